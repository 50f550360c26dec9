"""The data panel: the grid, the screening in words, setting a value aside and bringing it back."""

from __future__ import annotations

import pytest
from PySide6.QtCore import QUrl
from PySide6.QtGui import QGuiApplication

from desktop.data_panel import DataPanel, screening_html
from desktop.table_model import MARK_EXCLUDED, MARK_SET_ASIDE
from engine import io
from engine.pipeline import set_aside_keys
from engine.session import Session
from engine.spec import SetAside, Source


@pytest.fixture
def session(two_groups_csv, csv_file) -> Session:
    rows = [("north", 5.1), ("north", ""), ("north", 4.8), ("north", 5.3), ("south", 6.0),
            ("south", "broken"), ("south", 6.4), ("south", 5.9), ("south", 61.0)]
    path = csv_file("fields.csv", rows, ("field", "yield_t"))
    session = Session()
    table = io.read_table(path)
    session.choose(source=Source(str(path)), group_column="field", value_columns=("yield_t",))
    session.store("table", table)
    session.store("intake", io.make_groups(table, values="yield_t", group="field"))
    return session


@pytest.fixture
def panel(qtbot, session):
    reasons = iter(["written as 61.0 instead of 6.10"])
    made = DataPanel(session, ask_reason=lambda where: next(reasons))
    qtbot.addWidget(made)
    yield made
    made.cleanup()


def refresh_intake(session):
    cells = set_aside_keys(session.table, session.spec.set_aside) or None
    session.store("intake", io.make_groups(session.table, values="yield_t", group="field", set_aside=cells))


def test_grid_shows_the_file_and_marks_left_out_cells(panel, session):
    model = panel.model
    assert model.rowCount() == 9 and model.columnCount() == 2
    assert model.cell_text(0, 1) == "5.1"
    # row 1 is blank, row 5 holds a word: the screening leaves both out, and the grid says why
    assert model.mark(1, 1)[0] == MARK_EXCLUDED
    assert model.mark(5, 1)[0] == MARK_EXCLUDED
    assert model.mark(0, 1) is None
    assert "fields.csv" in panel.heading.text()


def test_report_names_groups_counts_and_exclusions(panel, session):
    text = panel.report.toPlainText()
    screening = session.intake.screening
    assert f"north: {screening.n_used[0]} values" in text
    assert f"south: {screening.n_used[1]} values" in text
    assert screening.n_used == (3, 4)  # counted by hand from the rows above
    assert "Left out" in text


def test_set_aside_and_bring_back(panel, session):
    panel.select_cell(8, "yield_t")
    assert panel.aside_button.isEnabled() and not panel.back_button.isEnabled()
    panel.set_aside_current()
    # the spec records the cell by the file's row (the header is row 1) and the cell's text
    assert session.spec.set_aside == (SetAside(10, "yield_t", "61.0", "written as 61.0 instead of 6.10"),)
    refresh_intake(session)
    assert session.intake.screening.n_used == (3, 3)
    assert panel.model.mark(8, 1) == (MARK_SET_ASIDE, "written as 61.0 instead of 6.10")
    assert "written as 61.0 instead of 6.10" in panel.report.toPlainText()
    assert panel.back_button.isEnabled()
    panel._on_link(QUrl("bring-back:0"))  # the "bring back" link of the first listed value
    assert session.spec.set_aside == ()
    refresh_intake(session)
    assert session.intake.screening.n_used == (3, 4)
    assert panel.model.mark(8, 1) is None


def test_copy_cells_as_tab_separated_text(panel):
    panel.grid.selectAll()
    panel.copy_selection()
    lines = QGuiApplication.clipboard().text().split("\n")
    assert lines[0] == "north\t5.1"
    assert len(lines) == 9


def test_report_before_a_file_and_with_a_problem():
    assert "Open a data file" in screening_html(None, None)


def test_paired_warning_is_in_words(csv_file):
    # each specimen measured once before and once after: the screening should call this paired
    rows = [(f"S{k}", "before", 10.0 + k * 0.3) for k in range(8)]
    rows += [(f"S{k}", "after", 10.4 + k * 0.3) for k in range(8)]
    path = csv_file("specimens.csv", rows, ("specimen", "stage", "hardness"))
    table = io.read_table(path)
    screening = io.make_groups(table, values="hardness", group="stage").screening
    assert screening.paired is not None
    html = screening_html(table, screening, problem="Choose the column of measurements.")
    assert "Are these really two separate groups?" in html
    assert "specimen" in html and "paired" in html
    assert "Choose the column of measurements." in html


def test_reasons_are_in_words(panel):
    text = panel.report.toPlainText()
    assert "blank or marked as missing: 1" in text
    assert "not a number: 1" in text


def test_a_million_rows_show_without_asking_for_hundreds_of_row_labels(qtbot, tmp_path, monkeypatch):
    import numpy as np

    from desktop.table_model import FrameModel

    rows = 1_000_000
    path = tmp_path / "million.csv"
    rng = np.random.default_rng(4)
    with path.open("w") as out:
        out.write("site,yield_t\n")
        out.writelines(f"{'north' if a else 'south'},{b}\n"
                       for a, b in zip((rng.random(rows) < 0.5).tolist(), np.round(rng.normal(6, 1, rows), 2).tolist()))
    asked = []
    original = FrameModel.headerData

    def counting(self, section, orientation, role=0):
        if orientation.name == "Vertical":
            asked.append(section)
        return original(self, section, orientation, role)

    monkeypatch.setattr(FrameModel, "headerData", counting)
    session = Session()
    panel = DataPanel(session)
    qtbot.addWidget(panel)
    panel.show()
    session.choose(source=Source(str(path)))
    session.store("table", io.read_table(path))
    panel.grab()  # paints the grid, its row numbers included
    # only the row numbers on screen are asked for (the stock header asks for about 1,600)
    assert panel.model.rowCount() == rows
    assert 0 < len(asked) < 200
    panel.cleanup()
