"""Choosing the paired design in the set-up panel: the choice, the screening's evidence beside
it, the pair ID column (long layout), the rows as pairs (wide layout), and never a silent switch."""

from __future__ import annotations

import numpy as np
import pytest

from desktop.setup_panel import DESIGN_WORDS, SetupPanel
from engine import io
from engine.session import Session
from engine.spec import DESIGNS, Source


def _long_rows(n: int = 10, seed: int = 5) -> list[tuple]:
    rng = np.random.default_rng(seed)
    base = rng.normal(50.0, 4.0, n)
    rows = [(f"P{i + 1:02d}", "before", round(float(v), 2)) for i, v in enumerate(base)]
    rows += [(f"P{i + 1:02d}", "after", round(float(v - 1.0), 2)) for i, v in enumerate(base)]
    return rows


@pytest.fixture
def long_session(csv_file):
    path = csv_file("coating.csv", _long_rows(), ("panel_id", "stage", "thickness"))
    session = Session()
    table = io.read_table(path)
    session.choose(source=Source(str(path)), group_column="stage", value_columns=("thickness",),
                   groups=("before", "after"))
    session.store("table", table)
    session.store("intake", io.make_groups(table, values="thickness", group="stage", pick=("before", "after")))
    return session


@pytest.fixture
def wide_session(csv_file):
    rows = [(round(50 + i * 0.7, 2), round(49 + i * 0.6, 2)) for i in range(8)]
    path = csv_file("coating_wide.csv", rows, ("before_um", "after_um"))
    session = Session()
    table = io.read_table(path)
    session.choose(source=Source(str(path)), layout="wide", value_columns=("before_um", "after_um"))
    session.store("table", table)
    session.store("intake", io.make_groups(table, values=("before_um", "after_um")))
    return session


def _panel(qtbot, session) -> SetupPanel:
    made = SetupPanel(session)
    qtbot.addWidget(made)
    return made


def _pick(combo, data) -> None:
    combo.setCurrentIndex(combo.findData(data))
    combo.activated.emit(combo.currentIndex())


def test_the_two_designs_in_our_words(qtbot, long_session):
    panel = _panel(qtbot, long_session)
    assert [panel.design.itemData(i) for i in range(panel.design.count())] == list(DESIGNS)
    assert [panel.design.itemText(i) for i in range(panel.design.count())] == \
        [DESIGN_WORDS[d][0] for d in DESIGNS]
    assert panel.design.currentData() == "independent"
    assert not panel.pair_column.isVisibleTo(panel)  # no pair ID column for separate groups
    panel.cleanup()


def test_choosing_pairs_in_the_long_layout_offers_the_id_column_the_screening_found(qtbot, long_session):
    panel = _panel(qtbot, long_session)
    finding = long_session.intake.screening.paired
    assert finding is not None and "panel_id" in finding.text  # the engine's sign of pairing
    # beside the choice of separate groups, the evidence against it
    assert panel.design_evidence.text() == (f"Take care: {finding.text} If so, choose \u201cThe same units "
                                            "measured twice (pairs)\u201d as the design.")
    _pick(panel.design, "paired")
    spec = long_session.spec
    assert spec.design == "paired" and spec.pair_column == "panel_id"
    assert panel.pair_column.isVisibleTo(panel) and panel.pair_column.currentData() == "panel_id"
    # the group and value columns cannot name the units
    offered = [panel.pair_column.itemData(i) for i in range(1, panel.pair_column.count())]
    assert offered == ["panel_id"]
    assert panel.design_evidence.text().startswith("Sign of pairs: ")
    assert "Rows with the same panel_id make a pair" in panel.pair_note.text()
    # back to separate groups: the pair ID column goes with the design (the spec allows no other)
    _pick(panel.design, "independent")
    assert long_session.spec.design == "independent" and long_session.spec.pair_column is None
    panel.cleanup()


def test_the_pair_id_column_is_the_users_to_choose(qtbot, long_session, csv_file):
    rows = [(f"u{i}", f"x{i % 3}", g, float(i + (g == "b"))) for i in range(6) for g in ("a", "b")]
    path = csv_file("two_ids.csv", rows, ("unit", "site", "arm", "value"))
    table = io.read_table(path)
    long_session.store("intake", None)
    long_session.choose(group_column="arm", value_columns=("value",), groups=("a", "b"))
    long_session.store("table", table)
    panel = _panel(qtbot, long_session)
    _pick(panel.design, "paired")
    offered = [panel.pair_column.itemData(i) for i in range(1, panel.pair_column.count())]
    assert offered == ["unit", "site"]
    _pick(panel.pair_column, "site")
    assert long_session.spec.pair_column == "site"
    _pick(panel.pair_column, None)  # "(choose a column)"
    assert long_session.spec.pair_column is None and long_session.spec.design == "paired"
    assert panel.pair_note.text().startswith("Choose the column that names each unit")
    panel.cleanup()


def test_choosing_pairs_in_the_wide_layout_takes_the_rows_as_pairs(qtbot, wide_session):
    panel = _panel(qtbot, wide_session)
    _pick(panel.design, "paired")
    spec = wide_session.spec
    assert spec.design == "paired" and spec.layout == "wide" and spec.pair_column is None
    assert not panel.pair_column.isVisibleTo(panel)
    assert panel.pair_note.text() == "Each row is one unit: its values in the two columns make a pair."
    # no ID column in this file: the screening has no sign to show, and says nothing for pairs
    assert not panel.design_evidence.isVisibleTo(panel)
    _pick(panel.design, "independent")
    assert panel.design_evidence.text().startswith("The file shows no sign of pairs")
    panel.cleanup()


def test_changing_the_layout_keeps_the_design_and_drops_the_id_column(qtbot, long_session):
    panel = _panel(qtbot, long_session)
    _pick(panel.design, "paired")
    assert long_session.spec.pair_column == "panel_id"
    panel.wide_radio.setChecked(True)
    spec = long_session.spec
    assert spec.layout == "wide" and spec.design == "paired" and spec.pair_column is None
    assert panel.refused.isHidden()
    panel.long_radio.setChecked(True)
    assert long_session.spec.design == "paired" and long_session.spec.layout == "long"
    panel.cleanup()


def test_pairs_that_cannot_be_formed_keep_the_paired_choice_and_say_why(qtbot, long_session):
    panel = _panel(qtbot, long_session)
    _pick(panel.design, "paired")
    message = "No pair ID in 'panel_id' of coating.csv has a number in both 'before' and 'after'."
    long_session.store("intake", None)
    long_session.store("problem", message)  # what the window stores when forming the pairs fails
    assert long_session.spec.design == "paired"  # never switched back to separate groups
    assert panel.design.currentData() == "paired"
    assert panel.pair_note.text() == f"These data cannot be paired yet: {message}"
    # the evidence stays beside the choice although no groups were screened this time
    assert panel.design_evidence.text().startswith("Sign of pairs: ")
    panel.cleanup()


def test_changes_from_elsewhere_show_and_write_nothing_back(qtbot, long_session):
    panel = _panel(qtbot, long_session)
    seen = []
    long_session.subscribe(lambda name, value: seen.append(name))
    long_session.choose(design="paired", pair_column="panel_id")
    assert seen == ["spec"]
    assert panel.design.currentData() == "paired" and panel.pair_column.currentData() == "panel_id"
    panel.cleanup()


def test_the_evidence_keeps_room_for_all_its_lines(qtbot, long_session):
    panel = _panel(qtbot, long_session)
    panel.resize(520, 700)
    panel.show()
    qtbot.waitExposed(panel)
    label = panel.design_evidence
    lines = label.fontMetrics().lineSpacing()
    assert label.text() and label.minimumHeight() >= 2 * lines  # wrapped, and given every line
    assert label.minimumHeight() >= label.heightForWidth(label.width())
    panel.cleanup()
