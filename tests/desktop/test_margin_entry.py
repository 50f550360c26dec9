"""The margin entry under the question row: each kind picked, margins typed in units, as a
percentage and as a ratio, even and uneven, bad entries said in one line while the question in
force stays, and nothing typed lost when the question is switched back and forth."""

from __future__ import annotations

from pathlib import Path

import pytest
from PySide6.QtCore import Qt

from desktop.margin_entry import UNIT_WORDS, WORSE_WORDS, margin_reading, parse_number
from desktop.setup_panel import SetupPanel
from engine import io, pipeline
from engine.question import MARGIN_UNITS, WORSE, Margin, Question
from engine.session import Session



BOLTS = Path(__file__).resolve().parents[2] / "demo_files" / "bolt_strength.csv"


@pytest.fixture
def session() -> Session:
    session = Session()
    table = io.read_table(BOLTS)
    session.adopt(pipeline.complete(table, session.spec.replace(source=pipeline.source_for(BOLTS))))
    session.store("table", table)
    return session


@pytest.fixture
def panel(qtbot, session):
    made = SetupPanel(session)
    qtbot.addWidget(made)
    made.show()
    yield made
    made.cleanup()


def pick(panel: SetupPanel, kind: str) -> None:
    """Pick ``kind`` in the question row as a user does."""
    at = panel.question.findData(kind)
    assert at >= 0, kind
    panel.question.setCurrentIndex(at)
    panel.question.activated.emit(at)


def type_into(qtbot, field, text: str) -> None:
    """Type ``text`` into ``field`` (replacing what it held) and press Enter."""
    field.setFocus()
    field.selectAll()
    qtbot.keyClicks(field, text) if text else field.clear()
    qtbot.keyClick(field, Qt.Key.Key_Return)


def choose(combo, data) -> None:
    at = combo.findData(data)
    combo.setCurrentIndex(at)
    combo.activated.emit(at)


def entry_of(panel):
    return panel.margin_entry


def test_the_fields_name_every_unit_and_direction_the_engine_knows():
    assert tuple(key for key, _ in UNIT_WORDS) == MARGIN_UNITS
    assert tuple(key for key, _ in WORSE_WORDS) == WORSE


def test_a_difference_question_shows_no_margin(panel, session):
    entry = entry_of(panel)
    for kind in ("differ", "lower", "higher"):
        pick(panel, kind)
        assert session.spec.question.kind == kind
        assert session.spec.question.margin is None
        assert not entry.isVisible()


def test_every_kind_is_offered_in_words(panel):
    labels = [panel.question.itemText(i) for i in range(panel.question.count())]
    kinds = [panel.question.itemData(i) for i in range(panel.question.count())]
    assert kinds == ["differ", "lower", "higher", "equivalent", "not_worse"]
    first, second = panel._labels()
    assert labels[3] == f"Are {first} and {second} the same within a margin you set?"
    assert labels[4] == f"Is {first} no worse than {second} by more than a margin you set?"


def test_a_margin_kind_waits_for_its_margin(panel, session, qtbot):
    entry = entry_of(panel)
    pick(panel, "equivalent")
    # the question in force is still the old one until a margin is typed; the row shows the pick
    assert session.spec.question == Question("differ")
    assert panel.question.currentData() == "equivalent"
    assert entry.isVisible() and entry.size.isVisible() and not entry.worse.isVisible()
    assert entry.problem.text() == "Type a margin to ask this. Still in force: do the groups differ?"
    type_into(qtbot, entry.size, "20")
    assert session.spec.question == Question("equivalent", 0.95, Margin(-20.0, 20.0, "units"))
    assert not entry.problem.isVisible()
    first, second = panel._labels()
    assert entry.reading.text() == f"The groups count as the same if {first} minus {second} lies between −20 and 20."


@pytest.mark.parametrize("unit, typed, margin, reads", [
    # a decimal comma and a percent sign are taken as meant
    ("percent", "2,5 %", Margin(-2.5, 2.5, "percent"), "{a} minus {b} lies between −2.5 % of {b}'s mean and 2.5 % of"),
    ("ratio", "1.25", Margin(0.8, 1.25, "ratio"), "{a}'s mean divided by {b}'s lies between 0.8 and 1.25."),
])
def test_a_margin_as_a_percentage_or_a_ratio(panel, session, qtbot, unit, typed, margin, reads):
    entry = entry_of(panel)
    pick(panel, "equivalent")
    choose(entry.unit, unit)
    type_into(qtbot, entry.size, typed)
    assert session.spec.question.margin == margin
    first, second = panel._labels()
    assert reads.format(a=first, b=second) in entry.reading.text()


def test_an_uneven_margin(panel, session, qtbot):
    entry = entry_of(panel)
    pick(panel, "equivalent")
    type_into(qtbot, entry.size, "20")
    entry.uneven.setChecked(True)
    # the two ends start from the even margin, so nothing changes until one is edited
    assert (entry.low.text(), entry.high.text()) == ("-20", "20")
    assert entry.low.isVisible() and not entry.size.isVisible()
    type_into(qtbot, entry.low, "-10")
    type_into(qtbot, entry.high, "30")
    assert session.spec.question.margin == Margin(-10.0, 30.0, "units")
    assert "between −10 and 30" in entry.reading.text()


def test_non_inferiority_says_which_way_is_worse(panel, session, qtbot):
    entry = entry_of(panel)
    pick(panel, "not_worse")
    assert entry.worse.isVisible() and not entry.uneven.isVisible()
    type_into(qtbot, entry.size, "15")
    assert session.spec.question == Question("not_worse", 0.95, Margin.not_worse_by(15, "lower"))
    first, _ = panel._labels()
    assert entry.reading.text().startswith(f"{first} counts as no worse if")
    assert entry.reading.text().endswith("lies above −15.")
    choose(entry.worse, "higher")
    assert session.spec.question.margin == Margin.not_worse_by(15, "higher")
    assert session.spec.question.alternative == "less"  # looks away from the worse side
    assert entry.reading.text().endswith("lies below 15.")


@pytest.mark.parametrize("unit, typed, said", [
    ("units", "abc", "\u201cabc\u201d is not a number; type one such as 0.5."),
    ("units", "0", "A margin of 0 leaves no room"),
    ("units", "-0", "A margin of 0 leaves no room"),
    ("ratio", "1", "A margin of 1 leaves no room"),
    ("ratio", "-2", "A ratio margin must be above 0, not -2."),
    ("ratio", "0", "A ratio margin must be above 0, not 0."),
    ("units", "", "Type the size of the margin."),
])
def test_a_bad_entry_is_said_in_one_line_and_the_last_question_stays(panel, session, qtbot, unit, typed, said):
    entry = entry_of(panel)
    pick(panel, "equivalent")
    type_into(qtbot, entry.size, "20")
    held = session.spec.question
    choose(entry.unit, unit)
    if unit == "ratio":  # 20 is a valid ratio margin too
        held = session.spec.question
    type_into(qtbot, entry.size, typed)
    assert session.spec.question == held
    text = entry.problem.text()
    assert entry.problem.isVisible() and "\n" not in text
    assert said in text or said.lower() in text.lower(), text
    assert text.endswith("Still in force: the same within " + ("±20?" if unit == "units" else "a ratio of 0.05 to 20?"))
    assert not entry.reading.isVisible()


def test_uneven_ends_on_one_side_are_refused(panel, session, qtbot):
    entry = entry_of(panel)
    pick(panel, "equivalent")
    entry.uneven.setChecked(True)
    type_into(qtbot, entry.low, "3")
    type_into(qtbot, entry.high, "5")
    assert session.spec.question == Question("differ")
    assert "either side of 0" in entry.problem.text()


def test_nothing_typed_is_lost_switching_kinds(panel, session, qtbot):
    entry = entry_of(panel)
    pick(panel, "equivalent")
    choose(entry.unit, "percent")
    type_into(qtbot, entry.size, "4")
    asked = session.spec.question
    pick(panel, "differ")
    assert session.spec.question == Question("differ")
    pick(panel, "not_worse")  # the same size, now for non-inferiority
    assert session.spec.question.margin == Margin.not_worse_by(4, "lower", "percent")
    pick(panel, "higher")
    pick(panel, "equivalent")
    assert session.spec.question == asked
    assert entry.size.text() == "4" and entry.unit.currentData() == "percent"


def test_a_question_from_elsewhere_fills_the_fields(panel, session):
    entry = entry_of(panel)
    session.ask(kind="equivalent", margin=Margin.within(-5, 12.5))
    assert panel.question.currentData() == "equivalent"
    assert entry.uneven.isChecked() and (entry.low.text(), entry.high.text()) == ("-5", "12.5")
    session.ask(kind="not_worse", margin=Margin.not_worse_by(0.9, "lower", "ratio"))
    assert entry.size.text() == "0.9" and entry.unit.currentData() == "ratio"
    assert entry.worse.currentData() == "lower" and entry.worse.isVisible()


def test_focus_entry_opens_the_equivalence_question(panel, session, qtbot):
    entry = entry_of(panel)
    panel.window().activateWindow()
    entry.focus_entry()
    panel.refresh()
    assert panel.question.currentData() == "equivalent"
    qtbot.waitUntil(lambda: entry.size.hasFocus())


@pytest.mark.parametrize("text, percent, value", [
    ("0.5", False, 0.5), ("0,5", False, 0.5), ("\u22122", False, -2.0), (" 5 % ", True, 5.0),
    ("5%", False, None), ("1,000.5", False, None), ("nan", False, None), ("inf", False, None), ("", False, None),
])
def test_numbers_are_read_as_meant(text, percent, value):
    assert parse_number(text, percent=percent) == value


def test_the_reading_of_a_ratio_margin_for_non_inferiority():
    margin = Margin.not_worse_by(1.1, "higher", "ratio")
    assert margin_reading("not_worse", margin, ("new", "old")) == (
        "new counts as no worse if new's mean divided by old's lies below 1.1.")


@pytest.mark.parametrize("before, after", [
    (Margin(-1.0, 3.0, "units"), Margin(-3.0, 1.0, "units")),
    (Margin(-2.0, 4.0, "percent"), Margin(-4.0, 2.0, "percent")),
    (Margin(0.8, 1.5, "ratio"), Margin(1 / 1.5, 1.25, "ratio")),
    (Margin(-2.0, 2.0, "units"), Margin(-2.0, 2.0, "units")),
])
def test_swapping_the_groups_turns_an_uneven_margin_over(qtbot, before, after):
    # intake-formed groups: the bolts' two suppliers
    session = Session()
    table = io.read_table(BOLTS)
    spec = pipeline.complete(table, session.spec.replace(source=pipeline.source_for(BOLTS)))
    session.adopt(spec.replace(groups=("north_forge", "south_forge"),
                               question=Question("equivalent", 0.95, before)))
    session.store("table", table)
    panel = SetupPanel(session)
    qtbot.addWidget(panel)
    panel.swap()
    assert session.spec.groups == ("south_forge", "north_forge")
    margin = session.spec.question.margin
    assert (margin.low, margin.high) == pytest.approx((after.low, after.high)) and margin.unit == after.unit
    entry = panel.margin_entry
    if not after.symmetric:
        assert entry.uneven.isChecked() and float(entry.low.text()) == pytest.approx(after.low)
    # a non-inferiority margin keeps its size and worse side for the new group 1
    session.ask(kind="not_worse", margin=Margin.not_worse_by(2, "lower"))
    panel.swap()
    assert session.spec.question.margin == Margin.not_worse_by(2, "lower")
    panel.cleanup()
