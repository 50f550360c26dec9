"""The same two groups compared on several measurement columns at once, with adjusted p-values.

The user ticks the columns (the long layout: one outcome per column beside the group column; the
wide layout: the ticked columns in pairs, one column per group, in the order they stand in the
file), picks one procedure for all or each outcome's own suggestion, and runs
``engine.outcomes.analyze_outcomes`` in a worker with progress and Stop. The table fills as the
outcomes finish; the adjusted p-values and the verdicts follow when all are done. The verdicts
follow Holm's or Benjamini and Hochberg's adjustment, as the user chooses, without running
anything again (``OutcomesAnalysis.with_adjustment``). Beside it, a plot of every outcome's
standardised effect (Hedges' g, or d of the differences for pairs) with its interval. Clicking a
row opens that outcome's whole findings in the findings panel.

The whole report (``engine.report.outcomes_report``) saves as a web page or plain text. The
analysis on show saves as a ``.twofold`` file (``engine.saved.save``); a saved one, run again
by the window (``engine.saved.reopen``), comes back through :meth:`OutcomesPanel.show_saved` with
its outcomes ticked, its adjustment and procedure chosen and its table filled.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path
from typing import Any, Callable, Sequence

from PySide6.QtCore import QObject, Qt, Signal
from PySide6.QtWidgets import (QAbstractItemView, QButtonGroup, QComboBox, QDialog, QFileDialog,
                               QHBoxLayout, QHeaderView, QListWidget, QListWidgetItem, QProgressBar,
                               QPushButton, QRadioButton, QScrollArea, QSplitter, QTableWidget,
                               QTableWidgetItem, QVBoxLayout, QWidget)

from engine.errors import FileProblem, TwofoldError
from engine.multiplicity import ADJUSTMENT_NAMES, ADJUSTMENTS
from engine.report import outcomes_report, tables
from engine.report.numbers import format_interval
from engine.results import Interval
from engine.rounding import format_number, format_p, level_text
from engine.session import Session
from engine.text import visible

from . import clipboard
from .findings_panel import FindingsPanel
from .messages import message_text
from .panel_parts import heading, text_label
from .plain_text import plain_label
from .plots import IntervalPlot, plot_image, save_plot
from .workers import Worker

__all__ = ["OutcomesPanel", "candidate_columns", "table_blocks", "VERDICT_WORDS"]

SUGGESTED = "each outcome's own suggestion"
VERDICT_WORDS = {True: "yes", False: "no", None: "no p-value"}
ADJUSTMENT_WHY = {
    "holm": "Holm: the chance of even one false finding among all the outcomes stays within the "
            "level. Choose it when each finding will be acted on.",
    "bh": "Benjamini-Hochberg: the expected share of false findings among those reported stays within "
          "the level. Choose it to screen many outcomes for the ones worth a closer look; it finds more.",
}
TABLE_FILTER = "Web page (*.html);;Plain text (*.txt)"
SAVED_SUFFIX = ".twofold"  # engine.saved.EXTENSION (checked by a test)
ANALYSIS_FILTER = f"Saved analysis (*{SAVED_SUFFIX})"


def candidate_columns(table, spec) -> list[str]:
    """The columns that can hold measurements, in the file's order (the group column left out)."""
    return [c for c in table.frame.columns
            if table.column_kinds.get(c) in ("number", "mixed") and c != spec.group_column]


HEADING_TIPS = {
    4: "The range of differences these data are consistent with, for this measurement on its own.",
    5: "The intervals at Bonferroni's level: all of them together cover the true differences at the "
       "chosen confidence level.",
    6: "The p-value of this measurement on its own, before any adjustment.",
    7: "Holm's adjusted p-value (family-wise error).",
    8: "Benjamini and Hochberg's adjusted p-value (false discovery rate).",
    10: "yes: the adjusted p-value the verdicts follow is below 1 minus the confidence level.",
}


# What a "yes" of the verdict column means, by the kind of question.
VERDICT_HEADINGS = {"equivalent": "Equivalent", "not_worse": "Not worse"}


def _headings(found_level: float, together: float | None, adjustment: str, kind: str = "differ") -> list[str]:
    verdict = VERDICT_HEADINGS.get(kind, "Difference found")
    return ["Outcome", "n per group", "Procedure", "Estimate", f"{level_text(found_level)} interval",
            f"Together ({level_text(together)})" if together else "Together", "p-value", "Holm",
            "Benjamini-Hochberg", "Standardised effect", f"{verdict} ({'Holm' if adjustment == 'holm' else 'B-H'})"]


def _cells(done, *, p_holm=None, p_bh=None, finding: Any = "") -> list[str]:
    """The cells of one outcome's row (the adjusted p-values and the verdict once all are done)."""
    result, analysis = done.result, done.analysis
    n = "" if analysis is None else " and ".join(str(k) for k in analysis.groups.n)
    if result is None:
        return [done.outcome.name, n, "not analysed", "", "", "", "", "", "", "", done.problem or ""]
    effect = done.effect
    effect_text = "" if effect is None else (
        f"{effect.name} {format_number(effect.value)}"
        + (f" ({format_interval(effect.interval)})" if effect.interval is not None else ""))
    adjusted = [format_p(p) if p is not None else ("" if finding == "" else "none") for p in (p_holm, p_bh)]
    return [done.outcome.name, n, result.name, format_number(result.estimate),
            format_interval(result.interval) or "none",
            format_interval(done.simultaneous.interval) if done.simultaneous is not None
            and done.simultaneous.interval is not None else "none",
            format_p(result.p_value) if result.p_value is not None else "none",
            *adjusted, effect_text, "" if finding == "" else VERDICT_WORDS[finding]]


def table_blocks(found) -> list[tuple]:
    """The whole table and why one would choose each adjustment, as report blocks (for copy and
    save)."""
    body = [_cells(done, p_holm=row.p_holm, p_bh=row.p_bh, finding=row.finding)
            for done, row in zip(found.outcomes, found.rows)]
    kind = found.spec.question.kind
    return [("grid", _headings(found.level, found.simultaneous_level, found.adjustment, kind), body, 3, True, 7),
            ("list", [finding.text for finding in found.findings])]


@dataclass(frozen=True)
class _EffectRow:
    """One outcome's standardised effect as the interval plot draws a row."""

    key: str
    name: str
    estimate: float
    interval: Interval | None
    finds_difference: bool


class _Relay(QObject):
    """Carries each finished outcome from the worker's thread to the GUI thread."""

    outcome = Signal(int, object)


class OutcomesPanel(QDialog):
    """Several measurement columns of the session's file compared at once.

    Parameters
    ----------
    session : engine.session.Session
        Read for the table and the spec (layout, group column, groups, question, resamples,
        seed); never written.
    """

    def __init__(self, session: Session, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setWindowTitle("Compare several measurement columns")
        self.session = session
        self.table_data = session.table
        self.spec = session.spec
        self.found: Any = None
        self.outcomes_done: list = []
        self.reopened: Any = None  # the engine.saved.Reopened of the analysis on show, if it was reopened
        self.saved_path: Path | None = None  # where the analysis was last saved
        # a reopened analysis's outcomes (their names and order) and the ticks that stand for them
        self._kept: tuple[tuple, list[str]] | None = None
        self._run = 0
        self._windows: list[QDialog] = []
        self.worker = Worker(self)
        self.worker.finished.connect(self._on_finished)
        self.worker.failed.connect(lambda message, expected: self._say(message))
        self.worker.stopped.connect(self._on_stopped)
        self.worker.progress.connect(self._on_progress)
        self.worker.busy_changed.connect(self._on_busy)
        self._relay = _Relay(self)
        self._relay.outcome.connect(self._on_outcome)
        self._build()

    # -- building ------------------------------------------------------------------------------
    def _build(self) -> None:
        layout = QVBoxLayout(self)
        wide = self.spec.layout == "wide"
        layout.addWidget(text_label(
            "Tick the columns to compare. Each pair of ticked columns is one measurement, the first "
            "of a pair for group 1 and the second for group 2, in the order they stand in the file."
            if wide else
            "Tick the measurement columns to compare. The same two groups are compared on each, and "
            "the p-values are adjusted for testing them all."))
        top = QHBoxLayout()
        self.columns = QListWidget()
        self.columns.setMaximumHeight(150)
        ticked = set(self.spec.value_columns)
        for column in candidate_columns(self.table_data, self.spec):
            item = QListWidgetItem(visible(column))
            item.setData(Qt.ItemDataRole.UserRole, column)
            item.setFlags(item.flags() | Qt.ItemFlag.ItemIsUserCheckable)
            item.setCheckState(Qt.CheckState.Checked if column in ticked else Qt.CheckState.Unchecked)
            self.columns.addItem(item)
        self.columns.itemChanged.connect(lambda _item: self._show_pairs())
        top.addWidget(self.columns, 1)
        choices = QVBoxLayout()
        choices.addWidget(plain_label("Procedure read for every outcome"))
        self.procedure = QComboBox()
        self.procedure.addItem(SUGGESTED, None)
        from engine.procedures import registry

        for record in registry.applicable(self.spec):
            self.procedure.addItem(record.name, record.key)
        self.procedure.setToolTip("Follow each outcome's own suggestion, or read the same procedure "
                                  "for all of them so that they are measured alike.")
        choices.addWidget(self.procedure)
        choices.addWidget(plain_label("The verdicts follow"))
        self.adjustment = QButtonGroup(self)
        for method in ADJUSTMENTS:
            button = QRadioButton(ADJUSTMENT_NAMES[method])
            button.setToolTip(ADJUSTMENT_WHY[method])
            button.setChecked(method == "holm")
            self.adjustment.addButton(button)
            button.setProperty("method", method)
            choices.addWidget(button)
        self.adjustment.buttonToggled.connect(lambda button, on: on and self.set_adjustment(button.property("method")))
        self.why = text_label(" ".join(ADJUSTMENT_WHY.values()))
        choices.addWidget(self.why)
        top.addLayout(choices, 2)
        layout.addLayout(top)
        self.pairs = text_label()
        self.pairs.setVisible(wide)
        layout.addWidget(self.pairs)

        runs = QHBoxLayout()
        self.run_button = QPushButton("Compare")
        self.run_button.setDefault(True)
        self.run_button.clicked.connect(self.run)
        self.stop_button = QPushButton("Stop")
        self.stop_button.setEnabled(False)
        self.stop_button.clicked.connect(self.cancel)
        self.progress = QProgressBar()
        self.progress.setRange(0, 1000)
        self.progress.setTextVisible(False)
        self.status = plain_label()
        for widget in (self.run_button, self.stop_button, self.progress):
            runs.addWidget(widget)
        runs.addWidget(self.status, 1)
        layout.addLayout(runs)
        self.problem = plain_label()
        self.problem.setStyleSheet("color: #b3261e;")
        self.problem.setVisible(False)
        layout.addWidget(self.problem)
        self.check = text_label()  # what the check of a reopened file found
        self.check.setVisible(False)
        layout.addWidget(self.check)

        self.direction = text_label()
        layout.addWidget(self.direction)
        split = QSplitter(Qt.Orientation.Vertical)
        self.grid = QTableWidget(0, len(_headings(0.95, None, "holm")))
        self._set_headings(_headings(self.spec.question.level, None, "holm", self.spec.question.kind))
        self.grid.verticalHeader().setVisible(False)
        self.grid.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.grid.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.grid.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        self.grid.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
        self.grid.setToolTip("Click a row to see that measurement's whole findings.")
        self.grid.cellClicked.connect(lambda row, _column: self.open_findings(row))
        split.addWidget(self.grid)
        lower = QWidget()
        below = QVBoxLayout(lower)
        below.setContentsMargins(0, 0, 0, 0)
        below.addWidget(heading("Standardised effect of every measurement"))
        self.plot = IntervalPlot()
        self.plot.setToolTip("Each line is one measurement's standardised effect with its interval; "
                             "the dashed line is no difference. The selected row is highlighted.")
        scroll = QScrollArea()
        scroll.setWidgetResizable(True)
        scroll.setWidget(self.plot)
        below.addWidget(scroll, 1)
        self.notes = text_label()
        below.addWidget(self.notes)
        split.addWidget(lower)
        layout.addWidget(split, 1)

        buttons = QHBoxLayout()
        self.copy_button = QPushButton("Copy the table")
        self.copy_button.setToolTip("Put the table on the clipboard as a table and as plain text.")
        self.copy_button.clicked.connect(self.copy_table)
        self.save_button = QPushButton("Save the table...")
        self.save_button.clicked.connect(self.ask_save_table)
        self.copy_plot_button = QPushButton("Copy the plot")
        self.copy_plot_button.clicked.connect(lambda: clipboard.copy_image(plot_image(self.plot)))
        self.save_plot_button = QPushButton("Save the plot...")
        self.save_plot_button.clicked.connect(self.ask_save_plot)
        self.save_analysis_button = QPushButton("Save the analysis...")
        self.save_analysis_button.setToolTip(
            "Keep this comparison of several measurements as a .twofold file: the columns, the choices, "
            "the seed and every number, so that it can be opened again and checked.")
        self.save_analysis_button.clicked.connect(lambda: self.save_analysis())
        self.report_button = QPushButton("Save a report...")
        self.report_button.setToolTip(
            "Write the whole report as a web page or plain text: the table, which adjustment the verdicts "
            "follow and why, each measurement's suggestion and checks in short, and the cautions.")
        self.report_button.clicked.connect(lambda: self.save_report())
        for button in (self.copy_button, self.save_button, self.copy_plot_button, self.save_plot_button,
                       self.report_button, self.save_analysis_button):
            button.setEnabled(False)
            buttons.addWidget(button)
        buttons.addStretch(1)
        layout.addLayout(buttons)
        self.resize(1200, 820)
        self._show_pairs()

    # -- the outcomes asked for ----------------------------------------------------------------
    def ticked(self) -> list[str]:
        """The ticked columns, in the file's order."""
        return [self.columns.item(i).data(Qt.ItemDataRole.UserRole) for i in range(self.columns.count())
                if self.columns.item(i).checkState() == Qt.CheckState.Checked]

    def tick(self, columns: Sequence[str]) -> None:
        """Tick exactly ``columns``."""
        for i in range(self.columns.count()):
            item = self.columns.item(i)
            item.setCheckState(Qt.CheckState.Checked if item.data(Qt.ItemDataRole.UserRole) in columns
                               else Qt.CheckState.Unchecked)

    def outcomes(self) -> tuple:
        """The outcomes the ticks describe (raises an engine error naming what is wrong); while the
        ticks are those of a reopened analysis, its outcomes as saved."""
        from engine.errors import OptionProblem
        from engine.outcomes import long_outcomes, wide_outcomes

        columns = self.ticked()
        if self._kept is not None and self._kept[1] == columns:  # as reopened: its names and order stand
            return self._kept[0]
        if self.spec.layout != "wide":
            if len(columns) < 2:
                raise OptionProblem("Tick at least two measurement columns.")
            return long_outcomes(columns)
        if len(columns) < 2 or len(columns) % 2:
            raise OptionProblem("Tick the columns in pairs, one column per group: an even number, at least two.")
        return wide_outcomes(list(zip(columns[::2], columns[1::2])))

    def _show_pairs(self) -> None:
        if self.spec.layout == "wide":
            columns = self.ticked()
            pairs = [f"{a} with {b}" for a, b in zip(columns[::2], columns[1::2])]
            self.pairs.setText("Pairs: " + ("; ".join(pairs) if pairs else "none yet")
                               + ("; one column left without a partner" if len(columns) % 2 else "") + ".")

    def _say(self, problem: str) -> None:
        self.problem.setText(problem)
        self.problem.setVisible(bool(problem))

    # -- running -------------------------------------------------------------------------------
    def run(self) -> bool:
        """Compare the ticked outcomes in a worker; what is wrong with the choice is said in one line."""
        try:
            outcomes = self.outcomes()
        except TwofoldError as problem:
            self._say(problem.message)
            return False
        self._say("")
        self._said_check(None, None)
        self._run += 1
        run, relay = self._run, self._relay
        table, spec = self.table_data, self.spec
        procedure, adjustment = self.procedure.currentData(), self.adjustment_method()
        self.found, self.outcomes_done = None, []
        self.grid.setRowCount(len(outcomes))
        self._set_headings(_headings(spec.question.level, None, adjustment, spec.question.kind))
        for row, outcome in enumerate(outcomes):
            self._fill_row(row, [outcome.name, "", "waiting", *[""] * 8])
        self.plot.show_rows([])
        self.notes.setText("")

        def compare(progress: Any, cancelled: Any) -> Any:
            from engine.outcomes import analyze_outcomes

            return analyze_outcomes(table, spec, outcomes, procedure=procedure, adjustment=adjustment,
                                    on_outcome=lambda done: relay.outcome.emit(run, done),
                                    progress=progress, cancelled=cancelled)

        self.worker.run(compare)
        return True

    def cancel(self) -> None:
        self.worker.cancel()

    def adjustment_method(self) -> str:
        checked = self.adjustment.checkedButton()
        return checked.property("method") if checked is not None else "holm"

    def set_adjustment(self, method: str) -> None:
        """Let the verdicts follow ``method`` ("holm" or "bh"); nothing is run again."""
        for button in self.adjustment.buttons():
            if button.property("method") == method and not button.isChecked():
                button.setChecked(True)  # comes back here through the button group
                return
        if self.found is not None and self.found.adjustment != method:
            self.found = self.found.with_adjustment(method)
            self._show_found()

    def _on_outcome(self, run: int, done: Any) -> None:
        if run != self._run or not self.worker.busy:
            return  # an outcome of a run replaced or stopped
        self.outcomes_done.append(done)
        self._fill_row(done.index, _cells(done))
        self._say_direction()
        self._show_plot()

    def _on_progress(self, fraction: float, what: str) -> None:
        self.progress.setValue(int(fraction * 1000))
        self.status.setText(f"Comparing {what}…")

    def _on_busy(self, busy: bool) -> None:
        self.run_button.setEnabled(not busy)
        self.stop_button.setEnabled(busy)
        if not busy:
            self.progress.setValue(0)

    def _on_stopped(self) -> None:
        self.status.setText(f"Stopped after {len(self.outcomes_done)} of {self.grid.rowCount()} measurements; "
                            "the adjusted p-values need them all.")
        self._enable(bool(self.outcomes_done), table=False)

    def _on_finished(self, found: Any) -> None:
        self.found = found
        self.status.setText(f"{len(found.outcomes)} measurements compared.")
        self._show_found()

    def _show_found(self) -> None:
        found = self.found
        self.outcomes_done = list(found.outcomes)
        self._set_headings(_headings(found.level, found.simultaneous_level, found.adjustment,
                                     found.spec.question.kind))
        blocks = table_blocks(found)
        for row, cells in enumerate(blocks[0][2]):
            self._fill_row(row, cells)
        self.notes.setText("\n".join(blocks[1][1]))
        self._show_plot()
        self._enable(True, table=True)

    def _enable(self, plot: bool, *, table: bool) -> None:
        for button in (self.copy_button, self.save_button, self.report_button, self.save_analysis_button):
            button.setEnabled(table)
        for button in (self.copy_plot_button, self.save_plot_button):
            button.setEnabled(plot)

    def _set_headings(self, headings: Sequence[str]) -> None:
        self.grid.setHorizontalHeaderLabels(list(headings))
        for column, tip in HEADING_TIPS.items():
            self.grid.horizontalHeaderItem(column).setToolTip(tip)

    def _fill_row(self, row: int, cells: Sequence[str]) -> None:
        done = next((d for d in self.outcomes_done if d.index == row), None)
        named = None if done is None or done.result is None else done.result.estimate_name
        for column, text in enumerate(cells):
            item = QTableWidgetItem(visible(text))
            if column == 3 and named:
                item.setToolTip(named)
            if 3 <= column <= 9:
                item.setTextAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
            self.grid.setItem(row, column, item)

    def effect_rows(self) -> list[_EffectRow]:
        """The plot's rows: each outcome done with a standardised effect, in the table's order."""
        rows = []
        for done in sorted(self.outcomes_done, key=lambda d: d.index):
            effect = done.effect
            if effect is None:
                continue
            interval = effect.interval
            rows.append(_EffectRow(str(done.index), done.outcome.name, effect.value, interval,
                                   interval is not None and interval.low is not None and interval.high is not None
                                   and not interval.low <= 0 <= interval.high))
        return rows

    def _groups(self) -> tuple[str, str] | None:
        return next((tuple(d.prepared.spec.groups) for d in self.outcomes_done
                     if d.prepared is not None and d.prepared.spec.groups), None)

    def _say_direction(self) -> None:
        groups = self._groups()
        self.direction.setText("" if groups is None else
                               f"Each estimate is {groups[0]} minus {groups[1]}; click a row for that "
                               "measurement's whole findings.")

    def _show_plot(self) -> None:
        selected = self.grid.currentRow()
        named = next((d.effect.name for d in self.outcomes_done if d.effect is not None), "standardised effect")
        groups = self._groups()
        self.plot.show_rows(self.effect_rows(), picked=str(selected) if selected >= 0 else None,
                            axis_label=f"{named}, {groups[0]} minus {groups[1]}" if groups else named)

    # -- a saved analysis ----------------------------------------------------------------------
    def show_saved(self, found, *, said: str | None = None, reopened: Any = None) -> None:
        """Show ``found`` (an ``OutcomesAnalysis`` run again from a saved file): its outcomes'
        columns ticked, its procedure and adjustment chosen, its table, plot and notes filled;
        ``said`` (what the check of the saved numbers found) stands in a line of its own and
        ``reopened`` (the ``engine.saved.Reopened``) goes into the report."""
        self.worker.cancel()
        self._run += 1  # an outcome still on its way from an earlier run is not shown
        self.tick([column for done in found.outcomes for column in done.outcome.columns])
        self._kept = (tuple(done.outcome for done in found.outcomes), self.ticked())
        at = self.procedure.findData(found.procedure)
        self.procedure.setCurrentIndex(at if at >= 0 else 0)
        self.found = None  # the switch below must not recompute what the file holds
        self.set_adjustment(found.adjustment)
        self.found = found
        self.grid.setRowCount(len(found.outcomes))
        self._say("")
        self._said_check(said, reopened)
        self._show_found()
        self._say_direction()
        self.status.setText(f"{len(found.outcomes)} measurements compared again.")

    def _said_check(self, said: str | None, reopened: Any) -> None:
        """Show what the check of a reopened file found (None: a table of this panel's own run)."""
        self.reopened = reopened
        self.check.setText(said or "")
        self.check.setVisible(bool(said))

    def write_analysis(self, path: str | Path) -> Path:
        """Write the analysis on show to ``path`` as a ``.twofold`` file, the suffix added when
        left out (so the data file is never written over); returns the file written."""
        from engine import saved as saved_files

        path = saved_files.with_extension(path)
        try:
            saved_files.save(path, self.found)
        except (TwofoldError, OSError) as problem:
            reason = getattr(problem, "message", None) or getattr(problem, "strerror", None) or problem
            raise FileProblem(message_text("save_failed", name=path.name, reason=reason)) from None
        self.saved_path = path
        return path

    def save_analysis(self, path: str | Path | None = None) -> bool:
        """Save the analysis on show as a ``.twofold`` file (asks for the path when none is given);
        a failure is said under the controls."""
        if self.found is None:
            return False
        data = Path(self.spec.source.path) if self.spec.source is not None else None
        start = "" if data is None else str(data.with_name(f"{data.stem} measurements{SAVED_SUFFIX}"))
        return self._ask_and_save("Save the analysis", start, ANALYSIS_FILTER, self.write_analysis, path)

    # -- one outcome's findings ----------------------------------------------------------------
    def open_findings(self, row: int) -> QDialog | None:
        """Open the whole findings of the outcome in ``row`` (None while it is not done)."""
        done = next((d for d in self.outcomes_done if d.index == row), None)
        self._show_plot()
        if done is None or done.prepared is None:
            return None
        prepared = done.prepared
        session = Session(prepared.spec.replace(procedure=done.key))
        for name in ("table", "intake", "analysis"):
            session.store(name, getattr(prepared, name))
        shown = QDialog(self)
        shown.setWindowTitle(f"{visible(done.outcome.name)}: findings")
        shown.setAttribute(Qt.WidgetAttribute.WA_DeleteOnClose)
        box = QVBoxLayout(shown)
        standing = self._standing(done)
        if standing:
            box.addWidget(text_label(standing))
        panel = FindingsPanel(session, parent=shown)
        box.addWidget(panel)
        shown.finished.connect(lambda _code: panel.cleanup())
        shown.resize(760, 820)
        shown.show()
        return shown

    def _standing(self, done) -> str:
        """Where this measurement stands among all of them (its findings read it on its own)."""
        found = self.found
        if found is None or done.result is None:
            return ""
        row = found.rows[done.index]
        p = found.adjusted()[done.index]
        if p is None:
            return ""
        name = "Holm's" if found.adjustment == "holm" else "Benjamini and Hochberg's"
        counted = "counts" if row.finding else "does not count"
        return (f"These findings read {done.outcome.name} on its own. Among the {len(found.outcomes)} "
                f"measurements compared, {name} adjusted p-value is {format_p(p)}, so it {counted} as a "
                f"finding at {level_text(found.level)}.")

    # -- into a document -----------------------------------------------------------------------
    def copy_table(self) -> None:
        """Put the table and why one would choose each adjustment on the clipboard."""
        if self.found is None:
            return
        blocks = table_blocks(self.found)
        clipboard.copy_findings_text(tables.html(blocks), tables.plain(blocks))

    def _write_page(self, path: str | Path, what: str, page: Callable[[], str], text: Callable[[], str]) -> Path:
        """Write ``page()`` to ``path`` ending in .html (or .htm), ``text()`` to one ending in .txt."""
        path = Path(path)
        if self.found is None:
            raise FileProblem(f"There is no {what} to save yet.")
        suffix = path.suffix.lower()
        if suffix not in (".html", ".htm", ".txt"):
            raise FileProblem(f"A {what} is saved as .html or .txt, not '{path.suffix}' ({path.name}).")
        try:
            path.write_text(text() if suffix == ".txt" else page(), encoding="utf-8")
        except OSError as error:
            raise FileProblem(f"Could not save the {what} to {path}: {error.strerror or error}.") from None
        return path

    def save_table(self, path: str | Path) -> Path:
        """Write the table as a web page (.html) or plain text (.txt)."""
        blocks = table_blocks(self.found) if self.found is not None else []
        return self._write_page(path, "table", lambda: clipboard.html_document(
            tables.html(blocks), title="Several measurements compared"), lambda: tables.plain(blocks))

    def write_report(self, path: str | Path) -> Path:
        """Write the whole report of the analysis on show (``engine.report.outcomes_report``, with
        the check of a reopened file first) as a web page (.html) or plain text (.txt)."""
        return self._write_page(path, "report", lambda: outcomes_report.html(self.found, reopened=self.reopened),
                                lambda: outcomes_report.plain(self.found, reopened=self.reopened))

    def _ask_and_save(self, title: str, start: str, name_filter: str, save, path: str | Path | None = None) -> bool:
        """Write with ``save(path)`` (it returns the file written), asking for the path when none
        is given; the outcome is said under the controls."""
        if path is None:
            path, _ = QFileDialog.getSaveFileName(self, title, start, name_filter)
            if not path:
                return False
        try:
            written = Path(save(path))
        except (FileProblem, OSError, ValueError) as problem:
            self._say(getattr(problem, "message", str(problem)))
            return False
        self._say("")
        self.status.setText(message_text("saved", name=written.name, folder=written.resolve().parent))
        return True

    def save_report(self, path: str | Path | None = None) -> bool:
        """Save the whole report (asks for the path when none is given); the outcome is said
        under the controls."""
        data = Path(self.spec.source.path) if self.spec.source is not None else None
        start = "measurements report.html" if data is None else str(data.with_name(f"{data.stem} report.html"))
        return self._ask_and_save("Save a report", start, TABLE_FILTER, self.write_report, path)

    def ask_save_table(self) -> None:
        self._ask_and_save("Save the table", "measurements.html", TABLE_FILTER, self.save_table)

    def ask_save_plot(self) -> None:
        self._ask_and_save("Save the plot", "effects.png", "Picture (*.png);;Drawing (*.svg)",
                           lambda path: save_plot(self.plot, path))

    def closeEvent(self, event) -> None:  # noqa: N802 - Qt's name
        self.worker.shutdown()
        super().closeEvent(event)


if __name__ == "__main__":  # pragma: no cover - a look by hand
    import sys

    from PySide6.QtWidgets import QApplication

    from .panel_alone import DEFAULT_FILE, prepared_session

    app = QApplication.instance() or QApplication(sys.argv[:1])
    panel = OutcomesPanel(prepared_session(Path(sys.argv[1]) if len(sys.argv) > 1 else DEFAULT_FILE))
    panel.show()
    sys.exit(app.exec())
