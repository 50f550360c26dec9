"""Saved analyses of several outcomes: ``analyze --outcomes ... --save``, ``analyze --spec`` of
such a file, ``report`` of it (with --source for a moved data file), the optional ``outcomes``
member, and files saved before it."""

import io
import json
import shutil
from html.parser import HTMLParser
from pathlib import Path

import pytest
from statsmodels.stats.multitest import multipletests

from engine import saved
from engine.cli import main
from engine.rounding import format_p
from engine.saved import SavedFileProblem

DEMO = Path(__file__).resolve().parents[2] / "demo_files"
OUTCOMES = ("strength_mpa", "hardness_hv", "elongation_pct", "mass_g")


def run(*argv):
    out, err = io.StringIO(), io.StringIO()
    code = main([str(a) for a in argv], out=out, err=err)
    return code, out.getvalue(), err.getvalue()


@pytest.fixture
def four(tmp_path):
    data = Path(shutil.copy(DEMO / "bolts_four_ways.csv", tmp_path / "bolts.csv"))
    target = tmp_path / "four.twofold"
    code, out, err = run("analyze", data, "--outcomes", *OUTCOMES, "--group", "supplier", "--adjust", "bh",
                         "--resamples", "300", "--json", "--save", target)
    assert code == 0, err
    return data, target, json.loads(out)


def test_the_outcomes_adjustment_and_figures_are_recorded(four):
    data, target, document = four
    written = json.loads(target.read_text(encoding="utf-8"))
    member = written["outcomes"]
    assert [o["name"] for o in member["list"]] == list(OUTCOMES)
    assert member["list"][0]["columns"] == ["strength_mpa"]
    assert member["adjustment"] == "bh" and member["procedure"] is None
    assert written["spec"]["source"]["path"] == str(data) and written["spec"]["source"]["sha256"]
    for row, shown in zip(member["figures"], document["outcomes"]):
        assert row["p_value"] == shown["p_value"] and row["p_holm"] == shown["p_holm"]
        assert row["p_bh"] == shown["p_bh"] and row["key"] == shown["key"]
    # reference: statsmodels multipletests, the adjusted p-values from the recorded raw ones
    raw = [row["p_value"] for row in member["figures"]]
    for method, key in (("holm", "p_holm"), ("fdr_bh", "p_bh")):
        expected = multipletests(raw, method=method)[1]
        for row, want in zip(member["figures"], expected):
            assert row[key] == pytest.approx(want, rel=1e-12)


def test_spec_reruns_to_identical_numbers(four):
    _, target, document = four
    code, out, err = run("analyze", "--spec", target, "--json")
    assert code == 0, err
    assert json.loads(out) == document  # every figure identical, bit for bit
    code, out, err = run("analyze", "--spec", target)
    assert code == 0, err
    assert out.startswith(f"Saved analysis {target.name}: Run again on bolts.csv, the analysis gave the "
                          "saved numbers exactly.")
    again = saved.reopen(saved.load(target))
    assert again.status == "same" and again.differences == ()


def test_one_procedure_for_all_and_the_wide_layout_round_trip(tmp_path):
    data = Path(shutil.copy(DEMO / "rod_diameters.csv", tmp_path / "rods.csv"))
    target = tmp_path / "rods.twofold"
    code, out, err = run("analyze", data, "--outcome-columns", "diameter", "caliper_mm", "laser_mm",
                         "--same-procedure", "welch_t", "--resamples", "300", "--json", "--save", target)
    assert code == 0, err
    member = saved.load(target).outcomes
    assert member["procedure"] == "welch_t" and member["list"] == [{"name": "diameter",
                                                                   "columns": ["caliper_mm", "laser_mm"]}]
    code, again, err = run("analyze", "--spec", target, "--json")
    assert code == 0, err
    assert json.loads(again) == json.loads(out)


def test_a_changed_data_file_is_said(four):
    data, target, _ = four
    data.write_text(data.read_text(encoding="utf-8").replace("814.3", "815.3", 1), encoding="utf-8")
    code, out, err = run("analyze", "--spec", target)
    assert code == 2 and out == "" and err.count("\n") == 1
    assert "has changed since the analysis was saved" in err and "strength_mpa" in err
    assert saved.reopen(saved.load(target)).status == "source_changed"


def test_a_moved_data_file_is_found_beside_the_saved_file(four, tmp_path):
    data, target, _ = four
    elsewhere = tmp_path / "moved"
    elsewhere.mkdir()
    data.rename(elsewhere / data.name)
    code, _, err = run("analyze", "--spec", target)
    assert code == 2 and "was not found" in err
    code, out, err = run("analyze", elsewhere / data.name, "--spec", target)
    assert code == 0, err


@pytest.mark.parametrize("edit, words", [
    (lambda d: d["outcomes"].update(adjustment="sidak"), "adjustment"),
    (lambda d: d["outcomes"]["figures"][1].update(p_holm="low"), "outcome 2's p_holm is not a number"),
    (lambda d: d["outcomes"]["figures"].pop(), "figures for every outcome"),
    (lambda d: d["outcomes"]["list"][0].update(columns=[]), "outcome 1"),
    (lambda d: d["outcomes"].pop("procedure"), "not list, adjustment, procedure and figures"),
])
def test_a_damaged_member_is_refused_in_one_line(four, edit, words):
    _, target, _ = four
    document = json.loads(target.read_text(encoding="utf-8"))
    edit(document)
    target.write_text(json.dumps(document), encoding="utf-8")
    with pytest.raises(SavedFileProblem) as caught:
        saved.load(target)
    message = caught.value.message
    assert message.startswith(f"{target.name} is damaged") and words in message and "\n" not in message
    code, out, err = run("analyze", "--spec", target)
    assert code == 2 and out == "" and err.count("\n") == 1


def test_a_one_outcome_file_has_no_outcomes_member_and_reopens(tmp_path):
    data = Path(shutil.copy(DEMO / "bolt_strength.csv", tmp_path / "bolts.csv"))
    target = tmp_path / "one.twofold"
    assert run("analyze", data, "--resamples", "300", "--save", target)[0] == 0
    assert "outcomes" not in json.loads(target.read_text(encoding="utf-8"))
    loaded = saved.load(target)
    assert loaded.outcomes is None and saved.reopen(loaded).status == "same"


def test_an_outcomes_file_validates_against_the_shipped_schema(four):
    import jsonschema
    from referencing import Registry, Resource

    from engine.jsonout import analysis_schema

    _, target, _ = four
    registry = Registry().with_resource("analysis.schema.json", Resource.from_contents(analysis_schema()))
    validator = jsonschema.Draft202012Validator(saved.saved_schema(), registry=registry)
    document = json.loads(target.read_text(encoding="utf-8"))
    validator.validate(document)  # jsonschema: a reference validator of JSON Schema 2020-12
    document["outcomes"]["adjustment"] = "sidak"
    assert not validator.is_valid(document)


def refused(code, out, err, *words):
    assert code == 2 and out == "" and err.count("\n") == 1, (code, out, err)
    for word in words:
        assert word in err, (word, err)


def text_of(path: Path) -> str:
    parser = _Text()
    parser.feed(path.read_text(encoding="utf-8"))
    return " ".join(parser.parts)


class _Text(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.parts: list[str] = []

    def handle_data(self, data):
        self.parts.append(data)


def test_report_of_a_saved_outcomes_file_writes_the_page(four, tmp_path):
    data, target, document = four
    page = tmp_path / "four.html"
    before = data.read_bytes(), target.read_bytes()
    code, out, err = run("report", target, "--html", page)
    assert (code, err) == (0, "") and out == f"Report written to {page}\n"
    text = text_of(page)
    assert "Run again on bolts.csv, the analysis gave the saved numbers exactly." in text
    assert "north_forge and east_works compared on 4 outcomes" in text
    raw = [o["p_value"] for o in document["outcomes"]]
    bh = multipletests(raw, method="fdr_bh")[1]  # reference: statsmodels, the adjustment the file chose
    for name, p, adjusted in zip(OUTCOMES, raw, bh):
        assert name in text
        assert format_p(p) in text and format_p(adjusted) in text
    assert "Verdict by Benjamini-Hochberg" in text
    assert (data.read_bytes(), target.read_bytes()) == before


def test_a_moved_data_file_is_given_with_source(four, tmp_path):
    data, target, _ = four
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    moved = data.rename(elsewhere / "renamed.csv")
    page = tmp_path / "four.html"
    refused(*run("report", target, "--html", page), "the data file bolts.csv was not found",
            f"python -m engine report {target} --source NEW_PLACE --html {page}")
    assert not page.exists()
    code, out, err = run("report", target, "--source", moved, "--html", page)
    assert code == 0, err
    assert "renamed.csv, found at a new place with the same checksum" in text_of(page)


def test_the_report_never_replaces_what_it_reads_nor_takes_new_choices(four, tmp_path):
    data, target, _ = four
    before = data.read_bytes(), target.read_bytes()
    refused(*run("report", target, "--html", data), "would replace bolts.csv")
    refused(*run("report", target, "--html", target), "would replace four.twofold")
    refused(*run("report", target, "--html", tmp_path / "x.html", "--confidence", "0.9"),
            "four.twofold holds every choice of its analysis; leave out --confidence")
    assert (data.read_bytes(), target.read_bytes()) == before


def test_a_changed_data_file_gives_no_report(four, tmp_path):
    data, target, _ = four
    data.write_text(data.read_text(encoding="utf-8").replace("814.3", "815.3", 1), encoding="utf-8")
    page = tmp_path / "four.html"
    refused(*run("report", target, "--html", page), "has changed since the analysis was saved")
    assert not page.exists()


@pytest.mark.parametrize("flags, said", [
    (["--adjust", "holm"], "leave out --adjust"),
    (["--same-procedure", "welch_t"], "leave out --same-procedure"),
    (["--adjust", "holm", "--same-procedure", "welch_t"], "leave out --adjust, --same-procedure"),
])
def test_outcome_flags_with_a_saved_analysis_are_refused(four, tmp_path, flags, said):
    _, target, _ = four
    refused(*run("analyze", "--spec", target, *flags), f"four.twofold holds every choice of its analysis; {said}")
    one = tmp_path / "one.twofold"
    assert run("analyze", DEMO / "bolt_strength.csv", "--resamples", "200", "--save", one)[0] == 0
    refused(*run("analyze", "--spec", one, *flags), f"one.twofold holds every choice of its analysis; {said}")
    sums = tmp_path / "sums.twofold"
    code, _, err = run("analyze", "--summary", "A n=12 mean=41.2 sd=3.1", "--summary", "B n=15 mean=38.0 sd=4.4",
                       "--save", sums)
    assert code == 0, err
    refused(*run("analyze", "--spec", sums, *flags), f"sums.twofold holds every choice of its analysis; {said}")


def test_the_plain_lines_show_each_outcome_as_the_report_does(four):
    from engine.report.outcomes_report import row_cells

    _, target, _ = four
    code, out, err = run("analyze", "--spec", target)
    assert code == 0, err
    found = saved.reopen(saved.load(target)).prepared
    lines = out.splitlines()
    for index, name in enumerate(OUTCOMES):
        line = next(line for line in lines if line.startswith(f"{name}: "))
        cells = row_cells(found, index)
        # the estimate and its interval, the Bonferroni interval, the p-values, the verdict
        assert f" {cells[3]}, together {cells[4]}; p {cells[5]}, Holm {cells[6]}, Benjamini-Hochberg {cells[7]}; " \
               f"verdict: {cells[9]}; Hedges' g {cells[8]}" in line

