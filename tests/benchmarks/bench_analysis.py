"""Benchmark: the whole analysis (every procedure, the checks, effect sizes, the advice).

Run: python tests/benchmarks/bench_analysis.py
Targets (from the project's issue): 2 x 1,000 values with 10,000 resamples each under 1 s;
2 x 1,000,000 values (rank methods by normal approximation, resampling left out) under 3 s with
peak memory under 1 GB. Prints the figures; asserts nothing.
"""

from __future__ import annotations

import resource
import subprocess
import sys
import time

CHILD = r"""
import resource, sys, time
import numpy as np
from engine.analysis import analyze
from engine.spec import AnalysisSpec
from engine.results import Groups
n = int(sys.argv[1])
rng = np.random.default_rng(1)
groups = Groups(("A", "B"), rng.normal(10.2, 2, n), rng.gamma(4, 2.5, n))
analyze(Groups(("A", "B"), groups.x[:50], groups.y[:50]), AnalysisSpec(resamples=200, seed=0))  # warm imports
before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
start = time.perf_counter()
analysis = analyze(groups, AnalysisSpec(resamples=10_000, seed=2))
elapsed = time.perf_counter() - start
peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
print(f"{elapsed:.3f} {peak / 1024:.0f} {len(analysis.procedures)}")
"""


def run(n: int) -> tuple[float, float, int]:
    best = None
    for _ in range(3):
        out = subprocess.run([sys.executable, "-c", CHILD, str(n)], capture_output=True, text=True, check=True)
        seconds, peak_mb, count = out.stdout.split()
        if best is None or float(seconds) < best[0]:
            best = (float(seconds), float(peak_mb), int(count))
    return best


def main() -> None:
    for n, target in [(1_000, 1.0), (1_000_000, 3.0)]:
        seconds, peak_mb, count = run(n)
        verdict = "meets" if seconds <= target else "MISSES"
        print(f"2 x {n:>9,}: {seconds:6.3f} s (best of 3), peak RSS {peak_mb:6.0f} MB, "
              f"{count} procedures; target {target} s: {verdict}")


if __name__ == "__main__":
    main()
