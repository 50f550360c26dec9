"""A finished analysis as words: one paragraph, an HTML fragment with tables, and plain text.

This package holds every sentence and every display number of Twofold's findings:
``numbers`` (the figures as shown), ``sentences`` (the paragraph, the agreement of the
procedures, the question, which procedure was followed), ``cautions``, ``tables`` (blocks as
HTML or plain text), ``findings`` (the report of one procedure) and ``document`` (the whole
report of an analysis as an HTML page, and the command's text). The names below are the ones
the rest of the program imports.
"""

from __future__ import annotations

from ..rounding import (NOT_AVAILABLE, P_CEILING, P_FLOOR, SCIENTIFIC_LARGE, SCIENTIFIC_SMALL, fixed,
                        format_number, format_p, format_shape, p_clause, shared_decimals)
from ..side_by_side import PROBABILITY_KEYS
from ..wording import GLOSSES, capital, plural
from .cautions import CAUTIONS_ALWAYS, GENERAL_CAUTIONS, cautions
from .findings import ReportText, render
from .numbers import (DIGITS, EFFECT_DECIMALS, EFFECT_FOR, MEDIAN_KEYS, RANK_KEYS, STATISTIC_LABEL, U_KEYS,
                      DisplayNumbers, _effect_decimals, display_numbers, format_interval, level_text)
from .sentences import (DF_ROW, EXCLUSION_WORDS, MC_SE_ROW, QUESTIONS, STATISTIC_ROW, _pair_share, agreement,
                        estimate_label, p_label, procedure_followed, question_text)

__all__ = ["ReportText", "DisplayNumbers", "render", "display_numbers", "format_p", "format_number",
           "format_shape", "format_interval", "p_clause", "plural", "capital", "agreement", "cautions",
           "GLOSSES", "GENERAL_CAUTIONS", "CAUTIONS_ALWAYS", "NOT_AVAILABLE", "P_CEILING", "P_FLOOR",
           "SCIENTIFIC_LARGE", "SCIENTIFIC_SMALL", "fixed", "shared_decimals", "PROBABILITY_KEYS",
           "DIGITS", "EFFECT_DECIMALS", "EFFECT_FOR", "MEDIAN_KEYS", "RANK_KEYS", "STATISTIC_LABEL",
           "U_KEYS", "EXCLUSION_WORDS", "QUESTIONS", "level_text", "procedure_followed",
           "question_text", "estimate_label", "p_label", "STATISTIC_ROW", "DF_ROW", "MC_SE_ROW"]
