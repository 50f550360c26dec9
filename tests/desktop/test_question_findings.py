"""The findings of a margin question: the verdict against the margin in the report's words, the
band in the plot, and a plain sentence when no procedure could answer."""

from __future__ import annotations

import numpy as np
import pytest

from desktop.findings_panel import NOTHING_ANSWERS, FindingsPanel
from engine.analysis import analyze
from engine.question import Margin, Question
from engine.results import Groups
from engine.session import Session
from engine.spec import AnalysisSpec


@pytest.fixture
def panel(qtbot):
    widget = FindingsPanel(Session())
    qtbot.addWidget(widget)
    yield widget
    widget.cleanup()


def test_nothing_to_answer_is_said_not_shown_as_a_crash(panel):
    rng = np.random.default_rng(5)
    # a ratio margin needs positive values; these cross zero, so no procedure can answer
    groups = Groups(("new", "old"), rng.normal(0.0, 1.0, 20), rng.normal(0.1, 1.0, 20))
    spec = AnalysisSpec(question=Question("equivalent", 0.95, Margin.within(1.25, unit="ratio")), seed=1)
    analysis = analyze(groups, spec)
    assert not analysis.procedures
    panel.session.store("analysis", analysis)
    assert panel.headline.text().startswith(NOTHING_ANSWERS)
    assert not panel.table.isVisibleTo(panel) and not panel.offer.isVisibleTo(panel)
    assert not panel.copy_button.isEnabled() and not panel.export_button.isEnabled()
    assert panel.plot.row_names() == [] and not panel.plot.isVisibleTo(panel)
