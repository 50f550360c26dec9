"""What the pairing left out, shown under Your data: each item with its file rows, and its cells
greyed in the grid."""

from __future__ import annotations

import pytest

from desktop.data_panel import MAX_PAIR_PROBLEMS_LISTED, pair_marks, pairs_html, screening_html
from engine import io
from engine.io.pairs import pairs_by_id, pairs_by_row
from engine.spec import AnalysisSpec
from engine.text import visible_html


@pytest.fixture
def awkward_long(csv_file):
    """Eight panels before and after a coating, with one of each thing the pairing leaves out."""
    rows = [(f"P{i}", "before", 50.0 + i) for i in range(1, 9)]
    rows += [(f"P{i}", "after", 49.0 + i) for i in range(1, 9)]
    rows[5] = ("P6", "before", None)       # file row 7: a pair with one value blank
    rows.append(("P9", "before", 51.0))    # file row 18: an ID in one group only
    rows.append(("P3", "after", 47.5))     # file row 19: P3 twice in 'after' (rows 4, 12, 19)
    rows.append(("", "after", 47.0))       # file row 20: a row without an ID
    return csv_file("coating.csv", rows, ("panel_id", "stage", "thickness"))


def test_every_item_left_out_is_listed_with_its_rows(awkward_long):
    table = io.read_table(awkward_long)
    pairs = pairs_by_id(table, values="thickness", group="stage", pair_id="panel_id", pick=("before", "after"))
    html = pairs_html(pairs)
    assert f"{pairs.n_pairs:,} units with a value in both before and after" in html
    assert pairs.n_pairs == 6  # P1, P2, P4, P5, P7, P8
    for item in pairs.problems:  # the engine's sentence for each, and a link to its first row
        assert visible_html(item.text) in html
        assert f'href="show-row:{item.file_rows[0]}"' in html
    assert {p.kind for p in pairs.problems} == {"partner_missing", "unmatched", "repeated", "no_id"}


def test_the_grid_greys_the_values_left_out_of_the_pairs(awkward_long):
    table = io.read_table(awkward_long)
    spec = AnalysisSpec(group_column="stage", value_columns=("thickness",), groups=("before", "after"),
                        design="paired", pair_column="panel_id")
    pairs = pairs_by_id(table, values="thickness", group="stage", pair_id="panel_id", pick=("before", "after"))
    marks = pair_marks(table, spec, pairs)
    marked_rows = sorted(table.file_row(row) for row, column in marks)
    # file rows: 7 and 15 (P6, blank partner), 18 (P9 alone), 4, 12, 19 (P3 repeated), 20 (no ID)
    assert marked_rows == [4, 7, 12, 15, 18, 19, 20]
    assert {column for _, column in marks} == {"thickness"}
    row_of_p9 = next(row for row in range(len(table.frame)) if table.file_row(row) == 18)
    assert marks[(row_of_p9, "thickness")] == "left out of the pairs (ID in one group only)"


def test_wide_pairs_mark_both_cells_of_a_row(csv_file):
    path = csv_file("wide.csv", [(1.0, 2.0), (1.5, None), (1.2, "broken"), (None, None), (2.0, 2.5)],
                    ("before_um", "after_um"))
    table = io.read_table(path)
    spec = AnalysisSpec(layout="wide", value_columns=("before_um", "after_um"), design="paired")
    pairs = pairs_by_row(table, columns=("before_um", "after_um"))
    marks = pair_marks(table, spec, pairs)
    assert sorted((table.file_row(r), c) for r, c in marks) == [
        (3, "after_um"), (3, "before_um"), (4, "after_um"), (4, "before_um")]
    assert "Every unit found its partner" not in pairs_html(pairs)


def test_a_long_list_is_cut_and_counted(csv_file):
    rows = [(f"U{i}", "a", float(i)) for i in range(MAX_PAIR_PROBLEMS_LISTED + 40)]
    rows += [(f"U{i}", "b", float(i) + 0.5) for i in range(3)]
    table = io.read_table(csv_file("many.csv", rows, ("unit", "arm", "value")))
    pairs = pairs_by_id(table, values="value", group="arm", pair_id="unit")
    html = pairs_html(pairs)
    assert html.count("<li>Pair ID") == MAX_PAIR_PROBLEMS_LISTED
    assert f"and {len(pairs.problems) - MAX_PAIR_PROBLEMS_LISTED:,} more, counted above" in html


def test_for_pairs_the_pairs_are_counted_in_place_of_the_groups(csv_file):
    rows = [(f"P{i}", arm, 10.0 + i + (arm == "after")) for arm in ("before", "after") for i in range(1, 7)]
    table = io.read_table(csv_file("clean.csv", rows, ("panel_id", "stage", "thickness")))
    intake = io.make_groups(table, values="thickness", group="stage")
    assert intake.screening.paired is not None  # the engine sees the sign of pairs
    separate = screening_html(table, intake.screening)
    assert "<b>Compared</b>" in separate and "Are these really two separate groups?" in separate
    pairs = pairs_by_id(table, values="thickness", group="stage", pair_id="panel_id")
    paired = screening_html(table, intake.screening, pairs=pairs)
    assert "<b>Compared</b>" not in paired and "Are these really two separate groups?" not in paired
    assert "<b>Pairs</b>: 6 units with a value in both before and after" in paired
    assert "Every unit found its partner" in paired


def test_each_item_left_out_is_said_once(awkward_long):
    from engine import pipeline

    table = io.read_table(awkward_long)
    spec = AnalysisSpec(group_column="stage", value_columns=("thickness",), groups=("before", "after"),
                        design="paired", pair_column="panel_id")
    intake = pipeline.form_groups(table, spec)
    assert any(f.key.startswith("pairs_") for f in intake.screening.findings)  # the engine says them too
    html = screening_html(table, intake.screening, pairs=intake.pairs)
    for item in intake.pairs.problems:
        assert html.count(visible_html(item.text)) == 1  # in the pairs' list, with its link, and only there
