"""The "Set up the comparison" panel: which columns hold what, which two groups, which question.

The panel shows the session's analysis spec and writes the user's edits back with
``session.choose`` (and ``session.ask`` for the question). It is filled from the spec the window
completed from the engine's proposal when a file was opened, so most users only check it. The
spec checks every value: the widgets take their ranges from its constants, and a value it
refuses shows its sentence under the form. While the panel itself refreshes its widgets from the
session it writes nothing back (no update loops).

Run on its own for a quick look: ``python -m desktop.setup_panel demo_files/bolt_strength.csv``.
"""

from __future__ import annotations

import sys
from typing import Any, Sequence

from PySide6.QtCore import QSignalBlocker, Qt
from PySide6.QtWidgets import (
    QButtonGroup,
    QComboBox,
    QDoubleSpinBox,
    QFormLayout,
    QGroupBox,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QPushButton,
    QRadioButton,
    QSpinBox,
    QVBoxLayout,
    QWidget,
)

from engine.errors import OptionProblem
from engine.io.layout import trimmed_levels
from engine.question import LEVEL_RANGE, Margin, Question
from engine.report import QUESTIONS  # the question in the user's words, for each kind
from engine.spec import DESIGNS, RESAMPLES_RANGE, draw_seed
from engine.text import visible

from .margin_entry import MarginEntry, entered_words, mirrored
from .messages import message_text
from .plain_text import plain_label

__all__ = ["SetupPanel", "QUESTIONS", "DESIGN_WORDS", "group_levels", "MAX_LEVELS"]

MAX_LEVELS = 500  # a column with more distinct entries than this is not a list of groups

LEVEL_DECIMALS = 1  # the confidence level is typed in percent with one decimal

# The two designs in the user's words (the spec's DESIGNS, in order), with what each means.
DESIGN_WORDS = {
    "independent": ("Two separate groups of units",
                    "Each unit (a part, a plot, a sample) was measured once, in one of the two groups."),
    "paired": ("The same units measured twice (pairs)",
               "Each unit has one value in each group, for example before and after, or on two "
               "instruments: the procedures then work on the difference within each pair."),
}


def group_levels(table: Any, column: str | None) -> list[str]:
    """The group labels of ``column`` as the engine forms them (trimmed, in order of first
    appearance), at most MAX_LEVELS of them."""
    if table is None or column is None or column not in table.frame.columns:
        return []
    return list(trimmed_levels(table, column)[0][:MAX_LEVELS])


def _fill(combo: QComboBox, items: Sequence[str], current: str | None, *, blank: str | None = None) -> None:
    with QSignalBlocker(combo):
        combo.clear()
        if blank is not None:
            combo.addItem(blank, None)
        for item in items:
            combo.addItem(visible(item), item)  # shown with its control characters as escapes
        at = combo.findData(current) if current is not None else (0 if blank is not None else -1)
        combo.setCurrentIndex(at)


class SetupPanel(QWidget):
    """Columns, the two groups, the direction of the question and the confidence level."""

    def __init__(self, session: Any, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._session = session
        self._refreshing = False
        self._partial: tuple[str | None, str | None] = (None, None)  # one group chosen so far

        self.box = QGroupBox("Set up the comparison", self)
        self.long_radio = QRadioButton("One column names the group, another holds the measurements", self)
        self.long_radio.setToolTip("Choose this when each row is one measurement with its group written beside it.")
        self.wide_radio = QRadioButton("Each group has a column of its own", self)
        self.wide_radio.setToolTip("Choose this when the measurements of each group stand in their own column.")
        self.layout_buttons = QButtonGroup(self)
        self.layout_buttons.addButton(self.long_radio)
        self.layout_buttons.addButton(self.wide_radio)

        self.group_column = QComboBox(self)
        self.group_column.setToolTip("The column that says which group each row belongs to.")
        self.value_column = QComboBox(self)
        self.value_column.setToolTip("The column of measurements to compare.")
        self.first_column = QComboBox(self)
        self.first_column.setToolTip("The column holding the measurements of group 1.")
        self.second_column = QComboBox(self)
        self.second_column.setToolTip("The column holding the measurements of group 2.")
        self.first_group = QComboBox(self)
        self.first_group.setToolTip("Group 1: every difference is reported as group 1 minus group 2.")
        self.second_group = QComboBox(self)
        self.second_group.setToolTip("Group 2: the group that group 1 is compared against.")
        self.swap_button = QPushButton("Swap", self)
        self.swap_button.setToolTip("Exchange group 1 and group 2 (the sign of every difference turns over).")
        self.question = QComboBox(self)
        self.question.setToolTip("What you want to know: any difference, a difference in one direction only, "
                                 "or whether the groups are the same (or one no worse) within a margin you set.")
        self.margin_entry = MarginEntry(session, self)  # shown while the question needs a margin
        # what a swap did to a percentage margin, shown until the question changes again
        self.swap_note = plain_label(parent=self)
        self.swap_note.setWordWrap(True)
        self._swapped_question: Question | None = None
        self.confidence = QDoubleSpinBox(self)
        low, high = LEVEL_RANGE  # the spec's range: at least low, below high
        self.confidence.setDecimals(LEVEL_DECIMALS)
        self.confidence.setRange(low * 100, high * 100 - 10.0 ** -LEVEL_DECIMALS)
        self.confidence.setSingleStep(0.5)
        self.confidence.setSuffix(" %")
        self.confidence.setKeyboardTracking(False)
        self.confidence.setToolTip("How sure the intervals should be: 95 % is usual, 99 % gives wider intervals.")
        self.resamples = QSpinBox(self)
        self.resamples.setRange(*RESAMPLES_RANGE)
        self.resamples.setSingleStep(1_000)
        self.resamples.setGroupSeparatorShown(True)
        self.resamples.setKeyboardTracking(False)
        self.resamples.setToolTip("How many reshuffles the resampling procedures use: more is steadier but slower.")
        self.seed = QLineEdit(self)
        self.seed.setToolTip("The starting number of the random reshuffles: the same seed gives the same "
                             "numbers again. Type one to repeat an earlier run.")
        self.new_seed_button = QPushButton("New seed", self)
        self.new_seed_button.setToolTip("Draw another seed at random (the resampled numbers change a little).")
        self.refused = plain_label(parent=self)  # the spec's sentence for a value it refuses
        self.refused.setWordWrap(True)
        self.refused.hide()
        self.hint = plain_label(parent=self)  # it names a column of the file
        self.hint.setWordWrap(True)

        form = QFormLayout()
        self.group_row_label = QLabel("Group column:", self)
        self.value_row_label = QLabel("Measurements:", self)
        self.first_column_label = QLabel("Group 1 column:", self)
        self.second_column_label = QLabel("Group 2 column:", self)
        self.first_group_label = QLabel("Group 1:", self)
        self.second_group_label = QLabel("Group 2:", self)
        for label, widget in ((self.group_row_label, self.group_column), (self.value_row_label, self.value_column),
                              (self.first_column_label, self.first_column),
                              (self.second_column_label, self.second_column)):
            label.setBuddy(widget)
            form.addRow(label, widget)
        pair = QHBoxLayout()
        pair.addWidget(self.first_group, 1)
        pair.addWidget(self.swap_button)
        pair.addStretch(0)  # keeps Swap its own size when the group lists are hidden (a column per group)
        self.first_group_label.setBuddy(self.first_group)
        self.second_group_label.setBuddy(self.second_group)
        form.addRow(self.first_group_label, pair)
        form.addRow(self.second_group_label, self.second_group)
        self.question_label = QLabel("Question:", self)
        self.question_label.setBuddy(self.question)
        form.addRow(self.question_label, self.question)
        form.addRow(self.margin_entry)
        form.addRow(self.swap_note)
        form.addRow("Confidence level:", self.confidence)
        form.addRow("Resampling rounds:", self.resamples)
        seed_row = QHBoxLayout()
        seed_row.addWidget(self.seed, 1)
        seed_row.addWidget(self.new_seed_button)
        self.seed_label = QLabel("Seed:", self)
        self.seed_label.setBuddy(self.seed)
        form.addRow(self.seed_label, seed_row)
        # the margin's own labels line up with the form's
        width = max([self.margin_entry.label_width()] + [
            item.widget().sizeHint().width() for item in
            (form.itemAt(row, QFormLayout.ItemRole.LabelRole) for row in range(form.rowCount()))
            if item is not None and item.widget() is not None])
        self.question_label.setMinimumWidth(width)
        self.margin_entry.set_label_width(width)
        inner = QVBoxLayout(self.box)
        inner.addWidget(self.long_radio)
        inner.addWidget(self.wide_radio)
        inner.addLayout(form)
        inner.addWidget(self.refused)
        inner.addWidget(self.hint)
        self._build_design(form)
        outer = QVBoxLayout(self)
        outer.setContentsMargins(0, 0, 0, 0)
        outer.addWidget(self.box)

        order = [self.long_radio, self.wide_radio, self.group_column, self.value_column, self.first_column,
                 self.second_column, self.first_group, self.swap_button, self.second_group, self.question,
                 *self.margin_entry.tab_order(), self.confidence, self.resamples, self.seed, self.new_seed_button]
        for before, after in zip(order, order[1:]):
            self.setTabOrder(before, after)

        self.long_radio.toggled.connect(self._layout_edited)
        self.group_column.activated.connect(self._group_column_edited)
        self.value_column.activated.connect(self._values_edited)
        self.first_column.activated.connect(self._values_edited)
        self.second_column.activated.connect(self._values_edited)
        self.first_group.activated.connect(lambda _: self._groups_edited(first_moved=True))
        self.second_group.activated.connect(lambda _: self._groups_edited(first_moved=False))
        self.swap_button.clicked.connect(self.swap)
        self.design.activated.connect(self._design_edited)
        self.pair_column.activated.connect(self._pair_column_edited)
        self.setTabOrder(self.second_group, self.design)  # the design's rows follow the groups
        self.setTabOrder(self.design, self.pair_column)
        self.question.activated.connect(self._question_edited)
        self.confidence.valueChanged.connect(self._confidence_edited)
        self.resamples.valueChanged.connect(self._resamples_edited)
        self.seed.editingFinished.connect(self._seed_edited)
        self.new_seed_button.clicked.connect(self.new_seed)
        session.subscribe(self._on_session)
        self.refresh()

    # -- from the session ----------------------------------------------------------------------
    def _on_session(self, name: str, value: Any) -> None:
        if name in ("spec", "table", "intake", "problem") and not self._refreshing:
            self.refresh()

    def _labels(self) -> tuple[str, str]:
        spec = self._session.spec
        if spec.layout == "wide" and len(spec.value_columns) == 2:
            return spec.value_columns[0], spec.value_columns[1]
        if spec.groups:
            return spec.groups
        intake = self._session.intake
        if intake is not None:
            return intake.groups.labels
        return "group 1", "group 2"

    def refresh(self) -> None:
        """Show the session's current spec (writes nothing back)."""
        self._refreshing = True
        try:
            self._refresh()
        finally:
            self._refreshing = False

    def _refresh(self) -> None:
        session, spec = self._session, self._session.spec
        table = session.table
        columns = [str(c) for c in table.frame.columns] if table is not None else []
        wide = spec.layout == "wide"
        self.box.setEnabled(table is not None)
        with QSignalBlocker(self.long_radio), QSignalBlocker(self.wide_radio):
            self.long_radio.setChecked(not wide)
            self.wide_radio.setChecked(wide)
        values = list(spec.value_columns)
        _fill(self.group_column, columns, spec.group_column, blank="(choose a column)")
        _fill(self.value_column, columns, values[0] if values and not wide else None, blank="(choose a column)")
        _fill(self.first_column, columns, values[0] if wide and values else None, blank="(choose a column)")
        _fill(self.second_column, columns, values[1] if wide and len(values) > 1 else None,
              blank="(choose a column)")
        levels = group_levels(table, spec.group_column) if not wide else []
        if spec.groups:
            picked = spec.groups
        elif session.intake is not None and not wide:
            picked = session.intake.groups.labels
        else:
            picked = tuple(p if p in levels else None for p in self._partial)
        _fill(self.first_group, levels, picked[0], blank="(choose a group)")
        _fill(self.second_group, levels, picked[1], blank="(choose a group)")
        for widget in (self.group_row_label, self.group_column, self.value_row_label, self.value_column,
                       self.first_group_label, self.first_group, self.second_group_label, self.second_group):
            widget.setVisible(not wide)
        for widget in (self.first_column_label, self.first_column, self.second_column_label, self.second_column):
            widget.setVisible(wide)
        self.swap_button.setEnabled(not wide and bool(spec.groups) or wide and len(values) == 2)
        first, second = self._labels()
        self.margin_entry.refresh((first, second))
        if spec.question != self._swapped_question and self.swap_note.text():
            self.swap_note.setText("")
            self.swap_note.setToolTip("")
            self._fit_height()
        self.swap_note.setVisible(bool(self.swap_note.text()))
        with QSignalBlocker(self.question):
            self.question.clear()
            for key, words in QUESTIONS:
                self.question.addItem(words.format(a=visible(first), b=visible(second)), key)
            self.question.setCurrentIndex(max(0, self.question.findData(self.margin_entry.shown_kind())))
        with QSignalBlocker(self.confidence):
            self.confidence.setValue(round(spec.level * 100, LEVEL_DECIMALS))
        with QSignalBlocker(self.resamples):
            self.resamples.setValue(int(spec.resamples))
        if not (self.seed.hasFocus() and self.seed.isModified()):  # never under the user's typing
            self.seed.setText("" if spec.seed is None else str(spec.seed))
        if not wide and spec.group_column and len(levels) > 2 and not spec.groups:
            self.hint.setText(f"{visible(spec.group_column)} holds {len(levels)} groups: choose the two to compare.")
        elif not wide and spec.group_column and len(levels) < 2 and table is not None:
            self.hint.setText(f"{visible(spec.group_column)} holds fewer than two groups: choose another column.")
        else:
            self.hint.setText("")
        self.hint.setVisible(bool(self.hint.text()))
        self._refresh_design(columns)

    # -- to the session ------------------------------------------------------------------------
    def _choose(self, **changes: Any) -> None:
        self._write(self._session.choose, changes)

    def _write(self, write: Any, changes: dict[str, Any]) -> None:
        """Write ``changes`` with ``write``; a value the spec refuses shows its sentence."""
        if self._refreshing:
            return
        self._refreshing = True
        try:
            write(**changes)
        except OptionProblem as problem:
            self.refused.setText(problem.message)
        else:
            self.refused.setText("")
        finally:
            self._refreshing = False
        self.refused.setVisible(bool(self.refused.text()))
        self.refresh()

    def _layout_edited(self, long_checked: bool) -> None:
        if self._refreshing:
            return
        spec = self._session.spec
        if long_checked:
            self._choose(layout="long", value_columns=tuple(spec.value_columns[:1]), groups=None,
                         pair_column=self._proposed_pair_column(spec.group_column, spec.value_columns[:1])
                         if spec.design == "paired" else None)
        else:
            numbers = self._number_columns()
            values = tuple(spec.value_columns[:2])
            if len(values) < 2:
                values = tuple(numbers[:2])
            self._choose(layout="wide", value_columns=values, group_column=None, groups=None, pair_column=None)

    def _number_columns(self) -> list[str]:
        table = self._session.table
        if table is None:
            return []
        kinds = getattr(table, "column_kinds", {}) or {}
        return [str(c) for c in table.frame.columns if kinds.get(c) == "number"]

    def _group_column_edited(self, _: int) -> None:
        column = self.group_column.currentData()
        levels = group_levels(self._session.table, column)
        picked = (levels[0], levels[1]) if len(levels) == 2 else None
        self._partial = (None, None)
        self._choose(group_column=column, groups=picked)

    def _values_edited(self, _: int) -> None:
        if self._session.spec.layout == "wide":
            chosen = (self.first_column.currentData(), self.second_column.currentData())
            self._choose(value_columns=tuple(c for c in chosen if c))
        else:
            column = self.value_column.currentData()
            self._choose(value_columns=(column,) if column else ())

    def _groups_edited(self, *, first_moved: bool) -> None:
        first, second = self.first_group.currentData(), self.second_group.currentData()
        old = self._session.spec.groups or (None, None)
        if first is not None and first == second:
            # picking the other group's label exchanges the two
            if first_moved:
                second = old[0]
            else:
                first = old[1]
        if first and second and first != second:
            self._partial = (None, None)
            self._choose(groups=(first, second))
        else:
            self._partial = (first, second)
            self.refresh()

    def swap(self) -> None:
        """Exchange group 1 and group 2 with the same margin: an uneven equivalence margin turns
        over with them, and a percentage margin (always of group 2's mean) is put in the
        measurement's units it stood for, which the line under the margin says."""
        spec = self._session.spec
        labels = self._labels()
        question, note = self._swapped(spec.question, labels)
        if spec.layout == "wide" and len(spec.value_columns) == 2:
            self._choose(value_columns=(spec.value_columns[1], spec.value_columns[0]), question=question)
        elif spec.groups:
            self._choose(groups=(spec.groups[1], spec.groups[0]), question=question)
        else:
            return
        if self._session.spec.question == question and note:
            self._swapped_question = question
            self.swap_note.setText(note[0])
            self.swap_note.setToolTip(note[1])
            self.swap_note.setVisible(True)
            self._fit_height()
            entry = self.margin_entry
            for field in (entry.size, entry.low, entry.high):
                field.setCursorPosition(0)  # a long amount shows its sign and first digits

    def _fit_height(self) -> None:
        """Ask for the height the wrapped lines need at this width, so that the window gives it
        rather than squeezing the rows of the form over one another."""
        self.setMinimumHeight(0)
        needed = self.heightForWidth(self.width()) if self.hasHeightForWidth() else -1
        self.setMinimumHeight(max(needed, self.minimumSizeHint().height()))

    def _swapped(self, question: Question, labels: tuple[str, str]) -> tuple[Question, tuple[str, str] | None]:
        """``question`` for the groups exchanged, and the line under the margin with its tooltip
        (None when the margin is simply turned over)."""
        margin = question.margin
        if margin is None or margin.unit != "percent":
            return mirrored(question), None
        first, second = labels
        unknown = (message_text("swap_percent_unknown", before=second, after=first), "")
        intake = self._session.intake
        if intake is None or tuple(intake.groups.labels) != (first, second):
            return mirrored(question), unknown
        reference = float(intake.groups.y.mean())  # group 2's mean, as the analysis takes it
        try:
            units = margin.in_units(reference)
        except OptionProblem:  # group 2's mean is 0: no percentage of it to keep
            return mirrored(question), unknown
        if question.kind == "equivalent":
            units = Margin(-units.high, -units.low, "units")
        turned = Question(question.kind, question.level, units)
        return turned, (
            message_text("swap_percent_margin", before=entered_words(margin, labels), second=second,
                         mean=f"{reference:.6g}"),
            message_text("swap_percent_why", first=first, after=entered_words(units, (second, first))))

    def _question_edited(self, _: int) -> None:
        if not self._refreshing:  # the margin's fields ask it, or say why they cannot yet
            self.margin_entry.pick(self.question.currentData())
            self.refresh()

    def _confidence_edited(self, value: float) -> None:
        self._write(self._session.ask, {"level": round(value / 100.0, LEVEL_DECIMALS + 2)})

    def _resamples_edited(self, value: int) -> None:
        self._choose(resamples=int(value))

    def _seed_edited(self) -> None:
        text = self.seed.text().strip()
        if text == ("" if self._session.spec.seed is None else str(self._session.spec.seed)):
            return
        try:
            seed: Any = int(text)
        except ValueError:
            seed = text  # not a whole number: the spec says so in its own words
        self._choose(seed=seed)

    def new_seed(self) -> None:
        """Draw another seed at random."""
        self._choose(seed=draw_seed())

    # -- the design: two separate groups, or the same units measured twice -----------------------
    def _build_design(self, form: QFormLayout) -> None:
        """The design's rows, below the two groups: the choice, what the file suggests, the pair
        ID column (long layout) and a note on how the pairs are formed or why they cannot be."""
        self.design = QComboBox(self)
        for design in DESIGNS:
            words, tip = DESIGN_WORDS[design]
            self.design.addItem(words, design)
            self.design.setItemData(self.design.count() - 1, tip, Qt.ItemDataRole.ToolTipRole)
        self.design.setToolTip("Whether the two groups hold different units, or the same units measured "
                               "twice. " + DESIGN_WORDS["paired"][1])
        self.design_label = QLabel("Design:", self)
        self.design_label.setBuddy(self.design)
        self.design_evidence = plain_label(parent=self)  # the screening's sentence quotes a column
        self.design_evidence.setWordWrap(True)
        self.pair_column = QComboBox(self)
        self.pair_column.setToolTip("The column that names each unit, so that its row in group 1 and its "
                                    "row in group 2 can be matched (each name once in each group).")
        self.pair_column_label = QLabel("Pair ID column:", self)
        self.pair_column_label.setBuddy(self.pair_column)
        self.pair_note = plain_label(parent=self)  # how the pairs are formed, or the engine's reason why not
        self.pair_note.setWordWrap(True)
        self._evidence: tuple[Any, Any] = (None, None)  # (table, the screening's paired finding)
        at = form.getWidgetPosition(self.second_group)[0] + 1
        form.insertRow(at, self.design_label, self.design)
        form.insertRow(at + 1, self.design_evidence)
        form.insertRow(at + 2, self.pair_column_label, self.pair_column)
        form.insertRow(at + 3, self.pair_note)

    def _paired_finding(self) -> Any:
        """The screening's sign of pairing for the table on show (kept while a paired choice
        leaves no groups to screen), or None."""
        session = self._session
        screening = getattr(session.intake, "screening", None)
        if screening is not None and (screening.paired is not None or self._evidence[0] is not session.table):
            self._evidence = (session.table, screening.paired)
        table, finding = self._evidence
        return finding if table is session.table else None

    def _refresh_design(self, columns: list[str]) -> None:
        session, spec = self._session, self._session.spec
        paired, long = spec.design == "paired", spec.layout == "long"
        with QSignalBlocker(self.design):
            self.design.setCurrentIndex(max(0, self.design.findData(spec.design)))
        taken = {spec.group_column, *spec.value_columns[:1]} if long else set()
        _fill(self.pair_column, [c for c in columns if c not in taken], spec.pair_column,
              blank="(choose a column)")
        for widget in (self.pair_column_label, self.pair_column):
            widget.setVisible(paired and long)
        finding = self._paired_finding()
        screened = session.table is not None and getattr(session.intake, "screening", None) is not None
        if finding is not None and paired:
            self.design_evidence.setText(f"Sign of pairs: {visible(finding.text)}")
        elif finding is not None:
            self.design_evidence.setText(f"Take care: {visible(finding.text)} If so, choose "
                                         f"\u201c{DESIGN_WORDS['paired'][0]}\u201d as the design.")
        elif screened and not paired:
            self.design_evidence.setText("The file shows no sign of pairs (no ID column with each name once "
                                         "in each group); only you know how the values were taken.")
        else:
            self.design_evidence.setText("")
        self.design_evidence.setVisible(bool(self.design_evidence.text()))
        if paired and long and spec.pair_column is None:
            note = "Choose the column that names each unit, so that its two rows can be matched."
        elif paired and session.problem and session.table is not None:
            note = f"These data cannot be paired yet: {visible(session.problem)}"
        elif paired and not long:
            note = "Each row is one unit: its values in the two columns make a pair."
        elif paired:
            note = (f"Rows with the same {visible(spec.pair_column)} make a pair, one row in each group; "
                    "what cannot be matched is listed under Your data.")
        else:
            note = ""
        self.pair_note.setText(note)
        self.pair_note.setVisible(bool(note))
        self._fit_wrapped()

    def _fit_wrapped(self) -> None:
        """Keep room for every line of the design's wrapped sentences: the splitter the panel sits
        in goes by minimum heights, and a wrapping label's own is a single line."""
        width = self.box.contentsRect().width() - 24
        for label in (self.design_evidence, self.pair_note):
            label.setMinimumHeight(label.heightForWidth(width) if label.text() and width > 100 else 0)

    def resizeEvent(self, event: Any) -> None:  # noqa: N802 - Qt's name
        super().resizeEvent(event)
        self._fit_wrapped()

    def _proposed_pair_column(self, group: str | None, values: Sequence[str]) -> str | None:
        """The column to offer first as the pair ID: the one the screening found pairs in, else
        the first column that looks like it names units, else none (the user chooses)."""
        table = self._session.table
        if table is None:
            return None
        from engine.io.screening import identifier_candidates

        skip = [c for c in (group, *values) if c]
        candidates = identifier_candidates(table, skip)
        finding = self._paired_finding()
        if finding is not None:
            named = [c for c in candidates if f"'{c}'" in finding.text]
            candidates = named + [c for c in candidates if c not in named]
        return candidates[0] if candidates else None

    def _design_edited(self, _: int) -> None:
        spec = self._session.spec
        if self.design.currentData() == "paired":
            changes: dict[str, Any] = {"design": "paired"}
            if spec.layout == "long" and spec.pair_column is None:
                changes["pair_column"] = self._proposed_pair_column(spec.group_column, spec.value_columns[:1])
            self._choose(**changes)
        else:
            self._choose(design="independent", pair_column=None)

    def _pair_column_edited(self, _: int) -> None:
        self._choose(pair_column=self.pair_column.currentData())

    def cleanup(self) -> None:
        """Stop listening to the session."""
        self._session.unsubscribe(self._on_session)


if __name__ == "__main__":  # pragma: no cover - a quick look by hand
    from .panel_alone import show_alone

    sys.exit(show_alone(SetupPanel, sys.argv))
