"""The whole analysis: every procedure present, progress, cancelling, option checks, robustness."""

import numpy as np
import pytest
from scipy import stats

from engine.analysis import PROCEDURE_NAMES, analyze
from engine.procedures import registry
from engine.spec import AnalysisSpec, Statements
from engine.question import Question
from engine.errors import Cancelled, OptionProblem
from engine.results import Groups


@pytest.fixture
def groups():
    rng = np.random.default_rng(7)
    return Groups(("treated", "control"), rng.normal(12.0, 2.0, 40), rng.normal(10.5, 2.5, 35))


def test_every_procedure_and_effect_size_is_there(groups):
    analysis = analyze(groups, AnalysisSpec(resamples=500, seed=1))
    expected = {r.key for r in registry.RECORDS if r.serves("independent", "differ")} - {"z"}
    assert set(analysis.procedures) == expected
    assert set(analysis.effect_sizes) == {"cohen_d", "hedges_g", "glass_delta", "rank_biserial", "common_language"}
    assert analysis.recommendation.key in analysis.procedures
    assert analysis.chosen is analysis.procedures[analysis.recommendation.key]


def test_numbers_are_those_of_the_reference_library(groups):
    analysis = analyze(groups, AnalysisSpec(question=Question.from_alternative("greater"), resamples=500, seed=1))
    # reference: scipy.stats.ttest_ind(x, y, equal_var=False, alternative="greater")
    expected = stats.ttest_ind(groups.x, groups.y, equal_var=False, alternative="greater")
    welch = analysis.procedures["welch_t"]
    assert welch.p_value == pytest.approx(expected.pvalue, rel=1e-10)
    assert welch.statistic == pytest.approx(expected.statistic, rel=1e-10)
    assert welch.interval.high is None  # one-sided: the upper end is open
    # reference: numpy mean and standard deviation with ddof=1
    assert analysis.summaries[0].mean == pytest.approx(np.mean(groups.x), rel=1e-14)
    assert analysis.summaries[1].sd == pytest.approx(np.std(groups.y, ddof=1), rel=1e-12)


def test_known_sds_add_the_z_procedure(groups):
    analysis = analyze(groups, AnalysisSpec(resamples=200, seed=1, statements=Statements(known_sd=(2.0, 2.5))))
    assert "z" in analysis.procedures
    # reference: the z statistic (mean1 - mean2) / sqrt(s1^2/n1 + s2^2/n2) with the given sds
    z = (groups.x.mean() - groups.y.mean()) / np.sqrt(4.0 / 40 + 6.25 / 35)
    assert analysis.procedures["z"].statistic == pytest.approx(z, rel=1e-12)


def test_progress_rises_to_one_and_cancel_stops(groups):
    seen = []
    analyze(groups, AnalysisSpec(resamples=300, seed=2), progress=lambda f, what: seen.append(f))
    assert seen[-1] == 1.0
    assert all(b >= a - 1e-12 for a, b in zip(seen, seen[1:]))
    with pytest.raises(Cancelled):
        analyze(groups, AnalysisSpec(resamples=300, seed=2), cancelled=lambda: True)


def test_the_same_seed_gives_the_same_answer(groups):
    first = analyze(groups, AnalysisSpec(resamples=300, seed=5))
    again = analyze(groups, AnalysisSpec(resamples=300, seed=5))
    assert first.procedures["permutation_mean"].p_value == again.procedures["permutation_mean"].p_value
    assert first.procedures["bootstrap_mean"].interval == again.procedures["bootstrap_mean"].interval


def test_both_permutation_tests_use_one_set_of_relabellings(groups):
    # the analysis draws the relabellings once, for the test of means (the first to draw from
    # the seed), and the test of medians uses them: its result is the one permutation_test
    # gives on its own from that seed (direct comparison)
    from engine.procedures.resampling import permutation_test

    analysis = analyze(groups, AnalysisSpec(resamples=400, seed=9))
    alone = permutation_test(groups.x, groups.y, statistic="median", n_resamples=400,
                             rng=np.random.default_rng(9))
    np.testing.assert_array_equal(analysis.procedures["permutation_median"].distribution,
                                  alone.distribution)


def test_robustness_rows_follow_the_chosen_level(groups):
    analysis = analyze(groups, AnalysisSpec(question=Question(level=0.99), resamples=300, seed=3))
    for row in analysis.robustness.rows:
        result = analysis.procedures[row.key]
        if result.p_value is not None:
            assert row.finds_difference == (result.p_value < 0.01)
    verdicts = {row.finds_difference for row in analysis.robustness.rows if row.votes}
    assert analysis.robustness.agree == (len(verdicts) == 1)


@pytest.mark.parametrize("make, message", [
    (lambda: Question.from_alternative("bigger"), "direction"),
    (lambda: Question(level=1.2), "confidence level"),
    (lambda: AnalysisSpec(resamples=5), "from 100"),
    (lambda: Statements(known_sd=(1.0, -2.0)), "positive"),
])
def test_bad_options_are_refused_with_a_sentence(make, message):
    with pytest.raises(OptionProblem, match=message):
        make()


def test_an_interval_without_a_test_is_shown_but_does_not_vote():
    # the review's example: Welch p = 0.15 and the exact permutation p = 1/3, while the bootstrap
    # interval excludes 0 (4 values have only a handful of distinct resamples)
    groups = Groups(("A", "B"), np.array([1.0, 2.0]), np.array([3.0, 4.5]))
    analysis = analyze(groups, AnalysisSpec(resamples=2000, seed=1))
    # reference: scipy.stats.ttest_ind(equal_var=False)
    assert analysis.procedures["welch_t"].p_value == pytest.approx(
        stats.ttest_ind([1.0, 2.0], [3.0, 4.5], equal_var=False).pvalue, rel=1e-10)
    rows = {row.key: row for row in analysis.robustness.rows}
    assert rows["bootstrap_mean"].finds_difference  # the interval itself is still reported
    assert not rows["bootstrap_mean"].votes and "no test" in rows["bootstrap_mean"].not_voting_because
    assert all(row.votes for row in analysis.robustness.rows if row.p_value is not None)
    assert analysis.robustness.agree


def test_permutation_tests_do_not_vote_when_the_spreads_differ():
    # scenario H: SDs 4:1, sizes 8 and 25; the permutation tests test interchangeable groups
    rng = np.random.default_rng(12)
    groups = Groups(("A", "B"), rng.normal(0, 4, 8), rng.normal(0, 1, 25))
    analysis = analyze(groups, AnalysisSpec(resamples=500, seed=2))
    rows = {row.key: row for row in analysis.robustness.rows}
    assert not rows["permutation_mean"].votes and not rows["permutation_median"].votes
    assert rows["welch_t"].votes and rows["mann_whitney"].votes
    verdicts = {row.finds_difference for row in analysis.robustness.voting}
    assert analysis.robustness.agree == (len(verdicts) <= 1)


def test_separated_triplicates_give_the_whole_analysis():
    # invented triplicates far apart: every procedure and every effect size is reported
    groups = Groups(("low", "high"), [10.1, 10.3, 9.9], [20.2, 19.8, 20.1])
    analysis = analyze(groups, AnalysisSpec(resamples=200, seed=1))
    assert {"welch_t", "pooled_t", "mann_whitney"} <= set(analysis.procedures)
    assert set(analysis.effect_sizes) == {"cohen_d", "hedges_g", "glass_delta", "rank_biserial",
                                          "common_language"}
    assert not [note for note in analysis.notes if note.key == "part_not_computed"]


def test_one_failing_part_is_reported_while_the_rest_stands(groups, monkeypatch):
    from engine.procedures import t

    def broken(*args, **kwargs):
        raise ValueError("a solver gave up")

    monkeypatch.setattr(t, "pooled_t", broken)
    analysis = analyze(groups, AnalysisSpec(resamples=200, seed=1))
    assert "pooled_t" not in analysis.procedures
    assert "welch_t" in analysis.procedures and "mann_whitney" in analysis.procedures
    assert analysis.effect_sizes
    [note] = [note for note in analysis.notes if note.key == "part_not_computed"]
    assert note.severity == "warning"
    assert note.text == "The pooled t-test could not be computed: a solver gave up."


def test_failing_effect_sizes_leave_the_procedures_standing(groups, monkeypatch):
    from engine import effects

    def broken(*args, **kwargs):
        raise OverflowError("math range error")

    monkeypatch.setattr(effects, "effect_sizes_with_reasons", broken)
    analysis = analyze(groups, AnalysisSpec(resamples=200, seed=1))
    assert not analysis.effect_sizes
    assert "welch_t" in analysis.procedures
    assert any(note.text == "The effect sizes could not be computed: math range error."
               for note in analysis.notes)


def test_an_effect_size_left_out_says_why():
    groups = Groups(("a", "b"), [1.0, 2.0, 3.0, 4.0], [5.0, 5.0, 5.0])
    analysis = analyze(groups, AnalysisSpec(resamples=200, seed=1))
    assert "glass_delta" not in analysis.effect_sizes
    assert any(note.key == "effect_size_left_out" and "Glass's delta" in note.text
               for note in analysis.notes)


def test_an_interval_whose_ends_could_not_be_computed_finds_nothing():
    # an interval-only row whose ends came out NaN (replicates that overflow near the float
    # limit) cannot be said to leave zero out: it reads "no clear difference", not "finds one"
    from engine.analysis import _robustness
    from engine.results import Interval, ProcedureResult

    nan = float("nan")
    result = ProcedureResult(key="bootstrap_mean", name=PROCEDURE_NAMES["bootstrap_mean"],
                             estimate=1.0, estimate_name="difference in means", statistic=None,
                             statistic_name=None, df=None, p_value=None,
                             interval=Interval(nan, nan, 0.95), alternative="two-sided",
                             method="percentile")
    shown = Interval(0.5, 1.5, 0.95)
    clear = ProcedureResult(**{**result.__dict__, "key": "bootstrap_median", "interval": shown})
    rows = _robustness({"bootstrap_mean": result, "bootstrap_median": clear}, 0.95).rows
    assert [row.finds_difference for row in rows] == [False, True]
