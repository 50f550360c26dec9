"""Checks of matched pairs: the shape, outliers and ties of the differences, pairs that show no
difference, and whether the two members of a pair go together as measurements of one unit do.

``check_pairs`` describes the pairs; it never picks a procedure (that is
``engine.paired_advice``). The shape of the differences is checked exactly as one group's shape
is (:func:`engine.diagnostics.sample_shape`); the findings speak of the differences.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from .diagnostics import (CHECK_ALPHA, FAR_FENCE, HEAVY_TIES, MILD_FENCE,
                          SHAPIRO_MAX_N, SHAPIRO_MIN_N, SHAPIRO_SMALL_N, SKEW_MATERIAL,
                          GroupShape, is_clearly_skewed, is_heavy_tailed, sample_shape)
from .procedures.paired import common_difference, paired_values
from .results import Finding, GroupSummary, readonly_array
from .rounding import format_number, format_shape, p_clause
from .stats_basics import common_scale
from .summary import summarize
from .wording import plural

__all__ = ["PairedChecks", "check_pairs", "pair_correlation", "WEAK_CORRELATION",
           "DIFFERENCES_LABEL"]

# The label of the differences' summary and shape.
DIFFERENCES_LABEL = "differences"
# A correlation of the two members of a pair below this is "weak" (common practice: Cohen's
# benchmarks for r, 0.1 small, 0.3 medium, 0.5 large; Cohen 1988, Statistical Power Analysis for
# the Behavioral Sciences, 2nd ed., section 3.2).
WEAK_CORRELATION = 0.3


@dataclass(frozen=True, eq=False)
class PairedChecks:
    """What the checks of matched pairs found.

    ``differences``: group 1 minus group 2, pair by pair (read-only); ``pair_means``: the mean of
    each pair's two values (for the plot of differences against means); ``shape``: the one-sample
    checks of the differences; ``summary``: their summary (label "differences");
    ``correlation``: Pearson's r of the two members of a pair (NaN with fewer than three pairs
    or a member that does not vary); ``findings``: one per check, in plain words;
    ``common_difference``: the amount by which every pair differs when they all differ by the
    same amount (``differences`` then hold exactly that amount), else None.
    """

    n_pairs: int
    differences: np.ndarray
    pair_means: np.ndarray
    shape: GroupShape
    summary: GroupSummary
    correlation: float
    findings: tuple[Finding, ...]
    common_difference: float | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "differences", readonly_array(self.differences))
        object.__setattr__(self, "pair_means", readonly_array(self.pair_means))
        object.__setattr__(self, "findings", tuple(self.findings))

    @property
    def zeros(self) -> int:
        """How many pairs show no difference at all."""
        return int(np.count_nonzero(self.differences == 0))

    def finding(self, key: str) -> Finding | None:
        """The finding with ``key``, or None."""
        return next((item for item in self.findings if item.key == key), None)


def pair_correlation(x: np.ndarray, y: np.ndarray) -> float:
    """Pearson's r of ``x`` and ``y`` (matched), NaN with fewer than three pairs or when either
    does not vary.

    Notes
    -----
    r = sum (x - mean x)(y - mean y) / sqrt(sum (x - mean x)^2 sum (y - mean y)^2), each list
    first divided by a power of two (:func:`engine.stats_basics.common_scale`), which leaves r
    unchanged and keeps the squares from overflowing or vanishing.
    """
    if x.size < 3:
        return float("nan")
    centred = []
    for values in (x, y):
        scaled = values / common_scale(values)
        centred.append(scaled - scaled.mean())
    a, b = centred
    sxx, syy = float(np.dot(a, a)), float(np.dot(b, b))
    if not (sxx > 0 and syy > 0):
        return float("nan")
    return float(min(1.0, max(-1.0, float(np.dot(a, b)) / math.sqrt(sxx) / math.sqrt(syy))))


def check_pairs(x: Any, y: Any, *, labels: tuple[str, str] | None = None) -> PairedChecks:
    """Check the matched pairs ``x[i]``, ``y[i]`` (one unit each).

    Parameters
    ----------
    x, y : array-like
        Group 1's and group 2's value of each pair, pair i in place i of each.
    labels : (str, str), optional
        The groups' labels, to name the direction of the differences in the findings.

    Returns
    -------
    PairedChecks
        With findings keyed "pairs", "same_difference" (only when every pair differs by the
        same amount), "difference_normality", "difference_skewness",
        "difference_tails", "difference_outliers", "difference_ties", "zero_differences" and
        "pair_correlation".

    Raises
    ------
    engine.errors.DataProblem
        When the two lists differ in length, are empty, or hold a value that is not a finite
        number.

    Notes
    -----
    The differences are checked as one group's values are (Shapiro-Wilk from 3 to 5000 values,
    adjusted skewness and excess kurtosis against twice their standard errors and sizes that
    matter, Tukey's fences with the generalized ESD test, ties): see :mod:`engine.diagnostics`.
    """
    first, second, d = paired_values(x, y, minimum=1)
    same = common_difference(first, second, d)
    ordered = np.sort(d)
    shape = sample_shape(DIFFERENCES_LABEL, d, ordered=ordered)
    summary = summarize(DIFFERENCES_LABEL, d, ordered=ordered)
    r = pair_correlation(first, second)
    n = int(d.size)
    findings = (_count_finding(n, labels), *_same_finding(same, labels), _normality_finding(shape),
                _skew_finding(shape), _tail_finding(shape), _outlier_finding(shape), _tie_finding(shape),
                _zero_finding(int(np.count_nonzero(d == 0)), n), _correlation_finding(r, n))
    return PairedChecks(n_pairs=n, differences=d, pair_means=first / 2 + second / 2, shape=shape,
                        summary=summary, correlation=r, findings=findings,
                        common_difference=same)


# -- the findings in words --------------------------------------------------------------------------

def _count_finding(n: int, labels: tuple[str, str] | None) -> Finding:
    direction = (f"'{labels[0]}' minus '{labels[1]}'" if labels is not None
                 else "group 1 minus group 2")
    return Finding("pairs", "info",
                   f"{plural(n, 'pair')} of values; each difference is {direction}, and the "
                   "paired procedures compare these differences with zero.")


def _same_finding(same: float | None, labels: tuple[str, str] | None) -> tuple[Finding, ...]:
    """The finding that every pair differs by one amount (none when they do not)."""
    if same is None:
        return ()
    direction = (f" ('{labels[0]}' minus '{labels[1]}')" if labels is not None else "")
    return (Finding("same_difference", "warning",
                    f"Every pair differs by the same amount, {same:.12g}{direction}: the "
                    "differences have no spread, so the paired t-test, its margin version and "
                    "the standardised differences d_z and d_av cannot be worked out (there is no "
                    "standard error). The signed-rank and sign-flip tests still count on which "
                    "side of zero the differences fall, and a rank interval is that amount "
                    "itself."),)


def _normality_finding(shape: GroupShape) -> Finding:
    n = shape.n
    if n < SHAPIRO_MIN_N:
        return Finding("difference_normality", "note",
                       f"With {plural(n, 'difference')} the Shapiro-Wilk check of a bell shape "
                       f"cannot be run (it needs at least {SHAPIRO_MIN_N}).")
    if n > SHAPIRO_MAX_N:
        return Finding("difference_normality", "info",
                       f"With {n:,} differences, more than the {SHAPIRO_MAX_N:,} for which the "
                       "Shapiro-Wilk check is valid, it was not run; the skewness, the tails "
                       "and the Q-Q plot describe the shape instead.")
    if shape.shapiro_p is None:
        return Finding("difference_normality", "note",
                       "Every pair differs by the same amount, so the Shapiro-Wilk check of a "
                       "bell shape cannot be run on the differences.")
    figures = f"W = {format_number(shape.shapiro_w, digits=3)}, {p_clause(shape.shapiro_p)}"
    if shape.shapiro_p < CHECK_ALPHA:
        return Finding("difference_normality", "note",
                       f"The Shapiro-Wilk check finds that the differences depart from a bell "
                       f"shape ({figures}).")
    few = (": with few pairs this check often misses real departures" if n < SHAPIRO_SMALL_N
           else "")
    return Finding("difference_normality", "info",
                   f"The Shapiro-Wilk check finds no clear departure of the differences from a "
                   f"bell shape ({figures}); that does not prove they are normal{few}.")


def _moment_finding(key: str, value: float, measure: str, figures: str, flagged: bool,
                    severity: str, flagged_words: str, calm_words: str) -> Finding:
    """A finding on the skewness or the tails of the differences: too few to measure, flagged
    (``flagged_words``) or not (``calm_words``), with the figures in brackets."""
    if not math.isfinite(value):
        return Finding(key, "info", "Too few differences, or differences that do not vary, to "
                                    f"measure {measure}.")
    if flagged:
        return Finding(key, severity, f"{flagged_words} ({figures}).")
    return Finding(key, "info", f"{calm_words} ({figures}).")


def _skew_finding(shape: GroupShape) -> Finding:
    g1 = shape.skewness
    side = "positive" if g1 > 0 else "negative"
    return _moment_finding(
        "difference_skewness", g1, "lopsidedness (skewness)",
        f"skewness {format_shape(g1)}, standard error {format_number(shape.skewness_se, digits=2)}",
        is_clearly_skewed(shape), "warning" if abs(g1) > 2 * SKEW_MATERIAL else "note",
        f"The differences are clearly lopsided, with a long tail of large {side} differences",
        "The differences are not clearly lopsided")


def _tail_finding(shape: GroupShape) -> Finding:
    g2 = shape.excess_kurtosis
    return _moment_finding(
        "difference_tails", g2, "tail weight (kurtosis)",
        f"excess kurtosis {format_shape(g2)}, standard error "
        f"{format_number(shape.kurtosis_se, digits=2)}; 0 for a normal distribution",
        is_heavy_tailed(shape), "warning",
        "The differences have heavier tails than a bell curve: some pairs differ far more than most",
        "The differences show no clearly heavy tails")


def _outlier_finding(shape: GroupShape) -> Finding:
    far, mild = len(shape.far_outliers), len(shape.mild_outliers)
    beyond = (f"more than {FAR_FENCE:g} times the interquartile range (the width of the middle "
              "half) beyond the quartiles")
    if far and shape.far_surprising:
        odds = ("" if not math.isfinite(shape.extreme_p) else
                f"; a normal sample of {shape.n} gives differences this extreme with "
                f"{p_clause(shape.extreme_p)}")
        return Finding("difference_outliers", "warning",
                       f"{plural(far, 'difference')} {plural(far, 'lies', 'lie', number=False)} "
                       f"far from the rest, {beyond}{odds}. Check those pairs before relying on "
                       "the mean difference, which such values pull strongly.")
    if far:
        return Finding("difference_outliers", "note",
                       f"{plural(far, 'difference')} {plural(far, 'lies', 'lie', number=False)} "
                       f"{beyond}, but for a normal sample of {shape.n} that is not surprising "
                       f"({p_clause(shape.extreme_p)} for the most extreme), so it does not "
                       "change the suggestion.")
    if mild:
        return Finding("difference_outliers", "info",
                       f"{plural(mild, 'difference')} {plural(mild, 'lies', 'lie', number=False)} "
                       f"more than {MILD_FENCE:g} times the interquartile range beyond the "
                       f"quartiles, none beyond {FAR_FENCE:g} times.")
    return Finding("difference_outliers", "info", "No difference lies apart from the rest.")


def _tie_finding(shape: GroupShape) -> Finding:
    share = shape.tie_share
    percent = format_number(100 * share, digits=2)
    if share >= HEAVY_TIES:
        return Finding("difference_ties", "info",
                       f"{percent}% of the differences equal another difference (ties), as "
                       "values recorded to a few digits give. The signed-rank test gives tied "
                       "differences their average rank and counts them exactly.")
    if share > 0:
        return Finding("difference_ties", "info",
                       f"{percent}% of the differences equal another difference (ties).")
    return Finding("difference_ties", "info", "No two differences are equal.")


def _zero_finding(zeros: int, n: int) -> Finding:
    if not zeros:
        return Finding("zero_differences", "info", "Every pair shows some difference.")
    if zeros == n:
        return Finding("zero_differences", "warning",
                       "No pair shows any difference: both values of every pair are equal.")
    return Finding("zero_differences", "note",
                   f"{zeros:,} of the {n:,} pairs show no difference (both values equal). The "
                   "signed-rank test either leaves such pairs out (Wilcoxon's rule) or ranks "
                   "them and gives them no sign (Pratt's rule); the p-values under both rules "
                   "are reported.")


def _correlation_finding(r: float, n: int) -> Finding:
    if not math.isfinite(r):
        return Finding("pair_correlation", "info",
                       "How the two values of a pair go together cannot be measured here (fewer "
                       "than three pairs, or values that do not vary).")
    figures = f"r = {format_number(r, digits=2)} over {plural(n, 'pair')}"
    few = " With few pairs r itself is uncertain." if n < SHAPIRO_SMALL_N else ""
    if r < 0:
        return Finding("pair_correlation", "warning",
                       f"The two values of a pair tend to go in opposite directions ({figures}). "
                       "Two measurements of the same unit usually go together, so check that "
                       "the pairs are matched right (the IDs, the order of the rows); with a "
                       "negative correlation pairing makes the comparison less precise, not "
                       f"more.{few}")
    if r < WEAK_CORRELATION:
        return Finding("pair_correlation", "note",
                       f"The two values of a pair hardly go together ({figures}). If each pair "
                       "is one unit measured twice, pairing removes little of the variation "
                       "between units; check that the pairing is real (the same unit in both "
                       f"groups, matched by the right ID or row).{few}")
    return Finding("pair_correlation", "info",
                   f"The two values of a pair go together ({figures}), as two measurements of "
                   "the same unit do; the differences leave out the variation between units.")
