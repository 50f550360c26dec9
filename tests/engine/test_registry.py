"""The procedure registry: one record per procedure, and everything else reads it."""

import importlib

import numpy as np
import pytest
from scipy import stats

from engine import advice, report, side_by_side
from engine.analysis import PROCEDURE_NAMES, analyze
from engine.procedures import registry
from engine.question import Question
from engine.results import Groups
from engine.spec import AnalysisSpec, Statements

# the procedures of a difference between two independent groups
_DIFFERENCE_KEYS = [r.key for r in registry.RECORDS if r.serves("independent", "differ")]
# the procedures of a difference between matched pairs
PAIRED = [r.key for r in registry.RECORDS if r.serves("paired", "differ")]


@pytest.fixture(scope="module")
def groups():
    rng = np.random.default_rng(41)
    return Groups(("treated", "control"), rng.normal(10.5, 2.0, 24), rng.normal(9.0, 3.0, 21))


@pytest.mark.parametrize("design", ["independent", "paired"])
def test_every_number_leads_to_the_function_that_computed_it_in_one_hop(groups, design):
    # from a result's key to its record, and from the record to the function by its dotted name
    spec = AnalysisSpec(resamples=300, seed=4, statements=Statements(known_sd=(2.0, 3.0)),
                        design=design)
    if design == "paired":
        n = min(groups.n)
        groups = Groups(groups.labels, groups.x[:n], groups.y[:n])
    analysis = analyze(groups, spec)
    assert list(analysis.procedures) == (_DIFFERENCE_KEYS if design == "independent" else PAIRED)
    for key, result in analysis.procedures.items():
        record = registry.record(key)
        module, name = record.computed_by.rsplit(".", 1)
        function = getattr(importlib.import_module(module), name)
        assert function is record.compute
        assert result.name == record.name and result.estimate_name == record.estimate_name


def test_a_record_runs_its_function_as_the_analysis_does(groups):
    # reference: scipy.stats.ttest_ind with equal_var=False (Welch) on the same values
    spec = AnalysisSpec(seed=1)
    context = registry.Context(np.sort(groups.x), np.sort(groups.y), np.random.default_rng(1))
    result = registry.record("welch_t").run(groups.x, groups.y, spec, context)
    reference = stats.ttest_ind(groups.x, groups.y, equal_var=False)
    assert result.statistic == pytest.approx(reference.statistic, rel=1e-12)
    assert result.p_value == pytest.approx(reference.pvalue, rel=1e-10)


def test_the_z_test_applies_only_with_known_sds():
    plain = registry.applicable(AnalysisSpec())
    known = registry.applicable(AnalysisSpec(statements=Statements(known_sd=(1.0, 2.0))))
    assert "z" not in [r.key for r in plain]
    assert [r.key for r in known] == _DIFFERENCE_KEYS


def test_every_question_kind_is_served_by_every_procedure_for_independent_groups():
    for kind in ("differ", "lower", "higher"):
        spec = AnalysisSpec(question=Question(kind))
        assert {r.key for r in registry.applicable(spec)} == set(_DIFFERENCE_KEYS) - {"z"}
        assert [r.key for r in registry.applicable(spec, design="paired")] == PAIRED
    assert PAIRED == ["paired_t", "signed_rank", "sign_flip_mean", "paired_bootstrap_mean"]


def test_resampling_has_a_size_limit_and_the_rest_does_not():
    limit = registry.RESAMPLING_MAX_VALUES
    for record in registry.RECORDS:
        assert record.fits_size(limit)
        assert record.fits_size(limit + 1) == (record.family != "resampling")


def test_who_votes_and_why_not_comes_from_the_records():
    assert registry.record("bootstrap_mean").not_voting(spreads_differ=False) == registry.INTERVAL_ONLY_NOTE
    assert registry.record("permutation_median").not_voting(spreads_differ=False) is None
    assert registry.record("permutation_median").not_voting(spreads_differ=True) == registry.EXCHANGEABLE_NOTE
    assert registry.record("welch_t").not_voting(spreads_differ=True) is None


def test_advice_report_and_side_by_side_read_the_records():
    assert dict(advice.ASSUMPTIONS) == {r.key: r.assumption for r in registry.RECORDS}
    assert report.EFFECT_FOR["brunner_munzel"] == ()
    assert report.EFFECT_FOR["bootstrap_median"] == ("rank_biserial", "common_language")
    assert report.STATISTIC_LABEL["mann_whitney"] == "Mann-Whitney U"
    assert [k for k in report.RANK_KEYS if k in _DIFFERENCE_KEYS] == ["mann_whitney", "brunner_munzel"]
    assert [k for k in report.RANK_KEYS if k in PAIRED] == ["signed_rank"]
    assert report.U_KEYS == ("mann_whitney", "signed_rank")  # whole or half numbers
    assert report.MEDIAN_KEYS == ("permutation_median", "bootstrap_median")
    assert side_by_side.PROBABILITY_KEYS == report.PROBABILITY_KEYS == ("brunner_munzel",)


def test_a_record_that_never_votes_must_say_why():
    welch = registry.record("welch_t")
    fields = {name: getattr(welch, name) for name in welch.__dataclass_fields__}
    with pytest.raises(ValueError, match="says why"):
        registry.Procedure(**{**fields, "key": "made_up", "votes": False})
    with pytest.raises(ValueError, match="unknown family"):
        registry.Procedure(**{**fields, "key": "made_up", "family": "bayes"})


def test_a_replaced_function_is_the_one_run(groups, monkeypatch):
    # the record looks its function up when it runs, so a test (or a fix) can replace it
    from engine.procedures import t

    calls = []
    original = t.pooled_t
    monkeypatch.setattr(t, "pooled_t", lambda *a, **k: calls.append(1) or original(*a, **k))
    analyze(groups, AnalysisSpec(resamples=100, seed=1))
    assert calls == [1]
