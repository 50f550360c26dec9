"""Long work off the GUI thread: one :class:`Worker` per kind of job, a new run replacing the old.

A job is a plain function ``job(progress, cancelled)``: ``progress(fraction, what)`` reports how
far it got and ``cancelled()`` says whether to stop (the engine raises
:class:`engine.errors.Cancelled` then; ``engine.tasks.Task.of(progress, cancelled)`` nests them
in steps). The function knows nothing of Qt. Its result, its failure
or its stop comes back to the GUI thread as a signal of the worker. Starting a new run cancels
the one before; a result of a replaced or cancelled run is dropped, even if that run could not
stop early.
"""

from __future__ import annotations

import threading
import time
from typing import Any, Callable

from PySide6.QtCore import QObject, QRunnable, QThreadPool, Signal, Slot

from engine.tasks import CancelCheck, Progress

__all__ = ["Job", "Worker"]

Job = Callable[[Progress, CancelCheck], Any]  # the engine's progress and cancel callables

_PROGRESS_EVERY = 0.05  # seconds between progress signals, so the GUI thread is never flooded


class _Relay(QObject):
    """Carries a run's news from the pool thread to the GUI thread (queued signals)."""

    progress = Signal(int, float, str)
    done = Signal(int, object)
    failed = Signal(int, str, bool)
    stopped = Signal(int)


class _Run(QRunnable):
    def __init__(self, ticket: int, job: Job, relay: _Relay, stop: threading.Event) -> None:
        super().__init__()
        self.setAutoDelete(True)
        self._ticket = ticket
        self._job = job
        self._relay = relay
        self._stop = stop
        self._last = 0.0

    def _progress(self, fraction: float, what: str) -> None:
        now = time.monotonic()
        if now - self._last >= _PROGRESS_EVERY or fraction >= 1.0:
            self._last = now
            self._relay.progress.emit(self._ticket, float(fraction), str(what))

    def run(self) -> None:  # runs in a pool thread
        from engine.errors import Cancelled, TwofoldError, quoted

        try:
            result = self._job(self._progress, self._stop.is_set)
        except Cancelled:
            self._relay.stopped.emit(self._ticket)
        except TwofoldError as problem:
            self._relay.failed.emit(self._ticket, str(problem), True)
        except MemoryError:
            self._relay.failed.emit(self._ticket, "there is not enough memory for this much data", True)
        except BaseException as problem:  # noqa: BLE001 - a Rust panic too: the window must hear back
            said = " ".join(str(problem).split())
            self._relay.failed.emit(self._ticket, quoted(f"{type(problem).__name__}: {said}", 300), False)
            if isinstance(problem, (KeyboardInterrupt, SystemExit)):
                raise
        else:
            if self._stop.is_set():
                self._relay.stopped.emit(self._ticket)
            else:
                self._relay.done.emit(self._ticket, result)


class Worker(QObject):
    """Runs one job at a time in a thread pool and reports back through signals.

    Signals: ``started()``, ``progress(fraction, what)``, ``finished(result)``,
    ``failed(message, expected)`` (``expected`` is True for the engine's own errors, whose message
    is a sentence for the user), ``stopped()`` and ``busy_changed(busy)``.
    """

    started = Signal()
    progress = Signal(float, str)
    finished = Signal(object)
    failed = Signal(str, bool)
    stopped = Signal()
    busy_changed = Signal(bool)

    def __init__(self, parent: QObject | None = None, *, pool: QThreadPool | None = None) -> None:
        super().__init__(parent)
        self._pool = pool or QThreadPool(self)
        if pool is None:
            self._pool.setMaxThreadCount(3)  # a replaced run may still be finishing
        self._relay = _Relay(self)
        self._relay.progress.connect(self._on_progress)
        self._relay.done.connect(self._on_done)
        self._relay.failed.connect(self._on_failed)
        self._relay.stopped.connect(self._on_stopped)
        self._ticket = 0
        self._stop: threading.Event | None = None
        self._busy = False

    @property
    def busy(self) -> bool:
        return self._busy

    def run(self, job: Job) -> None:
        """Start ``job``, cancelling the run in progress if there is one."""
        if self._stop is not None:
            self._stop.set()
        self._ticket += 1
        self._stop = threading.Event()
        self._set_busy(True)
        self.started.emit()
        self._pool.start(_Run(self._ticket, job, self._relay, self._stop))

    def cancel(self) -> None:
        """Ask the current run to stop; ``stopped`` is emitted at once and its result dropped."""
        if self._stop is None:
            return
        self._stop.set()
        self._stop = None
        self._ticket += 1
        self._set_busy(False)
        self.stopped.emit()

    def wait(self, msecs: int = 5000) -> bool:
        """Block until every run of this worker has ended (for closing the window and tests)."""
        return self._pool.waitForDone(msecs)

    def shutdown(self, msecs: int = 60_000) -> None:
        """Cancel, then wait for the pool thread to finish.

        The worker must outlive its runs (a run reports through it), so this waits for a run
        that cannot stop early, such as a file being read, to end by itself.
        """
        if self._stop is not None:
            self._stop.set()
            self._stop = None
        self._ticket += 1
        self._set_busy(False)
        self.wait(msecs)

    def _set_busy(self, busy: bool) -> None:
        if busy != self._busy:
            self._busy = busy
            self.busy_changed.emit(busy)

    def _current(self, ticket: int) -> bool:
        return ticket == self._ticket and self._stop is not None

    def _end(self) -> None:
        self._stop = None
        self._set_busy(False)

    @Slot(int, float, str)
    def _on_progress(self, ticket: int, fraction: float, what: str) -> None:
        if self._current(ticket):
            self.progress.emit(fraction, what)

    @Slot(int, object)
    def _on_done(self, ticket: int, result: object) -> None:
        if self._current(ticket):
            self._end()
            self.finished.emit(result)

    @Slot(int, str, bool)
    def _on_failed(self, ticket: int, message: str, expected: bool) -> None:
        if self._current(ticket):
            self._end()
            self.failed.emit(message, expected)

    @Slot(int)
    def _on_stopped(self, ticket: int) -> None:
        if self._current(ticket):
            self._end()
            self.stopped.emit()
