"""Several measurement columns in the window: the table is analyze_outcomes' (its adjusted
p-values statsmodels'), it fills as outcomes finish, the adjustment switch changes the verdicts
without running again, Stop stops, a row opens that outcome's findings, copy carries the table."""

from __future__ import annotations

import numpy as np
import pytest
from PySide6.QtGui import QGuiApplication
from PySide6.QtWidgets import QLabel
from scipy import stats as scipy_stats
from statsmodels.stats.multitest import multipletests

from desktop.findings_panel import FindingsPanel
from desktop.outcomes_panel import OutcomesPanel
from engine import pipeline, report
from engine.outcomes import analyze_outcomes, long_outcomes, wide_outcomes
from engine.rounding import format_p
from engine.session import Session
from engine.spec import AnalysisSpec, Source

# t statistics of the four outcomes: each p-value a little under 0.05 (Welch, 20 and 20), so
# that Benjamini-Hochberg finds all four and Holm none
T_VALUES = (2.05, 2.15, 2.25, 2.35)
N = 20
NAMES = ("strength", "hardness", "elongation", "mass")


def _write(path, header, columns):
    lines = [",".join(header)] + [",".join(str(v) for v in row) for row in zip(*columns)]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


@pytest.fixture
def lots_csv(tmp_path):
    """Two invented lots of bolts measured four ways: group 2 is the same standard pattern as
    group 1 moved by a set number of its standard errors."""
    base = scipy_stats.norm.ppf((np.arange(1, N + 1) - 0.5) / N)
    base = (base - base.mean()) / base.std(ddof=1)
    lot = ["east"] * N + ["west"] * N
    columns = [lot]
    for k, t in enumerate(T_VALUES):
        shift = t * np.sqrt(2 / N)  # Welch's t = shift / sqrt(1/n + 1/n) with both SDs 1
        columns.append([repr(round(float(v), 12)) for v in np.r_[base + shift, base] * (k + 1) + 10 * (k + 1)])
    return _write(tmp_path / "lots.csv", ("lot", *NAMES), columns)


def session_over(path, **changes):
    spec = AnalysisSpec(source=pipeline.source_for(path), **{"resamples": 200, "seed": 11, **changes})
    table = pipeline.read(spec)
    spec = pipeline.complete(table, spec)
    session = Session(spec)
    session.store("table", table)
    return session


@pytest.fixture
def panel(qtbot, lots_csv):
    made = OutcomesPanel(session_over(lots_csv, group_column="lot", value_columns=("strength",)))
    qtbot.addWidget(made)
    yield made
    made.worker.shutdown()


def run_all(qtbot, panel):
    with qtbot.waitSignal(panel.worker.finished, timeout=60_000):
        assert panel.run()
    return panel.found


def cell(panel, row, column):
    return panel.grid.item(row, column).text()


def test_the_columns_offered_are_the_measurements(panel):
    assert [panel.columns.item(i).text() for i in range(panel.columns.count())] == list(NAMES)
    assert panel.ticked() == ["strength"]  # the column the window compares


def test_too_few_columns_are_said_in_one_line(panel):
    assert not panel.run()
    assert "at least two" in panel.problem.text() and not panel.worker.busy


def test_the_table_is_analyze_outcomes(qtbot, panel):
    panel.tick(NAMES)
    panel.procedure.setCurrentIndex(panel.procedure.findData("welch_t"))
    found = run_all(qtbot, panel)
    reference = analyze_outcomes(panel.table_data, panel.spec, long_outcomes(NAMES), procedure="welch_t")
    for row, (ours, theirs) in enumerate(zip(found.rows, reference.rows)):
        assert (ours.name, ours.n, ours.estimate, ours.interval, ours.p_value, ours.p_holm, ours.p_bh) == \
            (theirs.name, theirs.n, theirs.estimate, theirs.interval, theirs.p_value, theirs.p_holm, theirs.p_bh)
        assert cell(panel, row, 0) == theirs.name
        assert cell(panel, row, 1) == f"{N} and {N}"
        assert cell(panel, row, 6) == format_p(theirs.p_value)
        assert cell(panel, row, 7) == format_p(theirs.p_holm)
        assert cell(panel, row, 8) == format_p(theirs.p_bh)
        assert cell(panel, row, 10) == "no"  # Holm finds none of the four
    # reference: statsmodels multipletests, 'holm' and 'fdr_bh'
    raw = [r.p_value for r in found.rows]
    assert np.allclose([r.p_holm for r in found.rows], multipletests(raw, method="holm")[1], rtol=1e-12)
    assert np.allclose([r.p_bh for r in found.rows], multipletests(raw, method="fdr_bh")[1], rtol=1e-12)
    # reference: scipy.stats.ttest_ind (Welch) of the first outcome's two lots
    values = panel.table_data.frame
    welch = scipy_stats.ttest_ind(values["strength"][:N].astype(float), values["strength"][N:].astype(float),
                                  equal_var=False)
    assert found.rows[0].p_value == pytest.approx(welch.pvalue, rel=1e-10)
    assert [r.name for r in panel.effect_rows()] == list(NAMES)
    assert panel.plot.row_names() == list(NAMES)
    assert "family-wise" in panel.notes.text() or "even one false finding" in panel.notes.text()


def test_the_adjustment_switch_changes_the_verdicts_without_running_again(qtbot, panel):
    panel.tick(NAMES)
    panel.procedure.setCurrentIndex(panel.procedure.findData("welch_t"))
    run_all(qtbot, panel)
    started = []
    panel.worker.started.connect(lambda: started.append(1))
    assert [cell(panel, r, 10) for r in range(4)] == ["no"] * 4
    panel.set_adjustment("bh")
    assert [cell(panel, r, 10) for r in range(4)] == ["yes"] * 4
    assert panel.grid.horizontalHeaderItem(10).text() == "Difference found (B-H)"
    assert panel.found.rows == panel.found.with_adjustment("bh").rows
    panel.set_adjustment("holm")
    assert [cell(panel, r, 10) for r in range(4)] == ["no"] * 4
    assert started == [] and not panel.worker.busy


def test_rows_fill_as_outcomes_finish(qtbot, panel):
    panel.tick(NAMES)
    seen = []

    def look(_run, done):
        seen.append((done.index, cell(panel, 3, 2)))

    panel._relay.outcome.connect(look)
    run_all(qtbot, panel)
    assert [index for index, _ in seen] == [0, 1, 2, 3]
    assert seen[0][1] == "waiting"  # the last row still waited when the first came in


def test_stop_keeps_what_was_done_and_runs_nothing_more(qtbot, lots_csv):
    panel = OutcomesPanel(session_over(lots_csv, group_column="lot", resamples=20_000))
    qtbot.addWidget(panel)
    panel.tick(NAMES)
    with qtbot.waitSignal(panel._relay.outcome, timeout=60_000):
        panel.run()
    with qtbot.waitSignal(panel.worker.stopped, timeout=5_000):
        panel.cancel()
    kept = len(panel.outcomes_done)
    panel.worker.wait(60_000)
    qtbot.wait(100)
    assert len(panel.outcomes_done) == kept < 4
    assert panel.found is None and "Stopped after" in panel.status.text()
    assert panel.run_button.isEnabled() and not panel.copy_button.isEnabled()
    panel.worker.shutdown()


def test_a_row_opens_that_outcomes_findings(qtbot, panel):
    panel.tick(NAMES[:2])
    found = run_all(qtbot, panel)
    panel.grid.cellClicked.emit(1, 0)
    window = panel.findChildren(FindingsPanel)[-1].window()
    findings = window.findChild(FindingsPanel)
    done = found.outcomes[1]
    assert findings.session.analysis is done.analysis
    assert findings.procedure_key() == done.key
    assert findings.headline.text() == report.render(done.analysis, procedure=done.key).paragraph
    # the findings read the outcome alone: the window says where it stands after the adjustment
    standing = [label.text() for label in window.findChildren(QLabel) if "on its own" in label.text()]
    assert standing and format_p(found.p_holm[1]) in standing[0]
    assert ("does not count" in standing[0]) == (not found.rows[1].finding)
    assert "east minus west" in panel.direction.text()
    assert panel.plot.row_names() == list(NAMES[:2])
    window.close()


def test_copy_and_save_carry_the_table(qtbot, panel, tmp_path):
    panel.tick(NAMES)
    found = run_all(qtbot, panel)
    panel.copy_table()
    data = QGuiApplication.clipboard().mimeData()
    assert "<table" in data.html() and "Benjamini-Hochberg" in data.html()
    assert format_p(found.rows[2].p_holm) in data.text()
    written = panel.save_table(tmp_path / "table.txt")
    assert all(name in written.read_text(encoding="utf-8") for name in NAMES)
    assert "<table" in panel.save_table(tmp_path / "table.html").read_text(encoding="utf-8")
    with pytest.raises(Exception, match=r"\.html or \.txt"):
        panel.save_table(tmp_path / "table.doc")
    panel.copy_plot_button.click()
    assert not QGuiApplication.clipboard().image().isNull()


def test_the_wide_layout_pairs_the_ticked_columns(qtbot, tmp_path):
    rng = np.random.default_rng(3)
    columns = [[f"{v:.3f}" for v in rng.normal(10, 1, 12)] for _ in range(4)]
    path = _write(tmp_path / "wide.csv", ("a_east", "a_west", "b_east", "b_west"), columns)
    panel = OutcomesPanel(session_over(path, layout="wide", value_columns=("a_east", "a_west")))
    qtbot.addWidget(panel)
    assert panel.pairs.text() == "Pairs: a_east with a_west."
    panel.tick(["a_east", "a_west", "b_east"])
    assert not panel.run() and "in pairs" in panel.problem.text()
    panel.tick(["a_east", "a_west", "b_east", "b_west"])
    assert panel.outcomes() == wide_outcomes([("a_east", "a_west"), ("b_east", "b_west")])
    found = run_all(qtbot, panel)
    reference = analyze_outcomes(panel.table_data, panel.spec, panel.outcomes())
    assert [r.p_value for r in found.rows] == [r.p_value for r in reference.rows]
    panel.worker.shutdown()


def test_the_window_menu_opens_the_panel(make_window, settle, qtbot, tmp_path):
    window = make_window()
    window.outcomes_action.trigger()
    assert window.message_bar.key == "outcomes_need_file"
    demo = tmp_path / "bolts.csv"
    demo.write_text("supplier,strength,mass\n" + "".join(f"{'ab'[i % 2]},{800 + i},{30 + i % 3}\n"
                                                          for i in range(12)), encoding="utf-8")
    window.open_file(demo)
    settle(window)
    window.outcomes_action.trigger()
    panel = window.findChild(OutcomesPanel)
    assert panel is not None and panel.isVisible()
    assert panel.ticked() == list(window.session.spec.value_columns)  # the column on show
    panel.close()


def test_save_a_report_writes_the_whole_report(qtbot, panel, tmp_path):
    from engine.report import outcomes_report

    assert not panel.report_button.isEnabled()
    panel.tick(NAMES)
    found = run_all(qtbot, panel)
    assert panel.report_button.isEnabled()
    text = panel.write_report(tmp_path / "report.txt").read_text(encoding="utf-8")
    assert text == outcomes_report.plain(found)
    assert "run again" not in text  # a table of the panel's own run has no check to report
    page = panel.write_report(tmp_path / "report.html").read_text(encoding="utf-8")
    assert page.startswith("<!DOCTYPE html>") and all(name in page for name in NAMES)
    # reference: statsmodels multipletests ('holm') for the adjusted p-values the report shows
    holm = multipletests([r.p_value for r in found.rows], method="holm")[1]
    assert all(format_p(p) in page for p in holm)
    with pytest.raises(Exception, match=r"report is saved as \.html or \.txt"):
        panel.write_report(tmp_path / "report.pdf")
    assert not (tmp_path / "report.pdf").exists()
    assert panel.save_report(tmp_path / "again.html")
    assert panel.status.text() == f"Saved again.html in {tmp_path.resolve()}."
    assert not panel.save_report(tmp_path / "no such folder" / "r.html")
    assert "Could not save the report" in panel.problem.text() and "\n" not in panel.problem.text()
