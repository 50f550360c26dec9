"""Pictures of the main screens for the README: ``python -m desktop.screens [FILE] [--dark]``.

Opens FILE (default ``demo_files/adhesive_cure_times.csv``, which has cells the screening leaves
out) in the main window off screen, waits for the analysis, and saves in ``icons/screens/``:
``0-your-data.png`` (the data and the set-up), the whole window with each tab
(``1-which-procedure.png``, ``2-findings.png``) and each of those panels scrolled out in full. With ``--dark`` the pictures use
a dark palette (their names end in ``-dark``), which shows the plots following the theme.
"""

from __future__ import annotations

import argparse
import os
import sys
import time
from pathlib import Path
from typing import Any

from .panel_alone import DEFAULT_FILE

__all__ = ["SCREEN_DIR", "DEFAULT_FILE", "dark_palette", "shoot"]

ROOT = Path(__file__).resolve().parent.parent
SCREEN_DIR = ROOT / "icons" / "screens"
WINDOW_SIZE = (1440, 900)  # 90% of a 1600 x 1000 screen, as the window opens there


def dark_palette() -> Any:
    """A dark palette of our own (for checking that every colour follows the theme)."""
    from PySide6.QtGui import QColor, QPalette

    palette = QPalette()
    roles = {
        QPalette.ColorRole.Window: "#26292e", QPalette.ColorRole.WindowText: "#e4e6ea",
        QPalette.ColorRole.Base: "#1d1f23", QPalette.ColorRole.AlternateBase: "#2b2e33",
        QPalette.ColorRole.Text: "#e4e6ea", QPalette.ColorRole.Button: "#30343a",
        QPalette.ColorRole.ButtonText: "#e4e6ea", QPalette.ColorRole.Highlight: "#3d7ab8",
        QPalette.ColorRole.HighlightedText: "#ffffff", QPalette.ColorRole.ToolTipBase: "#30343a",
        QPalette.ColorRole.ToolTipText: "#e4e6ea", QPalette.ColorRole.PlaceholderText: "#8a8f98",
        QPalette.ColorRole.Mid: "#4a4f57", QPalette.ColorRole.Dark: "#15171a",
        QPalette.ColorRole.Light: "#3a3e45", QPalette.ColorRole.Midlight: "#33373d",
    }
    for role, colour in roles.items():
        palette.setColor(role, QColor(colour))
    for role in (QPalette.ColorRole.WindowText, QPalette.ColorRole.Text, QPalette.ColorRole.ButtonText):
        palette.setColor(QPalette.ColorGroup.Disabled, role, QColor("#7a7f88"))
    return palette


def _settle(app: Any, seconds: float, done=lambda: False) -> None:
    end = time.monotonic() + seconds
    while time.monotonic() < end and not done():
        app.processEvents()
        time.sleep(0.02)


def _save(widget: Any, name: str) -> Path:
    SCREEN_DIR.mkdir(parents=True, exist_ok=True)
    target = SCREEN_DIR / f"{name}.png"
    if not widget.grab().save(str(target), "PNG"):
        raise OSError(f"could not write {target}")
    return target


def shoot(path: Path, *, dark: bool = False) -> list[Path]:
    """Save the window's data and set-up, each of its tabs and each late panel in full as PNG files."""
    from PySide6.QtWidgets import QApplication

    from .main_window import MainWindow

    app = QApplication.instance() or QApplication([sys.argv[0]])
    if dark:
        app.setStyle("Fusion")
        app.setPalette(dark_palette())
    suffix = "-dark" if dark else ""
    written = []
    window = MainWindow()
    window.resize(*WINDOW_SIZE)
    window.show()
    window.open_file(path)
    _settle(app, 60, lambda: window.session.analysis is not None and window.findings_panel is not None)
    _settle(app, 0.5)
    written.append(_save(window.splitter.widget(0), f"0-your-data{suffix}"))
    for index in range(window.tabs.count()):
        window.tabs.setCurrentIndex(index)
        _settle(app, 0.3)
        name = window.tabs.tabText(index).replace("&", "").strip().lower().replace(" ", "-")
        written.append(_save(window, f"{index + 1}-{name}{suffix}"))
    for name in ("choice_panel", "findings_panel"):
        written.append(_save(getattr(window, name).scroll.widget(), f"{name.replace('_', '-')}-whole{suffix}"))
    window.cleanup()
    window.close()
    return written


def main(argv: list[str] | None = None) -> int:
    parser = argparse.ArgumentParser(prog="python -m desktop.screens", description=__doc__.splitlines()[0])
    parser.add_argument("file", nargs="?", type=Path, default=DEFAULT_FILE)
    parser.add_argument("--dark", action="store_true", help="use a dark palette")
    args = parser.parse_args(argv)
    os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    for target in shoot(args.file, dark=args.dark):
        print(target.relative_to(ROOT))
    return 0


if __name__ == "__main__":
    sys.exit(main())
