"""p-values adjusted for testing several outcomes at once.

Holm's step-down adjustment keeps the chance of any false finding among all the outcomes (the
family-wise error rate) at most alpha, whatever the dependence between the tests. Benjamini and
Hochberg's step-up adjustment keeps the expected share of false findings among the findings (the
false discovery rate) at most alpha for independent or positively dependent tests; it finds more
when many outcomes truly differ. Bonferroni's level 1 - alpha / m gives intervals that all cover
their true differences together with chance at least 1 - alpha.
"""

from __future__ import annotations

from typing import Sequence

import numpy as np

from .errors import OptionProblem

__all__ = ["ADJUSTMENTS", "ADJUSTMENT_NAMES", "holm", "benjamini_hochberg", "adjusted",
           "bonferroni_level"]

ADJUSTMENTS = ("holm", "bh")
ADJUSTMENT_NAMES = {"holm": "Holm (family-wise error)", "bh": "Benjamini-Hochberg (false discovery rate)"}


def _checked(p_values: Sequence[float]) -> np.ndarray:
    p = np.asarray(p_values, dtype=float)
    if p.ndim != 1 or not np.all((p >= 0) & (p <= 1)):
        raise OptionProblem("p-values to adjust must be a list of numbers from 0 to 1.")
    return p


def holm(p_values: Sequence[float]) -> np.ndarray:
    """Holm's step-down adjusted p-values, in the order given.

    Notes
    -----
    With the m p-values sorted, p_(1) <= ... <= p_(m), the adjusted value of the i-th is
    max over j <= i of min(1, (m - j + 1) p_(j)). An outcome is a finding at level alpha when its
    adjusted p-value is at most alpha.

    References
    ----------
    Holm, S. (1979). A simple sequentially rejective multiple test procedure. Scandinavian
    Journal of Statistics 6(2), 65-70.
    """
    p = _checked(p_values)
    m = p.size
    order = np.argsort(p, kind="stable")
    stepped = np.minimum(1.0, (m - np.arange(m)) * p[order])
    out = np.empty(m)
    out[order] = np.maximum.accumulate(stepped)
    return out


def benjamini_hochberg(p_values: Sequence[float]) -> np.ndarray:
    """Benjamini and Hochberg's step-up adjusted p-values, in the order given.

    Notes
    -----
    With the m p-values sorted, the adjusted value of the i-th is min over j >= i of
    min(1, m p_(j) / j).

    References
    ----------
    Benjamini, Y. and Hochberg, Y. (1995). Controlling the false discovery rate: a practical and
    powerful approach to multiple testing. Journal of the Royal Statistical Society B 57(1),
    289-300.
    """
    p = _checked(p_values)
    m = p.size
    order = np.argsort(p, kind="stable")
    scaled = np.minimum(1.0, m * p[order] / np.arange(1, m + 1))
    out = np.empty(m)
    out[order] = np.minimum.accumulate(scaled[::-1])[::-1]
    return out


def adjusted(p_values: Sequence[float], method: str) -> np.ndarray:
    """The p-values adjusted by ``method``: "holm" or "bh"."""
    if method == "holm":
        return holm(p_values)
    if method == "bh":
        return benjamini_hochberg(p_values)
    raise OptionProblem(f"The adjustment must be 'holm' or 'bh', not '{method}'.")


def bonferroni_level(level: float, m: int) -> float:
    """The confidence level of each of ``m`` intervals that cover together at ``level``:
    1 - (1 - level) / m."""
    if not (0 < level < 1) or not (isinstance(m, int) and m >= 1):
        raise OptionProblem("A Bonferroni level needs a level between 0 and 1 and at least one outcome.")
    return 1.0 - (1.0 - level) / m if m > 1 else level

