"""The program's icons as ``QIcon``s, from the SVG files in :mod:`desktop.artwork`.

Action icons draw their lines in ``currentColor``; :func:`icon` paints that colour from the
application palette's button text, so the icons stay readable in a light or a dark theme. The
application icon carries its own colours.
"""

from __future__ import annotations

from PySide6.QtCore import QByteArray, QRectF, Qt
from PySide6.QtGui import QGuiApplication, QIcon, QPainter, QPalette, QPixmap
from PySide6.QtSvg import QSvgRenderer

from .artwork import NAMES, svg_file

__all__ = ["NAMES", "icon"]

_SIZES = (16, 20, 24, 32, 48, 64, 128)


def _ink(mode: QPalette.ColorGroup) -> str:
    palette = QGuiApplication.palette()
    return palette.color(mode, QPalette.ColorRole.ButtonText).name()


def _painted(svg: str, colour: str, size: int, ratio: float) -> QPixmap:
    renderer = QSvgRenderer(QByteArray(svg.replace("currentColor", colour).encode()))
    pixmap = QPixmap(round(size * ratio), round(size * ratio))
    pixmap.fill(Qt.GlobalColor.transparent)
    painter = QPainter(pixmap)
    renderer.render(painter, QRectF(0, 0, pixmap.width(), pixmap.height()))
    painter.end()
    pixmap.setDevicePixelRatio(ratio)
    return pixmap


def icon(name: str) -> QIcon:
    """The icon ``name`` ("app", "open", "copy", "export", "cancel") as a ``QIcon``.

    An SVG without ``currentColor`` is handed to Qt's SVG icon engine as it is (sharp at any
    size; the package is installed as files, so the SVG has a path). The others are painted in the palette's button-text colour (and its disabled shade)
    at the usual sizes and at the screen's device pixel ratio.
    """
    path = svg_file(name)
    svg = path.read_text(encoding="utf-8")
    if "currentColor" not in svg:
        return QIcon(str(path))
    screen = QGuiApplication.primaryScreen()
    ratio = max(1.0, screen.devicePixelRatio() if screen is not None else 1.0)
    result = QIcon()
    active = _ink(QPalette.ColorGroup.Active)
    disabled = _ink(QPalette.ColorGroup.Disabled)
    for size in _SIZES:
        result.addPixmap(_painted(svg, active, size, ratio), QIcon.Mode.Normal)
        result.addPixmap(_painted(svg, disabled, size, ratio), QIcon.Mode.Disabled)
    return result
