"""Pairing from small hand-made files: matched differences, and every row left out named."""

import numpy as np
import pytest

from engine.errors import ColumnProblem, DataProblem
from engine.io import read_table
from engine.io.pairs import pairs_by_id, pairs_by_row


def _one_line(caught, *words):
    message = caught.value.message
    assert "\n" not in message
    for word in words:
        assert word in message


def _table(tmp_path, text, name="bolts.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return read_table(path)


LONG = """unit,coating,load
B1,after,12.1
B1,before,11.5
B2,before,11.2
B2,after,11.4
B3,after,13.0
B4,before,12.4
B3,before,12.1
B5,after,12.9
B5,after,12.8
B5,before,12.0
B6,after,
B6,before,11.9
B7,after,strong
B7,before,12.2
,after,12.5
B8, before ,11.0
B8,after,11.9
"""


def test_long_layout_matches_by_id_and_names_every_row_left_out(tmp_path):
    # hand check: file row = line number (header on line 1)
    result = pairs_by_id(_table(tmp_path, LONG), values="load", group="coating", pair_id="unit")
    assert result.labels == ("after", "before")
    assert result.pair_ids == ("B1", "B2", "B3", "B8")  # order of each pair's first row
    np.testing.assert_allclose(result.differences, [0.6, 0.2, 0.9, 0.9], rtol=1e-12)
    np.testing.assert_array_equal(result.x, [12.1, 11.4, 13.0, 11.9])
    assert result.file_rows == ((2, 5, 6, 18), (3, 4, 8, 17))
    by_kind = {p.kind: p for p in result.problems}
    assert by_kind["unmatched"].pair_id == "B4" and by_kind["unmatched"].file_rows == (7,)
    assert "not in 'after'" in by_kind["unmatched"].text and "row 7" in by_kind["unmatched"].text
    assert by_kind["repeated"].file_rows == (9, 10, 11)
    assert "2 in 'after' and 1 in 'before'" in by_kind["repeated"].text
    assert by_kind["partner_missing"].pair_id == "B6" and by_kind["partner_missing"].file_rows == (12, 13)
    assert "'after' value is blank" in by_kind["partner_missing"].text
    assert by_kind["non_numeric"].pair_id == "B7" and "'strong'" in by_kind["non_numeric"].text
    assert by_kind["no_id"].file_rows == (16,)
    assert all("left out" in p.text for p in result.problems)
    assert dict(result.counts) == {"unmatched": 1, "repeated": 1, "no_id": 1,
                                   "partner_missing": 1, "non_numeric": 1, "set_aside": 0}
    assert [min(p.file_rows) for p in result.problems] == sorted(min(p.file_rows) for p in result.problems)


def test_long_layout_pick_sets_group_1(tmp_path):
    result = pairs_by_id(_table(tmp_path, LONG), values="load", group="coating", pair_id="unit",
                         pick=("before", "after"))
    np.testing.assert_allclose(result.differences, [-0.6, -0.2, -0.9, -0.9], rtol=1e-12)


def test_long_layout_id_column_missing_is_one_line(tmp_path):
    with pytest.raises(ColumnProblem) as caught:
        pairs_by_id(_table(tmp_path, LONG), values="load", group="coating", pair_id="bolt")
    _one_line(caught, "bolts.csv", "'bolt'")


def test_long_layout_without_pairs_is_one_line(tmp_path):
    text = "unit,coating,load\nA,after,1\nB,before,2\nC,after,3\nC,after,4\nC,before,5\n"
    with pytest.raises(DataProblem) as caught:
        pairs_by_id(_table(tmp_path, text), values="load", group="coating", pair_id="unit")
    _one_line(caught, "no pairs", "bolts.csv")


def test_long_layout_with_three_groups_needs_a_pick(tmp_path):
    text = "unit,coating,load\nA,x,1\nA,y,2\nA,z,3\n"
    with pytest.raises(ColumnProblem, match="pick the two"):
        pairs_by_id(_table(tmp_path, text), values="load", group="coating", pair_id="unit")
    result = pairs_by_id(_table(tmp_path, text), values="load", group="coating", pair_id="unit",
                         pick=("z", "x"))
    np.testing.assert_array_equal(result.differences, [2.0])


WIDE = """plot,after,before
1,12.1,11.5
2,11.4,11.2
3,,12.1
4,12.6,n/a
5,12.9,heavy
6,11.0,10.5
7,inf,10.0
,,
"""


def test_wide_layout_pairs_row_by_row(tmp_path):
    result = pairs_by_row(_table(tmp_path, WIDE), columns=("after", "before"))
    np.testing.assert_allclose(result.differences, [0.6, 0.2, 0.5], rtol=1e-12)
    assert result.pair_ids == ("row 2", "row 3", "row 7")
    kinds = [(p.kind, p.file_rows) for p in result.problems]
    assert kinds == [("partner_missing", (4,)), ("partner_missing", (5,)), ("non_numeric", (6,)),
                     ("non_numeric", (8,))]
    assert "'inf' is infinite" in result.problems[3].text
    assert "'after' value is blank" in result.problems[0].text
    assert "'before' value is blank" in result.problems[1].text
    assert "'heavy'" in result.problems[2].text
    assert result.n_pairs == 3


def test_wide_layout_without_pairs_is_one_line(tmp_path):
    text = "after,before\n1,\n,2\nx,3\n"
    with pytest.raises(DataProblem) as caught:
        pairs_by_row(_table(tmp_path, text), columns=("after", "before"))
    _one_line(caught, "no pairs", "bolts.csv")


def test_wide_layout_missing_column(tmp_path):
    with pytest.raises(ColumnProblem, match="no column 'during'"):
        pairs_by_row(_table(tmp_path, WIDE), columns=("after", "during"))


def test_the_file_is_left_unchanged(tmp_path):
    table = _table(tmp_path, LONG)
    before = (tmp_path / "bolts.csv").read_bytes()
    pairs_by_id(table, values="load", group="coating", pair_id="unit")
    assert (tmp_path / "bolts.csv").read_bytes() == before
