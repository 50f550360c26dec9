"""The z-test with known SDs, the pooled-variance t-test and the Welch t-test.

In all three the estimate is mean(group 1) - mean(group 2), the statistic is that
difference over its standard error, and the p-value and interval come from the normal
distribution (z) or a Student t distribution (pooled, Welch).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from ..errors import DataProblem, OptionProblem
from ..group_stats import GroupStats
from ..results import Interval, ProcedureResult, frozen_mapping
from ..stats_basics import Normal, StudentT, centred_sd, common_scale, critical_value, statistic_p
from ._checks import check_alternative, check_confidence_level, check_samples

__all__ = ["z_test", "pooled_t", "welch_t", "mean_difference", "Moments", "moments", "stats_moments",
           "two_groups", "NAMES"]

# The plain name of each procedure in this module (engine.procedures.registry shows them).
NAMES = frozen_mapping({
    "welch_t": "Welch t-test",
    "pooled_t": "pooled t-test",
    "z": "z-test with known SDs",
})


def mean_difference(x: np.ndarray, y: np.ndarray) -> tuple[float, float, float]:
    """Return (mean of x, mean of y, mean of x - mean of y), the difference found accurately.

    Notes
    -----
    Both samples are first shifted by a common reference c (the mean of all values), so the
    difference is mean(x - c) - mean(y - c). When the values share many leading digits (as in the
    NIST StRD AtmWtAg set) the shifted values are small and exact, and the difference keeps
    digits that mean(x) - mean(y) would lose to rounding. Values near the ends of the float range
    are divided by a power of two first (:func:`engine.summary.common_scale`), so that their sum
    cannot overflow.
    """
    scale = common_scale(x, y)
    if scale != 1.0:
        return tuple(part * scale for part in _mean_difference(x / scale, y / scale))
    return _mean_difference(x, y)


def _mean_difference(x: np.ndarray, y: np.ndarray) -> tuple[float, float, float]:
    centre = float(np.concatenate((x, y)).mean())
    dx, dy = x - centre, y - centre
    shift_x, shift_y = float(dx.mean()), float(dy.mean())
    # one correction step for each shifted mean (the deviations' mean of the deviations)
    shift_x += float((dx - shift_x).mean())
    shift_y += float((dy - shift_y).mean())
    return centre + shift_x, centre + shift_y, shift_x - shift_y


def _check_known_sd(sd: Any) -> tuple[float, float]:
    try:
        first, second = (float(s) for s in sd)
    except (TypeError, ValueError):
        raise OptionProblem(
            "The known standard deviations must be given as two numbers, group 1 first.") from None
    for which, value in (("group 1", first), ("group 2", second)):
        if not (math.isfinite(value) and value > 0):
            raise OptionProblem(
                f"The known standard deviation of {which} must be a positive number, not {value}.")
    return first, second


def _check_spread(m: "Moments") -> tuple[str, ...]:
    """Refuse two constant groups; warn when one group is constant.

    "Constant" means every value is the same number, checked on the values themselves: a spread
    too small to square in floating point (distinct values near 1e-300) is still a spread.
    """
    if m.constant_1 and m.constant_2:
        raise DataProblem(
            "Every value within group 1 is the same and so is every value within group 2; "
            "with no spread at all the t-tests cannot be computed.")
    for which, constant in (("group 1", m.constant_1), ("group 2", m.constant_2)):
        if constant:
            return (f"All values in {which} are equal, so its spread is zero; the result rests "
                    f"on the spread of the other group alone.",)
    return ()


def _result(
    key: str,
    *,
    estimate: float,
    standard_error: float,
    df: float | None,
    alternative: str,
    level: float,
    method: str,
    details: dict[str, Any],
    warnings: tuple[str, ...] = (),
    scale: float = 1.0,
    statistic: float | None = None,
) -> ProcedureResult:
    """The result from the estimate and its standard error, both in units of ``scale``.

    ``statistic``, if given, is estimate / standard error found without their own underflow.
    """
    distribution = Normal() if df is None else StudentT(df)
    if statistic is None:
        statistic = estimate / standard_error
    p_value = statistic_p(statistic, alternative, distribution)
    critical = critical_value(level, alternative, distribution)
    half_width = critical * standard_error
    interval = Interval.for_alternative((estimate - half_width) * scale,
                                        (estimate + half_width) * scale, level, alternative)
    details = dict(details, standard_error=standard_error * scale, critical_value=critical)
    return ProcedureResult(
        key=key,
        name=NAMES[key],
        estimate=estimate * scale,
        estimate_name="difference in means",
        statistic=float(statistic),
        statistic_name="z" if df is None else "t",
        df=None if df is None else float(df),
        p_value=p_value,
        interval=interval,
        alternative=alternative,
        method=method,
        details=details,
        warnings=warnings,
    )


def _shifted(value: float, exponent: int) -> float:
    """value * 2**exponent, infinite or zero (never an error) beyond the float range."""
    try:
        return math.ldexp(value, exponent)
    except OverflowError:
        return math.copysign(math.inf, value)


def _exponent(power_of_two: float) -> int:
    return math.frexp(power_of_two)[1] - 1


def _sd_parts(values: np.ndarray, sd: float | None = None) -> tuple[float, int]:
    """(a, k) with SD = a * 2**k, a at most about 3: the SD whatever the size of the values.

    ``sd``, when given, is the SD itself (``values`` then holds just that number, to find its
    scale); otherwise the SD of ``values`` is computed."""
    own = common_scale(values)
    if sd is not None:
        return sd / own, _exponent(own)
    return centred_sd(values / own if own != 1.0 else values), _exponent(own)


@dataclass(frozen=True)
class Moments:
    """Means and difference of two groups in units of ``scale``; their SDs in units of 2**``unit_exponent``.

    ``scale`` is a power of two near the largest |value| (1.0 for values of ordinary size) and
    2**``unit_exponent`` one near the larger SD, so that ``sd_1`` and ``sd_2`` lie in [0, 2)
    and may be squared, and squared again, without overflow or underflow. ``constant_1`` and
    ``constant_2`` say whether every value of a group is the same number.
    """

    scale: float
    mean_1: float
    mean_2: float
    difference: float
    sd_1: float
    sd_2: float
    unit_exponent: int
    constant_1: bool
    constant_2: bool

    def in_sd_units(self, value: float) -> float:
        """A value in units of ``scale`` (the difference, say) in units of 2**unit_exponent."""
        return _shifted(value, _exponent(self.scale) - self.unit_exponent)

    def in_scale_units(self, value: float) -> float:
        """A value in units of 2**unit_exponent (a standard error) in units of ``scale``."""
        return _shifted(value, self.unit_exponent - _exponent(self.scale))

    def absolute(self, value: float) -> float:
        """A value in units of 2**unit_exponent (an SD) in the units of the data."""
        return _shifted(value, self.unit_exponent)


def moments(x: np.ndarray, y: np.ndarray) -> Moments:
    """The means, difference and SDs of two groups, scaled so that nothing overflows.

    Notes
    -----
    The values are divided by their common power of two (:func:`engine.summary.common_scale`),
    which rounds nothing, so data of ordinary size give exactly the numbers of the plain
    formulas; the means and their difference are found on the scaled values. Each SD is found
    on its own group's scale and expressed in units of a power of two near the larger SD, so
    that neither the variances nor the squared variances of the Welch degrees of freedom
    overflow (spreads near 1e80 and beyond) or underflow (distinct values near 1e-300), even when
    the two groups differ in size by hundreds of orders of magnitude.
    """
    scale = common_scale(x, y)
    xs, ys = (x / scale, y / scale) if scale != 1.0 else (x, y)
    return _assembled(scale, *_mean_difference(xs, ys), _sd_parts(x), _sd_parts(y),
                      bool(x.min() == x.max()), bool(y.min() == y.max()))


def stats_moments(first: GroupStats, second: GroupStats) -> Moments:
    """:func:`moments` of two groups known by their summary statistics.

    The means are scaled by their common power of two and each SD is put in the same units as
    :func:`moments` puts the SD of the values, so that the summaries of two groups give the
    numbers their values give (the difference in means apart, which the values give with a few
    more correct digits).
    """
    scale = common_scale(np.array([first.mean, second.mean]))
    mean_1, mean_2 = first.mean / scale, second.mean / scale
    sd_1, sd_2 = first.standard_deviation, second.standard_deviation
    return _assembled(scale, mean_1, mean_2, mean_1 - mean_2, _sd_parts(np.array([sd_1]), sd_1),
                      _sd_parts(np.array([sd_2]), sd_2), sd_1 == 0, sd_2 == 0)


def _assembled(scale: float, mean_1: float, mean_2: float, difference: float,
               parts_1: tuple[float, int], parts_2: tuple[float, int], constant_1: bool,
               constant_2: bool) -> Moments:
    """The :class:`Moments` from the scaled means and each SD as (a, k) with SD = a * 2**k."""
    (a_1, k_1), (a_2, k_2) = parts_1, parts_2
    exponents = [math.frexp(a)[1] + k for a, k in ((a_1, k_1), (a_2, k_2)) if a > 0]
    unit_exponent = max(exponents) if exponents else 0
    return Moments(scale, mean_1, mean_2, difference,
                   _shifted(a_1, k_1 - unit_exponent), _shifted(a_2, k_2 - unit_exponent),
                   unit_exponent, constant_1, constant_2)


def two_groups(x: Any, y: Any) -> tuple[Moments, int, int]:
    """The :class:`Moments` and sizes of two groups given as values (each checked) or as two
    :class:`engine.group_stats.GroupStats`."""
    if isinstance(x, GroupStats) and isinstance(y, GroupStats):
        return stats_moments(x, y), x.n, y.n
    if isinstance(x, GroupStats) or isinstance(y, GroupStats):
        raise OptionProblem("Give both groups as values or both as summary statistics, not one of each.")
    x, y = check_samples(x, y)
    return moments(x, y), x.size, y.size


def _prepare(x: Any, y: Any, alternative: Any, confidence_level: Any):
    return (*two_groups(x, y), check_alternative(alternative), check_confidence_level(confidence_level))


def z_test(
    x: Any,
    y: Any,
    *,
    sd: tuple[float, float],
    alternative: str = "two-sided",
    confidence_level: float = 0.95,
) -> ProcedureResult:
    """Compare two means when both population standard deviations are known.

    Parameters
    ----------
    x, y : array-like of float, or two GroupStats
        Group 1 and group 2, at least two finite values each, or each group's summary
        statistics (:class:`engine.group_stats.GroupStats`).
    sd : (float, float)
        The known population standard deviations of group 1 and group 2.
    alternative : {"two-sided", "less", "greater"}
        "greater" means group 1 has the larger mean.
    confidence_level : float
        Coverage of the interval, strictly between 0 and 1.

    Returns
    -------
    ProcedureResult
        Key "z"; statistic z, no degrees of freedom.

    Notes
    -----
    z = (mean1 - mean2) / sqrt(sd1^2 / n1 + sd2^2 / n2), referred to the standard normal
    distribution; the interval is (mean1 - mean2) -/+ z_crit * SE.

    References
    ----------
    Snedecor, G. W. and Cochran, W. G. (1989). Statistical Methods, 8th ed., Iowa State
    University Press, section 6.
    """
    m, n_x, n_y, alternative, level = _prepare(x, y, alternative, confidence_level)
    sd_x, sd_y = _check_known_sd(sd)
    mean_x, mean_y, estimate = (part * m.scale for part in (m.mean_1, m.mean_2, m.difference))
    # in units of the larger SD, so that the squares cannot overflow or underflow
    unit = max(sd_x, sd_y)
    standard_error = math.sqrt((sd_x / unit) ** 2 / n_x + (sd_y / unit) ** 2 / n_y)
    return _result(
        "z", estimate=estimate / unit, standard_error=standard_error, df=None,
        alternative=alternative, level=level, scale=unit,
        method="normal distribution, with the standard deviations supplied as known",
        details=dict(n_1=n_x, n_2=n_y, mean_1=mean_x, mean_2=mean_y, known_sd_1=sd_x,
                     known_sd_2=sd_y),
    )


def pooled_t(
    x: Any,
    y: Any,
    *,
    alternative: str = "two-sided",
    confidence_level: float = 0.95,
) -> ProcedureResult:
    """Student's two-sample t-test with one variance pooled from both groups.

    Parameters
    ----------
    x, y : array-like of float, or two GroupStats
        Group 1 and group 2, at least two finite values each, or each group's summary
        statistics (:class:`engine.group_stats.GroupStats`).
    alternative : {"two-sided", "less", "greater"}
        "greater" means group 1 has the larger mean.
    confidence_level : float
        Coverage of the interval, strictly between 0 and 1.

    Returns
    -------
    ProcedureResult
        Key "pooled_t"; df = n1 + n2 - 2; ``details["pooled_variance"]``.

    Raises
    ------
    DataProblem
        If neither group has any spread.

    Notes
    -----
    s_p^2 = ((n1 - 1) s1^2 + (n2 - 1) s2^2) / (n1 + n2 - 2),
    t = (mean1 - mean2) / (s_p sqrt(1/n1 + 1/n2)), referred to Student's t with n1 + n2 - 2 df.
    Its square is the one-way analysis-of-variance F for two groups.

    References
    ----------
    Student (1908). The probable error of a mean. Biometrika 6(1), 1-25.
    Snedecor, G. W. and Cochran, W. G. (1989). Statistical Methods, 8th ed., section 6.7.
    """
    m, n_x, n_y, alternative, level = _prepare(x, y, alternative, confidence_level)
    warnings = _check_spread(m)
    df = n_x + n_y - 2
    # variances in units of 2**m.unit_exponent squared
    var_x, var_y = m.sd_1**2, m.sd_2**2
    pooled = ((n_x - 1) * var_x + (n_y - 1) * var_y) / df
    standard_error = math.sqrt(pooled * (1 / n_x + 1 / n_y))
    return _result(
        "pooled_t", estimate=m.difference, standard_error=m.in_scale_units(standard_error),
        df=df, alternative=alternative, level=level, scale=m.scale,
        statistic=m.in_sd_units(m.difference) / standard_error,
        method="Student t distribution with n1 + n2 - 2 degrees of freedom, one variance "
               "pooled from both groups",
        details=dict(n_1=n_x, n_2=n_y, mean_1=m.mean_1 * m.scale, mean_2=m.mean_2 * m.scale,
                     variance_1=_squared(m.absolute(m.sd_1)),
                     variance_2=_squared(m.absolute(m.sd_2)),
                     pooled_variance=_squared(m.absolute(math.sqrt(pooled)))),
        warnings=warnings,
    )


def welch_t(
    x: Any,
    y: Any,
    *,
    alternative: str = "two-sided",
    confidence_level: float = 0.95,
) -> ProcedureResult:
    """Welch's t-test: each group keeps its own variance; Welch-Satterthwaite degrees of freedom.

    Parameters
    ----------
    x, y : array-like of float, or two GroupStats
        Group 1 and group 2, at least two finite values each, or each group's summary
        statistics (:class:`engine.group_stats.GroupStats`).
    alternative : {"two-sided", "less", "greater"}
        "greater" means group 1 has the larger mean.
    confidence_level : float
        Coverage of the interval, strictly between 0 and 1.

    Returns
    -------
    ProcedureResult
        Key "welch_t"; df is fractional in general.

    Raises
    ------
    DataProblem
        If neither group has any spread.

    Notes
    -----
    With v_i = s_i^2 / n_i: SE = sqrt(v1 + v2), t = (mean1 - mean2) / SE and
    df = (v1 + v2)^2 / (v1^2 / (n1 - 1) + v2^2 / (n2 - 1)).

    References
    ----------
    Welch, B. L. (1947). The generalization of "Student's" problem when several different
    population variances are involved. Biometrika 34(1-2), 28-35.
    Satterthwaite, F. E. (1946). An approximate distribution of estimates of variance
    components. Biometrics Bulletin 2(6), 110-114.
    """
    m, n_x, n_y, alternative, level = _prepare(x, y, alternative, confidence_level)
    warnings = _check_spread(m)
    # v_i = s_i^2 / n_i in units of 2**m.unit_exponent squared: below 4, and the larger at
    # least 1 / (4 n_i), so v_i^2 neither overflows nor leaves both terms zero
    v_x, v_y = m.sd_1**2 / n_x, m.sd_2**2 / n_y
    df = (v_x + v_y) ** 2 / (v_x**2 / (n_x - 1) + v_y**2 / (n_y - 1))
    standard_error = math.sqrt(v_x + v_y)
    return _result(
        "welch_t", estimate=m.difference, standard_error=m.in_scale_units(standard_error),
        df=df, alternative=alternative, level=level, scale=m.scale,
        statistic=m.in_sd_units(m.difference) / standard_error,
        method="Student t distribution with Welch-Satterthwaite degrees of freedom, each "
               "group with its own variance",
        details=dict(n_1=n_x, n_2=n_y, mean_1=m.mean_1 * m.scale, mean_2=m.mean_2 * m.scale,
                     variance_1=_squared(m.absolute(m.sd_1)),
                     variance_2=_squared(m.absolute(m.sd_2))),
        warnings=warnings,
    )


def _squared(value: float) -> float:
    """value * value, infinite (not an error) where the square exceeds the largest float."""
    return value * value
