"""The one entry point of the bundle built by ``packaging/twofold.spec``.

The bundle's ``Twofold`` (the window, what a double-click starts) runs this script; so does
``twofold-cli``, the headless command (``python -m engine`` of a source install): on Linux a
link to ``Twofold``, on Windows and macOS a console executable of its own. Which one runs is
told by the name it was started under. Both also answer:

- ``--workbook-child PATH LIMIT`` (first argument): run the workbook reader's child process
  (``engine/io/_workbook_child.py``, shipped beside the modules as a plain file). In a bundle
  ``sys.executable`` is this program, not a Python, so :mod:`engine.io.sheets` starts it this
  way; nothing of Twofold is imported before the child's own script runs.
- ``--quit-after-paint SECONDS`` (first arguments, window only): once the grid has been painted
  with rows in it, print ``PAINTED <seconds since the epoch>``, keep the window up for SECONDS,
  then quit through the Quit action; a question the window asks meanwhile (which sheet of a
  workbook) is answered with the choice it offers first, and printed as ``ANSWERED <title>``; ``NOT PAINTED`` and exit code 3 if no filled grid was
  painted within a minute. The bundle's smoke test and ``tests/benchmarks/bench_bundle.py``
  use it.

The script runs from a source checkout too (``python packaging/launch.py ...``), so both
modes are tested without a build.
"""

from __future__ import annotations

import sys
from pathlib import Path

WORKBOOK_CHILD = "--workbook-child"  # the same flag as engine.io.sheets.FROZEN_CHILD_FLAG
QUIT_AFTER_PAINT = "--quit-after-paint"
CLI_NAME = "twofold-cli"
_PAINT_TIMEOUT_MS = 60_000


def _resources() -> Path:
    """The folder that holds the ``engine`` and ``desktop`` packages (the bundle's or the checkout's)."""
    frozen = getattr(sys, "_MEIPASS", None)
    return Path(frozen) if frozen else Path(__file__).resolve().parent.parent


def _qt_plugin_path() -> None:
    """Where Qt finds its plugins in the bundle (the step of PyInstaller's PySide6 start-up hook
    that the spec leaves out, so that the commands without a window do not load Qt)."""
    if getattr(sys, "frozen", False):
        import os

        qt = _resources() / "PySide6"
        os.environ["QT_PLUGIN_PATH"] = str(qt / "plugins" if sys.platform == "win32" else qt / "Qt" / "plugins")


def run_workbook_child(arguments: list[str]) -> int:
    import runpy

    script = _resources() / "engine" / "io" / "_workbook_child.py"
    sys.argv = [str(script), *arguments]
    runpy.run_path(str(script), run_name="__main__")
    return 0


def _watch_paint(seconds: float, state: dict):
    """A start hook for :func:`desktop.app.main` that reports the first filled paint and quits;
    ``state["painted"]`` says whether it came."""

    def hook(window) -> None:
        import time

        from PySide6.QtCore import QEvent, QObject, QTimer

        grid = window.data_panel.grid
        state["painted"] = False

        class FirstFilledPaint(QObject):
            def eventFilter(self, watched, event):  # noqa: N802 - Qt's name
                if not state["painted"] and event.type() == QEvent.Type.Paint and grid.model().rowCount() > 0:
                    state["painted"] = True
                    QTimer.singleShot(0, reported)  # once this paint has finished
                return False

        def reported() -> None:
            print(f"PAINTED {time.time():.6f}", flush=True)
            QTimer.singleShot(int(seconds * 1000), window.quit_action.trigger)

        def give_up() -> None:
            if not state["painted"]:
                print(f"NOT PAINTED (the window says: {window.message_bar.text or 'nothing'})", flush=True)
                window.quit_action.trigger()

        def answer_questions() -> None:
            from PySide6.QtWidgets import QApplication, QDialog

            question = QApplication.activeModalWidget()
            if isinstance(question, QDialog):
                print(f"ANSWERED {question.windowTitle()}", flush=True)
                question.accept()

        watch = FirstFilledPaint(window)
        grid.viewport().installEventFilter(watch)
        questions = QTimer(window)
        questions.timeout.connect(answer_questions)
        questions.start(100)
        QTimer.singleShot(_PAINT_TIMEOUT_MS, give_up)

    return hook


def main(argv: list[str] | None = None) -> int:
    arguments = list(sys.argv[1:] if argv is None else argv)
    if arguments[:1] == [WORKBOOK_CHILD]:
        return run_workbook_child(arguments[1:])
    frozen = getattr(sys, "frozen", False)
    if not frozen and sys.path[0] != str(_resources()):
        sys.path.insert(0, str(_resources()))  # run from a checkout: its packages come first
    if Path(sys.argv[0]).stem.lower() == CLI_NAME:  # as started: a link's own name on Linux
        from engine.cli import main as headless

        return headless(arguments)
    _qt_plugin_path()
    from desktop import app

    if arguments[:1] == [QUIT_AFTER_PAINT]:
        state: dict = {}
        code = app.main(arguments[2:], on_start=_watch_paint(float(arguments[1]), state))
        return code if state.get("painted") else 3
    return app.main(arguments)


if __name__ == "__main__":
    sys.exit(main())
