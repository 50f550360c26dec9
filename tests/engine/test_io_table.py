"""engine.io.Table: built once, never changed afterwards; what it works out is handed out read-only."""

from __future__ import annotations

import ast
import copy
import dataclasses
from pathlib import Path
from typing import Mapping

import numpy as np
import pandas as pd
import pytest

from engine.io import Table, make_groups, propose_layout, read_table
from engine.io.layout import trimmed_levels

IO = Path(__file__).resolve().parents[2] / "engine" / "io"


def _bolts_csv(tmp_path: Path) -> Path:
    """Two blank lines above the names, a label with a line break inside quotes (file rows move
    down a line below it), padded labels, a blank and a text among the values."""
    rows = ["", "", "bolt_no,supplier,strength_mpa,note"]
    values = [812.5, 799.0, "", 845.25, "n/a", 830.75, 801.5, 822.0]
    for i, value in enumerate(values):
        supplier = ["north", " south", "north ", "south"][i % 4]
        note = '"re-tested,\nsame day"' if i == 2 else "ok"
        rows.append(f"{i + 1},{supplier},{value},{note}")
    path = tmp_path / "bolts.csv"
    path.write_text("\n".join(rows) + "\n", encoding="utf-8")
    return path


def _plots_xlsx(tmp_path: Path) -> Path:
    path = tmp_path / "plots.xlsx"
    frame = pd.DataFrame({"regime": ["slow", "split"] * 4,
                          "yield_t_ha": [7.5, 7.25, 7.75, 7.0, 8.0, 6.75, 7.5, 7.125]})
    with pd.ExcelWriter(path, engine="openpyxl") as writer:
        frame.to_excel(writer, sheet_name="Plots", index=False, startrow=2)
    return path


def _wide_csv(tmp_path: Path) -> Path:
    """More float columns than are judged one by one (Table judges them together)."""
    width = 1_100
    rng = np.random.default_rng(20261203)
    block = np.round(rng.normal(10.0, 1.0, (6, width)), 3)
    path = tmp_path / "wide.csv"
    pd.DataFrame(block, columns=[f"run_{j}" for j in range(width)]).to_csv(path, index=False)
    return path


def _copy(value):
    if isinstance(value, pd.DataFrame):
        return value.copy(deep=True)
    if isinstance(value, Mapping):
        return dict(value)
    return copy.deepcopy(value)


def _snapshot(table: Table) -> dict:
    """Every attribute of the table: the object itself and a copy of its value (the memo of
    what the table has worked out by identity alone: it fills as the table is used)."""
    return {name: (value, None if name == "_memo" else _copy(value)) for name, value in vars(table).items()}


def _assert_unchanged(table: Table, before: dict) -> None:
    after = vars(table)
    assert after.keys() == before.keys()
    for name, (value, copied) in before.items():
        assert after[name] is value, f"Table.{name} was replaced after the table was built"
        if isinstance(value, pd.DataFrame):
            pd.testing.assert_frame_equal(value, copied, check_exact=True)
        elif copied is not None:
            assert (dict(value) if isinstance(value, Mapping) else value) == copied, f"Table.{name} changed after the table was built"


def _use_everything(table: Table) -> None:
    """Everything the rest of the program asks of a table."""
    proposal = propose_layout(table)
    if proposal.layout == "long":
        make_groups(table, values=proposal.value_columns[0], group=proposal.group_column)
    else:
        make_groups(table, values=list(proposal.value_columns[:2]))
    for column in table.frame.columns:
        table.numbers(column)
        table.factors(column)
        trimmed_levels(table, column)
        table.whole_numbers(column)
        table.strictly_rising(column)
    [table.file_row(row) for row in range(len(table.frame))]


@pytest.mark.parametrize("make", [_bolts_csv, _plots_xlsx, _wide_csv])
def test_a_table_does_not_change_after_it_is_built(tmp_path, make):
    table = read_table(make(tmp_path))
    before = _snapshot(table)
    _use_everything(table)
    _assert_unchanged(table, before)
    with pytest.raises(dataclasses.FrozenInstanceError):
        table.rows_above = 0  # type: ignore[misc]


def test_row_numbers_count_blank_lines_names_and_breaks_inside_cells(tmp_path):
    table = read_table(_bolts_csv(tmp_path))
    # reference: the file as written above, counted by hand: lines 1-2 blank, line 3 the names
    assert table.rows_above == 3
    assert [table.file_row(row) for row in (0, 2, 3, 7)] == [4, 6, 8, 12]  # row 2's note takes two lines


def test_what_a_table_works_out_is_read_only(tmp_path):
    table = read_table(_bolts_csv(tmp_path))
    handed_out = [table.numbers("strength_mpa"), table.factors("supplier")[0], table.levels("supplier")[1]]
    for values in handed_out:
        with pytest.raises(ValueError):
            values[0] = values[1]
    labels, codes, spellings = table.levels("supplier")
    # reference: the labels written above, trimmed, in order of first appearance
    assert labels == ["north", "south"]
    assert codes.tolist() == [0, 1, 0, 1, 0, 1, 0, 1]
    assert spellings["south"] == {" south", "south"}


def test_a_table_built_by_hand_counts_its_header_row():
    frame = pd.DataFrame({"supplier": ["north", "south"], "strength": [812.5, 799.0]})
    common = dict(path=Path("made_up.csv"), kind="csv", frame=frame, sheet=None, sheet_names=(),
                  encoding="utf-8", delimiter=",", decimal=".", thousands=None,
                  column_kinds={"supplier": "text", "strength": "number"}, notes=())
    assert Table(header=True, **common).file_row(0) == 2
    assert Table(header=False, **common).file_row(0) == 1
    assert Table(header=True, rows_above=4, **common).file_row(1) == 6


def _setattr_calls(tree: ast.AST):
    """(function name, line) of each ``object.__setattr__(...)`` call, by enclosing function."""
    found = []
    for function in ast.walk(tree):
        if isinstance(function, (ast.FunctionDef, ast.AsyncFunctionDef)):
            for node in ast.walk(function):
                if (isinstance(node, ast.Call) and isinstance(node.func, ast.Attribute)
                        and node.func.attr == "__setattr__" and isinstance(node.func.value, ast.Name)
                        and node.func.value.id == "object"):
                    found.append((function.name, node.lineno))
    return found


def test_engine_io_sets_frozen_fields_only_while_building():
    """``object.__setattr__`` on a frozen object belongs in its ``__post_init__`` alone."""
    late = []
    for path in sorted(IO.glob("*.py")):
        for function, line in _setattr_calls(ast.parse(path.read_text(encoding="utf-8"))):
            if function != "__post_init__":
                late.append(f"{path.name}:{line} in {function}")
    assert not late, late
