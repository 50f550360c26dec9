"""Planning the next study: how many to measure, the power of given sizes, or the smallest
difference they can find, with a power curve.

The inputs are filled in from the current comparison (its SDs, sizes, level, question and
design), or from a comparison of summary statistics (:meth:`PlanPanel.fill_from_summaries`: its
SDs, sizes and difference, with no values to resample), and can be changed freely; "from these
data" resamples the comparison's own groups (:func:`engine.plan_member.analysis_pilot`). Every
number comes from :func:`engine.planning.plan_study` and :func:`engine.planning.power_curve`,
run in a worker with a progress bar and a Stop button whenever an input changes; a refused input
is said in one line under the inputs. Copy puts the inputs, the sentence and the curve (as a table
and as a picture) on the clipboard.

Run on its own for a quick look: ``python -m desktop.plan_panel demo_files/bolt_strength.csv``.
"""

from __future__ import annotations

import math
from pathlib import Path
from typing import Any

from PySide6.QtCore import Qt, QTimer
from PySide6.QtGui import QPen
from PySide6.QtWidgets import (QComboBox, QFileDialog, QFormLayout, QHBoxLayout, QLineEdit, QProgressBar,
                               QPushButton, QSpinBox, QWidget)

from engine.errors import FileProblem, OptionProblem, TwofoldError
from engine.plan_member import analysis_pilot, plan_of
from engine.plan_words import DESIGN_WORDS, FIND_WORDS, QUESTION_WORDS, SHAPE_NAMES, answer_lines, curve_heading, \
    plan_html, plan_plain
from engine.planning import Plan, PlanResult, PowerCurve, SummaryPilot, plan_study, power_curve, towards
from engine.question import Margin, Question
from engine.rounding import format_number
from engine.text import visible

from . import clipboard
from .messages import message_text
from .panel_parts import FlowLayout, heading, hint_and_body, text_label
from .plots import ThemedPlot, plot_image, save_plot_file
from .workers import Worker

__all__ = ["PlanPanel", "PowerCurvePlot", "procedure_of", "CURVE_SIMULATIONS", "SIMULATED_POINTS"]

# A simulated plan's curve: this many points, each from at most this many simulated studies
# (the plan's own answer uses all of its simulations).
SIMULATED_POINTS = 12
CURVE_SIMULATIONS = 1000
CHANGE_DELAY_MS = 300  # a burst of typing works the plan out once

_PROCEDURE_WORDS = {"welch": "Welch t-test (SDs may differ)", "pooled": "pooled t-test (same SD in both)",
                    "mann_whitney": "rank-based (Mann-Whitney; pairs: signed-rank)",
                    "z": "z-test (SDs known beforehand)"}
_SPREAD_WORDS = {"given": "the SDs given here", "pilot": "these data, resampled"}
_WORSE_WORDS = {"lower": "lower values are worse", "higher": "higher values are worse"}
_CURVE_WORDS = {"n": "the size", "difference": "the difference"}
_HINT = ("Plan the next study here: how many to measure, the power of given sizes, or the smallest "
         "difference they can find.")


def procedure_of(key: str | None) -> str:
    """The planned test that fits a procedure of the analysis (by its registry key)."""
    key = key or ""
    if "pooled" in key:
        return "pooled"
    if key == "z":
        return "z"
    if key in ("mann_whitney", "brunner_munzel", "signed_rank") or key.endswith("_ranks"):
        return "mann_whitney"
    return "welch"


def _combo(choices: dict[str, str]) -> QComboBox:
    box = QComboBox()
    for value, words in choices.items():
        box.addItem(words[:1].upper() + words[1:], value)
    return box


def _number(text: str, what: str) -> float | None:
    text = text.strip().replace("\u2212", "-")
    if not text:
        return None
    try:
        value = float(text)
    except ValueError:
        raise OptionProblem(f"The {what} must be a number, not '{text}'.") from None
    if not math.isfinite(value):
        raise OptionProblem(f"The {what} must be a finite number, not '{text}'.")
    return value


def _whole(text: str, what: str) -> int | None:
    value = _number(text, what)
    if value is None:
        return None
    if value != int(value):
        raise OptionProblem(f"The {what} must be a whole number, not '{text.strip()}'.")
    return int(value)


def _shown(value: float | None, digits: int = 4) -> str:
    """A number for an input box: ``digits`` significant digits, no padding zeros."""
    return "" if value is None else f"{float(value):.{digits}g}"


class PowerCurvePlot(ThemedPlot):
    """Power along the size per group or the true difference; the plan's answer is marked, and a
    faint line shows the power wanted."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._curve: PowerCurve | None = None
        self._answer: tuple[float, float] | None = None
        self._wanted: float | None = None
        self._line = self.plot([], [])
        self._points = self.plot([], [], pen=None, symbol="o", symbolSize=5)
        self._mark = self.plot([], [], pen=None, symbol="o", symbolSize=11)
        self._target = self.plot([], [])
        self.setMinimumSize(320, 230)
        self.getPlotItem().setYRange(0, 1, padding=0.02)

    def show_curve(self, curve: PowerCurve | None, answer: tuple[float, float] | None = None,
                   wanted: float | None = None) -> None:
        self._curve, self._answer, self._wanted = curve, answer, wanted
        self.redraw()

    def redraw(self) -> None:
        colours = self.colours
        curve = self._curve
        if curve is None:
            for item in (self._line, self._points, self._mark, self._target):
                item.setData([], [])
            return
        ink = QPen(colours.groups[0])
        ink.setWidthF(2.0)
        ink.setCosmetic(True)
        self._line.setData(curve.x, curve.power, pen=ink)
        simulated = curve.monte_carlo_se is not None
        self._points.setData(curve.x if simulated else [], curve.power if simulated else [],
                             symbolBrush=colours.groups[0], symbolPen=None)
        if self._answer is not None:
            self._mark.setData([self._answer[0]], [self._answer[1]], symbolBrush=colours.picked,
                               symbolPen=None)
        else:
            self._mark.setData([], [])
        if self._wanted is not None:
            faint = QPen(colours.faint)
            faint.setStyle(Qt.PenStyle.DashLine)
            faint.setCosmetic(True)
            self._target.setData([float(curve.x[0]), float(curve.x[-1])], [self._wanted] * 2, pen=faint)
        else:
            self._target.setData([], [])
        self.getPlotItem().setYRange(0, 1, padding=0.02)
        self.getPlotItem().setXRange(float(curve.x[0]), float(curve.x[-1]), padding=0.02)
        self.set_axis_labels(curve_heading(curve), "power")

    def points(self) -> tuple[list[float], list[float]]:
        """The curve as drawn (x, power)."""
        x, y = self._line.getData()
        return ([] if x is None else list(x)), ([] if y is None else list(y))


class PlanPanel(QWidget):
    """The plan of the next study over a :class:`engine.session.Session` (read, never written).

    ``result`` and ``curve`` hold the last plan worked out (None before one or after a refused
    input); ``worker`` runs the working out.
    """

    def __init__(self, session, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.session = session
        self.result: PlanResult | None = None
        self.curve: PowerCurve | None = None
        self.worker = Worker(self)
        self._filling = False
        self._touched = False
        self._filled_difference: str | None = None
        self._filled_from: Any = None  # the groups the inputs were last filled in from
        self._summaries: SummaryPilot | None = None  # the summary statistics they came from, if so
        self._summary_analysis: Any = None  # the comparison of summaries last filled in from
        self._saved_answer: dict | None = None
        self._soon = QTimer(self)
        self._soon.setSingleShot(True)
        self._soon.setInterval(CHANGE_DELAY_MS)
        self._soon.timeout.connect(self.work_out)
        self._build()
        self.worker.finished.connect(self._on_done)
        self.worker.failed.connect(self._on_failed)
        self.worker.stopped.connect(self._on_stopped)
        self.worker.progress.connect(self._on_progress)
        self.worker.busy_changed.connect(self._on_busy)
        session.subscribe(self._on_session)
        self._on_busy(False)
        self._show_rows()
        if session.analysis is not None:
            self.fill_from_analysis()
        else:
            self._soon.start()

    # -- building ------------------------------------------------------------------------------
    def _build(self) -> None:
        self.hint, self.scroll, layout = hint_and_body(self, _HINT)
        self.hint.setVisible(False)
        layout.addWidget(heading("What the next study should show"))
        self.groups_line = text_label()
        layout.addWidget(self.groups_line)
        form = self.form = QFormLayout()
        form.setFieldGrowthPolicy(QFormLayout.FieldGrowthPolicy.ExpandingFieldsGrow)
        self.find = _combo(FIND_WORDS)
        self.question = _combo(QUESTION_WORDS)
        self.margin_low, self.margin_high = QLineEdit(), QLineEdit()
        self.margin_size = QLineEdit()
        self.worse = _combo(_WORSE_WORDS)
        self.design = _combo(DESIGN_WORDS)
        self.procedure = _combo(_PROCEDURE_WORDS)
        self.spread = _combo(_SPREAD_WORDS)
        self.shape = _combo(SHAPE_NAMES)
        self.difference, self.sd, self.sd2 = QLineEdit(), QLineEdit(), QLineEdit()
        self.n1, self.n2, self.ratio = QLineEdit(), QLineEdit(), QLineEdit("1")
        self.power, self.level, self.unit = QLineEdit("0.8"), QLineEdit("0.05"), QLineEdit()
        self.simulations = QSpinBox()
        self.simulations.setRange(100, 1_000_000)
        self.simulations.setSingleStep(1000)
        self.simulations.setValue(10_000)
        self.simulations.setGroupSeparatorShown(True)
        self.sd2.setPlaceholderText("the same as group 1")
        self.n2.setPlaceholderText("from the ratio")
        self.unit.setPlaceholderText("such as MPa (optional)")
        margins = QWidget()
        row = QHBoxLayout(margins)
        row.setContentsMargins(0, 0, 0, 0)
        for widget in (self.margin_low, self.margin_high):
            row.addWidget(widget)
        worse = QWidget()
        row = QHBoxLayout(worse)
        row.setContentsMargins(0, 0, 0, 0)
        row.addWidget(self.margin_size)
        row.addWidget(self.worse)
        self._rows = {
            "find": ("Work out", self.find, "What the plan works out; the other inputs are given."),
            "question": ("Question", self.question, "What the next study will ask of the two groups."),
            "margins": ("Margin, low and high", margins,
                        "Differences between these two count as the same (group 1 minus group 2)."),
            "worse": ("Margin and direction", worse,
                      "How much worse group 1 may be and still count as no worse, and which way is worse."),
            "design": ("Design", self.design, "Two separate groups, or the same units measured twice."),
            "procedure": ("Test", self.procedure, "The test the next study will use."),
            "spread": ("Spread from", self.spread,
                       "Give the SDs, or resample the groups of the current comparison (keeping "
                       "their real shape) and shift group 1 by the difference."),
            "shape": ("Shape of the values", self.shape,
                      "How the values spread around their mean; other than bell-shaped, the power "
                      "is found by simulation."),
            "difference": ("True difference", self.difference,
                           "The difference of means that matters, group 1 minus group 2 (for a "
                           "margin question: the one expected, 0 when left empty)."),
            "sd": ("SD of group 1", self.sd, "The standard deviation expected (pairs: of the pair differences)."),
            "sd2": ("SD of group 2", self.sd2, "Leave empty when it is the same as group 1's."),
            "n1": ("Size of group 1", self.n1, "Units in group 1 (pairs in a paired design)."),
            "n2": ("Size of group 2", self.n2, "Leave empty to take the ratio times group 1's size."),
            "ratio": ("Size ratio, group 2 to group 1", self.ratio,
                      "How many units group 2 gets for each unit of group 1 (1: equal sizes)."),
            "power": ("Power wanted", self.power,
                      "The chance that the study finds the difference if it is real, such as 0.8."),
            "level": ("Chance of a false finding", self.level,
                      "The test's level: how often it may find a difference that is not there, such as 0.05."),
            "unit": ("Unit", self.unit, "The measurement's unit, for the sentence."),
            "simulations": ("Simulated studies", self.simulations,
                            "How many studies a simulation runs; more give a steadier power."),
        }
        for name, (label, widget, tip) in self._rows.items():
            widget.setToolTip(tip)
            form.addRow(label, widget)
        layout.addLayout(form)
        self.problem = text_label()
        self.problem.setObjectName("plan_problem")
        self.problem.setStyleSheet("color: #b03a2e;")
        self.problem.setVisible(False)
        layout.addWidget(self.problem)

        buttons = FlowLayout(spacing=8)
        self.fill_button = QPushButton("Fill in from the comparison")
        self.fill_button.setToolTip("Take the SDs, sizes, level, question and design of the current comparison.")
        self.run_button = QPushButton("Work it out")
        self.run_button.setToolTip("Work the plan out again with the inputs above.")
        self.stop_button = QPushButton("Stop")
        self.stop_button.setToolTip("Stop the working out; what was shown before stays.")
        self.progress = QProgressBar()
        self.progress.setRange(0, 1000)
        self.progress.setTextVisible(False)
        self.progress.setMaximumWidth(200)
        for widget in (self.fill_button, self.run_button, self.stop_button, self.progress):
            buttons.addWidget(widget)
        layout.addLayout(buttons)

        layout.addWidget(heading("The plan"))
        self.sentence = text_label()
        font = self.sentence.font()
        font.setPointSizeF(font.pointSizeF() * 1.1)
        self.sentence.setFont(font)
        layout.addWidget(self.sentence)
        self.figures = text_label()
        layout.addWidget(self.figures)
        self.notes = text_label()
        layout.addWidget(self.notes)

        curve_row = QHBoxLayout()
        curve_row.addWidget(heading("Power against"))
        self.curve_axis = _combo(_CURVE_WORDS)
        self.curve_axis.setToolTip("Draw the power along the size per group or along the true difference.")
        curve_row.addWidget(self.curve_axis)
        curve_row.addStretch(1)
        layout.addLayout(curve_row)
        self.plot = PowerCurvePlot()
        self.plot.setToolTip("The power along the size or the difference, the other inputs fixed; the "
                             "large dot is the plan's answer, the dashed line the power wanted.")
        layout.addWidget(self.plot)
        self.curve_note = text_label()
        layout.addWidget(self.curve_note)
        copies = FlowLayout(spacing=8)
        self.copy_button = QPushButton("Copy the plan")
        self.copy_button.setToolTip("Put the inputs, the sentence and the curve (a table and a picture) "
                                    "on the clipboard, ready to paste into a document.")
        self.copy_plot_button = QPushButton("Copy the curve")
        self.copy_plot_button.setToolTip("Put the power curve on the clipboard as a picture.")
        self.save_plot_button = QPushButton("Save the curve...")
        self.save_plot_button.setToolTip("Save the power curve as a PNG picture or an SVG drawing.")
        for button in (self.copy_button, self.copy_plot_button, self.save_plot_button):
            copies.addWidget(button)
        layout.addLayout(copies)
        self.status = text_label()
        self.status.setVisible(False)
        layout.addWidget(self.status)
        layout.addStretch(1)

        for box in (self.find, self.question, self.worse, self.design, self.procedure, self.spread,
                    self.shape, self.curve_axis):
            box.currentIndexChanged.connect(self._changed)
        self.question.currentIndexChanged.connect(self._question_changed)
        for edit in (self.margin_low, self.margin_high, self.margin_size, self.difference, self.sd,
                     self.sd2, self.n1, self.n2, self.ratio, self.power, self.level, self.unit):
            edit.textChanged.connect(self._changed)
        self.simulations.valueChanged.connect(self._changed)
        self.fill_button.clicked.connect(self._fill_again)
        self.run_button.clicked.connect(self.work_out)
        self.stop_button.clicked.connect(self.stop)
        self.copy_button.clicked.connect(self.copy_plan)
        self.copy_plot_button.clicked.connect(self.copy_plot)
        self.save_plot_button.clicked.connect(self.ask_save_plot)

    # -- which inputs show -----------------------------------------------------------------------
    def _value(self, box: QComboBox) -> str:
        return box.currentData()

    def _set(self, box: QComboBox, value: str) -> None:
        index = box.findData(value)
        if index >= 0:
            box.setCurrentIndex(index)

    def _show_rows(self) -> None:
        find, kind = self._value(self.find), self._value(self.question)
        paired = self._value(self.design) == "paired"
        pilot = self._value(self.spread) == "pilot"
        margin = kind in ("equivalent", "not_worse")
        simulated = pilot or self._value(self.shape) != "normal" or self._value(self.procedure) == "mann_whitney"
        shown = {
            "margins": kind == "equivalent", "worse": kind == "not_worse",
            "difference": find != "difference" or margin,
            "sd": not pilot, "sd2": not pilot and not paired, "shape": not pilot,
            "n1": find != "n", "n2": find != "n" and not paired, "ratio": find == "n" and not paired,
            "power": find != "power", "simulations": simulated,
        }
        for name, (_label, widget, _tip) in self._rows.items():
            self.form.setRowVisible(widget, shown.get(name, True))
        self.form.labelForField(self.sd).setText("SD of the pair differences" if paired else "SD of group 1")
        self.form.labelForField(self.n1).setText("Number of pairs" if paired else "Size of group 1")
        self.form.labelForField(self.difference).setText(
            "Expected true difference" if margin else "Difference that matters")
        summaries = self._summaries
        has_pilot = self.session.analysis is not None and summaries is None
        if summaries is not None:
            self.groups_line.setText(message_text("plan_from_summaries", first=summaries.labels[0],
                                                  second=summaries.labels[1]))
        elif has_pilot:
            labels = self.session.analysis.groups.labels
            self.groups_line.setText(f"Group 1 is {visible(labels[0])} and group 2 is {visible(labels[1])}, "
                                     "as in the comparison; every difference is group 1 minus group 2.")
        self.groups_line.setVisible(has_pilot or summaries is not None)
        model = self.spread.model()
        model.item(self.spread.findData("pilot")).setEnabled(has_pilot)

    # -- reading the inputs ----------------------------------------------------------------------
    def _question(self) -> Question:
        level = _number(self.level.text(), "chance of a false finding")
        if level is None:
            raise OptionProblem("Give the chance of a false finding, such as 0.05.")
        if not 0 < level < 0.5:
            raise OptionProblem(f"The chance of a false finding must lie above 0 and below 0.5, "
                                f"such as 0.05; not {self.level.text().strip()}.")
        kind = self._value(self.question)
        if kind == "equivalent":
            low = _number(self.margin_low.text(), "low end of the margin")
            high = _number(self.margin_high.text(), "high end of the margin")
            if low is None or high is None:
                raise OptionProblem("Give both ends of the margin, such as -2 and 2.")
            return Question(kind, 1 - level, Margin.within(low, high))
        if kind == "not_worse":
            size = _number(self.margin_size.text(), "margin")
            if size is None:
                raise OptionProblem("Give the margin: how much worse group 1 may be.")
            return Question(kind, 1 - level, Margin.not_worse_by(size, self._value(self.worse)))
        return Question(kind, 1 - level)

    def pilot(self):
        """The pilot values of the current comparison (its groups, or pair differences)."""
        analysis = self.session.analysis
        if self._summaries is not None:
            raise OptionProblem(message_text("plan_summaries_no_pilot"))
        if analysis is None:
            raise OptionProblem(message_text("plan_no_pilot"))
        path = self.session.path
        return analysis_pilot(analysis.groups, self._value(self.design), path.name if path else "")

    def plan(self) -> Plan:
        """The :class:`Plan` the inputs describe; raises the engine's error with its sentence."""
        find = self._value(self.find)
        paired = self._value(self.design) == "paired"
        pilot = self.pilot() if self._value(self.spread) == "pilot" else None
        question = self._question()
        wanted = find != "difference" or question.has_margin
        difference = _number(self.difference.text(), "difference") if wanted else None
        if difference is None and find != "difference" and not question.has_margin:
            raise OptionProblem("Give the difference that matters (group 1 minus group 2).")
        sizes = {}
        if find != "n":
            sizes["n1"] = _whole(self.n1.text(), "number of pairs" if paired else "size of group 1")
            if not paired:
                sizes["n2"] = _whole(self.n2.text(), "size of group 2")
        ratio = 1.0 if paired or find != "n" else _number(self.ratio.text(), "ratio of the sizes")
        power = None if find == "power" else _number(self.power.text(), "power wanted")
        return Plan(find, difference=difference,
                    sd=None if pilot else _number(self.sd.text(), "SD"),
                    sd2=None if pilot or paired else _number(self.sd2.text(), "SD of group 2"),
                    ratio=1.0 if ratio is None else ratio, power=power, question=question,
                    design=self._value(self.design), procedure=self._value(self.procedure),
                    shape=self._value(self.shape), simulations=self.simulations.value(),
                    unit=self.unit.text(), pilot=pilot, **sizes)

    # -- filling in ------------------------------------------------------------------------------
    def fill_from_analysis(self, *, from_data: bool | None = None) -> None:
        """Fill the inputs in from the current comparison; ``from_data`` True picks its groups as
        the pilot (False: the SDs; None: leave that choice as it is)."""
        analysis = self.session.analysis
        if analysis is None:
            return
        spec = analysis.spec
        first, second = analysis.summaries
        paired = spec.design == "paired"
        question = spec.question
        self._filling = True
        try:
            self._set(self.design, spec.design)
            self._set(self.procedure, procedure_of(self.session.spec.procedure
                                                   if self.session.spec.procedure in analysis.procedures
                                                   else analysis.recommendation.key))
            if self._value(self.procedure) == "mann_whitney" and question.has_margin:
                self._set(self.procedure, "welch")
            self._fill_question(question, analysis.margin)
            import numpy as np

            x, y = np.asarray(analysis.groups.x, dtype=float), np.asarray(analysis.groups.y, dtype=float)
            if paired:
                self.sd.setText(_shown(float(np.std(x - y, ddof=1))))
                self.sd2.setText("")
                self.difference.setText(_shown(towards(question.kind, float(np.mean(x - y))))
                                        if not question.has_margin else "0")
            else:
                known = spec.statements.known_sd
                sds = known if known is not None and self._value(self.procedure) == "z" else (first.sd, second.sd)
                self.sd.setText(_shown(sds[0]))
                self.sd2.setText("" if _shown(sds[0]) == _shown(sds[1]) or self._value(self.procedure) == "pooled"
                                 else _shown(sds[1]))
                self.difference.setText(_shown(towards(question.kind, first.mean - second.mean))
                                        if not question.has_margin else "0")
            self.n1.setText(str(int(first.n)))
            self.n2.setText("" if paired or first.n == second.n else str(int(second.n)))
            self.ratio.setText(_shown(second.n / first.n) if not paired and first.n else "1")
            if from_data is not None:
                self._set(self.spread, "pilot" if from_data else "given")
        finally:
            self._filling = False
        self._summaries = None
        self._filled(analysis.groups)

    def fill_from_summaries(self, analysis: Any) -> None:
        """Fill the inputs in from a comparison of summary statistics (an
        :class:`engine.summary_analysis.SummaryAnalysis`): its question, level and margin, the SDs
        of the procedure it suggests (the pooled SD for the pooled t-test), the sizes and the
        difference of the means. The tab then says the numbers come from summaries, and resampling
        is not offered: there are no values to resample."""
        summaries = SummaryPilot.of_analysis(analysis)
        question = analysis.spec.question
        self._filling = True
        try:
            self._set(self.design, "independent")
            self._set(self.procedure, procedure_of(analysis.recommendation.key))
            self._fill_question(question, analysis.margin)
            self._set(self.spread, "given")
            self._set(self.shape, "normal")
            sd, sd2 = summaries.sds_for(self._value(self.procedure))
            self.sd.setText(_shown(sd))
            self.sd2.setText("" if sd2 is None or _shown(sd2) == _shown(sd) else _shown(sd2))
            self.difference.setText(_shown(summaries.expected_difference(question.kind)))
            n1, n2 = summaries.sizes
            self.n1.setText(str(n1))
            self.n2.setText("" if n1 == n2 else str(n2))
            self.ratio.setText(_shown(n2 / n1))
        finally:
            self._filling = False
        self._summaries, self._summary_analysis = summaries, analysis
        analysis_now = self.session.analysis
        self._filled(None if analysis_now is None else analysis_now.groups)

    def _fill_question(self, question: Question, margin: Margin | None) -> None:
        """The question's kind and level, and its margin when it is in the measurement's units."""
        self._set(self.question, question.kind)
        self.level.setText(_shown(1 - question.level, 12))
        if margin is not None and margin.unit == "units":
            if question.kind == "equivalent":
                self.margin_low.setText(_shown(margin.low, 12))
                self.margin_high.setText(_shown(margin.high, 12))
            else:
                self.margin_size.setText(_shown(margin.high if margin.worse == "higher" else -margin.low, 12))
                self._set(self.worse, margin.worse or "lower")

    def _filled(self, groups: Any) -> None:
        """After a filling in: the inputs are as filled (``groups``: the comparison's on show)."""
        self._touched = False
        self._filled_from = groups
        self._filled_difference = self.difference.text()
        self._saved_answer = None
        self._seed = None
        self._show_rows()
        self._soon.start()

    def _fill_again(self) -> None:
        """The fill-in button: from the comparison on show, else from the summaries last used."""
        if self.session.analysis is None and self._summary_analysis is not None:
            self.fill_from_summaries(self._summary_analysis)
        else:
            self.fill_from_analysis()

    def restore(self, plan: Plan, answer: dict | None = None) -> None:
        """Show ``plan`` (a saved one) in the inputs and work it out; when ``answer`` (the saved
        key figures) is given, a difference from the figures worked out now is said."""
        self._filling = True
        try:
            self._set(self.find, plan.find)
            self._set(self.question, plan.question.kind)
            self.level.setText(_shown(plan.alpha, 12))
            margin = plan.question.margin
            if margin is not None:
                self.margin_low.setText(_shown(margin.low, 17))
                self.margin_high.setText(_shown(margin.high, 17))
                self.margin_size.setText(_shown(margin.high if margin.worse == "higher" else -margin.low, 12))
                self._set(self.worse, margin.worse or "lower")
            self._set(self.design, plan.design)
            self._set(self.procedure, plan.procedure)
            self._set(self.spread, "pilot" if plan.pilot is not None else "given")
            self._set(self.shape, plan.shape)
            self.difference.setText(_shown(plan.difference, 17))
            self.sd.setText(_shown(plan.sd, 17))
            self.sd2.setText(_shown(plan.sd2, 17))
            self.n1.setText("" if plan.n1 is None else str(plan.n1))
            self.n2.setText("" if plan.n2 is None or plan.n2 == plan.n1 else str(plan.n2))
            self.ratio.setText(_shown(plan.ratio, 12))
            self.power.setText(_shown(plan.power, 12))
            self.unit.setText(plan.unit)
            self.simulations.setValue(plan.simulations)
        finally:
            self._filling = False
        self._seed = plan.seed
        self._touched = True
        self._summaries = self._summary_analysis = None
        self._saved_answer = answer
        self._changed()
        self.work_out()

    # -- working out -----------------------------------------------------------------------------
    _seed: int | None = None

    def _changed(self, *_: Any) -> None:
        self._show_rows()
        if self._filling:
            return
        self._touched = True
        self._soon.start()

    def work_out(self) -> None:
        """Work the plan out from the inputs, in the worker (a refused input is said at once)."""
        self._soon.stop()
        try:
            plan = self.plan()
            if plan.simulated and self._seed is not None:
                plan = plan.with_(seed=self._seed)
        except TwofoldError as problem:
            self.worker.cancel()
            self._say("plan_input", reason=problem.message)
            self._show(None, None)
            return
        over = self._value(self.curve_axis)

        def job(progress: Any, cancelled: Any) -> tuple:
            from engine.tasks import Task

            task = Task.of(progress, cancelled, what="planning")
            result = plan_study(plan, progress=task.step(0.5, "the plan"))
            curve = _curve(plan, result, over, task.step(0.5, "the power curve"))
            return result, curve

        self.progress.setValue(0)
        self._say(None)
        self.worker.run(job)

    def stop(self) -> None:
        if self.worker.busy:
            self.worker.cancel()

    def _on_done(self, outcome: tuple) -> None:
        result, curve = outcome
        self._say(None)
        if self._saved_answer is not None:
            self._compare_saved(result)
        self._show(result, curve)

    def _on_failed(self, message: str, expected: bool) -> None:
        self._say("plan_input" if expected else "plan_crashed", reason=message)
        self._show(None, None)

    def _on_stopped(self) -> None:
        self._say("plan_stopped")

    def _on_progress(self, fraction: float, what: str) -> None:
        self.progress.setValue(int(fraction * 1000))

    def _on_busy(self, busy: bool) -> None:
        self.stop_button.setEnabled(busy)
        self.progress.setVisible(busy)

    def _say(self, key: str | None, **values: Any) -> None:
        self.problem.setText("" if key is None else message_text(key, **values))
        self.problem.setVisible(key is not None)

    def _compare_saved(self, result: PlanResult) -> None:
        saved, self._saved_answer = self._saved_answer, None
        now = {"n1": result.n1, "n2": result.n2, "power": result.power, "difference": result.difference}
        differ = [name for name, value in now.items() if saved.get(name) is not None
                  and not math.isclose(float(saved[name]), float(value), rel_tol=1e-9, abs_tol=1e-12)]
        if differ:
            self._say("plan_saved_differs",
                      saved=", ".join(f"{name} {saved[name]:g}" for name in differ),
                      now=", ".join(f"{name} {now[name]:g}" for name in differ))

    def _question_changed(self) -> None:
        """A difference still as filled in from the comparison follows the question: turned the
        way a one-sided question asks, 0 expected for a margin question."""
        analysis = self.session.analysis
        if (analysis is None and self._summaries is None) or self._filling \
                or self.difference.text() != self._filled_difference:
            return
        import numpy as np

        kind = self._value(self.question)
        observed = (self._summaries.difference if self._summaries is not None
                    else float(np.mean(analysis.groups.x) - np.mean(analysis.groups.y)))
        text = "0" if kind in ("equivalent", "not_worse") else _shown(towards(kind, observed))
        self._filled_difference = text
        self.difference.setText(text)

    def _show(self, result: PlanResult | None, curve: PowerCurve | None) -> None:
        self.result, self.curve = result, curve
        for button in (self.copy_button, self.copy_plot_button, self.save_plot_button):
            button.setEnabled(result is not None)
        if result is None:
            self.sentence.setText("")
            self.figures.setText("")
            self.notes.setText("")
            self.curve_note.setText("")
            self.plot.show_curve(None)
            self.plot.setVisible(False)
            return
        lines = answer_lines(result)
        self.sentence.setText(lines[0])
        figures = [line for line in lines[2:] if line and not line.startswith("Note: ")]
        self.figures.setText("\n".join(figures))
        self.notes.setText("\n".join(result.notes))
        self.notes.setVisible(bool(result.notes))
        answer = None
        if curve is not None:
            x = result.n1 if curve.over == "n" else result.difference
            answer = (float(x), float(result.power))
        self.plot.show_curve(curve, answer, result.plan.power)
        self.plot.setVisible(curve is not None)
        note = ""
        if curve is not None and curve.monte_carlo_se is not None:
            note = (f"Each point of the curve: {curve.plan.simulations:,} simulated studies (Monte Carlo "
                    f"standard error up to {format_number(100 * float(max(curve.monte_carlo_se)), digits=2)} "
                    "percentage points).")
        self.curve_note.setText(note)
        self.curve_note.setVisible(bool(note))

    # -- listening -------------------------------------------------------------------------------
    def _on_session(self, name: str, value: Any) -> None:
        if name != "analysis":
            return
        if value is None:
            if self._value(self.spread) == "pilot":
                self._set(self.spread, "given")
            self._show_rows()
            return
        new_data = self._filled_from is None or not _same_groups(self._filled_from, value.groups)
        if new_data or (not self._touched and self._summaries is None):
            self.fill_from_analysis()
        elif self._value(self.spread) == "pilot":
            self._soon.start()  # the pilot is the comparison's groups: work it out again

    def cleanup(self) -> None:
        """Stop listening and stop the worker."""
        self.session.unsubscribe(self._on_session)
        self._soon.stop()
        self.worker.shutdown()

    # -- into a document -------------------------------------------------------------------------
    def copy_plan(self) -> None:
        """Put the plan on the clipboard: HTML (tables), plain text, and the curve as a picture."""
        if self.result is None:
            return
        data = clipboard.findings_mime(plan_html(self.result, self.curve), plan_plain(self.result, self.curve))
        data.setImageData(plot_image(self.plot))
        from PySide6.QtGui import QGuiApplication

        QGuiApplication.clipboard().setMimeData(data)

    def copy_plot(self) -> None:
        if self.result is not None:
            clipboard.copy_image(plot_image(self.plot))

    def save_plot(self, path: str | Path) -> Path:
        """Save the curve as PNG or SVG (by the suffix); raises :class:`FileProblem`."""
        return save_plot_file(self.plot, path, "curve")

    def ask_save_plot(self) -> None:
        path, _ = QFileDialog.getSaveFileName(self, "Save the power curve", "power curve.png",
                                              "PNG picture (*.png);;SVG drawing (*.svg)")
        if not path:
            return
        try:
            written = self.save_plot(path)
        except FileProblem as error:
            self.status.setText(error.message)
        else:
            self.status.setText(f"Saved {written.name} in {written.resolve().parent}.")
        self.status.setVisible(True)

    # -- the saved analysis ----------------------------------------------------------------------
    def restore_saved(self, member: dict) -> None:
        """Show the ``plan`` member of a saved analysis (checked by ``engine.saved.load``)."""
        analysis = self.session.analysis
        path = self.session.path
        try:
            plan = plan_of(member, None if analysis is None else analysis.groups, path.name if path else "")
        except TwofoldError as problem:
            self._say("plan_input", reason=problem.message)
            return
        self.restore(plan, member.get("answer"))


def _same_groups(old: Any, new: Any) -> bool:
    import numpy as np

    return (tuple(old.labels) == tuple(new.labels) and old.x.shape == new.x.shape and old.y.shape == new.y.shape
            and np.array_equal(old.x, new.x) and np.array_equal(old.y, new.y))


def _curve(plan: Plan, result: PlanResult, over: str, task: Any) -> PowerCurve | None:
    """The power curve of ``plan`` (a simulated one with fewer points and studies per point); None
    when the plan's inputs leave no curve to draw."""
    fixed = plan.with_(seed=result.seed) if result.seed is not None else plan
    points = {}
    if plan.simulated:
        fixed = fixed.with_(simulations=min(plan.simulations, CURVE_SIMULATIONS))
        points = {"points": SIMULATED_POINTS}
    try:
        return power_curve(fixed, over, progress=task, **points)
    except OptionProblem:
        return None


if __name__ == "__main__":  # pragma: no cover - a quick look by hand
    import sys

    from .panel_alone import show_alone

    sys.exit(show_alone(PlanPanel, sys.argv))
