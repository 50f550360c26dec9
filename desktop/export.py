"""A finished comparison written out as a self-contained HTML page or a PDF.

The report records where the numbers came from and what was decided (the analysis's own spec):
the data file's name and checksum, the choices made with the seed, the values set aside, the
date, then the findings as
``engine.report.render`` words them and the plots as pictures. The HTML carries its pictures
inside it (``data:`` addresses), so the one file is the whole report. The PDF is drawn by Qt's
own writer from the same HTML.
"""

from __future__ import annotations

import base64
from datetime import datetime
from pathlib import Path
from typing import Any, Sequence

from PySide6.QtCore import QBuffer, QByteArray, QIODevice, QMarginsF, QSizeF, QUrl
from PySide6.QtGui import QImage, QPageLayout, QPageSize, QPdfWriter, QTextDocument

from engine.errors import FileProblem
from engine.text import visible_html

__all__ = ["level_text", "direction_text", "choice_rows", "set_aside_rows", "report_html",
           "export_report", "pdf_document", "pdf_text_width", "REPORT_SUFFIXES", "CHECKSUM_NAME",
           "save_start", "remember_save_folder", "SAVE_FOLDER_KEY"]

REPORT_SUFFIXES = (".html", ".pdf")
# The checksum's row names its algorithm, so that a reader can recompute it.
CHECKSUM_NAME = "SHA-256 checksum"
# Width of the pictures in an HTML report, in pixels (a PDF takes the width of its text).
HTML_IMAGE_WIDTH = 640
SAVE_FOLDER_KEY = "export/folder"  # in the user's settings: the folder of the last report or plot saved

_DIRECTIONS = {
    "two-sided": "do the two groups differ (either way)?",
    "greater": "is the first group higher?",
    "less": "is the first group lower?",
}


def level_text(level: float) -> str:
    """A confidence level as a percentage, e.g. 0.95 -> "95%", 0.975 -> "97.5%"."""
    return f"{round(100 * level, 6):g}%"


def direction_text(alternative: str) -> str:
    """The question a direction asks, in words."""
    return _DIRECTIONS.get(alternative, alternative)


def _yes_no(flag: bool) -> str:
    return "yes" if flag else "no"


def choice_rows(analysis, *, procedure: str) -> list[tuple[str, str]]:
    """(what, choice) pairs describing the decisions behind the analysis."""
    from engine.report import format_number

    spec = analysis.spec
    statements = spec.statements
    labels = analysis.groups.labels
    source = analysis.source
    columns = source.get("columns") or spec.value_columns
    if isinstance(columns, str):
        columns = (columns,)
    rows = [
        ("Groups compared", f"{labels[0]} (first) and {labels[1]} (second); "
                            f"differences are {labels[0]} minus {labels[1]}"),
        ("Sizes", f"{analysis.groups.n[0]} and {analysis.groups.n[1]} values"),
    ]
    sheet = source.get("sheet") or (spec.source.sheet if spec.source else None)
    if sheet:
        rows.append(("Sheet", str(sheet)))
    if columns:
        rows.append(("Columns used", ", ".join(str(c) for c in columns)))
    rows += [
        ("Question", direction_text(spec.alternative)),
        ("Confidence level", level_text(spec.level)),
        ("Procedure followed", _procedure_text(analysis, procedure)),
        ("Spreads known to be equal", _yes_no(statements.equal_spread_known)),
        ("Values are ordinal ratings", _yes_no(statements.ordinal)),
    ]
    if statements.known_sd is not None:
        rows.append(("Known population SDs",
                     " and ".join(format_number(s, digits=4) for s in statements.known_sd)))
    rows += [("Resamples for permutation and bootstrap", f"{spec.resamples:,}"),
             ("Random seed", f"{spec.seed} (the same seed gives the same resampled numbers again)")]
    return rows


def _procedure_text(analysis, procedure: str) -> str:
    suggested = analysis.recommendation
    name = analysis.procedures[procedure].name if procedure in analysis.procedures else procedure
    if procedure == suggested.key:
        return f"{name} (the suggested procedure)"
    return f"{name} (picked by the user; the suggestion was {suggested.name})"


_REASONS = {
    "missing": "empty or marked as missing",
    "non_numeric": "not a number",
    "infinite": "an infinite value",
    "set_aside": "set aside by the user",
}


def set_aside_rows(analysis) -> list[tuple[str, str]]:
    """(where, why) pairs for every value left out of the groups (as the screening lists them).

    A value the user set aside carries the reason the user gave. When the screening listed only
    some of the values it left out, a last row gives the count of the others by reason.
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
        why = _REASONS.get(item.reason, item.reason)
        if item.reason == "set_aside" and given.get((item.file_row, item.column)):
            why += f" ({given[(item.file_row, item.column)]})"
        rows.append((where, why))
        listed[item.reason] = listed.get(item.reason, 0) + 1
    unlisted = {reason: count - listed.get(reason, 0)
                for reason, count in screening.excluded_counts.items() if count > listed.get(reason, 0)}
    if unlisted:
        rows.append(("other rows, not listed one by one",
                     "; ".join(f"{count} {_REASONS.get(reason, reason)}" for reason, count in unlisted.items())))
    return rows


def _escape(text: Any) -> str:
    return visible_html(text)  # labels from the file: no markup, no control or direction characters


# A checksum is set in a monospace font (no ligatures: copied out of a PDF it reads back
# exactly) on one line, a little smaller so that its 64 characters fit beside their name.
_CODE = "font-family: monospace; font-size: 8pt; white-space: nowrap;"
# Rows stay whole across pages (a word processor otherwise splits one and may leave it empty).
_KEEP = "page-break-inside: avoid;"


class _Code(str):
    """A table value set as code: monospace, on one line (a checksum)."""


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


def _file_rows(analysis) -> list[tuple[str, str]]:
    source = analysis.spec.source
    path = Path(source.path) if source is not None else None
    name = analysis.source.get("file") or (path.name if path else None)
    if not name:
        return [("Data", "entered directly, not read from a file")]
    rows = [("Data file", Path(str(name)).name)]
    if source is not None and source.sha256:  # the checksum of the bytes the numbers came from
        rows.append((CHECKSUM_NAME, _Code(source.sha256)))
    elif path is not None and path.is_file():
        from engine.io import file_checksum

        rows.append((CHECKSUM_NAME, _Code(file_checksum(path))))
    else:
        rows.append((CHECKSUM_NAME, "not available: the file was not found when the report was written"))
    return rows


def _png_base64(image: QImage) -> str:
    data = QByteArray()
    buffer = QBuffer(data)
    buffer.open(QIODevice.OpenModeFlag.WriteOnly)
    image.save(buffer, "PNG")
    buffer.close()
    return base64.b64encode(bytes(data)).decode("ascii")


def report_html(analysis, *, procedure: str, findings_html: str, cautions: Sequence[str],
                images: Sequence[tuple[str, QImage]] = (), when: datetime | None = None,
                embed_images: bool = True, image_width: float = HTML_IMAGE_WIDTH) -> str:
    """The whole report as one HTML document.

    ``images`` are (caption, image) pairs. With ``embed_images`` each image is a ``data:`` URL
    (one self-contained file); without it the ``src`` is ``plot<i>.png`` for a resource loader.
    Each image is drawn at most ``image_width`` wide, its caption in a paragraph of its own
    (a line as tall as the picture would leave a gap under it).
    """
    when = when or datetime.now().astimezone()
    labels = analysis.groups.labels
    title = f"Comparison of {labels[0]} and {labels[1]}"
    parts = [f"<h1>{_escape(title)}</h1>",
             f"<p>Written on {_escape(when.strftime('%Y-%m-%d %H:%M %Z').strip())} by Twofold.</p>",
             "<h2>The data</h2>", _table(_file_rows(analysis), ("What", "Record"), short_names=True),
             "<h2>Choices made</h2>", _table(choice_rows(analysis, procedure=procedure),
                                            ("What", "Choice")),
             "<h2>Values set aside</h2>"]
    aside = set_aside_rows(analysis)
    parts.append(_table(aside, ("Where", "Why")) if aside else "<p>No values were set aside.</p>")
    parts += ["<h2>Findings</h2>", findings_html]
    for number, (caption, image) in enumerate(images):
        src = f"data:image/png;base64,{_png_base64(image)}" if embed_images else f"plot{number}.png"
        ratio = max(image.devicePixelRatio(), 1.0)
        width, height = image.width() / ratio, image.height() / ratio
        scale = image_width / width if width else 1.0
        parts.append(f"<p style='line-height: 100%; {_KEEP}'><img src='{src}' width='{round(width * scale)}' "
                     f"height='{round(height * scale)}' alt='{_escape(caption)}'></p>"
                     f"<p><i>{_escape(caption)}</i></p>")
    parts.append("<h2>Before relying on this</h2><ul>")
    parts += [f"<li>{_escape(c)}</li>" for c in cautions]
    parts.append("</ul>")
    body = "".join(parts)  # no text between blocks: a PDF page must not end in an empty one
    return (f'<!DOCTYPE html>\n<html><head><meta charset="utf-8"><title>{_escape(title)}</title>'
            "<style>body{font-family:sans-serif;max-width:48em;margin:1.5em auto;line-height:1.4}"
            "table{border-collapse:collapse}td,th{padding:4px 8px;vertical-align:top}</style>"
            f"</head><body>{body}</body></html>")


def _pdf_page_setup(writer: QPdfWriter) -> None:
    writer.setPageSize(QPageSize(QPageSize.PageSizeId.A4))
    writer.setPageMargins(QMarginsF(18, 18, 18, 18), QPageLayout.Unit.Millimeter)
    writer.setResolution(300)


def pdf_document(document_html: str, images: Sequence[tuple[str, QImage]],
                 writer: QPdfWriter) -> QTextDocument:
    """The document a PDF is printed from, laid out on the writer's own device (its fonts at
    their point size, its text area in device pixels), so that ``pageCount()`` is the number
    of pages printed."""
    document = QTextDocument()
    document.documentLayout().setPaintDevice(writer)
    for number, (_caption, image) in enumerate(images):
        document.addResource(QTextDocument.ResourceType.ImageResource, QUrl(f"plot{number}.png"), image)
    document.setHtml(document_html)
    area = writer.pageLayout().paintRectPixels(writer.resolution())
    document.setPageSize(QSizeF(area.width(), area.height()))
    return document


# Qt's text layout sizes an image in pixels of 96 per inch, whatever the device.
_IMAGE_DPI = 96


def pdf_text_width() -> float:
    """The width of a PDF report's text in the pixels an image's width is given in."""
    writer = QPdfWriter(QBuffer())
    _pdf_page_setup(writer)
    return writer.pageLayout().paintRect(QPageLayout.Unit.Inch).width() * _IMAGE_DPI


def _write_pdf(path: Path, document_html: str, images: Sequence[tuple[str, QImage]]) -> None:
    writer = QPdfWriter(str(path))
    _pdf_page_setup(writer)
    document = pdf_document(document_html, images, writer)
    writer.setTitle(document.metaInformation(QTextDocument.MetaInformation.DocumentTitle))
    writer.setCreator("Twofold")
    document.print_(writer)


def export_report(path: str | Path, analysis, *, procedure: str, findings_html: str,
                  cautions: Sequence[str], images: Sequence[tuple[str, QImage]] = (),
                  when: datetime | None = None) -> Path:
    """Write the report to ``path``: HTML or PDF by its suffix. Returns the path written.

    Raises :class:`engine.errors.FileProblem` for another suffix or when the file cannot be
    written (the message names the file).
    """
    path = Path(path)
    suffix = path.suffix.lower()
    if suffix not in REPORT_SUFFIXES:
        raise FileProblem(f"A report is written as .html or .pdf, not '{path.suffix or path.name}'.")
    embed = suffix == ".html"
    width = HTML_IMAGE_WIDTH if embed else pdf_text_width()
    document = report_html(analysis, procedure=procedure, findings_html=findings_html,
                           cautions=cautions, images=images, when=when, embed_images=embed,
                           image_width=width)
    try:
        if embed:
            path.write_text(document, encoding="utf-8")
        else:
            if not path.parent.is_dir():
                raise OSError("the folder does not exist")
            _write_pdf(path, document, images)
            if not path.is_file() or path.stat().st_size == 0:
                raise OSError("the PDF writer produced nothing")
    except OSError as error:
        reason = error.strerror or str(error)
        raise FileProblem(f"Could not write the report to {path}: {reason}.") from None
    return path


def save_start(settings: Any, data_path: Path | None, suffix: str) -> Path:
    """Where a save dialog opens: the folder of the last save if it is still there, else the data
    file's folder, else the home folder; the name is the data file's with ``suffix``."""
    remembered = settings.value(SAVE_FOLDER_KEY, "") or ""
    if remembered and Path(remembered).is_dir():
        folder = Path(remembered)
    elif data_path is not None:
        folder = data_path.parent
    else:
        folder = Path.home()
    name = data_path.with_suffix(suffix).name if data_path is not None else f"findings{suffix}"
    return folder / name


def remember_save_folder(settings: Any, written: Path) -> None:
    """Open the next save dialog in the folder ``written`` went to."""
    settings.setValue(SAVE_FOLDER_KEY, str(Path(written).resolve().parent))
    settings.sync()
