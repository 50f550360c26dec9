"""The headless command from summary statistics and on several outcomes: JSON members, plain
lines, and one line for bad input."""

from __future__ import annotations

import io
import json

import numpy as np
import pandas as pd
import pytest
from scipy import stats
from statsmodels.stats.multitest import multipletests

from engine import pipeline
from engine.cli import main
from engine.spec import AnalysisSpec, Source


def run(*argv):
    out, err = io.StringIO(), io.StringIO()
    code = main(list(argv), out=out, err=err)
    return code, out.getvalue(), err.getvalue()


A, B = "A n=12 mean=41.2 sd=3.1", "B n=15 mean=38.0 sd=4.4"


def test_summary_json_has_the_results_and_the_numbers_as_entered():
    code, out, err = run("analyze", "--summary", A, "--summary", B, "--json")
    assert code == 0 and not err
    document = json.loads(out)
    assert document["input"] == "summary" and document["groups"] == ["A", "B"]
    assert document["summary_statistics"][0] == {"label": "A", "n": 12, "mean": 41.2, "sd": 3.1,
                                                 "se": None, "sd_known": False}
    # reference: scipy.stats.ttest_ind_from_stats(41.2, 3.1, 12, 38.0, 4.4, 15, equal_var=False)
    reference = stats.ttest_ind_from_stats(41.2, 3.1, 12, 38.0, 4.4, 15, equal_var=False)
    welch = document["procedures"]["welch_t"]
    assert welch["p_value"] == pytest.approx(reference.pvalue, rel=1e-12)
    assert document["recommendation"]["key"] == "welch_t"
    assert set(document["effect_sizes"]) == {"cohen_d", "hedges_g", "glass_delta"}
    assert "mann_whitney" in document["needs_values"]
    assert {f["key"] for f in document["findings"]} >= {"shape_not_checked", "needs_values"}


def test_standard_errors_and_known_sds():
    code, out, _ = run("analyze", "--summary", "A n=12 mean=41.2 se=0.9", "--summary",
                       "B n=15 mean=38.0 se=1.1", "--json")
    assert code == 0
    assert json.loads(out)["summary_statistics"][1]["se"] == 1.1
    code, out, _ = run("analyze", "--summary", A, "--summary", B, "--sd-known", "--json")
    document = json.loads(out)
    assert document["recommendation"]["key"] == "z" and "z" in document["procedures"]


def test_summary_file_and_plain_lines(tmp_path):
    path = tmp_path / "sums.csv"
    path.write_text("label,n,mean,sd\nA,12,41.2,3.1\nB,15,38.0,4.4\n", encoding="utf-8")
    code, out, _ = run("analyze", "--summary-file", str(path))
    assert code == 0 and "Welch t-test" in out and "Hedges' g" in out and "need the values" in out


def test_saving_over_the_file_of_summaries_is_refused(tmp_path):
    # the user's file is never changed: --save naming the file it reads gives one line
    source = tmp_path / "summaries.csv"
    source.write_text("label,n,mean,sd\nA,12,41.2,3.1\nB,15,38.0,4.4\n", encoding="utf-8")
    before = source.read_bytes()
    code, out, err = run("analyze", "--summary-file", str(source), "--save", str(source))
    assert code == 2 and out == ""
    assert "would replace the file of summary statistics" in err and len(err.strip().splitlines()) == 1
    assert source.read_bytes() == before


@pytest.mark.parametrize("argv, message", [
    (["--summary", A], "give --summary twice"),
    (["--summary", A, "--summary", "B n=15 mean=x sd=1"], "mean= must be a number"),
    (["--summary", A, "--summary", B, "--value", "x"], "leave out --value"),
    (["--summary", A, "--summary", B, "--known-sd", "1", "2"], "--sd-known"),
    (["--summary", A, "--summary", "A n=15 mean=38 sd=4"], "share the label"),
])
def test_bad_summaries_give_one_line(argv, message):
    code, out, err = run("analyze", *argv)
    assert code == 2 and not out and message in err and err.count("\n") == 1


@pytest.fixture(scope="module")
def lots(tmp_path_factory):
    rng = np.random.default_rng(5)
    frame = pd.DataFrame({"lot": ["p"] * 15 + ["q"] * 15})
    for k, name in enumerate(("strength", "hardness", "elongation")):
        frame[name] = np.r_[rng.normal(k, 1, 15), rng.normal(0, 1, 15)].round(4)
    path = tmp_path_factory.mktemp("lots") / "lots.csv"
    frame.to_csv(path, index=False)
    return path


def test_outcomes_json_gives_one_result_per_outcome_and_adjusted_p(lots):
    code, out, err = run("analyze", str(lots), "--outcomes", "strength", "hardness", "elongation",
                         "--group", "lot", "--resamples", "200", "--seed", "4", "--adjust", "bh",
                         "--json")
    assert code == 0 and not err
    document = json.loads(out)
    assert document["input"] == "outcomes" and document["adjustment"] == "bh"
    outcomes = document["outcomes"]
    assert [o["name"] for o in outcomes] == ["strength", "hardness", "elongation"]
    raw = [o["p_value"] for o in outcomes]
    # reference: statsmodels.stats.multitest.multipletests(raw, method='fdr_bh' / 'holm')
    np.testing.assert_allclose([o["p_bh"] for o in outcomes], multipletests(raw, method="fdr_bh")[1], rtol=1e-12)
    np.testing.assert_allclose([o["p_holm"] for o in outcomes], multipletests(raw, method="holm")[1], rtol=1e-12)
    assert [o["finding"] for o in outcomes] == [p < 0.05 for p in (o["p_bh"] for o in outcomes)]
    # each outcome's whole document is the single-outcome run's (engine.pipeline.from_file)
    spec = AnalysisSpec(source=Source(str(lots)), group_column="lot", resamples=200, seed=4,
                        value_columns=("hardness",))
    alone = pipeline.from_file(spec=spec).analysis
    assert outcomes[1]["analysis"]["procedures"]["welch_t"]["p_value"] == alone.procedures["welch_t"].p_value
    assert outcomes[1]["result"]["key"] == outcomes[1]["key"] == alone.recommendation.key


def test_outcomes_plain_table_and_one_procedure_for_all(lots):
    code, out, _ = run("analyze", str(lots), "--outcomes", "strength", "hardness", "--group", "lot",
                       "--resamples", "200", "--same-procedure", "mann_whitney")
    assert code == 0 and out.count("Mann-Whitney") == 2 and "Holm" in out


@pytest.mark.parametrize("argv, message", [
    (["--outcomes", "strength"], "needs --group"),
    (["--outcomes", "strength", "nope", "--group", "lot"], "no column 'nope'"),
    (["--outcomes", "strength", "--group", "lot", "--adjust", "sidak"], "invalid choice"),
    (["--outcomes", "strength", "--group", "lot", "--value", "hardness"], "leave out --value"),
    (["--outcomes", "strength", "--group", "lot", "--same-procedure", "nope"], "does not answer"),
])
def test_bad_outcome_requests_give_one_line(lots, argv, message):
    code, out, err = run("analyze", str(lots), *argv)
    assert code == 2 and not out and message in err and err.count("\n") == 1
