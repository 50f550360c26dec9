"""Shape, spread, outlier and tie checks, against scipy, numpy and the textbook formulas."""

import warnings

import numpy as np
import pytest
from scipy import stats

from engine import diagnostics as dg
from engine.diagnostics import diagnose
from engine.errors import DataProblem
from engine.results import Groups


def _groups(x, y, labels=("bolts A", "bolts B")):
    return Groups(labels, np.asarray(x, dtype=float), np.asarray(y, dtype=float))


@pytest.mark.parametrize("n", [5, 12, 40, 300])
def test_skewness_and_kurtosis_match_the_reference_library(n):
    rng = np.random.default_rng(n)
    x, y = rng.gamma(2.0, 3.0, n), rng.standard_t(5, n + 3)
    shapes = diagnose(_groups(x, y)).shapes
    for shape, values in zip(shapes, (x, y)):
        # reference: scipy.stats.skew(values, bias=False), the adjusted Fisher-Pearson G1
        assert shape.skewness == pytest.approx(stats.skew(values, bias=False), rel=1e-10)
        # reference: scipy.stats.kurtosis(values, fisher=True, bias=False), G2
        assert shape.excess_kurtosis == pytest.approx(stats.kurtosis(values, bias=False), rel=1e-10)


@pytest.mark.parametrize("n", [3, 4, 10, 25, 100, 1000])
def test_standard_errors_follow_the_textbook_variances(n):
    # reference: Joanes and Gill (1998), The Statistician 47:183, exact variances under normality:
    # var(G1) = 6 n (n - 1) / ((n - 2)(n + 1)(n + 3));
    # var(G2) = 24 n (n - 1)^2 / ((n - 3)(n - 2)(n + 3)(n + 5)) (written here in this other form)
    var_g1 = 6 * n * (n - 1) / ((n - 2) * (n + 1) * (n + 3))
    assert dg.skewness_se(n) == pytest.approx(np.sqrt(var_g1), rel=1e-12)
    if n >= 4:
        var_g2 = 24 * n * (n - 1) ** 2 / ((n - 3) * (n - 2) * (n + 3) * (n + 5))
        assert dg.kurtosis_se(n) == pytest.approx(np.sqrt(var_g2), rel=1e-12)
    else:
        assert np.isnan(dg.kurtosis_se(n))


def test_standard_error_of_skewness_against_simulation():
    # reference: theory - the SD of G1 over many normal samples equals SES (Joanes and Gill 1998)
    rng = np.random.default_rng(42)
    n, reps = 20, 20_000
    samples = rng.normal(size=(reps, n))
    g1 = stats.skew(samples, axis=1, bias=False)
    g2 = stats.kurtosis(samples, axis=1, bias=False)
    # Monte Carlo SE of an SD estimate is about sd / sqrt(2 reps): 0.5% here; allow 3%
    assert np.std(g1) == pytest.approx(dg.skewness_se(n), rel=0.03)
    assert np.std(g2) == pytest.approx(dg.kurtosis_se(n), rel=0.06)  # G2 is far from normal


def test_known_values_of_the_standard_errors():
    # reference: direct evaluation of the Joanes and Gill (1998) formulas for n = 100 by hand:
    # sqrt(59400 / 1019494) = 0.24138 and 2 * 0.24138 * sqrt(9999 / 10185) = 0.47833
    assert dg.skewness_se(100) == pytest.approx(0.24138, abs=5e-5)
    assert dg.kurtosis_se(100) == pytest.approx(0.47833, abs=5e-5)


def test_shapiro_wilk_matches_the_reference_library():
    rng = np.random.default_rng(3)
    x, y = rng.normal(5, 1, 30), rng.lognormal(0, 0.8, 45)
    shapes = diagnose(_groups(x, y)).shapes
    for shape, values in zip(shapes, (x, y)):
        # reference: scipy.stats.shapiro(values), the same algorithm (Royston's AS R94); its
        # normal scores come from a shorter approximation of the normal quantile than ours
        # (scipy.special.ndtri), which moves W in about the ninth digit
        expected = stats.shapiro(values)
        assert shape.shapiro_w == pytest.approx(expected.statistic, rel=1e-8)
        assert shape.shapiro_p == pytest.approx(expected.pvalue, rel=1e-6)



@pytest.mark.parametrize("scale", [1e-30, 1e-300, 1e150])
def test_shape_checks_at_tiny_and_huge_scales_match_the_reference_at_scale_one(scale):
    # reference: scipy.stats.shapiro, skew and kurtosis (bias=False) of the same values at scale
    # 1; none depends on the scale (Shapiro and Wilk 1965; Joanes and Gill 1998), but scipy's
    # Shapiro-Wilk routine warns "range zero" below a range of 1e-19, cubes overflow near 1e150
    # and squares vanish near 1e-300
    rng = np.random.default_rng(64)
    x, y = rng.gamma(2.0, 3.0, 25), rng.normal(10, 2, 30)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        shapes = diagnose(_groups(x * scale, y * scale)).shapes
    for shape, values in zip(shapes, (x, y)):
        reference = stats.shapiro(values)
        assert shape.shapiro_w == pytest.approx(reference.statistic, rel=1e-9)
        assert shape.shapiro_p == pytest.approx(reference.pvalue, rel=1e-7)
        assert shape.skewness == pytest.approx(stats.skew(values, bias=False), rel=1e-9)
        assert shape.excess_kurtosis == pytest.approx(stats.kurtosis(values, bias=False), rel=1e-9)

def test_shapiro_wilk_is_not_run_outside_its_valid_range_and_says_why():
    rng = np.random.default_rng(4)
    result = diagnose(_groups(rng.normal(size=2), rng.normal(size=6000)))
    small, large = result.shapes
    assert small.shapiro_w is None and small.shapiro_p is None
    assert large.shapiro_w is None and large.shapiro_p is None
    assert "at least 3" in result.finding("normality", 0).text
    assert "not run" in result.finding("normality", 1).text
    assert "5,000" in result.finding("normality", 1).text


def test_a_group_that_does_not_vary_is_described_without_failing():
    result = diagnose(_groups([2.0, 2.0, 2.0, 2.0], [1.0, 2.5, 3.0, 4.5, 5.0]))
    shape = result.shapes[0]
    assert shape.shapiro_p is None and np.isnan(shape.skewness) and np.isnan(shape.excess_kurtosis)
    assert shape.tie_share == 1.0
    assert "equal" in result.finding("normality", 0).text
    assert result.finding("spread").severity == "warning"


@pytest.mark.parametrize("center, field", [("mean", "levene"), ("median", "brown_forsythe")])
def test_spread_checks_match_the_reference_library(center, field):
    rng = np.random.default_rng(11)
    x, y = rng.normal(10, 1.0, 25), rng.normal(10, 2.2, 37)
    spread = diagnose(_groups(x, y)).spread
    # reference: scipy.stats.levene(x, y, center=center)
    expected = stats.levene(x, y, center=center)
    assert getattr(spread, f"{field}_stat") == pytest.approx(expected.statistic, rel=1e-10)
    assert getattr(spread, f"{field}_p") == pytest.approx(expected.pvalue, rel=1e-9)



@pytest.mark.parametrize("scale", [1e200, 1e-200])
@pytest.mark.parametrize("center, field", [("mean", "levene"), ("median", "brown_forsythe")])
def test_spread_checks_at_huge_and_tiny_scales_match_the_reference_at_scale_one(center, field, scale):
    # reference: scipy.stats.levene(x, y, center=center) at scale 1; the F of the absolute
    # deviations does not depend on the scale, but their squares overflow near 1e200 and
    # vanish near 1e-200
    rng = np.random.default_rng(12)
    x, y = rng.normal(10, 1.0, 25), rng.normal(10, 2.2, 37)
    with np.errstate(all="ignore"):  # the SD ratio beside it is another matter
        spread = diagnose(_groups(x * scale, y * scale)).spread
    expected = stats.levene(x, y, center=center)
    assert getattr(spread, f"{field}_stat") == pytest.approx(expected.statistic, rel=1e-9)
    assert getattr(spread, f"{field}_p") == pytest.approx(expected.pvalue, rel=1e-9)

def test_sd_and_size_ratios():
    rng = np.random.default_rng(12)
    x, y = rng.normal(0, 3, 20), rng.normal(0, 1, 50)
    spread = diagnose(_groups(x, y)).spread
    # reference: numpy standard deviations with ddof=1
    sds = np.std(x, ddof=1), np.std(y, ddof=1)
    assert spread.sd_ratio == pytest.approx(max(sds) / min(sds), rel=1e-12)
    assert spread.n_ratio == pytest.approx(2.5)


def test_outliers_at_tukeys_fences():
    x = np.r_[np.arange(1.0, 21.0), 35.0, 60.0, -40.0]
    y = np.linspace(0, 1, 10)
    shape = diagnose(_groups(x, y)).shapes[0]
    # reference: numpy.percentile (linear) and Tukey's fences q1 - k IQR, q3 + k IQR, k = 1.5, 3
    q1, q3 = np.percentile(x, [25, 75])
    iqr = q3 - q1
    far = x[(x < q1 - 3 * iqr) | (x > q3 + 3 * iqr)]
    mild = x[((x < q1 - 1.5 * iqr) | (x > q3 + 1.5 * iqr)) & ~np.isin(x, far)]
    assert sorted(shape.far_outliers) == sorted(far.tolist())
    assert sorted(shape.mild_outliers) == sorted(mild.tolist())
    assert 60.0 in shape.far_outliers and -40.0 in shape.far_outliers
    assert 35.0 in shape.mild_outliers


def test_a_far_outlier_in_a_small_group_is_a_warning_but_chance_ones_in_a_huge_group_are_not():
    rng = np.random.default_rng(13)
    small = np.r_[rng.normal(10, 1, 19), 30.0]
    result = diagnose(_groups(small, rng.normal(10, 1, 1_000_000)))
    assert result.finding("outliers", 0).severity == "warning"
    # a normal sample of a million has a few values beyond 3 IQR by chance (about 2.3 expected)
    assert result.finding("outliers", 1).severity != "warning"


def test_tie_shares_against_counting_with_numpy_unique():
    rng = np.random.default_rng(14)
    x = rng.integers(1, 8, 60).astype(float)
    y = np.r_[rng.normal(size=40), 3.0, 3.0]
    result = diagnose(_groups(x, y))

    # reference: numpy.unique counts - a value is tied when its count is above one
    def share(values):
        _, inverse, counts = np.unique(values, return_inverse=True, return_counts=True)
        return np.mean(counts[inverse] > 1)

    assert result.shapes[0].tie_share == pytest.approx(share(x))
    assert result.shapes[1].tie_share == pytest.approx(2 / 42)
    assert result.pooled_tie_share == pytest.approx(share(np.r_[x, y]))


def test_a_tie_across_the_groups_counts_only_for_the_pooled_share():
    # reference: counting by hand - 3.0 is the only repeated value, once in each group
    result = diagnose(_groups([1.0, 2.0, 3.0], [3.0, 4.0, 5.0]))
    assert result.shapes[0].tie_share == 0.0 and result.shapes[1].tie_share == 0.0
    assert result.pooled_tie_share == pytest.approx(2 / 6)


def test_qq_coordinates_use_blom_positions_and_are_thinned_for_big_groups():
    rng = np.random.default_rng(15)
    x, y = rng.normal(size=50), rng.normal(size=100_000)
    shapes = diagnose(_groups(x, y)).shapes
    n = x.size
    # reference: scipy.stats.norm.ppf at Blom's positions (i - 3/8) / (n + 1/4)
    expected = stats.norm.ppf((np.arange(1, n + 1) - 0.375) / (n + 0.25))
    np.testing.assert_allclose(shapes[0].qq_theoretical, expected, rtol=1e-12)
    np.testing.assert_array_equal(shapes[0].qq_observed, np.sort(x))
    big = shapes[1]
    assert big.qq_observed.size <= dg.QQ_MAX_POINTS
    assert big.qq_observed[0] == y.min() and big.qq_observed[-1] == y.max()
    assert np.all(np.diff(big.qq_observed) >= 0) and np.all(np.diff(big.qq_theoretical) > 0)


def test_one_finding_per_check_with_stable_keys():
    rng = np.random.default_rng(16)
    result = diagnose(_groups(rng.normal(size=30), rng.normal(size=25)))
    keys = {(f.key, f.group) for f in result.findings}
    per_group = {"normality", "skewness", "tails", "outliers", "ties"}
    expected = {(k, g) for k in per_group for g in (0, 1)} | {("spread", None), ("sizes", None),
                                                             ("pooled_ties", None)}
    assert keys == expected
    assert len(result.findings) == len(expected)
    assert all(f.severity in ("info", "note", "warning") and f.text.endswith(".") for f in result.findings)


def test_clearly_skewed_small_group_and_unequal_spread_are_flagged():
    rng = np.random.default_rng(17)
    x, y = rng.lognormal(0, 1.2, 25), rng.normal(0, 0.2, 25)
    result = diagnose(_groups(x, y))
    assert dg.is_clearly_skewed(result.shapes[0])
    assert not dg.is_clearly_skewed(result.shapes[1])
    assert result.finding("skewness", 0).severity in ("note", "warning")
    assert result.finding("spread").severity == "warning"


def test_labels_keep_their_case_in_findings():
    rng = np.random.default_rng(18)
    result = diagnose(_groups(rng.normal(size=10), rng.normal(size=10), labels=("Batch-X", "Batch-Y")))
    assert all("Batch-X" in f.text for f in result.findings if f.group == 0)


def test_an_empty_group_is_refused_with_a_sentence():
    with pytest.raises(DataProblem, match="Group 'B' has no values"):
        diagnose(_groups([1.0, 2.0, 3.0], [], labels=("A", "B")))


def test_diagnose_with_sorted_copies_is_identical():
    rng = np.random.default_rng(53)
    groups = Groups(("plot A", "plot B"), np.round(rng.lognormal(1, 0.5, 600), 1),
                    rng.normal(3, 1, 6000))
    # reference: the same call without sorted copies (each group sorted inside)
    plain = diagnose(groups)
    given = diagnose(groups, sorted_x=np.sort(groups.x), sorted_y=np.sort(groups.y))
    assert given.findings == plain.findings
    assert given.pooled_tie_share == plain.pooled_tie_share
    for a, b in zip(given.shapes, plain.shapes):
        assert (a.skewness, a.mild_outliers, a.far_outliers, a.tie_share) == \
            (b.skewness, b.mild_outliers, b.far_outliers, b.tie_share)
        assert np.array_equal(a.qq_observed, b.qq_observed)


# Rosner's example (Technometrics 25:165, 1983), as worked in the NIST/SEMATECH e-Handbook,
# section 1.3.5.17.3: 54 values, up to 10 outliers tested at alpha = 0.05.
ROSNER_DATA = [-0.25, 0.68, 0.94, 1.15, 1.20, 1.26, 1.26, 1.34, 1.38, 1.43, 1.49, 1.49, 1.55, 1.56,
               1.58, 1.65, 1.69, 1.70, 1.76, 1.77, 1.81, 1.91, 1.94, 1.96, 1.99, 2.06, 2.09, 2.10,
               2.14, 2.15, 2.23, 2.24, 2.26, 2.35, 2.37, 2.40, 2.47, 2.54, 2.62, 2.64, 2.90, 2.92,
               2.92, 2.93, 3.21, 3.26, 3.30, 3.59, 3.68, 4.30, 4.64, 5.34, 5.42, 6.01]


def test_extreme_value_test_reproduces_the_handbook_example_of_the_generalized_esd():
    p = dg.extreme_value_test(np.sort(ROSNER_DATA), 10)
    assert len(p) == 10
    # the handbook's table (recalled from memory): R_i against lambda_i for i = 1..10 is
    # 3.118/3.158, 2.942/3.151, 3.179/3.143, then R below lambda; so only step 3 rejects at 0.05
    # and the procedure declares 3 outliers
    assert [v < 0.05 for v in p] == [False, False, True] + [False] * 7
    # the p-value of a step is the level at which R_i equals its critical value lambda_i
    x = list(np.sort(ROSNER_DATA))
    for i, expected_r in enumerate((3.118, 2.942, 3.179)):
        values = np.array(x)
        r = np.max(np.abs(values - values.mean())) / values.std(ddof=1)
        assert r == pytest.approx(expected_r, abs=2e-3)
        m = values.size
        t = stats.t.ppf(1 - p[i] / (2 * m), m - 2)
        lam = (m - 1) * t / np.sqrt((m - 2 + t * t) * m)
        assert lam == pytest.approx(r, rel=1e-6)
        x.pop(int(np.argmax(np.abs(values - values.mean()))))


def test_extreme_value_test_keeps_its_precision_next_to_huge_values():
    # the remaining spread is tiny beside the removed value; a running total would lose it
    p = dg.extreme_value_test(np.array([1.0, 2.0, 3.0, 4.0, 5.0, 1e12]), 2)
    assert p[0] == 0.0
    # step 2 is Grubbs' test on 1..5 alone: reference, the same formula on those values
    alone = dg.extreme_value_test(np.array([1.0, 2.0, 3.0, 4.0, 5.0]), 1)
    assert p[1] == pytest.approx(alone[0], rel=1e-12)


def test_a_value_past_the_far_fence_in_a_normal_group_of_five_is_not_a_warning():
    # drawn from a normal with SD 1: the 3 IQR fence flags 8.70, but a normal sample of 5
    # gives a value that extreme often (Grubbs p about 0.06)
    a = [10.35, 10.82, 10.33, 8.70, 10.91]
    result = diagnose(_groups(a, [10.45, 9.46, 10.58, 10.36, 10.29]))
    shape = result.shapes[0]
    assert shape.far_outliers == (8.70,) and not shape.far_surprising
    assert 0.01 < shape.extreme_p < 0.1
    assert result.finding("outliers", 0).severity != "warning"
    assert "not surprising" in result.finding("outliers", 0).text
    # a real slip in a group of five is still surprising
    slip = diagnose(_groups([10.1, 10.3, 9.9, 10.2, 31.0], [10.45, 9.46, 10.58, 10.36, 10.29]))
    assert slip.shapes[0].far_surprising
    assert slip.finding("outliers", 0).severity == "warning"


def test_iqr_ratio_against_numpy_percentiles():
    rng = np.random.default_rng(31)
    x, y = rng.normal(0, 4, 8), rng.normal(0, 1, 25)
    spread = diagnose(_groups(x, y)).spread
    # reference: numpy.percentile with linear interpolation
    iqr = [np.subtract(*np.percentile(v, [75, 25])) for v in (x, y)]
    assert spread.iqr_ratio == pytest.approx(max(iqr) / min(iqr), rel=1e-12)


def test_ties_are_read_by_their_consequence_not_as_a_rating_scale():
    # 400 yields recorded to 0.1 kg: most values tie, which matters to no procedure's validity
    rng = np.random.default_rng(400)
    result = diagnose(_groups(np.round(rng.normal(52, 1.5, 200), 1), np.round(rng.normal(53, 1.5, 200), 1)))
    ties = result.finding("ties", 0)
    assert result.shapes[0].tie_share >= dg.HEAVY_TIES
    assert ties.severity == "info" and "rating" not in ties.text
    assert "rank procedures count the ties exactly" in ties.text
    assert result.finding("pooled_ties").severity == "info"
