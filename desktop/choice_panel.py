"""Which procedure: the shape and spread checks, the suggestion with its reasons, and the pick.

The panel walks the user through the checks the engine ran (each with a small plot, a line of
figures and a one-line reading), shows the suggested procedure with its reasons and the
alternatives weighed, and lets the user pick another, saying what that pick assumes. Three
things only the user can know are offered too: that the spreads are equal, that the values are
ordinal ratings, and (tucked away, for the z procedure) the population standard deviations.

Run on its own for a quick look: ``python -m desktop.choice_panel``.
"""

from __future__ import annotations

from typing import Any

from PySide6.QtGui import QDoubleValidator
from PySide6.QtWidgets import (QBoxLayout, QCheckBox, QComboBox, QFormLayout, QFrame, QGroupBox,
                               QHBoxLayout, QLabel, QLineEdit, QPushButton, QVBoxLayout, QWidget)

from engine import report
from engine.errors import OptionProblem
from engine.text import visible, visible_html

from .panel_parts import FlowLayout, disclosure_button, heading, hint_and_body, text_label
from .plain_text import plain_label
from .paired_plots import (DifferencePlot, DifferenceQQPlot, DifferenceShapePlot, JoinedPairsPlot, MAX_JOINED,
                           pair_figures)
from .plots import BoxPlot, QQPlot, ShapePlot

__all__ = ["ChoicePanel", "CHECK_TIPS", "main_reading"]

_SEVERITY_RANK = {"info": 0, "note": 1, "warning": 2}
_SEVERITY_WORD = {"info": "", "note": "Worth a look: ", "warning": "Take care: "}
_SHAPE_KEYS = ("normality", "skewness", "tails", "outliers", "ties")
_SPREAD_KEYS = ("spread", "sizes", "pooled_ties")
# The checks of matched pairs about the pairs themselves (the rest are the differences' shape).
_PAIR_KEYS = ("pairs", "same_difference", "zero_differences", "pair_correlation")

# One sentence per figure of the checks, shown when the pointer rests on it.
CHECK_TIPS = {
    "shapiro": "Shapiro-Wilk W is near 1 for values that look bell-shaped; a small p-value "
               "means the shape departs from a normal distribution.",
    "skewness": report.GLOSSES["skewness"],
    "kurtosis": report.GLOSSES["excess kurtosis"],
    "outliers": report.GLOSSES["interquartile range"],
    "sd_ratio": "The larger standard deviation divided by the smaller; 1 means the groups vary "
                "equally.",
    "levene": "Levene's check compares the spread of the groups around their means; a small "
              "p-value means the spreads differ.",
    "brown_forsythe": "The Brown-Forsythe check compares spread around the medians, which "
                      "stays reliable when the values are not bell-shaped.",
    "n_ratio": "The larger group's size divided by the smaller's.",
}

# The histogram's height axis reads "density": said in plain words when the pointer rests on it.
SHAPE_PLOT_TIP = ("Bars: how the group's values spread out; the curve: a bell curve with the "
                  "group's mean and SD. " + report.GLOSSES["density"])

_HINT = "Pick the columns and the two groups; the checks and the suggested procedure appear here."


def main_reading(findings) -> Any:
    """The finding to lead with: the most severe, the earliest among equals (None if empty)."""
    best = None
    for item in findings:
        if best is None or _SEVERITY_RANK[item.severity] > _SEVERITY_RANK[best.severity]:
            best = item
    return best


class _CheckCard(QFrame):
    """One check: title, plots, a row of figures with tooltips, the reading and the rest."""

    def __init__(self, plots: list[QWidget]) -> None:
        super().__init__()
        self.setFrameShape(QFrame.Shape.StyledPanel)
        layout = QVBoxLayout(self)
        self.title = heading("")
        layout.addWidget(self.title)
        self.plot_row = QBoxLayout(QBoxLayout.Direction.LeftToRight)
        self._plot_count = len(plots)
        for plot in plots:
            plot.setFixedHeight(190)
            plot.setMinimumWidth(150)
            self.plot_row.addWidget(plot)
        layout.addLayout(self.plot_row)
        self.figures = FlowLayout(spacing=18)
        layout.addLayout(self.figures)
        self.reading = text_label()
        font = self.reading.font()
        font.setBold(True)
        self.reading.setFont(font)
        layout.addWidget(self.reading)
        self.more = text_label()
        self.more_button = disclosure_button("All the checks in this part", self.more)
        layout.addWidget(self.more_button)
        layout.addWidget(self.more)

    def resizeEvent(self, event) -> None:  # noqa: N802 - Qt's name
        super().resizeEvent(event)
        # plots side by side when there is room for each, one above the other when not
        wide = event.size().width() >= 300 * self._plot_count
        self.plot_row.setDirection(QBoxLayout.Direction.LeftToRight if wide
                                   else QBoxLayout.Direction.TopToBottom)

    def show_figures(self, figures: list[tuple[str, str]]) -> None:
        """Write ``figures`` (text, tooltip) into the row of figures, reusing its labels.

        A label no longer needed is hidden and taken off the card at once: left to a deferred
        delete it stayed on show under the new ones until the event loop got round to it.
        """
        labels = [self.figures.itemAt(i).widget() for i in range(self.figures.count())]
        for place, (text, tip) in enumerate(figures):
            if place < len(labels):
                label = labels[place]
            else:
                label = plain_label(parent=self)
                self.figures.addWidget(label)
            label.setText(text)
            label.setToolTip(tip)
        while self.figures.count() > len(figures):
            spare = self.figures.takeAt(self.figures.count() - 1).widget()
            spare.hide()
            spare.setParent(None)
        self.figures.invalidate()

    def show_findings(self, findings) -> None:
        lead = main_reading(findings)
        self.reading.setText("" if lead is None else _SEVERITY_WORD[lead.severity] + visible(lead.text))
        others = [f for f in findings if f is not lead]
        self.more.setText("\n".join(f"- {_SEVERITY_WORD[f.severity]}{visible(f.text)}" for f in others))
        self.more_button.setVisible(bool(others))


class ChoicePanel(QWidget):
    """The checks, the suggested procedure and the user's pick.

    Parameters
    ----------
    session : engine.session.Session
        Read for the analysis and the spec; written with ``session.choose(procedure=...)`` and
        ``session.state(known_sd=..., equal_spread_known=..., ordinal=...)``.
    """

    def __init__(self, session, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.session = session
        self._syncing = False
        self._shown = None  # the analysis the checks and plots show
        self._build()
        session.subscribe(self._on_session)
        self.refresh()

    # -- building ------------------------------------------------------------------------------
    def _build(self) -> None:
        self.hint, self.scroll, layout = hint_and_body(self, _HINT)

        layout.addWidget(heading("1. How the values look"))
        self.shape_plots = [(ShapePlot(), QQPlot()) for _ in range(2)]
        for shape_plot, _qq in self.shape_plots:
            shape_plot.setToolTip(SHAPE_PLOT_TIP)
        self.shape_cards = [_CheckCard(list(pair)) for pair in self.shape_plots]
        for card in self.shape_cards:
            layout.addWidget(card)
        # a paired design shows the differences of the pairs in place of each group's shape
        self.paired_plots = (DifferenceShapePlot(), DifferenceQQPlot(), DifferencePlot(), JoinedPairsPlot())
        self.paired_cards = (_CheckCard(list(self.paired_plots[:2])), _CheckCard(list(self.paired_plots[2:])))
        for card in self.paired_cards:
            card.hide()
            layout.addWidget(card)
        self.box_plot = BoxPlot()
        self.spread_card = _CheckCard([self.box_plot])
        layout.addWidget(self.spread_card)

        layout.addWidget(heading("2. The suggested procedure"))
        self.suggestion = text_label(rich=True)
        layout.addWidget(self.suggestion)

        layout.addWidget(heading("3. Your pick"))
        pick_row = QHBoxLayout()
        pick_row.addWidget(QLabel("Procedure to follow:"))
        self.picker = QComboBox()
        self.picker.setToolTip("Follow the suggestion, or pick another procedure; the findings "
                               "then show that procedure's result.")
        self.picker.currentIndexChanged.connect(self._picked)
        pick_row.addWidget(self.picker, 1)
        layout.addLayout(pick_row)
        self.assumes = text_label(rich=True)
        layout.addWidget(self.assumes)

        known = QGroupBox("What you know beyond these data")
        known_layout = QVBoxLayout(known)
        self.equal_spread = QCheckBox("I know the spreads are equal")
        self.equal_spread.setToolTip("Tick this only if you know from outside these data (a "
                                     "specification, long experience) that both groups vary "
                                     "alike; it allows the pooled t-test.")
        self.equal_spread.toggled.connect(self._equal_spread_toggled)
        self.ordinal = QCheckBox("The values are ordinal ratings")
        self.ordinal.setToolTip("Tick this when only the order of the values means something, as with "
                                "1 to 5 ratings where a step of one need not mean the same everywhere; "
                                "it points to rank procedures.")
        self.ordinal.toggled.connect(self._ordinal_toggled)
        known_layout.addWidget(self.equal_spread)
        known_layout.addWidget(self.ordinal)
        self.sd_box = QGroupBox("Use the z procedure with these SDs")
        self.sd_box.setCheckable(True)
        self.sd_box.setToolTip("Only when the true standard deviation of each group is known from "
                               "outside these data, for example a gauge's certified precision.")
        self.sd_box.toggled.connect(self._sd_toggled)
        sd_form = QFormLayout(self.sd_box)
        self.sd_edits = [QLineEdit(), QLineEdit()]
        self.sd_labels = [plain_label(), plain_label()]
        for edit, label in zip(self.sd_edits, self.sd_labels):
            validator = QDoubleValidator(0.0, 1e300, 12, edit)
            validator.setNotation(QDoubleValidator.Notation.ScientificNotation)
            edit.setValidator(validator)
            edit.setPlaceholderText("a positive number")
            edit.returnPressed.connect(self._apply_sd)
            sd_form.addRow(label, edit)
        self.sd_apply = QPushButton("Use these SDs")
        self.sd_apply.clicked.connect(self._apply_sd)
        self.sd_message = text_label()
        sd_form.addRow(self.sd_apply, self.sd_message)
        self.advanced_button = disclosure_button("Advanced: known population SDs", self.sd_box)
        known_layout.addWidget(self.advanced_button)
        known_layout.addWidget(self.sd_box)
        layout.addWidget(known)
        layout.addStretch(1)

    # -- listening -----------------------------------------------------------------------------
    def _on_session(self, name: str, value: Any) -> None:
        if name == "analysis":
            self.refresh()
        elif name == "spec":
            self._sync_spec()

    def cleanup(self) -> None:
        """Stop listening to the session."""
        self.session.unsubscribe(self._on_session)

    # -- showing -------------------------------------------------------------------------------
    def refresh(self) -> None:
        """Show the current analysis (or the hint when there is none).

        The checks, plots and suggestion are drawn again only for a new analysis object; for the
        one on show only the widgets of the spec follow the session.
        """
        analysis = self.session.analysis
        self.hint.setVisible(analysis is None)
        self.scroll.setVisible(analysis is not None)
        if analysis is self._shown:
            if analysis is not None:
                self._sync_spec()
            return
        self._shown = analysis
        if analysis is None:
            return
        self._show_checks(analysis)
        self._show_suggestion(analysis)
        self._fill_picker(analysis)
        self._sync_spec()

    def _show_checks(self, analysis) -> None:
        groups, checks = analysis.groups, analysis.diagnostics
        paired = analysis.paired if analysis.design == "paired" else None
        for card in self.shape_cards:
            card.setVisible(paired is None)
        for card in self.paired_cards:
            card.setVisible(paired is not None)
        # the spreads of two separate groups, and what may be stated about them, are no part of
        # a paired design: its procedures work on the differences
        self.spread_card.setVisible(paired is None)
        for widget in (self.equal_spread, self.advanced_button):
            widget.setVisible(paired is None)
        self.sd_box.setVisible(paired is None and self.advanced_button.isChecked())
        if paired is not None:
            self._show_pairs(groups, paired)
            return
        values = (groups.x, groups.y)
        for index, (card, (shape_plot, qq_plot)) in enumerate(zip(self.shape_cards, self.shape_plots)):
            summary, shape = analysis.summaries[index], checks.shapes[index]
            card.title.setText(f"Shape of {visible(groups.labels[index])} ({summary.n:,} values)")
            shape_plot.set_title("histogram and normal curve")
            shape_plot.show_group(values[index], mean=summary.mean, sd=summary.sd, group=index)
            qq_plot.set_title("normal Q-Q plot")
            qq_plot.show_points(shape.qq_theoretical, shape.qq_observed, mean=summary.mean,
                                sd=summary.sd, group=index)
            card.show_figures(_shape_figures(shape))
            card.show_findings([f for f in checks.findings if f.group == index and f.key in _SHAPE_KEYS]
                               or [f for f in checks.findings if f.group == index])
        self.spread_card.title.setText("Spread of the two groups")
        self.box_plot.set_title("boxes and values")
        self.box_plot.show_groups([(groups.labels[0], groups.x, analysis.summaries[0]),
                                   (groups.labels[1], groups.y, analysis.summaries[1])])
        self.spread_card.show_figures(_spread_figures(checks.spread))
        self.spread_card.show_findings([f for f in checks.findings if f.group is None])

    def _show_pairs(self, groups, paired) -> None:
        """The differences of the pairs: their shape, and against the pair means."""
        shape_plot, qq_plot, difference_plot, joined_plot = self.paired_plots
        shape_card, pairs_card = self.paired_cards
        summary, labels = paired.summary, groups.labels
        shape_card.title.setText(f"Shape of the differences, {visible(labels[0])} minus {visible(labels[1])} "
                                 f"({summary.n:,} pairs)")
        # differences that are all one amount have no shape to draw: a histogram of them would
        # put its one bar around zero, a bin's width either side
        spread = getattr(paired, "common_difference", None) is None
        for plot in (shape_plot, qq_plot):
            plot.setVisible(spread)
        if spread:
            shape_plot.set_title("histogram and normal curve")
            shape_plot.show_group(paired.differences, mean=summary.mean, sd=summary.sd)
            qq_plot.set_title("normal Q-Q plot")
            qq_plot.show_points(paired.shape.qq_theoretical, paired.shape.qq_observed, mean=summary.mean,
                                sd=summary.sd)
        shape_card.show_figures(_shape_figures(paired.shape))
        shape_card.show_findings([f for f in paired.findings if f.key not in _PAIR_KEYS])
        pairs_card.title.setText("The pairs")
        difference_plot.show_pairs(paired.pair_means, paired.differences, mean_difference=summary.mean,
                                   labels=labels)
        joined_plot.set_title("each unit's two values")
        joined_plot.setVisible(joined_plot.show_pairs(groups.x, groups.y, labels=labels))
        figures = pair_figures(paired, labels)
        if not joined_plot.drawn:
            figures.append((f"more than {MAX_JOINED} pairs: not drawn one by one",
                            "Each unit's two values are joined by a line only when there are few enough "
                            "units for the lines to be followed."))
        pairs_card.show_figures(figures)
        pairs_card.show_findings([f for f in paired.findings if f.key in _PAIR_KEYS])

    def _show_suggestion(self, analysis) -> None:
        suggested = analysis.recommendation
        e = visible_html  # the reasons may quote a group's label
        parts = [f"<p>Suggested: <b>{e(report.capital(suggested.name))}</b></p>"]
        if suggested.reasons:
            parts.append("<p>Why:</p><ul>" + "".join(f"<li>{e(r)}</li>" for r in suggested.reasons) + "</ul>")
        if suggested.considered:
            parts.append("<p>Also weighed:</p><ul>" + "".join(
                f"<li><b>{e(report.capital(c.name))}</b>: {e(c.why_not)}</li>" for c in suggested.considered)
                + "</ul>")
        self.suggestion.setText("".join(parts))

    def _fill_picker(self, analysis) -> None:
        self._syncing = True
        try:
            self.picker.clear()
            self.picker.addItem(f"Follow the suggestion ({analysis.recommendation.name})", None)
            for key, result in analysis.procedures.items():
                self.picker.addItem(report.capital(result.name), key)
        finally:
            self._syncing = False
        labels = analysis.groups.labels
        for label, text in zip(self.sd_labels, labels):
            label.setText(f"SD of {visible(text)}:")

    def _sync_spec(self) -> None:
        """Make the widgets show the session's spec without writing anything back."""
        spec = self.session.spec
        statements = spec.statements
        self._syncing = True
        try:
            index = self.picker.findData(spec.procedure) if spec.procedure else 0
            self.picker.setCurrentIndex(max(index, 0))
            self.equal_spread.setChecked(statements.equal_spread_known)
            self.ordinal.setChecked(statements.ordinal)
            has_sd = statements.known_sd is not None
            self.sd_box.setChecked(has_sd)
            if has_sd:
                self.advanced_button.setChecked(True)
                for edit, value in zip(self.sd_edits, statements.known_sd):
                    edit.setText(repr(float(value)))
            if self._shown is not None and self._shown.design == "paired":
                self.sd_box.hide()  # known SDs of two separate groups: no part of pairs
        finally:
            self._syncing = False
        self._show_assumption()

    def _show_assumption(self) -> None:
        analysis = self.session.analysis
        if analysis is None:
            return
        suggested = analysis.recommendation
        key = self.picker.currentData() or suggested.key
        sentence = suggested.assumptions.get(key)
        name = analysis.procedures[key].name if key in analysis.procedures else key
        if sentence:
            self.assumes.setText(f"<b>What this pick assumes</b> ({visible_html(name)}): {visible_html(sentence)}")
        else:
            self.assumes.setText("")
        picked = self.session.spec.procedure
        if picked is not None and picked not in analysis.procedures:
            self.assumes.setText(f"The procedure picked before ({visible_html(picked)}) is not available "
                                 "for these data; the findings follow the suggestion.")

    # -- writing back --------------------------------------------------------------------------
    def _picked(self, _index: int) -> None:
        if self._syncing:
            return
        self.session.choose(procedure=self.picker.currentData())
        self._show_assumption()

    def _equal_spread_toggled(self, checked: bool) -> None:
        if not self._syncing:
            self.session.state(equal_spread_known=checked)

    def _ordinal_toggled(self, checked: bool) -> None:
        if not self._syncing:
            self.session.state(ordinal=checked)

    def _sd_toggled(self, checked: bool) -> None:
        if self._syncing:
            return
        if checked:
            self._apply_sd()
        else:
            self.sd_message.setText("")
            self.session.state(known_sd=None)

    def _apply_sd(self) -> None:
        if self._syncing or not self.sd_box.isChecked():
            return
        values = []
        for edit in self.sd_edits:
            text = edit.text().strip().replace(",", ".")
            try:
                values.append(float(text))
            except ValueError:
                values.append(float("nan"))  # not a number: the spec says what it needs
        try:
            self.session.state(known_sd=(values[0], values[1]))
        except OptionProblem as problem:
            self.sd_message.setText(problem.message)
        else:
            self.sd_message.setText("")


def _shape_figures(shape) -> list[tuple[str, str]]:
    fmt = report.format_number
    if shape.shapiro_w is None:
        shapiro = "Shapiro-Wilk: not run"
    else:
        shapiro = f"Shapiro-Wilk W = {fmt(shape.shapiro_w)}, {report.p_clause(shape.shapiro_p)}"
    return [
        (shapiro, CHECK_TIPS["shapiro"]),
        (f"skewness {report.format_shape(shape.skewness)}", CHECK_TIPS["skewness"]),
        (f"excess kurtosis {report.format_shape(shape.excess_kurtosis)}", CHECK_TIPS["kurtosis"]),
        (_apart_text(len(shape.mild_outliers), len(shape.far_outliers)), CHECK_TIPS["outliers"]),
    ]


def _apart_text(mild: int, far: int) -> str:
    """ "none apart from the rest", or "3 values apart from the rest, 1 of them far"."""
    if not mild and not far:
        return "none apart from the rest"
    text = f"{report.plural(mild + far, 'value')} apart from the rest"
    if far and mild:
        return f"{text}, {far:,} of them far"
    return f"{text}, far" if far else text


def _spread_figures(spread) -> list[tuple[str, str]]:
    fmt = report.format_number
    return [
        (f"SD ratio {fmt(spread.sd_ratio, digits=2)}", CHECK_TIPS["sd_ratio"]),
        (f"Levene {report.p_clause(spread.levene_p)}", CHECK_TIPS["levene"]),
        (f"Brown-Forsythe {report.p_clause(spread.brown_forsythe_p)}", CHECK_TIPS["brown_forsythe"]),
        (f"size ratio {fmt(spread.n_ratio, digits=2)}", CHECK_TIPS["n_ratio"]),
    ]


if __name__ == "__main__":  # pragma: no cover - a quick look by hand
    import sys

    from .panel_alone import show_alone

    sys.exit(show_alone(ChoicePanel, sys.argv))
