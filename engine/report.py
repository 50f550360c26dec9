"""A finished analysis as words: one paragraph, an HTML fragment with a table, and plain text.

This is the only module that rounds numbers for display (``format_number``, ``format_p``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

__all__ = ["ReportText", "render", "format_p", "format_number", "p_clause"]

# Below this a p-value is written as "< 0.001" (common practice in journals).
P_FLOOR = 0.001
# Significant digits kept in a p-value at or above the floor (common practice: two).
P_DIGITS = 2
# Plain numbers outside [SMALL, LARGE) in size are written in scientific notation.
SCIENTIFIC_SMALL = 1e-4
SCIENTIFIC_LARGE = 1e9
NOT_AVAILABLE = "n/a"


@dataclass(frozen=True)
class ReportText:
    """The report of one procedure: a paragraph, an HTML fragment and plain text."""

    paragraph: str
    html: str
    plain: str


def format_p(p: float | None) -> str:
    """A p-value for display: two significant digits, or "< 0.001" below 0.001.

    Parameters
    ----------
    p : float or None
        The p-value; None or NaN gives "n/a".

    Returns
    -------
    str
        For example "0.031", "0.0042", "0.27", "1.0" or "< 0.001".

    Notes
    -----
    A value is compared with 0.001 before rounding, so 0.0009999 is "< 0.001" and 0.001 is
    "0.0010". Values are rounded to two significant digits and written with fixed decimals.

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
    return _fixed_significant(p, P_DIGITS)


def p_clause(p: float | None) -> str:
    """"p = 0.031" or "p < 0.001" (the p-value as it sits in a sentence)."""
    text = format_p(p)
    return f"p {text}" if text.startswith("<") else f"p = {text}"


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
    if value is None or (isinstance(value, float) and math.isnan(value)):
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


def _decimals_for(value: float, digits: int) -> int:
    """Decimals that show ``value`` to ``digits`` significant digits (after rounding)."""
    if value == 0:
        return 0
    rounded = float(f"{value:.{digits - 1}e}")
    exponent = math.floor(math.log10(abs(rounded)))
    return max(0, digits - 1 - exponent)


def _fixed_significant(value: float, digits: int) -> str:
    text = f"{value:.{_decimals_for(value, digits)}f}"
    return text[1:] if text.startswith("-") and float(text) == 0 else text


def render(analysis, *, procedure: str | None = None) -> ReportText:
    """The report of ``procedure`` (default: the recommended one) from a finished analysis."""
    raise NotImplementedError("report rendering is being written")
