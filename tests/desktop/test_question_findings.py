"""The findings of a margin question: the verdict against the margin in the report's words, the
band in the plot, and a plain sentence when no procedure could answer."""

from __future__ import annotations

from dataclasses import replace

import numpy as np
from scipy import stats
import pytest

from desktop.findings_panel import NOTHING_ANSWERS, FindingsPanel
from engine import report
from engine.analysis import analyze
from engine.question import Margin, Question
from engine.results import Finding, Groups
from engine.session import Session
from engine.spec import AnalysisSpec


@pytest.fixture
def panel(qtbot):
    widget = FindingsPanel(Session())
    qtbot.addWidget(widget)
    yield widget
    widget.cleanup()


def test_nothing_to_answer_is_said_not_shown_as_a_crash(panel):
    # every procedure of the question failed (each becomes a note of the analysis): the findings
    # say so with the notes' reasons, and show no empty table or plot
    analysis = analyze(_normal_groups(), _spec(Question("equivalent", 0.95, Margin.within(3.0))))
    failed = Finding("part_not_computed", "warning", "The two one-sided Welch tests could not be computed: "
                                                     "no spread.")
    analysis = replace(analysis, procedures={}, notes=(failed,))
    panel.session.store("analysis", analysis)
    assert panel.headline.text() == f"{NOTHING_ANSWERS} {failed.text}"
    assert not panel.table.isVisibleTo(panel) and not panel.offer.isVisibleTo(panel)
    assert not panel.verdict.isVisibleTo(panel)
    assert not panel.copy_button.isEnabled() and not panel.export_button.isEnabled()
    assert panel.plot.row_names() == [] and not panel.plot.isVisibleTo(panel)


def _spec(question: Question) -> AnalysisSpec:
    return AnalysisSpec(question=question, seed=1, resamples=400)


def _normal_groups(seed: int = 8) -> Groups:
    rng = np.random.default_rng(seed)
    return Groups(("new", "old"), rng.normal(50.0, 4.0, 40), rng.normal(49.5, 4.0, 40))


def _verdict_words(analysis, key: str) -> str:
    result = analysis.procedures[key]
    return analysis.spec.question.margin_words(analysis.margin_answer(key), analysis.groups.labels,
                                               result.estimate_name)


def test_an_equivalence_verdict_with_its_interval_and_band(panel):
    groups = _normal_groups()
    analysis = analyze(groups, _spec(Question("equivalent", 0.95, Margin.within(3.0))))
    panel.session.store("analysis", analysis)
    key = panel.procedure_key()
    assert key in analysis.procedures and key.startswith("equivalence_")
    welch = analysis.procedures["equivalence_welch"]
    # the interval set against the margin is Welch's at 1 - 2 alpha = 90 %
    # (scipy.stats.ttest_ind(..., equal_var=False).confidence_interval(0.90))
    reference = stats.ttest_ind(groups.x, groups.y, equal_var=False).confidence_interval(0.90)
    assert (welch.interval.low, welch.interval.high) == pytest.approx((reference.low, reference.high), rel=1e-10)
    assert panel.verdict.isVisibleTo(panel) and panel.verdict.text() == _verdict_words(analysis, key)
    assert panel.verdict.text() not in panel.headline.text()  # said once
    assert panel.table.horizontalHeaderItem(2).text() == "90% interval"
    assert panel.plot.band() == pytest.approx((-3.0, 3.0))
    assert panel.plot_note.isVisibleTo(panel) and "90%" in panel.plot_note.text()
    assert not panel.offer.isVisibleTo(panel)


def test_a_percentage_margin_is_drawn_in_the_measurements_units(panel):
    groups = _normal_groups()
    analysis = analyze(groups, _spec(Question("equivalent", 0.9, Margin.within(4.0, unit="percent"))))
    panel.session.store("analysis", analysis)
    size = 4.0 * abs(float(np.mean(groups.y))) / 100  # 4 % of group 2's mean
    assert panel.plot.band() == pytest.approx((-size, size))
    assert panel.verdict.text() == _verdict_words(analysis, panel.procedure_key())
    assert "4% of old's mean" in panel.verdict.text()


@pytest.mark.parametrize("worse", ["lower", "higher"])
def test_a_non_inferiority_verdict_and_its_open_band(panel, worse):
    groups = _normal_groups()
    margin = Margin.not_worse_by(2.0, worse)
    analysis = analyze(groups, _spec(Question("not_worse", 0.95, margin)))
    panel.session.store("analysis", analysis)
    key = panel.procedure_key()
    assert key.startswith("noninferiority_")
    assert panel.verdict.text() == _verdict_words(analysis, key)
    low, high = panel.plot.band()
    assert (low, high) == ((-2.0, np.inf) if worse == "lower" else (-np.inf, 2.0))


def test_a_ratio_margin_reads_on_a_ratio_axis(panel):
    rng = np.random.default_rng(21)
    groups = Groups(("new", "old"), rng.lognormal(np.log(10.0), 0.2, 30), rng.lognormal(np.log(10.2), 0.2, 30))
    analysis = analyze(groups, _spec(Question("equivalent", 0.95, Margin.within(0.8, 1.25, "ratio"))))
    panel.session.store("analysis", analysis)
    assert panel.procedure_key() == "equivalence_log_welch"
    assert panel.plot.ratio
    assert panel.plot.band() == pytest.approx((np.log10(0.8), np.log10(1.25)))
    assert panel.plot.getPlotItem().getAxis("bottom").labelText.startswith("ratio of geometric means")
    # the ratio's 90 % interval: exp of Welch's interval of the logarithms (scipy.stats.ttest_ind)
    reference = stats.ttest_ind(np.log(groups.x), np.log(groups.y), equal_var=False).confidence_interval(0.90)
    result = analysis.procedures["equivalence_log_welch"]
    assert (result.interval.low, result.interval.high) == pytest.approx(
        (np.exp(reference.low), np.exp(reference.high)), rel=1e-10)


def test_a_margin_questions_findings_copy_and_export_with_the_band(panel, tmp_path, qtbot):
    from PySide6.QtGui import QGuiApplication

    analysis = analyze(_normal_groups(), _spec(Question("equivalent", 0.95, Margin.within(3.0))))
    panel.session.store("analysis", analysis)
    panel.copy_findings()
    copied = QGuiApplication.clipboard().mimeData().text()
    assert copied == report.render(analysis, procedure=panel.procedure_key()).plain  # the report's words
    assert panel.save_plot(tmp_path / "band.png").is_file()
    page = panel.export_report(tmp_path / "report.html").read_text(encoding="utf-8")
    assert "<img" in page and "margin" in page
