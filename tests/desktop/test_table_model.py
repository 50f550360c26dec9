"""The grid's model over a data frame: per-cell answers, quick at a million rows, marked cells."""

from __future__ import annotations

import time
import tracemalloc
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from PySide6.QtCore import Qt

from desktop.table_model import MARK_EXCLUDED, MARK_SET_ASIDE, FrameModel, format_cell
from engine.io.table import Table


def make_table(frame: pd.DataFrame, kinds: dict[str, str] | None = None) -> Table:
    kinds = kinds or {c: "number" if frame[c].dtype.kind == "f" else "text" for c in frame.columns}
    return Table(path=Path("made_up.csv"), kind="csv", frame=frame, sheet=None, sheet_names=(),
                 encoding="utf-8", delimiter=",", decimal=".", thousands=None, header=True,
                 column_kinds=kinds, notes=())


@pytest.fixture(scope="module")
def million() -> Table:
    rng = np.random.default_rng(2026)
    n = 1_000_000
    frame = pd.DataFrame({
        "line": np.where(rng.random(n) < 0.5, "old press", "new press"),
        "torque_nm": rng.normal(40.0, 3.0, n),
    })
    return make_table(frame)


def _fill(table) -> tuple[FrameModel, str, str, int]:
    """A model filled with ``table``, the last row's two cells, and the peak bytes traced."""
    model = FrameModel()
    tracemalloc.start()
    model.set_table(table)
    text = model.data(model.index(999_999, 1))
    label = model.data(model.index(999_999, 0))
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    return model, text, label, peak


def test_million_rows_answer_the_last_row_without_building_the_others(million):
    # tracemalloc counts every thread: a worker thread left running by an earlier test can add to
    # one pass, never to both, so the smaller of two passes is the model's own
    model, text, label, peak = _fill(million)
    peak = min(peak, _fill(million)[3])
    assert model.rowCount() == 1_000_000
    assert model.columnCount() == 2
    # reference: Python's own format spec, 15 significant digits (the grid may pad decimals with zeros)
    assert float(text) == float(format(float(million.frame["torque_nm"].iloc[999_999]), ".15g"))
    assert label == million.frame["line"].iloc[999_999]
    # one Python object per row would cost at least 8 MB for 1,000,000 rows
    assert peak < 1_000_000, f"filling the model allocated {peak} bytes"


def test_model_passes_qt_consistency_checks(qtmodeltester):
    frame = pd.DataFrame({"batch": ["A", "B", None], "peel": [1.5, np.nan, 3.0]})
    model = FrameModel()
    model.set_table(make_table(frame))
    qtmodeltester.check(model)


def test_headers_show_kind_and_file_row():
    frame = pd.DataFrame({"batch": ["A", "B"], "peel": [1.5, 2.0]})
    model = FrameModel()
    model.set_table(make_table(frame))
    assert model.headerData(1, Qt.Orientation.Horizontal) == "peel\nnumbers"
    assert "number" in model.headerData(1, Qt.Orientation.Horizontal, Qt.ItemDataRole.ToolTipRole)
    # with a header line, frame row 0 is the file's second line
    assert model.headerData(0, Qt.Orientation.Vertical) == "2"
    assert model.data(model.index(0, 1), Qt.ItemDataRole.TextAlignmentRole) & int(Qt.AlignmentFlag.AlignRight)


@pytest.mark.parametrize("value, text", [
    (np.nan, ""), (None, ""), (pd.NA, ""), (3.0, "3"), (0.1, "0.1"), (np.float64(2.5e-12), "2.5e-12"),
    (np.int64(7), "7"), ("old press", "old press"), (1 / 3, "0.333333333333333"),
])
def test_format_cell(value, text):
    # reference: Python's format(value, ".15g"); blanks for missing cells
    assert format_cell(value) == text


def test_marks_explain_themselves_and_announce_a_bounded_change(qtbot):
    frame = pd.DataFrame({"batch": list("AABBCC") * 10, "peel": np.arange(60.0)})
    model = FrameModel()
    model.set_table(make_table(frame))
    with qtbot.waitSignal(model.dataChanged) as blocker:
        model.set_marks(excluded={(5, "peel"): "the cell is blank"}, set_aside={(40, "peel"): "pen slip"})
    top_left, bottom_right = blocker.args[:2]
    assert (top_left.row(), bottom_right.row()) == (5, 40)
    assert (top_left.column(), bottom_right.column()) == (1, 1)
    assert model.mark(5, 1) == (MARK_EXCLUDED, "the cell is blank")
    assert model.mark(40, 1) == (MARK_SET_ASIDE, "pen slip")
    assert model.mark(6, 1) is None
    assert "blank" in model.data(model.index(5, 1), Qt.ItemDataRole.ToolTipRole)
    assert "pen slip" in model.data(model.index(40, 1), Qt.ItemDataRole.ToolTipRole)
    assert model.data(model.index(40, 1), Qt.ItemDataRole.FontRole).strikeOut()
    assert model.data(model.index(6, 1), Qt.ItemDataRole.ToolTipRole) is None


def test_scrolling_a_view_to_the_end_of_a_million_rows_is_quick(qtbot, million):
    from PySide6.QtWidgets import QTableView

    view = QTableView()
    qtbot.addWidget(view)
    model = FrameModel()
    view.setModel(model)
    view.resize(800, 600)
    view.show()
    started = time.perf_counter()
    model.set_table(million)
    view.scrollToBottom()
    view.viewport().repaint()
    # a guard against a pass over every row (tens of seconds in Python), not a speed target:
    # the figure itself is measured by tests/benchmarks/bench_startup.py
    assert time.perf_counter() - started < 3.0
    assert view.rowAt(view.viewport().height() - 2) > 999_900


def test_a_label_column_read_as_categories_shows_its_texts_and_blanks():
    frame = pd.DataFrame({"site": pd.Categorical(["upper field", None, "lower field"]),
                          "yield_t_ha": [7.1, 6.8, np.nan]})
    model = FrameModel()
    model.set_table(make_table(frame, {"site": "text", "yield_t_ha": "number"}))
    shown = [[model.data(model.index(r, c)) for c in range(2)] for r in range(3)]
    assert shown == [["upper field", "7.1"], ["", "6.8"], ["lower field", ""]]


def test_numbers_keep_the_decimals_and_the_decimal_mark_the_file_wrote(tmp_path):
    # "826.0" in a column written with one decimal was shown as "826"; a decimal-comma file
    # showed its numbers with a point beside its text cells with a comma.
    from engine import io

    bolts = tmp_path / "bolts.csv"
    bolts.write_text("forge,strength\nnorth,826.0\nnorth,861.9\nsouth,819.0\nsouth,855.25\nsouth,840.1\nsouth,833.7\n",
                     encoding="utf-8")
    model = FrameModel()
    model.set_table(io.read_table(bolts))
    assert [model.data(model.index(r, 1)) for r in range(5)] == ["826.0", "861.9", "819.0", "855.25", "840.1"]
    cure = tmp_path / "cure.csv"
    cure.write_text("batch;minutes;note\nb17;89,6;12,75\nb18;12,75;fast\nb18;40,5;\n", encoding="utf-8")
    table = io.read_table(cure)
    assert table.decimal == ","
    model.set_table(table)
    shown = [[model.data(model.index(r, c)) for c in range(3)] for r in range(3)]
    assert shown == [["b17", "89,6", "12,75"], ["b18", "12,75", "fast"], ["b18", "40,5", ""]]
    assert not any("." in text for row in shown for text in row)


@pytest.mark.parametrize("value, places, mark, text", [
    (826.0, 1, ".", "826.0"), (826.0, 0, ".", "826"), (12.75, 1, ".", "12.75"), (89.6, 1, ",", "89,6"),
    (np.nan, 2, ".", ""), (2.5e-12, 3, ".", "2.5e-12"), (1 / 3, 2, ".", "0.333333333333333"),
    (123456789012.5, 6, ".", "123456789012.500"),
])
def test_number_text(value, places, mark, text):
    from desktop.table_model import number_text

    # reference: Python's format(value, ".15g"), padded with zeros to the column's decimals
    assert number_text(value, places, mark) == text


def test_usual_decimals_is_the_most_common_count():
    from desktop.table_model import usual_decimals

    assert usual_decimals(np.array([826.0, 861.9, 819.0, 861.2, 834.5])) == 1
    assert usual_decimals(np.array([12.0, 15.0, 13.5, np.nan])) == 0
    assert usual_decimals(np.array([np.nan])) == 0
    long = np.round(np.random.default_rng(3).normal(50, 5, 100_000), 2)
    assert usual_decimals(long) == 2
