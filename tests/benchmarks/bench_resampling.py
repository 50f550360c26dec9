"""Benchmark: permutation tests and bootstrap intervals against scipy, on the same data.

Run: python tests/benchmarks/bench_resampling.py
Targets: difference in means, 2 x 1,000 values, 100,000 relabellings at least 5x faster than
scipy.stats.permutation_test (vectorized) with peak memory under 300 MB; BCa bootstrap of the
difference in means, 2 x 1,000 values, 10,000 resamples at least 1.5x faster than
scipy.stats.bootstrap(method="BCa", vectorized). Medians are shown too (no target).

Each measurement runs in its own process: the time is the best of a few runs and the memory is
the growth of peak resident memory (ru_maxrss) during the measured calls, after imports and a
warm-up; for our functions the peak traced by tracemalloc in one more call is printed too. scipy's permutation test runs with its default batch (all relabellings at once, several
GB) unless the machine has less than 8 GB available, in which case it gets batch=10,000 and the
output says so. Prints the figures; asserts nothing.
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]

CHILD = r"""
import resource, sys, time
import numpy as np
from scipy import stats
sys.path.insert(0, sys.argv[1])
from engine.procedures.resampling import bootstrap_interval, permutation_test

which, statistic, n, resamples, repeats, batch = sys.argv[2:8]
n, resamples, repeats = int(n), int(resamples), int(repeats)
batch = None if batch == "none" else int(batch)
data = np.random.default_rng(20261202)
x, y = data.normal(10.0, 2.0, n), data.gamma(4.0, 2.6, n)  # bolt lengths from two lines (mm)


def mean_diff(a, b, axis=-1):
    return np.mean(a, axis=axis) - np.mean(b, axis=axis)


def median_diff(a, b, axis=-1):
    return np.median(a, axis=axis) - np.median(b, axis=axis)


stat = {"mean": mean_diff, "median": median_diff}[statistic]
calls = {
    "ours_permutation": lambda size, rng: permutation_test(
        x[:size], y[:size], statistic=statistic, n_resamples=resamples, rng=rng),
    "scipy_permutation": lambda size, rng: stats.permutation_test(
        (x[:size], y[:size]), stat, vectorized=True, n_resamples=resamples, batch=batch, rng=rng),
    "ours_bootstrap": lambda size, rng: bootstrap_interval(
        x[:size], y[:size], statistic=statistic, n_resamples=resamples, rng=rng),
    "scipy_bootstrap": lambda size, rng: stats.bootstrap(
        (x[:size], y[:size]), stat, method="BCa", vectorized=True, n_resamples=resamples,
        rng=rng),
}
run = calls[which]
run(60, np.random.default_rng(0))  # warm-up: imports, caches
before = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
best = float("inf")
for seed in range(repeats):
    start = time.perf_counter()
    result = run(n, np.random.default_rng(seed + 1))
    best = min(best, time.perf_counter() - start)
peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
traced = "-"
if which.startswith("ours"):  # numpy reports its buffers to tracemalloc: one more, traced run
    import tracemalloc
    tracemalloc.start()
    run(n, np.random.default_rng(99))
    traced = f"{tracemalloc.get_traced_memory()[1] / 1024**2:.1f}"
    tracemalloc.stop()
if which.startswith("ours"):
    interval = result.interval
    summary = f"p={result.p_value} interval={interval}"
elif which == "scipy_permutation":
    summary = f"p={result.pvalue}"
else:
    summary = f"interval={result.confidence_interval}"
print(f"{best:.4f} {(peak - before) / 1024:.1f} {traced} {summary}")
"""


def measure(which: str, statistic: str, n: int, resamples: int, repeats: int,
            batch: int | None = None) -> tuple[float, float, str, str]:
    out = subprocess.run(
        [sys.executable, "-c", CHILD, str(ROOT), which, statistic, str(n), str(resamples),
         str(repeats), "none" if batch is None else str(batch)],
        capture_output=True, text=True, check=True)
    seconds, megabytes, traced, summary = out.stdout.strip().split(" ", 3)
    return float(seconds), float(megabytes), summary, traced


def available_gb() -> float:
    try:
        for line in Path("/proc/meminfo").read_text().splitlines():
            if line.startswith("MemAvailable:"):
                return int(line.split()[1]) / 1024**2
    except OSError:
        pass
    return float("inf")


def compare(title: str, kind: str, statistic: str, n: int, resamples: int, *, repeats: int,
            scipy_repeats: int, speed_target: float | None, memory_target: float | None,
            scipy_batch: int | None = None) -> None:
    ours = measure(f"ours_{kind}", statistic, n, resamples, repeats)
    theirs = measure(f"scipy_{kind}", statistic, n, resamples, scipy_repeats, scipy_batch)
    ratio = theirs[0] / ours[0]
    print(f"\n{title}: 2 x {n:,} values, {resamples:,} resamples")
    print(f"  ours : {ours[0]:8.3f} s (best of {repeats}), peak memory growth {ours[1]:7.1f} MB"
          f" (tracemalloc peak {ours[3]} MB)   {ours[2]}")
    batch_note = "default batch" if scipy_batch is None else f"batch={scipy_batch}"
    print(f"  scipy: {theirs[0]:8.3f} s (best of {scipy_repeats}, {batch_note}), peak memory "
          f"growth {theirs[1]:7.1f} MB   {theirs[2]}")
    verdicts = [f"{ratio:.1f}x faster"]
    if speed_target is not None:
        verdicts.append(f"speed target {speed_target}x: "
                        f"{'meets' if ratio >= speed_target else 'MISSES'}")
    if memory_target is not None:
        verdicts.append(f"memory target {memory_target:.0f} MB: "
                        f"{'meets' if max(ours[1], float(ours[3])) < memory_target else 'MISSES'}")
    print("  " + "; ".join(verdicts))


def main() -> None:
    scipy_batch = None if available_gb() >= 8 else 10_000
    if scipy_batch is not None:
        print(f"Less than 8 GB available: scipy's permutation test runs with batch={scipy_batch}.")
    compare("Permutation test, difference in means", "permutation", "mean", 1_000, 100_000,
            repeats=3, scipy_repeats=1, speed_target=5.0, memory_target=300.0,
            scipy_batch=scipy_batch)
    compare("Bootstrap BCa interval, difference in means", "bootstrap", "mean", 1_000, 10_000,
            repeats=5, scipy_repeats=5, speed_target=1.5, memory_target=None)
    compare("Permutation test, difference in medians", "permutation", "median", 1_000, 10_000,
            repeats=3, scipy_repeats=1, speed_target=None, memory_target=None,
            scipy_batch=scipy_batch)
    compare("Bootstrap BCa interval, difference in medians", "bootstrap", "median", 1_000,
            10_000, repeats=5, scipy_repeats=3, speed_target=None, memory_target=None)


if __name__ == "__main__":
    main()
