"""Copying into a document: HTML with a real table plus plain text, and plots as images."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from html.parser import HTMLParser  # noqa: E402

import numpy as np  # noqa: E402
import pytest  # noqa: E402
from PySide6.QtWidgets import QApplication  # noqa: E402
from scipy import stats  # noqa: E402

from engine import report  # noqa: E402
from engine.spec import AnalysisSpec
from engine.analysis import analyze  # noqa: E402
from engine.results import Groups  # noqa: E402
from engine.session import Session  # noqa: E402
from desktop import clipboard  # noqa: E402
from desktop.findings_panel import FindingsPanel  # noqa: E402


class _Cells(HTMLParser):
    """The text of every table cell in an HTML document."""

    def __init__(self) -> None:
        super().__init__()
        self.cells: list[str] = []
        self.tables = 0
        self._in_cell = False

    def handle_starttag(self, tag, attrs):
        if tag == "table":
            self.tables += 1
        if tag in ("td", "th"):
            self._in_cell = True
            self.cells.append("")

    def handle_endtag(self, tag):
        if tag in ("td", "th"):
            self._in_cell = False

    def handle_data(self, data):
        if self._in_cell:
            self.cells[-1] += data


@pytest.fixture
def ready_panel(qtbot):
    rng = np.random.default_rng(41)
    groups = Groups(("batch A", "batch B"), rng.normal(30.0, 4.0, 25), rng.normal(27.0, 4.0, 22))
    session = Session()
    panel = FindingsPanel(session)
    qtbot.addWidget(panel)
    session.store("analysis", analyze(groups, AnalysisSpec(resamples=300, seed=9)))
    yield panel, groups
    panel.cleanup()


def test_mime_data_carries_both_formats(qapp):
    data = clipboard.findings_mime("<table><tr><td>1.5</td></tr></table>", "1.5")
    assert data.hasHtml() and data.hasText()
    assert "<table>" in data.html() and data.html().startswith("<!DOCTYPE html>")
    assert data.text() == "1.5"


def test_copy_findings_puts_a_table_and_plain_text_on_the_clipboard(ready_panel):
    panel, groups = ready_panel
    panel.copy_findings()
    data = QApplication.clipboard().mimeData()
    assert "text/html" in data.formats() and "text/plain" in data.formats()
    expected = report.render(panel.session.analysis)
    assert data.text() == expected.plain
    parser = _Cells()
    parser.feed(data.html())
    assert parser.tables >= 1
    # reference: scipy.stats.ttest_ind(x, y, equal_var=False): the p-value the report prints
    welch = stats.ttest_ind(groups.x, groups.y, equal_var=False)
    p_text = report.format_p(welch.pvalue)
    assert p_text in parser.cells
    assert p_text in data.text()


def test_copy_plot_puts_an_image_on_the_clipboard(ready_panel):
    panel, _ = ready_panel
    panel.resize(700, 600)
    panel.copy_plot()
    image = QApplication.clipboard().image()
    assert not image.isNull()
    assert image.width() >= panel.plot.width()


def test_nothing_is_copied_before_an_analysis(qtbot):
    QApplication.clipboard().setText("untouched")
    panel = FindingsPanel(Session())
    qtbot.addWidget(panel)
    panel.copy_findings()
    panel.copy_plot()
    assert QApplication.clipboard().text() == "untouched"


def test_the_program_ends_cleanly_with_findings_on_the_clipboard(tmp_path):
    # Python-made clipboard data made PySide6 6.12 crash when the interpreter ended; the copy
    # must leave the process able to exit with status 0.
    import subprocess
    import sys
    from pathlib import Path

    script = tmp_path / "copy_then_exit.py"
    script.write_text(
        "import os\n"
        "os.environ['QT_QPA_PLATFORM'] = 'offscreen'\n"
        "from PySide6.QtWidgets import QApplication\n"
        "app = QApplication([])\n"
        "from desktop import clipboard\n"
        "clipboard.copy_findings_text('<table><tr><td>1.5</td></tr></table>', '1.5')\n"
        "assert QApplication.clipboard().mimeData().hasHtml()\n", encoding="utf-8")
    root = Path(__file__).resolve().parents[2]
    done = subprocess.run([sys.executable, str(script)], cwd=root, capture_output=True, timeout=60,
                          env={**os.environ, "PYTHONPATH": str(root)})
    assert done.returncode == 0, done.stderr.decode(errors="replace")[-500:]


def test_copied_findings_carry_what_a_reviewer_asks_for(ready_panel):
    panel, groups = ready_panel
    panel.copy_findings()
    data = QApplication.clipboard().mimeData()
    analysis = panel.session.analysis
    labels = analysis.groups.labels
    parser = _Cells()
    parser.feed(data.html())
    assert parser.tables >= 3  # the result, the groups, every procedure side by side
    plain = data.text()
    assert f"Estimate, {labels[0]} minus {labels[1]}" in plain
    for row in analysis.robustness.rows:
        assert report.capital(row.name) in plain
    for reason in analysis.recommendation.reasons:
        assert reason in plain
    for finding in analysis.diagnostics.findings:
        assert finding.text in plain
    # paragraphs are single lines, for the document to wrap
    assert report.render(analysis).paragraph in plain.splitlines()
