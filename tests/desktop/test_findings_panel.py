"""The findings panel: the hint, the headline, the table against scipy, the pick, saving a plot."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402
import pytest  # noqa: E402
from PySide6.QtGui import QImage  # noqa: E402
from scipy import stats  # noqa: E402

from engine import report  # noqa: E402
from engine.spec import AnalysisSpec
from engine.question import Question
from engine.analysis import analyze  # noqa: E402
from engine.errors import FileProblem  # noqa: E402
from engine.results import Groups  # noqa: E402
from engine.session import Session  # noqa: E402
from desktop.findings_panel import FindingsPanel  # noqa: E402


@pytest.fixture
def groups():
    rng = np.random.default_rng(20261202)
    return Groups(("treated", "control"), rng.normal(12.0, 2.0, 28), rng.normal(10.5, 3.0, 33))


@pytest.fixture
def analysis(groups):
    return analyze(groups, AnalysisSpec(resamples=400, seed=3))


@pytest.fixture
def panel(qtbot):
    session = Session()
    widget = FindingsPanel(session)
    qtbot.addWidget(widget)
    yield widget
    widget.cleanup()


def _cells(panel) -> list[list[str]]:
    table = panel.table
    return [[table.item(r, c).text() for c in range(table.columnCount())] for r in range(table.rowCount())]


def test_only_a_hint_before_any_analysis(panel):
    assert not panel.hint.isHidden() and panel.scroll.isHidden()
    assert not panel.copy_button.isEnabled() and not panel.export_button.isEnabled()


def test_headline_and_table_show_the_engines_welch_numbers(panel, analysis, groups):
    panel.session.store("analysis", analysis)
    assert panel.hint.isHidden() and not panel.scroll.isHidden()
    assert panel.procedure_key() == analysis.recommendation.key == "welch_t"
    assert panel.headline.text() == report.render(analysis).paragraph
    cells = _cells(panel)
    shown = report.display_numbers(analysis, "welch_t")
    plain = report.render(analysis).plain
    # the table reads exactly as the copied text
    assert (cells[0][1], cells[0][2], cells[3][1]) == (shown.estimate, shown.interval, shown.p)
    for text in (cells[0][1], cells[0][2], cells[1][1], cells[2][1], cells[3][1], cells[4][1]):
        assert text in plain
    # reference: scipy.stats.ttest_ind(x, y, equal_var=False) for t, its df and p, and its
    # confidence_interval(0.95) for the interval of the mean difference
    welch = stats.ttest_ind(groups.x, groups.y, equal_var=False)
    ci = welch.confidence_interval(0.95)
    assert float(cells[1][1]) == pytest.approx(welch.statistic, rel=5e-3)
    assert float(cells[2][1]) == pytest.approx(welch.df, rel=5e-3)
    assert cells[3][1] == report.format_p(welch.pvalue)
    low, high = (float(v) for v in cells[0][2].split(" to "))
    assert low == pytest.approx(ci.low, abs=0.006) and high == pytest.approx(ci.high, abs=0.006)
    assert float(cells[0][1]) == pytest.approx(groups.x.mean() - groups.y.mean(), abs=0.006)
    assert cells[4][0].startswith("Hedges")
    assert float(cells[4][1]) == pytest.approx(analysis.effect_sizes["hedges_g"].value, abs=0.006)
    assert all(panel.table.item(r, 1).toolTip() for r in range(panel.table.rowCount()))


def test_a_pick_switches_the_findings_to_that_procedure(panel, analysis, groups):
    session = panel.session
    session.store("analysis", analysis)
    session.choose(procedure="mann_whitney")
    assert panel.procedure_key() == "mann_whitney"
    cells = _cells(panel)
    # reference: scipy.stats.mannwhitneyu(x, y) gives U of the first sample
    u = stats.mannwhitneyu(groups.x, groups.y)
    assert cells[1][0] == "Test statistic (U)"
    assert float(cells[1][1]) == pytest.approx(u.statistic, abs=0.05)
    # a rank test has no degrees of freedom: no row says "n/a" for them
    assert [row[0] for row in cells[2:]] == ["p-value", cells[3][0]]
    assert report.NOT_AVAILABLE not in [row[1] for row in cells]
    rank = analysis.effect_sizes["rank_biserial"]
    assert cells[3][0].lower() == rank.name.lower()
    assert float(cells[3][1]) == pytest.approx(rank.value, abs=0.006)
    assert "suggestion was" in panel.followed.text()
    assert panel.headline.text() == report.render(analysis, procedure="mann_whitney").paragraph
    session.choose(procedure="z")  # not run without known SDs: the suggestion is shown instead
    assert panel.procedure_key() == "welch_t"


def test_robustness_rows_and_agreement(panel, analysis):
    panel.session.store("analysis", analysis)
    rows = analysis.robustness.rows
    # every difference on the plot's axis; the Brunner-Munzel probability is not a difference
    assert panel.plot.row_names() == [report.capital(row.name) for row in rows
                                      if row.key != "brunner_munzel"]
    assert any(row.key == "brunner_munzel" for row in rows)
    verdict = "agree" if analysis.robustness.agree else "disagree"
    assert verdict in panel.agreement.text()
    for caution in analysis.recommendation.cautions:
        assert caution in panel.cautions_list()


def test_a_probability_estimate_is_not_labelled_as_a_difference(panel, analysis):
    panel.session.store("analysis", analysis)
    panel.session.choose(procedure="brunner_munzel")
    first = _cells(panel)[0][0]
    assert first.startswith("Probability that the first group's value is the larger")
    assert "minus" not in first


def test_save_plot_by_suffix_and_refuse_others(panel, analysis, tmp_path):
    panel.session.store("analysis", analysis)
    png = panel.save_plot(tmp_path / "difference.png")
    assert not QImage(str(png)).isNull()
    svg = panel.save_plot(tmp_path / "difference.svg")
    assert svg.read_text(encoding="utf-8").lstrip().startswith("<?xml")
    with pytest.raises(FileProblem, match="difference.bmp"):
        panel.save_plot(tmp_path / "difference.bmp")
    with pytest.raises(FileProblem, match="Could not save"):
        panel.save_plot(tmp_path / "no such folder" / "difference.svg")


def test_cleanup_stops_listening(panel, analysis):
    panel.cleanup()
    panel.session.store("analysis", analysis)
    assert not panel.hint.isHidden()  # nothing was redrawn after cleanup


def test_the_panels_own_save_button_says_how_it_went(panel, analysis, tmp_path, monkeypatch):
    from desktop import findings_panel

    panel.session.store("analysis", analysis)
    target = tmp_path / "report.html"
    monkeypatch.setattr(findings_panel.QFileDialog, "getSaveFileName", lambda *a, **k: (str(target), ""))
    panel.export_button.click()
    assert target.is_file() and panel.status.text() == f"Saved report.html in {tmp_path.resolve()}."
    target = tmp_path / "report.odt"
    panel.export_button.click()
    assert not target.exists() and ".html or .pdf" in panel.status.text()


def test_a_one_sided_question_against_the_data_reads_as_such(panel):
    rng = np.random.default_rng(8)
    groups = Groups(("a", "b"), rng.normal(10, 1, 20), rng.normal(12, 1, 20))
    analysis = analyze(groups, AnalysisSpec(question=Question.from_alternative("greater"), resamples=300, seed=1))
    panel.session.store("analysis", analysis)
    assert "none finds a clear difference" not in panel.agreement.text()
    assert "the other way" in panel.agreement.text()
    assert "the other way" in panel.headline.text()
    assert "One-sided p-value" in [row[0] for row in _cells(panel)]


def test_a_dot_without_an_interval_is_explained(panel, analysis):
    panel.session.store("analysis", analysis)
    assert analysis.procedures["permutation_median"].interval is None
    assert not panel.no_interval.isHidden()
    assert "permutation test of medians gives a p-value but no interval" in panel.no_interval.text()
