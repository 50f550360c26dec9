"""Standardised effect sizes of group 1 against group 2, each with its confidence interval.

Cohen's d, Hedges' g and Glass's delta scale the difference in means by a standard deviation;
the common-language effect size and the rank-biserial correlation describe how often a value of
group 1 exceeds one of group 2. All are signed: positive when group 1 tends to be larger.
"""

from __future__ import annotations

import math
from functools import cached_property
from numbers import Real
from typing import Any, Callable

import numpy as np
from scipy import optimize, special, stats

from .errors import DataProblem, OptionProblem
from .procedures._checks import check_alternative, check_confidence_level, check_samples
from .procedures.ranks import pair_counts
from .procedures.t import mean_difference
from .results import EffectSize, Interval
from .summary import centred_variance, sorted_values

__all__ = [
    "cohen_d",
    "hedges_g",
    "glass_delta",
    "rank_biserial",
    "common_language",
    "all_effect_sizes",
    "hedges_correction",
    "mann_whitney_u1",
]


class _Pair:
    """Two checked samples and the summaries the effect sizes share, each computed once."""

    def __init__(self, x: np.ndarray, y: np.ndarray, sorted_x: np.ndarray | None = None,
                 sorted_y: np.ndarray | None = None, u1: float | None = None) -> None:
        self.x, self.y = x, y
        self.n1, self.n2 = x.size, y.size
        self.sorted_x, self.sorted_y = sorted_x, sorted_y
        if u1 is not None:
            self.__dict__["u1"] = float(u1)  # given by the caller: the cached value

    @cached_property
    def variances(self) -> tuple[float, float]:
        return centred_variance(self.x), centred_variance(self.y)

    @cached_property
    def difference(self) -> float:
        return mean_difference(self.x, self.y)[2]

    @cached_property
    def u1(self) -> float:
        return mann_whitney_u1(self.x, self.y, sorted_x=self.sorted_x, sorted_y=self.sorted_y)


def _prepare(x: Any, y: Any, confidence_level: Any, alternative: Any, sorted_x=None, sorted_y=None,
             u1=None):
    x, y = check_samples(x, y)
    if u1 is not None and not (isinstance(u1, Real) and 0 <= u1 <= x.size * y.size):
        raise OptionProblem(f"U of group 1 must lie between 0 and {x.size * y.size}, not {u1!r}.")
    return (_Pair(x, y, sorted_x, sorted_y, u1), check_confidence_level(confidence_level),
            check_alternative(alternative))


def _tail(level: float, alternative: str) -> float:
    return (1 - level) / 2 if alternative == "two-sided" else 1 - level


# ---------------------------------------------------------------------------- mean-based

def hedges_correction(df: float) -> float:
    """The exact small-sample factor J(df) = Gamma(df / 2) / (sqrt(df / 2) Gamma((df - 1) / 2)).

    Notes
    -----
    E[d] = delta / J(df) for normal data, so J d is unbiased; computed with log-gamma so that
    large df do not overflow. J(df) is about 1 - 3 / (4 df - 1).

    References
    ----------
    Hedges, L. V. (1981). Distribution theory for Glass's estimator of effect size and related
    estimators. Journal of Educational Statistics 6(2), 107-128.
    """
    return math.exp(special.gammaln(df / 2) - special.gammaln((df - 1) / 2)) / math.sqrt(df / 2)


def _noncentrality_limits(t_observed: float, df: float, tail: float) -> tuple[float, float]:
    """Noncentrality parameters whose noncentral t puts ``t_observed`` at 1 - tail and tail.

    The noncentral t cdf at a fixed point falls as the noncentrality grows, so each limit is
    the single root of cdf(t_observed; df, nc) - p, found by brentq in a widening bracket.
    """
    spread = math.sqrt(1 + t_observed**2 / (2 * df))

    def root(p: float) -> float:
        def gap(nc: float) -> float:
            return float(stats.nct.cdf(t_observed, df, nc)) - p

        low, high = t_observed - 4 * spread, t_observed + 4 * spread
        step = 4 * spread
        while gap(low) < 0:
            step *= 2
            low -= step
        while gap(high) > 0:
            step *= 2
            high += step
        return float(optimize.brentq(gap, low, high, xtol=1e-14 * max(1.0, abs(t_observed)),
                                     rtol=1e-13, maxiter=500))

    return root(1 - tail), root(tail)


def _pooled_sd(pair: _Pair) -> float:
    var_x, var_y = pair.variances
    pooled = ((pair.n1 - 1) * var_x + (pair.n2 - 1) * var_y) / (pair.n1 + pair.n2 - 2)
    if pooled == 0:
        raise DataProblem("Every value within each group is the same, so the pooled standard "
                          "deviation is zero and a standardised difference is not defined.")
    return math.sqrt(pooled)


def _standardised(pair: _Pair, level: float, alternative: str, *, correct: bool) -> EffectSize:
    n1, n2 = pair.n1, pair.n2
    df = n1 + n2 - 2
    sd = _pooled_sd(pair)
    d = pair.difference / sd
    scale = math.sqrt(1 / n1 + 1 / n2)
    nc_low, nc_high = _noncentrality_limits(d / scale, df, _tail(level, alternative))
    factor = hedges_correction(df) if correct else 1.0
    interval = Interval.for_alternative(factor * nc_low * scale, factor * nc_high * scale,
                                        level, alternative)
    key, name = ("hedges_g", "Hedges' g") if correct else ("cohen_d", "Cohen's d")
    method = ("difference in means over the pooled standard deviation"
              + (", times the exact small-sample factor J" if correct else "")
              + "; interval from the noncentral t distribution")
    details = dict(pooled_sd=sd, df=df, t=d / scale, noncentrality_interval=(nc_low, nc_high))
    if correct:
        details.update(correction=factor, cohen_d=d)
    return EffectSize(key=key, name=name, value=factor * d, interval=interval, method=method,
                      details=details)


def cohen_d(x: Any, y: Any, *, confidence_level: float = 0.95,
            alternative: str = "two-sided") -> EffectSize:
    """Cohen's d: the difference in means over the pooled standard deviation.

    Parameters
    ----------
    x, y : array-like of float
        Group 1 and group 2, at least two finite values each.
    confidence_level : float
        Coverage of the interval, strictly between 0 and 1.
    alternative : {"two-sided", "less", "greater"}
        One-sided alternatives give a one-sided interval ("greater": [low, +inf)).

    Returns
    -------
    EffectSize
        Key "cohen_d"; ``details`` has the pooled SD, df and t.

    Raises
    ------
    DataProblem
        If neither group has any spread.

    Notes
    -----
    d = (mean1 - mean2) / s_p with s_p^2 = ((n1 - 1) s1^2 + (n2 - 1) s2^2) / (n1 + n2 - 2).
    With normal data and equal SDs, t = d / sqrt(1/n1 + 1/n2) follows a noncentral t
    distribution with n1 + n2 - 2 degrees of freedom and noncentrality
    delta / sqrt(1/n1 + 1/n2). The interval holds the delta whose noncentral t puts the observed
    t at the 1 - alpha/2 and alpha/2 points of its distribution (alpha for one-sided), found by
    root finding, then scaled back by sqrt(1/n1 + 1/n2).

    References
    ----------
    Cohen, J. (1988). Statistical Power Analysis for the Behavioral Sciences, 2nd ed. Erlbaum.
    Steiger, J. H. and Fouladi, R. T. (1997). Noncentrality interval estimation and the
    evaluation of statistical models. In What If There Were No Significance Tests?, Erlbaum.
    """
    return _cohen(*_prepare(x, y, confidence_level, alternative))


def hedges_g(x: Any, y: Any, *, confidence_level: float = 0.95,
             alternative: str = "two-sided") -> EffectSize:
    """Hedges' g: Cohen's d times the exact small-sample bias correction J.

    Parameters
    ----------
    x, y : array-like of float
        Group 1 and group 2, at least two finite values each.
    confidence_level : float
        Coverage of the interval, strictly between 0 and 1.
    alternative : {"two-sided", "less", "greater"}
        One-sided alternatives give a one-sided interval.

    Returns
    -------
    EffectSize
        Key "hedges_g"; ``details["correction"]`` is J, ``details["cohen_d"]`` the uncorrected d.

    Notes
    -----
    g = J(df) d with df = n1 + n2 - 2 and J(df) = Gamma(df/2) / (sqrt(df/2) Gamma((df-1)/2)),
    which makes g unbiased for delta under normality (J is about 1 - 3 / (4 df - 1)). The
    interval is the noncentral t interval of d (see :func:`cohen_d`) multiplied by J.

    References
    ----------
    Hedges, L. V. (1981). Distribution theory for Glass's estimator of effect size and related
    estimators. Journal of Educational Statistics 6(2), 107-128.
    Hedges, L. V. and Olkin, I. (1985). Statistical Methods for Meta-Analysis. Academic Press,
    chapter 5.
    """
    return _hedges(*_prepare(x, y, confidence_level, alternative))


def glass_delta(x: Any, y: Any, *, confidence_level: float = 0.95,
                alternative: str = "two-sided") -> EffectSize:
    """Glass's delta: the difference in means over group 2's standard deviation.

    Parameters
    ----------
    x, y : array-like of float
        Group 1 and group 2 (the reference group), at least two finite values each.
    confidence_level : float
        Coverage of the interval, strictly between 0 and 1.
    alternative : {"two-sided", "less", "greater"}
        One-sided alternatives give a one-sided interval.

    Returns
    -------
    EffectSize
        Key "glass_delta"; ``details`` has the reference SD and the scale of the approximation.

    Raises
    ------
    DataProblem
        If group 2 has no spread.

    Notes
    -----
    Delta = (mean1 - mean2) / s2. The interval is a noncentral t approximation with
    n2 - 1 degrees of freedom (s2 alone estimates the reference SD): with
    c = sqrt(s1^2 / (s2^2 n1) + 1 / n2), Delta / c is treated as noncentral t with
    noncentrality delta / c, the variance ratio taken as known; the noncentrality limits are
    found as for :func:`cohen_d` and multiplied by c. Were the variance ratio known this would
    be exact for normal data; with the ratio estimated it is an approximation that improves as
    both groups grow.

    References
    ----------
    Glass, G. V., McGaw, B. and Smith, M. L. (1981). Meta-Analysis in Social Research. Sage.
    Algina, J., Keselman, H. J. and Penfield, R. D. (2006). Confidence intervals for an effect
    size when variances are not equal. Journal of Modern Applied Statistical Methods 5(1), 2-13.
    """
    return _glass(*_prepare(x, y, confidence_level, alternative))


def _cohen(pair: _Pair, level: float, alternative: str) -> EffectSize:
    return _standardised(pair, level, alternative, correct=False)


def _hedges(pair: _Pair, level: float, alternative: str) -> EffectSize:
    return _standardised(pair, level, alternative, correct=True)


def _glass(pair: _Pair, level: float, alternative: str) -> EffectSize:
    var_x, var_y = pair.variances
    if var_y == 0:
        raise DataProblem("Every value in group 2 is the same, so its standard deviation is zero "
                          "and Glass's delta is not defined.")
    sd = math.sqrt(var_y)
    delta = pair.difference / sd
    scale = math.sqrt(var_x / (var_y * pair.n1) + 1 / pair.n2)
    df = pair.n2 - 1
    nc_low, nc_high = _noncentrality_limits(delta / scale, df, _tail(level, alternative))
    return EffectSize(
        key="glass_delta", name="Glass's delta", value=delta,
        interval=Interval.for_alternative(nc_low * scale, nc_high * scale, level, alternative),
        method=("difference in means over group 2's standard deviation; interval from a "
                f"noncentral t approximation with {df} degrees of freedom"),
        details=dict(reference_sd=sd, df=df, scale=scale),
    )


# ---------------------------------------------------------------------------- rank-based

def mann_whitney_u1(x: np.ndarray, y: np.ndarray, *, sorted_x: np.ndarray | None = None,
                    sorted_y: np.ndarray | None = None) -> float:
    """U1 = #{(i, j): x_i > y_j} + 0.5 #{(i, j): x_i = y_j}, by sorting (O(n log n)).

    ``sorted_x`` and ``sorted_y``, if given, are ``np.sort(x)`` and ``np.sort(y)``.

    Notes
    -----
    With both samples sorted, a binary search gives for each x_i the number of y below it and
    the number tied with it (:func:`engine.procedures.ranks.pair_counts`); no n1 x n2
    comparison table is formed. (Sorting x too makes the searches walk y in order, which is
    several times faster for large samples.)

    References
    ----------
    Mann, H. B. and Whitney, D. R. (1947). On a test of whether one of two random variables is
    stochastically larger than the other. Annals of Mathematical Statistics 18(1), 50-60.
    """
    xs = sorted_values(np.asarray(x, dtype=float), sorted_x, name="group 1")
    ys = sorted_values(np.asarray(y, dtype=float), sorted_y, name="group 2")
    below, not_above = pair_counts(xs, ys)
    return float(below.sum(dtype=np.int64)) + 0.5 * float((not_above - below).sum(dtype=np.int64))


def _newcombe_variance(theta: float, n1: int, n2: int) -> float:
    half = (n1 + n2) / 2
    return theta * (1 - theta) / (n1 * n2) * (
        1 + (half - 1) * ((1 - theta) / (2 - theta) + theta / (1 + theta)))


def _probability_interval(cl: float, n1: int, n2: int, level: float, alternative: str):
    """Newcombe's method 5 limits for P(X > Y) + 0.5 P(X = Y): roots of (A - t)^2 = z^2 V(t)."""
    z = float(stats.norm.isf(_tail(level, alternative)))

    def gap(theta: float) -> float:
        return (cl - theta) ** 2 - z**2 * _newcombe_variance(theta, n1, n2)

    # at A = 0 or 1 the variance vanishes too, so step just inside, where (A - t)^2 < z^2 V(t)
    inside = min(0.25, z**2 / (4 * n1 * n2))
    centre = min(max(cl, inside), 1 - inside)
    low = 0.0 if cl <= 0 else float(optimize.brentq(gap, 0.0, centre, xtol=1e-15))
    high = 1.0 if cl >= 1 else float(optimize.brentq(gap, centre, 1.0, xtol=1e-15))
    return low, high


def _rank_effects(pair: _Pair, level: float, alternative: str):
    n1, n2 = pair.n1, pair.n2
    u1 = pair.u1
    cl = u1 / (n1 * n2)
    low, high = _probability_interval(cl, n1, n2, level, alternative)
    return u1, cl, low, high


_RANK_NOTES_METHOD = ("interval by Newcombe's method 5 (score-type, Hanley-McNeil variance with "
                      "both group sizes replaced by their mean)")


def common_language(x: Any, y: Any, *, confidence_level: float = 0.95,
                    alternative: str = "two-sided") -> EffectSize:
    """The common-language effect size: the chance a value of group 1 exceeds one of group 2.

    Parameters
    ----------
    x, y : array-like of float
        Group 1 and group 2, at least two finite values each.
    confidence_level : float
        Coverage of the interval, strictly between 0 and 1.
    alternative : {"two-sided", "less", "greater"}
        One-sided alternatives give a one-sided interval.

    Returns
    -------
    EffectSize
        Key "common_language"; ``details["u1"]`` is the Mann-Whitney U of group 1.

    Notes
    -----
    CL = P(X > Y) + 0.5 P(X = Y), estimated by U1 / (n1 n2), where U1 counts the pairs with
    x_i > y_j plus half the tied pairs (computed by sorting, in O(n log n)). The interval is
    Newcombe's method 5: with N = (n1 + n2) / 2 and
    V(t) = t (1 - t) / (n1 n2) [1 + (N - 1) ((1 - t) / (2 - t) + t / (1 + t))],
    the limits are the two solutions t of (CL - t)^2 = z^2 V(t), one on each side of CL
    (z = Phi^-1(1 - alpha/2), or 1 - alpha one-sided). It stays inside [0, 1], also when the
    groups do not overlap; the variance does not adjust for ties.

    References
    ----------
    McGraw, K. O. and Wong, S. P. (1992). A common language effect size statistic.
    Psychological Bulletin 111(2), 361-365.
    Hanley, J. A. and McNeil, B. J. (1982). The meaning and use of the area under a receiver
    operating characteristic (ROC) curve. Radiology 143(1), 29-36.
    Newcombe, R. G. (2006). Confidence intervals for an effect size measure based on the
    Mann-Whitney statistic. Part 2: asymptotic methods and evaluation. Statistics in Medicine
    25(4), 559-573.
    """
    return _common_language(*_prepare(x, y, confidence_level, alternative))


def _common_language(pair: _Pair, level: float, alternative: str) -> EffectSize:
    u1, cl, low, high = _rank_effects(pair, level, alternative)
    return EffectSize(
        key="common_language", name="common-language effect size", value=cl,
        interval=Interval.for_alternative(low, high, level, alternative),
        method="share of pairs in which the group 1 value is larger (ties count half); "
               + _RANK_NOTES_METHOD,
        details=dict(u1=u1, n_pairs=pair.n1 * pair.n2),
    )


def rank_biserial(x: Any, y: Any, *, confidence_level: float = 0.95,
                  alternative: str = "two-sided") -> EffectSize:
    """The rank-biserial correlation r = 2 CL - 1 (positive when group 1 tends to be larger).

    Parameters
    ----------
    x, y : array-like of float
        Group 1 and group 2, at least two finite values each.
    confidence_level : float
        Coverage of the interval, strictly between 0 and 1.
    alternative : {"two-sided", "less", "greater"}
        One-sided alternatives give a one-sided interval.

    Returns
    -------
    EffectSize
        Key "rank_biserial"; ``details["u1"]`` is the Mann-Whitney U of group 1.

    Notes
    -----
    r = 2 U1 / (n1 n2) - 1 = (share of pairs with group 1 larger) - (share with group 2 larger),
    between -1 and 1. Its interval is the common-language interval (Newcombe's method 5, see
    :func:`common_language`) mapped through t -> 2 t - 1.

    References
    ----------
    Glass, G. V. (1965). A ranking variable analogue of biserial correlation: implications for
    short-cut item analysis. Journal of Educational Measurement 2(1), 91-95.
    Kerby, D. S. (2014). The simple difference formula: an approach to teaching nonparametric
    correlation. Comprehensive Psychology 3, article 1.
    Newcombe, R. G. (2006). Statistics in Medicine 25(4), 559-573 (see :func:`common_language`).
    """
    return _rank_biserial(*_prepare(x, y, confidence_level, alternative))


def _rank_biserial(pair: _Pair, level: float, alternative: str) -> EffectSize:
    u1, cl, low, high = _rank_effects(pair, level, alternative)
    return EffectSize(
        key="rank_biserial", name="rank-biserial correlation", value=2 * cl - 1,
        interval=Interval.for_alternative(2 * low - 1, 2 * high - 1, level, alternative),
        method="share of pairs with group 1 larger minus share with group 2 larger; "
               + _RANK_NOTES_METHOD + ", rescaled",
        details=dict(u1=u1, common_language=cl),
    )


def all_effect_sizes(x: Any, y: Any, *, confidence_level: float = 0.95,
                     alternative: str = "two-sided", sorted_x: np.ndarray | None = None,
                     sorted_y: np.ndarray | None = None,
                     u1: float | None = None) -> dict[str, EffectSize]:
    """Every effect size of this module, keyed "cohen_d", "hedges_g", "glass_delta",
    "rank_biserial" and "common_language".

    ``sorted_x`` and ``sorted_y``, if given, are ``np.sort(x)`` and ``np.sort(y)`` (the rank-based
    sizes need them; each group is otherwise sorted here). ``u1``, if given, is the Mann-Whitney
    U of group 1 (as :func:`mann_whitney_u1` counts it), which the rank-based sizes then use
    instead of counting it again.

    An effect size the data cannot support (a standardised difference when the reference SD is
    zero) is left out rather than given as NaN; the rank-based ones always exist.

    Notes
    -----
    See each function for its formula.

    References
    ----------
    See each function.
    """
    pair, level, alternative = _prepare(x, y, confidence_level, alternative, sorted_x, sorted_y,
                                        u1)
    sizes: dict[str, EffectSize] = {}
    for key, build in _BUILDERS:
        try:
            sizes[key] = build(pair, level, alternative)
        except DataProblem:
            continue
    return sizes


_BUILDERS: tuple[tuple[str, Callable[[_Pair, float, str], EffectSize]], ...] = (
    ("cohen_d", _cohen), ("hedges_g", _hedges), ("glass_delta", _glass),
    ("rank_biserial", _rank_biserial), ("common_language", _common_language),
)
