"""A group known only by its summary statistics: label, count, mean, and an SD or a standard error.

A certificate, a paper or an older report often gives each group's mean, standard deviation and
count and nothing more. :class:`GroupStats` holds one such group as the user entered it (the SD or
the standard error, whichever was given, and whether the SD is a known population value), and
:func:`parse_stats` reads the short form the headless command takes
(``"A n=12 mean=41.2 sd=3.1"``). The procedures of a difference in means
(:mod:`engine.procedures.t`, :mod:`engine.effects`, :mod:`engine.procedures.equivalence`) take two
of them wherever they take two groups of values.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from .errors import DataProblem, quoted
from .stats_basics import centred_sd, common_scale

__all__ = ["GroupStats", "parse_stats", "plain_number", "SPREAD_NAMES", "LARGEST_COUNT"]

# How the spread of a group may be given, as the short form and the reader name it.
SPREAD_NAMES = ("sd", "se")
# The largest count n taken: beyond 2^53 a float64 no longer holds every whole number, so the
# count would not be the one entered by the time the formulas use it.
LARGEST_COUNT = 2 ** 53


def _is_number(value: object) -> bool:
    return isinstance(value, (int, float, np.integer, np.floating)) and not isinstance(value, (bool, np.bool_))


def _shown(value: object) -> str:
    """A number as a message shows it; anything else as Python writes it, quoted to a length."""
    return quoted(str(value) if _is_number(value) else repr(value))


@dataclass(frozen=True)
class GroupStats:
    """One group's summary statistics, as entered.

    ``sd``: the sample standard deviation (n - 1 denominator), or with ``sd_known`` the known
    population SD; ``se``: the standard error of the mean instead (SD / sqrt(n)). Exactly one of
    the two is given; :attr:`standard_deviation` and :attr:`standard_error` give both.
    """

    label: str
    n: int
    mean: float
    sd: float | None = None
    se: float | None = None
    sd_known: bool = False

    def __post_init__(self) -> None:
        label = self.label
        if not isinstance(label, str) or not label.strip():
            raise DataProblem("Each group of summary statistics needs a label.")
        name = f"group '{quoted(label)}'"
        if not (isinstance(self.n, (int, np.integer)) and not isinstance(self.n, bool)) \
                or not 2 <= self.n <= LARGEST_COUNT:
            raise DataProblem(f"The count n of {name} must be a whole number of 2 or more, up to "
                              f"{LARGEST_COUNT:,} (2^53), not {_shown(self.n)}.")
        object.__setattr__(self, "n", int(self.n))
        if not _is_number(self.mean) or not math.isfinite(self.mean):
            raise DataProblem(f"The mean of {name} must be a finite number, not {self.mean!r}.")
        object.__setattr__(self, "mean", float(self.mean))
        given = [kind for kind in SPREAD_NAMES if getattr(self, kind) is not None]
        if len(given) != 1:
            raise DataProblem(f"Give {name} either its standard deviation (sd) or its standard "
                              "error (se), not both and not neither.")
        spread = getattr(self, given[0])
        if not _is_number(spread) or not math.isfinite(spread) or spread < 0:
            raise DataProblem(f"The {given[0]} of {name} must be a number of 0 or more, not {spread!r}.")
        object.__setattr__(self, given[0], float(spread))
        if not isinstance(self.sd_known, bool):
            raise DataProblem(f"Whether the SD of {name} is known must be true or false.")
        if self.sd_known and self.standard_deviation == 0:
            raise DataProblem(f"A known standard deviation of {name} must be above 0.")

    @property
    def given_as(self) -> str:
        """"sd" or "se": how the spread was entered."""
        return "sd" if self.sd is not None else "se"

    @property
    def standard_deviation(self) -> float:
        """The SD: as given, or the standard error times sqrt(n)."""
        return self.sd if self.sd is not None else self.se * math.sqrt(self.n)

    @property
    def standard_error(self) -> float:
        """The standard error of the mean: as given, or the SD over sqrt(n)."""
        return self.se if self.se is not None else self.sd / math.sqrt(self.n)

    @classmethod
    def of_values(cls, label: str, values: Any) -> "GroupStats":
        """The summary of a group of values: n, the mean (found as :func:`engine.summary.summarize`
        finds it) and the sample SD (:func:`engine.stats_basics.centred_sd`)."""
        values = np.asarray(values, dtype=float)
        scale = common_scale(values)
        mean = float(values.mean()) if scale == 1.0 else float((values / scale).mean()) * scale
        return cls(label=label, n=int(values.size), mean=mean, sd=centred_sd(values))

    def to_dict(self) -> dict[str, Any]:
        """The numbers as entered (a saved analysis and the JSON document record these)."""
        return {"label": self.label, "n": self.n, "mean": self.mean, "sd": self.sd, "se": self.se,
                "sd_known": self.sd_known}

    @classmethod
    def from_dict(cls, data: Any) -> "GroupStats":
        if not isinstance(data, dict) or not set(data) <= {"label", "n", "mean", "sd", "se", "sd_known"}:
            raise DataProblem("A group of summary statistics must have only the members label, n, "
                              "mean, sd or se, and sd_known.")
        return cls(**data)


_KEYS = ("n", "mean", "sd", "se")


def plain_number(text: str, *, whole: bool = False) -> float | int:
    """The number written in ``text``: digits 0-9, a sign, a decimal point and an exponent (and
    the words nan and inf, which the checks of :class:`GroupStats` then refuse by name).
    Python's own readers also take underscores between digits and digits of other scripts;
    neither is how a count or a mean is written, and "1_000" is more likely a slip than a
    thousand, so both are refused. ``whole``: an integer (no point, no exponent).

    Raises
    ------
    ValueError
        For any other text.
    """
    text = text.strip()
    if not text.isascii() or "_" in text:
        raise ValueError(text)
    return int(text) if whole else float(text)


def parse_stats(text: str, *, sd_known: bool = False) -> GroupStats:
    """One group from its short form: the label first, then ``n=``, ``mean=`` and ``sd=`` or
    ``se=``, separated by spaces (``"A n=12 mean=41.2 sd=3.1"``; a label with spaces in quotes
    is not needed: every word before the first ``name=`` is the label).

    Raises
    ------
    DataProblem
        Naming the group and the part at fault.
    """
    if not isinstance(text, str) or not text.strip():
        raise DataProblem("A group of summary statistics is empty; write it as "
                          "\"LABEL n=12 mean=41.2 sd=3.1\".")
    words = text.split()
    label_words: list[str] = []
    while words and "=" not in words[0]:
        label_words.append(words.pop(0))
    label = " ".join(label_words)
    shown = quoted(text.strip())
    if not label:
        raise DataProblem(f"'{shown}': put the group's label first, then n=, mean= and sd= (or se=).")
    found: dict[str, str] = {}
    for word in words:
        name, _, value = word.partition("=")
        name = name.lower()
        if name not in _KEYS:
            raise DataProblem(f"'{shown}': unknown part '{quoted(name)}'; use n=, mean= and sd= or se=.")
        if name in found:
            raise DataProblem(f"'{shown}': {name}= is given twice.")
        found[name] = value
    missing = [name for name in ("n", "mean") if name not in found]
    if missing or not ({"sd", "se"} & set(found)):
        needed = missing + ([] if {"sd", "se"} & set(found) else ["sd (or se)"])
        raise DataProblem(f"'{shown}': {', '.join(needed)} missing.")
    numbers: dict[str, Any] = {}
    for name, value in found.items():
        try:
            numbers[name] = plain_number(value, whole=name == "n")
        except ValueError:
            kind = "a whole number" if name == "n" else "a number"
            raise DataProblem(f"'{shown}': {name}= must be {kind}, not '{quoted(value)}'.") from None
    return GroupStats(label=label, sd_known=sd_known, **numbers)
