"""Exact power of two one-sided tests (equivalence within a margin ``low`` to ``high``).

Both one-sided tests reject, at level alpha each, exactly when the (1 - 2 alpha) interval
D -/+ c SE_hat lies inside the margin. With D ~ N(delta, SE^2) and SE_hat = SE * U, where
U^2 = V / df with V chi-squared on df degrees of freedom and independent of D, the power is

    P = E_U [ Phi((high - delta) / SE - c U) - Phi((low - delta) / SE + c U) ]^+,

an integral over U, zero beyond U = (high - low) / (2 c SE). This is the integral form of
Owen's Q function behind the usual two one-sided tests power (Owen 1965; Phillips 1990), found
here by Gauss-Legendre quadrature against U's density. It is exact for the pooled and paired
t-tests; for Welch's test SE_hat^2 is not a scaled chi-squared, and its law is approximated by
the Welch-Satterthwaite degrees of freedom at the planned SDs. Known SDs (z) give the closed form
Phi((high - delta) / SE - c) - Phi((low - delta) / SE + c), when positive.
"""

from __future__ import annotations

import math

import numpy as np

from ..noncentral_t import _integrate
from .exact_power import Spread, critical

__all__ = ["equivalence_power"]


def equivalence_power(difference: float, low: float, high: float, spread_: Spread,
                      alpha: float) -> float:
    """Power of two one-sided tests at level ``alpha`` each, true difference ``difference``.

    References
    ----------
    Owen, D. B. (1965). A special case of a bivariate non-central t-distribution. Biometrika
    52(3-4), 437-446.
    Phillips, K. F. (1990). Power of the two one-sided tests procedure in bioequivalence.
    Journal of Pharmacokinetics and Biopharmaceutics 18(2), 137-144.
    Schuirmann, D. J. (1987). A comparison of the two one-sided tests procedure and the power
    approach for assessing the equivalence of average bioavailability. Journal of
    Pharmacokinetics and Biopharmaceutics 15(6), 657-680.
    """
    from scipy import special

    se, df = spread_.se, spread_.df
    c = critical(alpha, df)
    upper, lower = (high - difference) / se, (low - difference) / se
    if df is None:
        return max(0.0, float(special.ndtr(upper - c) - special.ndtr(lower + c)))
    reach = (upper - lower) / (2.0 * c)  # beyond this U the interval is wider than the margin
    # the 1e-17 and 1 - 1e-17 quantiles of U: the mass left outside is below 2e-17
    first = math.sqrt(2.0 * float(special.gammaincinv(0.5 * df, 1e-17)) / df)
    last = math.sqrt(2.0 * float(special.gammainccinv(0.5 * df, 1e-17)) / df)
    end = min(last, reach)
    if end <= first:
        return 0.0
    log_norm = (math.log(2.0) + 0.5 * df * math.log(0.5 * df) - float(special.gammaln(0.5 * df)))

    def integrand(u: np.ndarray) -> np.ndarray:
        inside = special.ndtr(upper - c * u) - special.ndtr(lower + c * u)
        density = np.exp(log_norm + (df - 1.0) * np.log(u) - 0.5 * df * u * u)
        return np.maximum(inside, 0.0) * density

    with np.errstate(all="ignore"):
        total = _integrate(integrand, first, end, None)
    return min(1.0, max(0.0, total))
