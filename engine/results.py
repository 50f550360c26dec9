"""Typed, immutable result objects shared by every stage of the engine.

Raw numbers only: nothing here is rounded (rounding belongs to ``engine.report``). Field names
never depend on options. Every difference and every signed effect size is group 1 minus group 2.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any, Literal, Mapping

import numpy as np

__all__ = [
    "Alternative",
    "ALTERNATIVES",
    "Interval",
    "Groups",
    "GroupSummary",
    "ProcedureResult",
    "EffectSize",
    "Finding",
    "frozen_mapping",
    "readonly_array",
]

Alternative = Literal["two-sided", "less", "greater"]
ALTERNATIVES: tuple[str, ...] = ("two-sided", "less", "greater")


def frozen_mapping(items: Mapping[str, Any] | None = None) -> Mapping[str, Any]:
    """A read-only view of a copy of ``items`` (for the ``details`` fields)."""
    return MappingProxyType(dict(items or {}))


def readonly_array(values: Any) -> np.ndarray:
    """``values`` as a float64 array that cannot be written to: a copy, unless ``values`` is
    already a read-only float64 array that owns its memory (then no view can change it)."""
    if (isinstance(values, np.ndarray) and values.dtype == np.float64 and values.base is None
            and not values.flags.writeable):
        return values
    array = np.array(values, dtype=float, copy=True)
    array.setflags(write=False)
    return array


@dataclass(frozen=True)
class Interval:
    """A confidence interval. ``None`` marks the open end of a one-sided interval.

    ``low_open`` / ``high_open`` mark a finite end that is itself excluded (the interval of a
    test inverted over shifts can stop just short of a value the test rejects).
    """

    low: float | None
    high: float | None
    level: float
    low_open: bool = False
    high_open: bool = False

    @classmethod
    def for_alternative(cls, low: float, high: float, level: float, alternative: str) -> "Interval":
        """Open the end that a one-sided alternative leaves unbounded.

        For ``"greater"`` (group 1 larger) the interval is [low, +inf): ``high`` becomes None;
        for ``"less"`` it is (-inf, high]: ``low`` becomes None.
        """
        if alternative == "greater":
            return cls(float(low), None, level)
        if alternative == "less":
            return cls(None, float(high), level)
        return cls(float(low), float(high), level)

    def contains(self, value: float) -> bool:
        above = self.low is None or self.low < value or (self.low == value and not self.low_open)
        below = self.high is None or value < self.high or (value == self.high and not self.high_open)
        return above and below


@dataclass(frozen=True, eq=False)
class Groups:
    """Two clean samples of finite numbers with their labels; group 1 is ``x``."""

    labels: tuple[str, str]
    x: np.ndarray
    y: np.ndarray

    def __post_init__(self) -> None:
        object.__setattr__(self, "x", readonly_array(self.x))
        object.__setattr__(self, "y", readonly_array(self.y))
        object.__setattr__(self, "labels", (str(self.labels[0]), str(self.labels[1])))

    @property
    def n(self) -> tuple[int, int]:
        return (int(self.x.size), int(self.y.size))


@dataclass(frozen=True)
class GroupSummary:
    """Descriptive statistics of one group (sd with n - 1 in the denominator)."""

    label: str
    n: int
    mean: float
    sd: float
    median: float
    min: float
    max: float
    q1: float
    q3: float


@dataclass(frozen=True, eq=False)
class ProcedureResult:
    """The outcome of one procedure on two groups.

    ``estimate`` is the procedure's own estimate of the difference, group 1 minus group 2 (a
    difference in means, in medians, or the Hodges-Lehmann shift; ``estimate_name`` says which).
    ``statistic`` and ``p_value`` are None for interval-only procedures (the bootstrap);
    ``interval`` is None only where the procedure gives none (``method`` then says so).
    ``method`` names how the p-value and interval were found in plain words, e.g. "exact
    permutation distribution of the rank sum (ties kept as mid-ranks)". ``details`` holds other
    raw numbers (U, z, variances, the percentile interval of a bootstrap, ...). ``distribution``
    keeps a resampled or permutation distribution where there is one. ``warnings`` are sentences a
    user must see (for example a forced switch from exact to normal approximation).
    """

    key: str
    name: str
    estimate: float
    estimate_name: str
    statistic: float | None
    statistic_name: str | None
    df: float | None
    p_value: float | None
    interval: Interval | None
    alternative: str
    method: str
    details: Mapping[str, Any] = field(default_factory=frozen_mapping)
    warnings: tuple[str, ...] = ()
    mc_standard_error: float | None = None
    distribution: np.ndarray | None = None

    def __post_init__(self) -> None:
        object.__setattr__(self, "details", frozen_mapping(self.details))
        object.__setattr__(self, "warnings", tuple(self.warnings))
        if self.distribution is not None:
            object.__setattr__(self, "distribution", readonly_array(self.distribution))


@dataclass(frozen=True)
class EffectSize:
    """A standardised effect size with its confidence interval; signed, group 1 minus group 2."""

    key: str
    name: str
    value: float
    interval: Interval
    method: str
    details: Mapping[str, Any] = field(default_factory=frozen_mapping)

    def __post_init__(self) -> None:
        object.__setattr__(self, "details", frozen_mapping(self.details))


@dataclass(frozen=True)
class Finding:
    """One thing the engine noticed, as a plain-language sentence.

    ``severity``: "info" (for the record), "note" (worth reading), "warning" (may change the
    choice of procedure or the reading of the result). ``key`` is stable for tests and the window;
    ``group`` is 0 or 1 when the finding is about one group, None otherwise.
    """

    key: str
    severity: Literal["info", "note", "warning"]
    text: str
    group: int | None = None
