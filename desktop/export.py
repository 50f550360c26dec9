"""A finished comparison written out as a self-contained HTML page or a PDF.

The page itself is built by ``engine.report.document`` (the file's record, the choices, the
values set aside, the findings, the cautions); this module adds the plots as pictures and writes
the page: the HTML carries its pictures inside it (``data:`` addresses), so the one file is the
whole report, and the PDF is drawn by Qt's own writer from the same HTML.
"""

from __future__ import annotations

import base64
from datetime import datetime
from pathlib import Path
from typing import Any, Sequence

from PySide6.QtCore import QBuffer, QByteArray, QIODevice, QMarginsF, QSizeF, QUrl
from PySide6.QtGui import QImage, QPageLayout, QPageSize, QPdfWriter, QTextDocument

from engine.errors import FileProblem
from engine.report import document as report_document
from engine.report.document import CHECKSUM_NAME, HTML_IMAGE_WIDTH

__all__ = ["report_html", "export_report", "pdf_document", "pdf_text_width", "REPORT_SUFFIXES",
           "CHECKSUM_NAME", "save_start", "remember_save_folder", "SAVE_FOLDER_KEY"]

REPORT_SUFFIXES = (".html", ".pdf")
SAVE_FOLDER_KEY = "export/folder"  # in the user's settings: the folder of the last report or plot saved


def _png_base64(image: QImage) -> str:
    data = QByteArray()
    buffer = QBuffer(data)
    buffer.open(QIODevice.OpenModeFlag.WriteOnly)
    image.save(buffer, "PNG")
    buffer.close()
    return base64.b64encode(bytes(data)).decode("ascii")


def report_html(analysis, *, procedure: str, images: Sequence[tuple[str, QImage]] = (),
                when: datetime | None = None, embed_images: bool = True,
                image_width: float = HTML_IMAGE_WIDTH) -> str:
    """The whole report as one HTML document (:func:`engine.report.document.html`) with
    ``images``, (caption, image) pairs, as its pictures.

    With ``embed_images`` each image is a ``data:`` URL (one self-contained file); without it
    the ``src`` is ``plot<i>.png`` for a resource loader. Each image is drawn at most
    ``image_width`` wide.
    """
    pictures = []
    for number, (caption, image) in enumerate(images):
        src = f"data:image/png;base64,{_png_base64(image)}" if embed_images else f"plot{number}.png"
        ratio = max(image.devicePixelRatio(), 1.0)
        pictures.append(report_document.Picture(caption, src, image.width() / ratio, image.height() / ratio))
    return report_document.html(analysis, procedure, pictures=pictures, when=when, image_width=image_width)


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


def export_report(path: str | Path, analysis, *, procedure: str,
                  images: Sequence[tuple[str, QImage]] = (), when: datetime | None = None) -> Path:
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
    page = report_html(analysis, procedure=procedure, images=images, when=when, embed_images=embed,
                       image_width=width)
    try:
        if embed:
            path.write_text(page, encoding="utf-8")
        else:
            if not path.parent.is_dir():
                raise OSError("the folder does not exist")
            _write_pdf(path, page, images)
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
