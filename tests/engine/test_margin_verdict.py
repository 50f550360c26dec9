"""The verdict of an equivalence or non-inferiority question, in cases and in words."""

import numpy as np
import pytest
from statsmodels.stats.weightstats import ttest_ind, ttost_ind

from engine.errors import OptionProblem
from engine.procedures.equivalence import equivalence_t, noninferiority_t
from engine.question import Margin, Question
from engine.results import Interval

LABELS = ("new", "old")
EQUIVALENT = Question("equivalent", 0.95, Margin.within(0.5))


def _equivalence(narrow, wide, question=EQUIVALENT, margin=None):
    return question.margin_answer(Interval(*narrow, 0.90), Interval(*wide, 0.95), margin=margin)


# The four cases of an interval against an equivalence margin and against no difference, as the
# equivalence literature draws them (Lakens 2017, "Equivalence tests: a practical primer", Social
# Psychological and Personality Science 8:355, its figure of four intervals; recalled from memory).
@pytest.mark.parametrize("narrow, wide, case, words", [
    ((-0.1, 0.2), (-0.15, 0.25), "equivalent",
     ["Equivalent within ±0.500 at the 5% level", "90% confidence interval of the difference in "
      "means, -0.100 to 0.200, lies inside the margin -0.500 to 0.500",
      "95% interval, -0.150 to 0.250, includes 0."]),
    ((0.05, 0.3), (0.02, 0.33), "equivalent_but_different",
     ["Equivalent within ±0.500 at the 5% level", "do differ, by less than the margin",
      "0.020 to 0.330, leaves out 0."]),
    ((0.2, 0.9), (0.1, 1.0), "different_not_equivalent",
     ["Not shown to be equivalent within ±0.50 at the 5% level", "reaches past the margin",
      "The groups differ:"]),
    ((0.6, 0.9), (0.55, 1.0), "different_not_equivalent",
     ["lies wholly outside the margin", "by more than the margin allows"]),
    ((-0.6, 0.3), (-0.7, 0.4), "inconclusive",
     ["Not shown to be equivalent within ±0.50", "no difference is shown either", "includes 0."]),
])
def test_the_four_cases_of_an_interval_against_margin_and_zero(narrow, wide, case, words):
    answer = _equivalence(narrow, wide)
    assert answer.case == case
    assert answer.yes is case.startswith("equivalent")
    text = EQUIVALENT.margin_words(answer, LABELS)
    for part in words:
        assert part in text, (part, text)


def test_an_interval_touching_the_margin_is_not_inside_it():
    # the two one-sided tests reject only when p < alpha, so an end on the margin is not enough
    assert _equivalence((-0.5, 0.2), (-0.6, 0.3)).case == "inconclusive"
    assert _equivalence((-0.49, 0.2), (-0.6, 0.3)).case == "equivalent"
    assert _equivalence((float("nan"), 0.2), (-0.6, 0.3)).case == "inconclusive"


def test_a_percentage_margin_says_what_it_was_entered_as():
    question = Question("equivalent", 0.95, Margin.within(5, unit="percent"))
    margin = question.margin.in_units(8.4)
    text = question.margin_words(_equivalence((-0.1, 0.2), (-0.15, 0.25), question, margin), LABELS)
    assert "±0.420 (±5% of old's mean)" in text
    with pytest.raises(OptionProblem, match="percentage"):
        _equivalence((-0.1, 0.2), (-0.15, 0.25), question)


def test_a_ratio_margin_reads_as_a_ratio_and_judges_against_one():
    question = Question("equivalent", 0.9, Margin.within(0.8, 1.25, "ratio"))
    answer = question.margin_answer(Interval(0.9, 1.1, 0.8), Interval(1.02, 1.2, 0.9))
    assert answer.case == "equivalent_but_different"
    text = question.margin_words(answer, LABELS, "ratio of geometric means")
    assert "within a ratio of 0.80 to 1.25 at the 10% level" in text
    assert "80% confidence interval of the ratio of geometric means" in text and "leaves out 1." in text


@pytest.mark.parametrize("worse, interval, case, words", [
    ("lower", (0.1, 0.9), "better", "At the 5% level, new is not worse than old by more than 0.500, and is shown to be better"),
    ("lower", (-0.3, 0.4), "not_worse", "lies wholly above the margin -0.50"),
    ("lower", (-0.9, -0.6), "worse", "new is worse than old by more than 0.50"),
    ("lower", (-0.7, 0.2), "not_shown_not_worse", "it is not shown that new is not worse"),
    ("higher", (-0.9, -0.1), "better", "lies wholly below 0."),
    ("higher", (-0.3, 0.4), "not_worse", "lies wholly below the margin 0.50"),
    ("higher", (0.6, 0.9), "worse", "lies wholly above the margin 0.50"),
    ("higher", (-0.2, 0.7), "not_shown_not_worse", "reaches above the margin 0.50"),
])
def test_the_non_inferiority_verdicts(worse, interval, case, words):
    question = Question("not_worse", 0.95, Margin.not_worse_by(0.5, worse))
    answer = question.margin_answer(Interval(*interval, 0.9))
    assert answer.case == case
    assert answer.yes is (case in ("better", "not_worse"))
    assert words in question.margin_words(answer, LABELS)


def test_a_one_sided_interval_still_judges_non_inferiority():
    question = Question("not_worse", 0.95, Margin.not_worse_by(0.5, "lower"))
    assert question.margin_answer(Interval(-0.3, None, 0.95)).case == "not_worse"
    assert question.margin_answer(Interval(-0.6, None, 0.95)).case == "not_shown_not_worse"


def test_a_difference_question_has_no_margin_verdict():
    with pytest.raises(OptionProblem):
        Question("differ").margin_answer(Interval(0, 1, 0.9))


@pytest.mark.parametrize("seed", range(12))
def test_the_verdict_agrees_with_statsmodels_two_one_sided_tests(seed):
    # reference: statsmodels ttost_ind (equivalence) and ttest_ind with the null at the margin
    # (non-inferiority, and the two-sided test for "differ")
    rng = np.random.default_rng(seed)
    x, y = rng.normal(0.15 * (seed % 5), 1.0, 25), rng.normal(0.0, 1.3, 30)
    question = Question("equivalent", 0.95, Margin.within(-0.6, 0.8))
    tost = equivalence_t(x, y, low=-0.6, high=0.8)
    wide = equivalence_t(x, y, low=-0.6, high=0.8, confidence_level=0.975).interval
    answer = question.margin_answer(tost.interval, wide)
    p_equivalent = ttost_ind(x, y, -0.6, 0.8, usevar="unequal")[0]
    p_differ = ttest_ind(x, y, usevar="unequal")[1]
    assert answer.yes is bool(p_equivalent < 0.05)
    assert (answer.case in ("equivalent_but_different", "different_not_equivalent")) is bool(p_differ < 0.05)
    not_worse = Question("not_worse", 0.95, Margin.not_worse_by(0.4, "lower"))
    one_sided = noninferiority_t(x, y, margin=0.4, worse="lower").interval
    p_not_worse = ttest_ind(x, y, alternative="larger", usevar="unequal", value=-0.4)[1]
    assert not_worse.margin_answer(one_sided).yes is bool(p_not_worse < 0.05)
