"""The signed-rank test and the one-sample Hodges-Lehmann estimate and interval, against brute
force enumeration and scipy."""

import itertools

import numpy as np
import pytest
from scipy import stats

from engine.errors import DataProblem, OptionProblem
from engine.procedures.signed_rank import signed_rank, signed_rank_test, shift_interval_limits
from engine.procedures.walsh import walsh_median, walsh_order_statistic


def _brute_p(d, zero_rule, alternative):
    """Every one of the 2^m sign patterns of the non-zero differences, counted (the definition
    of the exact permutation distribution; Pratt 1959, JASA 54:655 for the zero rule)."""
    d = np.asarray(d, float)
    ranked = d[d != 0] if zero_rule == "drop" else d
    ranks = stats.rankdata(np.abs(ranked))
    if zero_rule == "pratt":
        ranks, ranked = ranks[d != 0], d[d != 0]
    observed = ranks[ranked > 0].sum()
    sums = np.array([sum(r for r, s in zip(ranks, signs) if s) for signs in
                     itertools.product((0, 1), repeat=ranks.size)])
    upper, lower = np.mean(sums >= observed - 1e-9), np.mean(sums <= observed + 1e-9)
    return {"greater": upper, "less": lower, "two-sided": min(1.0, 2 * min(upper, lower))}[alternative]


SAMPLES = [
    [1.5, -0.5, 2.0, 2.0, 0.0, 3.5, -2.0, 1.0, 0.0, 4.0],       # ties and zeros
    [3, 3, 3, -3, 1, 1, -1, 2, 0, 0, 0, 5],                      # heavy ties, three zeros
    [0.2, -1.3, 0.8, 2.2, 1.7, -0.4, 0.9, 1.1, 3.0],             # no ties
    [-1, -1, -2, 0, -3, 1, -2, -4, -1],
]


@pytest.mark.parametrize("d", SAMPLES)
@pytest.mark.parametrize("zero_rule", ["drop", "pratt"])
@pytest.mark.parametrize("alternative", ["two-sided", "less", "greater"])
def test_the_exact_p_value_counts_every_sign_pattern(d, zero_rule, alternative):
    ours = signed_rank_test(d, zero_rule=zero_rule, alternative=alternative, method="exact")
    assert ours.p_value == pytest.approx(_brute_p(d, zero_rule, alternative), rel=1e-12)


@pytest.mark.parametrize("alternative", ["two-sided", "less", "greater"])
def test_without_ties_or_zeros_the_exact_p_value_is_scipys(alternative):
    # reference: scipy.stats.wilcoxon, method="exact" (no ties, no zeros)
    rng = np.random.default_rng(4)
    for n in (5, 12, 25, 40):
        d = rng.normal(0.3, 1.0, n)
        expected = stats.wilcoxon(d, alternative=alternative, method="exact")
        ours = signed_rank_test(d, alternative=alternative, method="exact")
        assert ours.statistic == pytest.approx(stats.wilcoxon(d, alternative="greater").statistic)
        assert ours.p_value == pytest.approx(expected.pvalue, rel=1e-10)


@pytest.mark.parametrize("zero_rule", ["drop", "pratt"])
@pytest.mark.parametrize("correction", [True, False])
@pytest.mark.parametrize("alternative", ["two-sided", "less", "greater"])
def test_the_normal_approximation_is_scipys(zero_rule, correction, alternative):
    # reference: scipy.stats.wilcoxon, method="approx" with its zero_method and correction
    rng = np.random.default_rng(9)
    d = np.round(rng.normal(0.2, 1.0, 80), 1)  # ties and some zeros
    assert (d == 0).any()
    expected = stats.wilcoxon(d, zero_method="wilcox" if zero_rule == "drop" else "pratt",
                              correction=correction, alternative=alternative, method="approx")
    ours = signed_rank_test(d, zero_rule=zero_rule, alternative=alternative, method="normal",
                            correction=correction)
    assert ours.p_value == pytest.approx(expected.pvalue, rel=1e-9)


def test_two_hundred_pairs_with_ties_and_zeros_get_an_exact_p_value():
    rng = np.random.default_rng(2)
    d = rng.integers(-6, 7, 200).astype(float)
    result = signed_rank_test(d, zero_rule="pratt")
    assert result.exact and result.zeros > 0 and 0 < result.p_value <= 1


@pytest.mark.parametrize("n", [1, 2, 7, 30, 61])
def test_walsh_order_statistics_match_the_full_list(n):
    # reference: the definition, every (d_i + d_j) / 2 with i <= j listed and sorted
    rng = np.random.default_rng(n)
    for d in (rng.normal(size=n), rng.integers(-3, 4, n).astype(float), rng.standard_cauchy(n)):
        ordered = np.sort(d)
        i, j = np.triu_indices(n)
        every = np.sort((ordered[i] + ordered[j]) / 2)
        for rank in {1, every.size, (every.size + 1) // 2, max(1, every.size // 5)}:
            assert walsh_order_statistic(ordered, rank) == every[rank - 1]
        assert walsh_median(ordered) == np.median(every)


@pytest.mark.parametrize("n, level", [(6, 0.95), (10, 0.95), (15, 0.90), (25, 0.99)])
def test_interval_ranks_keep_the_tail_at_most_alpha(n, level):
    # the k of the interval, from the exact null of n untied differences (brute force for n <= 15;
    # Hollander, Wolfe and Chicken 2014, section 3.2: P(T+ <= k - 1) <= alpha / 2 < P(T+ <= k))
    low_k, high_k = shift_interval_limits(n, level, "two-sided")
    assert low_k == high_k
    if n <= 15:
        sums = np.array([sum(r for r, s in zip(range(1, n + 1), signs) if s)
                         for signs in itertools.product((0, 1), repeat=n)])
        alpha = (1 - level) / 2
        if low_k is None:
            assert np.mean(sums <= 0) > alpha
        else:
            assert np.mean(sums <= low_k - 1) <= alpha < np.mean(sums <= low_k)


def test_too_few_pairs_leave_the_interval_open():
    # with 5 pairs the smallest two-sided exact p-value is 2 / 32 = 0.0625 > 0.05
    result = signed_rank([1.0, 2.0, 3.0, 4.0, 5.0], confidence_level=0.95)
    assert result.interval.low is None and result.interval.high is None


def test_interval_coverage_by_simulation():
    # the interval's coverage is at least its level for continuous symmetric differences
    rng = np.random.default_rng(11)
    covered = 0
    trials = 400
    for _ in range(trials):
        d = rng.standard_t(3, 20) + 1.0
        interval = signed_rank(d, confidence_level=0.9).interval
        covered += interval.low <= 1.0 <= interval.high
    # 0.9 nominal (exact k gives at least 0.9); 3 binomial SEs below is about 0.855
    assert covered / trials >= 0.855


@pytest.mark.parametrize("call, kind, words", [
    (lambda: signed_rank_test([0.0, 0.0]), DataProblem, "Every difference is zero"),
    (lambda: signed_rank_test([1.0, 2.0], zero_rule="ignore"), OptionProblem, "zero"),
    (lambda: signed_rank_test([1.0, 2.0], method="fast"), OptionProblem, "method"),
])
def test_bad_input_is_refused_with_a_sentence(call, kind, words):
    with pytest.raises(kind, match=words):
        call()
