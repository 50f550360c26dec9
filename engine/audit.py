"""The audit report the headless command writes (``python -m engine report ... --html OUT``): the
data file with its checksum, the outcome of running a saved analysis again, every choice of the
spec as recorded, the findings (``engine.report.render``) and the cautions, as one HTML page.

The window writes its own report with plots (``desktop/export.py``); once the report package
builds that document in the engine, this module gives way to it.
"""

from __future__ import annotations

import json
import os
from datetime import datetime
from pathlib import Path
from typing import Any, Iterable

from .errors import TwofoldError
from .text import visible_html

__all__ = ["audit_html", "spec_rows", "refuse_overwriting"]

_PAGE_STYLE = ("body{font-family:sans-serif;max-width:48em;margin:1.5em auto;line-height:1.4}"
               "table{border-collapse:collapse}td,th{padding:4px 8px;vertical-align:top;text-align:left}"
               "code{white-space:nowrap}")


def refuse_overwriting(target: str | Path, keep: Iterable[str | Path]) -> None:
    """Raise a one-line :class:`TwofoldError` when ``target`` is one of the files in ``keep``
    (the data file, the saved analysis): a report never replaces them."""
    target = Path(target)
    for path in keep:
        try:
            same = target.exists() and Path(path).exists() and os.path.samefile(target, path)
        except OSError:
            same = False
        if same:
            raise TwofoldError(f"The report would replace {Path(path).name}, which it reads; "
                               "write the report to a file of its own (.html).")


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


def _table(rows: Iterable[tuple[str, str]], code: bool = False) -> str:
    wrap = (lambda text: f"<code>{visible_html(text)}</code>") if code else visible_html
    body = "".join(f"<tr><td>{visible_html(name)}</td><td>{wrap(value)}</td></tr>" for name, value in rows)
    return f"<table border='1' cellspacing='0'>{body}</table>"


def _check_part(reopened) -> list[str]:
    if reopened is None:
        return []
    saved = reopened.saved
    rows = [("Outcome", reopened.status.replace("_", " ")),
            ("Saved on", saved.saved_at), ("Saved by", f"Twofold {saved.program_version}")]
    if reopened.source_used:
        rows.append(("Data file read", reopened.source_used))
    parts = ["<h2>The saved analysis, run again</h2>", f"<p>{visible_html(reopened.message)}</p>",
             _table(rows)]
    if reopened.differences:
        parts.append("<ul>" + "".join(f"<li>{visible_html(d)}</li>" for d in reopened.differences) + "</ul>")
    return parts


def audit_html(analysis, *, procedure: str | None = None, reopened=None, when: datetime | None = None) -> str:
    """The audit report of ``analysis`` as one HTML page (``reopened``: the outcome of running a
    saved analysis again, shown first)."""
    from . import __version__
    from .report import cautions, render

    when = when or datetime.now().astimezone()
    spec = analysis.spec
    first, second = analysis.groups.labels
    title = f"{first} and {second}: the record of a two-group comparison"
    source = spec.source
    data_rows = [("Data file", source.path if source else "not read from a file")]
    if source is not None:
        data_rows += [("Sheet", source.sheet or "(a text file, or the first sheet)"),
                      ("SHA-256 of its bytes", source.sha256 or "not recorded")]
    data_rows.append(("Values used", f"{analysis.groups.n[0]} in {first}, {analysis.groups.n[1]} in {second}"))
    parts = [f"<h1>{visible_html(title)}</h1>",
             f"<p>Written on {visible_html(when.strftime('%Y-%m-%d %H:%M %Z').strip())} "
             f"by Twofold {visible_html(__version__)}.</p>",
             *_check_part(reopened),
             "<h2>The data</h2>", _table(data_rows),
             "<h2>Every choice, as a saved analysis records it</h2>", _table(spec_rows(spec), code=True),
             "<h2>Findings</h2>", render(analysis, procedure=procedure).html,
             "<h2>Before relying on this</h2>",
             "<ul>" + "".join(f"<li>{visible_html(c)}</li>" for c in cautions(analysis)) + "</ul>"]
    return (f'<!DOCTYPE html>\n<html><head><meta charset="utf-8"><title>{visible_html(title)}</title>'
            f"<style>{_PAGE_STYLE}</style></head><body>\n" + "\n".join(parts) + "\n</body></html>\n")
