"""The Brunner-Munzel test of P(X > Y) + P(X = Y) / 2 = 1/2, with an interval for that probability.

Unlike the Mann-Whitney test, it does not assume that the two groups have the same shape and
spread when they do not differ: it studentizes the rank statistic with the spread of each
group's placements (how many values of the other group lie below each value), as Welch's test
studentizes a difference in means.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np
from scipy import special

from ..results import Interval, ProcedureResult, frozen_mapping
from ..rounding import level_text, p_clause
from ..stats_basics import Normal, StudentT, centred_variance, statistic_p, tail_alpha
from ..summary import sorted_values
from .probability_interval import newcombe_limits
from ._checks import (
    check_alternative, check_choice, check_confidence_level, check_samples,
)
from .ranks import pair_counts

__all__ = ["brunner_munzel", "placements", "NAMES"]

# The plain name of the procedure in this module (engine.procedures.registry shows it).
NAMES = frozen_mapping({"brunner_munzel": "Brunner-Munzel test, probability of a larger value"})

DISTRIBUTIONS = ("t", "normal")


def placements(xs: np.ndarray, ys: np.ndarray) -> np.ndarray:
    """For each value of sorted ``xs``: the number of values of sorted ``ys`` below it, ties half.

    Notes
    -----
    The placement of x_i is #{j: y_j < x_i} + #{j: y_j = x_i} / 2, which equals its mid-rank in
    the combined sample minus its mid-rank within its own group.

    References
    ----------
    Orban, J. and Wolfe, D. A. (1982). A class of distribution-free two-sample tests based on
    placements. Journal of the American Statistical Association 77(379), 666-672.
    """
    below, at_or_below = pair_counts(xs, ys)
    return (below + at_or_below) / 2.0


def _separation_p(n1: int, n2: int, upward: bool, alternative: str) -> float:
    """Permutation probability of a split at least as extreme as complete separation."""
    one_way = math.exp(-(special.gammaln(n1 + n2 + 1) - special.gammaln(n1 + 1)
                         - special.gammaln(n2 + 1)))  # 1 / C(N, n1)
    if alternative == "two-sided":
        return min(1.0, 2 * one_way)
    return one_way if (alternative == "greater") == upward else 1.0


def brunner_munzel(
    x: Any,
    y: Any,
    *,
    alternative: str = "two-sided",
    confidence_level: float = 0.95,
    distribution: str = "t",
    sorted_x: np.ndarray | None = None,
    sorted_y: np.ndarray | None = None,
) -> ProcedureResult:
    """Brunner-Munzel test with an interval for the probability that group 1 gives the larger value.

    Parameters
    ----------
    x, y : array-like of float
        Group 1 and group 2, at least two finite values each.
    alternative : {"two-sided", "less", "greater"}
        "greater" means a value of group 1 tends to be the larger (probability above 1/2).
    confidence_level : float
        Coverage of the interval for the probability, strictly between 0 and 1.
    distribution : {"t", "normal"}
        Reference distribution of the statistic: Student's t with the Satterthwaite-type degrees
        of freedom (the small-sample approximation of Brunner and Munzel), or the standard normal
        (the large-sample form).
    sorted_x, sorted_y : numpy.ndarray, optional
        ``np.sort(x)`` and ``np.sort(y)`` when the caller has them already.

    Returns
    -------
    ProcedureResult
        Key "brunner_munzel"; estimate p = P(X > Y) + P(X = Y) / 2 estimated by U1 / (n1 n2);
        statistic W (positive when group 1 tends to be larger); df; ``details`` with U1, both
        placement variances, the standard error of the estimate and the method used.

    Notes
    -----
    With placements P_i of group 1 among group 2 and Q_j of group 2 among group 1 (ties half),
    p = mean(P) / n2 = U1 / (n1 n2). With S1 = var(P) and S2 = var(Q) (n - 1 denominators) and
    V = n1 S1 + n2 S2, the standard error of p is sqrt(V) / (n1 n2) and

        W = (p - 1/2) n1 n2 / sqrt(V),
        df = V^2 / ((n1 S1)^2 / (n1 - 1) + (n2 S2)^2 / (n2 - 1)).

    (S1 and S2 equal Brunner and Munzel's variances of the combined minus internal mid-ranks.)
    The interval is computed on the logit scale, logit(p) +- q se / (p (1 - p)), with q the t
    (or normal) quantile, and mapped back, so it stays inside (0, 1). It is not the inverse of
    the test (which studentizes on the probability scale), so near the boundary the two can
    disagree; in tests/benchmarks/sim_ranks.py (normal, SDs 4 : 1, n 8 / 25) the interval was
    on the safe side (coverage 0.986) while the test rejected 6.3% at 0.05. The t approximation is
    studied for groups of about 10 and more; with fewer it tends to reject a little too often
    (recalled from Neubert and Brunner 2007; the simulation script in tests/benchmarks measures
    it for 8 against 25 values).

    When both placement variances are zero the statistic is undefined: either every value is
    the same (p = 1/2; the p-value is 1) or every value of one group lies above every value of
    the other (p = 0 or 1). The latter gets the permutation probability of so complete a
    separation, 1 / C(N, n1) one-sided (twice that two-sided), the value the studentized
    permutation version of the test (Neubert and Brunner 2007) gives. In both cases the interval
    is Newcombe's method 5 (:func:`engine.procedures.probability_interval.newcombe_limits`), which needs no placement
    variance; a warning says so.

    References
    ----------
    Brunner, E. and Munzel, U. (2000). The nonparametric Behrens-Fisher problem: asymptotic
    theory and a small-sample approximation. Biometrical Journal 42(1), 17-25.
    Neubert, K. and Brunner, E. (2007). A studentized permutation test for the non-parametric
    Behrens-Fisher problem. Computational Statistics & Data Analysis 51(10), 5192-5204.
    Pauly, M., Asendorf, T. and Konietschke, F. (2016). Permutation-based inference for the AUC:
    a unified approach for continuous and discontinuous data. Biometrical Journal 58(6),
    1319-1337 (the logit-transformed interval).
    Pratt, J. W. (1964). Robustness of some procedures for the two-sample location problem.
    Journal of the American Statistical Association 59(307), 665-680.
    """
    x, y = check_samples(x, y)
    alternative = check_alternative(alternative)
    level = check_confidence_level(confidence_level)
    distribution = check_choice(distribution, DISTRIBUTIONS, what="reference distribution")
    n1, n2 = x.size, y.size
    xs = sorted_values(x, sorted_x, name="group 1")
    ys = sorted_values(y, sorted_y, name="group 2")
    p_x = placements(xs, ys)
    p_y = placements(ys, xs)
    u1 = float(p_x.sum())
    estimate = u1 / (n1 * n2)
    s1 = centred_variance(p_x)
    s2 = centred_variance(p_y)
    v = n1 * s1 + n2 * s2
    details: dict[str, Any] = dict(U1=u1, n_1=n1, n_2=n2, placement_variance_1=s1,
                                   placement_variance_2=s2, distribution=distribution)
    warnings: list[str] = []
    tail = tail_alpha(level, alternative)
    if v > 0:
        se = math.sqrt(v) / (n1 * n2)
        w = (estimate - 0.5) / se
        df = v * v / ((n1 * s1) ** 2 / (n1 - 1) + (n2 * s2) ** 2 / (n2 - 1))
        dist = StudentT(df) if distribution == "t" else Normal()
        p_value = statistic_p(w, alternative, dist)
        details.update(standard_error=se, degenerate=False)
        if 0 < estimate < 1:
            q = float(dist.isf(tail))
            centre = math.log(estimate / (1 - estimate))
            half = q * se / (estimate * (1 - estimate))
            low, high = float(special.expit(centre - half)), float(special.expit(centre + half))
        else:  # cannot happen with v > 0 (a separation has both placement variances zero)
            low, high = estimate, estimate
        method = ("Brunner-Munzel statistic (rank statistic over the spread of each group's "
                  "placements) against "
                  + (f"Student's t with {df:.3g} degrees of freedom" if distribution == "t"
                     else "the standard normal")
                  + "; interval for the probability on the logit scale")
        statistic = w
        df_shown = df if distribution == "t" else None
    else:
        low, high = newcombe_limits(estimate, x.size, y.size, level, alternative)
        low = 0.0 if alternative == "less" else low  # the open end of a one-sided interval
        high = 1.0 if alternative == "greater" else high
        df_shown = None
        details.update(standard_error=0.0, degenerate=True)
        if estimate == 0.5:
            statistic, p_value = 0.0, 1.0
            warnings.append("Every value in both groups is the same, so the test has nothing to "
                            "go on and the p-value is 1.")
            method = "no test possible: every value is tied"
        else:
            upward = estimate > 0.5
            statistic = math.inf if upward else -math.inf
            p_value = _separation_p(n1, n2, upward, alternative)
            higher, lower = ("group 1", "group 2") if upward else ("group 2", "group 1")
            warnings.append(
                f"Every value of {higher} lies above every value of {lower}, so the spread of the "
                "placements is zero and the t approximation cannot be used; the p-value is the "
                "chance of so complete a separation if the group labels were shuffled.")
            method = "permutation probability of complete separation"
            if p_value >= 1 - level and not low <= 0.5 <= high:
                # Newcombe's interval knows nothing of the shuffling behind this p-value; with
                # so few values the separation is not clear at this level, so the interval is
                # taken to 1/2 to agree with the test.
                low, high = min(low, 0.5), max(high, 0.5)
                warnings.append(
                    f"With so few values even a complete separation is not clear at the "
                    f"{level_text(level)} level ({p_clause(p_value)}), so the interval is extended to "
                    "1/2 to agree with the test.")
        method += "; interval for the probability by Newcombe's method 5"
    return ProcedureResult(
        key="brunner_munzel",
        name=NAMES["brunner_munzel"],
        estimate=estimate,
        estimate_name="probability that the first group's value is the larger (ties count half)",
        statistic=statistic,
        statistic_name="W",
        df=df_shown,
        p_value=p_value,
        interval=Interval.for_alternative(low, high, level, alternative),
        alternative=alternative,
        method=method,
        details=details,
        warnings=tuple(warnings),
    )
