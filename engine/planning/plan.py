"""What a planner asks: the frozen :class:`Plan` (sample size, power or smallest detectable
difference, with the assumptions behind it) and :class:`Pilot` (values from a pilot study whose
shape the simulation resamples).

A plan is checked once, when it is made; every message is one sentence a user can read. The
difference is always group 1 minus group 2, as in the analysis; the question (its kind, level
and margin) is the analysis's own :class:`engine.question.Question`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, fields, replace
from typing import Any, Mapping

import numpy as np

from ..errors import DataProblem, OptionProblem
from ..question import Margin, Question
from ..results import readonly_array

__all__ = ["Plan", "Pilot", "FINDS", "PROCEDURES", "DESIGNS", "SHAPES", "METHODS",
           "MIN_N", "MAX_N", "MIN_SIMULATIONS", "MAX_SIMULATIONS"]

# What a plan finds: the sample size, the power, or the smallest detectable difference.
FINDS: tuple[str, ...] = ("n", "power", "difference")
# The procedure the planned study will use (for a paired design the t procedures are the paired
# t-test and Mann-Whitney's counterpart is the Wilcoxon signed-rank test).
PROCEDURES: tuple[str, ...] = ("welch", "pooled", "z", "mann_whitney")
DESIGNS: tuple[str, ...] = ("independent", "paired")
# How the values are assumed to vary around their mean when the power is simulated.
SHAPES: tuple[str, ...] = ("normal", "skewed", "heavy_tailed")
# How the power is found: "auto" picks the exact formula where there is one (t and z tests under
# normal spread), else a simulation; "approximation" is the asymptotic formula of the rank test.
METHODS: tuple[str, ...] = ("auto", "exact", "approximation", "simulation")
# Sizes a plan may give or find, per group (pairs for a paired design).
MIN_N = 2
MAX_N = 10_000_000
MIN_SIMULATIONS = 100
MAX_SIMULATIONS = 10_000_000


def _number(value: Any, what: str) -> float:
    try:
        number = float(value)
    except (TypeError, ValueError):
        raise OptionProblem(f"The {what} must be a number, not '{value}'.") from None
    if not math.isfinite(number):
        raise OptionProblem(f"The {what} must be a finite number, not {value}.")
    return number


def _positive(value: Any, what: str) -> float:
    number = _number(value, what)
    if not number > 0:
        raise OptionProblem(f"The {what} must be above 0, not {value}.")
    return number


def _size(value: Any, what: str) -> int:
    number = _number(value, what)
    if number != int(number) or not MIN_N <= number <= MAX_N:
        raise OptionProblem(f"The {what} must be a whole number from {MIN_N} to {MAX_N:,}, not {value}.")
    return int(number)


def _choice(value: Any, choices: tuple[str, ...], what: str) -> str:
    if value not in choices:
        raise OptionProblem(f"The {what} must be one of {', '.join(choices)}, not '{value}'.")
    return value


@dataclass(frozen=True, eq=False)
class Pilot:
    """Values from a pilot study: two groups (independent design) or the pair differences
    (group 1 minus group 2; paired design, ``group2`` None).

    Each group keeps its own shape and spread; the simulation centres it and shifts group 1 by
    the difference to detect. ``labels`` name the groups in the sentences; ``source`` names
    where the values came from (a file's name), or "".
    """

    group1: np.ndarray
    group2: np.ndarray | None = None
    labels: tuple[str, str] = ("group 1", "group 2")
    source: str = ""

    def __post_init__(self) -> None:
        for name in ("group1", "group2"):
            values = getattr(self, name)
            if values is None:
                continue
            which = self.labels[0 if name == "group1" else 1] if self.group2 is not None else "differences"
            array = np.asarray(values, dtype=float).ravel()
            if array.size < 2:
                raise DataProblem(f"The pilot {which} need at least 2 values, not {array.size}.")
            if not np.all(np.isfinite(array)):
                raise DataProblem(f"The pilot {which} hold a missing or infinite value.")
            if array.min() == array.max() and self.group2 is not None:
                raise DataProblem(f"Every pilot value of {which} is the same; their spread cannot "
                                  "be resampled.")
            object.__setattr__(self, name, readonly_array(array))
        if self.group2 is None and self.group1.min() == self.group1.max():
            raise DataProblem("Every pilot difference is the same; their spread cannot be resampled.")

    @property
    def paired(self) -> bool:
        return self.group2 is None

    @classmethod
    def of_groups(cls, groups: Any, source: str = "") -> "Pilot":
        """The pilot of two groups as the analysis holds them (an :class:`engine.results.Groups`:
        ``x``, ``y`` and ``labels``), such as the current analysis's, to plan a follow-up."""
        return cls(groups.x, groups.y, tuple(groups.labels), source)

    def to_dict(self) -> dict[str, Any]:
        return {"group1": self.group1.tolist(),
                "group2": None if self.group2 is None else self.group2.tolist(),
                "labels": list(self.labels), "source": self.source}

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> "Pilot":
        """The pilot :meth:`to_dict` wrote; an unknown member raises :class:`OptionProblem`."""
        members = dict(_members(data, "the pilot", {"group1", "group2", "labels", "source"}))
        if "labels" in members:
            members["labels"] = tuple(members["labels"])
        return cls(**members)

    def sds(self) -> tuple[float, float | None]:
        """The sample SDs (n - 1 denominator) of the pilot groups (the second None when paired)."""
        first = float(np.std(self.group1, ddof=1))
        return first, (None if self.group2 is None else float(np.std(self.group2, ddof=1)))


@dataclass(frozen=True)
class Plan:
    """A planned study and what to find about it.

    Parameters
    ----------
    find : {"n", "power", "difference"}
        The sample size per group (for the given power), the power (for the given sizes), or the
        smallest difference detectable with the given power and sizes.
    difference : float or None
        The true difference of means, group 1 minus group 2, in the measurement's units: the one
        to detect (a question of difference; its sign must point the way a one-sided question
        asks), or the one expected (equivalence and non-inferiority; 0 when not given).
    sd, sd2 : float or None
        The SD of group 1 and of group 2 (``sd2`` None: the same as ``sd``). Paired: ``sd`` is
        the SD of the pair differences. Not given with a pilot (its values give the spread).
    n1, n2 : int or None
        The group sizes (pairs when paired), for finding the power or the difference; ``n2``
        None: ``ratio`` times ``n1``, rounded up.
    ratio : float
        n2 / n1; when the sample size is found, group 2 gets ``ratio`` times group 1's size,
        rounded up.
    power : float or None
        The power wanted (between 0 and 1), for finding the sample size or the difference.
    question : Question
        The question the study will answer: its kind (``differ``, ``lower``, ``higher``,
        ``equivalent``, ``not_worse``), its level (1 - alpha) and margin (in the measurement's
        units).
    design, procedure, method, shape :
        See ``DESIGNS``, ``PROCEDURES``, ``METHODS``, ``SHAPES``.
    simulations : int
        Simulated studies for each power found by simulation.
    seed : int or None
        Seed of the simulation (None: a fresh one, recorded in the result).
    unit : str
        The measurement's unit for the sentences ("MPa"), or "".
    pilot : Pilot or None
        Pilot values whose shape is resampled (then the power is simulated).
    """

    find: str
    difference: float | None = None
    sd: float | None = None
    sd2: float | None = None
    n1: int | None = None
    n2: int | None = None
    ratio: float = 1.0
    power: float | None = None
    question: Question = field(default_factory=Question)
    design: str = "independent"
    procedure: str = "welch"
    method: str = "auto"
    shape: str = "normal"
    simulations: int = 10_000
    seed: int | None = None
    unit: str = ""
    pilot: Pilot | None = None

    def __post_init__(self) -> None:
        _choice(self.find, FINDS, "thing to find")
        _choice(self.design, DESIGNS, "design")
        _choice(self.procedure, PROCEDURES, "procedure")
        _choice(self.method, METHODS, "method")
        _choice(self.shape, SHAPES, "shape")
        if not isinstance(self.question, Question):
            raise OptionProblem("The plan's question must be a Question.")
        self._check_margin()
        self._check_numbers()
        self._check_sizes()
        self._check_method()

    # -- checks ------------------------------------------------------------------------------

    def _check_margin(self) -> None:
        margin = self.question.margin
        if margin is not None and margin.unit != "units":
            raise OptionProblem("A plan takes its margin in the measurement's units, not as a "
                                f"{'percentage' if margin.unit == 'percent' else 'ratio'}.")
        if self.has_margin and self.find == "difference":
            raise OptionProblem("For an equivalence or non-inferiority plan give the true "
                                "difference expected (0 when none is given) and find the sample "
                                "size or the power.")

    def _check_numbers(self) -> None:
        set_ = object.__setattr__
        if self.difference is not None:
            set_(self, "difference", _number(self.difference, "difference"))
        elif self.has_margin:
            set_(self, "difference", 0.0)
        elif self.find != "difference":
            raise OptionProblem("Give the difference to detect (group 1 minus group 2).")
        if self.find == "difference" and self.difference is not None and not self.has_margin:
            raise OptionProblem("To find the smallest detectable difference, leave the difference out.")
        if self.pilot is not None:
            if self.sd is not None or self.sd2 is not None:
                raise OptionProblem("The pilot values give the spread; leave the SD out.")
            if self.pilot.paired != (self.design == "paired"):
                raise OptionProblem("A paired plan takes the pilot pair differences; an independent "
                                    "plan takes two pilot groups.")
        else:
            if self.sd is None:
                raise OptionProblem("Give the SD of the measurements"
                                    + (" (of the pair differences)." if self.design == "paired" else "."))
            set_(self, "sd", _positive(self.sd, "SD"))
            if self.sd2 is not None:
                set_(self, "sd2", _positive(self.sd2, "SD of group 2"))
                if self.design == "paired":
                    raise OptionProblem("A paired plan takes one SD, that of the pair differences.")
                if self.procedure == "pooled" and self.sd2 != self.sd:
                    raise OptionProblem("The pooled t-test assumes the same SD in both groups; "
                                        "with two SDs plan for the Welch t-test.")
        if self.find in ("n", "difference"):
            if self.power is None:
                raise OptionProblem("Give the power wanted (such as 0.8).")
        if self.power is not None:
            power = _number(self.power, "power")
            if not 0 < power < 1:
                raise OptionProblem(f"The power must lie between 0 and 1, not {self.power}.")
            set_(self, "power", power)
            if power <= self.alpha and not self.has_margin:
                raise OptionProblem(f"The power wanted must be above the test's level "
                                    f"{self.alpha:g}, not {self.power}.")
        ratio = _positive(self.ratio, "allocation ratio")
        if self.design == "paired" and ratio != 1:
            raise OptionProblem("A paired design has one size, the number of pairs; leave the ratio out.")
        set_(self, "ratio", ratio)
        simulations = _number(self.simulations, "number of simulations")
        if simulations != int(simulations) or not MIN_SIMULATIONS <= simulations <= MAX_SIMULATIONS:
            raise OptionProblem(f"The number of simulations must be a whole number from "
                                f"{MIN_SIMULATIONS} to {MAX_SIMULATIONS:,}, not {self.simulations}.")
        set_(self, "simulations", int(simulations))
        if self.seed is not None:
            seed = _number(self.seed, "seed")
            if seed != int(seed) or seed < 0:
                raise OptionProblem(f"The seed must be a whole number of at least 0, not {self.seed}.")
            set_(self, "seed", int(seed))
        set_(self, "unit", str(self.unit or "").strip())

    def _check_sizes(self) -> None:
        set_ = object.__setattr__
        if self.find == "n":
            if self.n1 is not None or self.n2 is not None:
                raise OptionProblem("To find the sample size, leave the sizes out.")
            return
        if self.n1 is None:
            raise OptionProblem("Give the sample size" + (" (pairs)." if self.design == "paired"
                                                          else " per group."))
        set_(self, "n1", _size(self.n1, "sample size" if self.n2 is None else "size of group 1"))
        if self.n2 is None:
            set_(self, "n2", self.n1 if self.design == "paired" else
                 max(MIN_N, math.ceil(self.ratio * self.n1 - 1e-9)))
        else:
            if self.design == "paired":
                raise OptionProblem("A paired design has one size, the number of pairs.")
            set_(self, "n2", _size(self.n2, "size of group 2"))

    def _check_method(self) -> None:
        if self.method == "exact" and (self.procedure == "mann_whitney" or self.shape != "normal"
                                       or self.pilot is not None):
            raise OptionProblem("The exact power is known for the t and z tests under normal "
                                "spread; choose a simulation (or the approximation of the rank test).")
        if self.method == "approximation" and (self.procedure != "mann_whitney" or self.has_margin
                                               or self.pilot is not None or self.design == "paired"):
            raise OptionProblem("The approximation is the asymptotic formula of the Mann-Whitney "
                                "test for a difference between two independent groups.")
        if self.procedure == "mann_whitney" and self.has_margin:
            raise OptionProblem("Equivalence and non-inferiority plans take the Welch, pooled or z "
                                "test; a rank-based margin test is not planned here.")

    # -- what the plan implies ---------------------------------------------------------------

    @property
    def has_margin(self) -> bool:
        return self.question.has_margin

    @property
    def alpha(self) -> float:
        return 1.0 - self.question.level

    @property
    def alternative(self) -> str:
        return self.question.alternative

    @property
    def sds(self) -> tuple[float, float]:
        """The SDs of group 1 and group 2 (paired: that of the differences, twice); from the pilot
        values when there are some."""
        if self.pilot is not None:
            first, second = self.pilot.sds()
            return first, first if second is None else second
        return self.sd, self.sd if self.sd2 is None else self.sd2

    @property
    def simulated(self) -> bool:
        """Whether the power is found by simulation."""
        if self.method == "auto":
            return (self.pilot is not None or self.shape != "normal"
                    or self.procedure == "mann_whitney")
        return self.method == "simulation"

    def sizes_for(self, n1: int) -> tuple[int, int]:
        """Group sizes for ``n1`` in group 1 (pairs: the same twice) with the plan's ratio."""
        if self.design == "paired":
            return n1, n1
        return n1, max(MIN_N, math.ceil(self.ratio * n1 - 1e-9))

    def with_(self, **changes: Any) -> "Plan":
        """A copy with ``changes`` (checked again)."""
        return replace(self, **changes)

    def to_dict(self) -> dict[str, Any]:
        """Plain values (the pilot's values included) that :meth:`from_dict` reads back."""
        plain = {f.name: getattr(self, f.name) for f in fields(self)}
        plain["question"] = self.question.to_dict()
        plain["pilot"] = None if self.pilot is None else self.pilot.to_dict()
        if self.design == "paired" or self.find == "n":
            plain["n2"] = None  # follows from n1 (pairs) or is found
        return plain

    @classmethod
    def from_dict(cls, data: Mapping[str, Any]) -> "Plan":
        """The plan :meth:`to_dict` wrote, checked again; an unknown member raises
        :class:`OptionProblem`."""
        members = dict(_members(data, "the plan", {f.name for f in fields(cls)}))
        if "question" in members:
            question = dict(_members(members["question"], "the plan's question", {"kind", "level", "margin"}))
            if question.get("margin") is not None:
                question["margin"] = Margin.from_dict(question["margin"])
            members["question"] = Question(**question)
        if members.get("pilot") is not None:
            members["pilot"] = Pilot.from_dict(members["pilot"])
        return cls(**members)


def _members(data: Any, what: str, known: set[str]) -> Mapping[str, Any]:
    if not isinstance(data, Mapping):
        raise OptionProblem(f"{what.capitalize()} must be a set of named members.")
    unknown = sorted(set(data) - known)
    if unknown:
        raise OptionProblem(f"Unknown member in {what}: {', '.join(map(str, unknown))}.")
    return data
