"""Rows that repeat an earlier row in every column (a row pasted twice, a file appended to itself).

The check is exact and costs a few passes over the columns even on a million rows.
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd

from ..summary import common_scale

__all__ = ["duplicate_rows", "row_hashes", "pairs_by_chance", "repeats_surprising",
           "surprising_below", "REPEAT_SURPRISE"]

# How unlikely the observed number of repeated rows must be, given the pairs of equal rows that
# chance gives for columns like these, before the screening asks whether data were copied twice
# (common practice: 1%, the level of the outlier check too).
REPEAT_SURPRISE = 0.01

_DIRECT_UP_TO = 50_000  # rows; up to here pandas compares the rows directly
_WIDE = 1_000  # columns; a wider block of floats is compared row by row in numpy
_HASH_BLOCK = 1 << 16  # rows hashed at a time: a few buffers of 512 KiB
_SIEVE_BITS = (21, 20, 20)  # bins per stage: 2**21 counts (16 MiB), then 2**20 (8 MiB)
_SIEVE_STOP = 1 << 15   # rows; fewer than this go straight to the hash table
_SIEVE_SLOW = 0.9       # a stage that keeps more than this share: the rest are mostly real repeats
_U = np.uint64
_GOLDEN = _U(0x9E3779B97F4A7C15)  # 2**64 / golden ratio, the usual multiplicative step


def duplicate_rows(table, *, counted=None) -> np.ndarray:
    """Frame rows that repeat an earlier row in every column, in ascending order.

    Only rows where ``counted()`` (a function giving a boolean mask) is True are reported (the
    caller leaves out rows whose value cells are blank, which repeat each other without meaning
    anything); blank rows never count.

    Notes
    -----
    Up to 50,000 rows pandas compares the rows directly (``DataFrame.duplicated``). Above that,
    a running-number column settles it at once: no row can repeat another. Otherwise each row
    gets a 64-bit hash of its cells (float bits with -0.0 and NaN made canonical, factor codes
    for other columns), rows whose hash cannot repeat are sieved out (see :func:`_sieve`), and
    each remaining row is compared cell by cell with the first row of its hash. Should two
    different rows ever share a hash, pandas compares the rows of that hash directly, so the
    answer is exact in every case.
    """
    rows = _repeated(table)
    if counted is not None and rows.size:
        rows = rows[counted()[rows]]
    if rows.size:
        blank = table.frame.iloc[rows].isna().all(axis=1).to_numpy()
        rows = rows[~blank]
    return rows.astype(np.int64)


def _repeated(table) -> np.ndarray:
    """Every row that repeats an earlier row in every column, blank rows included."""
    frame = table.frame
    n = len(frame)
    if n < 2 or frame.shape[1] == 0:
        return np.empty(0, dtype=np.int64)
    if n <= _DIRECT_UP_TO:
        if frame.shape[1] > _WIDE and (frame.dtypes == np.float64).all():
            return _repeated_floats(frame.to_numpy())
        return np.flatnonzero(frame.duplicated(keep="first").to_numpy())
    if any(table.strictly_rising(name) for name in frame.columns):
        return np.empty(0, dtype=np.int64)
    return _repeats_by_hash(table, row_hashes(table))


def _repeated_floats(values: np.ndarray) -> np.ndarray:
    """Rows of a block of floats that repeat an earlier row, compared as whole rows of bytes
    (pandas compares column by column, seconds on 100,000 columns). -0.0 counts as 0.0 and
    every NaN as the same blank, as pandas counts them."""
    values = np.ascontiguousarray(values + 0.0)  # -0.0 + 0.0 is 0.0
    values[np.isnan(values)] = np.nan
    rows = values.view(np.dtype((np.void, values.dtype.itemsize * values.shape[1]))).ravel()
    _, first = np.unique(rows, return_index=True)
    repeated = np.ones(len(rows), dtype=bool)
    repeated[first] = False
    return np.flatnonzero(repeated)


def _mix(values: np.ndarray, spare: np.ndarray) -> None:
    """The splitmix64 finaliser, in place: every output bit depends on every input bit.

    References
    ----------
    Steele, Lea and Flood (2014), "Fast splittable pseudorandom number generators", OOPSLA.
    """
    with np.errstate(over="ignore"):
        np.bitwise_xor(values, np.right_shift(values, _U(30), out=spare), out=values)
        np.multiply(values, _U(0xBF58476D1CE4E5B9), out=values)
        np.bitwise_xor(values, np.right_shift(values, _U(27), out=spare), out=values)
        np.multiply(values, _U(0x94D049BB133111EB), out=values)
        np.bitwise_xor(values, np.right_shift(values, _U(31), out=spare), out=values)


def row_hashes(table) -> np.ndarray:
    """A 64-bit hash of each row's cells; rows with equal cells get equal hashes.

    The rows are hashed in blocks that fit the processor's cache, with the same few buffers
    for every block, so the only large array made is the answer.
    """
    frame = table.frame
    n = len(frame)
    columns = []
    for position, name in enumerate(frame.columns):
        column = frame.iloc[:, position]
        if column.dtype == np.float64:
            columns.append((True, column.to_numpy()))
        else:
            columns.append((False, table.factors(name)[0]))  # -1 (missing) is one code too
    combined = np.zeros(n, dtype=np.uint64)
    block = min(n, _HASH_BLOCK)
    spare = np.empty(block, dtype=np.uint64)
    floats = np.empty(block, dtype=np.float64)
    nan = np.empty(block, dtype=bool)
    with np.errstate(over="ignore"):
        for start in range(0, n, block):
            stop = min(start + block, n)
            out, size = combined[start:stop], stop - start
            for is_float, values in columns:
                part = values[start:stop]
                if is_float:
                    cells = floats[:size]
                    np.add(part, 0.0, out=cells)  # -0.0 + 0.0 is 0.0
                    if np.isnan(cells, out=nan[:size]).any():
                        cells[nan[:size]] = np.nan  # one bit pattern for every NaN
                    bits = cells.view(np.uint64)
                else:
                    bits = spare[:size]
                    np.copyto(bits, part, casting="unsafe")  # -1 wraps round: still one code
                np.multiply(out, _GOLDEN, out=out)
                np.add(out, bits, out=out)
            _mix(out, spare[:size])
    return combined


def _sieve(hashes: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The rows whose hash may repeat, and their hashes: every row whose hash repeats is kept.

    Notes
    -----
    Each stage counts the hashes of the rows still in play in bins taken from a fresh slice of
    the hash bits (2**21 bins, then 2**20; for fewer rows two to four bins per row), and keeps
    only the rows that share their bin. A repeated hash always shares its bin, so no repeat is
    lost. Counting in bins that fit the processor's cache is several times faster than a pass
    of a hash table. Of a million distinct rows about 38, 11 and 1 per cent survive the three
    stages.
    """
    rows = None  # all rows
    keys = hashes
    bins = np.empty(hashes.size, dtype=np.intp)  # reused by every stage
    shift = 0
    for most in _SIEVE_BITS:
        if keys.size <= _SIEVE_STOP:
            break
        width = min(most, max(16, 2 * keys.size).bit_length())  # two to four bins per row
        part = bins[:keys.size]
        slice_ = part.view(np.uint64)
        np.right_shift(keys, _U(shift), out=slice_)
        np.bitwise_and(slice_, _U((1 << width) - 1), out=slice_)
        shift += width
        crowded = np.bincount(part, minlength=1 << width) > 1
        kept = np.flatnonzero(crowded[part])  # positions, then one take: cheaper than a mask
        if kept.size > _SIEVE_SLOW * keys.size:
            break  # mostly real repeats: the hash table does the rest
        rows = kept if rows is None else rows[kept]
        keys = keys[kept]
    return (np.arange(hashes.size) if rows is None else rows), keys


def _repeats_by_hash(table, hashes: np.ndarray) -> np.ndarray:
    """The rows that repeat an earlier row, found through the row hashes (exact)."""
    frame = table.frame
    rows, keys = _sieve(hashes)
    if rows.size < 2:
        return np.empty(0, dtype=np.int64)
    codes, _ = pd.factorize(keys)
    # codes count up in order of first appearance, so a row is the first of its hash
    # exactly where its code exceeds every code before it
    first = np.ones(codes.size, dtype=bool)
    first[1:] = codes[1:] > np.maximum.accumulate(codes)[:-1]
    leaders = rows[first][codes]  # the first row with each row's hash
    later = ~first
    if not later.any():
        return np.empty(0, dtype=np.int64)
    candidates, their_leaders = rows[later], leaders[later]
    same = np.ones(candidates.size, dtype=bool)
    for position, name in enumerate(frame.columns):
        column = frame.iloc[:, position]
        if column.dtype == np.float64:
            values = column.to_numpy()
            a, b = values[candidates], values[their_leaders]
            same &= (a == b) | (np.isnan(a) & np.isnan(b))
        else:
            factor = table.factors(name)[0]
            same &= factor[candidates] == factor[their_leaders]
    if same.all():
        return candidates
    # two different rows share a hash: settle those hashes by comparing their rows directly
    clash = np.zeros(codes.max() + 1, dtype=bool)
    clash[codes[later][~same]] = True
    involved = rows[clash[codes]]
    settled = involved[frame.iloc[involved].duplicated(keep="first").to_numpy()]
    return np.sort(np.concatenate([candidates[same & ~clash[codes[later]]], settled]))


def _cells(table, position: int, name, rows: np.ndarray) -> tuple[np.ndarray, np.ndarray | None]:
    """Codes of the column's cells in ``rows`` (equal cells, equal codes) and, for a number
    column, the numbers themselves."""
    cells = table.frame.iloc[:, position]
    if cells.dtype == np.float64:
        values = cells.to_numpy()[rows] + 0.0  # -0.0 + 0.0 is 0.0, as the row check has it
        return pd.factorize(values, use_na_sentinel=False)[0], values
    return table.factors(name)[0][rows], None


def _equal_chance(codes: np.ndarray, values: np.ndarray | None, step: float,
                  first: np.ndarray) -> float:
    """Chance that two rows of one stratum agree in one column, by the birthday problem."""
    if codes.size < 2:
        return 1.0
    kept = codes[first]
    if kept.size > 2 and 2 * kept.size >= codes.size and np.unique(kept).size == kept.size:
        return 0.0  # an identifier: apart from the (fewer) repeated rows, no value comes twice
    if values is not None and np.isfinite(step) and step > 0:
        finite = values[np.isfinite(values)]
        # step and sd in units of a power of two, so that values near 1e308 square without overflow
        scale = common_scale(finite)
        sd = float(np.std(finite / scale)) if finite.size > 1 else 0.0
        if sd > 0:
            # values on a grid of ``step`` from a bell curve of SD sd: sum p^2 = step / (2 sqrt(pi) sd),
            # at most 1 (compared before dividing: equal values may leave an sd of rounding only)
            spread = 2.0 * math.sqrt(math.pi) * sd
            return 1.0 if step / scale >= spread else step / scale / spread
    shares = np.bincount(codes - codes.min()).astype(float) / codes.size
    return float(np.dot(shares, shares))


def _step(values: np.ndarray | None) -> float:
    """The recording step of a number column: the least gap between its distinct values."""
    if values is None:
        return float("nan")
    distinct = np.unique(values[np.isfinite(values)])
    if distinct.size < 2:
        return float("nan")
    with np.errstate(over="ignore"):  # a gap wider than the largest float is infinite: no step
        return float(np.min(np.diff(distinct)))


def pairs_by_chance(table, rows: np.ndarray, repeated: np.ndarray | None = None) -> float:
    """Expected number of pairs of equal rows among ``rows`` if the rows were drawn at random.

    Parameters
    ----------
    table : engine.io.Table
    rows : numpy.ndarray
        The frame rows taking part (those the repeated-row check counts).
    repeated : numpy.ndarray, optional
        The rows found to repeat an earlier row; a column counts as an identifier when its
        values are all different apart from these.

    Notes
    -----
    The birthday problem: n rows drawn independently give C(n, 2) sum_c p_c^2 pairs of equal
    rows in expectation (p_c the chance of the cell combination c), and the number of rows that
    repeat an earlier row is at most that. Rows are split by the column with the fewest
    distinct values (in a long layout the group label: values differ between groups) and the
    other columns are taken as independent within each part, so E = sum_l C(n_l, 2) prod_j q_lj.
    The chance q that two rows agree in a column is 0 for an identifier (every value
    different apart from the repeated rows, which are under half of the rows); step / (2 sqrt(pi) sd) for numbers recorded to a
    step (the least gap between distinct values) with standard deviation sd, the sum of p^2 of
    a bell curve on that grid; and the sum of squared shares of each value otherwise. Fine
    resolution, many columns or an identifier make E small; a label and a coarse value make it
    large.
    """
    rows = np.asarray(rows, dtype=np.int64)
    n = rows.size
    frame = table.frame
    if n < 2 or frame.shape[1] == 0:
        return 0.0
    first = ~np.isin(rows, np.asarray(repeated if repeated is not None else [], dtype=np.int64))
    columns = [_cells(table, position, name, rows) for position, name in enumerate(frame.columns)]
    distinct = [int(codes.max()) + 1 for codes, _ in columns]
    strata = int(np.argmin(distinct))
    level = columns[strata][0]
    steps = [_step(values) for _, values in columns]
    expected = 0.0
    for value in np.unique(level):
        inside = level == value
        size = int(np.count_nonzero(inside))
        chance = 1.0
        for j, (codes, values) in enumerate(columns):
            if j == strata or chance == 0.0:
                continue
            chance *= _equal_chance(codes[inside], None if values is None else values[inside],
                                    steps[j], first[inside])
        expected += size * (size - 1) / 2 * chance
    return float(expected)


def surprising_below(observed: int) -> float:
    """The expected pairs below which ``observed`` repeated rows are surprising: a Poisson count
    of mean E reaches ``observed`` with chance below ``REPEAT_SURPRISE`` exactly when E is below
    the ``REPEAT_SURPRISE`` quantile of a Gamma(observed, 1) law."""
    from scipy.special import gammaincinv  # scipy.stats.gamma.ppf(q, a) is gammaincinv(a, q)

    return float(gammaincinv(observed, REPEAT_SURPRISE)) if observed > 0 else 0.0


def repeats_surprising(observed: int, expected_pairs: float) -> bool:
    """Whether ``observed`` repeated rows are well above what chance gives: a Poisson count with
    mean ``expected_pairs`` (which bounds the expected repeated rows) reaches it with chance
    below ``REPEAT_SURPRISE``."""
    return observed > 0 and expected_pairs < surprising_below(observed)
