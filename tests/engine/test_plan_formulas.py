"""Exact and approximate power of the planner against outside references: statsmodels'
TTestIndPower, TTestPower and NormalIndPower (test-only), scipy's noncentral t, and Cohen's table."""

import math

import numpy as np
import pytest
from scipy import stats
from statsmodels.stats.power import NormalIndPower, TTestIndPower, TTestPower

from engine.errors import OptionProblem
from engine.planning import Plan, plan_study
from engine.planning.equivalence_power import equivalence_power
from engine.planning.exact_power import spread
from engine.planning.rank_approximation import noether_power, probability_greater
from engine.question import Margin, Question

_SM_ALTERNATIVE = {"differ": "two-sided", "higher": "larger", "lower": "smaller"}


def _question(kind, alpha=0.05):
    return Question(kind, 1 - alpha)


@pytest.mark.parametrize("d, n1, ratio, alpha, kind", [
    (0.5, 20, 1.0, 0.05, "differ"), (0.2, 100, 2.0, 0.01, "differ"), (0.8, 7, 0.5, 0.10, "higher"),
    (-0.6, 15, 1.5, 0.05, "lower"), (1.5, 3, 1.0, 0.05, "differ"), (0.05, 2000, 1.0, 0.05, "differ"),
])
def test_pooled_power_is_statsmodels_ttestindpower(d, n1, ratio, alpha, kind):
    n2 = n1 * ratio
    plan = Plan("power", difference=d * 3.0, sd=3.0, n1=n1, n2=int(n2), procedure="pooled",
                question=_question(kind, alpha))
    # statsmodels TTestIndPower().power(effect_size, nobs1, alpha, ratio, alternative)
    reference = TTestIndPower().power(d, n1, alpha, ratio=int(n2) / n1, alternative=_SM_ALTERNATIVE[kind])
    assert plan_study(plan).power == pytest.approx(reference, abs=1e-10)


@pytest.mark.parametrize("d, n, alpha, kind", [(0.5, 30, 0.05, "differ"), (0.3, 12, 0.05, "higher"),
                                                (-0.9, 5, 0.01, "lower")])
def test_welch_power_with_equal_sizes_and_sds_is_statsmodels_ttestindpower(d, n, alpha, kind):
    # with equal SDs and sizes Satterthwaite's df is n1 + n2 - 2 and Welch's power is the pooled
    # test's: statsmodels TTestIndPower computes that same quantity
    plan = Plan("power", difference=d, sd=1.0, n1=n, question=_question(kind, alpha))
    reference = TTestIndPower().power(d, n, alpha, ratio=1.0, alternative=_SM_ALTERNATIVE[kind])
    assert plan_study(plan).power == pytest.approx(reference, abs=1e-10)


def test_welch_power_with_unequal_sds_uses_satterthwaite_df_where_statsmodels_does_not():
    # Where the SDs or sizes differ, Welch's planned power is the noncentral t with the
    # Welch-Satterthwaite df at the planned SDs (scipy.stats.nct below); statsmodels'
    # TTestIndPower has no Welch case (its df is n1 + n2 - 2), so it differs from ours here.
    sd1, sd2, n1, n2, delta = 2.0, 5.0, 8, 20, 3.0
    v1, v2 = sd1**2 / n1, sd2**2 / n2
    df = (v1 + v2) ** 2 / (v1**2 / (n1 - 1) + v2**2 / (n2 - 1))
    nc = delta / math.sqrt(v1 + v2)
    crit = stats.t.isf(0.025, df)
    reference = stats.nct.sf(crit, df, nc) + stats.nct.cdf(-crit, df, nc)  # scipy.stats.nct
    result = plan_study(Plan("power", difference=delta, sd=sd1, sd2=sd2, n1=n1, n2=n2))
    assert result.power == pytest.approx(reference, abs=1e-10)
    assert result.df == pytest.approx(df, rel=1e-14)
    pooled_like = TTestIndPower().power(delta / math.sqrt((sd1**2 + sd2**2) / 2), n1, 0.05, ratio=n2 / n1)
    assert abs(result.power - pooled_like) > 0.01


@pytest.mark.parametrize("d, ratio, power, kind", [(0.5, 1.0, 0.8, "differ"), (0.3, 2.0, 0.9, "higher"),
                                                   (1.2, 1.0, 0.95, "differ"), (-0.25, 0.7, 0.8, "lower")])
def test_pooled_sample_size_is_statsmodels_solve_power(d, ratio, power, kind):
    result = plan_study(Plan("n", difference=d, sd=1.0, power=power, ratio=ratio, procedure="pooled",
                             question=_question(kind)))
    alternative = _SM_ALTERNATIVE[kind]
    # statsmodels' solve_power finds the continuous nobs1 to about 1e-8 relative (its own solver)
    reference = TTestIndPower().solve_power(effect_size=d, alpha=0.05, power=power, ratio=ratio,
                                            alternative=alternative)
    assert result.continuous_n == pytest.approx(reference, rel=1e-7)
    # the power statsmodels gives at our continuous size is the target, to 1e-8
    assert TTestIndPower().power(d, result.continuous_n, 0.05, ratio=ratio,
                                 alternative=alternative) == pytest.approx(power, abs=1e-8)
    # the answer is the smallest whole size of group 1 (group 2 ratio times it, rounded up)
    # whose power reaches the target
    n1, n2 = result.n1, result.n2
    assert n2 == math.ceil(ratio * n1 - 1e-9)
    assert TTestIndPower().power(d, n1, 0.05, ratio=n2 / n1, alternative=alternative) >= power
    below = n1 - 1
    assert TTestIndPower().power(d, below, 0.05, ratio=math.ceil(ratio * below - 1e-9) / below,
                                 alternative=alternative) < power
    assert result.power == pytest.approx(TTestIndPower().power(d, n1, 0.05, ratio=n2 / n1,
                                                               alternative=alternative), abs=1e-10)


def test_cohens_table_d_half_needs_64_per_group():
    # Cohen (1988), Statistical Power Analysis for the Behavioral Sciences, Table 2.4.1:
    # d = 0.50, two-sided alpha 0.05, power 0.80 -> n = 64 per group (value recalled from memory)
    result = plan_study(Plan("n", difference=0.5, sd=1.0, power=0.8, procedure="pooled"))
    assert (result.n1, result.n2) == (64, 64)
    assert plan_study(Plan("n", difference=0.5, sd=1.0, power=0.8)).n1 == 64  # Welch, equal SDs


@pytest.mark.parametrize("d, n, alpha, kind", [(0.4, 20, 0.05, "differ"), (0.25, 60, 0.01, "higher"),
                                                (-0.7, 9, 0.05, "lower")])
def test_paired_power_is_statsmodels_ttestpower(d, n, alpha, kind):
    plan = Plan("power", difference=d * 2.0, sd=2.0, n1=n, design="paired", question=_question(kind, alpha))
    # statsmodels TTestPower (one-sample t on the differences)
    reference = TTestPower().power(d, n, alpha, alternative=_SM_ALTERNATIVE[kind])
    assert plan_study(plan).power == pytest.approx(reference, abs=1e-10)


def test_paired_sample_size_is_statsmodels_ttestpower_solve_power():
    result = plan_study(Plan("n", difference=0.4, sd=1.0, power=0.8, design="paired"))
    reference = TTestPower().solve_power(effect_size=0.4, alpha=0.05, power=0.8)
    assert result.continuous_n == pytest.approx(reference, rel=1e-7)
    assert TTestPower().power(0.4, result.continuous_n, 0.05) == pytest.approx(0.8, abs=1e-8)
    assert result.n1 == math.ceil(reference) == result.n2


@pytest.mark.parametrize("d, n1, ratio, alpha, kind", [(0.5, 20, 1.0, 0.05, "differ"),
                                                       (0.3, 50, 3.0, 0.01, "higher"),
                                                       (-0.4, 33, 0.5, 0.10, "lower")])
def test_z_power_is_statsmodels_normalindpower(d, n1, ratio, alpha, kind):
    n2 = math.ceil(n1 * ratio)
    plan = Plan("power", difference=d, sd=1.0, n1=n1, n2=n2, procedure="z", question=_question(kind, alpha))
    # statsmodels NormalIndPower().power(effect_size, nobs1, alpha, ratio, alternative)
    reference = NormalIndPower().power(d, n1, alpha, ratio=n2 / n1, alternative=_SM_ALTERNATIVE[kind])
    assert plan_study(plan).power == pytest.approx(reference, abs=1e-12)


def test_z_sample_size_is_statsmodels_normalindpower_solve_power():
    result = plan_study(Plan("n", difference=0.4, sd=1.0, power=0.8, procedure="z", ratio=1.5))
    reference = NormalIndPower().solve_power(effect_size=0.4, alpha=0.05, power=0.8, ratio=1.5)
    assert result.continuous_n == pytest.approx(reference, rel=1e-8)


@pytest.mark.parametrize("n, power, kind", [(20, 0.8, "differ"), (45, 0.9, "lower"), (8, 0.95, "higher")])
def test_smallest_detectable_difference_is_statsmodels_solve_power_effect_size(n, power, kind):
    result = plan_study(Plan("difference", sd=2.0, n1=n, power=power, procedure="pooled",
                             question=_question(kind)))
    alternative = _SM_ALTERNATIVE[kind]
    # statsmodels TTestIndPower().solve_power(effect_size=None, ...) solves for d (to about 1e-8)
    reference = TTestIndPower().solve_power(nobs1=n, alpha=0.05, power=power, ratio=1.0,
                                            alternative=alternative)
    # its solver stops earlier than ours (about 2e-6 relative for "smaller"); the sharp check is
    # the power statsmodels gives at our answer, below
    assert result.difference / 2.0 == pytest.approx(reference, rel=1e-5)
    assert result.effect == pytest.approx(result.difference / 2.0, rel=1e-15)
    assert (result.difference < 0) == (kind == "lower")
    assert TTestIndPower().power(result.effect, n, 0.05, ratio=1.0,
                                 alternative=alternative) == pytest.approx(power, abs=1e-9)


@pytest.mark.parametrize("worse, delta", [("lower", 0.0), ("lower", 0.5), ("higher", -0.3)])
def test_noninferiority_power_is_the_one_sided_t_power_shifted_by_the_margin(worse, delta):
    margin, sd, n = 1.0, 2.0, 30
    plan = Plan("power", difference=delta, sd=sd, n1=n, procedure="pooled",
                question=Question("not_worse", 0.95, Margin.not_worse_by(margin, worse)))
    # H0: difference <= -margin (lower worse) is TTestIndPower's one-sided test of the shifted
    # effect (difference + margin) / sd, alternative "larger" (statsmodels)
    shift = (delta + margin) if worse == "lower" else (margin - delta)
    reference = TTestIndPower().power(shift / sd, n, 0.05, ratio=1.0, alternative="larger")
    assert plan_study(plan).power == pytest.approx(reference, abs=1e-10)


@pytest.mark.parametrize("procedure, sd2, n2", [("pooled", 1.0, 14), ("welch", 2.5, 25), ("z", 1.8, 11)])
def test_equivalence_power_with_an_open_upper_margin_is_the_one_sided_power(procedure, sd2, n2):
    # With the upper end of the margin far away, two one-sided tests are the lower one alone, a
    # one-sided test of (D - low) / SE: its power is the noncentral t's (scipy.stats.nct) or
    # normal (scipy.stats.norm) upper tail. Checks the quadrature over the sample SD.
    sd1, n1, low, delta, alpha = 1.0, 14, -1.0, 0.2, 0.05
    s = spread(procedure, "independent", sd1, sd2 if procedure != "pooled" else sd1, n1, n2)
    nc = (delta - low) / s.se
    if s.df is None:
        reference = stats.norm.sf(stats.norm.isf(alpha) - nc)
    else:
        reference = stats.nct.sf(stats.t.isf(alpha, s.df), s.df, nc)
    assert equivalence_power(delta, low, 1e9, s, alpha) == pytest.approx(reference, abs=1e-10)


def test_equivalence_power_is_symmetric_and_falls_towards_the_margin():
    s = spread("pooled", "independent", 1.0, 1.0, 30, 30)
    at = [equivalence_power(d, -0.6, 0.6, s, 0.05) for d in (0.0, 0.2, 0.4, 0.55)]
    assert at == sorted(at, reverse=True)
    assert equivalence_power(0.2, -0.6, 0.6, s, 0.05) == pytest.approx(
        equivalence_power(-0.2, -0.6, 0.6, s, 0.05), abs=1e-13)
    # at the margin the power is at most alpha (the size of the test; Schuirmann 1987)
    assert equivalence_power(0.6, -0.6, 0.6, s, 0.05) <= 0.05


def test_noether_power_formula():
    # Noether (1987), JASA 82, 645: N = (z_alpha + z_beta)^2 / (12 c (1 - c) (p - 1/2)^2); with
    # equal groups (c = 1/2), one-sided alpha 0.025 and power 0.8 the N it gives has power 0.8
    # in the tail of the effect; the two-sided power adds the other tail, Phi(-z - z_alpha)
    p = probability_greater(0.5, 1.0, 1.0, "normal")
    assert p == pytest.approx(stats.norm.cdf(0.5 / math.sqrt(2)), abs=1e-15)
    z = stats.norm.isf(0.025) + stats.norm.isf(0.2)
    total = z**2 / (12 * 0.25 * (p - 0.5) ** 2)
    other_tail = stats.norm.cdf(-z - stats.norm.isf(0.025))
    assert noether_power(p, total / 2, total / 2, 0.05, "two-sided") == pytest.approx(0.8 + other_tail, abs=1e-12)
    assert noether_power(p, total / 2, total / 2, 0.025, "greater") == pytest.approx(0.8, abs=1e-12)


@pytest.mark.parametrize("shape, reference", [
    # P(X > Y) of two standardised shapes, X shifted by 1, by scipy's integration (scipy.integrate.quad)
    ("skewed", None), ("heavy_tailed", None)])
def test_probability_greater_for_the_shapes_matches_scipy_integration(shape, reference):
    from scipy import integrate

    dist = (stats.gamma(2.0, loc=-math.sqrt(2.0), scale=1 / math.sqrt(2.0)) if shape == "skewed"
            else stats.t(3.0, scale=1 / math.sqrt(3.0)))
    value, _ = integrate.quad(lambda y: dist.pdf(y) * dist.sf(y - 1.0), -np.inf, np.inf, limit=500)
    assert probability_greater(1.0, 1.0, 1.0, shape) == pytest.approx(value, abs=1e-7)


@pytest.mark.parametrize("changes, message", [
    (dict(find="n", difference=5, sd=6, power=0.8, question=Question("lower")), "must be below 0"),
    (dict(find="n", difference=0, sd=6, power=0.8), "difference of 0"),
    (dict(find="n", difference=5, sd=6, power=0.8,
          question=Question("equivalent", 0.95, Margin.within(4))), "outside the margin"),
    (dict(find="n", difference=0.001, sd=6, power=0.99), "more than 10,000,000"),
])
def test_unreachable_plans_say_why(changes, message):
    with pytest.raises(OptionProblem, match=message):
        plan_study(Plan(**changes))


@pytest.mark.parametrize("changes, message", [
    (dict(find="n", difference=5, power=0.8), "Give the SD"),
    (dict(find="n", difference=5, sd=-1, power=0.8), "SD must be above 0"),
    (dict(find="n", difference=5, sd=1, power=1.2), "between 0 and 1"),
    (dict(find="power", difference=5, sd=1), "Give the sample size"),
    (dict(find="power", difference=5, sd=1, n1=1), "whole number from 2"),
    (dict(find="n", difference=5, sd=1, sd2=2, power=0.8, procedure="pooled"), "same SD"),
    (dict(find="n", difference=5, sd=1, power=0.8, procedure="mann_whitney", method="exact"), "exact power"),
    (dict(find="n", difference=5, sd=1, power=0.8, procedure="ranks"), "procedure must be one of"),
    (dict(find="n", sd=1, power=0.8, question=Question("equivalent", 0.95, Margin.within(5, unit="percent"))),
     "percentage"),
])
def test_bad_plans_are_refused_in_one_sentence(changes, message):
    with pytest.raises(OptionProblem, match=message):
        Plan(**changes)


def test_the_protocol_sentence_reads_right():
    result = plan_study(Plan("n", difference=5, sd=6, power=0.8, unit="MPa"))
    assert result.sentence == ("With 24 units per group, a Welch t-test at the two-sided 5% level "
                               "has 80.6% power to detect a difference of 5 MPa if the SD is 6 MPa "
                               "in both groups.")
    paired = plan_study(Plan("power", difference=-2, sd=3, n1=12, design="paired", question=Question("lower")))
    assert paired.sentence.startswith("With 12 pairs, a paired t-test at the one-sided 5% level has ")
    assert paired.sentence.endswith("power to detect group 1 being lower by 2 if the SD of the pair "
                                    "differences is 3.")
    equivalence = plan_study(Plan("n", sd=6, power=0.8, unit="MPa",
                                  question=Question("equivalent", 0.95, Margin.within(4))))
    assert ("two one-sided Welch t-tests, each at the 5% level, have" in equivalence.sentence
            and "to show equivalence within -4 MPa to 4 MPa if the true difference is 0 MPa and the "
                "SD is 6 MPa in both groups." in equivalence.sentence)


def test_power_is_never_overstated_in_words():
    from engine.planning.sentence import power_text

    assert power_text(0.80999) == "80.9%"
    assert power_text(0.8) == "80%"
    assert power_text(0.79996) == "79.9%"


@pytest.mark.parametrize("procedure", ["welch", "z"])
@pytest.mark.parametrize("scale", [2.0**990, 2.0**-1000])
def test_sds_near_the_ends_of_the_number_range_give_the_power_of_ordinary_units(procedure, scale):
    # the power depends on the difference over the SDs alone: at SDs near 1e298 (whose squares
    # overflow) or 1e-301 (whose squares vanish) it is the power in ordinary units
    ordinary = plan_study(Plan("power", difference=2.0, sd=1.0, sd2=10.0, n1=5, n2=3, procedure=procedure))
    far = plan_study(Plan("power", difference=2.0 * scale, sd=scale, sd2=10.0 * scale, n1=5, n2=3,
                          procedure=procedure))
    assert far.power == pytest.approx(ordinary.power, rel=1e-12)
    assert far.effect == pytest.approx(ordinary.effect, rel=1e-12)
    # and, by scipy.stats.norm, the z-test's power in ordinary units
    if procedure == "z":
        se = math.sqrt(1.0 / 5 + 100.0 / 3)
        reference = stats.norm.sf(stats.norm.isf(0.025) - 2.0 / se) + stats.norm.cdf(-stats.norm.isf(0.025) - 2.0 / se)
        assert ordinary.power == pytest.approx(reference, abs=1e-12)
