"""The main window: every way of opening a file, the flow to the findings, failures and stops."""

from __future__ import annotations

import hashlib
from pathlib import Path

import numpy as np
import pytest
from PySide6.QtCore import QMimeData, QPointF, Qt, QUrl
from PySide6.QtGui import QDropEvent, QKeySequence


def digest(path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def wait_for_table(qtbot, window, timeout=20_000):
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=timeout)


def test_every_demo_file_opens_as_a_double_click_would(make_window, qtbot, settle, demo_path):
    path = demo_path
    before = digest(path)
    window = make_window([path])  # what `twofold FILE` (the desktop's Exec line) runs
    wait_for_table(qtbot, window)
    settle(window, timeout=60_000)
    state = window.session
    assert window.data_panel.model.rowCount() == len(state.table.frame)
    assert state.path == path
    if state.intake is not None:
        qtbot.waitUntil(lambda: state.analysis is not None or window.message_bar.key is not None,
                        timeout=60_000)
        assert state.analysis is not None, window.message_bar.text
    else:
        assert window.message_bar.key == "groups_problem" and state.problem
    assert digest(path) == before  # the user's file is never written
    assert window.isVisible()


def test_columns_groups_set_aside_and_back(make_window, qtbot, settle, three_groups_csv):
    before = digest(three_groups_csv)
    window = make_window([three_groups_csv])
    wait_for_table(qtbot, window)
    settle(window)
    state = window.session
    # three batches: the window asks for two
    assert state.spec.group_column == "batch"
    assert state.spec.value_columns == ("peel_strength",)
    assert state.intake is None and "3 groups" in state.problem
    assert window.message_bar.key == "groups_problem"

    setup = window.setup_panel
    setup.first_group.setCurrentIndex(setup.first_group.findData("A"))
    setup.first_group.activated.emit(setup.first_group.currentIndex())
    setup.second_group.setCurrentIndex(setup.second_group.findData("C"))
    setup.second_group.activated.emit(setup.second_group.currentIndex())
    qtbot.waitUntil(lambda: state.intake is not None, timeout=10_000)
    assert state.intake.groups.labels == ("A", "C")
    assert window.message_bar.key is None
    # batch A has one blank cell among its 12 rows; C has 12 numbers
    assert state.intake.screening.n_used == (11, 12)
    settle(window, timeout=60_000)
    first = state.analysis
    assert first is not None and first.groups.labels == ("A", "C")

    frame_row = 0  # the first row is batch A
    window.data_panel.set_aside(frame_row, "peel_strength", "slip of the pen")
    qtbot.waitUntil(lambda: state.intake.screening.n_used == (10, 12), timeout=10_000)
    assert state.intake.screening.excluded_counts["set_aside"] == 1
    settle(window, timeout=60_000)
    assert state.analysis is not first and state.analysis.groups.n == (10, 12)

    window.data_panel.bring_back(frame_row, "peel_strength")
    qtbot.waitUntil(lambda: state.intake.screening.n_used == (11, 12), timeout=10_000)
    settle(window, timeout=60_000)
    assert state.analysis.groups.n == (11, 12)
    assert digest(three_groups_csv) == before


def test_a_broken_file_shows_a_message_and_the_window_stays_usable(make_window, qtbot, tmp_path, two_groups_csv):
    broken = tmp_path / "broken.csv"
    broken.write_bytes(bytes(range(256)) * 40)
    window = make_window([broken])
    qtbot.waitUntil(lambda: window.message_bar.key is not None, timeout=10_000)
    assert window.message_bar.key == "open_failed"
    assert window.message_bar.text.count("broken.csv") == 1  # named once, not "broken.csv: broken.csv ..."
    assert window.session.table is None and window.isVisible()
    assert window.open_file(two_groups_csv)
    wait_for_table(qtbot, window)
    assert window.message_bar.key is None


def test_the_sessions_problem_shows_in_the_bar_and_goes_when_solved(make_window, qtbot, settle, csv_file):
    rows = [("north" if i < 10 else "south", 5 + i % 3, f"plot {i}") for i in range(20)]
    path = csv_file("plots_with_notes.csv", rows, ("field", "yield_t", "note"))
    window = make_window([path])
    qtbot.waitUntil(lambda: window.session.analysis is not None, timeout=60_000)
    bar = window.message_bar
    state = window.session
    assert bar.key is None and state.problem is None
    # a value column that holds only text: the engine's sentence names the column
    state.choose(value_columns=("note",))
    qtbot.waitUntil(lambda: state.problem is not None, timeout=10_000)
    assert bar.isVisibleTo(window) and bar.key == "groups_problem"
    assert bar.text == state.problem and "'note'" in bar.text
    assert state.analysis is None and window.data_panel.model.rowCount() == 20
    # back to the numbers: the message goes and the comparison returns
    state.choose(value_columns=("yield_t",))
    qtbot.waitUntil(lambda: state.analysis is not None, timeout=60_000)
    assert bar.key is None and state.problem is None
    # a problem found before any worker runs shows as well
    state.choose(group_column=None)
    assert state.problem == "Choose the column that names the groups." and bar.text == state.problem
    state.choose(group_column="field")
    qtbot.waitUntil(lambda: state.analysis is not None, timeout=60_000)
    settle(window)
    assert bar.key is None and window.isVisible()


def test_the_window_opens_at_most_of_the_screen_with_balanced_panes(make_window, qtbot):
    window = make_window()
    qtbot.waitExposed(window)
    room = window.screen().availableGeometry()
    assert window.width() == pytest.approx(0.9 * room.width(), abs=2)
    assert window.height() == pytest.approx(0.9 * room.height(), abs=2)
    window.resize(1500, 950)  # the offscreen screen is small; a desktop one is not
    window.balance_panes()
    left, right = window.splitter.sizes()
    # the checks and findings get at least as much room as the data and set-up (47 % to 53 %)
    assert right >= left > 0.4 * (left + right)


def test_a_missing_file_is_named(make_window, tmp_path):
    window = make_window([tmp_path / "not_there.csv"])
    assert window.message_bar.key == "not_a_file"
    assert "not_there.csv" in window.message_bar.text


def test_an_unexpected_failure_in_a_worker_is_shown_not_fatal(make_window, qtbot, two_groups_csv, monkeypatch):
    import engine.analysis

    def made_up_failure(*args, **kwargs):
        raise RuntimeError("made-up failure for the test")

    monkeypatch.setattr(engine.analysis, "analyze", made_up_failure)
    window = make_window([two_groups_csv])
    qtbot.waitUntil(lambda: window.message_bar.key == "analysis_crashed", timeout=20_000)
    assert "made-up failure" in window.message_bar.text
    assert window.isVisible() and not window.busy
    assert window.redo_action.isEnabled()
    monkeypatch.undo()
    window.run_analysis()
    qtbot.waitUntil(lambda: window.session.analysis is not None, timeout=60_000)
    assert window.message_bar.key is None


def test_stop_ends_a_long_run(make_window, qtbot, csv_file):
    rng = np.random.default_rng(5)
    rows = [("old", round(float(v), 3)) for v in rng.normal(10, 2, 3000)]
    rows += [("new", round(float(v), 3)) for v in rng.normal(10.2, 2, 3000)]
    path = csv_file("long_run.csv", rows, ("press", "force"))
    window = make_window()
    window.session.choose(resamples=1_000_000)
    window.open_file(path)
    qtbot.waitUntil(lambda: window.analysis_worker.busy, timeout=20_000)
    with qtbot.waitSignal(window.analysis_worker.progress, timeout=30_000):
        pass
    assert window.cancel_button.isEnabled() and not window.redo_action.isEnabled()
    with qtbot.waitSignal(window.analysis_worker.stopped, timeout=5_000):
        window.cancel_button.click()
    assert window.message_bar.key == "analysis_stopped"
    assert not window.busy and window.redo_action.isEnabled()
    assert window.session.analysis is None
    assert window.analysis_worker.wait(30_000)  # the engine noticed and ended the pool thread


def test_choosing_a_procedure_only_changes_the_view(make_window, qtbot, settle, two_groups_csv):
    window = make_window([two_groups_csv])
    qtbot.waitUntil(lambda: window.session.analysis is not None, timeout=60_000)
    settle(window)
    shown = window.session.analysis
    window.session.choose(procedure="mann_whitney")
    assert not window.busy and window.session.analysis is shown
    window.session.ask(kind="lower")
    assert window.busy
    qtbot.waitUntil(lambda: window.session.analysis is not shown and not window.busy, timeout=60_000)
    assert window.session.analysis.spec.alternative == "less"


def _add_bolts_sheet(book) -> None:
    """A sheet "bolts" of eight invented strengths from two suppliers."""
    data = book.create_sheet("bolts")
    data.append(["supplier", "strength"])
    for k in range(8):
        data.append(["east" if k % 2 else "west", 800 + 7 * k])


def test_a_workbook_with_several_sheets_asks_which(make_window, qtbot, tmp_path, sheets_asked):
    openpyxl = pytest.importorskip("openpyxl")
    book = openpyxl.Workbook()
    notes = book.active
    notes.title = "notes"
    notes.append(["written by", "the lab"])
    _add_bolts_sheet(book)
    path = tmp_path / "bolts.xlsx"
    book.save(path)
    chosen = []

    def ask(names, current):
        chosen.append(list(names))
        return "bolts"

    window = make_window([path], ask_sheet=ask)
    qtbot.waitUntil(lambda: window.session.table is not None and window.session.table.sheet == "bolts",
                    timeout=20_000)
    assert chosen == [["notes", "bolts"]]  # asked once, not again for the chosen sheet
    assert window.session.spec.source.sheet == "bolts"
    assert window.data_panel.model.rowCount() == 8


def test_the_sheet_offered_first_holds_numbers_and_hidden_ones_are_not_offered(make_window, qtbot, tmp_path):
    openpyxl = pytest.importorskip("openpyxl")
    book = openpyxl.Workbook()
    book.active.title = "Notes"
    book.active.append(["Bolts from two forges, tested in May."])
    old = book.create_sheet("old")
    old.append(["supplier", "strength"])
    old.append(["east", 1.0])
    old.append(["west", 2.0])
    old.sheet_state = "hidden"
    _add_bolts_sheet(book)
    path = tmp_path / "forges.xlsx"
    book.save(path)
    offered = []

    def ask(names, current):
        offered.append((list(names), current))
        return current

    window = make_window([path], ask_sheet=ask)
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=20_000)
    assert offered == [(["Notes", "bolts"], "bolts")]
    assert window.session.table.sheet == "bolts"


def test_a_drop_opens_the_file(make_window, qtbot, two_groups_csv):
    window = make_window()
    mime = QMimeData()
    mime.setUrls([QUrl.fromLocalFile(str(two_groups_csv))])
    event = QDropEvent(QPointF(10, 10), Qt.DropAction.CopyAction, mime, Qt.MouseButton.LeftButton,
                       Qt.KeyboardModifier.NoModifier)
    window.dropEvent(event)
    wait_for_table(qtbot, window)
    assert window.session.path == two_groups_csv


def test_recent_files(make_window, qtbot, two_groups_csv, three_groups_csv):
    window = make_window([two_groups_csv])
    wait_for_table(qtbot, window)
    window.open_file(three_groups_csv)
    qtbot.waitUntil(lambda: window.session.path == three_groups_csv, timeout=20_000)
    assert window.recent.paths()[:2] == [three_groups_csv.resolve(), two_groups_csv.resolve()]
    window._fill_recent()
    assert [a.text() for a in window.recent_menu.actions()][:2] == [three_groups_csv.name, two_groups_csv.name]
    two_groups_csv.unlink()
    window.open_recent(two_groups_csv)
    assert window.message_bar.key == "recent_gone"
    assert two_groups_csv.resolve() not in window.recent.paths()


def test_shortcuts_and_tooltips(make_window):
    window = make_window()
    assert window.open_action.shortcut() == QKeySequence(QKeySequence.StandardKey.Open)
    assert window.copy_action.shortcut() == QKeySequence("Ctrl+Shift+C")
    assert window.export_action.shortcut() == QKeySequence("Ctrl+E")
    assert window.quit_action.shortcut() == QKeySequence(QKeySequence.StandardKey.Quit)
    for action in (window.open_action, window.copy_action, window.export_action, window.redo_action,
                   window.cancel_action, window.quit_action, window.copy_plot_action, window.save_plot_action):
        assert action.toolTip().endswith(".")
    # the plot these copy and save is the findings panel's side-by-side plot of the intervals
    for action in (window.copy_plot_action, window.save_plot_action):
        assert "interval" in action.toolTip() and "two groups" not in action.toolTip()
    for widget in (window.setup_panel.group_column, window.setup_panel.confidence, window.data_panel.grid,
                   window.cancel_button):
        assert widget.toolTip()


def test_nothing_to_copy_before_a_comparison_and_never_over_the_data(make_window, qtbot, two_groups_csv):
    window = make_window()
    window._add_late_panels()
    window.copy_findings()
    assert window.message_bar.key == "nothing_yet"
    window.open_file(two_groups_csv)
    qtbot.waitUntil(lambda: window.session.analysis is not None, timeout=60_000)
    before = digest(two_groups_csv)
    assert not window.export_report(two_groups_csv)
    assert window.message_bar.key == "save_failed" and "data file" in window.message_bar.text
    assert digest(two_groups_csv) == before


def test_copy_before_the_late_panels_came_in_brings_them_in(make_window, qtbot, two_groups_csv, monkeypatch):
    from PySide6.QtGui import QGuiApplication

    from desktop.main_window import MainWindow

    # the late panels wait: the user copies before they are in
    monkeypatch.setattr(MainWindow, "load_late_panels", lambda self: None)
    window = make_window()
    window.open_file(two_groups_csv)
    qtbot.waitUntil(lambda: window.session.analysis is not None, timeout=60_000)
    assert window.findings_panel is None
    QGuiApplication.clipboard().clear()
    window.copy_findings()
    assert window.findings_panel is not None and window.message_bar.key == "copied"
    assert "north" in QGuiApplication.clipboard().text()


def test_copy_and_export_go_through_the_findings_panel(make_window, qtbot, two_groups_csv, tmp_path):
    from PySide6.QtGui import QGuiApplication

    window = make_window([two_groups_csv])
    qtbot.waitUntil(lambda: window.session.analysis is not None and window.findings_panel is not None,
                    timeout=60_000)
    QGuiApplication.clipboard().clear()
    window.copy_action.trigger()
    copied = QGuiApplication.clipboard().text()
    assert "north" in copied and "south" in copied
    target = tmp_path / "findings.html"
    assert window.export_report(target)
    assert target.stat().st_size > 0 and "north" in target.read_text(encoding="utf-8")
    assert window.message_bar.key == "saved"
    picture = tmp_path / "groups.png"
    assert window.save_plot(picture)
    assert picture.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"  # reference: the PNG signature (RFC 2083)


def test_every_message_shown_is_declared_once():
    import re
    from pathlib import Path

    from desktop.messages import MESSAGES, _DECLARED

    desktop_dir = Path(__file__).resolve().parents[2] / "desktop"
    used = set()
    for source in desktop_dir.glob("*.py"):
        used |= set(re.findall(r'show_message\(\s*"(\w+)"', source.read_text(encoding="utf-8")))
    assert used <= set(MESSAGES), used - set(MESSAGES)
    assert len(MESSAGES) == len(_DECLARED)  # no key declared twice


def test_message_bar_follows_the_palette(make_window):
    from PySide6.QtGui import QPalette

    window = make_window()
    bar = window.message_bar
    bar.show_message("save_failed", name="report.html", reason="the disk is full")
    assert bar.isVisibleTo(window) and bar.text == "Could not save report.html: the disk is full"
    base = window.palette().color(QPalette.ColorRole.Base)
    shown = bar.palette().color(QPalette.ColorRole.Window)
    # a tint of the theme's own base colour: lightness stays on the same side as the base
    assert (shown.lightness() > 127) == (base.lightness() > 127)
    bar.clear()
    assert bar.key is None and not bar.isVisibleTo(window)


def test_each_new_file_starts_from_the_usual_settings_unless_kept(make_window, qtbot, two_groups_csv, csv_file):
    other = csv_file("kilns.csv", [("old", 3.1 + i / 10) for i in range(8)] + [("new", 3.5 + i / 9) for i in range(8)],
                     ("kiln", "shrinkage_pct"))
    window = make_window([two_groups_csv])
    qtbot.waitUntil(lambda: window.session.analysis is not None, timeout=60_000)
    window.session.ask(kind="lower", level=0.9)
    window.session.state(ordinal=True)
    qtbot.waitUntil(lambda: window.session.analysis.spec.alternative == "less" and not window.busy,
                    timeout=60_000)
    assert not window.keep_settings_action.isChecked()  # the default: every file starts afresh
    window.open_file(other)
    qtbot.waitUntil(lambda: window.session.path == other, timeout=20_000)
    assert window.message_bar.key == "settings_fresh"
    assert "two-sided, 95%" in window.message_bar.text
    assert "one-sided (group 1 lower), 90%" in window.message_bar.text
    qtbot.waitUntil(lambda: window.session.analysis is not None and not window.busy, timeout=60_000)
    spec = window.session.analysis.spec
    assert (spec.alternative, spec.level) == ("two-sided", 0.95)
    assert window.setup_panel.confidence.value() == 95.0
    assert window.setup_panel.question.currentData() == "differ"
    assert not window.session.spec.statements.ordinal  # a statement about one file's data never carries over

    window.keep_settings_action.trigger()
    assert window.keep_settings_action.isChecked()
    window.session.ask(kind="higher", level=0.9)
    window.session.state(ordinal=True)
    qtbot.waitUntil(lambda: window.session.analysis.spec.alternative == "greater" and not window.busy,
                    timeout=60_000)
    window.open_file(two_groups_csv)
    qtbot.waitUntil(lambda: window.session.path == two_groups_csv, timeout=20_000)
    assert window.message_bar.key == "settings_kept"
    assert "one-sided (group 1 higher), 90%" in window.message_bar.text
    qtbot.waitUntil(lambda: window.session.analysis is not None and not window.busy, timeout=60_000)
    spec = window.session.analysis.spec
    assert (spec.alternative, spec.level) == ("greater", 0.9)
    assert not window.session.spec.statements.ordinal
    assert window.settings.value("comparison/keep_settings", type=bool)  # remembered for next time


def test_the_copied_banner_goes_once_the_results_change(make_window, qtbot, two_groups_csv):
    window = make_window([two_groups_csv])
    qtbot.waitUntil(lambda: window.session.analysis is not None and window.findings_panel is not None
                    and not window.busy, timeout=60_000)
    window.copy_action.trigger()
    assert window.message_bar.key == "copied"
    window.session.ask(level=0.9)  # what was copied no longer matches what is shown
    assert window.message_bar.key is None


def test_recent_files_of_the_same_name_show_their_folders(make_window, qtbot, tmp_path, two_groups_csv):
    from desktop.recent import menu_labels

    twins = []
    for year in ("2024", "2025"):
        (tmp_path / year).mkdir()
        twins.append(tmp_path / year / "bolts.csv")
        twins[-1].write_bytes(two_groups_csv.read_bytes())
    window = make_window([twins[0]])
    qtbot.waitUntil(lambda: window.session.path == twins[0], timeout=20_000)
    window.open_file(twins[1])
    qtbot.waitUntil(lambda: window.session.path == twins[1], timeout=20_000)
    window._fill_recent()
    texts = [action.text() for action in window.recent_menu.actions()][:2]
    assert texts == ["bolts.csv  (…/2025)", "bolts.csv  (…/2024)"]
    assert menu_labels([Path("/data/a.csv"), Path("/data/b.csv")]) == ["a.csv", "b.csv"]  # only twins
    assert menu_labels([Path("/a/run/x.csv"), Path("/b/run/x.csv")]) == ["x.csv  (…/a/run)", "x.csv  (…/b/run)"]


def test_a_new_file_shows_the_right_panels_from_the_top(make_window, qtbot, two_groups_csv, csv_file):
    other = csv_file("kilns.csv", [("old", 3.1 + i / 10) for i in range(8)] + [("new", 3.5 + i / 9) for i in range(8)],
                     ("kiln", "shrinkage_pct"))
    window = make_window([two_groups_csv])
    window.resize(900, 500)
    qtbot.waitUntil(lambda: window.session.analysis is not None and window.choice_panel is not None
                    and not window.busy, timeout=60_000)
    bars = [panel.scroll.verticalScrollBar() for panel in (window.choice_panel, window.findings_panel)]
    for index, bar in enumerate(bars):
        window.tabs.setCurrentIndex(index)
        qtbot.waitUntil(lambda bar=bar: bar.maximum() > 0, timeout=10_000)
        bar.setValue(bar.maximum())
        assert bar.value() > 0
    window.open_file(other)
    qtbot.waitUntil(lambda: window.session.path == other, timeout=20_000)
    assert [bar.value() for bar in bars] == [0, 0]


def test_saving_remembers_the_folder_and_says_where_the_file_went(make_window, qtbot, two_groups_csv, tmp_path,
                                                                    monkeypatch):
    from desktop import main_window

    window = make_window([two_groups_csv])
    qtbot.waitUntil(lambda: window.session.analysis is not None and window.findings_panel is not None,
                    timeout=60_000)
    asked = []
    reports = tmp_path / "reports"
    reports.mkdir()

    def dialog(parent, title, start, name_filter):
        asked.append(Path(start))
        return str(reports / Path(start).name), ""

    monkeypatch.setattr(main_window.QFileDialog, "getSaveFileName", dialog)
    assert window.export_report()
    assert asked[-1] == two_groups_csv.parent / "plots.html"  # first time: beside the data
    written = reports / "plots.html"
    assert written.is_file()
    assert window.message_bar.key == "saved"
    assert window.message_bar.text == f"Saved plots.html in {reports.resolve()}."
    assert window.message_bar.action_text == "Open the folder"
    opened = []
    monkeypatch.setattr(main_window, "_open_folder", opened.append)
    window.message_bar._action.click()
    assert opened == [reports.resolve()]
    window.findings_panel.export_button.click()  # the panel's own button goes the same way
    assert asked[-1] == reports / "plots.html"  # the next save opens where the last one went
    window.save_plot()
    assert asked[-1] == reports / "plots.png"


def test_each_new_analysis_draws_and_shows_its_seed(make_window, qtbot, two_groups_csv, csv_file):
    other = csv_file("kilns.csv", [("old", 3.1 + i / 10) for i in range(8)] + [("new", 3.5 + i / 9) for i in range(8)],
                     ("kiln", "shrinkage_pct"))
    window = make_window([two_groups_csv])
    window.keep_settings_action.setChecked(True)  # even kept settings leave the seed to the new file
    qtbot.waitUntil(lambda: window.session.analysis is not None and not window.busy, timeout=60_000)
    first = window.session.analysis.spec.seed
    assert first is not None and first != 20261202  # drawn, not a fixed default
    assert window.setup_panel.seed.text() == str(first)
    window.open_file(other)
    qtbot.waitUntil(lambda: window.session.path == other and window.session.analysis is not None
                    and not window.busy, timeout=60_000)
    second = window.session.analysis.spec.seed
    assert second != first and window.setup_panel.seed.text() == str(second)  # 1 in 2^32 to fail by chance
    # the same seed again repeats the run exactly
    shown = window.session.analysis
    window.run_analysis()
    qtbot.waitUntil(lambda: window.session.analysis is not shown and not window.busy, timeout=60_000)
    again = window.session.analysis.procedures
    assert again["permutation_mean"].p_value == shown.procedures["permutation_mean"].p_value
    assert again["bootstrap_mean"].interval == shown.procedures["bootstrap_mean"].interval
