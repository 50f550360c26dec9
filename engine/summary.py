"""Descriptive statistics of one group."""

from __future__ import annotations

from typing import Any

import numpy as np

from .errors import OptionProblem
from .results import GroupSummary

__all__ = ["summarize", "centred_variance", "sorted_values"]


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


def centred_variance(values: np.ndarray) -> float:
    """Sample variance (n - 1 denominator) by the two-pass, corrected formula.

    Notes
    -----
    With mean m and deviations d_i = x_i - m, the variance is
    (sum d_i^2 - (sum d_i)^2 / n) / (n - 1). The second term corrects the rounding error left in
    m; data with many constant leading digits (the NIST StRD AtmWtAg set has seven) defeat the
    one-pass formula (sum x^2 - n m^2) but not this one.

    References
    ----------
    Chan, T. F., Golub, G. H. and LeVeque, R. J. (1983). Algorithms for computing the sample
    variance: analysis and recommendations. The American Statistician 37(3), 242-247.
    """
    values = np.asarray(values, dtype=float)
    n = values.size
    if n < 2:
        return float("nan")
    deviations = values - values.mean()
    return float((np.dot(deviations, deviations) - deviations.sum() ** 2 / n) / (n - 1))


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
    q1, median, q3 = np.quantile(ordered, [0.25, 0.5, 0.75])
    return GroupSummary(
        label=label,
        n=int(values.size),
        mean=float(values.mean()),
        sd=float(np.sqrt(centred_variance(values))) if values.size > 1 else float("nan"),
        median=float(median),
        min=float(ordered[0]),
        max=float(ordered[-1]),
        q1=float(q1),
        q3=float(q3),
    )
