"""The margin questions in the whole window: the offer after "no clear difference", the settings
carried to the next file and said in the message bar, a saved analysis reopened with its margin."""

from __future__ import annotations

import pytest

from desktop import main_window
from desktop.findings_panel import MARGIN_OFFER_BUTTON
from desktop.margin_entry import entered_words, question_words
from engine.question import Margin, Question
from engine.spec import AnalysisSpec


def ready(qtbot, window, timeout=60_000):
    qtbot.waitUntil(lambda: window.session.analysis is not None and not window.busy
                    and window.findings_panel is not None, timeout=timeout)


@pytest.mark.parametrize("question, said", [
    (Question("differ", 0.9), "two-sided, 90%"),
    (Question("equivalent", 0.95, Margin.within(2)), "the same within ±2, 95%"),
    (Question("equivalent", 0.95, Margin.within(-1, 3.5)), "the same within −1 to 3.5, 95%"),
    (Question("equivalent", 0.9, Margin.within(5, unit="percent")), "the same within ±5 % of group 2's mean, 90%"),
    (Question("equivalent", 0.95, Margin.within(-2, 4, unit="percent")),
     "the same within −2 % to 4 % of group 2's mean, 95%"),
    (Question("equivalent", 0.95, Margin.within(1.25, unit="ratio")), "the same within a ratio of 0.8 to 1.25, 95%"),
    (Question("not_worse", 0.95, Margin.not_worse_by(3, "lower")),
     "no worse by more than 3 (lower values are worse), 95%"),
    (Question("not_worse", 0.975, Margin.not_worse_by(1.1, "higher", "ratio")),
     "no worse by more than a ratio of 1.1 (higher values are worse), 97.5%"),
])
def test_the_carried_settings_say_the_margin(question, said):
    assert main_window.settings_words(AnalysisSpec(question=question)) == said


def test_the_margin_as_entered_names_group_two():
    assert entered_words(Margin.not_worse_by(4, "lower", "percent"), ("new", "old")) == (
        "4 % of old's mean (lower values are worse)")
    assert question_words(Question("differ"), ("new", "old")) == ""


def test_no_clear_difference_offers_the_question_of_sameness(make_window, qtbot, two_groups_csv):
    window = make_window([two_groups_csv])
    ready(qtbot, window)
    window.show()
    panel = window.findings_panel
    row = next(r for r in window.session.analysis.robustness.rows if r.key == panel.procedure_key())
    if row.finds_difference:  # the fixture's groups differ clearly: ask a level that does not find it
        window.session.ask(level=0.999)
        qtbot.waitUntil(lambda: window.session.analysis.spec.level == 0.999 and not window.busy, timeout=60_000)
    assert panel.offer.isVisibleTo(panel)
    assert panel.offer_button.text() == MARGIN_OFFER_BUTTON
    assert "subject matter" in panel.offer_text.text()
    panel.offer_button.click()
    setup = window.setup_panel
    assert setup.question.currentData() == "equivalent"
    assert setup.margin_entry.isVisible()
    qtbot.waitUntil(lambda: setup.margin_entry.size.hasFocus(), timeout=5_000)
    # the question in force is still "differ" until a margin is typed
    assert window.session.spec.question.kind == "differ"


def test_no_offer_after_a_clear_difference_or_another_question(make_window, qtbot, csv_file):
    apart = csv_file("apart.csv", [("old", 3.0 + i / 10) for i in range(12)] + [("new", 9.0 + i / 10) for i in range(12)],
                     ("kiln", "shrinkage_pct"))
    window = make_window([apart])
    ready(qtbot, window)
    assert not window.findings_panel.offer.isVisibleTo(window.findings_panel)
    window.session.ask(kind="higher")
    qtbot.waitUntil(lambda: window.session.analysis.spec.question.kind == "higher" and not window.busy,
                    timeout=60_000)
    assert not window.findings_panel.offer.isVisibleTo(window.findings_panel)


def test_kept_settings_carry_the_margin_to_the_next_file(make_window, qtbot, two_groups_csv, csv_file):
    other = csv_file("kilns.csv", [("old", 3.1 + i / 10) for i in range(8)] + [("new", 3.5 + i / 9) for i in range(8)],
                     ("kiln", "shrinkage_pct"))
    window = make_window([two_groups_csv])
    ready(qtbot, window)
    asked = Question("equivalent", 0.95, Margin.within(4, unit="percent"))
    window.session.ask(kind=asked.kind, margin=asked.margin)
    qtbot.waitUntil(lambda: window.session.analysis.spec.question == asked and not window.busy, timeout=60_000)
    window.keep_settings_action.trigger()
    window.open_file(other)
    qtbot.waitUntil(lambda: window.session.path == other, timeout=20_000)
    assert window.message_bar.key == "settings_kept"
    assert "the same within ±4 % of group 2's mean, 95%" in window.message_bar.text
    qtbot.waitUntil(lambda: window.session.analysis is not None and not window.busy, timeout=60_000)
    assert window.session.analysis.spec.question == asked
    entry = window.setup_panel.margin_entry
    assert window.setup_panel.question.currentData() == "equivalent"
    assert entry.size.text() == "4" and entry.unit.currentData() == "percent"
    # and without keeping them, the next file starts from "do they differ?", said in the bar
    window.keep_settings_action.trigger()
    window.open_file(two_groups_csv)
    qtbot.waitUntil(lambda: window.session.path == two_groups_csv, timeout=20_000)
    assert window.message_bar.key == "settings_fresh"
    assert "were the same within ±4 % of group 2's mean, 95%" in window.message_bar.text
    assert window.session.spec.question == Question()
    assert window.setup_panel.question.currentData() == "differ" and not entry.isVisibleTo(window.setup_panel)


def test_a_saved_margin_question_reopens_with_its_margin(make_window, qtbot, monkeypatch, two_groups_csv, tmp_path):
    window = make_window([two_groups_csv])
    ready(qtbot, window)
    asked = Question("not_worse", 0.9, Margin.not_worse_by(0.5, "higher"))
    window.session.ask(kind=asked.kind, level=asked.level, margin=asked.margin)
    qtbot.waitUntil(lambda: window.session.analysis.spec.question == asked and not window.busy, timeout=60_000)
    target = tmp_path / "kept.twofold"
    monkeypatch.setattr(main_window.QFileDialog, "getSaveFileName", lambda *a: (str(target), a[-1]))
    window.save_analysis_action.trigger()
    assert window.message_bar.key == "saved" and target.is_file()
    again = make_window([target])
    ready(qtbot, again)
    assert again.message_bar.key == "reopen_same"
    assert again.session.spec.question == asked
    setup = again.setup_panel
    assert setup.question.currentData() == "not_worse"
    entry = setup.margin_entry
    assert entry.size.text() == "0.5" and entry.unit.currentData() == "units"
    assert entry.worse.currentData() == "higher"
    assert entry.reading.text().endswith("lies below 0.5.")
