"""Equivalence and non-inferiority from an interval other than the t one: the Hodges-Lehmann
shift, the bootstrap of the mean difference, and the ratio of geometric means on the log scale.

Each follows the rule of the two one-sided tests (Schuirmann 1987): at level alpha the groups are
equivalent within ``low`` to ``high`` when the two-sided (1 - 2 alpha) interval lies inside the
margin, and group 1 is not worse by more than the margin when that interval's end on the better
side lies beyond the margin's end on the worse side. Each result is put together by
:func:`engine.procedures.equivalence.margin_result`: ``details`` holds the verdict of the interval
(``equivalent`` or ``not_worse``), the margin, ``margin_note`` and, for equivalence, the two-sided
(1 - alpha) interval as ``difference_interval`` (does it leave no difference out?), so that
:meth:`engine.question.Question.margin_answer` can tell the four cases apart.
"""

from __future__ import annotations

import math
from typing import Any, Callable

import numpy as np

from ..errors import OptionProblem
from ..results import Interval, ProcedureResult, frozen_mapping
from ..tasks import CancelCheck, Progress, Task
from .equivalence import (Ends, MarginTest, check_worse, inside_margin, margin_alpha, margin_ends,
                          margin_result, narrow_level, t_margin, worse_end)
from .ranks import mann_whitney
from .resampling import bootstrap_interval
from .t import pooled_t, welch_t

__all__ = ["equivalence_ranks", "noninferiority_ranks", "equivalence_bootstrap",
           "noninferiority_bootstrap", "equivalence_log_t", "noninferiority_log_t",
           "inside_margin", "bootstrap_margin", "ratio_worse_end", "BOOTSTRAP_KINDS", "NAMES"]

BOOTSTRAP_KINDS = ("bca", "percentile")
_SPREAD_NAMES = {"welch": "Welch", "pooled": "pooled"}

# The plain name of each procedure in this module.
NAMES = frozen_mapping({
    "equivalence_ranks": "equivalence of the Hodges-Lehmann shift",
    "noninferiority_ranks": "non-inferiority of the Hodges-Lehmann shift",
    "equivalence_bootstrap_bca": "equivalence by the bootstrap (BCa interval)",
    "equivalence_bootstrap_percentile": "equivalence by the bootstrap (percentile interval)",
    "noninferiority_bootstrap_bca": "non-inferiority by the bootstrap (BCa interval)",
    "noninferiority_bootstrap_percentile": "non-inferiority by the bootstrap (percentile interval)",
    "equivalence_log_welch": "two one-sided tests on the log scale (Welch t)",
    "equivalence_log_pooled": "two one-sided tests on the log scale (pooled t)",
    "noninferiority_log_welch": "non-inferiority t-test on the log scale (Welch t)",
    "noninferiority_log_pooled": "non-inferiority t-test on the log scale (pooled t)",
})
SHIFT_NAME = "Hodges-Lehmann shift"
RATIO_NAME = "ratio of geometric means (group 1 / group 2)"


# -- ranks ---------------------------------------------------------------------------------------

def _ranks(x: Any, y: Any, ends: Ends, confidence_level: float, method: str,
           cancelled: CancelCheck | None, margin_note: str | None) -> ProcedureResult:
    alpha = margin_alpha(confidence_level)
    xs, ys = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
    options = dict(method=method, cancelled=cancelled)
    narrow = mann_whitney(xs, ys, confidence_level=narrow_level(alpha), **options)
    wide = mann_whitney(xs, ys, confidence_level=1.0 - alpha, **options) if ends.equivalence else None
    # the one-sided tests whose inversion gives the interval's ends: x - end against y
    p_lower = (None if ends.low is None else
               mann_whitney(xs - ends.low, ys, alternative="greater", **options).p_value)
    p_upper = (None if ends.high is None else
               mann_whitney(xs - ends.high, ys, alternative="less", **options).p_value)
    warnings = narrow.warnings + (() if wide is None else wide.warnings)
    test = MarginTest(estimate=narrow.estimate, interval=narrow.interval,
                      difference_interval=None if wide is None else wide.interval,
                      p_lower=p_lower, p_upper=p_upper,
                      details=dict(rank_method=narrow.details["method"]), warnings=warnings)
    how = (f"the Hodges-Lehmann interval with {'two one-sided' if ends.equivalence else 'a one-sided'} "
           f"Mann-Whitney test{'s' if ends.equivalence else ''} ({narrow.details['method']})")
    return margin_result(test, ends, keys=("equivalence_ranks", "noninferiority_ranks"), names=NAMES,
                         estimate_name=SHIFT_NAME, statistic_name=None, how=how,
                         margin_note=margin_note)


def equivalence_ranks(x: Any, y: Any, *, low: float, high: float, confidence_level: float = 0.95,
                      method: str = "auto", cancelled: CancelCheck | None = None,
                      margin_note: str | None = None) -> ProcedureResult:
    """Equivalence of the Hodges-Lehmann shift: its (1 - 2 alpha) interval inside the margin.

    The p-value is the larger of the two one-sided Mann-Whitney p-values of x - ``low`` above y
    and x - ``high`` below y, the tests whose inversion gives the interval, so that p < alpha
    goes with the interval inside the margin. ``margin_note`` says how the margin was entered.
    """
    return _ranks(x, y, margin_ends(low, high), confidence_level, method, cancelled, margin_note)


def noninferiority_ranks(x: Any, y: Any, *, margin: float, worse: str, confidence_level: float = 0.95,
                         method: str = "auto", cancelled: CancelCheck | None = None,
                         margin_note: str | None = None) -> ProcedureResult:
    """Non-inferiority of the Hodges-Lehmann shift: the one-sided Mann-Whitney test of x minus the
    margin's worse end against y (lower worse: x + ``margin`` above y; higher worse: x - ``margin``
    below y), with the (1 - 2 alpha) interval whose better end inverts it."""
    return _ranks(x, y, worse_end(margin, worse), confidence_level, method, cancelled, margin_note)


# -- the bootstrap -------------------------------------------------------------------------------

def bootstrap_margin(run: Callable[[float, np.random.Generator, Task], ProcedureResult],
                     ends: Ends, *, confidence_level: float, rng: np.random.Generator | None,
                     progress: Progress | Task | None,
                     chosen: Callable[[ProcedureResult], Interval] = lambda r: r.interval) -> MarginTest:
    """A bootstrap interval at 1 - 2 alpha and, for an equivalence margin, the one at 1 - alpha
    from the same replicates: ``run(level, generator, task)`` is run once per level with
    generators seeded alike (one seed drawn from ``rng``). No p-value."""
    alpha = margin_alpha(confidence_level)
    seed = int((rng if rng is not None else np.random.default_rng()).integers(2**63))
    task = Task.of(progress)
    levels = (narrow_level(alpha), 1.0 - alpha) if ends.equivalence else (narrow_level(alpha),)
    results = [run(level, np.random.default_rng(seed), task.step(1.0 / len(levels), task.what))
               for level in levels]
    return MarginTest(estimate=results[0].estimate, interval=chosen(results[0]),
                      difference_interval=chosen(results[1]) if len(results) > 1 else None,
                      details=dict(results[0].details, seed=seed), warnings=results[0].warnings)


def _bootstrap(x: Any, y: Any, ends: Ends, confidence_level: float, kind: str, n_resamples: int,
               rng: np.random.Generator | None, progress: Progress | Task | None,
               margin_note: str | None) -> ProcedureResult:
    if kind not in BOOTSTRAP_KINDS:
        raise OptionProblem(f"The bootstrap interval must be 'bca' or 'percentile', not '{kind}'.")

    def run(level: float, generator: np.random.Generator, task: Task) -> ProcedureResult:
        return bootstrap_interval(x, y, statistic="mean", confidence_level=level,
                                  n_resamples=n_resamples, rng=generator, progress=task)

    test = bootstrap_margin(run, ends, confidence_level=confidence_level, rng=rng, progress=progress,
                            chosen=lambda r: r.interval if kind == "bca" else r.details["percentile"])
    title = "BCa" if kind == "bca" else "percentile"
    return margin_result(test, ends, keys=(f"equivalence_bootstrap_{kind}", f"noninferiority_bootstrap_{kind}"),
                         names=NAMES, estimate_name="difference in means", statistic_name=None,
                         how=(f"the {title} bootstrap interval of the difference in means "
                              f"({n_resamples:,} resamples within each group)"),
                         margin_note=margin_note)


def equivalence_bootstrap(x: Any, y: Any, *, low: float, high: float, confidence_level: float = 0.95,
                          kind: str = "bca", n_resamples: int = 10_000,
                          rng: np.random.Generator | None = None, progress: Progress | Task | None = None,
                          margin_note: str | None = None) -> ProcedureResult:
    """Equivalence of the mean difference by its bootstrap interval at 1 - 2 alpha (``kind``
    "bca" or "percentile") inside the margin; no p-value. Both intervals come from the same
    replicates (one seed drawn from ``rng``)."""
    return _bootstrap(x, y, margin_ends(low, high), confidence_level, kind, n_resamples, rng,
                      progress, margin_note)


def noninferiority_bootstrap(x: Any, y: Any, *, margin: float, worse: str,
                             confidence_level: float = 0.95, kind: str = "bca",
                             n_resamples: int = 10_000, rng: np.random.Generator | None = None,
                             progress: Progress | Task | None = None,
                             margin_note: str | None = None) -> ProcedureResult:
    """Non-inferiority of the mean difference by its bootstrap interval at 1 - 2 alpha: its end
    on the better side beyond the margin's end on the worse side; no p-value."""
    return _bootstrap(x, y, worse_end(margin, worse), confidence_level, kind, n_resamples, rng,
                      progress, margin_note)


# -- the ratio of geometric means ----------------------------------------------------------------

def _logs(x: Any, y: Any) -> tuple[np.ndarray, np.ndarray]:
    """The logarithms of both groups; a value that is not positive is refused in one line."""
    values = []
    for number, group in ((1, x), (2, y)):
        array = np.asarray(group, dtype=float)
        bad = np.flatnonzero(~(array > 0))
        if bad.size:
            raise OptionProblem(
                f"A ratio of means needs positive values; group {number} has "
                f"{bad.size} value{'s' if bad.size > 1 else ''} that {'are' if bad.size > 1 else 'is'} "
                f"not (the first: {array[bad[0]]:g}, value {bad[0] + 1} of the group); give the "
                "margin in the measurement's units or as a percentage instead.")
        values.append(np.log(array))
    return values[0], values[1]


def _ratio_ends(low: Any, high: Any) -> Ends:
    ends = margin_ends(low, high)
    if not (0 < ends.low < 1 < ends.high):
        raise OptionProblem(f"A ratio margin must go from below 1 to above 1, both above 0, "
                            f"not {ends.low:g} to {ends.high:g}.")
    return ends


def ratio_worse_end(margin: Any, worse: Any) -> Ends:
    """A non-inferiority ratio margin: ``margin`` (positive, not 1) as the allowed ratio on the
    ``worse`` side (0.8 and 1.25 both mean 0.8 when lower is worse, 1.25 when higher is)."""
    try:
        size = float(margin)
    except (TypeError, ValueError):
        raise OptionProblem("The margin must be a number.") from None
    if not (math.isfinite(size) and size > 0 and size != 1):
        raise OptionProblem(f"A ratio margin must be a positive number other than 1, not {size:g}.")
    small = min(size, 1 / size)
    return Ends(small, None) if check_worse(worse) == "lower" else Ends(None, 1 / small)


def _log_t(x: Any, y: Any, ends: Ends, spread: str, confidence_level: float,
           margin_note: str | None) -> ProcedureResult:
    if spread not in _SPREAD_NAMES:
        raise OptionProblem(f"The spread must be 'welch' or 'pooled', not '{spread}'.")
    logs = _logs(x, y)
    base = welch_t if spread == "welch" else pooled_t
    test = t_margin(base, *logs, ends.mapped(math.log), confidence_level=confidence_level)

    def ratios(interval: Interval | None) -> Interval | None:
        if interval is None:
            return None
        return Interval(math.exp(interval.low), math.exp(interval.high), interval.level)

    back = MarginTest(estimate=math.exp(test.estimate), interval=ratios(test.interval),
                      difference_interval=ratios(test.difference_interval), p_lower=test.p_lower,
                      p_upper=test.p_upper, statistics=test.statistics, df=test.df,
                      details=dict(test.details, log_difference=test.estimate),
                      warnings=test.warnings)
    tests = "two one-sided t-tests" if ends.equivalence else "a one-sided t-test"
    how = (f"{tests} on the logarithms: the ratio of the geometric means of group 1 to group 2 "
           f"({test.details['base_method']})")
    return margin_result(back, ends, keys=(f"equivalence_log_{spread}", f"noninferiority_log_{spread}"),
                         names=NAMES, estimate_name=RATIO_NAME,
                         statistic_name=f"{_SPREAD_NAMES[spread]} t", how=how,
                         margin_note=margin_note)


def equivalence_log_t(x: Any, y: Any, *, low: float, high: float, spread: str = "welch",
                      confidence_level: float = 0.95, margin_note: str | None = None) -> ProcedureResult:
    """Equivalence of the ratio of geometric means, group 1 over group 2, within ``low`` to
    ``high`` (a ratio margin such as 0.80 to 1.25): two one-sided t-tests on the logarithms
    against log(low) and log(high), the estimate and intervals taken back to ratios. Every value
    must be positive."""
    return _log_t(x, y, _ratio_ends(low, high), spread, confidence_level, margin_note)


def noninferiority_log_t(x: Any, y: Any, *, margin: float, worse: str, spread: str = "welch",
                         confidence_level: float = 0.95, margin_note: str | None = None) -> ProcedureResult:
    """Non-inferiority of the ratio of geometric means: the one-sided t-test on the logarithms
    against the log of the allowed ratio on the worse side (``ratio_worse_end``)."""
    return _log_t(x, y, ratio_worse_end(margin, worse), spread, confidence_level, margin_note)
