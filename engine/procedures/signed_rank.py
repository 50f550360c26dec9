"""The Wilcoxon signed-rank test on paired differences, with the one-sample Hodges-Lehmann
estimate and its distribution-free interval.

Zeros (pairs with no difference) follow one of two rules, said in every result:
- "drop" (Wilcoxon's): zeros are removed before ranking;
- "pratt" (Pratt's): zeros are ranked with the rest, then carry no sign, so the other pairs keep
  the ranks they would have beside them.
Tied absolute differences share their mid-rank. The exact p-value counts every one of the
2^m sign patterns of the m non-zero differences, ties and zeros included, by convolving the
distribution one rank at a time (mid-ranks are whole multiples of one half, so doubled ranks are
whole numbers); above ``EXACT_MAX_PAIRS`` non-zero differences the normal approximation is used,
with the variance of the ranks actually present (the tie correction) and, by default, a
continuity correction of one half.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np
from ..errors import DataProblem, OptionProblem
from ..results import Interval, ProcedureResult
from ..stats_basics import Normal, statistic_p, tail_alpha, tail_p
from ._checks import check_alternative, check_confidence_level, check_sample
from .walsh import walsh_median, walsh_order_statistics

__all__ = ["ZERO_RULES", "EXACT_MAX_PAIRS", "SignedRank", "signed_rank_test", "signed_rank_null",
           "signed_rank", "shift_interval_limits"]

ZERO_RULES = ("drop", "pratt")
# Up to this many non-zero differences the p-value is exact: the convolution costs about
# m^3 / 2 additions (a fraction of a second at 300); beyond it the normal approximation is
# accurate to a few in 10,000 (a practical limit of this program).
EXACT_MAX_PAIRS = 300


@dataclass(frozen=True)
class SignedRank:
    """The test's outcome: ``statistic`` is T+, the sum of the ranks of the positive
    differences; ``used`` the non-zero differences whose signs count; ``zeros`` the pairs with
    no difference; ``exact`` whether the p-value is exact; ``z`` the normal score (None when exact)."""

    statistic: float
    p_value: float
    exact: bool
    used: int
    zeros: int
    zero_rule: str
    z: float | None
    mean: float
    variance: float


def _ranks(magnitudes: np.ndarray) -> np.ndarray:
    """Mid-ranks (1-based) of ``magnitudes``."""
    order = np.argsort(magnitudes, kind="mergesort")
    ordered = magnitudes[order]
    n = ordered.size
    starts = np.flatnonzero(np.r_[True, ordered[1:] != ordered[:-1]])
    ends = np.r_[starts[1:], n]
    mid = (starts + ends + 1) / 2.0
    ranks = np.empty(n)
    ranks[order] = np.repeat(mid, ends - starts)
    return ranks


def signed_rank_null(doubled_ranks: np.ndarray) -> np.ndarray:
    """P(2 T+ = s) for s = 0 .. sum(doubled_ranks), each rank's sign + or - with chance 1/2."""
    total = int(doubled_ranks.sum())
    chances = np.zeros(total + 1)
    chances[0] = 1.0
    reach = 0
    for rank in np.sort(doubled_ranks.astype(np.int64)):
        rank = int(rank)
        # in place, from the top down: chances[s] = (chances[s] + chances[s - rank]) / 2
        chances[rank: reach + rank + 1] += chances[: reach + 1].copy()
        reach += rank
        chances[: reach + 1] *= 0.5
    return chances


def _exact_p(chances: np.ndarray, doubled: int, alternative: str) -> float:
    """P-value from the exact law: P(2 T+ <= observed) and P(2 T+ >= observed)."""
    return tail_p(float(chances[: doubled + 1].sum()), float(chances[doubled:].sum()), alternative)


def _normal_p(statistic: float, mean: float, variance: float, alternative: str,
              correction: bool) -> tuple[float, float]:
    gap = statistic - mean
    if correction:
        if alternative == "greater":
            gap -= 0.5
        elif alternative == "less":
            gap += 0.5
        else:
            gap = math.copysign(max(abs(gap) - 0.5, 0.0), gap)
    z = gap / math.sqrt(variance) if variance > 0 else 0.0
    return statistic_p(z, alternative, Normal()), z


def signed_rank_test(differences: Any, *, zero_rule: str = "drop", alternative: str = "two-sided",
                     method: str = "auto", correction: bool = True) -> SignedRank:
    """The signed-rank test of "the differences are symmetric about 0".

    ``alternative`` "greater": the differences tend to be positive (group 1 above group 2).
    ``method``: "auto" (exact up to ``EXACT_MAX_PAIRS`` non-zero differences), "exact" or
    "normal"; ``correction`` applies to the normal approximation only.
    """
    d = check_sample(differences, name="the differences", minimum=1)
    alternative = check_alternative(alternative)
    if zero_rule not in ZERO_RULES:
        raise OptionProblem(f"The rule for zero differences must be 'drop' or 'pratt', not '{zero_rule}'.")
    if method not in ("auto", "exact", "normal"):
        raise OptionProblem(f"The method must be 'auto', 'exact' or 'normal', not '{method}'.")
    nonzero = d != 0
    zeros = int(d.size - nonzero.sum())
    ranked = d[nonzero] if zero_rule == "drop" else d
    ranks = _ranks(np.abs(ranked))
    if zero_rule == "pratt":
        ranks, ranked = ranks[nonzero], d[nonzero]
    used = int(ranks.size)
    if used == 0:
        raise DataProblem("Every difference is zero: the signed-rank test has nothing to test.")
    statistic = float(ranks[ranked > 0].sum())
    mean, variance = float(ranks.sum()) / 2.0, float((ranks**2).sum()) / 4.0
    exact = method == "exact" or (method == "auto" and used <= EXACT_MAX_PAIRS)
    if exact:
        chances = signed_rank_null(np.rint(2 * ranks))
        p_value, z = _exact_p(chances, int(round(2 * statistic)), alternative), None
    else:
        p_value, z = _normal_p(statistic, mean, variance, alternative, correction)
    return SignedRank(statistic, p_value, exact, used, zeros, zero_rule, z, mean, variance)


def shift_interval_limits(n: int, level: float, alternative: str) -> tuple[int | None, int | None]:
    """The ranks k of the Walsh averages that bound the distribution-free interval: the interval
    runs from the k-th smallest to the k-th largest, where k - 1 is the largest count with
    P(T+ <= k - 1) <= alpha (alpha / 2 for two sides) under the null of n untied differences
    (normal approximation with continuity correction above ``EXACT_MAX_PAIRS``).
    None: that end is open (too few pairs for this level)."""
    tail = tail_alpha(level, alternative)
    if n <= EXACT_MAX_PAIRS:
        cdf = np.cumsum(signed_rank_null(2 * np.arange(1, n + 1))[::2])
        below = np.flatnonzero(cdf <= tail * (1 + 1e-12))
        k = int(below[-1]) + 1 if below.size else None
    else:
        mean, sd = n * (n + 1) / 4, math.sqrt(n * (n + 1) * (2 * n + 1) / 24)
        k = int(math.floor(mean - 0.5 - Normal().isf(tail) * sd)) + 1
        k = k if k >= 1 else None
    low_k = k if alternative in ("two-sided", "greater") else None
    high_k = k if alternative in ("two-sided", "less") else None
    return low_k, high_k


def signed_rank(differences: Any, *, zero_rule: str = "drop", alternative: str = "two-sided",
                confidence_level: float = 0.95, method: str = "auto",
                correction: bool = True) -> ProcedureResult:
    """The signed-rank test with the Hodges-Lehmann estimate (median of the Walsh averages) and
    its distribution-free interval (Hollander, Wolfe and Chicken 2014, Nonparametric Statistical
    Methods, 3rd ed., section 3.2)."""
    level = check_confidence_level(confidence_level)
    test = signed_rank_test(differences, zero_rule=zero_rule, alternative=alternative,
                            method=method, correction=correction)
    ordered = np.sort(check_sample(differences, name="the differences", minimum=1))
    n = ordered.size
    total = n * (n + 1) // 2
    low_k, high_k = shift_interval_limits(n, level, alternative)
    ranks = [r for r in (low_k, None if high_k is None else total + 1 - high_k) if r is not None]
    ends = dict(zip(ranks, walsh_order_statistics(ordered, ranks))) if ranks else {}
    low = ends.get(low_k) if low_k is not None else None
    high = ends.get(total + 1 - high_k) if high_k is not None else None
    interval = Interval(low, high, level)  # None: an end left open (one-sided, or too few pairs)
    rule = ("zeros dropped before ranking (Wilcoxon)" if zero_rule == "drop"
            else "zeros ranked, then given no sign (Pratt)")
    how = ("exact distribution over every sign pattern, ties as mid-ranks" if test.exact else
           "normal approximation with the tie-corrected variance"
           + (" and a continuity correction" if correction else ""))
    warnings = ()
    if test.zeros:
        warnings = (f"{test.zeros} pair{'s' if test.zeros != 1 else ''} showed no difference; {rule}.",)
    return ProcedureResult(
        key="signed_rank",
        name="Wilcoxon signed-rank test with Hodges-Lehmann estimate",
        estimate=walsh_median(ordered),
        estimate_name="median of the pairwise averages of the differences",
        statistic=test.statistic,
        statistic_name="T+",
        df=None,
        p_value=test.p_value,
        interval=interval,
        alternative=alternative,
        method=f"{how}; {rule}",
        details=dict(used=test.used, zeros=test.zeros, zero_rule=zero_rule, exact=test.exact,
                     z=test.z, mean=test.mean, variance=test.variance,
                     interval_ranks=(low_k, high_k)),
        warnings=warnings,
    )
