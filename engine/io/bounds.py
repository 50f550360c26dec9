"""Workbook sizes checked before the workbook is read, and the memory its reader may use.

A few kilobytes of workbook can ask for hundreds of gigabytes: a zip whose parts unpack to a
thousand times their size, a sheet with one cell in its first and one in its last row and column
(the reader holds a sheet as the full rectangle of cells between them), an .xls whose records
place cells far apart. These checks read only the zip directory and the chosen sheet's cell
references (unpacked as a stream, so the check itself needs little memory) and refuse such a file
with its sizes in the message. The reader then runs in a child process whose memory is capped
(:func:`reader_limit`), so that anything the checks miss ends that process, not Twofold.
"""

from __future__ import annotations

import re
import struct
import zipfile
from pathlib import Path, PurePosixPath
from xml.etree import ElementTree

from ..errors import FileProblem, quoted
from ._files import amount, available_memory

__all__ = ["check_workbook", "check_sheet", "CELL_BYTES", "sheet_extent", "xls_extents"]

# Memory per cell of a sheet's rectangle while it is read: the reader's 32-byte cell, the Python
# object and list slot it becomes, and the frame built from it (measured on a 100,000-row sheet
# with tests/benchmarks/bench_io.py, rounded up).
CELL_BYTES = 64
# Real workbooks unpack to 3 to 30 times their size (XML compresses well); far more is a file
# built to exhaust memory. Small totals pass whatever their ratio.
RATIO_LIMIT = 100
RATIO_FLOOR = 200_000_000
# The reader's memory limit: a fixed floor for the interpreter and small files, plus a multiple
# of the bytes it will parse; never more than most of the memory that is free.
LIMIT_FLOOR = 1_000_000_000
LIMIT_PER_BYTE = 60
_CHUNK = 1 << 20
_MAX_ROWS, _MAX_COLUMNS = 1_048_576, 16_384  # the largest sheet the .xlsx format allows


def _zip_parts(path: Path) -> list[zipfile.ZipInfo] | None:
    try:
        with zipfile.ZipFile(path) as archive:
            return archive.infolist()
    except (zipfile.BadZipFile, OSError, ValueError, EOFError):
        return None  # not a zip at all: the reader says what is wrong with it


def check_workbook(path: Path, kind: str) -> int:
    """Refuse a workbook whose declared sizes cannot be read in the memory there is; return the
    memory limit (bytes) for its reader.

    For .xlsx and .ods the sizes are the unpacked sizes in the zip directory; for .xls the
    rectangle each sheet's cell records span.
    """
    size = path.stat().st_size
    parsed = size
    if kind in ("xlsx", "ods"):
        parts = _zip_parts(path)
        if parts is not None:
            parsed = sum(part.file_size for part in parts)
            if parsed > RATIO_FLOOR and parsed > RATIO_LIMIT * max(size, 1):
                raise FileProblem(
                    f"{path.name} is {amount(size)} but unpacks to {amount(parsed)}, "
                    f"{parsed / max(size, 1):,.0f} times its size (a real workbook unpacks to 3 to 30 "
                    "times); it may be damaged or built to exhaust memory, so it was not read.")
    free = available_memory()
    limit = LIMIT_FLOOR + LIMIT_PER_BYTE * parsed
    if free is not None:
        if 2 * parsed > free:
            raise FileProblem(
                f"{path.name} unpacks to {amount(parsed)}; reading it needs about "
                f"{amount(2 * parsed)} of memory and {amount(free)} are free. Close other "
                "programs, or save the data as a smaller file.")
        limit = min(limit, max(int(free * 0.8), LIMIT_FLOOR // 4))
    if kind == "xls":  # the reader builds every sheet as it opens the file
        for name, extent in xls_extents(path):
            where = f"Sheet '{quoted(name)}' of {path.name}" if name else f"A sheet of {path.name}"
            _check_extent(where, extent, limit)
    return limit


def _check_extent(where: str, extent: tuple[int, int], limit: int, verb: str = "spans") -> None:
    rows, columns = extent
    need = rows * columns * CELL_BYTES
    if need > limit:
        raise FileProblem(
            f"{where} {verb} {rows:,} rows by {columns:,} columns ({rows * columns:,} cells); "
            f"reading it needs about {amount(need)} of memory and at most {amount(limit)} can be "
            "given to it. The sheet may hold a stray cell far below or to the right of the data: "
            "delete it and save again.")


def check_sheet(path: Path, kind: str, sheet: str, limit: int) -> None:
    """Refuse a sheet whose cells span a rectangle too large to hold in ``limit`` bytes.

    For .xlsx the extent comes from the cell and row references in the sheet's XML (the
    ``<dimension ref>`` a writer declares is not what the reader allocates, so it is not trusted
    either way). .ods and .xls sheets are checked as the workbook is opened (see
    :func:`check_workbook`); their reader builds every sheet then.
    """
    if kind != "xlsx":
        return
    extent = sheet_extent(path, sheet, limit)
    if extent is not None:
        _check_extent(f"Sheet '{quoted(sheet)}' of {path.name}", extent, limit)


# -- .xlsx -----------------------------------------------------------------------------------
_RELATIONSHIPS = "{http://schemas.openxmlformats.org/officeDocument/2006/relationships}id"
_SMALL_PART = 16_000_000  # bytes: the workbook part and its relationships are read whole


def _sheet_part(archive: zipfile.ZipFile, sheet: str) -> str | None:
    """The zip member holding ``sheet``, found through xl/workbook.xml and its relationships."""
    try:
        book_info = archive.getinfo("xl/workbook.xml")
        rels_info = archive.getinfo("xl/_rels/workbook.xml.rels")
        if book_info.file_size > _SMALL_PART or rels_info.file_size > _SMALL_PART:
            return None
        book = ElementTree.fromstring(archive.read(book_info))
        rels = ElementTree.fromstring(archive.read(rels_info))
    except (KeyError, ElementTree.ParseError, zipfile.BadZipFile, OSError, ValueError, EOFError):
        return None
    target_of = {rel.get("Id"): rel.get("Target", "") for rel in rels.iter() if rel.get("Id")}
    for element in book.iter():
        if element.tag.endswith("}sheet") and element.get("name") == sheet:
            target = target_of.get(element.get(_RELATIONSHIPS))
            if not target:
                return None
            if target.startswith("/"):
                return target.lstrip("/")
            return str(PurePosixPath("xl") / target).replace("/./", "/")
    return None


# The patterns start with a plain space (blocks have tabs and line breaks made spaces first), so
# that the regular-expression engine can skip ahead to each ' r="' instead of trying every byte.
_SPACES = bytes.maketrans(b"\t\n\r", b"   ")
_ANY_REF = re.compile(rb' r="([A-Za-z]*)0*(\d+)"')
_COLUMN_3 = re.compile(rb' r="([A-Za-z]{3,})\d')
_COLUMN_2 = re.compile(rb' r="[A-Za-z]{2}')
_COLUMN_1 = re.compile(rb' r="[A-Za-z]\d')


def _column_number(letters: bytes) -> int:
    number = 0
    for letter in letters.upper():
        number = number * 26 + (letter - 64)
    return number


def _columns_at_most(text: bytes, columns: int) -> int:
    """An upper bound of the columns ``text`` refers to, given the bound so far: exact for
    three-letter columns, else 702 (ZZ) or 26 (Z); a couple of passes over the bytes."""
    if columns < 702 and not _COLUMN_2.search(text):  # no column of two letters or more (one pass)
        return 26 if columns < 26 and _COLUMN_1.search(text) else columns
    long_columns = _COLUMN_3.findall(text)
    if long_columns:
        return max(columns, max(_column_number(c) for c in set(long_columns)))
    if columns < 702:
        return 702
    if columns < 26 and _COLUMN_1.search(text):
        return 26
    return columns


def _rows_above(limit: int) -> re.Pattern:
    """A pattern that finds a reference to a row beyond ``limit`` (one search, no match per cell)."""
    digits = str(limit)
    choices = [rb"[1-9]\d{%d,}" % len(digits)]
    for i, digit in enumerate(digits):
        if digit != "9":
            choices.append(digits[:i].encode() + b"[%d-9]" % (int(digit) + 1) + rb"\d{%d}" % (len(digits) - i - 1))
    return re.compile(rb' r="[A-Za-z]*0*(?:' + b"|".join(choices) + rb')"')


def _exact_extent(text: bytes) -> tuple[int, int]:
    rows = columns = 0
    for letters, digits in set(_ANY_REF.findall(text)):
        rows = max(rows, int(digits))
        if letters:
            columns = max(columns, _column_number(letters))
    return rows, columns


def _part_blocks(archive: zipfile.ZipFile, part: str):
    """The part's bytes in blocks that end at the end of an element."""
    with archive.open(part) as stream:
        carry = b""
        while True:
            block = stream.read(_CHUNK)
            if not block:
                break
            text = carry + block
            end = text.rfind(b">") + 1
            if end == 0 or len(text) - end > _CHUNK:  # no element ends for a megabyte: take it whole
                end = len(text)
            yield _spaced(text[:end])
            carry = text[end:]
        if carry:
            yield _spaced(carry)


def _spaced(text: bytes) -> bytes:
    """``text`` with tabs and line breaks made spaces, where one stands before an ``r=``."""
    if b'\tr="' in text or b'\nr="' in text or b'\rr="' in text:
        return text.translate(_SPACES)
    return text


def sheet_extent(path: Path, sheet: str, limit: int) -> tuple[int, int] | None:
    """(rows, columns) an .xlsx sheet's cell references reach if that rectangle needs more than
    ``limit`` bytes of memory, else None (also when the sheet's part cannot be found: the reader
    then says what is wrong).

    The part is unpacked as a stream through Python's zip reader, which stops at the size the
    zip directory declares and checks the CRC, so a part that lies about its size is refused.
    A first pass bounds the columns, a second looks for a row beyond what the memory allows with
    one search per block; only a sheet that fails is measured exactly, for the message.
    """
    try:
        archive = zipfile.ZipFile(path)
    except (zipfile.BadZipFile, OSError, ValueError, EOFError):
        return None
    with archive:
        part = _sheet_part(archive, sheet)
        if part is None:
            return None
        try:
            whole = archive.getinfo(part).file_size <= 64 * _CHUNK  # else unpacked twice, as a stream
            blocks = [b"".join(_part_blocks(archive, part))] if whole else None
            columns = 0
            for text in blocks or _part_blocks(archive, part):
                columns = _columns_at_most(text, columns)
            if columns == 0:
                return None  # no references: the reader counts cells in order, within the file's size
            beyond = _rows_above(max(limit // (CELL_BYTES * columns), 1))
            for text in blocks or _part_blocks(archive, part):
                if beyond.search(text):
                    return _measure(archive, part, blocks)
        except KeyError:
            return None
        except (zipfile.BadZipFile, zipfile.LargeZipFile, OSError, EOFError, ValueError) as error:
            raise FileProblem(f"Sheet '{quoted(sheet)}' of {path.name} is damaged: its packed data do not "
                              f"match the zip directory ({' '.join(str(error).split())[:80]}).") from error
    return None


def _measure(archive: zipfile.ZipFile, part: str, blocks: list[bytes] | None) -> tuple[int, int]:
    rows = columns = 0
    for text in blocks or _part_blocks(archive, part):
        more_rows, more_columns = _exact_extent(text)
        rows, columns = max(rows, more_rows), max(columns, more_columns)
    return rows, max(columns, 1)


# -- .xls ------------------------------------------------------------------------------------
_CFB_SIGNATURE = b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1"
_END_OF_CHAIN = 0xFFFFFFFA  # sector numbers from here on mark ends and free sectors
# BIFF8 records that place a cell with a value; blank cells (formatting only) are left out, as the
# reader leaves them out of a sheet's rectangle
_CELL_RECORDS = {0x0203, 0x027E, 0x00FD, 0x0204, 0x0205, 0x0006, 0x00D6}
_MULTI_RECORDS = {0x00BD}  # MULRK: row, first column, ..., last column
_BOF, _EOF, _SHEET = 0x0809, 0x000A, 0x0085


def _cfb_stream(data: bytes, names: tuple[str, ...]) -> bytes | None:
    """The named stream of a compound file (the container of an .xls), or None if the bytes are
    not one or the stream is missing; every chain is followed at most once per sector."""
    if len(data) < 512 or not data.startswith(_CFB_SIGNATURE):
        return None
    shift, mini_shift = struct.unpack_from("<HH", data, 0x1E)
    if not 7 <= shift <= 16 or not 2 <= mini_shift < shift:
        return None
    size = 1 << shift
    first_dir, = struct.unpack_from("<I", data, 0x30)
    mini_cutoff, first_minifat, _n_minifat, first_difat, n_difat = struct.unpack_from("<IIIII", data, 0x38)
    sectors = max((len(data) - size) // size, 0)

    def sector(n: int) -> bytes:
        return data[(n + 1) * size: (n + 2) * size]

    fat_sectors = [n for n in struct.unpack_from("<109I", data, 0x4C) if n < _END_OF_CHAIN]
    difat, seen = first_difat, set()
    while difat < _END_OF_CHAIN and difat not in seen and len(seen) <= n_difat:
        seen.add(difat)
        entries = struct.unpack(f"<{size // 4}I", sector(difat).ljust(size, b"\xff"))
        fat_sectors += [n for n in entries[:-1] if n < _END_OF_CHAIN]
        difat = entries[-1]
    fat = []
    for n in fat_sectors:
        fat.extend(struct.unpack(f"<{size // 4}I", sector(n).ljust(size, b"\xff")))

    def chain(start: int, table: list[int], read) -> bytes:
        parts, seen_here, n = [], set(), start
        while n < _END_OF_CHAIN and n not in seen_here and n < len(table) and len(seen_here) <= sectors * 64:
            seen_here.add(n)
            parts.append(read(n))
            n = table[n]
        return b"".join(parts)

    directory = chain(first_dir, fat, sector)
    root_start, stream = None, None
    for at in range(0, len(directory) - 127, 128):
        length, kind = struct.unpack_from("<HB", directory, at + 0x40)
        name = directory[at: at + max(min(length, 64) - 2, 0)].decode("utf-16-le", "replace")
        start, stream_size = struct.unpack_from("<II", directory, at + 0x74)
        if kind == 5:
            root_start = start
        elif kind == 2 and name in names and stream is None:
            stream = (start, stream_size)
    if stream is None:
        return None
    start, stream_size = stream
    if stream_size >= mini_cutoff or root_start is None:
        return chain(start, fat, sector)[:stream_size]
    mini_size = 1 << mini_shift
    container = chain(root_start, fat, sector)
    minifat_bytes = chain(first_minifat, fat, sector)
    minifat = list(struct.unpack(f"<{len(minifat_bytes) // 4}I", minifat_bytes[: len(minifat_bytes) // 4 * 4]))
    return chain(start, minifat, lambda n: container[n * mini_size: (n + 1) * mini_size])[:stream_size]


def xls_extents(path: Path) -> list[tuple[str, tuple[int, int]]]:
    """Each sheet's name and the (rows, columns) of the rectangle its cells span in an .xls
    file (name "" where the records do not tell), from the cell
    records themselves (the DIMENSIONS record a writer declares counts formatted blank cells,
    which the reader leaves out, so it is not what the reader allocates)."""
    try:
        with open(path, "rb") as handle:
            data = handle.read()
    except OSError:
        return []
    try:
        book = _cfb_stream(data, ("Workbook", "Book"))
    except struct.error:
        return []
    if not book:
        return []
    extents, box, names, starts, biff8 = [], None, {}, [], True
    at, end = 0, len(book)
    while at + 4 <= end:
        kind, length = struct.unpack_from("<HH", book, at)
        body = at + 4
        at = body + length
        if kind == _SHEET and length >= 8:
            names[struct.unpack_from("<I", book, body)[0]] = _sheet_name(book[body + 6: body + length], biff8)
        if kind == _BOF:
            if not starts and length >= 2:
                biff8 = struct.unpack_from("<H", book, body)[0] == 0x0600
            starts.append(body - 4)
            box = None
        elif kind == _EOF:
            if box is not None:
                extents.append((box[1] - box[0] + 1, box[3] - box[2] + 1))
            box = None
        elif (kind in _CELL_RECORDS and length >= 4) or (kind in _MULTI_RECORDS and length >= 6):
            row, first = struct.unpack_from("<HH", book, body)
            last = struct.unpack_from("<H", book, body + length - 2)[0] if kind in _MULTI_RECORDS else first
            last = max(last, first)
            box = ((row, row, first, last) if box is None else
                   (min(box[0], row), max(box[1], row), min(box[2], first), max(box[3], last)))
    if box is not None:
        extents.append((box[1] - box[0] + 1, box[3] - box[2] + 1))
    # a sheet's substream starts where its BOUNDSHEET record says; the globals have no cells
    sheet_starts = [start for start in starts if start in names]
    return [(names.get(start, ""), extent) for start, extent in zip(sheet_starts, extents)] if (
        len(sheet_starts) == len(extents)) else [("", extent) for extent in extents]


def _sheet_name(text: bytes, biff8: bool) -> str:
    """A short string: its length, in BIFF8 a flag byte (bit 0: two bytes a character), then the
    characters (BIFF5 and 7: one byte each, no flag)."""
    if len(text) < 2:
        return ""
    count, wide = text[0], (text[1] & 1 if biff8 else 0)
    raw = text[(2 if biff8 else 1):][: count * (2 if wide else 1)]
    return raw.decode("utf-16-le" if wide else "latin-1", "replace")
