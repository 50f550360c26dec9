"""The procedure panel: the checks against scipy, the suggestion, the pick and what it assumes."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import numpy as np  # noqa: E402
import pytest  # noqa: E402
from PySide6.QtWidgets import QApplication, QLabel  # noqa: E402
from scipy import stats  # noqa: E402

from engine import report  # noqa: E402
from engine.spec import AnalysisSpec, Statements
from engine.question import Question
from engine.analysis import analyze  # noqa: E402
from engine.results import Groups  # noqa: E402
from engine.session import Session  # noqa: E402
from desktop.choice_panel import ChoicePanel, main_reading  # noqa: E402


@pytest.fixture
def groups():
    rng = np.random.default_rng(77)
    return Groups(("plot north", "plot south"), rng.normal(5.0, 1.0, 24), rng.gamma(2.0, 1.4, 30))


@pytest.fixture
def panel(qtbot, groups):
    session = Session()
    widget = ChoicePanel(session)
    qtbot.addWidget(widget)
    session.store("analysis", analyze(groups, AnalysisSpec(resamples=300, seed=4)))
    yield widget
    widget.cleanup()


def _figures(card) -> list[str]:
    layout = card.figures
    return [layout.itemAt(i).widget().text() for i in range(layout.count())
            if isinstance(layout.itemAt(i).widget(), QLabel)]


def test_hint_only_without_an_analysis(qtbot):
    widget = ChoicePanel(Session())
    qtbot.addWidget(widget)
    assert not widget.hint.isHidden() and widget.scroll.isHidden()


def test_shape_figures_match_scipy(panel, groups):
    for index, values in enumerate((groups.x, groups.y)):
        figures = _figures(panel.shape_cards[index])
        # reference: scipy.stats.shapiro(values)
        w, p = stats.shapiro(values)
        assert figures[0] == f"Shapiro-Wilk W = {report.format_number(w)}, {report.p_clause(p)}"
        # reference: scipy.stats.skew(values, bias=False), the adjusted Fisher-Pearson G1
        assert figures[1] == f"skewness {report.format_number(stats.skew(values, bias=False), digits=2)}"
        # reference: scipy.stats.kurtosis(values, bias=False), the adjusted excess kurtosis G2
        assert figures[2] == (f"excess kurtosis "
                              f"{report.format_number(stats.kurtosis(values, bias=False), digits=2)}")
        assert groups.labels[index] in panel.shape_cards[index].title.text()


def test_a_symmetric_sample_shows_no_skewness_rather_than_rounding_noise(qtbot):
    # equally spaced values: scipy.stats.skew(values, bias=False) is 0 up to rounding (~1e-15)
    values = np.arange(1.0, 13.0) / 10 + 7.0
    assert abs(stats.skew(values, bias=False)) < 1e-12
    session = Session()
    widget = ChoicePanel(session)
    qtbot.addWidget(widget)
    session.store("analysis", analyze(Groups(("slow", "split"), values, values + 0.1),
                                      AnalysisSpec(resamples=200, seed=1)))
    figures = _figures(widget.shape_cards[0])
    assert figures[1] == "skewness 0.00"
    # reference: scipy.stats.kurtosis(values, bias=False) = -1.2 for twelve equally spaced values
    assert figures[2] == f"excess kurtosis {report.format_number(stats.kurtosis(values, bias=False), digits=2)}"
    widget.cleanup()


def test_spread_figures_match_scipy(panel, groups):
    figures = _figures(panel.spread_card)
    # reference: scipy.stats.levene(x, y, center="mean") and center="median" (Brown-Forsythe)
    levene = stats.levene(groups.x, groups.y, center="mean")
    brown_forsythe = stats.levene(groups.x, groups.y, center="median")
    assert f"Levene {report.p_clause(levene.pvalue)}" in figures
    assert f"Brown-Forsythe {report.p_clause(brown_forsythe.pvalue)}" in figures
    sds = sorted([np.std(groups.x, ddof=1), np.std(groups.y, ddof=1)])
    assert f"SD ratio {report.format_number(sds[1] / sds[0], digits=2)}" in figures


def test_tiny_p_values_read_p_below_a_thousandth(qtbot):
    rng = np.random.default_rng(5)
    skewed = Groups(("batch old", "batch new"), rng.normal(10.0, 0.5, 200), rng.exponential(8.0, 200))
    session = Session()
    widget = ChoicePanel(session)
    qtbot.addWidget(widget)
    session.store("analysis", analyze(skewed, AnalysisSpec(resamples=200, seed=1)))
    # reference: scipy.stats.shapiro(y) and scipy.stats.levene(x, y, center="mean") are both
    # below 0.001 for these data, checked here so the test cannot pass by accident
    assert stats.shapiro(skewed.y).pvalue < 0.001
    assert stats.levene(skewed.x, skewed.y, center="mean").pvalue < 0.001
    shown = _figures(widget.shape_cards[1]) + _figures(widget.spread_card)
    assert shown[0].endswith(", p < 0.001")
    assert "Levene p < 0.001" in shown
    assert not any("p = <" in text for text in shown)


def test_each_card_leads_with_its_most_severe_finding(panel):
    checks = panel.session.analysis.diagnostics
    for index, card in enumerate(panel.shape_cards):
        lead = main_reading([f for f in checks.findings if f.group == index and f.key in
                             ("normality", "skewness", "tails", "outliers", "ties")])
        assert card.reading.text().endswith(lead.text)
        rank = {"info": 0, "note": 1, "warning": 2}
        assert all(rank[f.severity] <= rank[lead.severity] for f in checks.findings if f.group == index)


def test_suggestion_shows_reasons_and_alternatives(panel):
    suggested = panel.session.analysis.recommendation
    text = panel.suggestion.text()
    # every name as a label: with a capital first letter, one style for all
    assert report.capital(suggested.name) in text
    assert all(report.capital(option.name) in text for option in suggested.considered)


def test_picking_writes_the_choice_and_says_what_it_assumes(panel):
    session = panel.session
    index = panel.picker.findData("pooled_t")
    panel.picker.setCurrentIndex(index)
    assert session.spec.procedure == "pooled_t"
    assert session.analysis.recommendation.assumptions["pooled_t"] in panel.assumes.text()
    panel.picker.setCurrentIndex(0)
    assert session.spec.procedure is None


def test_a_change_from_elsewhere_is_shown_without_writing_back(panel, groups, monkeypatch):
    session = panel.session
    original = session.choose
    session.choose(procedure="mann_whitney", statements=Statements(equal_spread_known=True, ordinal=True))
    calls = []
    monkeypatch.setattr(session, "choose", lambda **changes: calls.append(changes) or original(**changes))
    session.store("analysis", None)
    session.store("analysis", analyze(groups, AnalysisSpec(resamples=300, seed=4)))
    assert calls == []  # refilling the widgets from the session wrote nothing back
    assert panel.picker.currentData() == "mann_whitney"
    assert panel.ordinal.isChecked() and panel.equal_spread.isChecked()


def test_plots_are_drawn_again_only_for_a_new_analysis(panel, groups, monkeypatch):
    session = panel.session
    drawn = []
    for plot in [panel.box_plot, *(p for pair in panel.shape_plots for p in pair)]:
        monkeypatch.setattr(plot, "redraw", lambda plot=plot: drawn.append(plot))
    session.choose(resamples=900, question=Question("differ", 0.9), procedure="mann_whitney")
    assert drawn == []  # the analysis on show is the same object: only the pick's text follows
    assert panel.picker.currentData() == "mann_whitney"
    assert session.analysis.procedures["mann_whitney"].name in panel.assumes.text()
    session.store("analysis", analyze(groups, AnalysisSpec(resamples=300, seed=5)))
    assert len(drawn) == 5 and len(set(map(id, drawn))) == 5  # each plot once


def test_what_the_user_knows_goes_into_the_spec(panel):
    session = panel.session
    panel.equal_spread.setChecked(True)
    assert session.spec.statements.equal_spread_known
    panel.ordinal.setChecked(True)
    assert session.spec.statements.ordinal
    panel.advanced_button.setChecked(True)
    assert not panel.sd_box.isHidden()
    panel.sd_edits[0].setText("1.5")
    panel.sd_edits[1].setText("nonsense")
    panel.sd_box.setChecked(True)
    assert session.spec.statements.known_sd is None
    assert "positive number" in panel.sd_message.text()
    panel.sd_edits[1].setText("2.25")
    panel.sd_apply.click()
    assert session.spec.statements.known_sd == (1.5, 2.25)
    panel.sd_box.setChecked(False)
    assert session.spec.statements.known_sd is None


def test_check_figures_read_in_words_with_plain_hover_help(panel):
    from desktop.choice_panel import CHECK_TIPS, SHAPE_PLOT_TIP, _apart_text

    assert _apart_text(0, 0) == "none apart from the rest"
    assert _apart_text(1, 0) == "1 value apart from the rest"
    assert _apart_text(2, 1) == "3 values apart from the rest, 1 of them far"
    assert "width of the middle half" in CHECK_TIPS["outliers"]
    assert "heavy the tails" in CHECK_TIPS["kurtosis"]
    assert "Density is" in SHAPE_PLOT_TIP
    assert all(plot.toolTip() == SHAPE_PLOT_TIP for plot, _ in panel.shape_plots)
    names = [panel.picker.itemText(i) for i in range(panel.picker.count())]
    assert all(name[:1].isupper() for name in names)


def _shown_figure_labels(card) -> list[QLabel]:
    """Every visible label of a card's row of figures (not its title, reading or details)."""
    return [label for label in card.findChildren(QLabel)
            if label.isVisible() and label not in (card.title, card.reading, card.more)]


def _overlapping(widgets) -> list[tuple[str, str]]:
    return [(a.text(), b.text()) for i, a in enumerate(widgets) for b in widgets[i + 1:]
            if a.geometry().intersects(b.geometry())]


def test_new_figures_replace_the_old_at_once_without_overlap(qtbot, groups):
    # The spread line was once drawn over itself after Swap, one-sided and 90 %: the old labels
    # were left to a deferred delete and stayed on show under the new ones.
    session = Session()
    widget = ChoicePanel(session)
    qtbot.addWidget(widget)
    widget.resize(430, 900)
    widget.show()
    swapped = Groups(groups.labels[::-1], groups.y, groups.x)
    for data, alternative, level in ((groups, "two-sided", 0.95), (swapped, "two-sided", 0.95),
                                     (swapped, "less", 0.95), (swapped, "less", 0.9)):
        session.store("analysis", analyze(data, AnalysisSpec(question=Question.from_alternative(alternative, level), resamples=200, seed=3)))
        QApplication.processEvents()  # lays out and paints, but runs no deferred delete
        for card in (*widget.shape_cards, widget.spread_card):
            labels = _shown_figure_labels(card)
            assert sorted(label.text() for label in labels) == sorted(_figures(card))
            assert len(labels) == card.figures.count()
            assert _overlapping(labels + [card.reading]) == []
            bottom = max(label.geometry().bottom() for label in labels)
            assert bottom < card.reading.geometry().top()  # the reading sits below every line
    widget.cleanup()


def _paired_panel(qtbot, x, y, **spec):
    session = Session()
    widget = ChoicePanel(session)
    qtbot.addWidget(widget)
    session.store("analysis", analyze(Groups(("caliper", "laser"), x, y),
                                      AnalysisSpec(design="paired", resamples=300, seed=4, **spec)))
    return session, widget


def _card_text(card) -> str:
    return card.reading.text() + "\n" + card.more.text()


def test_paired_data_show_the_checks_of_pairs_not_those_of_two_groups(qtbot, groups):
    rng = np.random.default_rng(8)
    units = rng.normal(12.0, 0.05, 18)
    x, y = units + rng.normal(0.01, 0.004, 18), units + rng.normal(0.0, 0.004, 18)
    session, widget = _paired_panel(qtbot, x, y, statements=Statements(known_sd=(0.01, 0.01)))
    assert widget.spread_card.isHidden()  # no "spread of the two groups", no Levene, no SD ratio
    assert widget.equal_spread.isHidden() and widget.advanced_button.isHidden() and widget.sd_box.isHidden()
    assert not widget.ordinal.isHidden()  # ratings still matter to pairs
    shape_card, pairs_card = widget.paired_cards
    # the pairs' own checks (how they go together) sit with the pairs; the shape with the shape
    assert "go together" in _card_text(pairs_card) and "go together" not in _card_text(shape_card)
    assert "Shapiro-Wilk" in _card_text(shape_card)
    assert not any(plot.isHidden() for plot in widget.paired_plots)
    # two separate groups again: their spread and statements are back
    session.store("analysis", analyze(groups, AnalysisSpec(resamples=300, seed=4)))
    assert not widget.spread_card.isHidden() and not widget.equal_spread.isHidden()
    assert not widget.advanced_button.isHidden()
    widget.cleanup()


def test_pairs_one_amount_apart_say_so_with_the_pairs(qtbot):
    x = np.array([11.965, 12.014, 11.923, 12.055, 11.987, 12.002])
    _, widget = _paired_panel(qtbot, x, np.round(x - 0.02, 3))
    text = _card_text(widget.paired_cards[1])
    assert "Every pair differs by the same amount, 0.02" in text
    assert widget.session.analysis.recommendation.key == "signed_rank"
    assert "paired_t" not in [widget.picker.itemData(i) for i in range(widget.picker.count())]
    # no histogram or Q-Q plot of one amount (its one bar would sit around zero)
    assert all(plot.isHidden() for plot in widget.paired_plots[:2])
    assert "Shapiro-Wilk check of a bell shape cannot be run" in _card_text(widget.paired_cards[0])
    widget.cleanup()
