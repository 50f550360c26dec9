"""The error and warning types the engine raises, each carrying a sentence a user can read."""

from __future__ import annotations

from .text import visible

__all__ = [
    "TwofoldError",
    "FileProblem",
    "ColumnProblem",
    "DataProblem",
    "OptionProblem",
    "Cancelled",
    "TwofoldWarning",
]


class TwofoldError(Exception):
    """Base of every error the engine raises on purpose.

    ``str(error)`` is one line that a user can read: what went wrong and where (file, row,
    column). The window and the headless command show it as it is, never a traceback.
    """

    def __init__(self, message: str) -> None:
        # Labels and cell texts quoted in a message may hold line breaks, terminal escapes or
        # direction overrides; the message stays one line, with each written as an escape.
        message = visible(message)
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
