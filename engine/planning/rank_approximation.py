"""The usual asymptotic power of the Mann-Whitney test (Noether's formula), an approximation.

With N = n1 + n2 values, c = n1 / N and p = P(X > Y) for a value X of group 1 and Y of group 2,
U / (n1 n2) is near p with null variance (N + 1) / (12 n1 n2); Noether (1987) takes the null
variance throughout, so that z = (p - 1/2) sqrt(12 c (1 - c) N) and the power is
Phi(z - z_crit) one-sided, the sum of both tails two-sided. It ignores the change of U's
variance away from the null and the discreteness of U, and is least right for small samples and
large effects; the simulation answers both.
"""

from __future__ import annotations

import math

import numpy as np

from .shapes import cdf, quantile

__all__ = ["probability_greater", "noether_power"]

_NODES, _WEIGHTS = np.polynomial.legendre.leggauss(32)
_PANELS = 64


def probability_greater(difference: float, sd1: float, sd2: float, shape: str) -> float:
    """P(X > Y) for X = difference + sd1 Z1 and Y = sd2 Z2, Z1 and Z2 independent of ``shape``.

    Notes
    -----
    Normal: Phi(difference / sqrt(sd1^2 + sd2^2)). Otherwise the integral over Y's probability
    scale, P = int_0^1 [1 - F((sd2 Q(u) - difference) / sd1)] du, by Gauss-Legendre quadrature
    (64 panels of 32 nodes, denser towards both ends where Q grows fast).
    """
    if shape == "normal":
        from scipy.special import ndtr

        return float(ndtr(difference / math.hypot(sd1, sd2)))
    # panels evenly spaced on the logit scale, so the tails get their share
    edges = 1.0 / (1.0 + np.exp(-np.linspace(-40.0, 40.0, _PANELS + 1)))
    half = np.diff(edges)[:, None] / 2
    points = (edges[:-1, None] + half) + half * _NODES[None, :]
    values = 1.0 - cdf(shape, (sd2 * quantile(shape, points) - difference) / sd1)
    return float(np.sum(values * half * _WEIGHTS[None, :]))


def noether_power(probability: float, n1: float, n2: float, alpha: float, alternative: str) -> float:
    """Noether's approximate power of the Mann-Whitney test at level ``alpha``.

    References
    ----------
    Noether, G. E. (1987). Sample size determination for some common nonparametric tests.
    Journal of the American Statistical Association 82(398), 645-647.
    """
    from scipy.special import ndtr, ndtri

    total = n1 + n2
    share = n1 / total
    z = (probability - 0.5) * math.sqrt(12.0 * share * (1.0 - share) * total)
    if alternative == "two-sided":
        c = -float(ndtri(alpha / 2.0))
        return min(1.0, float(ndtr(z - c) + ndtr(-z - c)))
    c = -float(ndtri(alpha))
    return float(ndtr(z - c)) if alternative == "greater" else float(ndtr(-z - c))
