"""``make_groups``: two clean groups from a table, with the screening report."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Mapping, Sequence

import numpy as np
import pandas as pd

from ..errors import ColumnProblem, DataProblem, OptionProblem, about_file, listing, quoted
from ..results import Finding, Groups
from ..wording import plural
from ._files import wrap_unexpected
from .cells import cell_text, is_missing_marker
from .repeats import duplicate_rows
from .screening import repeated_rows_finding
from .screening import (
    MAX_LISTED_EXCLUSIONS,
    Exclusion,
    ScreeningReport,
    identifier_candidates,
    paired_sign,
    possible_slips,
)
from .table import Table

__all__ = ["Intake", "make_groups"]

_SHOWN = 5  # examples quoted in a finding


@dataclass(frozen=True, eq=False)
class Intake:
    """Two clean groups, the screening report, and the frame row of each value used.

    In a paired design the groups are the matched pairs (``groups.x[i]`` and ``groups.y[i]`` one
    unit) and ``pairs`` is the pairing (``engine.io.pairs.PairedIntake``); None otherwise.
    """

    groups: Groups
    screening: ScreeningReport
    rows: tuple[np.ndarray, np.ndarray]
    pairs: Any = None


@dataclass
class _Cells:
    """One group's cells before cleaning."""

    label: str
    column: str
    frame_rows: np.ndarray
    numbers: np.ndarray
    trailing_from: int | None = None  # wide layout: frame row where the column's blank tail begins


class _Listing:
    """Many excluded cells of one kind: their frame rows and texts (None: all blank)."""

    def __init__(self, rows: np.ndarray, texts: np.ndarray | None) -> None:
        self.rows, self.texts = rows, texts

    def __len__(self) -> int:
        return int(self.rows.size)

    def __getitem__(self, part: slice) -> list[tuple[int, str]]:
        rows = self.rows[part]
        texts = [""] * rows.size if self.texts is None else self.texts[part]
        return [(int(r), str(t)) for r, t in zip(rows, texts)]

    def __iter__(self):
        return iter(self[:])


@dataclass
class _Unlabelled:
    """Long-layout rows with a blank group label: counted as missing, listed on the label column."""

    unlabelled: int = 0
    listed: list = field(default_factory=list)


def make_groups(
    table: Table,
    *,
    values: str | Sequence[str],
    group: str | None = None,
    pick: tuple[str, str] | None = None,
    set_aside: Mapping[tuple[int, str], str] | None = None,
) -> Intake:
    """Split a table into two clean groups of finite numbers and screen them.

    Parameters
    ----------
    table : Table
        From :func:`engine.io.read_table`.
    values : str or sequence of str
        Long layout: the value column. Wide layout: the columns, one per group.
    group : str, optional
        Long layout: the column of group labels. None for the wide layout.
    pick : (str, str), optional
        The two groups to compare, group 1 first (labels in the long layout, columns in the wide
        one). Needed when there are more than two.
    set_aside : mapping of (frame row, column) to str, optional
        Cells the user leaves out, with the reason; they count as "set_aside".

    Returns
    -------
    Intake

    Raises
    ------
    ColumnProblem
        A column or label that does not exist, a value column of text only, or more than two
        groups and no ``pick``.
    DataProblem
        Only one group, or a group with fewer than two usable values.

    Notes
    -----
    A cell is used when it holds a finite number. Blank cells and texts such as "n/a" count as
    missing, other texts as non-numeric, infinities as infinite; each is listed with its file
    row. Group labels are trimmed of surrounding spaces. Group 1 is ``pick[0]``, else the first
    label met in the file (long) or the first value column (wide). Values that look like
    slips are flagged (see :func:`engine.io.screening.possible_slips`), never removed.

    References
    ----------
    Tukey, J. W. (1977). Exploratory Data Analysis. Addison-Wesley (screening by fences).
    """
    name = getattr(getattr(table, "path", None), "name", "the table")
    with about_file(name, getattr(table, "sheet", None)), wrap_unexpected(name, "split into groups", DataProblem):
        if not isinstance(table, Table):
            raise OptionProblem("make_groups needs a table read by read_table.")
        return _make_groups(table, values=values, group=group, pick=pick, set_aside=set_aside)


def _check_columns(table: Table, names: Sequence[str]) -> None:
    existing = table.column_kinds
    for name in names:
        if name not in existing:
            raise ColumnProblem(f"{table.path.name} has no column '{quoted(name)}'; its columns are "
                                f"{listing(existing)}.")


def _check_measurements(table: Table, name: str) -> None:
    kind = table.column_kinds[name]
    if kind == "text":
        cells = table.frame[name]
        examples = listing(cell_text(v) for v in cells.dropna().unique()[:3])
        raise ColumnProblem(
            f"Column '{quoted(name)}' of {table.path.name} holds only text ({examples}), not numbers.")
    if kind == "empty":
        raise ColumnProblem(f"Column '{name}' of {table.path.name} is empty.")


def _value_names(values: str | Sequence[str]) -> tuple[str, ...]:
    if isinstance(values, str):
        return (values,)
    try:
        names = tuple(values)
    except TypeError as error:
        raise OptionProblem("values must be a column name or a list of column names.") from error
    if not names or not all(isinstance(n, str) for n in names):
        raise OptionProblem("values must be a column name or a list of column names.")
    return names


def _check_pick(pick: tuple[str, str] | None) -> tuple[str, str] | None:
    if pick is None:
        return None
    if isinstance(pick, str) or len(pick) != 2:
        raise OptionProblem("Pick exactly two groups to compare.")
    first, second = (str(p).strip() for p in pick)
    if first == second:
        raise OptionProblem(f"The two groups picked are the same ('{first}'); pick two different ones.")
    return first, second


def _make_groups(table, *, values, group, pick, set_aside) -> Intake:
    names = _value_names(values)
    pick = _check_pick(pick)
    _check_columns(table, names + ((group,) if group is not None else ()))
    findings: list[Finding] = []
    extra = _Unlabelled()
    if group is not None:
        if len(names) != 1:
            raise ColumnProblem("With a group column, name one value column (not "
                                f"{len(names)}).")
        if group == names[0]:
            raise ColumnProblem(f"Column '{group}' cannot hold both the groups and the values.")
        _check_measurements(table, names[0])
        cells, other_rows = _long_cells(table, names[0], group, pick, findings, extra)
    else:
        cells = _wide_cells(table, names, pick)
        other_rows = 0
    return _screen(table, cells, group, other_rows, set_aside, findings, extra)


def _long_cells(table, value, group, pick, findings, extra):
    labels, codes, spellings = table.levels(group)
    if not labels:
        raise DataProblem(f"Column '{group}' of {table.path.name} holds no group labels.")
    if pick is None:
        if len(labels) == 1:
            raise DataProblem(
                f"Column '{group}' of {table.path.name} holds only one group ('{labels[0]}'); two are needed.")
        if len(labels) > 2:
            raise ColumnProblem(
                f"Column '{quoted(group)}' of {table.path.name} holds {len(labels):,} groups "
                f"({listing(labels)}); pick two to compare.")
        pick = (labels[0], labels[1])
    for label in pick:
        if label not in labels:
            raise ColumnProblem(
                f"Column '{quoted(group)}' of {table.path.name} has no group '{quoted(label)}'; its groups "
                f"are {listing(labels)}.")
    for label in pick:
        if len(spellings[label]) > 1:
            shown = " and ".join(f"'{s}'" for s in sorted(spellings[label])[:4])
            findings.append(Finding(
                "labels_trimmed", "note",
                f"Labels {shown} in '{group}' were taken as one group '{label}' (spaces around "
                "labels are ignored)."))
    lowered = pd.Series(labels, dtype=object).str.lower().to_numpy(dtype=object)
    for label in pick:
        twins = [labels[k] for k in np.flatnonzero(lowered == label.lower()) if labels[k] != label]
        if twins:
            findings.append(Finding(
                "labels_case", "note",
                f"Label '{quoted(label)}' differs from {listing(twins)} only in capital "
                "letters; they are kept as different groups."))
    numbers = table.numbers(value)
    cells = []
    for label in pick:
        rows = np.flatnonzero(codes == labels.index(label))
        cells.append(_Cells(label, value, rows, numbers[rows]))
    other_rows = int(np.count_nonzero(codes >= 0)) - sum(c.frame_rows.size for c in cells)
    unlabelled = np.flatnonzero(codes < 0)
    if unlabelled.size:
        raw = table.frame[value]
        extra.unlabelled = int(unlabelled.size)
        for row in unlabelled[:MAX_LISTED_EXCLUSIONS]:
            extra.listed.append((int(row), group, None, "missing", cell_text(raw.iat[row])))
        shown = _rows_text(table, unlabelled)
        findings.append(Finding(
            "no_label", "note",
            f"{plural(unlabelled.size, 'row')} {plural(unlabelled.size, 'has', number=False)} no group label in "
            f"'{group}' and {plural(unlabelled.size, 'was', number=False)} left out ({shown})."))
    return cells, other_rows


def _wide_cells(table, names, pick):
    if len(names) < 2:
        raise ColumnProblem(
            "Name a group column and one value column, or two value columns (one per group).")
    if pick is not None:
        _check_columns(table, pick)
        chosen = pick
    elif len(names) > 2:
        raise ColumnProblem(f"{len(names)} value columns were named ({listing(names)}); pick two to compare.")
    else:
        chosen = (names[0], names[1])
    if chosen[0] == chosen[1]:
        raise OptionProblem(f"The two groups picked are the same column ('{chosen[0]}').")
    cells = []
    for name in chosen:
        _check_measurements(table, name)
        numbers = table.numbers(name)
        filled = table.frame[name].notna().to_numpy()
        last = int(np.flatnonzero(filled)[-1]) if filled.any() else -1
        rows = np.arange(len(numbers))
        cells.append(_Cells(name, name, rows, numbers, trailing_from=last + 1 if last + 1 < len(numbers) else None))
    return cells


def _rows_text(table: Table, frame_rows: np.ndarray) -> str:
    shown = ", ".join(str(table.file_row(r)) for r in frame_rows[:_SHOWN])
    more = f" and {frame_rows.size - _SHOWN} more" if frame_rows.size > _SHOWN else ""
    return f"row{'s' if frame_rows.size > 1 else ''} {shown}{more}"


def _set_aside_cells(cells, set_aside, findings) -> tuple[list[np.ndarray], dict[tuple[int, str], str]]:
    masks = [np.zeros(c.frame_rows.size, dtype=bool) for c in cells]
    reasons: dict[tuple[int, str], str] = {}
    if not set_aside:
        return masks, reasons
    unused = 0
    for key, reason in dict(set_aside).items():
        try:
            row, column = int(key[0]), str(key[1])
        except (TypeError, ValueError, IndexError) as error:
            raise OptionProblem(f"A set-aside cell must be (frame row, column), not {key!r}.") from error
        hit = False
        for k, c in enumerate(cells):
            if c.column != column:
                continue
            position = np.searchsorted(c.frame_rows, row)
            if position < c.frame_rows.size and c.frame_rows[position] == row:
                masks[k][position] = True
                reasons[(row, column)] = str(reason)
                hit = True
        unused += not hit
    if unused:
        findings.append(Finding(
            "set_aside_unused", "info",
            f"{plural(unused, 'cell')} set aside {plural(unused, 'is', number=False)} not among the values of "
            "the two groups and changed nothing."))
    return masks, reasons


def _screen(table, cells, group, other_rows, set_aside, findings, extra) -> Intake:
    frame = table.frame
    offset = table.file_row(0)
    aside, reasons_aside = _set_aside_cells(cells, set_aside, findings)
    counts = {"missing": extra.unlabelled, "non_numeric": 0, "infinite": 0, "set_aside": 0}
    listed: list[tuple[int, str, str | None, str, str]] = list(extra.listed)
    used_values, used_rows = [], []
    for k, c in enumerate(cells):
        numbers = c.numbers
        clean = bool(np.isfinite(numbers).all()) and not aside[k].any()
        if clean:  # the common case on large files: one pass, no masks
            infinite = missing_or_text = np.zeros(numbers.size, dtype=bool)
            used = slice(None)
        else:
            infinite = np.isinf(numbers)
            missing_or_text = np.isnan(numbers)
            used = ~(infinite | missing_or_text) & ~aside[k]
        per_group: dict[str, _Listing | list] = {"missing": [], "non_numeric": [], "infinite": [], "set_aside": []}
        raw = frame[c.column]
        kind_is_number = table.column_kinds[c.column] == "number"
        for position in (() if clean else np.flatnonzero(aside[k])):
            row = int(c.frame_rows[position])
            per_group["set_aside"].append((row, reasons_aside.get((row, c.column), "")))
        for position in (() if clean else np.flatnonzero(infinite & ~aside[k])):
            row = int(c.frame_rows[position])
            per_group["infinite"].append((row, cell_text(raw.iat[row]) or str(numbers[position])))
        gap_rows = c.frame_rows[:0] if clean else c.frame_rows[np.flatnonzero(missing_or_text & ~aside[k])]
        if kind_is_number or gap_rows.size == 0:
            per_group["missing"] = _Listing(gap_rows, None)
        else:
            texts = raw.iloc[gap_rows].map(cell_text).to_numpy(dtype=object)
            marker = np.array([is_missing_marker(t) for t in texts], dtype=bool)
            per_group["missing"] = _Listing(gap_rows[marker], texts[marker])
            per_group["non_numeric"] = _Listing(gap_rows[~marker], texts[~marker])
        for reason, items in per_group.items():
            counts[reason] += len(items)
            for row, text in items[:MAX_LISTED_EXCLUSIONS]:
                listed.append((row, c.column, c.label, reason, text))
        findings.extend(_exclusion_findings(table, c, k, per_group))
        values = numbers if clean else numbers[used]
        values.setflags(write=False)  # an owned, read-only array passes into Groups uncopied
        used_values.append(values)
        rows = c.frame_rows if clean else c.frame_rows[used]
        used_rows.append(rows.astype(np.int64, copy=False))
    labels = (cells[0].label, cells[1].label)
    n_used = (int(used_values[0].size), int(used_values[1].size))
    for k in (0, 1):
        if n_used[k] < 2:
            raise DataProblem(
                f"Group '{labels[k]}' has {n_used[k]} usable value{'s' if n_used[k] != 1 else ''} in "
                f"'{cells[k].column}' of {table.path.name}; at least 2 are needed.")
    slips: list[Finding] = []
    for k in (0, 1):
        slips.extend(possible_slips(used_values[k], used_rows[k], label=labels[k], group=k,
                                    column=cells[k].column, row_offset=offset))
    def counted() -> np.ndarray:
        keep = np.ones(len(frame), dtype=bool)
        for c in cells:  # rows whose value cell is blank repeat each other without meaning
            blank = np.isnan(c.numbers)
            blank[_filled_text(table, c)] = False
            keep[c.frame_rows[blank]] = False
        return keep

    repeated = duplicate_rows(table, counted=counted)
    if repeated.size:
        findings.append(repeated_rows_finding(table, repeated, counted, _rows_text(table, repeated)))
    if other_rows:
        findings.append(Finding(
            "other_groups", "info",
            f"{plural(other_rows, 'row')} {plural(other_rows, 'belongs', number=False)} to other groups in "
            f"'{group}' and {plural(other_rows, 'was', number=False)} not used."))
    wide = group is None
    skip = [group] if group else []
    skip += [c.column for c in cells]
    candidates = []
    for name in identifier_candidates(table, skip):
        number = table.column_kinds[name] == "number"
        if number and not wide and table.strictly_rising(name):
            continue  # every row has its own ID: nothing is measured twice
        if _repeats_near_the_top(table, name, used_rows[0]):
            continue  # group 1 holds an ID twice: not one row per unit, so no sign of pairing
        ids = table.numbers(name) if number else _text_ids(table, name)
        first, second = ids[used_rows[0]], ids[used_rows[1]]
        candidates.append((name, _drop_blank(first), _drop_blank(second)))
    paired = paired_sign(candidates, labels=labels, wide=wide)
    listed.sort(key=lambda item: item[0])
    exclusions = tuple(
        Exclusion(row, table.file_row(row), column, label, reason, text)
        for row, column, label, reason, text in listed[:MAX_LISTED_EXCLUSIONS])
    summary = Finding(
        "screening_summary", "info",
        f"{len(frame)} rows read from {table.path.name}; {n_used[0]} values used for "
        f"'{labels[0]}' and {n_used[1]} for '{labels[1]}'"
        + (f"; {sum(counts.values())} cells left out." if sum(counts.values()) else "; no cells left out."))
    everything = [summary] + findings + slips + ([paired] if paired else [])
    report = ScreeningReport(
        rows_read=len(frame), labels=labels, n_used=n_used, excluded_counts=counts,
        exclusions=exclusions, other_group_rows=other_rows, duplicate_rows=int(repeated.size),
        possible_slips=tuple(slips), paired=paired, findings=tuple(everything))
    for rows in used_rows:
        rows.setflags(write=False)
    return Intake(Groups(labels, used_values[0], used_values[1]), report, (used_rows[0], used_rows[1]))


def _filled_text(table: Table, cells: _Cells) -> np.ndarray:
    """Positions of cells that hold some text although they are not numbers."""
    gaps = np.flatnonzero(np.isnan(cells.numbers))
    if gaps.size == 0 or table.column_kinds[cells.column] == "number":
        return np.empty(0, dtype=np.int64)
    raw = table.frame[cells.column]
    keep = [g for g in gaps if cell_text(raw.iat[int(cells.frame_rows[g])]).strip()]
    return np.array(keep, dtype=np.int64)


def _repeats_near_the_top(table: Table, column: str, rows: np.ndarray) -> bool:
    """True if the first thousand of a group's rows hold some ID of ``column`` twice (blank
    cells aside): a quick way to rule the column out before comparing whole groups."""
    if table.column_kinds[column] == "number":
        head = table.numbers(column)[rows[:1000]]
        head = head[~np.isnan(head)]
    else:
        codes, texts = table.factors(column)
        head = np.array([c for c in codes[rows[:1000]] if c >= 0 and texts[c].strip()], dtype=np.int64)
    return np.unique(head).size < head.size


def _text_ids(table: Table, column: str) -> np.ndarray:
    """A text ID column as numbers that compare as the trimmed texts do: its factor codes,
    NaN for a blank cell (so a million IDs are matched as numbers, not as texts). When some
    text carries spaces at either end, the trimmed texts themselves."""
    codes, texts = table.factors(column)
    trimmed = [t.strip() for t in texts]
    if trimmed != texts:
        return table.frame[column].to_numpy(dtype=object)
    blank = np.array([not t for t in trimmed] + [True])  # the last serves code -1
    ids = codes.astype(float)
    ids[blank[codes]] = np.nan
    return ids


def _drop_blank(ids: np.ndarray) -> np.ndarray:
    """IDs without the blank ones; texts trimmed (so "S1 " and "S1" are one ID)."""
    if ids.dtype == object:
        texts = pd.Series(ids, dtype=object)
        if pd.api.types.infer_dtype(texts, skipna=True) == "string":
            texts = texts.fillna("")
        else:
            texts = texts.map(cell_text)
        texts = texts.str.strip()
        return texts[texts != ""].to_numpy(dtype=object)
    return ids[np.isfinite(ids)]


def _exclusion_findings(table, cells: _Cells, k: int, per_group) -> list[Finding]:
    out: list[Finding] = []
    where = f"'{cells.column}'" + (f" (group '{cells.label}')" if cells.column != cells.label else "")
    missing = per_group["missing"]
    if missing:
        if isinstance(missing, _Listing):
            rows = missing.rows
            marked = sorted({str(t) for t in missing.texts if str(t).strip()}) if missing.texts is not None else []
        else:
            rows = np.array([row for row, _ in missing], dtype=np.int64)
            marked = sorted({text for _, text in missing if text.strip()})
        tail = np.array([], dtype=rows.dtype)
        if cells.trailing_from is not None:
            tail = rows[rows >= cells.trailing_from]
            rows = rows[rows < cells.trailing_from]
        if rows.size:
            as_text = (" or hold " + ", ".join(f"'{t}'" for t in marked[:_SHOWN])) if marked else ""
            out.append(Finding(
                "missing", "note",
                f"{plural(rows.size, 'cell')} of {where} {plural(rows.size, 'is', number=False)} blank{as_text} and "
                f"{plural(rows.size, 'was', number=False)} left out "
                f"({_rows_text(table, rows)}).", k))
        if tail.size:
            out.append(Finding(
                "shorter_column", "info",
                f"Column '{cells.column}' ends {plural(tail.size, 'row')} before the longest column; its "
                f"blank cells below file row {table.file_row(cells.trailing_from) - 1} are counted as "
                "missing, as expected when the groups differ in size.", k))
    texts = per_group["non_numeric"]
    if texts:
        shown = ", ".join(f"row {table.file_row(row)} '{text}'" for row, text in texts[:_SHOWN])
        more = f" and {len(texts) - _SHOWN} more" if len(texts) > _SHOWN else ""
        out.append(Finding(
            "non_numeric", "warning",
            f"{plural(len(texts), 'cell')} of {where} {plural(len(texts), 'is', number=False)} not "
            f"{plural(len(texts), 'a number', 'numbers', number=False)} and "
            f"{plural(len(texts), 'was', number=False)} left out: {shown}{more}.", k))
    infinite = per_group["infinite"]
    if infinite:
        shown = ", ".join(f"row {table.file_row(row)} '{text}'" for row, text in infinite[:_SHOWN])
        out.append(Finding(
            "infinite", "warning",
            f"{plural(len(infinite), 'cell')} of {where} {plural(len(infinite), 'holds', 'hold', number=False)} "
            f"an infinite value and {plural(len(infinite), 'was', number=False)} left out: {shown}.", k))
    aside = per_group["set_aside"]
    if aside:
        shown = ", ".join(f"row {table.file_row(row)}" + (f" ({why})" if why else "") for row, why in aside[:_SHOWN])
        out.append(Finding(
            "set_aside", "note",
            f"{plural(len(aside), 'value')} of {where} {plural(len(aside), 'was', number=False)} set aside by "
            f"hand: {shown}.", k))
    return out
