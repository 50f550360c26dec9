"""Generated input files for the fuzz run: text tables and workbooks, then mutated.

``write_case(seed, index, folder)`` writes one file and returns its path and a short tag that says
how it was made. The same (seed, index) always gives the same file (workbooks differ only in the
time stamps their writers put in), so a case found by the big run can be written again on its own
(``tests/fuzz/run.py --case N``); ``--keep`` keeps the very bytes of every failing case.
"""

from __future__ import annotations

import io
import math
import random
import zipfile
from pathlib import Path

__all__ = ["write_case", "CASE_KINDS"]

CASE_KINDS = ("text", "text-mutated", "xlsx", "xlsx-mutated", "ods", "ods-mutated", "bytes")
_KIND_WEIGHTS = (40, 25, 12, 10, 4, 4, 5)

_LABELS = [
    "A", "B", "treated", "control", "north_forge", "south_forge", "plot 1", "plot 2", "1", "2",
    "0", "-1", "", " ", "  A", "A ", "a", "NA", "n/a", "TRUE", "FALSE", "1e5", "3.5",
    "<b>bold</b>", "<font size=7 color=red>HUGE</font>", "<img width=900 height=700>", "&amp;",
    "\x1b[2J\x1b]0;title\x07", "tab\there", "vt\x0bff\x0c", "line\u2028sep", "nel\x85", "\u202eevil",
    "bell\x07", "nul\x00x", "quote\"inside", "comma,inside", "semi;inside", "new\nline", "cr\rhere",
    "Grüße", "ÆØÅ", "日本", "😀", "x" * 300, "=1+2", "'lead", "-", "?", "#N/A", "None", "nan",
]
_SPECIAL_NUMBERS = [
    "NaN", "nan", "inf", "-inf", "Infinity", "1e308", "-1e308", "1.7976931348623157e308", "1e309",
    "1e-300", "-1e-300", "5e-324", "2.2250738585072014e-308", "0", "-0", "0.0", "1" * 25,
    "9" * 400, "1e-400", "+3.5", " 4.5 ", "4.5e", "1,5", "1.234,5", "1,234.5", "1 234", "0x1A",
    "12%", "$5", "5 kg", "<0.5", ">100", "1/2", "--3", "3-", ".", "e5", "١٢٣", "４５", "", " ", "n/a",
    "NA", "-", "?", "abc", "TRUE", "2024-01-05", "12:30",
]


def write_case(seed: int, index: int, folder: Path, *, max_columns: int | None = None) -> tuple[Path, str]:
    """Write case ``index`` of the run seeded ``seed`` into ``folder``; return (path, tag).

    ``max_columns`` caps the width of the table and the number of group labels, for a run that
    must stay short (a capped case is otherwise drawn as the uncapped one, as far as it can be).
    """
    rng = random.Random(seed * 1_000_003 + index)
    kind = rng.choices(CASE_KINDS, _KIND_WEIGHTS)[0]
    if kind.startswith("text"):
        data, extension, tag = _text_file(rng, max_columns)
        if kind == "text-mutated":
            data, how = _mutate_bytes(rng, data)
            tag += f" {how}"
    elif kind.startswith(("xlsx", "ods")):
        book = kind.split("-")[0]
        data, tag = (_xlsx if book == "xlsx" else _ods)(rng, max_columns)
        extension = f".{book}"
        if kind.endswith("-mutated"):
            data, how = _mutate_workbook(rng, data)
            tag += f" {how}"
    else:
        data = bytes(rng.getrandbits(8) for _ in range(rng.choice([0, 1, 3, 50, 400, 4000])))
        extension = rng.choice([".csv", ".tsv", ".txt", ".xlsx", ".ods", ".xls"])
        tag = "random bytes"
    if rng.random() < 0.03:
        extension = extension.upper()
    path = folder / f"case{index}{extension}"
    path.write_bytes(data)
    return path, f"{kind}: {tag}"


# ---------------------------------------------------------------------------------------------
# the table behind every case: header + rows of cell texts (or numbers, for workbooks)


def _number(rng: random.Random, centre: float, spread: float) -> float:
    return rng.gauss(centre, spread)


def _scale(rng: random.Random) -> tuple[float, float]:
    style = rng.random()
    if style < 0.6:
        return rng.uniform(-100, 1000), rng.uniform(0.01, 50)
    if style < 0.75:  # huge or tiny magnitudes
        exponent = rng.choice([-320, -300, -200, -30, 30, 150, 300, 307, 308])
        centre = rng.choice([1.0, 3.5, -2.0]) * 10.0 ** exponent if exponent < 308 else 1.5e308
        return centre, abs(centre) * rng.choice([0.0, 1e-12, 0.1, 1.0])
    if style < 0.85:  # identical values
        return rng.uniform(-5, 5), 0.0
    return rng.uniform(0, 10), rng.uniform(0, 1e-9)  # nearly identical


def _table(rng: random.Random, cells: int = 200_000, max_columns: int | None = None
           ) -> tuple[list[object], list[list[object]]]:
    """A long (label, value) or wide (one column per group) table, with the usual troubles.

    ``cells`` bounds the size: very wide tables get fewer rows. One table in ten is a file of
    two groups' summary statistics instead (see :func:`_summary_table`).
    """
    if rng.random() < 0.1:
        return _summary_table(rng)
    label_pool = rng.sample(_LABELS, 2) if rng.random() < 0.4 else rng.choice(
        [["A", "B"], ["treated", "control"], ["north_forge", "south_forge"]])
    n_groups = rng.choice([1, 2, 2, 2, 2, 3, 5]) if rng.random() < 0.3 else 2
    labels = list(label_pool) + [f"G{i}" for i in range(n_groups - 2)] if n_groups >= 2 else label_pool[:1]
    if rng.random() < 0.02:  # very many labels
        labels = [f"L{i}" for i in range(rng.choice([50, 3000]))][:max_columns]
    sizes = [rng.choice([0, 1, 1, 2, 3, 3, 5, 10, 30, 200, 2000]) if rng.random() < 0.5
             else rng.choice([5, 8, 12, 20]) for _ in labels]
    scales = [_scale(rng) for _ in labels]
    if rng.random() < 0.2:  # far apart
        scales = [(c + i * s * rng.choice([30, 1e3, 1e6]), s) for i, (c, s) in enumerate(scales)]
    special_rate = rng.choice([0, 0, 0, 0.02, 0.2, 0.9])
    round_to = rng.choice([None, None, 0, 1, 3])

    def value() -> object:
        return rng.choice(_SPECIAL_NUMBERS)

    groups: list[list[object]] = []
    for size, (centre, spread) in zip(sizes, scales):
        column: list[object] = []
        for _ in range(size):
            if rng.random() < special_rate:
                column.append(value())
                continue
            number = _number(rng, centre, spread)
            if round_to is not None and math.isfinite(number) and abs(number) < 1e15:
                number = round(number, round_to)
            column.append(number)
        groups.append(column)

    wide = rng.random() < 0.3
    if wide:
        header: list[object] = [str(label) for label in labels]
        length = max([len(g) for g in groups] + [0])
        rows = [[g[i] if i < len(g) else "" for g in groups] for i in range(length)]
    else:
        header = [rng.choice(["group", "supplier", "", "Group", "value", "日本", "<b>g</b>", "g\x1b[31m"]),
                  rng.choice(["value", "strength_mpa", "", "yield (kg)", "value", "v\u202e"])]
        rows = [[label, v] for label, g in zip(labels, groups) for v in g]
        if rng.random() < 0.5:
            rng.shuffle(rows)
    extra = rng.choice([0, 0, 0, 1, 3, 50, 2000]) if rng.random() < 0.3 else 0
    if max_columns is not None:
        extra = min(extra, max_columns)
    if extra:
        rows = rows[:max(3, cells // (extra + 2))]
        header = header + [f"extra{i}" for i in range(extra)]
        filler = rng.choice(["id", "text", "blank", "number"])
        for number, row in enumerate(rows):
            row.extend(_filler(rng, filler, number) for _ in range(extra))
    if rng.random() < 0.1:  # duplicated names
        header = [header[0]] * len(header)
    return header, rows[:max(3, cells // max(len(header), 1))]


_SUMMARY_HEADERS = [
    ["label", "n", "mean", "sd"], ["group", "N", "Mean", "SD"], ["name", "n", "mean", "se"],
    ["label", "n", "mean", "sd", "sd_known"], ["supplier", "n", "mean", "sd"], [" Label ", " n", "MEAN ", "sd"],
    ["label", "n", "N", "mean", "sd"], ["label", "n", "mean", "sd", "se"], ["label", "n", "mean"],
    ["n", "mean", "sd"], ["label", "label", "n", "mean", "sd"], ["", "n", "mean", "sd"],
]
_COUNTS = ["12", "15", "2", "1", "0", "-3", "12.5", "1e3", "1_000", "12,000", "9007199254740993",
           "1" * 30, "1e30", "nan", "", "twelve", "١٢", "TRUE"]
_KNOWN = ["yes", "no", "true", "1", "0", "", "maybe", "YES"]


def _summary_table(rng: random.Random) -> tuple[list[object], list[list[object]]]:
    """A file of two groups' summary statistics (label, n, mean, sd or se, perhaps sd_known),
    with odd headers, too few or too many rows, and odd counts, means and spreads."""
    header: list[object] = list(rng.choice(_SUMMARY_HEADERS[:6] if rng.random() < 0.7 else _SUMMARY_HEADERS))
    n_rows = 2 if rng.random() < 0.8 else rng.choice([0, 1, 3, 50])
    rows: list[list[object]] = []
    for i in range(n_rows):
        row: list[object] = []
        for name in header:
            role = str(name).strip().lower()
            if role in ("label", "group", "name", "supplier", ""):
                row.append(rng.choice(_LABELS) if rng.random() < 0.15 else f"lot {i + 1}")
            elif role == "n":
                row.append(rng.choice(_COUNTS) if rng.random() < 0.15 else rng.choice([5, 12, 30, 200]))
            elif role == "sd_known":
                row.append(rng.choice(_KNOWN))
            else:
                centre, spread = _scale(rng)
                number = centre if role == "mean" else spread
                row.append(rng.choice(_SPECIAL_NUMBERS) if rng.random() < 0.08 else number)
        rows.append(row)
    return header, rows


def _filler(rng: random.Random, filler: str, number: int) -> object:
    if filler == "id":
        return number
    if filler == "text":
        return rng.choice(_LABELS)
    if filler == "blank":
        return ""
    return rng.random()


# ---------------------------------------------------------------------------------------------
# text files


def _format_number(rng: random.Random, number: object, decimal_comma: bool, style: str) -> str:
    if isinstance(number, str):
        return number
    if isinstance(number, int):
        return str(number)
    if style == "repr":
        text = repr(number)
    elif style == "fixed" and math.isfinite(number) and abs(number) < 1e20:
        text = f"{number:.4f}"
    elif style == "sci":
        text = f"{number:.6e}"
    else:
        text = f"{number:.10g}"
    if decimal_comma:
        text = text.replace(".", ",")
    return text


def _quote(rng: random.Random, cell: str, delimiter: str, quoting: str) -> str:
    needs = any(c in cell for c in (delimiter, '"', "\n", "\r"))
    if quoting == "all" or (quoting == "minimal" and needs):
        return '"' + cell.replace('"', '""') + '"'
    return cell


def _text_file(rng: random.Random, max_columns: int | None) -> tuple[bytes, str, str]:
    header, rows = _table(rng, max_columns=max_columns)
    decimal_comma = rng.random() < 0.2
    plain = [",", ",", ";", "\t", "|", " "]
    delimiter = rng.choice([";", "\t"] if decimal_comma and rng.random() < 0.8 else plain)
    style = rng.choice(["repr", "fixed", "sci", "g"])
    quoting = rng.choice(["minimal", "minimal", "all", "none"])
    lines = []
    if rng.random() < 0.15:
        for _ in range(rng.choice([1, 2, 4])):
            lines.append(rng.choice(["Results of the bolt test", "Report", "# comment", "Date: 2024-03-01",
                                     "", "Operator:;x", "<html>", "\x0c"]))
    if rng.random() >= 0.05:
        lines.append(delimiter.join(_quote(rng, str(c), delimiter, quoting) for c in header))
    for row in rows:
        cells = [_quote(rng, _format_number(rng, c, decimal_comma, style) if not isinstance(c, str) else c,
                        delimiter, quoting) for c in row]
        if rng.random() < 0.03:  # ragged
            cells = cells[:-1] if rng.random() < 0.5 else cells + ["", "extra"]
        lines.append(delimiter.join(cells))
        if rng.random() < 0.02:
            lines.append(rng.choice(["", delimiter * len(row), "   "]))
    if rng.random() < 0.05:
        lines.extend(["", "Total" + delimiter + "999"])
    newline = rng.choice(["\n", "\n", "\r\n", "\r"])
    text = newline.join(lines) + (newline if rng.random() < 0.8 else "")
    encoding = rng.choice(["utf-8", "utf-8", "utf-8", "utf-8-sig", "utf-16", "utf-16-le", "utf-16-be",
                           "cp1252", "latin-1", "utf-32"])
    data = text.encode(encoding, errors="replace")
    extension = {"\t": ".tsv"}.get(delimiter, rng.choice([".csv", ".txt"]))
    if rng.random() < 0.1:
        extension = rng.choice([".csv", ".tsv", ".txt"])
    tag = (f"text {encoding} delim={delimiter!r} comma={decimal_comma} quoting={quoting} rows={len(rows)} "
           f"cols={len(header)}")
    return data, extension, tag


def _mutate_bytes(rng: random.Random, data: bytes) -> tuple[bytes, str]:
    buffer = bytearray(data)
    steps = []
    for _ in range(rng.choice([1, 1, 2, 5])):
        how = rng.choice(["flip", "insert", "delete", "truncate", "duplicate", "nul", "quote", "bom", "crlf"])
        at = rng.randrange(len(buffer) + 1)
        if how == "flip" and buffer:
            for _ in range(rng.choice([1, 4, 32])):
                buffer[rng.randrange(len(buffer))] = rng.getrandbits(8)
        elif how == "insert":
            buffer[at:at] = bytes(rng.getrandbits(8) for _ in range(rng.choice([1, 8, 100])))
        elif how == "delete":
            del buffer[at:at + rng.choice([1, 10, 1000])]
        elif how == "truncate":
            del buffer[at:]
        elif how == "duplicate":
            buffer[at:at] = buffer[at:at + rng.choice([10, 1000])] * rng.choice([2, 50])
        elif how == "nul":
            buffer[at:at] = b"\x00" * rng.choice([1, 2, 64])
        elif how == "quote":
            buffer[at:at] = rng.choice([b'"', b"'", b'"""'])
        elif how == "bom":
            buffer[0:0] = rng.choice([b"\xef\xbb\xbf", b"\xff\xfe", b"\xfe\xff", b"\xff\xfe\x00\x00"])
        elif how == "crlf":
            buffer[at:at] = rng.choice([b"\r", b"\n", b"\r\n\r\n", b"\x85", b"\xe2\x80\xa8"])
        steps.append(how)
    return bytes(buffer), "+".join(steps)


# ---------------------------------------------------------------------------------------------
# workbooks


def _cell_value(rng: random.Random, value: object) -> object:
    if isinstance(value, float) and not math.isfinite(value):
        return repr(value)
    if isinstance(value, str) and rng.random() < 0.5:
        try:
            return float(value)
        except ValueError:
            return value
    return value


def _xlsx(rng: random.Random, max_columns: int | None) -> tuple[bytes, str]:
    from openpyxl import Workbook

    header, rows = _table(rng, cells=20_000, max_columns=max_columns)
    book = Workbook()
    sheet = book.active
    sheet.title = rng.choice(["Data", "Sheet1", "Notes", "日本", "a" * 31])
    if sheet.title == "Notes" or rng.random() < 0.1:
        sheet["A1"] = "Notes on the samples"
        sheet = book.create_sheet(rng.choice(["Data", "Sheet2"]))
    if rng.random() < 0.1:
        sheet.sheet_state = "hidden"
        book.create_sheet("Visible")
    offset = rng.choice([0, 0, 0, 2])
    for column, name in enumerate(header, start=1):
        sheet.cell(row=1 + offset, column=column, value=_clean_xml(name))
    for r, row in enumerate(rows, start=2 + offset):
        for column, value in enumerate(row, start=1):
            value = _cell_value(rng, value)
            sheet.cell(row=r, column=column, value=_clean_xml(value))
    if rng.random() < 0.1 and rows:
        sheet.cell(row=2 + offset, column=2, value=rng.choice(["=1/0", "=A1", True, "#DIV/0!"]))
    if rng.random() < 0.05 and len(rows) > 2:
        import datetime

        sheet.cell(row=3 + offset, column=2, value=datetime.datetime(2024, 1, 5, 12, 30))
    if rng.random() < 0.05:
        sheet.merge_cells(start_row=1 + offset, start_column=1, end_row=2 + offset, end_column=2)
    out = io.BytesIO()
    book.save(out)
    return out.getvalue(), f"xlsx rows={len(rows)} cols={len(header)}"


def _clean_xml(value: object) -> object:
    """openpyxl refuses the control characters XML cannot hold: leave them out of workbooks."""
    if not isinstance(value, str):
        return value
    return "".join(c for c in value if c in "\t\n\r" or ord(c) >= 32)[:32767]


def _ods(rng: random.Random, max_columns: int | None) -> tuple[bytes, str]:
    from odf.opendocument import OpenDocumentSpreadsheet
    from odf.table import Table, TableCell, TableRow
    from odf.text import P

    header, rows = _table(rng, cells=2_000, max_columns=max_columns)
    document = OpenDocumentSpreadsheet()
    table = Table(name=rng.choice(["Data", "Sheet1", "Notes"]))
    for row in [header] + rows:
        table_row = TableRow()
        for value in row:
            value = _cell_value(rng, value)
            if isinstance(value, (int, float)) and not isinstance(value, bool):
                cell = TableCell(valuetype="float", value=repr(float(value)))
                cell.addElement(P(text=repr(value)))
            else:
                cell = TableCell(valuetype="string")
                cell.addElement(P(text=str(_clean_xml(value))))
            table_row.addElement(cell)
        table.addElement(table_row)
    document.spreadsheet.addElement(table)
    out = io.BytesIO()
    document.write(out)
    return out.getvalue(), f"ods rows={len(rows)} cols={len(header)}"


def _mutate_workbook(rng: random.Random, data: bytes) -> tuple[bytes, str]:
    how = rng.choice(["bytes", "truncate", "member-text", "member-text", "drop-member", "crc", "not-zip"])
    if how == "bytes":
        return _mutate_bytes(rng, data)[0], how
    if how == "truncate":
        return data[:rng.randrange(len(data))], how
    if how == "not-zip":
        return rng.choice([b"group,value\nA,1\nB,2\n", b"PK\x03\x04", b"<html></html>", b""]), how
    if how == "crc":
        buffer = bytearray(data)
        at = data.find(b"PK\x03\x04")
        if at >= 0 and len(buffer) > at + 18:
            buffer[at + 14:at + 18] = bytes(rng.getrandbits(8) for _ in range(4))
        return bytes(buffer), how
    source = zipfile.ZipFile(io.BytesIO(data))
    names = source.namelist()
    victim = rng.choice([n for n in names if n.endswith(".xml")] or names)
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as target:
        for name in names:
            content = source.read(name)
            if name == victim:
                if how == "drop-member":
                    continue
                content = _mutate_xml(rng, content)
            target.writestr(name, content)
    return out.getvalue(), f"{how} {victim}"


def _mutate_xml(rng: random.Random, content: bytes) -> bytes:
    how = rng.choice(["cut", "bytes", "numbers", "attribute", "tag"])
    if how == "cut":
        return content[:rng.randrange(len(content) + 1)]
    if how == "bytes":
        return _mutate_bytes(rng, content)[0]
    if how == "numbers":  # a cell's number replaced by something odd
        for old in (b"<v>", b'office:value="'):
            at = content.find(old, rng.randrange(len(content) + 1))
            if at >= 0:
                at += len(old)
                odd = rng.choice([b"1e999", b"NaN", b"-", b"", b"1e-400", b"abc"])
                return content[:at] + odd + content[at:]
        return content
    if how == "attribute":  # a reference or count made wrong
        for old in (b'r="', b'ref="', b'count="', b'table:number-columns-repeated="'):
            at = content.find(old)
            if at >= 0:
                at += len(old)
                wrong = rng.choice([b"ZZ9", b"A0", b"-1", b"99999", b"A1048576", b"XFD"])
                return content[:at] + wrong + content[at:]
        return content
    return content.replace(b"<", b"<x", 1)
