"""Effect sizes against hand formulas, statsmodels, scipy and large-sample theory."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats
from statsmodels.stats.meta_analysis import effectsize_smd

from engine.effects import (
    all_effect_sizes,
    cohen_d,
    common_language,
    glass_delta,
    hedges_correction,
    hedges_g,
    mann_whitney_u1,
    rank_biserial,
)
from engine.errors import DataProblem, OptionProblem

# fertiliser plots: yield per plot (kg), treated (group 1) and untreated (group 2); invented
TREATED = np.array([31.2, 29.8, 33.5, 30.1, 34.0, 32.2, 28.9, 31.7, 35.1, 30.6, 32.8, 33.0])
UNTREATED = np.array([28.4, 30.2, 27.5, 29.9, 31.0, 26.8, 28.1, 29.4, 30.7, 27.9])


def pooled_sd(x, y):
    return math.sqrt(((x.size - 1) * np.var(x, ddof=1) + (y.size - 1) * np.var(y, ddof=1))
                     / (x.size + y.size - 2))


# --- Cohen's d and Hedges' g -------------------------------------------------------------------

def test_d_and_g_match_the_hand_formulas():
    # reference: the defining formulas with numpy; J(df) with math.gamma
    x, y = TREATED, UNTREATED
    d = (x.mean() - y.mean()) / pooled_sd(x, y)
    df = x.size + y.size - 2
    j = math.gamma(df / 2) / (math.sqrt(df / 2) * math.gamma((df - 1) / 2))
    assert cohen_d(x, y).value == pytest.approx(d, rel=1e-12)
    assert hedges_g(x, y).value == pytest.approx(j * d, rel=1e-12)
    assert hedges_correction(df) == pytest.approx(j, rel=1e-13)


def test_d_and_g_match_statsmodels():
    # reference: statsmodels.stats.meta_analysis.effectsize_smd, which returns the corrected
    # value with the approximation J ~ 1 - 3 / (4 N - 9); dividing it out gives d exactly, and
    # the exact and approximate J differ by O(1 / df^2) (here below 1e-4 relative)
    x, y = TREATED, UNTREATED
    smd_bc, _ = effectsize_smd(x.mean(), x.std(ddof=1), x.size, y.mean(), y.std(ddof=1), y.size)
    approx_j = 1 - 3 / (4 * (x.size + y.size) - 9)
    assert cohen_d(x, y).value == pytest.approx(smd_bc / approx_j, rel=1e-12)
    assert hedges_g(x, y).value == pytest.approx(smd_bc, rel=1e-4)


def test_correction_factor_approaches_the_textbook_approximation():
    # reference: Hedges (1981): J(df) ~ 1 - 3 / (4 df - 1), error O(df^-2) (common practice)
    for df in (10, 30, 100, 1000):
        assert abs(hedges_correction(df) - (1 - 3 / (4 * df - 1))) < 2.0 / df**2
    # J(2) = Gamma(1) / (1 * Gamma(1/2)) = 1 / sqrt(pi) (closed form)
    assert hedges_correction(2) == pytest.approx(1 / math.sqrt(math.pi), rel=1e-14)


@pytest.mark.parametrize("level", [0.9, 0.95, 0.99])
def test_d_interval_has_the_noncentral_t_defining_property(level):
    # reference: scipy.stats.nct.cdf at the observed t equals 1 - alpha/2 at the lower
    # noncentrality limit and alpha/2 at the upper one (Steiger and Fouladi 1997)
    x, y = TREATED, UNTREATED
    result = cohen_d(x, y, confidence_level=level)
    df = x.size + y.size - 2
    scale = math.sqrt(1 / x.size + 1 / y.size)
    t_obs = result.value / scale
    alpha = 1 - level
    assert stats.nct.cdf(t_obs, df, result.interval.low / scale) == pytest.approx(
        1 - alpha / 2, abs=1e-9)
    assert stats.nct.cdf(t_obs, df, result.interval.high / scale) == pytest.approx(
        alpha / 2, abs=1e-9)
    g = hedges_g(x, y, confidence_level=level)
    j = hedges_correction(df)
    assert g.interval.low == pytest.approx(j * result.interval.low, rel=1e-12)
    assert g.interval.high == pytest.approx(j * result.interval.high, rel=1e-12)


def test_d_interval_at_zero_effect_is_plus_minus_z():
    # reference: theory: a noncentral t is (Z + nc) / sqrt(chi2 / df), so P(T <= 0) = Phi(-nc)
    # whatever df; at t = 0 the limits are nc = -/+ z_(1 - alpha/2) (scipy.stats.norm.ppf)
    rng = np.random.default_rng(1)
    x = rng.normal(size=40)
    y = x[::-1] * 1.0  # the same values: d = 0 exactly
    result = cohen_d(x, y)
    assert abs(result.value) < 1e-12
    scale = math.sqrt(2 / 40)
    assert result.interval.low / scale == pytest.approx(-stats.norm.ppf(0.975), rel=1e-8)
    assert result.interval.high / scale == pytest.approx(stats.norm.ppf(0.975), rel=1e-8)


def test_d_interval_matches_hedges_olkin_for_large_groups():
    # reference: Hedges and Olkin (1985) large-sample variance
    # var(d) = (n1 + n2) / (n1 n2) + d^2 / (2 (n1 + n2)); with 5000 per group the noncentral t
    # interval agrees with d -/+ z sqrt(var) to about 1 % of its half-width
    rng = np.random.default_rng(2)
    x, y = rng.normal(0.4, 1, 5000), rng.normal(0, 1, 5000)
    result = cohen_d(x, y)
    d, n1, n2 = result.value, x.size, y.size
    half = stats.norm.ppf(0.975) * math.sqrt((n1 + n2) / (n1 * n2) + d**2 / (2 * (n1 + n2)))
    assert abs(result.interval.low - (d - half)) < 0.01 * half
    assert abs(result.interval.high - (d + half)) < 0.01 * half


@pytest.mark.parametrize("alternative", ["greater", "less"])
def test_one_sided_d_interval_uses_the_full_alpha(alternative):
    # reference: scipy.stats.nct.cdf at the finite limit equals 1 - alpha ("greater") or alpha
    x, y = TREATED, UNTREATED
    result = cohen_d(x, y, alternative=alternative, confidence_level=0.9)
    df, scale = x.size + y.size - 2, math.sqrt(1 / x.size + 1 / y.size)
    t_obs = result.value / scale
    if alternative == "greater":
        assert result.interval.high is None
        assert stats.nct.cdf(t_obs, df, result.interval.low / scale) == pytest.approx(0.9)
    else:
        assert result.interval.low is None
        assert stats.nct.cdf(t_obs, df, result.interval.high / scale) == pytest.approx(0.1)


def test_d_interval_for_a_huge_effect_is_found():
    # the bracket must widen far enough: t is about 60 here
    x = np.array([100.0, 101.0, 99.5, 100.5, 100.2, 99.8])
    y = np.array([50.0, 51.0, 49.5, 50.5, 50.2, 49.8])
    result = cohen_d(x, y)
    assert result.interval.low < result.value < result.interval.high
    df, scale = 10, math.sqrt(1 / 6 + 1 / 6)
    assert stats.nct.cdf(result.value / scale, df, result.interval.low / scale) == pytest.approx(
        0.975, abs=1e-8)


# --- Glass's delta -----------------------------------------------------------------------------

def test_glass_delta_uses_group_2_sd_and_its_nct_approximation():
    # reference: hand formula (mean1 - mean2) / s2, and scipy.stats.nct.cdf with df = n2 - 1
    # at the observed delta / c, c = sqrt(s1^2 / (s2^2 n1) + 1 / n2), equal to 0.975 and 0.025
    x, y = TREATED, UNTREATED
    result = glass_delta(x, y)
    s1, s2 = x.std(ddof=1), y.std(ddof=1)
    assert result.value == pytest.approx((x.mean() - y.mean()) / s2, rel=1e-12)
    c = math.sqrt(s1**2 / (s2**2 * x.size) + 1 / y.size)
    t_obs = result.value / c
    assert stats.nct.cdf(t_obs, y.size - 1, result.interval.low / c) == pytest.approx(0.975)
    assert stats.nct.cdf(t_obs, y.size - 1, result.interval.high / c) == pytest.approx(0.025)
    assert result.details["df"] == y.size - 1


def test_glass_delta_refuses_a_constant_reference_group():
    with pytest.raises(DataProblem, match="group 2"):
        glass_delta([1.0, 2.0, 3.0], [4.0, 4.0, 4.0])


# --- common-language and rank-biserial ---------------------------------------------------------

def test_common_language_is_u1_over_the_pairs_as_in_scipy():
    # reference: scipy.stats.mannwhitneyu(x, y).statistic / (n1 n2), with ties
    rng = np.random.default_rng(3)
    x, y = np.round(rng.normal(0.3, 1, 57), 1), np.round(rng.normal(0, 1, 43), 1)
    ref = stats.mannwhitneyu(x, y).statistic / (x.size * y.size)
    assert common_language(x, y).value == pytest.approx(ref, rel=1e-14)
    assert mann_whitney_u1(x, y) == stats.mannwhitneyu(x, y).statistic


def test_rank_biserial_sign_and_value():
    # reference: r = 2 U1 / (n1 n2) - 1 with U1 from scipy.stats.mannwhitneyu; Kerby's simple
    # difference: (pairs with group 1 larger - pairs with group 2 larger) / all pairs
    x, y = TREATED, UNTREATED
    u1 = stats.mannwhitneyu(x, y).statistic
    r = rank_biserial(x, y)
    assert r.value == pytest.approx(2 * u1 / (x.size * y.size) - 1, rel=1e-14)
    wins = sum(a > b for a in x for b in y)
    losses = sum(a < b for a in x for b in y)
    assert r.value == pytest.approx((wins - losses) / (x.size * y.size), rel=1e-14)
    assert r.value > 0  # treated plots tend to yield more
    assert rank_biserial(y, x).value == pytest.approx(-r.value, rel=1e-14)


def test_separated_groups_give_limits_inside_the_range():
    x, y = np.arange(10.0, 20.0), np.arange(0.0, 8.0)
    cl = common_language(x, y)
    assert cl.value == 1.0 and cl.interval.high == 1.0 and 0.5 < cl.interval.low < 1.0
    r = rank_biserial(x, y)
    assert r.value == 1.0 and r.interval.low == pytest.approx(2 * cl.interval.low - 1)


def test_common_language_interval_solves_newcombes_equation():
    # reference: Newcombe (2006) method 5 (recalled from memory): the limits t solve
    # (A - t)^2 = z^2 t (1 - t) / (n1 n2) [1 + (N - 1)((1 - t)/(2 - t) + t/(1 + t))],
    # N = (n1 + n2) / 2, z from scipy.stats.norm
    x, y = TREATED, UNTREATED
    result = common_language(x, y)
    a, n1, n2 = result.value, x.size, y.size
    z, half = stats.norm.ppf(0.975), (n1 + n2) / 2
    for t in (result.interval.low, result.interval.high):
        v = t * (1 - t) / (n1 * n2) * (1 + (half - 1) * ((1 - t) / (2 - t) + t / (1 + t)))
        assert (a - t) ** 2 == pytest.approx(z**2 * v, rel=1e-8)
    assert result.interval.low < a < result.interval.high


def test_common_language_interval_covers_at_about_the_nominal_rate():
    # reference: theory: for normal shift data P(X > Y) = Phi(delta / sqrt(2)); 600 simulated
    # 95 % intervals (n1 = 18, n2 = 24) should cover it 95 % of the time, within 3.5 binomial
    # SEs (0.031); Newcombe (2006) reports near-nominal coverage for method 5
    rng = np.random.default_rng(4)
    truth = stats.norm.cdf(0.6 / math.sqrt(2))
    hits = 0
    for _ in range(600):
        x, y = rng.normal(0.6, 1, 18), rng.normal(0, 1, 24)
        hits += common_language(x, y).interval.contains(truth)
    assert abs(hits / 600 - 0.95) < 3.5 * math.sqrt(0.95 * 0.05 / 600)


@pytest.mark.slow
def test_u1_for_two_million_values_matches_scipy():
    # reference: scipy.stats.mannwhitneyu(x, y, method="asymptotic").statistic (rank-sum based);
    # no n1 x n2 table: 10^12 pairs would not fit
    rng = np.random.default_rng(5)
    x = np.round(rng.normal(0.01, 1, 1_000_000), 3)
    y = np.round(rng.normal(0, 1, 1_000_000), 3)
    ref = stats.mannwhitneyu(x, y, method="asymptotic").statistic
    assert mann_whitney_u1(x, y) == ref
    sizes = all_effect_sizes(x, y, confidence_level=0.95, alternative="two-sided")
    assert sizes["common_language"].value == pytest.approx(ref / 1e12, rel=1e-14)


# --- the collection and input checks -----------------------------------------------------------

def test_all_effect_sizes_has_every_key_and_matches_the_single_calls():
    sizes = all_effect_sizes(TREATED, UNTREATED, confidence_level=0.9, alternative="greater")
    assert list(sizes) == ["cohen_d", "hedges_g", "glass_delta", "rank_biserial",
                           "common_language"]
    single = hedges_g(TREATED, UNTREATED, confidence_level=0.9, alternative="greater")
    assert sizes["hedges_g"] == single
    assert all(s.interval.high is None and s.interval.level == 0.9 for s in sizes.values())


def test_all_effect_sizes_leaves_out_what_the_data_cannot_support():
    sizes = all_effect_sizes([1.0, 2.0, 3.0], [4.0, 4.0, 4.0], confidence_level=0.95,
                             alternative="two-sided")
    assert "glass_delta" not in sizes and "cohen_d" in sizes
    sizes = all_effect_sizes([1.0, 1.0], [4.0, 4.0], confidence_level=0.95,
                             alternative="two-sided")
    assert set(sizes) == {"rank_biserial", "common_language"}
    with pytest.raises(DataProblem, match="pooled standard deviation"):
        cohen_d([1.0, 1.0], [4.0, 4.0])


@pytest.mark.parametrize("compute", [cohen_d, hedges_g, glass_delta, rank_biserial,
                                     common_language])
def test_bad_input_raises_readable_errors(compute):
    with pytest.raises(OptionProblem, match="confidence level"):
        compute(TREATED, UNTREATED, confidence_level=1.5)
    with pytest.raises(OptionProblem, match="direction"):
        compute(TREATED, UNTREATED, alternative="bigger")
    with pytest.raises(DataProblem, match="(?i)group 1"):
        compute([1.0], UNTREATED)
    with pytest.raises(DataProblem, match="(?i)group 2"):
        compute(TREATED, [1.0, float("inf")])


@pytest.mark.parametrize("decimals", [None, 0])
def test_effect_sizes_with_sorted_copies_are_identical(decimals):
    rng = np.random.default_rng(47)
    x, y = rng.normal(10, 2, 400), rng.normal(9, 3, 380)
    if decimals is not None:
        x, y = np.round(x, decimals), np.round(y, decimals)
    # reference: scipy.stats.mannwhitneyu(x, y).statistic for U1, and the call without copies
    assert mann_whitney_u1(x, y, sorted_x=np.sort(x), sorted_y=np.sort(y)) == \
        stats.mannwhitneyu(x, y).statistic
    plain = all_effect_sizes(x, y)
    given = all_effect_sizes(x, y, sorted_x=np.sort(x), sorted_y=np.sort(y))
    assert plain.keys() == given.keys()
    for key in plain:
        assert (given[key].value, given[key].interval) == (plain[key].value, plain[key].interval)


def test_effect_sizes_with_a_given_u1_are_identical():
    rng = np.random.default_rng(59)
    x, y = np.round(rng.normal(5, 1, 300), 1), np.round(rng.normal(5.3, 1, 280), 1)
    u1 = stats.mannwhitneyu(x, y).statistic  # reference: scipy.stats.mannwhitneyu(x, y)
    plain = all_effect_sizes(x, y)
    given = all_effect_sizes(x, y, u1=u1)
    for key in ("rank_biserial", "common_language"):
        assert (given[key].value, given[key].interval) == (plain[key].value, plain[key].interval)
    assert given["common_language"].value == u1 / (x.size * y.size)
    with pytest.raises(OptionProblem, match="U of group 1"):
        all_effect_sizes(x, y, u1=x.size * y.size + 1)
