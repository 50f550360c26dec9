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

from dataclasses import dataclass
from typing import Any, Mapping

from .errors import OptionProblem
from .results import ALTERNATIVES, frozen_mapping

__all__ = ["Question", "Answer", "KINDS", "LEVEL_RANGE"]

# The kinds of question, in the order a user is offered them, each with its alternative.
_ALTERNATIVE_OF: Mapping[str, str] = frozen_mapping({
    "differ": "two-sided",
    "lower": "less",
    "higher": "greater",
})
KINDS: tuple[str, ...] = tuple(_ALTERNATIVE_OF)
# The confidence levels accepted: at least LEVEL_RANGE[0] and below LEVEL_RANGE[1].
LEVEL_RANGE: tuple[float, float] = (0.5, 1.0)


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
    """``kind``: "differ" (two-sided), "lower" or "higher" (group 1 against group 2).

    ``level``: the confidence level of every interval, and 1 - level the p-value below which a
    test is said to find a difference.
    """

    kind: str = "differ"
    level: float = 0.95

    def __post_init__(self) -> None:
        if self.kind not in _ALTERNATIVE_OF:
            raise OptionProblem(
                f"The question must be one of {', '.join(KINDS)}, not '{self.kind}'.")
        low, high = LEVEL_RANGE
        try:
            level = float(self.level)
        except (TypeError, ValueError):
            raise OptionProblem(f"The confidence level must be a number, not '{self.level}'.") from None
        if not low <= level < high:
            raise OptionProblem(
                f"The confidence level must be at least {low} and below {high:g}, not {self.level}.")
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
        """The procedures' name for this question: "two-sided", "less" or "greater"."""
        return _ALTERNATIVE_OF[self.kind]

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
