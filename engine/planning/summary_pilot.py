"""A pilot known only by its summary statistics (each group's n, mean and SD): what a plan of the
next study can take from it, and what it cannot.

Summaries give the spread (the SDs), the sizes and the difference observed, so the normal-theory
power of the t and z tests can be worked out from them. They do not give the shape of the values:
resampling the pilot, a rank test's power (which hangs on that shape), or a simulation under an
assumed shape would rest on something the summaries never showed. :meth:`SummaryPilot.refuse`
says so in one line; give the SDs themselves (``--sd``) to plan under an assumed shape.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

from ..errors import OptionProblem
from ..group_stats import GroupStats

__all__ = ["SummaryPilot", "towards"]


def towards(kind: str, difference: float) -> float:
    """``difference`` turned the way a one-sided question asks (its size kept): a plan of
    "is group 1 lower" looks for a difference below 0, of "is group 1 higher" above 0."""
    if kind == "lower":
        return -abs(difference)
    if kind == "higher":
        return abs(difference)
    return difference


@dataclass(frozen=True)
class SummaryPilot:
    """Two groups known by their summary statistics (group 1 first), as a pilot for a plan;
    ``source`` names where they came from (a saved analysis's file name), or ""."""

    stats: tuple[GroupStats, GroupStats]
    source: str = ""

    def __post_init__(self) -> None:
        stats = tuple(self.stats)
        if len(stats) != 2 or not all(isinstance(s, GroupStats) for s in stats):
            raise OptionProblem("A pilot of summary statistics takes exactly two groups, group 1 first.")
        object.__setattr__(self, "stats", stats)

    @classmethod
    def of_analysis(cls, analysis: Any, source: str = "") -> "SummaryPilot":
        """The pilot of an :class:`engine.summary_analysis.SummaryAnalysis` (its ``stats``)."""
        return cls(tuple(analysis.stats), source)

    @property
    def labels(self) -> tuple[str, str]:
        return (self.stats[0].label, self.stats[1].label)

    @property
    def sizes(self) -> tuple[int, int]:
        return (self.stats[0].n, self.stats[1].n)

    @property
    def difference(self) -> float:
        """The difference of the means, group 1 minus group 2."""
        return self.stats[0].mean - self.stats[1].mean

    @property
    def known(self) -> bool:
        """Whether both SDs were entered as known population values."""
        return all(s.sd_known for s in self.stats)

    @property
    def pooled_sd(self) -> float:
        """The pooled SD: sqrt(((n1 - 1) s1^2 + (n2 - 1) s2^2) / (n1 + n2 - 2))."""
        (n1, n2), (s1, s2) = self.sizes, self.sds()
        return math.sqrt(((n1 - 1) * s1 * s1 + (n2 - 1) * s2 * s2) / (n1 + n2 - 2))

    def sds(self) -> tuple[float, float]:
        """Each group's SD (from its standard error when that was given)."""
        return (self.stats[0].standard_deviation, self.stats[1].standard_deviation)

    def sds_for(self, procedure: str) -> tuple[float, float | None]:
        """The SD (and group 2's, None when the same) a plan of ``procedure`` takes: the pooled
        SD for the pooled t-test, each group's own otherwise."""
        if procedure == "pooled":
            return self.pooled_sd, None
        first, second = self.sds()
        return first, (None if second == first else second)

    def refuse(self, *, procedure: str, design: str = "independent", method: str = "auto",
               shape: str = "normal") -> None:
        """Raise :class:`OptionProblem` (one line saying why) for what summaries cannot give."""
        if design == "paired":
            raise OptionProblem("Summary statistics of two groups do not give the spread of pair "
                                "differences; for a paired plan give the SD of the differences with --sd.")
        if procedure == "mann_whitney":
            raise OptionProblem("A rank test's power hangs on the shape of the values, which summary "
                                "statistics do not show; plan the Welch, pooled or z test from them, or "
                                "take the values themselves as the pilot.")
        if shape != "normal" or method == "simulation":
            raise OptionProblem("From summary statistics the power is worked out by the normal-theory "
                                "formulas; a simulation would rest on a shape of the values they do not "
                                "show (give the SDs with --sd to simulate a shape assumed).")

    def expected_difference(self, kind: str) -> float:
        """The difference a plan of a question of ``kind`` takes when none is given: the one
        observed, turned the way a one-sided question asks; 0 for a margin question (the
        difference expected when the groups are the same)."""
        return 0.0 if kind in ("equivalent", "not_worse") else towards(kind, self.difference)

    def to_dict(self) -> dict[str, Any]:
        return {"source": self.source, "labels": list(self.labels), "n": list(self.sizes),
                "means": [s.mean for s in self.stats], "sds": list(self.sds()),
                "sds_known": self.known}
