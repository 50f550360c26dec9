"""Python's cycle collector, run on the GUI thread only.

Left to itself the collector runs in whichever thread happens to allocate, a loading or analysis
worker included. If it then frees a discarded widget, Qt tears the widget down off the GUI thread
and can deadlock against it (the worker holds a Qt lock and waits for the interpreter; the GUI
thread holds the interpreter and waits for the lock). So automatic collection is switched off and
a timer on the GUI thread collects each generation once it is due, as the automatic collector
would have. The idea is pyqtgraph's ``util.garbage_collector.GarbageCollector`` (credited there to
Erik Janssens, 2014); it is written out here because importing pyqtgraph at start-up would delay
the first paint.
"""

from __future__ import annotations

import gc

from PySide6.QtCore import QObject, QTimer

__all__ = ["GuiThreadCollector", "collect_on_gui_thread", "collect_due", "INTERVAL_MS"]

INTERVAL_MS = 1000


class GuiThreadCollector(QObject):
    """Turns automatic collection off and collects on a GUI-thread timer instead."""

    def __init__(self, parent: QObject, interval_ms: int = INTERVAL_MS) -> None:
        super().__init__(parent)
        gc.disable()
        self._timer = QTimer(self)
        self._timer.timeout.connect(collect_due)
        self._timer.start(interval_ms)


def collect_due() -> None:
    """Collect each generation whose count has passed its threshold, youngest first, as the
    automatic collector would have."""
    for generation, (count, threshold) in enumerate(zip(gc.get_count(), gc.get_threshold())):
        if count <= threshold:
            break
        gc.collect(generation)


def collect_on_gui_thread(app: QObject) -> GuiThreadCollector:
    """Install the collector on ``app`` once (call it on the GUI thread); returns it."""
    existing = app.findChild(GuiThreadCollector)
    return existing if existing is not None else GuiThreadCollector(app)
