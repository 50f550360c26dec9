"""Timings of the rank procedures beside scipy on the same data, in the same run.

Run from the repository root: ``python tests/benchmarks/bench_ranks.py``. Prints figures; it is
not a test. Targets: exact with ties (2 x 50 values on 7 levels) < 0.5 s; exact without ties
(2 x 500) < 1 s; the whole call on 2 x 1,000,000 values (normal approximation) well under 1 s.
scipy's exact method ignores ties (it counts as if there were none), so on tied data its
p-value answers a different question; it is timed only for comparison. scipy's exact count on
2 x 500 values takes minutes (longer on a busy machine), so the whole script does too. Each time
is the best of a few runs, in seconds of wall-clock time; "cpu" is the process time of our run,
a steadier figure when other work shares the machine.
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

import numpy as np
from scipy import stats

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from engine.procedures.ranks import hodges_lehmann, mann_whitney  # noqa: E402


CPU: dict[str, float] = {}


def timed(call, repeats: int = 3):
    best, value, cpu = float("inf"), None, float("inf")
    for _ in range(repeats):
        start, start_cpu = time.perf_counter(), time.process_time()
        value = call()
        best = min(best, time.perf_counter() - start)
        cpu = min(cpu, time.process_time() - start_cpu)
    CPU["last"] = cpu
    return best, value


def row(label: str, ours: float, cpu: float, reference: float | None, note: str = "") -> None:
    ref = f"{reference:9.3f} s" if reference is not None else "        -  "
    print(f"{label:<46} {ours:9.3f} s  (cpu {cpu:6.3f} s)   {ref}   {note}")


def main() -> None:
    rng = np.random.default_rng(20261202)
    print(f"{'case':<46} {'ours':>11}  {'':>14}   {'scipy':>11}")

    # fertiliser plots scored on a 7-point scale: heavy ties
    x = rng.integers(1, 8, 50).astype(float)
    y = rng.integers(1, 8, 50).astype(float)
    t_ours, ours = timed(lambda: mann_whitney(x, y, method="exact"))
    cpu = CPU["last"]
    t_ref, ref = timed(lambda: stats.mannwhitneyu(x, y, method="exact"), 1)
    row("exact with ties, 2 x 50 on 7 levels", t_ours, cpu, t_ref,
        f"p ours {ours.p_value:.6f} (ties kept) / scipy {ref.pvalue:.6f} (ties ignored)")

    # bolt lengths, no ties
    x, y = rng.normal(50.0, 0.2, 500), rng.normal(50.02, 0.2, 500)
    t_ours, ours = timed(lambda: mann_whitney(x, y, method="exact"))
    cpu = CPU["last"]
    t_ref, ref = timed(lambda: stats.mannwhitneyu(x, y, method="exact"), 1)
    row("exact without ties, 2 x 500", t_ours, cpu, t_ref,
        f"p ours {ours.p_value:.12g} / scipy {ref.pvalue:.12g}")

    # adhesive peel strengths, a million per batch
    x, y = rng.normal(12.0, 1.5, 1_000_000), rng.normal(12.01, 1.5, 1_000_000)
    t_ours, ours = timed(lambda: mann_whitney(x, y, method="normal"), 2)
    cpu = CPU["last"]
    t_ref, ref = timed(lambda: stats.mannwhitneyu(x, y, method="asymptotic"), 2)
    row("whole call, 2 x 1,000,000, normal approximation", t_ours, cpu, t_ref,
        f"scipy gives no shift or interval; p ours {ours.p_value:.6g} / scipy {ref.pvalue:.6g}")
    t_hl, _ = timed(lambda: hodges_lehmann(x, y), 2)
    row("Hodges-Lehmann shift alone, 2 x 1,000,000", t_hl, CPU["last"], None,
        "10^12 pairs, none formed")


if __name__ == "__main__":
    main()
