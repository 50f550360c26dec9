"""The analysis as a plain-Python object that a window can watch.

A :class:`Session` holds what the user chose (file, sheet, columns, groups, options, values set
aside, the procedure picked) and what the engine produced for those choices (the table, the two
groups with their screening report, the finished analysis). It computes nothing itself: the window
runs the slow steps off its GUI thread and stores their results here. Every change of a field is
announced to the subscribers as ``callback(field_name, new_value)``.
"""

from __future__ import annotations

from dataclasses import dataclass, fields, replace
from pathlib import Path
from typing import TYPE_CHECKING, Any, Callable, Mapping

if TYPE_CHECKING:
    from .spec import AnalysisSpec

__all__ = ["Choices", "Session", "spec_of"]

Listener = Callable[[str, Any], None]


@dataclass(frozen=True)
class Choices:
    """Everything the user decides; each field maps one-to-one to an engine keyword."""

    path: Path | None = None
    sheet: str | None = None
    layout: str = "long"  # "long": a group column and a value column; "wide": a column per group
    group_column: str | None = None
    value_columns: tuple[str, ...] = ()
    picked: tuple[str, str] | None = None  # the two group labels, group 1 first
    set_aside: Mapping[tuple[int, str], str] | None = None  # (frame row, column) -> reason
    alternative: str = "two-sided"
    confidence_level: float = 0.95
    n_resamples: int = 10_000
    seed: int | None = 20261202
    known_sd: tuple[float, float] | None = None
    equal_spread_known: bool = False
    ordinal: bool = False
    procedure: str | None = None  # None: follow the recommendation


def spec_of(choices: Choices, table: Any = None) -> "AnalysisSpec":
    """The analysis spec these choices describe (cells set aside are recorded by file row when
    the table they were set aside in is given)."""
    from .pipeline import set_aside_cells
    from .question import Question
    from .spec import AnalysisSpec, Source, Statements

    return AnalysisSpec(
        source=None if choices.path is None else Source(str(choices.path), choices.sheet),
        layout=choices.layout, group_column=choices.group_column,
        value_columns=tuple(choices.value_columns), groups=choices.picked,
        set_aside=set_aside_cells(table, choices.set_aside) if table is not None and choices.set_aside else (),
        question=Question.from_alternative(choices.alternative, choices.confidence_level),
        resamples=choices.n_resamples, seed=choices.seed,
        statements=Statements(choices.known_sd, choices.equal_spread_known, choices.ordinal),
        procedure=choices.procedure)


class Session:
    """Current choices plus the engine's outputs, with change notification."""

    _OUTPUTS = ("table", "intake", "analysis", "problem")

    def __init__(self) -> None:
        self._listeners: list[Listener] = []
        self.choices = Choices()
        self.table = None      # engine.io.Table
        self.intake = None     # engine.io.Intake: groups and screening report
        self.analysis = None   # engine.analysis.Analysis
        self.problem: str | None = None  # the last error message a user must see

    # -- listening -----------------------------------------------------------------------------
    def subscribe(self, listener: Listener) -> None:
        self._listeners.append(listener)

    def unsubscribe(self, listener: Listener) -> None:
        if listener in self._listeners:
            self._listeners.remove(listener)

    def _emit(self, name: str, value: Any) -> None:
        for listener in list(self._listeners):
            listener(name, value)

    # -- writing -------------------------------------------------------------------------------
    def choose(self, **changes: Any) -> None:
        """Change some choices; announces ``"choices"`` once if anything differed."""
        known = {f.name for f in fields(Choices)}
        unknown = set(changes) - known
        if unknown:
            raise TypeError(f"unknown choice(s): {', '.join(sorted(unknown))}")
        new = replace(self.choices, **changes)
        if new != self.choices:
            self.choices = new
            self._emit("choices", new)

    def store(self, name: str, value: Any) -> None:
        """Store an engine output (``table``, ``intake``, ``analysis`` or ``problem``)."""
        if name not in self._OUTPUTS:
            raise TypeError(f"unknown output: {name}")
        if getattr(self, name) is value:
            return
        setattr(self, name, value)
        self._emit(name, value)
