"""The command's saved analyses: ``analyze --save``, ``analyze --spec``, ``report --html``, and
their exit codes (0: the saved numbers confirmed; 2: one line saying what is not)."""

import html
import io
import json
import shutil
from pathlib import Path

import jsonschema
import pytest

from engine import saved
from engine.cli import main
from engine.jsonout import analysis_schema
from engine.report import question_text

DEMO = Path(__file__).resolve().parents[2] / "demo_files"
QUICK = ("--resamples", "300")



def run(*argv):
    out, err = io.StringIO(), io.StringIO()
    code = main([str(a) for a in argv], out=out, err=err)
    return code, out.getvalue(), err.getvalue()


@pytest.fixture
def bolts(tmp_path):
    """A copy of the bolts file and an analysis of it saved with the command."""
    data = Path(shutil.copy(DEMO / "bolt_strength.csv", tmp_path / "bolts.csv"))
    target = tmp_path / "bolts.twofold"
    code, out, err = run("analyze", data, *QUICK, "--json", "--save", target)
    assert code == 0, err
    return data, target, json.loads(out)


def test_save_prints_what_it_printed_and_writes_a_loadable_file(bolts, tmp_path):
    data, target, document = bolts
    loaded = saved.load(target)
    assert loaded.spec.to_dict() == document["spec"]
    assert loaded.numbers["procedures"]["welch_t"]["p_value"] == document["procedures"]["welch_t"]["p_value"]
    plain = run("analyze", data, *QUICK, "--seed", loaded.spec.seed, "--save", tmp_path / "again.twofold")
    assert plain[0] == 0 and plain[1].startswith("File: bolts.csv")
    assert saved.load(tmp_path / "again.twofold").numbers == loaded.numbers


def test_spec_runs_it_again_with_the_same_document(bolts):
    _, target, document = bolts
    code, out, err = run("analyze", "--spec", target, "--json")
    assert code == 0 and err == ""
    again = json.loads(out)
    assert again == document
    jsonschema.validate(again, analysis_schema())


def test_spec_without_json_says_the_numbers_were_confirmed(bolts):
    _, target, _ = bolts
    code, out, err = run("analyze", "--spec", target)
    assert code == 0, err
    first = out.splitlines()[0]
    assert first.startswith("Saved analysis bolts.twofold:") and "saved numbers exactly" in first


def test_a_changed_source_exits_2_with_one_line_naming_the_figures(bolts):
    data, target, _ = bolts
    data.write_text(data.read_text(encoding="utf-8").replace("826.0", "836.0", 1), encoding="utf-8")
    code, out, err = run("analyze", "--spec", target, "--json")
    assert code == 2 and out == ""
    assert err.count("\n") == 1
    assert "bolts.twofold: bolts.csv has changed since the analysis was saved" in err
    assert "group 1 mean: saved" in err


def test_numbers_that_differ_exit_2_naming_them(bolts):
    _, target, _ = bolts
    document = json.loads(target.read_text(encoding="utf-8"))
    document["numbers"]["effect_sizes"]["hedges_g"]["value"] = 9.5
    target.write_text(json.dumps(document), encoding="utf-8")
    code, out, err = run("analyze", "--spec", target)
    assert code == 2 and out == "" and err.count("\n") == 1
    assert "hedges_g value: saved 9.5, now" in err


def test_numbers_close_enough_exit_0_and_say_so(bolts):
    _, target, document = bolts
    edited = json.loads(target.read_text(encoding="utf-8"))
    p = edited["numbers"]["procedures"]["welch_t"]["p_value"]
    edited["numbers"]["procedures"]["welch_t"]["p_value"] = p * (1 + 3e-13)
    target.write_text(json.dumps(edited), encoding="utf-8")
    code, out, err = run("analyze", "--spec", target)
    assert code == 0, err
    assert "to within 1e-12 relative" in out.splitlines()[0]
    code, out, err = run("analyze", "--spec", target, "--json")
    assert code == 0 and json.loads(out) == document


def test_a_moved_source_is_missing_then_given_as_the_file(bolts, tmp_path):
    data, target, document = bolts
    moved = tmp_path / "archive" / "bolts.csv"
    moved.parent.mkdir()
    data.rename(moved)
    code, out, err = run("analyze", "--spec", target, "--json")
    assert code == 2 and out == ""
    assert "the data file bolts.csv was not found" in err and "NEW_PLACE --spec" in err
    code, out, err = run("analyze", moved, "--spec", target, "--json")
    assert code == 0, err
    again = json.loads(out)
    assert again["procedures"] == document["procedures"]
    assert again["spec"]["source"]["path"] == str(moved)


def test_analysis_flags_with_spec_are_refused(bolts):
    _, target, _ = bolts
    for flags in (["--seed", "5"], ["--confidence", "0.95"], ["--ordinal"], ["--value", "x"]):
        code, out, err = run("analyze", "--spec", target, *flags)
        assert code == 2 and out == "" and "leave out --" in err, flags


def test_neither_a_file_nor_a_spec_is_one_line():
    code, out, err = run("analyze", "--json")
    assert code == 2 and out == "" and "give the path of a data file" in err


def test_a_damaged_spec_is_one_line_and_exit_2(tmp_path):
    target = tmp_path / "cut.twofold"
    target.write_text('{"format": "twofold-analysis", "version": 1, "spec": {', encoding="utf-8")
    code, out, err = run("analyze", "--spec", target, "--json")
    assert (code, out) == (2, "") and err == "cut.twofold is damaged: it ends too early (the file is cut short).\n"


def test_a_failed_save_prints_nothing_else(tmp_path):
    code, out, err = run("analyze", DEMO / "bolt_strength.csv", *QUICK, "--save", tmp_path / "no" / "x.twofold")
    assert code == 2 and out == "" and "x.twofold could not be written" in err


def test_report_of_a_saved_analysis_holds_its_record(bolts, tmp_path):
    data, target, document = bolts
    page = tmp_path / "bolts.html"
    code, out, err = run("report", target, "--html", page)
    assert code == 0, err
    assert out.strip() == f"Report written to {page}"
    text = page.read_text(encoding="utf-8")
    assert text.startswith("<!DOCTYPE html>") and text.rstrip().endswith("</html>")
    assert "The saved analysis, run again" in text and "saved numbers exactly" in text
    assert document["spec"]["source"]["sha256"] in text
    assert f'<tr style=\'page-break-inside: avoid;\'><td>seed</td><td>{document["spec"]["seed"]}</td>' in text
    for caution in saved_cautions(document):
        assert html.escape(caution, quote=False) in text or caution in html.unescape(text)


def saved_cautions(document):
    return document["recommendation"]["cautions"]


def test_report_of_a_data_file_takes_the_analysis_flags(tmp_path):
    page = tmp_path / "fertiliser.html"
    code, _, err = run("report", DEMO / "fertiliser_yields.xlsx", "--html", page, *QUICK, "--seed", "11",
                       "--alternative", "greater")
    assert code == 0, err
    text = page.read_text(encoding="utf-8")
    assert "The saved analysis, run again" not in text
    # the question as the report words it (engine.report.question_text), group 1 named first
    labels = ("slow_release_t_ha", "split_dose_t_ha")
    assert html.escape(question_text("greater", labels), quote=False) in text


def test_report_refuses_a_changed_source_and_its_own_inputs_as_output(bolts, tmp_path):
    data, target, _ = bolts
    before = data.read_bytes(), target.read_bytes()
    for out_path in (data, target):
        code, out, err = run("report", target, "--html", out_path)
        assert code == 2 and "would replace" in err
    assert (data.read_bytes(), target.read_bytes()) == before
    code, _, err = run("report", DEMO / "bolt_strength.csv", "--html", tmp_path / "x.html", "--source", data)
    assert code == 2 and "not a saved analysis" in err
    data.write_bytes(data.read_bytes() + b"north_forge,830.5,104\n")
    code, out, err = run("report", target, "--html", tmp_path / "changed.html")
    assert code == 2 and "has changed" in err and not (tmp_path / "changed.html").exists()
    moved = tmp_path / "moved.csv"
    data.rename(moved)
    code, out, err = run("report", target, "--html", tmp_path / "moved.html")
    assert code == 2 and "--source NEW_PLACE" in err


def test_the_procedure_picked_in_a_saved_analysis_is_the_one_reported(bolts, tmp_path):
    _, target, document = bolts
    edited = json.loads(target.read_text(encoding="utf-8"))
    picked = next(key for key in document["procedures"] if key != document["recommendation"]["key"])
    edited["spec"]["procedure"] = picked
    target.write_text(json.dumps(edited), encoding="utf-8")
    code, out, err = run("analyze", "--spec", target)
    assert code == 0, err
    suggested = document["recommendation"]["name"]
    assert f"suggested for these data was the {suggested}" in out
    code, _, err = run("report", target, "--html", tmp_path / "picked.html")
    assert code == 0, err
    assert f"suggested for these data was the {suggested}" in (tmp_path / "picked.html").read_text(encoding="utf-8")


# -- margin questions and paired data ---------------------------------------------------------------
def _paired_parts(folder: Path) -> Path:
    """Sixteen parts, each measured in both ovens; the rows of the second oven in another order,
    one part measured in the first oven only."""
    import numpy as np

    rng = np.random.default_rng(40)
    cold = np.round(rng.normal(30, 2, 16), 2)
    hot = np.round(cold - 0.6 + rng.normal(0, 0.7, 16), 2)
    rows = [f"P{i:02d},cold,{float(v)!r}" for i, v in enumerate(cold)]
    rows += [f"P{i:02d},hot,{float(hot[i])!r}" for i in reversed(range(16))]
    rows.append("P99,cold,31.0")
    path = folder / "parts.csv"
    path.write_text("part,oven,weight\n" + "\n".join(rows) + "\n", encoding="utf-8")
    return path


@pytest.mark.parametrize("case", ["equivalence", "noninferiority_percent", "paired", "paired_equivalence"])
def test_a_margin_or_paired_analysis_saved_reopens_to_the_same_numbers(case, tmp_path):
    if case.startswith("paired"):
        data = _paired_parts(tmp_path)
        flags = ["--group", "oven", "--value", "weight", "--paired-by", "part", "--groups", "cold", "hot",
                 "--zero-rule", "pratt"]
        flags += ["--equivalence-margin", "-1:1.5"] if case == "paired_equivalence" else []
    else:
        data = Path(shutil.copy(DEMO / "bolt_strength.csv", tmp_path / "bolts.csv"))
        flags = (["--equivalence-margin", "25"] if case == "equivalence"
                 else ["--noninferiority-margin", "3%", "--worse", "lower"])
    target = tmp_path / "run.twofold"
    code, out, err = run("analyze", data, *flags, *QUICK, "--json", "--save", target)
    assert code == 0, err
    document = json.loads(out)
    loaded = saved.load(target)
    assert loaded.spec.to_dict() == document["spec"]
    if "paired" in case:
        assert loaded.spec.design == "paired" and loaded.spec.pair_column == "part"
        assert loaded.spec.zero_rule == "pratt"
        assert {"paired_d_z", "paired_d_av"} <= set(loaded.numbers["effect_sizes"])
    if case != "paired":
        assert loaded.spec.question.margin is not None
        verdicts = loaded.numbers["margins"]
        assert verdicts and {key: v["case"] for key, v in verdicts.items()} == \
            {key: v["case"] for key, v in document["margin_verdicts"].items()}
    else:
        assert "margins" not in loaded.numbers
    again = saved.reopen(loaded)
    assert again.status == "same", again.differences
    # --spec runs it again: the same document, and the schema accepts it
    code, out, err = run("analyze", "--spec", target, "--json")
    assert code == 0 and err == ""
    assert json.loads(out) == document
    jsonschema.validate(json.loads(out), analysis_schema())
    code, out, err = run("analyze", "--spec", target)
    assert code == 0, err
    assert "saved numbers exactly" in out.splitlines()[0]
    design = "Design: two independent groups." if "paired" not in case else "Paired: "
    assert out.count(design) == 1
    page = tmp_path / "run.html"
    code, out, err = run("report", target, "--html", page)
    assert code == 0, err
    assert "saved numbers exactly" in page.read_text(encoding="utf-8")


def test_a_saved_margin_analysis_whose_verdict_was_edited_is_refused(tmp_path):
    data = Path(shutil.copy(DEMO / "bolt_strength.csv", tmp_path / "bolts.csv"))
    target = tmp_path / "run.twofold"
    assert run("analyze", data, "--equivalence-margin", "25", *QUICK, "--save", target)[0] == 0
    document = json.loads(target.read_text(encoding="utf-8"))
    key, verdict = next(iter(document["numbers"]["margins"].items()))
    verdict["yes"] = not verdict["yes"]
    target.write_text(json.dumps(document), encoding="utf-8")
    code, out, err = run("analyze", "--spec", target)
    assert code == 2 and out == "" and err.count("\n") == 1
    assert f"{key} margin yes: saved" in err
