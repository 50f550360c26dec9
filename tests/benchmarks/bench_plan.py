"""Speed of planning, ours beside statsmodels' in one run (statsmodels is test-only).

- exact sample size for Welch's test, unequal SDs and allocation (target < 50 ms);
- a power curve of 50 points (target < 0.5 s);
- power from pilot values, 2 x 30 pilot values, 10,000 simulated studies of 2 x 50:
  Welch (target < 2 s) and Mann-Whitney (target < 3 s);
- the longest stretch between two progress reports of a simulation (a cancel request is seen at
  each), and the longest pause of another Python thread that wakes every millisecond while the
  simulation runs (what a window's GUI thread would feel with the simulation in a worker; target
  under 100 ms);
- the skewed-pilot figure: how far the rank test's power from log-normal pilot values sits above
  the normal-theory t power at the same SDs.

    python tests/benchmarks/bench_plan.py

Load from other work on the machine skews every figure; run it on a quiet machine.
"""

from __future__ import annotations

import math
import time

import numpy as np


def _best(work, repeats: int = 5):
    """The fastest of ``repeats`` runs (seconds) and the last result."""
    best, result = math.inf, None
    for _ in range(repeats):
        start = time.perf_counter()
        result = work()
        best = min(best, time.perf_counter() - start)
    return best, result


class _Ticker:
    """A thread that wakes every millisecond and records the longest gap between wake-ups."""

    def __enter__(self):
        import threading

        self.longest, self._stop = 0.0, threading.Event()
        self._thread = threading.Thread(target=self._run, daemon=True)
        self._thread.start()
        return self

    def _run(self) -> None:
        last = time.perf_counter()
        while not self._stop.is_set():
            time.sleep(0.001)
            now = time.perf_counter()
            self.longest = max(self.longest, now - last)
            last = now

    def __exit__(self, *exc) -> None:
        self._stop.set()
        self._thread.join()


def main() -> None:
    from statsmodels.stats.power import TTestIndPower

    from engine.planning import Pilot, Plan, plan_study, power_curve
    from engine.question import Margin, Question

    plan = Plan("n", difference=5.0, sd=6.0, sd2=9.0, ratio=1.5, power=0.9)
    seconds, result = _best(lambda: plan_study(plan), 20)
    reference, n = _best(lambda: TTestIndPower().solve_power(effect_size=5 / 7.65, alpha=0.05,
                                                             power=0.9, ratio=1.5), 20)
    print(f"Welch sample size (SDs 6 and 9, ratio 1.5): {1000 * seconds:.1f} ms -> {result.n1} + "
          f"{result.n2} (target < 50 ms); statsmodels' pooled solve_power {1000 * reference:.1f} ms")
    seconds, curve = _best(lambda: power_curve(plan, "n", points=50), 5)
    print(f"power curve, 50 points along n (Welch): {seconds:.3f} s (target < 0.5 s)")
    seconds, curve = _best(lambda: power_curve(plan, "difference", points=50), 5)
    print(f"power curve, 50 points along the difference (Welch): {seconds:.3f} s (target < 0.5 s)")
    equivalence = Plan("n", difference=0.0, sd=6.0, power=0.8,
                       question=Question("equivalent", 0.95, Margin.within(4)))
    seconds, result = _best(lambda: plan_study(equivalence), 10)
    print(f"equivalence sample size (two one-sided Welch tests): {1000 * seconds:.1f} ms -> {result.n1}")

    rng = np.random.default_rng(1)
    pilot = Pilot(rng.normal(50, 5, 30), rng.normal(48, 7, 30))
    for procedure, target in (("welch", 2.0), ("mann_whitney", 3.0)):
        study = Plan("power", difference=3.0, n1=50, pilot=pilot, procedure=procedure,
                     simulations=10_000, seed=1)
        stamps: list[float] = []
        with _Ticker() as ticker:
            start = time.perf_counter()
            answer = plan_study(study, progress=lambda f, w: stamps.append(time.perf_counter()))
            seconds = time.perf_counter() - start
        gaps = np.diff([start] + stamps)
        print(f"pilot power, 2 x 30 pilot values, 10,000 studies of 2 x 50, {procedure}: "
              f"{seconds:.2f} s (target < {target:g} s); power {answer.power:.4f} +- "
              f"{answer.monte_carlo_se:.4f}; longest stretch between progress reports "
              f"{1000 * gaps.max():.0f} ms; longest pause of a 1 ms ticker thread {1000 * ticker.longest:.0f} ms")

    skewed = Pilot(rng.lognormal(0.0, 1.0, 30), rng.lognormal(0.0, 1.0, 30))
    sd1, sd2 = skewed.sds()
    delta = 0.5 * math.sqrt((sd1**2 + sd2**2) / 2)
    ranks = plan_study(Plan("power", difference=delta, n1=30, pilot=skewed, procedure="mann_whitney",
                            simulations=10_000, seed=2))
    welch = plan_study(Plan("power", difference=delta, n1=30, pilot=skewed, simulations=10_000, seed=2))
    normal = plan_study(Plan("power", difference=delta, sd=sd1, sd2=sd2, n1=30))
    print(f"log-normal pilot (2 x 30), shift of 0.5 SD, 30 per group: Mann-Whitney from the pilot "
          f"{ranks.power:.3f} +- {ranks.monte_carlo_se:.3f}, Welch from the pilot {welch.power:.3f} +- "
          f"{welch.monte_carlo_se:.3f}, Welch under normal theory {normal.power:.3f}")


if __name__ == "__main__":
    main()
