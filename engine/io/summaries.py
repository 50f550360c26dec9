"""Two groups' summary statistics from a small file: one row per group.

The file has a header row naming its columns: the group's label (``label``, ``group`` or
``name``; else the first text column), ``n``, ``mean``, and ``sd`` or ``se`` (one of the two), and
optionally ``sd_known`` (yes/no, true/false, 1/0) marking known population SDs. Any format
:func:`engine.io.read_table` reads will do (text with any delimiter and decimal mark, workbooks).
Blank rows are skipped; exactly two groups must remain, group 1 first. Each role is one column:
two columns named alike (``n`` and ``N``) are refused rather than one of them picked.
"""

from __future__ import annotations

import math
from pathlib import Path

from ..errors import ColumnProblem, DataProblem, TwofoldError, quoted
from ..group_stats import GroupStats, plain_number
from .cells import cell_text
from .read import read_table

__all__ = ["read_summaries", "LABEL_NAMES", "SPREAD_COLUMNS"]

LABEL_NAMES = ("label", "group", "name")
SPREAD_COLUMNS = ("sd", "se")
_YES = {"yes", "y", "true", "1", "known"}
_NO = {"no", "n", "false", "0", ""}


def _columns(table) -> dict[str, str]:
    """Role -> the file's column name for label, n, mean, sd or se, sd_known."""
    name = table.path.name
    by_lower: dict[str, str] = {}
    for column in table.frame.columns:
        key = str(column).strip().lower()
        if key in by_lower and key in ("n", "mean", "sd", "se", "sd_known") + LABEL_NAMES:
            raise ColumnProblem(f"{name}: two columns are named '{quoted(key)}' ('{quoted(by_lower[key])}' "
                                f"and '{quoted(column)}'); keep one.")
        by_lower.setdefault(key, column)
    roles: dict[str, str] = {}
    for role in ("n", "mean", "sd", "se", "sd_known"):
        if role in by_lower:
            roles[role] = by_lower[role]
    label = next((by_lower[n] for n in LABEL_NAMES if n in by_lower), None)
    if label is None:
        texts = [c for c in table.frame.columns if table.column_kinds.get(c) in ("text", "mixed")]
        label = texts[0] if texts else None
    missing = [r for r in ("n", "mean") if r not in roles] + ([] if label else ["label"])
    if not ({"sd", "se"} & set(roles)):
        missing.append("sd (or se)")
    if missing:
        raise ColumnProblem(f"{name}: a file of summary statistics needs the columns label, n, mean "
                            f"and sd (or se); missing: {', '.join(missing)}.")
    if "sd" in roles and "se" in roles:
        raise ColumnProblem(f"{name}: give the column sd or the column se, not both.")
    roles["label"] = label
    return roles


def _number(text: str, *, where: str, role: str) -> float:
    if not text:
        raise DataProblem(f"{where}, column {role}: the cell is empty; give a number.")
    try:
        value = plain_number(text.replace(",", ".") if text.count(",") == 1 and "." not in text else text)
    except ValueError:
        raise DataProblem(f"{where}, column {role}: '{quoted(text)}' is not a number.") from None
    if not math.isfinite(value):
        raise DataProblem(f"{where}, column {role}: '{quoted(text)}' is not a finite number.")
    return value


def read_summaries(path: str | Path, *, sheet: str | None = None) -> tuple[GroupStats, GroupStats]:
    """The two groups of the summary file ``path`` (group 1 first), read-only.

    Raises
    ------
    FileProblem, ColumnProblem, DataProblem
        One line naming the file, and the row and column at fault.
    """
    table = read_table(path, sheet=sheet)
    name = table.path.name
    roles = _columns(table)
    frame = table.frame
    groups: list[GroupStats] = []
    rows: list[int] = []
    for row in range(len(frame)):
        cells = {role: cell_text(frame[column].iat[row]).strip() for role, column in roles.items()}
        if not any(cells.values()):
            continue
        where = f"{name}, row {table.file_row(row)}"
        if len(groups) == 2:
            raise DataProblem(f"{where}: a file of summary statistics holds two groups, one row each; "
                              "this is a third.")
        spread = "sd" if "sd" in roles else "se"
        n = _number(cells["n"], where=where, role="n")
        if not n.is_integer():
            raise DataProblem(f"{where}, column n: the count must be a whole number, not {cells['n']}.")
        known = cells.get("sd_known", "").lower()
        if known not in _YES | _NO:
            raise DataProblem(f"{where}, column sd_known: write yes or no, not '{quoted(known)}'.")
        rows.append(table.file_row(row))
        try:
            groups.append(GroupStats(label=cells["label"], n=int(n),
                                     mean=_number(cells["mean"], where=where, role="mean"),
                                     sd_known=known in _YES,
                                     **{spread: _number(cells[spread], where=where, role=spread)}))
        except TwofoldError as problem:
            if problem.message.startswith(name):
                raise
            raise type(problem)(f"{where}: {problem.message}") from None
    if len(groups) != 2:
        raise DataProblem(f"{name}: a file of summary statistics holds two groups, one row each; "
                          f"found {len(groups)}.")
    _check_pair(groups, rows, name)
    return groups[0], groups[1]


def _check_pair(groups: list[GroupStats], rows: list[int], name: str) -> None:
    """What the two rows must agree on, said with the file and both rows (the analysis refuses
    the same things, but without knowing where they came from)."""
    first, second = groups
    where = f"{name}, rows {rows[0]} and {rows[1]}"
    if first.label == second.label:
        raise DataProblem(f"{where}: both groups are labelled '{quoted(first.label)}'; give each its own label.")
    if first.sd_known != second.sd_known:
        raise DataProblem(f"{where}, column sd_known: one SD is marked as known and the other not; "
                          "the z procedure needs both known, so mark both yes or both no.")
    if first.standard_deviation == 0 and second.standard_deviation == 0:
        spread = "sd" if first.given_as == second.given_as == "sd" else "sd or se"
        raise DataProblem(f"{where}, column {spread}: both groups have a spread of 0; with no spread "
                          "at all the groups cannot be compared.")
