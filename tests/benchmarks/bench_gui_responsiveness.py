"""How responsive the window stays while an analysis with 100,000 resamples runs in its worker.

A QTimer on the GUI thread fires every 10 ms and records the gaps between its ticks while the
analysis runs; the largest gap is how long the window could not answer the user (target: below
100 ms). The analysis time is printed beside it, and the same analysis run directly, without
the window, as the reference for what the worker costs.

Usage: ``python tests/benchmarks/bench_gui_responsiveness.py [--resamples 100000] [--n 200]``
"""

from __future__ import annotations

import argparse
import os
import statistics
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
TICK_MS = 10


def _stage_at(stages: list[tuple[float, str]], at: float) -> str:
    before = [what for when, what in stages if when <= at]
    return before[-1] if before else "(start)"


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--resamples", type=int, default=100_000)
    parser.add_argument("--n", type=int, default=200, help="values per group")
    args = parser.parse_args()
    if not os.environ.get("DISPLAY"):
        os.environ["QT_QPA_PLATFORM"] = "offscreen"
    sys.path.insert(0, str(ROOT))
    import engine.io  # noqa: F401 - before Qt, as the program does
    import numpy as np
    from PySide6.QtCore import QElapsedTimer, QEventLoop, QSettings, Qt, QTimer

    from desktop.app import start
    from engine.analysis import analyze
    from engine.spec import AnalysisSpec

    ticks: list[tuple[float, float]] = []  # (time, gap before it) in ms
    stages: list[tuple[float, str]] = []   # (time, what the analysis reported) in ms
    clock = QElapsedTimer()
    clock.start()
    last = [clock.nsecsElapsed()]
    rng = np.random.default_rng(3)
    with tempfile.TemporaryDirectory() as folder:
        path = Path(folder) / "adhesive_batches.csv"
        with path.open("w") as out:
            out.write("batch,peel_n\n")
            for batch, centre in (("old", 20.0), ("new", 21.0)):
                out.writelines(f"{batch},{v:.3f}\n" for v in rng.gamma(4.0, centre / 4.0, args.n))
        window = start([], settings=QSettings(str(Path(folder) / "s.ini"), QSettings.Format.IniFormat))
        window.session.choose(resamples=args.resamples)
        window.load_late_panels()
        loop = QEventLoop()
        QTimer.singleShot(3000, loop.quit)  # let the late panels and icons arrive first
        loop.exec()
        window.session.choose(resamples=1_000)
        window.open_file(path)  # a first, short run loads the statistics modules
        while window.session.analysis is None:
            loop.processEvents()
        intake = window.session.intake
        QTimer.singleShot(1000, loop.quit)  # let the panels finish showing that first run
        loop.exec()
        finished_at: list[float] = []
        window.analysis_worker.finished.connect(lambda _: finished_at.append(clock.nsecsElapsed() / 1e6),
                                                type=Qt.ConnectionType.DirectConnection)


        def tick() -> None:
            now = clock.nsecsElapsed()
            ticks.append((now / 1e6, (now - last[0]) / 1e6))
            last[0] = now

        probe = QTimer()
        probe.setInterval(TICK_MS)
        probe.timeout.connect(tick)
        window.analysis_worker.progress.connect(lambda f, what: stages.append((clock.nsecsElapsed() / 1e6, what)))
        window.analysis_worker.finished.connect(loop.quit)
        window.analysis_worker.failed.connect(loop.quit)
        probe.start()
        last[0] = clock.nsecsElapsed()
        started = time.perf_counter()
        window.session.choose(resamples=args.resamples)  # the measured run, from the user's change
        loop.exec()
        in_window = time.perf_counter() - started
        window.analysis_worker.finished.disconnect(loop.quit)
        QTimer.singleShot(600, loop.quit)  # keep probing while the panels show the result
        loop.exec()
        probe.stop()
        window.cleanup()

    started = time.perf_counter()
    analyze(intake.groups, AnalysisSpec(resamples=args.resamples, seed=1), screening=intake.screening)
    direct = time.perf_counter() - started
    end = finished_at[-1] if finished_at else float("inf")
    during = [gap for at, gap in ticks if at <= end]
    after = [gap for at, gap in ticks if at > end]
    print(f"analysis of 2 x {args.n} values with {args.resamples:,} resamples:")
    print(f"  run directly (no window)            {direct:.2f} s")
    print(f"  run in the window's worker          {in_window:.2f} s")
    print(f"  GUI probe every {TICK_MS} ms while it ran: {len(during)} ticks, median gap "
          f"{statistics.median(during):.1f} ms, largest gap {max(during):.1f} ms  (target below 100 ms)")
    for at, gap in ticks:
        if gap > 60 and at <= end:
            print(f"    a gap of {gap:.0f} ms ending {at - ticks[0][0]:.0f} ms into the run, during: "
                  f"{_stage_at(stages, at)}")
    if after:
        print(f"  largest gap while the panels show the finished analysis: {max(after):.1f} ms")
    return 0


if __name__ == "__main__":
    sys.exit(main())
