"""A finished analysis as words: one paragraph, an HTML fragment with tables, and plain text.

This is the only module that rounds numbers for display (``format_number``, ``format_p``).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from .text import visible, visible_html

__all__ = ["ReportText", "DisplayNumbers", "render", "display_numbers", "format_p", "format_number",
           "format_shape", "format_interval", "p_clause", "plural", "capital", "agreement", "cautions",
           "GLOSSES", "GENERAL_CAUTIONS"]

from .rounding import (NOT_AVAILABLE, P_CEILING, P_FLOOR, SCIENTIFIC_LARGE, SCIENTIFIC_SMALL, fixed,
                       format_number, format_p, format_shape, p_clause, shared_decimals)
from .procedures.registry import RECORDS, find as _record
from .side_by_side import PROBABILITY_KEYS, agreement_text, procedure_table
from .wording import GLOSSES, capital, gloss_line, plural


@dataclass(frozen=True)
class ReportText:
    """The report of one procedure: a paragraph, an HTML fragment and plain text."""

    paragraph: str
    html: str
    plain: str


# -- the report -----------------------------------------------------------------------------------

# Standardised effect sizes are shown with two decimals (common practice), more when a narrow
# interval would otherwise show the same number at both ends (very large groups).
EFFECT_DECIMALS = 2
# Significant digits of estimates, intervals and statistics in the text.
DIGITS = 3

# What the report needs to know of each procedure, from its record (engine.procedures.registry).
# The effect sizes that go with each procedure's question.
EFFECT_FOR: dict[str, tuple[str, ...]] = {r.key: r.effect_sizes for r in RECORDS}
# How each procedure's statistic is written ("Welch t(52.3) = 2.84"); None: not written.
STATISTIC_LABEL: dict[str, str | None] = {r.key: r.statistic_label for r in RECORDS}
RANK_KEYS = tuple(r.key for r in RECORDS if r.family == "rank")
# Procedures whose statistic is U, a whole or half number.
U_KEYS = tuple(r.key for r in RECORDS if r.statistic_in_halves)
MEDIAN_KEYS = tuple(r.key for r in RECORDS if r.estimate_kind == "median")

CAUTION_LINE = ("A p-value is not the size of an effect; a check that passes does not prove an "
                "assumption; regulated work follows its own rules and needs a qualified "
                "statistician's review.")


@dataclass(frozen=True)
class DisplayNumbers:
    """The display strings of one procedure's result, shared by the paragraph and the tables.

    ``effect_key`` and ``effect_name`` name the effect size paired with the procedure (None
    when none was computed); ``decimals`` is shared by the estimate, its interval and the group
    summaries (None: each in scientific notation).
    """

    level: str
    estimate: str
    interval: str | None
    statistic: str | None
    df: str | None
    p: str | None
    mc_se: str | None
    effect_key: str | None
    effect_name: str | None
    effect: str | None
    effect_interval: str | None
    decimals: int | None


def _level(level: float) -> str:
    return f"{round(level * 100, 4):g}%"


def _decimals_shared(values, digits: int = DIGITS) -> int | None:
    """Decimals for numbers shown together (see :func:`engine.rounding.shared_decimals`)."""
    return shared_decimals(values, digits)


def _fixed(value: float | None, decimals: int | None, digits: int = DIGITS) -> str:
    return fixed(value, decimals, digits=digits)


def format_interval(interval, *, decimals: int | None = None, digits: int = DIGITS) -> str | None:
    """An interval in words and numbers: "1.2 to 7.0", "at least 1.2" or "at most 7.0".

    Parameters
    ----------
    interval : engine.results.Interval or None
        None gives None; an open end (one-sided interval) is written in words.
    decimals : int or None, keyword-only
        Decimals of both ends; None: enough to show the larger end to ``digits`` significant
        digits, shared by both ends.
    digits : int, keyword-only
        Significant digits when ``decimals`` is None.
    """
    if interval is None:
        return None
    low, high = interval.low, interval.high
    if decimals is None:
        decimals = _decimals_shared([low, high], digits)
    if low is None and high is None:
        return "unbounded"
    # An end the test rejects is left out of the interval; that is said where it decides the
    # reading (an end at 0, no difference). Elsewhere the open end lies as close to the value
    # shown as the rounding allows, and "from above 10.6" would only puzzle a reader.
    low_open = getattr(interval, "low_open", False) and low == 0
    high_open = getattr(interval, "high_open", False) and high == 0
    if high is None:
        return f"{'above' if low_open else 'at least'} {_fixed(low, decimals)}"
    if low is None:
        return f"{'below' if high_open else 'at most'} {_fixed(high, decimals)}"
    if low_open or high_open:
        return (f"from {'above ' if low_open else ''}{_fixed(low, decimals)} to "
                f"{'below ' if high_open else ''}{_fixed(high, decimals)}")
    return f"{_fixed(low, decimals)} to {_fixed(high, decimals)}"


def _df_text(df: float | None) -> str | None:
    if df is None or not math.isfinite(df):
        return None
    if abs(df - round(df)) < 1e-9:
        return f"{int(round(df))}"
    return format_number(df, digits=DIGITS)


def _statistic_text(key: str, value: float | None) -> str | None:
    if value is None or not math.isfinite(value):
        return None
    if key in U_KEYS and abs(value * 2 - round(value * 2)) < 1e-9:
        return f"{value:.1f}".removesuffix(".0")  # U is a whole or half number
    return format_number(value, digits=DIGITS)


def _effect_decimals(effect) -> int:
    """Two decimals, or more until the value and the interval's ends that differ read
    differently."""
    values = [effect.value, effect.interval.low, effect.interval.high]
    decimals = shared_decimals(values, start=EFFECT_DECIMALS)
    return EFFECT_DECIMALS if decimals is None else decimals


def _effect_for(analysis, key: str):
    for name in EFFECT_FOR.get(key, ("hedges_g",)):
        effect = analysis.effect_sizes.get(name)
        if effect is not None:
            return effect
    return None


def display_numbers(analysis, procedure: str | None = None) -> DisplayNumbers:
    """The figures of one procedure's result as the report writes them.

    Parameters
    ----------
    analysis : engine.analysis.Analysis
        The finished analysis.
    procedure : str or None, optional
        A procedure key; None takes the recommended one.

    Returns
    -------
    DisplayNumbers
        The confidence level, the estimate, its interval, the test statistic, degrees of
        freedom, p-value, Monte Carlo error and the paired effect size with its interval, each as
        text (None where the procedure gives none), exactly as in :func:`render`'s paragraph and
        tables, so that a window showing them reads the same as the copied report.

    Raises
    ------
    engine.errors.OptionProblem
        When ``procedure`` was not run for these data.

    Notes
    -----
    The estimate and both interval ends share one number of decimals: enough to show the largest
    of them to three significant digits, more while two of them that differ would read alike
    (:func:`engine.rounding.shared_decimals`). Standardised effect sizes get two decimals, more
    while the value and the ends of their interval would otherwise read alike. p-values follow
    :func:`format_p`.

    References
    ----------
    American Psychological Association (2020). Publication Manual, 7th ed., chapter 6 (numbers
    and statistics in text).
    """
    key = procedure or analysis.recommendation.key
    _check_procedure(analysis, key)
    return _numbers(analysis, key, analysis.procedures[key])


def _numbers(analysis, key: str, result) -> DisplayNumbers:
    interval = result.interval
    ends = [result.estimate] + ([interval.low, interval.high] if interval is not None else [])
    decimals = _decimals_shared(ends)
    effect = _effect_for(analysis, key)
    effect_decimals = EFFECT_DECIMALS if effect is None else _effect_decimals(effect)
    return DisplayNumbers(
        level=_level(interval.level if interval is not None else analysis.spec.level),
        estimate=_fixed(result.estimate, decimals),
        interval=format_interval(interval, decimals=decimals),
        statistic=_statistic_text(key, result.statistic) if STATISTIC_LABEL.get(key) else None,
        df=_df_text(result.df),
        p=None if result.p_value is None else format_p(result.p_value),
        mc_se=(None if result.mc_standard_error is None
               else format_number(result.mc_standard_error, digits=2)),
        effect_key=None if effect is None else effect.key,
        effect_name=None if effect is None else effect.name,
        effect=None if effect is None else _fixed(effect.value, effect_decimals),
        effect_interval=None if effect is None else format_interval(effect.interval,
                                                                    decimals=effect_decimals),
        decimals=decimals,
    )


def _measure(analysis) -> str:
    """The name of the measured quantity when the source gives a single one, else ""."""
    source = analysis.source or {}
    values = source.get("value_columns") or ()
    if source.get("group_column") and len(values) == 1:
        return str(values[0])
    return ""


def _interval_phrase(numbers: DisplayNumbers, alternative: str, prefix: str = "") -> str:
    if numbers.interval is None:
        return "no confidence interval"
    sided = "one-sided " if alternative != "two-sided" else ""
    return f"{sided}{prefix}{numbers.level} CI {numbers.interval}"


def _group_phrase(summary, key: str, decimals: int | None) -> str:
    if key in RANK_KEYS or key in MEDIAN_KEYS:
        return (f"{summary.label} (median {_fixed(summary.median, decimals)}, quartiles "
                f"{_fixed(summary.q1, decimals)} to {_fixed(summary.q3, decimals)}, n = {summary.n:,})")
    return (f"{summary.label} (mean {_fixed(summary.mean, decimals)}, SD "
            f"{_fixed(summary.sd, decimals)}, n = {summary.n:,})")


def _summary_decimals(analysis, numbers_decimals: int | None) -> int | None:
    values = []
    for s in analysis.summaries:
        values += [s.mean, s.sd, s.median, s.q1, s.q3]
    own = _decimals_shared(values)
    if own is None or numbers_decimals is None:
        return own
    return max(own, numbers_decimals)


def _pair_share(share: float) -> str:
    """A share of pairs as a percentage that never reads as one half unless it is one half."""
    for decimals in range(0, 4):
        text = f"{100 * share:.{decimals}f}"
        if share == 0.5 or float(text) != 50:
            return text + "%"
    return ("just over" if share > 0.5 else "just under") + " 50%"


def _rank_direction(analysis, key: str, a: str, b: str) -> str:
    """Who tended to be higher, from U (the share of pairs in which group 1 is the larger, ties
    counting half), not from the shift estimate: a claim when the test is clear, otherwise a
    description of the samples."""
    result = analysis.procedures[key]
    n1, n2 = analysis.groups.n
    u1 = result.details.get("U1")
    if u1 is None:
        from .effects import mann_whitney_u1
        u1 = mann_whitney_u1(analysis.groups.x, analysis.groups.y)
    share = u1 / (n1 * n2)
    # the robustness view's rule: the test is clear when p is below 1 - level
    clear = (result.p_value is not None
             and result.p_value < 1 - analysis.spec.level)
    if clear and share != 0.5:
        word = "higher" if share > 0.5 else "lower"
        return f"Values of {a} tended to be {word} than those of {b}"
    if share == 0.5:
        return (f"In these samples, values of {a} were higher than those of {b} in as many "
                "pairs as they were lower")
    return (f"In these samples, values of {a} were higher than those of {b} in "
            f"{_pair_share(share)} of pairs (ties counting half)")


def _direction(analysis, key: str, estimate: float, result_decimals: int | None) -> str:
    """The opening clause: who was higher, in the words of the procedure's quantity."""
    first, second = analysis.summaries
    decimals = _summary_decimals(analysis, result_decimals)
    measure = _measure(analysis)
    a, b = _group_phrase(first, key, decimals), _group_phrase(second, key, decimals)
    if key in RANK_KEYS:
        return _rank_direction(analysis, key, a, b)
    quantity = "median" if key in MEDIAN_KEYS else "mean"
    quantity = f"{quantity} {measure}" if measure else quantity
    if estimate > 0:
        return f"The {quantity} of {a} was higher than that of {b}"
    if estimate < 0:
        return f"The {quantity} of {a} was lower than that of {b}"
    return f"The {quantity} of {a} was the same as that of {b}"


def _resampled(key: str) -> str | None:
    """ "permutation" or "bootstrap" when the procedure's p-value or interval comes from
    resampling (its record's ``resampled``), else None."""
    known = _record(key)
    return None if known is None else known.resampled


def _test_phrase(analysis, key: str, result, numbers: DisplayNumbers) -> str:
    """ "Welch t(52.3) = 2.84, p = 0.006" and its kin."""
    alternative = result.alternative
    first, second = analysis.groups.labels
    parts = []
    label = STATISTIC_LABEL.get(key)
    if label and numbers.statistic is not None:
        df = f"({numbers.df})" if numbers.df is not None and key != "z" else ""
        parts.append(f"{label}{df} = {numbers.statistic}")
    if numbers.p is not None:
        sided = "one-sided " if alternative != "two-sided" else ""
        method = "permutation " if _resampled(key) == "permutation" else ""
        p = f"{sided}{method}{p_clause(result.p_value)}"
        if method:
            if numbers.mc_se is not None:
                p += f" (Monte Carlo standard error {numbers.mc_se})"
        parts.append(p)
        if alternative != "two-sided":
            word = "higher" if alternative == "greater" else "lower"
            parts.append(f"testing whether {first} is {word} than {second}")
    elif _resampled(key) == "bootstrap":
        parts.append("the bootstrap gives an interval but no p-value")
    return ", ".join(parts)


# How each reason for leaving a value out is written (engine.io.screening.EXCLUSION_REASONS).
EXCLUSION_WORDS: dict[str, str] = {
    "missing": "empty or missing",
    "non_numeric": "not a number",
    "infinite": "infinite",
    "set_aside": "set aside after review",
}


def _exclusions(analysis) -> str:
    """ "4 values were left out before the comparison (3 empty or missing, 1 not a number)." """
    screening = analysis.screening
    counts = getattr(screening, "excluded_counts", None) if screening is not None else None
    if not counts:
        return ""
    pairs = list(counts.items()) if hasattr(counts, "items") else list(counts)
    pairs = [(EXCLUSION_WORDS.get(str(reason), str(reason).replace("_", " ")), int(n))
             for reason, n in pairs if n]
    if not pairs:
        return ""
    total = sum(n for _, n in pairs)
    detail = ", ".join(f"{n:,} {words}" for words, n in pairs)
    verb = "value was" if total == 1 else "values were"
    return f"{total:,} {verb} left out before the comparison ({detail})."


def _verdict(analysis, key: str, result, numbers: DisplayNumbers) -> str:
    """What the result says at the chosen level, so that a sample difference is not read as a
    finding when the data cannot tell it from chance (and the reverse)."""
    row = next((r for r in analysis.robustness.rows if r.key == key), None)
    known = _record(key)
    question = analysis.spec.question
    answer = question.answer(finds=None if row is None else row.finds_difference,
                             estimate=result.estimate, p_value=result.p_value,
                             no_difference=0.0 if known is None else known.no_difference)
    return question.verdict_words(answer, analysis.groups.labels, numbers.level)


def _paragraph(analysis, key: str, result, numbers: DisplayNumbers) -> str:
    opening = _direction(analysis, key, result.estimate, numbers.decimals)
    estimate_name = result.estimate_name
    bootstrap = _resampled(key) == "bootstrap"
    prefix = "bootstrap " if bootstrap else ""
    body = f"{estimate_name} {numbers.estimate}, {_interval_phrase(numbers, result.alternative, prefix)}"
    if bootstrap:
        body += f" ({analysis.spec.resamples:,} resamples)"
    test = _test_phrase(analysis, key, result, numbers)
    sentence = f"{opening}: {body}" + (f"; {test}." if test else ".")
    sentences = [sentence]
    verdict = _verdict(analysis, key, result, numbers)
    if verdict:
        sentences.append(verdict)
    if numbers.effect is not None:
        effect = f"{numbers.effect_name} = {numbers.effect}"
        if numbers.effect_interval is not None:
            sided = "one-sided " if result.alternative != "two-sided" else ""
            effect += f", {sided}{numbers.level} CI {numbers.effect_interval}"
        sentences.append(effect[:1].upper() + effect[1:] + ".")
    sentences.extend(w if w.endswith(".") else w + "." for w in result.warnings)
    excluded = _exclusions(analysis)
    if excluded:
        sentences.append(excluded)
    recommended = analysis.recommendation.key
    if key != recommended:
        sentences.append(f"This report uses the {result.name}; the procedure suggested for these "
                         f"data was the {analysis.recommendation.name}.")
    return " ".join(sentences)


def _result_rows(analysis, key: str, result, numbers: DisplayNumbers) -> list[tuple[str, str]]:
    sided = "one-sided " if result.alternative != "two-sided" else ""
    first, second = analysis.groups.labels
    rows = [("Procedure", capital(result.name)),
            (capital(result.estimate_name)
             + ("" if key in PROBABILITY_KEYS else f", {first} minus {second}"), numbers.estimate)]
    if numbers.interval is not None:
        rows.append((f"{sided}{numbers.level} confidence interval".capitalize(), numbers.interval))
    label = STATISTIC_LABEL.get(key)
    if label and numbers.statistic is not None:
        rows.append(("Test statistic", f"{label.split()[-1]} = {numbers.statistic}"))
    if numbers.df is not None and key != "z":
        rows.append(("Degrees of freedom", numbers.df))
    if numbers.p is not None:
        rows.append(("One-sided p-value" if sided else "p-value", numbers.p))
    if numbers.mc_se is not None:
        rows.append(("Monte Carlo standard error of p", numbers.mc_se))
    if numbers.effect is not None:
        text = numbers.effect
        if numbers.effect_interval is not None:
            text += f" ({sided}{numbers.level} CI {numbers.effect_interval})"
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
    return head, body


_CELL = "border: 1px solid #999; padding: 2px 8px; text-align: left;"
_NUMBER_CELL = "border: 1px solid #999; padding: 2px 8px; text-align: right;"
_TABLE = "border-collapse: collapse; margin: 6px 0;"
# Short cells keep to one line and each column asks for the width of its longest text: a word
# processor pasting the table otherwise narrows the columns until "Mean" or "32" breaks in two
# (seen in LibreOffice Writer 7.4, which reads the width attribute but not the nowrap style).
_ONE_LINE = f' nowrap style="white-space: nowrap; {_CELL}"'
_ONE_LINE_NUMBER = f' nowrap style="white-space: nowrap; {_NUMBER_CELL}"'


_BOLD = 1.25  # a bold character is about a quarter wider


def _shares(columns, padding: int = 3) -> list[str]:
    """Width attributes in per cent of the table for columns of (plain texts, bold texts), in
    proportion to each column's longest text (at most 40 characters, as a long text wraps,
    and ``padding`` more for the cell's padding), so that the table fits the page."""
    weights = [min(40, max([len(t) for t in plain] + [_BOLD * len(t) for t in bold])) + padding
               for plain, bold in columns]
    return [f' width="{100 * w / sum(weights):.0f}%"' for w in weights]


# Tables keep their rows whole across pages (a word processor otherwise splits a row and may
# leave an empty one behind).
_KEEP = "page-break-inside: avoid;"


# Room a number is given beyond its characters in a wrapping table (Qt's layout breaks a number
# that does not fit its share, non-breaking spaces or not).
_NUMBER_ROOM = "      "
# Characters of a text column of a wrapping table counted for its width (it wraps beyond).
_WRAP_TEXT = 16
# A name longer than this may wrap in its cell (it would otherwise squeeze the value column).
_ONE_LINE_NAME = 32


def _html_pairs(rows) -> list[str]:
    e = visible_html  # labels from the file are text: no markup, no control or direction characters
    names, values = _shares([((), [name for name, _ in rows]), ([value for _, value in rows], ())])
    out = [f'<table width="100%" style="{_TABLE}">']
    for name, value in rows:
        keep = _ONE_LINE if len(name) <= _ONE_LINE_NAME else f' style="{_CELL}"'
        out.append(f'<tr style="{_KEEP}"><th{names}{keep}>{e(name)}</th>'
                   f'<td{values} style="{_CELL}">{e(value)}</td></tr>')
    out.append("</table>")
    return out


def _html_grid(head, body, text_columns: int, wrap: bool, number_columns: int | None = None) -> list[str]:
    """A table with a heading row: the first ``text_columns`` columns are text (left-aligned),
    the next ``number_columns`` (default: all the rest) numbers, right-aligned on one line, and
    any after them text again. With ``wrap`` the headings and text cells may wrap; without it
    every cell keeps to one line."""
    e = visible_html  # labels from the file are text: no markup, no control or direction characters
    text_cell = f' style="{_CELL}"' if wrap else _ONE_LINE
    numbers = range(text_columns, len(head) if number_columns is None else text_columns + number_columns)
    if wrap:  # a number needs its whole length, a heading its longest word, a text wraps
        widths = _shares([([line[j] + _NUMBER_ROOM for line in body], h.split()) if j in numbers
                          else ([line[j][:_WRAP_TEXT] for line in body], h.split()[:1])
                          for j, h in enumerate(head)], padding=5)
    else:
        widths = _shares([([line[j] for line in body], [h]) for j, h in enumerate(head)])
    out = [f'<table width="100%" style="{_TABLE}">',
           f'<tr style="{_KEEP}">' + "".join(f"<th{w}{text_cell}>{e(h)}</th>"
                                             for w, h in zip(widths, head)) + "</tr>"]
    # Beside cells that wrap, a number keeps to one line by its non-breaking spaces: a nowrap
    # cell there takes the spare width from the text columns in Qt's layout (the PDF).
    number_cell = _ONE_LINE_NUMBER if not wrap else f' style="{_NUMBER_CELL}"'
    for line in body:
        cells = [f"<td{number_cell}>{e(cell).replace(' ', '&nbsp;')}</td>" if j in numbers
                 else f"<td{text_cell}>{e(cell)}</td>" for j, cell in enumerate(line)]
        out.append(f'<tr style="{_KEEP}">' + "".join(cells) + "</tr>")
    out.append("</table>")
    return out


def _html(blocks) -> str:
    """The report's blocks as an HTML fragment (paragraphs, headings, lists and tables)."""
    e = visible_html  # labels from the file are text: no markup, no control or direction characters
    out: list[str] = []
    for kind, *content in blocks:
        if kind == "p":
            out.append(f"<p>{e(content[0])}</p>")
        elif kind == "small":
            out.append(f'<p style="font-size: smaller;">{e(content[0])}</p>')
        elif kind == "h":
            out.append(f"<h3>{e(content[0])}</h3>")
        elif kind == "list":
            out.append("<ul>" + "".join(f"<li>{e(item)}</li>" for item in content[0]) + "</ul>")
        elif kind == "pairs":  # no text between a table's rows: a word processor may show it as a row
            out.append("".join(_html_pairs(content[0])))
        elif kind == "grid":
            out.append("".join(_html_grid(*content)))
    return "\n".join(out)


def _plain_grid(head, body, text_columns: int, wrap: bool = False, number_columns: int | None = None
                ) -> list[str]:
    numbers = range(text_columns, len(head) if number_columns is None else text_columns + number_columns)
    widths = [max(len(line[i]) for line in [head, *body]) for i in range(len(head))]
    out = []
    for line in [head, *body]:
        cells = [cell.rjust(w) if j in numbers else cell.ljust(w)
                 for j, (cell, w) in enumerate(zip(line, widths))]
        out.append("  ".join(cells).rstrip())
    return out


def _visible_block(block: tuple) -> tuple:
    """A report block with every text in it passed through :func:`engine.text.visible`."""
    def clean(item):
        if isinstance(item, str):
            return visible(item)
        if isinstance(item, (list, tuple)):
            return type(item)(clean(part) for part in item)
        return item
    kind, *content = block
    return (kind, *(clean(part) for part in content))


def _plain(blocks) -> str:
    """The report's blocks as plain text: one line per paragraph (a document or a mail program
    wraps it to its own width) and tables aligned in columns."""
    # labels from the file with their control and direction characters written as escapes
    blocks = [_visible_block(block) for block in blocks]
    out: list[str] = []
    for kind, *content in blocks:
        if kind in ("p", "small"):
            out += [content[0], ""]
        elif kind == "h":
            out += [content[0], ""]
        elif kind == "list":
            out += [f"- {item}" for item in content[0]] + [""]
        elif kind == "pairs":
            width = max(len(name) for name, _ in content[0])
            out += [f"{name.ljust(width)}  {value}" for name, value in content[0]] + [""]
        elif kind == "grid":
            out += _plain_grid(*content) + [""]
    return "\n".join(out).rstrip("\n") + "\n"


# Shown after the suggestion's own cautions (which already cover p-values, passing checks and
# regulated work).
GENERAL_CAUTIONS = (
    "These procedures assume two independent groups; paired or repeated measurements need a "
    "paired procedure.",
)


def cautions(analysis) -> list[str]:
    """What to keep in mind before relying on the findings: the suggestion's own cautions, then
    the ones that hold for every comparison."""
    return list(analysis.recommendation.cautions) + list(GENERAL_CAUTIONS)


def agreement(analysis) -> str:
    """Whether every applicable procedure gives the same answer, in one to three sentences."""
    robustness = analysis.robustness
    return agreement_text(robustness, analysis.spec.alternative, analysis.groups.labels,
                          _level(robustness.level))


def _side_by_side_blocks(analysis) -> list[tuple]:
    rows = analysis.robustness.rows
    if not rows:
        return []
    head, body, notes = procedure_table(
        analysis.robustness, analysis.spec.alternative, analysis.groups.labels,
        _level(analysis.robustness.level),
        lambda key: _numbers(analysis, key, analysis.procedures[key]))
    blocks = [("h", "Every applicable procedure side by side"), ("p", agreement(analysis)),
              ("grid", head, body, 1, True, 3)]
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
    diagnostics = analysis.diagnostics
    readings = [finding.text for finding in getattr(diagnostics, "findings", ())]
    readings += [note.text for note in getattr(analysis, "notes", ())]
    if not readings:
        return []
    return [("h", "Shape and spread of the groups"), ("list", readings),
            ("small", gloss_line("skewness", "excess kurtosis", "interquartile range"))]


def _blocks(analysis, key: str, paragraph: str, rows, head, body) -> list[tuple]:
    blocks: list[tuple] = [("p", paragraph), ("pairs", rows), ("h", "The groups"),
                           ("grid", head, body, 1, False)]
    blocks += _side_by_side_blocks(analysis)
    blocks += _reason_blocks(analysis, key)
    blocks += _check_blocks(analysis)
    blocks.append(("small", CAUTION_LINE))
    return blocks


def _check_procedure(analysis, key: str) -> None:
    if key not in analysis.procedures:
        from .errors import OptionProblem

        raise OptionProblem(f"The procedure '{key}' was not run for these data, so it cannot be reported.")


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
        the alternatives weighed, and the shape and spread readings with a plain gloss of their
        terms. Plain-text paragraphs are single lines.

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
    numbers = display_numbers(analysis, procedure)  # refuses a procedure that was not run
    key = procedure or analysis.recommendation.key
    result = analysis.procedures[key]
    paragraph = visible(_paragraph(analysis, key, result, numbers))  # one line, as it is shown
    rows = _result_rows(analysis, key, result, numbers)
    head, body = _summary_rows(analysis, _summary_decimals(analysis, numbers.decimals))
    blocks = _blocks(analysis, key, paragraph, rows, head, body)
    return ReportText(paragraph=paragraph, html=_html(blocks), plain=_plain(blocks))
