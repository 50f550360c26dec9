"""Procedures on matched pairs that work with the mean of the differences (group 1 minus group 2).

- :func:`paired_t`: the one-sample t-test of the differences, with its interval for any direction;
- :func:`paired_bootstrap_mean`: the percentile bootstrap interval of the mean difference, the
  pairs resampled whole (each resample draws n differences with replacement).

The signed-rank test and the sign-flip test of the same differences live in :mod:`.signed_rank`
and :mod:`.sign_flip`; equivalence and non-inferiority of the pairs in :mod:`.paired_margin`.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from ..errors import DataProblem
from ..results import Interval, ProcedureResult, frozen_mapping
from ..stats_basics import (StudentT, centred_sd, common_scale, critical_value, quantiles,
                           statistic_p, tail_alpha)
from ..tasks import CancelCheck, Progress, Task
from ._checks import check_alternative, check_confidence_level, check_sample
from .resampling import BOOTSTRAP_MIN_N, _check_resamples, _check_rng

__all__ = ["paired_differences", "paired_values", "common_difference", "SAME_DIFFERENCE_EPS",
           "corrected_mean", "scaled_moments", "paired_t",
           "paired_bootstrap_mean", "NAMES"]

# The plain name of each procedure in this module.
NAMES = frozen_mapping({
    "paired_t": "paired t-test",
    "paired_bootstrap_mean": "bootstrap interval, mean of the pair differences",
})

# How far apart, in machine epsilons times the largest value of either group, differences may
# lie and still be one amount. A value read from a decimal number is off by at most half an
# epsilon of its size, and so is the result of a subtraction: a difference x - y is off by at
# most (eps / 2)(|x| + |y| + |x - y|) <= 2 eps max(|x|, |y|) (the standard model of
# floating-point arithmetic: Higham 2002, Accuracy and Stability of Numerical Algorithms, 2nd
# ed., section 2.2), so two differences of one amount lie within 4 eps of the largest value;
# 8 leaves room for values that were themselves computed before they were written.
SAME_DIFFERENCE_EPS = 8.0

# Resampled indices held at once in a bootstrap batch (about 32 MB of int64).
_BATCH_INDICES = 4_000_000


def paired_differences(x: Any, y: Any, *, minimum: int = 2) -> np.ndarray:
    """``x - y`` pair by pair after checking both lists are numbers of the same length."""
    return paired_values(x, y, minimum=minimum)[2]


def paired_values(x: Any, y: Any, *, minimum: int = 2) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Both checked lists as float arrays and their differences ``x - y`` pair by pair (all
    exactly one amount when they are one amount up to rounding: :func:`common_difference`)."""
    first = check_sample(x, name="group 1", minimum=minimum)
    second = check_sample(y, name="group 2", minimum=minimum)
    if first.size != second.size:
        raise DataProblem(f"Paired groups must have one value per pair each; group 1 has "
                          f"{first.size} and group 2 has {second.size}.")
    with np.errstate(over="ignore"):
        d = first - second
    if not np.all(np.isfinite(d)):
        raise DataProblem("A pair's difference is too large to hold in a computer float.")
    same = common_difference(first, second, d)
    if same is not None:  # one amount, however the values' last binary places fell
        d = np.full(d.size, same)
    return first, second, d


def common_difference(x: np.ndarray, y: np.ndarray, d: np.ndarray) -> float | None:
    """The amount by which every pair differs, or None when the differences vary.

    ``x`` and ``y`` are the matched values as float arrays, ``d`` their differences ``x - y``.
    Differences that lie within ``SAME_DIFFERENCE_EPS`` machine epsilons of the largest value of
    one another are one amount: 12.014 - 11.994 and 11.965 - 11.945 differ in their last binary
    places, yet both are 0.02 as written, and a standard deviation made of that rounding would
    give a t in the trillions. The amount returned is the middle difference in order (no sum,
    so no overflow). :func:`paired_values` hands every procedure of pairs exactly that amount
    for each pair, so they all see differences with no spread.
    """
    if d.size == 0:
        return None
    largest = max(float(np.max(np.abs(x))), float(np.max(np.abs(y))))
    if not float(d.max()) - float(d.min()) <= SAME_DIFFERENCE_EPS * np.finfo(float).eps * largest:
        return None
    return float(np.partition(d, d.size // 2)[d.size // 2])


def corrected_mean(d: np.ndarray) -> float:
    """Mean with one correction step (the mean of the deviations from the first mean); values
    near the ends of the float range are divided by a power of two first
    (:func:`engine.stats_basics.common_scale`), so their sum cannot overflow."""
    scale = common_scale(d)
    if scale != 1.0:
        return corrected_mean(d / scale) * scale
    centre = float(d.mean())
    return centre + float((d - centre).mean())


def scaled_moments(d: np.ndarray) -> tuple[float, float, float]:
    """Mean and SD of the differences in units of ``scale`` (a power of two,
    :func:`engine.stats_basics.common_scale`), and ``scale``: their ratio is right even where
    the SD itself would overflow. SD 0 where every difference is the same."""
    scale = common_scale(d)
    scaled = d / scale if scale != 1.0 else d
    return corrected_mean(scaled), centred_sd(scaled), scale


def _moments(d: np.ndarray) -> tuple[float, float, float]:
    """Mean, standard error (both in units of ``scale``) and ``scale``; refuse differences
    with no spread."""
    mean, sd, scale = scaled_moments(d)
    if not sd > 0:
        raise DataProblem("Every pair differs by the same amount, so the differences have no "
                          "spread and the t-tests on them cannot be computed.")
    return mean, sd / math.sqrt(d.size), scale


def paired_t(x: Any, y: Any, *, alternative: str = "two-sided",
             confidence_level: float = 0.95) -> ProcedureResult:
    """The paired t-test: t = mean(d) / (sd(d) / sqrt(n)) on n - 1 degrees of freedom, d = x - y.

    ``x`` and ``y`` are the matched values, pair i in place i of each. The interval is
    mean(d) -/+ t(n - 1) quantile times the standard error, one-sided for a one-sided direction.
    """
    alternative = check_alternative(alternative)
    level = check_confidence_level(confidence_level)
    d = paired_differences(x, y)
    mean, se, scale = _moments(d)
    df = float(d.size - 1)
    distribution = StudentT(df)
    statistic = mean / se
    critical = critical_value(level, alternative, distribution)
    interval = Interval.for_alternative((mean - critical * se) * scale,
                                        (mean + critical * se) * scale, level, alternative)
    return ProcedureResult(
        key="paired_t", name=NAMES["paired_t"], estimate=mean * scale,
        estimate_name="mean of the pair differences", statistic=statistic, statistic_name="t",
        df=df, p_value=statistic_p(statistic, alternative, distribution), interval=interval,
        alternative=alternative,
        method="one-sample t-test of the pair differences (group 1 minus group 2)",
        details=dict(pairs=int(d.size), sd_of_differences=se * math.sqrt(d.size) * scale,
                     standard_error=se * scale, critical_value=critical),
    )


def paired_bootstrap_mean(x: Any, y: Any, *, alternative: str = "two-sided",
                          confidence_level: float = 0.95, n_resamples: int = 10_000,
                          rng: np.random.Generator | None = None,
                          progress: Progress | Task | None = None,
                          cancelled: CancelCheck | None = None) -> ProcedureResult:
    """Percentile bootstrap interval of the mean pair difference.

    Each resample draws n of the n differences with replacement (the pairs stay whole); the
    interval runs between the alpha and 1 - alpha quantiles of the resampled means (alpha is
    half of 1 - level for two sides), quantiles by linear interpolation as numpy's default.
    ``rng`` is a ``numpy.random.Generator`` (seed it to repeat a result). No p-value.
    ``progress(fraction, what)`` is told after each batch and ``cancelled()`` asked before it
    (``progress`` may be an :class:`engine.tasks.Task`).
    """
    alternative = check_alternative(alternative)
    level = check_confidence_level(confidence_level)
    n_resamples = _check_resamples(n_resamples)
    rng = _check_rng(rng)
    task = Task.of(progress, cancelled)
    d = paired_differences(x, y)
    n = d.size
    centre = corrected_mean(d)
    scale = common_scale(d)  # a power of two: nothing below overflows, and it divides exactly
    centred = d / scale - centre / scale  # resampled means of small deviations keep their digits
    replicates = np.empty(n_resamples)
    rows = max(1, _BATCH_INDICES // n)
    for start in range(0, n_resamples, rows):
        task.check()
        stop = min(start + rows, n_resamples)
        index = rng.integers(0, n, (stop - start, n))
        replicates[start:stop] = centred[index].mean(axis=1)
        task.report(stop / n_resamples, "bootstrap of the mean pair difference")
    replicates = (replicates + centre / scale) * scale  # within the range of the differences
    tail = tail_alpha(level, alternative)
    low, high = quantiles(replicates, (tail, 1 - tail))
    warnings = ()
    if n < BOOTSTRAP_MIN_N:
        warnings = (f"Only {n} pairs: a bootstrap interval from so few tends to be too narrow.",)
    return ProcedureResult(
        key="paired_bootstrap_mean", name=NAMES["paired_bootstrap_mean"], estimate=centre,
        estimate_name="mean of the pair differences", statistic=None, statistic_name=None,
        df=None, p_value=None,
        interval=Interval.for_alternative(low, high, level, alternative),
        alternative=alternative,
        method=(f"percentile bootstrap of the mean pair difference, {n_resamples:,} resamples "
                f"of whole pairs"),
        details=dict(pairs=int(n), n_resamples=n_resamples),
        warnings=warnings, distribution=replicates,
    )
