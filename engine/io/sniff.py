"""Format detection for text tables, done on a small sample from the head of the file.

The full read is left to pandas' C parser with the settings found here, so detection costs the
same for a 1 KB file and a 100 MB one.
"""

from __future__ import annotations

import codecs
import csv
import io
import re
from collections import Counter
from dataclasses import dataclass

from ..errors import FileProblem
from ..wording import plural

__all__ = ["TextFormat", "detect_encoding", "sniff_text", "has_header", "DELIMITER_NAMES", "looks_numeric",
           "title_rows", "title_texts", "title_note"]

DELIMITER_NAMES = {",": "comma", ";": "semicolon", "\t": "tab", "|": "pipe", " ": "spaces"}
_CANDIDATES = (",", ";", "\t", "|")
_SAMPLE_LINES = 200
_MAX_TITLE_ROWS = 20
# zip (xlsx, ods), PDF, OLE2 (xls, doc), PNG, JPEG, GIF, gzip
_BINARY_SIGNATURES = (b"PK\x03\x04", b"%PDF", b"\xd0\xcf\x11\xe0", b"\x89PNG", b"\xff\xd8\xff", b"GIF8", b"\x1f\x8b")

# A number as typed by a person: optional sign, digits with "." and "," anywhere, optional exponent.
_NUMBERISH = re.compile(r"^[+-]?(?:\d[\d.,]*|[.,]\d+)(?:[eE][+-]?\d+)?$")
_GROUPED = {  # digits in groups of three, e.g. 1,234,567 (thousands separator only)
    ",": re.compile(r"^[+-]?\d{1,3}(?:,\d{3})+$"),
    ".": re.compile(r"^[+-]?\d{1,3}(?:\.\d{3})+$"),
}
_GROUPED_WITH_DECIMAL = {  # 1,234.5 (thousands ",") and 1.234,5 (thousands ".")
    ",": re.compile(r"^[+-]?\d{1,3}(?:,\d{3})+\.\d+$"),
    ".": re.compile(r"^[+-]?\d{1,3}(?:\.\d{3})+,\d+$"),
}
_SPECIAL_NUMBERS = {"inf", "+inf", "-inf", "infinity", "+infinity", "-infinity", "nan"}


@dataclass(frozen=True)
class TextFormat:
    """What detection decided about a text table."""

    encoding: str
    delimiter: str
    decimal: str
    thousands: str | None
    header: bool
    skip_rows: int              # lines before the first row (blank lines, title lines)
    text_columns: tuple[int, ...]  # columns whose sampled cells are words with few distinct values
    notes: tuple[str, ...]      # plain sentences about the choices, for Table.notes


def detect_encoding(head: bytes, name: str) -> tuple[str, str]:
    """Return ``(codec, plain name)``; raise :class:`FileProblem` for a binary file.

    Byte-order marks decide first (UTF-8, UTF-16 LE/BE); then UTF-16 without a mark is spotted
    by its zero bytes; then strict UTF-8; then cp1252 (Windows Western), then latin-1.
    """
    if head.startswith(codecs.BOM_UTF8):
        return "utf-8-sig", "UTF-8 with a byte-order mark"
    if head.startswith(codecs.BOM_UTF16_LE) or head.startswith(codecs.BOM_UTF16_BE):
        return "utf-16", "UTF-16"
    sample = head[:4096]
    if sample.startswith(_BINARY_SIGNATURES):
        raise FileProblem(f"{name} looks like a binary file, not a text table.")
    if sample and b"\x00" in sample:
        even, odd = sample[0::2], sample[1::2]
        if odd.count(0) > 0.4 * len(odd) and even.count(0) < 0.1 * len(even):
            return "utf-16-le", "UTF-16 (little-endian, no byte-order mark)"
        if even.count(0) > 0.4 * len(even) and odd.count(0) < 0.1 * len(odd):
            return "utf-16-be", "UTF-16 (big-endian, no byte-order mark)"
        raise FileProblem(f"{name} looks like a binary file, not a text table.")
    controls = sum(sample.count(bytes([c])) for c in range(32) if c not in (9, 10, 12, 13))
    if controls > 0.05 * len(sample):
        raise FileProblem(f"{name} looks like a binary file, not a text table.")
    try:
        _decode_head(head, "utf-8")
        return "utf-8", "UTF-8"
    except UnicodeDecodeError:
        pass
    try:
        head.decode("cp1252")
        return "cp1252", "Windows Western (cp1252)"
    except UnicodeDecodeError:
        return "latin-1", "Latin-1"


def _decode_head(head: bytes, codec: str) -> str:
    """Decode a head sample whose last character may be cut in the middle."""
    decoder = codecs.getincrementaldecoder(codec)()
    return decoder.decode(head, final=False)


def _rows(text: str, delimiter: str) -> list[list[str]]:
    reader = csv.reader(io.StringIO(text), delimiter=delimiter, quotechar='"')
    rows = []
    try:
        for row in reader:
            rows.append(row)
            if len(rows) >= _SAMPLE_LINES:
                break
    except csv.Error:
        pass
    return rows


def _delimiter_score(rows: list[list[str]]) -> tuple[float, int]:
    """The share of filled rows that have the most common width of two or more cells, and
    that width (rows of one cell, such as title lines, do not get a say in the width)."""
    counts = [len(r) for r in rows if r and any(cell.strip() for cell in r)]
    split = Counter(c for c in counts if c >= 2)
    if not split:
        return 0.0, 1
    width, times = split.most_common(1)[0]
    return times / len(counts), width


def _choose_delimiter(text: str, kind: str) -> tuple[str, list[list[str]]]:
    order = ("\t",) + tuple(c for c in _CANDIDATES if c != "\t") if kind == "tsv" else _CANDIDATES
    best, best_key, best_rows = None, (0.0, 0), None
    for candidate in order:
        rows = _rows(text, candidate)
        consistency, width = _delimiter_score(rows)
        key = (round(consistency, 2), width if consistency > 0 else 0)
        if best is None or key > best_key:
            best, best_key, best_rows = candidate, key, rows
    if best_key[0] == 0 and kind == "txt":
        rows = [line.split() for line in text.splitlines()[:_SAMPLE_LINES]]
        consistency, width = _delimiter_score(rows)
        if consistency > 0.8 and width > 1:
            return " ", rows
    if best_key[0] == 0:
        best = "\t" if kind == "tsv" else ","
        best_rows = _rows(text, best)
    return best, best_rows or []


def title_rows(rows: list[list[str]], width: int) -> int:
    """How many rows at the top of ``rows`` are title rows (a report name, an operator, a date,
    blank rows among them): 0 if none.

    A title row has fewer than ``width`` cells, or at most one filled cell; the table starts at
    the first row that has ``width`` cells, two or more of them filled. Up to 20 title rows are
    looked for, and two rows must follow them; the caller keeps them unless column names follow.
    """
    if width < 2 or len(rows) < 3:
        return 0
    for start in range(min(len(rows) - 2, _MAX_TITLE_ROWS)):
        row = rows[start]
        if len(row) == width and sum(1 for cell in row if cell.strip()) >= 2:
            return start
    return 0


def title_texts(rows: list[list[str]]) -> list[str]:
    """The filled title rows as one line of text each, for a note."""
    texts = [" ".join(cell.strip() for cell in row if cell.strip()) for row in rows]
    return [t for t in texts if t]


def title_note(texts: list[str], rows: int, what: str) -> str:
    """The note that says which title rows (``rows`` of them, each a ``what``: "line" or "row")
    were passed over."""
    shown = "; ".join(f"'{_shorten(t)}'" for t in texts[:2]) + ("; ..." if len(texts) > 2 else "")
    return (f"{plural(rows, what)} of title above the column names {plural(rows, 'was', number=False)} "
            f"passed over ({shown}).")


def _title_rows(body: str, delimiter: str, rows: list[list[str]]) -> tuple[list[str], int, int]:
    """Title lines above a text table: their texts, the number of sample rows and the number of
    file lines they take (see :func:`title_rows`)."""
    if delimiter == " ":
        return [], 0, 0
    start = title_rows(rows, _delimiter_score(rows)[1])
    if start == 0:
        return [], 0, 0
    reader = csv.reader(io.StringIO(body), delimiter=delimiter, quotechar='"')
    for _ in range(start):
        next(reader)
    return title_texts(rows[:start]), start, reader.line_num


def _shorten(text: str, limit: int = 40) -> str:
    return text if len(text) <= limit else text[: limit - 3].rstrip() + "..."


def _number_tokens(rows: list[list[str]]) -> list[str]:
    tokens = []
    for row in rows:
        for cell in row:
            token = cell.strip().replace(" ", "")
            if token and _NUMBERISH.match(token) and any(ch.isdigit() for ch in token):
                tokens.append(token)
    return tokens


def _choose_decimal(tokens: list[str], delimiter: str) -> tuple[str, str | None, list[str]]:
    """Decide the decimal mark and thousands separator from the numbers in the sample."""
    notes: list[str] = []
    comma_decimal = dot_decimal = 0
    comma_grouped = 0
    for token in tokens:
        has_comma, has_dot = "," in token, "." in token
        if has_comma and has_dot:
            if token.rfind(",") > token.rfind("."):
                comma_decimal += 1
            else:
                dot_decimal += 1
        elif has_comma:
            if _GROUPED[","].match(token):
                comma_grouped += 1
            elif token.count(",") == 1:
                comma_decimal += 1
        elif has_dot:
            if token.count(".") == 1:
                dot_decimal += 1
    if delimiter == ",":
        comma_decimal = comma_grouped = 0  # unquoted commas split cells here
    decimal = "." if dot_decimal >= comma_decimal else ","
    if comma_decimal == 0 and dot_decimal == 0 and comma_grouped:
        decimal = "," if delimiter == ";" else "."
        notes.append(
            "Numbers such as '" + next(t for t in tokens if _GROUPED[","].match(t)) + "' could be "
            f"read two ways; the comma was taken as {'the decimal mark' if decimal == ',' else 'a thousands separator'}.")
    other = "." if decimal == "," else ","
    uses_other = [t for t in tokens if other in t]
    grouped = all(_GROUPED[other].match(t) or _GROUPED_WITH_DECIMAL[other].match(t) for t in uses_other)
    thousands = other if uses_other and grouped else None
    if decimal == "," and thousands is None and any("." in t for t in uses_other):
        notes.append("Some numbers use a dot in a file that writes decimals with commas; those "
                     "cells are kept as text.")
    return decimal, thousands, notes


def looks_numeric(cell: str, decimal: str, thousands: str | None) -> bool:
    """True if ``cell`` reads as a number under the given decimal mark and thousands separator."""
    token = cell.strip()
    if not token:
        return False
    if token.lower() in _SPECIAL_NUMBERS:
        return True
    if thousands:
        token = token.replace(thousands, "")
    if decimal == ",":
        if "." in token:
            return False
        token = token.replace(",", ".")
    try:
        float(token)
    except ValueError:
        return False
    return True


def has_header(rows: list[list[str]], decimal: str, thousands: str | None) -> tuple[bool, str]:
    if len(rows) < 2:
        first = rows[0] if rows else []
        numeric = any(looks_numeric(c, decimal, thousands) for c in first)
        return (not numeric), "only one row was found"
    first, rest = rows[0], rows[1:]
    votes_for = votes_against = 0
    for j, cell in enumerate(first):
        column = [r[j] for r in rest if j < len(r) and r[j].strip()]
        if not column:
            continue
        numeric_share = sum(looks_numeric(c, decimal, thousands) for c in column) / len(column)
        first_numeric = looks_numeric(cell, decimal, thousands)
        if numeric_share >= 0.5:
            if first_numeric:
                votes_against += 1
            elif cell.strip():
                votes_for += 1
    if votes_for or votes_against:
        header = votes_for >= votes_against
        return header, ("its cells are words above columns of numbers" if header
                        else "it holds numbers like the rows below it")
    names = [c.strip() for c in first]
    header = all(names) and len(set(names)) == len(names)
    return header, ("its cells are distinct words" if header else "it looks like data")


def _text_columns(rows: list[list[str]], header: bool, decimal: str, thousands: str | None) -> tuple[int, ...]:
    body = rows[1:] if header else rows
    if not body:
        return ()
    width = max(len(r) for r in body)
    chosen = []
    for j in range(width):
        cells = [r[j].strip() for r in body if j < len(r) and r[j].strip()]
        if not cells:
            continue
        if any(looks_numeric(c, decimal, thousands) for c in cells):
            continue
        if len(set(cells)) <= max(20, len(cells) // 4):
            chosen.append(j)
    return tuple(chosen)


def _marks_and_header(rows: list[list[str]], delimiter: str):
    """The decimal mark, thousands separator and their notes, then the header decision."""
    marks = _choose_decimal(_number_tokens(rows), delimiter)
    return marks, has_header(rows, marks[0], marks[1])


def sniff_text(head: bytes, *, name: str, kind: str, truncated: bool) -> TextFormat:
    """Detect encoding, delimiter, decimal mark, thousands separator and header on a sample.

    Parameters
    ----------
    head : bytes
        The first bytes of the file (``truncated`` says whether the file goes on).
    name : str
        The file name, for messages.
    kind : str
        "csv", "tsv" or "txt" (breaks ties between delimiters).
    truncated : bool
        True if ``head`` is not the whole file (its last line is then ignored).

    Returns
    -------
    TextFormat

    Notes
    -----
    The delimiter is the candidate (comma, semicolon, tab, pipe) that splits the most sampled
    lines into the same number (at least two) of fields, wider splits winning ties. The decimal
    mark is voted on by the numbers in the sample: "12,5" votes for a comma, "12.5" for a dot,
    "1.234,5" for a comma with dot thousands. A thousands separator is set only when every
    sampled number that uses the other mark groups its digits in threes, because pandas drops a
    thousands separator wherever it appears. The first row is taken as column names when its
    cells are words above columns that are mostly numbers (the rule of Python's
    ``csv.Sniffer.has_header``, common practice).

    References
    ----------
    Python Software Foundation, ``csv.Sniffer`` (Python 3.11 standard library documentation).
    """
    codec, encoding_name = detect_encoding(head, name)
    text = _decode_head(head, codec)
    if codec == "utf-8-sig":
        text = text.lstrip("\ufeff")
    if truncated and "\n" in text:
        text = text[: text.rfind("\n") + 1]
    lines = text.splitlines()
    skip = 0
    while skip < len(lines) and not lines[skip].strip():
        skip += 1
    body = "\n".join(lines[skip:])
    if not body.strip():
        raise FileProblem(f"{name} holds no data (only blank lines).")
    delimiter, rows = _choose_delimiter(body, kind)
    titles, skipped, title_lines = _title_rows(body, delimiter, rows)
    (decimal, thousands, decimal_notes), (header, why) = _marks_and_header(rows[skipped:], delimiter)
    if titles and not header:  # titles sit above column names; above bare data, keep every row
        titles, skipped, title_lines = [], 0, 0
        (decimal, thousands, decimal_notes), (header, why) = _marks_and_header(rows, delimiter)
    rows = rows[skipped:]
    notes = [f"Read as {encoding_name} text with cells separated by "
             f"{DELIMITER_NAMES[delimiter]}s." if delimiter != " " else
             f"Read as {encoding_name} text with cells separated by spaces."]
    notes.append("Decimals are written with a comma." if decimal == "," else
                 "Decimals are written with a dot.")
    if thousands:
        notes.append(f"'{thousands}' is read as a thousands separator (for example 1{thousands}250 "
                     "is one thousand two hundred and fifty).")
    notes.extend(decimal_notes)
    first = f"Line {skip + title_lines + 1}" if titles else "The first row"
    notes.append((f"{first} holds column names: " if header else
                  f"{first} is data, not column names: ") + why + ".")
    if skip:
        notes.append(f"{plural(skip, 'blank line')} at the top of the file {plural(skip, 'was', number=False)} "
                     "passed over.")
    if titles:
        notes.append(title_note(titles, title_lines, "line"))
    return TextFormat(codec, delimiter, decimal, thousands, header, skip + title_lines,
                      _text_columns(rows, header, decimal, thousands), tuple(notes))
