"""The whole report of one analysis, for a reader who checks it: where the numbers came from and
what was decided (the data file with its checksum, the choices, the values set aside, the date),
the findings as :func:`engine.report.render` words them, pictures, and the cautions.

``html`` gives one self-contained HTML page (the window writes it as HTML or, through Qt, as
PDF; the headless command writes it too); ``text`` is the command's plain-text output. Qt-free:
the window hands its plots in as :class:`Picture` values.
"""

from __future__ import annotations

import json
from dataclasses import dataclass
from datetime import datetime
from pathlib import Path
from typing import Any, Sequence

from ..io.screening import EXCLUSION_WORDS, MAX_LISTED_EXCLUSIONS
from ..rounding import format_number
from ..text import visible_html
from . import tables
from .cautions import HEADING as CAUTIONS_HEADING
from .cautions import caution_blocks, cautions
from .findings import findings_blocks
from .margins import estimate_is_ratio, has_margin, margin_entered
from .numbers import level_text
from .pairs import LEFT_OUT_HEADING, design_text, is_paired, left_out_items, n_pairs
from .question_lines import setup_lines
from .sentences import procedure_followed, question_text

__all__ = ["html", "text", "text_lines", "Picture", "procedure_key", "file_rows", "choice_rows",
           "set_aside_rows", "title", "CHECKSUM_NAME", "HTML_IMAGE_WIDTH", "ZERO_RULE_WORDS"]

# The signed-rank test's rule for pairs that do not differ, as the choices say it.
ZERO_RULE_WORDS = {
    "drop": "left out of the signed-rank test (pairs that do not differ are dropped)",
    "pratt": "kept in the ranking and given no sign (Pratt's rule)",
}

# The checksum's row names its algorithm, so that a reader can recompute it.
CHECKSUM_NAME = "SHA-256 checksum"
# Width of the pictures in an HTML page, in pixels (a PDF takes the width of its text).
HTML_IMAGE_WIDTH = 640


@dataclass(frozen=True)
class Picture:
    """A picture of the report: its caption, its address (a ``data:`` URL, or a name the program
    showing the page resolves) and its natural size in pixels."""

    caption: str
    src: str
    width: float
    height: float


def procedure_key(analysis, procedure: str | None = None) -> str:
    """The procedure a report follows: the one given, else the one the spec picked (when it
    ran), else the suggested one."""
    if procedure is not None:
        return procedure
    picked = analysis.spec.procedure
    return picked if picked in analysis.procedures else analysis.recommendation.key


def _yes_no(flag: bool) -> str:
    return "yes" if flag else "no"


def choice_rows(analysis, procedure: str | None = None) -> list[tuple[str, str]]:
    """(what, choice) pairs describing the decisions behind the analysis (from its spec)."""
    spec = analysis.spec
    statements = spec.statements
    labels = analysis.groups.labels
    source = analysis.source
    columns = source.get("columns") or spec.value_columns
    if isinstance(columns, str):
        columns = (columns,)
    sheet = source.get("sheet") or (spec.source.sheet if spec.source is not None else None)
    paired = is_paired(analysis)
    sizes = (f"{n_pairs(analysis):,} pairs" if paired
             else f"{analysis.groups.n[0]} and {analysis.groups.n[1]} values")
    rows = [
        ("Groups compared", f"{labels[0]} (first) and {labels[1]} (second); "
                            + (f"ratios are {labels[0]} over {labels[1]}" if estimate_is_ratio(analysis)
                               else f"differences are {labels[0]} minus {labels[1]}")),
        ("Design", design_text(analysis)),
        ("Sizes", sizes),
    ]
    if sheet:
        rows.append(("Sheet", str(sheet)))
    if columns:
        rows.append(("Columns used", ", ".join(str(c) for c in columns)))
    question = spec.question
    level = level_text(spec.level)
    if has_margin(analysis):
        level += (f" (a test at the {level_text(question.alpha)} level; the two-sided "
                  f"{level_text(1 - 2 * question.alpha)} interval is set against the margin)")
    rows += [("Question", question_text(question, labels, analysis))]
    if has_margin(analysis):
        rows.append(("Margin", margin_entered(analysis, procedure_key(analysis, procedure))))
    rows += [
        ("Confidence level", level),
        ("Procedure followed", procedure_followed(analysis, procedure_key(analysis, procedure))),
    ]
    if not paired:  # the paired procedures look at the differences alone, never at two spreads
        rows.append(("Spreads known to be equal", _yes_no(statements.equal_spread_known)))
    rows.append(("Values are ordinal ratings", _yes_no(statements.ordinal)))
    if paired:
        rows.append(("Differences of zero", ZERO_RULE_WORDS.get(spec.zero_rule, spec.zero_rule)))
    if statements.known_sd is not None:
        rows.append(("Known population SDs",
                     " and ".join(format_number(s, digits=4) for s in statements.known_sd)))
    rows.append(("Resamples for permutation and bootstrap",
                 f"{spec.resamples} (random seed {spec.seed})"))
    return rows


# Why a value was left out, in the record of values set aside.
def set_aside_rows(analysis) -> list[tuple[str, str]]:
    """(where, why) pairs for every value left out of the groups (as the screening lists them).

    A value the user set aside carries the reason recorded in the spec. When the screening
    listed only some of the values it left out, a last row gives the count of the others by
    reason.
    """
    screening = analysis.screening
    if screening is None:
        return []
    given = {(cell.row, cell.column): cell.reason for cell in analysis.spec.set_aside}
    rows = []
    listed: dict[str, int] = {}
    for item in screening.exclusions:
        where = f"row {item.file_row} of the file, column {item.column}"
        if item.group is not None:
            where += f", group {item.group}"
        if item.text:
            where += f": '{item.text}'"
        why = EXCLUSION_WORDS.get(item.reason, item.reason)
        if item.reason == "set_aside" and given.get((item.file_row, item.column)):
            why += f" ({given[(item.file_row, item.column)]})"
        rows.append((where, why))
        listed[item.reason] = listed.get(item.reason, 0) + 1
    unlisted = {reason: count - listed.get(reason, 0)
                for reason, count in screening.excluded_counts.items() if count > listed.get(reason, 0)}
    if unlisted:
        rows.append(("other rows, not listed one by one",
                     "; ".join(f"{count} {EXCLUSION_WORDS.get(reason, reason)}"
                               for reason, count in unlisted.items())))
    return rows


class _Code(str):
    """A table value set as code: monospace, on one line (a checksum)."""


def file_rows(analysis) -> list[tuple[str, str]]:
    """The data file's name and the checksum of its bytes: the one the spec recorded, else the
    file's as it is now (or a row saying it was not found)."""
    source = analysis.spec.source
    name = analysis.source.get("file") or (Path(source.path).name if source is not None else None)
    if not name:
        return [("Data", "entered directly, not read from a file")]
    rows: list[tuple[str, str]] = [("Data file", Path(str(name)).name)]
    if source is not None and source.sha256 is not None:
        rows.append((CHECKSUM_NAME, _Code(source.sha256)))
    elif source is not None and Path(source.path).is_file():
        from ..io import file_checksum

        rows.append((CHECKSUM_NAME, _Code(file_checksum(source.path))))
    else:
        rows.append((CHECKSUM_NAME, "not available: the file was not found when the report was written"))
    return rows


def _escape(value: Any) -> str:
    return visible_html(value)  # labels from the file: no markup, no control or direction characters


# A checksum is set in a monospace font (no ligatures: copied out of a PDF it reads back
# exactly) on one line, a little smaller so that its 64 characters fit beside their name.
_CODE = "font-family: monospace; font-size: 8pt; white-space: nowrap;"
# Rows stay whole across pages (a word processor otherwise splits one and may leave it empty).
_KEEP = "page-break-inside: avoid;"


def _cell(value: Any) -> str:
    if isinstance(value, _Code):
        return f"<td nowrap style='{_CODE}'>{_escape(value)}</td>"
    return f"<td>{_escape(value)}</td>"


def _table(rows: Sequence[tuple[str, str]], headings: tuple[str, str], *, short_names: bool = False) -> str:
    """A table of names and values; with ``short_names`` the names keep to one line (beside a
    checksum, which does, a name that may wrap is squeezed to a letter a line)."""
    name = "<td nowrap style='white-space: nowrap;'>" if short_names else "<td>"
    head = "".join(f"<th align='left'>{_escape(h)}</th>" for h in headings)
    body = "".join(f"<tr style='{_KEEP}'>{name}{_escape(a)}</td>{_cell(b)}</tr>" for a, b in rows)
    return (f"<table border='1' cellspacing='0' cellpadding='4'><tr style='{_KEEP}'>{head}</tr>"
            f"{body}</table>")


def title(analysis) -> str:
    """The report's title: "Comparison of wax and resin"."""
    labels = analysis.groups.labels
    return f"Comparison of {labels[0]} and {labels[1]}"


def _flat(value: Any, prefix: str = "") -> list[tuple[str, Any]]:
    if isinstance(value, dict):
        rows: list[tuple[str, Any]] = []
        for key, inner in value.items():
            rows += _flat(inner, f"{prefix}.{key}" if prefix else key)
        return rows
    if isinstance(value, list) and any(isinstance(item, dict) for item in value):
        rows = []
        for number, item in enumerate(value, start=1):
            rows += _flat(item, f"{prefix} {number}")
        return rows or [(prefix, value)]
    return [(prefix, value)]


def spec_rows(spec) -> list[tuple[str, str]]:
    """Every member of the spec as (member, value as the saved file writes it), so a reader can
    check the report against a ``.twofold`` file line by line."""
    return [(name, json.dumps(value, ensure_ascii=False)) for name, value in _flat(spec.to_dict())]


def rerun_parts(reopened) -> list[str]:
    """The outcome of running a saved analysis again (an ``engine.saved.Reopened``), and the
    spec it recorded, member by member."""
    saved = reopened.saved
    rows = [("Outcome", reopened.status.replace("_", " ")),
            ("Saved on", saved.saved_at), ("Saved by", f"Twofold {saved.program_version}")]
    if reopened.source_used:
        rows.append(("Data file read", str(reopened.source_used)))
    parts = ["<h2>The saved analysis, run again</h2>", f"<p>{_escape(reopened.message)}</p>",
             _table(rows, ("What", "Record"))]
    if reopened.differences:
        parts.append("<ul>" + "".join(f"<li>{_escape(d)}</li>" for d in reopened.differences) + "</ul>")
    parts += ["<h2>Every choice, as the saved analysis records it</h2>",
              _table(spec_rows(saved.spec), ("Member", "Value"))]
    return parts


def html(analysis, procedure: str | None = None, *, pictures: Sequence[Picture] = (),
         when: datetime | None = None, image_width: float = HTML_IMAGE_WIDTH, reopened: Any = None) -> str:
    """The whole report as one HTML page.

    Parameters
    ----------
    analysis : engine.analysis.Analysis
        The finished analysis; its spec says what was decided.
    procedure : str or None, optional
        The procedure the findings follow (see :func:`procedure_key`).
    pictures : sequence of Picture, keyword-only
        Drawn after the findings, each at most ``image_width`` wide, its caption in a paragraph
        of its own (a line as tall as the picture would leave a gap under it).
    when : datetime or None, keyword-only
        The date written on the report; None: now, in the local time zone.
    reopened : engine.saved.Reopened or None, keyword-only
        When the analysis is a saved one run again: its outcome, shown first, and the spec it
        recorded.
    """
    key = procedure_key(analysis, procedure)
    when = when or datetime.now().astimezone()
    heading = title(analysis)
    parts = [f"<h1>{_escape(heading)}</h1>",
             f"<p>Written on {_escape(when.strftime('%Y-%m-%d %H:%M %Z').strip())} by Twofold.</p>",
             *(rerun_parts(reopened) if reopened is not None else ()),
             "<h2>The data</h2>", _table(file_rows(analysis), ("What", "Record"), short_names=True),
             "<h2>Choices made</h2>", _table(choice_rows(analysis, key), ("What", "Choice")),
             "<h2>Values set aside</h2>"]
    aside = set_aside_rows(analysis)
    parts.append(_table(aside, ("Where", "Why")) if aside else "<p>No values were set aside.</p>")
    if is_paired(analysis):
        left_out = left_out_items(analysis)[:MAX_LISTED_EXCLUSIONS]
        parts.append(f"<h2>{_escape(LEFT_OUT_HEADING)}</h2>")
        parts.append("<ul>" + "".join(f"<li>{_escape(item)}</li>" for item in left_out) + "</ul>"
                     if left_out else "<p>No pairs were left out.</p>")
        unlisted = len(left_out_items(analysis)) - len(left_out)
        if unlisted:
            parts.append(f"<p>{unlisted:,} more, not listed one by one.</p>")
    parts += ["<h2>Findings</h2>", tables.html(findings_blocks(analysis, key))]
    for picture in pictures:
        scale = image_width / picture.width if picture.width else 1.0
        parts.append(f"<p style='line-height: 100%; {_KEEP}'><img src='{picture.src}' "
                     f"width='{round(picture.width * scale)}' height='{round(picture.height * scale)}' "
                     f"alt='{_escape(picture.caption)}'></p><p><i>{_escape(picture.caption)}</i></p>")
    parts.append(f"<h2>{_escape(CAUTIONS_HEADING)}</h2><ul>")
    parts += [f"<li>{_escape(c)}</li>" for c in cautions(analysis)]
    parts.append("</ul>")
    body = "".join(parts)  # no text between blocks: a PDF page must not end in an empty one
    return (f'<!DOCTYPE html>\n<html><head><meta charset="utf-8"><title>{_escape(heading)}</title>'
            "<style>body{font-family:sans-serif;max-width:48em;margin:1.5em auto;line-height:1.4}"
            "table{border-collapse:collapse}td,th{padding:4px 8px;vertical-align:top}</style>"
            f"</head><body>{body}</body></html>")


def text_lines(analysis, findings_text: str, procedure: str | None = None) -> list[str]:
    """The command's plain summary around ``findings_text`` (:func:`render`'s plain text of
    ``procedure``, see :func:`procedure_key`): the file and its screening, the design and a
    margin question with its verdict, the suggestion, then the findings, which close with the
    cautions. Text from the file is not yet escaped (the caller prints each line through
    :func:`engine.text.visible`)."""
    lines = [f"File: {analysis.source.get('file')}"]
    screening = analysis.screening
    if screening is not None:
        for finding in screening.findings:
            lines.append(f"  [{finding.severity}] {finding.text}")
    for note in analysis.notes:
        lines.append(f"  [{note.severity}] {note.text}")
    lines.append("")
    lines.extend(setup_lines(analysis, procedure_key(analysis, procedure)))
    lines.append(f"Suggested procedure: {analysis.recommendation.name}")
    lines.append("")
    lines.extend(findings_text.rstrip().split("\n"))  # the report's own lines (its texts are escaped)
    return lines


def text(analysis, procedure: str | None = None) -> str:
    """The command's plain-text report: :func:`text_lines` around the findings of ``procedure``
    (see :func:`procedure_key`)."""
    key = procedure_key(analysis, procedure)
    # the screening above the findings lists the pairs left out already
    findings = tables.plain(findings_blocks(analysis, key) + caution_blocks(analysis))
    return "\n".join(text_lines(analysis, findings, key)) + "\n"
