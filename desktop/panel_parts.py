"""Pieces the panels share: a selectable label, a part's heading, a hint over a scrolling body,
a button that shows more, and a layout that wraps its widgets like words."""

from __future__ import annotations

from PySide6.QtCore import QPoint, QRect, QSize, Qt
from PySide6.QtWidgets import QFrame, QLabel, QLayout, QScrollArea, QToolButton, QVBoxLayout, QWidget

from .plain_text import plain_label

__all__ = ["FlowLayout", "disclosure_button", "heading", "hint_and_body", "text_label"]


def text_label(text: str = "", *, rich: bool = False) -> QLabel:
    """A word-wrapped label whose text can be selected (plain text unless ``rich``)."""
    label = QLabel(text)
    label.setWordWrap(True)
    label.setTextFormat(Qt.TextFormat.RichText if rich else Qt.TextFormat.PlainText)
    label.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
    return label


def heading(text: str) -> QLabel:
    """A bold, slightly larger label for the parts of a panel (plain text: it may name a group)."""
    label = plain_label(text)
    font = label.font()
    font.setBold(True)
    font.setPointSizeF(font.pointSizeF() * 1.1)
    label.setFont(font)
    return label


def hint_and_body(panel: QWidget, hint: str) -> tuple[QLabel, QScrollArea, QVBoxLayout]:
    """Give ``panel`` a centred hint (shown while there is nothing to show) and a scrolling body.

    Returns the hint, the scroll area and the layout of the body to fill.
    """
    outer = QVBoxLayout(panel)
    outer.setContentsMargins(0, 0, 0, 0)
    label = plain_label(hint)
    label.setWordWrap(True)
    label.setAlignment(Qt.AlignmentFlag.AlignCenter)
    outer.addWidget(label)
    scroll = QScrollArea()
    scroll.setWidgetResizable(True)
    scroll.setFrameShape(QFrame.Shape.NoFrame)
    outer.addWidget(scroll)
    body = QWidget()
    scroll.setWidget(body)
    return label, scroll, QVBoxLayout(body)


def disclosure_button(text: str, shows: QWidget) -> QToolButton:
    """A button with an arrow that shows ``shows`` while pressed in (hidden at first)."""
    button = QToolButton()
    button.setCheckable(True)
    button.setText(text)
    button.setToolButtonStyle(Qt.ToolButtonStyle.ToolButtonTextBesideIcon)
    button.setArrowType(Qt.ArrowType.RightArrow)
    shows.setVisible(False)

    def toggle(shown: bool) -> None:
        shows.setVisible(shown)
        button.setArrowType(Qt.ArrowType.DownArrow if shown else Qt.ArrowType.RightArrow)

    button.toggled.connect(toggle)
    return button


class FlowLayout(QLayout):
    """Lays its widgets out left to right and starts a new line where the width runs out."""

    def __init__(self, parent: QWidget | None = None, *, spacing: int = 12) -> None:
        super().__init__(parent)
        self._items: list = []
        self._spacing = spacing
        self.setContentsMargins(0, 0, 0, 0)

    def addItem(self, item) -> None:  # noqa: N802 - Qt's name
        self._items.append(item)
        self.invalidate()  # the layouts around this one must ask for its new size

    def count(self) -> int:
        return len(self._items)

    def itemAt(self, index: int):  # noqa: N802 - Qt's name
        return self._items[index] if 0 <= index < len(self._items) else None

    def takeAt(self, index: int):  # noqa: N802 - Qt's name
        if not 0 <= index < len(self._items):
            return None
        self.invalidate()
        return self._items.pop(index)

    def expandingDirections(self) -> Qt.Orientation:  # noqa: N802 - Qt's name
        return Qt.Orientation(0)

    def hasHeightForWidth(self) -> bool:  # noqa: N802 - Qt's name
        return True

    def heightForWidth(self, width: int) -> int:  # noqa: N802 - Qt's name
        return self._place(QRect(0, 0, width, 0), move=False)

    def setGeometry(self, rect: QRect) -> None:  # noqa: N802 - Qt's name
        super().setGeometry(rect)
        self._place(rect, move=True)

    def sizeHint(self) -> QSize:  # noqa: N802 - Qt's name
        return self.minimumSize()

    def minimumSize(self) -> QSize:  # noqa: N802 - Qt's name
        size = QSize()
        for item in self._items:
            size = size.expandedTo(item.minimumSize())
        return size

    def _place(self, rect: QRect, *, move: bool) -> int:
        x, y, line = rect.x(), rect.y(), 0
        for item in self._items:
            hint = item.sizeHint()
            if x > rect.x() and x + hint.width() > rect.right() + 1:
                x, y, line = rect.x(), y + line + self._spacing // 2, 0
            if move:
                item.setGeometry(QRect(QPoint(x, y), hint))
            x += hint.width() + self._spacing
            line = max(line, hint.height())
        return y + line - rect.y()
