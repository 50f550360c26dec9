"""Saving an analysis from the window and reopening it: every way of opening a .twofold file, and
what the window says for each thing the check can find (the file dialogs are patched)."""

from __future__ import annotations

import hashlib
import json
import shutil
from pathlib import Path

import pytest
from PySide6.QtGui import QKeySequence

from engine import saved
from engine.jsonout import analysis_document


def digest(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def document(analysis) -> dict:
    return json.loads(json.dumps(analysis_document(analysis), allow_nan=False))


@pytest.fixture
def data_file(tmp_path, two_groups_csv) -> Path:
    folder = tmp_path / "data"
    folder.mkdir()
    return Path(shutil.copy(two_groups_csv, folder / "plots.csv"))


def ready(qtbot, window, timeout=60_000):
    qtbot.waitUntil(lambda: window.session.analysis is not None and not window.busy, timeout=timeout)


def save_as(window, monkeypatch, target: Path) -> None:
    """Save the analysis with Ctrl+S, answering the save dialog with ``target``."""
    from desktop import main_window

    asked = []

    def dialog(parent, title, start, name_filter):
        asked.append((title, Path(start), name_filter))
        return str(target), name_filter

    monkeypatch.setattr(main_window.QFileDialog, "getSaveFileName", dialog)
    window.save_analysis_action.trigger()
    assert asked and asked[-1][1].suffix == saved.EXTENSION and "*.twofold" in asked[-1][2]


@pytest.fixture
def saved_file(make_window, qtbot, monkeypatch, data_file, tmp_path):
    """A .twofold file saved from the window (one-sided question, a pick, a value set aside)."""
    window = make_window([data_file])
    ready(qtbot, window)
    window.session.ask(kind="lower", level=0.9)
    window.data_panel.set_aside(3, "yield_t", "slip of the pen")
    window.session.choose(procedure="mann_whitney")
    qtbot.waitUntil(lambda: bool(window.session.analysis.spec.set_aside) and not window.busy, timeout=60_000)
    target = tmp_path / "saved" / "plots analysis"
    target.parent.mkdir()
    save_as(window, monkeypatch, target)
    written = target.with_name("plots analysis.twofold")  # the suffix is added when left out
    assert window.message_bar.key == "saved" and written.is_file()
    return written, document(window.session.analysis), window.session.spec


def test_save_and_reopen_gives_the_same_numbers_in_a_new_window(make_window, qtbot, saved_file, data_file):
    path, numbers_before, spec_before = saved_file
    before = digest(data_file)
    window = make_window([path])  # the command line, as a double-click runs it
    ready(qtbot, window)
    assert window.message_bar.key == "reopen_same"
    assert "plots.csv" in window.message_bar.text and "exactly" in window.message_bar.text
    state = window.session
    assert state.spec == spec_before  # the pick, the set-aside value and the seed came back
    assert state.spec.procedure == "mann_whitney" and state.spec.set_aside[0].reason == "slip of the pen"
    assert document(state.analysis) == {**numbers_before, "spec": {**numbers_before["spec"], "procedure": "mann_whitney"}}
    assert window.setup_panel.seed.text() == str(spec_before.seed)
    assert window.setup_panel.question.currentData() == "lower"
    assert window.data_panel.model.mark(3, 1) is not None  # the value set aside is marked in the grid
    assert window.windowTitle().startswith(path.name)
    assert path.resolve() in window.recent.paths()
    assert digest(data_file) == before  # neither file is written by reopening
    # the window goes on as with any file: a change of setting runs the comparison again
    shown = state.analysis
    state.ask(level=0.95)
    qtbot.waitUntil(lambda: state.analysis is not shown and not window.busy, timeout=60_000)
    assert state.analysis.spec.level == 0.95


def test_the_open_dialog_and_the_recent_list_take_saved_analyses(make_window, qtbot, monkeypatch, saved_file):
    from desktop import main_window

    path = saved_file[0]
    window = make_window()
    assert window.save_analysis_action.shortcut() == QKeySequence(QKeySequence.StandardKey.Save)
    offered = []

    def dialog(parent, title, start, name_filter):
        offered.append(name_filter)
        return str(path), ""

    monkeypatch.setattr(main_window.QFileDialog, "getOpenFileName", dialog)
    window.open_action.trigger()
    ready(qtbot, window)
    assert "*.twofold" in offered[0].split(";;")[0]  # offered beside the data files, not only under "All"
    assert window.message_bar.key == "reopen_same"
    other = make_window()
    other.recent.add(path)
    other.open_recent(path)
    ready(qtbot, other)
    assert other.message_bar.key == "reopen_same"


def test_a_changed_data_file_is_said_and_never_called_the_same(make_window, qtbot, saved_file, data_file):
    path = saved_file[0]
    lines = data_file.read_text(encoding="utf-8").splitlines()
    lines[5] = lines[5].split(",")[0] + ",9.999"
    data_file.write_text("\n".join(lines) + "\n", encoding="utf-8")
    window = make_window([path])
    ready(qtbot, window)
    assert window.message_bar.key == "reopen_source_changed"
    text = window.message_bar.text
    assert "has changed" in text and "checksum" in text and "numbers that differ" in text
    from desktop.messages import MESSAGES

    assert MESSAGES["reopen_source_changed"].level == "warning"
    assert window.session.spec.source.sha256 == digest(data_file)  # what is shown is the file as it is now


def test_a_changed_data_file_with_the_same_numbers_is_still_said(make_window, qtbot, saved_file, data_file):
    path = saved_file[0]
    data_file.write_text(data_file.read_text(encoding="utf-8").replace("\n", "\r\n"), encoding="utf-8")
    window = make_window([path])
    ready(qtbot, window)
    assert window.message_bar.key == "reopen_source_changed_alike"
    assert "has changed" in window.message_bar.text and "came out as saved" in window.message_bar.text


def test_a_missing_data_file_keeps_what_is_shown_and_offers_to_find_it(make_window, qtbot, monkeypatch, saved_file,
                                                                     data_file, two_groups_csv, tmp_path):
    from desktop import main_window

    path, numbers_before, _ = saved_file
    moved = tmp_path / "elsewhere" / "renamed.csv"
    moved.parent.mkdir()
    data_file.rename(moved)
    window = make_window([two_groups_csv])
    ready(qtbot, window)
    shown, spec = window.session.analysis, window.session.spec
    window.open_file(path)
    qtbot.waitUntil(lambda: window.message_bar.key == "reopen_source_missing", timeout=60_000)
    assert "plots.csv" in window.message_bar.text and "not there any more" in window.message_bar.text
    assert window.session.analysis is shown and window.session.spec == spec  # nothing the user had is lost
    assert window.message_bar.action_text == "Find the data file…"
    asked = []

    def dialog(parent, title, start, name_filter):
        asked.append(name_filter)
        return str(moved), ""

    monkeypatch.setattr(main_window.QFileDialog, "getOpenFileName", dialog)
    window.message_bar._action.click()
    qtbot.waitUntil(lambda: window.message_bar.key == "reopen_same", timeout=60_000)
    assert "renamed.csv" in window.message_bar.text  # where it was found
    assert window.session.path == moved
    numbers_now = document(window.session.analysis)
    assert numbers_now["procedures"] == numbers_before["procedures"]


def test_other_numbers_are_listed_by_name(make_window, qtbot, saved_file):
    path = saved_file[0]
    content = json.loads(path.read_text(encoding="utf-8"))
    welch = content["numbers"]["procedures"]["welch_t"]
    welch["p_value"] = welch["p_value"] * 1.01  # a figure changed by hand, as a wrong copy would be
    path.write_text(json.dumps(content), encoding="utf-8")
    window = make_window([path])
    ready(qtbot, window)
    assert window.message_bar.key == "reopen_numbers_differ"
    assert "welch_t p_value: saved" in window.message_bar.text


@pytest.mark.parametrize("spoil, words", [
    (lambda text: text[: len(text) // 2], "cut short"),
    (lambda text: text.replace('"version": 1', '"version": 7'), "newer Twofold"),
    (lambda text: "not json at all {", "damaged"),
    (lambda text: text.replace('"yield_t"', '"yield_kg"'), "no longer fits"),
], ids=["truncated", "newer-version", "damaged", "columns-gone"])
def test_a_file_that_cannot_be_reopened_is_said_and_nothing_is_lost(make_window, qtbot, saved_file, two_groups_csv,
                                                                     spoil, words):
    path = saved_file[0]
    path.write_text(spoil(path.read_text(encoding="utf-8")), encoding="utf-8")
    window = make_window([two_groups_csv])
    ready(qtbot, window)
    shown, spec = window.session.analysis, window.session.spec
    window.open_file(path)
    qtbot.waitUntil(lambda: window.message_bar.key == "reopen_refused", timeout=60_000)
    assert words in window.message_bar.text and path.name in window.message_bar.text
    assert window.session.analysis is shown and window.session.spec == spec
    assert window.isVisible() and not window.busy


def test_close_numbers_are_confirmed_as_close(make_window, qtbot, monkeypatch, saved_file):
    """A re-run on another computer may differ in the last bits: within 1e-12 relative it is
    confirmed as close, never as the same (the tolerance is engine.saved.CLOSE_ENOUGH)."""
    path = saved_file[0]
    content = json.loads(path.read_text(encoding="utf-8"))
    group = content["numbers"]["groups"][0]
    group["mean"] = group["mean"] * (1 + 1e-14)
    path.write_text(json.dumps(content), encoding="utf-8")
    window = make_window([path])
    ready(qtbot, window)
    assert window.message_bar.key == "reopen_close"


def test_nothing_to_save_before_an_analysis(make_window):
    window = make_window()
    assert not window.save_analysis()
    assert window.message_bar.key == "nothing_yet"


def test_an_analysis_saved_by_the_command_reopens_in_the_window_to_the_same_numbers(make_window, qtbot, data_file,
                                                                                     tmp_path):
    import subprocess
    import sys

    target = tmp_path / "from the command.twofold"
    root = Path(__file__).resolve().parents[2]
    done = subprocess.run([sys.executable, "-m", "engine", "analyze", str(data_file), "--seed", "31", "--json",
                           "--save", str(target)], cwd=root, capture_output=True, text=True, timeout=300)
    assert done.returncode == 0, done.stderr
    window = make_window([target])
    ready(qtbot, window)
    assert window.message_bar.key == "reopen_same"
    assert document(window.session.analysis) == json.loads(done.stdout)
