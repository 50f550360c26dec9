"""A paired design from a file to an analysis: pairs by an ID column (long layout) or row by row
(wide layout), what was left out said, and the numbers those of scipy on the pairs matched by
pandas."""

import json
from pathlib import Path

import jsonschema
import numpy as np
import pandas as pd
import pytest
from scipy import stats
from statsmodels.stats.weightstats import ttost_paired

from engine import pipeline
from engine.analysis import analyze
from engine.procedures import registry
from engine.question import Margin, Question
from engine.results import Groups
from engine.errors import ColumnProblem, DataProblem, OptionProblem
from engine.jsonout import analysis_document, analysis_schema
from engine.spec import AnalysisSpec, SetAside

DEMO = Path(__file__).resolve().parents[2] / "demo_files" / "rod_diameters.csv"

# One rod per ID, measured before and after coating; file row = line number (header on line 1).
LONG = """rod,stage,diameter
R1,before,12.10
R1,after,12.16
R2,after,11.98
R2,before,11.91
R3,before,12.31
R3,after,12.33
R4,before,12.05
R5,after,12.40
R5,after,12.42
R5,before,12.36
R6,before,11.88
R6,after,
R7,after,12.21
R7,before,12.12
R8,before,12.00
R8,after,12.07
R9,after,11.95
R9,before,11.93
R10,before,12.20
R10,after,12.28
,after,12.50
"""

WIDE = """plot,spring,autumn
P1,4.1,4.6
P2,3.8,4.0
P3,,4.4
P4,4.5,4.9
P5,4.0,n/a
P6,3.6,4.1
P7,4.2,4.2
P8,4.4,4.3
P9,3.9,4.5
"""


def _file(tmp_path, text, name):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def _long(tmp_path, **changes):
    spec = AnalysisSpec(design="paired", group_column="stage", value_columns=("diameter",),
                        pair_column="rod", groups=("after", "before"), seed=2, resamples=500)
    return pipeline.from_file(_file(tmp_path, LONG, "rods.csv"), spec.replace(**changes))


def _by_pandas_long(path):
    """Reference pairing: pandas pivot of the IDs met exactly once in each group, blanks dropped."""
    frame = pd.read_csv(path).dropna(subset=["rod"])
    counts = frame.groupby(["rod", "stage"]).size().unstack(fill_value=0)
    once = counts[(counts["after"] == 1) & (counts["before"] == 1)].index
    wide = frame[frame["rod"].isin(once)].pivot(index="rod", columns="stage", values="diameter")
    return wide.dropna()


def test_long_layout_pairs_by_id_and_the_numbers_are_scipys(tmp_path):
    prepared = _long(tmp_path)
    analysis = prepared.analysis
    reference = _by_pandas_long(tmp_path / "rods.csv")
    order = list(analysis.pairs.pair_ids)
    assert sorted(order) == sorted(reference.index)
    x, y = reference.loc[order, "after"].to_numpy(), reference.loc[order, "before"].to_numpy()
    np.testing.assert_allclose(analysis.groups.x, x, rtol=0)
    np.testing.assert_allclose(analysis.groups.y, y, rtol=0)
    # reference: scipy.stats.ttest_rel and wilcoxon (exact: 7 pairs, no ties, no zeros)
    assert analysis.procedures["paired_t"].p_value == pytest.approx(stats.ttest_rel(x, y).pvalue, rel=1e-10)
    assert analysis.procedures["signed_rank"].p_value == pytest.approx(
        stats.wilcoxon(x, y, method="exact").pvalue, rel=1e-10)
    assert analysis.paired.n_pairs == 7 and analysis.pairs is prepared.intake.pairs
    assert prepared.intake.rows[0].dtype.kind == "i"


def test_long_layout_screening_says_what_was_left_out_and_what_was_done(tmp_path):
    screening = _long(tmp_path).analysis.screening
    by_key = {f.key: f.text for f in screening.findings}
    assert by_key["screening_summary"].startswith("21 rows read from rods.csv; 7 pairs of 'after' "
                                                  "and 'before' formed by the pair IDs in 'rod'")
    assert "1 ID in one group only: Pair ID 'R4'" in by_key["pairs_unmatched"]
    assert "it was left out" in by_key["pairs_unmatched"]
    assert "Pair ID 'R5' appears more than once" in by_key["pairs_repeated"]
    assert "rows 9, 10, 11" in by_key["pairs_repeated"] and "all its rows were left out" in by_key["pairs_repeated"]
    assert "Pair 'R6' (rows 12, 13): the 'after' value is blank" in by_key["pairs_partner_missing"]
    assert "Row 22 of group 'after' has no pair ID" in by_key["pairs_no_id"]
    assert screening.n_used == (7, 7) and screening.paired is None
    assert "paired" not in by_key  # the sign that independent groups look paired is moot here


def test_a_cell_set_aside_leaves_its_pair_out_and_is_listed(tmp_path):
    base = _long(tmp_path)
    aside = base.spec.replace(set_aside=(SetAside(row=6, column="diameter", text="12.31",
                                                  reason="gauge slipped"),))
    analysis = pipeline.from_file(None, aside).analysis
    assert analysis.paired.n_pairs == 6 and "R3" not in analysis.pairs.pair_ids
    text = next(f.text for f in analysis.screening.findings if f.key == "pairs_set_aside")
    assert "Pair 'R3' (rows 6, 7)" in text and "'12.31' (gauge slipped)" in text
    assert "the pair was left out" in text
    assert analysis.screening.excluded_counts["set_aside"] == 1


def test_wide_layout_pairs_row_by_row_and_the_numbers_are_scipys(tmp_path):
    path = _file(tmp_path, WIDE, "plots.csv")
    spec = AnalysisSpec(design="paired", value_columns=("autumn", "spring"), seed=4, resamples=500)
    prepared = pipeline.from_file(path, spec)
    analysis = prepared.analysis
    # reference: pandas, rows with both numbers (dropna on both columns)
    frame = pd.read_csv(path, na_values=["n/a"]).dropna(subset=["spring", "autumn"])
    x, y = frame["autumn"].to_numpy(), frame["spring"].to_numpy()
    np.testing.assert_array_equal(analysis.groups.x, x)
    assert analysis.pairs.pair_ids == ("row 2", "row 3", "row 5", "row 7", "row 8", "row 9", "row 10")
    # reference: scipy.stats.ttest_rel; wilcoxon, normal approximation with Pratt's zero rule
    assert analysis.procedures["paired_t"].p_value == pytest.approx(stats.ttest_rel(x, y).pvalue, rel=1e-10)
    pratt = pipeline.from_file(None, prepared.spec.replace(zero_rule="pratt", rank_method="normal"))
    assert pratt.analysis.procedures["signed_rank"].p_value == pytest.approx(
        stats.wilcoxon(x, y, zero_method="pratt", correction=True, method="approx").pvalue, rel=1e-9)
    by_key = {f.key: f.text for f in analysis.screening.findings}
    assert "7 pairs of 'autumn' and 'spring' formed row by row" in by_key["screening_summary"]
    assert "2 pairs with one value blank" in by_key["pairs_partner_missing"]
    assert "row 4" in by_key["pairs_partner_missing"] and "row 6" in by_key["pairs_partner_missing"]


def test_wide_layout_cells_set_aside_leave_their_rows_out_once_each(tmp_path):
    path = _file(tmp_path, WIDE, "plots.csv")
    spec = AnalysisSpec(design="paired", value_columns=("autumn", "spring"), seed=4, resamples=500)
    base = pipeline.from_file(path, spec)
    aside = base.spec.replace(set_aside=(
        SetAside(row=3, column="autumn", text="4.0", reason="hail"),
        SetAside(row=4, column="autumn", text="4.4", reason="")))  # its spring cell is blank too
    intake = pipeline.from_file(None, aside).intake
    assert intake.pairs.n_pairs == base.intake.pairs.n_pairs - 1
    assert "row 3" not in intake.pairs.pair_ids
    kinds = [(p.kind, p.file_rows) for p in intake.pairs.problems]
    assert kinds == [("set_aside", (3,)), ("set_aside", (4,)), ("partner_missing", (6,))]
    assert "'autumn' value '4.0' (hail) was set aside by hand" in intake.pairs.problems[0].text


def test_the_layout_proposal_fills_in_the_columns_of_a_paired_spec(tmp_path):
    path = _file(tmp_path, LONG, "rods.csv")
    prepared = pipeline.from_file(path, AnalysisSpec(design="paired", pair_column="rod", seed=1,
                                                     resamples=200))
    assert prepared.spec.group_column == "stage" and prepared.spec.value_columns == ("diameter",)
    assert prepared.spec.groups == ("before", "after")  # the first label met is group 1
    assert prepared.analysis.paired.n_pairs == 7


def test_a_long_layout_without_a_pair_column_is_one_line_naming_what_to_give(tmp_path):
    with pytest.raises(ColumnProblem) as caught:
        _long(tmp_path, pair_column=None)
    message = caught.value.message
    assert "\n" not in message and "rods.csv" in message
    assert "column of pair IDs" in message and "two value columns" in message


def test_a_pair_column_needs_the_long_layout(tmp_path):
    path = _file(tmp_path, WIDE, "plots.csv")
    with pytest.raises(OptionProblem, match="pair ID column belongs to a paired design in the long layout"):
        pipeline.from_file(path, AnalysisSpec(design="paired", value_columns=("autumn", "spring"),
                                              pair_column="plot", layout="long"))


def test_data_that_cannot_be_paired_never_fall_back_to_independent_groups(tmp_path):
    text = "rod,stage,diameter\nA,before,1.0\nB,after,2.0\nC,before,1.5\nD,after,2.5\n"
    path = _file(tmp_path, text, "unpaired.csv")
    spec = AnalysisSpec(design="paired", group_column="stage", value_columns=("diameter",),
                        pair_column="rod")
    with pytest.raises(DataProblem) as caught:
        pipeline.from_file(path, spec)
    assert "no pairs" in caught.value.message and "\n" not in caught.value.message
    # and the reverse: an independent spec on a paired file runs independent procedures only
    independent = _long(tmp_path, design="independent", pair_column=None).analysis
    assert independent.paired is None and independent.pairs is None
    assert "welch_t" in independent.procedures and "paired_t" not in independent.procedures


def test_a_paired_analysis_of_the_demo_file_is_not_the_independent_one():
    independent = pipeline.from_file(DEMO, AnalysisSpec(seed=1, resamples=500)).analysis
    paired = pipeline.from_file(DEMO, AnalysisSpec(design="paired", seed=1, resamples=500)).analysis
    assert independent.spec.layout == paired.spec.layout == "wide"
    assert set(independent.procedures).isdisjoint(paired.procedures)
    # reference: scipy.stats.ttest_rel on the rows pandas finds complete; ttest_ind on each column
    frame = pd.read_csv(DEMO)
    both = frame.dropna()
    x, y = both["caliper_mm"].to_numpy(), both["laser_mm"].to_numpy()
    assert paired.procedures["paired_t"].p_value == pytest.approx(stats.ttest_rel(x, y).pvalue, rel=1e-10)
    welch = stats.ttest_ind(frame["caliper_mm"].dropna(), frame["laser_mm"].dropna(), equal_var=False)
    assert independent.procedures["welch_t"].p_value == pytest.approx(welch.pvalue, rel=1e-10)
    assert paired.procedures["paired_t"].p_value < 0.01 < 0.05 < welch.pvalue
    assert paired.groups.n == (len(both), len(both)) != independent.groups.n
    assert any(f.key == "paired" for f in independent.screening.findings)  # the sign shown
    document = json.loads(json.dumps(analysis_document(paired), allow_nan=False))
    assert document["spec"]["design"] == "paired" and "paired_t" in document["procedures"]
    jsonschema.Draft202012Validator(analysis_schema()).validate(document)  # the published schema


def test_the_source_names_the_pair_column(tmp_path):
    analysis = _long(tmp_path).analysis
    assert analysis.source["pair_column"] == "rod"
    assert analysis.source["columns"] == ["stage", "diameter", "rod"]


def test_the_file_is_never_changed(tmp_path):
    _long(tmp_path)
    assert (tmp_path / "rods.csv").read_text(encoding="utf-8") == LONG


def test_an_equivalence_question_runs_on_the_pairs_of_a_file():
    question = Question("equivalent", margin=Margin.within(0.005))
    analysis = pipeline.from_file(DEMO, AnalysisSpec(design="paired", seed=1, resamples=500,
                                                     question=question)).analysis
    assert analysis.recommendation.key == "paired_equivalence"  # the counterpart of paired t
    assert analysis.paired.n_pairs == 19 and set(analysis.effect_sizes) == {"paired_d_z", "paired_d_av"}
    both = pd.read_csv(DEMO).dropna()
    # reference: statsmodels.stats.weightstats.ttost_paired(x1, x2, low, upp) on the complete rows
    expected = ttost_paired(both["caliper_mm"].to_numpy(), both["laser_mm"].to_numpy(), -0.005, 0.005)[0]
    assert analysis.procedures["paired_equivalence"].p_value == pytest.approx(expected, rel=1e-9)


def test_a_margin_question_on_few_lopsided_pairs_follows_the_paired_suggestion():
    rng = np.random.default_rng(12)
    y = rng.normal(40.0, 4.0, 14)
    x = y + rng.exponential(0.5, 14) ** 2 - 0.3
    groups = Groups(("new", "old"), x, y)
    difference = analyze(groups, AnalysisSpec(design="paired", seed=2, resamples=500))
    assert difference.recommendation.key == "signed_rank"
    question = Question("not_worse", margin=Margin.not_worse_by(1.0, "lower"))
    margin = analyze(groups, AnalysisSpec(design="paired", seed=2, resamples=500, question=question))
    assert margin.recommendation.key == "paired_noninferiority_ranks"  # counterpart: signed_rank
    assert all(registry.record(key).designs == ("paired",) for key in margin.procedures)
