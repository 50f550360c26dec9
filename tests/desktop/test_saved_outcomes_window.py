"""Several measurements saved from their panel and reopened in the window by every way of opening
a .twofold file: the file's table on show, the panel with its outcomes ticked, its adjustment and
procedure chosen and its table filled, and the message bar saying what the check found."""

from __future__ import annotations

import hashlib
import io
import json
import shutil
from pathlib import Path

import numpy as np
import pytest
from scipy import stats as scipy_stats
from statsmodels.stats.multitest import multipletests

from desktop.main_window import REOPEN_MESSAGES, reopen_message
from desktop.messages import MESSAGES
from desktop.outcomes_panel import SAVED_SUFFIX, OutcomesPanel
from engine import saved
from engine.outcomes import wide_outcomes
from engine.rounding import format_p

DEMO = Path(__file__).resolve().parents[2] / "demo_files" / "bolts_four_ways.csv"
TICKED = ("strength_mpa", "hardness_hv", "mass_g")  # in the file's order
RESAMPLES = 200


def digest(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def cell(panel, row, column):
    return panel.grid.item(row, column).text()


def shown_panel(window) -> OutcomesPanel:
    panels = [p for p in window.findChildren(OutcomesPanel) if p.isVisible()]
    assert len(panels) == 1
    return panels[0]


@pytest.fixture
def data_file(tmp_path) -> Path:
    folder = tmp_path / "data"
    folder.mkdir()
    return Path(shutil.copy(DEMO, folder / "bolts.csv"))


@pytest.fixture
def saved_file(make_window, qtbot, data_file, tmp_path):
    """Three measurements compared in the panel with Welch's t for all, the verdicts by
    Benjamini-Hochberg, saved as a .twofold file (the suffix left out by the user)."""
    window = make_window([data_file])
    qtbot.waitUntil(lambda: window.session.analysis is not None and not window.busy, timeout=60_000)
    window.session.choose(resamples=RESAMPLES)
    qtbot.waitUntil(lambda: window.session.analysis.spec.resamples == RESAMPLES and not window.busy,
                    timeout=60_000)
    panel = window.open_outcomes()
    assert not panel.save_analysis_button.isEnabled()  # nothing to save before the table
    panel.tick(TICKED)
    panel.procedure.setCurrentIndex(panel.procedure.findData("welch_t"))
    with qtbot.waitSignal(panel.worker.finished, timeout=120_000):
        assert panel.run()
    panel.set_adjustment("bh")
    assert panel.save_analysis_button.isEnabled()
    target = tmp_path / "saved" / "three measurements"
    target.parent.mkdir()
    assert panel.save_analysis(target)
    written = target.with_name("three measurements" + SAVED_SUFFIX)
    assert panel.saved_path == written and written.is_file()
    assert panel.status.text() == f"Saved {written.name} in {written.parent.resolve()}."
    found = panel.found
    panel.close()
    window.close()
    return written, found


def test_the_panel_saves_what_the_engine_reads_back(saved_file, data_file):
    path, found = saved_file
    assert SAVED_SUFFIX == saved.EXTENSION
    back = saved.load(path)
    assert back.outcomes["adjustment"] == "bh" and back.outcomes["procedure"] == "welch_t"
    assert [entry["columns"] for entry in back.outcomes["list"]] == [[name] for name in TICKED]
    assert back.spec.source.sha256 == digest(data_file)
    again = saved.reopen(back)
    assert again.status == "same", again.message
    # reference: statsmodels multipletests ('holm', 'fdr_bh') on the raw p-values saved
    raw = [row["p_value"] for row in back.outcomes["figures"]]
    assert np.allclose([row["p_holm"] for row in back.outcomes["figures"]],
                       multipletests(raw, method="holm")[1], rtol=1e-12)
    assert np.allclose([row["p_bh"] for row in back.outcomes["figures"]],
                       multipletests(raw, method="fdr_bh")[1], rtol=1e-12)


def test_reopening_from_the_command_line_shows_the_table_and_the_panel(make_window, qtbot, saved_file, data_file):
    path, found = saved_file
    before = digest(data_file), digest(path)
    window = make_window([path])  # the command line, as a double-click runs it
    qtbot.waitUntil(lambda: window.message_bar.key == "reopen_outcomes_same" and not window.busy, timeout=120_000)
    assert "bolts.csv" in window.message_bar.text and "exactly as saved" in window.message_bar.text
    # the file's table is on show, with the first measurement compared in the window
    state = window.session
    assert state.table is not None and state.path == data_file
    assert state.spec.value_columns == ("strength_mpa",) and state.spec.seed == found.spec.seed
    first = state.analysis
    frame = state.table.frame
    north, east = found.spec.groups
    # reference: scipy.stats.ttest_ind (Welch) of the first measurement's two suppliers
    welch = scipy_stats.ttest_ind(frame["strength_mpa"][frame["supplier"] == north].astype(float),
                                  frame["strength_mpa"][frame["supplier"] == east].astype(float), equal_var=False)
    assert first.procedures["welch_t"].p_value == pytest.approx(welch.pvalue, rel=1e-10)
    assert window.windowTitle().startswith(path.name) and path.resolve() in window.recent.paths()
    # the panel: ticks, procedure, adjustment and table as saved
    panel = shown_panel(window)
    assert panel.ticked() == list(TICKED)
    assert panel.procedure.currentData() == "welch_t" and panel.adjustment_method() == "bh"
    assert panel.check.text() == window.message_bar.text and panel.check.isVisibleTo(panel)
    assert panel.reopened.status == "same" and panel.reopened.prepared is panel.found
    assert panel.grid.horizontalHeaderItem(10).text() == "Difference found (B-H)"
    assert panel.grid.rowCount() == len(TICKED)
    for row, (now, then) in enumerate(zip(panel.found.rows, found.rows)):
        assert (now.name, now.p_value, now.p_holm, now.p_bh, now.finding) == \
            (then.name, then.p_value, then.p_holm, then.p_bh, then.finding)
        assert cell(panel, row, 0) == then.name
        assert cell(panel, row, 8) == format_p(then.p_bh)
        assert cell(panel, row, 10) == ("yes" if then.finding else "no")
    assert panel.plot.row_names() == list(TICKED)
    assert panel.copy_button.isEnabled() and panel.save_analysis_button.isEnabled()
    assert (digest(data_file), digest(path)) == before  # neither file is written by reopening
    # the report says first what the check found, then the table as saved
    assert panel.report_button.isEnabled()
    report = panel.write_report(path.parent / "report.txt").read_text(encoding="utf-8")
    assert report.index("run again") < report.index("strength_mpa")
    assert panel.reopened.message in report
    page = panel.write_report(path.parent / "report.html").read_text(encoding="utf-8")
    assert "The saved analysis, run again" in page and "Every choice, as the saved analysis records it" in page
    # the switch works on the reopened table without running anything again
    panel.set_adjustment("holm")
    assert not panel.worker.busy and panel.grid.horizontalHeaderItem(10).text() == "Difference found (Holm)"
    # a run of the panel's own no longer carries the check of the file
    with qtbot.waitSignal(panel.worker.finished, timeout=120_000):
        assert panel.run()
    assert panel.reopened is None and not panel.check.isVisibleTo(panel)
    assert [r.p_value for r in panel.found.rows] == [r.p_value for r in found.rows]  # the same seed
    panel.close()


def test_the_open_dialog_and_the_recent_list_take_it(make_window, qtbot, monkeypatch, saved_file):
    from desktop import main_window

    path = saved_file[0]
    window = make_window()
    monkeypatch.setattr(main_window.QFileDialog, "getOpenFileName", lambda *args: (str(path), ""))
    window.open_action.trigger()
    qtbot.waitUntil(lambda: window.message_bar.key == "reopen_outcomes_same" and not window.busy, timeout=120_000)
    shown_panel(window).close()
    other = make_window()
    other.recent.add(path)
    other.open_recent(path)
    qtbot.waitUntil(lambda: other.message_bar.key == "reopen_outcomes_same" and not other.busy, timeout=120_000)
    assert shown_panel(other).ticked() == list(TICKED)


def test_a_moved_data_file_is_asked_for_then_reopened(make_window, qtbot, monkeypatch, saved_file, data_file,
                                                      tmp_path, two_groups_csv):
    from desktop import main_window

    path = saved_file[0]
    moved = tmp_path / "elsewhere" / "renamed.csv"
    moved.parent.mkdir()
    data_file.rename(moved)
    window = make_window([two_groups_csv])
    qtbot.waitUntil(lambda: window.session.analysis is not None and not window.busy, timeout=60_000)
    shown, spec = window.session.analysis, window.session.spec
    window.open_file(path)
    qtbot.waitUntil(lambda: window.message_bar.key == "reopen_source_missing", timeout=60_000)
    assert "bolts.csv" in window.message_bar.text
    assert window.session.analysis is shown and window.session.spec == spec  # nothing the user had is lost
    assert not window.findChildren(OutcomesPanel)
    monkeypatch.setattr(main_window.QFileDialog, "getOpenFileName", lambda *args: (str(moved), ""))
    window.message_bar._action.click()
    qtbot.waitUntil(lambda: window.message_bar.key == "reopen_outcomes_same" and not window.busy, timeout=120_000)
    assert "renamed.csv" in window.message_bar.text  # where it was found
    assert window.session.path == moved
    assert shown_panel(window).ticked() == list(TICKED)


def test_a_changed_data_file_is_said_with_the_figures_that_moved(make_window, qtbot, saved_file, data_file):
    path = saved_file[0]
    lines = data_file.read_text(encoding="utf-8").splitlines()
    cells = lines[3].split(",")
    cells[2] = str(int(cells[2]) + 40)  # one hardness reading changed
    lines[3] = ",".join(cells)
    data_file.write_text("\n".join(lines) + "\n", encoding="utf-8")
    window = make_window([path])
    qtbot.waitUntil(lambda: window.message_bar.key == "reopen_outcomes_changed" and not window.busy, timeout=120_000)
    text = window.message_bar.text
    assert "has changed" in text and "checksum" in text and "hardness_hv" in text
    assert MESSAGES["reopen_outcomes_changed"].level == "warning"
    assert window.session.spec.source.sha256 == digest(data_file)  # the file as it is now
    assert shown_panel(window).check.text() == text


@pytest.mark.parametrize("factor, key, words", [
    (1.01, "reopen_outcomes_differ", "hardness_hv p_bh: saved"),
    (1 + 1e-14, "reopen_outcomes_close", "12 significant digits"),
], ids=["differ", "close"])
def test_other_figures_are_never_called_the_same(make_window, qtbot, saved_file, factor, key, words):
    path = saved_file[0]
    content = json.loads(path.read_text(encoding="utf-8"))
    content["outcomes"]["figures"][1]["p_bh"] *= factor  # a figure changed, as a wrong copy would be
    path.write_text(json.dumps(content), encoding="utf-8")
    window = make_window([path])
    qtbot.waitUntil(lambda: window.message_bar.key == key and not window.busy, timeout=120_000)
    assert words in window.message_bar.text
    shown_panel(window).close()


def test_a_damaged_outcomes_member_is_said_in_one_line(make_window, qtbot, saved_file, two_groups_csv):
    path = saved_file[0]
    content = json.loads(path.read_text(encoding="utf-8"))
    content["outcomes"]["adjustment"] = "sidak"
    path.write_text(json.dumps(content), encoding="utf-8")
    window = make_window([two_groups_csv])
    qtbot.waitUntil(lambda: window.session.analysis is not None and not window.busy, timeout=60_000)
    shown = window.session.analysis
    window.open_file(path)
    qtbot.waitUntil(lambda: window.message_bar.key == "reopen_refused", timeout=60_000)
    text = window.message_bar.text
    assert path.name in text and "adjustment" in text and "\n" not in text
    assert window.session.analysis is shown and not window.findChildren(OutcomesPanel)


def test_saving_never_writes_over_the_data_file(make_window, qtbot, saved_file, data_file):
    path = saved_file[0]
    before = digest(data_file)
    window = make_window([path])
    qtbot.waitUntil(lambda: window.message_bar.key == "reopen_outcomes_same" and not window.busy, timeout=120_000)
    panel = shown_panel(window)
    assert saved.with_extension("a.csv") == Path("a.csv.twofold")
    assert saved.with_extension("b.TwoFold") == Path("b.TwoFold")
    assert panel.save_analysis(data_file)  # the data file's own name: the suffix goes after it
    assert digest(data_file) == before
    assert saved.load(data_file.with_name(data_file.name + SAVED_SUFFIX)).outcomes is not None
    assert not panel.save_analysis(data_file.parent / "no such folder" / "x")
    assert panel.problem.text().startswith("Could not save x.twofold:") and "\n" not in panel.problem.text()
    panel.close()


def test_an_analysis_saved_by_the_command_reopens_in_the_window(make_window, qtbot, tmp_path, data_file):
    from engine.cli import main

    target = tmp_path / "four.twofold"
    assert main(["analyze", str(data_file), "--outcomes", "strength_mpa", "mass_g", "--group", "supplier",
                 "--resamples", str(RESAMPLES), "--save", str(target)], out=io.StringIO(), err=io.StringIO()) == 0
    window = make_window([target])
    qtbot.waitUntil(lambda: window.message_bar.key == "reopen_outcomes_same" and not window.busy, timeout=120_000)
    panel = shown_panel(window)
    assert panel.ticked() == ["strength_mpa", "mass_g"]
    assert panel.procedure.currentData() is None and panel.adjustment_method() == "holm"
    assert [cell(panel, row, 0) for row in range(panel.grid.rowCount())] == ["strength_mpa", "mass_g"]
    assert window.session.spec.value_columns == ("strength_mpa",)
    panel.close()


def test_every_status_of_a_reopen_has_a_message_of_its_own():
    for one, several in REOPEN_MESSAGES.values():
        assert one in MESSAGES and several in MESSAGES and MESSAGES[one].text != MESSAGES[several].text
        assert MESSAGES[one].level == MESSAGES[several].level
    assert reopen_message("source_changed", (), "sentence", several=True)[0] == "reopen_outcomes_changed_alike"
    assert reopen_message("something new", ("a: saved 1, now 2",), "sentence", several=True) == \
        ("reopen_outcomes_differ", {"differences": "a: saved 1, now 2"})
    assert reopen_message("same", (), "sentence")[0] == "reopen_same"


def test_a_wide_file_reopens_with_its_pairs_and_names(make_window, qtbot, tmp_path):
    from engine.cli import main

    rng = np.random.default_rng(5)
    header = ("a_east", "a_west", "b_east", "b_west")
    rows = np.round(rng.normal(10, 1, (12, 4)) + [0.9, 0, 0, 0], 3)
    data = tmp_path / "wide.csv"
    data.write_text(",".join(header) + "\n" + "".join(",".join(map(str, row)) + "\n" for row in rows),
                    encoding="utf-8")
    target = tmp_path / "wide.twofold"
    assert main(["analyze", str(data), "--outcome-columns", "second", "b_east", "b_west", "--outcome-columns",
                 "first", "a_east", "a_west", "--resamples", str(RESAMPLES), "--save", str(target)],
                out=io.StringIO(), err=io.StringIO()) == 0
    window = make_window([target])
    qtbot.waitUntil(lambda: window.message_bar.key == "reopen_outcomes_same" and not window.busy, timeout=120_000)
    panel = shown_panel(window)
    assert panel.ticked() == list(header)
    # the saved names and order stand in the table, not the pairs of the ticks
    assert [cell(panel, row, 0) for row in range(2)] == ["second", "first"]
    assert window.session.spec.layout == "wide" and window.session.spec.value_columns == ("b_east", "b_west")
    # reference: scipy.stats.ttest_ind (Welch) of the pair a_east, a_west
    welch = scipy_stats.ttest_ind(rows[:, 0], rows[:, 1], equal_var=False)
    assert panel.found.outcomes[1].analysis.procedures["welch_t"].p_value == pytest.approx(welch.pvalue, rel=1e-10)
    # compared again in the panel with the ticks as they came, the saved outcomes are compared
    saved_rows = panel.found.rows
    with qtbot.waitSignal(panel.worker.finished, timeout=120_000):
        assert panel.run()
    assert [(r.name, r.p_value, r.p_holm) for r in panel.found.rows] == \
        [(r.name, r.p_value, r.p_holm) for r in saved_rows]
    panel.tick(header[:2])  # other ticks: the pairs of the ticks
    assert panel.outcomes() == wide_outcomes([("a_east", "a_west")])
    panel.close()


def test_the_window_never_saves_one_outcome_over_a_file_of_several(saved_file, make_window, qtbot, data_file):
    # the window's Save writes one outcome; over a saved analysis of several it would lose the rest
    written, _ = saved_file
    before = digest(written)
    window = make_window([data_file])
    qtbot.waitUntil(lambda: window.session.analysis is not None and not window.busy, timeout=60_000)
    assert not window.save_analysis(written)
    assert digest(written) == before
    assert "holds an analysis of 3 outcomes" in window.message_bar.text
    assert window.save_analysis(written.with_name("one outcome.twofold"))
