"""Workbooks (.xlsx, .xls, .ods) read with the calamine reader."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import ColumnProblem, FileProblem
from ..wording import plural
from ._files import one_line
from .cells import cell_text
from .sniff import has_header, title_note, title_rows, title_texts

__all__ = ["read_sheet", "sheet_names"]

_KIND_NAMES = {"xlsx": "a workbook (.xlsx)", "xls": "an older-format workbook (.xls)", "ods": "an OpenDocument spreadsheet (.ods)"}
_HEADER_SAMPLE = 200


def _open(path: Path, kind: str):
    from python_calamine import CalamineWorkbook

    try:
        return CalamineWorkbook.from_path(str(path))
    except PermissionError as error:
        raise FileProblem(
            f"{path.name} cannot be opened: permission denied (it may be locked by another "
            "program or need different access rights).") from error
    except Exception as error:  # calamine's zip/XML errors: the file is damaged or mislabelled
        raise FileProblem(
            f"{path.name} could not be read as {_KIND_NAMES[kind]}; it may be damaged or not "
            f"really a .{kind} file ({one_line(error, 80)}).") from error


def _cells(book, path: Path, name: str) -> pd.DataFrame:
    """The sheet's cells from row 1 down (blank cells as NaN), as calamine gives them."""
    try:
        rows = book.get_sheet_by_name(name).to_python(skip_empty_area=False)
    except Exception as error:
        raise FileProblem(f"Sheet '{name}' of {path.name} could not be read: {one_line(error, 100)}") from error
    frame = pd.DataFrame(rows, dtype=object) if rows else pd.DataFrame()
    for position in range(frame.shape[1]):
        column = frame.iloc[:, position]
        values = column.to_numpy()
        blank = column.isna().to_numpy() | (values == "")
        if blank.any():
            frame.isetitem(position, column.where(~blank, np.nan))
    return frame


def sheet_names(path: Path, kind: str) -> tuple[str, ...]:
    """The workbook's sheet names in order."""
    book = _open(path, kind)
    try:
        return tuple(str(name) for name in book.sheet_names)
    finally:
        book.close()


def _pick_sheet(path: Path, names: tuple[str, ...], sheet: str | None) -> str:
    if not names:
        raise FileProblem(f"{path.name} holds no sheets.")
    if sheet is None:
        return names[0]
    if sheet in names:
        return sheet
    loose = [n for n in names if n.strip().lower() == str(sheet).strip().lower()]
    if len(loose) == 1:
        return loose[0]
    listed = ", ".join(f"'{n}'" for n in names)
    raise ColumnProblem(f"{path.name} has no sheet '{sheet}'; its sheets are {listed}.")


def read_sheet(path: Path, kind: str, sheet: str | None):
    """Read one sheet into a :class:`engine.io.Table` (the first sheet by default).

    The cells come straight from python-calamine (the reader behind pandas' "calamine"
    engine): pandas' own per-cell conversion would double the time on large sheets.

    Leading blank rows are kept in the count so that ``Table.file_row`` gives the row number the
    spreadsheet shows; fully blank columns without a name are dropped.
    """
    from .read import build_table

    book = _open(path, kind)
    try:
        names = tuple(str(name) for name in book.sheet_names)
        chosen = _pick_sheet(path, names, sheet)
        raw = _cells(book, path, chosen)
    finally:
        book.close()
    others = [n for n in names if n != chosen]
    if raw.empty or raw.isna().all().all():
        hint = f"; the other sheets are {', '.join(repr(n) for n in others)}" if others else ""
        raise FileProblem(f"Sheet '{chosen}' of {path.name} is empty{hint}.")
    raw = raw.loc[:, raw.notna().any()]  # blank columns (calamine keeps the empty area)
    filled = raw.notna().any(axis=1).to_numpy()
    top = int(filled.argmax())
    body = raw.iloc[top:]
    sample = [[cell_text(v) for v in row] for row in body.head(_HEADER_SAMPLE).itertuples(index=False)]
    header, why = has_header(sample, ".", None)
    notes = [f"Read {_KIND_NAMES[kind]}, sheet '{chosen}'"
             + (f" (of {len(names)}: {', '.join(repr(n) for n in names)})." if len(names) > 1 else ".")]
    if top:
        notes.append(f"The first {plural(top, 'row')} of the sheet {plural(top, 'is', number=False)} blank "
                     f"and {plural(top, 'was', number=False)} passed over.")
    titles = title_rows(sample, body.shape[1])
    if titles:
        below = has_header(sample[titles:], ".", None)
        if below[0]:  # titles sit above column names; above bare data, every row is kept
            notes.append(title_note(title_texts(sample[:titles]), titles, "row"))
            header, why = below
            body, sample, top = body.iloc[titles:], sample[titles:], top + titles
    first = f"Row {top + 1}" if top else "The first row"
    notes.append((f"{first} holds column names: " if header else
                  f"{first} is data, not column names: ") + why + ".")
    if header:
        columns = list(body.iloc[0])
        body = body.iloc[1:]
    else:
        columns = list(range(body.shape[1]))
    frame = body.reset_index(drop=True).infer_objects()  # the header row made every column object
    frame.columns = columns if header else range(frame.shape[1])
    return build_table(path, kind, frame, notes=notes, rows_above=top + (1 if header else 0),
                       sheet=chosen, sheet_names=names, header=header)
