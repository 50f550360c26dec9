"""``python -m engine plan --pilot SAVED_SUMMARY.twofold``: a plan from a pilot's summary statistics
equals the plan from the raw pilot's SDs, sizes and difference (checked against statsmodels'
power functions, test-only), and what would need the values is refused in one line."""

import io
import json
import math
from pathlib import Path

import numpy as np
import pytest
from statsmodels.stats.power import NormalIndPower, TTestIndPower

from engine import pipeline, saved
from engine.cli import main
from engine.group_stats import GroupStats
from engine.planning import Plan, SummaryPilot, plan_study
from engine.question import Margin, Question
from engine.spec import AnalysisSpec, Statements
from engine.summary_analysis import analyze_summaries

DEMO = Path(__file__).resolve().parents[2] / "demo_files" / "bolt_strength.csv"


def _run(*argv):
    out, err = io.StringIO(), io.StringIO()
    code = main(["plan", *argv], out=out, err=err)
    return code, out.getvalue(), err.getvalue()


@pytest.fixture(scope="module")
def raw():
    """The bolt demo's two groups of values: the raw pilot."""
    return pipeline.from_file(None, AnalysisSpec(source=pipeline.source_for(DEMO), seed=1,
                                                 resamples=200)).analysis.groups


def _saved(folder, raw, *, as_se=False, known=False):
    """The raw pilot's summary statistics saved as an analysis of summaries."""
    stats = [GroupStats.of_values(label, values) for label, values in zip(raw.labels, (raw.x, raw.y))]
    if as_se:
        stats = [GroupStats(s.label, s.n, s.mean, se=s.sd / math.sqrt(s.n)) for s in stats]
    if known:
        stats = [GroupStats(s.label, s.n, s.mean, sd=s.sd, sd_known=True) for s in stats]
    path = folder / "pilot_summary.twofold"
    saved.save(path, analyze_summaries(stats, AnalysisSpec()))
    return path


def _raw_figures(raw):
    """The SDs, the pooled SD and the difference of the raw values, by numpy."""
    x, y = np.asarray(raw.x, dtype=float), np.asarray(raw.y, dtype=float)
    s1, s2 = np.std(x, ddof=1), np.std(y, ddof=1)
    pooled = math.sqrt(((x.size - 1) * s1**2 + (y.size - 1) * s2**2) / (x.size + y.size - 2))
    return s1, s2, pooled, float(x.mean() - y.mean()), x.size, y.size


def test_welch_sample_size_from_summaries_is_the_plan_from_the_raw_sds(tmp_path, raw):
    path = _saved(tmp_path, raw)
    before = path.read_bytes()
    code, out, err = _run("--pilot", str(path), "--power", "0.8", "--json")
    assert code == 0, err
    document = json.loads(out)
    s1, s2, _, difference, _, _ = _raw_figures(raw)
    expected = plan_study(Plan("n", difference=difference, sd=s1, sd2=s2, power=0.8))
    assert document["find"] == "n" and document["answer"]["n1"] == expected.n1
    assert document["answer"]["power"] == pytest.approx(expected.power, rel=1e-12)
    assert document["inputs"]["sd1"] == pytest.approx(s1, rel=1e-12)
    assert document["inputs"]["summaries"]["taken"] == ["sd1", "sd2", "difference"]
    assert document["inputs"]["summaries"]["labels"] == list(raw.labels) and document["inputs"]["pilot"] is None
    assert path.read_bytes() == before


def test_pooled_power_at_the_pilots_sizes_is_statsmodels(tmp_path, raw):
    path = _saved(tmp_path, raw)
    code, out, err = _run("--pilot", str(path), "--procedure", "pooled", "--json")
    assert code == 0, err
    document = json.loads(out)
    _, _, pooled, difference, n1, n2 = _raw_figures(raw)
    # statsmodels TTestIndPower().power(d, nobs1, alpha, ratio): the pooled t-test's exact power
    reference = TTestIndPower().power(difference / pooled, n1, 0.05, ratio=n2 / n1)
    assert document["find"] == "power" and (document["answer"]["n1"], document["answer"]["n2"]) == (n1, n2)
    assert document["answer"]["power"] == pytest.approx(reference, abs=1e-10)
    assert document["inputs"]["summaries"]["taken"] == ["sd1", "sd2", "difference", "n1", "n2"]


def test_a_one_sided_sample_size_turns_the_observed_difference_the_way_asked(tmp_path, raw):
    path = _saved(tmp_path, raw)
    _, _, pooled, difference, _, _ = _raw_figures(raw)
    for alternative, word in (("greater", "larger"), ("less", "smaller")):
        code, out, err = _run("--pilot", str(path), "--procedure", "pooled", "--power", "0.9",
                              "--alternative", alternative, "--level", "0.025", "--json")
        assert code == 0, err
        turned = abs(difference) if alternative == "greater" else -abs(difference)
        # statsmodels TTestIndPower().solve_power(d, alpha, power, alternative), rounded up
        n = TTestIndPower().solve_power(turned / pooled, alpha=0.025, power=0.9, alternative=word)
        assert json.loads(out)["answer"]["n1"] == math.ceil(n)


def test_known_sds_plan_the_z_test_and_a_standard_error_gives_the_sd(tmp_path, raw):
    s1, s2, _, difference, n1, n2 = _raw_figures(raw)
    path = _saved(tmp_path, raw, known=True)
    code, out, err = _run("--pilot", str(path), "--json")
    assert code == 0, err
    document = json.loads(out)
    assert document["inputs"]["procedure"] == "z" and document["inputs"]["summaries"]["sds_known"] is True
    if s1 == s2:  # pragma: no cover - the demo's SDs differ
        pytest.skip("equal SDs")
    # statsmodels NormalIndPower().power(d, n1, alpha, ratio=n2 / n1) takes d * sqrt(1 / (1/n1 + 1/n2))
    # as the shift of the z statistic; with two SDs that shift is difference / sqrt(s1^2/n1 + s2^2/n2),
    # so d is the difference over sqrt((s1^2/n1 + s2^2/n2) / (1/n1 + 1/n2))
    scale = math.sqrt((s1**2 / n1 + s2**2 / n2) / (1 / n1 + 1 / n2))
    assert document["answer"]["power"] == pytest.approx(
        NormalIndPower().power(difference / scale, n1, 0.05, ratio=n2 / n1), abs=1e-10)
    path = _saved(tmp_path, raw, as_se=True)
    code, out, err = _run("--pilot", str(path), "--power", "0.8")
    assert code == 0, err
    assert "(from its standard error)" in out and "Taken from them: the SDs, the difference of the means." in out
    expected = plan_study(Plan("n", difference=difference, sd=s1, sd2=s2, power=0.8))
    assert f"Sample size: {expected.n1} per group" in out


def test_margin_plans_from_summaries_expect_no_difference_unless_given(tmp_path, raw):
    path = _saved(tmp_path, raw)
    s1, s2, *_ = _raw_figures(raw)
    code, out, err = _run("--pilot", str(path), "--power", "0.8", "--equivalence-margin", "25", "--json")
    assert code == 0, err
    document = json.loads(out)
    expected = plan_study(Plan("n", sd=s1, sd2=s2, power=0.8,
                               question=Question("equivalent", 0.95, Margin.within(25))))
    assert document["answer"]["n1"] == expected.n1 and document["inputs"]["difference"] == 0
    assert "difference" not in document["inputs"]["summaries"]["taken"]
    code, out, err = _run("--pilot", str(path), "--noninferiority-margin", "10", "--worse", "lower",
                          "--difference", "2", "--n", "40", "--json")
    assert code == 0, err
    expected = plan_study(Plan("power", difference=2, sd=s1, sd2=s2, n1=40,
                               question=Question("not_worse", 0.95, Margin.not_worse_by(10, "lower"))))
    assert json.loads(out)["answer"]["power"] == pytest.approx(expected.power, rel=1e-12)


def test_the_text_says_what_came_from_the_summaries(tmp_path, raw):
    path = _saved(tmp_path, raw)
    code, out, err = _run("--pilot", str(path), "--n", "20", "--power", "0.8", "--unit", "MPa")
    assert code == 0 and err == ""
    lines = out.splitlines()
    assert lines[0] == "From the summary statistics in pilot_summary.twofold:"
    assert lines[1].startswith(f"  group 1, {raw.labels[0]}: n {raw.x.size}, mean ")
    assert "Taken from them: the SDs." in out  # the size is given, the difference found
    assert "Smallest detectable difference:" in out and "pilot showed" not in out


@pytest.mark.parametrize("extra, message", [
    (("--procedure", "mann_whitney"), "A rank test's power hangs on the shape of the values"),
    (("--shape", "skewed"), "worked out by the normal-theory formulas"),
    (("--method", "simulation"), "worked out by the normal-theory formulas"),
    (("--paired",), "do not give the spread of pair differences"),
    (("--sd", "3"), "gives the SDs from its summary statistics"),
    (("--value", "strength"), "holds summary statistics, not columns"),
    (("--power", "0.8", "--n", "10", "--difference", "3"), "Give two of --difference, --n and --power"),
])
def test_what_needs_the_values_is_refused_in_one_line(tmp_path, raw, extra, message):
    path = _saved(tmp_path, raw)
    code, out, err = _run("--pilot", str(path), *extra)
    assert code == 2 and out == ""
    assert err.count("\n") == 1 and message in err and "Traceback" not in err


@pytest.mark.parametrize("stats, extra, message", [
    (("A n=5 mean=1 sd=0", "B n=3 mean=2 sd=1"), (), "summary.twofold: the SD of group 'A' is 0"),
    (("A n=5 mean=1 sd=2", "B n=3 mean=1 sd=1"), (), "summary.twofold: the two means are the same"),
    (("A n=5 mean=1 sd=2", "B n=3 mean=1 sd=1"), ("--alternative", "less"), "the two means are the same"),
])
def test_summaries_with_nothing_to_plan_on_are_refused_naming_the_file(tmp_path, stats, extra, message):
    path = tmp_path / "summary.twofold"
    assert main(["analyze", "--summary", stats[0], "--summary", stats[1], "--save", str(path)],
                out=io.StringIO(), err=io.StringIO()) == 0
    code, out, err = _run("--pilot", str(path), *extra)
    assert code == 2 and out == "" and err.count("\n") == 1 and message in err
    code, out, err = _run("--pilot", str(path), "--difference", "1", "--sd", "2")
    assert code == 2 and "leave out --sd" in err


def test_the_summary_pilot_takes_the_pooled_sd_for_the_pooled_test(raw):
    stats = tuple(GroupStats.of_values(label, values) for label, values in zip(raw.labels, (raw.x, raw.y)))
    pilot = SummaryPilot(stats, "pilot")
    _, _, pooled, difference, _, _ = _raw_figures(raw)
    assert pilot.sds_for("pooled") == (pytest.approx(pooled, rel=1e-12), None)
    assert pilot.expected_difference("lower") == pytest.approx(-abs(difference), rel=1e-12)
    assert pilot.expected_difference("equivalent") == 0.0
    with pytest.raises(Exception, match="exactly two groups"):
        SummaryPilot(stats[:1])


def test_the_summary_plan_document_follows_its_schema(tmp_path, raw):
    # checked with the jsonschema package (a reference validator of JSON Schema draft 2020-12)
    from importlib.resources import files

    import jsonschema

    schema = json.loads((files("engine") / "schema" / "plan.schema.json").read_text(encoding="utf-8"))
    validator = jsonschema.Draft202012Validator(schema)
    path = _saved(tmp_path, raw)
    code, out, err = _run("--pilot", str(path), "--power", "0.8", "--curve", "n", "--points", "4", "--json")
    assert code == 0, err
    document = json.loads(out)
    validator.validate(document)
    document["inputs"]["summaries"]["taken"] = ["the SDs"]
    with pytest.raises(jsonschema.ValidationError):
        validator.validate(document)


def test_a_percentage_margin_is_of_group_2s_mean_in_the_pilot(tmp_path, raw):
    s1, s2, _, _, _, _ = _raw_figures(raw)
    mean2 = float(np.mean(raw.y))
    expected = plan_study(Plan("n", sd=s1, sd2=s2, power=0.8,
                               question=Question("equivalent", 0.95, Margin.within(0.03 * abs(mean2)))))
    path = _saved(tmp_path, raw)
    code, out, err = _run("--pilot", str(path), "--power", "0.8", "--equivalence-margin", "3%", "--json")
    assert code == 0, err
    document = json.loads(out)
    assert document["inputs"]["margin"]["high"] == pytest.approx(0.03 * abs(mean2), rel=1e-12)
    assert document["answer"]["n1"] == expected.n1
    assert any(note.startswith("The margin: the margin -3% to 3% of group 2's mean") for note in document["notes"])
    # a pilot of values: group 2's mean from its values
    code, out, err = _run("--pilot", str(DEMO), "--value", "strength_mpa", "--group", "supplier",
                          "--noninferiority-margin", "2%", "--worse", "lower", "--n", "20",
                          "--simulations", "200", "--seed", "4", "--json")
    assert code == 0, err
    assert json.loads(out)["inputs"]["margin"]["low"] == pytest.approx(-0.02 * abs(mean2), rel=1e-12)
