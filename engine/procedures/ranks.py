"""The Mann-Whitney U test with the Hodges-Lehmann shift and its distribution-free interval.

U of group 1 counts the pairs (x_i, y_j) with x_i > y_j, a tie counting one half. Its p-value
comes from the exact permutation distribution (with or without ties) when that is quick to count,
otherwise from the normal approximation with tie and continuity corrections. The estimate is the
Hodges-Lehmann shift, the median of all n1 * n2 differences x_i - y_j, and the interval runs
between two order statistics of those differences. Large samples never hold all the differences
in memory: the order statistics are selected from the implicit sorted X - Y matrix.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from ..results import Interval, ProcedureResult, frozen_mapping
from ..stats_basics import Normal, tail_alpha
from ..summary import sorted_values
from ..tasks import CancelCheck
from .rank_laws import (
    TIED_TABLE_LIMIT, exact_p, no_tie_work, normal_p, tied_pmf, tied_rank_sum_distribution, tied_work,
    u_distribution,
)
from .shift_interval import invert_rank_test
from ._checks import (
    check_alternative, check_cancelled, check_choice, check_confidence_level, check_samples,
)

__all__ = [
    "mann_whitney",
    "hodges_lehmann",
    "u_distribution",
    "tied_rank_sum_distribution",
    "difference_order_statistics",
    "pair_counts",
    "EXACT_WORK_AUTO",
    "EXACT_WORK_LIMIT",
    "MATERIALIZE_LIMIT",
    "NAMES",
]

# The plain name of the procedure in this module (engine.procedures.registry shows it).
NAMES = frozen_mapping({"mann_whitney": "Mann-Whitney U with Hodges-Lehmann shift"})


# Work (array elements touched) up to which "auto" counts the exact distribution: about 0.3 s
# here (2 x 500 values without ties; 2 x 60 values with many ties).
EXACT_WORK_AUTO = 1.2e8
# Work up to which an explicit request for the exact distribution is honoured (about 10 s).
EXACT_WORK_LIMIT = 3e9
# Up to this many pairwise differences are formed outright; beyond, they are selected.
MATERIALIZE_LIMIT = 2_000_000


def _row_counts(a: np.ndarray, padded: np.ndarray, pivot: float, *, strict: bool) -> np.ndarray:
    """For each i, the number of j with fl(a_i + b_j) <= pivot (< pivot if ``strict``).

    a and b are ascending; ``padded`` is b with -inf in front and +inf behind. np.searchsorted on
    pivot - a_i gives the count up to rounding; every row is then checked on the computed sums
    themselves (the entry before the boundary must pass, the one after must fail), and the
    rare rows that fail the check get a binary search on the sums, so the count is exact.
    """
    n = padded.size - 2
    below = np.less if strict else np.less_equal
    count = np.searchsorted(padded[1:-1], pivot - a[::-1], side="left" if strict else "right")
    count = count[::-1]
    bad = ~below(a + padded[count], pivot) | below(a + padded[count + 1], pivot)
    rows = np.flatnonzero(bad)
    if rows.size:
        lo = np.zeros(rows.size, dtype=np.int64)
        hi = np.full(rows.size, n, dtype=np.int64)
        while True:
            open_ = lo < hi
            if not open_.any():
                break
            mid = (lo + hi) // 2
            go = open_ & below(a[rows] + padded[np.minimum(mid, n - 1) + 1], pivot)
            lo = np.where(go, mid + 1, lo)
            hi = np.where(open_ & ~go, mid, hi)
        count[rows] = lo
    return count


def _materialized(a, b, low, high, ranks):
    counts = high - low
    total = int(counts.sum())
    starts = np.cumsum(counts) - counts
    # entry t of the run of row i is column low_i + t - start_i
    cols = np.arange(total) + np.repeat(low - starts, counts)
    values = np.repeat(a, counts) + b[cols]
    local = np.asarray(ranks) - int(low.sum())
    return np.partition(values, local)[local]


def difference_order_statistics(
    x: np.ndarray, y: np.ndarray, ranks: list[int], *,
    materialize_limit: int = MATERIALIZE_LIMIT, cancelled: CancelCheck | None = None,
) -> np.ndarray:
    """The order statistics of the n1 * n2 differences x_i - y_j at 0-based ``ranks``.

    ``ranks`` should lie close together (a median pair, say); call once per far-apart rank.

    Notes
    -----
    With a = sorted(x) and b = sorted(-y), row i of the implicit matrix a_i + b_j is ascending,
    so the number of entries at or below a value t is found row by row with a binary search.
    Each row keeps a window [low_i, high_i) of columns still in play. A random sample of the
    entries in play gives two pivots that bracket the wanted ranks with high probability; the
    counts at both pivots narrow every window, and a wanted rank that falls on a run of entries
    equal to a pivot ends the search. When at most ``materialize_limit`` entries remain they are
    formed and partitioned. Each round keeps about 6 / sqrt(s) of the entries (s sampled), so
    10^12 pairs need three rounds. :func:`mann_whitney` asks for the median and both interval
    ends at once: a first shared round narrows to all three, then each goes on alone. The sums are compared as computed (fl(x_i - y_j)), so the
    result equals that of sorting all the differences; randomness affects only the speed.

    References
    ----------
    Johnson, D. B. and Mizoguchi, T. (1978). Selecting the Kth element in X + Y and
    X1 + X2 + ... + Xm. SIAM Journal on Computing 7(2), 147-153.
    Monahan, J. F. (1984). Algorithm 616: fast computation of the Hodges-Lehmann location
    estimator. ACM Transactions on Mathematical Software 10(3), 265-270.
    """
    a = np.sort(np.asarray(x, dtype=float))
    b = np.sort(-np.asarray(y, dtype=float))
    return _select(a, b, ranks, materialize_limit, cancelled)


_GRID_SIDE = 1000


def _grid_sample(a: np.ndarray, b: np.ndarray) -> tuple[np.ndarray, float]:
    """Sums of every s1-th a and every s2-th b (at most 1000 of each), and a margin in places.

    Each grid sum a_(k s1) + b_(l s2) is the smallest entry of its s1 x s2 block of the sorted
    matrix, so a grid count at t is exact except for the blocks that straddle t, which form a
    staircase of at most m1 + m2 - 1 blocks (m1, m2 grid rows and columns). A margin of
    max(3 sqrt(m1 m2), m1 + m2) grid places around a wanted share therefore brackets it (the
    last row and column of blocks may be smaller; the counts that follow check the bracket).
    """
    s1, s2 = -(-a.size // _GRID_SIDE), -(-b.size // _GRID_SIDE)
    rows, cols = a[::s1], b[::s2]
    sample = np.add.outer(rows, cols).ravel()
    return sample, max(3.0 * math.sqrt(sample.size), float(rows.size + cols.size))


class _Matrix:
    """The implicit sorted matrix a_i + b_j (a = sorted x, b = sorted -y) and its row windows."""

    def __init__(self, a: np.ndarray, b: np.ndarray, limit: int, cancelled) -> None:
        self.a, self.b = a, b
        self.padded = np.concatenate(([-np.inf], b, [np.inf]))
        self.limit = limit
        self.cancelled = cancelled
        self.rng = np.random.default_rng(20261202)
        self.stalled = False

    def full(self) -> tuple[np.ndarray, np.ndarray]:
        return (np.zeros(self.a.size, dtype=np.int64),
                np.full(self.a.size, self.b.size, dtype=np.int64))

    def _sample(self, low, high):
        """Entries drawn from the windows, a margin in sample places, and the window totals."""
        a, b = self.a, self.b
        counts = high - low
        in_play = int(counts.sum())
        below_all = int(low.sum())
        check_cancelled(self.cancelled)
        if in_play == a.size * b.size:
            # nothing ruled out yet: the sums of every s1-th a and every s2-th b, a grid whose
            # rank errors are bounded (see _grid_sample), and far quicker than random pairs
            sample, margin = _grid_sample(a, b)
        else:
            picks = np.sort(self.rng.integers(0, in_play, 300_000))
            ends = np.cumsum(counts)
            rows = np.searchsorted(ends, picks, side="right")
            sample = a[rows] + b[low[rows] + picks - (ends[rows] - counts[rows])]
            margin = 3.0 * math.sqrt(sample.size)
        return sample, margin, in_play, below_all

    def narrow(self, low, high, first, last):
        """One round: windows still holding ranks first..last, or the common value if found."""
        pivots, stride = self.pivots(low, high, [(first, last)])
        return self._narrow_at(low, high, first, last, *pivots[0], stride)

    def pivots(self, low, high, spans):
        """Pivots (p1, p2) for each span of ranks (first, last) from one sample, and the stride.

        Several spans that share the windows share the sample; each is then narrowed on its
        own (:meth:`_narrow_at`), one after the other, so only one set of windows is held.
        """
        sample, margin, in_play, below_all = self._sample(low, high)
        size = sample.size
        places = []
        for first, last in spans:
            places.append((
                int(np.clip(math.floor((first - below_all) / in_play * size - margin), 0, size - 1)),
                int(np.clip(math.ceil((last + 1 - below_all) / in_play * size + margin), 0, size - 1))))
        ordered = np.partition(sample, sorted({i for pair in places for i in pair}))
        # rows counted exactly: every stride-th. Between two counted rows a count moves by
        # about stride * n2 / n1 columns, so the slack is near 2 * stride * n2 in all; keep it
        # near half the entries the round should leave. A round that fails to halve the
        # entries in play is followed by exact counts.
        stride = int(0.5 * 6 / math.sqrt(size) * in_play / (2 * self.b.size))
        return [(ordered[i1], ordered[i2]) for i1, i2 in places], stride

    def _narrow_at(self, low, high, first, last, p1, p2, stride):
        a = self.a
        if p1 < p2 and stride >= 8 and not self.stalled:
            return self._narrow_by_bounds(low, high, first, last, p1, p2, stride)
        if p1 < p2:
            vectors = (_row_counts(a, self.padded, p1, strict=False),
                       _row_counts(a, self.padded, p2, strict=True))
        else:
            vectors = (_row_counts(a, self.padded, p1, strict=True),
                       _row_counts(a, self.padded, p1, strict=False))
            if vectors[0].sum() <= first and last < vectors[1].sum():
                return low, high, float(p1)  # every wanted rank falls on entries equal to p1
        # a count vector whose total is <= first leaves only entries below every wanted rank on
        # its left; one whose total is > last only entries above them on its right
        for counted in vectors:
            total = int(counted.sum())
            if total <= first:
                low = np.maximum(low, counted)
            elif total > last:
                high = np.minimum(high, counted)
        return low, high, None

    def _bounds(self, pivot: float, stride: int, *, strict: bool):
        """Lower and upper bounds on every row's count, from exact counts on every stride-th row.

        Row counts fall as a_i grows, so row i's count lies between those of the counted rows
        on either side of it.
        """
        n = self.a.size
        rows = np.append(np.arange(0, n, stride), n - 1)
        counted = _row_counts(self.a[rows], self.padded, pivot, strict=strict)
        # row i lies in block i // stride, between counted rows (i // stride) and the next
        return np.repeat(counted[1:], stride)[:n], np.repeat(counted[:-1], stride)[:n]

    def _narrow_by_bounds(self, low, high, first, last, p1, p2, stride):
        """A round with bounds on the counts instead of exact counts (large matrices).

        The entries left of the new low are all <= p1 and those right of the new high all
        >= p2; p1 is used only if at most ``first`` entries can be <= p1, and p2 only if more
        than ``last`` entries must be < p2, so the wanted ranks stay inside the windows.
        """
        in_play = int((high - low).sum())
        under, over = self._bounds(p1, stride, strict=False)
        if int(over.sum()) <= first:
            low = np.maximum(low, under)
        under, over = self._bounds(p2, stride, strict=True)
        if int(under.sum()) > last:
            high = np.minimum(high, over)
        self.stalled = 2 * int((high - low).sum()) > in_play
        return low, high, None

    def select(self, ranks, low=None, high=None) -> np.ndarray:
        if low is None:
            low, high = self.full()
        first, last = ranks[0], ranks[-1]
        self.stalled = False
        while int((high - low).sum()) > self.limit:
            low, high, value = self.narrow(low, high, first, last)
            if value is not None:
                return np.full(len(ranks), value)
        return _materialized(self.a, self.b, low, high, ranks)

    def select_groups(self, groups: list[list[int]]) -> list[np.ndarray]:
        """Several groups of close ranks; one shared first round narrows to all of them, and
        one shared sample gives each group its own second round."""
        low, high = self.full()
        first, last = min(g[0] for g in groups), max(g[-1] for g in groups)
        if int((high - low).sum()) <= self.limit:  # few entries: form them once for all
            wanted = sorted({r for g in groups for r in g})
            values = dict(zip(wanted, _materialized(self.a, self.b, low, high, wanted)))
            return [np.array([values[r] for r in g]) for g in groups]
        if len(groups) == 1:
            return [self.select(groups[0], low, high)]
        self.stalled = False
        low, high, value = self.narrow(low, high, first, last)
        if value is not None:
            return [np.full(len(g), value) for g in groups]
        if int((high - low).sum()) <= self.limit:
            return [self.select(g, low, high) for g in groups]
        pivots, stride = self.pivots(low, high, [(g[0], g[-1]) for g in groups])
        found = []
        for g, (p1, p2) in zip(groups, pivots):
            self.stalled = False
            lo, hi, value = self._narrow_at(low, high, g[0], g[-1], p1, p2, stride)
            found.append(np.full(len(g), value) if value is not None else self.select(g, lo, hi))
            del lo, hi
        return found


def _select(a, b, ranks, materialize_limit=MATERIALIZE_LIMIT, cancelled=None) -> np.ndarray:
    return _Matrix(a, b, materialize_limit, cancelled).select(sorted(int(r) for r in ranks))


def hodges_lehmann(x: Any, y: Any) -> float:
    """The Hodges-Lehmann shift: the median of all differences x_i - y_j (group 1 minus 2).

    Notes
    -----
    With N = n1 * n2 differences sorted as D_(1) <= ... <= D_(N), the estimate is D_((N+1)/2) for
    odd N and (D_(N/2) + D_(N/2+1)) / 2 for even N. Large samples use
    :func:`difference_order_statistics`, which never forms all N differences.

    References
    ----------
    Hodges, J. L. and Lehmann, E. L. (1963). Estimates of location based on rank tests. Annals
    of Mathematical Statistics 34(2), 598-611.
    """
    x, y = check_samples(x, y, minimum=1)
    return _shift(np.sort(x), np.sort(-y), None)


def _shift(a, b, cancelled) -> float:
    """The median of a_i + b_j (a = sorted x, b = sorted -y)."""
    total = a.size * b.size
    if total % 2:
        return float(_select(a, b, [total // 2], cancelled=cancelled)[0])
    pair = _select(a, b, [total // 2 - 1, total // 2], cancelled=cancelled)
    return _midpoint(float(pair[0]), float(pair[1]))


def _midpoint(low: float, high: float) -> float:
    """(low + high) / 2 for low <= high, without overflow when both lie near the largest float."""
    if (low < 0) != (high < 0):
        return (low + high) / 2
    return low + (high - low) / 2


# --- the test --------------------------------------------------------------------------------

def pair_counts(xs: np.ndarray, ys: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """For each value of sorted ``xs``, how many values of sorted ``ys`` lie below it and at or below.

    Notes
    -----
    below_i = #{j: y_j < x_i} and at_or_below_i = #{j: y_j <= x_i}, so
    2 U1 = sum(below_i + at_or_below_i). One binary search per x_i gives below_i; the second
    search runs only for the x_i that equal the y found there (ties), which are few for
    continuous data. Sorted queries make the searches walk ys in order.

    References
    ----------
    Knuth, D. E. (1998). The Art of Computer Programming, vol. 3, 2nd ed. Addison-Wesley,
    section 6.2.1 (binary search).
    """
    below = np.searchsorted(ys, xs, side="left")
    at_or_below = below.copy()
    if ys.size:
        tied = np.flatnonzero(ys[np.minimum(below, ys.size - 1)] == xs)
        if tied.size:
            at_or_below[tied] = np.searchsorted(ys, xs[tied], side="right")
    return below, at_or_below


def _tie_term(xs: np.ndarray, ys: np.ndarray, equal_in_y: np.ndarray) -> float:
    """sum(t^3 - t) over the tie blocks of the combined sample.

    xs and ys are sorted; ``equal_in_y[i]`` is the number of values of y equal to xs[i].
    """
    def cube_excess(t):
        return float(np.sum(t * t * t - t))

    starts = np.flatnonzero(np.r_[True, xs[1:] != xs[:-1]])
    in_x = np.diff(np.r_[starts, xs.size]).astype(float)
    shared = equal_in_y[starts].astype(float)
    in_y = np.diff(np.r_[np.flatnonzero(np.r_[True, ys[1:] != ys[:-1]]), ys.size]).astype(float)
    return cube_excess(in_x + shared) + cube_excess(in_y) - cube_excess(shared)


def _block_sizes(xs: np.ndarray, ys: np.ndarray) -> np.ndarray:
    _, counts = np.unique(np.concatenate((xs, ys)), return_counts=True)
    return counts


def _choose_method(requested, n1, n2, ties, xs, ys):
    """Return (method, block sizes or None, warning or None)."""
    if requested == "normal":
        return "normal", None, None
    sizes = _block_sizes(xs, ys) if ties and n1 + n2 <= 20_000 else None
    if not ties:
        work, table_ok = no_tie_work(n1, n2), True
    elif sizes is None:
        work, table_ok = math.inf, False
    else:
        work, table = tied_work(n1, n2, sizes)
        table_ok = table <= TIED_TABLE_LIMIT
    limit = EXACT_WORK_AUTO if requested == "auto" else EXACT_WORK_LIMIT
    if table_ok and work <= limit:
        return "exact", sizes, None
    if requested == "exact":
        return "normal", None, (
            f"The exact distribution for {n1} and {n2} values"
            f"{' with ties' if ties else ''} would take too long to count, so the p-value "
            f"uses the normal approximation instead.")
    return "normal", None, None


def _interval_rank(n1, n2, level, alternative, pmf):
    """k for the interval [D_(k), D_(n1 n2 + 1 - k)] and its actual coverage.

    ``pmf`` is the tie-free null distribution of U, or None for its normal approximation.
    k = 0 means that no interval reaches the level.
    """
    tail = tail_alpha(level, alternative)
    sides = 2 if alternative == "two-sided" else 1
    total = n1 * n2
    if pmf is not None:
        cdf = np.cumsum(pmf)
        k = int(np.searchsorted(cdf, tail * (1 + 1e-12), side="right"))  # P(U <= k - 1) <= tail
        below = float(cdf[max(k, 1) - 1])
    else:
        sd = math.sqrt(total * (n1 + n2 + 1) / 12)
        k = max(int(math.floor(total / 2 - Normal().isf(tail) * sd + 0.5)), 0)
        below = Normal().cdf((max(k, 1) - 0.5 - total / 2) / sd)
    k = min(k, (total + 1) // 2)
    return k, 1 - sides * below


def _shift_interval(low, high, level, alternative, ends_open) -> Interval:
    closed = Interval.for_alternative(low, high, level, alternative)
    return Interval(closed.low, closed.high, level,
                    low_open=ends_open[0] and closed.low is not None,
                    high_open=ends_open[1] and closed.high is not None)


def mann_whitney(
    x: Any,
    y: Any,
    *,
    alternative: str = "two-sided",
    confidence_level: float = 0.95,
    method: str = "auto",
    continuity: bool = True,
    cancelled: CancelCheck | None = None,
    sorted_x: np.ndarray | None = None,
    sorted_y: np.ndarray | None = None,
) -> ProcedureResult:
    """Mann-Whitney U test, Hodges-Lehmann shift of group 1 over group 2, and its interval.

    Parameters
    ----------
    x, y : array-like of float
        Group 1 and group 2, at least two finite values each.
    alternative : {"two-sided", "less", "greater"}
        "greater" means group 1 tends to take the larger values.
    confidence_level : float
        Coverage of the interval for the shift, strictly between 0 and 1.
    method : {"auto", "exact", "normal"}
        How the p-value is found. "auto" counts the exact distribution when that takes at most
        about ``EXACT_WORK_AUTO`` array operations (2 x 500 values without ties, about 2 x 60
        with heavy ties, 0.3 s) and otherwise uses the normal approximation. "exact" honours the
        request up to ``EXACT_WORK_LIMIT`` and otherwise switches, saying so in ``warnings``.
    continuity : bool
        Whether the normal approximation moves U half a unit toward its mean.
    cancelled : callable, optional
        Polled during long counts; a True answer raises :class:`engine.errors.Cancelled`.
    sorted_x, sorted_y : numpy.ndarray, optional
        ``np.sort(x)`` and ``np.sort(y)`` when the caller has them already (the analysis sorts
        each group once for every step); each group is otherwise sorted here.

    Returns
    -------
    ProcedureResult
        Key "mann_whitney"; statistic U of group 1; estimate the Hodges-Lehmann shift;
        ``details`` with U1, U2, both rank sums, the tie term, z (normal approximation), the
        method used and the interval's rank k and actual coverage.

    Notes
    -----
    U1 = #(x_i > y_j) + #(x_i = y_j) / 2 = R1 - n1 (n1 + 1) / 2 with R1 the mid-rank sum of
    group 1; U1 + U2 = n1 n2. Exact p-values: P(U1 >= u) ("greater"), P(U1 <= u) ("less"), twice
    the smaller of the two for "two-sided" (at most 1), from the permutation distribution of the
    mid-rank sum given the observed ties (:func:`tied_rank_sum_distribution`) or, without ties,
    the Gaussian binomial count (:func:`u_distribution`). The normal approximation uses mean
    n1 n2 / 2 and variance n1 n2 / 12 * ((N + 1) - sum(t^3 - t) / (N (N - 1))).

    The interval for the shift is [D_(k), D_(n1 n2 + 1 - k)] of the ordered differences, with k
    the largest integer such that P(U <= k - 1) <= (1 - level) / 2 (one-sided: 1 - level, one
    end open). P(U <= k - 1) is taken from the tie-free exact distribution when the p-value is
    exact and from its normal approximation (with continuity correction) otherwise; without
    ties this is exactly the set of shifts d at which the test of x - d against y does not
    reject. With ties it is not, so the test actually used (tie-aware exact count or tie-
    corrected normal approximation) is inverted over the shifts instead
    (:func:`engine.procedures.shift_interval.invert_rank_test`): 0 then lies in the interval
    exactly when p >= 1 - level, and an end that the test itself rejects is marked open
    (``Interval.low_open`` / ``high_open``). ``details["interval_inverted"]`` says which was
    done; an exact count too long to repeat keeps the tie-free interval with a warning. When no
    interval reaches the level (very small samples) the widest one [D_(1), D_(n1 n2)] is
    returned with a warning.

    References
    ----------
    Mann, H. B. and Whitney, D. R. (1947). On a test of whether one of two random variables is
    stochastically larger than the other. Annals of Mathematical Statistics 18(1), 50-60.
    Hollander, M., Wolfe, D. A. and Chicken, E. (2014). Nonparametric Statistical Methods, 3rd
    ed., Wiley, sections 4.1-4.3.
    Bauer, D. F. (1972). Constructing confidence sets using rank statistics. Journal of the
    American Statistical Association 67(339), 687-690.
    """
    x, y = check_samples(x, y)
    alternative = check_alternative(alternative)
    level = check_confidence_level(confidence_level)
    requested = check_choice(method, ("auto", "exact", "normal"), what="rank method")
    n1, n2 = x.size, y.size
    xs = sorted_values(x, sorted_x, name="group 1")
    ys = sorted_values(y, sorted_y, name="group 2")
    below, at_or_below = pair_counts(xs, ys)
    doubled_u1 = int(below.sum() + at_or_below.sum())  # 2 U1, exact in integers
    u1 = doubled_u1 / 2
    u2 = n1 * n2 - u1
    tie_term = _tie_term(xs, ys, at_or_below - below)
    del below, at_or_below  # not needed by the selection below; frees 16 bytes a value
    ties = tie_term > 0
    warnings: list[str] = []
    details: dict[str, Any] = dict(
        U1=u1, U2=u2, rank_sum_1=u1 + n1 * (n1 + 1) / 2, rank_sum_2=u2 + n2 * (n2 + 1) / 2,
        n_1=n1, n_2=n2, tie_term=tie_term, ties=ties, z=None)
    all_tied = xs[0] == xs[-1] == ys[0] == ys[-1]
    if all_tied:
        used, sizes = "exact", None
        p_value = 1.0
        warnings.append("Every value in both groups is the same, so the ranks carry no "
                        "information and the p-value is 1.")
        description = "no test possible: every value is tied"
    else:
        used, sizes, switch = _choose_method(requested, n1, n2, ties, xs, ys)
        if switch:
            warnings.append(switch)
        if used == "exact" and ties:
            pmf = tied_pmf(sizes, n1, n2, cancelled=cancelled)
            observed = doubled_u1
            description = ("exact permutation distribution of the rank sum, ties kept as "
                           "mid-ranks")
        elif used == "exact":
            pmf = u_distribution(n1, n2, cancelled=cancelled)
            observed = doubled_u1 // 2
            description = "exact distribution of U, counting every split of the values"
        if used == "exact":
            p_value = exact_p(pmf, observed, alternative)
        else:
            p_value, z = normal_p(u1, n1, n2, tie_term, alternative, continuity)
            details["z"] = z
            description = ("normal approximation to U with tie correction"
                           + (" and continuity correction" if continuity else ""))
    details["method"] = used
    negated = ys[::-1] * -1.0  # sorted(-y)
    total = n1 * n2
    if used == "exact" and not all_tied:
        null_u = pmf if not ties else u_distribution(n1, n2, cancelled=cancelled)
    else:
        null_u = None
    k, coverage = _interval_rank(n1, n2, level, alternative, null_u)
    if k < 1:
        k = 1
        warnings.append(
            f"With {n1} and {n2} values no interval for the shift reaches the requested "
            f"confidence; the widest one, from the smallest to the largest difference, is shown "
            f"(its coverage is {coverage:.3f}).")
    middle = [total // 2] if total % 2 else [total // 2 - 1, total // 2]
    groups = [middle, [k - 1], [total - k]]
    if alternative == "greater":
        groups.pop()
    elif alternative == "less":
        groups.pop(1)
    found = _Matrix(xs, negated, MATERIALIZE_LIMIT, cancelled).select_groups(groups)
    pair = found[0]
    estimate = float(pair[0]) if total % 2 else _midpoint(float(pair[0]), float(pair[1]))
    low = float(found[1][0]) if alternative != "less" else -math.inf
    high = float(found[-1][0]) if alternative != "greater" else math.inf
    details.update(interval_rank=k, interval_coverage=coverage, interval_inverted=False)
    ends_open = (False, False)
    # Inverting the exact test counts its distribution some ten times over; past the work an
    # automatic choice would allow for one count, the tie-free interval is kept and flagged.
    too_long = (not all_tied and used == "exact" and ties
                and tied_work(n1, n2, sizes)[0] > EXACT_WORK_AUTO)
    if too_long:
        warnings.append("Counting the interval for the shift with the ties kept would take too "
                        "long, so it uses the tie-free ranks; at its ends it may disagree with "
                        "the test.")
    if ties and not all_tied and not too_long:

        inverted = invert_rank_test(
            xs, ys, alternative=alternative, level=level, method=used, continuity=continuity,
            start=(low, high), centre=estimate, cancelled=cancelled)
        if inverted is not None:
            low, high = inverted.low, inverted.high
            ends_open = (inverted.low_open, inverted.high_open)
            details.update(interval_rank=None, interval_coverage=None, interval_inverted=True)
            widest_note = next((w for w in warnings if "widest" in w), None)
            if widest_note is not None and not inverted.widest:
                warnings.remove(widest_note)
                widest_note = None
            if not Interval(low, high, level, *ends_open).contains(estimate):
                warnings.append(
                    "With this many ties the shift estimate falls on a value the test rejects; "
                    "the interval holds the shifts the test does not reject.")
            if inverted.widest and widest_note is None:
                warnings.append(
                    f"With {n1} and {n2} values no interval for the shift reaches the requested "
                    "confidence; the widest one, from the smallest to the largest difference, "
                    "is shown.")
    return ProcedureResult(
        key="mann_whitney",
        name=NAMES["mann_whitney"],
        estimate=estimate,
        estimate_name="Hodges-Lehmann shift",
        statistic=u1,
        statistic_name="U",
        df=None,
        p_value=p_value,
        interval=_shift_interval(low, high, level, alternative, ends_open),
        alternative=alternative,
        method=description + ("; interval for the shift: the shifts this test does not reject"
                              if details["interval_inverted"] else
                              "; interval for the shift from ordered pairwise differences"),
        details=details,
        warnings=tuple(warnings),
    )
