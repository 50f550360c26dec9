"""``python -m engine plan``: the three questions, JSON, pilot files, curves, and one line for bad input."""

import io
import json

import pytest
from statsmodels.stats.power import TTestIndPower

from engine.cli import main


def _run(*argv):
    out, err = io.StringIO(), io.StringIO()
    code = main(["plan", *argv], out=out, err=err)
    return code, out.getvalue(), err.getvalue()


def test_sample_size_power_and_smallest_difference_from_the_command():
    code, out, err = _run("--difference", "5", "--sd", "6", "--power", "0.8", "--unit", "MPa")
    assert code == 0 and err == ""
    assert out.startswith("With 24 units per group, a Welch t-test at the two-sided 5% level has 80.6% power "
                          "to detect a difference of 5 MPa if the SD is 6 MPa in both groups.")
    assert "Sample size: 24 per group" in out
    code, out, _ = _run("--difference", "5", "--sd", "6", "--n", "20", "--procedure", "pooled", "--json")
    document = json.loads(out)
    # statsmodels TTestIndPower().power(5 / 6, 20, 0.05)
    assert document["answer"]["power"] == pytest.approx(TTestIndPower().power(5 / 6, 20, 0.05), abs=1e-10)
    assert document["find"] == "power" and document["inputs"]["procedure"] == "pooled"
    code, out, _ = _run("--sd", "6", "--n", "20", "--power", "0.8", "--procedure", "pooled", "--json")
    answer = json.loads(out)["answer"]
    assert answer["difference"] / 6 == pytest.approx(
        TTestIndPower().solve_power(nobs1=20, alpha=0.05, power=0.8), rel=1e-6)


def test_margins_paired_and_simulations_from_the_command():
    code, out, _ = _run("--sd", "6", "--power", "0.8", "--equivalence-margin=-3:4", "--json")
    document = json.loads(out)
    assert code == 0 and document["inputs"]["margin"] == {"low": -3.0, "high": 4.0, "worse": None}
    assert document["inputs"]["question"] == "equivalent" and document["answer"]["n1"] > 2
    code, out, _ = _run("--sd", "6", "--n", "40", "--noninferiority-margin", "3", "--worse", "lower")
    assert code == 0 and "not worse than group 2 by more than 3 (lower values being worse)" in out
    code, out, _ = _run("--difference", "2", "--sd", "3", "--power", "0.9", "--paired",
                        "--procedure", "mann_whitney", "--simulations", "1000", "--seed", "3", "--json")
    document = json.loads(out)
    assert document["method"] == "simulation" and document["answer"]["seed"] == 3
    assert document["procedure_name"] == "Wilcoxon signed-rank test"
    assert document["answer"]["monte_carlo_se"] > 0


def test_pilot_file_and_curve(tmp_path):
    pilot = tmp_path / "pilot.csv"
    rows = ["supplier,strength"] + [f"north,{50 + (i * 7) % 11}" for i in range(20)] + \
           [f"south,{47 + (i * 5) % 13}" for i in range(25)]
    pilot.write_text("\n".join(rows) + "\n", encoding="utf-8")
    before = pilot.read_bytes()
    code, out, err = _run("--difference", "3", "--n", "30", "--pilot", str(pilot), "--group", "supplier",
                          "--value", "strength", "--simulations", "1000", "--seed", "1", "--curve", "n",
                          "--points", "4", "--json")
    assert code == 0, err
    document = json.loads(out)
    assert document["inputs"]["pilot"] == {"source": "pilot.csv", "labels": ["north", "south"], "n": [20, 25]}
    assert len(document["curve"]["x"]) == 4 and len(document["curve"]["monte_carlo_se"]) == 4
    assert "north" in document["sentence"] and "resampled" in document["sentence"]
    assert pilot.read_bytes() == before


@pytest.mark.parametrize("argv, message", [
    (("--difference", "5", "--sd", "6"), "Give two of --difference, --n and --power"),
    (("--difference", "5", "--sd", "6", "--n", "10", "--power", "0.8"), "Give two of"),
    (("--difference", "5", "--power", "0.8"), "Give the SD"),
    (("--difference", "5", "--sd", "6", "--power", "0.8", "--level", "0.95"), "--level is the test's level"),
    (("--difference", "5", "--sd", "6", "--power", "0.8", "--alternative", "less"), "must be below 0"),
    # the margins are parsed as analyze parses them (engine.question_flags: one wording)
    (("--sd", "6", "--power", "0.8", "--equivalence-margin", "x"), "--equivalence-margin x: 'x' is not a number"),
    (("--sd", "6", "--power", "0.8", "--noninferiority-margin", "two", "--worse", "lower"),
     "--noninferiority-margin two: 'two' is not a number"),
    (("--sd", "6", "--power", "0.8", "--noninferiority-margin", "2"), "needs --worse lower or --worse higher"),
    (("--sd", "6", "--power", "0.8", "--worse", "lower"), "--worse goes with --noninferiority-margin"),
    (("--sd", "6", "--power", "0.8", "--noninferiority-margin=-1:2", "--worse", "lower"), "not LOW:HIGH"),
    (("--sd", "6", "--power", "0.8", "--equivalence-margin", "1:2:3"), "with one colon"),
    (("--sd", "6", "--power", "0.8", "--equivalence-margin", "0"), "leaves no room"),
    (("--sd", "6", "--power", "0.8", "--equivalence-margin", "5%"), "a percentage is of group 2's mean"),
    (("--sd", "6", "--power", "0.8", "--equivalence-margin", "5", "--alternative", "less"),
     "--alternative does not go with --equivalence-margin"),
    (("--difference", "5", "--sd", "6", "--power", "0.8", "--value", "a"), "--pilot FILE"),
    (("--difference", "5", "--n", "10", "--pilot", "no_such_file.csv"), "no_such_file.csv"),
    (("--difference", "5", "--sd", "6", "--power", "0.8", "--procedure", "anova"), "invalid choice"),
])
def test_bad_input_is_one_line_and_exit_code_2(argv, message):
    code, out, err = _run(*argv)
    assert code == 2 and out == ""
    assert err.count("\n") == 1 and message in err and "Traceback" not in err


def test_pilot_from_a_saved_analysis(tmp_path):
    import shutil
    from pathlib import Path

    data = tmp_path / "bolts.csv"
    shutil.copy(Path(__file__).resolve().parents[2] / "demo_files" / "bolt_strength.csv", data)
    saved = tmp_path / "bolts.twofold"
    assert main(["analyze", str(data), "--save", str(saved), "--resamples", "200", "--seed", "1"],
                out=io.StringIO(), err=io.StringIO()) == 0
    code, out, err = _run("--pilot", str(saved), "--difference", "10", "--n", "20",
                          "--simulations", "500", "--seed", "2", "--json")
    assert code == 0, err
    document = json.loads(out)
    assert document["inputs"]["pilot"]["source"] == "bolts.twofold"
    assert document["inputs"]["pilot"]["labels"] == ["north_forge", "south_forge"]
    data.write_text(data.read_text(encoding="utf-8") + "north_forge,1\n", encoding="utf-8")
    code, out, err = _run("--pilot", str(saved), "--difference", "10", "--n", "20")
    assert code == 2 and out == "" and err.count("\n") == 1 and err.startswith("bolts.twofold: ")
