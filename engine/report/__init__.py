"""A finished analysis as words: one paragraph, an HTML fragment with tables, and plain text.

This package holds every sentence and every display number of Twofold's findings:
``numbers`` (the figures as shown), ``sentences`` (the paragraph, the agreement of the
procedures), ``cautions``, ``tables`` (blocks as HTML or plain text) and ``findings`` (the report
of one procedure). The names below are the ones the rest of the program imports.
"""

from __future__ import annotations

from ..rounding import (NOT_AVAILABLE, P_CEILING, P_FLOOR, SCIENTIFIC_LARGE, SCIENTIFIC_SMALL, fixed,
                        format_number, format_p, format_shape, p_clause, shared_decimals)
from ..side_by_side import PROBABILITY_KEYS
from ..wording import GLOSSES, capital, plural
from .cautions import CAUTION_LINE, GENERAL_CAUTIONS, cautions
from .findings import ReportText, render
from .numbers import (DIGITS, EFFECT_DECIMALS, EFFECT_FOR, MEDIAN_KEYS, RANK_KEYS, STATISTIC_LABEL, U_KEYS,
                      DisplayNumbers, _effect_decimals, display_numbers, format_interval)
from .sentences import EXCLUSION_WORDS, _pair_share, agreement

__all__ = ["ReportText", "DisplayNumbers", "render", "display_numbers", "format_p", "format_number",
           "format_shape", "format_interval", "p_clause", "plural", "capital", "agreement", "cautions",
           "GLOSSES", "GENERAL_CAUTIONS", "CAUTION_LINE", "NOT_AVAILABLE", "P_CEILING", "P_FLOOR",
           "SCIENTIFIC_LARGE", "SCIENTIFIC_SMALL", "fixed", "shared_decimals", "PROBABILITY_KEYS",
           "DIGITS", "EFFECT_DECIMALS", "EFFECT_FOR", "MEDIAN_KEYS", "RANK_KEYS", "STATISTIC_LABEL",
           "U_KEYS", "EXCLUSION_WORDS"]
