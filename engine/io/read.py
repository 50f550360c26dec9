"""``read_table``: a .csv/.tsv/.txt/.xlsx/.xls/.ods file into a :class:`Table`."""

from __future__ import annotations

import csv
import re
import warnings
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import FileProblem, about_file
from ._files import (
    HEAD_BYTES,
    SHEET_KINDS,
    TEXT_MEMORY_FACTOR,
    available_memory,
    check_memory,
    check_path,
    one_line,
    read_head,
    wrap_unexpected,
)
from .build import build_table
from .sniff import DELIMITER_NAMES, TextFormat, sniff_text
from .table import Table, line_breaks

__all__ = ["read_table"]


def read_table(path: str | Path, *, sheet: str | None = None) -> Table:
    """Read a data file into a :class:`Table`, detecting its format.

    Parameters
    ----------
    path : str or pathlib.Path
        A .csv, .tsv, .txt, .xlsx, .xls or .ods file. It is opened read-only.
    sheet : str, optional
        For a workbook, the sheet to read (the first sheet by default). Ignored, with a note,
        for text files.

    Returns
    -------
    Table

    Raises
    ------
    FileProblem
        Missing, unreadable, empty, binary, of an unknown type, or broken.
    ColumnProblem
        The sheet asked for does not exist (the message lists the sheets).

    Notes
    -----
    Text files: encoding, delimiter, decimal mark, thousands separator and header row are
    detected on the first 64 KiB (see :func:`engine.io.sniff.sniff_text`); pandas' C parser then
    reads the whole file with those settings. Only blank cells are taken as missing at this
    stage, so texts such as "n/a" stay visible; columns whose cells are all numbers become
    float64. Workbooks are read with the calamine reader.

    References
    ----------
    pandas documentation, ``pandas.read_csv`` and ``pandas.read_excel`` (engine "calamine").
    """
    path, kind = check_path(path)
    head, size = read_head(path)
    if size == 0 or (kind not in SHEET_KINDS and not head.strip(b" \t\r\n\x00\xef\xbb\xbf\xff\xfe")):
        raise FileProblem(f"{path.name} is empty.")
    if kind not in SHEET_KINDS and size > HEAD_BYTES:
        check_memory(path, size, TEXT_MEMORY_FACTOR, available_memory())
    with about_file(path.name), wrap_unexpected(path.name, "read"):
        if kind in SHEET_KINDS:
            from .sheets import read_sheet

            return read_sheet(path, kind, sheet)
        return _read_text(path, kind, head, truncated=size > len(head), sheet=sheet)


def _read_text(path: Path, kind: str, head: bytes, *, truncated: bool, sheet: str | None) -> Table:
    fmt = sniff_text(head, name=path.name, kind=kind, truncated=truncated)
    notes = list(fmt.notes)
    encoding = fmt.encoding
    wide = _field_count(head, fmt) > WIDE_COLUMNS
    try:
        frame = _parse(path, fmt, encoding, wide=wide)
    except UnicodeDecodeError:
        encoding = "cp1252"
        notes.append("Part of the file is not valid UTF-8; it was read as Windows Western (cp1252).")
        frame = _parse(path, fmt, encoding, wide=wide)
    if sheet is not None:
        notes.append(f"A sheet ('{sheet}') was asked for, but a text file has no sheets.")
    header_lines = 1 + sum(line_breaks(str(name)) for name in frame.columns) if fmt.header else 0
    return build_table(path, kind, frame, fmt=fmt, encoding=encoding, notes=notes,
                       rows_above=fmt.skip_rows + header_lines)


WIDE_COLUMNS = 1_000  # fields in the first line from which a file is read row by row (see _parse_wide)


def _field_count(head: bytes, fmt: TextFormat) -> int:
    """A quick count of the fields on the first line of the head (quotes not considered)."""
    try:
        text = head.decode(fmt.encoding.replace("-sig", ""), errors="ignore")
    except LookupError:
        return 0
    lines = text.splitlines()[fmt.skip_rows: fmt.skip_rows + 1]
    return lines[0].count(fmt.delimiter) + 1 if lines and fmt.delimiter != " " else 0


def _parse(path: Path, fmt: TextFormat, encoding: str, *, wide: bool = False) -> pd.DataFrame:
    if wide:
        return _parse_wide(path, fmt, encoding)
    options = dict(
        header=0 if fmt.header else None,
        skiprows=fmt.skip_rows or None,
        encoding=encoding,
        decimal=fmt.decimal,
        thousands=fmt.thousands,
        keep_default_na=False,
        na_values=[""],
        skip_blank_lines=False,
        dtype={j: "category" for j in fmt.text_columns} or None,
    )
    if fmt.delimiter == " ":
        options["sep"] = r"\s+"
    else:
        options.update(sep=fmt.delimiter, quotechar='"')
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # mixed-type chunks are settled column by column below
        try:
            return pd.read_csv(path, engine="c", **options)
        except pd.errors.EmptyDataError as error:
            raise FileProblem(f"{path.name} holds no data.") from error
        except pd.errors.ParserError as error:
            raise FileProblem(_parser_message(path.name, error, fmt)) from error


def _parse_wide(path: Path, fmt: TextFormat, encoding: str) -> pd.DataFrame:
    """A file of thousands of columns, parsed row by row into one block of floats.

    pandas' parser makes and settles one array per column, which costs seconds on 100,000
    columns; here the cells of all columns are converted at once, and only columns with a cell
    that is not a number stay text. Short rows are padded with blanks, as pandas does; a long
    row is refused with its line, as pandas does.
    """
    with open(path, encoding=encoding, newline="") as handle:
        for _ in range(fmt.skip_rows):
            handle.readline()
        rows = list(csv.reader(handle, delimiter=fmt.delimiter, quotechar='"'))
    while rows and not any(cell.strip() for cell in rows[-1]):
        rows.pop()  # trailing blank lines
    if not rows:
        raise FileProblem(f"{path.name} holds no data.")
    names = rows[0] if fmt.header else None
    body = rows[1:] if fmt.header else rows
    width = max(len(names) if names is not None else 0, max((len(r) for r in body), default=0))
    if names is not None:
        for line, row in enumerate(body, start=fmt.skip_rows + 2):
            if len(row) > len(names):
                raise FileProblem(f"{path.name}, row {line}: {len(row)} cells where the rows above have "
                                  f"{len(names)}; check for a stray {DELIMITER_NAMES.get(fmt.delimiter, 'separator')} "
                                  "or a missing quote.")
    cells = np.full((len(body), width), "", dtype=object)
    for i, row in enumerate(body):
        cells[i, : len(row)] = row
    text = pd.Series(cells.ravel(), dtype=object).str.strip()
    if fmt.thousands:
        text = text.str.replace(fmt.thousands, "", regex=False)
    if fmt.decimal == ",":
        text = text.str.replace(",", ".", regex=False)
    blank = (text == "").to_numpy().reshape(cells.shape)
    numbers = pd.to_numeric(text.where(~blank.ravel(), "nan"), errors="coerce").to_numpy(dtype=float, copy=True).reshape(cells.shape)
    is_text = (np.isnan(numbers) & ~blank).any(axis=0)
    numbers[blank] = np.nan
    labels = list(names) + [f"Unnamed: {j}" for j in range(len(names), width)] if names is not None else list(range(width))
    frame = pd.DataFrame(numbers, columns=pd.RangeIndex(width))
    if is_text.any():
        texts = np.where(blank, np.nan, cells).astype(object)
        positions = np.flatnonzero(is_text)
        frame = pd.concat([frame.drop(columns=positions),
                           pd.DataFrame(texts[:, positions], columns=positions)], axis=1)[list(range(width))]
    frame.columns = labels
    return frame


def _parser_message(name: str, error: Exception, fmt: TextFormat) -> str:
    """pandas' tokenizer complaint in our words, with the file row where it applies."""
    text = one_line(error)
    ragged = re.search(r"Expected (\d+) fields in line (\d+), saw (\d+)", text)
    if ragged:
        expected, line, seen = (int(g) for g in ragged.groups())
        return (f"{name}, row {line}: {seen} cells where the rows above have "
                f"{expected}; check for a stray {DELIMITER_NAMES.get(fmt.delimiter, 'separator')} "
                "or a missing quote.")
    if "EOF inside string" in text:
        start = re.search(r"starting at row (\d+)", text)
        where = f", row {int(start.group(1)) + 1}" if start else ""
        return f"{name}{where}: a quote mark opens a cell that is never closed."
    return f"{name} could not be read as a table: {text}"
