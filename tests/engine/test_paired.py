"""Paired t, paired equivalence and the paired bootstrap against scipy and statsmodels."""

import numpy as np
import pytest
from scipy import stats
from statsmodels.stats.weightstats import ttost_paired

from engine.errors import DataProblem, OptionProblem
from engine.procedures.paired import paired_bootstrap_mean, paired_t
from engine.procedures.paired_margin import paired_equivalence


def _pairs(seed, n=15, shift=0.4):
    rng = np.random.default_rng(seed)
    base = rng.normal(10, 2, n)
    return base + shift + rng.normal(0, 1, n), base + rng.normal(0, 1, n)


@pytest.mark.parametrize("alternative", ["two-sided", "less", "greater"])
@pytest.mark.parametrize("seed", [1, 2, 3])
def test_paired_t_matches_scipy_ttest_rel(alternative, seed):
    # reference: scipy.stats.ttest_rel and its confidence_interval (scipy 1.17)
    x, y = _pairs(seed)
    ours = paired_t(x, y, alternative=alternative, confidence_level=0.9)
    ref = stats.ttest_rel(x, y, alternative=alternative)
    ci = ref.confidence_interval(0.9)
    assert ours.statistic == pytest.approx(ref.statistic, rel=1e-12)
    assert ours.p_value == pytest.approx(ref.pvalue, rel=1e-10)
    assert ours.df == ref.df
    assert ours.estimate == pytest.approx(np.mean(x - y), rel=1e-13)
    for mine, theirs in ((ours.interval.low, ci.low), (ours.interval.high, ci.high)):
        if np.isinf(theirs):
            assert mine is None
        else:
            assert mine == pytest.approx(theirs, rel=1e-12)


def test_paired_t_refuses_unmatched_lengths_and_constant_differences():
    with pytest.raises(DataProblem, match="one value per pair"):
        paired_t([1, 2, 3], [1, 2])
    with pytest.raises(DataProblem, match="no spread"):
        paired_t([1.0, 2.0, 3.0], [0.5, 1.5, 2.5])


@pytest.mark.parametrize("seed", [4, 5, 6, 7])
@pytest.mark.parametrize("margin", [(-0.5, 0.5), (-1.0, 0.3), (0.1, 2.0)])
def test_paired_equivalence_matches_statsmodels_ttost_paired(seed, margin):
    # reference: statsmodels.stats.weightstats.ttost_paired (Schuirmann's two one-sided tests)
    x, y = _pairs(seed, n=12, shift=0.1)
    low, high = margin
    ours = paired_equivalence(x, y, low=low, high=high)
    p, (t1, p1, df1), (t2, p2, df2) = ttost_paired(x, y, low, high)
    assert ours.p_value == pytest.approx(p, abs=1e-10)
    assert ours.details["p_lower"] == pytest.approx(p1, abs=1e-10)
    assert ours.details["p_upper"] == pytest.approx(p2, abs=1e-10)
    assert ours.details["t_lower"] == pytest.approx(t1, abs=1e-10)
    assert ours.details["t_upper"] == pytest.approx(t2, abs=1e-10)
    assert ours.df == df1 == df2


@pytest.mark.parametrize("seed", range(8))
def test_paired_equivalence_agrees_with_its_interval(seed):
    # Schuirmann (1987): equivalence at alpha exactly when the (1 - 2 alpha) interval lies
    # inside the margin; the interval is scipy's ttest_rel interval at 0.90
    x, y = _pairs(seed, n=20, shift=0.05)
    result = paired_equivalence(x, y, low=-0.6, high=0.6, confidence_level=0.95)
    ci = stats.ttest_rel(x, y).confidence_interval(0.90)
    assert result.interval.low == pytest.approx(ci.low, rel=1e-12)
    assert result.interval.high == pytest.approx(ci.high, rel=1e-12)
    inside = -0.6 < ci.low and ci.high < 0.6
    assert result.details["equivalent"] == inside


def test_paired_equivalence_checks_its_margin_and_level():
    x, y = _pairs(0)
    with pytest.raises(OptionProblem):
        paired_equivalence(x, y, low=1.0, high=-1.0)
    with pytest.raises(OptionProblem):
        paired_equivalence(x, y, low=-1.0, high=1.0, confidence_level=0.4)


@pytest.mark.parametrize("alternative", ["two-sided", "greater", "less"])
def test_paired_bootstrap_percentile_matches_scipy_within_monte_carlo_error(alternative):
    # reference: scipy.stats.bootstrap(method="percentile") on the differences; both are
    # Monte Carlo estimates, so they agree to a fraction of the interval's width (the quantile's
    # Monte Carlo standard error with 20,000 resamples is about 1% of the SE of the mean)
    x, y = _pairs(11, n=25)
    d = x - y
    ours = paired_bootstrap_mean(x, y, alternative=alternative, confidence_level=0.9,
                                 n_resamples=20_000, rng=np.random.default_rng(3))
    ref = stats.bootstrap((d,), np.mean, method="percentile", confidence_level=0.9,
                          alternative=alternative, n_resamples=20_000,
                          random_state=np.random.default_rng(4)).confidence_interval
    se = np.std(d, ddof=1) / np.sqrt(d.size)
    for mine, theirs in ((ours.interval.low, ref.low), (ours.interval.high, ref.high)):
        if np.isinf(theirs):
            assert mine is None
        else:
            assert abs(mine - theirs) < 0.07 * se
    assert ours.p_value is None
    assert ours.estimate == pytest.approx(d.mean(), rel=1e-13)


def test_paired_bootstrap_repeats_with_the_same_seed_and_warns_for_few_pairs():
    x, y = _pairs(12, n=6)
    first = paired_bootstrap_mean(x, y, n_resamples=500, rng=np.random.default_rng(9))
    second = paired_bootstrap_mean(x, y, n_resamples=500, rng=np.random.default_rng(9))
    assert first.interval == second.interval
    assert first.warnings and "6 pairs" in first.warnings[0]
    d = x - y
    assert d.min() <= first.interval.low < first.interval.high <= d.max()


def test_paired_equivalence_type_one_error_at_the_margin():
    # simulation (seeded): true mean difference exactly at the upper margin, normal differences;
    # Schuirmann's test rejects at most alpha = 0.05 of the time (here, with the margin wide
    # beside the standard error, very nearly alpha): within 3 Monte Carlo SE (0.0065 at 10,000)
    rng = np.random.default_rng(20261203)
    runs, n, hits = 10_000, 20, 0
    for _ in range(runs):
        d = rng.normal(1.0, 1.0, n)
        hits += paired_equivalence(d, np.zeros(n), low=-1.0, high=1.0).details["equivalent"]
    rate = hits / runs
    assert rate <= 0.05 + 0.0065
    assert rate >= 0.05 - 0.0065


def test_paired_t_interval_covers_at_the_stated_level():
    # simulation (seeded): pairs sharing a unit effect plus normal noise, n = 25, 4,000 runs;
    # the t interval is exact here, so coverage is 0.95 within 3 Monte Carlo SE (0.0104)
    rng = np.random.default_rng(7)
    runs, n, covered = 4_000, 25, 0
    for _ in range(runs):
        base = rng.normal(50, 5, n)
        x = base + rng.normal(0.0, 1.0, n) + 0.3
        y = base + rng.normal(0.0, 1.0, n)
        covered += paired_t(x, y).interval.contains(0.3)
    assert abs(covered / runs - 0.95) < 0.0104


def test_paired_bootstrap_interval_covers_near_the_stated_level():
    # simulation (seeded): normal differences, n = 30, 1,000 runs of 1,000 resamples; the
    # percentile interval runs a little narrow at this size (about 0.94 for normal data, the
    # usual finding, e.g. Hesterberg 2015, The American Statistician 69:371), so the check is
    # 0.925 to 0.965 (Monte Carlo SE about 0.007)
    rng = np.random.default_rng(8)
    runs, n, covered = 1_000, 30, 0
    for _ in range(runs):
        d = rng.normal(0.5, 2.0, n)
        result = paired_bootstrap_mean(d, np.zeros(n), n_resamples=1_000, rng=rng)
        covered += result.interval.contains(0.5)
    assert 0.925 <= covered / runs <= 0.965


@pytest.mark.parametrize("power", [1000, -1000])
def test_values_near_the_ends_of_the_float_range(power):
    # the statistic and d_z do not depend on the unit: scaled by 2**power (exact) they match
    # the unscaled ones, which are checked against scipy above; no numpy warning on the way
    import warnings

    from engine.paired_effects import paired_d_z

    x, y = _pairs(21, n=9)
    plain_t, plain_d = paired_t(x, y), paired_d_z(x, y)
    factor = 2.0**power
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        big_t = paired_t(x * factor, y * factor)
        big_d = paired_d_z(x * factor, y * factor)
        boot = paired_bootstrap_mean(x * factor, y * factor, n_resamples=200,
                                     rng=np.random.default_rng(1))
    assert big_t.statistic == pytest.approx(plain_t.statistic, rel=1e-12)
    assert big_t.p_value == pytest.approx(plain_t.p_value, rel=1e-12)
    assert big_t.interval.low == pytest.approx(plain_t.interval.low * factor, rel=1e-12)
    assert big_d.value == pytest.approx(plain_d.value, rel=1e-12)
    d = (x - y) * factor
    assert d.min() <= boot.interval.low <= boot.interval.high <= d.max()


def test_differences_that_overflow_the_sd_keep_a_finite_t():
    # the SD of these differences exceeds the largest float, but mean / SD does not: computed
    # in units of 2**1023 (hand check: the same t as for the values divided by 2**1023)
    x, y = np.array([1.7e308, 1.6e308, -1.5e308]), np.array([0.0, 0.0, 1.0])
    unit = 2.0**1023
    assert paired_t(x, y).statistic == pytest.approx(
        stats.ttest_rel(x / unit, y / unit).statistic, rel=1e-12)
