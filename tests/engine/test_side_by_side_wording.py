"""Sentences of the side-by-side comparison and the findings table that name several procedures
or a probability: names that hold commas stay apart, a reason said of several reads in the
plural, and a probability is not labelled as a difference."""

import numpy as np

from engine.analysis import analyze
from engine.spec import AnalysisSpec
from engine.report import render
from engine.results import Groups
from engine.wording import name_list


def test_name_list_joins_plain_names_with_commas_and_and():
    assert name_list([]) == ""
    assert name_list(["Welch t-test"]) == "Welch t-test"
    assert name_list(["Welch t-test", "pooled t-test"]) == "Welch t-test and pooled t-test"
    assert name_list(["a", "b", "c"]) == "a, b and c"


def test_name_list_parts_names_that_hold_commas_with_semicolons():
    names = ["Welch t-test", "permutation test, difference in means", "pooled t-test"]
    assert name_list(names) == ("Welch t-test; permutation test, difference in means; "
                                "and pooled t-test")


def _separated_triplicates():
    # well-separated triplicates: the t-tests find the difference, the rank and permutation
    # tests cannot reach 0.05 with 3 + 3 values (smallest two-sided exact p = 2/20 = 0.1,
    # the number of ways to choose 3 of 6 is 20: handbook combinatorics)
    return analyze(Groups(("A", "B"), np.array([10.1, 10.3, 9.9]), np.array([20.2, 19.8, 20.1])),
                   AnalysisSpec(resamples=400, seed=1))


def test_a_disagreement_names_each_procedure_apart():
    plain = render(_separated_triplicates()).plain
    line = next(line for line in plain.splitlines() if line.startswith("The procedures disagree"))
    assert "Welch t-test and pooled t-test." in line
    # each procedure's own comma stays inside its name: the names are parted by semicolons
    assert "; permutation test, difference in means;" in line
    assert "t-test, pooled" not in line


def test_a_reason_for_several_rows_not_counted_reads_in_the_plural():
    plain = render(_separated_triplicates()).plain
    note = next(line for line in plain.splitlines()
                if line.startswith("Not counted in whether the procedures agree: Bootstrap"))
    assert note.count("Bootstrap interval") == 2
    assert ". Each gives an interval but no test" in note and ". It gives" not in note


def test_a_single_row_not_counted_keeps_the_singular():
    rng = np.random.default_rng(4)
    # spreads far apart, 8 against 25 values: the permutation tests do not vote, the
    # bootstrap does not either; every reason names its rows in the right number
    analysis = analyze(Groups(("x", "y"), rng.normal(10, 5, 8), rng.normal(12, 0.5, 25)),
                       AnalysisSpec(resamples=400, seed=1))
    notes = [line for line in render(analysis).plain.splitlines()
             if line.startswith("Not counted in whether the procedures agree:")]
    assert notes
    for note in notes:
        names = note.split(": ", 1)[1].split(". ", 1)[0]
        several = ";" in names
        assert note.split(". ", 1)[1].startswith("Each" if several else "It")


def test_the_findings_table_does_not_call_a_probability_a_difference():
    rng = np.random.default_rng(5)
    analysis = analyze(Groups(("a", "b"), rng.normal(10, 1, 15), rng.normal(11, 1, 15)),
                       AnalysisSpec(resamples=400, seed=1))
    plain = render(analysis, procedure="brunner_munzel").plain
    row = next(line for line in plain.splitlines() if line.startswith("Probability that"))
    assert "minus" not in row
    welch = render(analysis, procedure="welch_t").plain
    assert any(line.startswith("Difference in means, a minus b") for line in welch.splitlines())


def test_the_probability_row_is_named_once_without_a_nested_gloss():
    # the Brunner-Munzel name already says what it estimates (a probability); the generic
    # "(what it estimates)" gloss would nest brackets inside brackets
    rng = np.random.default_rng(3)
    groups = Groups(("a", "b"), rng.normal(1, 1, 12), rng.normal(0, 1, 12))
    analysis = analyze(groups, AnalysisSpec(resamples=200, seed=1))
    plain = render(analysis).plain
    [line] = [line for line in plain.splitlines() if line.startswith("Brunner-Munzel")]
    assert line.count("(") == 0
