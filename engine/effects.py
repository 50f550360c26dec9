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
from scipy import special

from .errors import DataProblem, OptionProblem
from .procedures._checks import check_alternative, check_confidence_level, check_samples
from .procedures.probability_interval import newcombe_limits
from .procedures.ranks import pair_counts
from .group_stats import GroupStats
from .procedures.t import Moments, moments, two_groups
from .noncentral_t import BY_INTEGRAL as _BY_INTEGRAL
from .noncentral_t import limits_or_problem as _limits
from .results import EffectSize, Interval
from .summary import sorted_values

__all__ = [
    "cohen_d",
    "hedges_g",
    "glass_delta",
    "rank_biserial",
    "common_language",
    "all_effect_sizes",
    "effect_sizes_with_reasons",
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

    @classmethod
    def of_stats(cls, first: GroupStats, second: GroupStats) -> "_Pair":
        """Two groups known by their summary statistics: the mean-based sizes only."""
        m, n1, n2 = two_groups(first, second)
        pair = cls.__new__(cls)
        pair.x = pair.y = pair.sorted_x = pair.sorted_y = None
        pair.n1, pair.n2 = n1, n2
        pair.__dict__["moments"] = m
        return pair

    @cached_property
    def moments(self) -> Moments:
        """Means, difference and SDs, scaled so that no square overflows or underflows."""
        return moments(self.x, self.y)

    @cached_property
    def u1(self) -> float:
        if self.x is None:
            raise DataProblem("The rank-based effect sizes need the values themselves, not only "
                              "their means and standard deviations.")
        return mann_whitney_u1(self.x, self.y, sorted_x=self.sorted_x, sorted_y=self.sorted_y)


def _prepare(x: Any, y: Any, confidence_level: Any, alternative: Any, sorted_x=None, sorted_y=None,
             u1=None):
    if isinstance(x, GroupStats) or isinstance(y, GroupStats):
        return (_Pair.of_stats(x, y), check_confidence_level(confidence_level),
                check_alternative(alternative))
    x, y = check_samples(x, y)
    if u1 is not None and not (isinstance(u1, Real) and 0 <= u1 <= x.size * y.size):
        raise OptionProblem(f"U of group 1 must lie between 0 and {x.size * y.size}, not {u1!r}.")
    return (_Pair(x, y, sorted_x, sorted_y, u1), check_confidence_level(confidence_level),
            check_alternative(alternative))


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


def _pooled_sd(pair: _Pair) -> float:
    """The pooled SD in units of 2**``pair.moments.unit_exponent``."""
    m = pair.moments
    if m.constant_1 and m.constant_2:
        raise DataProblem("Every value within each group is the same, so the pooled standard "
                          "deviation is zero and a standardised difference is not defined.")
    var_x, var_y = m.sd_1**2, m.sd_2**2
    pooled = ((pair.n1 - 1) * var_x + (pair.n2 - 1) * var_y) / (pair.n1 + pair.n2 - 2)
    if pooled == 0:
        raise DataProblem("The spread within the groups is too small beside the size of the "
                          "values to be measured in floating point, so a standardised "
                          "difference cannot be computed.")
    return math.sqrt(pooled)



def _standardised(pair: _Pair, level: float, alternative: str, *, correct: bool) -> EffectSize:
    n1, n2 = pair.n1, pair.n2
    df = n1 + n2 - 2
    sd = _pooled_sd(pair)
    m = pair.moments
    d = m.in_sd_units(m.difference) / sd
    scale = math.sqrt(1 / n1 + 1 / n2)
    key, name = ("hedges_g", "Hedges' g") if correct else ("cohen_d", "Cohen's d")
    nc_low, nc_high, integrated = _limits(name, d / scale, df, level, alternative)
    factor = hedges_correction(df) if correct else 1.0
    # The interval is the same for d and g: the noncentral t interval of the population
    # standardised difference delta, exact for normal groups with equal SDs. Multiplying it by J
    # would make it an interval for J delta, which covers delta less often than stated.
    interval = Interval.for_alternative(nc_low * scale, nc_high * scale, level, alternative)
    method = ("difference in means over the pooled standard deviation"
              + (", times the exact small-sample factor J" if correct else "")
              + "; interval for the population standardised difference from the noncentral t "
                "distribution (exact for bell-shaped groups with equal spreads"
              + (", and not multiplied by J)" if correct else ")")
              + (_BY_INTEGRAL if integrated else ""))
    details = dict(pooled_sd=m.absolute(sd), df=df, t=d / scale,
                   noncentrality_interval=(nc_low, nc_high),
                   interval_estimates="population standardised difference (delta)",
                   interval_by_integration=integrated)
    if correct:
        details.update(correction=factor, cohen_d=d)
    return EffectSize(key=key, name=name, value=factor * d, interval=interval, method=method,
                      details=details)


def cohen_d(x: Any, y: Any, *, confidence_level: float = 0.95,
            alternative: str = "two-sided") -> EffectSize:
    """Cohen's d: the difference in means over the pooled standard deviation.

    Parameters
    ----------
    x, y : array-like of float, or two GroupStats
        Group 1 and group 2, at least two finite values each, or each group's summary
        statistics (:class:`engine.group_stats.GroupStats`).
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
    root finding, then scaled back by sqrt(1/n1 + 1/n2). Where scipy's series for the
    noncentral t gives no number (far in the tails, or |t| above 1e4, as for groups that do not
    overlap) the distribution is integrated numerically instead, and
    ``details["interval_by_integration"]`` is True.

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
    x, y : array-like of float, or two GroupStats
        Group 1 and group 2, at least two finite values each, or each group's summary
        statistics (:class:`engine.group_stats.GroupStats`).
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
    interval is the noncentral t interval for the population delta (see :func:`cohen_d`),
    which is exact for normal groups with equal SDs; it is not multiplied by J, since J times
    it would be an interval for J delta and cover delta less often than stated (93.5% instead
    of 95% at n = 3 and 3 with delta = 1). ``details["interval_estimates"]`` says so.

    References
    ----------
    Hedges, L. V. (1981). Distribution theory for Glass's estimator of effect size and related
    estimators. Journal of Educational Statistics 6(2), 107-128.
    Hedges, L. V. and Olkin, I. (1985). Statistical Methods for Meta-Analysis. Academic Press,
    chapter 5.
    Steiger, J. H. and Fouladi, R. T. (1997). Noncentrality interval estimation and the
    evaluation of statistical models. In What If There Were No Significance Tests?, Erlbaum.
    """
    return _hedges(*_prepare(x, y, confidence_level, alternative))


def glass_delta(x: Any, y: Any, *, confidence_level: float = 0.95,
                alternative: str = "two-sided") -> EffectSize:
    """Glass's delta: the difference in means over group 2's standard deviation.

    Parameters
    ----------
    x, y : array-like of float, or two GroupStats
        Group 1 and group 2 (the reference group), at least two finite values each, or each
        group's summary statistics (:class:`engine.group_stats.GroupStats`).
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
    m = pair.moments
    if m.constant_2:
        raise DataProblem("Every value in group 2 is the same, so its standard deviation is zero "
                          "and Glass's delta is not defined.")
    if m.sd_2 == 0:
        raise DataProblem("The spread of group 2 is too small beside the size of the values to be "
                          "measured in floating point, so Glass's delta cannot be computed.")
    delta = m.in_sd_units(m.difference) / m.sd_2
    scale = math.hypot(m.sd_1 / m.sd_2 / math.sqrt(pair.n1), 1 / math.sqrt(pair.n2))
    if not math.isfinite(scale):
        raise DataProblem("The spread of group 2 is too small beside that of group 1 to be "
                          "measured in floating point, so Glass's delta cannot be computed.")
    df = pair.n2 - 1
    nc_low, nc_high, integrated = _limits("Glass's delta", delta / scale, df, level, alternative)
    return EffectSize(
        key="glass_delta", name="Glass's delta", value=delta,
        interval=Interval.for_alternative(nc_low * scale, nc_high * scale, level, alternative),
        method=("difference in means over group 2's standard deviation; interval from a "
                f"noncentral t approximation with {df} degrees of freedom"
                + (_BY_INTEGRAL if integrated else "")),
        details=dict(reference_sd=m.absolute(m.sd_2), df=df, scale=scale,
                     interval_by_integration=integrated),
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


def _rank_effects(pair: _Pair, level: float, alternative: str):
    n1, n2 = pair.n1, pair.n2
    u1 = pair.u1
    cl = u1 / (n1 * n2)
    low, high = newcombe_limits(cl, n1, n2, level, alternative)
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
    :func:`effect_sizes_with_reasons` also says why each one left out is missing.

    Notes
    -----
    See each function for its formula.

    References
    ----------
    See each function.
    """
    return effect_sizes_with_reasons(x, y, confidence_level=confidence_level,
                                     alternative=alternative, sorted_x=sorted_x,
                                     sorted_y=sorted_y, u1=u1)[0]


def effect_sizes_with_reasons(x: Any, y: Any, *, confidence_level: float = 0.95,
                              alternative: str = "two-sided", sorted_x: np.ndarray | None = None,
                              sorted_y: np.ndarray | None = None, u1: float | None = None,
                              ) -> tuple[dict[str, EffectSize], dict[str, str]]:
    """:func:`all_effect_sizes` and, for each one left out, a sentence that says why.

    Returns
    -------
    (dict, dict)
        The effect sizes by key, and the keys left out with the reason in plain words. A size
        that fails in arithmetic (an overflow, a root not found) is left out with its reason
        like one the data cannot support; the others are still given.
    """
    pair, level, alternative = _prepare(x, y, confidence_level, alternative, sorted_x, sorted_y,
                                        u1)
    sizes: dict[str, EffectSize] = {}
    reasons: dict[str, str] = {}
    for key, build in _BUILDERS:
        try:
            with np.errstate(all="ignore"):
                sizes[key] = build(pair, level, alternative)
        except DataProblem as problem:
            reasons[key] = problem.message
        except (ArithmeticError, ValueError) as problem:
            reasons[key] = (f"The {_NAMES[key]} could not be computed: "
                            f"{str(problem).strip().rstrip('.') or type(problem).__name__}.")
    return sizes, reasons


_NAMES = {"cohen_d": "Cohen's d", "hedges_g": "Hedges' g", "glass_delta": "Glass's delta",
          "rank_biserial": "rank-biserial correlation",
          "common_language": "common-language effect size"}

_BUILDERS: tuple[tuple[str, Callable[[_Pair, float, str], EffectSize]], ...] = (
    ("cohen_d", _cohen), ("hedges_g", _hedges), ("glass_delta", _glass),
    ("rank_biserial", _rank_biserial), ("common_language", _common_language),
)
