"""Descriptive statistics of one group."""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from .errors import OptionProblem
from .results import GroupSummary

__all__ = ["summarize", "centred_variance", "centred_sd", "common_scale", "sorted_values"]

# Values whose largest size lies in this range are used as they are: their squares, sums of
# squares and squared variances stay far from overflow and underflow (2**60 is about 1.2e18).
_PLAIN_RANGE = (2.0**-60, 2.0**60)


def sorted_values(values: np.ndarray, ordered: Any = None, *, name: str = "the group") -> np.ndarray:
    """``values`` in ascending order: ``ordered`` when the caller already sorted them, else a sort.

    Several steps of an analysis need the same sorted groups; the caller sorts each group once
    and passes the copy on. A given copy is checked cheaply (same length, ascending), not
    compared with ``values`` value by value.

    Raises
    ------
    OptionProblem
        If ``ordered`` has another length than ``values`` or is not in ascending order.
    """
    if ordered is None:
        return np.sort(values)
    ordered = np.asarray(ordered, dtype=float)
    if ordered.shape != np.shape(values) or (ordered.size > 1 and not bool(np.all(ordered[1:] >= ordered[:-1]))):
        raise OptionProblem(f"The sorted copy of {name} does not match its values.")
    return ordered


def common_scale(*arrays: np.ndarray) -> float:
    """A power of two to divide the values by before squaring them; 1.0 when none is needed.

    Notes
    -----
    Squares of values near 1e160 overflow and those of distinct values near 1e-170 underflow,
    although the standard deviation of either fits a float. Dividing by 2**k, with k the binary
    exponent of the largest |value| less one, brings every value into [-2, 2] without rounding (a power of
    two changes only the exponent), so a statistic computed on the scaled values and multiplied
    back is the one the unscaled values would give, wherever that one does not overflow. Values
    whose largest size lies between 2**-60 and 2**60 are left as they are.
    """
    largest = 0.0
    for values in arrays:
        if values.size:
            largest = max(largest, float(values.max()), -float(values.min()))
    if largest == 0.0 or not math.isfinite(largest) or _PLAIN_RANGE[0] <= largest <= _PLAIN_RANGE[1]:
        return 1.0
    return math.ldexp(1.0, math.frexp(largest)[1] - 1)  # 2**1023 at most: the scaled values lie in [-2, 2]


def _variance(values: np.ndarray) -> float:
    n = values.size
    if n < 2:
        return float("nan")
    deviations = values - values.mean()
    return float((np.dot(deviations, deviations) - deviations.sum() ** 2 / n) / (n - 1))


def centred_variance(values: np.ndarray) -> float:
    """Sample variance (n - 1 denominator) by the two-pass, corrected formula.

    Notes
    -----
    With mean m and deviations d_i = x_i - m, the variance is
    (sum d_i^2 - (sum d_i)^2 / n) / (n - 1). The second term corrects the rounding error left in
    m; data with many constant leading digits (the NIST StRD AtmWtAg set has seven) defeat the
    one-pass formula (sum x^2 - n m^2) but not this one. Very large or very small values are
    first divided by a power of two (:func:`common_scale`); the variance itself is then
    infinite only where it exceeds the largest float (use :func:`centred_sd` there) and zero
    only where it is below the smallest.

    References
    ----------
    Chan, T. F., Golub, G. H. and LeVeque, R. J. (1983). Algorithms for computing the sample
    variance: analysis and recommendations. The American Statistician 37(3), 242-247.
    """
    values = np.asarray(values, dtype=float)
    scale = common_scale(values)
    if scale == 1.0:
        return _variance(values)
    return _variance(values / scale) * scale * scale


def centred_sd(values: np.ndarray) -> float:
    """Sample standard deviation (n - 1 denominator); finite whenever it fits a float.

    The square root is taken before the scale is multiplied back (see :func:`centred_variance`),
    so the SD of 3.5 and 1e308 comes out as about 7.07e307 although its square does not fit.
    """
    values = np.asarray(values, dtype=float)
    if values.size < 2:
        return float("nan")
    scale = common_scale(values)
    return math.sqrt(_variance(values / scale if scale != 1.0 else values)) * scale


def summarize(label: str, values: np.ndarray, *, ordered: Any = None) -> GroupSummary:
    """Mean, SD, median, extremes and quartiles of one group.

    Quartiles use linear interpolation between order statistics (Hyndman and Fan's type 7, the
    default of numpy and pandas). ``ordered``, if given, is ``np.sort(values)``, used for the
    quantiles and extremes (mean and SD are taken from ``values`` in their own order).
    """
    values = np.asarray(values, dtype=float)
    if values.size == 0:
        nan = float("nan")
        return GroupSummary(label, 0, nan, nan, nan, nan, nan, nan, nan)
    ordered = sorted_values(values, ordered, name=f"group '{label}'")
    scale = common_scale(ordered)
    q1, median, q3 = np.quantile(ordered / scale if scale != 1.0 else ordered,
                                 [0.25, 0.5, 0.75]) * scale
    mean = float(values.mean()) if scale == 1.0 else float((values / scale).mean()) * scale
    return GroupSummary(
        label=label,
        n=int(values.size),
        mean=mean,
        sd=centred_sd(values),
        median=float(median),
        min=float(ordered[0]),
        max=float(ordered[-1]),
        q1=float(q1),
        q3=float(q3),
    )
