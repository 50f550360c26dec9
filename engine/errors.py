"""The error and warning types the engine raises, each carrying a sentence a user can read."""

from __future__ import annotations

import contextlib
import functools
from typing import Any, Callable, Iterator, TypeVar

from .text import visible

_F = TypeVar("_F", bound=Callable[..., Any])

__all__ = [
    "TwofoldError",
    "FileProblem",
    "ColumnProblem",
    "DataProblem",
    "OptionProblem",
    "Cancelled",
    "TwofoldWarning",
    "quoted",
    "listing",
    "MESSAGE_LIMIT",
    "about_file",
    "naming_file",
    "names_its_source",
]

MESSAGE_LIMIT = 1000  # characters; a longer message keeps its start and end and says what was cut
QUOTE_LIMIT = 60  # characters of one label, column name or cell quoted in a message
LIST_LIMIT = 8  # items a message lists before it says how many more there are


def quoted(text: object, limit: int = QUOTE_LIMIT) -> str:
    """``text`` as a message quotes it: cut to ``limit`` characters, with the cut marked."""
    text = str(text)
    if len(text) <= limit:
        return text
    return f"{text[: limit - 1]}… ({len(text):,} characters)"


def listing(items, limit: int = LIST_LIMIT, *, quote: str = "'") -> str:
    """The first ``limit`` items, each quoted and cut, then how many more there are:
    "'a', 'b', 'c' and 99,997 more"."""
    items = list(items)
    shown = ", ".join(f"{quote}{quoted(item)}{quote}" for item in items[:limit])
    if len(items) > limit:
        shown += f" and {len(items) - limit:,} more"
    return shown


def _capped(message: str) -> str:
    if len(message) <= MESSAGE_LIMIT:
        return message
    # the note of what was cut counts against the limit too (its count is at most the length)
    room = MESSAGE_LIMIT - len(f" […{len(message):,} characters left out…] ")
    head, tail = message[: room * 3 // 4], message[len(message) - room // 4:]
    cut = len(message) - len(head) - len(tail)
    return f"{head} […{cut:,} characters left out…] {tail}"


class TwofoldError(Exception):
    """Base of every error the engine raises on purpose.

    ``str(error)`` is one line that a user can read: what went wrong and where (file, row,
    column). The window and the headless command show it as it is, never a traceback.
    """

    def __init__(self, message: str) -> None:
        # Labels and cell texts quoted in a message may hold line breaks, terminal escapes or
        # direction overrides; the message stays one line, with each written as an escape, and
        # within a length a reader can take in.
        message = _capped(visible(message))
        super().__init__(message)
        self.message = message


class FileProblem(TwofoldError):
    """The file cannot be read: missing, locked, empty, binary, unknown type, broken."""


class ColumnProblem(TwofoldError):
    """A named column or sheet does not exist, or cannot serve the role asked of it."""


class DataProblem(TwofoldError):
    """The data cannot support the analysis: a group too small, all values missing, no spread."""


class OptionProblem(TwofoldError):
    """An option is out of range: a confidence level of 1.5, a negative resample count."""


class Cancelled(TwofoldError):
    """The user stopped a long computation."""

    def __init__(self, message: str = "The computation was stopped before it finished.") -> None:
        super().__init__(message)


class TwofoldWarning(UserWarning):
    """A warning the engine itself issues (tests turn these into errors)."""


def naming_file(message: str, name: str, sheet: str | None = None) -> str:
    """``message`` made to name the file ``name`` (and the sheet, for a workbook): left as it is
    when it does, the file's first mention widened to the sheet, or the place put in front."""
    where = f"sheet '{quoted(sheet)}' of {name}" if sheet else name
    has_sheet = not sheet or f"'{quoted(sheet)}'" in message or f"'{sheet}'" in message
    if name in message and has_sheet:
        return message
    if name in message:
        at = message.index(name)
        if at == 0 and sheet:
            where = "S" + where[1:]
        return message[:at] + where + message[at + len(name):]
    return f"{'S' + where[1:] if sheet else where}: {message}"


@contextlib.contextmanager
def about_file(name: str | None, sheet: str | None = None) -> Iterator[None]:
    """Every :class:`TwofoldError` raised inside names the file (and sheet) it is about.

    The engine's own checks deep inside (a procedure that finds every value the same, a
    screening rule) do not know the file; this is the one place where their messages get it.
    """
    try:
        yield
    except Cancelled:
        raise
    except TwofoldError as error:
        if not name:
            raise
        fixed = naming_file(error.message, name, sheet)
        if fixed == error.message:
            raise
        raise type(error)(fixed) from error


def names_its_source(function: _F) -> _F:
    """Make every :class:`TwofoldError` of ``function`` name the file of its ``source=`` mapping
    (``{"file": ..., "sheet": ...}``), as the window and the command pass it."""

    @functools.wraps(function)
    def wrapper(*args: Any, **kwargs: Any) -> Any:
        source = kwargs.get("source") or {}
        with about_file(source.get("file"), source.get("sheet")):
            return function(*args, **kwargs)

    return wrapper  # type: ignore[return-value]
