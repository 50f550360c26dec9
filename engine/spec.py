"""Everything the user decided about one analysis, in one immutable, serialisable object.

An :class:`AnalysisSpec` names the source file (path, sheet, the sha256 of its bytes), the layout
and columns, the two groups in order, the cells set aside (by the file's row number and the
cell's text, with the reason), the question and its level, the resamples and their seed, what the
user states beyond the data (known SDs, spreads known to be equal, ratings) and the procedure
picked (None: follow the suggestion). The window, the headless command and a saved analysis all
hold one; every option is checked here, once.

``to_dict`` gives plain JSON-ready values; ``from_dict`` reads them back and says in one line what
is wrong with a damaged or hand-edited one.
"""

from __future__ import annotations

import math
import secrets
from dataclasses import dataclass, field, fields, replace
from typing import Any, Mapping

from .errors import OptionProblem, quoted
from .question import Margin, Question

__all__ = ["AnalysisSpec", "Source", "SetAside", "Statements", "LAYOUTS", "RANK_METHODS",
           "RESAMPLES_RANGE", "draw_seed", "SEED_LIMIT", "DESIGNS", "ZERO_RULES"]

LAYOUTS = ("long", "wide")  # long: a group column and a value column; wide: a column per group
RANK_METHODS = ("auto", "exact", "normal")  # how the Mann-Whitney p-value is found
# independent: two separate groups of units; paired: each unit measured once in each group,
# matched by an ID column (long layout) or row by row (wide layout).
DESIGNS = ("independent", "paired")
# What the signed-rank test does with pairs that show no difference: drop them before ranking
# (Wilcoxon's rule) or rank them and give them no sign (Pratt's rule).
ZERO_RULES = ("drop", "pratt")
# Resamples accepted for the permutation and bootstrap procedures: below 100 their p-values and
# interval ends are too coarse to report; above 10 million a run takes hours (practical limits).
RESAMPLES_RANGE: tuple[int, int] = (100, 10_000_000)
SEED_LIMIT = 2**63  # seeds are whole numbers from 0 to SEED_LIMIT - 1


def draw_seed() -> int:
    """A fresh seed for a new analysis (recorded in the spec, so the run can be repeated)."""
    return secrets.randbelow(2**32)


@dataclass(frozen=True)
class Source:
    """The data file: its path as given, the sheet of a workbook, the sha256 of its bytes."""

    path: str
    sheet: str | None = None
    sha256: str | None = None

    def __post_init__(self) -> None:
        if not isinstance(self.path, str) or not self.path:
            raise OptionProblem("The source file's path must be a non-empty text.")
        if self.sheet is not None and not isinstance(self.sheet, str):
            raise OptionProblem("The sheet must be a text.")
        if self.sha256 is not None and not _is_sha256(self.sha256):
            raise OptionProblem("The source file's checksum must be 64 hexadecimal digits.")


def _is_sha256(text: object) -> bool:
    return isinstance(text, str) and len(text) == 64 and all(c in "0123456789abcdef" for c in text)


@dataclass(frozen=True)
class SetAside:
    """One cell the user left out: the file's row number (as the grid shows it), the column,
    the cell's text (so a changed file is noticed) and the reason given."""

    row: int
    column: str
    text: str
    reason: str = ""

    def __post_init__(self) -> None:
        if not _is_whole(self.row) or self.row < 1:
            raise OptionProblem(f"A cell set aside needs a row number of 1 or more, not {self.row!r}.")
        for name in ("column", "text", "reason"):
            if not isinstance(getattr(self, name), str):
                raise OptionProblem(f"A cell set aside needs its {name} as text.")


@dataclass(frozen=True)
class Statements:
    """What the user states beyond the data.

    ``known_sd``: the two population SDs, known from outside these data (adds the z procedure).
    ``equal_spread_known``: the spreads are known to be equal. ``ordinal``: the values are ratings.
    """

    known_sd: tuple[float, float] | None = None
    equal_spread_known: bool = False
    ordinal: bool = False

    def __post_init__(self) -> None:
        if self.known_sd is not None:
            sds = tuple(self.known_sd)
            if len(sds) != 2 or not all(_is_number(s) and math.isfinite(s) and s > 0 for s in sds):
                raise OptionProblem("Known standard deviations must be two positive numbers.")
            object.__setattr__(self, "known_sd", tuple(float(s) for s in sds))
        for name in ("equal_spread_known", "ordinal"):
            if not isinstance(getattr(self, name), bool):
                raise OptionProblem(f"'{name}' must be true or false.")


@dataclass(frozen=True)
class AnalysisSpec:
    """Everything the user decided; see the module's description. ``seed`` None means "not yet
    drawn": :meth:`with_seed` (and every run) makes it concrete, and the run records it."""

    source: Source | None = None
    layout: str = "long"
    group_column: str | None = None
    value_columns: tuple[str, ...] = ()
    groups: tuple[str, str] | None = None
    set_aside: tuple[SetAside, ...] = ()
    question: Question = field(default_factory=Question)
    resamples: int = 10_000
    seed: int | None = None
    statements: Statements = field(default_factory=Statements)
    rank_method: str = "auto"
    procedure: str | None = None
    design: str = "independent"
    pair_column: str | None = None
    zero_rule: str = "drop"

    def __post_init__(self) -> None:
        if self.layout not in LAYOUTS:
            raise OptionProblem(f"The layout must be 'long' or 'wide', not '{quoted(self.layout)}'.")
        if self.group_column is not None and not isinstance(self.group_column, str):
            raise OptionProblem("The group column must be named by a text.")
        if isinstance(self.value_columns, str):
            raise OptionProblem("The value columns must be a list of column names.")
        values = tuple(self.value_columns)
        if not all(isinstance(v, str) for v in values):
            raise OptionProblem("The value columns must be named by texts.")
        object.__setattr__(self, "value_columns", values)
        if self.groups is not None:
            pair = () if isinstance(self.groups, str) else tuple(self.groups)
            if len(pair) != 2 or not all(isinstance(g, str) for g in pair):
                raise OptionProblem("The groups must be two labels, group 1 first.")
            object.__setattr__(self, "groups", pair)
        object.__setattr__(self, "set_aside", tuple(self.set_aside))
        if not all(isinstance(cell, SetAside) for cell in self.set_aside):
            raise OptionProblem("Cells set aside must each be a SetAside.")
        if not isinstance(self.question, Question):
            raise OptionProblem("The question must be a Question.")
        low, high = RESAMPLES_RANGE
        if not _is_whole(self.resamples) or not low <= self.resamples <= high:
            raise OptionProblem(f"Use from {low:,} to {high:,} resamples, not {self.resamples!r}.")
        if self.seed is not None and (not _is_whole(self.seed) or not 0 <= self.seed < SEED_LIMIT):
            raise OptionProblem(f"The seed must be a whole number from 0 to 2^63 - 1, not {self.seed!r}.")
        if self.rank_method not in RANK_METHODS:
            raise OptionProblem(f"Unknown rank method '{quoted(self.rank_method)}'.")
        if self.procedure is not None and not isinstance(self.procedure, str):
            raise OptionProblem("The procedure picked must be named by its key.")
        if self.design not in DESIGNS:
            raise OptionProblem(f"The design must be 'independent' or 'paired', not '{quoted(self.design)}'.")
        if self.pair_column is not None:
            if not isinstance(self.pair_column, str) or not self.pair_column:
                raise OptionProblem("The pair ID column must be named by a text.")
            if self.design != "paired" or self.layout != "long":
                raise OptionProblem("A pair ID column belongs to a paired design in the long layout "
                                    "(in the wide layout the pairs are the rows).")
        if self.zero_rule not in ZERO_RULES:
            raise OptionProblem(f"The rule for pairs with no difference must be 'drop' or 'pratt', "
                                f"not '{quoted(self.zero_rule)}'.")

    # -- deriving --------------------------------------------------------------------------------
    def replace(self, **changes: Any) -> "AnalysisSpec":
        """A copy with ``changes``; each is checked as a new spec would be."""
        return replace(self, **changes)

    def with_seed(self) -> "AnalysisSpec":
        """This spec with a concrete seed: its own, or a freshly drawn one."""
        return self if self.seed is not None else replace(self, seed=draw_seed())

    @property
    def alternative(self) -> str:
        return self.question.alternative

    @property
    def level(self) -> float:
        return self.question.level

    @property
    def values_argument(self) -> str | tuple[str, ...]:
        """The value column(s) as ``engine.io.make_groups`` takes them."""
        return self.value_columns[0] if self.layout == "long" and self.value_columns else self.value_columns

    # -- plain values ----------------------------------------------------------------------------
    def to_dict(self) -> dict[str, Any]:
        """Plain JSON-ready values (every field, in a fixed order)."""
        return {
            "source": None if self.source is None else {
                "path": self.source.path, "sheet": self.source.sheet, "sha256": self.source.sha256},
            "layout": self.layout,
            "group_column": self.group_column,
            "value_columns": list(self.value_columns),
            "groups": None if self.groups is None else list(self.groups),
            "set_aside": [{"row": c.row, "column": c.column, "text": c.text, "reason": c.reason}
                          for c in self.set_aside],
            "question": self.question.to_dict(),
            "resamples": self.resamples,
            "seed": self.seed,
            "statements": {
                "known_sd": None if self.statements.known_sd is None else list(self.statements.known_sd),
                "equal_spread_known": self.statements.equal_spread_known,
                "ordinal": self.statements.ordinal},
            "rank_method": self.rank_method,
            "procedure": self.procedure,
            "design": self.design,
            "pair_column": self.pair_column,
            "zero_rule": self.zero_rule,
        }

    @classmethod
    def from_dict(cls, data: Any) -> "AnalysisSpec":
        """The spec ``to_dict`` wrote; a missing member takes its default, an unknown member or a
        value of the wrong kind raises :class:`OptionProblem` naming the member."""
        members = _members(data, "the analysis", {f.name for f in fields(cls)})
        built: dict[str, Any] = {}
        for name, value in members.items():
            try:
                built[name] = _READERS.get(name, _same)(value)
            except OptionProblem as problem:
                raise OptionProblem(f"In '{name}': {problem.message}") from None
            except (TypeError, ValueError, KeyError) as problem:
                raise OptionProblem(f"In '{name}': {problem}.") from None
        return cls(**built)


def _is_number(value: object) -> bool:
    return isinstance(value, (int, float)) and not isinstance(value, bool)


def _is_whole(value: object) -> bool:
    return isinstance(value, int) and not isinstance(value, bool)


def _members(data: Any, what: str, known: set[str]) -> Mapping[str, Any]:
    if not isinstance(data, Mapping):
        raise OptionProblem(f"{what.capitalize()} must be a set of named members, not {type(data).__name__}.")
    unknown = sorted(set(data) - known)
    if unknown:
        raise OptionProblem(f"Unknown member{'s' if len(unknown) > 1 else ''} in {what}: "
                            f"{', '.join(quoted(u) for u in unknown)}.")
    return data


def _same(value: Any) -> Any:
    return value


def _source(value: Any) -> Source | None:
    if value is None:
        return None
    return Source(**_members(value, "the source", {f.name for f in fields(Source)}))


def _set_aside(value: Any) -> tuple[SetAside, ...]:
    if not isinstance(value, list):
        raise OptionProblem("The cells set aside must be a list.")
    return tuple(SetAside(**_members(cell, "a cell set aside", {f.name for f in fields(SetAside)}))
                 for cell in value)


def _question(value: Any) -> Question:
    members = dict(_members(value, "the question", {f.name for f in fields(Question)}))
    if members.get("margin") is not None:
        members["margin"] = Margin.from_dict(members["margin"])
    return Question(**members)


def _statements(value: Any) -> Statements:
    members = dict(_members(value, "the statements", {f.name for f in fields(Statements)}))
    if isinstance(members.get("known_sd"), list):
        members["known_sd"] = tuple(members["known_sd"])
    return Statements(**members)


def _pair_or_none(value: Any) -> Any:
    return tuple(value) if isinstance(value, list) else value


_READERS = {
    "source": _source,
    "set_aside": _set_aside,
    "question": _question,
    "statements": _statements,
    "value_columns": _pair_or_none,
    "groups": _pair_or_none,
}
