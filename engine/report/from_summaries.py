"""The whole report of a comparison from summary statistics (an
:class:`engine.summary_analysis.SummaryAnalysis`), for a reader who checks it.

For a question with a margin the answer against the margin comes first; then the two groups as
entered, the question and what was stated, every procedure that works from summaries side by side
(with the statistic and degrees of freedom of each), the effect sizes, the suggestion and its
reasons, what would have needed the values, the findings and the cautions.

``blocks`` gives the report as blocks (``engine.report.tables``), ``html`` one self-contained HTML
page, ``plain`` the same as text. The words of the verdicts are the question's own
(:class:`engine.question.Question`) and the side-by-side tables those of every other report
(:mod:`engine.side_by_side`), so a result from summaries reads as one from values.
"""

from __future__ import annotations

from datetime import datetime
from typing import Any

from ..rounding import entered_decimals, fixed, format_number, shared_decimals
from ..side_by_side import agreement_text, margin_agreement_text, margin_table, procedure_table
from ..text import visible_html
from ..wording import capital
from . import tables
from .cautions import CAUTIONS_ALWAYS, HEADING as CAUTIONS_HEADING, cautions
from .margins import margin_question, margin_tests
from .sentences import question_text
from .numbers import DisplayNumbers, _numbers, format_interval, level_text, margin_decimals

__all__ = ["html", "plain", "blocks", "title", "answer_lines", "question_sentence", "margin_texts",
           "summary_cautions", "ANSWER_HEADING"]

ANSWER_HEADING = "The answer against the margin"
# The cautions of every report that speak of checks of the values; from summaries none ran.
_ABOUT_CHECKS = (CAUTIONS_ALWAYS[0], CAUTIONS_ALWAYS[2])


def title(analysis) -> str:
    """The report's title: "Comparison of A and B from summary statistics"."""
    first, second = analysis.labels
    return f"Comparison of {first} and {second} from summary statistics"


def _entered(value: float) -> str:
    """A number as the user gave it (up to twelve significant digits, no rounding of its own)."""
    return f"{value:.12g}"


def _group_rows(analysis) -> tuple[list[str], list[list[str]]]:
    head = ["Group", "n", "Mean", "Spread as entered", "SD used"]
    body = []
    for s in analysis.stats:
        if s.given_as == "se":
            spread = f"standard error {_entered(s.se)}"
        else:
            spread = f"SD {_entered(s.sd)}" + (", a known population value" if s.sd_known else "")
        body.append([s.label, f"{s.n:,}", _entered(s.mean), spread,
                     format_number(s.standard_deviation, digits=4)])
    return head, body


def margin_texts(analysis, key: str | None = None) -> tuple[str, str]:
    """The margin as the verdicts name it ("±1.90 (±5% of B's mean)") and as it was entered
    ("-5% to 5% of B's mean (38), that is -1.90 to 1.90 in the measurement's units"; for
    non-inferiority the size on the worse side and which way is worse), its decimals those of
    the verdict of procedure ``key`` (default: the suggested one). Only for a margin question."""
    question, used = analysis.spec.question, analysis.margin
    given = question.margin
    answer = analysis.margin_answer(key or analysis.recommendation.key)
    decimals = margin_decimals(answer) if answer is not None else shared_decimals([used.low, used.high])
    size = question.margin_text(used, analysis.labels, decimals)
    not_worse = question.kind == "not_worse"
    ends = (abs(given.bound),) if not_worse else (given.low, given.high)
    shown = [fixed(v, entered_decimals(ends)) for v in ends]
    if given.unit == "percent":
        converted = (abs(used.bound),) if not_worse else (used.low, used.high)
        entered = (" to ".join(f"{v}%" for v in shown) + f" of {analysis.labels[1]}'s mean "
                   f"({_entered(analysis.stats[1].mean)}), that is "
                   + " to ".join(fixed(v, decimals) for v in converted) + " in the measurement's units")
    else:
        entered = " to ".join(shown) + " in the measurement's units"
    if not_worse:
        entered += f"; {given.worse} values are worse"
    return size, entered


def question_sentence(analysis, size: str | None = None) -> str:
    """The question in words: "Do A and B differ?", "Are A and B equivalent within ±1.90 (±5% of
    B's mean)?" (``size``: the margin as :func:`margin_texts` names it)."""
    question = analysis.spec.question
    if question.has_margin and size is None:
        size = margin_texts(analysis)[0]
    if question.has_margin:
        return margin_question(question, analysis.labels, size or "")
    return question_text(question, analysis.labels)


def _reported_key(analysis) -> str | None:
    """The suggested procedure, or the first that ran when it did not."""
    key = analysis.recommendation.key
    if key in analysis.procedures:
        return key
    return next(iter(analysis.procedures), None)


def answer_lines(analysis) -> list[str]:
    """The answer to the question by the suggested procedure, in sentences: for a margin
    question its verdict against the margin and the one-sided tests behind it; otherwise what
    it says at the chosen level. Empty when no procedure ran."""
    key = _reported_key(analysis)
    if key is None:
        return []
    question, result = analysis.spec.question, analysis.procedures[key]
    if analysis.margin is not None:
        answer = analysis.margin_answer(key)
        if answer is None:
            return [f"The {result.name} gave no interval to set against the margin, so it does not "
                    "answer the question."]
        lines = [f"By the {result.name}: "
                 + question.margin_words(answer, analysis.labels, result.estimate_name)]
        tests = margin_tests(analysis, key)
        return lines + ([tests] if tests else [])
    row = next((r for r in analysis.robustness.rows if r.key == key), None)
    finds = None if row is None else row.finds_difference
    said = question.answer(finds=finds, estimate=result.estimate, p_value=result.p_value)
    words = question.verdict_words(said, analysis.labels, level_text(question.level))
    return [f"By the {result.name}: {words}"] if words else []


def _choice_rows(analysis, size: str | None, entered: str | None) -> list[tuple[str, str]]:
    spec, question = analysis.spec, analysis.spec.question
    first, second = analysis.labels
    rows = [("Groups compared", f"{first} (first) and {second} (second); differences are "
                                f"{first} minus {second}"),
            ("Design", "two independent groups"),
            ("Question", question_sentence(analysis, size))]
    level = level_text(question.level)
    if analysis.margin is not None:
        rows.append(("Margin as entered", entered))
        level += (f" (a test at the {level_text(question.alpha)} level; the two-sided "
                  f"{level_text(1 - 2 * question.alpha)} interval is set against the margin)")
    rows.append(("Confidence level", level))
    rows.append(("Spreads known to be equal", "yes" if spec.statements.equal_spread_known else "no"))
    known = spec.statements.known_sd
    rows.append(("Known population SDs", "no" if known is None
                 else " and ".join(format_number(s, digits=4) for s in known)))
    return rows


def _numbers_for(analysis):
    def numbers_for(key: str) -> DisplayNumbers:
        return _numbers(analysis, key, analysis.procedures[key])
    return numbers_for


def _procedure_blocks(analysis, size: str | None) -> list[tuple]:
    question, labels = analysis.spec.question, analysis.labels
    numbers_for = _numbers_for(analysis)
    blocks: list[tuple] = [("h", "Every procedure that works from summary statistics")]
    if not analysis.procedures:
        return blocks + [("p", "No procedure could be computed from these numbers; the notes below say why.")]
    if analysis.margin is not None:
        head, body, notes = margin_table(analysis.robustness, question, labels, numbers_for,
                                         analysis.procedures.__getitem__, analysis.margin_answer)
        agree = margin_agreement_text(analysis.robustness, question, labels, size or "")
        grid = ("grid", head, body, 1, True, 4)
    else:
        head, body, notes = procedure_table(analysis.robustness, question.alternative, labels,
                                            level_text(analysis.robustness.level), numbers_for)
        agree = agreement_text(analysis.robustness, question.alternative, labels,
                               level_text(analysis.robustness.level))
        grid = ("grid", head, body, 1, True, 3)
    blocks += [("p", agree), grid]
    blocks += [("small", note) for note in dict.fromkeys(notes)]
    details = []
    for key, result in analysis.procedures.items():
        shown = numbers_for(key)
        details.append([capital(result.name), _statistic(result, shown), shown.df or "none", result.method])
    blocks += [("h", "How each was found"),
               ("grid", ["Procedure", "Test statistic", "Degrees of freedom", "Method"], details, 1, True, 2)]
    return blocks


def _statistic(result, shown: DisplayNumbers) -> str:
    """The test statistic as shown; the two of two one-sided tests, lower end first."""
    lower, upper = result.details.get("t_lower"), result.details.get("t_upper")
    if result.key.startswith("equivalence_") and lower is not None and upper is not None:
        return f"{format_number(lower)} against the lower end; {format_number(upper)} against the upper end"
    return shown.statistic or "none"


def _effect_blocks(analysis) -> list[tuple]:
    if not analysis.effect_sizes:
        return []
    first, second = analysis.labels
    body = []
    for size in analysis.effect_sizes.values():
        level = level_text(size.interval.level) if size.interval is not None else ""
        body.append([capital(size.name), f"{size.value:.2f}",
                     f"{level} {format_interval(size.interval, decimals=2)}" if size.interval is not None
                     else "none"])
    return [("h", "Effect sizes"),
            ("p", f"Standardised differences, {first} minus {second}, in units of a standard deviation."),
            ("grid", ["Effect size", "Value", "Confidence interval"], body, 1, False)]


def _suggestion_blocks(analysis) -> list[tuple]:
    suggestion = analysis.recommendation
    return [("h", f"Why the {suggestion.name}"), ("list", list(suggestion.reasons))]


def _values_blocks(analysis) -> list[tuple]:
    needs = [capital(name) for name in analysis.needs_values.values()]
    if not needs:
        return [("h", "What needed the values"),
                ("p", "Every procedure for this question runs from summary statistics.")]
    return [("h", "What needed the values"),
            ("p", "These would have run on the values themselves and cannot run from summary statistics:"),
            ("list", needs)]


def _finding_blocks(analysis) -> list[tuple]:
    # what needed the values is listed above, under its own heading
    found = [finding.text for finding in analysis.findings + analysis.notes if finding.key != "needs_values"]
    return [("h", "Findings"), ("list", found)] if found else []


def summary_cautions(analysis) -> list[str]:
    """The cautions of every report (:func:`engine.report.cautions`) without the ones about
    checks of the values, which summary statistics never ran."""
    return [c for c in cautions(analysis) if c not in _ABOUT_CHECKS]


def blocks(analysis) -> list[tuple]:
    """The report as blocks (see :mod:`engine.report.tables`), the cautions last."""
    key = _reported_key(analysis)
    size = entered = None
    if analysis.margin is not None:
        size, entered = margin_texts(analysis, key)
    out: list[tuple] = []
    if analysis.margin is not None:
        out += [("h", ANSWER_HEADING)] + [("p", line) for line in answer_lines(analysis)]
    first, second = analysis.labels
    head, body = _group_rows(analysis)
    out += [("h", "The two groups as entered"), ("grid", head, body, 1, False, 2)]
    out += [("h", "The question and what was stated"), ("pairs", _choice_rows(analysis, size, entered))]
    if analysis.margin is None:
        out += [("p", line) for line in answer_lines(analysis)]
    out += _procedure_blocks(analysis, size)
    out += _effect_blocks(analysis)
    out += _suggestion_blocks(analysis)
    out += _values_blocks(analysis)
    out += _finding_blocks(analysis)
    out += [("h", CAUTIONS_HEADING), ("list", summary_cautions(analysis))]
    return out


def html(analysis, *, reopened: str | None = None, when: datetime | None = None) -> str:
    """The whole report as one self-contained HTML page.

    Parameters
    ----------
    analysis : engine.summary_analysis.SummaryAnalysis
        The finished analysis from summary statistics.
    reopened : str or None, keyword-only
        When the analysis is a saved one run again: what running it again found, said first.
    when : datetime or None, keyword-only
        The date written on the report; None: now, in the local time zone.
    """
    when = when or datetime.now().astimezone()
    heading = title(analysis)
    e = visible_html  # labels as entered are text: no markup, no control or direction characters
    parts = [f"<h1>{e(heading)}</h1>",
             f"<p>Written on {e(when.strftime('%Y-%m-%d %H:%M %Z').strip())} by Twofold, from the "
             "summary statistics entered; no data file was read.</p>"]
    if reopened is not None:
        parts += ["<h2>The saved analysis, run again</h2>", f"<p>{e(reopened)}</p>"]
    parts.append(tables.html(blocks(analysis)))
    body = "".join(parts)
    return (f'<!DOCTYPE html>\n<html><head><meta charset="utf-8"><title>{e(heading)}</title>'
            "<style>body{font-family:sans-serif;max-width:48em;margin:1.5em auto;line-height:1.4}"
            "table{border-collapse:collapse}td,th{padding:4px 8px;vertical-align:top}</style>"
            f"</head><body>{body}</body></html>")


def plain(analysis, *, reopened: str | None = None) -> str:
    """The same report as plain text: one line per paragraph, tables aligned in columns."""
    lines: list[tuple[Any, ...]] = [("h", title(analysis))]
    if reopened is not None:
        lines.append(("p", reopened))
    return tables.plain(lines + blocks(analysis))
