"""From the checks to one suggested procedure, with reasons, alternatives and cautions."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Mapping

from .results import frozen_mapping

__all__ = ["ConsideredOption", "Recommendation", "recommend"]


@dataclass(frozen=True)
class ConsideredOption:
    """An alternative procedure that was weighed, and why it was not suggested."""

    key: str
    name: str
    why_not: str


@dataclass(frozen=True)
class Recommendation:
    """The suggested procedure, why, what else was weighed, and what to keep in mind."""

    key: str
    name: str
    reasons: tuple[str, ...]
    considered: tuple[ConsideredOption, ...]
    cautions: tuple[str, ...]
    assumptions: Mapping[str, str] = field(default_factory=frozen_mapping)

    def __post_init__(self) -> None:
        object.__setattr__(self, "assumptions", frozen_mapping(self.assumptions))


def recommend(diagnostics, groups, *, equal_spread_known: bool = False, ordinal: bool = False,
              known_sd: tuple[float, float] | None = None) -> Recommendation:
    """Suggest a procedure for these groups (being written: Welch unless told otherwise)."""
    from .analysis import PROCEDURE_NAMES

    if known_sd is not None:
        key = "z"
    elif ordinal:
        key = "mann_whitney"
    elif equal_spread_known:
        key = "pooled_t"
    else:
        key = "welch_t"
    return Recommendation(key, PROCEDURE_NAMES[key], ("provisional",), (), (), {})
