"""The margin of an equivalence or non-inferiority question, as the user enters it.

Shown under the question row of the set-up panel while the question picked there needs a margin:
its size (or a low and a high end for an uneven margin), how it is given (in the measurement's
units, as a percentage of group 2's mean, or as a ratio of group 1's mean to group 2's) and, for
non-inferiority, which direction is worse. A valid entry is written to the session at once with
``session.ask(kind=..., margin=Margin(...))``; an entry that is not valid is said in one line
under the fields, and the question last written stays in force (the line says which). The
fields keep what was typed while the question is switched to another kind and back.
"""

from __future__ import annotations

import math
from typing import Any

from PySide6.QtCore import QSignalBlocker, Qt
from PySide6.QtWidgets import (QCheckBox, QComboBox, QFormLayout, QHBoxLayout, QLabel, QLineEdit, QVBoxLayout,
                               QWidget)

from engine.errors import OptionProblem
from engine.question import MARGIN_KINDS, Margin, Question
from engine.text import visible

from .messages import message_text
from .plain_text import plain_label

__all__ = ["MarginEntry", "UNIT_WORDS", "WORSE_WORDS", "parse_number", "margin_reading", "in_force_words",
           "entered_words", "question_words", "mirrored"]

# How the margin is given, for each of engine.question.MARGIN_UNITS: {a} is group 1, {b} group 2.
UNIT_WORDS: tuple[tuple[str, str], ...] = (
    ("units", "in the measurement's units"),
    ("percent", "as % of {b}'s mean"),
    ("ratio", "as a ratio: {a}'s mean / {b}'s"),
)
UNIT_TIPS = {
    "units": "The margin is a difference in the measurements' own units, such as 2 for 2 kN.",
    "percent": "The margin is a share of {b}'s mean: 5 means 5 % of {b}'s mean, worked out from the data.",
    "ratio": "The margin is a ratio of {a}'s mean to {b}'s, such as 0.8 to 1.25. It compares the "
             "geometric means (on the log scale), so every measurement must be above zero.",
}
# Which direction is worse, for each of engine.question.WORSE.
WORSE_WORDS: tuple[tuple[str, str], ...] = (
    ("lower", "lower values are worse"),
    ("higher", "higher values are worse"),
)


def parse_number(text: str, *, percent: bool = False) -> float | None:
    """The number typed in ``text``, or None when it is not one. A decimal comma ("0,5"), a true
    minus sign and, for a percentage, a trailing "%" are taken as meant."""
    cleaned = text.strip().replace("\u2212", "-").replace(" ", "")
    if percent and cleaned.endswith("%"):
        cleaned = cleaned[:-1]
    if cleaned.count(",") == 1 and "." not in cleaned:
        cleaned = cleaned.replace(",", ".")
    try:
        value = float(cleaned)
    except ValueError:
        return None
    return value if math.isfinite(value) else None


def _g(value: float) -> str:
    return f"{value:.6g}".replace("-", "\u2212")


def margin_reading(kind: str, margin: Margin, labels: tuple[str, str]) -> str:
    """What the margin means, in a sentence: "The groups count as the same if wax minus resin
    lies between −2 and 2."."""
    first, second = (visible(label) for label in labels)
    if margin.unit == "ratio":
        what = f"{first}'s mean divided by {second}'s"
        show = _g
    else:
        what = f"{first} minus {second}"
        show = (lambda v: f"{_g(v)} % of {second}'s mean") if margin.unit == "percent" else _g
    if kind == "equivalent":
        return f"The groups count as the same if {what} lies between {show(margin.low)} and {show(margin.high)}."
    side = "above" if margin.worse == "lower" else "below"
    return f"{first} counts as no worse if {what} lies {side} {show(margin.bound)}."


def entered_words(margin: Margin, labels: tuple[str, str]) -> str:
    """The margin as it was entered: "±2", "−1 to 3", "±5 % of resin's mean", "a ratio of 0.8 to
    1.25"; for non-inferiority its size on the worse side and that side: "2 (lower values are
    worse)"."""
    second = visible(labels[1])
    if margin.worse is not None:
        size = margin.bound if margin.unit == "ratio" else abs(margin.bound)
        ends = _g(size)
    elif margin.symmetric and margin.unit != "ratio":
        ends = f"±{_g(margin.high)}"
    else:
        ends = f"{_g(margin.low)} to {_g(margin.high)}"
    if margin.unit == "percent":
        ends = (ends.replace(" to ", " % to ") + f" % of {second}'s mean")
    elif margin.unit == "ratio":
        ends = f"a ratio of {ends}"
    if margin.worse is not None:
        ends += f" ({dict(WORSE_WORDS)[margin.worse]})"
    return ends


def question_words(question: Question, labels: tuple[str, str]) -> str:
    """A margin question in a few words: "the same within ±2", "no worse by more than 5 % of
    resin's mean (lower values are worse)"; "" for a question without a margin."""
    if question.margin is None:
        return ""
    lead = "the same within" if question.kind == "equivalent" else "no worse by more than"
    return f"{lead} {entered_words(question.margin, labels)}"


def mirrored(question: Question) -> Question:
    """``question`` for the groups exchanged: an equivalence margin turned over (-1 to 3 becomes
    -3 to 1; a ratio of 0.8 to 1.5 becomes 1/1.5 to 1/0.8), so an uneven margin keeps its sides
    with the groups. A non-inferiority margin stays: its size and worse direction hold for
    whichever group is now group 1."""
    margin = question.margin
    if question.kind != "equivalent" or margin is None or margin.symmetric:
        return question
    if margin.unit == "ratio":
        turned = Margin(1.0 / margin.high, 1.0 / margin.low, margin.unit)
    else:
        turned = Margin(-margin.high, -margin.low, margin.unit)
    return Question(question.kind, question.level, turned)


# The question in force in a few words, as the problem line under the fields names it.
_IN_FORCE = {"differ": "do the groups differ?", "lower": "is group 1 lower?", "higher": "is group 1 higher?"}


def in_force_words(question: Question, labels: tuple[str, str]) -> str:
    """The question a session holds, short enough for the problem line: "do the groups differ?",
    "the same within ±2?"."""
    if question.margin is None:
        return _IN_FORCE[question.kind]
    return f"{question_words(question, labels)}?"


class MarginEntry(QWidget):
    """The margin's fields, shown while the question picked needs one.

    The set-up panel hands every pick of its question row to :meth:`pick` and asks
    :meth:`shown_kind` which kind its row shows (a margin kind picked before its margin is valid
    is shown, though the session still holds the question before it); it calls :meth:`refresh`
    with the groups' labels whenever it shows the session afresh.
    """

    def __init__(self, session: Any, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._session = session
        self._pending: str | None = None  # a margin kind picked whose margin is not valid yet
        self._seen: Question = session.spec.question  # the question last shown or written
        self._labels: tuple[str, str] = ("group 1", "group 2")
        self._loading = False

        self.size = QLineEdit(self)
        self.size.setPlaceholderText("size")
        self.size.setToolTip("How far apart the groups may be and still count as the same (or, for "
                             "\u201cno worse\u201d, how much worse group 1 may be). Choose it from what "
                             "matters in practice, before looking at the data.")
        self.low = QLineEdit(self)
        self.low.setPlaceholderText("low end")
        self.low.setToolTip("The lowest difference that still counts as the same (below no difference).")
        self.high = QLineEdit(self)
        self.high.setPlaceholderText("high end")
        self.high.setToolTip("The highest difference that still counts as the same (above no difference).")
        self.plus_minus = QLabel("\u00b1", self)
        self.to_word = QLabel("to", self)
        self.unit = QComboBox(self)
        self.uneven = QCheckBox("Different limits below and above", self)
        self.uneven.setToolTip("Tick to give a low and a high end of their own instead of one size either side.")
        self.worse = QComboBox(self)
        self.worse.setToolTip("Which way a change would be bad: lower strength is worse, a higher "
                              "defect rate is worse.")
        for key, words in WORSE_WORDS:
            self.worse.addItem(words[:1].upper() + words[1:], key)
        self.problem = plain_label(parent=self)  # one line: what is wrong with the entry
        self.problem.setWordWrap(True)
        self.reading = plain_label(parent=self)  # what the margin in force means
        self.reading.setWordWrap(True)

        fields = QHBoxLayout()
        fields.setContentsMargins(0, 0, 0, 0)
        for widget in (self.plus_minus, self.size, self.low, self.to_word, self.high):
            fields.addWidget(widget)
        fields.addWidget(self.unit, 1)
        form = QFormLayout()
        form.setContentsMargins(0, 0, 0, 0)
        self.margin_label = QLabel("Margin:", self)
        self.margin_label.setBuddy(self.size)
        form.addRow(self.margin_label, fields)
        form.addRow("", self.uneven)
        self.worse_label = QLabel("Which way is worse:", self)
        self.worse_label.setBuddy(self.worse)
        form.addRow(self.worse_label, self.worse)
        column = QVBoxLayout(self)
        column.setContentsMargins(0, 0, 0, 0)
        column.addLayout(form)
        column.addWidget(self.problem)
        column.addWidget(self.reading)

        for line in (self.size, self.low, self.high):
            line.editingFinished.connect(self._edited)
        self.unit.activated.connect(lambda _: self._edited())
        self.worse.activated.connect(lambda _: self._edited())
        self.uneven.toggled.connect(self._uneven_toggled)
        self._fill_units()
        self._load(session.spec.question)
        self._show()

    def label_width(self) -> int:
        """The width the labels of the fields ask for."""
        return max(label.sizeHint().width() for label in (self.margin_label, self.worse_label))

    def set_label_width(self, width: int) -> None:
        """Give the labels of the fields ``width``, to line them up with a form around them."""
        for label in (self.margin_label, self.worse_label):
            label.setMinimumWidth(width)

    def tab_order(self) -> list[QWidget]:
        """The fields in the order the Tab key visits them."""
        return [self.size, self.low, self.high, self.unit, self.uneven, self.worse]

    # -- what the question row shows -----------------------------------------------------------
    def shown_kind(self) -> str:
        """The kind the question row shows: a margin kind still waiting for its margin, else the
        session's."""
        return self._pending or self._session.spec.question.kind

    def pick(self, kind: str) -> None:
        """The user picked ``kind`` in the question row: ask it at once when it needs no margin
        or its margin is valid; otherwise show the fields and keep the question in force."""
        self._pending = kind if kind in MARGIN_KINDS else None
        if kind in MARGIN_KINDS:
            self._write(kind, quiet_when_empty=True)
        else:
            self._ask(kind=kind, margin=None)
        self._show()

    def focus_entry(self, kind: str = "equivalent") -> None:
        """Show the fields for ``kind`` (picked if the question is not a margin question yet) and
        put the cursor in the first one."""
        if self.shown_kind() not in MARGIN_KINDS:
            self.pick(kind)
        field = self.low if self.uneven.isChecked() and self.shown_kind() == "equivalent" else self.size
        self.setVisible(True)
        field.setFocus(Qt.FocusReason.OtherFocusReason)
        field.selectAll()

    # -- from the session ----------------------------------------------------------------------
    def refresh(self, labels: tuple[str, str]) -> None:
        """Show the session afresh with the groups' ``labels``; a question the user did not write
        here (a reopened analysis, a new file) replaces what was typed."""
        self._labels = (str(labels[0]), str(labels[1]))
        question = self._session.spec.question
        if question != self._seen:
            self._seen = question
            self._pending = None
            self._load(question)
            self.problem.setText("")
        self._fill_units()
        self._show()

    def _fill_units(self) -> None:
        first, second = (visible(label) for label in self._labels)
        current = self.unit.currentData() or "units"
        with QSignalBlocker(self.unit):
            self.unit.clear()
            for key, words in UNIT_WORDS:
                self.unit.addItem(words.format(a=first, b=second), key)
                self.unit.setItemData(self.unit.count() - 1, UNIT_TIPS[key].format(a=first, b=second),
                                      Qt.ItemDataRole.ToolTipRole)
            self.unit.setCurrentIndex(self.unit.findData(current))
        self.unit.setToolTip(UNIT_TIPS[current].format(a=first, b=second))

    def _load(self, question: Question) -> None:
        """Fill the fields from ``question``'s margin (a question without one leaves them)."""
        margin = question.margin
        if margin is None:
            return
        self._loading = True
        try:
            with QSignalBlocker(self.unit), QSignalBlocker(self.worse), QSignalBlocker(self.uneven):
                self.unit.setCurrentIndex(self.unit.findData(margin.unit))
                if margin.worse is not None:
                    self.worse.setCurrentIndex(self.worse.findData(margin.worse))
                    bound = margin.bound
                    self.size.setText(_plain(bound if margin.unit == "ratio" else abs(bound)))
                    self.uneven.setChecked(False)
                elif margin.symmetric:
                    self.size.setText(_plain(margin.high))
                    self.uneven.setChecked(False)
                else:
                    self.low.setText(_plain(margin.low))
                    self.high.setText(_plain(margin.high))
                    self.uneven.setChecked(True)
        finally:
            self._loading = False

    def _show(self) -> None:
        kind = self.shown_kind()
        wanted = kind in MARGIN_KINDS
        self.setVisible(wanted)
        uneven = kind == "equivalent" and self.uneven.isChecked()
        self.uneven.setVisible(kind == "equivalent")
        for widget in (self.plus_minus, self.size):
            widget.setVisible(not uneven)
        self.plus_minus.setVisible(kind == "equivalent" and not uneven)
        for widget in (self.low, self.to_word, self.high):
            widget.setVisible(uneven)
        for widget in (self.worse_label, self.worse):
            widget.setVisible(kind == "not_worse")
        question = self._session.spec.question
        self.problem.setVisible(bool(self.problem.text()))
        shown = question.kind == kind and question.margin is not None and not self.problem.text()
        self.reading.setText(margin_reading(kind, question.margin, self._labels) if shown else "")
        self.reading.setVisible(bool(self.reading.text()))

    # -- to the session ------------------------------------------------------------------------
    def margin(self, kind: str) -> Margin:
        """The margin the fields hold for ``kind``; raises :class:`OptionProblem` with the line to
        show when they hold none."""
        unit = self.unit.currentData() or "units"
        percent = unit == "percent"
        if kind == "equivalent" and self.uneven.isChecked():
            ends = []
            for field, name in ((self.low, "low end"), (self.high, "high end")):
                ends.append(self._number(field, name, percent))
            return Margin.within(ends[0], ends[1], unit)
        size = self._number(self.size, "size", percent)
        if unit == "ratio" and size <= 0:
            raise OptionProblem(message_text("margin_ratio_below_zero", value=_plain(size)))
        if size == (1.0 if unit == "ratio" else 0.0):
            raise OptionProblem(message_text("margin_no_room", value=_plain(abs(size))))
        if kind == "equivalent":
            return Margin.within(size, unit=unit)
        return Margin.not_worse_by(size, self.worse.currentData(), unit)

    def _number(self, field: QLineEdit, name: str, percent: bool) -> float:
        text = field.text()
        if not text.strip():
            raise _Missing(message_text("margin_missing", what=name))
        value = parse_number(text, percent=percent)
        if value is None:
            raise OptionProblem(message_text("margin_not_number", text=text.strip(), what=name))
        return value

    def _uneven_toggled(self, checked: bool) -> None:
        if self._loading:
            return
        if checked and not (self.low.text() or self.high.text()):
            size = parse_number(self.size.text(), percent=self.unit.currentData() == "percent")
            if size is not None and size != 0:  # start the two ends from the even margin
                margin = Margin.within(size, unit=self.unit.currentData()) if self._valid(size) else None
                if margin is not None:
                    self.low.setText(_plain(margin.low))
                    self.high.setText(_plain(margin.high))
        self._edited()

    def _valid(self, size: float) -> bool:
        try:
            Margin.within(size, unit=self.unit.currentData())
        except OptionProblem:
            return False
        return True

    def _edited(self) -> None:
        if self._loading:
            return
        self.unit.setToolTip(UNIT_TIPS[self.unit.currentData()].format(
            a=visible(self._labels[0]), b=visible(self._labels[1])))
        kind = self.shown_kind()
        if kind in MARGIN_KINDS:
            self._write(kind)
        self._show()

    def _write(self, kind: str, *, quiet_when_empty: bool = False) -> None:
        try:
            margin = self.margin(kind)
        except _Missing as missing:
            self._refuse("" if quiet_when_empty and self._session.spec.question.kind != kind else missing.message)
            return
        except OptionProblem as problem:
            self._refuse(problem.message)
            return
        self._ask(kind=kind, margin=margin)

    def _ask(self, **changes: Any) -> None:
        try:
            self._session.ask(**changes)
        except OptionProblem as problem:
            self._refuse(problem.message)
            return
        self._seen = self._session.spec.question
        if self._session.spec.question.kind == self._pending:
            self._pending = None
        self.problem.setText("")
        self._show()

    def _refuse(self, reason: str) -> None:
        """Say in one line what is wrong (with no ``reason``: that the margin is still wanted) and
        which question stays in force."""
        held = in_force_words(self._session.spec.question, self._labels)
        if reason:
            self.problem.setText(message_text("margin_refused", reason=reason, question=held))
        else:
            self.problem.setText(message_text("margin_wanted", question=held))
        self._show()


class _Missing(OptionProblem):
    """A field of the margin left empty."""


def _plain(value: float) -> str:
    """A number as it would be typed: 2, 0.8, 1.25, -3.5."""
    return f"{value:.12g}"
