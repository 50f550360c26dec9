"""Exact power of the t and z tests under normal spread: Welch, pooled, paired and z, for a
difference (two- or one-sided) and for non-inferiority; equivalence in
:mod:`engine.planning.equivalence_power`.

The estimate D (difference in means, or mean of the pair differences) is normal with mean delta
and standard error SE at the planned SDs. The t statistic D / SE_hat then follows a noncentral t
distribution with noncentrality delta / SE: exactly so for the pooled and paired t-tests, and for
Welch's test approximately, with the Welch-Satterthwaite degrees of freedom worked out at the
planned SDs (the usual planning approximation). The z-test's power is in closed form.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..noncentral_t import nct_cdf

__all__ = ["Spread", "spread", "power_of_shift", "test_shift", "root_mean_square"]


def _scale(sd1: float, sd2: float) -> float:
    """A power of two near the larger SD: the SDs are divided by it before they are squared, so
    that SDs near 1e300 or 1e-300 give what they give in ordinary units (a power of two rounds
    nothing, so ordinary SDs give the same bits as without it)."""
    top = max(abs(sd1), abs(sd2))
    if not math.isfinite(top) or top == 0.0:
        return 1.0
    return math.ldexp(1.0, math.frexp(top)[1])


def root_mean_square(sd1: float, sd2: float) -> float:
    """sqrt((sd1^2 + sd2^2) / 2), without overflow or underflow."""
    scale = _scale(sd1, sd2)
    a, b = sd1 / scale, sd2 / scale
    return scale * math.sqrt((a * a + b * b) / 2.0)


@dataclass(frozen=True)
class Spread:
    """The estimate's true standard error ``se`` at the planned SDs and sizes, and the test's
    degrees of freedom ``df`` (None for the z-test)."""

    se: float
    df: float | None


def spread(procedure: str, design: str, sd1: float, sd2: float, n1: float, n2: float) -> Spread:
    """:class:`Spread` of a planned study (sizes may be fractional while a size is searched).

    Notes
    -----
    Paired: SE = sd_d / sqrt(n), df = n - 1. z: SE = sqrt(sd1^2 / n1 + sd2^2 / n2). Pooled:
    SE = sd sqrt(1 / n1 + 1 / n2), df = n1 + n2 - 2. Welch: with v_i = sd_i^2 / n_i,
    SE = sqrt(v1 + v2) and df = (v1 + v2)^2 / (v1^2 / (n1 - 1) + v2^2 / (n2 - 1)).
    """
    if design == "paired":
        return Spread(sd1 / math.sqrt(n1), None if procedure == "z" else n1 - 1.0)
    if procedure == "pooled":
        return Spread(sd1 * math.sqrt(1.0 / n1 + 1.0 / n2), n1 + n2 - 2.0)
    scale = _scale(sd1, sd2)
    a, b = sd1 / scale, sd2 / scale
    v1, v2 = a * a / n1, b * b / n2  # the variances of the means over scale^2
    se = scale * math.sqrt(v1 + v2)
    if procedure == "z":
        return Spread(se, None)
    df = (v1 + v2) ** 2 / (v1 * v1 / (n1 - 1.0) + v2 * v2 / (n2 - 1.0))
    return Spread(se, df)


def _upper(nc: float, critical: float, df: float | None) -> float:
    """P(T > critical) for T noncentral t (df, nc), or normal with mean nc when df is None."""
    from scipy.special import ndtr

    if df is None:
        return float(ndtr(nc - critical))
    return 1.0 - nct_cdf(critical, df, nc)[0]


def _lower(nc: float, critical: float, df: float | None) -> float:
    """P(T < -critical)."""
    from scipy.special import ndtr

    if df is None:
        return float(ndtr(-nc - critical))
    return nct_cdf(-critical, df, nc)[0]


def critical(alpha: float, df: float | None) -> float:
    """The upper ``alpha`` point of the test's null distribution (normal or Student t)."""
    from scipy.special import ndtri, stdtrit

    return float(-ndtri(alpha)) if df is None else float(-stdtrit(df, alpha))


def power_of_shift(shift: float, spread_: Spread, alpha: float, alternative: str) -> float:
    """Power of a test at level ``alpha`` when its estimate sits ``shift`` above its null value.

    Notes
    -----
    With nc = shift / SE and c the upper alpha (one-sided) or alpha / 2 (two-sided) point of
    the null distribution: "greater" P(T > c); "less" P(T < -c); "two-sided" the sum of both
    tails, P(T > c) + P(T < -c), as the rejection region of the two-sided test has both.

    References
    ----------
    Cohen, J. (1988). Statistical Power Analysis for the Behavioral Sciences, 2nd ed., chapter 2.
    Julious, S. A. (2004). Sample sizes for clinical trials with normal data. Statistics in
    Medicine 23(12), 1921-1986.
    """
    nc = shift / spread_.se
    df = spread_.df
    if alternative == "two-sided":
        c = critical(alpha / 2.0, df)
        return min(1.0, _upper(nc, c, df) + _lower(nc, c, df))
    c = critical(alpha, df)
    return _upper(nc, c, df) if alternative == "greater" else _lower(nc, c, df)


def test_shift(difference: float, kind: str, bound: float | None) -> float:
    """How far the true ``difference`` lies from the null value of the test: itself for a
    question of difference, its distance from the margin's worse end (``bound``) for
    non-inferiority (H0: difference at or beyond ``bound``)."""
    if kind == "not_worse":
        return difference - bound
    return difference
