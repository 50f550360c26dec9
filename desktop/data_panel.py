"""The "Your data" panel: the file's cells in a read-only grid, and the screening in plain words.

Cells the screening left out are greyed and explain themselves on hover; a value the user sets
aside (a suspected slip of the pen) is struck through, carries the user's reason, and can be
brought back from the grid's menu or from the list beside it. Setting aside and bringing back
write the spec's ``set_aside`` (each cell by the file's row number and its text, through
``engine.pipeline.set_aside_cells``); the grid finds them again by ``set_aside_keys``. Nothing is
ever written to the file.

Run on its own for a quick look: ``python -m desktop.data_panel demo_files/bolt_strength.csv``.
"""

from __future__ import annotations

import bisect
import sys
from typing import Any, Callable, Mapping

from PySide6.QtCore import QItemSelectionModel, QPoint, QSize, Qt, QUrl
from PySide6.QtGui import QAction, QGuiApplication, QKeySequence
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHeaderView,
    QHBoxLayout,
    QInputDialog,
    QLabel,
    QMenu,
    QPushButton,
    QSplitter,
    QTableView,
    QTextBrowser,
    QVBoxLayout,
    QWidget,
)

from engine.text import visible, visible_html

from .plain_text import make_plain
from .table_model import MARK_SET_ASIDE, FrameModel

__all__ = ["DataPanel", "screening_html", "pairs_html", "pair_marks", "aside_order", "MAX_COPY_CELLS",
           "MAX_PAIR_PROBLEMS_LISTED"]

FIT_ROWS = 100  # rows looked at when fitting the column widths
MAX_COPY_CELLS = 200_000  # a larger selection is copied only up to this many cells
_BRING_BACK = "bring-back"
_SHOW_ROW = "show-row"
MAX_PAIR_PROBLEMS_LISTED = 200  # items the pairing left out, listed one by one; the rest are counted

AskReason = Callable[[str], "str | None"]


def _escape(text: object) -> str:
    return visible_html(text)  # text from the file, never markup


def _pairs(mapping: Any) -> list[tuple[Any, Any]]:
    if mapping is None:
        return []
    if isinstance(mapping, Mapping):
        return list(mapping.items())
    return list(mapping)


def _count(value: Any) -> int:
    if value is None:
        return 0
    if isinstance(value, int):
        return value
    return len(value)


def aside_order(set_aside: Mapping[tuple[int, str], str]) -> list[tuple[int, str]]:
    """The cells set aside in the order they are listed: by row, then column name."""
    return sorted(set_aside, key=lambda cell: (cell[0], str(cell[1])))


def screening_html(table: Any, screening: Any, *, set_aside: Mapping[tuple[int, str], str] | None = None,
                   problem: str | None = None, file_row: Callable[[int], int] | None = None,
                   pairs: Any = None) -> str:
    """The screening report as a short HTML page (no colours: the view's palette applies)."""
    parts: list[str] = []
    if table is None:
        return "<p>Open a data file to see here what was read and what will be compared.</p>"
    frame = table.frame
    parts.append(f"<p>{frame.shape[0]:,} rows and {frame.shape[1]} columns were read.</p>")
    for note in getattr(table, "notes", ()) or ():
        parts.append(f"<p>{_escape(note.text)}</p>")
    if problem:
        parts.append(f"<p><b>Not ready to compare:</b> {_escape(problem)}</p>")
    if pairs is not None:  # the pairs are what is compared: their count replaces the groups'
        parts.append(pairs_html(pairs))
    if screening is not None:
        parts.append(_groups_html(screening, paired=pairs is not None))
    if set_aside:
        finder = file_row or (lambda row: row + 1)
        items = []
        for number, (row, column) in enumerate(aside_order(set_aside)):
            items.append(f"<li>Row {finder(row)}, {_escape(column)}: {_escape(set_aside[(row, column)])} "
                         f"(<a href=\"{_BRING_BACK}:{number}\">bring back</a>)</li>")
        parts.append("<p><b>Values you set aside</b></p><ul>" + "".join(items) + "</ul>")
    return "\n".join(parts)


def _groups_html(screening: Any, *, paired: bool = False) -> str:
    """The screening in words; for a paired design without the two groups' counts (the pairs
    are what is compared) and without the question whether the groups are separate."""
    parts = []
    labels = tuple(getattr(screening, "labels", ()) or ())
    used = tuple(getattr(screening, "n_used", ()) or ())
    if labels and used and not paired:
        rows = "".join(f"<li>{_escape(label)}: {n:,} values</li>" for label, n in zip(labels, used))
        parts.append(f"<p><b>Compared</b> (group 1 first)</p><ul>{rows}</ul>")
    left_out = [(reason, n) for reason, n in _pairs(getattr(screening, "excluded_counts", None)) if n]
    if left_out:
        from engine.io.screening import EXCLUSION_WORDS  # loaded with the screening it words

        rows = "".join(f"<li>{_escape(EXCLUSION_WORDS.get(reason, reason))}: {n:,}</li>" for reason, n in left_out)
        parts.append(f"<p><b>Left out</b> (hover over a grey cell to see why)</p><ul>{rows}</ul>")
    others = _count(getattr(screening, "other_group_rows", 0))
    if others:
        parts.append(f"<p>{others:,} rows belong to other groups and are not part of this comparison.</p>")
    sign = getattr(screening, "paired", None)
    if sign is not None and not paired:
        parts.append(f"<p><b>Are these really two separate groups?</b> {_escape(sign.text)}</p>")
    shown = {sign.key} if sign is not None else set()
    findings = [f for f in getattr(screening, "findings", ()) or () if f.key not in shown
                and not (paired and f.key.startswith("pairs_"))]  # the pairs' list gives these item by item
    slips = [f for f in getattr(screening, "possible_slips", ()) or () if f not in findings]
    if findings or slips:
        rows = "".join(f"<li>{'<b>Check:</b> ' if f.severity == 'warning' else ''}{_escape(f.text)}</li>"
                       for f in (*findings, *slips))
        parts.append(f"<p><b>Noticed while reading</b></p><ul>{rows}</ul>")
    return "\n".join(parts)


def pairs_html(pairs: Any) -> str:
    """How the pairs were formed and what the pairing left out (``engine.io.pairs.PairedIntake``),
    each item with its file rows and a link that shows its first row in the grid."""
    from engine.io.pairs import PAIR_PROBLEMS  # loaded with the pairs it words

    labels = tuple(pairs.labels)
    parts = [f"<p><b>Pairs</b>: {pairs.n_pairs:,} units with a value in both "
             f"{_escape(labels[0])} and {_escape(labels[1])} (differences are {_escape(labels[0])} "
             f"minus {_escape(labels[1])}).</p>"]
    problems = tuple(pairs.problems)
    if not problems:
        parts.append("<p>Every unit found its partner: nothing was left out of the pairs.</p>")
        return "\n".join(parts)
    counts = "".join(f"<li>{_escape(PAIR_PROBLEMS.get(kind, kind))}: {n:,}</li>"
                     for kind, n in _pairs(pairs.counts) if n)
    parts.append(f"<p><b>Left out of the pairs</b> ({len(problems):,}; their cells are greyed in the grid)"
                 f"</p><ul>{counts}</ul>")
    items = []
    for item in problems[:MAX_PAIR_PROBLEMS_LISTED]:
        rows = tuple(item.file_rows)
        link = f" (<a href=\"{_SHOW_ROW}:{rows[0]}\">show row {rows[0]}</a>)" if rows else ""
        items.append(f"<li>{_escape(item.text)}{link}</li>")
    rest = len(problems) - MAX_PAIR_PROBLEMS_LISTED
    if rest > 0:
        items.append(f"<li>and {rest:,} more, counted above</li>")
    parts.append("<ul>" + "".join(items) + "</ul>")
    return "\n".join(parts)


def pair_marks(table: Any, spec: Any, pairs: Any) -> dict[tuple[int, str], str]:
    """The value cells of the rows the pairing left out, as (frame row, column) -> reason.

    A row is found by its file row number (the one the grid shows); the cells marked are the
    value column of the long layout, or both value columns of the wide one.
    """
    from engine.io.pairs import PAIR_PROBLEMS  # loaded with the pairs it words

    if table is None or pairs is None:
        return {}
    rows = len(table.frame)
    columns = [c for c in spec.value_columns if c in table.frame.columns]
    marks: dict[tuple[int, str], str] = {}
    for item in pairs.problems:
        why = f"left out of the pairs ({PAIR_PROBLEMS.get(item.kind, item.kind)})"
        for number in item.file_rows:
            frame_row = bisect.bisect_left(range(rows), number, key=table.file_row)
            if frame_row < rows and table.file_row(frame_row) == number:
                for column in columns:
                    marks.setdefault((frame_row, column), why)
    return marks


def _ask_reason(parent: QWidget) -> AskReason:
    def ask(where: str) -> str | None:
        dialog = QInputDialog(parent)
        dialog.setWindowTitle("Set a value aside")
        dialog.setLabelText(f"Why should {visible(where)} be left out? (The reason goes into the findings.)")
        make_plain(*dialog.findChildren(QLabel))  # ``where`` names a column of the file
        dialog.setTextValue("suspected slip when the value was written down")
        ok = dialog.exec() == QInputDialog.DialogCode.Accepted
        text = dialog.textValue()
        dialog.deleteLater()
        return text.strip() or "set aside" if ok else None
    return ask


class RowNumbers(QHeaderView):
    """The grid's row numbers, sized from the longest number rather than by asking the model
    for hundreds of labels (what the stock header does on every reset of a big file)."""

    def __init__(self, model: FrameModel, parent: QWidget | None = None) -> None:
        super().__init__(Qt.Orientation.Vertical, parent)
        self._frame_model = model
        self.setSectionsClickable(True)
        self.setHighlightSections(True)

    def sizeHint(self) -> QSize:  # noqa: N802 - Qt's name
        rows = self._frame_model.rowCount()
        last = self._frame_model.file_row(rows - 1) if rows else 1
        width = self.fontMetrics().horizontalAdvance("9" * len(str(last))) + 12
        return QSize(width, self.defaultSectionSize())


class DataPanel(QWidget):
    """The grid of the file's cells and, beside it, what was read and what will be compared."""

    def __init__(self, session: Any, parent: QWidget | None = None, *,
                 ask_reason: AskReason | None = None) -> None:
        super().__init__(parent)
        self._session = session
        self._ask = ask_reason or _ask_reason(self)
        self.model = FrameModel(self)

        self.heading = QLabel("Open a data file to begin.", self)
        self.heading.setTextFormat(Qt.TextFormat.RichText)  # its file name is escaped
        self.heading.setWordWrap(True)
        self.grid = QTableView(self)
        self.grid.setVerticalHeader(RowNumbers(self.model, self.grid))
        self.grid.setModel(self.model)
        self.grid.setObjectName("data_grid")
        self.grid.setToolTip("The cells of your file as they were read. The file itself is never changed.")
        self.grid.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectItems)
        self.grid.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.grid.setWordWrap(False)
        self.grid.setContextMenuPolicy(Qt.ContextMenuPolicy.CustomContextMenu)
        self.grid.customContextMenuRequested.connect(self._cell_menu)
        self.grid.verticalHeader().setDefaultSectionSize(self.grid.fontMetrics().height() + 6)
        self.grid.verticalHeader().setSectionResizeMode(self.grid.verticalHeader().ResizeMode.Fixed)
        self.grid.horizontalHeader().setDefaultSectionSize(self.grid.fontMetrics().averageCharWidth() * 14)
        self.grid.horizontalHeader().setHighlightSections(False)
        self.grid.setAccessibleName("Your data")
        copy_cells = QAction("Copy cells", self.grid)
        copy_cells.setShortcut(QKeySequence.StandardKey.Copy)
        copy_cells.setShortcutContext(Qt.ShortcutContext.WidgetShortcut)
        copy_cells.triggered.connect(self.copy_selection)
        self.grid.addAction(copy_cells)

        self.aside_button = QPushButton("Set value aside…", self)
        self.aside_button.setToolTip("Leave the selected value out of the comparison, with a reason you give.")
        self.aside_button.clicked.connect(self.set_aside_current)
        self.back_button = QPushButton("Bring value back", self)
        self.back_button.setToolTip("Put the selected value, which you set aside, back into the comparison.")
        self.back_button.clicked.connect(self.bring_back_current)

        self.report = QTextBrowser(self)
        self.report.setObjectName("screening_report")
        self.report.setOpenLinks(False)
        self.report.anchorClicked.connect(self._on_link)
        self.report.setToolTip("What was read from the file, what will be compared, and what was left out.")
        self.report.setAccessibleName("What was read")

        left = QWidget(self)
        left_column = QVBoxLayout(left)
        left_column.setContentsMargins(0, 0, 0, 0)
        left_column.addWidget(self.grid, 1)
        buttons = QHBoxLayout()
        buttons.addWidget(self.aside_button)
        buttons.addWidget(self.back_button)
        buttons.addStretch(1)
        left_column.addLayout(buttons)
        self.splitter = QSplitter(Qt.Orientation.Horizontal, self)
        self.splitter.addWidget(left)
        self.splitter.addWidget(self.report)
        self.splitter.setStretchFactor(0, 3)
        self.splitter.setStretchFactor(1, 2)
        column = QVBoxLayout(self)
        column.setContentsMargins(0, 0, 0, 0)
        column.addWidget(self.heading)
        column.addWidget(self.splitter, 1)
        self.setTabOrder(self.grid, self.aside_button)
        self.setTabOrder(self.aside_button, self.back_button)
        self.setTabOrder(self.back_button, self.report)

        self.grid.selectionModel().currentChanged.connect(self._update_buttons)
        session.subscribe(self._on_session)
        self._show_table(session.table)
        self._show_marks()

    # -- listening -----------------------------------------------------------------------------
    def _on_session(self, name: str, value: Any) -> None:
        if name == "table":
            self._show_table(value)
        if name in ("table", "intake", "spec", "problem"):
            self._show_marks()

    def _show_table(self, table: Any) -> None:
        if table is self.model.table:
            return
        self.model.set_table(table)
        if table is not None:
            self._fit_columns()
            self.share_width()
        if table is None:
            self.heading.setText("Open a data file to begin.")
        else:
            path = self._session.path
            name = path.name if path is not None else "the data"
            sheet = getattr(table, "sheet", None)
            where = f"{name}, sheet {sheet}" if sheet else name
            self.heading.setText(f"<b>{_escape(where)}</b>: {table.frame.shape[0]:,} rows, "
                                 f"{table.frame.shape[1]} columns")
        self._update_buttons()

    def _fit_columns(self) -> None:
        """Widen each column to its name and the first rows' cells (never all of a big file)."""
        header = self.grid.horizontalHeader()
        metrics = self.grid.fontMetrics()
        padding = metrics.averageCharWidth() * 3
        widest = metrics.averageCharWidth() * 40
        rows = range(min(FIT_ROWS, self.model.rowCount()))
        for column in range(self.model.columnCount()):
            title = str(self.model.headerData(column, Qt.Orientation.Horizontal) or "")
            width = max((header.fontMetrics().horizontalAdvance(line) for line in title.split("\n")), default=0)
            for row in rows:
                width = max(width, metrics.horizontalAdvance(self.model.cell_text(row, column)))
            header.resizeSection(column, min(widest, width + padding))

    def share_width(self) -> None:
        """Give the grid the width its columns need (between a third and two thirds of the
        panel) and the words beside it the rest."""
        total = sum(self.splitter.sizes())
        if total <= 0 or self.model.columnCount() == 0:
            return
        grid = self.grid
        natural = (grid.verticalHeader().sizeHint().width() + grid.horizontalHeader().length()
                   + grid.verticalScrollBar().sizeHint().width() + 2 * grid.frameWidth() + 4)
        left = round(min(max(natural, total * 0.35), total * 0.65))
        self.splitter.setSizes([left, total - left])

    def _show_marks(self) -> None:
        intake = self._session.intake
        screening = getattr(intake, "screening", None)
        excluded = {}
        if screening is not None:
            from engine.io.screening import EXCLUSION_WORDS  # loaded with the screening it words

            for item in screening.exclusions:
                why = EXCLUSION_WORDS.get(item.reason, item.reason)
                excluded[(int(item.frame_row), str(item.column))] = f"{why} ('{item.text}')" if item.text else why
        pairs = getattr(intake, "pairs", None) if self._session.spec.design == "paired" else None
        for cell, why in pair_marks(self._session.table, self._session.spec, pairs).items():
            excluded.setdefault(cell, why)  # a blank cell keeps the screening's own reason
        set_aside = self._set_aside()
        self.model.set_marks(excluded=excluded, set_aside=set_aside)
        self.report.setHtml(screening_html(self._session.table, screening, set_aside=set_aside,
                                           problem=self._session.problem, file_row=self.model.file_row,
                                           pairs=pairs))
        self._update_buttons()

    # -- setting aside -------------------------------------------------------------------------
    def _set_aside(self) -> dict[tuple[int, str], str]:
        """The spec's cells set aside that the table on show holds, as (frame row, column) ->
        reason (one that is gone or changed stays in the spec: forming the groups says which)."""
        return self._cells_set_aside()[0]

    def _cells_set_aside(self) -> tuple[dict[tuple[int, str], str], tuple[Any, ...]]:
        from engine.errors import TwofoldError
        from engine.pipeline import set_aside_keys

        table, cells = self._session.table, self._session.spec.set_aside
        found: dict[tuple[int, str], str] = {}
        unfit = []
        for cell in cells if table is not None else ():
            try:
                found.update(set_aside_keys(table, (cell,)))
            except TwofoldError:
                unfit.append(cell)
        return found, tuple(unfit)

    def _write_set_aside(self, marks: Mapping[tuple[int, str], str]) -> None:
        from engine.pipeline import set_aside_cells

        unfit = self._cells_set_aside()[1]
        self._session.choose(set_aside=unfit + set_aside_cells(self._session.table, marks))

    def set_aside(self, row: int, column: str, reason: str) -> None:
        """Leave the value at (frame row, column) out of the comparison, for ``reason``."""
        marks = self._set_aside()
        marks[(int(row), str(column))] = reason
        self._write_set_aside(marks)

    def bring_back(self, row: int, column: str) -> None:
        """Put a value set aside back into the comparison."""
        marks = self._set_aside()
        marks.pop((int(row), str(column)), None)
        self._write_set_aside(marks)

    def set_aside_current(self) -> None:
        index = self.grid.currentIndex()
        if not index.isValid():
            return
        column = self.model.column_name(index.column())
        where = f"the value {self.model.cell_text(index.row(), index.column()) or '(empty)'} " \
                f"in row {self.model.file_row(index.row())}, column {column},"
        reason = self._ask(where)
        if reason:
            self.set_aside(index.row(), column, reason)

    def bring_back_current(self) -> None:
        index = self.grid.currentIndex()
        if index.isValid():
            self.bring_back(index.row(), self.model.column_name(index.column()))

    def _update_buttons(self, *_: Any) -> None:
        index = self.grid.currentIndex()
        marked = self.model.mark(index.row(), index.column()) if index.isValid() else None
        is_aside = marked is not None and marked[0] == MARK_SET_ASIDE
        self.aside_button.setEnabled(index.isValid() and not is_aside)
        self.back_button.setEnabled(is_aside)

    def _cell_menu(self, point: QPoint) -> None:
        index = self.grid.indexAt(point)
        if not index.isValid():
            return
        self.grid.setCurrentIndex(index)
        menu = QMenu(self)
        marked = self.model.mark(index.row(), index.column())
        if marked is not None and marked[0] == MARK_SET_ASIDE:
            menu.addAction("Bring this value back", self.bring_back_current)
        else:
            menu.addAction("Set this value aside…", self.set_aside_current)
        menu.addAction("Copy", self.copy_selection)
        menu.exec(self.grid.viewport().mapToGlobal(point))

    def _on_link(self, url: QUrl) -> None:
        if url.scheme() == _SHOW_ROW:
            self._show_file_row(url.path())
            return
        if url.scheme() != _BRING_BACK:
            return
        cells = aside_order(self._set_aside())
        number = int(url.path()) if url.path().isdigit() else -1
        if 0 <= number < len(cells):
            self.bring_back(*cells[number])

    # -- copying cells -------------------------------------------------------------------------
    def selection_text(self) -> str:
        """The selected cells as tab-separated lines (the bounding box of the selection)."""
        ranges = self.grid.selectionModel().selection()
        if ranges.isEmpty():
            return ""
        top = min(r.top() for r in ranges)
        bottom = max(r.bottom() for r in ranges)
        left = min(r.left() for r in ranges)
        right = max(r.right() for r in ranges)
        width = right - left + 1
        bottom = min(bottom, top + max(1, MAX_COPY_CELLS // width) - 1)
        lines = ("\t".join(self.model.cell_text(row, col) for col in range(left, right + 1))
                 for row in range(top, bottom + 1))
        return "\n".join(lines)

    def copy_selection(self) -> None:
        text = self.selection_text()
        if text:
            QGuiApplication.clipboard().setText(text)

    def _show_file_row(self, text: str) -> None:
        """Make the row the file numbers ``text`` current in the grid, at its first value column."""
        table = self.model.table
        if table is None or not text.isdigit():
            return
        rows, number = self.model.rowCount(), int(text)
        frame_row = bisect.bisect_left(range(rows), number, key=self.model.file_row)
        if frame_row >= rows:
            return
        values = [c for c in self._session.spec.value_columns if c in table.frame.columns]
        self.select_cell(frame_row, values[0] if values else self.model.column_name(0))

    def select_cell(self, row: int, column: str) -> None:
        """Make (frame row, column) the current cell and show it."""
        index = self.model.index(row, self.model.column_index(column))
        self.grid.selectionModel().setCurrentIndex(index, QItemSelectionModel.SelectionFlag.ClearAndSelect)
        self.grid.scrollTo(index)

    def cleanup(self) -> None:
        """Stop listening to the session."""
        self._session.unsubscribe(self._on_session)


if __name__ == "__main__":  # pragma: no cover - a quick look by hand
    from .panel_alone import show_alone

    sys.exit(show_alone(DataPanel, sys.argv))
