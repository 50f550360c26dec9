"""The command with several outcomes: ``report SAVED --html`` of a saved analysis of several
outcomes (with --source for a moved data file), and the outcome flags refused in one line where
they would be ignored or cannot apply."""

from __future__ import annotations

import io
import json
import shutil
from html.parser import HTMLParser
from pathlib import Path

import pytest
from statsmodels.stats.multitest import multipletests

from engine.cli import main
from engine.rounding import format_p

DEMO = Path(__file__).resolve().parents[2] / "demo_files"
OUTCOMES = ("strength_mpa", "hardness_hv", "elongation_pct", "mass_g")
FITS = "welch_t, pooled_t, mann_whitney, brunner_munzel, permutation_mean, permutation_median, " \
       "bootstrap_mean, bootstrap_median"


def run(*argv):
    out, err = io.StringIO(), io.StringIO()
    code = main([str(a) for a in argv], out=out, err=err)
    return code, out.getvalue(), err.getvalue()


def refused(code, out, err, *words):
    assert code == 2 and out == "" and err.count("\n") == 1, (code, out, err)
    for word in words:
        assert word in err, (word, err)


class _Text(HTMLParser):
    def __init__(self) -> None:
        super().__init__()
        self.parts: list[str] = []

    def handle_data(self, data):
        self.parts.append(data)


def text_of(path: Path) -> str:
    parser = _Text()
    parser.feed(path.read_text(encoding="utf-8"))
    return " ".join(parser.parts)


@pytest.fixture
def four(tmp_path):
    data = Path(shutil.copy(DEMO / "bolts_four_ways.csv", tmp_path / "bolts.csv"))
    target = tmp_path / "four.twofold"
    code, out, err = run("analyze", data, "--outcomes", *OUTCOMES, "--group", "supplier", "--adjust", "bh",
                         "--resamples", "300", "--json", "--save", target)
    assert code == 0, err
    return data, target, json.loads(out)


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


@pytest.mark.parametrize("flags, said", [
    (["--adjust", "bh"], "--adjust is for several outcomes; add --outcomes (with --group) or --outcome-columns, "
                         "or leave it out"),
    (["--same-procedure", "welch_t"], "--same-procedure is for several outcomes"),
    (["--adjust", "bh", "--same-procedure", "welch_t"], "--adjust and --same-procedure are for several outcomes"),
])
def test_outcome_flags_without_outcomes_are_refused(flags, said):
    refused(*run("analyze", DEMO / "bolt_strength.csv", *flags), said)
    refused(*run("analyze", "--summary", "A n=12 mean=41.2 sd=3.1", "--summary", "B n=15 mean=38.0 sd=4.4",
                 *flags), said)


@pytest.mark.parametrize("key, why", [
    ("welch", "no procedure has that key (perhaps welch_t)"),
    ("nope", "no procedure has that key;"),
    ("paired_t", "it is for matched pairs"),
    ("equivalence_welch", "it is for an equivalence question"),
    ("z", "it needs the groups' known SDs (--known-sd)"),
])
def test_a_same_procedure_key_that_does_not_fit_names_the_keys_that_do(tmp_path, key, why):
    # the data file does not exist: the key is checked before anything is read
    missing = tmp_path / "not_there.csv"
    refused(*run("analyze", missing, "--outcomes", "a", "b", "--group", "g", "--same-procedure", key),
            f"--same-procedure '{key}' does not answer this question: {why}", f"the keys that fit: {FITS}")


def test_a_same_procedure_key_that_fits_runs_and_text_in_the_key_is_escaped(tmp_path):
    data = DEMO / "bolts_four_ways.csv"
    code, out, err = run("analyze", data, "--outcomes", "strength_mpa", "mass_g", "--group", "supplier",
                         "--same-procedure", "pooled_t", "--resamples", "200", "--json")
    assert code == 0, err
    assert [o["key"] for o in json.loads(out)["outcomes"]] == ["pooled_t", "pooled_t"]
    code, out, err = run("analyze", data, "--outcomes", "strength_mpa", "--group", "supplier",
                         "--same-procedure", "we\x1b[2Jlch")
    refused(code, out, err, "'we\\x1b[2Jlch'")
