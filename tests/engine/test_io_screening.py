"""engine.io.make_groups and its screening report: every cell accounted for, odd values flagged."""

from __future__ import annotations

import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from engine.io import Exclusion, Intake, ScreeningReport, make_groups, propose_layout, read_table
from engine.results import Groups

DEMO = Path(__file__).resolve().parents[2] / "demo_files"
REASONS = ("missing", "non_numeric", "infinite", "set_aside")


def _table(tmp_path, text, name="data.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return read_table(path)


def _keys(report: ScreeningReport) -> list[str]:
    return [finding.key for finding in report.findings]


def test_exclusions_carry_row_column_and_text(tmp_path):
    text = ("supplier,strength\n"    # file row 1
            "north,812.5\n"          # 2
            "south,799.0\n"          # 3
            "north,\n"               # 4 blank
            "south,12;5\n"           # 5 not a number
            "north,inf\n"            # 6 infinite
            "south,n/a\n"            # 7 missing marker
            "north,845.2\n"          # 8
            "south,830.7\n"          # 9
            "north,833.3\n")         # 10
    table = _table(tmp_path, text)
    intake = make_groups(table, values="strength", group="supplier")
    assert isinstance(intake, Intake) and isinstance(intake.groups, Groups)
    report = intake.screening
    assert report.rows_read == 9
    assert report.labels == ("north", "south")
    assert report.n_used == (3, 2)
    assert dict(report.excluded_counts) == {"missing": 2, "non_numeric": 1, "infinite": 1, "set_aside": 0}
    assert report.exclusions == (
        Exclusion(2, 4, "strength", "north", "missing", ""),
        Exclusion(3, 5, "strength", "south", "non_numeric", "12;5"),
        Exclusion(4, 6, "strength", "north", "infinite", "inf"),
        Exclusion(5, 7, "strength", "south", "missing", "n/a"),
    )
    np.testing.assert_array_equal(intake.groups.x, [812.5, 845.2, 833.3])
    np.testing.assert_array_equal(intake.groups.y, [799.0, 830.7])
    np.testing.assert_array_equal(intake.rows[0], [0, 6, 8])
    np.testing.assert_array_equal(intake.rows[1], [1, 7])
    assert "non_numeric" in _keys(report) and "infinite" in _keys(report) and "missing" in _keys(report)
    texts = " ".join(f.text for f in report.findings)
    assert "row 5 '12;5'" in texts


def test_rows_point_back_to_the_frame(tmp_path):
    rng = np.random.default_rng(3)
    values = np.round(rng.normal(40, 5, 40), 2)
    labels = rng.choice(["A", "B"], 40)
    rows = "".join(f"{g},{v}\n" for g, v in zip(labels, values))
    table = _table(tmp_path, "g,v\n" + rows)
    intake = make_groups(table, values="v", group="g")
    for k, sample in enumerate((intake.groups.x, intake.groups.y)):
        np.testing.assert_array_equal(table.frame["v"].to_numpy()[intake.rows[k]], sample)
    # reference: pandas boolean selection on the same frame
    np.testing.assert_array_equal(intake.groups.x, table.frame.loc[table.frame["g"] == labels[0], "v"])


def test_pick_sets_group_one(tmp_path):
    table = _table(tmp_path, "g,v\nA,1\nB,2\nC,3\nA,4\nB,5\nC,6\n")
    intake = make_groups(table, values="v", group="g", pick=("C", "A"))
    assert intake.groups.labels == ("C", "A")
    np.testing.assert_array_equal(intake.groups.x, [3, 6])
    assert intake.screening.other_group_rows == 2
    assert "other_groups" in _keys(intake.screening)


def test_labels_are_trimmed_with_a_note(tmp_path):
    table = _table(tmp_path, "g,v\nA,1\nA ,2\n B,3\nB,4\na,5\n", name="trim.csv")
    intake = make_groups(table, values="v", group="g", pick=("A", "B"))
    assert intake.groups.n == (2, 2)
    keys = _keys(intake.screening)
    assert keys.count("labels_trimmed") == 2 and "labels_case" in keys


def test_rows_without_a_label(tmp_path):
    table = _table(tmp_path, "g,v\nA,1\n,2\nB,3\nA,4\nB,5\n")
    report = make_groups(table, values="v", group="g").screening
    assert report.excluded_counts["missing"] == 1
    assert report.exclusions == (Exclusion(1, 3, "g", None, "missing", "2"),)
    assert "no_label" in _keys(report)


def test_set_aside_cells(tmp_path):
    table = _table(tmp_path, "g,v\nA,1\nB,2\nA,3\nB,4\nA,5\nB,6\n")
    intake = make_groups(table, values="v", group="g",
                         set_aside={(2, "v"): "gauge slipped", (40, "v"): "no such row", (0, "g"): "label"})
    assert intake.groups.n == (2, 3)
    report = intake.screening
    assert report.excluded_counts["set_aside"] == 1
    assert report.exclusions == (Exclusion(2, 4, "v", "A", "set_aside", "gauge slipped"),)
    assert "set_aside" in _keys(report) and "set_aside_unused" in _keys(report)


def test_counts_are_complete_beyond_the_listed_thousand(tmp_path):
    rows = "".join(f"{'AB'[i % 2]},{'x' if i % 3 == 0 else i}\n" for i in range(3000))
    report = make_groups(_table(tmp_path, "g,v\n" + rows), values="v", group="g").screening
    assert report.excluded_counts["non_numeric"] == 1000
    rows = "".join(f"{'AB'[i % 2]},{'x' if i % 3 else i}\n" for i in range(3000))
    report = make_groups(_table(tmp_path, "g,v\n" + rows, "many.csv"), values="v", group="g").screening
    assert report.excluded_counts["non_numeric"] == 2000
    assert len(report.exclusions) == 1000
    assert set(report.excluded_counts) == set(REASONS)


def test_wide_layout_with_unequal_lengths(tmp_path):
    table = _table(tmp_path, "slow,split\n7.5,7.1\n7.9,\n8.1,6.8\n8.3,\n8.0,\n7.7,\n")
    intake = make_groups(table, values=("slow", "split"))
    assert intake.groups.labels == ("slow", "split")
    assert intake.groups.n == (6, 2)
    report = intake.screening
    assert report.excluded_counts["missing"] == 4
    keys = _keys(report)
    assert "shorter_column" in keys  # the blank tail, said plainly
    assert "missing" in keys  # the one blank cell inside the column (file row 3)
    assert [e.file_row for e in report.exclusions] == [3, 5, 6, 7]
    reversed_pick = make_groups(table, values=("slow", "split"), pick=("split", "slow"))
    assert reversed_pick.groups.labels == ("split", "slow")


def test_duplicate_rows_match_pandas(tmp_path):
    rng = np.random.default_rng(11)
    frame = pd.DataFrame({"g": rng.choice(["A", "B"], 60), "v": rng.integers(1, 6, 60).astype(float)})
    path = tmp_path / "dups.csv"
    frame.to_csv(path, index=False)
    report = make_groups(read_table(path), values="v", group="g").screening
    # reference: pandas.DataFrame.duplicated(keep="first")
    assert report.duplicate_rows == int(frame.duplicated().sum())
    assert report.duplicate_rows > 0 and "duplicate_rows" in _keys(report)


@pytest.mark.slow
def test_duplicate_rows_on_a_large_frame_match_pandas(tmp_path):
    rng = np.random.default_rng(12)
    n = 60_000
    frame = pd.DataFrame({"g": rng.choice(["A", "B"], n), "v": np.round(rng.normal(50, 5, n), 1),
                          "w": rng.normal(0, 1, n)})
    frame.loc[[100, 5000, 40000], ["g", "v", "w"]] = frame.loc[[7, 8, 9], ["g", "v", "w"]].to_numpy()
    path = tmp_path / "big.csv"
    frame.to_csv(path, index=False)
    report = make_groups(read_table(path), values="v", group="g").screening
    expected = pd.read_csv(path).duplicated().sum()  # reference: pandas on the file as written
    assert report.duplicate_rows == expected == 3


def test_duplicate_rows_of_tied_columns_with_signed_zeros_and_blanks_match_pandas(tmp_path):
    # every column repeats values (rounded data), so no single column can rule repeats out
    rng = np.random.default_rng(13)
    n = 70_000
    frame = pd.DataFrame({"g": rng.choice(["A", "B"], n), "v": np.round(rng.normal(50, 5, n), 0),
                          "w": np.round(rng.normal(0, 1, n), 1), "k": rng.integers(0, 50, n)})
    frame.loc[10, "w"], frame.loc[20, "w"] = 0.0, -0.0
    frame.loc[[20], ["g", "v", "k"]] = frame.loc[[10], ["g", "v", "k"]].to_numpy()
    frame.loc[[30, 31], "w"] = np.nan
    frame.loc[[31], ["g", "v", "k"]] = frame.loc[[30], ["g", "v", "k"]].to_numpy()
    path = tmp_path / "tied.csv"
    frame.to_csv(path, index=False)
    report = make_groups(read_table(path), values="v", group="g").screening
    # reference: pandas.DataFrame.duplicated on the file as written (it takes -0.0 as 0.0)
    expected = int(pd.read_csv(path).duplicated().sum())
    assert report.duplicate_rows == expected and expected >= 2


def test_blank_value_rows_are_not_duplicates(tmp_path):
    report = make_groups(_table(tmp_path, "g,v\nA,\nA,\nA,1\nB,2\nB,3\nA,4\n"), values="v", group="g").screening
    assert report.duplicate_rows == 0


def test_far_out_value_is_flagged_not_removed(tmp_path):
    rng = np.random.default_rng(5)
    a = np.round(rng.normal(830, 15, 30), 1)
    a[7] = 990.0
    b = np.round(rng.normal(820, 15, 30), 1)
    rows = "".join(f"A,{v}\n" for v in a) + "".join(f"B,{v}\n" for v in b)
    intake = make_groups(_table(tmp_path, "g,v\n" + rows), values="v", group="g")
    assert intake.groups.n == (30, 30)  # nothing removed
    # reference: Tukey's far-out fences Q3 + 3 IQR with numpy's default (type 7) quartiles
    q1, q3 = np.quantile(a, [0.25, 0.75])
    expected = np.flatnonzero((a > q3 + 3 * (q3 - q1)) | (a < q1 - 3 * (q3 - q1)))
    slips = intake.screening.possible_slips
    assert len(slips) == expected.size >= 1
    assert all(s.group == 0 and s.key == "possible_slip" for s in slips)
    assert "Row 9 " in slips[0].text and "990" in slips[0].text


def test_shifted_decimal_point_is_flagged(tmp_path):
    values = [41.2, 38.5, 44.0, 39.9, 42.7, 40.1, 43.3, 37.8, 402.0, 41.9]
    rows = "".join(f"A,{v}\n" for v in values) + "".join(f"B,{v - 3}\n" for v in values[:8])
    report = make_groups(_table(tmp_path, "g,v\n" + rows), values="v", group="g").screening
    assert len(report.possible_slips) == 1
    assert "10 times the group median" in report.possible_slips[0].text
    assert "misplaced decimal point" in report.possible_slips[0].text



@pytest.mark.parametrize("scale", [1.0, 1e306])
def test_slips_near_the_largest_float_are_found_as_at_scale_one(tmp_path, scale):
    # reference: the rule of possible_slips' docstring worked by hand at scale 1 (numpy's type 7
    # quartiles 0.9925 and 1.045): 100.0 is 100 times the median and shifted back falls inside
    # the fences; every other value lies inside them. Near 1e308 the fences and the shifted
    # values go past the largest float, which numpy reported as overflow warnings.
    values = [1.00, 1.02, 0.98, 1.01, 0.99, 1.03, 0.97, 100.0, 1.05, 1.1]
    rows = "".join(f"A,{v * scale!r}\n" for v in values) + "".join(f"B,{v * scale!r}\n" for v in values[:7])
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        report = make_groups(_table(tmp_path, "g,v\n" + rows), values="v", group="g").screening
    assert len(report.possible_slips) == 1
    assert "Row 9 " in report.possible_slips[0].text
    assert "100 times the group median" in report.possible_slips[0].text

def test_no_slips_in_clean_normal_data(tmp_path):
    rng = np.random.default_rng(8)
    rows = "".join(f"{'AB'[i % 2]},{v:.2f}\n" for i, v in enumerate(rng.normal(100, 10, 200)))
    report = make_groups(_table(tmp_path, "g,v\n" + rows), values="v", group="g").screening
    assert report.possible_slips == ()


def test_paired_sign_from_ids_in_both_groups(tmp_path):
    rows = "".join(f"S{i:02d},before,{50 + i}.5\n" for i in range(10))
    rows += "".join(f"S{i:02d},after,{52 + i}.5\n" for i in range(10))
    report = make_groups(_table(tmp_path, "subject,stage,load\n" + rows), values="load", group="stage").screening
    assert report.paired is not None and report.paired.severity == "warning"
    assert "every ID appears once" in report.paired.text
    assert report.findings[-1] is report.paired


def test_paired_sign_in_wide_layout(tmp_path):
    rows = "".join(f"{i},{50 + i}.5,{51 + i}.25\n" for i in range(1, 9))
    report = make_groups(_table(tmp_path, "specimen,before,after\n" + rows), values=("before", "after")).screening
    assert report.paired is not None and report.paired.key == "paired"


def test_no_paired_sign_for_one_id_per_row(tmp_path):
    rows = "".join(f"{i},{'AB'[i % 2]},{50 + i}.5\n" for i in range(1, 21))
    report = make_groups(_table(tmp_path, "bolt_id,supplier,strength\n" + rows),
                         values="strength", group="supplier").screening
    assert report.paired is None


def test_report_is_frozen(tmp_path):
    report = make_groups(_table(tmp_path, "g,v\nA,1\nB,2\nA,3\nB,4\n"), values="v", group="g").screening
    with pytest.raises(AttributeError):
        report.rows_read = 3
    with pytest.raises(TypeError):
        report.excluded_counts["missing"] = 3


# -- demo files ---------------------------------------------------------------------------------

def _demo(name):
    table = read_table(DEMO / name)
    proposal = propose_layout(table)
    values = proposal.value_columns[0] if proposal.layout == "long" else proposal.value_columns[:2]
    return table, proposal, make_groups(table, values=values, group=proposal.group_column)


def test_demo_bolt_strength():
    table, proposal, intake = _demo("bolt_strength.csv")
    assert (proposal.layout, proposal.group_column, proposal.value_columns[0]) == ("long", "supplier", "strength_mpa")
    assert intake.groups.labels == ("north_forge", "south_forge")
    assert intake.groups.n == (32, 30)
    assert sum(intake.screening.excluded_counts.values()) == 0
    assert intake.screening.paired is None and intake.screening.duplicate_rows == 0
    # reference: pandas groupby on the same file
    means = pd.read_csv(DEMO / "bolt_strength.csv").groupby("supplier")["strength_mpa"].mean()
    assert intake.groups.x.mean() == pytest.approx(means["north_forge"], rel=1e-12)


def test_demo_fertiliser_yields():
    table, proposal, intake = _demo("fertiliser_yields.xlsx")
    assert table.sheet_names == ("yields", "about")
    assert proposal.layout == "wide"
    assert intake.groups.labels == ("slow_release_t_ha", "split_dose_t_ha")
    assert intake.groups.n == (18, 15)
    assert intake.screening.excluded_counts["missing"] == 3
    assert "shorter_column" in _keys(intake.screening)


def test_demo_adhesive_cure_times():
    table, proposal, intake = _demo("adhesive_cure_times.csv")
    assert (table.delimiter, table.decimal) == (";", ",")
    assert intake.groups.labels == ("batch_17", "batch_18")
    assert intake.groups.n == (22, 23)
    counts = intake.screening.excluded_counts
    assert (counts["missing"], counts["non_numeric"]) == (3, 2)
    assert sorted(e.text for e in intake.screening.exclusions) == ["", "", "45.8", "?", "n/a"]
    slips = intake.screening.possible_slips
    assert len(slips) == 1 and slips[0].group == 1 and "decimal point" in slips[0].text


@pytest.mark.slow
def test_large_groups_are_screened_on_a_subsample_of_quartiles(tmp_path):
    rng = np.random.default_rng(21)
    n = 250_000
    values = np.round(rng.normal(40.0, 2.0, n), 3)
    values[123_456] = 412.5  # one misplaced decimal point
    frame = pd.DataFrame({"bolt_id": np.arange(n), "batch": np.where(np.arange(n) % 2, "b1", "b2"), "cure": values})
    path = tmp_path / "large.csv"
    frame.to_csv(path, index=False)
    report = make_groups(read_table(path), values="cure", group="batch").screening
    # reference: exact Tukey far-out fences from numpy on each full group
    expected = 0
    for label in ("b2", "b1"):
        group = values[frame["batch"].to_numpy() == label]
        q1, q3 = np.quantile(group, [0.25, 0.75])
        expected += int(np.count_nonzero((group > q3 + 3 * (q3 - q1)) | (group < q1 - 3 * (q3 - q1))))
    assert len(report.possible_slips) == expected
    assert any("412.5" in slip.text and "decimal point" in slip.text for slip in report.possible_slips)
    assert report.duplicate_rows == 0 and report.paired is None


def test_paired_sign_in_wide_layout_with_a_blank_cell(tmp_path):
    # before and after on the same specimens, one reading missing: still paired
    rows = "".join(f"{i},{50 + i}.5,{'' if i == 3 else f'{51 + i}.25'}\n" for i in range(1, 9))
    report = make_groups(_table(tmp_path, "specimen,before,after\n" + rows), values=("before", "after")).screening
    assert report.paired is not None and report.paired.text.startswith("7 rows hold a value of 'before'")


def test_a_label_column_with_every_label_once_is_not_a_group_column(tmp_path):
    # each site is a row of its own: the site names the rows, and the layout is wide
    table = _table(tmp_path, "site,before,after\nA,12.5,12.9\nB,11.8,12.1\nC,13.0,13.4\nD,12.2,12.6\n")
    proposal = propose_layout(table)
    assert proposal.layout == "wide" and proposal.group_column is None
    assert proposal.value_columns == ("before", "after")


def test_paired_sign_from_a_text_column_that_names_each_row(tmp_path):
    table = _table(tmp_path, "site,before,after\nA,12.5,12.9\nB,11.8,12.1\nC,13.0,\nD,12.2,12.6\nE,12.9,13.1\n")
    report = make_groups(table, values=("before", "after")).screening
    assert report.paired is not None and "'site' names each row" in report.paired.text


def test_paired_sign_matches_text_ids_written_with_stray_spaces(tmp_path):
    rows = "".join(f"S{i:02d},before,{50 + i}.5\n" for i in range(10))
    rows += "".join(f"S{i:02d} ,after,{52 + i}.5\n" for i in range(10))  # the same IDs, a space after
    report = make_groups(_table(tmp_path, "subject,stage,load\n" + rows), values="load", group="stage").screening
    assert report.paired is not None and "every ID appears once" in report.paired.text


def test_repeats_of_a_label_and_a_rating_are_expected_by_chance(tmp_path):
    # a two-column 1-7 rating file: with 2 x 7 possible rows, most of 200 rows repeat another
    rng = np.random.default_rng(86)
    frame = pd.DataFrame({"group": rng.choice(["A", "B"], 200), "score": rng.integers(1, 8, 200)})
    path = tmp_path / "ratings.csv"
    frame.to_csv(path, index=False)
    report = make_groups(read_table(path), values="score", group="group").screening
    assert report.duplicate_rows == int(frame.duplicated().sum()) > 100  # reference: pandas
    finding = next(f for f in report.findings if f.key == "duplicate_rows")
    assert finding.severity == "info" and "copied" not in finding.text
    assert "expected by chance" in finding.text


@pytest.mark.parametrize("kind", ["identifier", "fine values"])
def test_repeats_that_chance_does_not_give_ask_about_copying(tmp_path, kind):
    rng = np.random.default_rng(87)
    n = 300
    frame = pd.DataFrame({"group": rng.choice(["A", "B"], n), "yield": np.round(rng.normal(50, 5, n), 5)})
    if kind == "identifier":
        frame.insert(0, "plot", np.arange(1, n + 1))
        frame["yield"] = np.round(frame["yield"], 0)  # coarse values: only the ID rules chance out
    frame = pd.concat([frame, frame.iloc[[5, 17]]], ignore_index=True)  # two rows pasted again
    path = tmp_path / "pasted.csv"
    frame.to_csv(path, index=False)
    report = make_groups(read_table(path), values="yield", group="group").screening
    assert report.duplicate_rows == int(frame.duplicated().sum()) == 2  # reference: pandas
    finding = next(f for f in report.findings if f.key == "duplicate_rows")
    assert finding.severity == "note" and "copied in twice" in finding.text


def test_pairs_by_chance_is_the_birthday_count():
    # a label with two equal halves and a text value spread evenly over 7 levels in each half:
    # the birthday problem gives 2 * C(n/2, 2) / 7 expected pairs of equal rows
    from engine.io import repeats

    class _Frame:  # the least a table offers the function
        def __init__(self, frame):
            self.frame = frame

        def factors(self, name):
            return pd.factorize(self.frame[name])[0], None

    n = 140
    frame = pd.DataFrame({"g": ["A"] * (n // 2) + ["B"] * (n // 2),
                          "v": np.tile(list("abcdefg"), n // 7)})
    expected = repeats.pairs_by_chance(_Frame(frame), np.arange(n))
    assert expected == pytest.approx(2 * (n // 2) * (n // 2 - 1) / 2 / 7, rel=1e-12)
    # numbers on a grid of step h from a bell curve: sum p^2 = h / (2 sqrt(pi) sd), the
    # integral of the squared normal density times h (a textbook identity)
    rng = np.random.default_rng(5)
    frame = pd.DataFrame({"g": ["A"] * 1000, "v": np.round(rng.normal(0, 2, 1000), 1)})
    sd = np.std(frame["v"])
    assert repeats.pairs_by_chance(_Frame(frame), np.arange(1000)) == pytest.approx(
        1000 * 999 / 2 * 0.1 / (2 * np.sqrt(np.pi) * sd), rel=1e-6)
    # an identifier column rules chance out
    frame["id"] = np.arange(1000)
    assert repeats.pairs_by_chance(_Frame(frame), np.arange(1000)) == 0.0


def test_pairs_by_chance_for_values_near_the_largest_float_is_the_same_count():
    # numbers of size 1e307 on a grid of step 1e306: their squares overflow a float, yet the
    # birthday count is the one of the same numbers in units of 1e306, h / (2 sqrt(pi) sd)
    # (the textbook identity of the test above), with no overflow warning on the way
    from engine.io import repeats

    class _Frame:
        def __init__(self, frame):
            self.frame = frame

        def factors(self, name):
            return pd.factorize(self.frame[name])[0], None

    rng = np.random.default_rng(11)
    units = np.round(rng.normal(0, 20, 1000))
    frame = pd.DataFrame({"g": ["A"] * 1000, "v": units * 1e306})
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        expected = repeats.pairs_by_chance(_Frame(frame), np.arange(1000))
        # two values at the ends of the float range: their gap is no grid step (shares are used)
        ends = repeats.pairs_by_chance(_Frame(pd.DataFrame({"g": ["A"] * 4, "v": [-1.7e308, 1.7e308] * 2})),
                                       np.arange(4))
        # one group near 1.5e308, the other twelve equal values (whose SD is rounding alone)
        mixed = pd.DataFrame({"g": ["A"] * 11 + ["B"] * 12,
                              "v": list(1.37e308 + np.arange(11) * 3e306) + [4.6] * 12})
        both = repeats.pairs_by_chance(_Frame(mixed), np.arange(23))
    assert expected == pytest.approx(1000 * 999 / 2 * 1.0 / (2 * np.sqrt(np.pi) * np.std(units)), rel=1e-9)
    assert both >= 12 * 11 / 2  # the twelve equal values agree for sure
    assert ends == pytest.approx(4 * 3 / 2 * 0.5, rel=1e-12)  # two values, half the rows each
