"""Equivalence from an interval other than the t one: the Hodges-Lehmann shift, the bootstrap of
the mean difference, and the ratio of geometric means on the log scale.

Each follows the rule of the two one-sided tests (Schuirmann 1987): at level alpha the groups are
equivalent within ``low`` to ``high`` when the two-sided (1 - 2 alpha) interval lies inside the
margin. ``details`` holds that interval's verdict (``equivalent``), the margin, and the two-sided
(1 - alpha) interval as ``difference_interval`` (does it leave no difference out?), so that
:meth:`engine.question.Question.margin_answer` can tell the four cases apart.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from ..errors import OptionProblem
from ..results import Interval, ProcedureResult
from .equivalence import _check_margin, equivalence_t
from .ranks import mann_whitney
from .resampling import bootstrap_interval

__all__ = ["equivalence_ranks", "equivalence_bootstrap", "equivalence_log_t", "inside_margin",
           "BOOTSTRAP_KINDS"]

BOOTSTRAP_KINDS = ("bca", "percentile")


def _alpha(confidence_level: float) -> float:
    alpha = 1.0 - float(confidence_level)
    if not 0 < alpha < 0.5:
        raise OptionProblem(f"The level of an equivalence test must be above 0.5 and below 1, "
                            f"not {confidence_level}.")
    return alpha


def _narrow(alpha: float) -> float:
    """The level 1 - 2 alpha, without the float residue of the subtraction (0.9, not 0.8999...)."""
    return round(1.0 - 2.0 * alpha, 12)


def inside_margin(interval: Interval, low: float, high: float) -> bool:
    """Whether every value of ``interval`` lies strictly inside ``low`` to ``high`` (an open end
    on the margin itself counts as inside; a missing or NaN end does not)."""
    a, b = interval.low, interval.high
    if a is None or b is None or a != a or b != b:
        return False
    return (a > low or (a == low and interval.low_open)) and (b < high or (b == high and interval.high_open))


def _with_note(method: str, margin_note: str | None) -> str:
    return method if margin_note is None else f"{method}; {margin_note}"


def equivalence_ranks(x: Any, y: Any, *, low: float, high: float, confidence_level: float = 0.95,
                      method: str = "auto", margin_note: str | None = None) -> ProcedureResult:
    """Equivalence of the Hodges-Lehmann shift: its (1 - 2 alpha) interval inside the margin.

    The p-value is the larger of the two one-sided Mann-Whitney p-values of x - ``low`` above y
    and x - ``high`` below y, the tests whose inversion gives the interval, so that p < alpha
    goes with the interval inside the margin. ``margin_note`` says how the margin was entered.
    """
    low, high = _check_margin(low, high)
    alpha = _alpha(confidence_level)
    xs, ys = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
    narrow = mann_whitney(xs, ys, confidence_level=_narrow(alpha), method=method)
    wide = mann_whitney(xs, ys, confidence_level=1.0 - alpha, method=method)
    p_lower = mann_whitney(xs - low, ys, alternative="greater", method=method).p_value
    p_upper = mann_whitney(xs - high, ys, alternative="less", method=method).p_value
    return ProcedureResult(
        key="equivalence_ranks",
        name="equivalence of the Hodges-Lehmann shift",
        estimate=narrow.estimate,
        estimate_name="shift (Hodges-Lehmann)",
        statistic=None,
        statistic_name=None,
        df=None,
        p_value=max(p_lower, p_upper),
        interval=narrow.interval,
        alternative="two-sided",
        method=_with_note(f"the {1 - 2 * alpha:.0%} Hodges-Lehmann interval against the margin "
                          f"{low:g} to {high:g}, with two one-sided Mann-Whitney tests", margin_note),
        details=dict(margin_low=low, margin_high=high, p_lower=p_lower, p_upper=p_upper,
                     equivalent=inside_margin(narrow.interval, low, high),
                     difference_interval=wide.interval, rank_method=narrow.details["method"],
                     margin_note=margin_note),
        warnings=tuple(dict.fromkeys(narrow.warnings + wide.warnings)),
    )


def equivalence_bootstrap(x: Any, y: Any, *, low: float, high: float, confidence_level: float = 0.95,
                          kind: str = "bca", n_resamples: int = 10_000,
                          rng: np.random.Generator | None = None,
                          margin_note: str | None = None) -> ProcedureResult:
    """Equivalence of the mean difference by its bootstrap interval at 1 - 2 alpha (``kind``
    "bca" or "percentile") inside the margin; no p-value. Both intervals come from the same
    replicates (one seed drawn from ``rng``)."""
    low, high = _check_margin(low, high)
    alpha = _alpha(confidence_level)
    if kind not in BOOTSTRAP_KINDS:
        raise OptionProblem(f"The bootstrap interval must be 'bca' or 'percentile', not '{kind}'.")
    seed = int((rng if rng is not None else np.random.default_rng()).integers(2**63))

    def run(level: float) -> ProcedureResult:
        return bootstrap_interval(x, y, statistic="mean", confidence_level=level,
                                  n_resamples=n_resamples, rng=np.random.default_rng(seed))

    narrow, wide = run(_narrow(alpha)), run(1.0 - alpha)

    def chosen(result: ProcedureResult) -> Interval:
        return result.interval if kind == "bca" else result.details["percentile"]

    interval = chosen(narrow)
    title = "BCa" if kind == "bca" else "percentile"
    return ProcedureResult(
        key=f"equivalence_bootstrap_{kind}",
        name=f"equivalence by the bootstrap ({title} interval)",
        estimate=narrow.estimate,
        estimate_name="difference in means",
        statistic=None,
        statistic_name=None,
        df=None,
        p_value=None,
        interval=interval,
        alternative="two-sided",
        method=_with_note(f"the {1 - 2 * alpha:.0%} {title} bootstrap interval of the difference in "
                          f"means ({n_resamples:,} resamples) against the margin {low:g} to {high:g}",
                          margin_note),
        details=dict(margin_low=low, margin_high=high, equivalent=inside_margin(interval, low, high),
                     difference_interval=chosen(wide), n_resamples=n_resamples, seed=seed,
                     margin_note=margin_note),
        warnings=narrow.warnings,
    )


def equivalence_log_t(x: Any, y: Any, *, low: float, high: float, spread: str = "welch",
                      confidence_level: float = 0.95, margin_note: str | None = None) -> ProcedureResult:
    """Equivalence of the ratio of geometric means, group 1 over group 2, within ``low`` to
    ``high`` (a ratio margin such as 0.80 to 1.25): two one-sided t-tests on the logarithms
    against log(low) and log(high), the estimate and interval taken back to ratios. Every value
    must be positive."""
    try:
        low, high = float(low), float(high)
    except (TypeError, ValueError):
        raise OptionProblem("The margin must be given as numbers.") from None
    if not (0 < low < 1 < high and math.isfinite(high)):
        raise OptionProblem(f"A ratio margin must go from below 1 to above 1, both above 0, "
                            f"not {low:g} to {high:g}.")
    values = []
    for number, group in ((1, x), (2, y)):
        array = np.asarray(group, dtype=float)
        bad = np.flatnonzero(~(array > 0))
        if bad.size:
            raise OptionProblem(
                f"A ratio of means needs positive values; group {number} has "
                f"{bad.size} value{'s' if bad.size > 1 else ''} that {'are' if bad.size > 1 else 'is'} "
                f"not (the first: {array[bad[0]]:g}, value {bad[0] + 1} of the group).")
        values.append(np.log(array))
    logged = equivalence_t(values[0], values[1], low=math.log(low), high=math.log(high),
                           spread=spread, confidence_level=confidence_level)
    narrow = logged.interval
    interval = Interval(math.exp(narrow.low), math.exp(narrow.high), narrow.level)
    return ProcedureResult(
        key=f"equivalence_log_{spread}",
        name=f"two one-sided tests on the log scale ({'Welch' if spread == 'welch' else 'pooled'} t)",
        estimate=math.exp(logged.estimate),
        estimate_name="ratio of geometric means (group 1 / group 2)",
        statistic=logged.statistic,
        statistic_name="t",
        df=logged.df,
        p_value=logged.p_value,
        interval=interval,
        alternative="two-sided",
        method=_with_note(f"two one-sided t-tests on the logarithms against log {low:g} and log "
                          f"{high:g}: the ratio of the geometric means of group 1 to group 2 "
                          f"({logged.method})", margin_note),
        details=dict(logged.details, margin_low=low, margin_high=high,
                     log_difference=logged.estimate, margin_note=margin_note),
        warnings=logged.warnings,
    )
