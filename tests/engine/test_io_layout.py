"""engine.io.propose_layout: which column holds the groups and which the values."""

from __future__ import annotations

import warnings

import pandas as pd
import pytest

from engine.io import LayoutProposal, propose_layout, read_table


def _table(tmp_path, text, name="data.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return read_table(path)


def test_long_layout_with_a_text_group_column(tmp_path):
    table = _table(tmp_path, "bolt_id,supplier,strength,lot\n1,north,812.5,3\n2,south,799.1,3\n"
                             "3,north ,845.2,4\n4,south,830.7,4\n")
    proposal = propose_layout(table)
    assert isinstance(proposal, LayoutProposal)
    assert proposal.layout == "long"
    assert proposal.group_column == "supplier"
    assert proposal.value_columns[0] == "strength"
    assert "bolt_id" not in proposal.value_columns  # an identifier, not a measurement
    assert proposal.levels == ("north", "south")  # trimmed, in order of first appearance
    assert any("supplier" in reason for reason in proposal.reasons)


def test_two_level_column_beats_many_levels(tmp_path):
    rows = "".join(f"{'AB'[i % 2]},{'CDEFG'[i % 5]},{i * 1.5}\n" for i in range(20))
    proposal = propose_layout(_table(tmp_path, "batch,oven,cure\n" + rows))
    assert proposal.group_column == "batch"


def test_more_than_two_levels_are_listed(tmp_path):
    rows = "".join(f"{'CDE'[i % 3]},{i * 1.5}\n" for i in range(9))
    proposal = propose_layout(_table(tmp_path, "oven,cure\n" + rows))
    assert proposal.layout == "long"
    assert proposal.levels == ("C", "D", "E")
    assert any("Pick the two groups" in reason for reason in proposal.reasons)


def test_whole_number_codes_as_groups(tmp_path):
    rows = "".join(f"{1 + i % 2},{800 + i * 1.25}\n" for i in range(10))
    proposal = propose_layout(_table(tmp_path, "regime,yield\n" + rows))
    assert proposal.layout == "long"
    assert proposal.group_column == "regime"
    assert proposal.levels == ("1", "2")
    assert proposal.value_columns == ("yield",)


def test_only_numeric_columns_is_wide(tmp_path):
    proposal = propose_layout(_table(tmp_path, "slow,split,extra\n7.5,7.1,1.2\n7.9,6.8,1.1\n8.1,,1.3\n"))
    assert proposal.layout == "wide"
    assert proposal.group_column is None
    assert proposal.value_columns[:2] == ("slow", "split")
    assert proposal.levels == ()


def test_mixed_value_column_still_counts_as_values(tmp_path):
    proposal = propose_layout(_table(tmp_path, "batch;cure\nA;12,5\nB;n/a\nA;13,0\nB;14,5\n"))
    assert (proposal.layout, proposal.group_column, proposal.value_columns) == ("long", "batch", ("cure",))


def test_one_number_column_and_no_labels(tmp_path):
    proposal = propose_layout(_table(tmp_path, "note,value\nfirst try,1.5\nsecond,2.5\nthird,3.5\nfourth,4.5\n"
                                                "fifth,5.5\nsixth,6.5\nseventh,7.5\neighth,8.5\n"))
    # eight distinct notes: could be labels, so the proposal offers the text column as groups
    assert proposal.value_columns == ("value",)


def test_workbook_wide_layout(tmp_path):
    path = tmp_path / "plots.xlsx"
    pd.DataFrame({"slow": [7.5, 7.9, 8.1], "split": [7.1, 6.8, None]}).to_excel(path, index=False)
    proposal = propose_layout(read_table(path))
    assert proposal.layout == "wide" and proposal.value_columns == ("slow", "split")


@pytest.mark.parametrize("name", ["id", "sample_id", "SpecimenID", "subject", "unit no"])
def test_identifier_names_are_not_values(tmp_path, name):
    rows = "".join(f"{i},{'AB'[i % 2]},{i * 0.7 + 3}\n" for i in range(1, 9))
    proposal = propose_layout(_table(tmp_path, f"{name},group,value\n" + rows))
    assert name not in proposal.value_columns
    assert proposal.value_columns == ("value",)


def test_distinct_whole_numbers_near_the_largest_float_are_an_identifier(tmp_path):
    # reference: the rule of _is_identifier, by hand: the codes are whole numbers, all different
    # and not in rising order, so the column is taken for an identifier; the gap between -1e308
    # and 1e308 overflowed when the sorted codes were subtracted
    codes = ["1e308", "-1e308", "1.5e308", "-1.5e308", "1.7e308", "-1.7e308", "1.1e308", "-1.1e308"]
    rows = "".join(f"{code},{'AB'[i % 2]},{i * 0.7 + 3}\n" for i, code in enumerate(codes))
    table = _table(tmp_path, "code,group,value\n" + rows)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        proposal = propose_layout(table)
    assert proposal.value_columns == ("value",)
    assert any("'code' looks like an identifier" in reason for reason in proposal.reasons)

def test_labels_that_first_appear_far_down_are_listed_in_order(tmp_path):
    # reference: the order of first appearance, counted by hand from the rows written
    rows = ["slow,7.5"] * 5000 + ["split,7.1"] * 3 + ["slow ,7.9"] + ["late,6.0"] * 2
    table = _table(tmp_path, "regime,yield\n" + "\n".join(rows) + "\n")
    assert propose_layout(table).levels == ("slow", "split", "late")


def test_whole_numbers_allow_blanks_and_infinities_but_not_fractions(tmp_path):
    table = _table(tmp_path, "plot,lot,dose\n" + "".join(
        f"{i},{'' if i % 10 == 0 else ('inf' if i == 7 else i % 4)},{i / 4}\n" for i in range(1, 3000)))
    assert table.whole_numbers("plot") and table.whole_numbers("lot")
    assert not table.whole_numbers("dose")  # 0.25, 0.5, ... (whole from row 4 on, now and then)


def test_measurements_with_fractions_are_proposed_before_whole_number_codes(tmp_path):
    # a batch number that repeats is neither an identifier nor the likely measurement
    rows = "".join(f"{b},{'north' if b % 2 else 'south'},{812.5 + b / 10}\n" for b in [3, 7, 3, 9, 7, 4])
    proposal = propose_layout(_table(tmp_path, "batch_no,supplier,strength\n" + rows))
    assert proposal.group_column == "supplier"
    assert proposal.value_columns == ("strength", "batch_no")


def test_wide_columns_keep_their_file_order(tmp_path):
    proposal = propose_layout(_table(tmp_path, "before,after\n12,12.5\n15,14.1\n12,11.9\n11,12.2\n"))
    assert proposal.layout == "wide" and proposal.value_columns == ("before", "after")


def test_a_wide_table_judges_its_number_columns_once_whatever_its_text_columns(tmp_path, monkeypatch):
    # 1,200 columns, half of them mixed text and numbers: asking about every column goes over
    # the block of number columns once (a pass per text column made 3,000 columns take minutes)
    from engine.io.table import Table

    passes = []
    judge = Table._judge_float_columns
    monkeypatch.setattr(Table, "_judge_float_columns", lambda self: passes.append(1) or judge(self))
    width = 1200
    header = ",".join(f"c{j}" for j in range(width))
    rows = [",".join(("x" if (i + j) % 3 == 0 else str(i + j)) if j % 2 else f"{i + j / 8}"
                     for j in range(width)) for i in range(1, 7)]
    table = _table(tmp_path, header + "\n" + "\n".join(rows) + "\n")
    answers = [table.whole_numbers(f"c{j}") for j in range(width)]
    assert len(passes) == 1
    # reference: pandas' own reading of the cells as numbers
    for j, answer in enumerate(answers):
        values = pd.to_numeric(table.frame[f"c{j}"], errors="coerce").dropna()
        assert answer == bool(len(values) and (values == values.round()).all()), j
