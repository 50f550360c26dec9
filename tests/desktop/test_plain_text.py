"""Group labels, column names and file names that look like HTML are shown as text, never markup."""

from __future__ import annotations

import html

import numpy as np
from PySide6.QtCore import Qt
from PySide6.QtGui import QTextDocument
from PySide6.QtWidgets import QLabel

from desktop import export
from desktop.plain_text import plain_label, tooltip

HUGE = "<font size=7 color=red>HUGE</font>"
PICTURE = "<img width=900 height=700>"
SMALL = "<b>small</b>"


def shown_as_text(label: QLabel, text: str) -> bool:
    """The label shows ``text`` literally, and one line of it given room is one line of its font
    high (drawn as markup, ``HUGE`` is about three lines high and the picture 700 pixels)."""
    if text not in label.text() or label.textFormat() != Qt.TextFormat.PlainText:
        return False
    height = label.heightForWidth(4000) if label.wordWrap() else label.sizeHint().height()
    return height < 2 * label.fontMetrics().height()


def rendered(html_text: str) -> str:
    """What Qt's rich-text engine draws for ``html_text`` (tooltips, pyqtgraph's labels)."""
    document = QTextDocument()
    document.setHtml(html_text)
    return document.toPlainText()


def test_a_plain_label_and_a_tooltip_keep_markup_as_text(qtbot):
    label = plain_label(PICTURE)
    qtbot.addWidget(label)
    assert shown_as_text(label, PICTURE)
    # the same text in a label that guesses its format becomes a 900 by 700 picture frame
    guessing = QLabel(PICTURE)
    qtbot.addWidget(guessing)
    assert guessing.sizeHint().height() >= 700
    for text in (HUGE, PICTURE, "A & B", "a < b", "a\u202eb"):
        shown = rendered(tooltip(text))
        assert "\u202e" not in shown
        assert shown == text.replace("\u202e", "\\u202e")


def test_html_in_labels_and_names_is_shown_literally(make_window, qtbot, settle, tmp_path):
    rng = np.random.default_rng(5)
    rows = [f'"{HUGE}",{v:.3f}' for v in rng.normal(10, 1, 12)]
    rows += [f'"{SMALL}",{v:.3f}' for v in rng.normal(12, 1, 11)]
    rows += [f"third,{v:.3f}" for v in rng.normal(11, 1, 5)]
    rows.append(f'"{SMALL}",{PICTURE}')  # a word where a number belongs: left out, with a tip
    path = tmp_path / f"{PICTURE}.csv"
    path.write_text(f'"{PICTURE} group","{HUGE} value"\n' + "\n".join(rows) + "\n", encoding="utf-8")

    window = make_window([path])
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=20_000)
    settle(window)
    state = window.session
    assert state.spec.group_column == f"{PICTURE} group"
    # three groups: the hint names the group column
    setup = window.setup_panel
    assert shown_as_text(setup.hint, f"{PICTURE} group")
    for combo, label in ((setup.first_group, HUGE), (setup.second_group, SMALL)):
        combo.setCurrentIndex(combo.findData(label))
        combo.activated.emit(combo.currentIndex())
    qtbot.waitUntil(lambda: state.intake is not None, timeout=10_000)
    settle(window, timeout=60_000)
    qtbot.waitUntil(lambda: state.analysis is not None, timeout=60_000)
    assert state.analysis.groups.labels == (HUGE, SMALL)

    assert PICTURE in window.windowTitle()
    heading = window.data_panel.heading
    assert PICTURE in rendered(heading.text()) and heading.sizeHint().height() < 200
    assert PICTURE in window.data_panel.report.toPlainText()  # the screening names the cell
    model = window.data_panel.model
    tips = [model.data(model.index(row, 1), Qt.ItemDataRole.ToolTipRole) for row in range(model.rowCount())]
    assert any(tip and PICTURE in rendered(tip) for tip in tips)

    qtbot.waitUntil(lambda: window.choice_panel is not None and window.findings_panel is not None, timeout=20_000)
    choice = window.choice_panel
    qtbot.waitUntil(lambda: choice.shape_cards[0].title.text() != "", timeout=20_000)
    assert shown_as_text(choice.shape_cards[0].title, HUGE)
    assert shown_as_text(choice.shape_cards[1].title, SMALL)
    assert shown_as_text(choice.sd_labels[0], HUGE)
    assert shown_as_text(choice.sd_labels[1], SMALL)

    findings = window.findings_panel
    qtbot.waitUntil(lambda: findings.headline.text() != "", timeout=20_000)
    assert shown_as_text(findings.headline, HUGE)
    axis = findings.plot.getPlotItem().getAxis("bottom")
    # pyqtgraph lays the axis name out as HTML: what it draws is the text itself
    assert f"{HUGE} minus {SMALL}" in axis.label.toPlainText()
    assert f"{HUGE} minus {SMALL}" in findings.table.item(0, 0).text()

    page = export.report_html(state.analysis, procedure=state.analysis.recommendation.key)
    assert HUGE not in page and html.escape(HUGE) in page and html.escape(PICTURE) in page

    bar = window.message_bar
    bar.show_message("open_failed", name=path.name, reason=f"{PICTURE} {HUGE}")
    assert shown_as_text(bar._text, PICTURE) and HUGE in bar.text


def test_the_grid_and_the_lists_show_direction_overrides_and_breaks_as_escapes(qtbot, tmp_path):
    # reference: Unicode Standard Annex #9 - U+202E (RIGHT-TO-LEFT OVERRIDE) shows the text
    # after it reversed, so "r\u202eo differ?" would read as "r?reffid o" in a list
    import pandas as pd

    from desktop.setup_panel import SetupPanel
    from desktop.table_model import FrameModel
    from engine.io.table import Table
    from engine.session import Session

    first, second = "r\u202eo", "two\nlines"
    frame = pd.DataFrame({"site\u202e": [first, second, first, second], "mass": [1.0, 2.0, 3.0, 4.5]})
    table = Table(path=tmp_path / "made_up.csv", kind="csv", frame=frame, sheet=None, sheet_names=(),
                  encoding="utf-8", delimiter=",", decimal=".", thousands=None, header=True,
                  column_kinds={"site\u202e": "text", "mass": "number"}, notes=())
    model = FrameModel()
    model.set_table(table)
    shown = [model.data(model.index(row, 0)) for row in range(4)]
    assert shown == ["r\\u202eo", "two\\nlines"] * 2
    assert model.headerData(0, Qt.Orientation.Horizontal).startswith("site\\u202e\n")

    session = Session()
    from engine.spec import Source

    session.choose(source=Source(str(table.path)), group_column="site\u202e", value_columns=("mass",),
                   groups=(first, second))
    session.store("table", table)
    panel = SetupPanel(session)
    qtbot.addWidget(panel)
    texts = [panel.first_group.itemText(i) for i in range(panel.first_group.count())]
    assert "r\\u202eo" in texts and "two\\nlines" in texts
    assert panel.first_group.currentData() == first  # the choice is still the label itself
    questions = [panel.question.itemText(i) for i in range(panel.question.count())]
    assert all("\u202e" not in q and "\n" not in q for q in questions)
    assert any("r\\u202eo" in q for q in questions)
    panel.cleanup()
