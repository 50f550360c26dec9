"""``propose_layout``: a first guess at which column holds the groups and which the values."""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np

from ..errors import ColumnProblem, about_file, listing, quoted
from .table import Spellings, Table

__all__ = ["LayoutProposal", "propose_layout", "looks_like_id_name", "trimmed_levels", "MAX_GROUP_LEVELS"]

MAX_GROUP_LEVELS = 30
_ID_NAME = re.compile(
    r"(^|[^a-z])(id|ids|nr|subject|subj|sample|unit|specimen|patient|participant|pair|animal|"
    r"person|serial|piece|individual)([^a-z]|$)", re.IGNORECASE)
_CAMEL_ID = re.compile(r"[a-z0-9_ ](ID|Id)$")


def looks_like_id_name(name: str) -> bool:
    """True for names such as "id", "subject", "sample_no", "specimenID" (common practice)."""
    return bool(_ID_NAME.search(str(name)) or _CAMEL_ID.search(str(name)))


@dataclass(frozen=True)
class LayoutProposal:
    """Which columns likely hold the groups and the values; the caller makes the final choice."""

    layout: str
    group_column: str | None
    value_columns: tuple[str, ...]
    levels: tuple[str, ...]
    reasons: tuple[str, ...]


def trimmed_levels(table: Table, column: str) -> tuple[list[str], np.ndarray, Spellings]:
    """Trimmed labels in order of first appearance, each row's label index (-1 for a blank
    label), and the raw spellings merged under each trimmed label (see :meth:`Table.levels`)."""
    return table.levels(column)


def _value_like(table: Table, name: str) -> bool:
    kind = table.column_kinds[name]
    if kind == "number":
        return True
    if kind == "mixed":
        numbers = table.numbers(name)
        filled = table.frame[name].notna().to_numpy()
        return np.count_nonzero(~np.isnan(numbers)) >= 0.5 * max(1, np.count_nonzero(filled))
    return False


def propose_layout(table: Table) -> LayoutProposal:
    """Suggest a long layout (a group column and a value column) or a wide one (a column per group).

    Parameters
    ----------
    table : Table
        As returned by :func:`engine.io.read_table`.

    Returns
    -------
    LayoutProposal
        ``value_columns`` lists the likely measurement columns, best first; ``levels`` the
        trimmed group labels in order of first appearance (long layout).

    Raises
    ------
    ColumnProblem
        No column holds numbers.

    Notes
    -----
    A column of text (or whole-number codes) with 2 to 30 distinct labels, some used more than
    once and none of them an identifier, is a group column; two labels beat more. Columns of numbers that are not
    identifiers (named like id/subject/sample, or whole numbers all different) are value
    columns; in the long layout those with fractions come before whole-number columns (codes,
    counts). With no group column and at least two value columns the layout is wide, its
    columns in file order.

    References
    ----------
    Wickham, H. (2014). Tidy data. Journal of Statistical Software 59(10), 1-23 (long and wide
    arrangements of the same measurements).
    """
    with about_file(table.path.name, table.sheet):
        return _propose_layout(table)


def _propose_layout(table: Table) -> LayoutProposal:
    names = list(table.frame.columns)
    values = [n for n in names if _value_like(table, n)]
    if not values:
        kinds = listing([f"{quoted(n)}' ({table.column_kinds[n]}" for n in names])
        raise ColumnProblem(f"No column of {table.path.name} holds numbers; its columns are {kinds}.")
    identifiers = [n for n in values if _is_identifier(table, n)]
    measures = [n for n in values if n not in identifiers] or values
    group, levels, why_group = _best_grouping(table, names, measures)
    reasons: list[str] = []
    if group is not None:
        # measurements with fractions before whole-number columns (codes, batch numbers, counts)
        whole = {n: table.column_kinds[n] == "number" and table.whole_numbers(n) for n in measures}
        value_columns = tuple(sorted((n for n in measures if n != group), key=whole.__getitem__))
        if value_columns:
            reasons.append(why_group)
            reasons.append(f"'{value_columns[0]}' holds numbers, so it is taken as the measurements.")
            if identifiers:
                many = len(identifiers) > 1
                reasons.append(f"{listing(identifiers)} "
                               f"{'look like identifiers' if many else 'looks like an identifier'}, "
                               "not measurements.")
            return LayoutProposal("long", group, value_columns, tuple(levels), tuple(reasons))
    if len(measures) >= 2:
        reasons.append("No column holds group labels, and several columns hold numbers, so each "
                       f"column is taken as one group ({', '.join(repr(n) for n in measures[:2])} "
                       "first).")
        return LayoutProposal("wide", None, tuple(measures), (), tuple(reasons))
    reasons.append(f"Only '{measures[0]}' holds numbers and no column holds group labels; name "
                   "the column that says which group each row belongs to.")
    return LayoutProposal("long", None, tuple(measures), (), tuple(reasons))


def _is_identifier(table: Table, name: str) -> bool:
    """Whole numbers named like an identifier, or whole numbers that are all different."""
    if not table.whole_numbers(name):
        return False
    if looks_like_id_name(name):
        return True
    values = table.numbers(name)
    head = values[:1000]
    head = head[np.isfinite(head)]
    if np.unique(head).size < head.size:
        return False  # a repeated value in the first rows: not all different
    if values.size >= 3 and table.strictly_rising(name):
        return True  # a running number: one comparison pass
    finite = values[np.isfinite(values)]
    if finite.size < 3:
        return False
    ordered = np.sort(finite)
    # compared, not subtracted: the gap between -1e308 and 1e308 is beyond the largest float
    return bool(np.all(ordered[1:] > ordered[:-1]))


def _two_codes(values: np.ndarray) -> bool:
    """True if the column's finite values take exactly two distinct values."""
    head = values[:1000]
    codes = np.unique(head[np.isfinite(head)])
    if codes.size > 2:
        return False  # more than two codes in the first rows already
    if codes.size == 2:
        return bool(np.all((values == codes[0]) | (values == codes[1]) | ~np.isfinite(values)))
    return np.unique(values[np.isfinite(values)]).size == 2


def _few_texts(table: Table, name: str) -> bool:
    """False when the column's cells, trimmed, hold more distinct texts than a group column can."""
    head = table.frame[name].iloc[:4096].dropna()
    if len({str(v).strip() for v in head}) > MAX_GROUP_LEVELS + 1:  # a blank counts among them
        return False  # the first rows alone hold too many (a million labels need no factorizing)
    _, texts = table.factors(name)
    if len(texts) <= MAX_GROUP_LEVELS + 1:
        return True
    return len({t.strip() for t in texts}) <= MAX_GROUP_LEVELS + 1


def _best_grouping(table: Table, names: list[str], measures: list[str]) -> tuple[str | None, list[str], str]:
    best: tuple | None = None
    for position, name in enumerate(names):
        kind = table.column_kinds[name]
        if kind == "empty" or kind == "number" and not table.whole_numbers(name):
            continue  # (the cheap test first: on 100,000 columns of measurements it settles all)
        if looks_like_id_name(name):
            continue
        if kind == "number":
            if len(measures) < 2 and name in measures:
                continue
            if not _two_codes(table.numbers(name)):
                continue
        elif _value_like(table, name):
            continue
        if not _few_texts(table, name):
            continue  # more distinct texts than group labels can be, even once trimmed
        labels, codes, _ = table.levels(name)
        if not 2 <= len(labels) <= MAX_GROUP_LEVELS:
            continue
        if np.count_nonzero(codes >= 0) <= len(labels):
            continue  # no label used twice: each row names itself, as an identifier does
        score = (len(labels) == 2, kind != "number", -len(labels), -position)
        if best is None or score > best[0]:
            best = (score, name, labels)
    if best is None:
        return None, [], ""
    _, name, labels = best
    shown = listing(labels, 6)
    why = f"'{name}' holds {len(labels)} labels ({shown}), so it is taken as the group column."
    if len(labels) > 2:
        why += " Pick the two groups to compare."
    return name, labels, why
