"""The null laws of the Mann-Whitney statistic: the exact permutation distribution of U without
ties, the tie-aware distribution of the rank sum given the tie blocks, and the p-values from
them or from the normal approximation. The rank test (:mod:`engine.procedures.ranks`) and the
tie-aware shift interval (:mod:`engine.procedures.shift_interval`) both count with them.
"""

from __future__ import annotations

import math

import numpy as np
from scipy import special

from ..stats_basics import Normal, tail_p
from ..tasks import CancelCheck
from ._checks import check_cancelled

__all__ = ["u_distribution", "tied_rank_sum_distribution", "tied_pmf", "exact_p", "normal_p",
           "no_tie_work", "tied_work", "TIED_TABLE_LIMIT"]

# Largest table of the tie-aware count, in array elements (two such tables are held).
TIED_TABLE_LIMIT = 2e7


# --- null distributions ----------------------------------------------------------------------

def no_tie_work(m: int, n: int) -> float:
    """Array elements touched in counting the exact law of U without ties."""
    small, large = min(m, n), max(m, n)
    # steps (a, b) -> (a + 1, b) or (a, b + 1) from (0, large - small), each touching a * b / 2
    return small**2 * (large - small) + 2 * small**3 / 3 + small + large


def tied_work(m: int, n: int, sizes: np.ndarray) -> tuple[float, float]:
    """(elements touched, elements of the table) in counting the tie-aware law."""
    small = min(m, n)
    table = (small + 1) * (2 * m * n + 1)
    steps = float(np.minimum(sizes, small).sum() + sizes.size)
    return steps * table, float(table)


def u_distribution(m: int, n: int, *, cancelled: CancelCheck | None = None) -> np.ndarray:
    """Null probabilities of U = 0, 1, ..., m * n for samples of m and n values without ties.

    Notes
    -----
    The counts are the coefficients of the Gaussian binomial coefficient
    [m + n choose m]_q = prod_{i=1}^{m} (1 - q^(n+i)) / (1 - q^i). They are built one factor at a
    time along a path (a, b) -> (a + 1, b) or (a, b + 1) from (0, n - m) to (m, n), each step
    multiplying by (1 - q^(a+b+1)) and dividing by (1 - q^(a+1)) or (1 - q^(b+1)), on the
    probability scale (each step also divides by C(a+b+1, a+1) / C(a+b, a)). Only the lower half of
    each intermediate polynomial is computed (its coefficients are symmetric); alternating the
    two kinds of step keeps the rounding error at the level of the last digits, while growing
    only one sample (Harding's original order) loses all accuracy near 300 x 300.

    References
    ----------
    Harding, E. F. (1984). An efficient, minimal-storage procedure for calculating the
    Mann-Whitney U, generalized U and similar distributions. Applied Statistics 33(1), 1-6.
    Andrews, G. E. (1976). The Theory of Partitions. Addison-Wesley, chapter 3.
    """
    small, large = min(m, n), max(m, n)
    p = np.ones(1)
    a, b = 0, large - small
    steps = 0
    while a < small or b < large:
        grow_a = a <= b - (large - small) and a < small or b >= large
        divisor = a + 1 if grow_a else b + 1
        a, b = (a + 1, b) if grow_a else (a, b + 1)
        s = a + b
        degree = a * b
        top = degree // 2 + 1
        source = np.zeros(top)
        source[: min(top, p.size)] = p[:top]
        if s < top:
            source[s:] -= p[: top - s] if p.size >= top - s else np.pad(p, (0, top - s - p.size))
        rows = -(-top // divisor)
        work = np.zeros(rows * divisor)
        work[:top] = source
        p = np.empty(degree + 1)
        p[:top] = work.reshape(rows, divisor).cumsum(axis=0).ravel()[:top] * (divisor / s)
        p[top:] = p[degree - top :: -1][: degree + 1 - top]
        steps += 1
        if steps % 16 == 0:
            check_cancelled(cancelled)
    return p


def tied_rank_sum_distribution(
    sizes: np.ndarray, m: int, *, cancelled: CancelCheck | None = None,
) -> np.ndarray:
    """Null probabilities of 2 U for a sample of ``m`` values, given the tie blocks ``sizes``.

    ``sizes`` lists the tie-block sizes of the combined sample in increasing order of value. The
    result has 2 m n + 1 entries (n = sum(sizes) - m): entry d is P(2 U = d), U counting ties as
    one half, i.e. the permutation distribution of the mid-rank sum of the m values.

    Notes
    -----
    A block of t values at mid-rank r contributes k r to the rank sum with C(t, k) ways of
    choosing its k members of the sample. A table indexed by (values chosen so far, doubled rank
    sum) is carried block by block; doubled mid-ranks are integers, and measuring each doubled
    rank from N + 1 keeps the table at (m + 1) x (2 m n + 1). The table is rescaled after each
    block to stay within floating-point range. With every block of size 1 this is the
    Streitberg-Roehmel count.

    References
    ----------
    Streitberg, B. and Roehmel, J. (1986). Exact distributions for permutation and rank tests:
    an introduction to some recently published algorithms. Statistical Software Newsletter 12,
    10-17.
    Lehmann, E. L. (1975). Nonparametrics: Statistical Methods Based on Ranks. Holden-Day,
    section 1.4 (ties and mid-ranks).
    """
    sizes = np.asarray(sizes, dtype=np.int64)
    total = int(sizes.sum())
    n = total - m
    width = 2 * m * n + 1
    offset = m * n
    table = np.zeros((m + 1, width))
    table[0, offset] = 1.0
    before = 0
    seen = 0
    for t in sizes.tolist():
        value = 2 * before + t + 1 - (total + 1)  # doubled mid-rank, measured from N + 1
        top_k = min(t, m)
        ks = np.arange(top_k + 1)
        log_ways = special.gammaln(t + 1) - special.gammaln(ks + 1) - special.gammaln(t - ks + 1)
        ways = np.exp(log_ways - log_ways.max())
        rows = min(seen, m) + 1  # rows that can be non-zero so far
        new = np.zeros_like(table)
        for k in range(top_k + 1):
            used = min(rows, m + 1 - k)
            shift = k * value
            source = table[:used]
            if shift >= 0:
                new[k : k + used, shift:] += ways[k] * source[:, : width - shift]
            else:
                new[k : k + used, :shift] += ways[k] * source[:, -shift:]
        table = new / new.max()
        before += t
        seen += t
        check_cancelled(cancelled)
    last = table[m]
    return last / last.sum()


# --- order statistics of the pairwise differences ---------------------------------------------


def tied_pmf(sizes: np.ndarray, n1: int, n2: int, *,
             cancelled: CancelCheck | None = None) -> np.ndarray:
    """Null probabilities of 2 U1 = 0, 1, ..., 2 n1 n2 given the tie blocks ``sizes``."""
    pmf = tied_rank_sum_distribution(sizes, min(n1, n2), cancelled=cancelled)
    return pmf[::-1] if n1 > n2 else pmf  # the count was for group 2: 2 U1 = 2 n1 n2 - 2 U2


def exact_p(pmf: np.ndarray, observed: int, alternative: str) -> float:
    """The p-value of ``observed`` (an index of ``pmf``: U, or 2 U with ties)."""
    return tail_p(float(pmf[: observed + 1].sum()), float(pmf[observed:].sum()), alternative)


def normal_p(u1: float, n1: int, n2: int, tie_term: float, alternative: str,
             continuity: bool) -> tuple[float, float]:
    """The p-value and z of U1 by the normal approximation with tie (and continuity) correction."""
    mean = n1 * n2 / 2
    total_n = n1 + n2
    sd = math.sqrt(n1 * n2 / 12 * ((total_n + 1) - tie_term / (total_n * (total_n - 1))))
    correction = 0.5 if continuity else 0.0
    deviation = u1 - mean
    # the continuity correction moves the observed U half a step toward the centre in each tail
    p_value = tail_p(Normal().cdf((deviation + correction) / sd),
                     Normal().sf((deviation - correction) / sd), alternative)
    if alternative == "greater":
        return p_value, (deviation - correction) / sd
    if alternative == "less":
        return p_value, (deviation + correction) / sd
    return p_value, math.copysign(max(abs(deviation) - correction, 0.0), deviation) / sd
