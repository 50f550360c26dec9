"""Two one-sided t-tests: are the groups the same within a margin, or group 1 not worse by more
than a margin?

Equivalence within ``low`` to ``high`` (``low`` < 0 < ``high`` in the usual case) is shown when
both one-sided tests reject: the difference in means is above ``low`` and below ``high``. Its
p-value is the larger of the two one-sided p-values, and the matching interval is the two-sided
(1 - 2 alpha) interval: equivalence at level alpha holds exactly when that interval lies inside
the margin (Schuirmann 1987). Non-inferiority is one of the two tests alone.

The spread is Welch's (each group its own variance, Satterthwaite degrees of freedom) or pooled
(the same variance in both groups, stated beforehand), as in :mod:`engine.procedures.t`.
"""

from __future__ import annotations

import math
from typing import Any

from ..errors import OptionProblem
from ..results import Interval, ProcedureResult
from ..stats_basics import StudentT
from .t import pooled_t, welch_t

__all__ = ["equivalence_t", "noninferiority_t", "SPREADS"]

SPREADS = ("welch", "pooled")
_BASE = {"welch": welch_t, "pooled": pooled_t}
_NAMES = {"welch": "Welch", "pooled": "pooled"}


def _check_margin(low: Any, high: Any) -> tuple[float, float]:
    try:
        low, high = float(low), float(high)
    except (TypeError, ValueError):
        raise OptionProblem("The margin must be given as numbers.") from None
    if not (math.isfinite(low) and math.isfinite(high)) or not low < high:
        raise OptionProblem(
            f"The margin's lower end must be below its upper end, and both finite, not {low:g} to {high:g}.")
    return low, high


def _check_spread(spread: str) -> None:
    if spread not in SPREADS:
        raise OptionProblem(f"The spread must be 'welch' or 'pooled', not '{spread}'.")


def _t_sf(value: float, df: float) -> float:
    """P(T > value) for Student's t with ``df`` degrees of freedom."""
    return StudentT(df).sf(value)


def equivalence_t(x: Any, y: Any, *, low: float, high: float, spread: str = "welch",
                  confidence_level: float = 0.95) -> ProcedureResult:
    """Two one-sided t-tests of H0: difference <= low or difference >= high.

    ``confidence_level`` is 1 - alpha of the whole test (0.95: alpha 0.05); the interval returned
    is the two-sided one at 1 - 2 alpha (0.90), the one to set against the margin.
    ``details`` holds both one-sided statistics and p-values and the margin.
    """
    low, high = _check_margin(low, high)
    _check_spread(spread)
    alpha = 1.0 - float(confidence_level)
    if not 0 < alpha < 0.5:
        raise OptionProblem(f"The level of an equivalence test must be above 0.5 and below 1, "
                            f"not {confidence_level}.")
    base = _BASE[spread](x, y, alternative="two-sided", confidence_level=1.0 - 2.0 * alpha)
    estimate, se, df = base.estimate, base.details["standard_error"], base.df
    t_lower, t_upper = (estimate - low) / se, (estimate - high) / se
    p_lower, p_upper = _t_sf(t_lower, df), _t_sf(-t_upper, df)
    p_value = max(p_lower, p_upper)
    return ProcedureResult(
        key=f"equivalence_{spread}",
        name=f"two one-sided tests ({_NAMES[spread]} t)",
        estimate=estimate,
        estimate_name="difference in means",
        statistic=t_lower if p_lower >= p_upper else t_upper,
        statistic_name="t",
        df=df,
        p_value=p_value,
        interval=base.interval,
        alternative="two-sided",
        method=(f"two one-sided t-tests against the margin {low:g} to {high:g} "
                f"({base.method}); the interval is the {1 - 2 * alpha:.0%} one"),
        details=dict(base.details, margin_low=low, margin_high=high, t_lower=t_lower,
                     t_upper=t_upper, p_lower=p_lower, p_upper=p_upper,
                     equivalent=bool(p_value < alpha)),
        warnings=base.warnings,
    )


def noninferiority_t(x: Any, y: Any, *, margin: float, worse: str, spread: str = "welch",
                     confidence_level: float = 0.95) -> ProcedureResult:
    """One one-sided t-test: is group 1 not worse than group 2 by more than ``margin``?

    ``worse`` is "lower" (lower values are worse: H0 difference <= -margin) or "higher" (higher
    values are worse: H0 difference >= margin). The interval is the one-sided one at
    ``confidence_level`` whose open end points away from the margin.
    """
    try:
        margin = float(margin)
    except (TypeError, ValueError):
        raise OptionProblem("The margin must be a number.") from None
    if not (math.isfinite(margin) and margin > 0):
        raise OptionProblem(f"The non-inferiority margin must be a positive number, not {margin:g}.")
    if worse not in ("lower", "higher"):
        raise OptionProblem(f"Say which direction is worse: 'lower' or 'higher', not '{worse}'.")
    _check_spread(spread)
    alternative = "greater" if worse == "lower" else "less"
    base = _BASE[spread](x, y, alternative=alternative, confidence_level=confidence_level)
    estimate, se, df = base.estimate, base.details["standard_error"], base.df
    bound = -margin if worse == "lower" else margin
    statistic = (estimate - bound) / se
    p_value = _t_sf(statistic, df) if worse == "lower" else _t_sf(-statistic, df)
    interval = base.interval if base.interval is not None else Interval(None, None, confidence_level)
    return ProcedureResult(
        key=f"noninferiority_{spread}",
        name=f"non-inferiority t-test ({_NAMES[spread]} t)",
        estimate=estimate,
        estimate_name="difference in means",
        statistic=statistic,
        statistic_name="t",
        df=df,
        p_value=p_value,
        interval=interval,
        alternative=alternative,
        method=(f"one-sided t-test against the margin {bound:g} ({base.method}); "
                f"{worse} values are worse"),
        details=dict(base.details, margin=margin, bound=bound, worse=worse),
        warnings=base.warnings,
    )
