"""The program's icons, drawn as SVG files that ship inside the package.

Qt-free, so that the desktop registration can copy the application icon without loading Qt;
:mod:`desktop.icons` turns the files into ``QIcon``s.
"""

from __future__ import annotations

from importlib.resources import files
from importlib.resources.abc import Traversable

__all__ = ["NAMES", "svg_file"]

NAMES = ("app", "open", "copy", "export", "cancel", "save")


def svg_file(name: str) -> Traversable:
    """The SVG file of icon ``name`` where the package is installed; ``KeyError`` for a name the
    program does not have."""
    if name not in NAMES:
        raise KeyError(f"no icon named '{name}'")
    return files(__name__) / f"{name}.svg"
