"""The command's flags that name the columns of a data file (``--value``, ``--group``,
``--groups``, ``--sheet``), declared once: ``analyze`` and ``report`` take them for the data file,
``plan`` for a pilot file."""

from __future__ import annotations

from typing import Any

__all__ = ["COLUMN_FLAGS", "add_column_flags"]

# The flags this module adds, as argparse names them.
COLUMN_FLAGS = ("value", "group", "groups", "sheet")


def add_column_flags(command: Any) -> None:
    """Add the column flags to ``command`` (a parser or an argument group of one)."""
    command.add_argument("--value", action="append", metavar="COLUMN",
                         help="the column of measurements; give it twice, once per group column, for a "
                              "file with one column per group (paired row by row: one row per pair)")
    command.add_argument("--group", metavar="COLUMN", help="the column that says which group a row is in")
    command.add_argument("--groups", nargs=2, metavar=("FIRST", "SECOND"),
                         help="the two group labels to compare; every difference is FIRST minus SECOND")
    command.add_argument("--sheet", help="the sheet of a workbook (default: the first)")
