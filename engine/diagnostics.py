"""Checks of shape, spread, outliers and ties of two groups, as numbers and plain sentences.

``diagnose`` describes the data; it never picks a procedure (that is ``engine.advice``). Every
check yields one :class:`engine.results.Finding` with a stable key, so the window and the advice
can read them. The checks stay fast on a million values per group: the Shapiro-Wilk test is run
only where it is valid (3 to 5000 values), each group is sorted once, and the Q-Q plot keeps at
most ``QQ_MAX_POINTS`` evenly spaced order statistics.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import special

from .errors import DataProblem
from .rounding import format_number, format_shape, p_clause
from .wording import plural
from .results import Finding, Groups, readonly_array
from .shapiro_wilk import MAX_N, MIN_N, shapiro_wilk
from .stats_basics import FAR_FENCE, MILD_FENCE, centred_sd, quantiles, quartiles, tukey_fences
from .summary import sorted_values

__all__ = [
    "GroupShape",
    "SpreadCheck",
    "Diagnostics",
    "diagnose",
    "sample_shape",
    "skewness_se",
    "kurtosis_se",
    "is_clearly_skewed",
    "is_heavy_tailed",
    "extreme_value_test",
    "SHAPIRO_MIN_N",
    "SHAPIRO_MAX_N",
    "SHAPIRO_SMALL_N",
    "SHAPIRO_LARGE_N",
    "QQ_MAX_POINTS",
    "MILD_FENCE",
    "FAR_FENCE",
    "NORMAL_MILD_SHARE",
    "NORMAL_FAR_SHARE",
    "OUTLIER_SURPRISE",
    "EXTREME_TEST_MAX_STEPS",
    "CHECK_ALPHA",
    "SKEW_SE_MULTIPLE",
    "SKEW_MATERIAL",
    "KURTOSIS_MATERIAL",
    "HEAVY_TIES",
    "SD_RATIO_NOTE",
    "SD_RATIO_WARNING",
    "N_RATIO_NOTE",
]

# Shapiro-Wilk as implemented (Royston's algorithm) is valid for 3 to 5000 values.
SHAPIRO_MIN_N = MIN_N
SHAPIRO_MAX_N = MAX_N
# Below this many values the Shapiro-Wilk check has little power; from the larger size on it
# flags departures too small to matter for a t-test (common practice).
SHAPIRO_SMALL_N = 30
SHAPIRO_LARGE_N = 200
# Most points drawn in a Q-Q plot; more add nothing visible and slow the window.
QQ_MAX_POINTS = 2000
# Tukey's fences (MILD_FENCE = 1.5 and FAR_FENCE = 3 IQR beyond the quartiles) come from
# engine.stats_basics.
# Level at which a check's p-value is called "small" in the findings (common practice: 0.05).
CHECK_ALPHA = 0.05
# Skewness or excess kurtosis more than twice its standard error is "clearly" non-zero
# (common practice, a rough two-SE rule).
SKEW_SE_MULTIPLE = 2.0
# Sizes that matter in practice whatever n is (common practice, after Bulmer 1979: |skewness|
# above 0.5 is moderate, above 1 strong; excess kurtosis above 1 means visibly heavy tails).
SKEW_MATERIAL = 0.5
KURTOSIS_MATERIAL = 1.0
# Share of a normal distribution beyond each fence (about 0.7% and 0.00023%), and how unlikely
# a count must be under that share to be reported as more than chance (common practice: 1%).
_QUARTILE_Z = float(special.ndtri(0.75))
NORMAL_MILD_SHARE = float(2 * special.ndtr(-_QUARTILE_Z * (1 + 2 * MILD_FENCE)))
NORMAL_FAR_SHARE = float(2 * special.ndtr(-_QUARTILE_Z * (1 + 2 * FAR_FENCE)))
OUTLIER_SURPRISE = 0.01
# Most steps of the many-outlier test (one value removed per step); enough for any group in
# which far values are a handful of slips, and it bounds the work on huge groups.
EXTREME_TEST_MAX_STEPS = 1000
# Share of tied values from which ties are "heavy" (common practice for rating scales).
HEAVY_TIES = 0.25
# Ratio of the larger to the smaller SD worth a note, and one that is a warning for the pooled
# t-test (common practice: a ratio above 2 is the usual rule of thumb).
SD_RATIO_NOTE = 1.5
SD_RATIO_WARNING = 2.0
# Ratio of group sizes from which unequal spreads bias the pooled t-test more (common practice).
N_RATIO_NOTE = 1.5


@dataclass(frozen=True, eq=False)
class GroupShape:
    """The shape of one group's values.

    ``shapiro_w`` and ``shapiro_p`` are None outside Shapiro-Wilk's valid n (3..5000); a finding
    says why. ``skewness`` and ``excess_kurtosis`` are the adjusted Fisher-Pearson G1 and G2
    (NaN where n is too small or the values do not vary). Outliers are at Tukey's fences.
    ``tie_share`` is the share of values equal to another value of the same group.
    ``far_surprising`` says whether the far outliers are more extreme than a normal sample of
    this size gives by chance (:func:`extreme_value_test` at ``OUTLIER_SURPRISE``);
    ``extreme_p`` is that test's smallest p-value over the far outliers (NaN with none).
    ``qq_theoretical`` and ``qq_observed`` are normal Q-Q coordinates (Blom positions).
    """

    label: str
    n: int
    shapiro_w: float | None
    shapiro_p: float | None
    skewness: float
    skewness_se: float
    excess_kurtosis: float
    kurtosis_se: float
    mild_outliers: tuple[float, ...]
    far_outliers: tuple[float, ...]
    tie_share: float
    qq_theoretical: np.ndarray
    qq_observed: np.ndarray
    far_surprising: bool = False
    extreme_p: float = float("nan")


@dataclass(frozen=True)
class SpreadCheck:
    """Whether the two groups spread out alike, and how different their sizes are."""

    levene_stat: float
    levene_p: float
    brown_forsythe_stat: float
    brown_forsythe_p: float
    sd_ratio: float
    n_ratio: float
    iqr_ratio: float = float("nan")  # larger over smaller interquartile range; NaN if one is 0


@dataclass(frozen=True, eq=False)
class Diagnostics:
    """Shape of each group, the spread check, ties across both groups, and the findings."""

    shapes: tuple[GroupShape, GroupShape]
    spread: SpreadCheck
    pooled_tie_share: float
    findings: tuple[Finding, ...]

    def finding(self, key: str, group: int | None = None) -> Finding | None:
        """The finding with ``key`` (and ``group``), or None."""
        for item in self.findings:
            if item.key == key and item.group == group:
                return item
        return None


# -- formulas -------------------------------------------------------------------------------------

def skewness_se(n: int) -> float:
    """Standard error of the adjusted skewness G1 of a normal sample of size n.

    Notes
    -----
    SES = sqrt(6 n (n - 1) / ((n - 2)(n + 1)(n + 3))), defined for n >= 3.

    References
    ----------
    Joanes, D. N. and Gill, C. A. (1998). Comparing measures of sample skewness and kurtosis.
    The Statistician 47(1), 183-189.
    """
    if n < 3:
        return float("nan")
    return float(np.sqrt(6.0 * n * (n - 1) / ((n - 2) * (n + 1) * (n + 3))))


def kurtosis_se(n: int) -> float:
    """Standard error of the adjusted excess kurtosis G2 of a normal sample of size n.

    Notes
    -----
    SEK = 2 SES sqrt((n^2 - 1) / ((n - 3)(n + 5))), defined for n >= 4.

    References
    ----------
    Joanes, D. N. and Gill, C. A. (1998). The Statistician 47(1), 183-189.
    """
    if n < 4:
        return float("nan")
    return float(2.0 * skewness_se(n) * np.sqrt((n * n - 1.0) / ((n - 3) * (n + 5))))


def _moments(values: np.ndarray) -> tuple[float, float]:
    """Adjusted Fisher-Pearson skewness G1 and excess kurtosis G2 (NaN where undefined)."""
    n = values.size
    if n < 3:
        return float("nan"), float("nan")
    # G1 and G2 do not depend on the scale: the values are brought to about 1 (by the largest
    # magnitude), and the deviations once more, so that squares and cubes neither overflow near
    # 1e308 nor vanish near 1e-300.
    magnitude = max(float(values.max()), -float(values.min()))
    if not np.isfinite(magnitude) or magnitude == 0:
        return float("nan"), float("nan")
    deviations = values / magnitude
    deviations -= deviations.mean()
    scale = max(float(deviations.max()), -float(deviations.min()))
    if scale == 0:
        return float("nan"), float("nan")
    deviations /= scale
    squares = deviations * deviations
    m2 = squares.mean()
    # Values that do not vary (up to rounding) have no shape to speak of.
    if m2 <= np.finfo(float).eps ** 2:
        return float("nan"), float("nan")
    m3 = float(np.dot(squares, deviations)) / n
    g1 = m3 / m2 ** 1.5
    skew = g1 * np.sqrt(n * (n - 1.0)) / (n - 2.0)
    if n < 4:
        return float(skew), float("nan")
    m4 = float(np.dot(squares, squares)) / n
    g2 = m4 / (m2 * m2) - 3.0
    kurt = ((n + 1.0) * g2 + 6.0) * (n - 1.0) / ((n - 2.0) * (n - 3.0))
    return float(skew), float(kurt)


def _tied_within(ordered: np.ndarray) -> np.ndarray:
    """Which of the sorted values equal a neighbour (and so another value of the same group)."""
    tied = np.zeros(ordered.size, dtype=bool)
    if ordered.size > 1:
        same = ordered[1:] == ordered[:-1]
        tied[1:] |= same
        tied[:-1] |= same
    return tied


def _tie_share(ordered: np.ndarray) -> float:
    """Share of sorted values that equal another value."""
    return float(np.count_nonzero(_tied_within(ordered))) / ordered.size if ordered.size else 0.0


def _pooled_tie_share(x_sorted: np.ndarray, y_sorted: np.ndarray) -> float:
    """Share of all values equal to another value in either group.

    Both inputs are sorted, so a stable sort of their concatenation is a single merge of two runs
    (numpy's timsort finds them), far quicker than sorting anew.
    """
    pooled = np.concatenate((x_sorted, y_sorted))
    pooled.sort(kind="stable")
    return _tie_share(pooled)


def _qq(ordered: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Normal Q-Q coordinates with Blom's positions (i - 3/8) / (n + 1/4)."""
    n = ordered.size
    if n == 0:
        return readonly_array([]), readonly_array([])
    if n > QQ_MAX_POINTS:
        index = np.unique(np.round(np.linspace(0, n - 1, QQ_MAX_POINTS)).astype(np.int64))
    else:
        index = np.arange(n)
    positions = (index + 1 - 0.375) / (n + 0.25)
    return readonly_array(special.ndtri(positions)), readonly_array(ordered[index])


_SAFE_TO_SQUARE = (1e-150, 1e150)  # magnitudes whose squares and sums of squares stay normal floats


def _anova_of_deviations(groups: tuple[np.ndarray, np.ndarray], centres: tuple[float, float]
                         ) -> tuple[float, float]:
    """One-way ANOVA F of absolute deviations from each group's centre, and its p-value.

    Notes
    -----
    With Z_ij = |x_ij - c_i|, W = (N - k) sum n_i (Zbar_i - Zbar)^2 / ((k - 1) sum (Z_ij -
    Zbar_i)^2), referred to F(k - 1, N - k). Centre = mean gives Levene's test, centre = median
    the Brown-Forsythe variant.
    """
    with np.errstate(over="ignore"):
        deviations = [np.abs(values - centre) for values, centre in zip(groups, centres)]
    largest = max(float(d.max()) if d.size else 0.0 for d in deviations)
    if not _SAFE_TO_SQUARE[0] < largest < _SAFE_TO_SQUARE[1]:
        # F does not depend on the scale: values whose deviations would overflow (or vanish)
        # when squared are brought to about 1 first
        magnitude = max(max(float(v.max()), -float(v.min())) if v.size else 0.0 for v in groups)
        if np.isfinite(magnitude) and magnitude > 0:
            deviations = [np.abs(values / magnitude - centre / magnitude)
                          for values, centre in zip(groups, centres)]
    sizes = np.array([d.size for d in deviations], dtype=float)
    total = sizes.sum()
    k = len(deviations)
    means = np.array([d.mean() for d in deviations])
    grand = float((means * sizes).sum() / total)
    between = float((sizes * (means - grand) ** 2).sum())
    within = float(sum(np.dot(d - m, d - m) for d, m in zip(deviations, means)))
    if total - k <= 0 or within <= 0:
        return float("nan"), float("nan")
    statistic = (total - k) * between / ((k - 1) * within)
    return float(statistic), float(special.fdtrc(k - 1, total - k, statistic))  # the F upper tail


# -- checks ---------------------------------------------------------------------------------------

def is_clearly_skewed(shape: GroupShape) -> bool:
    """Whether a group is clearly lopsided: skewness beyond chance and of a size that matters.

    Notes
    -----
    True when |G1| > ``SKEW_SE_MULTIPLE`` * SES and |G1| > ``SKEW_MATERIAL``. The first part
    keeps small samples from being judged on noise; the second keeps huge samples from being
    judged on trivial lopsidedness that the standard error alone would call significant.

    References
    ----------
    Bulmer, M. G. (1979). Principles of Statistics. Dover (skewness beyond 0.5 moderate, beyond 1
    strong).
    """
    g1, se = shape.skewness, shape.skewness_se
    return bool(np.isfinite(g1) and np.isfinite(se)
                and abs(g1) > SKEW_SE_MULTIPLE * se and abs(g1) > SKEW_MATERIAL)


def is_heavy_tailed(shape: GroupShape) -> bool:
    """Whether a group has clearly heavier tails than a normal distribution.

    Notes
    -----
    True when G2 > ``SKEW_SE_MULTIPLE`` * SEK and G2 > ``KURTOSIS_MATERIAL`` (light tails,
    G2 < 0, do not count: they harm neither the t-test nor the rank test).

    References
    ----------
    Joanes, D. N. and Gill, C. A. (1998). The Statistician 47(1), 183-189.
    """
    g2, se = shape.excess_kurtosis, shape.kurtosis_se
    return bool(np.isfinite(g2) and np.isfinite(se)
                and g2 > SKEW_SE_MULTIPLE * se and g2 > KURTOSIS_MATERIAL)


def extreme_value_test(ordered: np.ndarray, count: int) -> tuple[float, ...]:
    """How surprising the ``count`` most extreme values are for a normal sample of this size.

    Parameters
    ----------
    ordered : numpy.ndarray
        The group's values, sorted.
    count : int
        How many of the most extreme values to test (at most ``n - 2``).

    Returns
    -------
    tuple of float
        One p-value per step of Rosner's generalized ESD procedure: step i removes the i - 1
        values tested before and asks whether the value farthest from the mean of the rest is
        more extreme than a normal sample of that size gives. Fewer than ``count`` p-values
        when the values run out (fewer than three left, or no spread left).

    Notes
    -----
    With m values left, R = max |x - mean| / s. Its critical value at level alpha is
    lambda = (m - 1) t / sqrt((m - 2 + t^2) m), t the 1 - alpha / (2 m) point of Student's t with
    m - 2 degrees of freedom; solving for alpha gives the p-value
    p = min(1, 2 m P(T > t)) with t = R sqrt(m (m - 2) / ((m - 1)^2 - m R^2)). The procedure
    finds at least one outlier at level alpha exactly when some p is below alpha. For one value
    this is Grubbs' test, whose Bonferroni form is exact for the levels used here.

    References
    ----------
    Grubbs, F. E. (1969). Procedures for detecting outlying observations in samples.
    Technometrics 11(1), 1-21.
    Rosner, B. (1983). Percentage points for a generalized ESD many-outlier procedure.
    Technometrics 25(2), 165-172.
    NIST/SEMATECH e-Handbook of Statistical Methods, section 1.3.5.17.3 (generalized ESD test).
    """
    values = np.asarray(ordered, dtype=float)
    n = values.size
    steps = min(max(0, int(count)), n - 2, EXTREME_TEST_MAX_STEPS)
    if steps <= 0:
        return ()
    # Sums over the values still in play, ordered[low:high], built outwards from the median so
    # that no removed extreme value enters them (a running total minus the removed values would
    # lose the small remaining spread to rounding when the extremes are huge).
    middle = n // 2
    centre = float(values[middle])
    deviations = values - centre
    left = deviations[:middle][::-1]
    right = deviations[middle:]
    zero = np.zeros(1)
    sums_left = np.concatenate((zero, np.cumsum(left)))
    squares_left = np.concatenate((zero, np.cumsum(left * left)))
    sums_right = np.concatenate((zero, np.cumsum(right)))
    squares_right = np.concatenate((zero, np.cumsum(right * right)))
    low, high = 0, n
    ratios: list[float] = []
    sizes: list[int] = []
    for _ in range(steps):
        m = high - low
        if m < 3 or low > middle or high < middle:
            break
        s1 = sums_left[middle - low] + sums_right[high - middle]
        s2 = squares_left[middle - low] + squares_right[high - middle]
        mean = s1 / m
        variance = max(0.0, (s2 - s1 * mean) / (m - 1))
        below, above = mean - deviations[low], deviations[high - 1] - mean
        widest = max(below, above)
        if not variance > 0 or np.sqrt(variance) <= np.finfo(float).eps * max(widest, abs(centre)):
            break
        ratios.append(widest / np.sqrt(variance))
        sizes.append(m)
        if above >= below:
            high -= 1
        else:
            low += 1
    if not ratios:
        return ()
    r, m = np.array(ratios), np.array(sizes, dtype=float)
    room = (m - 1.0) ** 2 - m * r * r
    with np.errstate(divide="ignore", invalid="ignore"):
        t = r * np.sqrt(m * (m - 2.0) / room)
        p = np.minimum(1.0, 2.0 * m * special.stdtr(m - 2.0, -t))  # Student's t upper tail
    # the largest R that m values allow (room <= 0 after rounding): no normal sample reaches it
    p = np.where(room > 0, p, 0.0)
    return tuple(float(v) for v in p)


def _shape(label: str, values: np.ndarray, index: int, ordered: np.ndarray | None = None
           ) -> tuple[GroupShape, list[Finding], np.ndarray, float]:
    """The shape of one group, its findings, its sorted values and its median."""
    n = int(values.size)
    ordered = sorted_values(values, ordered, name=f"group '{label}'")
    findings: list[Finding] = []
    name = f"Group '{label}'"
    lower = f"group '{label}'"

    shapiro_w = shapiro_p = None
    constant = n > 0 and ordered[0] == ordered[-1]
    if n < SHAPIRO_MIN_N:
        findings.append(Finding("normality", "note",
            f"{name} has {plural(n, 'value')}, too few for the Shapiro-Wilk check of a bell shape "
            f"(it needs at least {SHAPIRO_MIN_N}).", index))
    elif n > SHAPIRO_MAX_N:
        findings.append(Finding("normality", "info",
            f"{name} has {n:,} values, more than the {SHAPIRO_MAX_N:,} for which the Shapiro-Wilk "
            "check of a bell shape is valid, so it was not run. At this size it would flag "
            "departures too small to matter; the skewness, the tails and the Q-Q plot describe "
            "the shape instead.", index))
    elif constant:
        findings.append(Finding("normality", "note",
            f"All values of {lower} are equal, so the Shapiro-Wilk check of a bell shape cannot "
            "be run.", index))
    else:
        # W and its p-value do not depend on the scale. Brought to about 1 first, so that the
        # range and the sums of squares neither vanish near 1e-300 nor overflow near 1e308.
        shapiro_w, shapiro_p = shapiro_wilk(ordered / max(abs(ordered[0]), abs(ordered[-1])))
        figures = f"W = {format_number(shapiro_w, digits=3)}, {p_clause(shapiro_p)}"
        if shapiro_p < CHECK_ALPHA:
            text = (f"The Shapiro-Wilk check (does {lower} look like a sample from a "
                    f"bell-shaped, normal distribution?) finds a departure: {figures}.")
            if n >= SHAPIRO_LARGE_N:
                text += (" With this many values it flags even departures too small to matter; "
                         "look at the skewness, the tails and the Q-Q plot for their size.")
            severity = "note"
        else:
            text = (f"The Shapiro-Wilk check finds no clear departure of {lower} from a "
                    f"bell shape ({figures}). That does not prove the values are normal")
            text += (": with few values this check often misses real departures." if n < SHAPIRO_SMALL_N
                     else ".")
            severity = "info"
        findings.append(Finding("normality", severity, text, index))

    skew, kurt = _moments(values)
    ses, sek = skewness_se(n), kurtosis_se(n)
    q1, median, q3 = quartiles(ordered, ordered=True)
    fences = tukey_fences(q1, q3)
    far_mask = fences.beyond_far(ordered)
    mild_mask = fences.beyond_mild(ordered) & ~far_mask
    mild = tuple(ordered[mild_mask].tolist())
    far = tuple(ordered[far_mask].tolist())
    ties = _tie_share(ordered)
    qq_x, qq_y = _qq(ordered)
    surprise = extreme_value_test(ordered, min(len(far), n - 2)) if far else ()
    extreme_p = min(surprise) if surprise else float("nan")
    # a far value that the test cannot judge (too few values left) keeps the fence's verdict
    surprising = bool(far) and (not surprise or extreme_p < OUTLIER_SURPRISE)
    shape = GroupShape(label, n, shapiro_w, shapiro_p, skew, ses, kurt, sek, mild, far, ties,
                       qq_x, qq_y, surprising, extreme_p)

    findings.append(_skew_finding(shape, name, index))
    findings.append(_tail_finding(shape, name, index))
    findings.append(_outlier_finding(shape, name, index))
    findings.append(_tie_finding(shape, name, index))
    return shape, findings, ordered, median


def sample_shape(label: str, values: np.ndarray, *, ordered: np.ndarray | None = None) -> GroupShape:
    """The shape checks of one sample, as :func:`diagnose` runs them on each group: Shapiro-Wilk,
    skewness, tails, outliers at Tukey's fences with the extreme-value test, ties and the Q-Q
    coordinates (``ordered``: the values sorted, when the caller has them)."""
    return _shape(label, np.asarray(values, dtype=float), 0, ordered)[0]


def _lower(name: str) -> str:
    """'Group 'x'' at the start of a sentence -> 'group 'x'' inside one (the label untouched)."""
    return "g" + name[1:] if name.startswith("Group") else name


def _skew_finding(shape: GroupShape, name: str, index: int) -> Finding:
    g1 = shape.skewness
    if not np.isfinite(g1):
        return Finding("skewness", "info",
                       f"{name}: too few values, or values that do not vary, to measure lopsidedness (skewness).", index)
    side = "right (a long tail of high values)" if g1 > 0 else "left (a long tail of low values)"
    figures = f"skewness {format_shape(g1)}, standard error {format_number(shape.skewness_se, digits=2)}"
    if is_clearly_skewed(shape):
        severity = "warning" if abs(g1) > 2 * SKEW_MATERIAL else "note"
        return Finding("skewness", severity,
                       f"{name} is lopsided to the {side}: {figures}.", index)
    return Finding("skewness", "info",
                   f"{name} is not clearly lopsided ({figures}).", index)


def _tail_finding(shape: GroupShape, name: str, index: int) -> Finding:
    g2 = shape.excess_kurtosis
    if not np.isfinite(g2):
        return Finding("tails", "info",
                       f"{name}: too few values, or values that do not vary, to measure tail weight (kurtosis).", index)
    figures = (f"excess kurtosis {format_shape(g2)}, standard error "
               f"{format_number(shape.kurtosis_se, digits=2)}; 0 for a normal distribution")
    if is_heavy_tailed(shape):
        return Finding("tails", "warning",
                       f"{name} has heavier tails than a bell curve, so extreme values are more "
                       f"common than a normal distribution would give ({figures}).", index)
    return Finding("tails", "info", f"{name} shows no clearly heavy tails ({figures}).", index)


def _more_than_normal(count: int, n: int, share: float) -> bool:
    """Whether ``count`` values beyond a fence are more than a normal sample of n would give."""
    if count == 0:
        return False
    return bool(special.pdtrc(count - 1, n * share) < OUTLIER_SURPRISE)  # P(Poisson >= count)


def _values(count: int) -> str:
    return "a value" if count == 1 else "values"


def _outlier_counts(far: int, mild: int) -> str:
    """ "2 values more than 3 times the interquartile range beyond the quartiles and 1 more
    beyond 1.5 times", leaving out a count that is zero."""
    iqr = "the interquartile range (the width of the middle half of the values)"
    if far and mild:
        return (f"{plural(far, 'value')} more than {FAR_FENCE:g} times {iqr} beyond the quartiles "
                f"and {mild:,} more beyond {MILD_FENCE:g} times")
    if far:
        return f"{plural(far, 'value')} more than {FAR_FENCE:g} times {iqr} beyond the quartiles"
    return (f"{plural(mild, 'value')} more than {MILD_FENCE:g} times {iqr} beyond the quartiles, "
            f"none beyond {FAR_FENCE:g} times")


def _outlier_finding(shape: GroupShape, name: str, index: int) -> Finding:
    far, mild, n = len(shape.far_outliers), len(shape.mild_outliers), shape.n
    counts = _outlier_counts(far, mild)
    if far and shape.far_surprising:
        odds = ("" if not np.isfinite(shape.extreme_p) else
                f" (a normal sample of {n} gives values this extreme with {p_clause(shape.extreme_p)})")
        return Finding("outliers", "warning",
                       f"{name} has {_values(far + mild)} far from the rest: {counts}{odds}. Check they are real "
                       "measurements before relying on a mean, which they pull strongly.", index)
    if far:
        return Finding("outliers", "note",
                       f"{name} has values apart from the rest: {counts}. For a normal sample of "
                       f"{n} values that is not surprising ({p_clause(shape.extreme_p)} for the "
                       "most extreme; a small group's quartiles are themselves uncertain), so it "
                       "does not change the suggestion.", index)
    if _more_than_normal(mild, n, NORMAL_MILD_SHARE):
        return Finding("outliers", "note",
                       f"{name} has {_values(far + mild)} apart from the rest: {counts}.", index)
    if mild:
        return Finding("outliers", "info",
                       f"{name} has {counts}, about as many as a bell-shaped distribution gives "
                       "by chance in a group this size.", index)
    return Finding("outliers", "info", f"{name} has no values apart from the rest.", index)


def _tie_finding(shape: GroupShape, name: str, index: int) -> Finding:
    share = shape.tie_share
    if share >= HEAVY_TIES:
        return Finding("ties", "info",
                       f"{format_number(100 * share, digits=2)}% of the values of {_lower(name)} "
                       "equal another value (ties), as values recorded to a few digits give. The "
                       "t procedures are not affected; the rank procedures count the ties exactly, "
                       "and a median moves in steps.", index)
    if share > 0:
        return Finding("ties", "info",
                       f"{format_number(100 * share, digits=2)}% of the values of {_lower(name)} "
                       "equal another value (ties).", index)
    return Finding("ties", "info", f"No two values of {_lower(name)} are equal.", index)


def _ratio(a: float, b: float) -> float:
    """Larger over smaller of two positive spreads; NaN unless both are positive and finite."""
    small, large = min(a, b), max(a, b)
    return float(large / small) if np.isfinite(large) and small > 0 else float("nan")


def _spread(x: np.ndarray, y: np.ndarray, medians: tuple[float, float],
            iqrs: tuple[float, float] = (float("nan"), float("nan"))) -> SpreadCheck:
    levene = _anova_of_deviations((x, y), (float(x.mean()), float(y.mean())))
    brown_forsythe = _anova_of_deviations((x, y), medians)
    sds = [centred_sd(v) for v in (x, y)]
    small, large = min(sds), max(sds)
    if not (np.isfinite(small) and np.isfinite(large)):
        sd_ratio = float("nan")
    elif small == 0:
        sd_ratio = float("inf") if large > 0 else float("nan")
    else:
        sd_ratio = large / small
    n_ratio = max(x.size, y.size) / min(x.size, y.size)
    return SpreadCheck(levene[0], levene[1], brown_forsythe[0], brown_forsythe[1], sd_ratio,
                       float(n_ratio), _ratio(*iqrs))


def _spread_findings(spread: SpreadCheck, labels: tuple[str, str]) -> list[Finding]:
    ratio = spread.sd_ratio
    bf = (f"the Brown-Forsythe check of equal spread (Levene's test around the medians) gives "
          f"{p_clause(spread.brown_forsythe_p)}")
    if not np.isfinite(ratio):
        spread_finding = Finding("spread", "warning",
                                 "At least one group does not vary, so the spreads cannot be "
                                 "compared.")
    elif ratio >= SD_RATIO_WARNING:
        spread_finding = Finding("spread", "warning",
                                 f"One group's standard deviation is {format_number(ratio, digits=2)} "
                                 f"times the other's, and {bf}. Procedures that assume equal "
                                 "spread, such as the pooled t-test, are unsafe here. With spreads "
                                 "this different a rank result reads as a tendency: how often a "
                                 "value of one group exceeds a value of the other, not a shift of "
                                 "one group against the other.")
    elif ratio >= SD_RATIO_NOTE or spread.brown_forsythe_p < CHECK_ALPHA:
        spread_finding = Finding("spread", "note",
                                 f"The standard deviations differ by a factor of "
                                 f"{format_number(ratio, digits=2)}, and {bf}.")
    else:
        spread_finding = Finding("spread", "info",
                                 f"The standard deviations are similar (ratio "
                                 f"{format_number(ratio, digits=2)}), and {bf}; a check that "
                                 "passes does not prove the spreads are equal.")
    if spread.n_ratio >= N_RATIO_NOTE:
        sizes = Finding("sizes", "note",
                        f"One group is {format_number(spread.n_ratio, digits=2)} times the size of "
                        "the other; with unequal sizes, a difference in spread misleads the pooled "
                        "t-test more.")
    else:
        sizes = Finding("sizes", "info",
                        f"The groups are of similar size (ratio {format_number(spread.n_ratio, digits=2)}).")
    return [spread_finding, sizes]


def _check_groups(groups: Groups) -> None:
    for label, values in zip(groups.labels, (groups.x, groups.y)):
        if values.size == 0:
            raise DataProblem(f"Group '{label}' has no values to check.")


def diagnose(groups: Groups, *, sorted_x: np.ndarray | None = None,
             sorted_y: np.ndarray | None = None) -> Diagnostics:
    """Describe the shape of each group, the spread of both, outliers and ties.

    Parameters
    ----------
    groups : engine.results.Groups
        The two clean samples (each at least one value).
    sorted_x, sorted_y : numpy.ndarray, optional
        ``np.sort(groups.x)`` and ``np.sort(groups.y)`` when the caller has them already; each
        group is otherwise sorted here.

    Returns
    -------
    Diagnostics
        Numbers per group and for both, and one plain-language :class:`Finding` per check with
        keys "normality", "skewness", "tails", "outliers", "ties" (per group), "spread",
        "sizes" and "pooled_ties".

    Notes
    -----
    G1 = g1 sqrt(n (n - 1)) / (n - 2) and G2 = ((n + 1) g2 + 6)(n - 1) / ((n - 2)(n - 3)) with
    g1 = m3 / m2^(3/2), g2 = m4 / m2^2 - 3 and m_r the central moments; standard errors as in
    :func:`skewness_se` and :func:`kurtosis_se`. Outliers lie beyond q1 - f IQR or q3 + f IQR
    (f = 1.5 mild, 3 far; quartiles by linear interpolation). Levene's statistic is the one-way
    ANOVA F of |x - mean| across groups; the Brown-Forsythe one uses |x - median|.

    References
    ----------
    Joanes, D. N. and Gill, C. A. (1998). The Statistician 47(1), 183-189.
    Shapiro, S. S. and Wilk, M. B. (1965). Biometrika 52, 591-611; Royston, P. (1995). Applied
    Statistics 44, 547-551 (the algorithm for n up to 5000).
    Levene, H. (1960). In Contributions to Probability and Statistics, 278-292. Brown, M. B. and
    Forsythe, A. B. (1974). JASA 69, 364-367.
    Tukey, J. W. (1977). Exploratory Data Analysis. Addison-Wesley.
    Blom, G. (1958). Statistical Estimates and Transformed Beta-Variables. Wiley.
    """
    _check_groups(groups)
    shape_x, found_x, x_sorted, x_median = _shape(groups.labels[0], groups.x, 0, sorted_x)
    shape_y, found_y, y_sorted, y_median = _shape(groups.labels[1], groups.y, 1, sorted_y)
    iqrs = tuple(q3 - q1 for q1, q3 in (quantiles(o, (0.25, 0.75), ordered=True)
                                        for o in (x_sorted, y_sorted)))
    spread = _spread(groups.x, groups.y, (x_median, y_median), iqrs)
    pooled = _pooled_tie_share(x_sorted, y_sorted)
    findings = found_x + found_y + _spread_findings(spread, groups.labels)
    if pooled >= HEAVY_TIES:
        findings.append(Finding("pooled_ties", "info",
                                f"{format_number(100 * pooled, digits=2)}% of all values equal "
                                "another value in either group; the rank test counts such ties "
                                "exactly, and its large-sample formula carries the correction "
                                "for them."))
    else:
        findings.append(Finding("pooled_ties", "info",
                                f"{format_number(100 * pooled, digits=2)}% of all values equal "
                                "another value in either group."))
    return Diagnostics((shape_x, shape_y), spread, pooled, tuple(findings))
