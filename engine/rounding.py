"""Rounding numbers for display: p-values, single numbers, and numbers shown together.

Three rules hold everywhere a number is written:

- rounding never changes a sign: a value that is not zero never reads as "0", "0.00" or "-0";
- a p-value never claims certainty: below 1 it never reads as "1.0" (and above 0 never as "0");
- distinct values shown together never look equal: the decimals of a set of numbers are chosen
  from the gaps between them as well as from their size.

``engine.report`` re-exports the public names; the rest of the program imports them from there.
"""

from __future__ import annotations

import math
from typing import Iterable

__all__ = ["format_p", "p_clause", "level_text", "format_number", "format_shape", "shared_decimals", "fixed",
           "decimals_for", "entered_decimals", "P_FLOOR", "P_CEILING", "NOT_AVAILABLE", "SCIENTIFIC_SMALL",
           "SCIENTIFIC_LARGE"]

# Below this a p-value is written as "< 0.001" (common practice in journals).
P_FLOOR = 0.001
# Above this (and below 1) a p-value is written as "> 0.999", the mirror of the floor.
P_CEILING = 0.999
# Significant digits kept in a p-value at or above the floor (common practice: two).
P_DIGITS = 2
# Plain numbers outside [SMALL, LARGE) in size are written in scientific notation.
SCIENTIFIC_SMALL = 1e-4
SCIENTIFIC_LARGE = 1e9
NOT_AVAILABLE = "n/a"
# Most significant digits a shared rounding goes to when it separates close values: a float
# holds 15 to 17, and the last ones are noise of the arithmetic.
MAX_SIGNIFICANT = 15
# A skewness or kurtosis smaller than this is rounding noise of a symmetric sample (some 1e-15),
# not shape.
SHAPE_NOISE = 1e-9


def format_p(p: float | None) -> str:
    """A p-value for display: two significant digits, "< 0.001" below 0.001, "> 0.999" above.

    Parameters
    ----------
    p : float or None
        The p-value; None or NaN gives "n/a".

    Returns
    -------
    str
        For example "0.031", "0.0042", "0.27", "0.997", "> 0.999", "1.0" (exactly 1 only) or
        "< 0.001".

    Notes
    -----
    A value is compared with 0.001 before rounding, so 0.0009999 is "< 0.001" and 0.001 is
    "0.0010". Values are rounded to two significant digits and written with fixed decimals. A
    value below 1 that two digits would round to "1.0" gets three decimals ("0.997"), and above
    0.999 it is written "> 0.999": a p-value below 1 never reads as certain.

    References
    ----------
    American Psychological Association (2020). Publication Manual, 7th ed., section 6.36
    (exact p-values, "< .001" below one in a thousand).
    """
    if p is None or not math.isfinite(p):
        return NOT_AVAILABLE
    p = min(max(float(p), 0.0), 1.0)
    if p < P_FLOOR:
        return f"< {P_FLOOR:g}"
    if p == 1.0:
        return "1.0"
    text = _fixed_significant(p, P_DIGITS)
    if float(text) >= 1.0:
        text = f"{p:.3f}"
        if float(text) > P_CEILING:
            return f"> {P_CEILING:g}"
    return text


def p_clause(p: float | None) -> str:
    """"p = 0.031", "p < 0.001" or "p > 0.999" (the p-value as it sits in a sentence)."""
    text = format_p(p)
    return f"p {text}" if text[:1] in "<>" else f"p = {text}"


def format_number(value: float | None, *, digits: int = 3) -> str:
    """A number rounded to ``digits`` significant digits for display.

    Parameters
    ----------
    value : float or None
        The number; None or NaN gives "n/a", infinities "infinity"/"-infinity".
    digits : int, keyword-only
        Significant digits kept (at least 1). Digits left of the decimal point are never
        dropped: 1234.56 with three digits is "1235".

    Returns
    -------
    str
        Fixed-point text such as "4.12", "0.0123" or "-7.00"; scientific ("1.23e-05") for
        magnitudes below 1e-4 or from 1e9 up.

    Notes
    -----
    With e = floor(log10 |v|) the number of decimals is max(0, digits - 1 - e), computed after
    rounding so that 9.996 becomes "10.0" rather than "10.00".
    """
    if value is None:
        return NOT_AVAILABLE
    value = float(value)
    if math.isnan(value):
        return NOT_AVAILABLE
    if math.isinf(value):
        return "infinity" if value > 0 else "-infinity"
    digits = max(1, int(digits))
    if value == 0:
        return "0"
    size = abs(value)
    if size < SCIENTIFIC_SMALL or size >= SCIENTIFIC_LARGE:
        return f"{value:.{digits - 1}e}"
    return _fixed_significant(value, digits)


def format_shape(value: float | None) -> str:
    """A skewness or excess kurtosis for display: two significant digits, and "0.00" only for a
    size below ``SHAPE_NOISE`` (a symmetric sample computes to some 1e-15, which is rounding,
    not shape)."""
    if value is not None and abs(value) < SHAPE_NOISE:  # NaN compares False and stays "n/a"
        return "0.00"
    return format_number(value, digits=2)


def decimals_for(value: float, digits: int) -> int:
    """Decimals that show ``value`` to ``digits`` significant digits (after rounding)."""
    if value == 0:
        return 0
    rounded = float(f"{value:.{digits - 1}e}")
    exponent = math.floor(math.log10(abs(rounded)))
    return max(0, digits - 1 - exponent)


def _fixed_significant(value: float, digits: int) -> str:
    text = f"{value:.{decimals_for(value, digits)}f}"
    return text[1:] if text.startswith("-") and float(text) == 0 else text


def fixed(value: float | None, decimals: int | None, *, digits: int = 3) -> str:
    """``value`` with ``decimals`` decimals (None: :func:`format_number` with ``digits``).

    A value that is not zero but would round to zero at these decimals gets the decimals of its
    first significant digit instead ("-0.002", not "0.00"): rounding never changes a sign.
    """
    if value is None or not math.isfinite(value) or decimals is None:
        return format_number(value, digits=digits)
    text = f"{value:.{decimals}f}"
    if value != 0 and float(text) == 0:
        if abs(value) < SCIENTIFIC_SMALL:
            return format_number(value, digits=1)
        text = f"{value:.{decimals_for(value, 1)}f}"
    return text[1:] if text.startswith("-") and float(text) == 0 else text


def _distinct(values: list[float], decimals: int | None, digits: int) -> bool:
    """Whether the distinct ``values`` stay distinct as text with these decimals."""
    texts = {fixed(v, decimals, digits=digits) for v in values}
    return len(texts) == len(values)


def shared_decimals(values: Iterable[float | None], digits: int = 3, *,
                    start: int | None = None) -> int | None:
    """Decimals for numbers shown together (None: each in scientific notation).

    Parameters
    ----------
    values : iterable of float or None
        The numbers shown side by side (None and non-finite ones are skipped).
    digits : int
        Significant digits of the largest in size.
    start : int or None, keyword-only
        Decimals to start from whatever the size (for example two for a standardised effect
        size); None: from ``digits``.

    Notes
    -----
    Start from ``start``, or from the decimals that show the largest to ``digits`` significant
    digits (scientific notation below 1e-4 or from 1e9 up), then add decimals until values that differ read
    differently, up to ``MAX_SIGNIFICANT`` significant digits of the largest. When scientific
    notation would show two different values alike, fixed decimals are used instead.
    """
    finite = [float(v) for v in values if v is not None and math.isfinite(v)]
    if not finite or max(abs(v) for v in finite) == 0:
        return 0 if start is None else start
    largest = max(abs(v) for v in finite)
    distinct = sorted(set(finite))
    scientific = start is None and (largest < SCIENTIFIC_SMALL or largest >= SCIENTIFIC_LARGE)
    if scientific and _distinct(distinct, None, digits):
        return None
    if start is not None:
        decimals = start
    else:
        decimals = 0 if scientific else decimals_for(largest, digits)
    top = max(decimals, MAX_SIGNIFICANT - 1 - math.floor(math.log10(largest)))
    while decimals < top and not _distinct(distinct, decimals, digits):
        decimals += 1
    return decimals


# Significant digits that show a number the user typed as typed (a float carries 15 to 17; the
# last of them are noise of the arithmetic, as in 8.4 * 5 / 100 = 0.42000000000000004).
ENTERED_DIGITS = 12


def entered_decimals(values: Iterable[float | None]) -> int | None:
    """Decimals that show every one of ``values`` as the user entered it (a margin of 0.5 reads
    "0.5", of 1.25 "1.25", never "0.500"), shared by all of them; None when one of them needs
    scientific notation (:func:`fixed` then writes each to three significant digits)."""
    decimals = 0
    for value in values:
        if value is None or not math.isfinite(value):
            continue
        text = f"{abs(float(value)):.{ENTERED_DIGITS}g}"
        if "e" in text:
            return None
        decimals = max(decimals, len(text.partition(".")[2]))
    return decimals


def level_text(level: float) -> str:
    """A confidence level as a percentage: 0.95 -> "95%", 0.975 -> "97.5%".

    Up to four decimals of the percentage, more for a level so close to 1 that four would read
    as "100%" (a level is always below 1).
    """
    for decimals in range(4, 16):
        text = f"{round(level * 100, decimals):.{decimals}f}".rstrip("0").rstrip(".")
        if text != "100" or level >= 1:
            break
    return f"{text}%"
