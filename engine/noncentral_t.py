"""The noncentral t distribution's cdf and the noncentrality limits behind the exact intervals of
standardised differences (Cohen's d, Hedges' g, Glass's delta, and d of paired differences).

The observed t of a standardised difference follows a noncentral t distribution; inverting its
cdf in the noncentrality gives the interval (Steiger and Fouladi 1997, noncentrality interval
estimation). scipy's series answers in the usual range; far out a numerical integral stands in.
"""

from __future__ import annotations

import math
from typing import Callable

import numpy as np
from scipy import special

from .errors import DataProblem
from .root_finding import brent_root
from .stats_basics import tail_alpha

__all__ = ["NoInterval", "nct_cdf", "nct_cdf_integral", "noncentrality_limits",
           "limits_or_problem", "BY_INTEGRAL"]


class NoInterval(ArithmeticError):
    """The noncentral t limits could not be found; the message says why, in plain words."""


# The integral over Z in :func:`nct_cdf_integral` stops at this many standard deviations: the
# normal mass beyond is below 1e-32, far under any tail a confidence level asks for.
_Z_REACH = 12.0
# Composite Gauss-Legendre rule: 16 nodes on each of 32 panels (and a panel edge at the kink).
_GAUSS_NODES, _GAUSS_WEIGHTS = np.polynomial.legendre.leggauss(16)
_PANELS = 32
# Above this |t| scipy's series for the noncentral t is slow and gives NaN far out (checked with
# scipy 1.17 at 1e6): the integral, within 1e-8 of it at 1e4, is used at once.
_SERIES_REACH = 1e4


def _integrate(integrand: Callable[[np.ndarray], np.ndarray], low: float, high: float,
               kink: float | None) -> float:
    """Integral of a smooth ``integrand`` (vectorised) over [low, high], split at ``kink``."""
    edges = np.linspace(low, high, _PANELS + 1)
    if kink is not None and low < kink < high:
        edges = np.sort(np.append(edges, kink))
    half = np.diff(edges)[:, None] / 2
    points = (edges[:-1, None] + half) + half * _GAUSS_NODES[None, :]
    return float(np.sum(integrand(points) * (half * _GAUSS_WEIGHTS[None, :])))


def nct_cdf_integral(t: float, df: float, nc: float) -> float:
    """P(T <= t) for T noncentral t (df, nc), by numerical integration; finite for any finite input.

    Notes
    -----
    T = (Z + nc) / S with Z standard normal and S = sqrt(V / df), V chi-squared with df degrees
    of freedom, so P(T <= t) = P(t S - Z >= nc). When |t| is large against the spread of S the
    integrand is smooth in z: P = integral of phi(z) P(t S >= nc + z) dz, with the chi-squared
    tail in closed form; otherwise it is smooth in s: P = integral of Phi(t s - nc) f_S(s) ds,
    summed on the log scale (``log_ndtr`` plus the log density) so that no factor underflows
    before the product. As |t| grows the first form tends to the chi-squared tail at nc / t, the
    asymptotic limit, with no separate approximation. A composite Gauss-Legendre rule with an
    edge at the kink of the integrand gives about 1e-12 absolute accuracy (checked against
    scipy's series where that answers).
    """
    with np.errstate(all="ignore"):
        if abs(t) * math.sqrt(0.5 / df) > 1:
            def integrand(z: np.ndarray) -> np.ndarray:
                ratio = (nc + z) / t
                squared = df * ratio * ratio
                tail = special.chdtrc(df, squared) if t > 0 else special.chdtr(df, squared)
                tail = np.where(ratio > 0, tail, 1.0 if t > 0 else 0.0)
                return tail * np.exp(-0.5 * z * z - 0.5 * math.log(2 * math.pi))

            total = _integrate(integrand, -_Z_REACH, _Z_REACH, -nc)
        else:
            log_norm = (math.log(2.0) + 0.5 * df * math.log(0.5 * df)
                        - float(special.gammaln(0.5 * df)))

            def integrand(s: np.ndarray) -> np.ndarray:
                return np.exp(special.log_ndtr(t * s - nc) + log_norm + (df - 1) * np.log(s)
                              - 0.5 * df * s * s)

            # the 1e-17 and 1 - 1e-17 quantiles of S: the mass left outside is below 2e-17
            low = math.sqrt(2 * float(special.gammaincinv(0.5 * df, 1e-17)) / df)
            high = math.sqrt(2 * float(special.gammainccinv(0.5 * df, 1e-17)) / df)
            total = _integrate(integrand, low, high, nc / t if t != 0 else None)
    return min(1.0, max(0.0, total))


def nct_cdf(t: float, df: float, nc: float) -> tuple[float, bool]:
    """P(T <= t) for T noncentral t (df, nc), and whether the integral stood in for scipy's.

    scipy's series answers in the usual range; far in the tails or for very large t it returns
    NaN (no number), and the integral then gives the value.
    """
    if abs(t) < _SERIES_REACH:
        with np.errstate(all="ignore"):
            value = float(special.nctdtr(df, nc, t))
        if math.isfinite(value) and 0.0 <= value <= 1.0:
            return value, False
    return nct_cdf_integral(t, df, nc), True


def noncentrality_limits(t_observed: float, df: float,
                          tail: float) -> tuple[float, float, bool]:
    """Noncentrality parameters whose noncentral t puts ``t_observed`` at 1 - tail and tail.

    Returns the lower limit, the upper limit and whether any value came from the integral of
    :func:`nct_cdf_integral` instead of scipy's series.

    Notes
    -----
    The noncentral t cdf at a fixed point falls as the noncentrality grows, so each limit is the
    single root of cdf(t_observed; df, nc) - p. Since nc = t S - Z at the root, nc / t lies near
    a quantile of S when |t| is large: the search then runs over r = nc / t (bounded whatever the
    size of t, so nothing overflows) and over nc itself when |t| < 1. The bracket starts around
    nc = t and doubles its reach until the cdf crosses p on both sides; brentq then finds the root.

    Raises
    ------
    NoInterval
        If t is not finite or no bracket is found (neither happens for finite data).
    """
    if not (math.isfinite(t_observed) and math.isfinite(df) and df > 0):
        raise NoInterval("the t statistic behind it is not a finite number")
    unit = t_observed if abs(t_observed) >= 1 else 1.0
    centre = 1.0 if abs(t_observed) >= 1 else t_observed
    reach = 4 * (math.sqrt(0.5 / df) + 1 / abs(unit)) if abs(t_observed) >= 1 else 4.0
    integrated = False
    known: dict[float, float] = {}

    def falling(u: float, p: float) -> float:
        nonlocal integrated
        if u not in known:
            value, by_integral = nct_cdf(t_observed, df, u * unit)
            integrated = integrated or by_integral
            known[u] = value
        gap = known[u] - p
        return gap if unit > 0 else -gap  # falls as u grows, whichever the sign of t

    def root(p: float) -> float:
        low, high = centre - reach, centre + reach
        step = reach
        for _ in range(80):
            if falling(low, p) >= 0:
                break
            step *= 2
            low -= step
        else:
            raise NoInterval("no lower end was found for its search")
        step = reach
        for _ in range(80):
            if falling(high, p) <= 0:
                break
            step *= 2
            high += step
        else:
            raise NoInterval("no upper end was found for its search")
        if falling(low, p) == 0:
            return low * unit
        if falling(high, p) == 0:
            return high * unit
        return unit * brent_root(lambda u: falling(u, p), low, high, xtol=1e-14,
                                 rtol=4 * np.finfo(float).eps, maxiter=500)

    first, second = root(1 - tail), root(tail)
    if not (math.isfinite(first) and math.isfinite(second)):
        raise NoInterval("its ends lie beyond the largest number a computer float can hold")
    return first, second, integrated


BY_INTEGRAL = ("; this far out the noncentral t distribution was found by numerical "
                "integration, as the usual series gives no number there")


def limits_or_problem(name: str, t_observed: float, df: float, level: float,
            alternative: str) -> tuple[float, float, bool]:
    """The noncentrality limits, or a DataProblem that says why the interval of ``name`` is missing."""
    try:
        return noncentrality_limits(t_observed, df, tail_alpha(level, alternative))
    except (NoInterval, ArithmeticError, ValueError) as problem:
        raise DataProblem(f"The interval of {name} could not be computed: {problem}.") from None
