"""Text from the file shown as text in Qt widgets, never as markup.

A QLabel, a tooltip or a dialog's label guesses whether its text is HTML (``Qt.AutoText``): a
group called ``<font size=7 color=red>HUGE</font>`` would be drawn huge and red, and an
``<img width=900 height=700>`` label would blow the widget up. The helpers here fix the format
to plain text, or, where Qt insists on guessing (tooltips), hand it HTML with the text escaped.
Control and direction characters are written as visible escapes (:func:`engine.text.visible`).
"""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import QLabel, QWidget

from engine.text import visible_html

__all__ = ["plain_label", "make_plain", "tooltip"]


def make_plain(*labels: QLabel) -> None:
    """Show the text of each label as it is, whatever it looks like."""
    for label in labels:
        label.setTextFormat(Qt.TextFormat.PlainText)


def plain_label(text: str = "", parent: QWidget | None = None) -> QLabel:
    """A QLabel that shows ``text`` (and any later text) as plain text."""
    label = QLabel(parent)
    make_plain(label)
    label.setText(text)
    return label


def tooltip(text: str) -> str:
    """A tooltip that shows ``text`` literally.

    Qt renders a tooltip as HTML when it looks like HTML; wrapped in a span with the text
    escaped, it is HTML always, and its markup characters are shown as they are.
    """
    return f"<span>{visible_html(text)}</span>"
