"""The suggested procedure in seeded scenarios that the usual practice of the field settles.

The expected choices follow the sources named in engine/advice.py: Welch by default (Ruxton 2006,
Behavioral Ecology 17:688; Delacre, Lakens and Leys 2017, International Review of Social
Psychology 30:92), pooled only with equal spreads known, z with known SDs, ranks for ratings and
for small groups with clearly non-normal shape (common practice), Welch for large groups by the
central limit theorem (common practice).
"""

import numpy as np
import pytest

from engine import advice
from engine.analysis import PROCEDURE_NAMES
from engine.procedures.registry import RECORDS
from engine.diagnostics import diagnose
from engine.results import Groups


def _suggest(x, y, **flags):
    groups = Groups(("plot A", "plot B"), np.asarray(x, float), np.asarray(y, float))
    return advice.recommend(diagnose(groups), groups, **flags)


@pytest.fixture
def rng():
    return np.random.default_rng(2026)


def test_normal_groups_get_welch_with_its_sources(rng):
    suggestion = _suggest(rng.normal(10, 2, 40), rng.normal(11, 2, 40))
    assert suggestion.key == "welch_t"
    assert suggestion.name == PROCEDURE_NAMES["welch_t"]
    assert any("Ruxton 2006" in r and "Delacre" in r for r in suggestion.reasons)


def test_equal_spread_asserted_gives_pooled(rng):
    suggestion = _suggest(rng.normal(10, 2, 40), rng.normal(11, 2, 42), equal_spread_known=True)
    assert suggestion.key == "pooled_t"
    assert not any("argue against" in c for c in suggestion.cautions)


def test_asserted_equal_spread_that_the_data_contradict_is_questioned(rng):
    # SD ratio about 3 with sizes 2:1 - the common-practice rule of thumb says pooling misleads
    suggestion = _suggest(rng.normal(10, 1, 60), rng.normal(10, 3, 30), equal_spread_known=True)
    assert suggestion.key == "pooled_t"
    assert any("argue against" in c for c in suggestion.cautions)


def test_small_skewed_groups_with_far_outliers_get_a_rank_or_resampling_procedure(rng):
    x = np.r_[rng.lognormal(0, 1, 14), 80.0]
    y = rng.lognormal(0.5, 1, 15)
    suggestion = _suggest(x, y)
    assert suggestion.key in ("mann_whitney", "brunner_munzel", "permutation_mean", "bootstrap_mean")
    # with a far outlier the mean itself is unstable, so a rank procedure is the one; the
    # outlier makes the SDs differ (ratio above 2), so it is the one that allows for that
    assert suggestion.key == "brunner_munzel"
    assert any("Pratt 1964" in r for r in suggestion.reasons)
    assert any("common practice" in r for r in suggestion.reasons)


def test_small_lopsided_groups_without_extremes_keep_the_mean_with_resampling():
    # square of a uniform: clearly right-skewed (G1 about 0.6-0.9) but light-tailed, no far outliers
    rng = np.random.default_rng(8)
    x, y = rng.uniform(0, 1, 28) ** 2, rng.uniform(0, 1, 28) ** 2 + 0.2
    groups = Groups(("plot A", "plot B"), x, y)
    checks = diagnose(groups)
    # this scenario only means something if the sample is clearly skewed and has no extremes
    from engine.diagnostics import is_clearly_skewed, is_heavy_tailed
    assert any(is_clearly_skewed(s) for s in checks.shapes)
    assert not any(is_heavy_tailed(s) or s.far_outliers for s in checks.shapes)
    suggestion = advice.recommend(checks, groups)
    assert suggestion.key == "permutation_mean"


def test_ordinal_ratings_get_mann_whitney_with_a_note_on_ties(rng):
    x, y = rng.integers(1, 6, 40), rng.integers(2, 6, 45)
    suggestion = _suggest(x, y, ordinal=True)
    assert suggestion.key == "mann_whitney"
    assert any("ties" in r or "tied" in r for r in suggestion.reasons)


def test_known_sds_give_the_z_test(rng):
    suggestion = _suggest(rng.normal(10, 2, 40), rng.normal(11, 2, 40), known_sd=(2.0, 2.0))
    assert suggestion.key == "z"
    assert "z" not in {c.key for c in suggestion.considered}
    assert not any("far from the known value" in c for c in suggestion.cautions)


def test_known_sds_far_from_the_data_are_questioned(rng):
    suggestion = _suggest(rng.normal(10, 2, 40), rng.normal(11, 2, 40), known_sd=(2.0, 9.0))
    assert any("far from the known value" in c for c in suggestion.cautions)


def test_large_skewed_groups_get_welch_with_a_central_limit_reason(rng):
    suggestion = _suggest(rng.lognormal(0, 1, 400), rng.lognormal(0.2, 1, 500))
    assert suggestion.key == "welch_t"
    assert any("central limit theorem" in r and "common practice" in r for r in suggestion.reasons)


def test_the_shapiro_p_value_alone_does_not_move_the_choice():
    # two tight clusters: Shapiro-Wilk rejects a bell shape, but nothing is lopsided or heavy-tailed
    rng = np.random.default_rng(5)
    x = np.r_[rng.normal(0, 0.3, 14), rng.normal(4, 0.3, 14)]
    y = np.r_[rng.normal(1, 0.3, 14), rng.normal(5, 0.3, 14)]
    groups = Groups(("plot A", "plot B"), x, y)
    checks = diagnose(groups)
    assert all(s.shapiro_p < 0.05 for s in checks.shapes)  # reference: scipy.stats.shapiro inside
    suggestion = advice.recommend(checks, groups)
    assert suggestion.key == "welch_t"
    assert any("Shapiro-Wilk" in c and "did not change" in c for c in suggestion.cautions)


def test_resampling_is_never_suggested_where_it_is_not_run():
    # one small skewed group beside a huge one: resampling is left out above the analysis limit
    rng = np.random.default_rng(6)
    x, y = rng.gamma(1.5, size=20) ** 2, rng.normal(size=advice.RESAMPLING_MAX_VALUES)
    suggestion = _suggest(x, y)
    assert suggestion.key not in ("permutation_mean", "bootstrap_mean", "permutation_median",
                                  "bootstrap_median")


@pytest.mark.parametrize("flags", [{}, {"equal_spread_known": True}, {"ordinal": True},
                                   {"known_sd": (1.0, 1.0)}])
def test_every_suggestion_has_reasons_alternatives_cautions_and_assumptions(rng, flags):
    suggestion = _suggest(rng.normal(0, 1, 20), rng.normal(0.5, 1, 22), **flags)
    assert suggestion.reasons and all(r.strip() for r in suggestion.reasons)
    # every other applicable procedure is weighed, each with a reason
    applicable = {r.key for r in RECORDS if r.serves("independent", "differ")} - ({"z"} if "known_sd" not in flags else set())
    assert {c.key for c in suggestion.considered} == applicable - {suggestion.key}
    assert all(c.why_not.strip() and c.name == PROCEDURE_NAMES[c.key] for c in suggestion.considered)
    # one sentence on what choosing it assumes, for every procedure key
    assert set(suggestion.assumptions) == set(PROCEDURE_NAMES)
    assert all(s.endswith(".") and s.count(". ") == 0 for s in suggestion.assumptions.values())
    # the suggestion holds only the cautions these data call for; those for every comparison
    # are added by the report, in one place (tests/engine/test_report_cautions.py)
    from engine.report.cautions import CAUTIONS_ALWAYS

    assert not set(CAUTIONS_ALWAYS) & set(suggestion.cautions)
    text = " ".join(CAUTIONS_ALWAYS)
    for idea in ("little power", "not the size", "does not prove", "Regulated work"):
        assert idea in text


def test_thresholds_are_named_constants_marked_as_common_practice():
    import inspect

    source = inspect.getsource(advice)
    assert advice.SMALL_GROUP_N == 30
    assert "common practice" in source.split("SMALL_GROUP_N = 30")[0].rsplit("\n\n", 1)[-1]


def test_normal_groups_of_five_rarely_get_a_rank_suggestion():
    # A seeded simulation of the pre-test's false alarms: normal data, 5 values per group. With
    # a value beyond the 3 IQR fence switching on its own, about 26% of such data sets were sent
    # to Mann-Whitney; through the surprise test only heavy tails or a value a normal sample of
    # 5 rarely gives do it (the larger run's figures are in tests/benchmarks/sim_advice.py).
    rng = np.random.default_rng(20261203)
    keys = [_suggest(rng.normal(10, 1, 5), rng.normal(10, 1, 5)).key for _ in range(300)]
    assert keys.count("mann_whitney") / len(keys) < 0.10
    assert "bootstrap_mean" not in keys


def test_the_fence_alone_does_not_switch_and_the_rule_is_stated():
    a = [10.35, 10.82, 10.33, 8.70, 10.91]
    b = [10.45, 9.46, 10.58, 10.36, 10.29]
    suggestion = _suggest(a, b)
    assert suggestion.key != "mann_whitney"
    text = " ".join(suggestion.reasons)
    assert "far from the rest" not in text
    assert advice.FENCE_RULE in text and "Rochon" in text


def test_small_doubtful_groups_with_unequal_spreads_get_welch_not_resampling(rng):
    # scenario H of the review: the small group (8) four times as spread as the large one (25),
    # here with a lopsided shape; permutation tests and bootstrap intervals are not suggested
    seen = set()
    for _ in range(60):
        x = rng.lognormal(0, 1.2, 8)
        y = rng.lognormal(0, 0.4, 25)
        suggestion = _suggest(x, y)
        seen.add(suggestion.key)
        if suggestion.key == "welch_t" and any("Romano" in r for r in suggestion.reasons):
            considered = {c.key: c.why_not for c in suggestion.considered}
            assert "interchangeable" in considered["permutation_mean"]
            assert "Hesterberg" in considered["bootstrap_mean"]
    assert not seen & {"permutation_mean", "permutation_median", "bootstrap_mean", "bootstrap_median"}


def test_permutation_tests_are_described_as_tests_of_interchangeable_groups():
    # Romano (1990), JASA 85:686: a permutation test of means or medians tests that the groups
    # have one distribution, not that the means or medians are equal
    for key in ("permutation_mean", "permutation_median"):
        assert "interchangeable" in advice.ASSUMPTIONS[key]
        assert "Romano 1990" in advice.ASSUMPTIONS[key]


def test_bootstrap_is_never_suggested_for_small_groups():
    rng = np.random.default_rng(77)
    for _ in range(60):
        n1, n2 = rng.integers(5, 30, 2)
        x = rng.lognormal(0, rng.uniform(0.3, 1.5), n1)
        y = rng.lognormal(0.3, rng.uniform(0.3, 1.5), n2)
        assert _suggest(x, y).key != "bootstrap_mean"


def test_one_outlier_judges_the_spreads_by_their_quartiles():
    # the outlier inflates one SD (SD ratio far above 2) while the middle halves spread alike:
    # the rank procedure stays the suggestion
    rng = np.random.default_rng(2026)
    x = np.r_[rng.lognormal(0, 1, 14), 80.0]
    y = rng.lognormal(0.5, 1, 15)
    groups = Groups(("plot A", "plot B"), x, y)
    checks = diagnose(groups)
    assert checks.spread.sd_ratio > 2 and checks.spread.iqr_ratio < 2
    # a rank procedure, not Welch; the inflated SD ratio errs toward Brunner-Munzel, which
    # holds with equal spreads too
    assert advice.recommend(checks, groups).key in ("mann_whitney", "brunner_munzel")


def test_few_whole_numbers_prompt_the_ratings_statement(rng):
    # a 1-7 rating file read as plain numbers: the suggestion asks whether they are ratings
    x, y = rng.integers(1, 8, 60), rng.integers(2, 8, 55)
    suggestion = _suggest(x, y)
    assert suggestion.looks_like_ratings
    assert any("ordinal ratings" in r and "whole numbers from 1 to 7" in r for r in suggestion.reasons)
    # once stated, the prompt is gone and the rank procedure is suggested
    stated = _suggest(x, y, ordinal=True)
    assert stated.key == "mann_whitney" and not any("whole numbers" in r for r in stated.reasons)
    # measurements, a wide range of counts, or a yes/no outcome are not asked about
    assert not _suggest(rng.normal(10, 2, 40), rng.normal(11, 2, 40)).looks_like_ratings
    assert not _suggest(rng.integers(0, 100, 40), rng.integers(0, 100, 40)).looks_like_ratings
    assert not _suggest(rng.integers(0, 2, 40), rng.integers(0, 2, 40)).looks_like_ratings
    assert advice.looks_like_ratings(Groups(("a", "b"), np.array([0.0, 5, 10]), np.array([3.0, 4])))


def test_shape_based_effect_sizes_carry_a_caution_when_groups_are_lopsided():
    # scenario LN of the review: lognormal (sdlog 1), 15 per group; Algina, Keselman and
    # Penfield (2005), Psychological Methods 10:317, on d's interval under non-normality
    rng = np.random.default_rng(15)
    lopsided = _suggest(rng.lognormal(0, 1, 15), rng.lognormal(0.5, 1, 15))
    assert any("Glass's delta" in c and "Algina" in c for c in lopsided.cautions)
    bell = _suggest(rng.normal(10, 2, 40), rng.normal(11, 2, 40))
    assert not any("Algina" in c for c in bell.cautions)
