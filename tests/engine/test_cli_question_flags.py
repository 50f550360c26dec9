"""The command's margin and design flags: what spec each builds, and one line for each wrong
combination (exit code 2, no traceback)."""

import io
from pathlib import Path

import pytest

from engine.cli import EXIT_BAD_INPUT, build_parser, main, spec_from_arguments
from engine.question import Margin

DEMO = Path(__file__).resolve().parents[2] / "demo_files"
BOLTS = str(DEMO / "bolt_strength.csv")


def spec_of(*flags):
    return spec_from_arguments(build_parser().parse_args(["analyze", BOLTS, *flags]))


def run(*argv):
    out, err = io.StringIO(), io.StringIO()
    code = main([str(a) for a in argv], out=out, err=err)
    return code, out.getvalue(), err.getvalue()


@pytest.mark.parametrize("flags, kind, margin", [
    (["--equivalence-margin", "0.5"], "equivalent", Margin(-0.5, 0.5, "units")),
    (["--equivalence-margin", "-0.5:0.8"], "equivalent", Margin(-0.5, 0.8, "units")),
    (["--equivalence-margin=-0.5:0.8"], "equivalent", Margin(-0.5, 0.8, "units")),
    (["--equivalence-margin", "-2e-1:.3"], "equivalent", Margin(-0.2, 0.3, "units")),
    (["--equivalence-margin", "5%"], "equivalent", Margin(-5, 5, "percent")),
    (["--equivalence-margin", "-3%:4%"], "equivalent", Margin(-3, 4, "percent")),
    (["--equivalence-margin", "-3:4", "--margin-as", "percent"], "equivalent", Margin(-3, 4, "percent")),
    (["--equivalence-margin", "0.8:1.25", "--margin-as", "ratio"], "equivalent", Margin(0.8, 1.25, "ratio")),
    (["--equivalence-margin", "1.25", "--margin-as", "ratio"], "equivalent", Margin(0.8, 1.25, "ratio")),
    (["--equivalence-margin", "0.8", "--margin-as", "ratio"], "equivalent", Margin(0.8, 1.25, "ratio")),
    (["--noninferiority-margin", "2", "--worse", "lower"], "not_worse", Margin(-2, 2, "units", "lower")),
    (["--noninferiority-margin", "4%", "--worse", "higher"], "not_worse", Margin(-4, 4, "percent", "higher")),
    (["--noninferiority-margin", "0.9", "--worse", "lower", "--margin-as", "ratio"], "not_worse",
     Margin(0.9, 1 / 0.9, "ratio", "lower")),
])
def test_margin_flags_build_the_question(flags, kind, margin):
    question = spec_of(*flags, "--confidence", "0.9").question
    assert question.kind == kind
    assert question.level == 0.9
    assert question.margin == margin


def test_without_margin_flags_the_question_is_the_difference_one():
    spec = spec_of("--alternative", "less")
    assert (spec.question.kind, spec.question.margin, spec.design) == ("lower", None, "independent")


def test_paired_flags_build_the_design():
    spec = spec_of("--paired-by", "part", "--group", "stage", "--value", "load", "--zero-rule", "pratt")
    assert (spec.design, spec.pair_column, spec.zero_rule, spec.layout) == ("paired", "part", "pratt", "long")
    spec = spec_of("--paired", "--value", "before", "--value", "after")
    assert (spec.design, spec.pair_column, spec.zero_rule, spec.layout) == ("paired", None, "drop", "wide")
    # the pair column alone says the layout is long, whatever the columns proposed later
    assert spec_of("--paired-by", "part").layout == "long"


@pytest.mark.parametrize("flags, named", [
    (["--equivalence-margin", "1", "--noninferiority-margin", "2", "--worse", "lower"],
     ["--equivalence-margin", "--noninferiority-margin"]),
    (["--worse", "lower"], ["--worse", "--noninferiority-margin"]),
    (["--equivalence-margin", "1", "--worse", "lower"], ["--worse", "--noninferiority-margin"]),
    (["--noninferiority-margin", "2"], ["--noninferiority-margin", "--worse"]),
    (["--equivalence-margin", "1", "--alternative", "less"], ["--alternative", "--equivalence-margin"]),
    (["--noninferiority-margin", "1", "--worse", "lower", "--alternative", "two-sided"],
     ["--alternative", "--noninferiority-margin"]),
    (["--margin-as", "ratio"], ["--margin-as"]),
    (["--equivalence-margin", "0.5:0.8"], ["--equivalence-margin", "either side of 0"]),
    (["--equivalence-margin", "-0.8:-0.5"], ["--equivalence-margin", "either side of 0"]),
    (["--equivalence-margin", "1.1:1.25", "--margin-as", "ratio"], ["--equivalence-margin", "either side of 1"]),
    (["--equivalence-margin", "-1:1.25", "--margin-as", "ratio"], ["--equivalence-margin", "above 0"]),
    (["--equivalence-margin", "1", "--margin-as", "ratio"], ["--equivalence-margin"]),
    (["--equivalence-margin", "0"], ["--equivalence-margin"]),
    (["--equivalence-margin", "5%", "--margin-as", "units"], ["--equivalence-margin", "--margin-as"]),
    (["--equivalence-margin", "5%", "--margin-as", "ratio"], ["--equivalence-margin", "--margin-as"]),
    (["--equivalence-margin", "-5%:3"], ["--equivalence-margin", "percentages"]),
    (["--equivalence-margin", "abc"], ["--equivalence-margin", "'abc'"]),
    (["--equivalence-margin", "inf"], ["--equivalence-margin"]),
    (["--equivalence-margin", "1:2:3"], ["--equivalence-margin", "colon"]),
    (["--equivalence-margin", ":1"], ["--equivalence-margin"]),
    (["--noninferiority-margin", "-2", "--worse", "lower"], ["--noninferiority-margin", "positive"]),
    (["--noninferiority-margin", "-1:2", "--worse", "lower"], ["--noninferiority-margin", "LOW:HIGH"]),
    (["--noninferiority-margin", "1", "--worse", "lower", "--margin-as", "ratio"], ["--noninferiority-margin"]),
    (["--noninferiority-margin", "2", "--worse", "sideways"], ["--worse"]),
    (["--equivalence-margin"], ["--equivalence-margin"]),
    (["--equivalence-margin", "1", "--confidence", "0.5"], ["level"]),
    (["--paired-by", "part", "--value", "a", "--value", "b"], ["--paired-by", "--paired"]),
    (["--paired", "--group", "supplier"], ["--paired", "--group", "--paired-by"]),
    (["--paired", "--value", "strength_mpa"], ["--paired", "--value", "--paired-by"]),
    (["--paired", "--paired-by", "part"], ["--paired", "--paired-by"]),
    (["--paired-by", "supplier", "--group", "supplier"], ["--paired-by", "--group"]),
    (["--zero-rule", "pratt"], ["--zero-rule", "--paired"]),
    (["--zero-rule", "none", "--paired"], ["--zero-rule"]),
])
def test_each_wrong_combination_gives_one_line_naming_the_flags(flags, named):
    code, out, err = run("analyze", BOLTS, *flags)
    assert code == EXIT_BAD_INPUT
    assert out == ""
    assert err.count("\n") == 1 and "Traceback" not in err
    for word in named:
        assert word in err


def test_report_takes_the_same_flags_and_refuses_the_same_combinations(tmp_path):
    code, _, err = run("report", BOLTS, "--html", tmp_path / "out.html", "--worse", "lower")
    assert code == EXIT_BAD_INPUT and err.count("\n") == 1 and "--worse" in err


def test_a_negative_margin_never_reads_as_a_flag():
    # argparse takes "-0.5:0.8" for an unknown option unless told otherwise
    for text in ("-0.5:0.8", "-3%:4%", "-5%", "-.5:.5", "-1e-2:2e-2"):
        spec = spec_of("--equivalence-margin", text)
        assert spec.question.margin.low < 0 < spec.question.margin.high


def test_a_saved_analysis_refuses_the_new_flags(tmp_path):
    data = tmp_path / "bolts.csv"
    data.write_bytes((DEMO / "bolt_strength.csv").read_bytes())
    target = tmp_path / "bolts.twofold"
    assert run("analyze", data, "--resamples", "200", "--save", target)[0] == 0
    for flags in (["--equivalence-margin", "1"], ["--noninferiority-margin", "1", "--worse", "lower"],
                  ["--paired"], ["--paired-by", "x"], ["--zero-rule", "pratt"], ["--margin-as", "units"]):
        code, out, err = run("analyze", "--spec", target, *flags)
        assert code == EXIT_BAD_INPUT and out == "" and err.count("\n") == 1
        assert "leave out" in err and flags[0] in err


@pytest.mark.parametrize("flags, named", [
    (["--summary", "a n=10 mean=5.1 sd=1.2", "--summary", "b n=12 mean=5.6 sd=1.0", "--equivalence-margin",
      "0.8:1.25", "--margin-as", "ratio"], ["--margin-as ratio", "summary statistics"]),
    (["--summary", "a n=10 mean=5.1 sd=1.2", "--summary", "b n=12 mean=5.6 sd=1.0", "--paired"],
     ["--paired", "summary statistics"]),
    ([BOLTS, "--outcomes", "strength_mpa", "--group", "supplier", "--noninferiority-margin", "3", "--worse", "lower"],
     ["--noninferiority-margin", "--worse", "several outcomes"]),
])
def test_margin_and_pair_flags_that_another_mode_would_ignore_are_refused(flags, named):
    # without the refusal the summary statistics would answer the difference question silently
    code, out, err = run("analyze", *flags)
    assert code == EXIT_BAD_INPUT and out == "" and err.count("\n") == 1
    for word in named:
        assert word in err
