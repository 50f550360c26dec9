"""Descriptive statistics of one group."""

from __future__ import annotations

import numpy as np

from .results import GroupSummary

__all__ = ["summarize", "centred_variance"]


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


def summarize(label: str, values: np.ndarray) -> GroupSummary:
    """Mean, SD, median, extremes and quartiles of one group.

    Quartiles use linear interpolation between order statistics (Hyndman and Fan's type 7, the
    default of numpy and pandas).
    """
    values = np.asarray(values, dtype=float)
    if values.size == 0:
        nan = float("nan")
        return GroupSummary(label, 0, nan, nan, nan, nan, nan, nan, nan)
    q1, median, q3 = np.quantile(values, [0.25, 0.5, 0.75])
    return GroupSummary(
        label=label,
        n=int(values.size),
        mean=float(values.mean()),
        sd=float(np.sqrt(centred_variance(values))) if values.size > 1 else float("nan"),
        median=float(median),
        min=float(values.min()),
        max=float(values.max()),
        q1=float(q1),
        q3=float(q3),
    )
