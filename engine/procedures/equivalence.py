"""Two one-sided t-tests: are the groups the same within a margin, or group 1 not worse by more
than a margin? And the parts every margin procedure shares.

Equivalence within ``low`` to ``high`` (``low`` < 0 < ``high`` in the usual case) is shown when
both one-sided tests reject: the difference in means is above ``low`` and below ``high``. Its
p-value is the larger of the two one-sided p-values, and the matching interval is the two-sided
(1 - 2 alpha) interval: equivalence at level alpha holds exactly when that interval lies inside
the margin (Schuirmann 1987). Non-inferiority is one of the two tests alone, the one at the end
of the margin on the worse side; its interval is the same two-sided (1 - 2 alpha) one, whose end
on the better side is the one-sided (1 - alpha) limit.

The spread is Welch's (each group its own variance, Satterthwaite degrees of freedom) or pooled
(the same variance in both groups, stated beforehand), as in :mod:`engine.procedures.t`; the
paired t of :mod:`engine.procedures.paired` fits the same frame (:func:`t_margin`).

Every margin procedure ends in :func:`margin_result` from a :class:`MarginTest`: the interval at
1 - 2 alpha, the (1 - alpha) ``difference_interval`` for an equivalence verdict, the one-sided
p-values at each end of the margin, and ``margin_note`` (how the margin was entered).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Callable, Mapping

from ..errors import OptionProblem
from ..results import Interval, ProcedureResult, frozen_mapping
from ..stats_basics import StudentT
from .t import pooled_t, welch_t

__all__ = ["equivalence_t", "noninferiority_t", "SPREADS", "NAMES", "Ends", "MarginTest",
           "margin_result", "inside_margin", "check_worse", "margin_ends", "worse_end", "margin_alpha", "narrow_level", "t_margin"]

SPREADS = ("welch", "pooled")
_BASE = {"welch": welch_t, "pooled": pooled_t}
_NAMES = {"welch": "Welch", "pooled": "pooled"}

# The plain name of each procedure in this module.
NAMES = frozen_mapping({
    "equivalence_welch": "two one-sided tests (Welch t)",
    "equivalence_pooled": "two one-sided tests (pooled t)",
    "noninferiority_welch": "non-inferiority t-test (Welch t)",
    "noninferiority_pooled": "non-inferiority t-test (pooled t)",
})


@dataclass(frozen=True)
class Ends:
    """The ends of the margin a procedure tests against, in the estimate's units: both for an
    equivalence question; for a non-inferiority question only the end on the worse side (``low``
    when lower values are worse, ``high`` when higher values are)."""

    low: float | None
    high: float | None

    @property
    def equivalence(self) -> bool:
        return self.low is not None and self.high is not None

    @property
    def worse(self) -> str | None:
        """The worse direction of a non-inferiority margin; None for an equivalence margin."""
        if self.equivalence:
            return None
        return "lower" if self.low is not None else "higher"

    def mapped(self, change: Callable[[float], float]) -> "Ends":
        """The ends carried to another scale (the logarithms of a ratio margin)."""
        return Ends(None if self.low is None else change(self.low),
                    None if self.high is None else change(self.high))

    def words(self) -> str:
        if self.equivalence:
            return f"the margin {self.low:g} to {self.high:g}"
        bound = self.low if self.low is not None else self.high
        return f"the margin end {bound:g} ({self.worse} values worse)"


def _number(value: Any, what: str) -> float:
    try:
        number = float(value)
    except (TypeError, ValueError):
        raise OptionProblem(f"The {what} must be a number.") from None
    return number


def margin_ends(low: Any, high: Any) -> Ends:
    """An equivalence margin ``low`` to ``high``, checked."""
    low, high = _number(low, "margin"), _number(high, "margin")
    if not (math.isfinite(low) and math.isfinite(high)) or not low < high:
        raise OptionProblem(
            f"The margin's lower end must be below its upper end, and both finite, not {low:g} to {high:g}.")
    return Ends(low, high)


def _check_margin(low: Any, high: Any) -> tuple[float, float]:
    ends = margin_ends(low, high)
    return ends.low, ends.high


def check_worse(worse: Any) -> str:
    if worse not in ("lower", "higher"):
        raise OptionProblem(f"Say which direction is worse: 'lower' or 'higher', not '{worse}'.")
    return worse


def worse_end(margin: Any, worse: Any) -> Ends:
    """A non-inferiority margin of size ``margin`` (positive) on the ``worse`` side of 0."""
    margin = _number(margin, "margin")
    if not (math.isfinite(margin) and margin > 0):
        raise OptionProblem(f"The non-inferiority margin must be a positive number, not {margin:g}.")
    return Ends(-margin, None) if check_worse(worse) == "lower" else Ends(None, margin)


def margin_alpha(confidence_level: Any) -> float:
    """alpha = 1 - ``confidence_level``, which must leave 1 - 2 alpha above 0."""
    alpha = 1.0 - _number(confidence_level, "confidence level")
    if not 0 < alpha < 0.5:
        raise OptionProblem(f"The level of an equivalence or non-inferiority test must be above "
                            f"0.5 and below 1, not {confidence_level}.")
    return alpha


def narrow_level(alpha: float) -> float:
    """The level 1 - 2 alpha, without the float residue of the subtraction (0.9, not 0.8999...)."""
    return round(1.0 - 2.0 * alpha, 12)


def inside_margin(interval: Interval, low: float | None, high: float | None) -> bool:
    """Whether every value of ``interval`` lies strictly inside ``low`` to ``high`` (None: that
    side unbounded; an open end on the margin itself counts as inside; a missing or NaN end of
    the interval facing a bound does not)."""
    a, b = interval.low, interval.high
    above = low is None or (a is not None and a == a and (a > low or (a == low and interval.low_open)))
    below = high is None or (b is not None and b == b and (b < high or (b == high and interval.high_open)))
    return above and below


def _percent(level: float) -> str:
    return f"{round(level * 100, 6):g}%"


@dataclass(frozen=True)
class MarginTest:
    """What a margin procedure found, before it is put into a result.

    ``interval``: two-sided at 1 - 2 alpha; ``difference_interval``: two-sided at 1 - alpha (an
    equivalence question); ``p_lower``: the one-sided p-value of "the estimate is at or below the
    margin's low end", ``p_upper`` of "at or above its high end" (None: that end is not tested,
    or the procedure gives no test); ``statistics``: the test statistics at those ends.
    """

    estimate: float
    interval: Interval
    difference_interval: Interval | None = None
    p_lower: float | None = None
    p_upper: float | None = None
    statistics: tuple[float | None, float | None] = (None, None)
    df: float | None = None
    details: Mapping[str, Any] = field(default_factory=dict)
    warnings: tuple[str, ...] = ()


def margin_result(test: MarginTest, ends: Ends, *, keys: tuple[str, str], names: Mapping[str, str],
                  estimate_name: str, statistic_name: str | None, how: str,
                  margin_note: str | None) -> ProcedureResult:
    """The result of a margin procedure: key ``keys[0]`` for an equivalence margin, ``keys[1]``
    for a non-inferiority one. Its p-value is the larger one-sided p-value (equivalence) or the
    one at the worse end (non-inferiority; ``details["worse"]`` says which side); None when the
    procedure gives no test. Its ``alternative`` is "two-sided", as its interval is: the
    one-sided tests are read against the margin, not against no difference."""
    key = keys[0] if ends.equivalence else keys[1]
    tested = [(p, s) for p, s, end in zip((test.p_lower, test.p_upper), test.statistics,
                                         (ends.low, ends.high)) if end is not None and p is not None]
    p_value, statistic = max(tested, key=lambda pair: pair[0]) if tested else (None, None)
    note = margin_note if margin_note is not None else f"{ends.words()} in the estimate's units"
    method = (f"{how}, against {ends.words()}; the interval set against the margin is the two-sided "
              f"{_percent(test.interval.level)} one; {note}")
    verdict = "equivalent" if ends.equivalence else "not_worse"
    details = dict(test.details, margin_low=ends.low, margin_high=ends.high, worse=ends.worse,
                   p_lower=test.p_lower, p_upper=test.p_upper, margin_note=note,
                   difference_interval=test.difference_interval,
                   **{verdict: inside_margin(test.interval, ends.low, ends.high)})
    return ProcedureResult(
        key=key, name=names[key], estimate=float(test.estimate), estimate_name=estimate_name,
        statistic=statistic, statistic_name=statistic_name if statistic is not None else None,
        df=test.df, p_value=p_value, interval=test.interval, alternative="two-sided",
        method=method, details=details, warnings=tuple(dict.fromkeys(test.warnings)))


def t_margin(base: Callable[..., ProcedureResult], x: Any, y: Any, ends: Ends, *,
             confidence_level: float) -> MarginTest:
    """The one-sided t-tests at each end of ``ends`` on the estimate and standard error of
    ``base`` (a t procedure: Welch, pooled or paired), with its two-sided intervals at 1 - 2 alpha
    and, for an equivalence margin, at 1 - alpha."""
    alpha = margin_alpha(confidence_level)
    narrow = base(x, y, alternative="two-sided", confidence_level=narrow_level(alpha))
    wide = (base(x, y, alternative="two-sided", confidence_level=1.0 - alpha).interval
            if ends.equivalence else None)
    estimate, se, df = narrow.estimate, narrow.details["standard_error"], narrow.df
    law = StudentT(df)
    t_lower = None if ends.low is None else (estimate - ends.low) / se
    t_upper = None if ends.high is None else (estimate - ends.high) / se
    return MarginTest(
        estimate=estimate, interval=narrow.interval, difference_interval=wide,
        p_lower=None if t_lower is None else law.sf(t_lower),
        p_upper=None if t_upper is None else law.cdf(t_upper),
        statistics=(t_lower, t_upper), df=df,
        details=dict(narrow.details, t_lower=t_lower, t_upper=t_upper, base_method=narrow.method),
        warnings=narrow.warnings)


def _check_spread(spread: str) -> None:
    if spread not in SPREADS:
        raise OptionProblem(f"The spread must be 'welch' or 'pooled', not '{spread}'.")


def _t(x: Any, y: Any, ends: Ends, spread: str, confidence_level: float,
       margin_note: str | None) -> ProcedureResult:
    _check_spread(spread)
    test = t_margin(_BASE[spread], x, y, ends, confidence_level=confidence_level)
    how = ("two one-sided t-tests" if ends.equivalence else "one-sided t-test") + \
        f" ({test.details['base_method']})"
    return margin_result(test, ends, keys=(f"equivalence_{spread}", f"noninferiority_{spread}"),
                         names=NAMES, estimate_name="difference in means",
                         statistic_name=f"{_NAMES[spread]} t", how=how, margin_note=margin_note)


def equivalence_t(x: Any, y: Any, *, low: float, high: float, spread: str = "welch",
                  confidence_level: float = 0.95, margin_note: str | None = None) -> ProcedureResult:
    """Two one-sided t-tests of H0: difference <= low or difference >= high.

    ``confidence_level`` is 1 - alpha of the whole test (0.95: alpha 0.05); the interval returned
    is the two-sided one at 1 - 2 alpha (0.90), the one to set against the margin, and
    ``details["difference_interval"]`` the two-sided one at 1 - alpha. ``details`` holds both
    one-sided statistics and p-values, the margin and ``margin_note`` (how it was entered).
    """
    return _t(x, y, margin_ends(low, high), spread, confidence_level, margin_note)


def noninferiority_t(x: Any, y: Any, *, margin: float, worse: str, spread: str = "welch",
                     confidence_level: float = 0.95, margin_note: str | None = None) -> ProcedureResult:
    """One one-sided t-test: is group 1 not worse than group 2 by more than ``margin``?

    ``worse`` is "lower" (lower values are worse: H0 difference <= -margin) or "higher" (higher
    values are worse: H0 difference >= margin). The interval is the two-sided one at
    1 - 2 alpha: its end on the better side is the one-sided (1 - alpha) limit the test inverts.
    """
    return _t(x, y, worse_end(margin, worse), spread, confidence_level, margin_note)
