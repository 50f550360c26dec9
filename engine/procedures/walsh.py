"""Order statistics of the Walsh averages (d_i + d_j) / 2, i <= j, without forming all of them.

The one-sample Hodges-Lehmann estimate is their median, and the distribution-free interval that
goes with the signed-rank test runs from the k-th smallest to the k-th largest. There are
n (n + 1) / 2 of them (5 billion for 100,000 pairs), so they are counted, not listed: with the
differences sorted, how many averages lie at or below v is one ``searchsorted`` per value, and a
search on v narrows a band around the wanted rank until few enough averages remain in it to list
them and pick the one wanted. Time O(n log n) per step, memory linear in n.
"""

from __future__ import annotations

import numpy as np

__all__ = ["walsh_count", "walsh_order_statistic", "walsh_order_statistics", "walsh_median"]

# When at most this many averages (times n) remain between the search's ends, they are listed.
_LIST_FACTOR = 2
# Up to this many averages in all they are listed at once (a few hundred KB): cheaper than a search.
_LIST_ALL = 20_000
_MAX_STEPS = 200
# Averages drawn at random to bracket the wanted rank before counting (a fixed seed: the result
# never depends on the draw, only the number of counting steps does).
_SAMPLE = 20_000


def walsh_count(ordered: np.ndarray, value: float) -> int:
    """How many Walsh averages of the sorted ``ordered`` are at or below ``value``."""
    n = ordered.size
    # for each i, the j >= i with d_i + d_j <= 2 value
    ends = np.searchsorted(ordered, 2.0 * value - ordered, side="right")
    return int(np.maximum(ends - np.arange(n), 0).sum())


def _band(ordered: np.ndarray, low: float, high: float) -> np.ndarray:
    """Every Walsh average in (low, high], listed."""
    n = ordered.size
    starts = np.maximum(np.searchsorted(ordered, 2.0 * low - ordered, side="right"), np.arange(n))
    ends = np.maximum(np.searchsorted(ordered, 2.0 * high - ordered, side="right"), np.arange(n))
    counts = ends - starts
    used = np.flatnonzero(counts)
    counts, starts = counts[used], starts[used]
    rows = np.repeat(used, counts)
    offsets = np.arange(int(counts.sum())) - np.repeat(np.cumsum(counts) - counts, counts)
    columns = np.repeat(starts, counts) + offsets
    return (ordered[rows] + ordered[columns]) / 2.0


def walsh_order_statistic(ordered: np.ndarray, rank: int) -> float:
    """The ``rank``-th smallest Walsh average (1-based) of the sorted values ``ordered``."""
    return walsh_order_statistics(ordered, (rank,))[0]


def walsh_order_statistics(ordered: np.ndarray, ranks) -> tuple[float, ...]:
    """The Walsh averages of the given ranks (1-based), in the order given; ranks next to each
    other share one search."""
    n = ordered.size
    total = n * (n + 1) // 2
    wanted = sorted({int(r) for r in ranks})
    found: dict[int, float] = {}
    for rank in wanted:
        if not 1 <= rank <= total:
            raise ValueError(f"rank {rank} outside 1..{total}")
        if rank in found:
            continue
        below, inside = _band_around(ordered, rank)
        for other in wanted:
            if below < other <= below + inside.size:
                found[other] = float(inside[other - below - 1])
    return tuple(found[int(r)] for r in ranks)


def _band_around(ordered: np.ndarray, rank: int) -> tuple[int, np.ndarray]:
    """(how many averages lie below the band, the band's averages sorted), the band holding the
    ``rank``-th smallest and at most about ``_LIST_FACTOR`` n averages (all of them, when there
    are at most ``_LIST_ALL``)."""
    n = ordered.size
    total = n * (n + 1) // 2
    # (low, high]: count(low) < rank <= count(high); the smallest average is ordered[0] itself,
    # so none lies at or below the number just under it
    low, high = float(np.nextafter(ordered[0], -np.inf)), float(ordered[-1])
    below, at_high = 0, total
    listed = max(_LIST_FACTOR * n, _LIST_ALL)
    if total > listed:
        low, below, high, at_high = _bracket(ordered, rank, low, below, high, at_high)
    for _ in range(_MAX_STEPS):
        if at_high - below <= listed:
            break
        # interpolate on the counts, kept off the ends so that each step shrinks the band
        share = min(max((rank - below) / (at_high - below), 0.05), 0.95)
        middle = low + share * (high - low)
        if not low < middle < high:
            break
        low, below, high, at_high = _split(ordered, rank, middle, low, below, high, at_high)
    return below, np.sort(_band(ordered, low, high))


def _split(ordered: np.ndarray, rank: int, value: float, low: float, below: int, high: float,
           at_high: int) -> tuple[float, int, float, int]:
    """The half of (low, high] split at ``value`` that holds the ``rank``-th average, with the
    counts at its ends."""
    counted = walsh_count(ordered, value)
    if counted >= rank:
        return low, below, value, counted
    return value, counted, high, at_high


def _bracket(ordered: np.ndarray, rank: int, low: float, below: int, high: float, at_high: int):
    """Narrow (low, high] around ``rank`` from the quantiles of a random sample of averages."""
    n = ordered.size
    total = n * (n + 1) // 2
    draw = np.random.default_rng(0)
    i, j = draw.integers(0, n, _SAMPLE), draw.integers(0, n, _SAMPLE)
    sample = np.sort((ordered[i] + ordered[j]) / 2.0)
    share = rank / total
    reach = 4.0 * np.sqrt(share * (1 - share) / _SAMPLE) + 2.0 / _SAMPLE
    for edge in (share - reach, share + reach):
        if not 0.0 < edge < 1.0:
            continue
        guess = float(sample[min(int(edge * _SAMPLE), _SAMPLE - 1)])
        if not low < guess < high:
            continue
        low, below, high, at_high = _split(ordered, rank, guess, low, below, high, at_high)
    return low, below, high, at_high


def walsh_median(ordered: np.ndarray) -> float:
    """The one-sample Hodges-Lehmann estimate: the median of the Walsh averages."""
    n = ordered.size
    total = n * (n + 1) // 2
    if total % 2:
        return walsh_order_statistic(ordered, (total + 1) // 2)
    lower, upper = walsh_order_statistics(ordered, (total // 2, total // 2 + 1))
    return (lower + upper) / 2.0
