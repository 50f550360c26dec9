"""z, pooled t and Welch t against NIST StRD, statsmodels, scipy and a Student t table."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest
import scipy
from scipy import stats
from statsmodels.stats.weightstats import CompareMeans, DescrStatsW, ttest_ind, ztest

from engine.errors import DataProblem, OptionProblem
from engine.procedures.t import pooled_t, welch_t, z_test

ALTERNATIVES = ("two-sided", "less", "greater")
LEVELS = (0.8, 0.9, 0.95, 0.99)
# statsmodels spells the one-sided alternatives differently
SM_ALTERNATIVE = {"two-sided": "two-sided", "less": "smaller", "greater": "larger"}


def rel(a: float, b: float) -> float:
    return abs(a - b) / max(abs(b), 1e-300)


def close_interval(interval, low: float, high: float, alternative: str, tol: float = 1e-10):
    if alternative == "greater":
        assert interval.high is None and rel(interval.low, low) < tol
    elif alternative == "less":
        assert interval.low is None and rel(interval.high, high) < tol
    else:
        assert rel(interval.low, low) < tol and rel(interval.high, high) < tol


# --- NIST StRD -----------------------------------------------------------------------------

def load_atmwtag() -> tuple[np.ndarray, np.ndarray]:
    """NIST StRD one-way ANOVA data set AtmWtAg (two instruments, 24 silver weights each)."""
    path = Path(scipy.__file__).parent / "stats" / "tests" / "data" / "nist_anova" / "AtmWtAg.dat"
    lines = path.read_text().splitlines()[60:108]  # data on lines 61 to 108 (file header)
    rows = [line.split() for line in lines]
    groups = {k: np.array([float(v) for g, v in rows if g == k]) for k in ("1", "2")}
    return groups["1"], groups["2"]


def test_pooled_t_squared_is_the_nist_certified_f():
    # reference: NIST StRD AtmWtAg, certified F statistic 1.59467335677930E+01 and
    # within-groups mean square 2.28155932971014E-10 (certified values, lines 41 to 47)
    x, y = load_atmwtag()
    assert x.size == y.size == 24
    result = pooled_t(x, y)
    assert rel(result.statistic**2, 1.59467335677930e01) < 1e-10
    assert rel(result.details["pooled_variance"], 2.28155932971014e-10) < 1e-10
    assert result.df == 46  # certified within-groups df


def test_welch_t_squared_equals_pooled_for_equal_sizes_on_nist_data():
    # with n1 == n2 the Welch statistic equals the pooled one (algebra: identical SE), so it
    # also matches the NIST StRD AtmWtAg certified F
    x, y = load_atmwtag()
    assert rel(welch_t(x, y).statistic ** 2, 1.59467335677930e01) < 1e-10


# --- scipy and statsmodels -----------------------------------------------------------------

def samples(seed: int, n1: int = 13, n2: int = 9):
    rng = np.random.default_rng(seed)
    return rng.normal(10.0, 1.5, n1), rng.normal(9.2, 3.0, n2)


@pytest.mark.parametrize("alternative", ALTERNATIVES)
@pytest.mark.parametrize("level", LEVELS)
@pytest.mark.parametrize("equal_var", (True, False))
def test_t_against_scipy(alternative, level, equal_var):
    x, y = samples(11)
    ours = (pooled_t if equal_var else welch_t)(x, y, alternative=alternative,
                                                confidence_level=level)
    # reference: scipy.stats.ttest_ind(x, y, equal_var=..., alternative=...)
    ref = stats.ttest_ind(x, y, equal_var=equal_var, alternative=alternative)
    ci = ref.confidence_interval(level)
    assert rel(ours.statistic, ref.statistic) < 1e-10
    assert rel(ours.df, ref.df) < 1e-10
    assert rel(ours.p_value, ref.pvalue) < 1e-10
    close_interval(ours.interval, ci.low, ci.high, alternative)
    assert ours.interval.level == level
    assert rel(ours.estimate, x.mean() - y.mean()) < 1e-12


@pytest.mark.parametrize("alternative", ALTERNATIVES)
@pytest.mark.parametrize("usevar", ("pooled", "unequal"))
@pytest.mark.parametrize("seed", (3, 4))
def test_t_against_statsmodels(alternative, usevar, seed):
    x, y = samples(seed, 21, 8)
    ours = (pooled_t if usevar == "pooled" else welch_t)(x, y, alternative=alternative,
                                                         confidence_level=0.9)
    sm = SM_ALTERNATIVE[alternative]
    # reference: statsmodels.stats.weightstats.ttest_ind(x, y, alternative, usevar)
    t_stat, p, df = ttest_ind(x, y, alternative=sm, usevar=usevar)
    assert rel(ours.statistic, t_stat) < 1e-10
    assert rel(ours.p_value, p) < 1e-10
    assert rel(ours.df, df) < 1e-10
    # reference: statsmodels CompareMeans(...).tconfint_diff(alpha, alternative, usevar)
    low, high = CompareMeans(DescrStatsW(x), DescrStatsW(y)).tconfint_diff(
        alpha=0.1, alternative=sm, usevar=usevar)
    close_interval(ours.interval, low, high, alternative)


@pytest.mark.parametrize("alternative", ALTERNATIVES)
@pytest.mark.parametrize("level", (0.9, 0.95, 0.995))
def test_z_against_statsmodels(alternative, level):
    x, y = samples(5, 30, 40)
    known = (float(np.std(x, ddof=1)), float(np.std(y, ddof=1)))
    ours = z_test(x, y, sd=known, alternative=alternative, confidence_level=level)
    compare = CompareMeans(DescrStatsW(x), DescrStatsW(y))
    sm = SM_ALTERNATIVE[alternative]
    # reference: statsmodels CompareMeans.ztest_ind / zconfint_diff with usevar="unequal"
    # (separate sample SDs, n - 1 denominator), here given to us as the known SDs
    z, p = compare.ztest_ind(alternative=sm, usevar="unequal")
    low, high = compare.zconfint_diff(alpha=1 - level, alternative=sm, usevar="unequal")
    assert rel(ours.statistic, z) < 1e-10
    assert rel(ours.p_value, p) < 1e-10
    close_interval(ours.interval, low, high, alternative)
    assert ours.df is None


def test_z_with_equal_known_sds_against_statsmodels_ztest():
    x, y = samples(8, 15, 15)
    pooled_sd = float(np.sqrt((np.var(x, ddof=1) + np.var(y, ddof=1)) / 2))
    # reference: statsmodels.stats.weightstats.ztest(x, y, usevar="pooled"): with equal sizes
    # the pooled variance is the mean of the two variances
    z, p = ztest(x, y, usevar="pooled")
    ours = z_test(x, y, sd=(pooled_sd, pooled_sd))
    assert rel(ours.statistic, z) < 1e-10 and rel(ours.p_value, p) < 1e-10


def test_z_interval_half_width_matches_normal_table():
    x, y = samples(9, 25, 25)
    ours = z_test(x, y, sd=(2.0, 3.0), confidence_level=0.95)
    se = np.sqrt(4 / 25 + 9 / 25)
    assert ours.details["standard_error"] == pytest.approx(se, rel=1e-14)
    # z_{0.975} = 1.960 (recalled from memory, standard normal table)
    half = (ours.interval.high - ours.interval.low) / 2
    assert half / se == pytest.approx(1.960, abs=5e-4)
    assert ours.interval.low + half == pytest.approx(x.mean() - y.mean(), rel=1e-12)


# --- handbook table ------------------------------------------------------------------------

@pytest.mark.parametrize(
    ("df", "level", "alternative", "table_value"),
    [
        # Student t critical values (recalled from memory, standard Student t table)
        (10, 0.95, "two-sided", 2.228),   # t_{0.975, 10}
        (30, 0.95, "two-sided", 2.042),   # t_{0.975, 30}
        (5, 0.90, "two-sided", 2.015),    # t_{0.95, 5}
        (5, 0.95, "greater", 2.015),      # t_{0.95, 5}, one-sided
        (20, 0.99, "two-sided", 2.845),   # t_{0.995, 20}
        (8, 0.95, "less", 1.860),         # t_{0.95, 8}, one-sided
    ],
)
def test_pooled_interval_width_matches_student_t_table(df, level, alternative, table_value):
    rng = np.random.default_rng(df)
    n1 = (df + 2) // 2
    x, y = rng.normal(size=n1), rng.normal(size=df + 2 - n1)
    result = pooled_t(x, y, alternative=alternative, confidence_level=level)
    assert result.df == df
    bound = result.interval.high if alternative == "less" else result.interval.low
    implied = abs(bound - result.estimate) / result.details["standard_error"]
    assert implied == pytest.approx(table_value, abs=6e-4)  # table gives 3 decimals


# --- input checks --------------------------------------------------------------------------

def test_two_constant_groups_are_refused():
    with pytest.raises(DataProblem, match="no spread"):
        pooled_t([3.0, 3.0, 3.0], [4.0, 4.0])
    with pytest.raises(DataProblem, match="no spread"):
        welch_t([3.0, 3.0], [4.0, 4.0])


def test_one_constant_group_gives_a_warning():
    result = welch_t([3.0, 3.0, 3.0], [4.0, 5.0, 7.0])
    assert any("group 1" in w and "zero" in w for w in result.warnings)
    assert np.isfinite(result.p_value)


@pytest.mark.parametrize(
    ("kwargs", "error", "pattern"),
    [
        (dict(x=[1.0], y=[2.0, 3.0]), DataProblem, "Group 1 has 1 value"),
        (dict(x=[1.0, 2.0], y=[2.0, float("nan")]), DataProblem, "Value 2 of group 2"),
        (dict(x=[1.0, 2.0], y=["a", 3.0]), DataProblem, "must all be numbers"),
        (dict(x=[1.0, 2.0], y=[2.0, 3.0], alternative="up"), OptionProblem, "direction"),
        (dict(x=[1.0, 2.0], y=[2.0, 3.0], confidence_level=1.0), OptionProblem, "between 0"),
        (dict(x=[1.0, 2.0], y=[2.0, 3.0], confidence_level=0), OptionProblem, "between 0"),
    ],
)
def test_bad_input_gets_a_readable_error(kwargs, error, pattern):
    for procedure in (pooled_t, welch_t):
        with pytest.raises(error, match=pattern):
            procedure(**kwargs)


@pytest.mark.parametrize("sd", [(1.0, 0.0), (1.0, -2.0), (1.0,), "ab", (float("inf"), 1.0)])
def test_bad_known_sd_is_refused(sd):
    with pytest.raises(OptionProblem, match="standard deviation"):
        z_test([1.0, 2.0], [3.0, 4.0], sd=sd)


def test_result_fields():
    x, y = samples(2)
    result = welch_t(x, y, alternative="greater", confidence_level=0.9)
    assert result.key == "welch_t" and result.alternative == "greater"
    assert result.estimate_name == "difference in means"
    assert result.details["n_1"] == 13 and result.details["n_2"] == 9
    with pytest.raises(TypeError):
        welch_t(x, y, "greater")  # options are keyword-only


# --- values at the ends of the float range: scale before squaring ------------------------------

# invented bolt loads, rescaled to extreme units; the results are scale-equivariant: t, df and
# p unchanged, the difference and its interval multiplied by the scale
_BOLTS_1 = np.array([31.2, 29.8, 33.5, 30.1, 34.0, 32.2, 28.9])
_BOLTS_2 = np.array([28.4, 30.2, 27.5, 29.9, 31.0, 26.8, 28.1, 39.4, 20.7])


@pytest.mark.parametrize("factor", [1e80, 1e154, 1e200, 1e300, 1e-160, 1e-300, 1e-310])
@pytest.mark.parametrize("equal_var", [False, True])
def test_t_is_scale_equivariant_at_the_float_extremes(factor, equal_var):
    # reference: scipy.stats.ttest_ind on the same data in ordinary units (its Welch df,
    # statistic and p are unchanged by scale); the interval ends scale with the data
    compute = pooled_t if equal_var else welch_t
    reference = stats.ttest_ind(_BOLTS_1, _BOLTS_2, equal_var=equal_var)
    plain = compute(_BOLTS_1, _BOLTS_2)
    scaled = compute(_BOLTS_1 * factor, _BOLTS_2 * factor)
    assert scaled.statistic == pytest.approx(reference.statistic, rel=1e-9)
    assert scaled.df == pytest.approx(reference.df, rel=1e-9)
    assert scaled.p_value == pytest.approx(reference.pvalue, rel=1e-8)
    # subnormal inputs (1e-310) keep fewer digits, hence the looser tolerance there
    rel = 1e-9 if factor >= 1e-300 else 1e-4
    assert scaled.estimate == pytest.approx(plain.estimate * factor, rel=rel)
    assert scaled.interval.low == pytest.approx(plain.interval.low * factor, rel=rel)
    assert scaled.interval.high == pytest.approx(plain.interval.high * factor, rel=rel)
    assert not scaled.warnings


def test_distinct_values_near_1e_minus_300_are_not_called_constant():
    # the variance of these values underflows to zero when squared unscaled
    x = np.array([1.0, 2.0, 3.0]) * 1e-300
    y = np.array([4.0, 6.0, 5.0]) * 1e-300
    result = welch_t(x, y)
    reference = stats.ttest_ind([1.0, 2.0, 3.0], [4.0, 6.0, 5.0], equal_var=False)
    assert result.statistic == pytest.approx(reference.statistic, rel=1e-12)
    assert result.df == pytest.approx(reference.df, rel=1e-12)


def test_groups_hundreds_of_orders_apart_keep_both_spreads():
    # hand computation (Welch 1947 formulas): group 1 constant at 1e200, group 2 = 1e-100 and
    # 3e-100 (SD sqrt(2) 1e-100), so SE = sqrt(2e-200 / 2) = 1e-100, t = 1e200 / 1e-100 = 1e300
    # and df = n2 - 1 = 1; on a common scale alone group 2's spread would underflow to zero
    result = welch_t([1e200, 1e200, 1e200], [1e-100, 3e-100])
    assert result.statistic == pytest.approx(1e300, rel=1e-12)
    assert result.df == pytest.approx(1.0, rel=1e-12)
    assert result.details["variance_2"] == pytest.approx(2e-200, rel=1e-12)
    assert result.warnings == ("All values in group 1 are equal, so its spread is zero; the result "
                               "rests on the spread of the other group alone.",)
