"""``propose_layout``: a first guess at which column holds the groups and which the values."""

from __future__ import annotations

import re
from dataclasses import dataclass

import numpy as np

from ..errors import ColumnProblem
from .table import Table

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


def trimmed_levels(table: Table, column: str) -> tuple[list[str], np.ndarray, dict[str, set[str]]]:
    """Trimmed labels in order of first appearance, each row's label index (-1 for a blank
    label), and the raw spellings merged under each trimmed label (cached per column)."""
    if column not in table._levels:
        table._levels[column] = _trimmed_levels(table, column)
    return table._levels[column]


def _trimmed_levels(table: Table, column: str) -> tuple[list[str], np.ndarray, dict[str, set[str]]]:
    codes, texts = table.factors(column)
    if len(texts) <= 64:
        firsts = []
        for k in range(len(texts)):
            hits = codes == k
            firsts.append(int(hits.argmax()) if hits.any() else codes.size)
    else:
        firsts = [codes.size] * len(texts)
        present, where = np.unique(codes, return_index=True)
        for k, first in zip(present, where):
            if k >= 0:
                firsts[int(k)] = int(first)
    labels: list[str] = []
    index: dict[str, int] = {}
    spellings: dict[str, set[str]] = {}
    remap = np.full(len(texts) + 1, -1, dtype=np.int64)  # the last slot serves code -1
    for k in sorted(range(len(texts)), key=lambda k: firsts[k]):
        label = texts[k].strip()
        if not label or firsts[k] == codes.size:
            continue
        if label not in index:
            index[label] = len(labels)
            labels.append(label)
        remap[k] = index[label]
        spellings.setdefault(label, set()).add(texts[k])
    return labels, remap[codes], spellings


def _integer_codes(values: np.ndarray) -> bool:
    head = values[:1000]
    head = head[np.isfinite(head)]
    if head.size and not np.all(head == np.round(head)):
        return False
    finite = values[np.isfinite(values)]
    return finite.size > 0 and bool(np.all(finite == np.round(finite)))


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
    A column of text (or whole-number codes) with 2 to 30 distinct labels, none of them an
    identifier, is a group column; two labels beat more. Columns of numbers that are not
    identifiers (named like id/subject/sample, or whole numbers all different) are value
    columns. With no group column and at least two value columns the layout is wide.

    References
    ----------
    Wickham, H. (2014). Tidy data. Journal of Statistical Software 59(10), 1-23 (long and wide
    arrangements of the same measurements).
    """
    names = list(table.frame.columns)
    values = [n for n in names if _value_like(table, n)]
    if not values:
        kinds = ", ".join(f"'{n}' ({table.column_kinds[n]})" for n in names)
        raise ColumnProblem(f"No column of {table.path.name} holds numbers; its columns are {kinds}.")
    identifiers = [n for n in values if _is_identifier(table, n)]
    measures = [n for n in values if n not in identifiers] or values
    group, levels, why_group = _best_grouping(table, names, measures)
    reasons: list[str] = []
    if group is not None:
        value_columns = tuple(n for n in measures if n != group)
        if value_columns:
            reasons.append(why_group)
            reasons.append(f"'{value_columns[0]}' holds numbers, so it is taken as the measurements.")
            if identifiers:
                many = len(identifiers) > 1
                reasons.append(f"{', '.join(repr(n) for n in identifiers)} "
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
    values = table.numbers(name)
    if looks_like_id_name(name):
        return _integer_codes(values)
    if not _integer_codes(values):
        return False
    finite = values[np.isfinite(values)]
    if finite.size < 3:
        return False
    if np.all(np.diff(finite) > 0):
        return True
    head = finite[:1000]
    if np.unique(head).size < head.size:
        return False  # a repeated value in the first rows: not all different
    ordered = np.sort(finite)
    return bool(np.all(np.diff(ordered) > 0))


def _best_grouping(table: Table, names: list[str], measures: list[str]) -> tuple[str | None, list[str], str]:
    best: tuple | None = None
    for position, name in enumerate(names):
        kind = table.column_kinds[name]
        if kind == "empty" or looks_like_id_name(name):
            continue
        if kind == "number":
            values = table.numbers(name)
            if not _integer_codes(values) or len(measures) < 2 and name in measures:
                continue
            finite = values[np.isfinite(values)]
            if np.unique(finite[:1000]).size > 2:
                continue  # more than two codes in the first rows already
            distinct = np.unique(finite)
            if distinct.size != 2:
                continue
        elif _value_like(table, name):
            continue
        labels, _, _ = trimmed_levels(table, name)
        if not 2 <= len(labels) <= MAX_GROUP_LEVELS:
            continue
        score = (len(labels) == 2, kind != "number", -len(labels), -position)
        if best is None or score > best[0]:
            best = (score, name, labels)
    if best is None:
        return None, [], ""
    _, name, labels = best
    shown = ", ".join(f"'{label}'" for label in labels[:6]) + (", ..." if len(labels) > 6 else "")
    why = f"'{name}' holds {len(labels)} labels ({shown}), so it is taken as the group column."
    if len(labels) > 2:
        why += " Pick the two groups to compare."
    return name, labels, why
