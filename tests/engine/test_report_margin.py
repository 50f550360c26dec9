"""The report of an equivalence or non-inferiority question: the verdict against the margin as the
headline, the margin as entered in every output, the one-sided tests, the side-by-side table,
the cautions; and the paragraph after a "differ" question answered "no clear evidence"."""

import dataclasses
import html
import re
from pathlib import Path

import numpy as np
import pytest
from statsmodels.stats.weightstats import ttost_ind

from engine import pipeline, report
from engine.analysis import _robustness, analyze
from engine.question import Margin, Question
from engine.report import document
from engine.report.sentences import question_text
from engine.report.cautions import CAUTIONS_ALWAYS, MARGIN_CAUTIONS
from engine.results import Groups, Interval, ProcedureResult
from engine.rounding import format_p
from engine.spec import AnalysisSpec

LABELS = ("new", "old")


# -- margin analyses ------------------------------------------------------------------------------

def _with_results(analysis, results):
    """``analysis`` with ``results`` as its procedures (the first suggested) and its side-by-side
    view worked out by the engine's own rule (for intervals a test needs to choose)."""
    procedures = {r.key: r for r in results}
    first = results[0]
    suggestion = dataclasses.replace(analysis.recommendation, key=first.key, name=first.name)
    question = analysis.spec.question
    return dataclasses.replace(analysis, procedures=procedures, recommendation=suggestion,
                               robustness=_robustness(procedures, question.level, question=question,
                                                      margin=analysis.margin))


def _margin_analysis(x, y, question, **spec):
    """The whole analysis of a margin question, as the window and the command run it."""
    groups = Groups(LABELS, np.asarray(x, float), np.asarray(y, float))
    return analyze(groups, AnalysisSpec(question=question, seed=1, resamples=1000, **spec))


def _data(shift=0.1, n=30, seed=3):
    rng = np.random.default_rng(seed)
    return rng.normal(10 + shift, 0.4, n), rng.normal(10, 0.4, n)


EQUIVALENT = Question("equivalent", 0.95, Margin.within(0.5))


def _squeezed(plain: str) -> str:
    """Plain text with the padding of its aligned columns closed up to two spaces."""
    return re.sub(" {2,}", "  ", plain)


# -- the headline -------------------------------------------------------------------------------

def test_the_headline_is_the_verdict_of_the_suggested_procedure_against_the_margin():
    analysis = _margin_analysis(*_data(), EQUIVALENT)
    key = analysis.recommendation.key
    words = EQUIVALENT.margin_words(analysis.margin_answer(key), LABELS,
                                    analysis.procedures[key].estimate_name)
    text = report.render(analysis)
    assert text.paragraph.startswith(words)
    assert text.paragraph.startswith("Equivalent within ±0.500 at the 5% level: the 90% confidence interval")
    # the figures of the verdict are the figures of the tables: one rounding for both
    shown = report.display_numbers(analysis)
    assert f"90% confidence interval of the difference in means, {shown.interval}," in text.paragraph
    assert f"90% confidence interval, set against the margin  {shown.interval}" in _squeezed(text.plain)


def test_the_two_one_sided_p_values_are_those_of_statsmodels():
    x, y = _data()
    analysis = _margin_analysis(x, y, EQUIVALENT)
    # reference: statsmodels ttost_ind with unequal variances (Welch), the two one-sided tests
    p, lower, upper = ttost_ind(x, y, -0.5, 0.5, usevar="unequal")
    assert p < 0.05  # these data are equivalent within 0.5
    text = report.render(analysis)
    assert (f"The one-sided tests give {report.p_clause(lower[1])} against the lower end of the margin, -0.500, "
            f"and {report.p_clause(upper[1])} against the upper end, 0.500; equivalence at the 5% level "
            "needs both below 0.05.") in text.paragraph
    assert f"One-sided p-value, upper end of the margin  {format_p(upper[1])}" in _squeezed(text.plain)
    assert f"{format_p(lower[1])}; {format_p(upper[1])}" in text.plain  # the side-by-side cell


def _hand_made(question, narrow, wide=None, key="equivalence_welch", p=(0.01, 0.02)):
    """An analysis whose one result has the given intervals (the four cases of a verdict)."""
    x, y = _data()
    analysis = _margin_analysis(x, y, question)
    level = question.level
    details = {"p_lower": p[0], "p_upper": p[1]}
    if wide is not None:
        details["difference_interval"] = Interval(*wide, level)
    result = ProcedureResult(key, "two one-sided tests (Welch t)", (narrow[0] + narrow[1]) / 2,
                             "difference in means", None, None, None, max(p), Interval(*narrow, 1 - 2 * (1 - level)),
                             "two-sided", "by hand", details)
    return _with_results(analysis, [result])


# The four cases of an interval against an equivalence margin and against no difference (Lakens
# 2017, "Equivalence tests: a practical primer", Social Psychological and Personality Science
# 8:355, its figure of four intervals; recalled from memory).
@pytest.mark.parametrize("narrow, wide, opening, reading", [
    ((-0.1, 0.2), (-0.15, 0.25), "Equivalent within ±0.500 at the 5% level", "equivalent"),
    ((0.05, 0.3), (0.02, 0.33), "Equivalent within ±0.500 at the 5% level", "equivalent, with a difference"),
    ((0.2, 0.9), (0.1, 1.0), "Not shown to be equivalent within ±0.50 at the 5% level", "differ, not equivalent"),
    ((-0.6, 0.3), (-0.7, 0.4), "Not shown to be equivalent within ±0.500 at the 5% level, and no "
                               "difference is shown either", "not clear either way"),
])
def test_the_four_equivalence_cases_head_the_findings_and_the_table(narrow, wide, opening, reading):
    analysis = _hand_made(EQUIVALENT, narrow, wide)
    text = report.render(analysis)
    assert text.paragraph.startswith(opening)
    line = next(line for line in text.plain.splitlines() if line.startswith("Two one-sided tests"))
    assert line.rstrip().endswith(reading) or reading in line
    assert not text.sameness  # the paragraph on sameness belongs to a "differ" question


@pytest.mark.parametrize("worse, narrow, opening, reading", [
    ("lower", (0.1, 0.9), "At the 5% level, new is not worse than old by more than 0.500, and is shown to be better",
     "Better"),
    ("lower", (-0.3, 0.4), "At the 5% level, new is not worse than old by more than 0.500:", "Not worse"),
    ("lower", (-0.9, -0.6), "At the 5% level, new is worse than old by more than 0.50", "Worse by more than the margin"),
    ("lower", (-0.7, 0.2), "At the 5% level it is not shown that new is not worse", "Not clear"),
    ("higher", (-0.3, 0.4), "At the 5% level, new is not worse than old by more than 0.500:", "Not worse"),
    ("higher", (0.6, 0.9), "At the 5% level, new is worse than old by more than 0.50", "Worse by more than the margin"),
])
def test_the_non_inferiority_cases_read_right(worse, narrow, opening, reading):
    question = Question("not_worse", 0.95, Margin.not_worse_by(0.5, worse))
    analysis = _hand_made(question, narrow, key="noninferiority_welch", p=(0.03, 0.03))
    text = report.render(analysis)
    assert text.paragraph.startswith(opening)
    assert f"At the 5% level  {reading}" in _squeezed(text.plain)
    bound = "-0.50" if worse == "lower" else "0.50"
    assert f"The one-sided test against the margin, {bound}" in text.paragraph
    assert f"0.5 in the measurement's units; {worse} values are worse" in text.plain


def test_non_inferiority_p_value_is_the_one_sided_test_at_the_worse_end():
    x, y = _data(shift=0.05)
    question = Question("not_worse", 0.95, Margin.not_worse_by(0.3, "lower"))
    analysis = _margin_analysis(x, y, question)
    assert analysis.recommendation.key == "noninferiority_welch"
    # reference: statsmodels ttost_ind's lower test is the one-sided Welch test of H0: diff <= -0.3
    _, lower, _ = ttost_ind(x, y, -0.3, 0.3, usevar="unequal")
    text = report.render(analysis)
    assert f"gives {report.p_clause(lower[1])}; non-inferiority at the 5% level needs it below 0.05" in text.paragraph
    assert f"One-sided p-value against the margin  {format_p(lower[1])}" in _squeezed(text.plain)
    assert "Is new not worse than old by more than 0.3, where lower values are worse?" in dict(
        document.choice_rows(analysis))["Question"]


def test_a_percentage_margin_is_said_as_entered_with_its_value_in_units_everywhere():
    x, y = _data()
    question = Question("equivalent", 0.95, Margin.within(4, unit="percent"))
    analysis = _margin_analysis(x, y, question)
    mean = analysis.summaries[1].mean
    size = 0.04 * abs(mean)
    text = report.render(analysis)
    shown = f"{size:.3f}"
    entered = f"-4% to 4% of old's mean ({mean:.3f}), that is -{shown} to {shown} in the measurement's units"
    assert f"Equivalent within ±{shown} (±4% of old's mean)" in text.paragraph
    assert f"Margin as entered: {entered}." in text.paragraph
    assert f"Margin  {entered}" in _squeezed(text.plain)
    assert f"-{shown} to {shown}" in next(line for line in text.plain.splitlines()
                                          if line.startswith("Two one-sided tests"))
    rows = dict(document.choice_rows(analysis))
    assert rows["Margin"] == entered
    assert rows["Question"] == f"Are new and old equivalent within ±{shown} (±4% of old's mean)?"
    assert "±4% of old's mean" in report.agreement(analysis)
    page = html.unescape(document.html(analysis))
    assert entered in page and f"Equivalent within ±{shown} (±4% of old's mean)" in page


def test_a_margin_in_units_is_said_as_entered():
    analysis = _margin_analysis(*_data(), Question("equivalent", 0.95, Margin.within(-0.25, 0.75)))
    text = report.render(analysis)
    assert "Margin as entered: -0.25 to 0.75 in the measurement's units." in text.paragraph
    assert dict(document.choice_rows(analysis))["Question"] == "Are new and old equivalent within -0.25 to 0.75?"


def test_a_ratio_margin_reads_as_a_ratio_of_group_1_over_group_2():
    rng = np.random.default_rng(5)
    x, y = rng.lognormal(2.0, 0.2, 40), rng.lognormal(2.0, 0.2, 40)
    question = Question("equivalent", 0.95, Margin.within(0.8, 1.25, "ratio"))
    analysis = _margin_analysis(x, y, question)
    assert analysis.recommendation.key == "equivalence_log_welch"
    text = report.render(analysis)
    assert text.paragraph.startswith("Equivalent within a ratio of 0.80 to 1.25 at the 5% level")
    assert ", new over old, is " in text.paragraph
    assert "Margin as entered: 0.80 to 1.25 as a ratio of new's geometric mean to old's." in text.paragraph
    assert "Estimate, new over old" in text.plain
    assert "minus" not in next(line for line in text.plain.splitlines() if line.startswith("Ratio of"))
    assert dict(document.choice_rows(analysis))["Groups compared"].endswith("ratios are new over old")


def test_the_table_of_the_groups_keeps_the_decimals_of_the_values_not_of_a_ratio():
    rng = np.random.default_rng(5)
    x, y = rng.lognormal(6.0, 0.05, 40), rng.lognormal(6.0, 0.05, 40)  # values near 400
    question = Question("equivalent", 0.95, Margin.within(0.95, 1.05, "ratio"))
    analysis = _margin_analysis(x, y, question)
    assert analysis.recommendation.key == "equivalence_log_welch"
    assert report.display_numbers(analysis).decimals == 3  # a ratio near 1
    new_row = next(line for line in report.render(analysis).plain.splitlines() if line.startswith("new "))
    assert new_row.split()[2] == f"{np.mean(x):.1f}"  # numpy's mean, to four significant digits


def test_the_side_by_side_table_shows_interval_margin_p_values_and_reading():
    x, y = _data()
    analysis = _margin_analysis(x, y, EQUIVALENT)
    assert list(analysis.procedures) == ["equivalence_welch", "equivalence_ranks", "equivalence_bootstrap_bca"]
    blocks = report.findings.findings_blocks(analysis)
    grid = next(b for b in blocks if b[0] == "grid" and b[1][0] == "Procedure")
    head, body = grid[1], grid[2]
    assert head == ["Procedure", "Estimate, new minus old", "90% interval", "Margin",
                    "One-sided p-values, lower end; upper end", "At the 5% level"]
    welch, ranks, bootstrap = body
    # reference: statsmodels ttost_ind (Welch) for the two one-sided p-values of the first row
    _, lower, upper = ttost_ind(x, y, -0.5, 0.5, usevar="unequal")
    assert welch[3] == "-0.500 to 0.500" and welch[4] == f"{format_p(lower[1])}; {format_p(upper[1])}"
    for row in body:
        answer = analysis.margin_answer(next(k for k in analysis.procedures
                                             if report.capital(analysis.procedures[k].name) in row[0]))
        assert row[5].startswith(EQUIVALENT.margin_reading(answer))
    assert bootstrap[4] == "none" and bootstrap[5].endswith("(not counted)")
    agreement = report.agreement(analysis)
    assert "within ±0.5" in agreement and "finds a difference" not in agreement
    notes = [b[1] for b in blocks if b[0] == "small"]
    assert any("two-sided 90% one (1 - 2 × 5%)" in n for n in notes)
    assert any("reads from its interval alone" in n for n in notes)


def test_the_margin_cautions_replace_the_ones_about_a_difference():
    analysis = _margin_analysis(*_data(), EQUIVALENT)
    said = report.cautions(analysis)
    for caution in MARGIN_CAUTIONS:
        assert caution in said
    assert CAUTIONS_ALWAYS[1] not in said  # "if there were no difference" does not fit a margin
    assert sum("subject matter" in c and "before the data are seen" in c for c in said) == 1
    assert any("not the size of the difference" in c for c in said)
    assert any(c.startswith("Regulated") for c in said)
    page = document.html(analysis)
    assert "fixed before the data are seen" in page


def test_the_report_page_says_the_question_margin_and_levels():
    analysis = _margin_analysis(*_data(), Question("equivalent", 0.9, Margin.within(0.5)))
    assert analysis.recommendation.key == "equivalence_welch"
    rows = dict(document.choice_rows(analysis))
    assert rows["Confidence level"] == ("90% (a test at the 10% level; the two-sided 80% interval is set "
                                        "against the margin)")
    assert rows["Margin"] == "-0.5 to 0.5 in the measurement's units"
    text = report.render(analysis)
    assert "80% confidence interval, set against the margin" in text.plain
    assert "90% confidence interval, whether the groups differ" in text.plain
    assert "Hedges' g = " in text.paragraph and "90% CI" in text.paragraph.split("Hedges' g")[1]


def test_plain_paragraphs_are_single_lines():
    analysis = _margin_analysis(*_data(), EQUIVALENT)
    plain = report.render(analysis).plain
    paragraph = report.render(analysis).paragraph
    assert "\n" not in paragraph and paragraph + "\n" in plain


# -- after "no clear evidence" of a difference -------------------------------------------------

def _difference_analysis(shift, kind="differ"):
    x, y = _data(shift=shift)
    return analyze(Groups(LABELS, x, y), AnalysisSpec(question=Question(kind), seed=1, resamples=1000))


def test_no_clear_difference_adds_the_paragraph_on_sameness():
    analysis = _difference_analysis(0.1)
    text = report.render(analysis)
    assert text.sameness.startswith("A difference that is not shown is not sameness:")
    assert "95% interval of the difference in means" in text.sameness
    assert "margin taken from the subject matter" in text.sameness and "not from these data" in text.sameness
    assert "\n" not in text.sameness
    assert f"{text.paragraph}\n\n{text.sameness}\n" in text.plain
    assert f"<p>{text.sameness}</p>" in text.html
    assert text.sameness in document.html(analysis)


def test_a_clear_difference_or_a_one_sided_question_adds_none():
    assert report.render(_difference_analysis(0.6)).sameness == ""
    assert report.render(_difference_analysis(0.1, "higher")).sameness == ""


def test_one_margin_procedure_alone_gives_the_verdict_in_the_agreement():
    analysis = _margin_analysis(*_data(), EQUIVALENT)
    analysis = _with_results(analysis, [analysis.chosen])
    assert report.agreement(analysis) == ("By the two one-sided tests (Welch t), the groups are shown to be "
                                          "equivalent within ±0.5 at the 5% level.")
    question = Question("not_worse", 0.95, Margin.not_worse_by(0.02, "lower"))  # the interval reaches -0.031
    analysis = _margin_analysis(*_data(), question)
    analysis = _with_results(analysis, [analysis.procedures["noninferiority_welch"]])
    assert report.agreement(analysis) == ("By the non-inferiority t-test (Welch t), new is not shown to be not "
                                          "worse than old by more than 0.02 at the 5% level.")


def test_a_converted_margin_reads_alike_in_every_sentence():
    # the adhesive demo file: a wide interval, so the verdict writes the margin to one decimal
    demo = Path(__file__).resolve().parents[2] / "demo_files" / "adhesive_cure_times.csv"
    question = Question("not_worse", 0.95, Margin.not_worse_by(10, "higher", "percent"))
    analysis = pipeline.from_file(demo, AnalysisSpec(question=question, seed=7, resamples=1000)).analysis
    second = analysis.groups.labels[1]
    text = report.render(analysis)
    shown = re.search(rf"by more than (\S+) \(10% of {second}'s mean\)", text.paragraph).group(1)
    assert float(shown) == pytest.approx(0.10 * abs(np.mean(analysis.groups.y)), abs=0.05)
    assert f"that is {shown} in the measurement's units; higher values are worse" in text.paragraph
    assert f"by more than {shown} (10% of {second}'s mean)" in report.agreement(analysis)
    assert f"by more than {shown} (10% of {second}'s mean), where higher" in dict(
        document.choice_rows(analysis))["Question"]


def test_a_probability_estimate_leaves_the_groups_their_own_decimals():
    # the adhesive demo file: the suggested Brunner-Munzel estimate is a probability near 1/2
    demo = Path(__file__).resolve().parents[2] / "demo_files" / "adhesive_cure_times.csv"
    analysis = pipeline.from_file(demo, AnalysisSpec(seed=7, resamples=1000)).analysis
    assert analysis.recommendation.key == "brunner_munzel"
    text = report.render(analysis)
    median = float(np.median(analysis.groups.x))  # numpy's median as the reference
    assert f"(median {median:.1f}, quartiles" in text.paragraph
    first_row = next(line for line in text.plain.splitlines() if line.startswith(analysis.groups.labels[0] + " "))
    assert first_row.split()[4] == f"{median:.1f}"


@pytest.mark.parametrize("margin, kind, said", [
    (Margin(-5, 5, "percent"), "equivalent", "within ±5% of B's mean?"),
    (Margin(-2, 3, "percent"), "equivalent", "within -2% to 3% of B's mean?"),
    (Margin.not_worse_by(4, "lower", "percent"), "not_worse", "4% of B's mean"),
])
def test_a_percentage_margin_without_the_analysis_is_said_once(margin, kind, said):
    # before any analysis (no group 2 mean yet) the question names the percentage once
    text = question_text(Question(kind=kind, margin=margin), ("A", "B"))
    assert said in text and text.count("%") == said.count("%")
