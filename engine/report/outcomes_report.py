"""The report of several outcomes compared at once (an ``engine.outcomes.OutcomesAnalysis``):
the table of every outcome, which adjustment the verdicts follow and why one would choose each,
each outcome's suggestion and checks in short, and the cautions.

``html`` gives one self-contained HTML page (the command's ``report`` and the window's "Save a
report..." write it); ``plain`` the same as text. Both are built from the same report blocks
(:mod:`engine.report.tables`), so they say the same things. The analysis is read, never run:
the adjusted p-values, the Bonferroni intervals and every outcome's results come with it.
"""

from __future__ import annotations

from datetime import datetime
from pathlib import Path
from typing import Any

from ..rounding import fixed, format_p, level_text
from ..text import visible, visible_html
from . import tables
from .cautions import HEADING as CAUTIONS_HEADING
from .cautions import cautions
from .document import CHECKSUM_NAME, rerun_parts
from .margins import estimate_is_ratio
from .numbers import _effect_decimals, display_numbers, format_interval
from .pairs import is_paired, n_pairs
from .sentences import question_text

__all__ = ["html", "plain", "sections", "blocks", "table_block", "page_blocks", "headings", "row_cells", "title",
           "ADJUSTMENT_SHORT", "VERDICT_WORDS", "WIDE_LABELS", "SEVERAL_CAUTIONS", "NONE"]

# The adjustments as a table heading and a sentence name them.
ADJUSTMENT_SHORT = {"holm": "Holm", "bh": "Benjamini-Hochberg"}
_ADJUSTMENT_OWNER = {"holm": "Holm's", "bh": "Benjamini and Hochberg's"}

# The verdict of one outcome, by the kind of question: (marked, not marked). "{a}" is group 1.
VERDICT_WORDS = {
    "differ": ("differ", "no clear difference"),
    "lower": ("{a} lower", "not clear"),
    "higher": ("{a} higher", "not clear"),
    "equivalent": ("equivalent", "not shown equivalent"),
    "not_worse": ("not worse", "worse not ruled out"),
}
# A cell with nothing to show (a procedure without a p-value or an interval).
NONE = "none"
_NOT_ANALYSED = "not analysed"
_NO_P = "no p-value"

# What to keep in mind with several outcomes, before the cautions of each comparison.
SEVERAL_CAUTIONS = (
    "The adjustments count only the outcomes in this table. Outcomes that were looked at and then "
    "left out are not counted, so the outcomes should be chosen before the results are seen.",
    "The outcomes are measured on the same units, so their results are usually related. Holm's "
    "adjustment and the intervals at the Bonferroni level hold however they are related; Benjamini "
    "and Hochberg's holds when the outcomes are unrelated or tend to rise and fall together, the "
    "usual case, but not for every kind of relation.",
)
_UNMARKED_CAUTION = {
    "differ": "An outcome not marked as differing is not shown to be the same in both groups; its "
              "interval gives the differences the data still allow.",
    "lower": "An outcome not marked is not shown to be the same in both groups; its interval gives "
             "the differences the data still allow.",
    "equivalent": "An outcome not shown equivalent is not shown to differ either; its interval "
                  "against the margin says which.",
    "not_worse": "An outcome where worse is not ruled out is not shown to be worse either; its "
                 "interval against the margin says which.",
}
_UNMARKED_CAUTION["higher"] = _UNMARKED_CAUTION["lower"]


def _first_analysis(found):
    return next((done.analysis for done in found.outcomes if done.analysis is not None), None)


# In the wide layout each outcome has columns of its own: the groups have no names in common.
WIDE_LABELS = ("group 1", "group 2")


def _labels(found) -> tuple[str, str]:
    """The two groups' labels (the long layout's group labels; in the wide layout "group 1" and
    "group 2", each outcome's first and second column)."""
    if found.spec.layout == "wide":
        return WIDE_LABELS
    analysis = _first_analysis(found)
    if analysis is not None:
        return tuple(str(label) for label in analysis.groups.labels)
    if found.spec.groups:
        return tuple(str(label) for label in found.spec.groups)
    return WIDE_LABELS


def title(found) -> str:
    """The report's title: "north_forge and east_works compared on 4 outcomes" ("Two groups
    compared on 3 outcomes" in the wide layout)."""
    first, second = _labels(found)
    count = len(found.outcomes)
    groups = "Two groups" if found.spec.layout == "wide" else f"{first} and {second}"
    return f"{groups} compared on {count} outcome{'s' if count != 1 else ''}"


def headings(found) -> list[str]:
    """The headings of the table of outcomes."""
    level = level_text(found.level)
    return ["Outcome", "n", "Procedure", f"Estimate ({level} interval)",
            f"Interval at {level_text(found.simultaneous_level)} (Bonferroni)", "p-value",
            "Holm", "Benjamini-Hochberg", "Standardised effect",
            f"Verdict by {ADJUSTMENT_SHORT[found.adjustment]}"]


def _verdict(found, finding: bool | None) -> str:
    if finding is None:
        return _NO_P
    marked, unmarked = VERDICT_WORDS.get(found.spec.question.kind, VERDICT_WORDS["differ"])
    return (marked if finding else unmarked).format(a=_labels(found)[0])


def _sizes(analysis) -> str:
    if is_paired(analysis):
        return f"{n_pairs(analysis):,} pairs"
    return " and ".join(f"{n:,}" for n in analysis.groups.n)


def _effect_cell(effect) -> str:
    if effect is None:
        return NONE
    if effect.interval is None:
        return fixed(effect.value, 2)
    decimals = _effect_decimals(effect)
    return f"{fixed(effect.value, decimals)} ({format_interval(effect.interval, decimals=decimals)})"


def row_cells(found, index: int) -> list[str]:
    """The cells of outcome ``index``'s row, as :func:`headings` names them."""
    done, row = found.outcomes[index], found.rows[index]
    analysis = done.analysis
    if analysis is None:
        return [done.outcome.name, NONE, _NOT_ANALYSED] + [NONE] * 6 + [_NOT_ANALYSED]
    if done.result is None:
        return [done.outcome.name, _sizes(analysis), _NOT_ANALYSED] + [NONE] * 5 + [
            _effect_cell(done.effect), _NOT_ANALYSED]
    numbers = display_numbers(analysis, done.key)
    together = row.simultaneous_interval
    return [
        done.outcome.name, _sizes(analysis),
        done.result.name,
        f"{numbers.estimate} ({numbers.interval or 'no interval'})",
        format_interval(together, decimals=numbers.decimals) if together is not None else NONE,
        numbers.p or NONE,
        NONE if row.p_holm is None else format_p(row.p_holm),
        NONE if row.p_bh is None else format_p(row.p_bh),
        _effect_cell(done.effect), _verdict(found, row.finding),
    ]


def table_block(found) -> tuple:
    """The table of every outcome as one report block (see :mod:`engine.report.tables`): three
    text columns, six of numbers, the verdict. Wide: for text and for copying into a document."""
    body = [row_cells(found, index) for index in range(len(found.outcomes))]
    return ("grid", headings(found), body, 3, True, 6)


# The wide table in two parts that fit a page: the estimates (outcome, n, procedure, estimate,
# Bonferroni interval, effect), then the p-values and verdicts (outcome, p, Holm, BH, verdict).
_ESTIMATE_COLUMNS = (0, 1, 2, 3, 4, 8)
_P_COLUMNS = (0, 5, 6, 7, 9)


def page_blocks(found) -> list[tuple]:
    """The table of every outcome as two report blocks, each narrow enough for a page: the
    estimates, then the p-values and verdicts, each row led by its outcome."""
    head = headings(found)
    body = [row_cells(found, index) for index in range(len(found.outcomes))]

    def part(columns: tuple[int, ...], text_columns: int, numbers: int) -> tuple:
        return ("grid", [head[j] for j in columns], [[line[j] for j in columns] for line in body],
                text_columns, True, numbers)

    return [part(_ESTIMATE_COLUMNS, 3, 3), part(_P_COLUMNS, 1, 3)]


def _estimate_words(found) -> str:
    """What each procedure in the table estimates, and the standardised effect beside it."""
    estimates = {done.result.name: done.result.estimate_name for done in found.outcomes
                 if done.result is not None and done.result.estimate_name}
    said = [f"{name}: {estimate}" for name, estimate in estimates.items()]
    effect = next((done.effect for done in found.outcomes if done.effect is not None), None)
    if effect is not None:
        level = level_text(effect.interval.level) if effect.interval is not None else None
        said.append(f"standardised effect: {effect.name}" + (f", with its {level} interval" if level else "")
                    + ", so that outcomes measured in different units can be set side by side")
    return ("Estimates: " + "; ".join(said) + ".") if said else ""


def _estimate_note(found) -> list[tuple]:
    words = _estimate_words(found)
    return [("small", words)] if words else []


def _marked_count(found, method: str) -> int:
    alpha = found.spec.question.alpha
    return sum(p is not None and p < alpha for p in found.adjusted(method))


def _adjustment_blocks(found) -> list[tuple]:
    chosen, other = found.adjustment, ("bh" if found.adjustment == "holm" else "holm")
    alpha = found.spec.question.alpha
    marked = _marked_count(found, chosen)
    tested = sum(p is not None for p in found.adjusted(chosen))
    other_marked = _marked_count(found, other)
    said = (f"The verdicts follow {_ADJUSTMENT_OWNER[chosen]} adjusted p-values: an outcome is marked when "
            f"its adjusted p-value is below {round(alpha, 12):g} (1 minus the confidence level). "
            f"{marked} of the {tested} outcomes with a p-value are marked; by "
            f"{_ADJUSTMENT_OWNER[other]} adjustment {other_marked} would be.")
    return [("p", said), ("list", [finding.text for finding in found.findings])]


def _choice_pairs(found) -> list[tuple[str, str]]:
    spec = found.spec
    labels = _labels(found)
    analysis = _first_analysis(found)
    source = spec.source
    rows = []
    if source is not None:
        rows.append(("Data file", Path(source.path).name))
        if source.sheet:
            rows.append(("Sheet", str(source.sheet)))
        if source.sha256:
            rows.append((CHECKSUM_NAME, source.sha256))
    ratio = analysis is not None and estimate_is_ratio(analysis)
    compared = (f"{labels[0]} (first) and {labels[1]} (second)" if spec.layout == "long" else
                f"{labels[0]}: the first column of each outcome; {labels[1]}: the second")
    rows.append(("Groups compared", f"{compared}; "
                                    + (f"ratios are {labels[0]} over {labels[1]}" if ratio
                                       else f"differences are {labels[0]} minus {labels[1]}")))
    if spec.layout == "long" and spec.group_column is not None:
        rows.append(("Group column", str(spec.group_column)))
    rows.append(("Outcomes", "; ".join(
        done.outcome.name + ("" if done.outcome.columns == (done.outcome.name,)
                             else f" (columns {', '.join(done.outcome.columns)})")
        for done in found.outcomes)))
    # a margin in % is said as entered: in units it differs from one outcome to the next
    rows.append(("Question", question_text(spec.question, labels)))
    rows.append(("Confidence level", level_text(found.level)))
    rows.append(("Procedure read", "the same for every outcome: " + _procedure_name(found)
                 if found.procedure is not None else "each outcome's own suggestion"))
    rows.append(("Verdicts follow", f"{_ADJUSTMENT_OWNER[found.adjustment]} adjustment"))
    rows.append(("Resamples for permutation and bootstrap", f"{spec.resamples} (random seed {spec.seed})"))
    return rows


def _procedure_name(found) -> str:
    for done in found.outcomes:
        if done.result is not None and done.key == found.procedure:
            return done.result.name
    return str(found.procedure)


def _suggestion(analysis) -> tuple:
    return analysis.recommendation.key, analysis.recommendation.reasons


def _outcome_blocks(found, index: int) -> list[tuple]:
    """One outcome in short: the values used, the suggestion and its reasons, the checks worth
    reading, and what could not be done."""
    done = found.outcomes[index]
    analysis = done.analysis
    out: list[tuple] = [("h", done.outcome.name)]
    if analysis is None:
        return out + [("p", f"Not analysed: {done.problem}")]
    items = []
    screening = getattr(analysis, "screening", None)
    if screening is not None:
        items += [finding.text for finding in screening.findings]
    suggestion = analysis.recommendation
    same = next((earlier for earlier in found.outcomes[:index] if earlier.analysis is not None
                 and _suggestion(earlier.analysis) == _suggestion(analysis)), None)
    items.append(f"Suggested: the {suggestion.name}, for the same reasons as for {same.outcome.name}."
                 if same is not None else f"Suggested: the {suggestion.name}. " + " ".join(suggestion.reasons))
    if done.key is not None and done.key != suggestion.key:
        read = done.result.name if done.result is not None else done.key
        items.append(f"The table reads the {read} for this outcome, as chosen for every outcome.")
    concerns = [finding.text for finding in analysis.diagnostics.findings if finding.severity != "info"]
    items += concerns or ["The checks of shape, spread, outliers and ties raised nothing worth a note."]
    items += [note.text for note in analysis.notes]
    if done.problem is not None:
        items.append(done.problem)
    return out + [("list", items)]


def _cautions(found) -> list[str]:
    """The several outcomes' own cautions, each outcome's data cautions (named), then those of
    every comparison of its kind, each said once."""
    kind = found.spec.question.kind
    said = list(SEVERAL_CAUTIONS) + [_UNMARKED_CAUTION.get(kind, _UNMARKED_CAUTION["differ"])]
    shared: list[str] = []
    for done in found.outcomes:
        if done.analysis is None:
            continue
        own = list(done.analysis.recommendation.cautions)
        said += [f"{done.outcome.name}: {text}" for text in own]
        shared += [text for text in cautions(done.analysis) if text not in own]
    if not shared:
        shared = cautions(None)
    return list(dict.fromkeys(said + shared))


def sections(found) -> list[tuple[str, list[tuple]]]:
    """The report's body as (heading, blocks) sections (blocks as :mod:`engine.report.tables`
    writes them), shared by :func:`html` and :func:`plain`."""
    outcomes: list[tuple] = []
    for index in range(len(found.outcomes)):
        outcomes += _outcome_blocks(found, index)
    return [
        ("Choices made", [("pairs", _choice_pairs(found))]),
        ("Every outcome", [table_block(found)] + _estimate_note(found)),
        ("How the verdicts were reached", _adjustment_blocks(found)),
        ("Each outcome in short", outcomes),
        (CAUTIONS_HEADING, [("list", _cautions(found))]),
    ]


def blocks(found) -> list[tuple]:
    """The report's body as one list of blocks, each section's heading a block of its own (for a
    window that copies the report)."""
    out: list[tuple] = []
    for heading, inner in sections(found):
        out += [("h", heading)] + inner
    return out


def _rerun_blocks(reopened) -> list[tuple]:
    return [("list", [reopened.message] + list(reopened.differences))]


def html(found, *, reopened: Any = None, when: datetime | None = None) -> str:
    """The whole report of several outcomes as one HTML page.

    Parameters
    ----------
    found : engine.outcomes.OutcomesAnalysis
        The finished analysis of every outcome.
    reopened : engine.saved.Reopened or None, keyword-only
        When ``found`` is a saved analysis run again: its outcome, shown first, and the spec it
        recorded.
    when : datetime or None, keyword-only
        The date written on the report; None: now, in the local time zone.
    """
    when = when or datetime.now().astimezone()
    heading = title(found)
    parts: list[str] = [f"<h1>{visible_html(heading)}</h1>",
                        f"<p>Written on {visible_html(when.strftime('%Y-%m-%d %H:%M %Z').strip())} by Twofold.</p>"]
    if reopened is not None:
        parts += rerun_parts(reopened)
    for section, inner in sections(found):  # no text between blocks: a PDF page must not end in an empty one
        if inner and inner[0][0] == "grid":  # the wide table in two parts that fit a page
            inner = page_blocks(found) + inner[1:]
        parts += [f"<h2>{visible_html(section)}</h2>", tables.html(inner)]
    body = "".join(parts)
    return (f'<!DOCTYPE html>\n<html><head><meta charset="utf-8"><title>{visible_html(heading)}</title>'
            "<style>body{font-family:sans-serif;max-width:72em;margin:1.5em auto;line-height:1.4}"
            "table{border-collapse:collapse}td,th{padding:4px 8px;vertical-align:top}</style>"
            f"</head><body>{body}</body></html>")


def plain(found, *, reopened: Any = None) -> str:
    """The report of :func:`html` as plain text: the title, then each section under its heading
    (underlined); with ``reopened``, the outcome of running the saved analysis again first."""
    parts = [_underlined(title(found), "=")]
    body = ([("The saved analysis, run again", _rerun_blocks(reopened))] if reopened is not None else [])
    for section, inner in body + sections(found):
        parts += [_underlined(section, "-"), tables.plain(inner)]
    return "\n".join(parts)


def _underlined(heading: str, mark: str) -> str:
    shown = visible(heading)
    return f"{shown}\n{mark * len(shown)}\n"
