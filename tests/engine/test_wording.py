"""Wording shared by every sentence: counts with the right noun, one style of capitals, plain
glosses, and no "(s)" left in any message."""

import re

import numpy as np

from engine.diagnostics import diagnose
from engine.io import make_groups, read_table
from engine.results import Groups
from engine.wording import GLOSSES, capital, plural


def test_plural_agrees_with_the_count():
    assert plural(1, "cell") == "1 cell"
    assert plural(0, "cell") == "0 cells"
    assert plural(2345, "row") == "2,345 rows"
    assert plural(1, "was", number=False) == "was" and plural(3, "was", number=False) == "were"
    assert plural(2, "a number", "numbers", number=False) == "numbers"


def test_capital_starts_a_label_and_keeps_the_rest():
    assert capital("pooled t-test") == "Pooled t-test"
    assert capital("Welch t-test") == "Welch t-test"
    assert capital("") == ""


def test_screening_counts_read_in_the_singular_and_the_plural(tmp_path):
    path = tmp_path / "batches.csv"
    path.write_text("g,v\nA,1.5\nA,about 2\nA,2.5\nB,3.0\nB,about 3\nB,x\nB,3.5\nC,9\n", encoding="utf-8")
    findings = make_groups(read_table(path), values="v", group="g", pick=("A", "B")).screening.findings
    text = " ".join(f.text for f in findings)
    assert "(s)" not in text
    assert "1 cell of 'v' (group 'A') is not a number and was left out" in text
    assert "2 cells of 'v' (group 'B') are not numbers and were left out" in text
    assert "1 row belongs to other groups" in text


def test_outlier_counts_leave_out_a_zero_and_say_what_the_range_is():
    x = np.append(np.linspace(9, 11, 30), 30.0)  # one value far beyond 3 IQR, none just beyond 1.5
    findings = diagnose(Groups(("a", "b"), x, np.linspace(9, 11, 30))).findings
    outliers = next(f.text for f in findings if f.key == "outliers" and f.group == 0)
    assert "(s)" not in outliers and not re.search(r"\b0 (value|more)", outliers)
    assert "has a value far from the rest: 1 value more than 3 times the interquartile range" in outliers
    assert "width of the middle half of the values" in outliers


def test_unequal_spreads_say_what_a_rank_result_then_means():
    rng = np.random.default_rng(4)
    findings = diagnose(Groups(("a", "b"), rng.normal(10, 1, 40), rng.normal(10, 5, 40))).findings
    spread = next(f.text for f in findings if f.key == "spread")
    assert "unsafe here" in spread and "not a shift" in spread


def test_a_possible_slip_gives_both_quartiles_with_the_same_decimals(tmp_path):
    values = [15.55, 20.1, 31.0, 45.2, 60.75, 80.0, 95.3, 109.127, 100.4, 99.0, 88.8, 20000.0]
    path = tmp_path / "q.csv"
    path.write_text("g,v\n" + "".join(f"A,{v}\nB,{v + 1}\n" for v in values), encoding="utf-8")
    slips = make_groups(read_table(path), values="v", group="g").screening.possible_slips
    quartiles = re.search(r"quartiles (\S+) and (\S+)\)", slips[0].text).groups()
    # reference: numpy's default (type 7) quartiles of the group, in one precision
    expected = np.quantile(values, [0.25, 0.75])
    decimals = [len(q.split(".")[1]) if "." in q else 0 for q in quartiles]
    assert decimals[0] == decimals[1]  # one precision (not "15.55 and 109.127")
    assert all(abs(float(q) - e) <= 0.5 * 10.0 ** -decimals[0] + 1e-9 for q, e in zip(quartiles, expected))
    assert "IQR" not in slips[0].text


def test_glosses_are_plain_sentences():
    for word in ("skewness", "excess kurtosis", "interquartile range", "density"):
        assert GLOSSES[word].endswith(".") and len(GLOSSES[word]) < 260


def test_a_possible_slip_is_shown_as_written_near_a_billion(tmp_path):
    values = [1e9 + v for v in (10.5, 11.25, 9.75, 10.0, 10.75, 11.0, 9.5, 10.25)] + [999999970.125]
    path = tmp_path / "offset.csv"
    path.write_text("g,v\n" + "".join(f"A,{v!r}\nB,{v + 1!r}\n" for v in values), encoding="utf-8")
    slips = make_groups(read_table(path), values="v", group="g").screening.possible_slips
    assert slips and "999999970.125 lies" in slips[0].text  # not "1e+09"
    first, second = re.search(r"quartiles (\S+) and (\S+)\)", slips[0].text).groups()
    assert first != second
