"""The suggestion for matched pairs: which procedure for which differences, the alternatives
weighed and the cautions. The thresholds are rules of common practice (30 pairs, Tukey's far
fence with the generalized ESD test), not results; the cases sit well clear of them."""

import numpy as np
import pytest

from engine import advice
from engine.analysis import analyze
from engine.diagnostics import diagnose
from engine.paired_advice import ORDER_CAUTION, PAIRING_CAUTION, SMALL_PAIRS, recommend_paired
from engine.paired_diagnostics import check_pairs
from engine.procedures import registry
from engine.results import Groups
from engine.spec import AnalysisSpec, Statements

PAIRED_KEYS = {r.key for r in registry.RECORDS if r.serves("paired", "differ")}


def _suggest(x, y, **options):
    groups = Groups(("after", "before"), np.asarray(x, float), np.asarray(y, float))
    return recommend_paired(check_pairs(groups.x, groups.y), groups, **options)


def _units(n, seed):
    rng = np.random.default_rng(seed)
    return rng, rng.normal(40.0, 5.0, n)


def test_bell_shaped_differences_get_the_paired_t_test_with_every_alternative_weighed():
    rng, units = _units(12, 1)
    suggestion = _suggest(units + 1.0 + rng.normal(0, 1, 12), units + rng.normal(0, 1, 12))
    assert suggestion.key == "paired_t" and suggestion.name == "paired t-test"
    assert "own control" in suggestion.reasons[0]
    assert {c.key for c in suggestion.considered} == PAIRED_KEYS - {"paired_t"}
    assert all(c.why_not.strip() for c in suggestion.considered)
    why = {c.key: c.why_not for c in suggestion.considered}
    assert "cross-check" in why["sign_flip_mean"] and "no p-value" in why["paired_bootstrap_mean"]
    assert suggestion.cautions[0] == PAIRING_CAUTION and ORDER_CAUTION in suggestion.cautions


def test_few_pairs_with_a_far_difference_get_the_signed_rank_test():
    rng, units = _units(15, 2)
    x, y = units + 1.0 + rng.normal(0, 1, 15), units + rng.normal(0, 1, 15)
    x[3] += 30.0
    suggestion = _suggest(x, y)
    assert suggestion.key == "signed_rank"
    text = " ".join(suggestion.reasons)
    assert f"fewer than {SMALL_PAIRS}" in text and "symmetrically around zero" in text
    assert "Hodges-Lehmann" in text and "does not test the mean" in text
    assert "generalized ESD" in text  # the fence rule said
    why = {c.key: c.why_not for c in suggestion.considered}
    assert "pull the mean" in why["paired_t"]
    assert "heavy tails or far values" in why["sign_flip_mean"]


def test_few_lopsided_pairs_get_the_signed_rank_test_read_as_leaning_to_one_side():
    rng, units = _units(20, 3)
    suggestion = _suggest(units + rng.exponential(2.0, 20) ** 1.5, units)
    assert suggestion.key == "signed_rank"
    assert any("lean to one side" in reason for reason in suggestion.reasons)
    assert any("d_z and d_av" in caution for caution in suggestion.cautions)


def test_many_lopsided_pairs_keep_the_paired_t_test_by_the_central_limit_theorem():
    rng, units = _units(80, 4)
    suggestion = _suggest(units + rng.exponential(2.0, 80), units)
    assert suggestion.key == "paired_t"
    assert any("central limit theorem" in reason for reason in suggestion.reasons)
    why = {c.key: c.why_not for c in suggestion.considered}
    assert "different question" in why["signed_rank"]


def test_ratings_get_the_signed_rank_test_and_a_mean_is_not_offered():
    before = [3, 4, 2, 5, 3, 4, 3, 2, 4, 3]
    after = [4, 4, 3, 5, 4, 5, 3, 3, 5, 4]
    plain = _suggest(after, before)
    assert plain.looks_like_ratings
    assert any("ordinal ratings" in reason for reason in plain.reasons)
    rated = _suggest(after, before, ordinal=True)
    assert rated.key == "signed_rank"
    why = {c.key: c.why_not for c in rated.considered}
    assert "equal steps" in why["paired_t"] and "equal steps" in why["sign_flip_mean"]


@pytest.mark.parametrize("zero_rule, words", [("drop", "Wilcoxon's rule"), ("pratt", "Pratt's rule")])
def test_pairs_without_a_difference_earn_a_caution_naming_the_rule(zero_rule, words):
    before = np.array([10.0, 11.0, 12.0, 13.0, 14.0, 15.0, 16.0, 17.0, 18.0, 19.0])
    after = before + np.array([0.0, 0.0, 1.0, 2.0, 0.5, 9.0, 1.5, 0.0, 1.0, 30.0])
    suggestion = _suggest(after, before, zero_rule=zero_rule)
    assert suggestion.key == "signed_rank"
    caution = next(c for c in suggestion.cautions if "showed no difference" in c)
    assert caution.startswith("3 pairs") and words in caution


def test_a_weak_correlation_of_the_members_and_statements_for_groups_earn_cautions():
    rng = np.random.default_rng(5)
    suggestion = _suggest(rng.normal(10, 1, 25), rng.normal(10, 1, 25) * -1 + 20,
                          known_sd=(1.0, 1.0))
    assert any("check the pairing" in c for c in suggestion.cautions)
    assert any("do not use it" in c for c in suggestion.cautions)


def test_the_analysis_takes_the_paired_suggestion_and_the_independent_advice_weighs_no_paired_procedure():
    rng, units = _units(14, 6)
    groups = Groups(("after", "before"), units + rng.normal(1, 1, 14), units + rng.normal(0, 1, 14))
    paired = analyze(groups, AnalysisSpec(design="paired", seed=1, resamples=500,
                                          statements=Statements(ordinal=False)))
    assert paired.recommendation.key == "paired_t" and paired.chosen is paired.procedures["paired_t"]
    independent = advice.recommend(diagnose(groups), groups)
    assert not {c.key for c in independent.considered} & PAIRED_KEYS
