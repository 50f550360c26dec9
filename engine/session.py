"""The analysis as a plain-Python object that a window can watch.

A :class:`Session` holds what the user decided, as one :class:`engine.spec.AnalysisSpec` (the
data file and sheet are its source, the procedure picked is its ``procedure``), and what the
engine produced for it (the table, the two groups with their screening report, the finished
analysis). It computes nothing itself: the window runs the steps of ``engine.pipeline`` off its
GUI thread and stores their results here. Every change is announced to the subscribers as
``callback(name, new_value)``: ``"spec"`` for a new spec, else the name of the output.
"""

from __future__ import annotations

from dataclasses import fields, replace
from pathlib import Path
from typing import Any, Callable

from .spec import AnalysisSpec

__all__ = ["Session"]

Listener = Callable[[str, Any], None]


class Session:
    """The current spec plus the engine's outputs, with change notification."""

    _OUTPUTS = ("table", "intake", "analysis", "problem")

    def __init__(self, spec: AnalysisSpec | None = None) -> None:
        self._listeners: list[Listener] = []
        self.spec = spec if spec is not None else AnalysisSpec()
        self.table = None      # engine.io.Table
        self.intake = None     # engine.io.Intake: groups and screening report
        self.analysis = None   # engine.analysis.Analysis
        self.problem: str | None = None  # the last error message a user must see

    @property
    def path(self) -> Path | None:
        """The data file of the spec, or None before one is opened."""
        return None if self.spec.source is None else Path(self.spec.source.path)

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
        """Change some fields of the spec; announces ``"spec"`` once if anything differed.

        Each value is checked by the spec: one it refuses raises
        :class:`engine.errors.OptionProblem` with the spec's sentence, and nothing changes.
        """
        known = {f.name for f in fields(AnalysisSpec)}
        unknown = set(changes) - known
        if unknown:
            raise TypeError(f"unknown field(s) of the spec: {', '.join(sorted(unknown))}")
        self.adopt(self.spec.replace(**changes))

    def ask(self, **changes: Any) -> None:
        """Change the question (``kind``, ``level``), checked as :meth:`choose` checks."""
        self.choose(question=replace(self.spec.question, **changes))

    def state(self, **changes: Any) -> None:
        """Change what the user states beyond the data (``known_sd``, ``equal_spread_known``,
        ``ordinal``), checked as :meth:`choose` checks."""
        self.choose(statements=replace(self.spec.statements, **changes))

    def adopt(self, spec: AnalysisSpec) -> None:
        """Take ``spec`` whole (a new file's, a reopened analysis's); announces ``"spec"`` if it differs."""
        if not isinstance(spec, AnalysisSpec):
            raise TypeError("a session holds an AnalysisSpec")
        if spec != self.spec:
            self.spec = spec
            self._emit("spec", spec)

    def store(self, name: str, value: Any) -> None:
        """Store an engine output (``table``, ``intake``, ``analysis`` or ``problem``)."""
        if name not in self._OUTPUTS:
            raise TypeError(f"unknown output: {name}")
        if getattr(self, name) is value:
            return
        setattr(self, name, value)
        self._emit(name, value)
