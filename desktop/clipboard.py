"""Putting findings and plots on the system clipboard, ready to paste into a document.

The findings go on as two formats at once: HTML (a real ``<table>``, which a word processor
pastes as a table) and plain text (for e-mail and plain editors). The text itself comes from
``engine.report.render``; this module only packs it.
"""

from __future__ import annotations

from PySide6.QtCore import QMimeData
from PySide6.QtGui import QGuiApplication, QImage
from PySide6.QtWidgets import QTextEdit

__all__ = ["html_document", "findings_mime", "copy_findings_text", "copy_image"]


def html_document(fragment: str, *, title: str = "") -> str:
    """A small standalone HTML document around ``fragment`` (what word processors expect)."""
    head = f"<title>{title}</title>" if title else ""
    return (f'<!DOCTYPE html><html><head><meta charset="utf-8">{head}</head>'
            f"<body>{fragment}</body></html>")


def _qt_made_mime() -> QMimeData:
    """An empty ``QMimeData`` that Qt itself created (and the clipboard may own outright).

    A ``QMimeData`` made from Python and handed to the clipboard is freed twice when the program
    ends (PySide6 6.12), which ends it with a crash; one made by Qt is not.
    """
    data = QTextEdit().createMimeDataFromSelection()
    data.clear()
    return data


def findings_mime(html: str, plain: str) -> QMimeData:
    """Clipboard data carrying ``html`` as text/html and ``plain`` as text/plain.

    Hand the result to the clipboard (which then owns it); it is not freed otherwise.
    """
    data = _qt_made_mime()
    data.setHtml(html_document(html))
    data.setText(plain)
    return data


def copy_findings_text(html: str, plain: str) -> None:
    """Put the findings on the clipboard in both formats (the clipboard takes ownership)."""
    QGuiApplication.clipboard().setMimeData(findings_mime(html, plain))


def copy_image(image: QImage) -> None:
    """Put an image (a plot) on the clipboard."""
    QGuiApplication.clipboard().setImage(image)
