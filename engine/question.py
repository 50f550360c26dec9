"""What the user asks of the two groups, and how surely.

A :class:`Question` is one of a few kinds (do the groups differ; is group 1 lower; is group 1
higher) with a confidence level. The procedures speak in ``alternative`` ("two-sided", "less",
"greater"); the question translates. Kinds that need a margin (equivalence, non-inferiority) fit
here as further kinds with a ``margin`` field, without changing the callers that only read
``kind``, ``level`` and ``alternative``.

The question also owns its verdict: :meth:`Question.finds` says whether a result answers it
with "yes" at its level, :meth:`Question.answer` gathers what a result says to it (an
:class:`Answer`), and :meth:`Question.verdict_words`, :meth:`Question.reading` and
:meth:`Question.claim` put that in words ("finds a difference" only makes sense for some
questions; an equivalence question will say "finds the groups equivalent").
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Callable, Mapping

from .errors import OptionProblem
from .results import ALTERNATIVES, Interval, frozen_mapping
from .rounding import fixed, shared_decimals

__all__ = ["Question", "Answer", "Margin", "MarginAnswer", "MARGIN_CASES", "KINDS", "MARGIN_KINDS", "ALL_KINDS", "MARGIN_UNITS",
           "WORSE", "LEVEL_RANGE"]

# The kinds of question, in the order a user is offered them, each with its alternative.
_ALTERNATIVE_OF: Mapping[str, str] = frozen_mapping({
    "differ": "two-sided",
    "lower": "less",
    "higher": "greater",
})
# The kinds about a difference; every procedure answers these (the registry's default).
KINDS: tuple[str, ...] = tuple(_ALTERNATIVE_OF)
# The kinds that need a margin: are the groups equivalent within it; is group 1 not worse than
# group 2 by more than it. Only procedures built for them answer them.
MARGIN_KINDS: tuple[str, ...] = ("equivalent", "not_worse")
ALL_KINDS: tuple[str, ...] = KINDS + MARGIN_KINDS
# How a margin was entered: in the measurement's units, as a percentage of group 2's mean, or as
# a ratio of group 1's (geometric) mean to group 2's.
MARGIN_UNITS: tuple[str, ...] = ("units", "percent", "ratio")
# Which direction is worse, for a non-inferiority question.
WORSE: tuple[str, ...] = ("lower", "higher")
# The confidence levels accepted: at least LEVEL_RANGE[0] and below LEVEL_RANGE[1].
LEVEL_RANGE: tuple[float, float] = (0.5, 1.0)


@dataclass(frozen=True)
class Margin:
    """The margin of an equivalence or non-inferiority question.

    ``low`` and ``high``: the ends of the equivalence margin, around no difference (``low`` < 0 <
    ``high`` for "units" and "percent", ``low`` < 1 < ``high`` for "ratio"). ``unit``: how it
    was entered (see ``MARGIN_UNITS``; "percent" ends are percentages of group 2's mean).
    ``worse``: for a non-inferiority question, the direction that is worse ("lower" or
    "higher"); its margin is then ``bound``, the end on the worse side. Build one with
    :meth:`within` or :meth:`not_worse_by`.
    """

    low: float
    high: float
    unit: str = "units"
    worse: str | None = None

    def __post_init__(self) -> None:
        if self.unit not in MARGIN_UNITS:
            raise OptionProblem(
                f"The margin must be in {', '.join(MARGIN_UNITS)}, not '{self.unit}'.")
        if self.worse is not None and self.worse not in WORSE:
            raise OptionProblem(f"Say which direction is worse: 'lower' or 'higher', not '{self.worse}'.")
        try:
            low, high = float(self.low), float(self.high)
        except (TypeError, ValueError):
            raise OptionProblem("The margin must be given as numbers.") from None
        centre = self.no_difference
        if not (math.isfinite(low) and math.isfinite(high)) or not low < centre < high:
            kind = "a ratio margin" if self.unit == "ratio" else "the margin"
            raise OptionProblem(
                f"The ends of {kind} must lie either side of {centre:g} (no difference), "
                f"not {low:g} to {high:g}.")
        if self.unit == "ratio" and low <= 0:
            raise OptionProblem(f"A ratio margin must be above 0, not {low:g}.")
        object.__setattr__(self, "low", low)
        object.__setattr__(self, "high", high)

    @classmethod
    def within(cls, low: float, high: float | None = None, unit: str = "units") -> "Margin":
        """The equivalence margin ``low`` to ``high``; ``high`` None: -``low`` to +``low`` (for a
        ratio, 1/``low`` to ``low`` with ``low`` above 1, or ``low`` to 1/``low`` below 1)."""
        if high is None:
            try:
                size = abs(float(low))
            except (TypeError, ValueError):
                raise OptionProblem("The margin must be a number.") from None
            if unit == "ratio":
                return cls(min(size, 1 / size), max(size, 1 / size), unit) if size > 0 else cls(0.0, 1.0, unit)
            return cls(-size, size, unit)
        return cls(low, high, unit)

    @classmethod
    def not_worse_by(cls, size: float, worse: str, unit: str = "units") -> "Margin":
        """Group 1 may be worse than group 2 by at most ``size`` (a positive number; for a ratio,
        the ratio allowed on the worse side, such as 0.8 when lower is worse)."""
        try:
            size = float(size)
        except (TypeError, ValueError):
            raise OptionProblem("The margin must be a number.") from None
        if unit == "ratio":
            if not (math.isfinite(size) and size > 0 and size != 1):
                raise OptionProblem(f"A ratio margin must be a positive number other than 1, not {size:g}.")
            return cls(min(size, 1 / size), max(size, 1 / size), unit, worse)
        if not (math.isfinite(size) and size > 0):
            raise OptionProblem(f"The non-inferiority margin must be a positive number, not {size:g}.")
        return cls(-size, size, unit, worse)

    @property
    def no_difference(self) -> float:
        """The value of the estimate when the groups do not differ: 1 for a ratio, else 0."""
        return 1.0 if self.unit == "ratio" else 0.0

    @property
    def bound(self) -> float:
        """The end on the worse side (a non-inferiority margin); ``low`` when unstated."""
        return self.high if self.worse == "higher" else self.low

    @property
    def symmetric(self) -> bool:
        if self.unit == "ratio":
            return math.isclose(self.low * self.high, 1.0, rel_tol=1e-12)
        return self.low == -self.high

    def in_units(self, reference_mean: float) -> "Margin":
        """This margin in the measurement's units: a percentage margin times |``reference_mean``|
        (group 2's mean) / 100; a margin in units or as a ratio is returned as it is."""
        if self.unit != "percent":
            return self
        reference = float(reference_mean)
        if not math.isfinite(reference) or reference == 0:
            raise OptionProblem(
                "A margin given as a percentage of group 2's mean needs that mean to be a number "
                f"other than 0, not {reference:g}; give the margin in the measurement's units.")
        scale = abs(reference) / 100.0
        return Margin(self.low * scale, self.high * scale, "units", self.worse)

    def note(self, reference_mean: float | None = None) -> str:
        """How the margin was entered, for a result's method: "the margin -0.5 to 0.5 in the
        measurement's units", "the margin -5% to 5% of group 2's mean 8.4, that is -0.42 to 0.42
        in the measurement's units", "the margin 0.8 to 1.25 as a ratio"."""
        ends = f"{self.low:g} to {self.high:g}"
        if self.unit == "ratio":
            return f"the margin {ends} as a ratio"
        if self.unit == "units":
            return f"the margin {ends} in the measurement's units"
        units = self.in_units(reference_mean)
        return (f"the margin {self.low:g}% to {self.high:g}% of group 2's mean {reference_mean:.6g}, "
                f"that is {units.low:.6g} to {units.high:.6g} in the measurement's units")

    def to_dict(self) -> dict[str, Any]:
        return {"low": self.low, "high": self.high, "unit": self.unit, "worse": self.worse}

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> "Margin":
        """The margin :meth:`to_dict` wrote; an unknown member raises :class:`OptionProblem`."""
        if not isinstance(data, Mapping):
            raise OptionProblem("The margin must be a set of named members.")
        unknown = sorted(set(data) - {"low", "high", "unit", "worse"})
        if unknown:
            raise OptionProblem(f"Unknown member in the margin: {', '.join(unknown)}.")
        return cls(**data)


# What an interval says against a margin. Equivalence: inside the margin or not, crossed with
# leaving no difference out or not (the four cases). Non-inferiority: better, not worse, worse by
# more than the margin, or not clear.
MARGIN_CASES: tuple[str, ...] = (
    "equivalent", "equivalent_but_different", "different_not_equivalent", "inconclusive",
    "better", "not_worse", "worse", "not_shown_not_worse")
_MARGIN_READINGS: Mapping[str, str] = frozen_mapping({
    "equivalent": "equivalent",
    "equivalent_but_different": "equivalent, with a difference smaller than the margin",
    "different_not_equivalent": "differ, not equivalent",
    "inconclusive": "not clear either way",
    "better": "better",
    "not_worse": "not worse",
    "worse": "worse by more than the margin",
    "not_shown_not_worse": "not clear",
})


@dataclass(frozen=True)
class MarginAnswer:
    """What a result says to a margin question.

    ``case``: one of ``MARGIN_CASES``. ``interval``: the two-sided (1 - 2 alpha) interval set
    against the margin. ``difference_interval``: the two-sided (1 - alpha) interval that says
    whether the groups differ (equivalence only). ``margin``: the margin in the estimate's
    units (a percentage already converted). ``beyond``: the whole interval lies outside the
    margin (equivalence) or past its worse end (non-inferiority).
    """

    case: str
    interval: Interval
    difference_interval: Interval | None
    margin: Margin
    beyond: bool = False

    @property
    def yes(self) -> bool:
        """Whether the question is answered "yes" (equivalent; not worse, or better)."""
        return self.case in ("equivalent", "equivalent_but_different", "better", "not_worse")


def _ends(interval: Interval) -> tuple[float, float]:
    """The ends of ``interval`` with an open end as an infinity (NaN stays NaN)."""
    low = -math.inf if interval.low is None else float(interval.low)
    high = math.inf if interval.high is None else float(interval.high)
    return low, high


def _percent(fraction: float) -> str:
    """A level or an alpha as a percentage: 0.05 -> "5%", 0.975 -> "97.5%"."""
    return f"{round(fraction * 100, 6):.10g}%"


@dataclass(frozen=True)
class Answer:
    """What one result says to the question.

    ``decided``: the result gives a p-value or an interval to judge by. ``yes``: it gives clear
    evidence of what the question looks for, at the question's level. ``other_way``: a one-sided
    question whose estimate points the other way; ``other_way_clear``: the question in the other
    direction would have been answered "yes" at the same level.
    """

    decided: bool
    yes: bool = False
    other_way: bool = False
    other_way_clear: bool = False


@dataclass(frozen=True)
class Question:
    """``kind``: "differ" (two-sided), "lower" or "higher" (group 1 against group 2), or one of
    ``MARGIN_KINDS``: "equivalent" (within ``margin``) or "not_worse" (group 1 not worse than
    group 2 by more than ``margin``, whose ``worse`` says which direction is worse).

    ``level``: the confidence level of every interval, and 1 - level the p-value below which a
    test is said to find a difference. For a margin kind 1 - level is the test's alpha, and the
    interval set against the margin is the (1 - 2 alpha) two-sided one.
    ``margin``: a :class:`Margin`, given exactly for the margin kinds.
    """

    kind: str = "differ"
    level: float = 0.95
    margin: Margin | None = None

    def __post_init__(self) -> None:
        if self.kind not in ALL_KINDS:
            raise OptionProblem(
                f"The question must be one of {', '.join(ALL_KINDS)}, not '{self.kind}'.")
        if self.kind in MARGIN_KINDS:
            if not isinstance(self.margin, Margin):
                raise OptionProblem("An equivalence or non-inferiority question needs a margin.")
            if (self.kind == "not_worse") != (self.margin.worse is not None):
                raise OptionProblem(
                    "A non-inferiority question says which direction is worse; an equivalence "
                    "question does not.")
        elif self.margin is not None:
            raise OptionProblem(f"A margin belongs to an equivalence or non-inferiority question, "
                                f"not to '{self.kind}'.")
        low, high = LEVEL_RANGE
        try:
            level = float(self.level)
        except (TypeError, ValueError):
            raise OptionProblem(f"The confidence level must be a number, not '{self.level}'.") from None
        if not low <= level < high:
            raise OptionProblem(
                f"The confidence level must be at least {low} and below {high:g}, not {self.level}.")
        if self.kind in MARGIN_KINDS and level == low:
            raise OptionProblem(f"The level of an equivalence or non-inferiority question must be "
                                f"above {low}, not {self.level}.")
        object.__setattr__(self, "level", level)

    @classmethod
    def from_alternative(cls, alternative: str, level: float = 0.95) -> "Question":
        """The question whose procedures take ``alternative``."""
        for kind, said in _ALTERNATIVE_OF.items():
            if said == alternative:
                return cls(kind, level)
        raise OptionProblem(
            f"The direction must be one of {', '.join(ALTERNATIVES)}, not '{alternative}'.")

    @property
    def alternative(self) -> str:
        """The procedures' name for this question: "two-sided", "less" or "greater". An
        equivalence question is two-sided; a non-inferiority question looks away from the worse
        side ("greater" when lower is worse)."""
        if self.kind == "not_worse":
            return "greater" if self.margin.worse == "lower" else "less"
        return _ALTERNATIVE_OF.get(self.kind, "two-sided")

    @property
    def has_margin(self) -> bool:
        return self.kind in MARGIN_KINDS

    def to_dict(self) -> dict[str, Any]:
        """Plain values; the margin only when there is one (an older file has none)."""
        plain: dict[str, Any] = {"kind": self.kind, "level": self.level}
        if self.margin is not None:
            plain["margin"] = self.margin.to_dict()
        return plain

    @property
    def one_sided(self) -> bool:
        return self.alternative != "two-sided"

    @property
    def alpha(self) -> float:
        """The p-value below which a test answers the question with "yes"."""
        return 1.0 - self.level

    # -- the verdict -------------------------------------------------------------------------

    def finds(self, *, p_value: float | None = None, interval: Any = None,
              no_difference: float = 0.0) -> bool | None:
        """Whether a result answers the question with "yes": its p-value below ``alpha``, or,
        for an interval without a test, the interval leaving ``no_difference`` out (an end that
        could not be computed, NaN, leaves nothing out). None when it gives neither."""
        if p_value is not None:
            return bool(p_value < self.alpha)
        if interval is None:
            return None
        ends = (interval.low, interval.high)
        if any(end is not None and end != end for end in ends):
            return False
        return not interval.contains(no_difference)

    def points_other_way(self, estimate: float | None, no_difference: float = 0.0) -> bool:
        """Whether a one-sided question points the other way from ``estimate`` ("is group 1
        higher?" with group 1 lower in the data, or the reverse); ``no_difference`` is the
        estimate's value when the groups do not differ (1/2 for a probability)."""
        if estimate is None or estimate != estimate:
            return False
        return ((self.alternative == "greater" and estimate < no_difference)
                or (self.alternative == "less" and estimate > no_difference))

    def other_way_clear(self, p_value: float | None) -> bool:
        """Whether the one-sided question in the other direction would have been clear at the
        same level: its p-value, 1 - p for a continuous statistic, is below ``alpha``."""
        return p_value is not None and 1.0 - p_value < self.alpha

    def answer(self, *, finds: bool | None, estimate: float | None = None,
               p_value: float | None = None, no_difference: float = 0.0) -> Answer:
        """What a result says to the question: ``finds`` as :meth:`finds` gave it (None: nothing
        to judge by), its estimate and p-value for the direction of the data."""
        other_way = self.points_other_way(estimate, no_difference)
        return Answer(decided=finds is not None, yes=bool(finds), other_way=other_way,
                      other_way_clear=other_way and self.other_way_clear(p_value))

    # -- the verdict in words -----------------------------------------------------------------

    def _word(self) -> str:
        return "higher" if self.alternative == "greater" else "lower"

    def _other(self) -> str:
        return "lower" if self.alternative == "greater" else "higher"

    def claim(self, labels: tuple[str, str]) -> str:
        """What the question looks for: "a difference between the groups" or "A being lower
        than B"."""
        if not self.one_sided:
            return "a difference between the groups"
        return f"{labels[0]} being {self._word()} than {labels[1]}"

    def other_way_words(self, labels: tuple[str, str], clear: bool) -> str:
        """The sentences for a one-sided question asked against the direction of the data."""
        first, second = labels
        strength = "clearly " if clear else ""
        return (f"The data point {strength}the other way: here {first} was {self._other()} than "
                f"{second}, while the question asked whether {first} is {self._word()}. A "
                "one-sided question cannot find a difference in the direction it did not ask about, "
                "so this result is no sign that the groups are alike; to look for a difference either "
                "way, the two-sided question has to be chosen before the data are seen.")

    def verdict_words(self, answer: Answer, labels: tuple[str, str], level_text: str) -> str:
        """What a result says at the chosen level, in one or more sentences ("" when it gives
        nothing to judge by), so that a sample difference is not read as a finding when the
        data cannot tell it from chance (and the reverse)."""
        if not answer.decided and not answer.other_way:
            return ""
        claim = self.claim(labels)
        if answer.yes:
            return f"At {level_text} confidence the data give clear evidence of {claim}."
        if answer.other_way:
            return (f"At {level_text} confidence the data give no evidence of {claim}, the "
                    f"direction asked about. {self.other_way_words(labels, answer.other_way_clear)}")
        return (f"At {level_text} confidence the data do not give clear evidence of {claim}; "
                "that does not show the groups are the same.")

    def reading(self, answer: Answer, labels: tuple[str, str]) -> str:
        """The verdict of one result in a few words, as the side-by-side table writes it."""
        if answer.yes:
            return "finds a difference" if not self.one_sided else f"finds {labels[0]} {self._word()}"
        if answer.other_way:
            return "not clear: the data point the other way"
        return "no clear difference" if not self.one_sided else "not clear"

    # -- the verdict against a margin --------------------------------------------------------

    def margin_answer(self, interval: Interval, difference_interval: Interval | None = None, *,
                      margin: Margin | None = None) -> MarginAnswer:
        """What the (1 - 2 alpha) two-sided ``interval`` says against the margin.

        ``margin``: the question's margin in the estimate's units (needed when it was given as a
        percentage; see :meth:`Margin.in_units`). ``difference_interval``: the two-sided
        (1 - alpha) interval, needed for an equivalence question (does it leave no difference
        out?). Ends are compared strictly: an interval touching the margin is not inside it, as
        the two one-sided tests do not reject at p = alpha. An end that could not be computed
        (NaN) shows nothing.
        """
        if not self.has_margin:
            raise OptionProblem(f"A '{self.kind}' question has no margin to judge against.")
        margin = self.margin if margin is None else margin
        if margin.unit == "percent":
            raise OptionProblem("Convert a percentage margin to units (Margin.in_units) first.")
        low, high = _ends(interval)
        zero = margin.no_difference
        if self.kind == "equivalent":
            if difference_interval is None:
                raise OptionProblem("An equivalence verdict needs the (1 - alpha) interval as well.")
            inside = margin.low < low and high < margin.high
            d_low, d_high = _ends(difference_interval)
            different = d_low > zero or d_high < zero
            beyond = high <= margin.low or low >= margin.high
            case = ("equivalent_but_different" if different else "equivalent") if inside else (
                "different_not_equivalent" if different else "inconclusive")
            return MarginAnswer(case, interval, difference_interval, margin, beyond)
        sign = 1.0 if margin.worse == "lower" else -1.0
        good_end, bad_end = (low, high) if sign > 0 else (high, low)
        if sign * (good_end - zero) > 0:
            case = "better"
        elif sign * (good_end - margin.bound) > 0:
            case = "not_worse"
        elif sign * (bad_end - margin.bound) < 0:
            case = "worse"
        else:
            case = "not_shown_not_worse"
        return MarginAnswer(case, interval, difference_interval, margin, case == "worse")

    def margin_reading(self, answer: MarginAnswer) -> str:
        """The verdict against the margin in a few words."""
        return _MARGIN_READINGS[answer.case]

    def margin_text(self, margin: Margin, labels: tuple[str, str], decimals: int | None = None) -> str:
        """The margin as the verdict names it: "±0.5", "-0.4 to 0.7", "a ratio of 0.8 to 1.25";
        for a non-inferiority question the size on the worse side; a percentage margin adds what
        it was entered as: "±0.42 (±5% of B's mean)"."""
        given = self.margin

        def number(value: float) -> str:
            return fixed(value, decimals)

        def span(m: Margin, show: Callable[[float], str]) -> str:
            if self.kind == "not_worse":
                return show(abs(m.bound - m.no_difference)) if m.unit != "ratio" else show(m.bound)
            if m.symmetric and m.unit != "ratio":
                return f"±{show(m.high)}"
            return f"{show(m.low)} to {show(m.high)}"

        text = span(margin, number)
        if given.unit == "ratio":
            return f"a ratio of {text}"
        if given.unit == "percent":
            as_given = span(given, lambda v: f"{v:g}%")
            return f"{text} ({as_given} of {labels[1]}'s mean)"
        return text

    def margin_words(self, answer: MarginAnswer, labels: tuple[str, str],
                     estimate_name: str = "difference in means") -> str:
        """The verdict against the margin in sentences, numbers rounded together."""
        margin, interval = answer.margin, answer.interval
        low, high = _ends(interval)
        shown = [margin.low, margin.high, low, high]
        if answer.difference_interval is not None:
            shown += list(_ends(answer.difference_interval))
        decimals = shared_decimals(shown)

        def number(value: float) -> str:
            return fixed(value, decimals)

        def ends(values: tuple[float, float]) -> str:
            return f"{number(values[0])} to {number(values[1])}"

        size = self.margin_text(margin, labels, decimals)
        alpha, narrow, wide = _percent(self.alpha), _percent(interval.level), _percent(self.level)
        zero = f"{margin.no_difference:g}"
        first, second = labels
        at = f"at the {alpha} level"
        ci = f"the {narrow} confidence interval of the {estimate_name}, {ends((low, high))}"
        case = answer.case
        if self.kind == "equivalent":
            bounds = ends((margin.low, margin.high))
            wide_ci = f"the {wide} interval, {ends(_ends(answer.difference_interval))}"
            if case == "equivalent":
                return (f"Equivalent within {size} {at}: {ci}, lies inside the margin {bounds}. "
                        f"No difference is shown either: {wide_ci}, includes {zero}.")
            if case == "equivalent_but_different":
                return (f"Equivalent within {size} {at}: {ci}, lies inside the margin {bounds}. "
                        f"The groups do differ, by less than the margin: {wide_ci}, leaves out {zero}.")
            where = "lies wholly outside" if answer.beyond else "reaches past"
            if case == "different_not_equivalent":
                more = ", by more than the margin allows" if answer.beyond else ""
                return (f"Not shown to be equivalent within {size} {at}: {ci}, {where} the margin "
                        f"{bounds}. The groups differ{more}: {wide_ci}, leaves out {zero}.")
            return (f"Not shown to be equivalent within {size} {at}, and no difference is shown "
                    f"either: {ci}, {where} the margin {bounds}, while {wide_ci}, includes {zero}. "
                    "The data cannot tell the two apart yet; more measurements narrow the interval.")
        bound = number(margin.bound)
        good = "above" if margin.worse == "lower" else "below"
        bad = "below" if margin.worse == "lower" else "above"
        claim = f"{first} is not worse than {second} by more than {size}"
        if case == "better":
            return (f"At the {alpha} level, {claim}, and is shown to be better: {ci}, lies wholly "
                    f"{good} {zero}.")
        if case == "not_worse":
            return f"At the {alpha} level, {claim}: {ci}, lies wholly {good} the margin {bound}."
        if case == "worse":
            return (f"At the {alpha} level, {first} is worse than {second} by more than {size}: "
                    f"{ci}, lies wholly {bad} the margin {bound}.")
        return (f"At the {alpha} level it is not shown that {claim}: {ci}, reaches {bad} the "
                f"margin {bound}. Nor is it shown to be worse by more than that: the interval "
                "reaches the other side of the margin too.")
