"""How far a piece of work has got, and whether to stop it: one object, nested in steps.

A :class:`Task` wraps the two callables the callers pass (``progress(fraction, what)`` and
``cancelled()``). ``task.step(share, what)`` gives a child task for the next ``share`` of this
one: the child's fractions 0..1 land on that slice of the parent's, so a procedure reports its
own 0..1 without knowing where it sits in the whole analysis. ``task.check()`` raises
:class:`engine.errors.Cancelled` when the caller asked to stop.

A task is itself a ``progress(fraction, what)`` callable, so it can be passed wherever a plain
progress callable is taken; :meth:`Task.of` accepts either.
"""

from __future__ import annotations

from typing import Callable

from .errors import Cancelled

__all__ = ["Task", "Progress", "CancelCheck"]

Progress = Callable[[float, str], None]
CancelCheck = Callable[[], bool]


def _never() -> bool:
    return False


class Task:
    """Progress and cancelling of one piece of work over its own fractions 0..1.

    Parameters
    ----------
    progress : callable(fraction, what) or None
        Told how far the work has got (``fraction`` of the whole, 0..1) and what it is doing.
    cancelled : callable() -> bool or None
        Asked whether to stop; a True answer makes :meth:`check` and :meth:`report` raise
        :class:`engine.errors.Cancelled`.
    what : str
        What this task is doing, said when a report names nothing else.
    """

    __slots__ = ("_progress", "_cancelled", "_start", "_span", "what", "_done")

    def __init__(self, progress: Progress | None = None, cancelled: CancelCheck | None = None,
                 *, what: str = "") -> None:
        self._progress = progress
        self._cancelled = cancelled or _never
        self._start, self._span = 0.0, 1.0
        self.what = what
        self._done = 0.0  # how much of this task the steps given out so far cover

    @classmethod
    def of(cls, progress: "Progress | Task | None" = None, cancelled: CancelCheck | None = None,
           *, what: str = "") -> "Task":
        """A task from what a caller passed: a :class:`Task` as it is (``progress`` may be one),
        or plain callables wrapped in a new one."""
        if isinstance(progress, Task) and cancelled is None:
            return progress
        return cls(progress, cancelled, what=what)

    def cancelled(self) -> bool:
        """Whether the caller asked to stop."""
        return bool(self._cancelled())

    def check(self) -> None:
        """Raise :class:`engine.errors.Cancelled` when the caller asked to stop."""
        if self._cancelled():
            raise Cancelled()

    def report(self, fraction: float, what: str | None = None) -> None:
        """Stop if asked, else say that ``fraction`` (0..1, clipped) of this task is done."""
        self.check()
        if self._progress is not None:
            fraction = min(1.0, max(0.0, float(fraction)))
            self._progress(self._start + fraction * self._span, what or self.what)

    __call__ = report

    def step(self, share: float, what: str) -> "Task":
        """The next ``share`` of this task as a child task doing ``what``; its start is reported.

        Steps follow each other: the first covers 0..share of this task, the next begins where
        it ended. A share beyond what is left is cut to what is left.
        """
        begin = self._done
        share = max(0.0, min(float(share), 1.0 - begin))
        self._done = begin + share
        self.report(begin, what)
        child = Task(self._progress, self._cancelled, what=what)
        child._start = self._start + begin * self._span
        child._span = share * self._span
        return child
