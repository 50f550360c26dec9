"""The statistics every part of the engine shares, each written once.

One sample SD (with the power-of-two scaling that keeps squares in range), one quantile rule
(quartiles included), Tukey's fences, the tail of a confidence level, and a p-value from a
statistic's distribution (with the normal and Student t distributions it is read from). Only
numpy is imported up front and ``scipy.special`` when a distribution is first asked for: the
file reader uses the quartiles before the window's first paint, and the whole of
``scipy.stats`` costs most of a second to import.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Sequence

import numpy as np

__all__ = [
    "common_scale",
    "centred_variance",
    "centred_sd",
    "quantiles",
    "quartiles",
    "MILD_FENCE",
    "FAR_FENCE",
    "Fences",
    "tukey_fences",
    "tail_alpha",
    "tail_p",
    "Normal",
    "StudentT",
    "statistic_p",
    "critical_value",
]

# Values whose largest size lies in this range are used as they are: their squares, sums of
# squares and squared variances stay far from overflow and underflow (2**60 is about 1.2e18).
_PLAIN_RANGE = (2.0**-60, 2.0**60)

# Tukey's fences: beyond 1.5 IQR from the quartiles is a mild outlier, beyond 3 IQR a far one
# (common practice, Tukey 1977).
MILD_FENCE = 1.5
FAR_FENCE = 3.0


# ---------------------------------------------------------------------------- spread

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


def centred_variance(values: Any) -> float:
    """Sample variance (n - 1 denominator) by the two-pass, corrected formula.

    Notes
    -----
    With mean m and deviations d_i = x_i - m, the variance is
    (sum d_i^2 - (sum d_i)^2 / n) / (n - 1). The second term corrects the rounding error left in
    m; data with many constant leading digits (the NIST StRD AtmWtAg set has seven) defeat the
    one-pass formula (sum x^2 - n m^2) but not this one. Very large or very small values are
    first divided by a power of two (:func:`common_scale`); the variance itself is then
    infinite only where it exceeds the largest float (use :func:`centred_sd` there) and zero
    only where it is below the smallest. NaN for fewer than two values.

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


def centred_sd(values: Any) -> float:
    """Sample standard deviation (n - 1 denominator); finite whenever it fits a float.

    The square root is taken before the scale is multiplied back (see :func:`centred_variance`),
    so the SD of 3.5 and 1e308 comes out as about 7.07e307 although its square does not fit.
    NaN for fewer than two values.
    """
    values = np.asarray(values, dtype=float)
    if values.size < 2:
        return float("nan")
    scale = common_scale(values)
    return math.sqrt(_variance(values / scale if scale != 1.0 else values)) * scale


# ---------------------------------------------------------------------------- quantiles

def _between(low: float, high: float, weight: float) -> float:
    """The point ``weight`` of the way from ``low`` to ``high``, as numpy's "linear" rule forms it.

    From the nearer end (low + (high - low) w below w = 1/2, high - (high - low)(1 - w) from it
    on), so a weight of 0 or 1 gives the order statistic itself. Where high - low exceeds the
    largest float both ends are halved first (exact for values that large) and the result doubled.
    """
    if weight == 0.0:
        return low
    gap = high - low
    if math.isinf(gap):
        return 2.0 * _between(low / 2.0, high / 2.0, weight)
    return low + gap * weight if weight < 0.5 else high - gap * (1.0 - weight)


def quantiles(values: Any, fractions: Sequence[float], *, ordered: bool = False) -> tuple[float, ...]:
    """Quantiles of ``values`` by linear interpolation between order statistics.

    Parameters
    ----------
    values : array-like of float
        Finite values, at least one.
    fractions : sequence of float
        Each in [0, 1].
    ordered : bool
        True when ``values`` are already in ascending order (then nothing is sorted).

    Notes
    -----
    Hyndman and Fan's definition 7, numpy's default "linear" method: with h = (n - 1) p and
    x_(1) <= ... <= x_(n), Q(p) = x_(floor h + 1) + (h - floor h)(x_(floor h + 2) - x_(floor h + 1)).
    Same numbers as ``numpy.quantile(values, fractions)`` (the interpolation is formed the way
    numpy forms it), also where numpy's difference of two order statistics would overflow. The
    order statistics of unsorted values come from a partial sort (O(n)).

    References
    ----------
    Hyndman, R. J. and Fan, Y. (1996). Sample quantiles in statistical packages. The American
    Statistician 50(4), 361-365.
    """
    array = np.asarray(values, dtype=float)
    n = array.size
    positions = [(n - 1) * float(p) for p in fractions]
    indexes = [(math.floor(h), min(math.floor(h) + 1, n - 1)) for h in positions]
    if not ordered:
        needed = sorted({i for pair in indexes for i in pair})
        array = np.partition(array, needed)
    result = []
    for h, (below, above) in zip(positions, indexes):
        if h >= n - 1:
            result.append(float(array[n - 1]))
        else:
            result.append(_between(float(array[below]), float(array[above]), h - below))
    return tuple(result)


def quartiles(values: Any, *, ordered: bool = False) -> tuple[float, float, float]:
    """First quartile, median and third quartile by the rule of :func:`quantiles`."""
    return quantiles(values, (0.25, 0.5, 0.75), ordered=ordered)  # type: ignore[return-value]


# ---------------------------------------------------------------------------- fences

@dataclass(frozen=True)
class Fences:
    """Tukey's fences around the quartiles ``q1`` and ``q3``.

    A value below ``mild_low`` or above ``mild_high`` (1.5 IQR beyond a quartile) is a mild
    outlier, one below ``far_low`` or above ``far_high`` (3 IQR) a far one. A fence beyond the
    largest float is infinite, and rightly so: no value can lie beyond it.
    """

    q1: float
    q3: float
    mild_low: float
    mild_high: float
    far_low: float
    far_high: float

    def beyond_mild(self, values: np.ndarray) -> np.ndarray:
        """Which values lie beyond the mild (inner) fences, far ones included."""
        return (values < self.mild_low) | (values > self.mild_high)

    def beyond_far(self, values: np.ndarray) -> np.ndarray:
        """Which values lie beyond the far (outer) fences."""
        return (values < self.far_low) | (values > self.far_high)


def tukey_fences(q1: float, q3: float) -> Fences:
    """The mild (1.5 IQR) and far (3 IQR) fences around the quartiles ``q1`` and ``q3``.

    Notes
    -----
    With IQR = q3 - q1: mild fences q1 - 1.5 IQR and q3 + 1.5 IQR, far fences q1 - 3 IQR and
    q3 + 3 IQR. Found in Python floats, whose overflow gives an infinity without a warning.

    References
    ----------
    Tukey, J. W. (1977). Exploratory Data Analysis. Addison-Wesley, section 2C.
    """
    q1, q3 = float(q1), float(q3)
    iqr = q3 - q1
    return Fences(q1, q3, q1 - MILD_FENCE * iqr, q3 + MILD_FENCE * iqr,
                  q1 - FAR_FENCE * iqr, q3 + FAR_FENCE * iqr)


# ---------------------------------------------------------------------------- tails and p-values

def tail_alpha(level: float, alternative: str) -> float:
    """The probability in each open tail of an interval: (1 - level) / 2 two-sided, else 1 - level."""
    return (1 - level) / 2 if alternative == "two-sided" else 1 - level


def tail_p(cdf_at: float, sf_at: float, alternative: str) -> float:
    """The p-value from the two tail probabilities of the observed statistic.

    ``cdf_at`` is P(S <= s) and ``sf_at`` is P(S >= s) under the null distribution (for a
    continuous S, P(S > s)). "greater" (group 1 larger) takes the upper tail, "less" the lower
    one, "two-sided" twice the smaller tail, at most 1.
    """
    if alternative == "greater":
        return min(1.0, float(sf_at))
    if alternative == "less":
        return min(1.0, float(cdf_at))
    return min(1.0, 2.0 * min(float(cdf_at), float(sf_at)))


@dataclass(frozen=True)
class Normal:
    """The standard normal distribution (``scipy.special.ndtr`` and ``ndtri``).

    The same numbers as ``scipy.stats.norm``, whose cdf, sf and isf are these functions.
    """

    def cdf(self, x: float) -> float:
        from scipy.special import ndtr

        return float(ndtr(x))

    def sf(self, x: float) -> float:
        from scipy.special import ndtr

        return float(ndtr(-x))

    def isf(self, q: float) -> float:
        from scipy.special import ndtri

        return float(-ndtri(q))


@dataclass(frozen=True)
class StudentT:
    """Student's t distribution with ``df`` degrees of freedom (``scipy.special.stdtr``, ``stdtrit``).

    The same numbers as ``scipy.stats.t(df)``, whose cdf, sf and isf are these functions.
    """

    df: float

    def cdf(self, x: float) -> float:
        from scipy.special import stdtr

        return float(stdtr(self.df, x))

    def sf(self, x: float) -> float:
        from scipy.special import stdtr

        return float(stdtr(self.df, -x))

    def isf(self, q: float) -> float:
        from scipy.special import stdtrit

        return float(-stdtrit(self.df, q))


def statistic_p(statistic: float, alternative: str, distribution: Normal | StudentT) -> float:
    """:func:`tail_p` of ``statistic`` under a continuous null ``distribution``."""
    return tail_p(distribution.cdf(statistic), distribution.sf(statistic), alternative)


def critical_value(level: float, alternative: str, distribution: Normal | StudentT) -> float:
    """The point of ``distribution`` with :func:`tail_alpha` above it: an interval's multiplier."""
    return distribution.isf(tail_alpha(level, alternative))
