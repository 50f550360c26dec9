"""The headless command on the demo files and on bad input."""

import io
import json
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from scipy import stats

from engine.cli import main

DEMO = Path(__file__).resolve().parents[2] / "demo_files"


def run(*argv):
    out, err = io.StringIO(), io.StringIO()
    code = main(list(argv), out=out, err=err)
    return code, out.getvalue(), err.getvalue()


def run_json(*argv):
    code, out, err = run(*argv, "--json", "--resamples", "500", "--seed", "3")
    assert code == 0, err
    return json.loads(out)


def test_long_csv_gives_groups_counts_and_summaries_as_pandas_does():
    document = run_json("analyze", str(DEMO / "bolt_strength.csv"), "--value", "strength_mpa",
                        "--group", "supplier")
    frame = pd.read_csv(DEMO / "bolt_strength.csv")
    first, second = frame["supplier"].drop_duplicates().tolist()[:2]
    assert document["groups"] == [first, second]
    for label, summary in zip(document["groups"], document["summary"]):
        values = frame.loc[frame["supplier"] == label, "strength_mpa"].dropna().to_numpy()
        # reference: pandas/numpy on the same column
        assert summary["n"] == values.size
        assert summary["mean"] == pytest.approx(values.mean(), rel=1e-12)
        assert summary["sd"] == pytest.approx(values.std(ddof=1), rel=1e-10)
        assert summary["median"] == pytest.approx(np.median(values), rel=1e-12)
        assert summary["q1"] == pytest.approx(np.quantile(values, 0.25), rel=1e-12)
    x = frame.loc[frame["supplier"] == first, "strength_mpa"].to_numpy()
    y = frame.loc[frame["supplier"] == second, "strength_mpa"].to_numpy()
    # reference: scipy.stats.ttest_ind(x, y, equal_var=False)
    welch = document["procedures"]["welch_t"]
    assert welch["p_value"] == pytest.approx(stats.ttest_ind(x, y, equal_var=False).pvalue, rel=1e-10)
    for member in ("procedures", "effect_sizes", "diagnostics", "recommendation"):
        assert document[member]
    assert document["recommendation"]["key"] in document["procedures"]


def test_groups_option_orders_the_difference():
    forward = run_json("analyze", str(DEMO / "bolt_strength.csv"), "--value", "strength_mpa", "--group", "supplier")
    a, b = forward["groups"]
    backward = run_json("analyze", str(DEMO / "bolt_strength.csv"), "--value", "strength_mpa",
                        "--group", "supplier", "--groups", b, a)
    assert backward["groups"] == [b, a]
    assert backward["procedures"]["welch_t"]["estimate"] == pytest.approx(-forward["procedures"]["welch_t"]["estimate"])


def test_wide_workbook_uses_the_two_columns_as_groups():
    frame = pd.read_excel(DEMO / "fertiliser_yields.xlsx", engine="calamine")
    a, b = frame.columns[:2]
    document = run_json("analyze", str(DEMO / "fertiliser_yields.xlsx"), "--value", a, "--value", b)
    assert document["groups"] == [a, b]
    # reference: pandas' own reader, blanks dropped
    assert document["n"] == [int(frame[a].notna().sum()), int(frame[b].notna().sum())]


def test_junk_cells_are_counted_not_dropped_silently():
    document = run_json("analyze", str(DEMO / "adhesive_cure_times.csv"))
    excluded = document["excluded"]
    assert excluded["missing"] >= 1 and excluded["non_numeric"] >= 1
    assert sum(document["n"]) + sum(excluded.values()) >= 40


def test_readable_summary_without_json():
    code, out, err = run("analyze", str(DEMO / "bolt_strength.csv"), "--resamples", "300", "--seed", "1")
    assert code == 0, err
    assert "bolt_strength.csv" in out and "Welch" in out


@pytest.mark.parametrize("argv, words", [
    (["analyze", "no_such_file.csv"], "no_such_file.csv"),
    (["analyze", str(DEMO / "bolt_strength.csv"), "--value", "torque", "--group", "supplier"], "torque"),
    (["analyze", str(DEMO / "bolt_strength.csv"), "--value", "strength_mpa", "--group", "supplier",
      "--groups", "north_forge", "west_forge"], "west_forge"),
    (["analyze", str(DEMO / "bolt_strength.csv"), "--confidence", "1.5"], "confidence"),
    (["analyze"], "path"),
])
def test_bad_input_is_one_line_and_exit_code_2(argv, words):
    code, out, err = run(*argv)
    assert code == 2
    assert out == ""
    assert err.count("\n") == 1 and words in err
    assert "Traceback" not in err


def test_text_only_value_column_and_tiny_group(tmp_path):
    path = tmp_path / "tiny.csv"
    path.write_text("site,yield\nA,1.5\nA,2.5\nB,3.0\n")
    code, _, err = run("analyze", str(path), "--value", "yield", "--group", "site")
    assert code == 2 and "B" in err
    path.write_text("site,yield\nA,low\nA,high\nB,low\nB,mid\n")
    code, _, err = run("analyze", str(path), "--value", "yield", "--group", "site")
    assert code == 2 and "yield" in err


def test_huge_values_print_no_numpy_warning(tmp_path):
    # 3.5 and 1e308 in one group: the SD (about 7.07e307) fits a float, and the command's stderr
    # stays empty (no RuntimeWarning reaches the terminal); run as the user runs it
    import subprocess
    import sys

    path = tmp_path / "huge.csv"
    path.write_text("g,v\na,3.5\na,1e308\nb,1\nb,2\nb,3\n")
    root = Path(__file__).resolve().parents[2]
    done = subprocess.run([sys.executable, "-m", "engine", "analyze", str(path), "--value", "v",
                           "--group", "g", "--resamples", "200", "--seed", "1"],
                          capture_output=True, text=True, cwd=root, timeout=120)
    assert done.returncode == 0, done.stderr
    assert done.stderr == ""
    assert "SD 7.07e+307" in done.stdout  # the true SD of 3.5 and 1e308, not infinity


def test_a_failed_suggested_procedure_leaves_the_rest_reported(monkeypatch):
    from engine.procedures import t

    def broken(*args, **kwargs):
        raise ValueError("a solver gave up")

    monkeypatch.setattr(t, "welch_t", broken)
    monkeypatch.setattr(t, "pooled_t", broken)
    code, out, err = run("analyze", str(DEMO / "bolt_strength.csv"), "--value", "strength_mpa",
                         "--group", "supplier", "--resamples", "200", "--seed", "1")
    assert code == 0, err
    assert "[warning] The Welch t-test could not be computed: a solver gave up." in out
    assert "[warning] The pooled t-test could not be computed: a solver gave up." in out
    assert "Mann-Whitney" in out


def test_plain_output_shows_the_suggestion_its_reasons_alternatives_and_cautions():
    code, out, err = run("analyze", str(DEMO / "bolt_strength.csv"), "--resamples", "300", "--seed", "1")
    assert code == 0, err
    document = run_json("analyze", str(DEMO / "bolt_strength.csv"))
    recommendation = document["recommendation"]
    lines = out.splitlines()
    assert f"Suggested procedure: {recommendation['name']}" in lines
    for reason in recommendation["reasons"]:
        assert f"- {reason}" in lines
    for caution in recommendation["cautions"]:
        assert f"- {caution}" in lines
    for name in document["procedures"]:
        assert document["procedures"][name]["name"].lower() in out.lower()
    assert "read the reasons above" not in out
    assert "north_forge minus south_forge" in out


class PanicException(BaseException):
    """Stands for pyo3_runtime.PanicException, a BaseException that a Rust panic raises."""


def test_an_unforeseen_error_is_one_line_naming_the_file(monkeypatch):
    import engine.io

    def panics(path, sheet=None):
        raise PanicException("index out of bounds: the len is 3 but the index is " + "9" * 5000)

    monkeypatch.setattr(engine.io, "read_table", panics)
    code, out, err = run("analyze", str(DEMO / "bolt_strength.csv"))
    assert code == 1 and out == ""
    assert err.count("\n") == 1 and "bolt_strength.csv" in err and "PanicException" in err
    assert len(err) < 400 and "Traceback" not in err


def test_a_reader_that_stops_early_gets_no_error_message(tmp_path):
    # `python -m engine analyze FILE | head -3`: the pipe closes while the report is written
    import subprocess
    import sys

    demo = Path(__file__).parents[2] / "demo_files" / "bolt_strength.csv"
    command = f"{sys.executable} -m engine analyze '{demo}' --resamples 200 --seed 1 | head -1"
    done = subprocess.run(["bash", "-c", command], capture_output=True, text=True, timeout=120,
                          cwd=Path(__file__).parents[2])
    assert done.stdout == "File: bolt_strength.csv\n"
    assert done.stderr == ""
