"""Equivalence and non-inferiority questions run through ``analyze``: the margin records against
statsmodels, the duality of the two one-sided tests with the (1 - 2 alpha) interval, percentage
and ratio margins, and which records run for which margin."""

import importlib

import numpy as np
import pytest
from statsmodels.stats.weightstats import CompareMeans, DescrStatsW, ttest_ind, ttost_ind, ttost_paired

from engine.analysis import analyze
from engine.errors import OptionProblem, TwofoldError
from engine.procedures import registry
from engine.question import Margin, Question
from engine.results import Groups
from engine.spec import AnalysisSpec, Statements


def _groups(seed, n1=16, n2=21, shift=0.3, sd2=1.8):
    rng = np.random.default_rng(seed)
    return Groups(("new", "old"), rng.normal(20.0 + shift, 1.2, n1), rng.normal(20.0, sd2, n2))


def _spec(question, **fields):
    return AnalysisSpec(question=question, resamples=400, seed=3, **fields)


EQUAL = Statements(equal_spread_known=True)


@pytest.mark.parametrize("seed", range(4))
@pytest.mark.parametrize("key, usevar, statements", [
    ("equivalence_welch", "unequal", Statements()), ("equivalence_pooled", "pooled", EQUAL)])
def test_equivalence_through_analyze_matches_statsmodels_ttost_ind(seed, key, usevar, statements):
    groups = _groups(seed)
    low, high = -1.1, 0.9
    analysis = analyze(groups, _spec(Question("equivalent", 0.95, Margin.within(low, high)),
                                     statements=statements))
    result = analysis.procedures[key]
    # reference: statsmodels.stats.weightstats.ttost_ind (Schuirmann's two one-sided tests)
    p, (t1, p1, df), (t2, p2, _) = ttost_ind(groups.x, groups.y, low, high, usevar=usevar)
    assert result.p_value == pytest.approx(p, rel=1e-10)
    assert result.details["p_lower"] == pytest.approx(p1, rel=1e-10)
    assert result.details["p_upper"] == pytest.approx(p2, rel=1e-10)
    assert result.details["t_lower"] == pytest.approx(t1, rel=1e-10)
    assert result.details["t_upper"] == pytest.approx(t2, rel=1e-10)
    assert result.df == pytest.approx(df, rel=1e-10)
    # reference: statsmodels CompareMeans.tconfint_diff at alpha 0.10 (the interval set against
    # the margin) and at 0.05 (the one that says whether the groups differ)
    compare = CompareMeans.from_data(groups.x, groups.y)
    for interval, alpha in ((result.interval, 0.10), (result.details["difference_interval"], 0.05)):
        low_ref, high_ref = compare.tconfint_diff(alpha=alpha, usevar=usevar)
        assert interval.level == pytest.approx(1 - alpha)
        assert (interval.low, interval.high) == pytest.approx((low_ref, high_ref), rel=1e-10)


@pytest.mark.parametrize("worse, alternative, sign", [("lower", "larger", -1), ("higher", "smaller", 1)])
@pytest.mark.parametrize("key, usevar, statements", [
    ("noninferiority_welch", "unequal", Statements()), ("noninferiority_pooled", "pooled", EQUAL)])
def test_non_inferiority_through_analyze_matches_statsmodels(worse, alternative, sign, key, usevar,
                                                             statements):
    groups = _groups(5, shift=-0.4)
    analysis = analyze(groups, _spec(Question("not_worse", 0.95, Margin.not_worse_by(1.2, worse)),
                                     statements=statements))
    result = analysis.procedures[key]
    # reference: statsmodels ttest_ind with the null difference at the margin's worse end
    statistic, p, df = ttest_ind(groups.x, groups.y, alternative=alternative, usevar=usevar,
                                 value=sign * 1.2)
    assert result.p_value == pytest.approx(p, rel=1e-10)
    assert result.statistic == pytest.approx(statistic, rel=1e-10)
    assert result.df == pytest.approx(df, rel=1e-10)
    low_ref, high_ref = CompareMeans.from_data(groups.x, groups.y).tconfint_diff(alpha=0.10, usevar=usevar)
    assert (result.interval.low, result.interval.high) == pytest.approx((low_ref, high_ref), rel=1e-10)
    # the duality: not worse at alpha exactly when the (1 - 2 alpha) interval clears the margin end
    assert (result.p_value < 0.05) is analysis.margin_answer(key).yes


@pytest.mark.parametrize("seed", range(12))
def test_each_test_agrees_with_its_1_minus_2_alpha_interval(seed):
    # the duality of the two one-sided tests (Schuirmann 1987, Journal of Pharmacokinetics and
    # Biopharmaceutics 15:657): p < alpha exactly when the (1 - 2 alpha) interval lies inside
    # the margin; for the rank version the Hodges-Lehmann interval inverts the same Mann-Whitney
    # tests (Hollander, Wolfe and Chicken 2014, section 4.3), continuous data have no ties
    groups = _groups(100 + seed, shift=0.15 * (seed % 6) - 0.4)
    questions = (Question("equivalent", 0.95, Margin.within(-0.9, 1.0)),
                 Question("equivalent", 0.9, Margin.within(0.6)),
                 Question("not_worse", 0.95, Margin.not_worse_by(0.5, "lower")),
                 Question("not_worse", 0.975, Margin.not_worse_by(0.7, "higher")))
    for question in questions:
        analysis = analyze(groups, _spec(question, statements=EQUAL))
        for key, result in analysis.procedures.items():
            if result.p_value is None:
                continue
            answer = analysis.margin_answer(key)
            assert answer.interval.level == pytest.approx(1 - 2 * question.alpha)
            assert (result.p_value < question.alpha) is answer.yes, (key, question)


def test_every_margin_result_names_its_record_and_says_how_the_margin_was_entered():
    groups = _groups(2)
    for question in (Question("equivalent", 0.95, Margin.within(4, unit="percent")),
                     Question("not_worse", 0.95, Margin.not_worse_by(0.8, "lower", "ratio"))):
        analysis = analyze(groups, _spec(question, statements=EQUAL))
        assert analysis.procedures
        note = question.margin.note(float(np.mean(groups.y)))
        for key, result in analysis.procedures.items():
            record = registry.record(key)
            module, name = record.computed_by.rsplit(".", 1)
            assert getattr(importlib.import_module(module), name) is record.compute
            assert result.name == record.name and result.estimate_name == record.estimate_name
            assert result.details["margin_note"] == note and note in result.method


def test_a_percentage_margin_is_converted_with_group_2s_mean_and_said_in_the_method():
    groups = _groups(8)
    mean = float(np.mean(groups.y))
    by_percent = analyze(groups, _spec(Question("equivalent", 0.95, Margin.within(-4, 5, "percent"))))
    in_units = analyze(groups, _spec(Question("equivalent", 0.95,
                                              Margin.within(-0.04 * mean, 0.05 * mean))))
    # the conversion: the ends are the percentages of |mean of group 2| (checked by hand, as
    # the question's own definition of a percentage margin)
    assert (by_percent.margin.low, by_percent.margin.high) == pytest.approx((-0.04 * mean, 0.05 * mean))
    for key in ("equivalence_welch", "equivalence_ranks"):
        ours, same = by_percent.procedures[key], in_units.procedures[key]
        assert ours.p_value == pytest.approx(same.p_value, rel=1e-9)
        assert "-4% to 5% of group 2's mean" in ours.method
        assert "in the measurement's units" in ours.method
    # reference: statsmodels ttost_ind with the converted margin
    p = ttost_ind(groups.x, groups.y, -0.04 * mean, 0.05 * mean, usevar="unequal")[0]
    assert by_percent.procedures["equivalence_welch"].p_value == pytest.approx(p, rel=1e-9)


def _positive(seed, n1=18, n2=23, ratio=1.04):
    rng = np.random.default_rng(seed)
    return Groups(("new", "old"), rng.lognormal(2.0 + np.log(ratio), 0.25, n1), rng.lognormal(2.0, 0.3, n2))


def test_a_ratio_margin_runs_only_the_log_records_and_matches_statsmodels():
    groups = _positive(4)
    analysis = analyze(groups, _spec(Question("equivalent", 0.95, Margin.within(0.8, 1.25, "ratio"))))
    assert list(analysis.procedures) == ["equivalence_log_welch"]
    assert analysis.recommendation.key == "equivalence_log_welch"
    result = analysis.procedures["equivalence_log_welch"]
    # reference: statsmodels ttost_ind(..., transform=np.log) takes logs of data and margin
    p, (_, p1, _), (_, p2, df) = ttost_ind(groups.x, groups.y, 0.8, 1.25, usevar="unequal",
                                           transform=np.log)
    assert result.p_value == pytest.approx(p, rel=1e-10)
    assert (result.details["p_lower"], result.details["p_upper"]) == pytest.approx((p1, p2), rel=1e-10)
    assert result.df == pytest.approx(df, rel=1e-10)
    # reference: the ratio interval is exp of statsmodels' log-scale Welch interval
    logs = CompareMeans.from_data(np.log(groups.x), np.log(groups.y))
    for interval, alpha in ((result.interval, 0.10), (result.details["difference_interval"], 0.05)):
        expected = np.exp(logs.tconfint_diff(alpha=alpha, usevar="unequal"))
        assert (interval.low, interval.high) == pytest.approx(tuple(expected), rel=1e-10)
    assert analysis.margin_answer("equivalence_log_welch").yes is bool(p < 0.05)
    assert "as a ratio" in result.method


@pytest.mark.parametrize("worse, alternative", [("lower", "larger"), ("higher", "smaller")])
def test_a_ratio_non_inferiority_margin_tests_the_log_of_its_worse_end(worse, alternative):
    groups = _positive(9, ratio=0.97)
    analysis = analyze(groups, _spec(Question("not_worse", 0.95, Margin.not_worse_by(0.9, worse, "ratio"))))
    assert list(analysis.procedures) == ["noninferiority_log_welch"]
    result = analysis.procedures["noninferiority_log_welch"]
    bound = 0.9 if worse == "lower" else 1 / 0.9
    # reference: statsmodels ttest_ind on the logarithms, the null at the log of the worse end
    _, p, _ = ttest_ind(np.log(groups.x), np.log(groups.y), alternative=alternative,
                        usevar="unequal", value=np.log(bound))
    assert result.p_value == pytest.approx(p, rel=1e-10)
    assert result.details["margin_low" if worse == "lower" else "margin_high"] == pytest.approx(bound)


def test_difference_margins_never_run_the_log_records_and_pooled_needs_equal_spreads():
    groups = _groups(1)
    for question in (Question("equivalent", 0.95, Margin.within(1.0)),
                     Question("not_worse", 0.95, Margin.not_worse_by(3, "higher", "percent"))):
        plain = set(analyze(groups, _spec(question)).procedures)
        stated = set(analyze(groups, _spec(question, statements=EQUAL)).procedures)
        stem = "equivalence" if question.kind == "equivalent" else "noninferiority"
        assert plain == {f"{stem}_welch", f"{stem}_ranks", f"{stem}_bootstrap_bca"}
        assert stated == plain | {f"{stem}_pooled"}


@pytest.mark.parametrize("bad, where", [([3.0, 0.0, 2.0, 4.0], "group 1 has 1 value"),
                                        ([3.0, -1.0, -2.0, 4.0], "group 1 has 2 values")])
def test_a_ratio_margin_on_values_that_are_not_positive_is_one_clear_line(bad, where):
    groups = Groups(("new", "old"), np.array(bad), np.array([1.0, 2.0, 3.0, 2.5]))
    with pytest.raises(TwofoldError) as caught:
        analyze(groups, _spec(Question("equivalent", 0.95, Margin.within(1.25, unit="ratio"))))
    message = caught.value.message
    assert "positive values" in message and where in message and "\n" not in message


def test_the_bootstrap_records_repeat_with_the_seed_and_give_no_p_value():
    groups = _groups(6, n1=25, n2=25)
    question = Question("equivalent", 0.95, Margin.within(1.0))
    first, again = (analyze(groups, _spec(question)).procedures["equivalence_bootstrap_bca"]
                    for _ in range(2))
    assert first.p_value is None and first.interval == again.interval
    assert first.details["difference_interval"].level == pytest.approx(0.95)
    assert first.interval.level == pytest.approx(0.90)
    # the wider interval holds the narrower one: both come from the same replicates
    wide = first.details["difference_interval"]
    assert wide.low <= first.interval.low and first.interval.high <= wide.high


def test_a_ratio_margin_for_paired_data_is_refused_in_one_line():
    groups = _positive(2, n1=12, n2=12)
    spec = _spec(Question("equivalent", 0.95, Margin.within(1.25, unit="ratio")), design="paired")
    with pytest.raises(OptionProblem) as caught:
        analyze(groups, spec)
    assert "ratio" in caught.value.message and "paired" in caught.value.message


def test_a_difference_question_runs_no_margin_record():
    analysis = analyze(_groups(3), AnalysisSpec(resamples=200, seed=1))
    assert not any(registry.record(key).counterpart for key in analysis.procedures)
    assert analysis.margin is None


def _matched(seed, n=18, shift=0.2):
    rng = np.random.default_rng(seed)
    base = rng.normal(30.0, 4.0, n)
    return Groups(("after", "before"), base + shift + rng.normal(0.0, 0.8, n), base)


@pytest.mark.parametrize("seed", range(3))
def test_paired_equivalence_through_analyze_matches_statsmodels_ttost_paired(seed):
    groups = _matched(seed)
    analysis = analyze(groups, _spec(Question("equivalent", 0.95, Margin.within(-0.5, 0.7)),
                                     design="paired"))
    assert set(analysis.procedures) == {"paired_equivalence", "paired_equivalence_ranks",
                                        "paired_equivalence_bootstrap"}
    assert analysis.recommendation.key == "paired_equivalence"
    result = analysis.procedures["paired_equivalence"]
    # reference: statsmodels.stats.weightstats.ttost_paired (Schuirmann's two one-sided tests)
    p, (t1, p1, df), (t2, p2, _) = ttost_paired(groups.x, groups.y, -0.5, 0.7)
    assert result.p_value == pytest.approx(p, rel=1e-10)
    assert (result.details["p_lower"], result.details["p_upper"]) == pytest.approx((p1, p2), rel=1e-10)
    assert (result.details["t_lower"], result.details["t_upper"]) == pytest.approx((t1, t2), rel=1e-10)
    assert result.df == df
    assert bool(p < 0.05) is analysis.margin_answer("paired_equivalence").yes


@pytest.mark.parametrize("worse, alternative, sign", [("lower", "larger", -1), ("higher", "smaller", 1)])
def test_paired_non_inferiority_through_analyze_matches_statsmodels(worse, alternative, sign):
    groups = _matched(4, shift=-0.1)
    mean = float(np.mean(groups.y))
    analysis = analyze(groups, _spec(Question("not_worse", 0.95, Margin.not_worse_by(2, worse, "percent")),
                                     design="paired"))
    result = analysis.procedures["paired_noninferiority"]
    # reference: statsmodels DescrStatsW(x - y).ttest_mean with the null at the margin's worse
    # end, 2% of group 2's mean
    _, p, _ = DescrStatsW(groups.x - groups.y).ttest_mean(value=sign * 0.02 * mean, alternative=alternative)
    assert result.p_value == pytest.approx(p, rel=1e-10)
    assert "2% of group 2's mean" in result.details["margin_note"]
