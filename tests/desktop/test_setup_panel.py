"""The set-up panel: shows the session's spec and writes the user's edits back, without loops."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from desktop.setup_panel import SetupPanel, group_levels
from engine import io
from engine.session import Session
from engine.spec import Source


@pytest.fixture
def session(three_groups_csv) -> Session:
    session = Session()
    table = io.read_table(three_groups_csv)
    session.choose(source=Source(str(three_groups_csv)), group_column="batch", value_columns=("peel_strength",))
    session.store("table", table)
    return session


@pytest.fixture
def panel(qtbot, session):
    made = SetupPanel(session)
    qtbot.addWidget(made)
    yield made
    made.cleanup()


def test_levels_are_the_engines_labels(csv_file):
    path = csv_file("spaced.csv",
                     [(" north ", 1.0), ("south", 2.0), ("north", 3.0), ("south", 4.0), ("", 5.0)],
                     ("field", "yield"))
    table = io.read_table(path)
    # the engine trims labels and skips blanks (make_groups' Notes); the panel must offer the same
    assert group_levels(table, "field") == ["north", "south"]
    intake = io.make_groups(table, values="yield", group="field")
    assert list(intake.groups.labels) == group_levels(table, "field")


def test_shows_the_spec(panel, session):
    assert panel.long_radio.isChecked()
    assert panel.group_column.currentData() == "batch"
    assert panel.value_column.currentData() == "peel_strength"
    assert [panel.first_group.itemData(i) for i in range(1, panel.first_group.count())] == ["A", "B", "C"]
    assert panel.first_group.currentData() is None  # three groups and none picked yet
    assert "3 groups" in panel.hint.text()


def test_picking_the_two_groups(panel, session):
    panel.first_group.setCurrentIndex(panel.first_group.findData("C"))
    panel.first_group.activated.emit(panel.first_group.currentIndex())
    assert session.spec.groups is None  # only one of the two so far
    panel.second_group.setCurrentIndex(panel.second_group.findData("A"))
    panel.second_group.activated.emit(panel.second_group.currentIndex())
    assert session.spec.groups == ("C", "A")
    # choosing group 2's label for group 1 exchanges the two
    panel.first_group.setCurrentIndex(panel.first_group.findData("A"))
    panel.first_group.activated.emit(panel.first_group.currentIndex())
    assert session.spec.groups == ("A", "C")
    panel.swap()
    assert session.spec.groups == ("C", "A")
    assert panel.question.itemText(2) == "Is C higher than A?"


def test_question_and_confidence(panel, session):
    panel.question.setCurrentIndex(panel.question.findData("lower"))
    panel.question.activated.emit(panel.question.currentIndex())
    assert session.spec.alternative == "less"
    panel.confidence.setValue(99.0)
    assert session.spec.level == pytest.approx(0.99)
    panel.resamples.setValue(5_000)
    assert session.spec.resamples == 5_000


def test_changes_from_elsewhere_show_and_write_nothing_back(panel, session):
    seen = []
    session.subscribe(lambda name, value: seen.append(name))
    session.ask(kind="higher", level=0.9)
    assert seen == ["spec"]  # one announcement, no echo from the panel
    assert panel.question.currentData() == "higher"
    assert panel.confidence.value() == pytest.approx(90.0)


def test_wide_layout(panel, session, csv_file):
    path = csv_file("wide.csv", [(1.0, 2.0, 9), (1.5, 2.5, 8), (1.2, 2.2, 7)],
                     ("supplier_a", "supplier_b", "lot"))
    session.store("table", io.read_table(Path(path)))
    session.choose(layout="long", group_column=None, value_columns=())
    panel.wide_radio.setChecked(True)
    assert session.spec.layout == "wide"
    assert session.spec.group_column is None
    assert session.spec.value_columns == ("supplier_a", "supplier_b")
    assert panel.first_column.isVisibleTo(panel) and not panel.group_column.isVisibleTo(panel)
    panel.second_column.setCurrentIndex(panel.second_column.findData("lot"))
    panel.second_column.activated.emit(panel.second_column.currentIndex())
    assert session.spec.value_columns == ("supplier_a", "lot")
    panel.swap()
    assert session.spec.value_columns == ("lot", "supplier_a")


def test_choosing_a_group_column_with_two_groups_picks_them(panel, session, csv_file):
    path = csv_file("two.csv", [("old", 1.0, "x"), ("new", 2.0, "y"), ("old", 1.4, "x")],
                     ("press", "torque", "shift"))
    session.store("table", io.read_table(path))
    panel.group_column.setCurrentIndex(panel.group_column.findData("shift"))
    panel.group_column.activated.emit(panel.group_column.currentIndex())
    assert session.spec.group_column == "shift"
    assert session.spec.groups == ("x", "y")


def test_tab_order_follows_the_form(panel):
    order = [panel.long_radio, panel.group_column, panel.value_column, panel.first_group, panel.swap_button,
             panel.second_group, panel.question, panel.confidence, panel.resamples, panel.seed,
             panel.new_seed_button]
    chain, widget = [], panel.long_radio
    for _ in range(60):
        if widget in order and widget not in chain:
            chain.append(widget)
        widget = widget.nextInFocusChain()
    assert chain == order


def test_the_ranges_are_the_specs_and_a_refused_value_shows_its_sentence(panel, session):
    from engine.question import LEVEL_RANGE
    from engine.spec import RESAMPLES_RANGE

    assert (panel.resamples.minimum(), panel.resamples.maximum()) == RESAMPLES_RANGE
    assert panel.confidence.minimum() == LEVEL_RANGE[0] * 100
    assert panel.confidence.maximum() < LEVEL_RANGE[1] * 100  # the spec takes levels below 1
    panel.seed.setText("12345")
    panel.seed.editingFinished.emit()
    assert session.spec.seed == 12345 and panel.refused.isHidden()
    for typed in ("-4", "twelve", str(2**63)):
        panel.seed.setText(typed)
        panel.seed.editingFinished.emit()
        # the spec's own sentence (engine/spec.py), and the seed stays as it was
        assert panel.refused.text().startswith("The seed must be a whole number from 0 to 2^63 - 1")
        assert not panel.refused.isHidden() and session.spec.seed == 12345
        assert panel.seed.text() == "12345"
    panel.new_seed_button.click()
    assert session.spec.seed != 12345 and panel.seed.text() == str(session.spec.seed)
    assert panel.refused.isHidden()


# -- swapping the groups under a percentage margin ---------------------------------------------

BOLTS = Path(__file__).resolve().parents[2] / "demo_files" / "bolt_strength.csv"


def _bolts_panel(qtbot, question, *, formed=True):
    """The panel over the bolts' two suppliers with ``question``; the groups formed as the window
    forms them (or not yet)."""
    from engine import pipeline

    session = Session()
    table = io.read_table(BOLTS)
    spec = pipeline.complete(table, session.spec.replace(source=pipeline.source_for(BOLTS)))
    session.adopt(spec.replace(groups=("north_forge", "south_forge"), question=question, resamples=200, seed=4))
    session.store("table", table)
    if formed:
        session.store("intake", pipeline.form_groups(table, session.spec))
    panel = SetupPanel(session)
    qtbot.addWidget(panel)
    return session, panel


def test_swapping_under_a_percentage_margin_keeps_the_same_margin_in_units(qtbot):
    from statsmodels.stats.weightstats import ttost_ind

    from engine import pipeline
    from engine.question import Margin, Question

    session, panel = _bolts_panel(qtbot, Question("equivalent", 0.95, Margin(-2.0, 4.0, "percent")))
    groups = session.intake.groups
    north, south = groups.x, groups.y
    before = pipeline.run(session.intake, session.spec)
    panel.swap()
    assert session.spec.groups == ("south_forge", "north_forge")
    # the margin stood for -2% to 4% of south_forge's mean; turned over with the groups, it is
    # -4% to 2% of that same mean, now in units (group 2's mean has become north_forge's)
    margin = session.spec.question.margin
    assert margin.unit == "units"
    assert (margin.low, margin.high) == (-0.04 * float(np.mean(south)), -(-0.02 * float(np.mean(south))))
    note = panel.swap_note.text()
    assert not panel.swap_note.isHidden() and "now in units" in note and "south_forge's mean" in note
    assert "always of group 2's mean" in panel.swap_note.toolTip()
    low = panel.margin_entry.low
    assert float(low.text()) == pytest.approx(margin.low, rel=1e-11) and low.cursorPosition() == 0
    session.store("intake", pipeline.form_groups(session.table, session.spec))
    after = pipeline.run(session.intake, session.spec)
    # reference: statsmodels ttost_ind(south, north, low, high, usevar="unequal"), the swapped
    # groups against the mirrored margin; the p-value of the two one-sided tests is unchanged
    p, _, _ = ttost_ind(south, north, margin.low, margin.high, usevar="unequal")
    assert after.procedures["equivalence_welch"].p_value == pytest.approx(p, rel=1e-10)
    assert after.procedures["equivalence_welch"].p_value == pytest.approx(
        before.procedures["equivalence_welch"].p_value, rel=1e-12)
    # another question clears the line
    session.ask(kind="differ", margin=None)
    assert panel.swap_note.isHidden()
    panel.cleanup()


def test_swapping_under_a_percentage_non_inferiority_margin_keeps_its_size_in_units(qtbot):
    from engine.question import Margin, Question

    session, panel = _bolts_panel(qtbot, Question("not_worse", 0.95, Margin.not_worse_by(3.0, "lower", "percent")))
    south = session.intake.groups.y
    panel.swap()
    assert session.spec.question.margin == Margin.not_worse_by(0.03 * float(np.mean(south)), "lower")
    panel.cleanup()


def test_swapping_before_the_groups_are_formed_says_the_percentage_now_means_another_margin(qtbot):
    from engine.question import Margin, Question

    session, panel = _bolts_panel(qtbot, Question("equivalent", 0.95, Margin.within(3.0, unit="percent")),
                                  formed=False)
    panel.swap()
    assert session.spec.question.margin == Margin.within(3.0, unit="percent")
    note = panel.swap_note.text()
    assert "now north_forge's instead of south_forge's" in note and "not the same margin" in note
    panel.cleanup()
