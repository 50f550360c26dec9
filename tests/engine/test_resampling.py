"""Permutation tests and bootstrap intervals against scipy, brute force and theory."""

from __future__ import annotations

import itertools
import math

import numpy as np
import pytest
from scipy import stats

from engine.errors import Cancelled, DataProblem, OptionProblem
from engine.procedures.resampling import _Pool, bootstrap_interval, permutation_test

ALTERNATIVES = ("two-sided", "less", "greater")


def mean_diff(a, b, axis=-1):
    return np.mean(a, axis=axis) - np.mean(b, axis=axis)


def median_diff(a, b, axis=-1):
    return np.median(a, axis=axis) - np.median(b, axis=axis)


STAT = {"mean": mean_diff, "median": median_diff}


def brute_force_p(x, y, statistic, alternative):
    """Enumerate every split with itertools and count by the definition (|T*| >= |T| two-sided)."""
    pooled = np.concatenate((x, y))
    n1 = x.size
    observed = STAT[statistic](x, y)
    values = []
    for members in itertools.combinations(range(pooled.size), n1):
        chosen = np.zeros(pooled.size, dtype=bool)
        chosen[list(members)] = True
        values.append(STAT[statistic](pooled[chosen], pooled[~chosen]))
    values = np.array(values)
    tol = 1e-9 * max(1.0, abs(observed))
    if alternative == "greater":
        return np.mean(values >= observed - tol)
    if alternative == "less":
        return np.mean(values <= observed + tol)
    return np.mean(np.abs(values) >= abs(observed) - tol)


# --- the random relabellings -------------------------------------------------------------------

@pytest.mark.parametrize("n1, n2, draws", [(3, 4, 35_000), (2, 40, 86_100), (5, 5, 50_400)])
def test_random_relabellings_are_uniform_over_all_subsets(n1, n2, draws):
    # reference: scipy.stats.chisquare of the subset counts against the uniform distribution;
    # (2, 40) takes the path that starts from no marks (k / n < 1 / 16), (5, 5) the p = 1/2 one
    pool = _Pool(np.arange(float(n1)), np.arange(float(n2)) + 100, "mean")
    masks = pool.random_masks(np.random.default_rng(11), draws)
    bits = np.unpackbits(masks, axis=1, bitorder="little")
    assert np.all(bits[:, pool.n:] == 0)
    assert np.all(bits.sum(axis=1) == min(n1, n2))
    codes = bits[:, : pool.n].astype(np.int64) @ (np.int64(1) << np.arange(pool.n, dtype=np.int64))
    _, counts = np.unique(codes, return_counts=True)
    assert counts.size == math.comb(n1 + n2, min(n1, n2))
    assert stats.chisquare(counts).pvalue > 1e-3


def test_random_relabellings_keep_the_size_for_large_uneven_groups():
    # exactly k marks in every row, whatever k / n (direct count)
    for n1, n2 in ((700, 1300), (13, 2000), (1000, 1000), (999, 1001)):
        pool = _Pool(np.zeros(n1), np.ones(n2), "mean")
        masks = pool.random_masks(np.random.default_rng(n1), 300)
        assert np.all(np.unpackbits(masks, axis=1).sum(axis=1) == min(n1, n2))


def test_random_relabellings_do_not_depend_on_earlier_batches():
    # the pool keeps its scratch from batch to batch: the same draws with a fresh pool for each
    # batch give the same masks (direct comparison); larger batches first, so stale entries are
    # left in the scratch, and uneven sizes, so the corrections run several rounds
    for n1, n2 in ((700, 1300), (1000, 1000), (13, 40)):
        rng, fresh = np.random.default_rng(n2), np.random.default_rng(n2)
        pool = _Pool(np.zeros(n1), np.ones(n2), "mean")
        for rows in (300, 120, 7):
            again = _Pool(np.zeros(n1), np.ones(n2), "mean").random_masks(fresh, rows)
            np.testing.assert_array_equal(pool.random_masks(rng, rows), again)


def test_permutation_tests_share_their_random_relabellings():
    # direct check: with one store, the median test takes the masks the mean test drew (its
    # result is the one it gets from the mean's seed on its own) and draws nothing itself;
    # the store is emptied once they are used
    rng = np.random.default_rng(31)
    x, y = rng.normal(1.0, 1, 70), rng.normal(0, 1.5, 90)
    shared, source = {}, np.random.default_rng(5)
    permutation_test(x, y, statistic="mean", n_resamples=3_000, rng=source, shared_draws=shared)
    state = source.bit_generator.state
    median = permutation_test(x, y, statistic="median", n_resamples=3_000, rng=source,
                              shared_draws=shared)
    alone = permutation_test(x, y, statistic="median", n_resamples=3_000,
                             rng=np.random.default_rng(5))
    assert source.bit_generator.state == state
    assert median.p_value == alone.p_value
    np.testing.assert_array_equal(median.distribution, alone.distribution)
    assert shared == {}
    # other group sizes or another count draw their own
    other = permutation_test(x[:-1], y, statistic="median", n_resamples=3_000, rng=source,
                             shared_draws={})
    assert source.bit_generator.state != state and other.details["n_1"] == 69


def test_a_stopped_permutation_test_leaves_no_relabellings_behind():
    shared, asked = {}, []
    rng = np.random.default_rng(33)
    with pytest.raises(Cancelled):
        permutation_test(rng.normal(size=300), rng.normal(size=300), n_resamples=200_000,
                         rng=rng, shared_draws=shared,
                         cancelled=lambda: asked.append(True) or len(asked) > 2)
    assert shared == {}


# --- exact permutation p-values ---------------------------------------------------------------

@pytest.mark.parametrize("statistic", ["mean", "median"])
@pytest.mark.parametrize("alternative", ["less", "greater"])
def test_exact_one_sided_p_matches_scipy(statistic, alternative):
    # reference: scipy.stats.permutation_test(..., n_resamples=np.inf) (exact enumeration)
    rng = np.random.default_rng(1)
    x = np.round(rng.normal(0.5, 1, 6), 1)  # rounded: ties across and within groups
    y = np.round(rng.normal(0, 1, 8), 1)
    ours = permutation_test(x, y, statistic=statistic, alternative=alternative,
                            n_resamples=10_000)
    ref = stats.permutation_test((x, y), STAT[statistic], vectorized=True,
                                 n_resamples=np.inf, alternative=alternative)
    assert ours.details["exact"] and ours.details["n_splits"] == math.comb(14, 6)
    assert "exact" in ours.method
    assert abs(ours.p_value - ref.pvalue) < 1e-12
    assert ours.mc_standard_error is None
    np.testing.assert_allclose(np.sort(ours.distribution), np.sort(ref.null_distribution),
                               atol=1e-12)


@pytest.mark.parametrize("statistic", ["mean", "median"])
def test_exact_two_sided_p_matches_scipy_for_equal_sizes(statistic):
    # reference: scipy.stats.permutation_test exact; scipy doubles the smaller one-sided p,
    # which equals the |T*| >= |T| count when n1 == n2 (the split distribution is symmetric)
    rng = np.random.default_rng(2)
    x = np.round(rng.normal(0.8, 1, 7), 1)
    y = np.round(rng.normal(0, 1, 7), 1)
    ours = permutation_test(x, y, statistic=statistic, n_resamples=5_000)
    ref = stats.permutation_test((x, y), STAT[statistic], vectorized=True, n_resamples=np.inf)
    assert ours.details["exact"]
    assert abs(ours.p_value - ref.pvalue) < 1e-12


@pytest.mark.parametrize("statistic", ["mean", "median"])
@pytest.mark.parametrize("alternative", ALTERNATIVES)
def test_exact_p_matches_brute_force_for_tiny_groups(statistic, alternative):
    # reference: enumeration of all C(9, 4) = 126 splits by itertools (brute_force_p above)
    x = np.array([4.1, 5.3, 6.0, 5.3])
    y = np.array([3.2, 4.1, 2.9, 5.0, 3.8])
    ours = permutation_test(x, y, statistic=statistic, alternative=alternative)
    assert ours.details["n_splits"] == 126
    assert abs(ours.p_value - brute_force_p(x, y, statistic, alternative)) < 1e-12


def test_larger_group_first_is_handled_like_the_smaller_one():
    # reference: brute-force enumeration; group 1 the larger group (the masks mark group 2)
    x = np.array([7.0, 6.1, 8.2, 5.9, 7.7, 6.6])
    y = np.array([5.1, 6.0, 5.8])
    for statistic in ("mean", "median"):
        for alternative in ALTERNATIVES:
            ours = permutation_test(x, y, statistic=statistic, alternative=alternative)
            assert abs(ours.p_value - brute_force_p(x, y, statistic, alternative)) < 1e-12


# --- Monte Carlo permutation p-values ---------------------------------------------------------

@pytest.mark.parametrize("statistic", ["mean", "median"])
def test_monte_carlo_p_agrees_with_the_exact_p_within_its_error(statistic):
    # reference: scipy.stats.permutation_test exact over all C(16, 8) = 12870 splits; our
    # Monte Carlo p (5000 < 12870 relabellings) must lie within 4 of its standard errors of it
    rng = np.random.default_rng(3)
    x, y = rng.normal(0.7, 1, 8), rng.normal(0, 1, 8)
    ref = stats.permutation_test((x, y), STAT[statistic], vectorized=True, n_resamples=np.inf,
                                 alternative="greater")
    ours = permutation_test(x, y, statistic=statistic, alternative="greater",
                            n_resamples=5_000, rng=np.random.default_rng(4))
    assert not ours.details["exact"] and "random relabellings" in ours.method
    assert ours.mc_standard_error == pytest.approx(
        math.sqrt(ours.p_value * (1 - ours.p_value) / 5_000))
    assert abs(ours.p_value - ref.pvalue) < 4 * ours.mc_standard_error


def test_monte_carlo_p_agrees_with_scipy_monte_carlo():
    # reference: scipy.stats.permutation_test(n_resamples=20000), also Monte Carlo with
    # (b + 1) / (m + 1); the two estimates differ by less than 4 SE of their difference
    rng = np.random.default_rng(5)
    x, y = rng.normal(0.3, 1, 40), rng.normal(0, 1.5, 60)
    ours = permutation_test(x, y, n_resamples=20_000, rng=np.random.default_rng(6))
    ref = stats.permutation_test((x, y), mean_diff, vectorized=True, n_resamples=20_000,
                                 alternative="two-sided", rng=np.random.default_rng(7))
    se = math.sqrt(2 * ours.p_value * (1 - ours.p_value) / 20_000)
    assert abs(ours.p_value - ref.pvalue) < 4 * se


def test_monte_carlo_p_has_the_plus_one_form():
    # reference: Phipson and Smyth (2010): p = (b + 1) / (m + 1), b counted from the stored
    # null distribution; with fully separated groups b = 0 and p = 1 / (m + 1), never 0
    rng = np.random.default_rng(8)
    x, y = rng.normal(10, 1, 30), rng.normal(0, 1, 30)
    result = permutation_test(x, y, alternative="greater", n_resamples=999,
                              rng=np.random.default_rng(9))
    assert result.p_value == pytest.approx(1 / 1000, abs=1e-15)
    x2 = rng.normal(0.2, 1, 30)
    result = permutation_test(x2, y, alternative="greater", n_resamples=999,
                              rng=np.random.default_rng(9))
    b = np.count_nonzero(result.distribution >= result.statistic - 1e-9)
    assert result.p_value == pytest.approx((b + 1) / 1000, abs=1e-15)
    assert result.distribution.size == 999


# --- the interval from inverting the test ------------------------------------------------------

def _p_at_shift(x, y, shift, alternative, n_resamples, seed):
    return permutation_test(x - shift, y, alternative=alternative, n_resamples=n_resamples,
                            rng=np.random.default_rng(seed)).p_value


@pytest.mark.parametrize("alternative", ALTERNATIVES)
@pytest.mark.parametrize("n1, n2, n_resamples", [(25, 35, 4_000), (5, 6, 1_000), (40, 25, 3_000),
                                                  (6, 4, 1_000)])
def test_interval_limits_are_where_the_test_changes_its_answer(alternative, n1, n2,
                                                                n_resamples):
    # reference: the test itself, re-run on x - d against y with the same relabellings: just
    # inside a limit the p-value exceeds alpha, just outside it does not. (5, 6) and (6, 4) are
    # exact; (40, 25) and (6, 4) have the larger group first.
    rng = np.random.default_rng(n1)
    x, y = rng.normal(1.0, 1, n1), rng.normal(0, 1, n2)
    level, alpha = 0.9, 0.1
    result = permutation_test(x, y, alternative=alternative, confidence_level=level,
                              n_resamples=n_resamples, rng=np.random.default_rng(1))
    assert result.details["exact"] == (n1 + n2 < 12)
    eps = 1e-7 * np.ptp(np.concatenate((x, y)))
    limits = []
    if result.interval.low is not None:
        limits.append((result.interval.low, +1))
    if result.interval.high is not None:
        limits.append((result.interval.high, -1))
    assert len(limits) == (2 if alternative == "two-sided" else 1)
    for limit, inward in limits:
        assert _p_at_shift(x, y, limit + inward * eps, alternative, n_resamples, 1) > alpha
        assert _p_at_shift(x, y, limit - inward * eps, alternative, n_resamples, 1) <= alpha
    if alternative == "two-sided":
        assert result.interval.contains(result.estimate)
        assert result.details["accepted_shifts_connected"]


def test_interval_is_close_to_the_t_interval_for_normal_data():
    # reference: scipy.stats.ttest_ind(x, y).confidence_interval(0.95); for normal data of this
    # size the permutation interval differs from the pooled t interval by a few percent of its
    # width (common practice: the permutation distribution of the mean is nearly t-shaped)
    rng = np.random.default_rng(12)
    x, y = rng.normal(1, 2, 150), rng.normal(0, 2, 150)
    ours = permutation_test(x, y, n_resamples=20_000, rng=np.random.default_rng(13)).interval
    ref = stats.ttest_ind(x, y).confidence_interval(0.95)
    width = ref.high - ref.low
    assert abs(ours.low - ref.low) < 0.05 * width
    assert abs(ours.high - ref.high) < 0.05 * width


def test_median_test_has_no_interval_and_says_so():
    rng = np.random.default_rng(14)
    result = permutation_test(rng.normal(size=20), rng.normal(size=20), statistic="median",
                              n_resamples=500, rng=rng)
    assert result.interval is None
    assert "bootstrap" in result.method
    assert result.key == "permutation_median"


def test_one_sided_interval_is_open_on_the_right_side():
    rng = np.random.default_rng(15)
    x, y = rng.normal(1, 1, 30), rng.normal(0, 1, 30)
    greater = permutation_test(x, y, alternative="greater", n_resamples=2_000, rng=rng)
    less = permutation_test(x, y, alternative="less", n_resamples=2_000, rng=rng)
    assert greater.interval.high is None and greater.interval.low is not None
    assert less.interval.low is None and less.interval.high is not None


def test_too_few_splits_give_an_unbounded_interval_with_a_warning():
    # C(4, 2) = 6 splits: the smallest p-value is 1/6 > 0.05, so no shift is ruled out
    result = permutation_test([5.0, 6.0], [1.0, 2.0])
    assert result.interval.low is None and result.interval.high is None
    assert any("too few distinct splits" in w for w in result.warnings)
    # one-sided: the smallest p is 1/6 > 0.05 as well, so the closed end cannot be found
    result = permutation_test([5.0, 6.0], [1.0, 2.0], alternative="less")
    assert result.interval.low is None and result.interval.high is None
    assert any("too few distinct splits" in w for w in result.warnings)


def test_constant_data_give_p_one_and_a_warning():
    result = permutation_test([3.0, 3.0, 3.0], [3.0, 3.0, 3.0, 3.0], alternative="greater")
    assert result.p_value == 1.0
    assert any("same in both groups" in w for w in result.warnings)
    assert math.copysign(1.0, result.interval.low) == 1.0  # 0.0, not -0.0


# --- bootstrap ---------------------------------------------------------------------------------

def _quantile_se(replicates: np.ndarray, fraction: float) -> float:
    """Standard error of a sample quantile, sqrt(q (1 - q) / B) / density (normal density)."""
    sd = replicates.std()
    return sd * math.sqrt(fraction * (1 - fraction) / replicates.size) / stats.norm.pdf(
        stats.norm.ppf(fraction))


@pytest.mark.parametrize("statistic", ["mean", "median"])
def test_bootstrap_intervals_agree_with_scipy_within_monte_carlo_error(statistic):
    # reference: scipy.stats.bootstrap((x, y), stat, method="BCa" / "percentile"), independent
    # resamples; each endpoint is a 2.5 % quantile of 20000 replicates, with standard error
    # about sd * sqrt(q (1 - q) / B) / phi(z_q); two independent runs differ by sqrt(2) of it,
    # and we allow 4 of those (plus the median's granularity: its replicates take few values)
    rng = np.random.default_rng(16)
    x, y = rng.gamma(2.0, 1.0, 80), rng.gamma(2.0, 1.3, 60)
    ours = bootstrap_interval(x, y, statistic=statistic, n_resamples=20_000,
                              rng=np.random.default_rng(17))
    tol = 4 * math.sqrt(2) * _quantile_se(ours.distribution, 0.025)
    for method, interval in (("BCa", ours.interval), ("percentile", ours.details["percentile"])):
        ref = stats.bootstrap((x, y), STAT[statistic], method=method, vectorized=True,
                              n_resamples=20_000, rng=np.random.default_rng(18))
        assert abs(interval.low - ref.confidence_interval.low) < tol
        assert abs(interval.high - ref.confidence_interval.high) < tol


@pytest.mark.parametrize("statistic", ["mean", "median"])
@pytest.mark.parametrize("alternative", ALTERNATIVES)
def test_bca_on_our_replicates_matches_scipy_formula(statistic, alternative):
    # reference: scipy.stats._resampling._bca_interval (scipy's BCa quantile levels and
    # acceleration, Efron and Tibshirani 1993 eq. 15.36) applied to the same replicates, then
    # scipy.stats.quantile; a private scipy helper, so the check is skipped if it moves
    resampling = pytest.importorskip("scipy.stats._resampling")
    bca = getattr(resampling, "_bca_interval", None)
    if bca is None:
        pytest.skip("scipy no longer has _bca_interval")
    rng = np.random.default_rng(19)
    x, y = rng.lognormal(0, 0.7, 41), rng.lognormal(0.2, 0.5, 30)
    ours = bootstrap_interval(x, y, statistic=statistic, alternative=alternative,
                              confidence_level=0.9, n_resamples=5_000,
                              rng=np.random.default_rng(20))
    alpha = 0.05 if alternative == "two-sided" else 0.1
    alpha_1, alpha_2, a_hat = bca((x, y), STAT[statistic], axis=-1, alpha=alpha,
                                  theta_hat_b=np.asarray(ours.distribution), batch=None, xp=np)
    low, high = stats.quantile(ours.distribution, np.array([float(alpha_1), float(alpha_2)]))
    assert ours.details["acceleration"] == pytest.approx(float(a_hat), rel=1e-9, abs=1e-15)
    if alternative != "less":
        assert ours.interval.low == pytest.approx(low, rel=1e-12)
    if alternative != "greater":
        assert ours.interval.high == pytest.approx(high, rel=1e-12)


def test_jackknife_closed_forms_match_leaving_each_value_out():
    # reference: np.mean / np.median of np.delete(values, i) for every i
    from engine.procedures.resampling import _Sample
    rng = np.random.default_rng(21)
    for n in (5, 6, 2, 3):
        values = np.round(rng.normal(size=n), 1)
        mean = _Sample(values, "mean")
        direct = np.array([np.mean(np.delete(values, i)) for i in range(n)])
        np.testing.assert_allclose(np.sort(mean.jackknife() + mean.centre), np.sort(direct),
                                   atol=1e-14)
        median = _Sample(values, "median")
        direct = np.array([np.median(np.delete(values, i)) for i in range(n)])
        np.testing.assert_allclose(np.sort(median.jackknife()), np.sort(direct), atol=1e-14)


@pytest.mark.parametrize("n", [3, 4, 5, 6])
def test_resampled_medians_follow_the_enumerated_law(n):
    # reference: enumeration of all n^n resamples with replacement (itertools.product) and
    # np.median of each; 100000 drawn replicates tested with scipy.stats.chisquare
    from engine.procedures.resampling import _Sample
    values = np.array([1.0, 2.5, 2.5, 4.0, 7.0, 9.5])[:n]
    law: dict[float, int] = {}
    for draw in itertools.product(range(n), repeat=n):
        m = float(np.median(values[list(draw)]))
        law[m] = law.get(m, 0) + 1
    drawn = _Sample(values, "median").replicates(np.random.default_rng(n), 100_000)
    keys = sorted(law)
    observed = np.array([np.count_nonzero(drawn == k) for k in keys])
    assert observed.sum() == drawn.size
    expected = np.array([law[k] for k in keys]) / n**n * drawn.size
    assert stats.chisquare(observed, expected).pvalue > 1e-3


@pytest.mark.parametrize("n", [400, 401])
def test_resampled_medians_match_direct_resampling(n):
    # reference: np.median of index resamples drawn with numpy, compared by
    # scipy.stats.ks_2samp (the replicates' law is the same, so p should not be tiny)
    from engine.procedures.resampling import _Sample
    rng = np.random.default_rng(n)
    values = np.sort(rng.normal(size=n))
    drawn = _Sample(values, "median").replicates(rng, 20_000)
    direct = np.median(values[rng.integers(0, n, (4_000, n))], axis=1)
    assert stats.ks_2samp(drawn, direct).pvalue > 1e-3


def test_bootstrap_of_means_matches_theory():
    # reference: theory of the stratified bootstrap (Efron and Tibshirani 1993, ch. 5): the
    # replicates of mean(x*) - mean(y*) have mean mean(x) - mean(y) and variance
    # v = s1^2 (n1 - 1) / n1^2 + s2^2 (n2 - 1) / n2^2; with 40000 replicates the replicate mean
    # is within 4 sqrt(v / B) and the variance within 4 v sqrt(2 / B) (normal theory)
    rng = np.random.default_rng(22)
    x, y = rng.normal(3, 1, 50), rng.normal(2, 2, 70)
    result = bootstrap_interval(x, y, n_resamples=40_000, rng=np.random.default_rng(23))
    v = x.var() / x.size + y.var() / y.size
    b = result.distribution
    assert abs(b.mean() - (x.mean() - y.mean())) < 4 * math.sqrt(v / b.size)
    assert abs(b.var() - v) < 4 * v * math.sqrt(2 / b.size)
    # and the percentile interval is near the normal one, theta -/+ 1.96 sqrt(v)
    half = stats.norm.ppf(0.975) * math.sqrt(v)
    pct = result.details["percentile"]
    assert abs(pct.low - (result.estimate - half)) < 0.05 * half
    assert abs(pct.high - (result.estimate + half)) < 0.05 * half
    assert result.statistic is None and result.p_value is None


def test_bootstrap_one_sided_interval_uses_the_full_tail():
    rng = np.random.default_rng(24)
    x, y = rng.normal(1, 1, 40), rng.normal(0, 1, 40)
    result = bootstrap_interval(x, y, alternative="greater", confidence_level=0.9,
                                n_resamples=4_000, rng=np.random.default_rng(25))
    assert result.interval.high is None and result.details["percentile"].high is None
    # percentile lower limit: the 10 % quantile of the replicates (np.quantile, linear)
    assert result.details["percentile"].low == pytest.approx(
        np.quantile(result.distribution, 0.1), rel=1e-12)


def test_bootstrap_of_constant_groups_warns_instead_of_nan():
    result = bootstrap_interval([2.0, 2.0, 2.0], [1.0, 1.0, 1.0, 1.0], n_resamples=200,
                                rng=np.random.default_rng(26))
    assert result.interval.low == result.interval.high == pytest.approx(1.0)
    assert any("same difference" in w for w in result.warnings)
    assert not any(math.isnan(v) for v in (result.interval.low, result.interval.high))


def test_bootstrap_median_with_constant_jackknife_warns_and_drops_the_acceleration():
    # leaving out any one value leaves the median at 1 (group 1) and 2 (group 2): the
    # jackknife does not vary (direct check with np.delete), so a is undefined
    x, y = np.array([1.0, 1, 1, 1, 9]), np.array([2.0, 2, 2, 2, 7])
    assert np.ptp([np.median(np.delete(x, i)) for i in range(5)]) == 0
    result = bootstrap_interval(x, y, statistic="median", n_resamples=2_000,
                                rng=np.random.default_rng(27))
    assert result.details["acceleration"] == 0.0
    assert any("acceleration" in w for w in result.warnings)
    assert result.interval.low is not None and not math.isnan(result.interval.low)



@pytest.mark.parametrize("statistic", ["mean", "median"])
@pytest.mark.parametrize("scale", [1e150, 1e-200])
def test_bca_acceleration_is_the_same_at_huge_and_tiny_scales(statistic, scale):
    # reference: the acceleration of Efron and Tibshirani 1993 eq. 14.15 is a ratio of a sum of
    # cubes to a sum of squares to the power 1.5, so it does not change when every value is
    # multiplied by one number; at scale 1 ours matches scipy (test above). Cubes near 1e450
    # overflowed, squares near 1e-400 underflowed to zero.
    rng = np.random.default_rng(31)
    x, y = rng.lognormal(0, 0.7, 23), rng.lognormal(0.4, 0.5, 17)
    plain = bootstrap_interval(x, y, statistic=statistic, n_resamples=500, rng=np.random.default_rng(32))
    scaled = bootstrap_interval(x * scale, y * scale, statistic=statistic, n_resamples=500,
                                rng=np.random.default_rng(32))
    assert scaled.details["acceleration"] == pytest.approx(plain.details["acceleration"], rel=1e-9)
    assert scaled.details["interval_kind"] == plain.details["interval_kind"] == "BCa"


# --- progress, cancelling and bad input --------------------------------------------------------

@pytest.mark.parametrize("run", [permutation_test, bootstrap_interval])
def test_progress_is_reported_and_ends_at_one(run):
    calls = []
    rng = np.random.default_rng(28)
    run(rng.normal(size=300), rng.normal(size=300), n_resamples=60_000, rng=rng,
        progress=lambda fraction, what: calls.append((fraction, what)))
    fractions = [f for f, _ in calls]
    assert len(calls) >= 3 and fractions[-1] == 1.0
    assert fractions == sorted(fractions)
    assert all(isinstance(what, str) and what for _, what in calls)


@pytest.mark.parametrize("run", [permutation_test, bootstrap_interval])
def test_cancelling_stops_the_work(run):
    asked = []

    def cancelled():
        asked.append(True)
        return len(asked) > 2

    rng = np.random.default_rng(29)
    with pytest.raises(Cancelled):
        run(rng.normal(size=300), rng.normal(size=300), n_resamples=200_000, rng=rng,
            cancelled=cancelled)


@pytest.mark.parametrize("run", [permutation_test, bootstrap_interval])
def test_bad_options_raise_readable_errors(run):
    x, y = [1.0, 2.0, 3.0], [2.0, 3.0, 4.0]
    with pytest.raises(OptionProblem, match="statistic"):
        run(x, y, statistic="trimmed")
    with pytest.raises(OptionProblem, match="resamples"):
        run(x, y, n_resamples=0)
    with pytest.raises(OptionProblem, match="random source"):
        run(x, y, rng=42)
    with pytest.raises(OptionProblem, match="direction"):
        run(x, y, alternative="up")
    with pytest.raises(OptionProblem, match="confidence level"):
        run(x, y, confidence_level=95)
    with pytest.raises(DataProblem, match="(?i)group 2"):
        run(x, [1.0, float("nan")])
    with pytest.raises(DataProblem, match="(?i)group 1"):
        run([1.0], y)


@pytest.mark.slow
def test_large_permutation_run_is_correct_and_bounded():
    # 2 x 1000 values, 100000 relabellings: p within 4 SE of the pooled t p-value's neighbourhood
    # is not a fair check, so compare with scipy's Monte Carlo run on fewer resamples instead
    rng = np.random.default_rng(30)
    x, y = rng.normal(0.08, 1, 1000), rng.normal(0, 1, 1000)
    ours = permutation_test(x, y, n_resamples=100_000, rng=np.random.default_rng(31))
    ref = stats.permutation_test((x, y), mean_diff, vectorized=True, n_resamples=20_000,
                                 rng=np.random.default_rng(32), batch=2_000)
    se = math.sqrt(ref.pvalue * (1 - ref.pvalue) / 20_000 + ours.mc_standard_error**2)
    assert abs(ours.p_value - ref.pvalue) < 4 * se
    # reference: scipy.stats.ttest_ind(x, y).confidence_interval(); n large, interval close
    t_ci = stats.ttest_ind(x, y).confidence_interval(0.95)
    width = t_ci.high - t_ci.low
    assert abs(ours.interval.low - t_ci.low) < 0.02 * width
    assert abs(ours.interval.high - t_ci.high) < 0.02 * width


def test_bootstrap_warns_below_ten_values_per_group():
    # Hesterberg (2015), The American Statistician 69:371: bootstrap intervals are too narrow for
    # small samples (BCa covered about 0.88 at a stated 0.95 with 5 and 6 normal values)
    rng = np.random.default_rng(41)
    small = bootstrap_interval(rng.normal(size=9), rng.normal(size=30), n_resamples=300, rng=rng)
    assert any("fewer than 10 values" in w and "Hesterberg" in w for w in small.warnings)
    enough = bootstrap_interval(rng.normal(size=10), rng.normal(size=30), n_resamples=300, rng=rng)
    assert not any("fewer than 10" in w for w in enough.warnings)


@pytest.mark.parametrize("statistic", ["mean", "median"])
def test_values_near_the_float_limit_give_the_p_value_of_the_same_values_scaled_down(statistic):
    # sums of values near 1.8e308 overflow; the permutation distribution must still be the one
    # of the same numbers in smaller units. Reference: scipy.stats.permutation_test on the
    # values times 1e-300 (all 70 splits of 4 + 4, so exact and free of randomness).
    x = np.array([1e308, 9e307, 8e307, 1.5e308])
    y = np.array([-1e308, 2e307, -5e307, 1e308])
    scale = 1e-300
    measure = np.mean if statistic == "mean" else np.median
    expected = stats.permutation_test((x * scale, y * scale),
                                      lambda a, b: measure(a) - measure(b),
                                      permutation_type="independent", n_resamples=np.inf).pvalue
    result = permutation_test(x, y, statistic=statistic, n_resamples=1000,
                              rng=np.random.default_rng(1))
    assert result.p_value == pytest.approx(expected, rel=1e-12)
    assert result.p_value >= 2 / math.comb(8, 4)  # the observed split and its mirror count
    assert math.isfinite(result.estimate)
    if statistic == "mean":
        # the upper end lies beyond the float limit: infinite, not "no limit" for want of splits
        assert result.interval.low == pytest.approx(-2e307, rel=1e-9)
        assert result.interval.high == math.inf and not result.warnings
