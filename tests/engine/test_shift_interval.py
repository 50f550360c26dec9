"""The Hodges-Lehmann interval agrees with the rank test: it holds the shifts the test keeps.

References used below: brute-force enumeration of every split of the pooled values with
mid-ranks (the tie-aware permutation test, computed from scratch with scipy.stats.rankdata),
scipy.stats.mannwhitneyu (exact, tie-free) for the classical interval without ties, and the
duality of tests and confidence sets (Lehmann 1963, Annals of Mathematical Statistics 34:1507).
"""

from __future__ import annotations


import numpy as np
import pytest
from scipy import stats

from engine.procedures.ranks import mann_whitney
from test_ranks import brute_force_p  # every split of the pooled values, mid-ranks for ties

ALTERNATIVES = ("two-sided", "less", "greater")


def _cases():
    rng = np.random.default_rng(20261203)
    cases = [([4.0] * 16 + [5.0] * 4, [3.0] * 4 + [4.0] * 16),  # the heavy-ties example
             ([2.0, 3.0, 4.0, 6.0, 7.0], [1.0, 3.0, 4.0, 5.0, 6.0])]
    for n1, n2, levels, shift in [(6, 7, 4, 0), (8, 8, 3, 1), (12, 10, 5, 1), (20, 25, 5, 0),
                                  (30, 30, 3, 0), (15, 9, 7, 2), (40, 35, 4, 1)]:
        x = rng.integers(1, levels + 1, n1) + rng.integers(0, shift + 1, n1)
        cases.append((x.astype(float), rng.integers(1, levels + 1, n2).astype(float)))
    return cases


@pytest.mark.parametrize("case", range(9))
@pytest.mark.parametrize("alternative", ALTERNATIVES)
@pytest.mark.parametrize("level", [0.95, 0.9])
def test_zero_is_in_the_interval_exactly_when_the_test_keeps_it(case, alternative, level):
    x, y = _cases()[case]
    for method in ("auto", "normal"):
        result = mann_whitney(x, y, alternative=alternative, confidence_level=level, method=method)
        assert result.interval.contains(0.0) == (result.p_value >= 1 - level), method
        if level != 0.95:
            continue
        # and at whole and half shifts (exact in binary): the test of x - d against y
        for d in np.arange(-3.0, 3.5, 0.5):
            p = mann_whitney(x - d, y, alternative=alternative, method=method).p_value
            assert result.interval.contains(d) == (p >= 1 - level), (method, d)


@pytest.mark.parametrize("alternative", ALTERNATIVES)
def test_interval_is_the_set_the_enumerated_test_keeps(alternative):
    rng = np.random.default_rng(31)
    x = rng.integers(1, 5, 6).astype(float)
    y = rng.integers(0, 4, 6).astype(float)
    level = 0.9
    result = mann_whitney(x, y, alternative=alternative, confidence_level=level)
    deltas = np.unique(np.subtract.outer(x, y))
    pieces = np.concatenate(([deltas[0] - 1], deltas, (deltas[:-1] + deltas[1:]) / 2,
                             [deltas[-1] + 1]))
    for d in pieces:  # every point and every gap between the pairwise differences
        kept = brute_force_p(x - d, y, alternative) >= 1 - level
        assert result.interval.contains(float(d)) == kept, d


def test_heavy_ties_interval_leaves_out_the_rejected_zero():
    x, y = [4.0] * 16 + [5.0] * 4, [3.0] * 4 + [4.0] * 16
    result = mann_whitney(x, y)
    assert result.p_value < 0.05 and not result.interval.contains(0.0)
    assert result.interval.low == 0.0 and result.interval.low_open
    assert result.interval.contains(0.5) and result.interval.contains(0.999)
    assert result.details["interval_inverted"]
    assert any("falls on a value the test rejects" in w for w in result.warnings)


@pytest.mark.parametrize(("n1", "n2", "seed"), [(9, 12, 1), (15, 15, 2), (6, 20, 3)])
@pytest.mark.parametrize("alternative", ALTERNATIVES)
def test_without_ties_the_classical_interval_stands(n1, n2, seed, alternative):
    rng = np.random.default_rng(seed)
    x, y = rng.normal(0.5, 1, n1), rng.normal(0, 1, n2)
    level = 0.95
    result = mann_whitney(x, y, alternative=alternative, confidence_level=level)
    assert not result.details["interval_inverted"]
    ordered = np.sort(np.subtract.outer(x, y).ravel())
    k = result.details["interval_rank"]
    tail = (1 - level) / 2 if alternative == "two-sided" else 1 - level
    # reference: scipy.stats.mannwhitneyu(method="exact"), tie-free: P(U <= k - 1) <= tail
    # < P(U <= k). At a shift d in (D_(j), D_(j+1)), U of x - d is n1 n2 - j, so "greater" on
    # x - d just above D_(k - 1)... is P(U >= n1 n2 - k + 1) = P(U <= k - 1) by symmetry.
    def p_greater(d):
        return stats.mannwhitneyu(x - d, y, alternative="greater", method="exact").pvalue
    assert p_greater((ordered[k - 2] + ordered[k - 1]) / 2 if k > 1 else ordered[0] - 1) <= tail
    assert p_greater((ordered[k - 1] + ordered[k]) / 2) > tail
    if alternative != "less":
        assert result.interval.low == ordered[k - 1]
    if alternative != "greater":
        assert result.interval.high == ordered[-k]


def test_an_exact_count_too_long_to_repeat_keeps_the_tie_free_interval_and_says_so(monkeypatch):
    from engine.procedures import ranks

    x, y = [4.0] * 16 + [5.0] * 4, [3.0] * 4 + [4.0] * 16
    monkeypatch.setattr(ranks, "EXACT_WORK_AUTO", 1.0)  # every count now counts as long
    result = ranks.mann_whitney(x, y, method="exact")
    assert result.details["method"] == "exact" and not result.details["interval_inverted"]
    assert any("tie-free ranks" in w for w in result.warnings)
