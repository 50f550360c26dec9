"""Mann-Whitney U, its exact distributions and the Hodges-Lehmann shift against outside sources.

References used below: scipy.stats.mannwhitneyu, brute-force enumeration of every split of the
pooled values, brute-force sorting of every pairwise difference, an independent integer
recursion for the count of U, and a table of critical values of U.
"""

from __future__ import annotations

import itertools
import warnings
from fractions import Fraction
from math import comb

import numpy as np
import pytest
from scipy import stats

from engine.errors import Cancelled, DataProblem, OptionProblem
from engine.procedures import ranks
from engine.procedures.ranks import (
    difference_order_statistics, hodges_lehmann, mann_whitney, pair_counts,
    tied_rank_sum_distribution, u_distribution,
)

ALTERNATIVES = ("two-sided", "less", "greater")


def rel(a: float, b: float) -> float:
    return abs(a - b) / max(abs(b), 1e-300)


def brute_force_p(x, y, alternative):
    """Enumerate every split of the pooled values into groups of n1 and n2 (mid-ranks)."""
    pooled = np.concatenate((x, y))
    midranks = stats.rankdata(pooled)
    observed = midranks[: x.size].sum()
    sums = np.array([midranks[list(c)].sum()
                     for c in itertools.combinations(range(pooled.size), x.size)])
    at_least = np.mean(sums >= observed - 1e-9)
    at_most = np.mean(sums <= observed + 1e-9)
    return {"greater": at_least, "less": at_most,
            "two-sided": min(1.0, 2 * min(at_least, at_most))}[alternative]


def integer_u_counts(m: int, n: int) -> list[int]:
    """Number of splits with U = u, by the textbook recursion f(m, n, u) = f(m - 1, n, u - n) +
    f(m, n - 1, u) (Mann and Whitney 1947, eq. 1), in exact integers."""
    table = {(0, j): [1] for j in range(n + 1)}
    for i in range(1, m + 1):
        table[(i, 0)] = [1]
        for j in range(1, n + 1):
            left, right = table[(i - 1, j)], table[(i, j - 1)]
            counts = [0] * (i * j + 1)
            for u, c in enumerate(left):
                counts[u + j] += c
            for u, c in enumerate(right):
                counts[u] += c
            table[(i, j)] = counts
    return table[(m, n)]


# --- exact distributions ---------------------------------------------------------------------

@pytest.mark.parametrize(("m", "n"), [(1, 1), (2, 5), (7, 3), (12, 12), (25, 40)])
def test_u_distribution_against_integer_recursion(m, n):
    # reference: the Mann-Whitney recursion in exact integers, divided by C(m + n, m)
    counts = integer_u_counts(m, n)
    expected = np.array(counts, dtype=float) / comb(m + n, m)
    got = u_distribution(m, n)
    assert got.size == m * n + 1
    assert np.max(np.abs(got - expected) / expected) < 1e-12


def test_u_distribution_stays_accurate_for_large_samples():
    # reference: the first terms are partition counts, p(u) = #partitions of u / C(2m, m) for
    # u <= m; the distribution is symmetric and sums to one
    m = 400
    p = u_distribution(m, m)
    partitions = [1, 1, 2, 3, 5, 7, 11, 15, 22, 30, 42]  # p(0..10), standard partition numbers
    total = comb(2 * m, m)
    for u, count in enumerate(partitions):
        assert rel(p[u], count / total) < 1e-12
    assert abs(p.sum() - 1) < 1e-12
    assert np.all(p >= 0)
    assert np.max(np.abs(p - p[::-1])) < 1e-15
    # reference: variance m n (m + n + 1) / 12 of U (Mann and Whitney 1947)
    u = np.arange(p.size)
    mean = (p * u).sum()
    assert rel(mean, m * m / 2) < 1e-12
    assert rel((p * (u - mean) ** 2).sum(), m * m * (2 * m + 1) / 12) < 1e-10


def test_tied_distribution_against_enumeration():
    rng = np.random.default_rng(41)
    x = rng.integers(0, 3, 4).astype(float)
    y = rng.integers(0, 3, 5).astype(float)
    pooled = np.concatenate((x, y))
    midranks = stats.rankdata(pooled)
    _, sizes = np.unique(pooled, return_counts=True)
    # reference: every split of the 9 pooled values; 2U = 2 R - m (m + 1)
    doubled_u = [round(2 * midranks[list(c)].sum()) - 4 * 5
                 for c in itertools.combinations(range(9), 4)]
    expected = np.bincount(doubled_u, minlength=2 * 4 * 5 + 1) / comb(9, 4)
    got = tied_rank_sum_distribution(sizes, 4)
    assert np.max(np.abs(got - expected)) < 1e-14


@pytest.mark.parametrize(
    ("m", "critical"),
    # Critical values of U, two-sided alpha = 0.05, n1 = n2 = m: reject when U <= critical
    # (recalled from memory, standard table of critical values of the Mann-Whitney U as
    # printed in nonparametric statistics textbooks)
    [(5, 2), (6, 5), (7, 8), (8, 13), (9, 17), (10, 23), (15, 64), (20, 127)],
)
def test_critical_values_against_table(m, critical):
    cdf = np.cumsum(u_distribution(m, m))
    assert cdf[critical] <= 0.025 < cdf[critical + 1]


@pytest.mark.parametrize(
    ("m", "critical"),
    # one-sided alpha = 0.05 (recalled from memory, same table)
    [(5, 4), (8, 15), (10, 27)],
)
def test_one_sided_critical_values_against_table(m, critical):
    cdf = np.cumsum(u_distribution(m, m))
    assert cdf[critical] <= 0.05 < cdf[critical + 1]


# --- the test against scipy ------------------------------------------------------------------

@pytest.mark.parametrize("alternative", ALTERNATIVES)
@pytest.mark.parametrize(("n1", "n2", "seed"), [(5, 6, 1), (10, 7, 2), (30, 25, 3), (3, 40, 4),
                                                 (60, 45, 5)])
def test_exact_without_ties_against_scipy(alternative, n1, n2, seed):
    rng = np.random.default_rng(seed)
    x, y = rng.normal(0.4, 1, n1), rng.normal(0, 1, n2)
    ours = mann_whitney(x, y, alternative=alternative, method="exact")
    # reference: scipy.stats.mannwhitneyu(x, y, alternative=..., method="exact")
    ref = stats.mannwhitneyu(x, y, alternative=alternative, method="exact")
    assert ours.statistic == ref.statistic
    assert rel(ours.p_value, ref.pvalue) < 1e-10
    assert ours.details["method"] == "exact"
    assert ours.details["U1"] + ours.details["U2"] == n1 * n2


@pytest.mark.parametrize("alternative", ALTERNATIVES)
@pytest.mark.parametrize("continuity", (True, False))
@pytest.mark.parametrize("tied", (True, False))
def test_normal_approximation_against_scipy(alternative, continuity, tied):
    rng = np.random.default_rng(7)
    x, y = rng.normal(0.3, 1, 38), rng.normal(0, 1.3, 51)
    if tied:
        x, y = np.round(x), np.round(y)
    ours = mann_whitney(x, y, alternative=alternative, method="normal", continuity=continuity)
    # reference: scipy.stats.mannwhitneyu(..., method="asymptotic", use_continuity=...)
    ref = stats.mannwhitneyu(x, y, alternative=alternative, method="asymptotic",
                             use_continuity=continuity)
    assert ours.statistic == ref.statistic
    assert rel(ours.p_value, ref.pvalue) < 1e-10
    assert ours.details["z"] is not None and ours.details["ties"] is tied


def test_rank_sums_against_scipy_rankdata():
    rng = np.random.default_rng(8)
    x, y = np.round(rng.normal(size=20), 1), np.round(rng.normal(size=17), 1)
    midranks = stats.rankdata(np.concatenate((x, y)))  # reference: scipy.stats.rankdata
    ours = mann_whitney(x, y)
    assert ours.details["rank_sum_1"] == pytest.approx(midranks[:20].sum(), rel=1e-14)
    assert ours.details["rank_sum_2"] == pytest.approx(midranks[20:].sum(), rel=1e-14)
    # reference: U1 = #(x > y) + #(x = y) / 2, by brute force
    diff = np.subtract.outer(x, y)
    assert ours.statistic == np.sum(diff > 0) + 0.5 * np.sum(diff == 0)


@pytest.mark.parametrize("alternative", ALTERNATIVES)
@pytest.mark.parametrize(("n1", "n2", "seed"), [(5, 6, 10), (6, 5, 11), (4, 7, 12), (6, 6, 13)])
def test_exact_with_ties_against_enumeration(alternative, n1, n2, seed):
    rng = np.random.default_rng(seed)
    x = rng.integers(0, 4, n1).astype(float)
    y = rng.integers(1, 5, n2).astype(float)
    assert np.unique(np.concatenate((x, y))).size < n1 + n2  # the data hold ties
    ours = mann_whitney(x, y, alternative=alternative, method="exact")
    # reference: brute-force enumeration of all C(n1 + n2, n1) splits with mid-ranks
    assert rel(ours.p_value, brute_force_p(x, y, alternative)) < 1e-12
    assert "mid-ranks" in ours.method and not ours.warnings


# --- Hodges-Lehmann shift and interval -------------------------------------------------------

@pytest.mark.parametrize(("n1", "n2", "decimals"), [(2, 2, None), (7, 4, None), (9, 9, 0),
                                                    (150, 333, None), (401, 250, 1)])
def test_hodges_lehmann_against_brute_force(n1, n2, decimals):
    rng = np.random.default_rng(n1 * n2)
    x, y = rng.standard_t(3, n1) + 0.5, rng.standard_t(3, n2)
    if decimals is not None:
        x, y = np.round(x, decimals), np.round(y, decimals)
    # reference: the median of every pairwise difference, formed outright
    assert hodges_lehmann(x, y) == np.median(np.subtract.outer(x, y))


def test_hodges_lehmann_near_the_largest_float_is_the_exact_midpoint():
    # reference: the median of the four differences 1.5e308, 1.5e308, 1.6e308, 1.6e308 worked
    # exactly with fractions.Fraction; the plain (a + b) / 2 overflowed to infinity
    x, y = np.array([1.5e308, 1.6e308]), np.array([0.0, 0.0])
    expected = float((Fraction(1.5e308) + Fraction(1.6e308)) / 2)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        assert hodges_lehmann(x, y) == expected
        assert mann_whitney(x, y).estimate == expected


@pytest.mark.parametrize("decimals", (None, 2, 0))
def test_selection_on_three_million_pairs_against_brute_force(decimals):
    rng = np.random.default_rng(99)
    x, y = rng.lognormal(0, 1, 1700), rng.normal(1, 2, 1800)  # 3.06e6 pairs
    if decimals is not None:
        x, y = np.round(x, decimals), np.round(y, decimals)
    ordered = np.sort(np.subtract.outer(x, y).ravel())  # reference: brute force
    middle = ordered.size // 2
    wanted = [0, 17, middle - 1, middle, ordered.size - 40, ordered.size - 1]
    for rank in wanted:
        got = difference_order_statistics(x, y, [rank], materialize_limit=20_000)
        assert got[0] == ordered[rank]
    pair = difference_order_statistics(x, y, [middle - 1, middle], materialize_limit=20_000)
    assert np.array_equal(pair, ordered[[middle - 1, middle]])
    assert hodges_lehmann(x, y) == np.median(ordered)  # default threshold: selection path


@pytest.mark.parametrize("decimals", (None, 1))
def test_selection_with_bounded_counts_against_brute_force(decimals, monkeypatch):
    # many rows (group 1) and few columns: the first round counts only every few rows exactly
    # and bounds the others between them
    rng = np.random.default_rng(17)
    x, y = rng.gamma(2.0, 1.0, 100_000), rng.normal(0, 1, 100)  # 10^7 pairs
    if decimals is not None:
        x, y = np.round(x, decimals), np.round(y, decimals)
    differences = np.subtract.outer(x, y).ravel()
    wanted = [3, 2_500_000, 4_999_999, 5_000_000, 9_999_990]
    expected = np.partition(differences, wanted)[wanted]  # reference: brute force
    bounded = []
    original = ranks._Matrix._narrow_by_bounds

    def spy(self, *args):
        bounded.append(args[-1])
        return original(self, *args)

    monkeypatch.setattr(ranks._Matrix, "_narrow_by_bounds", spy)
    for rank, value in zip(wanted, expected):
        assert difference_order_statistics(x, y, [rank], materialize_limit=5_000)[0] == value
    assert bounded and min(bounded) >= 8  # the bounded rounds did run
    assert hodges_lehmann(x, y) == np.median(differences)


def test_selection_with_every_difference_equal():
    x, y = np.full(3000, 2.5), np.full(2000, 1.0)
    got = difference_order_statistics(x, y, [0, 2_999_999], materialize_limit=1000)
    assert np.all(got == 1.5)


def brute_force_interval_rank(n1, n2, tail):
    """k from the null distribution of U found by enumerating every split (no ties)."""
    u_values = []
    for c in itertools.combinations(range(n1 + n2), n1):
        chosen = np.zeros(n1 + n2, bool)
        chosen[list(c)] = True
        ranks_1 = np.flatnonzero(chosen) + 1
        u_values.append(ranks_1.sum() - n1 * (n1 + 1) // 2)
    cdf = np.cumsum(np.bincount(u_values, minlength=n1 * n2 + 1)) / comb(n1 + n2, n1)
    return int(np.sum(cdf <= tail + 1e-15))  # largest k with P(U <= k - 1) <= tail


@pytest.mark.parametrize(("alternative", "level"), [("two-sided", 0.95), ("two-sided", 0.9),
                                                    ("greater", 0.95), ("less", 0.9)])
def test_interval_against_brute_force_order_statistics(alternative, level):
    rng = np.random.default_rng(5)
    x, y = rng.normal(1, 1, 6), rng.normal(0, 1, 7)
    tail = (1 - level) / 2 if alternative == "two-sided" else 1 - level
    k = brute_force_interval_rank(6, 7, tail)
    ordered = np.sort(np.subtract.outer(x, y).ravel())
    ours = mann_whitney(x, y, alternative=alternative, confidence_level=level)
    assert ours.details["interval_rank"] == k
    if alternative != "less":
        assert ours.interval.low == ordered[k - 1]
    else:
        assert ours.interval.low is None
    if alternative != "greater":
        assert ours.interval.high == ordered[42 - k]
    else:
        assert ours.interval.high is None


@pytest.mark.parametrize(("method", "n1", "n2"), [("exact", 9, 12), ("normal", 70, 55)])
def test_interval_inverts_the_test(method, n1, n2):
    # reference: scipy.stats.mannwhitneyu on the shifted samples x - d: shifts just inside the
    # interval are not rejected at 1 - level, shifts just outside are
    rng = np.random.default_rng(n1)
    x, y = rng.normal(0.5, 1, n1), rng.normal(0, 1, n2)
    level = 0.9
    ours = mann_whitney(x, y, confidence_level=level, method=method)
    ordered = np.sort(np.subtract.outer(x, y).ravel())
    k = ours.details["interval_rank"]
    scipy_method = "exact" if method == "exact" else "asymptotic"

    def p_at(shift):
        return stats.mannwhitneyu(x - shift, y, method=scipy_method).pvalue

    inside_low = (ordered[k - 1] + ordered[k]) / 2
    outside_low = (ordered[k - 2] + ordered[k - 1]) / 2
    inside_high = (ordered[-k] + ordered[-k - 1]) / 2
    outside_high = (ordered[-k] + ordered[-k + 1]) / 2
    assert p_at(inside_low) > 1 - level and p_at(inside_high) > 1 - level
    assert p_at(outside_low) <= 1 - level and p_at(outside_high) <= 1 - level
    assert ours.interval.low == ordered[k - 1] and ours.interval.high == ordered[-k]
    assert ours.details["interval_coverage"] >= level


def test_too_small_for_the_level_gives_widest_interval_and_warning():
    ours = mann_whitney([1.0, 2.0], [3.0, 5.0], confidence_level=0.95)
    assert ours.interval.low == -4.0 and ours.interval.high == -1.0
    # reference: P(U = 0) = 1 / C(4, 2) = 1/6, so the widest interval covers 1 - 2/6
    assert ours.details["interval_coverage"] == pytest.approx(2 / 3, rel=1e-12)
    assert any("widest" in w for w in ours.warnings)


# --- method choice, warnings, checks ---------------------------------------------------------

def test_auto_is_exact_for_small_and_normal_for_large():
    rng = np.random.default_rng(3)
    small = mann_whitney(rng.normal(size=20), rng.normal(size=25))
    large = mann_whitney(rng.normal(size=3000), rng.normal(size=3000))
    assert small.details["method"] == "exact" and "exact" in small.method
    assert large.details["method"] == "normal" and "normal approximation" in large.method
    assert not small.warnings and not large.warnings


def test_infeasible_exact_request_switches_and_says_so():
    rng = np.random.default_rng(4)
    x, y = np.round(rng.normal(size=400), 1), np.round(rng.normal(size=400), 1)
    ours = mann_whitney(x, y, method="exact")
    assert ours.details["method"] == "normal"
    assert any("normal approximation instead" in w for w in ours.warnings)


def test_every_value_tied():
    ours = mann_whitney([2.0, 2.0, 2.0], [2.0, 2.0])
    assert ours.p_value == 1.0 and ours.estimate == 0.0
    assert ours.interval.low == ours.interval.high == 0.0
    assert any("same" in w for w in ours.warnings)


def test_cancel_stops_the_count():
    rng = np.random.default_rng(6)
    x, y = rng.normal(size=300), rng.normal(size=300)
    with pytest.raises(Cancelled):
        mann_whitney(x, y, method="exact", cancelled=lambda: True)


def test_result_fields_and_direction():
    rng = np.random.default_rng(9)
    x, y = rng.normal(2, 1, 15), rng.normal(0, 1, 12)
    ours = mann_whitney(x, y, alternative="greater")
    assert ours.key == "mann_whitney" and ours.statistic_name == "U"
    assert ours.estimate > 0 and ours.p_value < 0.01  # group 1 larger
    assert ours.estimate_name == "Hodges-Lehmann shift" and ours.df is None
    swapped = mann_whitney(y, x, alternative="less")
    assert swapped.p_value == pytest.approx(ours.p_value, rel=1e-12)
    assert swapped.estimate == -ours.estimate


@pytest.mark.parametrize(
    ("kwargs", "error", "pattern"),
    [
        (dict(x=[1.0], y=[2.0, 3.0]), DataProblem, "Group 1 has 1 value"),
        (dict(x=[1.0, np.inf], y=[2.0, 3.0]), DataProblem, "Value 2 of group 1"),
        (dict(x=[1.0, 2.0], y=[2.0, 3.0], method="fast"), OptionProblem, "rank method"),
        (dict(x=[1.0, 2.0], y=[2.0, 3.0], alternative="two"), OptionProblem, "direction"),
        (dict(x=[1.0, 2.0], y=[2.0, 3.0], confidence_level=95), OptionProblem, "between 0"),
    ],
)
def test_bad_input_gets_a_readable_error(kwargs, error, pattern):
    with pytest.raises(error, match=pattern):
        mann_whitney(**kwargs)


def test_module_limits_are_exported():
    assert ranks.EXACT_WORK_AUTO < ranks.EXACT_WORK_LIMIT
    assert "hodges_lehmann" in ranks.__all__


@pytest.mark.parametrize("decimals", [None, 0])
def test_pair_counts_against_brute_force(decimals):
    rng = np.random.default_rng(41)
    x, y = rng.normal(0, 2, 300), rng.normal(0.5, 2, 250)
    if decimals is not None:
        x, y = np.round(x, decimals), np.round(y, decimals)
    xs, ys = np.sort(x), np.sort(y)
    below, at_or_below = pair_counts(xs, ys)
    # reference: brute force over the full comparison table
    assert np.array_equal(below, (ys[None, :] < xs[:, None]).sum(axis=1))
    assert np.array_equal(at_or_below, (ys[None, :] <= xs[:, None]).sum(axis=1))


@pytest.mark.parametrize("decimals", [None, 1])
def test_sorted_copies_give_the_same_result(decimals):
    rng = np.random.default_rng(43)
    x, y = rng.gamma(3, 2, 700), rng.gamma(3, 2.2, 650)
    if decimals is not None:
        x, y = np.round(x, decimals), np.round(y, decimals)
    # reference: scipy.stats.mannwhitneyu(x, y) for U, and the call without sorted copies
    plain = mann_whitney(x, y)
    given = mann_whitney(x, y, sorted_x=np.sort(x), sorted_y=np.sort(y))
    assert given.statistic == plain.statistic == stats.mannwhitneyu(x, y).statistic
    assert (given.p_value, given.estimate, given.interval) == (plain.p_value, plain.estimate,
                                                                plain.interval)


def test_a_sorted_copy_that_does_not_match_is_refused():
    x, y = np.array([2.0, 1.0, 4.0]), np.array([3.0, 5.0, 0.5])
    with pytest.raises(OptionProblem, match="sorted copy of group 2"):
        mann_whitney(x, y, sorted_x=np.sort(x), sorted_y=y)


@pytest.mark.parametrize("decimals", (None, 1))
def test_shared_rounds_for_median_and_interval_ends_against_brute_force(decimals):
    # the rank test's three order statistics: one shared round, one shared sample, then alone
    rng = np.random.default_rng(7)
    x, y = rng.gamma(3.0, 1.0, 1500), rng.normal(2.5, 1.5, 1400)  # 2.1e6 pairs
    if decimals is not None:
        x, y = np.round(x, decimals), np.round(y, decimals)
    ordered = np.sort(np.subtract.outer(x, y).ravel())  # reference: brute force
    total = ordered.size
    groups = [[total // 2 - 1, total // 2], [40_000], [total - 40_001]]
    matrix = ranks._Matrix(np.sort(x), np.sort(-y), 5_000, None)
    found = matrix.select_groups(groups)
    for wanted, got in zip(groups, found):
        assert np.array_equal(got, ordered[wanted])
