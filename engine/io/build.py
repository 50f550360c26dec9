"""``build_table``: a frame freshly parsed from a text file or a sheet, settled into a :class:`Table`.

Both readers end here: column names cleaned, blank rows at the end passed over, each column's
kind settled, and the table built once with everything it holds.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import FileProblem
from ..results import Finding
from ..wording import plural
from .cells import settle_column
from .sniff import TextFormat
from .table import MANY_FLOAT_COLUMNS, Table, line_breaks

__all__ = ["build_table"]


def build_table(
    path: Path,
    kind: str,
    frame: pd.DataFrame,
    *,
    fmt: TextFormat | None = None,
    encoding: str | None = None,
    notes: list[str],
    rows_above: int,
    sheet: str | None = None,
    sheet_names: tuple[str, ...] = (),
    header: bool | None = None,
) -> Table:
    """Settle names, kinds and blank rows of a freshly parsed frame and wrap it in a Table."""
    header = fmt.header if fmt is not None else bool(header)
    decimal = fmt.decimal if fmt is not None else "."
    thousands = fmt.thousands if fmt is not None else None
    if frame.shape[1] == 0:
        raise FileProblem(f"{path.name} holds no columns.")
    names, name_notes = _clean_names(list(frame.columns), header)
    notes = notes + name_notes
    frame, trailing = _trim_blank_tail(frame)
    if trailing:
        notes.append(f"{plural(trailing, 'blank row')} at the end {plural(trailing, 'was', number=False)} "
                     "passed over.")
    if len(frame) == 0:
        where = f"sheet '{sheet}' of {path.name}" if sheet else path.name
        raise FileProblem(f"{where} has column names but no rows of data." if header
                          else f"{where} holds no data.")
    frame = frame.set_axis(names, axis=1)
    kinds: dict[str, str] = {}
    factors: dict[str, tuple[np.ndarray, list[str]]] = {}
    floats = (frame.dtypes == np.float64).to_numpy(copy=True)
    if floats.sum() > MANY_FLOAT_COLUMNS:  # thousands of float columns: judged at once, not one by one
        blank = np.isnan(frame.iloc[:, np.flatnonzero(floats)].to_numpy()).all(axis=0)
        for position, empty in zip(np.flatnonzero(floats), blank):
            kinds[names[position]] = "empty" if empty else "number"
    else:
        floats[:] = False
    for position, name in enumerate(names):
        if floats[position]:
            continue
        column = frame.iloc[:, position]
        if isinstance(column.dtype, pd.CategoricalDtype):
            factors[name] = (column.cat.codes.to_numpy(), [str(c) for c in column.cat.categories])
        settled, kinds[name] = settle_column(column, decimal=decimal, thousands=thousands)
        if settled is not column:
            frame.isetitem(position, settled)
    kinds = {name: kinds[name] for name in names}  # in file order
    if not isinstance(frame.index, pd.RangeIndex) or frame.index.start != 0:
        frame = frame.reset_index(drop=True)
    return Table(
        path=path, kind=kind, frame=frame, sheet=sheet, sheet_names=sheet_names,
        encoding=encoding, delimiter=fmt.delimiter if fmt is not None else None,
        decimal=decimal, thousands=thousands, header=header, column_kinds=kinds,
        notes=tuple(Finding(f"read_{i}", "info", text) for i, text in enumerate(notes)),
        rows_above=rows_above,
        read_factors={name: found for name, found in factors.items() if kinds[name] in ("text", "mixed")},
    )


def _clean_names(names: list[object], header: bool) -> tuple[list[str], list[str]]:
    """Column names as text: trimmed, blanks named by position, repeats numbered."""
    notes: list[str] = []
    clean: list[str] = []
    seen: set[str] = set()
    for j, raw in enumerate(names):
        text = "" if raw is None or (isinstance(raw, float) and np.isnan(raw)) else str(raw)
        if isinstance(raw, float) and raw.is_integer():
            text = str(int(raw))
        name = " ".join(text.split()) if ("\n" in text or "\r" in text) else text.strip()
        if not header or not name or name.startswith("Unnamed: "):
            name = f"column {j + 1}"
            if header:
                notes.append(f"Column {j + 1} has no name; it is called '{name}'.")
        base, k = name, 2
        while name in seen:
            name = f"{base} ({k})"
            k += 1
        if header and name != text and text and not text.startswith("Unnamed: "):
            if line_breaks(text):
                notes.append(f"The name of column {j + 1} is written on {line_breaks(text) + 1} "
                             f"lines; it is used as '{name}'.")
            else:
                notes.append(f"Column name '{text}' is used as '{name}'.")
        seen.add(name)
        clean.append(name)
    return clean, notes


def _trim_blank_tail(frame: pd.DataFrame) -> tuple[pd.DataFrame, int]:
    end = len(frame)
    while end > 0 and frame.iloc[end - 1].isna().all():
        end -= 1
    return (frame.iloc[:end] if end < len(frame) else frame), len(frame) - end
