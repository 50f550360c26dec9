"""The program's entry point: ``twofold [FILE]``, ``python -m desktop [FILE]``.

``twofold FILE`` (a data file or a saved ``.twofold`` analysis) is also what a double-click on
such a file runs once the program is registered with the desktop (``twofold
--install-desktop-entry``); the file goes through the same :meth:`MainWindow.open_file` as the
Open dialog, a drop on the window or the recent list.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path
from typing import Any, Callable, Sequence

__all__ = ["main", "start", "build_parser", "FIRST_PAINT_WAIT_MS"]

# How long the window waits for the file of the command line before it first shows: a small
# file then appears with the window; a large one keeps loading with a progress bar.
FIRST_PAINT_WAIT_MS = 400


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="twofold", description="Compare two independent groups of measurements from a data file.")
    parser.add_argument("files", nargs="*", type=Path, metavar="FILE",
                        help="a .csv, .tsv, .txt, .xlsx, .xls or .ods file to open, or a saved analysis (.twofold)")
    registration = parser.add_mutually_exclusive_group()  # both at once would do only one
    registration.add_argument("--install-desktop-entry", action="store_true",
                              help="offer Twofold for .csv, .tsv, .txt, .xlsx, .xls and .ods files on the desktop "
                                   "(Open With), and say how to make it the default")
    registration.add_argument("--uninstall-desktop-entry", action="store_true",
                              help="undo --install-desktop-entry")
    return parser


def _import_data_stack_first() -> None:
    """Import numpy, pandas and ``engine.io`` before Qt.

    Once PySide6 is imported it checks every later import of a Python module by reading the
    module's source (for its ``__feature__`` switches); the hundreds of modules of pandas then
    add a fifth of a second to the start. Imported first, they are not checked.
    """
    import engine.io  # noqa: F401 - imports numpy and pandas


def _application() -> Any:
    from PySide6.QtCore import Qt
    from PySide6.QtGui import QGuiApplication
    from PySide6.QtWidgets import QApplication

    app = QApplication.instance()
    if app is None:
        QGuiApplication.setHighDpiScaleFactorRoundingPolicy(Qt.HighDpiScaleFactorRoundingPolicy.PassThrough)
        app = QApplication([sys.argv[0] if sys.argv else "twofold"])
    app.setApplicationName("Twofold")
    app.setOrganizationName("Twofold")
    app.setApplicationDisplayName("Twofold")
    app.setDesktopFileName("twofold")
    from .collector import collect_on_gui_thread

    collect_on_gui_thread(app)  # no cycle collection in worker threads (see desktop/collector.py)
    return app


def _keep_running(window: Any) -> Any:
    """Show an unexpected error of the window's own code in its message bar instead of a crash.

    Returns the hook it replaced, for :func:`_tear_down` to put back.
    """
    previous = sys.excepthook

    def hook(kind: type, error: BaseException, trace: Any) -> None:
        if issubclass(kind, KeyboardInterrupt):
            previous(kind, error, trace)
            return
        try:
            window.message_bar.show_message("window_crashed", reason=f"{kind.__name__}: {error}")
        except RuntimeError:  # the window is already gone
            previous(kind, error, trace)

    sys.excepthook = hook
    return previous


def _tear_down(window: Any, excepthook: Any) -> None:
    """End in a fixed order while the application still exists, all on the GUI thread.

    The workers stop first; then the window and every widget waiting for a deferred delete are
    deleted; then the reference cycles left over are collected. Left to the interpreter's exit,
    the window (kept alive by the error hook) and the cycles would go after the application,
    in whatever order the interpreter tears its modules down.
    """
    import gc

    from PySide6.QtCore import QCoreApplication, QEvent

    sys.excepthook = excepthook
    window.cleanup()
    window.deleteLater()
    QCoreApplication.sendPostedEvents(None, QEvent.Type.DeferredDelete)
    gc.collect()


def start(argv: Sequence[str] | None = None, **window_options: Any) -> Any:
    """Create the application and the window for command line ``argv``; open its file, if any.

    Returns the shown :class:`desktop.main_window.MainWindow`. ``window_options`` go to it
    (tests pass their own settings and sheet chooser).
    """
    args = build_parser().parse_args(argv)
    _import_data_stack_first()
    _application()
    from .main_window import MainWindow

    window = MainWindow(**window_options)
    if args.files and window.open_file(args.files[0]):
        window.wait_for_file(FIRST_PAINT_WAIT_MS)
    window.show()
    return window


def main(argv: Sequence[str] | None = None, *, on_start: Callable[[Any], object] | None = None) -> int:
    """Run Twofold; the exit code is 0 unless the desktop registration failed.

    ``on_start`` is called with the shown window before the event loop runs (the bundle's
    smoke test watches the first paint with it).
    """
    args = build_parser().parse_args(argv)
    if args.install_desktop_entry or args.uninstall_desktop_entry:
        from engine.text import visible

        from .desktop_entry import install, next_steps, uninstall

        try:
            where = install() if args.install_desktop_entry else uninstall()
        except OSError as problem:
            print(f"twofold: {visible(problem)}", file=sys.stderr)
            return 1
        if args.install_desktop_entry:
            print("\n".join(next_steps(where)))
        elif where is None:
            print("Twofold was not registered with the desktop for this user: there was nothing to remove.")
        else:
            print(f"Twofold is no longer registered with the desktop (removed from {visible(where)}).")
        return 0
    window = start(argv)
    excepthook = _keep_running(window)
    if getattr(sys, "frozen", False):  # the bundle made by packaging/twofold.spec
        from .first_start import bundle_started

        bundle_started(window)
    if on_start is not None:
        on_start(window)
    try:
        return _application().exec()
    finally:
        _tear_down(window, excepthook)

