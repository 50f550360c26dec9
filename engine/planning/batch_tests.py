"""The engine's own tests applied to a whole batch of simulated studies at once.

Each function takes a batch as arrays, one study per row (``x`` of shape (B, n1), ``y`` of
shape (B, n2); ``d`` of shape (B, n) for pair differences), and returns each study's p-value
by the very formulas of :mod:`engine.procedures` (``welch_t``, ``pooled_t``, ``z_test``,
``paired_t``, ``equivalence_t``, ``noninferiority_t``, ``paired_margin.paired_equivalence``, ``mann_whitney``,
``signed_rank_test``), row by row in numpy instead of one study per call
(``tests/engine/test_plan_batch.py`` checks them against those functions).

Where the analysis of one study would count an exact rank law that depends on that study's own
ties (Mann-Whitney with tied values; the signed-rank test with tied or zero differences), a
batch uses the normal approximation with the tie correction instead, for those studies only, and
says how many there were: counting a new law for each of thousands of studies would take
minutes. Tie-free studies get the exact law the analysis uses, counted once for the batch.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..procedures.rank_laws import no_tie_work, u_distribution
from ..procedures.ranks import EXACT_WORK_AUTO
from ..procedures.signed_rank import EXACT_MAX_PAIRS, signed_rank_null

__all__ = ["Moments", "two_group_moments", "paired_moments", "t_p_values", "margin_p_values",
           "RankPValues", "mann_whitney_p", "signed_rank_p", "midranks"]


@dataclass(frozen=True)
class Moments:
    """Per study: the estimate, its estimated standard error, and the degrees of freedom (an
    array, or None for the z-test)."""

    estimate: np.ndarray
    se: np.ndarray
    df: np.ndarray | None


def _mean_var(values: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    mean = values.mean(axis=1)
    deviations = values - mean[:, None]
    n = values.shape[1]
    # the corrected two-pass variance of engine.stats_basics.centred_variance, row by row
    var = (np.einsum("ij,ij->i", deviations, deviations) - deviations.sum(axis=1) ** 2 / n) / (n - 1)
    return mean, var


def two_group_moments(x: np.ndarray, y: np.ndarray, procedure: str,
                      known_sds: tuple[float, float] | None = None) -> Moments:
    """Moments of the Welch ("welch"), pooled ("pooled") or z ("z", with ``known_sds``) test."""
    n1, n2 = x.shape[1], y.shape[1]
    mean1, var1 = _mean_var(x)
    mean2, var2 = _mean_var(y)
    estimate = mean1 - mean2
    if procedure == "z":
        sd1, sd2 = known_sds
        se = np.full(estimate.shape, math.sqrt(sd1 * sd1 / n1 + sd2 * sd2 / n2))
        return Moments(estimate, se, None)
    if procedure == "pooled":
        df = n1 + n2 - 2
        pooled = ((n1 - 1) * var1 + (n2 - 1) * var2) / df
        return Moments(estimate, np.sqrt(pooled * (1.0 / n1 + 1.0 / n2)), np.full(estimate.shape, float(df)))
    v1, v2 = var1 / n1, var2 / n2
    with np.errstate(invalid="ignore", divide="ignore"):
        df = (v1 + v2) ** 2 / (v1 * v1 / (n1 - 1) + v2 * v2 / (n2 - 1))
    return Moments(estimate, np.sqrt(v1 + v2), df)


def paired_moments(d: np.ndarray, procedure: str, known_sd: float | None = None) -> Moments:
    """Moments of the paired t-test (or the paired z-test with ``known_sd``)."""
    n = d.shape[1]
    mean, var = _mean_var(d)
    if procedure == "z":
        return Moments(mean, np.full(mean.shape, known_sd / math.sqrt(n)), None)
    return Moments(mean, np.sqrt(var / n), np.full(mean.shape, float(n - 1)))


def _cdf(t: np.ndarray, df: np.ndarray | None) -> np.ndarray:
    from scipy.special import ndtr, stdtr

    return ndtr(t) if df is None else stdtr(df, t)


def _tail_p(t: np.ndarray, df: np.ndarray | None, alternative: str) -> np.ndarray:
    """engine.stats_basics.statistic_p, row by row."""
    below, above = _cdf(t, df), _cdf(-t, df)
    if alternative == "greater":
        return np.minimum(1.0, above)
    if alternative == "less":
        return np.minimum(1.0, below)
    return np.minimum(1.0, 2.0 * np.minimum(below, above))


def _statistic(shift: np.ndarray, se: np.ndarray) -> np.ndarray:
    # a study with no spread at all (possible when pilot values are few) gets t = +-inf, or 0
    # when its estimate sits on the null value, as the limit of a vanishing spread would
    with np.errstate(divide="ignore", invalid="ignore"):
        t = shift / se
    return np.where(np.isnan(t), 0.0, t)


def t_p_values(m: Moments, alternative: str) -> np.ndarray:
    """p-values of the test of no difference."""
    return _tail_p(_statistic(m.estimate, m.se), m.df, alternative)


def margin_p_values(m: Moments, kind: str, low: float, high: float, bound: float,
                    alternative: str) -> np.ndarray:
    """p-values of two one-sided tests (``kind`` "equivalent": the larger of the two) or of the
    non-inferiority test ("not_worse": H0 at or beyond ``bound``, ``alternative`` away from it)."""
    if kind == "not_worse":
        return _tail_p(_statistic(m.estimate - bound, m.se), m.df, alternative)
    p_low = _cdf(-_statistic(m.estimate - low, m.se), m.df)   # P(T > (D - low) / se)
    p_high = _cdf(_statistic(m.estimate - high, m.se), m.df)  # P(T < (D - high) / se)
    return np.maximum(p_low, p_high)


def midranks(values: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Row by row: the mid-ranks (1-based) of ``values`` in their own places, the sort order,
    and sum(t^3 - t) over each row's tie blocks."""
    b, n = values.shape
    order = np.argsort(values, axis=1, kind="stable")
    ordered = np.take_along_axis(values, order, axis=1)
    new = np.ones((b, n), dtype=bool)
    new[:, 1:] = ordered[:, 1:] != ordered[:, :-1]
    positions = np.broadcast_to(np.arange(n), (b, n))
    starts = np.maximum.accumulate(np.where(new, positions, 0), axis=1)
    last = np.ones((b, n), dtype=bool)
    last[:, :-1] = new[:, 1:]
    ends = np.minimum.accumulate(np.where(last, positions, n - 1)[:, ::-1], axis=1)[:, ::-1]
    sizes = (ends - starts + 1).astype(float)
    ranks = np.empty((b, n))
    np.put_along_axis(ranks, order, (starts + ends) / 2.0 + 1.0, axis=1)
    tie_term = (sizes * sizes - 1.0).sum(axis=1)  # each block of t adds t (t^2 - 1)
    return ranks, order, tie_term


@dataclass(frozen=True)
class RankPValues:
    """p-values of a batch of rank tests and how many studies had ties (or zero differences)
    and were judged by the normal approximation with the tie correction, where the analysis of
    one such study may count the exact law of its own ties instead."""

    p: np.ndarray
    tied_by_normal: int


def _normal_tail(deviation: np.ndarray, sd: np.ndarray, alternative: str) -> np.ndarray:
    """engine.procedures.rank_laws.normal_p with the continuity correction, row by row."""
    from scipy.special import ndtr

    with np.errstate(divide="ignore", invalid="ignore"):
        below = ndtr((deviation + 0.5) / sd)
        above = ndtr(-(deviation - 0.5) / sd)
    below = np.where(sd > 0, below, 1.0)
    above = np.where(sd > 0, above, 1.0)
    if alternative == "greater":
        return np.minimum(1.0, above)
    if alternative == "less":
        return np.minimum(1.0, below)
    return np.minimum(1.0, 2.0 * np.minimum(below, above))


def _exact_lookup(pmf: np.ndarray, observed: np.ndarray, alternative: str) -> np.ndarray:
    """engine.procedures.rank_laws.exact_p for many observed indexes of one law."""
    below = np.cumsum(pmf)
    above = np.cumsum(pmf[::-1])[::-1]
    low, high = below[observed], above[observed]
    if alternative == "greater":
        return np.minimum(1.0, high)
    if alternative == "less":
        return np.minimum(1.0, low)
    return np.minimum(1.0, 2.0 * np.minimum(low, high))


def mann_whitney_p(x: np.ndarray, y: np.ndarray, alternative: str) -> RankPValues:
    """Mann-Whitney p-values: the exact law of U for tie-free studies where the analysis would
    count it (``EXACT_WORK_AUTO``), else the normal approximation with tie and continuity
    corrections."""
    n1, n2 = x.shape[1], y.shape[1]
    total = n1 + n2
    ranks, _, tie_term = midranks(np.concatenate((x, y), axis=1))
    u1 = ranks[:, :n1].sum(axis=1) - n1 * (n1 + 1) / 2.0
    tied = tie_term > 0
    variance = n1 * n2 / 12.0 * ((total + 1) - tie_term / (total * (total - 1)))
    p = _normal_tail(u1 - n1 * n2 / 2.0, np.sqrt(np.maximum(variance, 0.0)), alternative)
    exact_rows = ~tied if no_tie_work(n1, n2) <= EXACT_WORK_AUTO else np.zeros_like(tied)
    if exact_rows.any():
        observed = np.rint(u1[exact_rows]).astype(np.int64)
        p[exact_rows] = _exact_lookup(u_distribution(n1, n2), observed, alternative)
    return RankPValues(p, int(tied.sum()))


def signed_rank_p(d: np.ndarray, alternative: str) -> RankPValues:
    """Signed-rank p-values (zeros dropped, as the analysis does by default): the exact law for
    studies without ties or zeros (up to ``EXACT_MAX_PAIRS`` pairs), else the normal
    approximation with the variance of the ranks present and the continuity correction."""
    n = d.shape[1]
    magnitudes = np.abs(d)
    ranks, _, tie_term = midranks(magnitudes)
    zeros = (d == 0).sum(axis=1)
    # zeros hold the lowest places, all tied: dropping them lowers every other rank by their count
    ranks = np.where(d != 0, ranks - zeros[:, None], 0.0)
    zero_blocks = zeros * (zeros * zeros - 1.0)
    tied = (tie_term - zero_blocks > 0) | (zeros > 0)
    statistic = np.where(d > 0, ranks, 0.0).sum(axis=1)
    mean = ranks.sum(axis=1) / 2.0
    variance = (ranks * ranks).sum(axis=1) / 4.0
    p = _normal_tail(statistic - mean, np.sqrt(variance), alternative)
    exact_rows = ~tied if n <= EXACT_MAX_PAIRS else np.zeros_like(tied)
    if exact_rows.any():
        chances = signed_rank_null(2.0 * np.arange(1, n + 1))
        observed = np.rint(2.0 * statistic[exact_rows]).astype(np.int64)
        p[exact_rows] = _exact_lookup(chances, observed, alternative)
    would_count = (n - zeros) <= EXACT_MAX_PAIRS
    return RankPValues(p, int((tied & would_count).sum()))
