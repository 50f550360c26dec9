"""The screening report: what was used, what was left out and why, and what looks odd.

Nothing here removes a value that is a number: possible slips and signs of pairing are
reported for the user to judge.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Mapping, Sequence

import numpy as np
import pandas as pd

from ..results import Finding, frozen_mapping
from ..rounding import fixed, shared_decimals
from ..stats_basics import FAR_FENCE, Fences, quartiles, tukey_fences
from .layout import looks_like_id_name
from .repeats import pairs_by_chance, surprising_below

__all__ = [
    "Exclusion",
    "ScreeningReport",
    "EXCLUSION_REASONS",
    "EXCLUSION_WORDS",
    "MAX_LISTED_EXCLUSIONS",
    "FAR_OUT_IQR",
    "possible_slips",
    "paired_sign",
    "identifier_candidates",
    "repeated_rows_finding",
]

# Why a value was left out of its group, in the words every count and list of left-out values
# uses (the report, the window, the exported report); read after a count ("3 not a number"),
# as a heading ("not a number: 3") or as the reason beside one cell.
EXCLUSION_WORDS: Mapping[str, str] = frozen_mapping({
    "missing": "blank or marked as missing",
    "non_numeric": "not a number",
    "infinite": "infinite",
    "set_aside": "set aside by hand",
})
EXCLUSION_REASONS: tuple[str, ...] = tuple(EXCLUSION_WORDS)
MAX_LISTED_EXCLUSIONS = 1000
FAR_OUT_IQR = FAR_FENCE  # Tukey's "far out" fence: beyond 3 IQR from the quartiles
MAX_SLIPS_LISTED = 20   # per group; the rest are summed up in one finding
_EXACT_QUARTILES_UP_TO = 100_000  # larger groups: quartiles from an evenly spaced subsample
_SHIFT_TOLERANCE = 0.12  # |log10(value / median) - k| for a shift by 10**k


@dataclass(frozen=True)
class Exclusion:
    """One cell left out of a group, with where it is and why."""

    frame_row: int
    file_row: int
    column: str
    group: str | None
    reason: str
    text: str


@dataclass(frozen=True)
class ScreeningReport:
    """What became of every row read, and what deserves a second look."""

    rows_read: int
    labels: tuple[str, str]
    n_used: tuple[int, int]
    excluded_counts: Mapping[str, int]
    exclusions: tuple[Exclusion, ...]
    other_group_rows: int
    duplicate_rows: int
    possible_slips: tuple[Finding, ...]
    paired: Finding | None
    findings: tuple[Finding, ...] = field(default=())

    def __post_init__(self) -> None:
        counts = {reason: int(self.excluded_counts.get(reason, 0)) for reason in EXCLUSION_REASONS}
        object.__setattr__(self, "excluded_counts", frozen_mapping(counts))
        object.__setattr__(self, "exclusions", tuple(self.exclusions))
        object.__setattr__(self, "possible_slips", tuple(self.possible_slips))
        object.__setattr__(self, "findings", tuple(self.findings))


def _fences(values: np.ndarray) -> tuple[Fences, float] | None:
    if values.size < 5:
        return None
    sample = values
    if values.size > _EXACT_QUARTILES_UP_TO:  # an evenly spread subsample: quartiles to ~0.3 %
        sample = values[:: values.size // _EXACT_QUARTILES_UP_TO]
    q1, median, q3 = quartiles(sample)
    if not q3 - q1 > 0:  # an IQR beyond the largest float is infinite: fences at infinity
        return None
    return tukey_fences(q1, q3), median


def possible_slips(
    values: np.ndarray,
    file_rows: np.ndarray,
    *,
    label: str,
    group: int,
    column: str,
    row_offset: int = 0,
) -> list[Finding]:
    """Values that look like data-entry slips: flagged, never removed.

    Parameters
    ----------
    values : numpy.ndarray
        The group's usable values.
    file_rows : numpy.ndarray
        The file row of each value, less ``row_offset``, for the messages.
    label, group, column
        The group's label and index (0 or 1) and the column name, for the messages.
    row_offset : int
        Added to ``file_rows`` (frame rows can be passed with the table's offset).

    Returns
    -------
    list of Finding
        One "possible_slip" finding (severity "note") per flagged value, at most 20, then one
        that counts the rest.

    Notes
    -----
    With quartiles Q1, Q3 and IQR = Q3 - Q1, a value is flagged when it lies beyond Tukey's
    far-out fences Q1 - 3 IQR or Q3 + 3 IQR, or when it lies beyond the inner fences
    (1.5 IQR) and is within a factor 10**0.12 of 10 or 100 times (or a tenth or hundredth of)
    the group median while the value shifted back by that power of ten falls inside the inner
    fences: the mark of a misplaced decimal point. Groups of fewer than five values, or with
    no spread between the quartiles, are not screened.

    References
    ----------
    Tukey, J. W. (1977). Exploratory Data Analysis. Addison-Wesley, section 2C (fences).
    """
    fences = _fences(values)
    if fences is None:
        return []
    fences, median = fences
    q1, q3, far_high = fences.q1, fences.q3, fences.far_high
    shift = _decimal_shifts(values, median, fences.mild_low, fences.mild_high)
    far = fences.beyond_far(values)
    flagged = np.flatnonzero(far | (shift != 0))
    findings: list[Finding] = []
    for i in flagged[:MAX_SLIPS_LISTED]:
        value = float(values[i])
        where = f"Row {int(file_rows[i]) + row_offset} of '{column}'" + (f" (group '{label}')" if label != column else "")
        if shift[i]:
            power = 10 ** abs(int(shift[i]))
            times = f"{power} times" if shift[i] > 0 else f"1/{power} of"
            text = (f"{where}: {value:.15g} is about {times} the group median "
                    f"({fixed(median, shared_decimals([median]))}); it may "
                    "have a misplaced decimal point. It was kept.")
        else:
            side = "above the upper" if value > far_high else "below the lower"
            shared = shared_decimals([q1, q3])
            text = (f"{where}: {value:.15g} lies more than 3 interquartile ranges (the width of the "
                    f"middle half of the values) {side} quartile (quartiles {fixed(q1, shared)} "
                    f"and {fixed(q3, shared)}); check it for a typing slip. It was kept.")
        findings.append(Finding("possible_slip", "note", text, group))
    if flagged.size > MAX_SLIPS_LISTED:
        findings.append(Finding(
            "possible_slip", "note",
            f"{flagged.size - MAX_SLIPS_LISTED} more values of group '{label}' look like possible "
            f"slips; only the first {MAX_SLIPS_LISTED} are listed.", group))
    return findings


def _decimal_shifts(values: np.ndarray, median: float, low: float, high: float) -> np.ndarray:
    """For each value, k if it looks like the median shifted by 10**k (k = +-1, +-2), else 0."""
    shifts = np.zeros(values.size, dtype=np.int8)
    outside = np.flatnonzero((values < low) | (values > high))
    if median == 0 or outside.size == 0:
        return shifts
    candidates = values[outside]
    # a ratio or a shifted value beyond the largest float is infinite and so no shift: right
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        ratio = np.log10(candidates / median)
        for k in (1, 2, -1, -2):
            back = candidates / 10.0 ** k
            hit = (np.abs(ratio - k) < _SHIFT_TOLERANCE) & (back >= low) & (back <= high)
            shifts[outside[hit & (shifts[outside] == 0)]] = k
    return shifts


def paired_sign(
    candidates: Sequence[tuple[str, np.ndarray, np.ndarray]],
    *,
    labels: tuple[str, str],
    wide: bool,
) -> Finding | None:
    """A warning when the data look paired rather than independent.

    ``candidates`` holds (column name, IDs of group 1's rows, IDs of group 2's rows) for each
    identifier-like column. In the long layout the sign is that most IDs appear exactly once in
    each group; in the wide layout (one row holds a value of each group) it is an identifier
    column with one ID per row and most rows (80 per cent) holding a value of both groups.
    """
    for name, first, second in candidates:
        one, two = pd.Series(first, dtype=first.dtype), pd.Series(second, dtype=second.dtype)
        if one.empty or two.empty or not one.is_unique or not two.is_unique:
            continue
        shared = int(one.isin(two).sum())  # a hash lookup: sorting a million texts is slow
        if shared < 2 or shared < 0.8 * max(len(one), len(two)):
            continue
        if wide:  # a shared ID is a row that holds a value of both groups
            return Finding(
                "paired", "warning",
                f"{shared} rows hold a value of '{labels[0]}' and one of '{labels[1]}', and "
                f"'{name}' names each row: if both values of a row come from the same unit, "
                "the data are paired and procedures for independent groups do not fit.")
        every = shared == len(one) == len(two)
        amount = "every ID appears" if every else f"{shared} IDs appear"
        return Finding(
            "paired", "warning",
            f"In column '{name}', {amount} once in group '{labels[0]}' and once in group "
            f"'{labels[1]}': the same units seem to be measured twice, so the data may be "
            "paired and procedures for independent groups may not fit.")
    return None


def identifier_candidates(table, skip: Sequence[str]) -> list[str]:
    """Columns that may identify units: named like an ID, whole-number codes, or text with a
    label of its own in every filled row (site names, specimen codes)."""
    names = []
    for name, kind in table.column_kinds.items():
        if len(names) == 3:
            break
        if name in skip or kind == "empty":
            continue
        if looks_like_id_name(name) or (kind == "number" and table.whole_numbers(name)):
            names.append(name)
        elif kind == "text":
            codes, texts = table.factors(name)
            if len(texts) >= 2 and len(texts) == np.count_nonzero(codes >= 0):
                names.append(name)
    return names[:3]


def repeated_rows_finding(table, repeated: np.ndarray, counted, where: str) -> Finding:
    """The finding on rows that repeat an earlier row: a note asking about copying only when
    that many repeats are unlikely by chance for columns like these (see
    :func:`engine.io.repeats.pairs_by_chance`), else a line for the record."""
    count = int(repeated.size)
    rows = np.flatnonzero(counted() & ~table.frame.isna().all(axis=1).to_numpy())
    threshold = surprising_below(count)
    expected = pairs_by_chance(table, rows, repeated)
    rows_word = "row repeats" if count == 1 else "rows repeat"
    if expected < threshold:
        chance = "almost none" if expected < 0.05 else f"about {_about(expected)}"
        return Finding(
            "duplicate_rows", "note",
            f"{count:,} {rows_word} an earlier row exactly ({where}); with values like these, "
            f"chance gives {chance}, so check that no data were copied in twice.")
    return Finding(
        "duplicate_rows", "info",
        f"{count:,} {rows_word} an earlier row exactly; the rows hold few different values, so "
        f"repeats are expected by chance (about {_about(expected)} pairs of equal rows) and are "
        "no sign of copying.")


def _about(value: float) -> str:
    return f"{value:,.0f}" if value >= 10 else f"{value:.2g}"
