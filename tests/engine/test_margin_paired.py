"""Equivalence and non-inferiority of matched pairs: the paired t, the signed-rank version with
the one-sample Hodges-Lehmann interval, and the paired bootstrap, against scipy and statsmodels
(the paired equivalence t against ``ttost_paired`` is in test_paired.py)."""

import numpy as np
import pytest
from scipy import stats
from statsmodels.stats.weightstats import DescrStatsW, ttost_paired

from engine.procedures.paired import paired_bootstrap_mean
from engine.procedures.paired_margin import (
    paired_equivalence, paired_equivalence_bootstrap, paired_equivalence_ranks, paired_noninferiority,
    paired_noninferiority_bootstrap, paired_noninferiority_ranks)


def _pairs(seed, n=14, shift=0.1, noise=0.6):
    rng = np.random.default_rng(seed)
    base = rng.normal(50.0, 5.0, n)
    return base + shift + rng.normal(0.0, noise, n), base


def test_the_paired_equivalence_carries_both_intervals_and_its_margin_note():
    x, y = _pairs(1)
    result = paired_equivalence(x, y, low=-0.5, high=0.6, margin_note="the margin as entered")
    # reference: statsmodels ttost_paired, and scipy ttest_rel's intervals at 0.90 and 0.95
    assert result.p_value == pytest.approx(ttost_paired(x, y, -0.5, 0.6)[0], rel=1e-10)
    for interval, level in ((result.interval, 0.90), (result.details["difference_interval"], 0.95)):
        ci = stats.ttest_rel(x, y).confidence_interval(level)
        assert (interval.low, interval.high) == pytest.approx((ci.low, ci.high), rel=1e-12)
    assert result.details["margin_note"] == "the margin as entered"
    assert result.method.endswith("the margin as entered")


@pytest.mark.parametrize("worse, alternative, sign", [("lower", "larger", -1), ("higher", "smaller", 1)])
@pytest.mark.parametrize("seed", range(3))
def test_paired_non_inferiority_t_matches_statsmodels(worse, alternative, sign, seed):
    x, y = _pairs(seed, shift=-0.2)
    result = paired_noninferiority(x, y, margin=0.5, worse=worse)
    # reference: statsmodels DescrStatsW(d).ttest_mean with the null at the margin's worse end
    statistic, p, df = DescrStatsW(x - y).ttest_mean(value=sign * 0.5, alternative=alternative)
    assert result.p_value == pytest.approx(p, rel=1e-10)
    assert result.statistic == pytest.approx(statistic, rel=1e-10)
    assert result.df == df
    ci = stats.ttest_rel(x, y).confidence_interval(0.90)
    assert (result.interval.low, result.interval.high) == pytest.approx((ci.low, ci.high), rel=1e-12)
    assert result.details["not_worse"] is bool(p < 0.05)


@pytest.mark.parametrize("seed", range(6))
def test_the_signed_rank_version_tests_the_differences_minus_each_margin_end(seed):
    x, y = _pairs(10 + seed, n=15, shift=0.1 * (seed % 4))
    d = x - y
    low, high = -0.45, 0.55
    result = paired_equivalence_ranks(x, y, low=low, high=high, method="exact")
    # reference: scipy.stats.wilcoxon, exact (no ties, no zeros), of d - low and d - high
    p_lower = stats.wilcoxon(d - low, alternative="greater", method="exact").pvalue
    p_upper = stats.wilcoxon(d - high, alternative="less", method="exact").pvalue
    assert result.details["p_lower"] == pytest.approx(p_lower, rel=1e-10)
    assert result.details["p_upper"] == pytest.approx(p_upper, rel=1e-10)
    assert result.p_value == max(result.details["p_lower"], result.details["p_upper"])
    # the Hodges-Lehmann estimate: the median of the Walsh averages, listed here by brute force
    i, j = np.triu_indices(d.size)
    assert result.estimate == pytest.approx(np.median((d[i] + d[j]) / 2), rel=1e-12)
    # the duality: with no ties the exact interval at 1 - 2 alpha inverts the same tests
    # (Hollander, Wolfe and Chicken 2014, Nonparametric Statistical Methods, section 3.2)
    assert (result.p_value < 0.05) is result.details["equivalent"]
    assert result.interval.level == pytest.approx(0.90)
    assert result.details["difference_interval"].level == pytest.approx(0.95)


@pytest.mark.parametrize("zero_rule, zero_method", [("drop", "wilcox"), ("pratt", "pratt")])
def test_the_zero_rule_and_the_normal_method_reach_the_margin_tests(zero_rule, zero_method):
    x, y = _pairs(3, n=40, shift=-0.1)
    d = x - y
    bound = float(d[d < 0][0])  # a pair exactly on the margin's worse end: a zero after the shift
    result = paired_noninferiority_ranks(x, y, margin=-bound, worse="lower", zero_rule=zero_rule,
                                         method="normal")
    # reference: scipy.stats.wilcoxon, normal approximation with continuity correction, of the
    # differences minus the worse end (exactly one of which is zero)
    expected = stats.wilcoxon(x - y - bound, alternative="greater", method="approx",
                              zero_method=zero_method, correction=True).pvalue
    assert result.p_value == pytest.approx(expected, rel=1e-9)
    assert result.details["zero_rule"] == zero_rule and result.details["p_upper"] is None


def test_the_paired_bootstrap_intervals_come_from_one_seed():
    x, y = _pairs(5, n=30)
    result = paired_equivalence_bootstrap(x, y, low=-0.5, high=0.5, n_resamples=4000,
                                          rng=np.random.default_rng(2))
    seed = result.details["seed"]
    for interval, level in ((result.interval, 0.90), (result.details["difference_interval"], 0.95)):
        again = paired_bootstrap_mean(x, y, confidence_level=level, n_resamples=4000,
                                      rng=np.random.default_rng(seed)).interval
        assert interval == again
    assert result.p_value is None
    # reference: scipy.stats.bootstrap percentile interval of the mean difference at 0.90; the
    # resamples differ, so within Monte Carlo error (common practice: a few percent of the width)
    theirs = stats.bootstrap((x - y,), np.mean, confidence_level=0.90, n_resamples=20_000,
                             method="percentile", random_state=np.random.default_rng(1)).confidence_interval
    width = theirs.high - theirs.low
    assert abs(result.interval.low - theirs.low) < 0.06 * width
    assert abs(result.interval.high - theirs.high) < 0.06 * width


def test_the_paired_non_inferiority_bootstrap_judges_the_better_end():
    x, y = _pairs(6, n=30, shift=0.3)
    seen = []
    result = paired_noninferiority_bootstrap(x, y, margin=0.2, worse="lower", n_resamples=2000,
                                             rng=np.random.default_rng(4),
                                             progress=lambda f, what: seen.append(f))
    assert result.details["not_worse"] is bool(result.interval.low > -0.2)
    assert result.details["difference_interval"] is None and result.p_value is None
    assert seen and seen[-1] == pytest.approx(1.0)
