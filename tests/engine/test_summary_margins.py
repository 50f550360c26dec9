"""Equivalence and non-inferiority from summary statistics: the command's margin flags with
--summary, the JSON members question and margin_verdicts, the saved file, and the report command
of a saved summary analysis. Checked against statsmodels on the raw values of the demo files."""

from __future__ import annotations

import io
import json
from pathlib import Path

import jsonschema
import numpy as np
import pytest
from referencing import Registry, Resource
from statsmodels.stats.weightstats import ttest_ind, ttost_ind
from test_summary_stats import demo_groups

from engine import pipeline, saved
from engine.cli import main
from engine.errors import OptionProblem
from engine.group_stats import GroupStats
from engine.jsonout import analysis_schema
from engine.question import Margin, Question
from engine.spec import AnalysisSpec, Source
from engine.summary_analysis import analyze_summaries
from engine.summary_cli import summary_schema

DEMO = Path(__file__).resolve().parents[2] / "demo_files"
A, B = "A n=12 mean=41.2 sd=3.1", "B n=15 mean=38.0 sd=4.4"


def run(*argv):
    out, err = io.StringIO(), io.StringIO()
    code = main([str(a) for a in argv], out=out, err=err)
    return code, out.getvalue(), err.getvalue()


def rel(a, b) -> float:
    return abs(a - b) / max(abs(b), 1e-300)


def _raw_groups():
    """The two groups of values of each demo file (as test_summary_stats forms them)."""
    return [pytest.param(np.asarray(p.values[0].x, float), np.asarray(p.values[0].y, float), id=p.id)
            for p in demo_groups()]


def _summary_flags(x, y) -> list[str]:
    """--summary flags of the values' own n, mean and SD (repr keeps every digit of a float)."""
    flags = []
    for label, values in (("first", x), ("second", y)):
        stats = GroupStats.of_values(label, values)
        flags += ["--summary", f"{label} n={stats.n} mean={stats.mean!r} sd={stats.sd!r}"]
    return flags


def _document(*argv) -> dict:
    code, out, err = run("analyze", *argv, "--json")
    assert code == 0, err
    return json.loads(out)


SPREADS = [pytest.param([], "welch", "unequal", id="welch"),
           pytest.param(["--equal-spreads-known"], "pooled", "pooled", id="pooled")]


@pytest.mark.parametrize("x, y", _raw_groups())
@pytest.mark.parametrize("stated, spread, usevar", SPREADS)
def test_equivalence_from_summaries_matches_statsmodels_on_the_raw_values(x, y, stated, spread, usevar):
    scale = float(np.std(y, ddof=1))
    low, high = -0.3 * scale, 0.5 * scale
    document = _document(*_summary_flags(x, y), *stated, "--equivalence-margin", f"{low!r}:{high!r}")
    result = document["procedures"][f"equivalence_{spread}"]
    # reference: statsmodels.stats.weightstats.ttost_ind on the values the summaries come from
    p, (t1, p1, df1), (t2, p2, _) = ttost_ind(x, y, low, high, usevar=usevar)
    assert rel(result["p_value"], p) < 1e-10
    assert rel(result["details"]["p_lower"], p1) < 1e-10 and rel(result["details"]["p_upper"], p2) < 1e-10
    assert rel(result["details"]["t_lower"], t1) < 1e-10 and rel(result["details"]["t_upper"], t2) < 1e-10
    assert rel(result["df"], df1) < 1e-10
    verdict = document["margin_verdicts"][f"equivalence_{spread}"]
    assert verdict["yes"] == (p < 0.05)  # equivalence at the 5% level: both one-sided p below 0.05


@pytest.mark.parametrize("x, y", _raw_groups())
@pytest.mark.parametrize("stated, spread, usevar", SPREADS)
def test_a_percentage_margin_is_of_group_2s_mean(x, y, stated, spread, usevar):
    document = _document(*_summary_flags(x, y), *stated, "--equivalence-margin", "2%")
    reference = float(np.mean(y))
    # reference: statsmodels ttost_ind with the margin 2% of the second group's mean, in units
    p, (_, p1, _), (_, p2, _) = ttost_ind(x, y, -0.02 * abs(reference), 0.02 * abs(reference), usevar=usevar)
    result = document["procedures"][f"equivalence_{spread}"]
    assert rel(result["p_value"], p) < 1e-10
    assert rel(result["details"]["p_lower"], p1) < 1e-10 and rel(result["details"]["p_upper"], p2) < 1e-10
    margin = document["question"]["margin"]
    assert margin["entered_as"] == "percent" and rel(margin["reference_mean"], reference) < 1e-12
    assert rel(margin["in_units"]["high"], 0.02 * abs(reference)) < 1e-12


@pytest.mark.parametrize("x, y", _raw_groups())
@pytest.mark.parametrize("stated, spread, usevar", SPREADS)
@pytest.mark.parametrize("worse", ["lower", "higher"])
def test_non_inferiority_from_summaries_matches_statsmodels(x, y, stated, spread, usevar, worse):
    size = 0.4 * float(np.std(y, ddof=1))
    document = _document(*_summary_flags(x, y), *stated, "--noninferiority-margin", repr(size),
                         "--worse", worse)
    result = document["procedures"][f"noninferiority_{spread}"]
    # reference: statsmodels ttest_ind, one-sided against the margin's end on the worse side
    # (lower worse: is the difference above -size? higher worse: below +size?)
    value, alternative = (-size, "larger") if worse == "lower" else (size, "smaller")
    statistic, p, df = ttest_ind(x, y, alternative=alternative, usevar=usevar, value=value)
    assert rel(result["p_value"], p) < 1e-10 and rel(result["statistic"], statistic) < 1e-10
    assert rel(result["df"], df) < 1e-10
    assert document["margin_verdicts"][f"noninferiority_{spread}"]["yes"] == (p < 0.05)
    assert document["question"]["kind"] == "not_worse"
    assert document["question"]["margin"]["entered"]["worse"] == worse


def test_the_summary_of_the_values_gives_the_value_analysis_verdicts():
    path = DEMO / "bolt_strength.csv"
    question = Question("equivalent", 0.95, margin=Margin.within(-15.0, 20.0))
    prepared = pipeline.from_file(spec=AnalysisSpec(source=Source(str(path)), question=question, resamples=200))
    values = prepared.analysis
    stats = (GroupStats.of_values(values.groups.labels[0], values.groups.x),
             GroupStats.of_values(values.groups.labels[1], values.groups.y))
    from_summaries = analyze_summaries(stats, AnalysisSpec(question=question))
    from engine.jsonout import margin_verdicts, question_member

    # the same members, the same verdict words, from the values and from their summaries
    assert question_member(from_summaries) == question_member(values)
    ours, theirs = margin_verdicts(from_summaries), margin_verdicts(values)
    assert ours["equivalence_welch"]["words"] == theirs["equivalence_welch"]["words"]
    assert ours["equivalence_welch"]["case"] == theirs["equivalence_welch"]["case"]


def test_the_plain_lines_say_the_question_and_each_verdict():
    code, out, err = run("analyze", "--summary", A, "--summary", B, "--equal-spreads-known",
                         "--noninferiority-margin", "5%", "--worse", "lower")
    assert code == 0, err
    lines = out.splitlines()
    assert ("Question: Is A not worse than B by more than 1.90 (5% of B's mean), where lower values "
            "are worse? (non-inferiority, at the 5% level)") in lines
    assert "Margin as entered: 5% of B's mean (38), that is 1.90 in the measurement's units; lower values are worse." in lines
    verdicts = [line for line in lines if line.startswith("Verdict by ")]
    assert [v.split(":")[0] for v in verdicts] == ["Verdict by non-inferiority t-test (Welch t)",
                                                   "Verdict by non-inferiority t-test (pooled t)"]
    assert all("A is not worse than B by more than 1.90" in v for v in verdicts)


@pytest.mark.parametrize("argv, words", [
    (["--equivalence-margin", "0.8:1.25", "--margin-as", "ratio"], "--margin-as ratio cannot be used with summary"),
    (["--noninferiority-margin", "0.9", "--worse", "lower", "--margin-as", "ratio"], "log scale of the values"),
    (["--paired"], "--paired cannot be used with summary statistics; leave it out"),
    (["--paired-by", "unit", "--zero-rule", "pratt"], "--paired-by, --zero-rule cannot be used with summary"),
    (["--zero-rule", "drop"], "--zero-rule cannot be used with summary"),
    (["--equivalence-margin", "2", "--alternative", "less"], "--alternative does not go with"),
    (["--noninferiority-margin", "2"], "needs --worse"),
    (["--equivalence-margin", "two"], "is not a number"),
])
def test_what_summaries_cannot_answer_is_refused_in_one_line(argv, words):
    code, out, err = run("analyze", "--summary", A, "--summary", B, *argv)
    assert code == 2 and out == "" and err.count("\n") == 1 and words in err and "Traceback" not in err


def test_the_engine_refuses_a_ratio_margin_from_summaries():
    stats = (GroupStats("A", 12, 41.2, sd=3.1), GroupStats("B", 15, 38.0, sd=4.4))
    spec = AnalysisSpec(question=Question("equivalent", margin=Margin.within(0.8, 1.25, unit="ratio")))
    with pytest.raises(OptionProblem, match="log scale of the values") as caught:
        analyze_summaries(stats, spec)
    assert "\n" not in caught.value.message


def _validator(schema):
    registry = Registry().with_resource("analysis.schema.json", Resource.from_contents(analysis_schema()))
    return jsonschema.Draft202012Validator(schema, registry=registry)


@pytest.mark.parametrize("argv", [
    [],
    ["--equivalence-margin", "5%"],
    ["--equivalence-margin", "-1:4", "--equal-spreads-known", "--confidence", "0.9"],
    ["--noninferiority-margin", "2", "--worse", "higher"],
    ["--sd-known", "--equivalence-margin", "3"],
])
def test_the_document_follows_its_shipped_schema(argv):
    # jsonschema: a reference validator of JSON Schema 2020-12
    document = _document("--summary", A, "--summary", B, *argv)
    validator = _validator(summary_schema())
    validator.validate(document)
    assert {"question", "margin_verdicts"} <= set(document)
    broken = dict(document, input="values")
    assert not validator.is_valid(broken)
    broken = dict(document, margin_verdicts={"equivalence_welch": {"case": "maybe"}})
    assert not validator.is_valid(broken)


@pytest.fixture
def saved_margin(tmp_path):
    target = tmp_path / "certificate.twofold"
    document = _document("--summary", A, "--summary", B, "--equivalence-margin", "-1:4", "--save", target)
    return target, document


def test_a_margin_question_saves_and_runs_again_to_the_same_numbers(saved_margin):
    target, document = saved_margin
    recorded = json.loads(target.read_text(encoding="utf-8"))
    assert recorded["spec"]["question"]["margin"] == {"low": -1.0, "high": 4.0, "unit": "units", "worse": None}
    assert set(recorded["numbers"]["margins"]) == {"equivalence_welch"}
    assert _document("--spec", target) == document  # every figure and verdict identical
    again, status, differences = saved.rerun_summaries(saved.load(target))
    assert status == "same" and differences == () and again.margin == Margin.within(-1.0, 4.0)
    code, out, err = run("analyze", "--spec", target)
    assert code == 0 and out.startswith(f"Saved analysis {target.name}: run again from its summary "
                                        "statistics, it gave the saved numbers.")
    assert "Verdict by two one-sided tests (Welch t)" in out


@pytest.mark.parametrize("edit, figure", [
    (lambda d: d["numbers"]["margins"]["equivalence_welch"].update(yes=True), "equivalence_welch margin yes"),
    (lambda d: d["spec"]["question"]["margin"].update(high=3.0), "equivalence_welch"),
])
def test_an_edited_margin_or_verdict_is_caught(saved_margin, edit, figure):
    target, _ = saved_margin
    document = json.loads(target.read_text(encoding="utf-8"))
    edit(document)
    target.write_text(json.dumps(document), encoding="utf-8")
    code, out, err = run("analyze", "--spec", target)
    assert code == 2 and out == "" and err.count("\n") == 1
    assert "the numbers differ" in err and figure in err


def test_the_report_command_writes_the_report_of_a_saved_summary_analysis(saved_margin, tmp_path):
    target, document = saved_margin
    page = tmp_path / "report.html"
    code, out, err = run("report", target, "--html", page)
    assert code == 0 and not err and out == f"Report written to {page}\n"
    html = page.read_text(encoding="utf-8")
    assert html.startswith("<!DOCTYPE html>")
    assert "it gave the saved numbers" in html
    words = document["margin_verdicts"]["equivalence_welch"]["words"]
    import html as markup

    assert markup.escape(words, quote=True) in html
    assert html.index("The answer against the margin") < html.index("The two groups as entered")


@pytest.mark.parametrize("argv, words", [
    (["--value", "strength"], "leave out --value"),
    (["--source", "elsewhere.csv"], "leave out --source"),
    (["--equivalence-margin", "3", "--seed", "4"], "leave out --seed, --equivalence-margin"),
])
def test_the_report_command_refuses_the_flags_of_a_data_file(saved_margin, tmp_path, argv, words):
    target, _ = saved_margin
    code, out, err = run("report", target, "--html", tmp_path / "r.html", *argv)
    assert code == 2 and out == "" and err.count("\n") == 1 and words in err
    assert not (tmp_path / "r.html").exists()


def test_the_report_command_never_replaces_the_saved_file_or_reports_other_numbers(saved_margin):
    target, _ = saved_margin
    before = target.read_bytes()
    code, _, err = run("report", target, "--html", target)
    assert code == 2 and "would replace" in err and target.read_bytes() == before
    document = json.loads(before)
    document["summary_statistics"][0]["mean"] = 41.3
    target.write_text(json.dumps(document), encoding="utf-8")
    page = target.with_suffix(".html")
    code, _, err = run("report", target, "--html", page)
    assert code == 2 and err.count("\n") == 1 and "the numbers differ" in err and not page.exists()


def test_known_sds_with_a_margin_suggest_a_margin_procedure_that_ran():
    # the z-test has no margin version: the suggestion must be one of the procedures that ran
    document = _document("--summary", A, "--summary", B, "--sd-known", "--equivalence-margin", "3")
    suggested = document["recommendation"]["key"]
    assert suggested == "equivalence_welch" and suggested in document["procedures"]
    assert "no margin version of the z-test" in document["recommendation"]["reasons"][0]
    assert suggested in document["margin_verdicts"]
