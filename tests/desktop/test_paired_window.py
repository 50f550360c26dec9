"""The paired design through the whole window: choosing it in the long and the wide layout, the
analysis of the pairs, the plots of the differences, what was left out, never a silent switch,
and a saved paired analysis that reopens paired."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats


def _coating(n: int = 12, seed: int = 5) -> tuple[np.ndarray, np.ndarray]:
    rng = np.random.default_rng(seed)
    base = rng.normal(50.0, 4.0, n)
    return np.round(base + rng.normal(0, 0.8, n), 2), np.round(base - 1.2 + rng.normal(0, 0.8, n), 2)


@pytest.fixture
def long_file(csv_file):
    """Twelve panels before and after a coating (file rows 2-25), then one ID in one group only
    (row 26) and one ID twice in 'after' (rows 4, 16 and 27)."""
    before, after = _coating()
    rows = [(f"P{i + 1:02d}", "before", v) for i, v in enumerate(before)]
    rows += [(f"P{i + 1:02d}", "after", v) for i, v in enumerate(after)]
    rows += [("P13", "before", 51.0), ("P03", "after", 47.5)]
    return csv_file("coating_panels.csv", rows, ("panel_id", "stage", "thickness_um"))


@pytest.fixture
def wide_file(csv_file):
    before, after = _coating(9)
    rows = [(b, a) for b, a in zip(before, after)]
    rows[4] = (rows[4][0], None)  # file row 6: one partner blank
    return csv_file("coating_wide.csv", rows, ("before_um", "after_um"))


def _choose(combo, data) -> None:
    combo.setCurrentIndex(combo.findData(data))
    combo.activated.emit(combo.currentIndex())


def _ready(window, settle, qtbot):
    settle(window)
    window._add_late_panels()
    qtbot.waitUntil(lambda: window.choice_panel is not None and window.session.analysis is not None,
                    timeout=20_000)


def test_paired_long_file_from_choice_to_plots(make_window, settle, qtbot, long_file):
    window = make_window([long_file])
    _ready(window, settle, qtbot)
    live = window.session
    # data that look paired are never taken as paired without the user's say
    assert live.spec.design == "independent" and live.analysis.design == "independent"
    assert window.setup_panel.design_evidence.isVisibleTo(window.setup_panel)
    _choose(window.setup_panel.design, "paired")
    settle(window)
    spec, analysis = live.spec, live.analysis
    assert spec.design == "paired" and spec.pair_column == "panel_id"
    assert analysis is not None and analysis.design == "paired"
    before, after = _coating()
    keep = [i for i in range(12) if i != 2]  # P03 is twice in 'after': left out, never guessed
    # the pairs the window analysed are the file's, matched by ID (scipy's ttest_rel on them)
    assert stats.ttest_rel(analysis.groups.x, analysis.groups.y).statistic == pytest.approx(
        stats.ttest_rel(before[keep], after[keep]).statistic, rel=1e-12)
    # the checks show the differences in place of each group's shape
    choice = window.choice_panel
    assert all(not card.isVisibleTo(choice) for card in choice.shape_cards)
    assert all(card.isVisibleTo(choice) for card in choice.paired_cards)
    shape_plot, qq_plot, difference_plot, joined_plot = choice.paired_plots
    across, up = difference_plot.shown_points()
    assert sorted(up) == pytest.approx(sorted(before[keep] - after[keep]))
    assert sorted(across) == pytest.approx(sorted((before[keep] + after[keep]) / 2))
    assert difference_plot.mean_line == pytest.approx(np.mean(before[keep] - after[keep]))
    assert joined_plot.drawn and joined_plot.isVisibleTo(choice)
    # what the pairing left out, with its rows, in the screening's panel and in the grid
    html = window.data_panel.report.toHtml()
    assert "Left out of the pairs" in html and "P13" in html and "P03" in html
    model = window.data_panel.model
    marked = {model.file_row(row) for row in range(model.rowCount())
              if model.mark(row, model.column_index("thickness_um")) is not None}
    assert marked == {4, 16, 26, 27}


def test_paired_wide_file_takes_the_rows_as_pairs(make_window, settle, qtbot, wide_file):
    window = make_window([wide_file])
    _ready(window, settle, qtbot)
    _choose(window.setup_panel.design, "paired")
    settle(window)
    analysis = window.session.analysis
    assert window.session.spec.design == "paired" and window.session.spec.pair_column is None
    assert analysis.design == "paired" and analysis.paired.n_pairs == 8
    assert "row 6" in window.data_panel.report.toHtml()
    model = window.data_panel.model
    row = next(r for r in range(model.rowCount()) if model.file_row(r) == 6)
    assert model.mark(row, model.column_index("before_um")) is not None  # its partner is greyed too


def test_pairs_that_cannot_be_formed_never_fall_back(make_window, settle, qtbot, csv_file):
    rows = [(f"A{i}", "before", 10.0 + i) for i in range(6)] + [(f"B{i}", "after", 9.0 + i) for i in range(6)]
    path = csv_file("no_partners.csv", rows, ("panel_id", "stage", "thickness_um"))
    window = make_window([path])
    _ready(window, settle, qtbot)
    _choose(window.setup_panel.design, "paired")
    _choose(window.setup_panel.pair_column, "panel_id")
    settle(window)
    live = window.session
    assert live.spec.design == "paired"  # stays paired
    assert live.analysis is None and live.problem  # and nothing is compared as separate groups
    assert window.message_bar.key == "groups_problem" and live.problem in window.message_bar.text
    assert "\n" not in live.problem  # the engine's one line
    assert window.setup_panel.pair_note.text() == f"These data cannot be paired yet: {live.problem}"


def test_a_saved_paired_analysis_reopens_paired(make_window, settle, qtbot, long_file, tmp_path):
    window = make_window([long_file])
    _ready(window, settle, qtbot)
    _choose(window.setup_panel.design, "paired")
    settle(window)
    saved_figures = dict(window.session.analysis.procedures)
    target = tmp_path / "coating.twofold"
    assert window.save_analysis(target)
    again = make_window([target])
    _ready(again, settle, qtbot)
    spec, analysis = again.session.spec, again.session.analysis
    assert spec.design == "paired" and spec.pair_column == "panel_id"
    assert analysis.design == "paired" and analysis.paired is not None
    assert again.message_bar.key == "reopen_same"
    assert again.setup_panel.design.currentData() == "paired"
    assert set(analysis.procedures) == set(saved_figures)
    again._add_late_panels()
    assert all(card.isVisibleTo(again.choice_panel) for card in again.choice_panel.paired_cards)
