"""Cycle collection runs on the GUI thread only (a widget freed in a worker thread can deadlock Qt)."""

from __future__ import annotations

import gc

from PySide6.QtCore import QObject

from desktop.collector import GuiThreadCollector, collect_due, collect_on_gui_thread


class _Cycle:
    def __init__(self) -> None:
        self.me = self


def test_the_collector_turns_automatic_collection_off_and_collects_when_due(qapp):
    owner = QObject()
    was = gc.isenabled()
    gc.enable()
    try:
        collector = collect_on_gui_thread(owner)
        assert isinstance(collector, GuiThreadCollector) and not gc.isenabled()
        assert collect_on_gui_thread(owner) is collector  # installed once
        gc.collect()
        for _ in range(gc.get_threshold()[0] + 10):
            _Cycle()
        assert gc.get_count()[0] > gc.get_threshold()[0]  # due, and nothing collected it
        collect_due()
        assert gc.get_count()[0] < gc.get_threshold()[0]
    finally:
        owner.deleteLater()
        if was:
            gc.enable()
        else:
            gc.disable()


def test_the_program_installs_it(make_window):
    from PySide6.QtWidgets import QApplication

    make_window([])
    assert QApplication.instance().findChild(GuiThreadCollector) is not None
