"""Random draws made once and handed out again to later runs that make the same draws.

Several outcomes compared on the same two groups with the same seed draw the same relabellings
and the same bootstrap indices, outcome after outcome: the draws depend on the seed and the group
sizes only, never on the values. A :class:`DrawLog` keeps what the first run drew (each call, its
result and the generator's state after it); each later run gets a generator that answers the
same calls, in the same order, from the log, and draws for itself (from the state the log
recorded) from the first call that differs. Every run therefore sees exactly the numbers
``numpy.random.default_rng(seed)`` would give it; only the drawing is saved.
"""

from __future__ import annotations

from typing import Any, Callable

import numpy as np

__all__ = ["DrawLog", "LOG_LIMIT_BYTES"]

# The draws a log keeps at most; later calls are drawn by each run (a practical limit).
LOG_LIMIT_BYTES = 1 << 28
# The calls answered from the log (the ones the resampling procedures make); any other method
# of the generator makes it draw for itself from then on.
_LOGGED = ("integers", "random")


class DrawLog:
    """The draws of the first run from ``seed``, for later runs from the same seed.

    ``generator()`` gives a ``numpy.random.Generator`` of ``seed``'s stream: the first one
    records its draws (up to ``limit_bytes``), every later one replays them while its calls match.
    """

    def __init__(self, seed: int, *, limit_bytes: int = LOG_LIMIT_BYTES) -> None:
        self.seed = int(seed)
        self.limit_bytes = int(limit_bytes)
        self.entries: list[tuple[tuple[str, str], np.ndarray, dict]] = []
        self.size = 0
        self._recorder_given = False

    def generator(self) -> np.random.Generator:
        """A generator of ``seed``'s stream (the first records, the later ones replay)."""
        record = not self._recorder_given
        self._recorder_given = True
        return _Replaying(self, record=record)

    @property
    def replayed_bytes(self) -> int:
        """The bytes of draws the log holds."""
        return self.size


class _BitGenerator:
    """The generator's bit generator, with ``random_raw`` logged like the generator's draws."""

    def __init__(self, owner: "_Replaying") -> None:
        self._owner = owner

    def random_raw(self, *args: Any, **kwargs: Any) -> Any:
        real = np.random.Generator.bit_generator.__get__(self._owner)
        return self._owner._draw("random_raw", real.random_raw, args, kwargs)

    def __getattr__(self, name: str) -> Any:
        self._owner._go_live()
        return getattr(np.random.Generator.bit_generator.__get__(self._owner), name)


class _Replaying(np.random.Generator):
    """A generator of the log's seed that answers logged calls from the log while they match."""

    def __init__(self, log: DrawLog, *, record: bool) -> None:
        super().__init__(np.random.PCG64(log.seed))
        self._log = log
        self._position = 0
        self._recording = record
        self._replaying = not record

    @property
    def bit_generator(self) -> Any:  # type: ignore[override]
        return _BitGenerator(self)

    def _real_state(self) -> dict:
        return np.random.Generator.bit_generator.__get__(self).state

    def _go_live(self) -> None:
        """Draw for itself from here on, from the state after the last call replayed."""
        if self._replaying:
            self._replaying = False
            if self._position:
                np.random.Generator.bit_generator.__get__(self).state = self._log.entries[self._position - 1][2]
        self._recording = False

    def kept(self, key: tuple, build: Callable[[], np.ndarray]) -> np.ndarray:
        """``build()``, which draws from this generator (relabelling masks, say), as the first run
        built it at this point: a replaying generator hands out the array kept and moves on to
        the state building it left; the recording one keeps it (its own draws inside are not
        logged: a later run takes the whole or draws for itself from before it)."""
        key = ("kept", repr(key))
        replayed = self._replayed(key)
        if replayed is not None:
            return replayed
        recording, self._recording = self._recording, False
        result = build()
        self._recording = recording and self._keep(key, result)
        return result

    def _draw(self, name: str, draw: Callable[..., Any], args: tuple, kwargs: dict) -> Any:
        key = (name, repr((args, sorted(kwargs.items()))))
        replayed = self._replayed(key)
        if replayed is not None:
            return replayed
        result = draw(*args, **kwargs)
        if self._recording:
            self._recording = self._keep(key, result)
        return result

    def _replayed(self, key: tuple) -> np.ndarray | None:
        """The logged result of call ``key`` when it is the next one logged (the position moves
        on); otherwise None, and from here on this generator draws for itself."""
        log = self._log
        if not self._replaying:
            return None
        if self._position < len(log.entries) and log.entries[self._position][0] == key:
            self._position += 1
            return log.entries[self._position - 1][1]
        self._go_live()
        return None

    def _keep(self, key: tuple, result: Any) -> bool:
        """Log ``result`` of call ``key`` with the state after it; False (recording ends) when it
        is out of turn or beyond the log's limit."""
        log = self._log
        kept = np.array(result, copy=True)
        if self._position != len(log.entries) or log.size + kept.nbytes > log.limit_bytes:
            return False
        kept.setflags(write=False)
        if kept.ndim == 0:  # a single draw is handed out as numpy gave it (a scalar)
            kept = result
        log.entries.append((key, kept, self._real_state()))
        log.size += kept.nbytes
        self._position += 1
        return True


def _logged(name: str) -> Callable[..., Any]:
    method = getattr(np.random.Generator, name)

    def draw(self: _Replaying, *args: Any, **kwargs: Any) -> Any:
        return self._draw(name, lambda *a, **k: method(self, *a, **k), args, kwargs)

    draw.__name__ = name
    return draw


def _live(name: str) -> Callable[..., Any]:
    method = getattr(np.random.Generator, name)

    def draw(self: _Replaying, *args: Any, **kwargs: Any) -> Any:
        self._go_live()
        return method(self, *args, **kwargs)

    draw.__name__ = name
    return draw


for _name in dir(np.random.Generator):
    if _name.startswith("_") or _name == "bit_generator" or not callable(getattr(np.random.Generator, _name)):
        continue
    setattr(_Replaying, _name, _logged(_name) if _name in _LOGGED else _live(_name))
