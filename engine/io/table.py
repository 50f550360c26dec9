"""The :class:`Table`: a file's cells as read, with what detection decided about them."""

from __future__ import annotations

from dataclasses import InitVar, dataclass, field
from pathlib import Path
from typing import Mapping

import numpy as np
import pandas as pd

from ..results import Finding, frozen_mapping
from ._files import TEXT_KINDS
from .cells import cell_text, coerce_numbers

__all__ = ["Table", "Spellings", "line_breaks", "MANY_FLOAT_COLUMNS"]

MANY_FLOAT_COLUMNS = 1_000  # from here the float columns are judged together, in one pass


@dataclass(frozen=True, eq=False)
class Table:
    """A data file read into a frame.

    ``frame`` holds the cells as read, one frame row per file row after the column names:
    clean numeric columns are float64, other columns text (or objects for spreadsheet cells).
    ``column_kinds`` maps each column to "number", "text", "mixed" or "empty". ``notes`` say
    in plain words what detection decided (encoding, delimiter, decimal mark, header, sheet).
    ``rows_above`` counts the file rows above the first frame row (1 with a header row, 0
    without, unless the reader says more). ``read_factors`` (given at construction only) are
    codes the reader already holds for some columns (columns parsed as categories).

    A table never changes once built. What its methods work out from the cells (numbers,
    codes, trimmed labels, row numbers) is kept for the next call in a memo made with the
    table, arrays read-only; every entry follows from the cells alone.
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
    rows_above: int | None = None
    read_factors: InitVar[Mapping[str, tuple[np.ndarray, list[str]]] | None] = None
    _memo: "_Memo" = field(init=False, repr=False, compare=False)

    def __post_init__(self, read_factors: Mapping[str, tuple[np.ndarray, list[str]]] | None) -> None:
        object.__setattr__(self, "column_kinds", frozen_mapping(self.column_kinds))
        object.__setattr__(self, "notes", tuple(self.notes))
        object.__setattr__(self, "sheet_names", tuple(self.sheet_names))
        # file rows above the first frame row (blank lines, titles, column names)
        above = (1 if self.header else 0) if self.rows_above is None else int(self.rows_above)
        object.__setattr__(self, "rows_above", above)
        memo = _Memo()
        for column, (codes, texts) in (read_factors or {}).items():
            memo.factors[column] = (_read_only(codes), list(texts))
        object.__setattr__(self, "_memo", memo)

    def file_row(self, frame_row: int) -> int:
        """The 1-based row number a user sees for ``frame_row`` in a spreadsheet, or the line
        where the row starts in a text editor.

        In a text file a quoted cell may hold line breaks; each one moves the rows below it
        down a line (worked out from the cells, once, on the first call).
        """
        line = int(frame_row) + 1 + self.rows_above
        memo = self._memo
        if memo.breaks is _NOT_YET:
            memo.breaks = _rows_with_line_breaks(self) if self.kind in TEXT_KINDS else None
        breaks = memo.breaks
        if breaks is None:
            return line
        rows, before = breaks
        return line + int(before[np.searchsorted(rows, frame_row, side="left")])

    def numbers(self, column: str):
        """The column as float64, NaN where a cell is not a number (cached per column)."""
        cache = self._memo.numbers
        if column not in cache:
            values = coerce_numbers(self.frame[column], decimal=self.decimal, thousands=self.thousands)
            cache[column] = _read_only(values)
        return cache[column]

    def strictly_rising(self, column: str) -> bool:
        """True if the column is numeric and every value exceeds the one above it (cached)."""
        cache = self._memo.rising
        if column not in cache:
            rising = False
            if self.column_kinds[column] == "number" and len(self.frame) > 1:
                values = self.frame[column].to_numpy()
                head = values[:1000]
                rising = bool((head[1:] > head[:-1]).all() and (values[1:] > values[:-1]).all())
            cache[column] = rising
        return cache[column]

    def whole_numbers(self, column: str) -> bool:
        """True if the column holds at least one finite number and every finite number in it is
        a whole number (codes, counts, identifiers); cached per column."""
        memo = self._memo
        if column not in memo.whole and self.frame.shape[1] > MANY_FLOAT_COLUMNS and not memo.floats_judged:
            self._judge_float_columns()  # once: a column of text is judged by itself below
        if column not in memo.whole:
            values = self.numbers(column)
            head = values[:1000]
            whole = bool(np.all((head == np.trunc(head)) | np.isnan(head)))
            if whole:  # trunc leaves infinities alone and turns no finite fraction whole
                missing = int(np.count_nonzero(np.isnan(values)))
                whole = int(np.count_nonzero(values == np.trunc(values))) == values.size - missing
                whole = whole and missing < values.size and bool(np.isfinite(values).any())
            memo.whole[column] = whole
        return memo.whole[column]

    def _judge_float_columns(self) -> None:
        """``whole_numbers`` for every float column at once: on thousands of columns one pass
        over the block beats a pass per column."""
        self._memo.floats_judged = True
        frame = self.frame
        positions = np.flatnonzero((frame.dtypes == np.float64).to_numpy())
        values = frame.iloc[:, positions].to_numpy()
        missing = np.isnan(values)
        with np.errstate(invalid="ignore"):
            whole = ((values == np.trunc(values)) | missing).all(axis=0)
        whole &= np.isfinite(values).any(axis=0)
        names = frame.columns.tolist()
        for position, answer in zip(positions.tolist(), whole.tolist()):
            self._memo.whole.setdefault(names[position], answer)

    def factors(self, column: str) -> tuple[np.ndarray, list[str]]:
        """Integer codes of the column's cells (-1 for a missing cell) and the distinct cell
        texts they index (cached per column)."""
        cache = self._memo.factors
        if column not in cache:
            codes, uniques = pd.factorize(self.frame[column], use_na_sentinel=True)
            if pd.api.types.infer_dtype(uniques, skipna=False) == "string":
                texts = np.asarray(uniques, dtype=object).tolist()  # texts already, none missing
            else:
                texts = [cell_text(u) for u in uniques]
            cache[column] = (_read_only(codes), texts)
        return cache[column]

    def levels(self, column: str) -> tuple[list[str], np.ndarray, "Spellings"]:
        """Trimmed labels in order of first appearance, each row's label index (-1 for a blank
        label), and the raw spellings merged under each trimmed label (cached per column)."""
        cache = self._memo.levels
        if column not in cache:
            cache[column] = _trimmed_levels(*self.factors(column))
        return cache[column]


class _Memo:
    """What a :class:`Table` has worked out from its cells, kept for the next call."""

    __slots__ = ("numbers", "factors", "levels", "rising", "whole", "floats_judged", "breaks")

    def __init__(self) -> None:
        self.numbers: dict[str, np.ndarray] = {}
        self.factors: dict[str, tuple[np.ndarray, list[str]]] = {}
        self.levels: dict[str, tuple[list[str], np.ndarray, Spellings]] = {}
        self.rising: dict[str, bool] = {}
        self.whole: dict[str, bool] = {}
        self.floats_judged = False  # see Table._judge_float_columns
        self.breaks: object = _NOT_YET  # rows with line breaks, found on first use


def _read_only(values: np.ndarray) -> np.ndarray:
    """A read-only view of the array (its owner, a frame perhaps, keeps its own flags)."""
    if values.flags.writeable:
        values = values.view()
        values.setflags(write=False)
    return values


def _trimmed_levels(codes: np.ndarray, texts: list[str]) -> tuple[list[str], np.ndarray, "Spellings"]:
    count = len(texts)
    # the first row of each distinct text (codes.size for a text never used), in one sort
    firsts = np.full(count, codes.size, dtype=np.int64)
    used, where = np.unique(codes, return_index=True)
    keep = used >= 0
    firsts[used[keep]] = where[keep]
    trimmed = [t.strip() for t in texts]
    stripped = np.empty(count, dtype=object)
    stripped[:] = trimmed
    order = np.argsort(firsts, kind="stable")
    order = order[(firsts[order] < codes.size) & (stripped[order] != "")]
    in_order = stripped[order]
    if trimmed == texts:  # nothing to trim (a list comparison in C)
        label_codes, labels = np.arange(order.size), in_order.tolist()  # distinct texts already
    else:  # labels numbered by first appearance: factorize keeps the order it meets them in
        label_codes, uniques = pd.factorize(in_order) if order.size else (np.array([], dtype=np.intp), [])
        labels = list(uniques)
    # label index per code, in the smallest integer type; the last slot serves code -1
    remap = np.full(count + 1, -1, dtype=np.min_scalar_type(-count - 1))
    remap[order] = label_codes
    return labels, _read_only(remap[codes]), Spellings(texts, remap[:-1], labels)


class Spellings:
    """The raw spellings merged under each trimmed label, worked out for a label when asked
    (a column of a million labels needs none of them)."""

    def __init__(self, texts: list[str], remap: np.ndarray, labels: list[str]) -> None:
        self._texts, self._remap, self._labels = texts, remap, labels

    def __getitem__(self, label: str) -> set[str]:
        try:
            index = self._labels.index(label)
        except ValueError:
            raise KeyError(label) from None
        return {self._texts[k] for k in np.flatnonzero(self._remap == index)}


_NOT_YET = object()


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
