"""Why a value was left out reads the same in the window, its tooltips and the exported report:
all of them take the words from ``engine.io.screening.EXCLUSION_WORDS``."""

from __future__ import annotations

from types import SimpleNamespace

import pytest
from PySide6.QtCore import Qt

from desktop.data_panel import DataPanel, screening_html
from engine import io, pipeline
from engine.io.screening import EXCLUSION_REASONS, EXCLUSION_WORDS
from engine.session import Session

# frame rows (0-based) of the cells below that the screening leaves out, one for each reason
LEFT_OUT = {"missing": 1, "non_numeric": 5, "infinite": 7, "set_aside": 8}


@pytest.fixture
def session(csv_file) -> Session:
    rows = [("north", 5.1), ("north", ""), ("north", 4.8), ("north", 5.3), ("north", 5.0),
            ("south", "broken"), ("south", 6.4), ("south", "inf"), ("south", 61.0), ("south", 5.9)]
    path = csv_file("fields.csv", rows, ("field", "yield_t"))
    aside = {(LEFT_OUT["set_aside"], "yield_t"): "written as 61.0 instead of 6.10"}
    table = io.read_table(path)
    session = Session()
    session.choose(source=pipeline.source_for(path), group_column="field", value_columns=("yield_t",),
                   set_aside=pipeline.set_aside_cells(table, aside))
    session.store("table", table)
    session.store("intake", io.make_groups(table, values="yield_t", group="field", set_aside=aside))
    return session


def test_every_reason_has_its_words_once():
    assert set(EXCLUSION_WORDS) == set(EXCLUSION_REASONS) == set(LEFT_OUT)
    assert len(set(EXCLUSION_WORDS.values())) == len(EXCLUSION_WORDS)


def test_the_screening_counts_each_reason_in_the_shared_words(session):
    screening = session.intake.screening
    assert dict(screening.excluded_counts) == {reason: 1 for reason in LEFT_OUT}  # by hand, above
    html = screening_html(session.table, screening)
    for reason in EXCLUSION_REASONS:
        assert f"{EXCLUSION_WORDS[reason]}: 1" in html


def test_the_exported_report_gives_each_reason_in_the_shared_words(session):
    from engine.report import document
    analysis = SimpleNamespace(screening=session.intake.screening,
                               spec=session.spec)
    why = dict((where.split(",")[0], why) for where, why in document.set_aside_rows(analysis))
    table = session.table
    for reason, row in LEFT_OUT.items():
        assert why[f"row {table.file_row(row)} of the file"].startswith(EXCLUSION_WORDS[reason])
    assert why[f"row {table.file_row(LEFT_OUT['set_aside'])} of the file"].endswith(
        "(written as 61.0 instead of 6.10)")  # the user's reason beside the shared words


def test_a_left_out_cell_says_why_in_the_shared_words(qtbot, session):
    panel = DataPanel(session, ask_reason=lambda where: None)
    qtbot.addWidget(panel)
    try:
        model = panel.model
        tips = {reason: model.data(model.index(LEFT_OUT[reason], 1), Qt.ItemDataRole.ToolTipRole)
                for reason in ("missing", "non_numeric", "infinite")}
        assert tips["missing"] == f"<span>Left out of the comparison: {EXCLUSION_WORDS['missing']}</span>"
        for reason, text in (("non_numeric", "broken"), ("infinite", "inf")):  # the cell's text beside
            assert tips[reason].startswith(f"<span>Left out of the comparison: {EXCLUSION_WORDS[reason]} (")
            assert text in tips[reason]
    finally:
        panel.cleanup()
