"""The report of paired data: the design, the pairs left out and why, the pair differences, the
paired effect sizes labelled so that d_z is not read as d_av, the paired cautions."""

import dataclasses
from pathlib import Path
import html
import re

import numpy as np
import pytest
from scipy import stats

from engine import pipeline, report
from engine.analysis import _robustness, analyze
from engine.io import read_table
from engine.io.pairs import pairs_by_id, pairs_by_row
from engine.paired_effects import paired_effect_sizes
from engine.procedures.paired import paired_t
from engine.report import document
from engine.report.cautions import GENERAL_CAUTIONS, PAIRED_CAUTIONS
from engine.results import Groups
from engine.spec import AnalysisSpec

BEFORE = [12.1, 11.8, 13.0, 12.6, 11.2, 12.9, 13.4, 12.2, 11.9, 12.7, 12.4, 13.1]
AFTER = [11.6, 11.9, 12.1, 12.0, 10.9, 12.2, 12.8, 12.0, 11.1, 12.5, 11.8, 12.3]


def _squeezed(plain: str) -> str:
    return re.sub(" {2,}", "  ", plain)


def _wide(tmp_path, blank_row: int | None = None):
    """A wide file, one row per part; ``blank_row``: the data row whose 'after' cell is blank."""
    lines = ["before,after"]
    for i, (b, a) in enumerate(zip(BEFORE, AFTER)):
        lines.append(f"{b},{'' if i == blank_row else a}")
    path = tmp_path / "parts.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


def _paired_analysis(intake, spec):
    """An analysis of the pairs with the paired t-test and both paired effect sizes (the engine
    functions the paired records run)."""
    groups = Groups(intake.labels, intake.x, intake.y)
    analysis = analyze(groups, spec, source={"file": "parts.csv"})
    result = paired_t(groups.x, groups.y)
    sizes, _ = paired_effect_sizes(groups.x, groups.y)
    procedures = {"paired_t": result}
    suggestion = dataclasses.replace(analysis.recommendation, key="paired_t", name=result.name)
    return dataclasses.replace(analysis, procedures=procedures, effect_sizes=sizes, pairs=intake,
                               recommendation=suggestion,
                               robustness=_robustness(procedures, 0.95, question=spec.question))


@pytest.fixture
def by_row(tmp_path):
    table = read_table(_wide(tmp_path, blank_row=4))
    intake = pairs_by_row(table, columns=("before", "after"))
    return _paired_analysis(intake, AnalysisSpec(layout="wide", value_columns=("before", "after"),
                                                  design="paired", seed=1))


def test_the_design_and_the_pairs_left_out_are_said(by_row):
    rows = dict(document.choice_rows(by_row))
    assert rows["Design"] == "paired: 11 pairs, row by row"
    assert rows["Sizes"] == "11 pairs"
    assert "Spreads known to be equal" not in rows  # nothing paired rests on two spreads
    text = report.render(by_row)
    assert "1 ID or row was left out of the pairs (pair with one value blank: 1)." in text.paragraph
    assert "Design  Paired: 11 pairs, row by row" in _squeezed(text.plain)
    page = html.unescape(document.html(by_row))
    (problem,) = by_row.pairs.problems
    assert "<h2>Pairs left out</h2>" in page and problem.text in page
    assert "row 6" in problem.text  # the fifth data row is row 6 of the file
    # listed once in the whole report; the findings count it (the screening lists it)
    assert page.count(problem.text) == 1


def test_pairs_matched_by_an_id_column_say_the_column(tmp_path):
    path = tmp_path / "long.csv"
    lines = ["part,stage,load"]
    for i, (b, a) in enumerate(zip(BEFORE, AFTER)):
        lines += [f"P{i},before,{b}", f"P{i},after,{a}"]
    lines.append("P99,before,12.0")  # an ID in one group only
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    intake = pairs_by_id(read_table(path), values="load", group="stage", pair_id="part")
    analysis = _paired_analysis(intake, AnalysisSpec(group_column="stage", value_columns=("load",),
                                                     design="paired", pair_column="part", seed=1))
    assert dict(document.choice_rows(analysis))["Design"] == "paired: 12 pairs, matched by ID column 'part'"
    assert "(ID in one group only: 1)" in report.render(analysis).paragraph


def test_the_paragraph_speaks_of_the_pair_differences(by_row):
    x, y = by_row.groups.x, by_row.groups.y
    d = x - y
    # reference: scipy's paired t-test
    reference = stats.ttest_rel(x, y)
    text = report.render(by_row)
    assert text.paragraph.startswith("In 11 pairs, before was higher than after on average (SD of the "
                                     "pair differences ")
    assert f": mean of the pair differences {np.mean(d):.3f}, 95% CI" in text.paragraph
    assert report.p_clause(reference.pvalue) in text.paragraph
    assert "Mean of the pair differences, before minus after  " in _squeezed(text.plain)
    # the table of the groups carries the differences (numpy's mean and sample SD as reference)
    line = next(line for line in text.plain.splitlines() if line.startswith("Differences, before minus after"))
    cells = line.split()
    assert cells[4] == "11" and float(cells[5]) == pytest.approx(np.mean(d), abs=0.001)
    assert float(cells[6]) == pytest.approx(np.std(d, ddof=1), abs=0.001)


def test_the_paired_effect_sizes_say_what_they_are_standardised_by(by_row):
    x, y = by_row.groups.x, by_row.groups.y
    d = x - y
    # reference: the definitions, worked with numpy (Lakens 2013, Frontiers in Psychology 4:863,
    # d_z = mean(d) / sd(d) and d_av = mean(d) / ((sd1 + sd2) / 2); recalled from memory)
    d_z = np.mean(d) / np.std(d, ddof=1)
    d_av = np.mean(d) / ((np.std(x, ddof=1) + np.std(y, ddof=1)) / 2)
    text = report.render(by_row)
    plain = text.plain
    z_line = next(line for line in plain.splitlines() if line.startswith("- d of the differences (d_z)"))
    av_line = next(line for line in plain.splitlines() if line.startswith("- d over the average SD"))
    assert f"= {d_z:.2f} " in z_line and "standardised by the SD of the pair differences" in z_line
    assert f"= {d_av:.2f} " in av_line and "standardised by the average SD of the two groups" in av_line
    assert "average SD" not in z_line.split(".")[0] and "pair differences" not in av_line.split(".")[0]
    # the paragraph's own effect size and the table of the result carry the label too
    assert f"d of the differences (d_z) = {d_z:.2f}, 95% CI" in text.paragraph
    assert "(standardised by the SD of the pair differences)" in text.paragraph
    row = next(line for line in _squeezed(plain).splitlines() if line.startswith("Effect size: d of the differences"))
    assert f"  {d_z:.2f} (95% CI " in row and row.endswith("), standardised by the SD of the pair differences")


def test_paired_cautions_replace_the_independent_groups_one(by_row):
    said = report.cautions(by_row)
    assert PAIRED_CAUTIONS[0] in said and GENERAL_CAUTIONS[0] not in said
    assert GENERAL_CAUTIONS[0] in report.cautions(analyze(by_row.groups, AnalysisSpec(seed=1, resamples=1000)))


def test_an_independent_analysis_says_its_design(by_row):
    analysis = analyze(by_row.groups, AnalysisSpec(seed=1, resamples=1000))
    assert dict(document.choice_rows(analysis))["Design"] == "two independent groups"
    assert "Differences, " not in report.render(analysis).plain


def test_one_procedure_alone_is_not_said_to_agree(by_row):
    # one row in the side-by-side view: no "The 1 procedure agree"
    assert report.agreement(by_row) == "At the 95% level the paired t-test finds a difference."


def test_a_paired_equivalence_question_reads_in_pair_differences(tmp_path):
    from statsmodels.stats.weightstats import ttost_paired

    from engine.question import Margin, Question

    table = read_table(_wide(tmp_path))
    intake = pairs_by_row(table, columns=("before", "after"))
    question = Question("equivalent", 0.95, Margin.within(0.8))
    spec = AnalysisSpec(layout="wide", value_columns=("before", "after"), design="paired", seed=1,
                        resamples=1000, question=question)
    groups = Groups(intake.labels, intake.x, intake.y)
    analysis = analyze(groups, spec)
    assert analysis.recommendation.key == "paired_equivalence"
    text = report.render(analysis)
    # reference: statsmodels' two one-sided paired t-tests
    _, lower, upper = ttost_paired(groups.x, groups.y, -0.8, 0.8)
    assert text.paragraph.startswith("Equivalent within ±0.800 at the 5% level: the 90% confidence interval of "
                                     "the mean of the pair differences")
    assert "The groups do differ, by less than the margin" in text.paragraph
    assert ", before minus after, is " in text.paragraph and " over 12 pairs." in text.paragraph
    assert (f"give {report.p_clause(lower[1])} against the lower end of the margin, -0.800, and "
            f"{report.p_clause(upper[1])} against the upper end, 0.800") in text.paragraph
    assert dict(document.choice_rows(analysis))["Question"] == "Are before and after equivalent within ±0.8?"
    assert PAIRED_CAUTIONS[0] in report.cautions(analysis)
    assert any("subject matter" in c for c in report.cautions(analysis))


# -- through the pipeline, as the window and the command run it -----------------------------------

DEMO = Path(__file__).resolve().parents[2] / "demo_files" / "rod_diameters.csv"


@pytest.fixture(scope="module")
def rods():
    spec = AnalysisSpec(layout="wide", value_columns=("caliper_mm", "laser_mm"), design="paired", seed=1,
                        resamples=1000)
    return pipeline.from_file(DEMO, spec).analysis


def test_a_paired_file_reads_right_through_the_pipeline(rods):
    x, y = rods.groups.x, rods.groups.y
    reference = stats.ttest_rel(x, y)  # reference: scipy's paired t-test
    text = report.render(rods)
    assert text.paragraph.startswith(f"In {x.size} pairs, caliper_mm was higher than laser_mm on average")
    assert f"paired t({x.size - 1}) = {reference.statistic:.2f}, {report.p_clause(reference.pvalue)}" in text.paragraph
    # a blank cell takes its pair with it: counted once, as a pair
    assert "left out before the comparison" not in text.paragraph
    assert "1 ID or row was left out of the pairs (pair with one value blank: 1)." in text.paragraph
    for finding in rods.paired.findings:
        assert finding.text in text.plain
    assert "Shape and spread of the groups" not in text.plain
    (problem,) = rods.pairs.problems
    assert document.text(rods).count(problem.text) == 1


def test_the_signed_rank_result_counts_the_pairs_each_way(rods):
    d = rods.groups.x - rods.groups.y
    paragraph = report.render(rods, procedure="signed_rank").paragraph
    higher, lower = int(np.sum(d > 0)), int(np.sum(d < 0))
    assert paragraph.startswith(f"Of {d.size} pairs, caliper_mm was higher than laser_mm in {higher}, lower in {lower}")
