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

__all__ = ["SCREEN_DIR", "DEFAULT_FILE", "prepared_session", "dark_palette", "shoot", "show_alone"]

ROOT = Path(__file__).resolve().parent.parent
SCREEN_DIR = ROOT / "icons" / "screens"
DEFAULT_FILE = ROOT / "demo_files" / "adhesive_cure_times.csv"
WINDOW_SIZE = (1440, 900)  # 90% of a 1600 x 1000 screen, as the window opens there


def prepared_session(path: Path) -> Any:
    """A session over ``path`` with the engine's proposed layout and the finished analysis.

    Runs on the calling thread (for pictures and quick looks, not for the window).
    """
    from engine import pipeline
    from engine.session import Session
    from engine.spec import AnalysisSpec

    prepared = pipeline.from_file(path, AnalysisSpec())
    session = Session(prepared.spec)
    session.store("table", prepared.table)
    session.store("intake", prepared.intake)
    session.store("analysis", prepared.analysis)
    return session


def show_alone(panel_class: type, argv: list[str]) -> int:  # pragma: no cover - a look by hand
    """Show one panel over the file ``argv[1]`` (default: the demo file) with its analysis."""
    from PySide6.QtWidgets import QApplication

    app = QApplication.instance() or QApplication(argv[:1])
    session = prepared_session(Path(argv[1]) if len(argv) > 1 else DEFAULT_FILE)
    panel = panel_class(session)
    panel.resize(1000, 900)
    panel.show()
    return app.exec()


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
    """Save the window's tabs (or, without the main window, the two panels) as PNG files."""
    from PySide6.QtWidgets import QApplication, QTabWidget

    app = QApplication.instance() or QApplication([sys.argv[0]])
    if dark:
        app.setStyle("Fusion")
        app.setPalette(dark_palette())
    suffix = "-dark" if dark else ""
    written = []
    try:
        from .main_window import MainWindow
    except ImportError:
        MainWindow = None
    if MainWindow is not None:
        window = MainWindow()
        window.resize(*WINDOW_SIZE)
        window.show()
        window.open_file(path)
        _settle(app, 60, lambda: window.session.analysis is not None and window.findings_panel is not None)
        _settle(app, 0.5)
        written.append(_save(window.splitter.widget(0), f"0-your-data{suffix}"))
        tabs = window.findChild(QTabWidget)
        if tabs is None:
            written.append(_save(window, f"window{suffix}"))
        else:
            for index in range(tabs.count()):
                tabs.setCurrentIndex(index)
                _settle(app, 0.3)
                name = tabs.tabText(index).replace("&", "").strip().lower().replace(" ", "-")
                written.append(_save(window, f"{index + 1}-{name}{suffix}"))
        for name in ("choice_panel", "findings_panel"):
            panel = getattr(window, name, None)
            if panel is not None and hasattr(panel, "scroll"):
                written.append(_save(panel.scroll.widget(), f"{name.replace('_', '-')}-whole{suffix}"))
        window.cleanup()
        window.close()
        return written
    from .choice_panel import ChoicePanel
    from .findings_panel import FindingsPanel

    session = prepared_session(path)
    for number, panel_class in enumerate((ChoicePanel, FindingsPanel), start=3):
        panel = panel_class(session)
        panel.resize(*WINDOW_SIZE)
        panel.show()
        _settle(app, 0.3)
        written.append(_save(panel, f"{number}-{panel_class.__name__.lower()}{suffix}"))
        panel.cleanup()
        panel.close()
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
