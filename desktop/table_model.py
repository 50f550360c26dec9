"""A read-only Qt model over a data frame that stays quick at a million rows.

The model keeps one reference per column (the frame's own numpy array, or its extension array
where there is no zero-copy numpy view) and formats a cell only when a view asks for it. It never
builds anything per row or per cell up front; ``rowCount`` is the frame's real length. Cells the
screening left out and cells the user set aside are marked from two small mappings keyed by
(frame row, column name), whose size is the number of marked cells.
"""

from __future__ import annotations

import math
from typing import Any, Mapping

import numpy as np
import pandas as pd
from PySide6.QtCore import QAbstractTableModel, QModelIndex, QPersistentModelIndex, Qt
from PySide6.QtGui import QColor, QFont, QGuiApplication, QPalette

from engine.text import visible

from .plain_text import tooltip

__all__ = ["FrameModel", "KIND_WORDS", "MARK_EXCLUDED", "MARK_SET_ASIDE", "format_cell", "number_text",
           "usual_decimals", "blend"]

MARK_EXCLUDED = "excluded"
MARK_SET_ASIDE = "set aside"

# How the header names each detected kind of column, and the one-sentence tooltip for it.
KIND_WORDS: Mapping[str, tuple[str, str]] = {
    "number": ("numbers", "Every filled cell of this column is a number."),
    "text": ("text", "This column holds text or labels, such as group names."),
    "mixed": ("numbers, some text", "This column holds numbers and some cells of text; the text "
              "cells cannot be measured and are left out."),
    "empty": ("empty", "This column has no filled cells."),
}

Index = QModelIndex | QPersistentModelIndex


def format_cell(value: Any) -> str:
    """The text of one cell: floats to 15 significant digits, missing values as an empty cell."""
    if value is None or value is pd.NA or value is pd.NaT:
        return ""
    if isinstance(value, (float, np.floating)):
        if math.isnan(value):
            return ""
        return f"{float(value):.15g}"
    if isinstance(value, (np.integer, np.bool_)):
        return str(value.item())
    return str(value)


_DECIMALS_SAMPLE = 1000  # values of a long column looked at to find how many decimals it is written with


def _decimals(text: str) -> int:
    return len(text) - text.index(".") - 1 if "." in text else 0


def usual_decimals(values: np.ndarray) -> int:
    """How many decimals the numbers of a column are most often written with (at 15 significant
    digits; ties go to the fewer). A long column is judged from a sample of its values."""
    n = len(values)
    if n > _DECIMALS_SAMPLE:
        picks = np.linspace(0, n - 1, _DECIMALS_SAMPLE).astype(np.intp)
        values = values[np.unique(np.concatenate([np.arange(_DECIMALS_SAMPLE // 4), picks]))]
    counts: dict[int, int] = {}
    for value in values.tolist():
        if value == value and not math.isinf(value):
            text = format(value, ".15g")
            if "e" not in text:
                places = _decimals(text)
                counts[places] = counts.get(places, 0) + 1
    return max(sorted(counts), key=counts.__getitem__) if counts else 0


def number_text(value: float, decimals: int = 0, mark: str = ".") -> str:
    """A number of a number column as the file wrote it: at least ``decimals`` decimals (so that
    826.0 in a column written with one decimal keeps its ".0"), never fewer than its own digits
    at 15 significant digits, with the file's decimal mark."""
    value = float(value)
    if math.isnan(value):
        return ""
    text = format(value, ".15g")
    if "e" not in text and decimals > _decimals(text) and not math.isinf(value):
        whole = len(str(int(abs(value))))
        places = min(decimals, max(0, 15 - whole))
        if places > _decimals(text):
            text = f"{value:.{places}f}"
    return text.replace(".", mark) if mark != "." else text


def _column_store(series: pd.Series) -> Any:
    """The frame's own storage of a column, indexable by position without a per-cell copy."""
    dtype = series.dtype
    if isinstance(dtype, np.dtype) or (isinstance(dtype, pd.StringDtype) and dtype.storage == "python"):
        return series.to_numpy(copy=False)
    return series.array


def blend(base: QColor, tint: QColor, amount: float) -> QColor:
    """``base`` moved ``amount`` (0 to 1) of the way towards ``tint``: a theme colour, tinted."""
    return QColor(round(base.red() + (tint.red() - base.red()) * amount),
                  round(base.green() + (tint.green() - base.green()) * amount),
                  round(base.blue() + (tint.blue() - base.blue()) * amount))


class FrameModel(QAbstractTableModel):
    """Rows and columns of ``table.frame``; the row header shows the row number in the file."""

    def __init__(self, parent: Any = None) -> None:
        super().__init__(parent)
        self._table: Any = None
        self._names: list[str] = []
        self._stores: list[Any] = []
        self._rows = 0
        self._kinds: Mapping[str, str] = {}
        self._excluded: Mapping[tuple[int, str], str] = {}
        self._set_aside: Mapping[tuple[int, str], str] = {}
        self._mark = "."  # the file's decimal mark
        self._places: dict[int, int | None] = {}  # column -> usual decimals (None: not a float column)

    # -- filling -------------------------------------------------------------------------------
    def set_table(self, table: Any) -> None:
        """Show ``table`` (an ``engine.io.Table``), or nothing for None."""
        self.beginResetModel()
        self._table = table
        frame = table.frame if table is not None else None
        if frame is None:
            self._names, self._stores, self._rows, self._kinds = [], [], 0, {}
        else:
            self._names = [str(name) for name in frame.columns]
            self._stores = [_column_store(frame.iloc[:, j]) for j in range(frame.shape[1])]
            self._rows = int(frame.shape[0])
            self._kinds = dict(getattr(table, "column_kinds", {}) or {})
        self._mark = getattr(table, "decimal", ".") or "." if table is not None else "."
        self._places = {}  # worked out per column when first shown: a wide file has many
        self._excluded, self._set_aside = {}, {}
        self.endResetModel()

    def set_marks(self, *, excluded: Mapping[tuple[int, str], str] | None = None,
                  set_aside: Mapping[tuple[int, str], str] | None = None) -> None:
        """Replace the marked cells: left out by the screening, and set aside by the user."""
        before = set(self._excluded) | set(self._set_aside)
        self._excluded = dict(excluded or {})
        self._set_aside = dict(set_aside or {})
        changed = before | set(self._excluded) | set(self._set_aside)
        self._announce(changed)

    def _announce(self, cells: set[tuple[int, str]]) -> None:
        """One bounded ``dataChanged`` over the rows and columns that hold changed marks."""
        places = [(row, self._names.index(col)) for row, col in cells
                  if col in self._names and 0 <= row < self._rows]
        if not places:
            return
        rows = [row for row, _ in places]
        cols = [col for _, col in places]
        self.dataChanged.emit(self.index(min(rows), min(cols)), self.index(max(rows), max(cols)))

    # -- reading -------------------------------------------------------------------------------
    @property
    def table(self) -> Any:
        return self._table

    def column_name(self, column: int) -> str:
        return self._names[column]

    def column_index(self, name: str) -> int:
        return self._names.index(name)

    def mark(self, row: int, column: int) -> tuple[str, str] | None:
        """``(MARK_SET_ASIDE or MARK_EXCLUDED, reason)`` for a marked cell, else None."""
        key = (row, self._names[column])
        if key in self._set_aside:
            return MARK_SET_ASIDE, self._set_aside[key]
        if key in self._excluded:
            return MARK_EXCLUDED, self._excluded[key]
        return None

    def cell_text(self, row: int, column: int) -> str:
        """The text the grid shows: a number of a number column as the file wrote it (see
        :func:`number_text`), anything else as :func:`format_cell` writes it."""
        places = self._places.get(column, -1)
        if places == -1:
            store = self._stores[column]
            floats = (self._kinds.get(self._names[column]) == "number" and isinstance(store, np.ndarray)
                      and store.dtype.kind == "f")
            places = self._places[column] = usual_decimals(store) if floats else None
        value = self._stores[column][row]
        if places is None:
            return format_cell(value)
        return number_text(value, places, self._mark)

    def file_row(self, row: int) -> int:
        """The row number a spreadsheet program would show for frame row ``row``."""
        table = self._table
        finder = getattr(table, "file_row", None)
        return int(finder(row)) if finder is not None else row + 1

    # -- the Qt model interface ---------------------------------------------------------------
    def rowCount(self, parent: Index = QModelIndex()) -> int:  # noqa: N802 - Qt's name
        return 0 if parent.isValid() else self._rows

    def columnCount(self, parent: Index = QModelIndex()) -> int:  # noqa: N802 - Qt's name
        return 0 if parent.isValid() else len(self._names)

    def flags(self, index: Index) -> Qt.ItemFlag:
        if not index.isValid():
            return Qt.ItemFlag.NoItemFlags
        return Qt.ItemFlag.ItemIsEnabled | Qt.ItemFlag.ItemIsSelectable

    def data(self, index: Index, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if not index.isValid():
            return None
        row, column = index.row(), index.column()
        if role == Qt.ItemDataRole.DisplayRole:
            return visible(self.cell_text(row, column))  # a line break or override shows as an escape
        if role == Qt.ItemDataRole.TextAlignmentRole:
            if self._kinds.get(self._names[column]) == "number":
                return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
            return int(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignVCenter)
        if role not in (Qt.ItemDataRole.ToolTipRole, Qt.ItemDataRole.BackgroundRole,
                        Qt.ItemDataRole.ForegroundRole, Qt.ItemDataRole.FontRole):
            return None
        if not self._excluded and not self._set_aside:
            return None
        marked = self.mark(row, column)
        if marked is None:
            return None
        kind, reason = marked
        if role == Qt.ItemDataRole.ToolTipRole:
            if kind == MARK_SET_ASIDE:
                return tooltip(f"You set this value aside: {reason}")
            return tooltip(f"Left out of the comparison: {reason}")
        palette = QGuiApplication.palette()
        if role == Qt.ItemDataRole.BackgroundRole:
            tint = palette.color(QPalette.ColorRole.Highlight) if kind == MARK_SET_ASIDE else \
                palette.color(QPalette.ColorRole.Text)
            return blend(palette.color(QPalette.ColorRole.Base), tint, 0.28 if kind == MARK_SET_ASIDE else 0.12)
        if role == Qt.ItemDataRole.ForegroundRole:
            return palette.color(QPalette.ColorRole.PlaceholderText) if kind == MARK_EXCLUDED else None
        font = QFont()
        font.setStrikeOut(kind == MARK_SET_ASIDE)
        font.setItalic(kind == MARK_EXCLUDED)
        return font

    def headerData(self, section: int, orientation: Qt.Orientation,  # noqa: N802 - Qt's name
                   role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if orientation == Qt.Orientation.Vertical:
            if role == Qt.ItemDataRole.DisplayRole:
                return str(self.file_row(section))
            if role == Qt.ItemDataRole.ToolTipRole:
                return f"Row {self.file_row(section)} of the file."
            return None
        if not 0 <= section < len(self._names):
            return None
        name = self._names[section]
        kind = self._kinds.get(name)
        if role == Qt.ItemDataRole.DisplayRole:
            shown = visible(name)
            return f"{shown}\n{KIND_WORDS[kind][0]}" if kind in KIND_WORDS else shown
        if role == Qt.ItemDataRole.ToolTipRole:
            return KIND_WORDS[kind][1] if kind in KIND_WORDS else tooltip(f"The column {name}.")
        return None
