"""engine.io.read_table: delimiters, encodings, decimal marks, headers, sheets, row numbers."""

from __future__ import annotations

import csv
import hashlib
import os
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from engine.io import SUPPORTED_EXTENSIONS, file_checksum, read_table

STRENGTHS = [812.5, 799.0, 845.25, 830.75]
SUPPLIERS = ["north", "south", "north", "south"]


def _write(path: Path, text: str, encoding: str = "utf-8") -> Path:
    path.write_bytes(text.encode(encoding))
    return path


def _rows(delimiter: str, decimal: str = ".") -> str:
    lines = [delimiter.join(["supplier", "strength", "lot"])]
    for supplier, value, lot in zip(SUPPLIERS, STRENGTHS, [1, 2, 3, 4]):
        lines.append(delimiter.join([supplier, f"{value}".replace(".", decimal), str(lot)]))
    return "\n".join(lines) + "\n"


def test_supported_extensions_are_the_documented_ones():
    assert SUPPORTED_EXTENSIONS == (".csv", ".tsv", ".txt", ".xlsx", ".xls", ".ods")


@pytest.mark.parametrize("delimiter, name", [(",", "comma"), (";", "semicolon"), ("\t", "tab"), ("|", "pipe")])
def test_each_delimiter_is_detected(tmp_path, delimiter, name):
    path = _write(tmp_path / "bolts.csv", _rows(delimiter))
    table = read_table(path)
    assert table.delimiter == delimiter
    assert list(table.frame.columns) == ["supplier", "strength", "lot"]
    # reference: the values written above, parsed by Python's float()
    np.testing.assert_array_equal(table.frame["strength"].to_numpy(), STRENGTHS)
    assert table.frame["strength"].dtype == np.float64
    assert any(name in note.text for note in table.notes)


@pytest.mark.parametrize("extension", [".tsv", ".txt"])
def test_tab_files_with_other_extensions(tmp_path, extension):
    table = read_table(_write(tmp_path / f"bolts{extension}", _rows("\t")))
    assert table.kind == extension[1:]
    assert table.delimiter == "\t"
    assert table.frame["supplier"].tolist() == SUPPLIERS


def test_whitespace_separated_txt(tmp_path):
    text = "supplier strength\nnorth 812.5\nsouth 799.0\nnorth 845.25\n"
    table = read_table(_write(tmp_path / "bolts.txt", text))
    np.testing.assert_array_equal(table.frame["strength"].to_numpy(), STRENGTHS[:3])


@pytest.mark.parametrize("codec, expected", [
    ("utf-8", "utf-8"), ("utf-8-sig", "utf-8-sig"), ("utf-16", "utf-16"),
    ("utf-16-le", "utf-16-le"), ("utf-16-be", "utf-16-be"), ("cp1252", "cp1252"), ("latin-1", "cp1252"),
])
def test_encodings(tmp_path, codec, expected):
    text = "Lieferant;Festigkeit\nSüdwerk;812,5\nNordwerk;799,0\nSüdwerk;845,25\n"
    table = read_table(_write(tmp_path / "bolts.csv", text, codec))
    assert table.encoding == expected
    assert table.frame["Lieferant"].tolist() == ["Südwerk", "Nordwerk", "Südwerk"]
    np.testing.assert_array_equal(table.frame["Festigkeit"].to_numpy(), STRENGTHS[:3])


def test_latin1_only_byte_falls_back_to_latin1(tmp_path):
    # 0x81 is undefined in cp1252 (reference: the cp1252 code page table), so latin-1 it is
    path = tmp_path / "odd.csv"
    path.write_bytes(b"name;value\nA\x81;1,5\nB;2,5\n")
    table = read_table(path)
    assert table.encoding == "latin-1"
    assert table.frame["name"].iloc[0] == "A\x81"


def test_non_utf8_bytes_after_the_sample_are_reread_as_cp1252(tmp_path):
    body = "".join(f"A;{i},5\n" for i in range(12_000))
    path = tmp_path / "late.csv"
    path.write_bytes(("grp;value\n" + body + "Bé;1,5\n").encode("cp1252"))
    table = read_table(path)
    assert table.encoding == "cp1252"
    assert table.frame["grp"].iloc[-1] == "Bé"
    assert any("cp1252" in note.text for note in table.notes)


def test_decimal_comma_with_semicolons(tmp_path):
    table = read_table(_write(tmp_path / "bolts.csv", _rows(";", ",")))
    assert table.decimal == ","
    assert table.thousands is None
    np.testing.assert_array_equal(table.frame["strength"].to_numpy(), STRENGTHS)


@pytest.mark.parametrize("delimiter, cells, decimal, thousands", [
    (";", ["1.234,5", "12.345,25", "999,0"], ",", "."),
    (";", ["1,234.5", "12,345.25", "999.0"], ".", ","),
    ("\t", ["1.234,5", "2.000,0", "15,5"], ",", "."),
    (",", ['"1,234.5"', '"12,345.25"', "999.0"], ".", ","),
])
def test_thousands_separators(tmp_path, delimiter, cells, decimal, thousands):
    text = delimiter.join(["batch", "mass_g"]) + "\n" + "".join(
        delimiter.join([f"b{i}", cell]) + "\n" for i, cell in enumerate(cells))
    table = read_table(_write(tmp_path / "mass.csv", text))
    assert (table.decimal, table.thousands) == (decimal, thousands)
    # reference: the same numbers typed without separators
    expected = [float(c.strip('"').replace(thousands, "").replace(decimal, ".")) for c in cells]
    np.testing.assert_array_equal(table.frame["mass_g"].to_numpy(), expected)


def test_a_dot_in_a_decimal_comma_file_stays_text(tmp_path):
    text = "batch;cure\nb1;12,5\nb1;13,0\nb2;12.5\nb2;14,25\n"
    table = read_table(_write(tmp_path / "cure.csv", text))
    assert (table.decimal, table.thousands) == (",", None)
    assert table.column_kinds["cure"] == "mixed"
    assert table.frame["cure"].tolist() == ["12,5", "13,0", "12.5", "14,25"]
    numbers = table.numbers("cure")
    np.testing.assert_array_equal(numbers[[0, 1, 3]], [12.5, 13.0, 14.25])
    assert np.isnan(numbers[2])


def test_no_header_row(tmp_path):
    text = "north,812.5\nsouth,799.0\nnorth,845.25\n"
    table = read_table(_write(tmp_path / "bare.csv", text))
    assert table.header is False
    assert list(table.frame.columns) == ["column 1", "column 2"]
    assert table.frame.shape == (3, 2)
    assert table.file_row(0) == 1


def test_header_row_and_file_rows(tmp_path):
    text = "\n\nsupplier,strength\nnorth,812.5\n\nsouth,799.0\n\n\n"
    table = read_table(_write(tmp_path / "gaps.csv", text))
    assert table.header is True
    # blank line inside the data stays as a blank frame row so rows keep their file numbers
    assert table.frame["supplier"].tolist()[0] == "north"
    assert len(table.frame) == 3  # the trailing blank lines are dropped
    assert table.file_row(0) == 4  # two blank lines, the header, then the first data row
    assert table.frame["supplier"].iloc[2] == "south" and table.file_row(2) == 6


def test_column_kinds(tmp_path):
    text = "label,measure,junk,blank\nA,1.5,x,\nB,2.5,3,\nA,3.5,y,\n"
    table = read_table(_write(tmp_path / "kinds.csv", text))
    assert dict(table.column_kinds) == {"label": "text", "measure": "number", "junk": "mixed", "blank": "empty"}


def test_integer_columns_become_float64(tmp_path):
    table = read_table(_write(tmp_path / "ints.csv", "lot,count\n1,10\n2,20\n"))
    assert table.frame["count"].dtype == np.float64
    assert table.column_kinds["count"] == "number"


def test_missing_markers_are_kept_as_text(tmp_path):
    table = read_table(_write(tmp_path / "na.csv", "grp,value\nNA,1\nB,n/a\nB,2\n"))
    # "NA" is a label here, not a missing value; "n/a" stays visible in the frame
    assert table.frame["grp"].tolist() == ["NA", "B", "B"]
    assert table.frame["value"].tolist() == ["1", "n/a", "2"]


def test_blank_and_repeated_column_names(tmp_path):
    table = read_table(_write(tmp_path / "names.csv", " width ,,width\n1,2,3\n4,5,6\n"))
    assert list(table.frame.columns) == ["width", "column 2", "width (2)"]


def test_quoted_cells_with_delimiters(tmp_path):
    text = 'site,note,value\n"North, upper","said ""ok""",1.5\nSouth,plain,2.5\n'
    table = read_table(_write(tmp_path / "quoted.csv", text))
    assert table.frame["site"].tolist() == ["North, upper", "South"]
    assert table.frame["note"].iloc[0] == 'said "ok"'


def test_infinite_cells_parse_as_infinity(tmp_path):
    table = read_table(_write(tmp_path / "inf.csv", "g,v\nA,inf\nA,1\nB,-inf\n"))
    assert np.isposinf(table.frame["v"].iloc[0]) and np.isneginf(table.frame["v"].iloc[2])


def test_file_bytes_unchanged_and_checksum(tmp_path):
    path = _write(tmp_path / "bolts.csv", _rows(";", ","))
    before = hashlib.sha256(path.read_bytes()).hexdigest()
    mtime = os.stat(path).st_mtime_ns
    read_table(path)
    # reference: hashlib.sha256 over the bytes read directly
    assert file_checksum(path) == before
    assert hashlib.sha256(path.read_bytes()).hexdigest() == before
    assert os.stat(path).st_mtime_ns == mtime


# -- spreadsheets ------------------------------------------------------------------------------

def _book(path: Path, engine: str) -> Path:
    with pd.ExcelWriter(path, engine=engine) as writer:
        pd.DataFrame({"supplier": SUPPLIERS, "strength": STRENGTHS}).to_excel(
            writer, sheet_name="tests", index=False)
        pd.DataFrame({"regime": ["slow", "split"], "yield": [7.5, 7.25]}).to_excel(
            writer, sheet_name="Plots", index=False, startrow=2)
    return path


@pytest.mark.parametrize("extension, engine", [(".xlsx", "openpyxl"), (".ods", "odf")])
def test_first_sheet_by_default(tmp_path, extension, engine):
    path = _book(tmp_path / f"book{extension}", engine)
    table = read_table(path)
    assert table.kind == extension[1:]
    assert table.sheet == "tests" and table.sheet_names == ("tests", "Plots")
    assert table.encoding is None and table.delimiter is None and table.header is True
    assert table.frame["supplier"].tolist() == SUPPLIERS
    np.testing.assert_array_equal(table.frame["strength"].to_numpy(), STRENGTHS)
    assert table.file_row(0) == 2


@pytest.mark.parametrize("extension, engine", [(".xlsx", "openpyxl"), (".ods", "odf")])
def test_sheet_by_name_with_rows_above(tmp_path, extension, engine):
    path = _book(tmp_path / f"book{extension}", engine)
    table = read_table(path, sheet="Plots")
    assert table.sheet == "Plots"
    assert table.frame["yield"].tolist() == [7.5, 7.25]
    # written with startrow=2: header on spreadsheet row 3, first value on row 4
    assert table.file_row(0) == 4
    assert read_table(path, sheet="plots").sheet == "Plots"  # case and spaces forgiven


def test_xls_workbook():
    import warnings

    import statsmodels

    found = sorted(Path(os.path.dirname(statsmodels.__file__)).rglob("test_spec.xls"))
    if not found or not found[0].is_file():
        pytest.skip("no .xls workbook is installed to read")
    path = found[0]
    table = read_table(path)
    assert table.kind == "xls"
    # reference: the same workbook read by xlrd through pandas
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        expected = pd.read_excel(path, engine="xlrd")
    assert table.frame.shape == expected.shape
    assert table.frame["SeriesID"].tolist() == expected["SeriesID"].astype(str).tolist()
    np.testing.assert_array_equal(table.frame["Model"].to_numpy(), expected["Model"].to_numpy(dtype=float))


def test_text_file_ignores_a_sheet_with_a_note(tmp_path):
    table = read_table(_write(tmp_path / "bolts.csv", _rows(",")), sheet="Sheet1")
    assert table.sheet is None
    assert any("no sheets" in note.text for note in table.notes)


def test_table_is_frozen_and_notes_are_findings(tmp_path):
    from engine.results import Finding

    table = read_table(_write(tmp_path / "bolts.csv", _rows(";", ",")))
    assert all(isinstance(note, Finding) and note.severity == "info" for note in table.notes)
    with pytest.raises(AttributeError):
        table.header = False
    with pytest.raises(TypeError):
        table.column_kinds["strength"] = "text"


def test_sheet_without_column_names(tmp_path):
    path = tmp_path / "bare.xlsx"
    pd.DataFrame([[812.5, 799.0], [845.25, 830.75]]).to_excel(path, index=False, header=False)
    table = read_table(path)
    assert table.header is False
    assert list(table.frame.columns) == ["column 1", "column 2"]
    assert table.file_row(0) == 1
    np.testing.assert_array_equal(table.frame["column 2"].to_numpy(), [799.0, 830.75])


def test_sheet_cells_match_pandas_calamine(tmp_path):
    path = tmp_path / "mixed.xlsx"
    frame = pd.DataFrame({"batch": ["b1", "b2", None, "b1"], "cure": [41.5, "n/a", 39.0, 40.25]})
    frame.to_excel(path, index=False)
    table = read_table(path)
    # reference: pandas.read_excel(engine="calamine") on the same workbook, blanks only as missing
    expected = pd.read_excel(path, engine="calamine", keep_default_na=False, na_values=[""])
    assert table.column_kinds["cure"] == "mixed"
    def plain(v):
        return float(v) if isinstance(v, (int, float)) else v

    assert [plain(v) for v in table.frame["cure"]] == [plain(v) for v in expected["cure"]]
    assert table.frame["batch"].isna().tolist() == expected["batch"].isna().tolist()


def test_label_columns_stay_categories_and_read_back_as_their_texts(tmp_path):
    # a label column is held as codes into its few distinct texts, not as a text per cell;
    # reference: the texts as written
    labels = ["north forge", "south forge", "north forge", "", "south forge"] * 200
    rows = "".join(f"{label},{800 + i % 7}.5\n" for i, label in enumerate(labels))
    path = tmp_path / "labels.csv"
    path.write_text("supplier,strength\n" + rows, encoding="utf-8")
    table = read_table(path)
    cells = table.frame["supplier"]
    assert isinstance(cells.dtype, pd.CategoricalDtype)
    assert table.column_kinds["supplier"] == "text"
    assert [("" if pd.isna(v) else v) for v in cells.to_numpy(dtype=object)] == labels


def test_title_lines_above_the_column_names_are_passed_over_with_a_note(tmp_path):
    # an instrument export with a report title, an operator line (padded with commas, as a
    # spreadsheet saves it) and a blank line above the column names
    text = ("Tensile test export\nOperator: bench 2,,\n\nsupplier,strength,lot\n"
            "north,812.5,3\nsouth,799.1,3\nnorth,845.2,4\n")
    path = tmp_path / "export.csv"
    path.write_text(text, encoding="utf-8")
    table = read_table(path)
    assert list(table.frame.columns) == ["supplier", "strength", "lot"]
    assert table.frame["strength"].tolist() == [812.5, 799.1, 845.2]
    assert table.file_row(0) == 5  # reference: the line numbers of the file as written
    note = " ".join(n.text for n in table.notes)
    assert "3 lines of title" in note and "Tensile test export" in note


def test_a_first_row_with_one_filled_cell_above_bare_data_is_kept(tmp_path):
    # no column names below it, so the short first row is data, not a title
    path = tmp_path / "bare.csv"
    path.write_text("north,\nnorth,812.5\nsouth,799.1\nsouth,830.7\nnorth,845.2\n", encoding="utf-8")
    table = read_table(path)
    assert len(table.frame) == 5 and table.file_row(0) == 1


def test_row_numbers_count_the_lines_of_quoted_cells_that_span_lines(tmp_path):
    rng = np.random.default_rng(31)
    notes = ["ok", "two\nlines", "three\r\nof\nthem", "", "cr\ronly"]
    rows = [f"{'north' if i % 2 else 'south'},{800 + i}.5,\"{notes[rng.integers(0, 5)]}\"" for i in range(60)]
    path = tmp_path / "notes.csv"
    path.write_bytes(('"supplier\nname",strength,note\n' + "\n".join(rows) + "\n").encode("utf-8"))
    table = read_table(path)
    # reference: Python's csv module, the line on which each record starts
    with open(path, newline="", encoding="utf-8") as handle:
        reader = csv.reader(handle)
        starts = []
        while True:
            line = reader.line_num + 1
            if next(reader, None) is None:
                break
            starts.append(line)
    assert [table.file_row(r) for r in range(len(table.frame))] == starts[1:]
    assert list(table.frame.columns)[0] == "supplier name"


@pytest.mark.parametrize("extension, engine", [(".xlsx", "openpyxl"), (".ods", "odf")])
def test_a_title_above_the_column_names_of_a_sheet_is_passed_over(tmp_path, extension, engine):
    # a lab sheet: a title in the first cell, a blank row, then the table
    path = tmp_path / f"tensile{extension}"
    rows = [["Tensile tests, press line 2", None], [None, None], ["supplier", "strength"]]
    rows += [[s, v] for s, v in zip(SUPPLIERS, STRENGTHS)]
    pd.DataFrame(rows).to_excel(path, index=False, header=False, engine=engine)
    table = read_table(path)
    assert list(table.frame.columns) == ["supplier", "strength"]
    assert table.frame["strength"].tolist() == STRENGTHS
    assert table.file_row(0) == 4  # reference: the row numbers the spreadsheet shows
    notes = " ".join(n.text for n in table.notes)
    assert "2 rows of title" in notes and "Tensile tests, press line 2" in notes
    assert "Row 3 holds column names" in notes


def test_a_lone_value_above_bare_data_in_a_sheet_is_kept(tmp_path):
    path = tmp_path / "bare.xlsx"
    pd.DataFrame([[812.5, None], [799.0, 801.5], [845.25, 830.75], [833.0, 829.5]]).to_excel(
        path, index=False, header=False, engine="openpyxl")
    table = read_table(path)
    assert len(table.frame) == 4 and table.file_row(0) == 1


def test_a_long_column_of_codes_is_text_and_a_long_measurement_column_with_junk_is_mixed(tmp_path):
    # 30,000 rows: sample codes (a few look like numbers) and readings with a few junk cells
    n = 30_000
    codes = [f"S{i:06d}" for i in range(n)]
    codes[12_345] = "4711"
    readings = [f"{7 + (i % 97) / 100:.2f}" for i in range(n)]
    for i in (10, 20_000, 29_999):
        readings[i] = "n/a" if i == 10 else "?"
    path = tmp_path / "codes.csv"
    path.write_text("code,reading\n" + "".join(f"{c},{r}\n" for c, r in zip(codes, readings)),
                    encoding="utf-8")
    table = read_table(path)
    assert table.column_kinds == {"code": "text", "reading": "mixed"}
    # the texts stay as written; the one code that reads as a number is still there
    assert table.frame["code"].iloc[12_345] == "4711" and table.numbers("code")[12_345] == 4711
    assert np.count_nonzero(np.isnan(table.numbers("reading"))) == 3


def test_a_file_of_thousands_of_columns_reads_as_pandas_reads_it(tmp_path):
    # past 1,000 columns the file is parsed row by row into one block of floats; pandas' own
    # parser is the reference for every cell
    rng = np.random.default_rng(11)
    frame = pd.DataFrame(np.round(rng.normal(50, 5, (6, 1500)), 3), columns=[f"plot {j}" for j in range(1500)])
    frame.insert(0, "regime", ["slow", "split"] * 3)
    frame.iloc[2, 5] = np.nan
    frame.iloc[:, 7] = np.nan
    path = tmp_path / "wide.csv"
    frame.to_csv(path, index=False)
    table = read_table(path)
    reference = pd.read_csv(path)
    assert list(table.frame.columns) == list(reference.columns)
    assert table.column_kinds["regime"] == "text" and table.column_kinds["plot 0"] == "number"
    assert table.column_kinds["plot 6"] == "empty"
    assert table.frame["regime"].tolist() == reference["regime"].tolist()
    np.testing.assert_array_equal(table.frame.iloc[:, 1:].to_numpy(dtype=float),
                                  reference.iloc[:, 1:].to_numpy(dtype=float))


def test_a_long_row_in_a_wide_file_names_its_line(tmp_path):
    from engine.errors import FileProblem

    path = tmp_path / "wide.csv"
    header = ",".join(f"c{j}" for j in range(1200))
    path.write_text(header + "\n" + ",".join(["1"] * 1200) + "\n" + ",".join(["2"] * 1201) + "\n")
    with pytest.raises(FileProblem, match=r"wide\.csv, row 3: 1201 cells where the rows above have 1200"):
        read_table(path)
