"""Brent's method for the root of a function of one variable in a bracket.

Written here so that an analysis does not import ``scipy.optimize`` (with scipy.linalg and
scipy.sparse behind it, about half a second) for the few roots the effect sizes need.
"""

from __future__ import annotations

from typing import Callable

__all__ = ["brent_root"]

_EPS = 2.0 ** -52


def brent_root(f: Callable[[float], float], a: float, b: float, *, xtol: float = 2e-12,
               rtol: float = 4 * _EPS, maxiter: int = 100) -> float:
    """A root of ``f`` between ``a`` and ``b``, where f(a) and f(b) differ in sign.

    Parameters
    ----------
    f : callable(float) -> float
        Continuous on [a, b].
    a, b : float
        The ends of the bracket.
    xtol, rtol : float
        The root is found to within xtol + rtol |x|.
    maxiter : int
        Most evaluations after the two ends.

    Raises
    ------
    ValueError
        If f(a) and f(b) have the same sign, or no root is found in ``maxiter`` steps.

    Notes
    -----
    Each step keeps a bracket [x, x_blk] around the root with |f(x)| <= |f(x_blk)| and tries an
    inverse quadratic interpolation through the last three points (a secant step through two),
    taking it only when it falls well inside the bracket and shrinks faster than the step
    before; otherwise it bisects. The same steps and stopping rule as ``scipy.optimize.brentq``.

    References
    ----------
    Brent, R. P. (1973). Algorithms for Minimization without Derivatives. Prentice-Hall,
    chapter 4.
    """
    fpre, fcur = f(a), f(b)
    xpre, xcur = a, b
    if fpre * fcur > 0:
        raise ValueError("the function has the same sign at both ends of the bracket")
    if fpre == 0:
        return xpre
    if fcur == 0:
        return xcur
    xblk = fblk = spre = scur = 0.0
    for _ in range(maxiter):
        if fpre != 0 and fcur != 0 and (fpre < 0) != (fcur < 0):
            xblk, fblk = xpre, fpre
            spre = scur = xcur - xpre
        if abs(fblk) < abs(fcur):
            xpre, xcur, xblk = xcur, xblk, xcur
            fpre, fcur, fblk = fcur, fblk, fcur
        delta = (xtol + rtol * abs(xcur)) / 2
        sbis = (xblk - xcur) / 2
        if fcur == 0 or abs(sbis) < delta:
            return xcur
        if abs(spre) > delta and abs(fcur) < abs(fpre):
            if xpre == xblk:  # secant
                stry = -fcur * (xcur - xpre) / (fcur - fpre)
            else:  # inverse quadratic interpolation
                dpre = (fpre - fcur) / (xpre - xcur)
                dblk = (fblk - fcur) / (xblk - xcur)
                stry = -fcur * (fblk * dblk - fpre * dpre) / (dblk * dpre * (fblk - fpre))
            if 2 * abs(stry) < min(abs(spre), 3 * abs(sbis) - delta):
                spre, scur = scur, stry
            else:
                spre = scur = sbis
        else:
            spre = scur = sbis
        xpre, fpre = xcur, fcur
        xcur += scur if abs(scur) > delta else (delta if sbis > 0 else -delta)
        fcur = f(xcur)
    raise ValueError(f"no root was found in {maxiter} steps")
