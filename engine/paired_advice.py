"""From the checks of matched pairs to one suggested procedure, with reasons, the alternatives
weighed and cautions.

The same practice as :mod:`engine.advice`, applied to the pair differences: the paired t-test
by default (the differences look near normal, or there are enough pairs for the central limit
theorem); the signed-rank test for ratings, or for few pairs whose differences are clearly
lopsided, heavy-tailed or hold surprising far values. The sign-flip test (the mean, exact with
few pairs) and the bootstrap interval (an interval without a test, which does not vote) are
weighed beside them. A normality pre-test's p-value on its own never decides. The result is an
:class:`engine.advice.Recommendation`, read by everything that reads the advice for two
independent groups.
"""

from __future__ import annotations

from dataclasses import dataclass

from . import diagnostics as checks
from .advice import SMALL_GROUP_N, ConsideredOption, Recommendation, looks_like_ratings
from .diagnostics import FAR_FENCE, OUTLIER_SURPRISE
from .paired_diagnostics import WEAK_CORRELATION, PairedChecks
from .procedures.registry import RECORDS, record
from .procedures.resampling import BOOTSTRAP_MIN_N
from .results import Groups
from .rounding import format_number
from .wording import plural

__all__ = ["recommend_paired", "SMALL_PAIRS", "PAIRING_CAUTION", "ORDER_CAUTION"]

# Below this many pairs the central limit theorem cannot be leaned on when the differences are
# clearly lopsided, heavy-tailed or hold far values (common practice: "30", as for a group).
SMALL_PAIRS = SMALL_GROUP_N

PAIRING_CAUTION = (
    "The paired procedures are right only if the pairing is real: each unit measured once in "
    "each group and matched by the right ID or row. Units matched by mistake, or measured more "
    "than once in a group, make every paired result wrong.")
ORDER_CAUTION = (
    "In before-and-after data, anything that changes between the two measurements (wear, "
    "practice, a drifting instrument, the season) shows up as a difference too; measuring in a "
    "balanced or random order, or comparing with units left untreated, tells it apart from the "
    "effect of interest.")


@dataclass(frozen=True)
class _Pairs:
    """What the checks of the pairs say, in the terms the advice reasons with."""

    n: int
    skewed: bool
    heavy: bool
    far: bool     # differences beyond the far fence that are surprising for a normal sample
    fenced: bool  # differences beyond the far fence that a normal sample of n gives often
    ties: float
    zeros: int
    correlation: float
    resampling_runs: bool
    same: float | None = None  # the one amount every pair differs by, if they all do

    @property
    def small(self) -> bool:
        return self.n < SMALL_PAIRS

    @property
    def doubtful(self) -> bool:
        return self.skewed or self.heavy or self.far

    @property
    def extremes(self) -> bool:
        """Heavy tails or far values: the mean difference itself is unstable."""
        return self.heavy or self.far

    def describe(self) -> str:
        """ "are clearly lopsided and have values far from the rest" """
        traits = [words for flag, words in ((self.skewed, "are clearly lopsided"),
                                            (self.heavy, "are heavy-tailed"),
                                            (self.far, "hold values far from the rest"))
                  if flag]
        return traits[0] if len(traits) == 1 else ", ".join(traits[:-1]) + " and " + traits[-1]


def _situation(paired: PairedChecks, groups: Groups) -> _Pairs:
    shape = paired.shape
    return _Pairs(
        n=paired.n_pairs,
        skewed=checks.is_clearly_skewed(shape),
        heavy=checks.is_heavy_tailed(shape),
        far=bool(shape.far_surprising),
        fenced=len(shape.far_outliers) > 0 and not shape.far_surprising,
        ties=float(shape.tie_share),
        zeros=paired.zeros,
        correlation=float(paired.correlation),
        resampling_runs=record("sign_flip_mean").fits_size(groups.x.size + groups.y.size),
        same=paired.common_difference,
    )


# -- the choice -----------------------------------------------------------------------------------

_T_DEFAULT = ("The paired t-test compares the mean of the pair differences with zero. It is the "
              "usual choice for matched pairs: each unit serves as its own control, so the "
              "variation from one unit to the next drops out of the comparison.")
_RANKS = ("The signed-rank test works with the order of the sizes of the differences, so a few "
          "extreme pairs cannot pull it far. It tests whether the differences are spread "
          "symmetrically around zero; when they are symmetric about some centre, a small "
          "p-value means that centre is not zero. Its estimate is the median of the averages of "
          "every two differences (Hodges-Lehmann), a median-like typical difference; it does "
          "not test the mean.")
_NO_SPREAD = ("Every pair differs by the same amount, so the differences have no spread: the "
              "paired t-test has no standard error to divide by, and gives no t, p-value or "
              "interval. The signed-rank test still works, from the signs of the differences.")


def _choose(s: _Pairs, *, ordinal: bool) -> tuple[str, list[str]]:
    """The suggested key and the reasons for it."""
    if s.same is not None:
        return "signed_rank", [_NO_SPREAD, _RANKS]
    if ordinal:
        return "signed_rank", [
            "The values are ratings on an ordered scale: their order means something but the "
            "steps between them need not be equal, so a mean of the differences is hard to "
            "interpret.",
            _RANKS,
        ]
    if s.small and s.doubtful:
        reasons = [
            f"There are {plural(s.n, 'pair')}, fewer than {SMALL_PAIRS}, and the differences "
            f"{s.describe()}. With so few pairs the central limit theorem cannot be relied on "
            "to rescue a t-test of their mean (the cut-off is common practice, not a sharp rule).",
            _RANKS,
        ]
        if s.skewed:
            reasons.append(
                "Lopsided differences cannot be symmetric about any point, so a small p-value "
                "may reflect the lopsidedness as well as a shift: read it as 'the differences "
                "lean to one side of zero', not as a statement about their mean.")
        if s.ties >= checks.HEAVY_TIES:
            reasons.append("Many differences are tied; the test gives tied sizes their average "
                           "rank and counts them exactly.")
        return "signed_rank", reasons
    reasons = [_T_DEFAULT]
    if s.doubtful:
        reasons.append(
            f"The differences are not bell-shaped (they {s.describe()}), but there are "
            f"{plural(s.n, 'pair')}, at least {SMALL_PAIRS}. With that many the mean difference "
            "is close to normally distributed even when the differences are not (the central "
            "limit theorem), so the t-test's p-value and interval hold up. The cut-off of "
            f"{SMALL_PAIRS} is common practice, not a sharp rule; very lopsided differences "
            "need more.")
    else:
        reasons.append("The differences show no clear lopsidedness, heavy tails or far values, "
                       "so nothing argues against comparing their mean with a t-test.")
    return "paired_t", reasons


def _fence_rule(s: _Pairs) -> str:
    rule = (f"A difference beyond the far fence (more than {FAR_FENCE:g} interquartile ranges "
            "past the quartiles) changes the suggestion only when a normal sample of "
            f"{plural(s.n, 'difference')} gives one that extreme less than "
            f"{OUTLIER_SURPRISE:.0%} of the time (Rosner's generalized ESD test).")
    if s.fenced and not s.far:
        rule += " Here it is not that surprising, so it did not count."
    return rule


# -- the alternatives -----------------------------------------------------------------------------

def _why_not(key: str, chosen: str, s: _Pairs, *, ordinal: bool) -> str:
    procedure = record(key)
    if procedure.family == "resampling" and not s.resampling_runs:
        return "Resampling is not run for this many values; the large-sample procedures are accurate."
    if ordinal and procedure.estimate_kind == "mean":
        return "A mean of differences of ratings assumes equal steps between the scale points."
    if key == "paired_t" and s.same is not None:
        return "It was not computed: the differences have no spread, so it has no standard error."
    if key == "paired_t":
        return (f"With {plural(s.n, 'pair')} and differences that {s.describe()}, the t-test's "
                "p-value and interval may be off, and extreme pairs pull the mean it compares.")
    if key == "signed_rank":
        if s.doubtful:
            return ("It tests whether the differences are symmetric about zero, with a "
                    "median-like estimate; lopsided differences are not symmetric about any "
                    "point, so it answers a different question, and with this many pairs the "
                    "mean can be compared directly.")
        return ("It tests whether the differences are symmetric about zero, with a median-like "
                "estimate, rather than comparing the mean; nothing in the differences calls for "
                "leaving the mean. It serves as a cross-check.")
    if key == "sign_flip_mean" and s.same is not None:
        return ("With every difference the same amount it counts the same signs as the "
                "signed-rank test and gives the same p-value; it serves as a cross-check.")
    if key == "sign_flip_mean":
        if chosen == "signed_rank" and s.extremes:
            return ("It is exact with few pairs, counting every pattern of signs, but it "
                    "compares the mean, which heavy tails or far values pull strongly.")
        if chosen == "signed_rank":
            return ("It compares the mean exactly with few pairs, but it takes the differences "
                    "to be symmetric about zero when the groups do not differ, which lopsided "
                    "differences are not; it serves as a cross-check of the mean.")
        return ("It compares the same mean as the t-test without needing a bell shape, exact "
                "with few pairs; nothing in these differences calls for it, so it serves as a "
                "cross-check.")
    if key == "paired_bootstrap_mean":
        if s.n < BOOTSTRAP_MIN_N:
            return (f"With fewer than {BOOTSTRAP_MIN_N} pairs its interval is too narrow (it "
                    "misses the true difference more often than stated) and it gives no p-value "
                    "(Hesterberg 2015, The American Statistician 69:371).")
        if s.small:
            return ("It gives no p-value, and with this few pairs its interval covers the true "
                    "mean difference no better than the t-test's (Hesterberg 2015, The American "
                    "Statistician 69:371).")
        return ("It gives an interval for the mean difference but no p-value, so it is shown "
                "beside the tests as a check and not counted.")
    return "Not weighed for these data."


def _cautions(chosen: str, s: _Pairs, paired: PairedChecks, *, zero_rule: str,
              stated_spreads: bool) -> list[str]:
    out = [PAIRING_CAUTION]
    r = s.correlation
    if r == r and r < WEAK_CORRELATION:  # NaN: not measured
        how = "go in opposite directions" if r < 0 else "hardly go together"
        out.append(f"Here the two values of a pair {how} (r = {format_number(r, digits=2)}), "
                   "which is unusual for two measurements of one unit: check the pairing "
                   "before relying on the result.")
    out.append(ORDER_CAUTION)
    if record(chosen).estimate_kind == "mean" and s.far:
        out.append("Some differences lie far from the rest and pull the mean; check those "
                   "pairs, and compare with the signed-rank test.")
    if chosen == "signed_rank" and s.zeros:
        used = ("left out before ranking (Wilcoxon's rule)" if zero_rule == "drop"
                else "ranked and given no sign (Pratt's rule)")
        out.append(f"{plural(s.zeros, 'pair')} showed no difference and {'was' if s.zeros == 1 else 'were'} "
                   f"{used}; the p-value under the other rule is reported beside it, and when "
                   "the two rules disagree about the verdict the result is borderline.")
    if s.skewed or s.heavy:
        out.append("The intervals of d_z and d_av assume bell-shaped differences; these are "
                   "lopsided or heavy-tailed, so those intervals can miss the true value more "
                   "often than stated.")
    shape = paired.shape
    if (shape.shapiro_p is not None and shape.shapiro_p < checks.CHECK_ALPHA
            and not s.doubtful):
        out.append("The Shapiro-Wilk check flagged a departure of the differences from a bell "
                   "shape, but their skewness, tails and outliers show nothing large, so it did "
                   "not change the suggestion.")
    if stated_spreads:
        out.append("What was stated about the groups' standard deviations or equal spreads "
                   "concerns two independent groups; the paired procedures work on the "
                   "differences and do not use it.")
    return out


def recommend_paired(paired: PairedChecks, groups: Groups, *, ordinal: bool = False,
                     zero_rule: str = "drop", known_sd: tuple[float, float] | None = None,
                     equal_spread_known: bool = False) -> Recommendation:
    """Suggest one procedure for matched pairs, with reasons, alternatives and cautions.

    Parameters
    ----------
    paired : engine.paired_diagnostics.PairedChecks
        The checks of the pairs.
    groups : engine.results.Groups
        The matched samples (pair i in place i of each).
    ordinal : bool, keyword-only
        The values are ratings on an ordered scale.
    zero_rule : str, keyword-only
        The signed-rank test's rule for pairs with no difference ("drop" or "pratt").
    known_sd, equal_spread_known : keyword-only
        Statements about two independent groups; in a paired design they only earn a caution.

    Returns
    -------
    engine.advice.Recommendation

    Notes
    -----
    Ratings -> signed-rank; fewer than ``SMALL_PAIRS`` pairs whose differences are clearly
    lopsided, heavy-tailed or hold surprising far values -> signed-rank; otherwise the paired
    t-test, which stays accurate for many pairs by the central limit theorem. Every paired
    procedure of a difference not suggested is weighed with the reason it was not.

    References
    ----------
    Wilcoxon, F. (1945). Biometrics Bulletin 1, 80-83. Hollander, M., Wolfe, D. A. and Chicken,
    E. (2014). Nonparametric Statistical Methods, 3rd ed., Wiley, chapter 3 (the signed-rank
    test and its Hodges-Lehmann estimate assume differences symmetric about their centre).
    """
    s = _situation(paired, groups)
    key, reasons = _choose(s, ordinal=ordinal)
    rating_like = looks_like_ratings(groups)
    if rating_like and not ordinal:
        reasons.append(
            "All values are whole numbers on a short scale, as ratings are. If they are ratings "
            "whose order means something but whose steps need not be equal, say so (the "
            "statement that the values are ordinal ratings): the suggestion then turns to the "
            "signed-rank test. If they are counts or measurements, keep this suggestion.")
    if not ordinal and (s.far or s.fenced):
        reasons.append(_fence_rule(s))
    weighed = [r for r in RECORDS if r.key != key and r.serves("paired", "differ")]
    considered = tuple(ConsideredOption(r.key, r.name, _why_not(r.key, key, s, ordinal=ordinal))
                       for r in weighed)
    cautions = _cautions(key, s, paired, zero_rule=zero_rule,
                         stated_spreads=known_sd is not None or equal_spread_known)
    return Recommendation(key, record(key).name, tuple(reasons), considered, tuple(cautions),
                          looks_like_ratings=rating_like)
