"""The shared statistics (SD, quantiles, Tukey's fences, tails, p-values) against outside references."""

import math
import statistics
from fractions import Fraction

import numpy as np
import pytest
from scipy import stats

from engine.stats_basics import (FAR_FENCE, MILD_FENCE, Normal, StudentT, centred_sd, centred_variance,
                                 critical_value, quantiles, quartiles, statistic_p, tail_alpha, tail_p,
                                 tukey_fences)

FRACTIONS = (0.0, 0.01, 0.025, 0.1, 0.25, 0.3, 0.5, 0.6, 0.75, 0.9, 0.975, 0.99, 1.0)


@pytest.mark.parametrize("n", [1, 2, 3, 4, 5, 10, 11, 999, 1000])
def test_quantiles_are_numpys_linear_method_to_the_bit(n):
    # reference: numpy.quantile(values, p, method="linear") (Hyndman and Fan's definition 7)
    rng = np.random.default_rng(n)
    for values in (rng.normal(10.0, 3.0, n), rng.integers(0, 5, n).astype(float), rng.gamma(0.5, 1e-5, n)):
        expected = np.quantile(values, FRACTIONS, method="linear")
        assert quantiles(values, FRACTIONS) == tuple(expected.tolist())
        assert quantiles(np.sort(values), FRACTIONS, ordered=True) == tuple(expected.tolist())
        # reference: numpy.percentile(values, 100 p) is the same rule
        assert quartiles(values) == tuple(np.percentile(values, [25, 50, 75]).tolist())


def test_quantiles_follow_the_handbook_definition():
    # reference: Hyndman and Fan (1996), definition 7: h = (n - 1) p, Q = x_(floor h + 1) +
    # (h - floor h)(x_(floor h + 2) - x_(floor h + 1)); for 1, 2, 3, 4 the quartiles are 1.75,
    # 2.5 and 3.25, and for 1..9 they are 3, 5 and 7 (worked by hand)
    assert quartiles([4.0, 1.0, 3.0, 2.0]) == (1.75, 2.5, 3.25)
    assert quartiles(np.arange(1.0, 10.0)) == (3.0, 5.0, 7.0)


def test_quantiles_near_the_float_limit_do_not_overflow():
    # the exact type-7 values, worked in rational arithmetic: numpy's own difference of the two
    # order statistics overflows here and it returns a NaN median
    values = [-1.7e308, -1.5e308, 1.6e308, 1.75e308]
    ordered = [Fraction(v) for v in values]

    def exact(p):
        h = Fraction(len(values) - 1) * Fraction(p)
        below = math.floor(h)
        return float(ordered[below] + (h - below) * (ordered[below + 1] - ordered[below]))

    # within rounding of the span (about 3.45e308), as any interpolation between the two is
    for found, p in zip(quartiles(values), (0.25, 0.5, 0.75)):
        assert math.isfinite(found) and found == pytest.approx(exact(p), abs=4e-16 * 3.45 * 1e308)


def test_sample_sd_matches_the_stdlib_and_numpy():
    # reference: statistics.stdev (exact rational sums, Python's standard library) and
    # numpy.std(ddof=1)
    rng = np.random.default_rng(5)
    for values in (rng.normal(100.0, 0.01, 50), rng.exponential(3.0, 7), np.array([1.0, 2.0])):
        assert centred_sd(values) == pytest.approx(statistics.stdev(values.tolist()), rel=1e-14)
        assert centred_sd(values) == pytest.approx(np.std(values, ddof=1), rel=1e-13)
        assert centred_variance(values) == pytest.approx(statistics.variance(values.tolist()), rel=1e-14)
    assert math.isnan(centred_sd(np.array([3.0])))


def test_sample_sd_of_values_near_the_float_limits_is_the_scaled_sd():
    # a power of two changes only the exponent, so the SD of x * 2**k is exactly SD(x) * 2**k
    # (DEVELOPERS.md, the scaling convention); numpy.std overflows to infinity at 2**1000
    values = np.array([1.0, 2.5, 3.25, 7.0, 11.5])
    plain = statistics.stdev(values.tolist())  # reference: Python's statistics.stdev
    for k in (1000, -1040):
        assert centred_sd(np.ldexp(values, k)) == pytest.approx(math.ldexp(plain, k), rel=1e-15)


def test_tukey_fences_are_the_handbook_ones():
    # reference: NIST/SEMATECH e-Handbook of Statistical Methods, 7.1.6 (inner fences at
    # 1.5 IQR, outer fences at 3 IQR beyond the quartiles); Tukey (1977), section 2C.
    # scipy.stats.iqr gives the interquartile range by the same (linear) quartiles.
    values = np.array([2.0, 3.0, 3.5, 4.0, 4.5, 5.0, 5.5, 6.0, 30.0, 9.4])
    q1, _, q3 = quartiles(values)
    iqr = stats.iqr(values)
    fences = tukey_fences(q1, q3)
    assert (MILD_FENCE, FAR_FENCE) == (1.5, 3.0)
    assert fences.mild_low == pytest.approx(q1 - 1.5 * iqr, rel=1e-15)
    assert fences.mild_high == pytest.approx(q3 + 1.5 * iqr, rel=1e-15)
    assert fences.far_low == pytest.approx(q1 - 3.0 * iqr, rel=1e-15)
    assert fences.far_high == pytest.approx(q3 + 3.0 * iqr, rel=1e-15)
    # 9.4 lies between the mild and far fences above (Q3 = 5.875, IQR = 2.25), 30 beyond both
    assert values[fences.beyond_mild(values)].tolist() == [30.0, 9.4]
    assert values[fences.beyond_far(values)].tolist() == [30.0]


def test_fences_beyond_the_largest_float_are_infinite_without_a_warning():
    with np.errstate(all="raise"):
        fences = tukey_fences(-1.5e308, 1.5e308)
    assert fences.far_low == -math.inf and fences.far_high == math.inf
    assert not fences.beyond_far(np.array([-1.7e308, 1.7e308])).any()


def test_tail_alpha_and_the_critical_values_of_a_table():
    # reference: scipy.stats.norm.ppf(0.975) = 1.959963984540054, scipy.stats.norm.ppf(0.95) =
    # 1.6448536269514722 and scipy.stats.t.ppf(0.975, 10); a printed t table gives 2.228 for
    # 10 df at 0.025 in each tail (recalled from memory)
    assert tail_alpha(0.95, "two-sided") == pytest.approx(0.025)
    assert tail_alpha(0.95, "greater") == tail_alpha(0.95, "less") == pytest.approx(0.05)
    assert critical_value(0.95, "two-sided", Normal()) == stats.norm.ppf(0.975 + 0.0)
    assert critical_value(0.95, "two-sided", Normal()) == pytest.approx(1.959963984540054, rel=1e-15)
    assert critical_value(0.95, "greater", Normal()) == pytest.approx(1.6448536269514722, rel=1e-15)
    assert critical_value(0.95, "two-sided", StudentT(10)) == pytest.approx(stats.t.ppf(0.975, 10), rel=1e-14)
    assert round(critical_value(0.95, "two-sided", StudentT(10)), 3) == 2.228


@pytest.mark.parametrize("statistic", [-40.0, -2.5, -0.3, 0.0, 0.7, 1.96, 9.0])
@pytest.mark.parametrize("df", [None, 1, 4.5, 30, 1e6])
def test_statistic_p_is_scipys_tail_to_the_bit(statistic, df):
    # reference: scipy.stats.norm and scipy.stats.t: sf for "greater", cdf for "less", twice
    # the sf of |statistic| for "two-sided"
    reference = stats.norm() if df is None else stats.t(df)
    distribution = Normal() if df is None else StudentT(df)
    assert statistic_p(statistic, "greater", distribution) == float(reference.sf(statistic))
    assert statistic_p(statistic, "less", distribution) == float(reference.cdf(statistic))
    assert statistic_p(statistic, "two-sided", distribution) == min(1.0, float(2 * reference.sf(abs(statistic))))


def test_tail_p_of_a_discrete_statistic_is_the_binomial_tests():
    # reference: 8 successes in 10 trials at p = 1/2: P(X >= 8) = 56/1024, P(X <= 8) = 1013/1024,
    # and scipy.stats.binomtest(8, 10).pvalue = 0.109375 (twice the smaller tail, by symmetry)
    pmf = stats.binom.pmf(np.arange(11), 10, 0.5)
    cdf_at, sf_at = float(pmf[:9].sum()), float(pmf[8:].sum())
    assert tail_p(cdf_at, sf_at, "greater") == pytest.approx(56 / 1024, rel=1e-14)
    assert tail_p(cdf_at, sf_at, "less") == pytest.approx(1013 / 1024, rel=1e-14)
    assert tail_p(cdf_at, sf_at, "two-sided") == pytest.approx(stats.binomtest(8, 10).pvalue, rel=1e-14)
    assert tail_p(0.7, 0.6, "two-sided") == 1.0  # both tails past the middle: p is 1, not 1.2
