"""Two groups from summary statistics: against scipy, against the values they summarise, against a
published worked example, and the short form, the file reader and the analysis from summaries."""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pytest
from scipy import stats

from engine import effects, pipeline
from engine.errors import ColumnProblem, DataProblem, OptionProblem
from engine.group_stats import GroupStats, parse_stats
from engine.io.summaries import read_summaries
from engine.procedures import registry
from engine.procedures.equivalence import equivalence_t, noninferiority_t
from engine.procedures.t import pooled_t, welch_t, z_test
from engine.question import Question
from engine.spec import AnalysisSpec, Source, Statements
from engine.summary_analysis import analyze_summaries

DEMO = Path(__file__).resolve().parents[2] / "demo_files"
ALTERNATIVES = ("two-sided", "less", "greater")


def rel(a, b) -> float:
    if a is None or b is None:
        return 0.0 if a is b else math.inf
    if a == b:
        return 0.0
    return abs(a - b) / max(abs(b), 1e-300)


# --- scipy ---------------------------------------------------------------------------------

@pytest.mark.parametrize("equal_var", [True, False])
@pytest.mark.parametrize("alternative", ALTERNATIVES)
def test_t_from_summaries_matches_scipy_ttest_ind_from_stats(equal_var, alternative):
    rng = np.random.default_rng(20261203)
    for _ in range(20):
        n1, n2 = (int(k) for k in rng.integers(2, 60, size=2))
        m1, m2 = rng.normal(50, 10, size=2)
        s1, s2 = rng.uniform(0.5, 9, size=2)
        first, second = GroupStats("a", n1, m1, sd=s1), GroupStats("b", n2, m2, sd=s2)
        ours = (pooled_t if equal_var else welch_t)(first, second, alternative=alternative)
        # reference: scipy.stats.ttest_ind_from_stats(mean1, std1, nobs1, mean2, std2, nobs2, equal_var, alternative)
        ref = stats.ttest_ind_from_stats(m1, s1, n1, m2, s2, n2, equal_var=equal_var,
                                         alternative=alternative)
        assert rel(ours.statistic, ref.statistic) < 1e-12
        assert rel(ours.p_value, ref.pvalue) < 1e-12


def test_standard_error_entered_gives_the_sd_result():
    # the same group entered with sd and with se = sd / sqrt(n) (scipy as above, sd form)
    sd_form = welch_t(GroupStats("a", 12, 41.2, sd=3.1), GroupStats("b", 15, 38.0, sd=4.4))
    se_form = welch_t(GroupStats("a", 12, 41.2, se=3.1 / math.sqrt(12)),
                      GroupStats("b", 15, 38.0, se=4.4 / math.sqrt(15)))
    ref = stats.ttest_ind_from_stats(41.2, 3.1, 12, 38.0, 4.4, 15, equal_var=False)
    assert rel(se_form.p_value, ref.pvalue) < 1e-12 and rel(sd_form.p_value, ref.pvalue) < 1e-12


def test_z_from_known_sds_matches_the_normal_formula():
    # reference: z = (m1 - m2) / sqrt(s1^2/n1 + s2^2/n2), p = 2 * scipy.stats.norm.sf(|z|)
    first, second = GroupStats("a", 12, 41.2, sd=3.0), GroupStats("b", 15, 38.0, sd=4.0)
    ours = z_test(first, second, sd=(3.0, 4.0))
    z = 3.2 / math.sqrt(9 / 12 + 16 / 15)
    assert rel(ours.statistic, z) < 1e-13
    assert rel(ours.p_value, 2 * stats.norm.sf(z)) < 1e-12


# --- the values the summaries come from ----------------------------------------------------

def demo_groups():
    """The two groups of each demo file, as the pipeline forms them from the proposed layout."""
    found = []
    for path in sorted(DEMO.iterdir()):
        spec = AnalysisSpec(source=Source(str(path)))
        table = pipeline.read(spec)
        groups = pipeline.form_groups(table, pipeline.complete(table, spec)).groups
        found.append(pytest.param(groups, id=path.name))
    return found


def same_result(raw, summary, tol=1e-12):
    for name in ("estimate", "statistic", "df", "p_value"):
        assert rel(getattr(summary, name), getattr(raw, name)) < tol, name
    for end in ("low", "high"):
        assert rel(getattr(summary.interval, end), getattr(raw.interval, end)) < tol, end
    for key, value in raw.details.items():
        if isinstance(value, float):
            assert rel(summary.details[key], value) < tol, key
    assert summary.key == raw.key and summary.warnings == raw.warnings


@pytest.mark.parametrize("groups", demo_groups())
@pytest.mark.parametrize("alternative", ALTERNATIVES)
def test_summaries_give_the_results_of_their_values_on_every_demo_file(groups, alternative):
    x, y = groups.x, groups.y
    first, second = GroupStats.of_values("1", x), GroupStats.of_values("2", y)
    common = dict(alternative=alternative, confidence_level=0.9)
    for procedure in (welch_t, pooled_t):
        same_result(procedure(x, y, **common), procedure(first, second, **common))
    sd = (float(np.std(x)), float(np.std(y)))
    same_result(z_test(x, y, sd=sd, **common), z_test(first, second, sd=sd, **common))
    low, high = -0.5 * abs(first.mean), 0.5 * abs(first.mean)
    for spread in ("welch", "pooled"):
        same_result(equivalence_t(x, y, low=low, high=high, spread=spread),
                    equivalence_t(first, second, low=low, high=high, spread=spread))
        same_result(noninferiority_t(x, y, margin=high, worse="lower", spread=spread),
                    noninferiority_t(first, second, margin=high, worse="lower", spread=spread))
    for size in (effects.cohen_d, effects.hedges_g, effects.glass_delta):
        raw, summary = size(x, y, **common), size(first, second, **common)
        assert rel(summary.value, raw.value) < 1e-12
        for end in ("low", "high"):
            assert rel(getattr(summary.interval, end), getattr(raw.interval, end)) < 1e-12


# --- a published worked example --------------------------------------------------------------

def test_borenstein_worked_example_of_d_and_g():
    # Borenstein, Hedges, Higgins and Rothstein (2009), Introduction to Meta-Analysis, Wiley,
    # chapter 4 worked example (recalled from memory): means 103 and 100, SDs 5.5 and 4.5,
    # n 50 each; S_within = 5.0249, d = 0.5970, J = 0.9923, g = 0.5924.
    first, second = GroupStats("treated", 50, 103.0, sd=5.5), GroupStats("control", 50, 100.0, sd=4.5)
    d, g = effects.cohen_d(first, second), effects.hedges_g(first, second)
    assert d.details["pooled_sd"] == pytest.approx(5.0249, abs=5e-5)
    assert d.value == pytest.approx(0.5970, abs=5e-5)
    assert g.details["correction"] == pytest.approx(0.9923, abs=5e-5)
    assert g.value == pytest.approx(0.5924, abs=5e-5)


# --- the short form and the file -----------------------------------------------------------

def test_short_form_reads_label_first_then_the_numbers():
    group = parse_stats("North forge n=12 mean=41.2 sd=3.1")
    assert group == GroupStats("North forge", 12, 41.2, sd=3.1)
    assert parse_stats("B n=15 mean=38 se=1.1").standard_deviation == pytest.approx(1.1 * math.sqrt(15))
    assert parse_stats("B n=15 mean=38 sd=4", sd_known=True).sd_known


@pytest.mark.parametrize("text, message", [
    ("n=12 mean=41.2 sd=3.1", "label first"),
    ("A n=12 mean=41.2", "sd \\(or se\\) missing"),
    ("A n=12 mean=41.2 sd=3.1 se=1", "not both"),
    ("A n=1.5 mean=41.2 sd=3.1", "n= must be a whole number"),
    ("A n=1 mean=41.2 sd=3.1", "2 or more"),
    ("A n=12 mean=abc sd=3.1", "mean= must be a number"),
    ("A n=12 mean=4 sd=-3", "0 or more"),
    ("A n=12 median=4 sd=3", "unknown part 'median'"),
    ("A n=12 mean=nan sd=3", "finite"),
])
def test_short_form_refuses_with_one_line(text, message):
    with pytest.raises(DataProblem, match=message) as caught:
        parse_stats(text)
    assert "\n" not in str(caught.value)


def test_file_of_summaries_is_read_by_column_names(tmp_path):
    path = tmp_path / "certificate.csv"
    path.write_text("supplier;n;mean;se;sd_known\nnorth;12;41,2;0,9;no\nsouth;15;38,0;1,1;no\n",
                    encoding="utf-8")
    first, second = read_summaries(path)
    assert (first.label, first.n, first.mean, first.se) == ("north", 12, 41.2, 0.9)
    assert second.given_as == "se" and not second.sd_known


@pytest.mark.parametrize("text, error, message", [
    ("label,n,mean\nA,12,41.2\nB,15,38\n", ColumnProblem, "missing: sd \\(or se\\)"),
    ("label,n,mean,sd\nA,12,41.2,3\nB,x,38,4\n", DataProblem, "row 3, column n: 'x' is not a number"),
    ("label,n,mean,sd\nA,12,41.2,3\n", DataProblem, "found 1"),
    ("label,n,mean,sd\nA,12,41.2,3\nB,15,38,4\nC,15,38,4\n", DataProblem, "row 4: .* third"),
    ("label,n,mean,sd\nA,12,41.2,3\nB,1,38,4\n", DataProblem, "row 3: .*2 or more"),
])
def test_bad_summary_file_names_file_row_and_column(tmp_path, text, error, message):
    path = tmp_path / "sums.csv"
    path.write_text(text, encoding="utf-8")
    before = path.read_bytes()
    with pytest.raises(error, match=message) as caught:
        read_summaries(path)
    assert str(caught.value).startswith("sums.csv") and "\n" not in str(caught.value)
    assert path.read_bytes() == before


def test_mixing_values_and_summaries_is_refused():
    with pytest.raises(OptionProblem, match="both groups as values or both as summary"):
        welch_t([1.0, 2.0, 3.0], GroupStats("b", 5, 1.0, sd=1.0))


# --- the analysis from summaries -------------------------------------------------------------

def test_analysis_from_summaries_runs_what_summaries_allow_and_names_the_rest():
    first, second = parse_stats("A n=12 mean=41.2 sd=3.1"), parse_stats("B n=15 mean=38.0 sd=4.4")
    analysis = analyze_summaries((first, second))
    assert set(analysis.procedures) == {"welch_t", "pooled_t"}
    assert analysis.recommendation.key == "welch_t"
    assert set(analysis.effect_sizes) == {"cohen_d", "hedges_g", "glass_delta"}
    # every procedure on the values that is not in the summary records is named as needing them
    assert set(analysis.needs_values) == {r.key for r in registry.applicable(AnalysisSpec())} - {
        "welch_t", "pooled_t"}
    keys = [f.key for f in analysis.findings]
    assert "shape_not_checked" in keys and "needs_values" in keys
    assert any("shape" in reason for reason in analysis.recommendation.reasons)
    # scipy.stats.ttest_ind_from_stats(41.2, 3.1, 12, 38.0, 4.4, 15, equal_var=False)
    assert rel(analysis.chosen.p_value, stats.ttest_ind_from_stats(
        41.2, 3.1, 12, 38.0, 4.4, 15, equal_var=False).pvalue) < 1e-12
    assert analysis.spec.groups == ("A", "B") and analysis.spec.seed is not None


def test_known_sds_entered_add_the_z_procedure_and_suggest_it():
    first = parse_stats("A n=12 mean=41.2 sd=3.0", sd_known=True)
    second = parse_stats("B n=15 mean=38.0 sd=4.0", sd_known=True)
    analysis = analyze_summaries((first, second))
    assert analysis.recommendation.key == "z" and "z" in analysis.procedures
    assert analysis.spec.statements.known_sd == (3.0, 4.0)
    with pytest.raises(DataProblem, match="both known"):
        analyze_summaries((first, parse_stats("B n=15 mean=38.0 sd=4.0")))


def test_equal_spreads_stated_suggest_the_pooled_t():
    spec = AnalysisSpec(statements=Statements(equal_spread_known=True))
    analysis = analyze_summaries((parse_stats("A n=12 mean=41.2 sd=3.1"),
                                  parse_stats("B n=15 mean=38.0 sd=4.4")), spec)
    assert analysis.recommendation.key == "pooled_t"


def test_summary_records_are_the_value_records_with_summary_input():
    # the same key, name, assumption and function: a result from summaries reads as one from values
    for summary in registry.SUMMARY_RECORDS:
        raw = registry.record(summary.key)
        assert summary.input == "summary" and raw.input == "raw"
        assert (summary.name, summary.function, summary.assumption) == (raw.name, raw.function, raw.assumption)


@pytest.mark.parametrize("kind, unit", [("equivalent", "units"), ("not_worse", "units"),
                                        ("equivalent", "percent"), ("not_worse", "percent")])
def test_every_summary_margin_record_runs_from_summaries(kind, unit):
    from engine.question import Margin

    margin = (Margin.within(2.0, unit=unit) if kind == "equivalent"
              else Margin.not_worse_by(2.0, "lower", unit=unit))
    spec = AnalysisSpec(question=Question(kind=kind, margin=margin))
    analysis = analyze_summaries((parse_stats("A n=30 mean=40.2 sd=3.1"),
                                  parse_stats("B n=30 mean=40.0 sd=3.4")), spec)
    records = registry.applicable(analysis.spec, input="summary")
    assert records and set(analysis.procedures) == {r.key for r in records}
    assert not analysis.notes
    assert analysis.recommendation.key == f"{'equivalence' if kind == 'equivalent' else 'noninferiority'}_welch"


def test_analysis_from_summaries_can_be_cancelled():
    from engine.errors import Cancelled

    with pytest.raises(Cancelled):
        analyze_summaries((parse_stats("A n=12 mean=41.2 sd=3.1"),
                           parse_stats("B n=15 mean=38.0 sd=4.4")), cancelled=lambda: True)


def test_a_paired_design_is_refused_from_summaries():
    spec = AnalysisSpec(design="paired", layout="wide")
    with pytest.raises(OptionProblem, match="pairs' values"):
        analyze_summaries((parse_stats("A n=12 mean=41.2 sd=3.1"),
                           parse_stats("B n=12 mean=38.0 sd=4.4")), spec)
