"""Generated CSV text either loads or raises a TwofoldError - never any other exception."""

from __future__ import annotations

import tempfile
from pathlib import Path

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from engine.errors import TwofoldError
from engine.io import make_groups, propose_layout, read_table

_CELL = st.one_of(
    st.text(alphabet=st.characters(codec="utf-8", exclude_categories=("Cs",)), max_size=8),
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.integers(-10**20, 10**20).map(str),
    st.sampled_from(["", " ", "n/a", "NA", "?", "1,5", "1.234,5", "1,234.5", '"', '""', "a\"b", "-", "inf"]),
)
_DELIMITER = st.sampled_from([",", ";", "\t", "|", " "])
_ENCODING = st.sampled_from(["utf-8", "utf-8-sig", "utf-16", "cp1252"])


def _load_everything(path: Path) -> None:
    try:
        table = read_table(path)
        proposal = propose_layout(table)
        if proposal.layout == "long" and proposal.group_column is not None:
            make_groups(table, values=proposal.value_columns[0], group=proposal.group_column,
                        pick=proposal.levels[:2] if len(proposal.levels) > 2 else None)
        else:
            make_groups(table, values=proposal.value_columns[:2])
    except TwofoldError as error:
        assert "\n" not in str(error)


@pytest.mark.slow
@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(rows=st.lists(st.lists(_CELL, min_size=1, max_size=5), max_size=12), delimiter=_DELIMITER,
       encoding=_ENCODING, newline=st.sampled_from(["\n", "\r\n", "\r"]))
def test_generated_csv_loads_or_raises_our_error(rows, delimiter, encoding, newline):
    text = newline.join(delimiter.join(row) for row in rows)
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "fuzz.csv"
        try:
            data = text.encode(encoding)
        except UnicodeEncodeError:
            data = text.encode("utf-8")
        path.write_bytes(data)
        _load_everything(path)


@pytest.mark.slow
@settings(max_examples=60, deadline=None)
@given(data=st.binary(max_size=400), extension=st.sampled_from([".csv", ".txt", ".tsv", ".xlsx", ".ods"]))
def test_arbitrary_bytes_load_or_raise_our_error(data, extension):
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / f"bytes{extension}"
        path.write_bytes(data)
        _load_everything(path)


@pytest.mark.slow
@settings(max_examples=80, deadline=None)
@given(groups=st.lists(st.sampled_from(["A", "B", " A", "C", ""]), min_size=1, max_size=30),
       values=st.lists(st.one_of(st.floats(allow_nan=False, width=32).map(repr),
                                 st.sampled_from(["", "x", "inf", "n/a"])), min_size=1, max_size=30))
def test_generated_long_tables(groups, values):
    lines = ["g,v"] + [f"{g},{v}" for g, v in zip(groups, values)]
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "long.csv"
        path.write_text("\n".join(lines) + "\n", encoding="utf-8")
        try:
            table = read_table(path)
            intake = make_groups(table, values="v" if "v" in table.frame else table.frame.columns[-1],
                                 group="g" if "g" in table.frame else table.frame.columns[0],
                                 pick=("A", "B"))
        except TwofoldError:
            return
        report = intake.screening
        # every row of the two picked groups is either used or excluded, and counted once
        assert sum(report.n_used) + sum(report.excluded_counts.values()) + report.other_group_rows \
            == report.rows_read


_WORD = st.text(alphabet="abcdefghijklmnopqrstuvwxyz_", min_size=1, max_size=8)
_TITLE = st.text(alphabet="ABCDEFGHIJKLMNOPQRSTUVWXYZ abcdefghij:-/0123456789", min_size=1, max_size=30)


@pytest.mark.slow
@settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(names=st.lists(_WORD, min_size=2, max_size=5, unique=True),
       values=st.lists(st.lists(st.floats(-1e6, 1e6, allow_nan=False), min_size=5, max_size=5),
                       min_size=3, max_size=30),
       titles=st.lists(st.one_of(_TITLE, st.just("")), min_size=1, max_size=4),
       delimiter=st.sampled_from([",", ";", "\t"]), padded=st.booleans())
def test_title_lines_above_column_names_leave_the_table_as_it_is(names, values, titles, delimiter, padded):
    # reference: the same table written without the title lines
    width = len(names)
    body = [delimiter.join(names)] + [delimiter.join(f"{v:.3f}" for v in row[:width]) for row in values]
    pad = delimiter * (width - 1) if padded else ""
    titled = [t.strip(" ") + (pad if t.strip(" ") else "") for t in titles]
    if not titled[0]:
        titled[0] = "Report" + pad  # blank lines at the very top are counted apart
    with tempfile.TemporaryDirectory() as folder:
        plain, with_titles = Path(folder) / "plain.csv", Path(folder) / "titled.csv"
        plain.write_text("\n".join(body) + "\n", encoding="utf-8")
        with_titles.write_text("\n".join(titled + body) + "\n", encoding="utf-8")
        expected, table = read_table(plain), read_table(with_titles)
    assert list(table.frame.columns) == list(expected.frame.columns)
    assert table.frame.equals(expected.frame)
    assert table.file_row(0) == expected.file_row(0) + len(titled)
