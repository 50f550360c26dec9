"""The Next study tab: each kind of plan from its inputs, the filling in from a comparison, the
resampling of the comparison's groups in a worker (with Stop), copying, and saving with the analysis."""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest
from PySide6.QtGui import QGuiApplication
from statsmodels.stats.power import NormalIndPower, TTestIndPower, TTestPower

from engine import pipeline
from engine.planning import Plan, plan_study
from engine.question import Margin, Question
from engine.session import Session
from engine.spec import AnalysisSpec

DEMO = Path(__file__).resolve().parents[2] / "demo_files" / "bolt_strength.csv"


@pytest.fixture
def panel(qtbot):
    from desktop.plan_panel import PlanPanel

    made = PlanPanel(Session())
    qtbot.addWidget(made)
    yield made
    made.cleanup()


def fill(panel, **inputs):
    """Set the panel's inputs by name (combo boxes by their value) and wait for the plan."""
    panel._filling = True
    try:
        for name, value in inputs.items():
            widget = getattr(panel, name)
            if hasattr(widget, "findData"):
                panel._set(widget, value)
                assert widget.currentData() == value
            elif hasattr(widget, "setValue"):
                widget.setValue(value)
            else:
                widget.setText(str(value))
    finally:
        panel._filling = False
    panel._show_rows()
    panel.work_out()


def worked_out(qtbot, panel, timeout=60_000):
    qtbot.waitUntil(lambda: not panel.worker.busy and (panel.result is not None or not panel.problem.isHidden()),
                    timeout=timeout)
    assert panel.problem.isHidden(), panel.problem.text()
    return panel.result


def test_sample_size_from_the_panel_is_statsmodels_and_plan_study(qtbot, panel):
    fill(panel, find="n", question="differ", design="independent", procedure="pooled", spread="given",
         shape="normal", difference="5", sd="6", sd2="", ratio="1", power="0.8", level="0.05", unit="MPa")
    result = worked_out(qtbot, panel)
    # statsmodels TTestIndPower().solve_power(effect_size=5/6, alpha=0.05, power=0.8), rounded up
    assert result.n1 == result.n2 == math.ceil(TTestIndPower().solve_power(5 / 6, alpha=0.05, power=0.8))
    expected = plan_study(Plan("n", difference=5, sd=6, power=0.8, procedure="pooled", unit="MPa"))
    assert result.sentence == expected.sentence and panel.sentence.text() == expected.sentence
    assert panel.curve is not None and panel.curve.over == "n" and len(panel.plot.points()[0]) > 10


def test_power_smallest_difference_and_known_sds_from_the_panel(qtbot, panel):
    fill(panel, find="power", procedure="pooled", difference="5", sd="6", sd2="", n1="20", n2="", level="0.05")
    # statsmodels TTestIndPower().power(5/6, nobs1=20, alpha=0.05)
    assert worked_out(qtbot, panel).power == pytest.approx(TTestIndPower().power(5 / 6, 20, 0.05), abs=1e-10)
    fill(panel, find="difference", procedure="pooled", sd="6", n1="20", power="0.8")
    # statsmodels TTestIndPower().solve_power(nobs1=20, alpha=0.05, power=0.8): d, times the SD
    assert worked_out(qtbot, panel).difference == pytest.approx(
        6 * TTestIndPower().solve_power(nobs1=20, alpha=0.05, power=0.8), rel=1e-6)
    fill(panel, find="power", procedure="z", difference="5", sd="6", n1="20", level="0.05")
    # statsmodels NormalIndPower().power(5/6, nobs1=20, alpha=0.05)
    assert worked_out(qtbot, panel).power == pytest.approx(NormalIndPower().power(5 / 6, 20, 0.05), abs=1e-8)
    fill(panel, find="power", procedure="welch", difference="5", sd="6", sd2="9", n1="20", n2="30")
    welch = plan_study(Plan("power", difference=5, sd=6, sd2=9, n1=20, n2=30))  # no Welch power in statsmodels
    assert worked_out(qtbot, panel).power == welch.power


def test_one_sided_margin_and_paired_plans_from_the_panel(qtbot, panel):
    fill(panel, find="n", question="higher", procedure="pooled", difference="5", sd="6", power="0.9", level="0.025")
    # statsmodels TTestIndPower().solve_power(5/6, alpha=0.025, power=0.9, alternative="larger")
    assert worked_out(qtbot, panel).n1 == math.ceil(
        TTestIndPower().solve_power(5 / 6, alpha=0.025, power=0.9, alternative="larger"))
    fill(panel, find="power", question="not_worse", procedure="pooled", difference="0", margin_size="3",
         worse="lower", sd="6", n1="40", level="0.05")
    # non-inferiority by a one-sided test against the margin: statsmodels
    # TTestIndPower().power((0 - (-3)) / 6, 40, 0.05, alternative="larger")
    assert worked_out(qtbot, panel).power == pytest.approx(
        TTestIndPower().power(3 / 6, 40, 0.05, alternative="larger"), abs=1e-10)
    fill(panel, find="n", question="equivalent", procedure="welch", difference="0.5", margin_low="-3",
         margin_high="4", sd="6", power="0.8", level="0.05")
    expected = plan_study(Plan("n", difference=0.5, sd=6, power=0.8,
                               question=Question("equivalent", 0.95, Margin.within(-3, 4))))
    assert worked_out(qtbot, panel).n1 == expected.n1 and panel.result.power == expected.power
    fill(panel, find="n", question="differ", design="paired", procedure="welch", difference="2", sd="3",
         power="0.9", level="0.05")
    # statsmodels TTestPower().solve_power(2/3, alpha=0.05, power=0.9): pairs, rounded up
    assert worked_out(qtbot, panel).n1 == math.ceil(TTestPower().solve_power(2 / 3, alpha=0.05, power=0.9))
    assert "Number of pairs" == panel.form.labelForField(panel.n1).text()


def test_a_rank_plan_is_simulated_as_plan_study_simulates_it(qtbot, panel):
    fill(panel, find="power", question="differ", design="independent", procedure="mann_whitney",
         shape="skewed", difference="3", sd="4", sd2="", n1="15", n2="", simulations=500)
    result = worked_out(qtbot, panel)
    again = plan_study(result.plan.with_(seed=result.seed))  # the same seed gives the same studies
    assert result.method == "simulation" and again.power == result.power
    assert panel.curve_note.text().startswith("Each point of the curve")


def test_a_bad_input_is_said_in_one_line(qtbot, panel):
    fill(panel, find="n", question="differ", procedure="welch", difference="five", sd="6", power="0.8")
    assert not panel.problem.isHidden() and panel.problem.text() == "The difference must be a number, not 'five'."
    fill(panel, difference="5", power="1.2")
    assert not panel.problem.isHidden() and "\n" not in panel.problem.text() and "power" in panel.problem.text()
    assert panel.result is None and not panel.copy_button.isEnabled()
    fill(panel, find="n", question="higher", difference="-5", power="0.8", level="0.05")
    qtbot.waitUntil(lambda: not panel.problem.isHidden(), timeout=20_000)
    assert "above 0" in panel.problem.text()


def prepared_session(kind="differ", level=0.95) -> Session:
    spec = AnalysisSpec(source=pipeline.source_for(DEMO), seed=3, resamples=200,
                        question=Question(kind, level))
    prepared = pipeline.from_file(None, spec)
    session = Session(prepared.spec)
    session.store("table", prepared.table)
    session.store("intake", prepared.intake)
    session.store("analysis", prepared.analysis)
    return session


def test_the_inputs_are_filled_in_from_the_comparison(qtbot):
    from desktop.plan_panel import PlanPanel

    session = prepared_session("lower", 0.9)
    panel = PlanPanel(session)
    qtbot.addWidget(panel)
    first, second = session.analysis.summaries
    assert float(panel.sd.text()) == pytest.approx(first.sd, rel=1e-3)
    assert float(panel.sd2.text()) == pytest.approx(second.sd, rel=1e-3)
    assert int(panel.n1.text()) == first.n and int(panel.n2.text()) == second.n
    assert float(panel.level.text()) == pytest.approx(0.1)
    assert panel.question.currentData() == "lower" and panel.design.currentData() == "independent"
    # the observed difference, turned the way the one-sided question asks
    assert first.mean > second.mean
    assert float(panel.difference.text()) == pytest.approx(-(first.mean - second.mean), rel=1e-3)
    labels = session.analysis.groups.labels
    assert panel.groups_line.text().startswith(f"Group 1 is {labels[0]} and group 2 is {labels[1]}")
    worked_out(qtbot, panel)
    # a difference as filled in follows the question: 0 expected under a margin, turned for one side
    panel._set(panel.question, "equivalent")
    assert panel.difference.text() == "0"
    panel._set(panel.question, "higher")
    assert float(panel.difference.text()) == pytest.approx(first.mean - second.mean, rel=1e-3)
    panel.difference.setText("7")  # typed by the user: it stays
    panel._set(panel.question, "equivalent")
    assert panel.difference.text() == "7"
    panel.cleanup()


def test_resampling_the_comparison_runs_in_a_worker_and_stops(qtbot):
    from desktop.plan_panel import PlanPanel

    session = prepared_session()
    panel = PlanPanel(session)
    qtbot.addWidget(panel)
    worked_out(qtbot, panel)
    fill(panel, find="n", spread="pilot", procedure="mann_whitney", difference="30", simulations=1_000_000)
    assert panel.worker.busy and panel.stop_button.isEnabled()  # the GUI thread is free meanwhile
    qtbot.waitUntil(lambda: panel.progress.value() > 0, timeout=30_000)
    with qtbot.waitSignal(panel.worker.stopped, timeout=5_000):
        panel.stop_button.click()
    assert not panel.worker.busy and panel.problem.text().startswith("Stopped.")
    fill(panel, design="paired")  # 32 and 30 values are no pairs: said in one line, no crash
    assert not panel.problem.isHidden() and "32 and 30 values, not pairs" in panel.problem.text()
    fill(panel, design="independent", simulations=400)
    result = worked_out(qtbot, panel)
    assert result.method == "simulation" and result.plan.pilot is not None
    assert result.plan.pilot.group1.size == session.analysis.groups.x.size
    assert "pilot" in panel.notes.text()
    panel.cleanup()


def test_copy_puts_the_inputs_the_sentence_and_the_curve_on_the_clipboard(qtbot, panel):
    fill(panel, find="n", question="differ", procedure="welch", spread="given", shape="normal",
         difference="5", sd="6", sd2="", ratio="1", power="0.8", level="0.05", unit="MPa")
    result = worked_out(qtbot, panel)
    panel.copy_button.click()
    data = QGuiApplication.clipboard().mimeData()
    assert result.sentence in data.text() and "Difference that matters" not in data.text()
    assert "True difference (group 1 minus group 2)" in data.text() and "5 MPa" in data.text()
    assert "Power curve (units per group, power):" in data.text()
    assert "<table>" in data.html() and data.hasImage()


def test_the_plan_is_saved_with_the_analysis_and_comes_back_on_reopening(make_window, qtbot, tmp_path, monkeypatch):
    import shutil

    data = Path(shutil.copy(DEMO, tmp_path / "bolt_strength.csv"))
    window = make_window([data])
    qtbot.waitUntil(lambda: window.session.analysis is not None and window.findings_panel is not None
                    and not window.busy, timeout=60_000)
    window.tabs.setCurrentIndex(0)
    window.plan_action.trigger()  # Comparison > Plan the next study
    assert window.tabs.currentWidget() is window.plan_panel
    window.tabs.setCurrentWidget(window.findings_panel)
    window.findings_panel.plan_button.click()  # "plan a follow-up from these data"
    panel = window.plan_panel
    assert window.tabs.currentWidget() is panel and panel.spread.currentData() == "pilot"
    fill(panel, find="power", n1="12", n2="", difference="25", simulations=500)
    result = worked_out(qtbot, panel)
    target = tmp_path / "bolts.twofold"
    assert window.save_analysis(target)
    member = json.loads(target.read_text(encoding="utf-8"))["plan"]
    assert member["pilot_from_analysis"] is True and member["answer"]["power"] == result.power
    again = make_window([target])
    qtbot.waitUntil(lambda: again.session.analysis is not None and again.plan_panel is not None
                    and again.plan_panel.result is not None and not again.plan_panel.worker.busy, timeout=60_000)
    back = again.plan_panel
    assert back.spread.currentData() == "pilot" and back.find.currentData() == "power" and back.n1.text() == "12"
    assert back.result.power == result.power and back.result.sentence == result.sentence
    assert back.problem.isHidden()
    # the comparison run again (another confidence level) leaves the restored plan's inputs as they are
    analysis = again.session.analysis
    again.session.ask(level=0.9)
    qtbot.waitUntil(lambda: again.session.analysis is not analysis and not again.busy, timeout=60_000)
    assert back.find.currentData() == "power" and back.n1.text() == "12" and back.difference.text() == "25"


def test_a_paired_comparison_fills_in_a_paired_plan_from_its_pair_differences(qtbot, csv_file):
    from desktop.plan_panel import PlanPanel

    rng = np.random.default_rng(12)
    before = rng.normal(50.0, 8.0, 14)
    after = before + rng.normal(2.0, 1.5, 14)  # each unit measured twice: a small shift, strongly paired
    path = csv_file("soak.csv", [(round(a, 3), round(b, 3)) for a, b in zip(after, before)], ("after", "before"))
    spec = AnalysisSpec(source=pipeline.source_for(path), layout="wide", value_columns=("after", "before"),
                        design="paired", seed=2, resamples=200)
    prepared = pipeline.from_file(None, spec)
    session = Session(prepared.spec)
    session.store("analysis", prepared.analysis)
    panel = PlanPanel(session)
    qtbot.addWidget(panel)
    differences = np.asarray(prepared.analysis.groups.x) - np.asarray(prepared.analysis.groups.y)
    assert panel.design.currentData() == "paired" and panel.n1.text() == "14"
    assert float(panel.sd.text()) == pytest.approx(np.std(differences, ddof=1), rel=1e-3)
    assert panel.form.labelForField(panel.sd).text() == "SD of the pair differences"
    fill(panel, find="n", power="0.9")
    result = worked_out(qtbot, panel)
    # statsmodels TTestPower().solve_power(d_z, alpha=0.05, power=0.9) with the filled-in figures, rounded up
    d_z = float(panel.difference.text()) / float(panel.sd.text())
    assert result.n1 == math.ceil(TTestPower().solve_power(d_z, alpha=0.05, power=0.9))
    fill(panel, spread="pilot", simulations=300)
    result = worked_out(qtbot, panel)
    assert result.plan.pilot.paired and np.array_equal(result.plan.pilot.group1, differences)
    panel.cleanup()


def summary_analysis(kind="differ", level=0.95, *, equal_spreads=False, margin=None):
    """The comparison of the bolt demo's two groups from their summary statistics alone."""
    from engine.group_stats import GroupStats
    from engine.spec import Statements
    from engine.summary_analysis import analyze_summaries

    groups = pipeline.from_file(None, AnalysisSpec(source=pipeline.source_for(DEMO), seed=3,
                                                   resamples=200)).analysis.groups
    stats = (GroupStats.of_values(groups.labels[0], groups.x), GroupStats.of_values(groups.labels[1], groups.y))
    spec = AnalysisSpec(question=Question(kind, level, margin),
                        statements=Statements(equal_spread_known=equal_spreads))
    return analyze_summaries(stats, spec), groups


def test_the_inputs_are_filled_in_from_summary_statistics(qtbot, panel):
    analysis, groups = summary_analysis("higher", 0.9, equal_spreads=True)
    panel.fill_from_summaries(analysis)
    first, second = analysis.stats
    assert panel.procedure.currentData() == "pooled" and panel.spread.currentData() == "given"
    # the pooled SD of the raw values (numpy), which the pooled t-test plans with
    pooled = math.sqrt(((groups.x.size - 1) * np.var(groups.x, ddof=1) + (groups.y.size - 1) * np.var(groups.y, ddof=1))
                       / (groups.x.size + groups.y.size - 2))
    assert float(panel.sd.text()) == pytest.approx(pooled, rel=1e-3) and panel.sd2.text() == ""
    assert (int(panel.n1.text()), int(panel.n2.text())) == (groups.x.size, groups.y.size)
    assert panel.question.currentData() == "higher" and float(panel.level.text()) == pytest.approx(0.1)
    assert float(panel.difference.text()) == pytest.approx(abs(first.mean - second.mean), rel=1e-3)
    assert "summary statistics" in panel.groups_line.text() and first.label in panel.groups_line.text()
    assert not panel.groups_line.isHidden()
    # nothing to resample: the choice is not offered
    assert not panel.spread.model().item(panel.spread.findData("pilot")).isEnabled()
    panel._set(panel.find, "power")
    result = worked_out(qtbot, panel)
    d = float(panel.difference.text()) / float(panel.sd.text())
    # statsmodels TTestIndPower().power(d, nobs1, alpha=0.1, ratio, alternative="larger")
    assert result.power == pytest.approx(TTestIndPower().power(
        d, groups.x.size, 0.1, ratio=groups.y.size / groups.x.size, alternative="larger"), abs=1e-10)
    # the difference as filled in follows the question, from the summaries' means
    panel._set(panel.question, "lower")
    assert float(panel.difference.text()) == pytest.approx(-abs(first.mean - second.mean), rel=1e-3)
    panel._set(panel.spread, "pilot")  # even if forced, the summaries hold no values: one line
    panel.work_out()
    assert not panel.problem.isHidden() and "no values to resample" in panel.problem.text()


def test_welch_and_a_margin_question_are_filled_in_from_summary_statistics(qtbot, panel):
    analysis, groups = summary_analysis("equivalent", margin=Margin.within(-20, 25))
    panel.fill_from_summaries(analysis)
    assert panel.procedure.currentData() == "welch" and panel.question.currentData() == "equivalent"
    assert (panel.margin_low.text(), panel.margin_high.text()) == ("-20", "25")
    assert panel.difference.text() == "0"  # the difference expected under a margin question
    assert float(panel.sd.text()) == pytest.approx(np.std(groups.x, ddof=1), rel=1e-3)
    assert float(panel.sd2.text()) == pytest.approx(np.std(groups.y, ddof=1), rel=1e-3)
    panel._set(panel.find, "n")
    result = worked_out(qtbot, panel)
    expected = plan_study(Plan("n", difference=0, sd=float(panel.sd.text()), sd2=float(panel.sd2.text()),
                               power=0.8, ratio=float(panel.ratio.text()),
                               question=Question("equivalent", 0.95, Margin.within(-20, 25))))
    assert (result.n1, result.power) == (expected.n1, expected.power)
    # the fill-in button, with no comparison of values on show, fills in from the summaries again
    panel.sd.setText("1")
    panel.fill_button.click()
    assert float(panel.sd.text()) == pytest.approx(np.std(groups.x, ddof=1), rel=1e-3)


def test_a_comparison_of_values_takes_over_from_the_summaries(qtbot):
    from desktop.plan_panel import PlanPanel

    session = Session()
    panel = PlanPanel(session)
    qtbot.addWidget(panel)
    analysis, _ = summary_analysis()
    panel.fill_from_summaries(analysis)
    worked_out(qtbot, panel)
    prepared = prepared_session()
    session.store("analysis", prepared.analysis)  # a file compared after: its groups fill the tab in
    assert panel.groups_line.text().startswith("Group 1 is ")
    assert panel.spread.model().item(panel.spread.findData("pilot")).isEnabled()
    panel.cleanup()


def test_the_window_plans_from_summary_statistics(make_window, qtbot):
    window = make_window()
    analysis, groups = summary_analysis()
    window.plan_from_summaries(analysis)
    panel = window.plan_panel
    assert window.tabs.currentWidget() is panel
    assert (int(panel.n1.text()), int(panel.n2.text())) == (groups.x.size, groups.y.size)
    assert "summary statistics" in panel.groups_line.text()
    result = worked_out(qtbot, panel)
    assert result.method == "exact" and result.plan.pilot is None
