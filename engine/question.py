"""What the user asks of the two groups, and how surely.

A :class:`Question` is one of a few kinds (do the groups differ; is group 1 lower; is group 1
higher) with a confidence level. The procedures speak in ``alternative`` ("two-sided", "less",
"greater"); the question translates. Kinds that need a margin (equivalence, non-inferiority) fit
here as further kinds with a ``margin`` field, without changing the callers that only read
``kind``, ``level`` and ``alternative``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Mapping

from .errors import OptionProblem
from .results import ALTERNATIVES, frozen_mapping

__all__ = ["Question", "KINDS", "LEVEL_RANGE"]

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
