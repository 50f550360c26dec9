"""How responsive the Next study tab stays while it resamples pilot values in its worker.

The pilot is two groups of 30 values (a skewed and a bell-shaped one, seeded); the plan is the
power of 2 x 50 units, 10,000 simulated studies, with Welch's t-test and with Mann-Whitney, plus
the power curve the tab draws beside it. A QTimer on the GUI thread fires every 10 ms and records
the gaps between its ticks; the largest gap is how long the tab could not answer the user
(target: below 100 ms). The time to the answer is printed beside the same plan worked out
directly (``plan_study`` and ``power_curve`` without the window) as the reference.

Usage: ``python tests/benchmarks/bench_plan_panel.py [--simulations 10000]``
"""

from __future__ import annotations

import argparse
import os
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
TICK_MS = 10


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--simulations", type=int, default=10_000)
    parser.add_argument("--warm", action="store_true", help="run a small plan of each kind first")
    args = parser.parse_args()
    if not os.environ.get("DISPLAY"):
        os.environ["QT_QPA_PLATFORM"] = "offscreen"
    sys.path.insert(0, str(ROOT))
    import numpy as np
    from PySide6.QtCore import QElapsedTimer, QTimer
    from PySide6.QtWidgets import QApplication

    from desktop import plan_panel
    from engine.planning import plan_study
    from engine.analysis import analyze
    from engine.results import Groups
    from engine.spec import AnalysisSpec
    from engine.session import Session

    app = QApplication.instance() or QApplication([])
    rng = np.random.default_rng(2026)

    groups = Groups(("treated", "control"), rng.gamma(2.0, 3.0, 30), rng.normal(6.0, 4.0, 30))
    session = Session()
    session.store("analysis", analyze(groups, AnalysisSpec(seed=1, resamples=200)))
    panel = plan_panel.PlanPanel(session)
    if args.warm:  # the modules the simulation imports on first use, loaded before the timing
        from engine.planning import Pilot, Plan

        for procedure in ("welch", "mann_whitney"):
            plan_study(Plan("power", difference=1.0, n1=5, procedure=procedure, simulations=100, seed=1,
                            pilot=Pilot.of_groups(session.analysis.groups)))
    panel.show()
    for procedure in ("welch", "mann_whitney"):
        panel._filling = True
        for name, value in (("find", "power"), ("question", "differ"), ("design", "independent"),
                            ("procedure", procedure), ("spread", "pilot")):
            panel._set(getattr(panel, name), value)
        panel.difference.setText("3")
        panel.n1.setText("50")
        panel.n2.setText("")
        panel.level.setText("0.05")
        panel.simulations.setValue(args.simulations)
        panel._filling = False
        panel._soon.stop()
        gaps: list[float] = []
        clock = QElapsedTimer()
        clock.start()
        last = [clock.nsecsElapsed()]

        def tick() -> None:
            now = clock.nsecsElapsed()
            gaps.append((now - last[0]) / 1e6)
            last[0] = now

        timer = QTimer()
        timer.setInterval(TICK_MS)
        timer.timeout.connect(tick)
        timer.start()
        started = time.perf_counter()
        panel.work_out()
        starting = time.perf_counter() - started
        while panel.worker.busy:
            app.processEvents()
            time.sleep(0.001)
        took = time.perf_counter() - started
        timer.stop()
        plan = panel.result.plan.with_(seed=panel.result.seed)
        started = time.perf_counter()
        result = plan_study(plan)
        alone = time.perf_counter() - started
        started = time.perf_counter()
        plan_panel._curve(plan, result, "n", None)
        curve_alone = time.perf_counter() - started
        print(f"{procedure:>12}: power {panel.result.power:.4f} (direct {result.power:.4f}); in the tab "
              f"{took:.2f} s for the plan and its curve; direct: plan {alone:.2f} s, curve {curve_alone:.2f} s; "
              f"longest GUI pause {max(gaps):.0f} ms over {len(gaps)} ticks (tick {gaps.index(max(gaps)) + 1}; "
              f"starting the worker took {1000 * starting:.0f} ms)")
    panel.cleanup()
    return 0


if __name__ == "__main__":
    sys.exit(main())
