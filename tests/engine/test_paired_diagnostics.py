"""The checks of matched pairs: the differences' shape against scipy, the correlation of the
members against scipy, and the findings in words."""

import numpy as np
import pytest
from scipy import stats

from engine.errors import DataProblem
from engine.paired_diagnostics import WEAK_CORRELATION, check_pairs, pair_correlation


def _pairs(n, seed, spread=1.0):
    rng = np.random.default_rng(seed)
    units = rng.normal(100.0, 10.0, n)
    return units + 2.0 + rng.normal(0, spread, n), units + rng.normal(0, spread, n)


def test_the_shape_of_the_differences_is_scipys():
    x, y = _pairs(40, 1)
    checks = check_pairs(x, y)
    d = x - y
    # reference: scipy.stats.skew / kurtosis with bias=False (adjusted G1, G2) and shapiro
    assert checks.shape.skewness == pytest.approx(stats.skew(d, bias=False), rel=1e-9)
    assert checks.shape.excess_kurtosis == pytest.approx(stats.kurtosis(d, bias=False), rel=1e-9)
    assert checks.shape.shapiro_w == pytest.approx(stats.shapiro(d).statistic, abs=1e-6)
    assert checks.shape.shapiro_p == pytest.approx(stats.shapiro(d).pvalue, rel=1e-3)
    # reference: numpy's mean, sample SD and median of the differences
    assert checks.summary.label == "differences"
    assert checks.summary.mean == pytest.approx(d.mean(), rel=1e-12)
    assert checks.summary.sd == pytest.approx(d.std(ddof=1), rel=1e-12)
    assert checks.summary.median == pytest.approx(np.median(d), rel=1e-12)
    np.testing.assert_array_equal(checks.differences, d)
    np.testing.assert_allclose(checks.pair_means, (x + y) / 2, rtol=1e-15)
    assert not checks.differences.flags.writeable and not checks.pair_means.flags.writeable
    assert checks.n_pairs == 40


@pytest.mark.parametrize("seed", [2, 3])
def test_the_correlation_of_the_members_is_scipys_pearsonr(seed):
    x, y = _pairs(25, seed, spread=8.0)
    # reference: scipy.stats.pearsonr
    assert pair_correlation(x, y) == pytest.approx(stats.pearsonr(x, y).statistic, rel=1e-12)
    huge = pair_correlation(x * 1e300, y * 1e-300)  # the scale leaves r unchanged
    assert huge == pytest.approx(stats.pearsonr(x, y).statistic, rel=1e-12)


def test_the_correlation_is_undefined_with_too_few_pairs_or_no_spread():
    assert np.isnan(pair_correlation(np.array([1.0, 2.0]), np.array([2.0, 1.0])))
    assert np.isnan(pair_correlation(np.array([1.0, 2.0, 3.0]), np.array([5.0, 5.0, 5.0])))
    checks = check_pairs([1.0, 2.0], [1.5, 2.5])
    assert np.isnan(checks.correlation)
    assert "cannot be measured" in checks.finding("pair_correlation").text


def test_clearly_lopsided_differences_are_said():
    rng = np.random.default_rng(4)
    y = rng.normal(50, 5, 30)
    x = y + rng.lognormal(0.0, 1.0, 30)
    finding = check_pairs(x, y).finding("difference_skewness")
    assert finding.severity in ("note", "warning")
    assert "clearly lopsided" in finding.text and "large positive differences" in finding.text


def test_a_far_difference_is_said_and_named_as_a_difference():
    x, y = _pairs(20, 5)
    x[7] += 40.0  # one pair measured wrong
    checks = check_pairs(x, y)
    finding = checks.finding("difference_outliers")
    assert finding.severity == "warning" and checks.shape.far_surprising
    assert finding.text.startswith("1 difference lies far from the rest")
    assert "Check those pairs" in finding.text


def test_pairs_without_a_difference_are_counted():
    x = np.array([1.0, 2.0, 3.0, 4.0, 5.0, 6.0])
    y = np.array([1.0, 2.5, 3.0, 3.0, 5.5, 6.0])
    checks = check_pairs(x, y)
    assert checks.zeros == 3
    text = checks.finding("zero_differences").text
    assert text.startswith("3 of the 6 pairs show no difference")
    assert "Pratt" in text and "Wilcoxon" in text
    same = check_pairs([1.0, 2.0, 3.0], [1.0, 2.0, 3.0])
    assert same.finding("zero_differences").severity == "warning"


def test_a_weak_or_negative_correlation_asks_whether_the_pairing_is_real():
    rng = np.random.default_rng(6)
    x = rng.normal(10, 1, 30)
    opposite = check_pairs(x, 20 - x + rng.normal(0, 0.3, 30))
    assert opposite.correlation < 0
    finding = opposite.finding("pair_correlation")
    assert finding.severity == "warning" and "opposite directions" in finding.text
    assert "matched right" in finding.text
    unrelated = check_pairs(x, rng.normal(10, 1, 30))
    assert unrelated.correlation < WEAK_CORRELATION
    assert unrelated.finding("pair_correlation").severity in ("note", "warning")
    together = check_pairs(*_pairs(30, 7))
    assert together.correlation > 0.9
    assert together.finding("pair_correlation").severity == "info"


def test_the_direction_of_the_differences_is_named():
    checks = check_pairs([3.0, 4.0, 6.0], [1.0, 2.0, 2.5], labels=("new gauge", "old gauge"))
    assert "'new gauge' minus 'old gauge'" in checks.finding("pairs").text
    keys = [f.key for f in checks.findings]
    assert keys == ["pairs", "difference_normality", "difference_skewness", "difference_tails",
                    "difference_outliers", "difference_ties", "zero_differences",
                    "pair_correlation"]


def test_lists_that_are_not_pairs_are_refused_in_a_sentence():
    with pytest.raises(DataProblem, match="one value per pair"):
        check_pairs([1.0, 2.0, 3.0], [1.0, 2.0])
    with pytest.raises(DataProblem, match="too large"):
        check_pairs([1e308, 2.0], [-1e308, 1.0])


def test_values_near_the_float_limits_give_no_warning():
    x, y = _pairs(12, 8)
    with np.errstate(all="raise"):
        big = check_pairs(x * 1e300, y * 1e300)
    assert big.correlation == pytest.approx(stats.pearsonr(x, y).statistic, rel=1e-9)
    # reference: scipy.stats.skew(bias=False) of the unscaled differences (skewness has no unit)
    assert big.shape.skewness == pytest.approx(stats.skew(x - y, bias=False), rel=1e-6)
