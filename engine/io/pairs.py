"""Matched pairs from a table: by an ID column (long layout) or row by row (wide layout).

``pairs_by_id`` matches the rows of two groups through an ID column, each ID once in each group;
``pairs_by_row`` takes two columns and one row per unit. Both return the matched values and
their differences (group 1 minus group 2) in a stable order (the order in which each pair's
first row appears in the file), and a list of everything left out, each item with its file rows
and what was done with it. Nothing is guessed: an ID that appears twice in a group is left out,
never matched to one of its rows at random.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Mapping

import numpy as np

from ..errors import ColumnProblem, DataProblem, OptionProblem, about_file, listing, quoted
from ..results import Finding, Groups, frozen_mapping, readonly_array
from ..wording import plural
from .cells import cell_text, is_missing_marker
from .groups import Intake, _check_columns, _check_measurements
from .table import Table

__all__ = ["PAIR_PROBLEMS", "PairProblem", "PairedIntake", "pairs_by_id", "pairs_by_row",
           "paired_intake"]

# The kinds of item the pairing leaves out, in the words a count of them uses.
PAIR_PROBLEMS: Mapping[str, str] = frozen_mapping({
    "unmatched": "ID in one group only",
    "repeated": "ID more than once in a group",
    "no_id": "row without an ID",
    "partner_missing": "pair with one value blank",
    "non_numeric": "pair with a value that is not a number",
    "set_aside": "pair with a value set aside by hand",
})
# The same kinds counted in the plural ("2 IDs in one group only").
_PROBLEMS_PLURAL: Mapping[str, str] = frozen_mapping({
    "unmatched": "IDs in one group only",
    "repeated": "IDs more than once in a group",
    "no_id": "rows without an ID",
    "partner_missing": "pairs with one value blank",
    "non_numeric": "pairs with a value that is not a number",
    "set_aside": "pairs with a value set aside by hand",
})
_SHOWN_ROWS = 5
_SHOWN_PROBLEMS = 5  # items quoted in full in the screening, per kind


@dataclass(frozen=True)
class PairProblem:
    """One ID or row left out of the pairs: ``kind`` (a key of ``PAIR_PROBLEMS``), the pair ID
    (None for a row without one), the file rows concerned and a sentence saying what was done."""

    kind: str
    pair_id: str | None
    file_rows: tuple[int, ...]
    text: str


@dataclass(frozen=True, eq=False)
class PairedIntake:
    """The matched pairs and what the pairing left out.

    ``x`` and ``y`` hold group 1's and group 2's value of each pair, ``differences`` is x - y,
    ``pair_ids`` names each pair (the ID, or the file row in the wide layout) and ``file_rows``
    gives the file row of each value (``frame_rows``: its row in the table's frame).
    ``counts`` has the number of items of each kind left out.
    """

    labels: tuple[str, str]
    pair_ids: tuple[str, ...]
    x: np.ndarray
    y: np.ndarray
    differences: np.ndarray
    file_rows: tuple[tuple[int, ...], tuple[int, ...]]
    problems: tuple[PairProblem, ...]
    counts: Mapping[str, int]
    frame_rows: tuple[np.ndarray, np.ndarray] = (np.empty(0, np.intp), np.empty(0, np.intp))

    def __post_init__(self) -> None:
        for name in ("x", "y", "differences"):
            object.__setattr__(self, name, readonly_array(getattr(self, name)))
        object.__setattr__(self, "frame_rows", tuple(_readonly_rows(rows) for rows in self.frame_rows))
        object.__setattr__(self, "problems", tuple(self.problems))
        object.__setattr__(self, "counts", frozen_mapping(
            {kind: sum(p.kind == kind for p in self.problems) for kind in PAIR_PROBLEMS}))

    @property
    def n_pairs(self) -> int:
        return int(self.differences.size)


def _readonly_rows(rows) -> np.ndarray:
    """Frame rows as a read-only integer array of their own."""
    array = np.array(rows, dtype=np.intp, copy=True)
    array.setflags(write=False)
    return array


def _rows(rows) -> str:
    rows = sorted(rows)
    shown = ", ".join(str(r) for r in rows[:_SHOWN_ROWS])
    more = f" and {len(rows) - _SHOWN_ROWS} more" if len(rows) > _SHOWN_ROWS else ""
    return f"{'row' if len(rows) == 1 else 'rows'} {shown}{more}"


def _cell_state(table: Table, column: str, frame_row: int) -> tuple[str, str]:
    """("ok" | "missing" | "non_numeric", the cell's text) for one value cell."""
    value = table.numbers(column)[frame_row]
    text = cell_text(table.frame[column].iat[frame_row])
    if np.isfinite(value):
        return "ok", text
    if np.isnan(value) and is_missing_marker(text):
        return "missing", text
    return "non_numeric", text


def _value_problem(table: Table, columns: tuple[str, str], names: tuple[str, str],
                   frame_rows: tuple[int, int], pair_id: str | None) -> PairProblem | None:
    """The problem of a pair whose value cells are not both numbers, else None."""
    states = [_cell_state(table, c, r) for c, r in zip(columns, frame_rows)]
    if all(state == "ok" for state, _ in states):
        return None
    file_rows = tuple(sorted({table.file_row(r) for r in frame_rows}))
    who = f"Pair '{quoted(pair_id)}'" if pair_id is not None else f"The pair in {_rows(file_rows)}"
    where = f" ({_rows(file_rows)})" if pair_id is not None else ""
    bad = [(name, state, text) for name, (state, text) in zip(names, states) if state != "ok"]
    if any(state == "non_numeric" for _, state, _ in bad):
        name, _, text = next(b for b in bad if b[1] == "non_numeric")
        column, row = next((c, r) for c, r, n in zip(columns, frame_rows, names) if n == name)
        what = "is infinite" if np.isinf(table.numbers(column)[row]) else "is not a number"
        return PairProblem("non_numeric", pair_id, file_rows,
                           f"{who}{where}: the '{quoted(name)}' value '{quoted(text)}' {what}; "
                           f"the pair was left out.")
    named = " and ".join(f"'{quoted(name)}'" for name, _, _ in bad)
    return PairProblem("partner_missing", pair_id, file_rows,
                       f"{who}{where}: the {named} value {'is' if len(bad) == 1 else 'are'} "
                       f"blank; the pair was left out.")


def _aside_problem(table: Table, columns: tuple[str, str], names: tuple[str, str],
                   frame_rows: tuple[int, int], pair_id: str | None,
                   set_aside: Mapping[tuple[int, str], str]) -> PairProblem | None:
    """The problem of a pair one of whose value cells the user set aside, else None."""
    aside = [(name, column, row) for name, column, row in zip(names, columns, frame_rows)
             if (row, column) in set_aside]
    if not aside:
        return None
    file_rows = tuple(sorted({table.file_row(r) for r in frame_rows}))
    who = f"Pair '{quoted(pair_id)}' ({_rows(file_rows)})" if pair_id is not None else \
        f"The pair in {_rows(file_rows)}"
    said = []
    for name, column, row in aside:
        why = set_aside[(row, column)]
        said.append(f"the '{quoted(name)}' value '{quoted(cell_text(table.frame[column].iat[row]))}'"
                     + (f" ({quoted(why)})" if why else ""))
    return PairProblem("set_aside", pair_id, file_rows,
                       f"{who}: {' and '.join(said)} {'was' if len(said) == 1 else 'were'} set "
                       "aside by hand; the pair was left out.")


def _finish(table: Table, labels: tuple[str, str], columns: tuple[str, str], ids: list[str],
            frame_rows: list[tuple[int, int]], problems: list[PairProblem],
            none_found: str) -> PairedIntake:
    if not ids:
        raise DataProblem(none_found)
    rows = np.array(frame_rows, dtype=np.intp).reshape(-1, 2)
    x, y = table.numbers(columns[0])[rows[:, 0]], table.numbers(columns[1])[rows[:, 1]]
    with np.errstate(over="ignore"):
        d = x - y
    problems.sort(key=lambda p: (min(p.file_rows) if p.file_rows else 0, p.kind))
    return PairedIntake(labels=labels, pair_ids=tuple(ids), x=x, y=y, differences=d,
                        file_rows=(tuple(table.file_row(a) for a, _ in frame_rows),
                                   tuple(table.file_row(b) for _, b in frame_rows)),
                        problems=tuple(problems), counts={}, frame_rows=(rows[:, 0], rows[:, 1]))


def pairs_by_row(table: Table, *, columns: tuple[str, str],
                 set_aside: Mapping[tuple[int, str], str] | None = None) -> PairedIntake:
    """Pairs from two columns of a wide table, one row per unit (group 1 is ``columns[0]``).

    A row with both cells blank is skipped without a word (blank rows below the data); a row
    with one value blank or not a number, or with a cell in ``set_aside`` ((frame row, column)
    -> the reason, as :func:`engine.io.make_groups` takes it), is left out and listed.
    """
    name = getattr(getattr(table, "path", None), "name", "the table")
    with about_file(name, getattr(table, "sheet", None)):
        if not isinstance(table, Table):
            raise OptionProblem("Pairing needs a table read by read_table.")
        columns = tuple(columns)
        if len(columns) != 2 or columns[0] == columns[1]:
            raise OptionProblem("Pairing row by row needs two different columns, one per group.")
        _check_columns(table, columns)
        for column in columns:
            _check_measurements(table, column)
        set_aside = set_aside or {}
        ok = np.isfinite(table.numbers(columns[0])) & np.isfinite(table.numbers(columns[1]))
        problems = []
        aside = sorted({row for row, column in set_aside if column in columns and 0 <= row < ok.size})
        for row in aside:
            problems.append(_aside_problem(table, columns, columns, (row, row), None, set_aside))
        listed = ok.copy()
        listed[aside] = True  # a row set aside is listed as such, whatever its cells hold
        for row in np.flatnonzero(~listed).tolist():
            states = [_cell_state(table, c, row)[0] for c in columns]
            if states != ["missing", "missing"]:
                problems.append(_value_problem(table, columns, columns, (row, row), None))
        ok[aside] = False
        good = np.flatnonzero(ok).tolist()
        ids = [f"row {table.file_row(row)}" for row in good]
        frame_rows = [(row, row) for row in good]
        return _finish(table, columns, columns, ids, frame_rows, problems,
                       f"No row of {name} holds a number in both '{quoted(columns[0])}' and "
                       f"'{quoted(columns[1])}', so there are no pairs.")


def pairs_by_id(table: Table, *, values: str, group: str, pair_id: str,
                pick: tuple[str, str] | None = None,
                set_aside: Mapping[tuple[int, str], str] | None = None) -> PairedIntake:
    """Pairs from a long table: ``values`` holds the measurements, ``group`` the group labels and
    ``pair_id`` the unit each row belongs to; each ID should appear once in each group.

    ``pick`` names the two groups, group 1 first; without it the column must hold exactly two
    labels, and group 1 is the first met in the file. IDs and labels are compared with spaces
    around them trimmed. Left out, each with its file rows: IDs in one group only, IDs that
    appear more than once in a group (all their rows), rows without an ID (of the two groups),
    pairs with a value blank or not a number, and pairs with a value cell in ``set_aside``
    ((frame row, column) -> the reason, as :func:`engine.io.make_groups` takes it).
    """
    name = getattr(getattr(table, "path", None), "name", "the table")
    with about_file(name, getattr(table, "sheet", None)):
        if not isinstance(table, Table):
            raise OptionProblem("Pairing needs a table read by read_table.")
        if pair_id in (values, group):
            raise OptionProblem(f"The pair ID column '{quoted(pair_id)}' must differ from the "
                                f"value and group columns.")
        if pair_id not in table.column_kinds:
            raise ColumnProblem(f"{name} has no pair ID column '{quoted(pair_id)}'; its columns "
                                f"are {listing(table.column_kinds)}.")
        _check_columns(table, (values, group))
        _check_measurements(table, values)
        labels, codes, _ = table.levels(group)
        if pick is None:
            if len(labels) != 2:
                raise ColumnProblem(
                    f"Column '{quoted(group)}' of {name} holds {plural(len(labels), 'group')}"
                    f"{' (' + listing(labels) + ')' if labels else ''}; pick the two to pair.")
            pick = (labels[0], labels[1])
        pick = (str(pick[0]).strip(), str(pick[1]).strip())
        for label in pick:
            if label not in labels:
                raise ColumnProblem(f"Column '{quoted(group)}' of {name} has no group "
                                    f"'{quoted(label)}'; its groups are {listing(labels)}.")
        if pick[0] == pick[1]:
            raise OptionProblem(f"The two groups picked are the same ('{quoted(pick[0])}').")
        return _pair_long(table, name, values, group, pair_id, pick,
                          [np.flatnonzero(codes == labels.index(label)) for label in pick],
                          set_aside or {})


def _pair_long(table, name, values, group, pair_id, pick, rows_of, set_aside) -> PairedIntake:
    id_cells = table.frame[pair_id].to_numpy(dtype=object)
    usable = np.isfinite(table.numbers(values))
    problems: list[PairProblem] = []
    by_group: list[dict[str, list[int]]] = []
    for label, rows in zip(pick, rows_of):
        seen: dict[str, list[int]] = {}
        for row, cell in zip(rows.tolist(), id_cells[rows].tolist()):
            text = cell_text(cell).strip()
            if not text:
                problems.append(PairProblem(
                    "no_id", None, (table.file_row(row),),
                    f"Row {table.file_row(row)} of group '{quoted(label)}' has no pair ID in "
                    f"'{quoted(pair_id)}'; it was left out."))
                continue
            seen.setdefault(text, []).append(row)
        by_group.append(seen)
    repeated = {key for seen in by_group for key, rows in seen.items() if len(rows) > 1}
    for key in repeated:
        file_rows = tuple(sorted(table.file_row(r) for seen in by_group for r in seen.get(key, ())))
        counts = " and ".join(f"{len(seen.get(key, ()))} in '{quoted(label)}'"
                              for label, seen in zip(pick, by_group))
        problems.append(PairProblem(
            "repeated", key, file_rows,
            f"Pair ID '{quoted(key)}' appears more than once in a group ({counts}; "
            f"{_rows(file_rows)}); all its rows were left out."))
    first, second = by_group
    for seen, other, here, there in ((first, second, pick[0], pick[1]),
                                     (second, first, pick[1], pick[0])):
        for key, rows in seen.items():
            if key in repeated or key in other:
                continue
            file_rows = tuple(table.file_row(r) for r in rows)
            problems.append(PairProblem(
                "unmatched", key, file_rows,
                f"Pair ID '{quoted(key)}' appears in group '{quoted(here)}' ({_rows(file_rows)}) "
                f"but not in '{quoted(there)}'; it was left out."))
    matched = [key for key in first if key in second and key not in repeated]
    matched.sort(key=lambda k: min(first[k][0], second[k][0]))
    ids, frame_rows = [], []
    for key in matched:
        rows = (first[key][0], second[key][0])
        aside = _aside_problem(table, (values, values), pick, rows, key, set_aside)
        if aside is not None:
            problems.append(aside)
            continue
        if not (usable[rows[0]] and usable[rows[1]]):
            problems.append(_value_problem(table, (values, values), pick, rows, key))
            continue
        ids.append(key)
        frame_rows.append(rows)
    return _finish(table, pick, (values, values), ids, frame_rows, problems,
                   f"No pair ID in '{quoted(pair_id)}' of {name} has a number in both "
                   f"'{quoted(pick[0])}' and '{quoted(pick[1])}' (each ID once in each group), "
                   f"so there are no pairs.")


def _problem_finding(kind: str, problems: list[PairProblem]) -> Finding:
    """One finding for every item of one kind left out: how many, and the first few in full."""
    count = len(problems)
    shown = " ".join(p.text for p in problems[:_SHOWN_PROBLEMS])
    more = (f" And {plural(count - _SHOWN_PROBLEMS, 'more')} like "
            f"{'it' if count - _SHOWN_PROBLEMS == 1 else 'them'}." if count > _SHOWN_PROBLEMS else "")
    severity = "warning" if kind in ("repeated", "unmatched") else "note"
    return Finding(f"pairs_{kind}", severity,
                   f"{plural(count, PAIR_PROBLEMS[kind], _PROBLEMS_PLURAL[kind])}: {shown}{more}")


def paired_intake(base: Intake, pairs: PairedIntake, *, file_name: str, how: str) -> Intake:
    """The intake of a paired design: the matched pairs as the two groups (``x[i]`` and ``y[i]``
    one unit), and the screening of the cells (``base``, from :func:`engine.io.make_groups` on
    the same columns) with what the pairing did in place of its own summary.

    ``how`` says how the pairs were matched ("by the IDs in 'unit'", "row by row"). The
    screening's findings start with the number of pairs formed and one finding for each kind of
    item left out (IDs in one group only, IDs repeated within a group, rows without an ID, pairs
    with a value blank, not a number or set aside), each item with its file rows and what was
    done with it. The sign that independent groups look paired is dropped: the design is paired.
    """
    screening = base.screening
    n = pairs.n_pairs
    left_out = [(kind, [p for p in pairs.problems if p.kind == kind]) for kind in PAIR_PROBLEMS]
    left_out = [(kind, items) for kind, items in left_out if items]
    counts = ", ".join(plural(len(items), PAIR_PROBLEMS[kind], _PROBLEMS_PLURAL[kind])
                       for kind, items in left_out)
    summary = Finding(
        "screening_summary", "info",
        f"{plural(screening.rows_read, 'row')} read from {file_name}; {plural(n, 'pair')} of "
        f"'{quoted(pairs.labels[0])}' and '{quoted(pairs.labels[1])}' formed {how}"
        + (f"; left out: {counts}." if left_out else "; nothing left out of the pairs."))
    kept = [f for f in screening.findings if f.key not in ("screening_summary", "paired")]
    findings = (summary, *(_problem_finding(kind, items) for kind, items in left_out), *kept)
    return Intake(Groups(pairs.labels, pairs.x, pairs.y),
                  replace(screening, n_used=(n, n), paired=None, findings=findings),
                  pairs.frame_rows, pairs=pairs)
