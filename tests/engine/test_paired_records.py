"""The paired procedures as the analysis runs them (a paired spec through ``analyze``), against
scipy: ``ttest_rel``, ``wilcoxon`` and ``permutation_test`` with sign flips."""

import numpy as np
import pytest
from scipy import stats

from engine import diagnostics
from engine.analysis import analyze
from engine.errors import Cancelled, DataProblem
from engine.paired_effects import paired_effect_sizes
from engine.procedures import registry
from engine.procedures.pair_differences import signed_rank_pairs
from engine.procedures.paired import (common_difference, paired_bootstrap_mean, paired_differences,
                                     paired_t)
from engine.question import Margin, Question
from engine.results import Groups
from engine.spec import AnalysisSpec

PAIRED = ("paired_t", "signed_rank", "sign_flip_mean", "paired_bootstrap_mean")


def _pairs(n=14, seed=5, shift=0.6):
    rng = np.random.default_rng(seed)
    units = rng.normal(50.0, 6.0, n)
    return units + shift + rng.normal(0, 1.0, n), units + rng.normal(0, 1.0, n)


def _tied_pairs():
    """Readings to one decimal: tied differences and three pairs with none."""
    before = np.array([12.1, 11.4, 13.0, 12.4, 11.9, 12.2, 12.8, 11.0, 12.5, 12.0, 11.7, 12.6])
    after = np.array([12.4, 11.4, 13.5, 12.4, 12.4, 12.0, 13.1, 11.3, 12.5, 12.9, 11.5, 13.1])
    return after, before


def _paired(x, y, labels=("after", "before"), **spec):
    spec = dict(dict(seed=3, resamples=2000), **spec)
    return analyze(Groups(labels, x, y), AnalysisSpec(design="paired", **spec))


@pytest.mark.parametrize("alternative", ["two-sided", "less", "greater"])
def test_paired_t_through_analyze_is_scipys_ttest_rel(alternative):
    x, y = _pairs()
    analysis = _paired(x, y, question=Question.from_alternative(alternative, level=0.9))
    result = analysis.procedures["paired_t"]
    # reference: scipy.stats.ttest_rel(x, y, alternative=...) and its confidence_interval(0.9)
    reference = stats.ttest_rel(x, y, alternative=alternative)
    ci = reference.confidence_interval(0.9)
    assert result.statistic == pytest.approx(reference.statistic, rel=1e-12)
    assert result.p_value == pytest.approx(reference.pvalue, rel=1e-10)
    assert result.df == reference.df == x.size - 1
    for ours, theirs in ((result.interval.low, ci.low), (result.interval.high, ci.high)):
        if np.isfinite(theirs):
            assert ours == pytest.approx(theirs, rel=1e-10)
        else:
            assert ours is None or not np.isfinite(ours)


def _positive_rank_sum(d, axis=-1):
    """T+: the sum of the mid-ranks of |d| over the positive differences (zeros, if any are
    left, take their ranks and never count: Pratt 1959, JASA 54:655)."""
    ranks = stats.rankdata(np.abs(d), axis=axis)
    return np.sum(np.where(d > 0, ranks, 0.0), axis=axis)


def _exact_by_sign_flips(d, zero_rule, alternative):
    """Reference: scipy.stats.permutation_test on one sample with permutation_type="samples"
    (every sign pattern, n_resamples=inf), statistic T+; a zero flips to a zero. Wilcoxon's
    rule drops the zeros first."""
    d = np.asarray(d, float)
    if zero_rule == "drop":
        d = d[d != 0]
    return stats.permutation_test((d,), _positive_rank_sum, permutation_type="samples",
                                  n_resamples=np.inf, alternative=alternative,
                                  vectorized=True).pvalue


@pytest.mark.parametrize("zero_rule", ["drop", "pratt"])
@pytest.mark.parametrize("alternative", ["two-sided", "less", "greater"])
def test_exact_signed_rank_with_ties_and_zeros_through_analyze(zero_rule, alternative):
    x, y = _tied_pairs()
    d = x - y
    assert (d == 0).sum() == 3 and np.unique(np.abs(d[d != 0])).size < (d != 0).sum()
    analysis = _paired(x, y, zero_rule=zero_rule, rank_method="exact",
                       question=Question.from_alternative(alternative))
    result = analysis.procedures["signed_rank"]
    assert result.details["exact"] and result.details["zero_rule"] == zero_rule
    # both rules are offered: the spec's is the result's p-value, the other is in the details
    for rule in ("drop", "pratt"):
        expected = _exact_by_sign_flips(d, rule, alternative)
        assert result.details[f"p_value_{rule}"] == pytest.approx(expected, rel=1e-9)
    assert result.p_value == result.details[f"p_value_{zero_rule}"]
    assert "3 pairs showed no difference" in result.warnings[0]


@pytest.mark.parametrize("zero_rule, zero_method", [("drop", "wilcox"), ("pratt", "pratt")])
@pytest.mark.parametrize("alternative", ["two-sided", "less", "greater"])
def test_normal_signed_rank_through_analyze_is_scipys_wilcoxon(zero_rule, zero_method, alternative):
    rng = np.random.default_rng(17)
    before = np.round(rng.normal(20, 3, 60), 1)
    after = np.round(before + rng.normal(0.3, 1.0, 60), 1)
    assert ((after - before) == 0).any()
    analysis = _paired(after, before, zero_rule=zero_rule, rank_method="normal",
                       question=Question.from_alternative(alternative))
    result = analysis.procedures["signed_rank"]
    # reference: scipy.stats.wilcoxon(x, y, zero_method=..., correction=True, method="approx")
    for rule, method in (("drop", "wilcox"), ("pratt", "pratt")):
        reference = stats.wilcoxon(after, before, zero_method=method, correction=True,
                                   alternative=alternative, method="approx")
        assert result.details[f"p_value_{rule}"] == pytest.approx(reference.pvalue, rel=1e-9)
    assert not result.details["exact"]


@pytest.mark.parametrize("correction", [True, False])
def test_the_continuity_correction_is_scipys(correction):
    rng = np.random.default_rng(23)
    x, y = np.round(rng.normal(5, 1, 40), 1), np.round(rng.normal(5.2, 1, 40), 1)
    result = signed_rank_pairs(x, y, method="normal", correction=correction)
    # reference: scipy.stats.wilcoxon(x, y, correction=..., method="approx"), zeros dropped
    reference = stats.wilcoxon(x, y, correction=correction, method="approx")
    assert result.p_value == pytest.approx(reference.pvalue, rel=1e-9)


def test_exact_signed_rank_without_ties_is_scipys_wilcoxon():
    x, y = _pairs(n=16)
    analysis = _paired(x, y, rank_method="exact")
    # reference: scipy.stats.wilcoxon(x, y, method="exact") (no ties, no zeros)
    reference = stats.wilcoxon(x, y, method="exact")
    assert analysis.procedures["signed_rank"].p_value == pytest.approx(reference.pvalue, rel=1e-10)


def test_sign_flip_counts_every_pattern_through_analyze():
    x, y = _pairs(n=10, shift=0.8)
    analysis = _paired(x, y, resamples=1024)  # 2^10 patterns: every one is counted
    result = analysis.procedures["sign_flip_mean"]
    # reference: scipy.stats.permutation_test((d,), mean, permutation_type="samples", n_resamples=inf)
    reference = stats.permutation_test((x - y,), np.mean, permutation_type="samples",
                                       n_resamples=np.inf)
    assert result.details["exact"]
    assert result.p_value == pytest.approx(reference.pvalue, rel=1e-12)


def test_the_bootstrap_interval_is_shown_but_does_not_vote_and_the_tests_do():
    analysis = _paired(*_pairs())
    rows = {row.key: row for row in analysis.robustness.rows}
    assert set(rows) == set(PAIRED)
    assert not rows["paired_bootstrap_mean"].votes
    assert rows["paired_bootstrap_mean"].not_voting_because == registry.INTERVAL_ONLY_NOTE
    assert all(rows[key].votes for key in ("paired_t", "signed_rank", "sign_flip_mean"))


def test_a_paired_analysis_runs_only_paired_procedures_with_paired_effect_sizes():
    x, y = _pairs()
    analysis = _paired(x, y)
    assert tuple(analysis.procedures) == PAIRED
    sizes, _ = paired_effect_sizes(x, y)
    assert set(analysis.effect_sizes) == {"paired_d_z", "paired_d_av"}
    d = x - y
    # reference: d_z = mean(d) / sd(d) by hand with numpy (Cohen 1988, section 2.3)
    assert analysis.effect_sizes["paired_d_z"].value == pytest.approx(d.mean() / d.std(ddof=1), rel=1e-12)
    assert analysis.effect_sizes["paired_d_av"].value == pytest.approx(sizes["paired_d_av"].value)
    # the two groups' own checks stay as they are for independent groups; the pairs have theirs
    usual = diagnostics.diagnose(analysis.groups)
    assert [f.text for f in analysis.diagnostics.findings] == [f.text for f in usual.findings]
    assert analysis.paired.n_pairs == x.size
    np.testing.assert_array_equal(analysis.paired.differences, d)
    assert analysis.design == "paired" and analysis.recommendation.key in analysis.procedures


def test_the_same_data_analysed_as_independent_groups_give_other_numbers():
    x, y = _pairs()
    paired = _paired(x, y)
    independent = analyze(Groups(("after", "before"), x, y), AnalysisSpec(seed=3, resamples=2000))
    assert independent.paired is None and "paired_t" not in independent.procedures
    # reference: scipy.stats.ttest_rel and ttest_ind(equal_var=False) differ on these data
    assert paired.procedures["paired_t"].p_value == pytest.approx(stats.ttest_rel(x, y).pvalue)
    assert independent.procedures["welch_t"].p_value == pytest.approx(
        stats.ttest_ind(x, y, equal_var=False).pvalue)
    assert paired.procedures["paired_t"].p_value < independent.procedures["welch_t"].p_value / 5


def test_groups_of_different_sizes_cannot_be_pairs():
    x, y = _pairs()
    with pytest.raises(DataProblem) as caught:
        _paired(x, y[:-1])
    message = caught.value.message
    assert "\n" not in message and "'after' has 14 values and 'before' has 13" in message
    with pytest.raises(DataProblem, match="at least 2 pairs"):
        _paired(x[:1], y[:1])


def test_pairs_that_never_differ_are_said_in_one_line():
    x = np.array([1.0, 2.0, 3.0, 4.0])
    with pytest.raises(DataProblem, match="No pair shows any difference"):
        _paired(x, x.copy())


def _rods_one_amount_apart(n=10, amount=0.02):
    """Diameters to three decimals, every second reading ``amount`` below the first: as written,
    one amount apart; as floats, differences that disagree in their last binary places."""
    first = np.round(np.random.default_rng(0).uniform(11.9, 12.1, n), 3)
    return first, np.round(first - amount, 3)


@pytest.mark.parametrize("shift", [0.5, -0.25])
def test_pairs_one_amount_apart_give_the_rank_and_sign_results_and_say_why_no_t(shift):
    x = np.array([10.5, 11.5, 12.0, 9.5, 10.25, 13.0, 8.75])
    analysis = _paired(x, x - shift)
    n = x.size
    assert "paired_t" not in analysis.procedures
    assert analysis.recommendation.key == "signed_rank"
    assert any("no spread" in reason for reason in analysis.recommendation.reasons)
    assert analysis.paired.common_difference == shift
    assert "same_difference" in {finding.key for finding in analysis.paired.findings}
    # reference: every |difference| tied, so T+ is (n + 1)/2 times the number of positive signs
    # and the signed-rank and sign-flip tests are the sign test: scipy.stats.binomtest
    sign_test = stats.binomtest(n if shift > 0 else 0, n, 0.5).pvalue
    for key in ("signed_rank", "sign_flip_mean"):
        result = analysis.procedures[key]
        assert result.estimate == shift
        assert result.p_value == pytest.approx(sign_test, rel=1e-12)
    rank_interval = analysis.procedures["signed_rank"].interval
    assert rank_interval.low == rank_interval.high == shift  # every Walsh average is the amount
    assert analysis.effect_sizes == {}
    left_out = [note for note in analysis.notes if note.key == "effect_size_left_out"]
    assert len(left_out) == 1 and "no spread" in left_out[0].text


def test_one_amount_written_in_decimals_is_one_amount_not_a_t_in_the_trillions():
    first, second = _rods_one_amount_apart()
    assert np.ptp(first - second) > 0  # the float differences do disagree in their last places
    assert common_difference(first, second, first - second) == pytest.approx(0.02, abs=1e-15)
    assert np.ptp(paired_differences(first, second)) == 0
    with pytest.raises(DataProblem, match="no spread"):
        paired_t(first, second)
    analysis = _paired(first, second)
    assert "paired_t" not in analysis.procedures
    interval = analysis.procedures["paired_bootstrap_mean"].interval
    assert interval.low == interval.high == analysis.paired.common_difference


@pytest.mark.parametrize("scale", [1.0, 1e6, 1e-9])
def test_differences_that_do_vary_however_little_are_not_one_amount(scale):
    first, second = _rods_one_amount_apart()
    first, second = first * scale, second * scale
    # one pair a thousandth of a millimetre apart from the rest: a real spread, far above rounding
    second[3] += 0.001 * scale
    assert common_difference(first, second, first - second) is None
    analysis = _paired(first, second)
    assert "paired_t" in analysis.procedures and analysis.paired.common_difference is None


def test_a_margin_question_on_pairs_one_amount_apart_is_answered_by_the_rank_interval():
    first, second = _rods_one_amount_apart()
    analysis = _paired(first, second, question=Question("equivalent", 0.95, Margin.within(0.05)))
    assert "paired_equivalence" not in analysis.procedures
    assert analysis.recommendation.key == "paired_equivalence_ranks"
    result = analysis.procedures["paired_equivalence_ranks"]
    assert result.interval.low == result.interval.high == pytest.approx(0.02, abs=1e-15)


def test_the_resampling_procedures_report_progress_and_stop_when_asked():
    x, y = _pairs(n=40)
    said = []
    analysis = analyze(Groups(("a", "b"), x, y), AnalysisSpec(design="paired", seed=1, resamples=5000),
                       progress=lambda fraction, what: said.append(what))
    assert analysis.procedures
    assert "bootstrap of the mean pair difference" in said
    assert "sign-flip permutation test" in said

    def stop_in_the_bootstrap():
        return bool(said) and said[-1] == "bootstrap of the mean pair difference"
    said.clear()
    with pytest.raises(Cancelled):
        analyze(Groups(("a", "b"), x, y), AnalysisSpec(design="paired", seed=1, resamples=5000),
                progress=lambda fraction, what: said.append(what), cancelled=stop_in_the_bootstrap)


def test_the_paired_bootstrap_takes_progress_and_cancelling():
    x, y = _pairs(n=30)
    fractions = []
    paired_bootstrap_mean(x, y, n_resamples=3000, rng=np.random.default_rng(1),
                          progress=lambda fraction, what: fractions.append(fraction))
    assert fractions and fractions[-1] == 1.0 and fractions == sorted(fractions)
    with pytest.raises(Cancelled):
        paired_bootstrap_mean(x, y, n_resamples=3000, rng=np.random.default_rng(1),
                              cancelled=lambda: True)


def test_resampling_is_left_out_above_its_size_limit():
    n = registry.RESAMPLING_MAX_VALUES // 2 + 1  # values in all: two per pair
    rng = np.random.default_rng(8)
    y = rng.normal(0, 1, n)
    x = y + rng.normal(0.01, 1, n)
    analysis = _paired(x, y)
    assert tuple(analysis.procedures) == ("paired_t", "signed_rank")
    assert any(note.key == "resampling_left_out" for note in analysis.notes)
    considered = {c.key: c.why_not for c in analysis.recommendation.considered}
    assert "Resampling is not run" in considered["sign_flip_mean"]
    # reference: scipy.stats.ttest_rel at this size too
    assert analysis.procedures["paired_t"].p_value == pytest.approx(stats.ttest_rel(x, y).pvalue,
                                                                    rel=1e-9)
