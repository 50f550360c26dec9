"""Saved analyses from summary statistics: ``analyze --summary ... --save``, ``analyze --spec``
of such a file, the optional ``summary_statistics`` member, and files saved before it."""

import io
import json
import shutil
from pathlib import Path

import pytest
from scipy import stats as scipy_stats

from engine import pipeline, saved
from engine.cli import main
from engine.group_stats import GroupStats
from engine.saved import SavedFileProblem
from engine.spec import AnalysisSpec
from engine.summary_analysis import analyze_summaries

DEMO = Path(__file__).resolve().parents[2] / "demo_files"
A = "Supplier A n=12 mean=41.2 sd=3.1"
B = "Supplier B n=15 mean=38.0 se=1.1"


def run(*argv):
    out, err = io.StringIO(), io.StringIO()
    code = main([str(a) for a in argv], out=out, err=err)
    return code, out.getvalue(), err.getvalue()


@pytest.fixture
def summary_file(tmp_path):
    target = tmp_path / "certificate.twofold"
    code, out, err = run("analyze", "--summary", A, "--summary", B, "--save", target, "--json")
    assert code == 0, err
    return target, json.loads(out)


def test_the_numbers_are_recorded_as_entered(summary_file):
    target, _ = summary_file
    document = json.loads(target.read_text(encoding="utf-8"))
    assert document["spec"]["source"] is None and document["source_from_here"] is None
    assert document["summary_statistics"] == [
        {"label": "Supplier A", "n": 12, "mean": 41.2, "sd": 3.1, "se": None, "sd_known": False},
        {"label": "Supplier B", "n": 15, "mean": 38.0, "sd": None, "se": 1.1, "sd_known": False}]
    assert document["spec"]["question"] == {"kind": "differ", "level": 0.95}
    loaded = saved.load(target)
    assert loaded.summary_statistics == (GroupStats("Supplier A", 12, 41.2, sd=3.1),
                                         GroupStats("Supplier B", 15, 38.0, se=1.1))


def test_the_saved_figures_match_scipy(summary_file):
    target, _ = summary_file
    numbers = saved.load(target).numbers
    # reference: scipy.stats.ttest_ind_from_stats (the SD of B is its SE x sqrt(n))
    reference = scipy_stats.ttest_ind_from_stats(41.2, 3.1, 12, 38.0, 1.1 * 15 ** 0.5, 15, equal_var=False)
    assert numbers["procedures"]["welch_t"]["p_value"] == pytest.approx(reference.pvalue, rel=1e-12)
    assert numbers["procedures"]["welch_t"]["statistic"] == pytest.approx(reference.statistic, rel=1e-12)
    assert numbers["groups"][1]["sd"] == pytest.approx(1.1 * 15 ** 0.5, rel=1e-15)


def test_spec_reruns_to_identical_numbers_without_a_data_file(summary_file):
    target, document = summary_file
    code, out, err = run("analyze", "--spec", target, "--json")
    assert code == 0, err
    assert json.loads(out) == document  # every figure identical, bit for bit
    code, out, err = run("analyze", "--spec", target)
    assert code == 0, err
    assert out.startswith(f"Saved analysis {target.name}: run again from its summary statistics, "
                          "it gave the saved numbers.")
    loaded = saved.load(target)
    again, status, differences = saved.rerun_summaries(loaded)
    assert status == "same" and differences == ()
    assert saved.numbers_of(again) == loaded.numbers


def test_a_level_and_a_one_sided_question_are_kept(tmp_path):
    target = tmp_path / "greater.twofold"
    code, _, err = run("analyze", "--summary", A, "--summary", B, "--alternative", "greater",
                       "--confidence", "0.9", "--save", target)
    assert code == 0, err
    loaded = saved.load(target)
    assert loaded.spec.question.kind == "higher" and loaded.spec.question.level == 0.9
    assert run("analyze", "--spec", target)[0] == 0


def test_known_sds_round_trip(tmp_path):
    stats = (GroupStats("Line 1", 20, 10.0, sd=2.0, sd_known=True), GroupStats("Line 2", 25, 9.0, sd=2.0, sd_known=True))
    analysis = analyze_summaries(stats, AnalysisSpec())
    assert "z" in analysis.procedures
    saved.save(tmp_path / "z.twofold", analysis)
    loaded = saved.load(tmp_path / "z.twofold")
    assert loaded.summary_statistics == stats
    again, status, _ = saved.rerun_summaries(loaded)
    assert status == "same" and again.procedures["z"].p_value == analysis.procedures["z"].p_value


def test_an_edited_number_is_caught(summary_file):
    target, _ = summary_file
    document = json.loads(target.read_text(encoding="utf-8"))
    document["summary_statistics"][0]["mean"] = 41.3  # the entered number, not the figures
    target.write_text(json.dumps(document), encoding="utf-8")
    code, out, err = run("analyze", "--spec", target)
    assert code == 2 and out == ""
    assert err.count("\n") == 1 and "the numbers differ" in err and "pooled_t p_value" in err


@pytest.mark.parametrize("edit, words", [
    (lambda d: d["summary_statistics"][1].update(n="x"), "summary statistics group 2"),
    (lambda d: d["summary_statistics"][0].update(colour="red"), "summary statistics group 1"),
    (lambda d: d["summary_statistics"].pop(), "do not hold two groups"),
    (lambda d: d.update(summary_statistics="A and B"), "do not hold two groups"),
    (lambda d: d["summary_statistics"][0].update(sd=-1.0), "summary statistics group 1"),
])
def test_a_damaged_member_is_refused_in_one_line(summary_file, edit, words):
    target, _ = summary_file
    document = json.loads(target.read_text(encoding="utf-8"))
    edit(document)
    target.write_text(json.dumps(document), encoding="utf-8")
    with pytest.raises(SavedFileProblem) as caught:
        saved.load(target)
    assert words in caught.value.message and "\n" not in caught.value.message
    assert caught.value.message.startswith(f"{target.name} is damaged")
    code, out, err = run("analyze", "--spec", target)
    assert code == 2 and out == "" and err.count("\n") == 1 and "Traceback" not in err


def test_a_data_file_is_refused_with_a_summary_file(summary_file):
    target, _ = summary_file
    code, _, err = run("analyze", DEMO / "bolt_strength.csv", "--spec", target)
    assert code == 2 and "needs no data file" in err


def test_report_of_a_summary_file_is_the_report_of_summaries(summary_file, tmp_path):
    target, _ = summary_file
    code, out, err = run("report", target, "--html", tmp_path / "r.html")
    assert code == 0 and not err and out.startswith("Report written to")
    page = (tmp_path / "r.html").read_text(encoding="utf-8")
    assert "Comparison of Supplier A and Supplier B from summary statistics" in page
    assert "standard error 1.1" in page and "it gave the saved numbers" in page


def test_files_of_data_saved_before_still_load_and_reopen(tmp_path):
    data = Path(shutil.copy(DEMO / "bolt_strength.csv", tmp_path / "bolts.csv"))
    prepared = pipeline.from_file(data, AnalysisSpec(resamples=200))
    target = tmp_path / "bolts.twofold"
    saved.save(target, prepared.analysis)
    assert "summary_statistics" not in json.loads(target.read_text(encoding="utf-8"))
    loaded = saved.load(target)
    assert loaded.summary_statistics is None
    assert saved.reopen(loaded).status == "same"
    with pytest.raises(SavedFileProblem):
        saved.rerun_summaries(loaded)


def test_a_data_file_analysis_without_its_source_is_still_refused(tmp_path):
    data = Path(shutil.copy(DEMO / "bolt_strength.csv", tmp_path / "bolts.csv"))
    target = tmp_path / "bolts.twofold"
    saved.save(target, pipeline.from_file(data, AnalysisSpec(resamples=200)).analysis)
    document = json.loads(target.read_text(encoding="utf-8"))
    document["spec"]["source"] = None
    target.write_text(json.dumps(document), encoding="utf-8")
    with pytest.raises(SavedFileProblem, match="does not name its data file"):
        saved.load(target)


def test_a_summary_file_validates_against_the_shipped_schema(summary_file):
    import jsonschema
    from referencing import Registry, Resource

    from engine.jsonout import analysis_schema

    target, _ = summary_file
    registry = Registry().with_resource("analysis.schema.json", Resource.from_contents(analysis_schema()))
    validator = jsonschema.Draft202012Validator(saved.saved_schema(), registry=registry)
    document = json.loads(target.read_text(encoding="utf-8"))
    validator.validate(document)  # jsonschema: a reference validator of JSON Schema 2020-12
    document["summary_statistics"][0]["colour"] = "red"
    assert not validator.is_valid(document)
