"""Standardised effect sizes of matched pairs (group 1 minus group 2, pair by pair).

Two sizes that answer different questions, named so they are not mixed up:

- d_z, "d of the differences": mean(d) / sd(d). It measures the difference against the spread
  of the differences, so it grows as the pairing removes more of the variation between units;
  its interval is exact for bell-shaped differences (noncentral t, n - 1 degrees of freedom).
- d_av, "d over the average SD": mean(d) / ((sd1 + sd2) / 2), the difference against the
  average spread of the two groups' own values, on the same scale as a d of two independent
  groups. Its interval is approximate (see :func:`paired_d_av`).
"""

from __future__ import annotations

import math
from typing import Any

from .errors import DataProblem
from .noncentral_t import BY_INTEGRAL, limits_or_problem
from .procedures._checks import check_alternative, check_confidence_level
from .procedures.paired import paired_values, scaled_moments
from .results import EffectSize, Interval
from .stats_basics import centred_sd, common_scale

__all__ = ["paired_d_z", "paired_d_av", "paired_effect_sizes"]

_D_Z = "d of the differences (d_z)"
_D_AV = "d over the average SD of the two groups (d_av)"


def _d_z_parts(x: Any, y: Any, confidence_level: float, alternative: str):
    """The checked inputs, and the mean and SD of the differences in units of ``scale``."""
    level = check_confidence_level(confidence_level)
    alternative = check_alternative(alternative)
    first, second, d = paired_values(x, y)
    mean, sd, scale = scaled_moments(d)
    if not sd > 0:
        raise DataProblem("Every pair differs by the same amount, so the differences have no "
                          "spread and a standardised difference of pairs is not defined.")
    t = mean / sd * math.sqrt(d.size)
    return first, second, d, level, alternative, mean, sd, scale, t


def paired_d_z(x: Any, y: Any, *, confidence_level: float = 0.95,
               alternative: str = "two-sided") -> EffectSize:
    """d_z = mean(d) / sd(d), d = x - y pair by pair, with its exact noncentral t interval.

    Notes
    -----
    With n pairs, t = d_z sqrt(n) is the paired t statistic; for normal differences it follows a
    noncentral t with n - 1 degrees of freedom and noncentrality delta_z sqrt(n). The interval
    holds the delta_z whose noncentral t puts the observed t at its 1 - alpha/2 and alpha/2
    points (alpha one-sided), divided by sqrt(n).

    References
    ----------
    Cohen, J. (1988). Statistical Power Analysis for the Behavioral Sciences, 2nd ed., section
    2.3 (d_z of paired differences). Steiger, J. H. and Fouladi, R. T. (1997). Noncentrality
    interval estimation and the evaluation of statistical models. In What If There Were No
    Significance Tests?, Erlbaum, 221-257.
    """
    _, _, d, level, alternative, mean, sd, scale, t = _d_z_parts(x, y, confidence_level,
                                                                 alternative)
    n = d.size
    nc_low, nc_high, integrated = limits_or_problem(_D_Z, t, n - 1, level, alternative)
    root_n = math.sqrt(n)
    return EffectSize(
        key="paired_d_z", name=_D_Z, value=mean / sd,
        interval=Interval.for_alternative(nc_low / root_n, nc_high / root_n, level, alternative),
        method=("mean of the pair differences over their standard deviation; interval from "
                "the noncentral t distribution with n - 1 degrees of freedom (exact for "
                "bell-shaped differences)" + (BY_INTEGRAL if integrated else "")),
        details=dict(pairs=int(n), df=n - 1, t=t, sd_of_differences=sd * scale,
                     noncentrality_interval=(nc_low, nc_high),
                     interval_by_integration=integrated),
    )


def paired_d_av(x: Any, y: Any, *, confidence_level: float = 0.95,
                alternative: str = "two-sided") -> EffectSize:
    """d_av = mean(d) / ((sd1 + sd2) / 2), with an approximate interval.

    Notes
    -----
    The interval is the exact interval of d_z (:func:`paired_d_z`) multiplied by
    sd(d) / ((sd1 + sd2) / 2), so it treats that ratio as known: approximate, as it leaves out
    the ratio's own sampling error (the "approximate noncentral t" interval that Algina and
    Keselman 2003 studied for standardised paired differences; reference recalled from memory:
    Algina, J. and Keselman, H. J. (2003), Approximate confidence intervals for effect sizes,
    Educational and Psychological Measurement 63(4), 537-553). Its coverage is close to the
    stated level when the two groups' SDs are alike (checked by simulation in the tests).
    """
    first, second, d, level, alternative, mean, sd, scale, t = _d_z_parts(
        x, y, confidence_level, alternative)
    # one power of two for both groups and the differences, so no ratio below overflows
    common = common_scale(first, second, d)
    sd_1, sd_2 = centred_sd(first / common), centred_sd(second / common)
    average = (sd_1 + sd_2) / 2
    mean, sd = mean * (scale / common), sd * (scale / common)
    if not average > 0:
        raise DataProblem("Every value within each group is the same, so the average standard "
                          "deviation is zero and d over the average SD is not defined.")
    n = d.size
    nc_low, nc_high, integrated = limits_or_problem(_D_AV, t, n - 1, level, alternative)
    factor = sd / average / math.sqrt(n)
    return EffectSize(
        key="paired_d_av", name=_D_AV, value=mean / average,
        interval=Interval.for_alternative(nc_low * factor, nc_high * factor, level, alternative),
        method=("mean of the pair differences over the average of the two groups' standard "
                "deviations; approximate interval: the noncentral t interval of d_z rescaled "
                "by the ratio of the SD of the differences to the average SD, that ratio taken "
                "as known" + (BY_INTEGRAL if integrated else "")),
        details=dict(pairs=int(n), sd_1=sd_1 * common, sd_2=sd_2 * common,
                     average_sd=average * common, sd_of_differences=sd * common,
                     interval_approximate=True,
                     interval_by_integration=integrated),
    )


def paired_effect_sizes(x: Any, y: Any, *, confidence_level: float = 0.95,
                        alternative: str = "two-sided"
                        ) -> tuple[dict[str, EffectSize], dict[str, str]]:
    """Both paired sizes by key ("paired_d_z", "paired_d_av"), and for each one left out the
    sentence that says why (as :func:`engine.effects.effect_sizes_with_reasons`)."""
    sizes: dict[str, EffectSize] = {}
    reasons: dict[str, str] = {}
    for key, build in (("paired_d_z", paired_d_z), ("paired_d_av", paired_d_av)):
        try:
            sizes[key] = build(x, y, confidence_level=confidence_level, alternative=alternative)
        except DataProblem as problem:
            reasons[key] = problem.message
    return sizes, reasons
