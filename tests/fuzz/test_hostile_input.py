"""Bad input to the newer parts of the headless command (summaries, several outcomes), each run
as a user would run it: exit code 2, one line on stderr naming what and where, nothing on
stdout, and the user's file unchanged."""

from __future__ import annotations

import hashlib
import io
import sys
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

HERE = Path(__file__).resolve().parent
ROOT = HERE.parents[1]
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from engine.cli import main  # noqa: E402
from engine.errors import ColumnProblem, DataProblem  # noqa: E402
from engine.outcomes import Outcome, long_outcomes, outcomes_from_file  # noqa: E402
from engine.spec import AnalysisSpec, Source  # noqa: E402

QUICK = ["--resamples", "200", "--seed", "3"]


def run(argv):
    out, err = io.StringIO(), io.StringIO()
    code = main([str(a) for a in argv], out=out, err=err)
    return code, out.getvalue(), err.getvalue()


def digest(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def refused(argv, file: Path, *expected: str) -> str:
    """Run ``argv``; check the promise for bad input and that the line says each of ``expected``."""
    before = digest(file)
    code, out, err = run(argv)
    assert code == 2, err
    assert out == ""
    assert err.endswith("\n") and err.count("\n") == 1, err
    assert "Traceback" not in err
    for part in expected:
        assert part in err, err
    assert digest(file) == before
    return err


@pytest.fixture(scope="module")
def lots(tmp_path_factory) -> Path:
    """Bolts of three lots measured two ways (invented), one text column, one column blank in a lot."""
    rng = np.random.default_rng(5)
    n = 10
    frame = pd.DataFrame({"lot": ["east"] * n + ["west"] * n + ["north"] * n,
                          "strength": rng.normal(800, 20, 3 * n).round(1),
                          "hardness": rng.normal(250, 5, 3 * n).round(0),
                          "inspector": [f"i{k % 4}" for k in range(3 * n)]})
    frame["blank_west"] = np.where(frame["lot"] == "west", np.nan, rng.normal(3, 1, 3 * n).round(2))
    path = tmp_path_factory.mktemp("hostile") / "bolt_lots.csv"
    frame.to_csv(path, index=False)
    return path


@pytest.fixture(scope="module")
def by_column(tmp_path_factory) -> Path:
    """One column per group (invented rods measured two ways by two gauges)."""
    rng = np.random.default_rng(6)
    frame = pd.DataFrame({name: rng.normal(12, 0.02, 8).round(3)
                          for name in ("gauge_a_1", "gauge_b_1", "gauge_a_2", "gauge_b_2")})
    path = tmp_path_factory.mktemp("hostile") / "rods.csv"
    frame.to_csv(path, index=False)
    return path


# --- several outcomes ------------------------------------------------------------------------

def test_group_column_that_is_not_there_is_refused_before_any_outcome_runs(lots):
    refused(["analyze", lots, "--group", "batch", "--outcomes", "strength", "hardness", *QUICK], lots,
            "bolt_lots.csv", "no group column 'batch'")


def test_three_groups_without_a_choice_is_refused_in_one_line(lots):
    # before: every outcome became a row "not analysed" and the command ended with exit code 0
    refused(["analyze", lots, "--group", "lot", "--outcomes", "strength", "hardness", *QUICK], lots,
            "bolt_lots.csv", "None of the 2 outcomes could be analysed", "3 groups")


def test_a_group_label_not_in_the_file_is_refused_in_one_line(lots):
    refused(["analyze", lots, "--group", "lot", "--groups", "east", "south", "--outcomes", "strength",
             *QUICK], lots, "bolt_lots.csv", "'south'")


def test_outcomes_that_all_fail_for_their_own_reasons_are_refused(lots):
    err = refused(["analyze", lots, "--group", "lot", "--groups", "east", "west", "--outcomes",
                   "inspector", "blank_west", *QUICK], lots, "bolt_lots.csv", "'inspector'")
    assert "1 other outcome could not be analysed for another reason" in err


def test_one_failing_outcome_among_good_ones_keeps_its_row(lots):
    code, out, err = run(["analyze", lots, "--group", "lot", "--groups", "east", "west", "--outcomes",
                          "strength", "blank_west", *QUICK])
    assert code == 0 and err == ""
    assert "blank_west: not analysed: " in out and "bolt_lots.csv" in out


def test_the_same_column_for_both_groups_is_refused(by_column):
    refused(["analyze", by_column, "--outcome-columns", "first", "gauge_a_1", "gauge_a_1",
             "--outcome-columns", "second", "gauge_a_2", "gauge_b_2", *QUICK], by_column,
            "rods.csv", "'first' names the column 'gauge_a_1' for both groups")


def test_two_outcomes_of_the_same_columns_are_refused(by_column, lots):
    refused(["analyze", by_column, "--outcome-columns", "first", "gauge_a_1", "gauge_b_1",
             "--outcome-columns", "again", "gauge_a_1", "gauge_b_1", *QUICK], by_column,
            "rods.csv", "'first' and 'again' compare the same columns")
    with pytest.raises(ColumnProblem, match="compare the same column;"):
        outcomes_from_file(AnalysisSpec(source=Source(str(lots)), group_column="lot",
                                        groups=("east", "west"), resamples=200, seed=3),
                           [Outcome("strength", ("strength",)), Outcome("again", ("strength",))])


def test_the_engine_refuses_a_run_with_nothing_analysed(lots):
    spec = AnalysisSpec(source=Source(str(lots)), group_column="lot", resamples=200, seed=3)
    with pytest.raises(DataProblem, match=r"bolt_lots\.csv") as caught:
        outcomes_from_file(spec, long_outcomes(["strength"]))
    assert "\n" not in caught.value.message and "3 groups" in caught.value.message


# --- summaries -------------------------------------------------------------------------------

@pytest.mark.parametrize("text, expected", [
    ("label,n,N,mean,sd\nA,12,40,41.2,3.1\nB,15,15,38.0,4.4\n", "two columns are named 'n'"),
    ("label,n,mean,sd\nA,12,41.2,3.1\nA,15,38.0,4.4\n", "rows 2 and 3: both groups are labelled 'A'"),
    ("label,n,mean,sd,sd_known\nA,12,41.2,3.1,yes\nB,15,38.0,4.4,no\n", "rows 2 and 3, column sd_known"),
    ("label,n,mean,sd\nA,12,41.2,0\nB,15,38.0,0\n", "rows 2 and 3, column sd"),
    ("label,n,mean,sd\nA,1e30,41.2,3.1\nB,15,38.0,4.4\n", "row 2: The count n"),
    ("label,n,mean,sd\nA,1_000,41.2,3.1\nB,15,38.0,4.4\n", "row 2, column n: '1_000'"),
])
def test_bad_summary_file_gives_one_line_naming_file_and_row(tmp_path, text, expected):
    path = tmp_path / "certificate.csv"
    path.write_text(text, encoding="utf-8")
    refused(["analyze", "--summary-file", path], path, "certificate.csv", expected)


@pytest.mark.parametrize("first, expected", [
    ("A n=1_000 mean=41.2 sd=3.1", "n= must be a whole number"),
    ("A n=99999999999999999999999 mean=41.2 sd=3.1", "up to 9,007,199,254,740,992"),
])
def test_bad_summary_string_gives_one_line(tmp_path, first, expected):
    # no file here: a file of the test stands in to show nothing is written anywhere near it
    witness = tmp_path / "witness.csv"
    witness.write_text("x\n1\n", encoding="utf-8")
    refused(["analyze", "--summary", first, "--summary", "B n=15 mean=38.0 sd=4.4"], witness, expected)
