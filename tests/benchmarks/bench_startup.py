"""Startup and big-file figures of the window, each beside a reference measured in the same run.

1. From launching ``twofold FILE`` to the first paint of the filled grid, against a minimal
   script (PySide6 + pandas: read the same file, show it in a QTableView, paint). Both run as
   fresh processes, alternately, several times; the medians are compared (target: at most 1.3x).
2. Opening a 1,000,000-row CSV in a running window until the filled grid is painted, against
   the engine's own ``read_table`` + ``propose_layout`` of the same file (target: at most 1.5x);
   then scrolling to the last row and painting it.

Usage: ``python tests/benchmarks/bench_startup.py [FILE] [--runs 7] [--skip-big]``
(``QT_QPA_PLATFORM=offscreen`` unless a display is set).
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]

# Shared by both scripts: print the time once the grid was painted with rows in it, then quit.
_PAINT_WATCH = r'''
from PySide6.QtCore import QEvent, QObject, QTimer

class _FirstFilledPaint(QObject):
    def __init__(self, view, app):
        super().__init__()
        self.view, self.app, self.done = view, app, False
    def eventFilter(self, watched, event):
        if not self.done and event.type() == QEvent.Type.Paint and self.view.model().rowCount() > 0:
            self.done = True
            QTimer.singleShot(0, self.report)  # runs once this paint has finished
        return False
    def report(self):
        print(f"PAINTED {time.time():.6f}", flush=True)
        import sys
        print("HEAVY " + ",".join(m for m in ("scipy.stats", "pyqtgraph") if m in sys.modules), flush=True)
        self.app.quit()
'''

REFERENCE = r'''
import sys, time
import pandas as pd
from PySide6.QtCore import QAbstractTableModel, QModelIndex, Qt
from PySide6.QtWidgets import QApplication, QTableView
''' + _PAINT_WATCH + r'''
app = QApplication([])
frame = pd.read_csv(sys.argv[1])

class Model(QAbstractTableModel):
    def rowCount(self, parent=QModelIndex()):
        return len(frame)
    def columnCount(self, parent=QModelIndex()):
        return frame.shape[1]
    def data(self, index, role=Qt.ItemDataRole.DisplayRole):
        if role == Qt.ItemDataRole.DisplayRole:
            return str(frame.iat[index.row(), index.column()])
        return None
    def headerData(self, section, orientation, role=Qt.ItemDataRole.DisplayRole):
        if role == Qt.ItemDataRole.DisplayRole and orientation == Qt.Orientation.Horizontal:
            return str(frame.columns[section])
        return None

view = QTableView()
model = Model()
view.setModel(model)
watch = _FirstFilledPaint(view, app)
view.viewport().installEventFilter(watch)
view.resize(1400, 900)
view.show()
app.exec()
'''

OURS = r'''
import sys, time
sys.path.insert(0, sys.argv[2])
from desktop.app import _application, start
window = start([sys.argv[1]])  # as `twofold FILE`; nothing imports Qt before it does
''' + _PAINT_WATCH + r'''
grid = window.data_panel.grid
watch = _FirstFilledPaint(grid, _application())
grid.viewport().installEventFilter(watch)
_application().exec()
window.cleanup()
'''


def _environment() -> dict[str, str]:
    env = dict(os.environ)
    if not env.get("DISPLAY") and not env.get("WAYLAND_DISPLAY"):
        env["QT_QPA_PLATFORM"] = "offscreen"
    return env


_HEAVY_AT_PAINT: set[str] = set()


def _launch(script: Path, path: Path, env: dict[str, str]) -> float:
    started = time.time()
    done = subprocess.run([sys.executable, str(script), str(path), str(ROOT)], capture_output=True,
                          text=True, timeout=120, env=env, cwd=tempfile.gettempdir())
    if script.stem == "ours":
        for line in done.stdout.splitlines():
            if line.startswith("HEAVY ") and line[6:].strip():
                _HEAVY_AT_PAINT.update(line[6:].strip().split(","))
    for line in done.stdout.splitlines():
        if line.startswith("PAINTED "):
            return float(line.split()[1]) - started
    raise RuntimeError(f"{script.name} did not paint:\n{done.stdout}\n{done.stderr}")


def startup(path: Path, runs: int) -> tuple[float, float]:
    env = _environment()
    with tempfile.TemporaryDirectory() as folder:
        reference, ours = Path(folder) / "reference.py", Path(folder) / "ours.py"
        reference.write_text(REFERENCE)
        ours.write_text(OURS)
        _launch(reference, path, env)  # warm the file-system cache once for both
        _launch(ours, path, env)
        times: dict[str, list[float]] = {"reference": [], "ours": []}
        for _ in range(runs):
            times["reference"].append(_launch(reference, path, env))
            times["ours"].append(_launch(ours, path, env))
    ref, own = statistics.median(times["reference"]), statistics.median(times["ours"])
    print(f"startup to the painted, filled grid ({path.name}, median of {runs} runs each):")
    print(f"  reference script  {ref:.3f} s   (all: {', '.join(f'{t:.3f}' for t in times['reference'])})")
    print(f"  twofold           {own:.3f} s   (all: {', '.join(f'{t:.3f}' for t in times['ours'])})")
    print(f"  ratio             {own / ref:.2f}x  (target at most 1.30x)")
    print(f"  loaded by twofold's first paint: {', '.join(sorted(_HEAVY_AT_PAINT)) or 'neither scipy.stats nor pyqtgraph'}")
    return ref, own


OPENS = 5  # the 1,000,000-row file is opened this many times; the medians are compared


def big_file(rows: int = 1_000_000) -> None:
    os.environ.update({k: v for k, v in _environment().items() if k == "QT_QPA_PLATFORM"})
    sys.path.insert(0, str(ROOT))
    import numpy as np
    from PySide6.QtCore import QEvent, QEventLoop, QObject, QSettings, QTimer
    from PySide6.QtWidgets import QApplication

    from desktop.app import start
    from engine import io

    rng = np.random.default_rng(1)
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "million_bolts.csv"
        labels = np.where(rng.random(rows) < 0.5, "supplier_a", "supplier_b")
        values = np.round(rng.normal(800.0, 25.0, rows), 2)
        with path.open("w") as out:
            out.write("supplier,strength_mpa\n")
            out.writelines(f"{a},{b}\n" for a, b in zip(labels.tolist(), values.tolist()))
        io.propose_layout(io.read_table(path))  # warm caches and imports once
        loads = []
        for _ in range(OPENS):
            started = time.perf_counter()
            io.propose_layout(io.read_table(path))
            loads.append(time.perf_counter() - started)
        engine_time = statistics.median(loads)

        window = start([], settings=QSettings(str(Path(folder) / "s.ini"), QSettings.Format.IniFormat))
        app = QApplication.instance()
        window.session.choose(resamples=1_000)
        grid = window.data_panel.grid
        painted: list[float] = []
        loop = QEventLoop()

        class Watch(QObject):
            def eventFilter(self, watched, event):  # noqa: N802 - Qt's name
                if event.type() == QEvent.Type.Paint and grid.model().rowCount() > 0 and not painted:
                    QTimer.singleShot(0, lambda: (painted.append(time.perf_counter()), loop.quit()))
                return False

        watch = Watch()
        grid.viewport().installEventFilter(watch)
        window.load_late_panels()  # as in a window that has been open a while (Open dialog, drop)

        def settle() -> None:
            while window.import_worker.busy or window.groups_worker.busy or window.analysis_worker.busy:
                app.processEvents()
                time.sleep(0.01)
            for _ in range(50):
                app.processEvents()
                time.sleep(0.01)

        opens = []
        for _ in range(OPENS):
            settle()
            painted.clear()
            window.session.store("table", None)
            settle()
            started = time.perf_counter()
            window.open_file(path)
            loop.exec()
            opens.append(painted[0] - started)
            window.cancel()
        shown = statistics.median(opens)
        started = time.perf_counter()
        grid.scrollToBottom()
        grid.viewport().repaint()
        scrolled = time.perf_counter() - started
        last = grid.rowAt(grid.viewport().height() - 2)
        window.cleanup()
    print(f"opening a {rows:,}-row CSV:")
    print(f"  engine read_table + propose_layout  {engine_time:.3f} s")
    print(f"  window, open to painted grid        {shown:.3f} s  (median of {OPENS}: "
          + ", ".join(f"{t:.3f}" for t in opens) + ")")
    print(f"  ratio                               {shown / engine_time:.2f}x  (target at most 1.50x)")
    print(f"  scroll to the end and paint         {scrolled * 1000:.1f} ms (last row shown: {last + 1:,})")


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("file", nargs="?", type=Path, default=ROOT / "demo_files" / "bolt_strength.csv")
    parser.add_argument("--runs", type=int, default=7)
    parser.add_argument("--skip-big", action="store_true")
    args = parser.parse_args()
    startup(args.file.resolve(), args.runs)
    if not args.skip_big:
        big_file()
    return 0


if __name__ == "__main__":
    sys.exit(main())
