"""Input checks shared by every procedure.

Each check raises an :mod:`engine.errors` type whose message is one sentence a user can read,
naming the group or option at fault. Procedures call these before any arithmetic, so the numeric
code below them can assume clean input.
"""

from __future__ import annotations

import math
from numbers import Real
from typing import Any, Callable, Iterable

import numpy as np

from ..errors import Cancelled, DataProblem, OptionProblem
from ..results import ALTERNATIVES

__all__ = [
    "GROUP_NAMES",
    "check_sample",
    "check_samples",
    "check_alternative",
    "check_confidence_level",
    "check_choice",
    "check_cancelled",
]

GROUP_NAMES: tuple[str, str] = ("group 1", "group 2")


def check_sample(values: Any, *, name: str = "the group", minimum: int = 2) -> np.ndarray:
    """Return ``values`` as a new 1-D float64 array after checking it.

    Raises
    ------
    DataProblem
        If the values are not numbers, are not a flat list, hold a missing or infinite value, or
        number fewer than ``minimum``.
    """
    try:
        array = np.array(values, dtype=float, copy=True)
    except (TypeError, ValueError):
        raise DataProblem(f"The values of {name} must all be numbers.") from None
    if array.ndim == 0:
        array = array.reshape(1)
    if array.ndim != 1:
        raise DataProblem(
            f"The values of {name} must be a single list of numbers, not a table of shape "
            f"{'x'.join(str(s) for s in array.shape)}.")
    bad = np.flatnonzero(~np.isfinite(array))
    if bad.size:
        where = int(bad[0]) + 1
        raise DataProblem(
            f"Value {where} of {name} is missing or not finite ({array[bad[0]]}); "
            f"{bad.size} such value{'s' if bad.size > 1 else ''} in all.")
    if array.size < minimum:
        raise DataProblem(
            f"{name.capitalize()} has {array.size} value{'' if array.size == 1 else 's'}; "
            f"at least {minimum} are needed.")
    return array


def check_samples(x: Any, y: Any, *, minimum: int = 2) -> tuple[np.ndarray, np.ndarray]:
    """Check both samples (group 1 is ``x``, group 2 is ``y``); return them as float arrays."""
    return (check_sample(x, name=GROUP_NAMES[0], minimum=minimum),
            check_sample(y, name=GROUP_NAMES[1], minimum=minimum))


def check_alternative(alternative: Any) -> str:
    """Return ``alternative`` if it is "two-sided", "less" or "greater"."""
    if not isinstance(alternative, str) or alternative not in ALTERNATIVES:
        raise OptionProblem(
            f"The direction must be one of {', '.join(ALTERNATIVES)}, not {alternative!r}.")
    return alternative


def check_confidence_level(level: Any) -> float:
    """Return ``level`` as a float if it lies strictly between 0 and 1."""
    if isinstance(level, bool) or not isinstance(level, Real) or not math.isfinite(level):
        raise OptionProblem(f"The confidence level must be a number between 0 and 1, not {level!r}.")
    if not 0 < level < 1:
        raise OptionProblem(
            f"The confidence level must lie strictly between 0 and 1 (for example 0.95), "
            f"not {level}.")
    return float(level)


def check_choice(value: Any, allowed: Iterable[str], *, what: str) -> str:
    """Return ``value`` if it is one of ``allowed``; ``what`` names the option in the message."""
    allowed = tuple(allowed)
    if not isinstance(value, str) or value not in allowed:
        raise OptionProblem(f"The {what} must be one of {', '.join(allowed)}, not {value!r}.")
    return value


def check_cancelled(cancelled: Callable[[], bool] | None) -> None:
    """Raise :class:`engine.errors.Cancelled` if the ``cancelled`` callback answers True."""
    if cancelled is not None and cancelled():
        raise Cancelled()
