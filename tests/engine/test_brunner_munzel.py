"""The Brunner-Munzel test and its interval against scipy, theory and a seeded simulation.

References used below: scipy.stats.brunnermunzel (statistic, p-value; scipy's statistic has the
opposite sign: it is positive when group 2 tends to be larger), scipy.stats.rankdata for the
placements, the count of splits C(N, n1) for complete separation, and the definition of a
confidence interval for the simulated coverage.
"""

from __future__ import annotations

import json
from math import comb

import numpy as np
import pytest
from scipy import stats

from engine import report
from engine.analysis import analyze
from engine.question import Question
from engine.spec import AnalysisSpec, Statements
from engine.errors import OptionProblem
from engine.jsonout import analysis_document
from engine.procedures.brunner_munzel import brunner_munzel, placements
from engine.results import Groups

ALTERNATIVES = ("two-sided", "less", "greater")


def _h(rng, n1=8, n2=25):
    """Scenario H: normal, equal means, SDs 4:1, the small group the noisy one."""
    return rng.normal(0, 4, n1), rng.normal(0, 1, n2)


@pytest.mark.parametrize("alternative", ALTERNATIVES)
@pytest.mark.parametrize("distribution", ["t", "normal"])
@pytest.mark.parametrize(("n1", "n2", "decimals"), [(8, 25, None), (5, 6, None), (30, 12, 0),
                                                    (15, 15, 1), (40, 3, 0)])
def test_statistic_df_and_p_against_scipy(alternative, distribution, n1, n2, decimals):
    rng = np.random.default_rng(n1 * 100 + n2)
    x, y = rng.normal(0.3, 3, n1), rng.normal(0, 1, n2)
    if decimals is not None:  # ties within and across the groups
        x, y = np.round(x, decimals), np.round(y, decimals)
    ours = brunner_munzel(x, y, alternative=alternative, distribution=distribution)
    reference = stats.brunnermunzel(x, y, alternative=alternative, distribution=distribution)
    assert ours.statistic == pytest.approx(-reference.statistic, abs=1e-12, rel=1e-12)
    assert ours.p_value == pytest.approx(reference.pvalue, abs=1e-12, rel=1e-12)
    if distribution == "t":
        # reference: the Satterthwaite-type df of Brunner and Munzel (2000), eq. as in scipy's
        # implementation, from scipy.stats.rankdata of the combined and the separate samples
        rank_all = stats.rankdata(np.r_[x, y])
        px = rank_all[:n1] - stats.rankdata(x)
        py = rank_all[n1:] - stats.rankdata(y)
        sx, sy = np.var(px, ddof=1), np.var(py, ddof=1)
        df = (n1 * sx + n2 * sy) ** 2 / ((n1 * sx) ** 2 / (n1 - 1) + (n2 * sy) ** 2 / (n2 - 1))
        assert ours.df == pytest.approx(df, rel=1e-12)
    else:
        assert ours.df is None


def test_placements_are_combined_minus_internal_mid_ranks():
    rng = np.random.default_rng(3)
    x, y = np.round(rng.normal(0, 1, 30), 1), np.round(rng.normal(0, 2, 20), 1)
    # reference: scipy.stats.rankdata (mid-ranks)
    expected = stats.rankdata(np.r_[x, y])[:30] - stats.rankdata(x)
    assert np.allclose(placements(np.sort(x), np.sort(y)), np.sort(expected), rtol=0, atol=1e-12)


def test_estimate_is_the_common_language_share_and_sign_follows_group_1():
    rng = np.random.default_rng(5)
    x, y = rng.normal(1, 1, 12), rng.normal(0, 1, 14)
    ours = brunner_munzel(x, y)
    # reference: direct count of pairs, ties half
    share = (np.sum(x[:, None] > y[None, :]) + 0.5 * np.sum(x[:, None] == y[None, :])) / (12 * 14)
    assert ours.estimate == pytest.approx(share, rel=1e-14)
    assert ours.statistic > 0 and ours.interval.low < ours.estimate < ours.interval.high
    swapped = brunner_munzel(y, x)
    assert swapped.estimate == pytest.approx(1 - ours.estimate, rel=1e-14)
    assert swapped.interval.low == pytest.approx(1 - ours.interval.high, rel=1e-12)


def test_one_sided_intervals_open_the_right_end_and_match_the_logit_formula():
    rng = np.random.default_rng(8)
    x, y = rng.normal(0.5, 2, 10), rng.normal(0, 1, 16)
    two = brunner_munzel(x, y, confidence_level=0.9)
    greater = brunner_munzel(x, y, alternative="greater", confidence_level=0.95)
    less = brunner_munzel(x, y, alternative="less", confidence_level=0.95)
    # a one-sided 95% bound is an end of the two-sided 90% interval (same t quantile)
    assert greater.interval.high is None and less.interval.low is None
    assert greater.interval.low == pytest.approx(two.interval.low, rel=1e-12)
    assert less.interval.high == pytest.approx(two.interval.high, rel=1e-12)
    # reference: logit(p) +- t_{df, 0.95} se / (p (1 - p)), se from scipy's statistic
    p = two.estimate
    se = (p - 0.5) / -stats.brunnermunzel(x, y).statistic
    half = stats.t.isf(0.05, two.df) * se / (p * (1 - p))
    logit = np.log(p / (1 - p))
    assert two.interval.low == pytest.approx(1 / (1 + np.exp(-(logit - half))), rel=1e-12)


@pytest.mark.parametrize(("x", "y", "alternative", "expected"), [
    # reference: 1 / C(N, n1) splits put every value of one group above the other
    ([4.0, 5.0, 6.0], [1.0, 2.0, 3.0], "greater", 1 / comb(6, 3)),
    ([4.0, 5.0, 6.0], [1.0, 2.0, 3.0], "two-sided", 2 / comb(6, 3)),
    ([4.0, 5.0, 6.0], [1.0, 2.0, 3.0], "less", 1.0),
    ([0.0] * 10, [1.0] * 10, "two-sided", 2 / comb(20, 10)),
])
def test_complete_separation_gives_a_clear_result_not_nan(x, y, alternative, expected):
    ours = brunner_munzel(x, y, alternative=alternative)
    assert ours.p_value == pytest.approx(expected, rel=1e-12)
    assert ours.details["degenerate"] and ours.df is None
    assert abs(ours.statistic) == np.inf
    interval = ours.interval
    assert all(v is None or 0 <= v <= 1 for v in (interval.low, interval.high))
    assert any("lies above every value" in w for w in ours.warnings)


def test_every_value_tied_gives_p_one():
    ours = brunner_munzel([2.0, 2.0, 2.0], [2.0, 2.0])
    assert ours.p_value == 1.0 and ours.estimate == 0.5 and ours.statistic == 0.0
    assert ours.interval.low < 0.5 < ours.interval.high
    assert any("same" in w for w in ours.warnings)


def test_one_group_constant_still_has_a_t_reference():
    # placements of group 1 all equal, group 2's vary: df = n2 - 1 (reference: the df formula)
    ours = brunner_munzel([5.0, 5.0, 5.0], [1.0, 4.0, 6.0, 9.0])
    assert ours.df == pytest.approx(3.0, rel=1e-12)
    assert ours.p_value == pytest.approx(stats.brunnermunzel([5.0, 5.0, 5.0],
                                                             [1.0, 4.0, 6.0, 9.0]).pvalue, rel=1e-12)


def test_bad_options_are_refused_with_a_sentence():
    with pytest.raises(OptionProblem, match="reference distribution"):
        brunner_munzel([1.0, 2.0], [3.0, 4.0], distribution="exact")


@pytest.mark.slow
def test_interval_covers_and_test_holds_its_level_under_unequal_spreads():
    # scenario H: P(X > Y) = 1/2 exactly (both normal, centred at 0). 600 data sets: binomial
    # standard error about 0.009 near 0.95; the full run is tests/benchmarks/sim_ranks.py
    rng = np.random.default_rng(20261203)
    covered = rejected = 0
    reps = 600
    for _ in range(reps):
        result = brunner_munzel(*_h(rng))
        covered += result.interval.contains(0.5)
        rejected += result.p_value < 0.05
    # the logit interval is on the safe side at these sizes (0.986 in the 4,000-set run)
    assert 0.93 <= covered / reps <= 0.997
    assert rejected / reps <= 0.085


def _spec(alternative="two-sided", **statements):
    return AnalysisSpec(seed=1, resamples=200, question=Question.from_alternative(alternative),
                        statements=Statements(**statements))


def _analysis(x, y, **options):
    return analyze(Groups(("batch A", "batch B"), x, y), _spec(**options))


def test_analysis_runs_it_and_the_json_carries_it():
    rng = np.random.default_rng(11)
    analysis = _analysis(*_h(rng))
    result = analysis.procedures["brunner_munzel"]
    assert any(row.key == "brunner_munzel" for row in analysis.robustness.rows)
    document = json.loads(json.dumps(analysis_document(analysis)))
    assert document["procedures"]["brunner_munzel"]["p_value"] == pytest.approx(result.p_value)
    assert "mann_whitney" in document["procedures"]  # members are added, none renamed


def test_report_phrases_the_probability_and_the_statistic():
    rng = np.random.default_rng(12)
    x, y = rng.normal(1.5, 3, 12), rng.normal(0, 1, 20)
    analysis = _analysis(x, y)
    result = analysis.procedures["brunner_munzel"]
    text = report.render(analysis, procedure="brunner_munzel").paragraph
    numbers = report.display_numbers(analysis, "brunner_munzel")
    assert f"Brunner-Munzel W({numbers.df}) = {numbers.statistic}" in text
    assert f"probability that the first group's value is the larger (ties count half) {numbers.estimate}" in text
    assert numbers.effect is None  # the estimate is itself the effect size
    assert report.p_clause(result.p_value) in text


def test_unequal_spreads_with_far_values_suggest_brunner_munzel_not_mann_whitney():
    # small groups, one with far values, spreads 4:1 in SD and in quartiles: the rule that used
    # to suggest Mann-Whitney (whose level fails here, Pratt 1964) now suggests Brunner-Munzel
    rng = np.random.default_rng(13)
    x = np.r_[rng.normal(0, 4, 11), 40.0]
    y = rng.normal(0, 1, 25)
    analysis = _analysis(x, y)
    suggestion = analysis.recommendation
    assert suggestion.key == "brunner_munzel"
    assert any("Pratt 1964" in r for r in suggestion.reasons)
    assert "same shape and spread" in suggestion.assumptions["mann_whitney"]


def test_similar_spreads_with_far_values_keep_mann_whitney():
    # a far value in each group: the SDs stay alike (ratio under 2), so Mann-Whitney stays
    rng = np.random.default_rng(15)
    x = np.r_[rng.normal(0, 1, 14), 12.0]
    y = np.r_[rng.normal(0.3, 1, 14), -11.0]
    analysis = _analysis(x, y)
    assert analysis.diagnostics.spread.sd_ratio < 2
    assert analysis.recommendation.key == "mann_whitney"


@pytest.mark.parametrize("sizes", [(2, 2), (3, 3), (3, 4), (4, 4), (5, 6), (8, 8)])
@pytest.mark.parametrize("alternative", ["two-sided", "greater"])
def test_a_complete_separation_gives_an_interval_that_agrees_with_its_test(sizes, alternative):
    # every value of group 1 above every value of group 2 (the triplicates 10.1, 10.3, 9.9 vs
    # 20.2, 19.8, 20.1 in reverse): 1/2 lies in the interval exactly when the test does not reject
    n1, n2 = sizes
    x = 20.0 + np.arange(n1) / 10
    y = 10.0 + np.arange(n2) / 10
    result = brunner_munzel(x, y, alternative=alternative, confidence_level=0.95)
    # reference: the chance of so complete a separation among all C(n1 + n2, n1) relabellings
    expected = (1 if alternative == "greater" else 2) / comb(n1 + n2, n1)
    assert result.p_value == pytest.approx(min(1.0, expected), rel=1e-12)
    low = result.interval.low if result.interval.low is not None else 0.0
    high = result.interval.high if result.interval.high is not None else 1.0
    assert (low <= 0.5 <= high) == (result.p_value >= 0.05)
