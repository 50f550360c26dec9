"""Turning cells into numbers and sorting columns into kinds ("number", "text", "mixed", "empty")."""

from __future__ import annotations

import numpy as np
import pandas as pd

__all__ = [
    "MISSING_MARKERS",
    "EXACT_INTEGER_LIMIT",
    "coerce_numbers",
    "is_missing_marker",
    "settle_column",
    "cell_text",
]

# Texts people type for "no value"; they count as missing (their text is kept in the report).
MISSING_MARKERS = frozenset({"", "na", "n/a", "n.a.", "nan", "null", "none", "#n/a", "-", "--"})
EXACT_INTEGER_LIMIT = 2.0 ** 53  # integers beyond this cannot be held exactly as float64


def is_missing_marker(text: str) -> bool:
    return text.strip().lower() in MISSING_MARKERS


def cell_text(value: object) -> str:
    """The text a user would see in a cell (blank for a missing cell)."""
    if value is None or (isinstance(value, float) and np.isnan(value)) or value is pd.NA:
        return ""
    if isinstance(value, float) and value.is_integer() and abs(value) < EXACT_INTEGER_LIMIT:
        return str(int(value))
    return str(value)


def coerce_numbers(column: pd.Series, *, decimal: str = ".", thousands: str | None = None) -> np.ndarray:
    """The column as float64, NaN wherever a cell is not a number.

    Numeric columns are returned as they are. Text cells are read with the file's decimal mark
    and thousands separator; under a decimal comma a cell with a dot is not a number. Booleans
    and dates are not numbers.
    """
    if pd.api.types.is_bool_dtype(column.dtype):
        return np.full(len(column), np.nan)
    if pd.api.types.is_numeric_dtype(column.dtype):
        return column.to_numpy(dtype=float, na_value=np.nan)
    if isinstance(column.dtype, pd.CategoricalDtype):
        categories = pd.Series(column.cat.categories)
        numbers = coerce_numbers(categories, decimal=decimal, thousands=thousands)
        codes = column.cat.codes.to_numpy()
        out = np.append(numbers, np.nan)[np.where(codes < 0, len(numbers), codes)]
        return out.astype(float)
    values = column.astype(object)
    is_text = values.map(lambda v: isinstance(v, str)).to_numpy(dtype=bool)
    is_number = values.map(
        lambda v: isinstance(v, (int, float, np.integer, np.floating)) and not isinstance(v, (bool, np.bool_))
    ).to_numpy(dtype=bool)
    out = np.full(len(values), np.nan)
    if is_number.any():
        out[is_number] = values[is_number].astype(float).to_numpy()
    if is_text.any():
        text = pd.Series(values[is_text].to_numpy(), dtype=object).str.strip()
        bad = np.zeros(len(text), dtype=bool)
        if thousands:
            text = text.str.replace(thousands, "", regex=False)
        if decimal == ",":
            bad = text.str.contains(".", regex=False).to_numpy(dtype=bool)
            text = text.str.replace(",", ".", regex=False)
        else:
            bad = text.str.contains(",", regex=False).to_numpy(dtype=bool)
        numbers = pd.to_numeric(text, errors="coerce").to_numpy(dtype=float, na_value=np.nan, copy=True)
        numbers[bad] = np.nan
        out[is_text] = numbers
    return out


def settle_column(column: pd.Series, *, decimal: str, thousands: str | None) -> tuple[pd.Series, str]:
    """Return the column as it will sit in ``Table.frame`` and its kind.

    Clean numeric columns become float64 (integers too, unless too large to hold exactly: those
    are identifiers and stay text). Columns read as categories stay categories (codes into the
    distinct texts: no per-cell text objects), unless every filled cell is a number. Text columns
    whose every filled cell is a number become float64 ("number"); some numbers -> "mixed";
    none -> "text"; nothing filled -> "empty". A long column (over 20,000 cells) whose evenly
    spread sample of 2,000 filled cells holds no number at all is "text" without converting
    every cell (codes such as "S0000001"); a handful of numbers among its texts would not make
    it a column of measurements.
    """
    dtype = column.dtype
    if pd.api.types.is_bool_dtype(dtype):
        return column.astype(object).map(str), "text"
    if pd.api.types.is_integer_dtype(dtype):
        values = column.to_numpy()
        if values.size and max(-int(values.min()), int(values.max())) >= EXACT_INTEGER_LIMIT:
            return column.astype(str), "text"
        return column.astype(float), "number"
    if pd.api.types.is_float_dtype(dtype):
        values = column.to_numpy(dtype=float)
        head_blank = values.size == 0 or np.isnan(values[:1000]).all()
        return column, ("empty" if head_blank and np.isnan(values).all() else "number")
    if isinstance(dtype, pd.CategoricalDtype):
        return _settle_categories(column, decimal=decimal, thousands=thousands)
    if _spread_sample_is_words(column, decimal=decimal, thousands=thousands):
        return column, "text"
    numbers, filled = _numbers_by_distinct_cell(column, decimal=decimal, thousands=thousands)
    n_filled = int(filled.sum())
    n_numbers = int(np.count_nonzero(~np.isnan(numbers) & filled))
    if n_filled == 0:
        return column, "empty"
    if n_numbers == n_filled:
        return pd.Series(numbers, index=column.index, name=column.name), "number"
    return column, ("text" if n_numbers == 0 else "mixed")


_SAMPLED_FROM = 20_000  # cells; longer text columns are first judged on a spread sample
_SAMPLE_CELLS = 2_000


def _spread_sample_is_words(column: pd.Series, *, decimal: str, thousands: str | None) -> bool:
    """True if the column is long and an evenly spread sample of its filled cells holds no
    number (the full conversion of a million distinct texts takes seconds)."""
    if len(column) <= _SAMPLED_FROM:
        return False
    positions = np.linspace(0, len(column) - 1, 4 * _SAMPLE_CELLS).astype(np.intp)
    sample = column.iloc[positions]
    sample = sample[sample.notna()].iloc[:_SAMPLE_CELLS]
    if len(sample) < _SAMPLE_CELLS // 2:
        return False  # mostly blank: let the full check decide
    numbers = coerce_numbers(sample.reset_index(drop=True), decimal=decimal, thousands=thousands)
    return bool(np.isnan(numbers).all())


def _settle_categories(column: pd.Series, *, decimal: str, thousands: str | None) -> tuple[pd.Series, str]:
    """A column parsed as categories (few distinct texts): judged on its categories alone."""
    categories = np.asarray(column.cat.categories.astype(str), dtype=object)
    codes = column.cat.codes.to_numpy()
    numbers = coerce_numbers(pd.Series(categories, dtype=object), decimal=decimal, thousands=thousands)
    blank = np.array([not c.strip() for c in categories], dtype=bool)
    present = _codes_present(codes, len(categories))
    filled = present & ~blank
    numeric = filled & ~np.isnan(numbers)
    if not filled.any():
        return column, "empty"
    if not numeric.any():
        return column, "text"
    if numeric.sum() == filled.sum() and not (present & blank).any():
        values = np.append(numbers, np.nan)[codes]
        return pd.Series(values, index=column.index, name=column.name), "number"
    return column, "mixed"


def _codes_present(codes: np.ndarray, count: int) -> np.ndarray:
    """Which of the codes 0..count-1 occur; the first rows usually show them all."""
    present = np.zeros(count, dtype=bool)
    head = codes[:4096]
    present[head[head >= 0]] = True
    if not present.all():
        if count <= 64:
            for k in np.flatnonzero(~present):
                present[k] = bool((codes == k).any())
        else:
            present = np.bincount(codes.astype(np.intp) + 1, minlength=count + 1)[1:] > 0
    return present


def _numbers_by_distinct_cell(column: pd.Series, *, decimal: str, thousands: str | None) -> tuple[np.ndarray, np.ndarray]:
    """Numbers and a filled-cell mask, converting each distinct cell once (text columns repeat)."""
    codes, uniques = pd.factorize(column, use_na_sentinel=True)
    distinct = pd.Series(np.asarray(uniques, dtype=object), dtype=object)
    numbers = np.append(coerce_numbers(distinct, decimal=decimal, thousands=thousands), np.nan)
    blank = np.append(distinct.map(lambda v: isinstance(v, str) and not v.strip()).to_numpy(dtype=bool), True)
    return numbers[codes], ~blank[codes]
