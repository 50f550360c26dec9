"""The :class:`Table`: a file's cells as read, with what detection decided about them."""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import Mapping

import numpy as np
import pandas as pd

from ..results import Finding, frozen_mapping
from ._files import TEXT_KINDS

__all__ = ["Table", "with_rows_above", "remember_factors"]


@dataclass(frozen=True, eq=False)
class Table:
    """A data file read into a frame.

    ``frame`` holds the cells as read, one frame row per file row after the column names:
    clean numeric columns are float64, other columns text (or objects for spreadsheet cells).
    ``column_kinds`` maps each column to "number", "text", "mixed" or "empty". ``notes`` say
    in plain words what detection decided (encoding, delimiter, decimal mark, header, sheet).
    """

    path: Path
    kind: str
    frame: pd.DataFrame
    sheet: str | None
    sheet_names: tuple[str, ...]
    encoding: str | None
    delimiter: str | None
    decimal: str
    thousands: str | None
    header: bool
    column_kinds: Mapping[str, str]
    notes: tuple[Finding, ...]

    def __post_init__(self) -> None:
        object.__setattr__(self, "column_kinds", frozen_mapping(self.column_kinds))
        object.__setattr__(self, "notes", tuple(self.notes))
        object.__setattr__(self, "sheet_names", tuple(self.sheet_names))
        # file rows above the first frame row (blank lines, column names); readers may reset it
        object.__setattr__(self, "_rows_above", 1 if self.header else 0)
        object.__setattr__(self, "_numbers", {})
        object.__setattr__(self, "_factors", {})
        object.__setattr__(self, "_rising", {})
        object.__setattr__(self, "_whole", {})
        object.__setattr__(self, "_floats_judged", False)  # see _judge_float_columns
        object.__setattr__(self, "_breaks", _NOT_YET)  # rows with line breaks, found on first use
        object.__setattr__(self, "_levels", {})

    def file_row(self, frame_row: int) -> int:
        """The 1-based row number a user sees for ``frame_row`` in a spreadsheet, or the line
        where the row starts in a text editor.

        In a text file a quoted cell may hold line breaks; each one moves the rows below it
        down a line (worked out from the cells, once, on the first call).
        """
        line = int(frame_row) + 1 + self._rows_above
        if self._breaks is _NOT_YET:
            found = _rows_with_line_breaks(self) if self.kind in TEXT_KINDS else None
            object.__setattr__(self, "_breaks", found)
        breaks = self._breaks
        if breaks is None:
            return line
        rows, before = breaks
        return line + int(before[np.searchsorted(rows, frame_row, side="left")])

    def numbers(self, column: str):
        """The column as float64, NaN where a cell is not a number (cached per column)."""
        from .cells import coerce_numbers

        cache = self._numbers
        if column not in cache:
            values = coerce_numbers(self.frame[column], decimal=self.decimal, thousands=self.thousands)
            values.setflags(write=False)
            cache[column] = values
        return cache[column]


    def strictly_rising(self, column: str) -> bool:
        """True if the column is numeric and every value exceeds the one above it (cached)."""
        if column not in self._rising:
            rising = False
            if self.column_kinds[column] == "number" and len(self.frame) > 1:
                values = self.frame[column].to_numpy()
                head = values[:1000]
                rising = bool((head[1:] > head[:-1]).all() and (values[1:] > values[:-1]).all())
            self._rising[column] = rising
        return self._rising[column]

    def whole_numbers(self, column: str) -> bool:
        """True if the column holds at least one finite number and every finite number in it is
        a whole number (codes, counts, identifiers); cached per column."""
        if column not in self._whole and self.frame.shape[1] > _WIDE and not self._floats_judged:
            self._judge_float_columns()  # once: a column of text is judged by itself below
        if column not in self._whole:
            values = self.numbers(column)
            head = values[:1000]
            whole = bool(np.all((head == np.trunc(head)) | np.isnan(head)))
            if whole:  # trunc leaves infinities alone and turns no finite fraction whole
                missing = int(np.count_nonzero(np.isnan(values)))
                whole = int(np.count_nonzero(values == np.trunc(values))) == values.size - missing
                whole = whole and missing < values.size and bool(np.isfinite(values).any())
            self._whole[column] = whole
        return self._whole[column]

    def _judge_float_columns(self) -> None:
        """``whole_numbers`` for every float column at once: on thousands of columns one pass
        over the block beats a pass per column."""
        object.__setattr__(self, "_floats_judged", True)
        frame = self.frame
        positions = np.flatnonzero((frame.dtypes == np.float64).to_numpy())
        values = frame.iloc[:, positions].to_numpy()
        missing = np.isnan(values)
        with np.errstate(invalid="ignore"):
            whole = ((values == np.trunc(values)) | missing).all(axis=0)
        whole &= np.isfinite(values).any(axis=0)
        names = frame.columns.tolist()
        for position, answer in zip(positions.tolist(), whole.tolist()):
            self._whole.setdefault(names[position], answer)

    def factors(self, column: str) -> tuple[np.ndarray, list[str]]:
        """Integer codes of the column's cells (-1 for a missing cell) and the distinct cell
        texts they index (cached per column)."""
        from .cells import cell_text

        if column not in self._factors:
            codes, uniques = pd.factorize(self.frame[column], use_na_sentinel=True)
            if pd.api.types.infer_dtype(uniques, skipna=False) == "string":
                texts = np.asarray(uniques, dtype=object).tolist()  # texts already, none missing
            else:
                texts = [cell_text(u) for u in uniques]
            self._factors[column] = (codes, texts)
        return self._factors[column]


_NOT_YET = object()
_WIDE = 1_000  # columns; from here the float columns are judged together


def line_breaks(text: str) -> int:
    """How many line breaks a cell's text holds (CR LF, LF and a lone CR each count once)."""
    return text.count("\n") + text.count("\r") - text.count("\r\n")


def _may_hold_line_breaks(column: pd.Series) -> bool:
    """False when no cell of the column holds a line break (one search through all its texts
    joined, instead of a test per cell)."""
    if isinstance(column.dtype, pd.CategoricalDtype):
        texts = [str(c) for c in column.cat.categories]
    else:
        texts = [t for t in column.dropna().tolist() if isinstance(t, str)]
    joined = "".join(texts)
    return "\n" in joined or "\r" in joined


def _rows_with_line_breaks(table: Table) -> tuple[np.ndarray, np.ndarray] | None:
    """Frame rows whose cells hold line breaks (ascending) and, for each position in that list
    and one past it, the breaks in the rows before it; None when no cell holds one."""
    per_row = None
    frame = table.frame
    for position in np.flatnonzero((frame.dtypes != np.float64).to_numpy()):
        name = frame.columns[position]
        cells = frame.iloc[:, position]
        if not _may_hold_line_breaks(cells):
            continue
        codes, texts = table.factors(name)
        counts = np.array([line_breaks(t) for t in texts] + [0], dtype=np.int64)  # last: code -1
        if counts.any():
            per_row = counts[codes] if per_row is None else per_row + counts[codes]
    if per_row is None:
        return None
    rows = np.flatnonzero(per_row)
    before = np.concatenate([[0], np.cumsum(per_row[rows])])
    return rows, before


def with_rows_above(table: Table, rows_above: int) -> Table:
    """Record how many file rows sit above the first frame row (used by the readers)."""
    object.__setattr__(table, "_rows_above", int(rows_above))
    return table


def remember_factors(table: Table, column: str, codes: np.ndarray, texts: list[str]) -> None:
    """Store codes already known from the read (a column parsed as categories)."""
    table._factors[column] = (codes, texts)
