"""Several outcomes on the same two groups: each equals its own single-outcome run, the adjusted
p-values are statsmodels', the verdicts follow the chosen adjustment, progress and cancelling."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from statsmodels.stats.multitest import multipletests

from engine import pipeline
from engine.errors import Cancelled, ColumnProblem, OptionProblem
from engine.outcomes import analyze_outcomes, long_outcomes, outcomes_from_file, wide_outcomes
from engine.question import Question
from engine.spec import AnalysisSpec, Source

NAMES = ("strength", "hardness", "elongation", "mass")


@pytest.fixture(scope="module")
def parts(tmp_path_factory):
    """Bolts from two lots measured four ways (invented); one hardness cell is not a number."""
    rng = np.random.default_rng(7)
    n = 30
    frame = pd.DataFrame({"lot": ["east"] * n + ["west"] * (n + 4)})
    for k, name in enumerate(NAMES):
        frame[name] = np.r_[rng.normal(50 + 0.5 * k, 2, n), rng.lognormal(3.9, 0.05, n + 4)].round(3)
    frame = frame.astype({"hardness": object})
    frame.loc[3, "hardness"] = "n/a"
    path = tmp_path_factory.mktemp("outcomes") / "bolt_lots.csv"
    frame.to_csv(path, index=False)
    return path


def spec_for(path, **changes):
    return AnalysisSpec(source=Source(str(path)), group_column="lot", resamples=200, seed=11, **changes)


def assert_same_analysis(one, alone):
    assert set(one.procedures) == set(alone.procedures)
    for key, result in alone.procedures.items():
        ours = one.procedures[key]
        assert (ours.estimate, ours.p_value, ours.interval) == (result.estimate, result.p_value, result.interval), key
    assert one.recommendation.key == alone.recommendation.key
    assert [f.key for f in one.diagnostics.findings] == [f.key for f in alone.diagnostics.findings]
    assert one.groups.n == alone.groups.n


def test_each_outcome_equals_its_single_outcome_run(parts):
    spec = spec_for(parts)
    found = outcomes_from_file(spec, long_outcomes(NAMES))
    for done in found.outcomes:
        # the reference: engine.pipeline.from_file on that column alone, same spec and seed
        alone = pipeline.from_file(spec=spec.replace(value_columns=done.outcome.columns))
        assert_same_analysis(done.analysis, alone.analysis)
        assert done.prepared.intake.screening.excluded_counts == alone.intake.screening.excluded_counts
        assert done.result is alone.analysis.procedures.get(done.key) or \
            done.result.p_value == alone.analysis.procedures[done.key].p_value
        assert done.key == alone.analysis.recommendation.key
    assert found.outcomes[1].prepared.intake.screening.excluded_counts  # the "n/a" cell


def test_adjusted_p_values_are_statsmodels_and_verdicts_follow_the_choice(parts):
    found = outcomes_from_file(spec_for(parts), long_outcomes(NAMES), procedure="welch_t",
                               adjustment="bh")
    raw = [d.p_value for d in found.outcomes]
    # reference: statsmodels.stats.multitest.multipletests(raw, method='holm' / 'fdr_bh')
    np.testing.assert_allclose(found.p_holm, multipletests(raw, method="holm")[1], rtol=1e-12)
    np.testing.assert_allclose(found.p_bh, multipletests(raw, method="fdr_bh")[1], rtol=1e-12)
    rows = found.rows
    assert [r.finding for r in rows] == [p < 0.05 for p in found.p_bh]
    holm_rows = found.with_adjustment("holm").rows
    assert [r.finding for r in holm_rows] == [p < 0.05 for p in found.p_holm]
    assert all(r.key == "welch_t" for r in rows)
    assert {f.key for f in found.findings} >= {"adjust_holm", "adjust_bh", "simultaneous_intervals"}


def test_bonferroni_intervals_are_the_procedure_at_the_bonferroni_level(parts):
    from engine.procedures.t import welch_t

    found = outcomes_from_file(spec_for(parts), long_outcomes(NAMES), procedure="welch_t")
    assert found.simultaneous_level == pytest.approx(1 - 0.05 / 4, rel=1e-15)
    for done in found.outcomes:
        groups = done.analysis.groups
        # reference: the Welch interval of the same groups at level 1 - alpha / m
        wider = welch_t(groups.x, groups.y, confidence_level=1 - 0.05 / 4).interval
        assert (done.simultaneous.interval.low, done.simultaneous.interval.high) == (wider.low, wider.high)
        assert done.simultaneous.interval.low < done.result.interval.low
        assert done.effect.key == "hedges_g"


def test_wide_layout_takes_a_pair_of_columns_per_outcome(tmp_path):
    rng = np.random.default_rng(3)
    frame = pd.DataFrame({f"{name}_{lot}": rng.normal(10, 1, 12).round(3)
                          for name in ("width", "depth") for lot in ("old", "new")})
    path = tmp_path / "plates.csv"
    frame.to_csv(path, index=False)
    spec = AnalysisSpec(source=Source(str(path)), layout="wide", resamples=200, seed=2)
    outcomes = wide_outcomes([("width_old", "width_new"), ("depth_old", "depth_new")], ["width", "depth"])
    found = outcomes_from_file(spec, outcomes)
    for done in found.outcomes:
        alone = pipeline.from_file(spec=spec.replace(value_columns=done.outcome.columns))
        assert_same_analysis(done.analysis, alone.analysis)
    assert [r.name for r in found.rows] == ["width", "depth"]


def test_outcomes_arrive_one_by_one_with_progress_and_can_be_cancelled(parts):
    seen, fractions = [], []
    outcomes_from_file(spec_for(parts), long_outcomes(NAMES), on_outcome=seen.append,
                       progress=lambda f, what: fractions.append(f))
    assert [d.outcome.name for d in seen] == list(NAMES)
    assert all(b >= a - 1e-12 for a, b in zip(fractions, fractions[1:])) and fractions[-1] == 1.0
    stop = []
    with pytest.raises(Cancelled):
        outcomes_from_file(spec_for(parts), long_outcomes(NAMES), on_outcome=stop.append,
                           cancelled=lambda: len(stop) >= 2)
    assert len(stop) == 2


def test_an_outcome_that_cannot_be_analysed_is_kept_with_its_reason(tmp_path):
    frame = pd.DataFrame({"lot": ["a"] * 5 + ["b"] * 5, "good": np.arange(10.0),
                          "blank": [np.nan] * 10})
    frame["blank"] = frame["blank"].astype(object)
    frame.loc[0, "blank"] = "x"
    path = tmp_path / "one_bad.csv"
    frame.to_csv(path, index=False)
    found = outcomes_from_file(spec_for(path), long_outcomes(["good", "blank"]))
    bad = found.outcomes[1]
    assert bad.result is None and bad.problem and "\n" not in bad.problem
    assert found.p_holm[1] is None and found.p_holm[0] == found.outcomes[0].p_value  # m = 1
    assert "outcomes_untested" in {f.key for f in found.findings}


@pytest.mark.parametrize("outcomes, options, error, message", [
    (["strength", "nope"], {}, ColumnProblem, "no column 'nope'"),
    (["strength", "lot"], {}, ColumnProblem, "group column 'lot'"),
    ([], {}, OptionProblem, "at least one"),
    (["strength"], {"adjustment": "sidak"}, OptionProblem, "'holm' or 'bh'"),
    (["strength"], {"procedure": "paired_t"}, OptionProblem, "does not answer"),
])
def test_bad_requests_are_refused_in_one_line(parts, outcomes, options, error, message):
    with pytest.raises(error, match=message) as caught:
        outcomes_from_file(spec_for(parts), long_outcomes(outcomes), **options)
    assert "\n" not in str(caught.value)


def test_one_sided_question_is_adjusted_on_its_one_sided_p_values(parts):
    spec = spec_for(parts, question=Question(kind="lower"))
    found = outcomes_from_file(spec, long_outcomes(NAMES[:2]), procedure="welch_t")
    for done in found.outcomes:
        assert done.result.alternative == "less"
