"""Bad input gives a typed error with one line naming the file (and row, column where it applies)."""

from __future__ import annotations

import builtins
import os
import zipfile

import pandas as pd
import pytest

from engine.errors import ColumnProblem, DataProblem, FileProblem, OptionProblem, TwofoldError
from engine.io import file_checksum, make_groups, propose_layout, read_table


def _csv(tmp_path, text, name="data.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def _one_line(error: pytest.ExceptionInfo) -> str:
    message = str(error.value)
    assert "\n" not in message and "Traceback" not in message
    return message


def test_missing_file(tmp_path):
    with pytest.raises(FileProblem, match=r"nowhere\.csv was not found") as error:
        read_table(tmp_path / "nowhere.csv")
    _one_line(error)


def test_folder_instead_of_file(tmp_path):
    folder = tmp_path / "looks.csv"
    folder.mkdir()
    with pytest.raises(FileProblem, match=r"looks\.csv is a folder"):
        read_table(folder)


@pytest.mark.parametrize("name", ["pipe.csv", "pipe.xlsx"])
def test_a_named_pipe_is_refused_at_once_not_waited_on(tmp_path, name):
    # opening a FIFO for reading blocks until a writer comes: the check must not open it
    path = tmp_path / name
    os.mkfifo(path)
    with pytest.raises(FileProblem, match=rf"{name.replace('.', '[.]')} is a named pipe, not a saved file"):
        read_table(path)
    with pytest.raises(FileProblem, match="named pipe"):
        file_checksum(path)


@pytest.mark.parametrize("name", ["notes.docx", "table.json", "noextension"])
def test_unknown_extension(tmp_path, name):
    path = tmp_path / name
    path.write_text("a,b\n1,2\n")
    with pytest.raises(FileProblem, match=r"Twofold reads \.csv, \.tsv, \.txt, \.xlsx, \.xls, \.ods"):
        read_table(path)


def test_upper_case_extension_is_fine(tmp_path):
    assert read_table(_csv(tmp_path, "g,v\nA,1\nB,2\n", "DATA.CSV")).kind == "csv"


@pytest.mark.parametrize("content", [b"", b"   \n\n\r\n", b"\xef\xbb\xbf"])
def test_empty_file(tmp_path, content):
    path = tmp_path / "empty.csv"
    path.write_bytes(content)
    with pytest.raises(FileProblem, match=r"empty\.csv (is empty|holds no data)"):
        read_table(path)


def test_header_only(tmp_path):
    with pytest.raises(FileProblem, match=r"head\.csv has column names but no rows of data"):
        read_table(_csv(tmp_path, "supplier,strength\n", "head.csv"))


@pytest.mark.parametrize("content", [
    bytes(range(256)) * 4,
    b"PK\x03\x04" + b"\x14\x00" * 50,
    b"%PDF-1.7\n" + bytes(range(0, 32)) * 20,
])
def test_binary_file(tmp_path, content):
    path = tmp_path / "image.csv"
    path.write_bytes(content)
    with pytest.raises(FileProblem, match=r"image\.csv looks like a binary file"):
        read_table(path)


def test_permission_denied(tmp_path, monkeypatch):
    # the tests may run as root, which ignores file modes: refuse the read-only open instead
    path = _csv(tmp_path, "g,v\nA,1\n", "locked.csv")
    real_open = builtins.open

    def locked(file, mode="r", *args, **kwargs):
        if str(file) == str(path):
            raise PermissionError(13, "Permission denied", str(file))
        return real_open(file, mode, *args, **kwargs)

    monkeypatch.setattr(builtins, "open", locked)
    with pytest.raises(FileProblem, match=r"locked\.csv cannot be opened: permission denied"):
        read_table(path)
    with pytest.raises(FileProblem, match=r"locked\.csv cannot be opened: permission denied"):
        file_checksum(path)


def test_files_are_opened_read_only(tmp_path, monkeypatch):
    path = _csv(tmp_path, "g,v\nA,1\nB,2\nA,3\nB,4\n")
    real_open = builtins.open
    modes = []

    def watching(file, mode="r", *args, **kwargs):
        if str(file) == str(path):
            modes.append(mode)
        return real_open(file, mode, *args, **kwargs)

    monkeypatch.setattr(builtins, "open", watching)
    read_table(path)
    file_checksum(path)
    assert modes and all(set(m) <= {"r", "b"} for m in modes)


@pytest.mark.parametrize("extension", [".xlsx", ".ods", ".xls"])
def test_broken_workbook(tmp_path, extension):
    path = tmp_path / f"broken{extension}"
    path.write_bytes(b"this is not a workbook at all\n" * 10)
    with pytest.raises(FileProblem, match=rf"broken\{extension} could not be read as an? "):
        read_table(path)


def test_truncated_xlsx(tmp_path):
    good = tmp_path / "good.xlsx"
    pd.DataFrame({"g": ["A", "B"] * 5, "v": range(10)}).to_excel(good, index=False)
    cut = tmp_path / "cut.xlsx"
    cut.write_bytes(good.read_bytes()[: good.stat().st_size // 2])
    with pytest.raises(FileProblem, match=r"cut\.xlsx could not be read"):
        read_table(cut)


def test_xlsx_zip_without_a_workbook(tmp_path):
    path = tmp_path / "hollow.xlsx"
    with zipfile.ZipFile(path, "w") as archive:
        archive.writestr("readme.txt", "nothing here")
    with pytest.raises(FileProblem, match=r"hollow\.xlsx could not be read"):
        read_table(path)


def test_unknown_sheet_lists_the_sheets(tmp_path):
    path = tmp_path / "book.xlsx"
    with pd.ExcelWriter(path) as writer:
        pd.DataFrame({"v": [1, 2]}).to_excel(writer, sheet_name="north", index=False)
        pd.DataFrame({"v": [3, 4]}).to_excel(writer, sheet_name="south", index=False)
    with pytest.raises(ColumnProblem, match=r"book\.xlsx has no sheet 'east'; its sheets are 'north', 'south'"):
        read_table(path, sheet="east")


def test_empty_sheet_names_the_others(tmp_path):
    path = tmp_path / "book.xlsx"
    with pd.ExcelWriter(path) as writer:
        pd.DataFrame().to_excel(writer, sheet_name="blank", index=False)
        pd.DataFrame({"v": [3, 4]}).to_excel(writer, sheet_name="data", index=False)
    with pytest.raises(FileProblem, match=r"Sheet 'blank' of book\.xlsx is empty; the other sheets are 'data'"):
        read_table(path)


def test_missing_column_lists_the_columns(tmp_path):
    table = read_table(_csv(tmp_path, "supplier,strength\nA,1\nB,2\nA,3\nB,4\n"))
    with pytest.raises(ColumnProblem, match=r"data\.csv has no column 'strenght'; its columns are 'supplier', 'strength'"):
        make_groups(table, values="strenght", group="supplier")
    with pytest.raises(ColumnProblem, match=r"has no column 'vendor'"):
        make_groups(table, values="strength", group="vendor")


def test_value_column_all_text(tmp_path):
    table = read_table(_csv(tmp_path, "supplier,grade\nA,high\nB,low\nA,high\nB,mid\n"))
    with pytest.raises(ColumnProblem, match=r"Column 'grade' of data\.csv holds only text \('high', 'low', 'mid'\)"):
        make_groups(table, values="grade", group="supplier")


def test_no_numbers_anywhere(tmp_path):
    table = read_table(_csv(tmp_path, "supplier,grade\nA,high\nB,low\n"))
    with pytest.raises(ColumnProblem, match=r"No column of data\.csv holds numbers"):
        propose_layout(table)


def test_group_with_one_usable_value(tmp_path):
    table = read_table(_csv(tmp_path, "supplier,strength\nA,1\nB,2\nA,3\nB,x\nA,4\n"))
    with pytest.raises(DataProblem, match=r"Group 'B' has 1 usable value in 'strength' of data\.csv; at least 2 are needed"):
        make_groups(table, values="strength", group="supplier")


def test_wide_column_with_no_numbers_left(tmp_path):
    table = read_table(_csv(tmp_path, "slow,split\n1,\n2,4\n3,\n"))
    with pytest.raises(DataProblem, match=r"Group 'split' has 1 usable value in 'split'"):
        make_groups(table, values=("slow", "split"))


def test_only_one_group(tmp_path):
    table = read_table(_csv(tmp_path, "supplier,strength\nA,1\nA,2\n"))
    with pytest.raises(DataProblem, match=r"holds only one group \('A'\)"):
        make_groups(table, values="strength", group="supplier")


def test_more_than_two_groups_needs_a_pick(tmp_path):
    table = read_table(_csv(tmp_path, "supplier,strength\nA,1\nB,2\nC,3\nA,4\nB,5\nC,6\n"))
    with pytest.raises(ColumnProblem, match=r"holds 3 groups \('A', 'B', 'C'\); pick two to compare"):
        make_groups(table, values="strength", group="supplier")
    with pytest.raises(ColumnProblem, match=r"has no group 'D'; its groups are 'A', 'B', 'C'"):
        make_groups(table, values="strength", group="supplier", pick=("A", "D"))
    with pytest.raises(OptionProblem, match=r"the same \('A'\)"):
        make_groups(table, values="strength", group="supplier", pick=("A", "A "))


def test_wrong_shapes_of_arguments(tmp_path):
    table = read_table(_csv(tmp_path, "supplier,strength,hardness\nA,1,2\nB,2,3\nA,3,4\nB,4,5\n"))
    with pytest.raises(ColumnProblem, match=r"name one value column"):
        make_groups(table, values=("strength", "hardness"), group="supplier")
    with pytest.raises(ColumnProblem, match=r"two value columns"):
        make_groups(table, values="strength")
    with pytest.raises(ColumnProblem, match=r"cannot hold both"):
        make_groups(table, values="strength", group="strength")
    with pytest.raises(OptionProblem, match=r"values must be"):
        make_groups(table, values=5, group="supplier")
    with pytest.raises(OptionProblem, match=r"needs a table"):
        make_groups("data.csv", values="strength", group="supplier")


def test_unexpected_parser_errors_are_wrapped(tmp_path, monkeypatch):
    path = _csv(tmp_path, "g,v\nA,1\nB,2\n")

    def boom(*args, **kwargs):
        raise RuntimeError("tokenizer fell over\nsecond line")

    monkeypatch.setattr(pd, "read_csv", boom)
    with pytest.raises(FileProblem, match=r"^data\.csv could not be read: tokenizer fell over second line$"):
        read_table(path)


def test_every_error_is_a_twofold_error():
    for kind in (FileProblem, ColumnProblem, DataProblem, OptionProblem):
        assert issubclass(kind, TwofoldError)


def test_ragged_row_names_the_row(tmp_path):
    path = _csv(tmp_path, "\n\ng;v\nA;1\nA;2\nB;2;3\n", "ragged.csv")
    with pytest.raises(FileProblem, match=r"^ragged\.csv, row 6: 3 cells where the rows above have 2; check for a stray semicolon"):
        read_table(path)


def test_unclosed_quote_names_the_row(tmp_path):
    path = _csv(tmp_path, 'g,v\nA,1\n"B,2\nA,3\n', "quote.csv")
    with pytest.raises(FileProblem, match=r"^quote\.csv, row 3: a quote mark opens a cell that is never closed"):
        read_table(path)


def test_a_file_too_large_for_the_free_memory_is_refused_before_reading(tmp_path, monkeypatch):
    from engine.io import read as reader

    path = _csv(tmp_path, "g,v\n" + "A,1.5\nB,2.5\n" * 20_000)  # larger than the 64 KiB sample
    size = path.stat().st_size
    parsed = []
    monkeypatch.setattr(pd, "read_csv", lambda *a, **k: parsed.append(1))
    monkeypatch.setattr(reader, "available_memory", lambda: int(size * 1.5))
    with pytest.raises(FileProblem) as error:
        read_table(path)
    message = _one_line(error)
    shown = lambda amount: f"{amount / 1e6:.1f} MB"  # noqa: E731
    assert message.startswith(f"data.csv is {shown(size)}; reading it needs about {shown(2 * size)} "
                              f"of memory and {shown(int(size * 1.5))} are free.")
    assert "Close other programs, or split the file." in message and not parsed


def test_enough_free_memory_or_no_figure_lets_the_file_be_read(tmp_path, monkeypatch):
    from engine.io import read as reader

    path = _csv(tmp_path, "g,v\n" + "A,1.5\nB,2.5\n" * 20_000)
    for free in (path.stat().st_size * 3, None):
        monkeypatch.setattr(reader, "available_memory", lambda free=free: free)
        assert len(read_table(path).frame) == 40_000


def test_a_missing_column_among_100000_is_one_short_line(tmp_path):
    path = tmp_path / "wide.csv"
    path.write_text(",".join(f"c{j}" for j in range(100_000)) + "\n" + ",".join(["1.5"] * 100_000) + "\n")
    table = read_table(path)
    with pytest.raises(ColumnProblem, match=r"wide\.csv has no column 'strength'; its columns are 'c0', .* and 99,992 more") as error:
        make_groups(table, values="strength", group="c0")
    assert len(_one_line(error)) < 300


def test_an_analysis_error_names_the_file(tmp_path):
    # the t procedures refuse two groups without spread; their message is made to name the file
    from engine.analysis import analyze

    table = read_table(_csv(tmp_path, "g,v\nA,1\nA,1\nA,1\nB,2\nB,2\nB,2\n", "flat.csv"))
    intake = make_groups(table, values="v", group="g")
    with pytest.raises(DataProblem, match=r"^flat\.csv: Every value within group 1 is the same"):
        analyze(intake.groups, source={"file": "flat.csv", "sheet": None})


def test_an_error_about_a_sheet_names_it(tmp_path):
    import openpyxl

    path = tmp_path / "season.xlsx"
    book = openpyxl.Workbook()
    book.active.title = "yields"
    book.active.append(["regime", "yield"])
    book.active.append(["slow", 7.5])
    book.active.append(["split", 7.25])
    book.save(path)
    table = read_table(path)
    with pytest.raises(ColumnProblem, match=r"^Sheet 'yields' of season\.xlsx has no column 'weight'"):
        make_groups(table, values="weight", group="regime")
