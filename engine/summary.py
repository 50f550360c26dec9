"""Descriptive statistics of one group."""

from __future__ import annotations

from typing import Any

import numpy as np

from .errors import OptionProblem
from .results import GroupSummary
from .stats_basics import centred_sd, centred_variance, common_scale, quartiles

__all__ = ["summarize", "centred_variance", "centred_sd", "common_scale", "sorted_values"]


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


def summarize(label: str, values: np.ndarray, *, ordered: Any = None) -> GroupSummary:
    """Mean, SD, median, extremes and quartiles of one group.

    Quartiles use linear interpolation between order statistics (Hyndman and Fan's type 7, the
    default of numpy and pandas; :func:`engine.stats_basics.quartiles`). ``ordered``, if given,
    is ``np.sort(values)``, used for the quantiles and extremes (mean and SD are taken from ``values`` in their own order).
    """
    values = np.asarray(values, dtype=float)
    if values.size == 0:
        nan = float("nan")
        return GroupSummary(label, 0, nan, nan, nan, nan, nan, nan, nan)
    ordered = sorted_values(values, ordered, name=f"group '{label}'")
    q1, median, q3 = quartiles(ordered, ordered=True)
    scale = common_scale(ordered)
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
