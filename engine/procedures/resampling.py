"""Permutation tests and stratified bootstrap intervals for a difference in means or medians.

Both procedures resample in batches, so memory stays bounded whatever the resample count, and
between batches they report progress and ask whether to stop.

Relabellings of the pooled data are held as bit masks: one bit per pooled value, set when the
value is assigned to the smaller group, eight values to a byte. Sums over a relabelled group come
from a table of the 256 possible subset sums of each block of eight values, and order statistics
(for medians) from running bit counts, so a resample costs about n / 8 table look-ups instead of n
random draws and n gathers.
"""

from __future__ import annotations

import dataclasses
import itertools
import math
from numbers import Integral
from typing import Any

import numpy as np
from scipy.special import bdtr, bdtrc, betaln, ndtr, ndtri, xlog1py, xlogy

from ..errors import OptionProblem
from ..results import Interval, ProcedureResult, frozen_mapping
from ..stats_basics import centred_sd, quantiles, tail_alpha
from ._checks import (
    check_alternative,
    check_choice,
    check_confidence_level,
    check_samples,
)
from ..tasks import CancelCheck, Progress, Task
from .t import mean_difference

__all__ = ["permutation_test", "bootstrap_interval", "count_extreme", "byte_sums", "marked_sums",
           "TIE_TOLERANCE", "EXTREME_WORDS", "STATISTICS", "BOOTSTRAP_MIN_N", "NAMES"]

# The plain name of each procedure in this module (engine.procedures.registry shows them).
NAMES = frozen_mapping({
    "permutation_mean": "permutation test, difference in means",
    "permutation_median": "permutation test, difference in medians",
    "bootstrap_mean": "bootstrap interval, difference in means",
    "bootstrap_median": "bootstrap interval, difference in medians",
})


STATISTICS: tuple[str, ...] = ("mean", "median")

# Below this many values in a group a bootstrap interval is too narrow: it covers the true
# difference noticeably less often than stated (Hesterberg 2015, The American Statistician
# 69:371, on small samples; the figure of 10 is common practice). Its result carries a warning.
BOOTSTRAP_MIN_N = 10

# A batch holds about this many bytes of bit masks (permutation) or indices (bootstrap).
_BATCH_BYTES = 1 << 22
# Random relabellings up to this many bytes of masks are kept for the next permutation test of
# the same analysis (see ``_random_batches``); larger sets are drawn again.
_SHARED_BYTES = 1 << 28
# Two statistics closer than this, relative to the data's scale, count as a tie.
TIE_TOLERANCE = 1e-12
# How a resampled statistic T* counts as at least as extreme as the observed T, in words.
EXTREME_WORDS = {"two-sided": "|T*| >= |T|", "greater": "T* >= T", "less": "T* <= T"}

# Values beyond this size in magnitude are divided by a power of two before the permutation
# sums: sums and differences of values near the float limit (1.8e308) overflow, and a NaN or
# infinite relabelling never counts as extreme, so p could fall to 0. A power of two divides
# exactly, so every comparison is the same as on the unscaled values.
_LARGE = 2.0 ** 960

_BYTE_VALUES = np.arange(256, dtype=np.uint16)
_BIT_OF_BYTE = ((_BYTE_VALUES[None, :] >> np.arange(8)[:, None]) & 1).astype(float)  # (8, 256)
_POPCOUNT = _BIT_OF_BYTE.sum(axis=0).astype(np.uint8)
# _SELECT[v, r] is the position (0-7) of the (r + 1)-th set bit of byte v (8 if there is none).
_SELECT = np.full((256, 8), 8, dtype=np.intp)
for _value in range(256):
    _bits = [b for b in range(8) if _value >> b & 1]
    _SELECT[_value, : len(_bits)] = _bits
del _value, _bits


# ---------------------------------------------------------------------------- option checks

def _check_resamples(n_resamples: Any) -> int:
    if isinstance(n_resamples, bool) or not isinstance(n_resamples, Integral) or n_resamples < 1:
        raise OptionProblem(
            f"The number of resamples must be a whole number of at least 1, not {n_resamples!r}.")
    return int(n_resamples)


def _check_rng(rng: Any) -> np.random.Generator:
    if rng is None:
        return np.random.default_rng()
    if not isinstance(rng, np.random.Generator):
        raise OptionProblem(
            f"The random source must be a numpy.random.Generator, not {type(rng).__name__}.")
    return rng


def _prepare(x, y, statistic, alternative, confidence_level, n_resamples, rng):
    x, y = check_samples(x, y)
    return (x, y, check_choice(statistic, STATISTICS, what="statistic"),
            check_alternative(alternative), check_confidence_level(confidence_level),
            _check_resamples(n_resamples), _check_rng(rng))


# ---------------------------------------------------------------------------- relabellings

def byte_sums(values: np.ndarray) -> np.ndarray:
    """(blocks, 256): for each block of eight values (the last one padded with zeros) and each
    byte, the sum of the block's values whose bit the byte sets."""
    blocks = -(-values.size // 8)
    padded = np.zeros(blocks * 8)
    padded[: values.size] = values
    return padded.reshape(blocks, 8) @ _BIT_OF_BYTE


def marked_sums(table: np.ndarray, masks: np.ndarray) -> np.ndarray:
    """For each row of byte masks, the sum of the values it marks: one look-up in
    :func:`byte_sums`' table per byte."""
    offsets = (np.arange(table.shape[0], dtype=np.intp) * 256)[None, :]
    return np.take(table, masks.astype(np.intp) + offsets).sum(axis=1)


class _Pool:
    """The pooled values, the size of the smaller group, and the block tables of the masks.

    ``values`` is group 1 then group 2 for means (centred on their mean) and the sorted pooled
    values for medians. A mask marks the ``k`` members of the smaller group.
    """

    def __init__(self, x: np.ndarray, y: np.ndarray, statistic: str) -> None:
        self.n1, self.n2 = x.size, y.size
        self.n = self.n1 + self.n2
        self.k = min(self.n1, self.n2)
        self.marks_group_1 = self.n1 <= self.n2
        self.statistic = statistic
        self._latest = np.empty(0, dtype=np.int32)  # scratch of random_masks
        pooled = np.concatenate((x, y))
        self.n_bytes = -(-self.n // 8)
        if statistic == "mean":
            self.values = pooled - pooled.mean()
            self.table = byte_sums(self.values)
            self.total = float(self.table[np.arange(self.n_bytes), 255].sum())
            observed = np.arange(self.n1) if self.marks_group_1 else np.arange(self.n1, self.n)
        else:
            order = np.argsort(pooled, kind="stable")
            self.values = pooled[order]
            rank = np.empty(self.n, dtype=np.intp)
            rank[order] = np.arange(self.n)
            observed = rank[: self.n1] if self.marks_group_1 else rank[self.n1:]
        self.observed_mask = self.pack(observed[None, :])
        self.scale = float(np.max(np.abs(pooled - pooled.mean())))

    def pack(self, members: np.ndarray) -> np.ndarray:
        """Bit masks (rows, n_bytes) from a (rows, k) array of member positions."""
        dense = np.zeros((members.shape[0], self.n_bytes * 8), dtype=bool)
        np.put_along_axis(dense, members, True, axis=1)
        return np.packbits(dense, axis=1, bitorder="little")

    # -- statistics of masks

    def group_1_sum(self, masks: np.ndarray) -> np.ndarray:
        marked = marked_sums(self.table, masks)
        return marked if self.marks_group_1 else self.total - marked

    def statistic_of(self, masks: np.ndarray) -> np.ndarray:
        if self.statistic == "mean":
            s1 = self.group_1_sum(masks)
            return s1 / self.n1 - (self.total - s1) / self.n2
        marked = self._median(masks, self.k)
        unmarked = self._median(~masks, self.n - self.k)
        return marked - unmarked if self.marks_group_1 else unmarked - marked

    def _median(self, masks: np.ndarray, size: int) -> np.ndarray:
        counts = np.cumsum(_POPCOUNT[masks], axis=1, dtype=np.int32)
        middle = self._order_statistic(masks, counts, (size + 1) // 2)
        if size % 2:
            return middle
        return 0.5 * (middle + self._order_statistic(masks, counts, size // 2 + 1))

    def _order_statistic(self, masks, counts, rank: int) -> np.ndarray:
        """The value of the ``rank``-th (1-based) marked position of each mask."""
        block = np.count_nonzero(counts < rank, axis=1)
        rows = np.arange(masks.shape[0])
        before = np.where(block > 0, counts[rows, np.maximum(block - 1, 0)], 0)
        bit = _SELECT[masks[rows, block], rank - before - 1]
        return self.values[block * 8 + bit]

    def x_in_group_1(self, masks: np.ndarray) -> np.ndarray:
        """How many of group 1's own values each relabelling puts in group 1 (means only)."""
        full, rest = divmod(self.n1, 8)
        counts = _POPCOUNT[masks[:, :full]].sum(axis=1, dtype=np.int64)
        if rest:
            counts += _POPCOUNT[masks[:, full] & np.uint8((1 << rest) - 1)]
        return counts if self.marks_group_1 else self.n1 - counts

    # -- drawing relabellings

    def random_masks(self, rng: np.random.Generator, rows: int) -> np.ndarray:
        """``rows`` independent, uniformly random k-subsets of the n pooled positions.

        Each position is first marked independently with probability j / 16 (j the nearest
        whole number to 16 k / n, or 0 when k / n < 1 / 16), from up to four random bytes per
        block of eight (one bit plane of U per byte, down to j's lowest set bit); then single
        positions drawn uniformly at
        random are unmarked (or marked) until exactly k are marked.
        """
        n, k, nb = self.n, self.k, self.n_bytes
        j = int(round(16 * k / n)) if 16 * k >= n else 0
        if j == 0:
            masks = np.zeros((rows, nb), dtype=np.uint8)
        else:
            # U < j is decided by the bits of U down to j's lowest set bit (below it j has only
            # zeros), so only those planes are drawn: one byte per block when j = 8 (k = n / 2)
            lowest = (j & -j).bit_length() - 1
            used = 4 - lowest
            words = -(-used * rows * nb // 8)
            planes = rng.bit_generator.random_raw(words).view(np.uint8)[: used * rows * nb]
            planes = planes.reshape(used, rows, nb)
            masks = np.zeros((rows, nb), dtype=np.uint8)  # bits of U < j, U = the 4-bit value
            equal = np.full((rows, nb), 255, dtype=np.uint8)
            for m in range(3, lowest - 1, -1):
                plane = planes[3 - m]
                if j >> m & 1:
                    masks |= equal & ~plane
                    equal &= plane
                else:
                    equal &= ~plane
        if n % 8:
            masks[:, -1] &= np.uint8((1 << (n % 8)) - 1)
        excess = _POPCOUNT[masks].sum(axis=1, dtype=np.int64) - k
        flat = masks.reshape(-1)
        active = np.flatnonzero(excess)
        # scratch: which attempt hit each (row, position); kept for the next batch, as a fresh
        # one would cost a page fault per 4 KB touched (stale entries are overwritten before
        # they are read)
        if self._latest.size < rows * n:
            self._latest = np.empty(rows * n, dtype=np.int32)
        latest = self._latest
        while active.size:
            # |excess| attempts per row at once; a repeated position counts once, as it would
            # if the attempts were made one after another (the repeat would find it changed)
            owner = np.repeat(active, np.abs(excess[active]))
            drawn = rng.integers(0, n, owner.size)
            key = owner * n + drawn
            attempt = np.arange(key.size, dtype=np.int32)
            latest[key] = attempt
            kept = latest[key] == attempt
            row, position = owner[kept], drawn[kept]  # key // n and key % n, without dividing
            where = row * nb + (position >> 3)
            bit = np.left_shift(1, position & 7).astype(np.uint8)
            change = ((flat[where] & bit) != 0) == (excess[row] > 0)
            np.bitwise_xor.at(flat, where[change], bit[change])
            excess -= np.sign(excess) * np.bincount(row[change], minlength=rows)
            active = np.flatnonzero(excess)
        return masks

    def all_masks(self, batch: int):
        """Every k-subset of the n positions, in batches of masks."""
        combos = itertools.combinations(range(self.n), self.k)
        while True:
            members = np.fromiter(itertools.chain.from_iterable(itertools.islice(combos, batch)),
                                  dtype=np.intp)
            if members.size == 0:
                return
            yield self.pack(members.reshape(-1, self.k))


def _random_batches(pool: _Pool, rng: np.random.Generator, total: int, batch: int,
                    shared_draws: dict | None):
    """``total`` random masks of ``pool`` in batches.

    With ``shared_draws`` (a dict the permutation tests of one analysis hold in common) the
    masks drawn for one test are kept, and the next test of the same group sizes and count takes
    them instead of drawing its own. A mask is a uniformly random k-subset of the n positions,
    whatever the values at those positions, so it serves a pool of either statistic: each test
    still sees uniformly random relabellings of its own values (the mean's pool holds them in
    the order given, the median's sorted, so the two tests pair positions with values
    differently).
    """
    key = ("random relabellings", pool.n1, pool.n2, total)
    if shared_draws is not None and key in shared_draws:
        yield from shared_draws.pop(key)
        return
    keep = shared_draws is not None and total * pool.n_bytes <= _SHARED_BYTES
    drawn = []
    for start in range(0, total, batch):
        masks = _masks(pool, rng, min(batch, total - start))
        if keep:
            drawn.append(masks)
        yield masks
    if keep:  # only once all are drawn: a test stopped half-way leaves nothing behind
        shared_draws[key] = drawn


def _masks(pool: _Pool, rng: np.random.Generator, rows: int) -> np.ndarray:
    """``pool.random_masks(rng, rows)``; a generator that keeps what earlier runs drew from its seed
    (:class:`engine.draw_log.DrawLog`) hands out the masks an earlier run drew at this point
    instead of building them again: the same masks, and the generator left where drawing them
    would leave it."""
    kept = getattr(rng, "kept", None)
    if kept is None:
        return pool.random_masks(rng, rows)
    return kept(("random relabellings", pool.n, pool.k, rows), lambda: pool.random_masks(rng, rows))


def count_extreme(null: np.ndarray, observed: float, alternative: str, tolerance: float) -> int:
    """How many of the resampled statistics ``null`` are at least as extreme as ``observed``
    (within ``tolerance``, which counts near-ties as extreme)."""
    if alternative == "greater":
        return int(np.count_nonzero(null >= observed - tolerance))
    if alternative == "less":
        return int(np.count_nonzero(null <= observed + tolerance))
    return int(np.count_nonzero(np.abs(null) >= abs(observed) - tolerance))


# ---------------------------------------------------------------------------- test inversion

def _accepted_shifts(low: np.ndarray, high: np.ndarray, needed: int):
    """Hull of the points covered by at least ``needed`` of the closed intervals [low, high].

    Returns (lowest, highest, connected); (nan, nan, True) when no point is covered enough.
    """
    if needed <= 0:
        return -math.inf, math.inf, True
    keep = low <= high
    starts, ends = np.sort(low[keep]), np.sort(high[keep])
    if starts.size < needed:
        return math.nan, math.nan, True
    depth_at_start = np.searchsorted(starts, starts, "right") - np.searchsorted(ends, starts, "left")
    depth_at_end = np.searchsorted(starts, ends, "right") - np.searchsorted(ends, ends, "left")
    covered_starts = starts[depth_at_start >= needed]
    if covered_starts.size == 0:
        return math.nan, math.nan, True
    lowest = float(covered_starts[0])
    highest = float(ends[depth_at_end >= needed][-1])
    # just past each end inside the hull, the depth may dip below what is needed
    inside = ends[(ends >= lowest) & (ends < highest)]
    after = np.searchsorted(starts, inside, "right") - np.searchsorted(ends, inside, "right")
    return lowest, highest, bool(np.all(after >= needed))


def _unit(x: np.ndarray, y: np.ndarray) -> float:
    """1, or for values beyond ``_LARGE`` a power of two that brings them below 2."""
    largest = max(float(np.max(np.abs(x))), float(np.max(np.abs(y))))
    return math.ldexp(1.0, math.frexp(largest)[1] - 1) if largest > _LARGE else 1.0


def _median_difference(x: np.ndarray, y: np.ndarray) -> float:
    """median(x) - median(y) without overflow in the middle of an even group (9e307 and 1e308
    average to 9.5e307, not infinity); a difference beyond the float limit is infinite."""
    unit = _unit(x, y)
    with np.errstate(over="ignore"):
        return float((np.median(x / unit) - np.median(y / unit)) * unit)


def _times(values: np.ndarray, unit: float) -> np.ndarray:
    """``values * unit``, a product beyond the float limit written as an infinity."""
    with np.errstate(over="ignore"):
        return values * unit


def _mean_shift_interval(pool: _Pool, null: np.ndarray, own: np.ndarray, observed: float,
                         alternative: str, alpha: float, extra: int, denominator: int,
                         tolerance: float):
    """Shifts d for which testing x - d against y is not rejected at level ``alpha``.

    Each relabelling's difference at shift d is T*(d) = T* - c d with
    c = j / n1 - (n1 - j) / n2 (j of group 1's own values kept in group 1), and the observed one
    is T - d, so each relabelling counts as extreme on a closed interval of d.
    """
    n1, n2 = pool.n1, pool.n2
    c = own / n1 - (n1 - own) / n2
    a = null - observed
    with np.errstate(divide="ignore", invalid="ignore"):
        if alternative == "two-sided":
            # |T* - c d| >= |T - d|  <=>  ((T* - T) + (1 - c) d) ((T* + T) - (1 + c) d) >= 0
            r1 = -a / (1 - c)
            r2 = (null + observed) / (1 + c)
            low, high = np.minimum(r1, r2), np.maximum(r1, r2)
            swap = (own == 0) & (n1 == n2)  # c = -1: the second factor does not depend on d
            tie = np.abs(null + observed) <= tolerance
            low[swap] = np.where(tie[swap], -np.inf, np.where((null + observed)[swap] > 0,
                                                               r1[swap], -np.inf))
            high[swap] = np.where(tie[swap] | ((null + observed)[swap] > 0), np.inf, r1[swap])
        elif alternative == "greater":
            low, high = -a / (1 - c), np.full(null.size, np.inf)
        else:
            low, high = np.full(null.size, -np.inf), -a / (1 - c)
    same = own == n1  # the observed labelling itself: always as extreme as itself
    low[same], high[same] = -np.inf, np.inf
    # reject when p <= alpha; alpha = 1 - level carries rounding (1 - 0.9 < 0.1), so allow it
    limit = alpha + 1e-12
    needed = max(0, int(alpha * denominator) - extra - 1)
    while (extra + needed) / denominator <= limit:
        needed += 1
    return _accepted_shifts(low, high, needed)


# ---------------------------------------------------------------------------- permutation test

def permutation_test(
    x: Any,
    y: Any,
    *,
    statistic: str = "mean",
    alternative: str = "two-sided",
    confidence_level: float = 0.95,
    n_resamples: int = 10_000,
    rng: np.random.Generator | None = None,
    progress: Progress | None = None,
    cancelled: CancelCheck | None = None,
    shared_draws: dict | None = None,
) -> ProcedureResult:
    """Permutation test of a difference in means or medians, group 1 minus group 2.

    Parameters
    ----------
    x, y : array-like of float
        Group 1 and group 2, at least two finite values each.
    statistic : {"mean", "median"}
        The difference the test is built on.
    alternative : {"two-sided", "less", "greater"}
        "greater" means group 1 tends to be larger.
    confidence_level : float
        Coverage of the interval (difference in means only), strictly between 0 and 1.
    n_resamples : int
        Random relabellings to draw; when the number of distinct splits of the pooled values,
        C(n1 + n2, n1), is no larger, every split is enumerated instead.
    rng : numpy.random.Generator, optional
        Source of the random relabellings.
    progress : callable(fraction, what) or engine.tasks.Task, optional
        Called after each batch; the last call has fraction 1 (a task maps it onto its slice).
    cancelled : callable() -> bool, optional
        Polled between batches; True raises :class:`engine.errors.Cancelled`.
    shared_draws : dict, optional
        A store the permutation tests of one analysis hold in common: the random relabellings
        drawn by one are used again by the next with the same group sizes and count (the first
        draws from ``rng``, the next draws nothing). Without it each test draws its own.

    Returns
    -------
    ProcedureResult
        Key "permutation_mean" or "permutation_median". ``distribution`` holds the difference
        under every relabelling used; ``mc_standard_error`` is set for the Monte Carlo version.

    Notes
    -----
    Under the null hypothesis that both groups come from one distribution every split of the
    pooled n1 + n2 values into groups of n1 and n2 is equally likely. With T the observed
    difference and T* its value under a relabelling, b counts relabellings at least as extreme:
    T* >= T ("greater"), T* <= T ("less") or |T*| >= |T| ("two-sided"); values within
    1e-12 times the data's range of the boundary count as ties and hence as extreme.
    Exact enumeration gives p = b / C(n1 + n2, n1). Monte Carlo sampling of m relabellings gives
    p = (b + 1) / (m + 1), which counts the observed labelling as one of the draws and so never
    falls below 1 / (m + 1); its standard error is sqrt(p (1 - p) / m).

    The interval for a difference in means inverts the test over shifts d: it holds every d for
    which the test of x - d against y is not rejected at level 1 - confidence_level, using the
    same relabellings. A relabelling that keeps j of group 1's own values in group 1 has
    difference T* - c d with c = j / n1 - (n1 - j) / n2, while the observed difference is T - d,
    so each relabelling is extreme on one closed interval of d, and sorting the interval ends
    gives the accepted set exactly, without re-running the test. If that set has gaps the hull
    is reported with a warning. For medians no interval is given: the bootstrap of medians
    provides it.

    Random relabellings are uniform k-subsets (k the smaller group size) drawn as bit masks:
    every position is marked independently with probability near k / n, then uniformly drawn
    single positions are unmarked (or marked) until exactly k are marked. Given the first count
    the marked set is uniform over subsets of that size, and each correction step keeps it so.

    References
    ----------
    Ernst, M. D. (2004). Permutation methods: a basis for exact inference. Statistical Science
    19(4), 676-685.
    Good, P. I. (2005). Permutation, Parametric and Bootstrap Tests of Hypotheses, 3rd ed.
    Springer.
    Phipson, B. and Smyth, G. K. (2010). Permutation p-values should never be zero: calculating
    exact p-values when permutations are randomly drawn. Statistical Applications in Genetics
    and Molecular Biology 9(1), article 39.
    """
    x, y, statistic, alternative, level, n_resamples, rng = _prepare(
        x, y, statistic, alternative, confidence_level, n_resamples, rng)
    key = f"permutation_{statistic}"
    step = Task.of(progress, cancelled, what=NAMES[key]).report  # stops if asked
    unit = _unit(x, y)
    pool = _Pool(x / unit, y / unit, statistic)
    observed = float(pool.statistic_of(pool.observed_mask)[0])
    tolerance = TIE_TOLERANCE * max(pool.scale, abs(observed))
    splits = math.comb(pool.n, pool.k)
    exact = splits <= n_resamples
    total = splits if exact else n_resamples
    batch = max(1, _BATCH_BYTES // (4 * pool.n_bytes))
    null = np.empty(total)
    own = np.empty(total, dtype=np.int64) if statistic == "mean" else None
    batches = pool.all_masks(batch) if exact else _random_batches(pool, rng, total, batch,
                                                                    shared_draws)
    done = 0
    step(0.0)
    for masks in batches:
        rows = masks.shape[0]
        null[done:done + rows] = pool.statistic_of(masks)
        if own is not None:
            own[done:done + rows] = pool.x_in_group_1(masks)
        done += rows
        step(0.95 * done / total)

    extreme = count_extreme(null, observed, alternative, tolerance)
    extra, denominator = (0, total) if exact else (1, total + 1)
    p_value = (extreme + extra) / denominator
    mc_se = None if exact else math.sqrt(p_value * (1 - p_value) / total)
    alpha = 1 - level
    if statistic == "mean":
        estimate = mean_difference(x, y)[2]
        estimate_name = "difference in means"
    else:
        estimate = _median_difference(x, y)
        estimate_name = "difference in medians"
    tail = EXTREME_WORDS[alternative]
    if exact:
        method = (f"exact permutation distribution: all {splits} splits of the pooled values; "
                  f"p counts splits with {tail}")
    else:
        method = (f"{total} random relabellings of the pooled values; p = (b + 1) / (m + 1) "
                  f"with b the relabellings with {tail}")
    warnings: list[str] = []
    details: dict[str, Any] = dict(n_1=pool.n1, n_2=pool.n2, exact=exact, n_splits=splits,
                                   n_extreme=extreme, n_resamples=total,
                                   tie_tolerance=tolerance * unit)
    if pool.scale == 0:
        warnings.append("Every value is the same in both groups, so every relabelling gives the "
                        "same difference and the test cannot tell the groups apart.")
    interval = None
    if statistic == "mean":
        lowest, highest, connected = _mean_shift_interval(
            pool, null, own, observed, alternative, alpha, extra, denominator, tolerance)
        interval = _shift_interval(lowest, highest, level, alternative, warnings)
        if unit != 1.0:  # an end beyond the float limit reads as infinite, as Welch's does
            interval = dataclasses.replace(
                interval, low=None if interval.low is None else interval.low * unit,
                high=None if interval.high is None else interval.high * unit)
        details["accepted_shifts_connected"] = connected
        if not connected:
            warnings.append("The shifts the test accepts do not form one unbroken range; the "
                            "interval spans all of them.")
        method += "; interval from inverting the test over shifts of group 1"
    else:
        method += "; no interval here (the bootstrap of medians gives one)"
    step(1.0)
    return ProcedureResult(
        key=key, name=NAMES[key], estimate=float(estimate),
        estimate_name=estimate_name, statistic=float(estimate), statistic_name=estimate_name,
        df=None, p_value=float(p_value), interval=interval, alternative=alternative,
        method=method, details=details, warnings=tuple(warnings), mc_standard_error=mc_se,
        distribution=null if unit == 1.0 else _times(null, unit),
    )


def _shift_interval(lowest: float, highest: float, level: float, alternative: str,
                    warnings: list[str]) -> Interval:
    if math.isnan(lowest):
        warnings.append("No shift of group 1 passes the test at this confidence level, so the "
                        "interval is empty; use more resamples.")
        return Interval(math.nan, math.nan, level)
    open_low = alternative != "less" and math.isinf(lowest)
    open_high = alternative != "greater" and math.isinf(highest)
    if open_low or open_high:
        warnings.append("There are too few distinct splits of the data for this confidence "
                        "level: no shift is ruled out, so the interval has no limit.")
    low = None if math.isinf(lowest) else lowest + 0.0  # + 0.0 turns -0.0 into 0.0
    high = None if math.isinf(highest) else highest + 0.0
    if alternative == "greater":
        high = None
    elif alternative == "less":
        low = None
    return Interval(low, high, level)


# ---------------------------------------------------------------------------- bootstrap

def _index_dtype(n: int):
    return np.uint16 if n <= np.iinfo(np.uint16).max else np.int64


class _Sample:
    """One group, ready for resampled means or medians and for its jackknife."""

    def __init__(self, values: np.ndarray, statistic: str) -> None:
        self.n = values.size
        self.statistic = statistic
        self.dtype = _index_dtype(self.n)
        if statistic == "mean":
            self.centre = float(values.mean())
            self.values = values - self.centre
            self.centre += float(self.values.mean())
            self.values = values - self.centre
        else:
            self.values = np.sort(values)
            self._median_law()

    def _median_law(self) -> None:
        """The law of the middle order statistic(s) of n indices drawn with replacement.

        With N(m) the number of the n indices (uniform on 0..n-1) that are <= m,
        N(m) ~ Binomial(n, (m + 1) / n) and the h-th smallest index is <= m iff N(m) >= h.
        For even n, given the h-th (h = n / 2) smallest is a, the next one is also a unless
        exactly h indices are <= a; that happens with probability ``stay_chance[a]``, and then
        the next is a + 1 plus the least of the other n - h indices, uniform above a.
        """
        n = self.n
        h = (n + 1) // 2 if n % 2 else n // 2
        self.rank = h
        grid = np.arange(n)
        upper = bdtrc(h - 1, n, (grid + 1) / n)  # P(h-th smallest <= a): P(Binomial >= h)
        lower = bdtr(h - 1, n, (grid + 1) / n)  # 1 - upper, accurate near 1
        upper[-1], lower[-1] = 1.0, 0.0
        self.cdf = upper
        if n % 2:
            return
        # P(h-th smallest == a): difference of upper (left half) or of lower (right half)
        previous_upper = np.concatenate(([0.0], upper[:-1]))
        previous_lower = np.concatenate(([1.0], lower[:-1]))
        chance = np.where(upper < 0.5, upper - previous_upper, previous_lower - lower)
        # P(h-th smallest == a and exactly h indices <= a)
        with np.errstate(divide="ignore"):  # a = n - 1: log1p(-1) = -inf, probability 0
            none_at_a = np.exp((n - h) * np.log1p(-1.0 / (n - grid)))
        exactly = _binomial_pmf(h, n, (grid + 1) / n) - _binomial_pmf(h, n, grid / n) * none_at_a
        with np.errstate(divide="ignore", invalid="ignore"):
            self.stay_chance = np.clip(np.where(chance > 0, exactly / chance, 0.0), 0.0, 1.0)

    def replicates(self, rng: np.random.Generator, rows: int) -> np.ndarray:
        if self.statistic == "mean":
            index = rng.integers(0, self.n, (rows, self.n), dtype=self.dtype)
            return self.values[index].sum(axis=1) / self.n
        n, h = self.n, self.rank
        first = np.minimum(np.searchsorted(self.cdf, rng.random(rows), side="right"), n - 1)
        if n % 2:
            return self.values[first]
        jump = rng.random(rows) < self.stay_chance[first]
        room = n - 1 - first[jump]  # positions above a
        least = -np.expm1(np.log1p(-rng.random(room.size)) / (n - h))  # least of n - h uniforms
        second = first.copy()
        second[jump] += 1 + np.minimum(np.floor(room * least).astype(np.intp), room - 1)
        return 0.5 * (self.values[first] + self.values[second])

    def jackknife(self) -> np.ndarray:
        """Leave-one-out statistics, closed form (for means, relative to the centre)."""
        n, v = self.n, self.values
        if self.statistic == "mean":
            return (v.sum() - v) / (n - 1)
        left_out = np.arange(n)

        def kept(position: int) -> np.ndarray:  # value at ``position`` once one is left out
            return np.where(left_out > position, v[position], v[min(position + 1, n - 1)])

        m = n - 1
        if m % 2:
            return kept((m - 1) // 2)
        return 0.5 * (kept(m // 2 - 1) + kept(m // 2))


def _binomial_pmf(k: int, n: int, p: np.ndarray) -> np.ndarray:
    """P(Binomial(n, p) = k) as exp(log C(n, k) + k log p + (n - k) log(1 - p)).

    C(n, k) = 1 / ((n + 1) B(k + 1, n - k + 1)); ``xlogy`` and ``xlog1py`` give 0 log 0 = 0 at
    p = 0 and 1. Accurate to about 1e-13 relative for n near 1000 and 1e-9 near a million,
    against scipy.stats.binom.pmf.
    """
    with np.errstate(divide="ignore"):
        return np.exp(xlogy(k, p) + xlog1py(n - k, -p) - betaln(k + 1, n - k + 1) - np.log1p(n))


def _acceleration(jackknives: list[np.ndarray]) -> float:
    """The BCa acceleration from the leave-one-out values of each group.

    The ratio sum(u**3) / (6 * sum(u**2)**1.5) does not change when every u is divided by the
    same number, so the values are first brought to about 1 (by the largest magnitude), and the
    u once more: cubes of values near 1e150 would overflow and squares of values near 1e-200
    underflow to zero.
    """
    largest = max((float(np.max(np.abs(values))) for values in jackknives if values.size), default=0.0)
    if not math.isfinite(largest) or largest == 0:
        return math.nan
    deviations = []
    for values in jackknives:
        scaled = values / largest
        deviations.append((values.size, (values.size - 1) * (scaled.mean() - scaled)))
    spread = max(float(np.max(np.abs(u))) for _, u in deviations)
    if spread == 0:
        return math.nan
    numerator = denominator = 0.0
    for n, u in deviations:
        u = u / spread
        numerator += float(np.sum(u**3)) / n**3
        denominator += float(np.sum(u**2)) / n**2
    return numerator / (6 * denominator**1.5)


def bootstrap_interval(
    x: Any,
    y: Any,
    *,
    statistic: str = "mean",
    alternative: str = "two-sided",
    confidence_level: float = 0.95,
    n_resamples: int = 10_000,
    rng: np.random.Generator | None = None,
    progress: Progress | None = None,
    cancelled: CancelCheck | None = None,
) -> ProcedureResult:
    """Stratified bootstrap interval (BCa, with the percentile interval beside it).

    Parameters
    ----------
    x, y : array-like of float
        Group 1 and group 2, at least two finite values each.
    statistic : {"mean", "median"}
        The interval is for mean(x) - mean(y) or median(x) - median(y).
    alternative : {"two-sided", "less", "greater"}
        One-sided alternatives give a one-sided interval ("greater": [low, +inf)).
    confidence_level : float
        Coverage of the interval, strictly between 0 and 1.
    n_resamples : int
        Bootstrap replicates to draw.
    rng : numpy.random.Generator, optional
        Source of the resamples.
    progress : callable(fraction, what) or engine.tasks.Task, optional
        Called after each batch; the last call has fraction 1 (a task maps it onto its slice).
    cancelled : callable() -> bool, optional
        Polled between batches; True raises :class:`engine.errors.Cancelled`.

    Returns
    -------
    ProcedureResult
        Key "bootstrap_mean" or "bootstrap_median"; ``statistic`` and ``p_value`` are None.
        ``interval`` is the BCa interval; ``details["percentile"]`` the percentile interval,
        ``details["bias_correction"]`` z0 and ``details["acceleration"]`` a; ``distribution``
        the replicates.

    Notes
    -----
    Each replicate resamples n1 values from group 1 and n2 from group 2, with replacement and
    within each group, and takes the difference theta*. With alpha = (1 - level) / 2
    (two-sided) or 1 - level (one-sided) the percentile interval is the alpha and 1 - alpha
    quantiles of theta* (linear interpolation). BCa moves those to the quantiles
    alpha_1 = Phi(z0 + (z0 + z_alpha) / (1 - a (z0 + z_alpha))) and the same with
    z_(1-alpha), where z0 = Phi^-1((#{theta* < theta} + #{theta* <= theta}) / (2B)) and the
    acceleration a = sum_g sum_i U_gi^3 / n_g^3 / (6 (sum_g sum_i U_gi^2 / n_g^2)^(3/2)),
    U_gi = (n_g - 1)(mean of the jackknife values of group g - theta with value i of group g
    left out). The jackknife values have closed forms: (total - x_i) / (n - 1) for a mean, and
    for a median the middle of the sorted sample with one order statistic removed. When every
    replicate is equal, or theta lies outside all of them, BCa is undefined: the percentile
    interval is used and a warning says so. With fewer than ``BOOTSTRAP_MIN_N`` values in a
    group a warning says the interval is too narrow (Hesterberg 2015).

    A resampled median is drawn without forming the resample: with the group sorted, it is the
    value at the middle order statistic(s) of n indices drawn uniformly with replacement, whose
    law is exact and cheap. The h-th smallest index is <= m exactly when at least h of the n
    indices are, a Binomial(n, (m + 1) / n) count, so it is drawn by inverting that
    distribution function; for even n the next order statistic is drawn given the first (see
    ``_Sample._median_law``). Each replicate then costs O(log n) instead of O(n).

    References
    ----------
    Efron, B. (1987). Better bootstrap confidence intervals. Journal of the American Statistical
    Association 82(397), 171-185.
    Efron, B. and Tibshirani, R. J. (1993). An Introduction to the Bootstrap. Chapman & Hall,
    chapters 14 and 15 (equation 15.36 for several samples).
    Hesterberg, T. C. (2015). What teachers should know about the bootstrap: resampling in the
    undergraduate statistics curriculum. The American Statistician 69(4), 371-386.
    """
    x, y, statistic, alternative, level, n_resamples, rng = _prepare(
        x, y, statistic, alternative, confidence_level, n_resamples, rng)
    key = f"bootstrap_{statistic}"
    step = Task.of(progress, cancelled, what=NAMES[key]).report  # stops if asked
    first, second = _Sample(x, statistic), _Sample(y, statistic)
    if statistic == "mean":
        estimate = mean_difference(x, y)[2]
        offset = first.centre - second.centre
        estimate_name = "difference in means"
    else:
        estimate = _median_difference(x, y)
        offset = 0.0
        estimate_name = "difference in medians"
    batch = max(1, _BATCH_BYTES // (8 * max(first.n, second.n)))
    replicates = np.empty(n_resamples)
    step(0.0)
    for start in range(0, n_resamples, batch):
        rows = min(batch, n_resamples - start)
        block = first.replicates(rng, rows)
        block -= second.replicates(rng, rows)
        replicates[start:start + rows] = block + offset
        step(0.95 * (start + rows) / n_resamples)

    alpha = tail_alpha(level, alternative)
    percentile = _quantile_interval(replicates, alpha, 1 - alpha, level, alternative)
    below = np.count_nonzero(replicates < estimate) + np.count_nonzero(replicates <= estimate)
    with np.errstate(divide="ignore"):
        z0 = float(ndtri(below / (2 * n_resamples)))
    # leaving out a value of group 2 moves the difference the other way
    a = _acceleration([first.jackknife(), -second.jackknife()])
    warnings: list[str] = []
    if min(first.n, second.n) < BOOTSTRAP_MIN_N:
        warnings.append(
            f"A group has fewer than {BOOTSTRAP_MIN_N} values ({min(first.n, second.n)}): a bootstrap "
            "can only resample the few values it has, so its interval comes out too narrow and "
            "misses the true difference more often than the stated confidence (Hesterberg 2015, "
            "The American Statistician 69:371). Read it beside the Welch interval, not instead of it.")
    interval = percentile
    if np.ptp(replicates) == 0:
        warnings.append("Every bootstrap replicate gives the same difference, so the data show "
                        "no spread to resample; the interval has zero width and BCa is not "
                        "defined.")
        used = "percentile (BCa undefined: all replicates equal)"
    elif not math.isfinite(z0):
        warnings.append("The observed difference lies outside every bootstrap replicate, so the "
                        "bias correction is infinite; the percentile interval is shown instead "
                        "of BCa.")
        used = "percentile (BCa undefined: estimate outside the replicates)"
    else:
        if not math.isfinite(a):
            warnings.append("The jackknife values do not vary, so the acceleration is taken as "
                            "0 (bias-corrected percentile interval).")
            a = 0.0
        z_low, z_high = float(ndtri(alpha)), float(ndtri(1 - alpha))
        alpha_1 = float(ndtr(z0 + (z0 + z_low) / (1 - a * (z0 + z_low))))
        alpha_2 = float(ndtr(z0 + (z0 + z_high) / (1 - a * (z0 + z_high))))
        interval = _quantile_interval(replicates, alpha_1, alpha_2, level, alternative)
        used = "BCa"
    step(1.0)
    details = dict(n_1=first.n, n_2=second.n, n_resamples=n_resamples, percentile=percentile,
                   bias_correction=z0, acceleration=a, interval_kind=used,
                   standard_error=centred_sd(replicates))
    return ProcedureResult(
        key=key, name=NAMES[key], estimate=float(estimate),
        estimate_name=estimate_name, statistic=None, statistic_name=None, df=None, p_value=None,
        interval=interval, alternative=alternative,
        method=(f"{used} interval from {n_resamples} bootstrap resamples drawn within each "
                f"group"),
        details=details, warnings=tuple(warnings), distribution=replicates,
    )


def _quantile_interval(replicates: np.ndarray, low_fraction: float, high_fraction: float,
                       level: float, alternative: str) -> Interval:
    low, high = quantiles(replicates, (low_fraction, high_fraction))
    return Interval.for_alternative(low, high, level, alternative)
