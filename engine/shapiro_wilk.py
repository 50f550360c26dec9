"""The Shapiro-Wilk check of normality, by Royston's approximations (algorithm AS R94).

Written here, on ``scipy.special`` alone, so that an analysis does not import the whole of
``scipy.stats`` (most of a second) for this one test.
"""

from __future__ import annotations

import math

import numpy as np

__all__ = ["shapiro_wilk", "MIN_N", "MAX_N"]

# The approximations hold for 3 to 5000 values.
MIN_N = 3
MAX_N = 5000

# Royston (1992, 1995): the polynomials in 1/sqrt(n) for the two largest coefficients, and
# those in n (up to 11 values) or log n for the mean and log SD of the normalising transform.
_C1 = (0.0, 0.221157, -0.147981, -2.071190, 4.434685, -2.706056)
_C2 = (0.0, 0.042981, -0.293762, -1.752461, 5.682633, -3.582633)
_C3 = (0.5440, -0.39978, 0.025054, -6.714e-4)
_C4 = (1.3822, -0.77857, 0.062767, -0.0020322)
_C5 = (-1.5861, -0.31082, -0.083751, 0.0038915)
_C6 = (-0.4803, -0.082676, 0.0030302)
_G = (-2.273, 0.459)


def _poly(coefficients: tuple[float, ...], x: float) -> float:
    """c0 + c1 x + c2 x^2 + ..., by Horner's rule."""
    total = 0.0
    for c in reversed(coefficients):
        total = total * x + c
    return total


def _coefficients(n: int) -> np.ndarray:
    """The coefficients a_1 ... a_{n//2} of the lower half (the upper half mirrors them)."""
    from scipy.special import ndtri

    if n == 3:
        return np.array([math.sqrt(0.5)])
    m = ndtri((np.arange(1, n // 2 + 1) - 0.375) / (n + 0.25))  # Blom's normal scores, negative
    summ2 = 2.0 * float(np.dot(m, m))
    ssumm2 = math.sqrt(summ2)
    rsn = 1.0 / math.sqrt(n)
    a1 = _poly(_C1, rsn) - m[0] / ssumm2
    if n > 5:
        a2 = -m[1] / ssumm2 + _poly(_C2, rsn)
        fac = math.sqrt((summ2 - 2 * m[0] ** 2 - 2 * m[1] ** 2) / (1 - 2 * a1 ** 2 - 2 * a2 ** 2))
        a = -m / fac
        a[1] = a2
    else:
        fac = math.sqrt((summ2 - 2 * m[0] ** 2) / (1 - 2 * a1 ** 2))
        a = -m / fac
    a[0] = a1
    return a


def shapiro_wilk(ordered: np.ndarray) -> tuple[float, float]:
    """W and its p-value for sorted values (3 to 5000 of them, not all equal).

    Parameters
    ----------
    ordered : numpy.ndarray
        The values in ascending order.

    Returns
    -------
    (float, float)
        The statistic W and the p-value (small when the values depart from a normal shape).

    Notes
    -----
    W is the squared correlation between the sorted values and the coefficients a, which
    Royston approximates from Blom's normal scores m_i = Phi^-1((i - 3/8) / (n + 1/4)) with
    polynomial corrections for the two outermost. 1 - W is found directly (as
    (sqrt(S_aa S_xx) - S_ax)(sqrt(S_aa S_xx) + S_ax) / (S_aa S_xx)) so that W near 1 keeps its
    digits. The p-value refers log(1 - W) (n > 11), or -log(gamma - log(1 - W)) (4 to 11 values),
    to a normal distribution with mean and SD polynomial in log n (or n); for n = 3 the
    distribution of W is exact: p = 6/pi (arcsin sqrt W - pi/3). Shifting and scaling the values
    changes nothing: they are centred on their median and divided by their range first.

    References
    ----------
    Shapiro, S. S. and Wilk, M. B. (1965). An analysis of variance test for normality (complete
    samples). Biometrika 52(3-4), 591-611.
    Royston, P. (1992). Approximating the Shapiro-Wilk W-test for non-normality. Statistics and
    Computing 2, 117-119.
    Royston, P. (1995). Remark AS R94: a remark on algorithm AS 181: the W-test for normality.
    Applied Statistics 44(4), 547-551.
    """
    from scipy.special import ndtr

    values = np.asarray(ordered, dtype=float)
    n = values.size
    half = n // 2
    a = _coefficients(n)
    weights = np.zeros(n)
    weights[:half] = -a
    weights[n - half:] = a[::-1]
    spread = float(values[-1] - values[0])
    centred = (values - values[half]) / spread
    deviations = centred - centred.mean()
    weights -= weights.mean()
    ssa = float(np.dot(weights, weights))
    ssx = float(np.dot(deviations, deviations))
    sax = float(np.dot(weights, deviations))
    root = math.sqrt(ssa * ssx)
    w1 = (root - sax) * (root + sax) / (ssa * ssx)
    w = 1.0 - w1
    if n == 3:
        return w, max(0.0, 6.0 / math.pi * (math.asin(math.sqrt(w)) - math.pi / 3.0))
    y = math.log(w1)
    if n <= 11:
        gamma = _poly(_G, n)
        if y >= gamma:
            return w, 0.0
        y = -math.log(gamma - y)
        mean, sd = _poly(_C3, n), math.exp(_poly(_C4, n))
    else:
        log_n = math.log(n)
        mean, sd = _poly(_C5, log_n), math.exp(_poly(_C6, log_n))
    return w, float(ndtr(-(y - mean) / sd))
