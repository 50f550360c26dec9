"""Hostile and damaged workbooks: refused with their sizes, or stopped in the reader's own process,
never an abort, a panic's text on the terminal or gigabytes of memory."""

from __future__ import annotations

import os
import subprocess
import sys
import zipfile
from pathlib import Path

import openpyxl
import pytest

from engine.errors import FileProblem
from engine.io import bounds, read_table
from engine.io.sheets import workbook_sheets

ROOT = Path(__file__).resolve().parents[2]


def _corner_book(path: Path) -> Path:
    """A 5 KB workbook with a name in A1 and one number in the last row and column: the reader
    would hold the sheet as 17 billion cells (about 550 GB)."""
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = "plots"
    sheet["A1"] = "yield"
    sheet.cell(row=1_048_576, column=16_384, value=1.5)
    book.save(path)
    return path


def _statsmodels_xls() -> Path:
    import statsmodels

    found = sorted(Path(os.path.dirname(statsmodels.__file__)).rglob("test_spec.xls"))
    if not found or not found[0].is_file():
        pytest.skip("no .xls workbook is installed to damage")
    return found[0]


def test_a_cell_in_the_last_row_and_column_is_refused_with_the_sizes(tmp_path):
    path = _corner_book(tmp_path / "corner.xlsx")
    assert path.stat().st_size < 10_000
    with pytest.raises(FileProblem) as error:
        read_table(path)
    message = str(error.value)
    assert "Sheet 'plots' of corner.xlsx spans 1,048,576 rows by 16,384 columns" in message
    assert "1.1 TB" in message  # 17,179,869,184 cells at 64 bytes each


def test_an_ordinary_sheet_passes_the_extent_check(tmp_path):
    path = tmp_path / "plots.xlsx"
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(["regime", "yield"])
    for i in range(200):
        sheet.append(["slow" if i % 2 else "split", 7.0 + i / 100])
    book.save(path)
    assert bounds.sheet_extent(path, "Sheet", limit=10**6) is None
    # a limit too small for 201 rows by 2 columns (bounded by 26 columns) is caught
    assert bounds.sheet_extent(path, "Sheet", limit=1000) == (201, 2)
    assert read_table(path).frame.shape == (200, 2)


def test_a_row_reference_beyond_the_limit_is_found_whatever_its_digits():
    for limit in (1, 9, 10, 99, 1234, 70_000, 999_999):
        pattern = bounds._rows_above(limit)
        for row in (limit + 1, limit + 10, limit * 10 + 3, 10 * limit + 99):
            assert pattern.search(b' r="B%d"' % row), (limit, row)
        for row in (1, limit, max(limit - 1, 1)):
            assert not pattern.search(b' r="B%d"' % row), (limit, row)


def test_a_zip_bomb_is_refused_by_its_unpacked_size(tmp_path, monkeypatch):
    # scaled down for the test: 8 MB of blanks packed into a few kilobytes (ratio near 1,000)
    monkeypatch.setattr(bounds, "RATIO_FLOOR", 1_000_000)
    path = tmp_path / "bomb.xlsx"
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as archive:
        archive.writestr("xl/worksheets/sheet1.xml", "<worksheet>" + " " * 8_000_000 + "</worksheet>")
    with pytest.raises(FileProblem, match=r"bomb\.xlsx is 0\.\d MB but unpacks to 8\.0 MB, [\d,]+ times its size"):
        read_table(path)


def test_an_abort_in_the_reader_ends_its_process_not_ours(tmp_path, monkeypatch):
    # with the extent check switched off the reader asks for 550 GB and aborts: only the child dies
    monkeypatch.setattr(bounds, "sheet_extent", lambda *args: None)
    path = _corner_book(tmp_path / "corner.xlsx")
    with pytest.raises(FileProblem, match=r"Sheet 'plots' of corner\.xlsx asks for 549\.8 GB of memory"):
        read_table(path)


def test_a_reader_that_outgrows_its_limit_is_stopped(tmp_path, monkeypatch):
    monkeypatch.setattr(bounds, "sheet_extent", lambda *args: None)
    monkeypatch.setattr(bounds, "LIMIT_FLOOR", 200_000_000)
    monkeypatch.setattr(bounds, "LIMIT_PER_BYTE", 0)
    path = tmp_path / "many.xlsx"
    book = openpyxl.Workbook()
    sheet = book.active
    sheet["A1"] = "yield"
    sheet["ZZ20000"] = 1.0  # 14 million cells: more than 200 MB once read
    book.save(path)
    with pytest.raises(FileProblem, match=r"many\.xlsx .*(memory|could not be read)"):
        read_table(path)


def _damaged_xls(tmp_path) -> Path:
    # one byte changed in a real workbook makes python-calamine 0.9 panic (found by mutation)
    data = bytearray(_statsmodels_xls().read_bytes())
    data[2661] = 0x87
    path = tmp_path / "damaged.xls"
    path.write_bytes(bytes(data))
    return path


def test_a_panic_in_the_reader_is_one_line_naming_the_file(tmp_path):
    path = _damaged_xls(tmp_path)
    with pytest.raises(FileProblem, match=r"damaged\.xls could not be read as an older-format workbook"):
        read_table(path)


def test_the_command_prints_one_line_and_no_rust_text_for_a_panic(tmp_path):
    path = _damaged_xls(tmp_path)
    done = subprocess.run([sys.executable, "-m", "engine", "analyze", str(path)], cwd=ROOT,
                          capture_output=True, text=True, timeout=120)
    assert done.returncode == 2
    assert done.stdout == ""
    assert done.stderr.count("\n") == 1 and "damaged.xls" in done.stderr
    assert "panicked" not in done.stderr and "backtrace" not in done.stderr.lower()


def _hidden_book(path: Path) -> Path:
    book = openpyxl.Workbook()
    notes = book.active
    notes.title = "Notes"
    notes["A1"] = "Plots sown in April; yields in t/ha."
    old = book.create_sheet("old run")
    old.append(["regime", "yield"])
    old.append(["slow", 1.0])
    old.append(["split", 2.0])
    old.sheet_state = "hidden"
    data = book.create_sheet("yields")
    data.append(["regime", "yield"])
    for i in range(6):
        data.append(["slow" if i % 2 else "split", 7.0 + i / 10])
    book.save(path)
    return path


def test_hidden_sheets_are_passed_over_and_said_so(tmp_path):
    path = _hidden_book(tmp_path / "season.xlsx")
    sheets = workbook_sheets(path)
    assert sheets.names == ("Notes", "old run", "yields")
    assert sheets.hidden == ("old run",)
    assert sheets.visible == ("Notes", "yields")
    assert sheets.first_with_numbers == "yields"  # "Notes" holds words only, "old run" is hidden
    table = read_table(path, sheet="yields")
    assert any("'old run'" in note.text and "passed over" in note.text for note in table.notes)
    by_name = read_table(path, sheet="old run")
    assert by_name.frame["yield"].tolist() == [1.0, 2.0]
    assert any("hidden" in note.text and "asked for by name" in note.text for note in by_name.notes)


def test_the_default_sheet_is_the_first_visible_one(tmp_path):
    book = openpyxl.Workbook()
    first = book.active
    first.title = "archive"
    first.append(["regime", "yield"])
    first.append(["old", 1.0])
    first.sheet_state = "hidden"
    data = book.create_sheet("now")
    data.append(["regime", "yield"])
    data.append(["slow", 7.5])
    data.append(["split", 7.25])
    path = tmp_path / "book.xlsx"
    book.save(path)
    table = read_table(path)
    assert table.sheet == "now"
    assert table.frame["yield"].tolist() == [7.5, 7.25]


def test_a_message_about_a_sheet_names_the_sheet(tmp_path):
    path = _hidden_book(tmp_path / "season.xlsx")
    from engine.io import make_groups, propose_layout

    with pytest.raises(Exception) as error:
        table = read_table(path, sheet="Notes")
        make_groups(table, values=propose_layout(table).value_columns[:2])
    assert "'Notes'" in str(error.value) and "season.xlsx" in str(error.value)


def test_an_ods_with_a_billion_repeated_cells_is_refused_naming_the_file(tmp_path):
    # one cell repeated across every column of every row: 17 billion cells from 800 bytes
    path = tmp_path / "repeated.ods"
    cell = ('<table:table-cell table:number-columns-repeated="16384" office:value-type="float" '
            'office:value="1"><text:p>1</text:p></table:table-cell>')
    content = ('<?xml version="1.0" encoding="UTF-8"?><office:document-content '
               'xmlns:office="urn:oasis:names:tc:opendocument:xmlns:office:1.0" '
               'xmlns:table="urn:oasis:names:tc:opendocument:xmlns:table:1.0" '
               'xmlns:text="urn:oasis:names:tc:opendocument:xmlns:text:1.0" office:version="1.2">'
               '<office:body><office:spreadsheet><table:table table:name="data">'
               f'<table:table-row table:number-rows-repeated="1048576">{cell}</table:table-row>'
               '</table:table></office:spreadsheet></office:body></office:document-content>')
    with zipfile.ZipFile(path, "w") as archive:
        archive.writestr("mimetype", "application/vnd.oasis.opendocument.spreadsheet")
        archive.writestr("META-INF/manifest.xml", (
            '<?xml version="1.0" encoding="UTF-8"?><manifest:manifest '
            'xmlns:manifest="urn:oasis:names:tc:opendocument:xmlns:manifest:1.0">'
            '<manifest:file-entry manifest:full-path="/" '
            'manifest:media-type="application/vnd.oasis.opendocument.spreadsheet"/>'
            '<manifest:file-entry manifest:full-path="content.xml" manifest:media-type="text/xml"/>'
            '</manifest:manifest>'))
        archive.writestr("content.xml", content, compress_type=zipfile.ZIP_DEFLATED)
    with pytest.raises(FileProblem, match=r"repeated\.ods could not be read .*17179869184 cells"):
        read_table(path)


def test_a_reference_after_a_tab_or_line_break_is_seen_too():
    # XML allows any white space between attributes; the reader takes them all
    for gap in (b" ", b"\t", b"\n", b"\r"):
        text = bounds._spaced(b"<row" + gap + b'r="1048576"><c' + gap + b'r="XFD1048576"><v>1</v></c></row>')
        assert bounds._columns_at_most(text, 0) == 16_384
        assert bounds._rows_above(1_000_000).search(text)


def _far_cell_xls(tmp_path) -> Path:
    """The installed .xls with one number moved to row 65,536 and column 65,536 (a column
    number BIFF8 should never hold): the reader would span 4 billion cells."""
    import struct

    data = bytearray(_statsmodels_xls().read_bytes())
    stream = bounds._cfb_stream(bytes(data), ("Workbook", "Book"))
    at = 0
    while at + 4 <= len(stream):
        kind, length = struct.unpack_from("<HH", stream, at)
        if kind in bounds._CELL_RECORDS:  # a cell with a value: row, column, ...
            record = stream[at: at + 4 + length]
            break
        at += 4 + length
    where = bytes(data).index(record)
    data[where + 4: where + 8] = struct.pack("<HH", 0xFFFF, 0xFFFF)
    path = tmp_path / "far.xls"
    path.write_bytes(bytes(data))
    return path


def test_an_xls_sheet_spanning_billions_of_cells_is_refused_before_reading(tmp_path):
    assert bounds.xls_extents(_statsmodels_xls()) == [("spec", (6, 8))]  # as calamine reads it
    path = _far_cell_xls(tmp_path)
    with pytest.raises(FileProblem, match=r"Sheet 'spec' of far\.xls spans 65,53\d rows by 65,53\d columns"):
        read_table(path)


@pytest.mark.parametrize("name", ["noise.xlsx", "noise.ods", "cut.xlsx"])
def test_a_damaged_workbook_leaves_no_process_or_file_open(tmp_path, name):
    # a workbook the reader refuses as it opens: its process, pipes and error file are all closed
    # (with ResourceWarning as an error, anything left open prints "Exception ignored ..." lines)
    path = tmp_path / name
    if name.startswith("cut"):
        whole = tmp_path / "whole.xlsx"
        book = openpyxl.Workbook()
        book.active.append(["yield", 1.5])
        book.save(whole)
        with zipfile.ZipFile(whole) as source, zipfile.ZipFile(path, "w") as damaged:
            for item in source.infolist():
                data = source.read(item)
                damaged.writestr(item, data[: len(data) // 2] if item.filename.endswith("workbook.xml") else data)
    else:
        path.write_bytes(b"PK\x03\x04" + bytes(range(256)) * 40)
    for command in ("columns", "analyze"):
        done = subprocess.run([sys.executable, "-W", "error::ResourceWarning", "-m", "engine", command,
                               str(path)], cwd=ROOT, capture_output=True, text=True, timeout=120)
        assert done.returncode == 2, done.stderr
        assert done.stderr.count("\n") == 1 and name in done.stderr, done.stderr
        assert "ResourceWarning" not in done.stderr and "Exception ignored" not in done.stderr
