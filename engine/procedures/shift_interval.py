"""The Hodges-Lehmann interval as the shifts the Mann-Whitney test does not reject, ties kept.

Without ties the classical interval [D_(k), D_(n1 n2 + 1 - k)] of the ordered pairwise
differences is exactly the set of shifts d at which the test of x - d against y does not reject.
With ties that is no longer so: the test counts the tie blocks of the data, while k comes from
the tie-free distribution, and the two can disagree (an interval that contains 0 beside a test
that rejects). Here the test actually used (the tie-aware exact count, or the normal
approximation with its tie correction) is evaluated at the candidate shifts and the interval is
the span of those it does not reject.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

import numpy as np

from .rank_laws import exact_p, normal_p, tied_pmf, u_distribution

__all__ = ["ShiftSet", "invert_rank_test", "DISTINCT_PAIRS_LIMIT"]

# Largest number of (distinct group 1 value, distinct group 2 value) pairs for which the test is
# inverted; beyond it (many distinct values, hence few ties) the classical interval is kept.
DISTINCT_PAIRS_LIMIT = 2_000_000


@dataclass(frozen=True)
class ShiftSet:
    """The ends of the set of accepted shifts; an open end excludes its own value."""

    low: float
    high: float
    low_open: bool
    high_open: bool
    widest: bool  # even the most extreme shifts were not rejected at one end


class _Shifts:
    """The test of x - d against y at the candidate shifts, in order.

    Position 2 i + 1 is the shift delta_(i+1), the (i+1)-th smallest distinct pairwise
    difference; position 2 i is the open gap just below it, and 2 M the gap above the largest.
    """

    def __init__(self, xs, ys, test: Callable[[int, np.ndarray], float]) -> None:
        self.ux, self.cx = np.unique(xs, return_counts=True)
        self.uy, self.cy = np.unique(ys, return_counts=True)
        self.table = np.subtract.outer(self.ux, self.uy)  # fl(x - y), as the selection has them
        self.deltas = np.unique(self.table)
        self.test = test
        self.cache: dict[int, float] = {}

    @property
    def last(self) -> int:
        return 2 * self.deltas.size

    def value(self, position: int) -> float:
        return float(self.deltas[min(position // 2, self.deltas.size - 1)])

    def position_of(self, delta: float) -> int:
        return 2 * int(np.searchsorted(self.deltas, delta)) + 1

    def p(self, position: int) -> float:
        if position not in self.cache:
            self.cache[position] = self.test(*self._state(position))
        return self.cache[position]

    def _state(self, position: int) -> tuple[int, np.ndarray]:
        """2 U1 of x - d against y, and the tie-block sizes in value order, at ``position``."""
        index, at_point = divmod(position, 2)
        if position == self.last:
            delta, at_point, below_gap = self.deltas[-1], False, False
        else:
            delta, below_gap = self.deltas[index], not at_point
        rows = self.table
        above = rows > delta  # y value below x - d
        equal = rows == delta
        if below_gap:  # d just under delta: the tied pairs have x - d above y
            above, equal = above | equal, np.zeros_like(equal)
        elif not at_point:  # d just over delta: the tied pairs have x - d below y
            equal = np.zeros_like(equal)
        below_counts = above @ self.cy
        tied_counts = equal @ self.cy
        doubled_u = int(np.dot(self.cx, 2 * below_counts + tied_counts))
        return doubled_u, self._blocks(above.sum(axis=1), equal.sum(axis=1))

    def _blocks(self, prefix: np.ndarray, tied: np.ndarray) -> np.ndarray:
        """Tie-block sizes of the combined sample in value order.

        Each distinct x value sits after the first ``prefix`` distinct y values, and is tied
        with the next ``tied`` of them (none, as a rule).
        """
        sizes: list[int] = []
        cy = self.cy.tolist()
        j = 0
        for count, p, e in zip(self.cx.tolist(), prefix.tolist(), tied.tolist()):
            while j < p:
                sizes.append(cy[j])
                j += 1
            if e:
                if j > p:  # joins the block formed with an earlier x value
                    sizes[-1] += count
                else:
                    sizes.append(count + sum(cy[p:p + e]))
                    j = p + e
            else:
                sizes.append(count)
        sizes.extend(cy[j:])
        return np.asarray(sizes, dtype=np.int64)


def _edge(shifts: _Shifts, accepted, start: int, end: int, step: int) -> int | None:
    """The first accepted position going from ``start`` toward ``end`` by ``step`` (+1 or -1),
    assuming acceptance does not stop once it starts; found by galloping, then halving."""
    inside = lambda pos: (pos - end) * step <= 0  # noqa: E731
    if accepted(start):
        # gallop back (away from end) while accepted
        good, jump = start, 1
        while True:
            probe = good - step * jump
            if not (0 <= probe <= shifts.last):
                probe = 0 if step > 0 else shifts.last
                if accepted(probe):
                    return probe
                bad = probe
                break
            if accepted(probe):
                good, jump = probe, jump * 2
            else:
                bad = probe
                break
    else:
        bad, jump = start, 1
        while True:
            probe = bad + step * jump
            if not inside(probe):
                probe = end
                if not accepted(probe):
                    return None
                good = probe
                break
            if accepted(probe):
                good = probe
                break
            bad, jump = probe, jump * 2
    while abs(good - bad) > 1:  # bad before good in the walking direction
        middle = (good + bad) // 2
        if accepted(middle):
            good = middle
        else:
            bad = middle
    return good


# How many pieces next to the Hodges-Lehmann estimate are tried for one the test accepts.
_ANCHOR_TRIES = 64


def _anchor(shifts: _Shifts, accepted, centre: float) -> int | None:
    """An accepted position near the estimate (with heavy ties the estimate's own piece can be
    rejected, e.g. a median difference of 0 beside a test that rejects at 0)."""
    index = int(np.searchsorted(shifts.deltas, centre))
    at = 2 * index + 1 if index < shifts.deltas.size and shifts.deltas[index] == centre else 2 * index
    for distance in range(_ANCHOR_TRIES):
        for position in ((at,) if distance == 0 else (at + distance, at - distance)):
            if 0 <= position <= shifts.last and accepted(position):
                return position
    return None


def invert_rank_test(xs: np.ndarray, ys: np.ndarray, *, alternative: str, level: float,
                     method: str, continuity: bool, start: tuple[float, float],
                     centre: float, cancelled=None) -> ShiftSet | None:
    """The span of shifts d at which the rank test of x - d against y has p >= 1 - level.

    Parameters
    ----------
    xs, ys : numpy.ndarray
        Both groups, sorted.
    alternative, level : str, float
        As for the test; "greater" leaves the upper end open (infinite), "less" the lower.
    method : {"exact", "normal"}
        The test the p-value used: the tie-aware exact count or the normal approximation with
        tie correction (and ``continuity`` correction).
    start : (float, float)
        The classical interval's ends, where the search begins.
    centre : float
        The Hodges-Lehmann estimate; the search for each end stops there.

    Returns
    -------
    ShiftSet or None
        None when the groups hold too many distinct values to invert (then they have few ties
        and the classical interval stands).

    Notes
    -----
    The pairwise differences x_i - y_j split the line into points and open gaps. In a gap the
    shifted samples share no value, and U and the tie blocks (ties within each group) are
    constant; at a point some pairs tie across the groups and their blocks merge. The test is
    evaluated on these pieces, each once, and each end is found by galloping from the classical
    end and halving, which assumes that the rejected pieces lie outside the accepted ones at
    each side (as the tail probabilities move monotonically with U). An end is open when the
    point itself is rejected but the gap beside it is not. Test and interval then agree: 0 lies
    in the interval exactly when the test of the data has p >= 1 - level.

    References
    ----------
    Lehmann, E. L. (1963). Nonparametric confidence intervals for a shift parameter. Annals of
    Mathematical Statistics 34(4), 1507-1512.
    Bauer, D. F. (1972). Constructing confidence sets using rank statistics. Journal of the
    American Statistical Association 67(339), 687-690.
    """
    n1, n2 = xs.size, ys.size
    if np.unique(xs).size * np.unique(ys).size > DISTINCT_PAIRS_LIMIT:
        return None
    alpha = 1 - level
    no_tie_pmf: list[np.ndarray] = []

    def test(doubled_u: int, sizes: np.ndarray) -> float:
        if cancelled is not None and cancelled():
            from ..errors import Cancelled
            raise Cancelled()
        if method == "normal":
            tie_term = float(np.sum(sizes.astype(float) ** 3 - sizes))
            return normal_p(doubled_u / 2, n1, n2, tie_term, alternative, continuity)[0]
        if sizes.size == n1 + n2:  # no tie at this shift: the quicker tie-free count
            if not no_tie_pmf:
                no_tie_pmf.append(u_distribution(n1, n2))
            return exact_p(no_tie_pmf[0], doubled_u // 2, alternative)
        return exact_p(tied_pmf(sizes, n1, n2), doubled_u, alternative)

    shifts = _Shifts(xs, ys, test)

    def accepted(position: int) -> bool:
        return shifts.p(position) >= alpha

    middle = _anchor(shifts, accepted, centre)
    if middle is None:
        return None
    low, low_open, high, high_open, widest = -math.inf, False, math.inf, False, False
    if alternative != "less":
        first = min(shifts.position_of(start[0]), middle)
        found = _edge(shifts, accepted, first, middle, +1)
        if found is None:
            return None
        if found == 0:
            widest, low = True, shifts.value(1)
        else:
            low = shifts.value(found - 1 if found % 2 == 0 else found)
            low_open = found % 2 == 0
    if alternative != "greater":
        first = max(shifts.position_of(start[1]), middle)
        found = _edge(shifts, accepted, first, middle, -1)
        if found is None:
            return None
        if found == shifts.last:
            widest, high = True, shifts.value(shifts.last - 1)
        else:
            high = shifts.value(found + 1 if found % 2 == 0 else found)
            high_open = found % 2 == 0
    return ShiftSet(low, high, low_open, high_open, widest)
