"""The report of one procedure: a paragraph, then the result, the groups, every procedure side
by side, the reasons for the suggestion and the checks, as HTML and as plain text."""

from __future__ import annotations

from dataclasses import dataclass

from ..rounding import format_number, format_p
from ..side_by_side import margin_table, procedure_table
from ..text import visible
from ..wording import capital, gloss_line
from . import pairs, tables
from .cautions import caution_blocks
from .margins import estimate_is_ratio, has_margin, margin_entered, sameness_paragraph
from .numbers import (STATISTIC_LABEL, DisplayNumbers, _fixed, format_interval, level_text, _numbers,
                      _summary_decimals, display_numbers)
from .sentences import (DF_ROW, MC_SE_ROW, STATISTIC_ROW, agreement, effect_level_words, estimate_label,
                        p_label, paragraph)

__all__ = ["ReportText", "render", "findings_blocks"]

@dataclass(frozen=True)
class ReportText:
    """The report of one procedure: a paragraph, an HTML fragment and plain text.

    ``sameness``: after a "differ" question the data do not answer with "yes", the paragraph
    saying that a difference not shown is not sameness and how to ask for equivalence (the
    HTML and plain text carry it after the paragraph); "" otherwise.
    """

    paragraph: str
    html: str
    plain: str
    sameness: str = ""


def _margin_rows(analysis, result, numbers: DisplayNumbers) -> list[tuple[str, str]]:
    """The rows a margin question adds: the interval set against the margin, the (1 - alpha)
    interval of an equivalence verdict, the margin as entered."""
    question = analysis.spec.question
    rows = []
    if numbers.interval is not None:
        rows.append((f"{numbers.level} confidence interval, set against the margin", numbers.interval))
    wide = result.details.get("difference_interval")
    if question.kind == "equivalent" and wide is not None:
        rows.append((f"{level_text(wide.level)} confidence interval, whether the groups differ",
                     format_interval(wide, decimals=numbers.decimals)))
    rows.append(("Margin", margin_entered(analysis, result.key)))
    return rows


def _margin_test_rows(analysis, key: str, result, numbers: DisplayNumbers) -> list[tuple[str, str]]:
    """The statistics and one-sided p-values of a margin procedure, and its reading."""
    question, details = analysis.spec.question, result.details
    rows = []
    t_lower, t_upper = details.get("t_lower"), details.get("t_upper")
    label = STATISTIC_LABEL.get(key) or result.statistic_name
    symbol = label.split()[-1] if label else None
    if question.kind == "equivalent" and symbol and t_lower is not None and t_upper is not None:
        rows.append((STATISTIC_ROW, f"{symbol} = {format_number(t_lower)} against the lower end; "
                                    f"{format_number(t_upper)} against the upper end"))
    elif symbol and numbers.statistic is not None:
        rows.append((STATISTIC_ROW, f"{symbol} = {numbers.statistic}"))
    if numbers.df is not None:
        rows.append((DF_ROW, numbers.df))
    p_lower, p_upper = details.get("p_lower"), details.get("p_upper")
    if question.kind == "equivalent" and p_lower is not None and p_upper is not None:
        rows += [("One-sided p-value, lower end of the margin", format_p(p_lower)),
                 ("One-sided p-value, upper end of the margin", format_p(p_upper))]
    elif numbers.p is not None:
        rows.append(("One-sided p-value against the margin" if question.kind == "not_worse"
                     else "p-value of the two one-sided tests (the larger)", numbers.p))
    answer = analysis.margin_answer(key)
    if answer is not None:
        rows.append((f"At the {level_text(question.alpha)} level", capital(question.margin_reading(answer))))
    return rows


def _result_rows(analysis, key: str, result, numbers: DisplayNumbers) -> list[tuple[str, str]]:
    sided = "one-sided " if result.alternative != "two-sided" else ""
    first, second = analysis.groups.labels
    rows = [("Procedure", capital(result.name))]
    if pairs.is_paired(analysis):
        rows.append(("Design", capital(pairs.design_text(analysis))))
    rows.append((estimate_label(result, (first, second)), numbers.estimate))
    if has_margin(analysis):
        rows += _margin_rows(analysis, result, numbers)
        rows += _margin_test_rows(analysis, key, result, numbers)
    else:
        if numbers.interval is not None:
            rows.append((f"{sided}{numbers.level} confidence interval".capitalize(), numbers.interval))
        label = STATISTIC_LABEL.get(key)
        if label and numbers.statistic is not None:
            rows.append((STATISTIC_ROW, f"{label.split()[-1]} = {numbers.statistic}"))
        if numbers.df is not None and key != "z":
            rows.append((DF_ROW, numbers.df))
        if numbers.p is not None:
            rows.append((p_label(result.alternative), numbers.p))
    if numbers.mc_se is not None:
        rows.append((MC_SE_ROW, numbers.mc_se))
    if numbers.effect is not None:
        text = numbers.effect
        if numbers.effect_interval is not None:
            text += f" ({effect_level_words(analysis, result, numbers)} CI {numbers.effect_interval})"
        if numbers.effect_key in pairs.EFFECT_SCALE:
            text += f", {pairs.EFFECT_SCALE[numbers.effect_key]}"
        rows.append((f"Effect size: {numbers.effect_name}", text))
    rows.append(("How it was found", result.method))
    source = analysis.source or {}
    if source.get("file"):
        where = str(source["file"]) + (f", sheet {source['sheet']}" if source.get("sheet") else "")
        rows.append(("Data", where))
    return rows


def _summary_rows(analysis, decimals: int | None) -> tuple[list[str], list[list[str]]]:
    head = ["Group", "n", "Mean", "SD", "Median", "Quartiles", "Range"]
    body = [[s.label, f"{s.n:,}", _fixed(s.mean, decimals), _fixed(s.sd, decimals),
             _fixed(s.median, decimals), f"{_fixed(s.q1, decimals)} to {_fixed(s.q3, decimals)}",
             f"{_fixed(s.min, decimals)} to {_fixed(s.max, decimals)}"] for s in analysis.summaries]
    if pairs.is_paired(analysis):
        body.append(pairs.difference_row(analysis, decimals))
    return head, body


def _side_by_side_blocks(analysis) -> list[tuple]:
    rows = analysis.robustness.rows
    if not rows:
        return []

    def numbers_for(key: str) -> DisplayNumbers:
        return _numbers(analysis, key, analysis.procedures[key])

    if has_margin(analysis):
        head, body, notes = margin_table(
            analysis.robustness, analysis.spec.question, analysis.groups.labels, numbers_for,
            analysis.procedures.__getitem__, analysis.margin_answer, ratio=estimate_is_ratio(analysis))
        grid = ("grid", head, body, 1, True, 4)  # estimate, interval, margin, p-values: one line each
    else:
        head, body, notes = procedure_table(
            analysis.robustness, analysis.spec.alternative, analysis.groups.labels,
            level_text(analysis.robustness.level), numbers_for)
        grid = ("grid", head, body, 1, True, 3)
    blocks = [("h", "Every applicable procedure side by side"), ("p", agreement(analysis)), grid]
    blocks += [("small", note) for note in dict.fromkeys(notes)]
    return blocks


def _reason_blocks(analysis, key: str) -> list[tuple]:
    suggestion = analysis.recommendation
    title = (f"Why the {suggestion.name}" if key == suggestion.key
             else f"Why the {suggestion.name} was suggested")
    blocks = [("h", title)]
    if suggestion.reasons:
        blocks.append(("list", list(suggestion.reasons)))
    weighed = [f"{capital(option.name)}: {option.why_not}" for option in suggestion.considered]
    if weighed:
        blocks += [("h", "Also weighed"), ("list", weighed)]
    return blocks


def _check_blocks(analysis) -> list[tuple]:
    if pairs.is_paired(analysis):  # the paired procedures rest on the differences alone
        return pairs.check_blocks(analysis, [note.text for note in getattr(analysis, "notes", ())])
    diagnostics = analysis.diagnostics
    readings = [finding.text for finding in getattr(diagnostics, "findings", ())]
    readings += [note.text for note in getattr(analysis, "notes", ())]
    if not readings:
        return []
    return [("h", "Shape and spread of the groups"), ("list", readings),
            ("small", gloss_line("skewness", "excess kurtosis", "interquartile range"))]


def _blocks(analysis, key: str, paragraph: str, sameness: str, rows, head, body) -> list[tuple]:
    blocks: list[tuple] = [("p", paragraph)]
    if sameness:
        blocks.append(("p", sameness))
    title = "The groups and their pair differences" if pairs.is_paired(analysis) else "The groups"
    blocks += [("pairs", rows), ("h", title), ("grid", head, body, 1, False)]
    if pairs.is_paired(analysis):
        blocks += pairs.effect_blocks(analysis)
    blocks += _side_by_side_blocks(analysis)
    blocks += _reason_blocks(analysis, key)
    blocks += _check_blocks(analysis)
    return blocks


def render(analysis, *, procedure: str | None = None) -> ReportText:
    """The report of one procedure from a finished analysis.

    Parameters
    ----------
    analysis : engine.analysis.Analysis
        The finished analysis.
    procedure : str or None, keyword-only
        A procedure key; None reports the recommended one.

    Returns
    -------
    ReportText
        A paragraph in the usual reporting convention (groups with their summaries, the estimate
        with its interval, the test statistic with degrees of freedom and the p-value, the effect
        size with its interval, values left out); an HTML fragment and a plain-text version
        that carry what a reviewer asks for: the paragraph, the result and the groups as
        tables, every applicable procedure side by side (estimate with the direction of the
        difference, interval, p-value, reading), the reasons for the suggested procedure and
        the alternatives weighed, the shape and spread readings with a plain gloss of their
        terms, and the cautions (:func:`engine.report.cautions`). Plain-text paragraphs are
        single lines.

    Notes
    -----
    Estimates and interval ends share one number of decimals (three significant digits of the
    largest); standardised effect sizes have two decimals; p-values follow :func:`format_p`.
    One-sided intervals are written with their open end in words ("at least 1.2").

    References
    ----------
    American Psychological Association (2020). Publication Manual, 7th ed., chapter 6 (numbers
    and statistics in text).
    """
    words, sameness, blocks = _findings(analysis, procedure)
    blocks += caution_blocks(analysis)
    return ReportText(paragraph=words, html=tables.html(blocks), plain=tables.plain(blocks),
                      sameness=sameness)


def findings_blocks(analysis, procedure: str | None = None) -> list[tuple]:
    """The blocks of :func:`render`'s report without its closing cautions (a longer document
    places them after its own parts)."""
    return _findings(analysis, procedure)[2]


def _findings(analysis, procedure: str | None) -> tuple[str, str, list[tuple]]:
    numbers = display_numbers(analysis, procedure)  # refuses a procedure that was not run
    key = procedure or analysis.recommendation.key
    result = analysis.procedures[key]
    words = visible(paragraph(analysis, key, result, numbers))  # one line, as it is shown
    rows = _result_rows(analysis, key, result, numbers)
    sameness = visible(sameness_paragraph(analysis, key, numbers))
    # a ratio's or a probability's decimals say nothing of the values' own (near 1 or 1/2 they need three)
    decimals = _summary_decimals(analysis, numbers.decimals, key)
    if pairs.is_paired(analysis):
        decimals = pairs.with_differences(analysis, decimals)
    head, body = _summary_rows(analysis, decimals)
    return words, sameness, _blocks(analysis, key, words, sameness, rows, head, body)
