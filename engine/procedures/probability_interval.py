"""Newcombe's method 5 limits for the probability that a value of group 1 exceeds one of group 2
(ties counting half): the common-language effect size's interval, and the Brunner-Munzel test's
interval where its own variance vanishes.

References
----------
Newcombe, R. G. (2006). Confidence intervals for an effect size measure based on the
Mann-Whitney statistic. Part 2: asymptotic methods and evaluation. Statistics in Medicine 25(4),
559-573.
"""

from __future__ import annotations

from ..root_finding import brent_root
from ..stats_basics import Normal, tail_alpha

__all__ = ["newcombe_variance", "newcombe_limits"]


def newcombe_variance(theta: float, n1: int, n2: int) -> float:
    half = (n1 + n2) / 2
    return theta * (1 - theta) / (n1 * n2) * (
        1 + (half - 1) * ((1 - theta) / (2 - theta) + theta / (1 + theta)))


def newcombe_limits(cl: float, n1: int, n2: int, level: float, alternative: str):
    """Newcombe's method 5 limits for P(X > Y) + 0.5 P(X = Y): roots of (A - t)^2 = z^2 V(t)."""
    z = Normal().isf(tail_alpha(level, alternative))

    def gap(theta: float) -> float:
        return (cl - theta) ** 2 - z**2 * newcombe_variance(theta, n1, n2)

    # at A = 0 or 1 the variance vanishes too, so step just inside, where (A - t)^2 < z^2 V(t)
    inside = min(0.25, z**2 / (4 * n1 * n2))
    centre = min(max(cl, inside), 1 - inside)
    low = 0.0 if cl <= 0 else brent_root(gap, 0.0, centre, xtol=1e-15)
    high = 1.0 if cl >= 1 else brent_root(gap, centre, 1.0, xtol=1e-15)
    return low, high
