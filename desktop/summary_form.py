"""Comparing two groups known only by their summary statistics: a small form and its results.

For each group a label, n, the mean and the spread: the standard deviation, or the standard
error of the mean instead, or SDs known as population values (which adds the z-test). A block of
2 rows x 3 cells (n, mean, spread) or x 4 (label first) pasted from a spreadsheet fills the
form, a header row skipped; a file of summaries (``engine.io.summaries.read_summaries``) fills
it too. ``engine.summary_analysis.analyze_summaries`` runs in a worker; the results are one
document of blocks (``engine.report.tables``) shown here and copied as it is shown.

Run on its own for a look by hand: ``python -m desktop.summary_form``.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from PySide6.QtCore import QEvent, QObject, Qt
from PySide6.QtGui import QGuiApplication, QKeySequence
from PySide6.QtWidgets import (QComboBox, QDialog, QFileDialog, QGridLayout, QHBoxLayout, QLabel,
                               QLineEdit, QPushButton, QTextBrowser, QVBoxLayout, QWidget)

from engine.errors import DataProblem, TwofoldError
from engine.group_stats import GroupStats
from engine.report import tables
from engine.report.numbers import format_interval
from engine.rounding import format_number, format_p, level_text
from engine.spec import AnalysisSpec

from . import clipboard
from .panel_parts import text_label
from .plain_text import plain_label
from .workers import Worker

__all__ = ["SummaryForm", "SPREAD_KINDS", "parse_block", "result_blocks"]

# How the spread is entered: (what the menu says, the column heading, GroupStats field, known).
SPREAD_KINDS = (
    ("standard deviation (SD)", "SD", "sd", False),
    ("standard error of the mean (SE) instead of the SD", "SE", "se", False),
    ("SD known in advance as the population value (adds the z-test)", "known SD", "sd", True),
)
FIELDS = ("label", "n", "mean", "spread")
SAVED_FILTER = "Saved analyses (*.twofold);;All files (*)"
SUMMARY_FILTER = "Summary files (*.csv *.tsv *.txt *.xlsx *.xls *.ods);;All files (*)"


def _number(text: str) -> float:
    """A number as typed or pasted: a lone decimal comma is read as a point."""
    text = text.strip()
    if text.count(",") == 1 and "." not in text:
        text = text.replace(",", ".")
    return float(text)


def _is_number(text: str) -> bool:
    try:
        _number(text)
    except ValueError:
        return False
    return True


def parse_block(text: str) -> list[list[str]]:
    """The rows of a block copied from a spreadsheet (cells split by tabs, else by spaces), with
    a header row (no number where n belongs) left out: two rows of 3 cells (n, mean, spread) or
    4 (label, n, mean, spread).

    Raises DataProblem when the block is not of that shape.
    """
    lines = [line for line in text.replace("\r\n", "\n").replace("\r", "\n").split("\n") if line.strip()]
    rows = [[cell.strip() for cell in (line.split("\t") if "\t" in line else line.split())] for line in lines]
    if rows and len(rows[0]) in (3, 4) and not _is_number(rows[0][-3]):
        rows = rows[1:]  # a header row
    if len(rows) != 2 or {len(row) for row in rows} not in ({3}, {4}):
        shape = f"{len(rows)} row{'s' if len(rows) != 1 else ''}" + \
            (f" of {'/'.join(str(n) for n in sorted({len(r) for r in rows}))} cells" if rows else "")
        raise DataProblem(f"Paste two rows (one per group) of n, mean and SD, or of label, n, mean and "
                          f"SD; this block has {shape}.")
    return rows


def _spread_text(stats: GroupStats) -> str:
    """The spread as entered, and the SD found from a standard error."""
    if stats.given_as == "se":
        return f"SE {stats.se:.12g} (SD {format_number(stats.standard_deviation, digits=4)})"
    return f"SD {stats.sd:.12g}" + (" (known)" if stats.sd_known else "")


def result_blocks(analysis) -> list[tuple]:
    """The results as report blocks: the groups as entered, every procedure that works from
    summaries, the effect sizes, the suggestion and why, and what the summaries could not give."""
    chosen = analysis.recommendation.key
    level = level_text(analysis.spec.question.level)
    groups = [(s.label, str(s.n), f"{s.mean:.12g}", _spread_text(s)) for s in analysis.stats]
    procedures = [((("suggested: " if key == chosen else "") + result.name), result.estimate_name,
                   format_number(result.estimate), format_interval(result.interval) or "none",
                   format_p(result.p_value) if result.p_value is not None else "none")
                  for key, result in analysis.procedures.items()]
    sizes = [(size.name, format_number(size.value), format_interval(size.interval) or "none")
             for size in analysis.effect_sizes.values()]
    blocks: list[tuple] = [
        ("h", "The two groups as entered"),
        ("grid", ["Group", "n", "Mean", "Spread"], groups, 1, False),
        ("h", "Every procedure that works from summary statistics"),
        ("p", f"Each difference is {analysis.labels[0]} minus {analysis.labels[1]}."),
        ("grid", ["Procedure", "Estimate of", "Estimate", f"{level} interval", "p-value"], procedures, 2, True),
        ("h", "Effect sizes"),
        ("grid", ["Effect size", "Value", f"{level} interval"], sizes, 1, False),
        ("h", f"Suggested: {analysis.recommendation.name}"),
        ("list", list(analysis.recommendation.reasons)),
        ("h", "What summary statistics cannot give"),
        ("list", [finding.text for finding in analysis.findings + analysis.notes]),
    ]
    return blocks


class _PasteCatcher(QObject):
    """Sends a paste of several cells into a field to the form, which fills every field from it."""

    def __init__(self, form: "SummaryForm") -> None:
        super().__init__(form)
        self._form = form

    def eventFilter(self, watched, event) -> bool:  # noqa: N802 - Qt's name
        if event.type() == QEvent.Type.KeyPress and event.matches(QKeySequence.StandardKey.Paste):
            text = QGuiApplication.clipboard().text()
            if "\t" in text or "\n" in text.strip():
                self._form.paste_block(text)
                return True
        return False


class SummaryForm(QDialog):
    """The form of two groups' summary statistics and what they give.

    Parameters
    ----------
    spec : AnalysisSpec, optional
        The question (direction, level, margin) and statements the comparison takes (the
        window's current ones); its data columns are not used.
    """

    def __init__(self, spec: AnalysisSpec | None = None, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setWindowTitle("Compare from summary statistics")
        self.spec = AnalysisSpec(question=spec.question, statements=spec.statements) if spec else AnalysisSpec()
        self.analysis: Any = None
        self.saved_path: Path | None = None  # where the analysis was last saved
        self.worker = Worker(self)
        self.worker.finished.connect(self._on_done)
        self.worker.failed.connect(lambda message, expected: self._say(message))
        self.worker.busy_changed.connect(lambda busy: self.run_button.setEnabled(not busy))
        self._build()

    def _build(self) -> None:
        layout = QVBoxLayout(self)
        layout.addWidget(text_label(
            "When only each group's count, mean and spread are known (from a certificate, a paper or "
            "an older report), enter them here. Paste two rows from a spreadsheet into any box to fill "
            "the form at once."))
        kind_row = QHBoxLayout()
        kind_row.addWidget(plain_label("The spread is given as"))
        self.spread_kind = QComboBox()
        for words, *_ in SPREAD_KINDS:
            self.spread_kind.addItem(words)
        self.spread_kind.currentIndexChanged.connect(self._kind_changed)
        kind_row.addWidget(self.spread_kind, 1)
        layout.addLayout(kind_row)

        grid = QGridLayout()
        self.spread_heading = plain_label("SD")
        for column, heading in enumerate(("", "Label", "n", "Mean")):
            grid.addWidget(plain_label(heading), 0, column)
        grid.addWidget(self.spread_heading, 0, 4)
        catcher = _PasteCatcher(self)
        self.fields: list[dict[str, QLineEdit]] = []
        for group in range(2):
            grid.addWidget(plain_label(f"Group {group + 1}"), group + 1, 0)
            row = {}
            for column, name in enumerate(FIELDS):
                edit = QLineEdit()
                edit.setPlaceholderText(("group name", "count", "mean", "spread")[column])
                edit.installEventFilter(catcher)
                edit.textEdited.connect(lambda _text: self._say(""))
                edit.textChanged.connect(lambda _text: self._forget())
                grid.addWidget(edit, group + 1, column + 1)
                row[name] = edit
            self.fields.append(row)
        layout.addLayout(grid)
        self.problem = plain_label()
        self.problem.setStyleSheet("color: #b3261e;")
        self.problem.setVisible(False)
        layout.addWidget(self.problem)

        buttons = QHBoxLayout()
        self.paste_button = QPushButton("Paste from a spreadsheet")
        self.paste_button.setToolTip("Fill the form from two rows copied from a spreadsheet: n, mean "
                                     "and spread, or the label first.")
        self.paste_button.clicked.connect(lambda: self.paste_block(QGuiApplication.clipboard().text()))
        self.file_button = QPushButton("Open a file of summaries...")
        self.file_button.setToolTip("A small file with one row per group and the columns label, n, "
                                    "mean and sd (or se).")
        self.file_button.clicked.connect(self.ask_file)
        self.run_button = QPushButton("Compare")
        self.run_button.setDefault(True)
        self.run_button.clicked.connect(self.run)
        self.copy_button = QPushButton("Copy the results")
        self.copy_button.setToolTip("Put the results on the clipboard as tables and as plain text.")
        self.copy_button.setEnabled(False)
        self.copy_button.clicked.connect(self.copy_results)
        self.save_button = QPushButton("Save the analysis...")
        self.save_button.setToolTip("Keep these numbers, the question and the results as a .twofold file, "
                                    "to open again or run again with the command.")
        self.save_button.setEnabled(False)
        self.save_button.clicked.connect(lambda: self.save_analysis())
        for button in (self.paste_button, self.file_button):
            buttons.addWidget(button)
        buttons.addStretch(1)
        for button in (self.run_button, self.copy_button, self.save_button):
            buttons.addWidget(button)
        layout.addLayout(buttons)
        self.results = QTextBrowser()
        self.results.setOpenLinks(False)
        self.results.setMinimumSize(640, 360)
        layout.addWidget(self.results, 1)

    # -- entering ------------------------------------------------------------------------------
    def _kind_changed(self, index: int) -> None:
        self.spread_heading.setText(SPREAD_KINDS[index][1])
        self._forget()

    def _forget(self) -> None:
        """Take the results away once the numbers they came from are changed."""
        if self.analysis is not None or self.worker.busy:
            self.worker.cancel()
            self.analysis = None
            self.results.setHtml(tables.html([("p", "The numbers have changed: press Compare for their results.")]))
            self.copy_button.setEnabled(False)
            self.save_button.setEnabled(False)

    def _say(self, problem: str) -> None:
        self.problem.setText(problem)
        self.problem.setVisible(bool(problem))

    def fill(self, stats) -> None:
        """Put two GroupStats in the form (their spread as they were given)."""
        first, second = stats
        known = first.sd_known and second.sd_known
        self.spread_kind.setCurrentIndex(2 if known else (1 if first.given_as == "se" else 0))
        as_se = self.spread_kind.currentIndex() == 1
        for row, s in zip(self.fields, stats):
            spread = s.standard_error if as_se else s.standard_deviation
            for name, value in zip(FIELDS, (s.label, str(s.n), repr(s.mean), repr(spread))):
                row[name].setText(value)
        self._say("")

    def paste_block(self, text: str) -> bool:
        """Fill the form from a block copied from a spreadsheet; a block of another shape is
        said under the form and changes nothing."""
        try:
            rows = parse_block(text)
        except DataProblem as problem:
            self._say(problem.message)
            return False
        for row, cells in zip(self.fields, rows):
            names = FIELDS if len(cells) == 4 else FIELDS[1:]
            for name, cell in zip(names, cells):
                row[name].setText(cell)
        self._say("")
        return True

    def ask_file(self) -> None:
        path, _ = QFileDialog.getOpenFileName(self, "Open a file of summary statistics", "", SUMMARY_FILTER)
        if path:
            self.open_file(path)

    def open_file(self, path: str | Path) -> bool:
        """Fill the form from a file of summaries (``read_summaries``); a problem is said under the form."""
        from engine.io.summaries import read_summaries

        try:
            stats = read_summaries(path)
        except TwofoldError as problem:
            self._say(problem.message)
            return False
        self.fill(stats)
        return True

    def stats(self) -> tuple[GroupStats, GroupStats]:
        """The two groups as entered; raises DataProblem naming the group and the box at fault."""
        _, shown, spread, known = SPREAD_KINDS[self.spread_kind.currentIndex()]
        found = []
        for index, row in enumerate(self.fields):
            texts = {name: row[name].text().strip() for name in FIELDS}
            where = f"Group {index + 1}"
            if not texts["label"]:
                raise DataProblem(f"{where}: give the group a label.")
            numbers: dict[str, Any] = {}
            for name, heading in (("n", "n"), ("mean", "mean"), ("spread", shown)):
                if not texts[name]:
                    raise DataProblem(f"{where}: the {heading} is missing.")
                try:
                    value = _number(texts[name])
                except ValueError:
                    raise DataProblem(f"{where}: the {heading} '{texts[name]}' is not a number.") from None
                numbers[name] = value
            if not numbers["n"].is_integer():
                raise DataProblem(f"{where}: n must be a whole number, not {texts['n']}.")
            found.append(GroupStats(label=texts["label"], n=int(numbers["n"]), mean=numbers["mean"],
                                    sd_known=known, **{spread: numbers["spread"]}))
        return found[0], found[1]

    # -- comparing -----------------------------------------------------------------------------
    def run(self) -> bool:
        """Compare the groups as entered, in a worker; a bad entry is said in one line instead."""
        try:
            stats = self.stats()
        except TwofoldError as problem:
            self._say(problem.message)
            return False
        self._say("")
        spec = self.spec

        def compare(progress: Any, cancelled: Any) -> Any:
            from engine.summary_analysis import analyze_summaries

            return analyze_summaries(stats, spec, progress=progress, cancelled=cancelled)

        self.worker.run(compare)
        return True

    def _on_done(self, analysis: Any) -> None:
        self.analysis = analysis
        self.results.setHtml(tables.html(result_blocks(analysis)))
        self.copy_button.setEnabled(True)
        self.save_button.setEnabled(True)

    def show_saved(self, stats, analysis: Any) -> None:
        """Show a saved analysis run again: its numbers in the form, its results below."""
        self.fill(stats)
        self._on_done(analysis)

    def save_analysis(self, path: str | Path | None = None) -> bool:
        """Save the results on show as a ``.twofold`` file (asks for the path when none is given);
        a failure is said under the form."""
        from engine import saved as saved_files

        if self.analysis is None:
            return False
        if path is None:
            chosen, _ = QFileDialog.getSaveFileName(self, "Save the analysis", "", SAVED_FILTER)
            if not chosen:
                return False
            path = chosen
        path = Path(path)
        if path.suffix.lower() != saved_files.EXTENSION:
            path = path.with_name(path.name + saved_files.EXTENSION)
        try:
            saved_files.save(path, self.analysis)
        except (TwofoldError, OSError) as problem:
            self._say(f"Could not save {path.name}: {getattr(problem, 'message', None) or problem}")
            return False
        self._say("")
        self.saved_path = path
        return True

    def copy_results(self) -> None:
        """Put the results on the clipboard as HTML tables and as plain text."""
        if self.analysis is None:
            return
        blocks = result_blocks(self.analysis)
        clipboard.copy_findings_text(tables.html(blocks), tables.plain(blocks))

    def closeEvent(self, event) -> None:  # noqa: N802 - Qt's name
        self.worker.shutdown()
        super().closeEvent(event)


if __name__ == "__main__":  # pragma: no cover - a look by hand
    import sys

    from PySide6.QtWidgets import QApplication

    app = QApplication.instance() or QApplication(sys.argv[:1])
    form = SummaryForm()
    form.paste_block("A\t12\t41.2\t3.1\nB\t15\t38.0\t4.4")
    form.show()
    sys.exit(app.exec())
