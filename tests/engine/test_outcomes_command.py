"""The command's outcome flags refused in one line where they would be ignored or cannot apply
(with a saved analysis, see test_saved_outcomes.py), and a --same-procedure key checked before
anything is read."""

from __future__ import annotations

import io
import json
from pathlib import Path

import pytest

from engine.cli import main

DEMO = Path(__file__).resolve().parents[2] / "demo_files"
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