"""Equivalence by the Hodges-Lehmann interval, the bootstrap interval and the log-scale t-tests."""

import numpy as np
import pytest
from scipy import stats
from statsmodels.stats.weightstats import ttost_ind

from engine.errors import OptionProblem
from engine.procedures.equivalence_intervals import (
    equivalence_bootstrap, equivalence_log_t, equivalence_ranks, inside_margin)
from engine.procedures.ranks import mann_whitney
from engine.question import Margin, Question
from engine.results import Interval


def _positive(seed, n1=18, n2=23, ratio=1.05):
    rng = np.random.default_rng(seed)
    return rng.lognormal(2.0, 0.25, n1), rng.lognormal(2.0 - np.log(ratio), 0.35, n2)


@pytest.mark.parametrize("spread, usevar", [("welch", "unequal"), ("pooled", "pooled")])
@pytest.mark.parametrize("seed", range(5))
def test_the_log_scale_tests_match_statsmodels_with_the_log_transform(spread, usevar, seed):
    # reference: statsmodels ttost_ind(..., transform=np.log), which takes logs of the data and
    # of the margin; the estimate is the ratio of geometric means (scipy.stats.gmean)
    x, y = _positive(seed)
    p, (t1, p1, _), (t2, p2, df) = ttost_ind(x, y, 0.8, 1.25, usevar=usevar, transform=np.log)
    ours = equivalence_log_t(x, y, low=0.8, high=1.25, spread=spread)
    assert ours.p_value == pytest.approx(p, rel=1e-10)
    assert ours.details["p_lower"] == pytest.approx(p1, rel=1e-10)
    assert ours.details["p_upper"] == pytest.approx(p2, rel=1e-10)
    assert ours.df == pytest.approx(df, rel=1e-10)
    assert ours.estimate == pytest.approx(stats.gmean(x) / stats.gmean(y), rel=1e-12)
    assert "geometric means of group 1 to group 2" in ours.method
    # duality on the ratio scale: p < alpha exactly when the 90% ratio interval is inside
    assert (ours.p_value < 0.05) == inside_margin(ours.interval, 0.8, 1.25)
    assert ours.interval.low < ours.estimate < ours.interval.high


@pytest.mark.parametrize("bad, where", [([3.0, 0.0, 2.0], "group 1 has 1 value that is not (the first: 0, value 2"),
                                        ([3.0, -1.0, -2.0], "group 1 has 2 values that are not")])
def test_the_log_scale_refuses_values_that_are_not_positive(bad, where):
    with pytest.raises(OptionProblem) as caught:
        equivalence_log_t(bad, [1.0, 2.0, 3.0], low=0.8, high=1.25)
    assert "positive values" in caught.value.message and where in caught.value.message
    with pytest.raises(OptionProblem, match="ratio margin"):
        equivalence_log_t([1, 2, 3], [1, 2, 3], low=-0.2, high=0.2)


@pytest.mark.parametrize("seed", range(10))
def test_the_rank_version_p_values_are_scipys_and_agree_with_the_interval(seed):
    # reference: scipy.stats.mannwhitneyu (exact) of the shifted group 1 against group 2, one
    # test per margin end; the Hodges-Lehmann interval at 1 - 2 alpha inverts the same tests
    rng = np.random.default_rng(100 + seed)
    x, y = rng.normal(0.1 * (seed % 6), 1.0, 12), rng.normal(0.0, 1.0, 14)
    low, high = -0.9, 1.1
    ours = equivalence_ranks(x, y, low=low, high=high)
    p_lower = stats.mannwhitneyu(x - low, y, alternative="greater", method="exact").pvalue
    p_upper = stats.mannwhitneyu(x - high, y, alternative="less", method="exact").pvalue
    assert ours.details["p_lower"] == pytest.approx(p_lower, rel=1e-9)
    assert ours.details["p_upper"] == pytest.approx(p_upper, rel=1e-9)
    assert ours.interval == mann_whitney(x, y, confidence_level=0.90).interval
    assert ours.details["equivalent"] is bool(ours.p_value < 0.05)


def test_the_bootstrap_version_is_near_scipys_bootstrap_and_repeats_with_its_seed():
    # reference: scipy.stats.bootstrap of mean(x) - mean(y), each group resampled on its own;
    # the resamples differ, so the ends agree only to Monte Carlo error (common practice: a few
    # percent of the width at 20,000 resamples)
    rng = np.random.default_rng(7)
    x, y = rng.gamma(3.0, 1.0, 30), rng.gamma(3.0, 1.1, 35)
    for kind, method in (("bca", "BCa"), ("percentile", "percentile")):
        ours = equivalence_bootstrap(x, y, low=-1.5, high=1.5, kind=kind, n_resamples=20_000,
                                     rng=np.random.default_rng(1))
        theirs = stats.bootstrap((x, y), lambda a, b, axis: a.mean(axis) - b.mean(axis),
                                 confidence_level=0.90, n_resamples=20_000, method=method,
                                 random_state=np.random.default_rng(2)).confidence_interval
        width = theirs.high - theirs.low
        assert ours.interval.level == pytest.approx(0.90)
        assert abs(ours.interval.low - theirs.low) < 0.05 * width
        assert abs(ours.interval.high - theirs.high) < 0.05 * width
        again = equivalence_bootstrap(x, y, low=-1.5, high=1.5, kind=kind, n_resamples=20_000,
                                      rng=np.random.default_rng(1))
        assert again.interval == ours.interval
        assert ours.details["equivalent"] is inside_margin(ours.interval, -1.5, 1.5)
        wide = ours.details["difference_interval"]
        assert wide.level == pytest.approx(0.95) and wide.low < ours.interval.low


def test_the_results_carry_what_the_question_needs_for_its_four_cases():
    x, y = _positive(3)
    question = Question("equivalent", 0.95, Margin.within(4, unit="percent"))
    margin = question.margin.in_units(float(np.mean(y)))
    note = question.margin.note(float(np.mean(y)))
    result = equivalence_ranks(x, y, low=margin.low, high=margin.high, margin_note=note)
    assert "% of group 2's mean" in result.method and "in the measurement's units" in result.method
    answer = question.margin_answer(result.interval, result.details["difference_interval"], margin=margin)
    assert answer.yes is result.details["equivalent"]


def test_an_open_end_on_the_margin_counts_as_inside():
    assert inside_margin(Interval(-1.0, 0.5, 0.9, low_open=True), -1.0, 1.0)
    assert not inside_margin(Interval(-1.0, 0.5, 0.9), -1.0, 1.0)
    assert not inside_margin(Interval(None, 0.5, 0.9), -1.0, 1.0)
