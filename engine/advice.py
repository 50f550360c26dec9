"""From the checks to one suggested procedure, with reasons, alternatives and cautions.

The choice encodes the usual practice of the field rather than a single p-value cut-off: Welch's
t-test by default; the pooled t-test only when equal spreads are known beforehand; the z-test when
the SDs are known; a rank procedure for ratings, or for small groups whose shape is clearly far
from a bell curve; a resampling procedure when the mean matters but the shape is doubtful and the
groups are small. A normality pre-test's p-value on its own never decides. Every threshold below is
a named constant; they are rules of common practice, not results, and the reasons say so.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Mapping

import numpy as np

from . import diagnostics as checks
from .procedures.registry import PROCEDURE_NAMES, RECORDS, RESAMPLING_MAX_VALUES, record
from .procedures.resampling import BOOTSTRAP_MIN_N
from .rounding import format_number
from .results import Groups, frozen_mapping
from .stats_basics import centred_sd

__all__ = [
    "ConsideredOption",
    "Recommendation",
    "recommend",
    "spreads_differ",
    "ASSUMPTIONS",
    "SMALL_GROUP_N",
    "KNOWN_SD_MISMATCH",
    "FENCE_RULE",
    "RATING_MAX_LEVELS",
    "looks_like_ratings",
    "RESAMPLING_MAX_VALUES",
]

# Below this many values in a group, the central limit theorem cannot be leaned on when the
# values are clearly lopsided or heavy-tailed (common practice: "30 per group").
SMALL_GROUP_N = 30
# A sample SD this many times above or below the stated known SD casts doubt on it (common
# practice, the same rule of thumb as the SD ratio of two groups).
KNOWN_SD_MISMATCH = checks.SD_RATIO_WARNING
# Values that are all whole numbers with at most this many different values, within a span of
# RATING_MAX_LEVELS - 1, look like ratings (a 1-5, 1-7 or 0-10 scale): the user is asked whether
# they are (common practice for rating scales; counts can look the same, hence a question).
RATING_MAX_LEVELS = 11
# Resampling is not run above RESAMPLING_MAX_VALUES values in all (its records' limit), so it is
# never suggested there.

WELCH_SOURCES = ("Ruxton 2006, Behavioral Ecology 17:688; Delacre, Lakens and Leys 2017, "
                 "International Review of Social Psychology 30:92")

# How surprising a value beyond the far fence must be, for a normal sample of the group's size,
# before it changes the suggestion (the diagnostics' generalized ESD test; common practice: 1%).
FENCE_RULE = (
    "A value beyond the far fence (more than 3 interquartile ranges past the quartiles) changes "
    "the suggestion only when a normal sample of the group's size gives one that extreme less than "
    f"{checks.OUTLIER_SURPRISE:.0%} of the time (Rosner's generalized ESD test). In small groups the "
    "fence alone flags ordinary values often, and switching procedures on a pre-test's verdict "
    "has costs of its own (Rochon, Gondan and Kieser 2012, BMC Medical Research Methodology "
    "12:81).")

TIES_HANDLED = ("the rank test allows for ties: its exact version counts them as they are, and "
                "its large-sample formula carries the usual correction for them.")

# What choosing each procedure takes for granted, one sentence each (shown when the user picks a
# procedure other than the suggested one): each procedure record's ``assumption``.
ASSUMPTIONS: Mapping[str, str] = frozen_mapping({r.key: r.assumption for r in RECORDS})


@dataclass(frozen=True)
class ConsideredOption:
    """An alternative procedure that was weighed, and why it was not suggested."""

    key: str
    name: str
    why_not: str


@dataclass(frozen=True)
class Recommendation:
    """The suggested procedure, why, what else was weighed, and what to keep in mind.

    ``assumptions`` holds one sentence for every procedure key, whether suggested or not.
    """

    key: str
    name: str
    reasons: tuple[str, ...]
    considered: tuple[ConsideredOption, ...]
    cautions: tuple[str, ...]
    assumptions: Mapping[str, str] = field(default_factory=lambda: ASSUMPTIONS)
    looks_like_ratings: bool = False  # few whole numbers: the user is asked whether they are ratings

    def __post_init__(self) -> None:
        object.__setattr__(self, "reasons", tuple(self.reasons))
        object.__setattr__(self, "considered", tuple(self.considered))
        object.__setattr__(self, "cautions", tuple(self.cautions))
        object.__setattr__(self, "assumptions", frozen_mapping(self.assumptions))


@dataclass(frozen=True)
class _Situation:
    """What the checks say, in the terms the advice reasons with."""

    sizes: tuple[int, int]
    labels: tuple[str, str]
    skewed: tuple[bool, bool]
    heavy: tuple[bool, bool]
    far: tuple[bool, bool]  # values beyond the far fence that are surprising for a normal sample
    fenced: tuple[bool, bool]  # values beyond the far fence that a normal sample of n gives often
    sd_ratio: float
    n_ratio: float
    iqr_ratio: float
    ties: float
    resampling_runs: bool
    levels: tuple[float, float, int] | None = None  # lowest, highest, how many: when rating-like

    @property
    def small(self) -> bool:
        return min(self.sizes) < SMALL_GROUP_N

    @property
    def shape_doubtful(self) -> bool:
        return any(self.skewed) or any(self.heavy) or any(self.far)

    @property
    def extremes(self) -> bool:
        """Heavy tails or far outliers: the mean itself is unstable."""
        return any(self.heavy) or any(self.far)

    @property
    def spreads_differ(self) -> bool:
        return not np.isfinite(self.sd_ratio) or self.sd_ratio >= checks.SD_RATIO_WARNING

    @property
    def pooling_risky(self) -> bool:
        """The data argue against one common SD (the rule of thumb of the SD and n ratios)."""
        return _pooling_risky(self.sd_ratio, self.n_ratio)

    @property
    def robust_ratio(self) -> bool:
        """Whether the spreads are compared by their interquartile ranges: when extreme values
        inflate a standard deviation, the SD ratio says more about them than about the spread."""
        return self.extremes and np.isfinite(self.iqr_ratio)

    @property
    def unequal_spreads(self) -> bool:
        """The spreads argue against treating the groups as interchangeable (the pooling rule
        of thumb, on the IQR ratio when extreme values distort the SDs)."""
        ratio = self.iqr_ratio if self.robust_ratio else self.sd_ratio
        return _pooling_risky(ratio, self.n_ratio)

    def ratio_words(self) -> str:
        if self.robust_ratio:
            return f"ratio of the interquartile ranges {format_number(self.iqr_ratio, digits=2)}"
        return f"SD ratio {format_number(self.sd_ratio, digits=2)}"

    def describe_shape(self) -> str:
        """Which groups look how, in words: "group 'A' is clearly lopsided and has far outliers"."""
        parts = []
        for label, skewed, heavy, far in zip(self.labels, self.skewed, self.heavy, self.far):
            traits = [words for flag, words in ((skewed, "is clearly lopsided"),
                                                (heavy, "is heavy-tailed"),
                                                (far, "has values far from the rest")) if flag]
            if traits:
                parts.append(f"group '{label}' " + _join(traits))
        return "; ".join(parts)


def _pooling_risky(sd_ratio: float, n_ratio: float) -> bool:
    return (not np.isfinite(sd_ratio) or sd_ratio >= checks.SD_RATIO_WARNING
            or (sd_ratio >= checks.SD_RATIO_NOTE and n_ratio >= checks.N_RATIO_NOTE))


def spreads_differ(diagnostics, groups: Groups) -> bool:
    """Whether the spreads argue against treating the two groups as interchangeable: an SD ratio
    of ``SD_RATIO_WARNING`` or more, or of ``SD_RATIO_NOTE`` with a size ratio of
    ``N_RATIO_NOTE`` or more (common practice); judged on the interquartile ranges when heavy
    tails or surprising far values distort the SDs."""
    return _situation(diagnostics, groups).unequal_spreads


def _join(words: list[str]) -> str:
    return words[0] if len(words) == 1 else ", ".join(words[:-1]) + " and " + words[-1]


def _situation(diagnostics, groups: Groups) -> _Situation:
    shapes = diagnostics.shapes
    sizes = (int(groups.x.size), int(groups.y.size))
    return _Situation(
        sizes=sizes,
        labels=tuple(groups.labels),
        skewed=tuple(checks.is_clearly_skewed(s) for s in shapes),
        heavy=tuple(checks.is_heavy_tailed(s) for s in shapes),
        far=tuple(bool(s.far_surprising) for s in shapes),
        fenced=tuple(len(s.far_outliers) > 0 and not s.far_surprising for s in shapes),
        sd_ratio=float(diagnostics.spread.sd_ratio),
        n_ratio=float(diagnostics.spread.n_ratio),
        iqr_ratio=float(getattr(diagnostics.spread, "iqr_ratio", float("nan"))),
        ties=float(diagnostics.pooled_tie_share),
        resampling_runs=sum(sizes) <= RESAMPLING_MAX_VALUES,
        levels=_rating_levels(groups.x, groups.y),
    )


def _rating_levels(x: np.ndarray, y: np.ndarray) -> tuple[float, float, int] | None:
    """(lowest, highest, number of different values) when the values of both groups are whole
    numbers with 3 to ``RATING_MAX_LEVELS`` different values in a span that fits them; else
    None. Linear time: no sort of a large group."""
    low = float(min(x.min(), y.min()))
    high = float(max(x.max(), y.max()))
    if not (np.isfinite(low) and np.isfinite(high)) or high - low > RATING_MAX_LEVELS - 1:
        return None
    if not all(np.array_equal(v, np.floor(v)) for v in (x, y)):
        return None
    seen = np.zeros(int(high - low) + 1, dtype=bool)
    for v in (x, y):
        seen[(v - low).astype(np.intp)] = True
    count = int(np.count_nonzero(seen))
    return (low, high, count) if count >= 3 else None  # two values: a yes/no, not a scale


def looks_like_ratings(groups: Groups) -> bool:
    """Whether the values are few whole numbers, as ratings on a scale are."""
    return _rating_levels(groups.x, groups.y) is not None


# -- the choice -----------------------------------------------------------------------------------

def _choose(s: _Situation, *, equal_spread_known: bool, ordinal: bool, known_sd) -> tuple[str, list[str]]:
    """The suggested key and the reasons for it."""
    if known_sd is not None:
        return "z", [
            "You gave the two standard deviations as known from outside these data (for example a "
            "long record of the same process), so the z-test uses them instead of estimating them.",
        ]
    if ordinal:
        reasons = [
            "The values are ratings on an ordered scale: their order means something but the steps "
            "between them need not be equal, so a mean is hard to interpret.",
            "The Mann-Whitney procedure uses only the order of the values. It answers whether values "
            "in one group tend to be higher than in the other, with the Hodges-Lehmann estimate of "
            "the typical shift; the means are not what it tests.",
        ]
        if s.ties >= checks.HEAVY_TIES:
            reasons.append(f"Many values are tied, as ratings usually are; {TIES_HANDLED}")
        return "mann_whitney", reasons
    if s.small and s.shape_doubtful:
        return _small_and_doubtful(s)
    if equal_spread_known:
        reasons = [
            "You stated from prior knowledge that the two groups spread out equally, so the pooled "
            "t-test may combine both groups into one estimate of spread, which gives it slightly "
            "more precision than Welch's test.",
        ]
        return "pooled_t", reasons
    reasons = ["Welch's t-test is the usual default for comparing two means: it keeps its stated "
               "error rate when the spreads differ and loses almost nothing when they are equal "
               f"({WELCH_SOURCES})."]
    if s.shape_doubtful:
        reasons.append(
            f"The values are not bell-shaped ({s.describe_shape()}), but each group has at least "
            f"{SMALL_GROUP_N} values. With that many, the group means are close to normally "
            "distributed even when the values are not (the central limit theorem), so Welch's "
            f"p-value and interval hold up. The cut-off of {SMALL_GROUP_N} is common practice, not a "
            "sharp rule; very lopsided values need more.")
    else:
        reasons.append("Neither group shows clear lopsidedness, heavy tails or far outliers, so "
                       "nothing argues against a comparison of means.")
    if s.spreads_differ:
        reasons.append(f"The standard deviations differ by a factor of {format_number(s.sd_ratio, digits=2)}, "
                       "which is exactly the situation Welch's test is made for.")
    return "welch_t", reasons


def _small_and_doubtful(s: _Situation) -> tuple[str, list[str]]:
    smallest = min(s.sizes)
    base = (f"The smallest group has {smallest} values, fewer than {SMALL_GROUP_N}, and "
            f"{s.describe_shape()}. With groups this small the central limit theorem cannot be "
            "relied on to rescue a t-test (the cut-off is common practice, not a sharp rule).")
    if s.unequal_spreads:
        return _doubtful_with_unequal_spreads(s, base)
    if s.extremes or not s.resampling_runs:
        reasons = [base,
                   "The Mann-Whitney procedure works with the order of the values, so a few extreme "
                   "values cannot pull it far. It answers whether values in one group tend to be "
                   "higher (a shift, or stochastic ordering), with the Hodges-Lehmann estimate of "
                   "the typical shift; the means are not what it tests."]
        if s.ties >= checks.HEAVY_TIES:
            reasons.append(f"Many values are tied; {TIES_HANDLED}")
        return "mann_whitney", reasons
    return "permutation_mean", [
        base,
        "The mean is still a sensible summary here (no far outliers or heavy tails) and the spreads "
        "are similar, so the permutation test can stand in for the t-test: it reshuffles the group "
        "labels many times and needs no bell shape. Strictly it tests that the two groups are "
        "interchangeable (the same distribution); with similar spreads and shapes that comes down "
        "to comparing the means. Its p-value carries a small Monte Carlo error, reported with it.",
    ]


def _doubtful_with_unequal_spreads(s: _Situation, base: str) -> tuple[str, list[str]]:
    """Small groups, a doubtful shape and spreads that differ: Brunner-Munzel when extreme
    values make the means fragile, else Welch's t-test.

    The permutation tests and the Mann-Whitney test treat the groups as interchangeable when
    they do not differ, so a difference in spread alone moves them. Welch's test allows unequal
    spreads for means; the Brunner-Munzel test allows them for the order of the values (Brunner
    and Munzel 2000), which far values or heavy tails cannot pull (``s.extremes``).
    """
    reasons = [
        base,
        f"The spreads differ as well ({s.ratio_words()}, size ratio "
        f"{format_number(s.n_ratio, digits=2)}). The permutation tests and the Mann-Whitney test "
        "assume that, if the groups did not differ, their values could be swapped freely; a "
        "difference in spread alone then makes them report a difference that is not in the means "
        "or the typical values (Romano 1990, JASA 85:686; Pratt 1964, JASA 59:665).",
    ]
    if s.extremes:
        return "brunner_munzel", reasons + [
            "Some values lie far from the rest or the tails are heavy, so the means are fragile. "
            "The Brunner-Munzel test works with the order of the values, which such values cannot "
            "pull far, and allows the spreads and shapes to differ: it answers whether a value of "
            "one group is more likely to be the larger than a value of the other, with an interval "
            "for that probability (Brunner and Munzel 2000, Biometrical Journal 42:17).",
        ]
    return "welch_t", reasons + [
        "Welch's t-test allows the spreads to differ. With small groups that are not bell-shaped "
        "its p-value and interval are approximate; bootstrap intervals do no better at these sizes "
        "and give no p-value (Hesterberg 2015, The American Statistician 69:371), so Welch's test "
        "is the safer of the procedures at hand.",
    ]


# -- the rank test when spreads differ -------------------------------------------------------------

def _rank_test_for_unequal_spreads(key: str, reasons: list[str],
                                   s: _Situation) -> tuple[str, list[str]]:
    """Brunner-Munzel in place of Mann-Whitney when the spreads differ (the rest unchanged).

    Under unequal spreads the Mann-Whitney test is not a test of P(X > Y) = 1/2 alone (Pratt
    1964); the Brunner-Munzel test is, whatever the spreads (Brunner and Munzel 2000). The
    spreads count as different by the SD-ratio rule the rest of the advice uses
    (``_Situation.spreads_differ``, common practice). Far values inflate that ratio, which then
    errs toward Brunner-Munzel, which is also valid when the spreads are equal.
    """
    if key != "mann_whitney" or not s.spreads_differ:
        return key, reasons
    kept = [r for r in reasons if "Mann-Whitney" not in r and TIES_HANDLED not in r]
    if s.ties >= checks.HEAVY_TIES:
        kept.append("Many values are tied; the Brunner-Munzel test counts a tie as half a pair "
                    "either way (mid-ranks), so ties need no separate correction.")
    return "brunner_munzel", kept + [
        "A rank procedure fits these data, and the standard deviations differ by a factor of "
        f"{format_number(s.sd_ratio, digits=2)}. With unequal spreads the Mann-Whitney test can "
        "reject although neither group tends to be higher (Pratt 1964, JASA 59:665). The "
        "Brunner-Munzel test allows for different spreads: it answers whether a value of one "
        "group is more likely to be the larger than a value of the other, with an interval for "
        "that probability (Brunner and Munzel 2000, Biometrical Journal 42:17).",
    ]


def _why_not_brunner_munzel(chosen: str, s: _Situation) -> str:
    if chosen == "mann_whitney":
        return ("It asks the same question as the Mann-Whitney test without assuming equal "
                "spreads; with similar spreads both agree closely, and Mann-Whitney adds an "
                "estimate of the shift.")
    if record(chosen).estimate_kind == "mean":
        return ("It answers a different question (whether a value of one group is more likely "
                "to be the larger) rather than comparing means; it serves as a cross-check.")
    return ("It answers whether a value of one group is more likely to be the larger, which is "
            "a different quantity from the one compared here.")


# -- the alternatives -----------------------------------------------------------------------------

def _why_not(key: str, chosen: str, s: _Situation, *, equal_spread_known: bool, ordinal: bool,
             known_sd) -> str:
    small_doubt = s.small and s.shape_doubtful
    if chosen == "z" and key != "z":
        return "Standard deviations known from outside the data were given, and the z-test uses them."
    if record(key).family == "t" and ordinal:
        return "A mean of ratings assumes equal steps between the scale points."
    if key == "welch_t":
        if chosen == "pooled_t":
            return ("With equal spreads known, pooling gives a little more precision; Welch's test "
                    "remains a safe check and should agree.")
        return ("The groups are small and not bell-shaped, so the t-test's p-value and interval may "
                "be off.")
    if key == "pooled_t":
        if equal_spread_known and small_doubt:
            return ("You stated equal spreads, but with small groups that are not bell-shaped the shape "
                    "matters more than the spread.")
        if s.pooling_risky:
            return (f"It assumes equal spreads, and the data argue against that (SD ratio "
                    f"{format_number(s.sd_ratio, digits=2)}, size ratio {format_number(s.n_ratio, digits=2)}); "
                    "it can then give misleading p-values.")
        return ("It assumes equal spreads, which were not stated as known; Welch's test does not need "
                "that and loses almost nothing when the spreads are equal.")
    if key == "z":
        return "The z-test needs standard deviations known from outside the data; none were given."
    unequal_small = s.small and s.shape_doubtful and s.unequal_spreads and not ordinal
    if key == "mann_whitney":
        if chosen == "brunner_munzel" or unequal_small:
            return ("With unequal spreads it does not test whether one group tends to be higher: "
                    "a difference in spread alone can make it reject (Pratt 1964, JASA 59:665).")
        if record(chosen).family == "t":
            return ("It answers a different question (whether values of one group tend to be higher) "
                    "rather than comparing means; nothing in the data forces that change.")
        return ("It compares the order of values, not the means; with no far outliers or heavy "
                "tails the mean can be kept as the quantity of interest.")
    if key == "brunner_munzel":
        return _why_not_brunner_munzel(chosen, s)
    procedure = record(key)
    if procedure.family == "resampling" and not s.resampling_runs:
        return "Resampling is not run for this many values; the large-sample procedures are accurate."
    if procedure.exchangeable and s.unequal_spreads:
        return (f"It tests that the groups are interchangeable, spread and shape included, not only "
                f"that the {procedure.estimate_kind}s are equal; with "
                f"spreads this different ({s.ratio_words()}) it can "
                "report a difference that is not there (Romano 1990, JASA 85:686).")
    if key == "bootstrap_mean" and s.small:
        if min(s.sizes) < BOOTSTRAP_MIN_N:
            return (f"With fewer than {BOOTSTRAP_MIN_N} values in a group its interval is too "
                    "narrow (it misses the true difference more often than stated) and it gives "
                    "no p-value (Hesterberg 2015, The American Statistician 69:371).")
        return ("It gives no p-value, and with groups this small its interval covers the true "
                "difference no better than Welch's (Hesterberg 2015, The American Statistician "
                "69:371).")
    if procedure.family == "resampling" and procedure.estimate_kind == "mean":
        if ordinal:
            return "It compares means, which assumes equal steps between the scale points."
        if record(chosen).family == "rank":
            return ("Far outliers or heavy tails pull a mean strongly, so a comparison of means is "
                    "fragile here however its p-value is found.")
        return ("It answers the same question as the t-test without the bell-shape assumption; "
                "nothing in these data calls for that, so it serves as a cross-check.")
    if procedure.family == "resampling" and procedure.estimate_kind == "median":
        coarse = (" Medians of data with many ties move in jumps, which makes it coarse."
                  if s.ties >= checks.HEAVY_TIES else "")
        return ("A difference in medians is a different quantity from the one compared here, and it "
                "is estimated less precisely than a difference in means or the rank shift." + coarse)
    return "Not weighed for these data."


def _cautions(chosen: str, s: _Situation, diagnostics, groups: Groups, *, equal_spread_known: bool,
              ordinal: bool, known_sd) -> list[str]:
    out: list[str] = []
    if chosen == "pooled_t" and s.pooling_risky:
        out.append(f"You stated equal spreads, but the data argue against it: the SD ratio is "
                   f"{format_number(s.sd_ratio, digits=2)} and the size ratio "
                   f"{format_number(s.n_ratio, digits=2)}. If the statement rests on firm knowledge "
                   "keep it; otherwise Welch's test is the safer choice.")
    if chosen == "z" and known_sd is not None:
        for label, values, known in zip(groups.labels, (groups.x, groups.y), known_sd):
            if values.size > 1:
                sd = centred_sd(values)
                ratio = max(sd, known) / min(sd, known) if min(sd, known) > 0 else float("inf")
                if ratio >= KNOWN_SD_MISMATCH:
                    out.append(f"The standard deviation of group '{label}' in these data "
                               f"({format_number(sd)}) is far from the known value "
                               f"({format_number(known)}); check that the known value applies.")
    if chosen == "mann_whitney" and s.spreads_differ:
        out.append("The spreads differ a lot; the Mann-Whitney test then does not tell whether one "
                   "group tends to be higher (it can reject when neither does, Pratt 1964), and the "
                   "shift estimate is less meaningful as one number. The Brunner-Munzel test "
                   "answers that question with unequal spreads.")
    if record(chosen).family == "t" and any(s.far):
        out.append("Some values lie far from the rest and pull the means; check that they are real "
                   "measurements, and compare with the rank and median procedures.")
    if record(chosen).family == "resampling":
        out.append("Resampled results vary slightly with the random seed; the seed used is recorded "
                   "so the numbers can be repeated.")
    misshapen = [f"group '{label}'" for label, skewed, heavy in zip(s.labels, s.skewed, s.heavy)
                 if skewed or heavy]
    if misshapen and not ordinal:
        out.append(
            "Cohen's d, Hedges' g and Glass's delta, and above all their intervals, assume "
            f"bell-shaped groups; {_join(misshapen)} {'is' if len(misshapen) == 1 else 'are'} "
            "lopsided or heavy-tailed, so those intervals can miss the true value more often than "
            "stated (in one simulation of lopsided groups of 15, about 91% for d and 85% for "
            "Glass's delta at a stated 95%; Algina, Keselman and Penfield 2005, Psychological "
            "Methods 10:317). The rank-biserial correlation and the common-language effect size "
            "rest on the order of the values only.")
    flagged = [shape.label for shape in diagnostics.shapes
               if shape.shapiro_p is not None and shape.shapiro_p < checks.CHECK_ALPHA]
    if flagged and not s.shape_doubtful and not ordinal:
        out.append("The Shapiro-Wilk check flagged a departure from a bell shape in "
                   f"{_join([f'group {label!r}' for label in flagged])}, but the skewness, tails and outliers "
                   "show nothing large, so it did not change the suggestion.")
    return out  # those for every comparison: engine.report.cautions


def recommend(diagnostics, groups: Groups, *, equal_spread_known: bool = False, ordinal: bool = False,
              known_sd: tuple[float, float] | None = None) -> Recommendation:
    """Suggest one procedure for the two groups, with reasons, alternatives and cautions.

    Parameters
    ----------
    diagnostics : engine.diagnostics.Diagnostics
        The checks of these groups.
    groups : engine.results.Groups
        The two samples.
    equal_spread_known : bool, keyword-only
        The user knows from outside the data that the spreads are equal.
    ordinal : bool, keyword-only
        The values are ratings on an ordered scale.
    known_sd : (float, float) or None, keyword-only
        Standard deviations known from outside the data.

    Returns
    -------
    Recommendation

    Notes
    -----
    In order: known SDs -> z-test; ratings -> Mann-Whitney; a group under ``SMALL_GROUP_N`` values
    that is clearly skewed, heavy-tailed or has far outliers -> Mann-Whitney when there are heavy
    tails or far outliers, otherwise the permutation test of means (similar spreads) or the
    bootstrap interval of means (spreads differ); equal spreads known -> pooled t; otherwise
    Welch's t-test, which stays accurate for larger groups by the central limit theorem. The
    Shapiro-Wilk p-value never decides on its own.

    References
    ----------
    Ruxton, G. D. (2006). The unequal variance t-test is an underused alternative to Student's
    t-test and the Mann-Whitney U test. Behavioral Ecology 17(4), 688-690.
    Delacre, M., Lakens, D. and Leys, C. (2017). Why psychologists should by default use Welch's
    t-test instead of Student's t-test. International Review of Social Psychology 30(1), 92-101.
    Fagerland, M. W. and Sandvik, L. (2009). The Wilcoxon-Mann-Whitney test under scrutiny.
    Statistics in Medicine 28(10), 1487-1497.
    """
    s = _situation(diagnostics, groups)
    flags = dict(equal_spread_known=equal_spread_known, ordinal=ordinal, known_sd=known_sd)
    key, reasons = _choose(s, **flags)
    key, reasons = _rank_test_for_unequal_spreads(key, reasons, s)
    if s.levels is not None and not ordinal and known_sd is None:
        low, high, count = s.levels
        reasons.append(
            f"All values are whole numbers from {low:g} to {high:g} ({count} different values), as "
            "ratings on a scale are. If they are ratings whose order means something but whose "
            "steps need not be equal, say so (the statement that the values are ordinal ratings; "
            "--ordinal in the command): the suggestion then turns to the Mann-Whitney procedure, "
            "which uses only the order. If they are counts or measurements, keep this suggestion.")
    if key != "z" and not ordinal and (any(s.far) or any(s.fenced)):
        calm = [f"group '{label}'" for label, fenced in zip(s.labels, s.fenced) if fenced]
        note = (f" Here the values beyond the fence in {_join(calm)} are not that surprising, so "
                "they did not count." if calm else "")
        reasons.append(FENCE_RULE + note)
    candidates = [r for r in RECORDS if r.key != key and r.serves("independent", "differ")
                  and (not r.needs_known_sd or known_sd is not None)]
    considered = tuple(ConsideredOption(r.key, r.name, _why_not(r.key, key, s, **flags))
                       for r in candidates)
    cautions = _cautions(key, s, diagnostics, groups, **flags)
    assumptions = {r.key: r.assumption for r in RECORDS}
    return Recommendation(key, PROCEDURE_NAMES[key], tuple(reasons), considered, tuple(cautions),
                          assumptions, looks_like_ratings=s.levels is not None)
