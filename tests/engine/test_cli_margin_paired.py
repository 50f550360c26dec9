"""The command on equivalence, non-inferiority and paired data, against statsmodels and scipy.

Files are written in ``tmp_path`` with every value as Python's shortest round-trip text, so the
command reads exactly the numbers the references get.
"""

import dataclasses
import io
import json

import numpy as np
import pandas as pd
import pytest
from scipy import stats
from statsmodels.stats.weightstats import ttest_ind as sm_ttest_ind
from statsmodels.stats.weightstats import ttost_ind, ttost_paired

from engine import pipeline
from engine.cli import main
from engine.procedures import registry
from engine.question import Margin, Question
from engine.report.question_lines import design_lines
from engine.spec import AnalysisSpec

TIGHT = dict(rel=1e-10, abs=1e-12)



def run(*argv):
    out, err = io.StringIO(), io.StringIO()
    code = main([str(a) for a in argv], out=out, err=err)
    return code, out.getvalue(), err.getvalue()


def document_of(*argv):
    code, out, err = run("analyze", *argv, "--json", "--resamples", "400", "--seed", "11")
    assert code == 0, err
    return json.loads(out)


def write_long(path, x, y, labels=("new_press", "old_press")):
    rows = [f"{labels[0]},{float(v)!r}" for v in x] + [f"{labels[1]},{float(v)!r}" for v in y]
    path.write_text("press,thickness\n" + "\n".join(rows) + "\n", encoding="utf-8")
    return path


def write_wide(path, x, y, names=("before", "after")):
    rows = [f"{float(a)!r},{float(b)!r}" for a, b in zip(x, y)]
    path.write_text(f"{names[0]},{names[1]}\n" + "\n".join(rows) + "\n", encoding="utf-8")
    return path


@pytest.fixture
def presses(tmp_path):
    rng = np.random.default_rng(20261203)
    x = np.round(rng.normal(50.0, 1.2, 24), 4)
    y = np.round(rng.normal(50.3, 2.0, 31), 4)
    return write_long(tmp_path / "presses.csv", x, y), x, y


def _interval(result):
    return result["interval"]["low"], result["interval"]["high"]


def test_equivalence_welch_and_pooled_match_statsmodels_ttost_ind(presses):
    path, x, y = presses
    document = document_of(path, "--equivalence-margin", "1.5", "--equal-spreads-known")
    for key, usevar, equal_var in (("equivalence_welch", "unequal", False),
                                   ("equivalence_pooled", "pooled", True)):
        result = document["procedures"][key]
        # reference: statsmodels.stats.weightstats.ttost_ind(x, y, -1.5, 1.5, usevar=...)
        p, lower, upper = ttost_ind(x, y, -1.5, 1.5, usevar=usevar)
        assert result["p_value"] == pytest.approx(p, **TIGHT)
        assert result["details"]["p_lower"] == pytest.approx(lower[1], **TIGHT)
        assert result["details"]["p_upper"] == pytest.approx(upper[1], **TIGHT)
        # reference: scipy.stats.ttest_ind(...).confidence_interval at 1 - 2 alpha and 1 - alpha
        t = stats.ttest_ind(x, y, equal_var=equal_var)
        assert _interval(result) == pytest.approx(tuple(t.confidence_interval(0.90)), **TIGHT)
        verdict = document["margin_verdicts"][key]
        assert (verdict["difference_interval"]["low"], verdict["difference_interval"]["high"]) == \
            pytest.approx(tuple(t.confidence_interval(0.95)), **TIGHT)
        assert verdict["interval"] == result["interval"]
        # the duality of the two one-sided tests with the 90% interval (Schuirmann 1987)
        assert verdict["yes"] == (p < 0.05)
        assert verdict["words"] and verdict["reading"]
    assert document["question"]["kind"] == "equivalent"
    assert document["question"]["margin"]["entered_as"] == "units"


def test_an_asymmetric_negative_margin_parses_and_matches_statsmodels(presses):
    path, x, y = presses
    document = document_of(path, "--equivalence-margin", "-0.5:2.5")
    # reference: statsmodels ttost_ind(x, y, -0.5, 2.5, usevar="unequal")
    p, _, _ = ttost_ind(x, y, -0.5, 2.5, usevar="unequal")
    assert document["procedures"]["equivalence_welch"]["p_value"] == pytest.approx(p, **TIGHT)
    assert document["question"]["margin"]["entered"] == {"low": -0.5, "high": 2.5, "unit": "units", "worse": None}


def test_a_percentage_margin_is_converted_with_group_2s_mean(presses):
    path, x, y = presses
    document = document_of(path, "--equivalence-margin", "-3%:4%")
    scale = abs(y.mean()) / 100
    margin = document["question"]["margin"]
    assert margin["entered_as"] == "percent" and margin["entered"]["low"] == -3.0
    assert margin["reference_mean"] == pytest.approx(y.mean(), rel=1e-14)
    assert (margin["in_units"]["low"], margin["in_units"]["high"]) == pytest.approx((-3 * scale, 4 * scale), rel=1e-13)
    assert "%" in margin["note"] and "group 2's mean" in margin["note"]
    # reference: statsmodels ttost_ind with the margin in units
    p, _, _ = ttost_ind(x, y, -3 * scale, 4 * scale, usevar="unequal")
    assert document["procedures"]["equivalence_welch"]["p_value"] == pytest.approx(p, rel=1e-9)


@pytest.mark.parametrize("worse, alternative, value_sign", [("lower", "larger", -1), ("higher", "smaller", 1)])
def test_noninferiority_welch_matches_the_one_sided_statsmodels_test(presses, worse, alternative, value_sign):
    path, x, y = presses
    document = document_of(path, "--noninferiority-margin", "1.2", "--worse", worse)
    result = document["procedures"]["noninferiority_welch"]
    # reference: statsmodels.stats.weightstats.ttest_ind(x, y, alternative=..., usevar="unequal",
    # value=-1.2 when lower is worse, +1.2 when higher is worse)
    _, p, _ = sm_ttest_ind(x, y, alternative=alternative, usevar="unequal", value=value_sign * 1.2)
    assert result["p_value"] == pytest.approx(p, **TIGHT)
    verdict = document["margin_verdicts"]["noninferiority_welch"]
    assert verdict["yes"] == (p < 0.05)
    assert document["question"]["margin"]["entered"]["worse"] == worse


def test_a_ratio_margin_runs_the_log_procedure(tmp_path):
    rng = np.random.default_rng(5)
    x, y = np.round(rng.lognormal(2.0, 0.2, 30), 5), np.round(rng.lognormal(2.02, 0.25, 28), 5)
    document = document_of(write_long(tmp_path / "ratio.csv", x, y), "--equivalence-margin", "0.8:1.25",
                           "--margin-as", "ratio")
    assert set(document["procedures"]) == {"equivalence_log_welch"}
    # reference: statsmodels ttost_ind on the logs, margin log(0.8) to log(1.25)
    p, _, _ = ttost_ind(np.log(x), np.log(y), np.log(0.8), np.log(1.25), usevar="unequal")
    assert document["procedures"]["equivalence_log_welch"]["p_value"] == pytest.approx(p, rel=1e-9)
    assert document["question"]["margin"]["in_units"]["unit"] == "ratio"


def test_the_readable_output_says_the_margin_how_it_was_entered_and_the_verdict(presses):
    path, _, _ = presses
    code, out, err = run("analyze", path, "--equivalence-margin", "4%", "--resamples", "300", "--seed", "2")
    assert code == 0, err
    assert "Design: two independent groups." in out
    lines = out.splitlines()
    question = next(line for line in lines if line.startswith("Question: "))
    assert "equivalent within" in question and "4% of old_press's mean" in question
    # the verdict opens the findings, right under the suggestion; the margin as entered is said
    # there, once
    verdict = lines[lines.index(next(line for line in lines if line.startswith("Suggested procedure: "))) + 2]
    assert "equivalent within" in verdict.lower()
    assert out.count("Margin as entered: -4% to 4% of old_press's mean (") == 1
    assert out.count(verdict.split(":")[0]) == 1 and not any(line.startswith("Verdict") for line in lines)


def test_the_readable_output_says_the_design_of_pairs_once(gauges):
    path, _, _ = gauges
    code, out, err = run("analyze", path, "--paired", "--equivalence-margin", "0.5", "--resamples", "300",
                         "--seed", "2")
    assert code == 0, err
    assert out.count("Design") == 1 and "Design: paired" not in out
    assert out.count("Margin as entered") == 1


# -- paired -------------------------------------------------------------------------------------

@pytest.fixture
def gauges(tmp_path):
    """Twenty parts measured by two gauges; row by row."""
    rng = np.random.default_rng(77)
    before = np.round(rng.normal(12.0, 1.0, 20), 3)
    after = before + rng.normal(0.15, 0.3, 20)  # unrounded: no two differences alike
    return write_wide(tmp_path / "gauges.csv", before, after), before, after


def test_paired_row_by_row_matches_scipy_ttest_rel_and_wilcoxon(gauges):
    path, x, y = gauges
    document = document_of(path, "--paired")
    assert document["design"] == "paired" and document["n"] == [20, 20]
    paired = document["procedures"]["paired_t"]
    # reference: scipy.stats.ttest_rel(x, y)
    reference = stats.ttest_rel(x, y)
    assert paired["statistic"] == pytest.approx(reference.statistic, **TIGHT)
    assert paired["p_value"] == pytest.approx(reference.pvalue, **TIGHT)
    assert paired["df"] == reference.df
    assert _interval(paired) == pytest.approx(tuple(reference.confidence_interval(0.95)), **TIGHT)
    # reference: scipy.stats.wilcoxon(x, y, method="exact") (no ties, no zeros: the exact law)
    d = x - y
    assert np.unique(np.abs(d)).size == d.size and np.all(d != 0)
    ranks = document["procedures"]["signed_rank"]
    assert ranks["p_value"] == pytest.approx(stats.wilcoxon(x, y, method="exact").pvalue, **TIGHT)
    pairs = document["pairs"]
    assert pairs["formed_by"] == "row" and pairs["n_pairs"] == 20 and pairs["left_out"] == []
    checks = document["paired"]
    assert checks["n_pairs"] == 20
    # reference: numpy on the differences; scipy.stats.pearsonr for the correlation
    assert checks["summary"]["mean"] == pytest.approx(d.mean(), rel=1e-12)
    assert checks["summary"]["sd"] == pytest.approx(d.std(ddof=1), rel=1e-10)
    assert checks["correlation"] == pytest.approx(stats.pearsonr(x, y).statistic, rel=1e-10)
    sizes = document["effect_sizes"]
    # d_z: the mean difference over the SD of the differences (Cohen 1988, ch. 2.3)
    assert sizes["paired_d_z"]["value"] == pytest.approx(d.mean() / d.std(ddof=1), rel=1e-10)
    assert sizes["paired_d_z"]["name"] != sizes["paired_d_av"]["name"]


def test_paired_zero_rule_matches_scipy_wilcoxon_zero_methods_and_enumeration(tmp_path):
    # ties and zeros among the differences: two pairs with no difference, tied sizes
    x = np.array([5.1, 4.8, 6.2, 5.5, 5.0, 4.4, 6.1, 5.9, 5.3, 4.7, 5.8, 6.4, 5.2, 4.9, 6.0, 5.6])
    y = np.array([5.1, 4.5, 5.7, 5.5, 4.6, 4.6, 5.4, 5.1, 5.0, 4.9, 5.0, 5.9, 4.8, 4.2, 5.1, 5.2])
    path = write_wide(tmp_path / "zeros.csv", x, y)
    d = x - y
    for rule, zero_method in (("drop", "wilcox"), ("pratt", "pratt")):
        document = document_of(path, "--paired", "--zero-rule", rule)
        assert document["spec"]["zero_rule"] == rule
        ranks = document["procedures"]["signed_rank"]
        details = ranks["details"]
        # reference: scipy.stats.wilcoxon(x, y, zero_method=..., method="approx", correction=False):
        # its statistic is the smaller rank sum, its z uses the same mean and tie-corrected variance
        reference = stats.wilcoxon(x, y, zero_method=zero_method, method="approx", correction=False)
        kept = d if rule == "pratt" else d[d != 0]
        ranked = stats.rankdata(np.abs(kept))
        signed = ranked[kept != 0]
        assert min(ranks["statistic"], signed.sum() - ranks["statistic"]) == pytest.approx(reference.statistic, **TIGHT)
        z = (ranks["statistic"] - details["mean"]) / np.sqrt(details["variance"])
        assert abs(z) == pytest.approx(abs(reference.zstatistic), **TIGHT)
        # reference: brute-force enumeration of all 2^n sign patterns of the nonzero ranks
        # (mid-ranks for ties; under Pratt's rule the zeros keep their ranks and get no sign)
        patterns = (np.arange(2 ** signed.size)[:, None] >> np.arange(signed.size)) & 1
        sums = patterns @ signed
        observed = ranked[kept > 0].sum()
        p = min(1.0, 2 * min(np.mean(sums >= observed - 1e-9), np.mean(sums <= observed + 1e-9)))
        assert ranks["p_value"] == pytest.approx(p, **TIGHT)
        assert details["zeros"] == 2 and details["zero_rule"] == rule


def test_paired_equivalence_matches_statsmodels_ttost_paired(gauges):
    path, x, y = gauges
    document = document_of(path, "--paired", "--equivalence-margin", "-0.2:0.4")
    result = document["procedures"]["paired_equivalence"]
    # reference: statsmodels.stats.weightstats.ttost_paired(x, y, -0.2, 0.4)
    p, lower, upper = ttost_paired(x, y, -0.2, 0.4)
    assert result["p_value"] == pytest.approx(p, **TIGHT)
    # reference: scipy.stats.ttest_rel(x, y).confidence_interval(0.90)
    assert _interval(result) == pytest.approx(tuple(stats.ttest_rel(x, y).confidence_interval(0.90)), **TIGHT)
    assert document["margin_verdicts"]["paired_equivalence"]["yes"] == (p < 0.05)


def test_pairs_by_id_match_units_across_the_file_and_list_what_was_left_out(tmp_path):
    rng = np.random.default_rng(3)
    ids = [f"P{i:02d}" for i in range(1, 19)]
    first = dict(zip(ids, (float(v) for v in np.round(rng.normal(30, 3, 18), 2))))
    second = {k: round(v + float(rng.normal(-0.8, 1.0)), 2) for k, v in first.items()}
    rows = [(k, "cold", first[k]) for k in ids] + [(k, "hot", second[k]) for k in reversed(ids)]
    rows.append(("P99", "cold", 31.5))            # an ID in one group only
    rows.append(("P03", "hot", 29.0))             # P03 twice in the second group
    rows.append(("P05", "hot", ""))               # blank cell of a third P05 row: P05 repeated too
    rng.shuffle(rows)
    text = "part,oven,weight\n" + "\n".join(f"{a},{b},{c!r}" if c != "" else f"{a},{b}," for a, b, c in rows)
    path = tmp_path / "ovens.csv"
    path.write_text(text + "\n", encoding="utf-8")
    document = document_of(path, "--group", "oven", "--value", "weight", "--paired-by", "part",
                           "--groups", "cold", "hot")
    kept = [k for k in ids if k not in ("P03", "P05")]
    x = np.array([first[k] for k in kept])
    y = np.array([second[k] for k in kept])
    # reference: scipy.stats.ttest_rel on the pairs matched by ID with pandas
    frame = pd.DataFrame(rows, columns=["part", "oven", "weight"])
    assert set(frame["part"]) >= set(kept)
    assert document["procedures"]["paired_t"]["p_value"] == pytest.approx(stats.ttest_rel(x, y).pvalue, **TIGHT)
    pairs = document["pairs"]
    assert pairs["formed_by"] == "id_column" and pairs["pair_column"] == "part"
    assert pairs["n_pairs"] == len(kept)
    assert {item["pair_id"]: item["kind"] for item in pairs["left_out"]} == \
        {"P99": "unmatched", "P03": "repeated", "P05": "repeated"}
    file_row = {(a, b): i + 2 for i, (a, b, _) in enumerate(rows)}  # the header is file row 1
    unmatched = next(item for item in pairs["left_out"] if item["pair_id"] == "P99")
    assert unmatched["file_rows"] == [file_row[("P99", "cold")]]
    assert pairs["left_out_counts"]["unmatched"] == 1 and pairs["left_out_counts"]["repeated"] == 2
    code, out, err = run("analyze", path, "--group", "oven", "--value", "weight", "--paired-by", "part",
                         "--groups", "cold", "hot", "--resamples", "300", "--seed", "1")
    assert code == 0, err
    assert f"Paired: {len(kept)} pairs, matched by ID column 'part'" in out  # the findings' design row
    for item in pairs["left_out"]:  # each said once, with its file rows
        assert out.count(item["text"]) == 1


@pytest.mark.parametrize("flags", [["--paired"], ["--paired-by", "serial", "--group", "press", "--value", "thickness"]])
def test_data_that_cannot_be_paired_give_one_line(presses, flags):
    path, _, _ = presses
    code, out, err = run("analyze", path, *flags)
    assert code == 2 and out == "" and err.count("\n") == 1 and "Traceback" not in err


def test_when_every_margin_procedure_fails_the_command_says_so_in_one_line(presses, monkeypatch):
    path, _, _ = presses
    spec = AnalysisSpec(question=Question("equivalent", 0.95, Margin.within(1.0)))

    def fails(*args, **kwargs):
        raise ArithmeticError("a failure nobody foresaw")

    for record in registry.applicable(spec):
        monkeypatch.setattr(record.module, record.function, fails)
    code, out, err = run("analyze", path, "--equivalence-margin", "1", "--resamples", "300")
    assert code == 2 and out == "" and err.count("\n") == 1
    assert err.startswith("presses.csv: no procedure could answer this question for these data.")
    # the --json document still says what happened, in its notes
    code, out, err = run("analyze", path, "--equivalence-margin", "1", "--resamples", "300", "--json")
    assert code == 0, err
    document = json.loads(out)
    assert document["procedures"] == {} and document["margin_verdicts"] == {}
    assert {note["key"] for note in document["notes"]} == {"part_not_computed"}


def test_items_left_out_of_the_pairs_are_listed_under_the_design_when_the_screening_does_not(tmp_path):
    path = tmp_path / "rods.csv"
    path.write_text("rod,first,second\nR1,1.0,1.5\nR2,2.0,\nR3,3.0,2.0\nR4,x,4.0\nR5,5.0,5.5\nR6,6.0,6.1\n",
                    encoding="utf-8")
    spec = AnalysisSpec(value_columns=("first", "second"), layout="wide", design="paired", resamples=200)
    analysis = pipeline.from_file(path, spec).analysis
    assert design_lines(analysis) == []  # the screening's lines name them
    alone = design_lines(dataclasses.replace(analysis, screening=None))
    assert [line.split("] ")[0] for line in alone] == ["  [left out", "  [left out"]
    assert "row 3" in alone[0] and "row 5" in alone[1]  # the file rows (the header is row 1)
