"""Benchmark: the whole headless command against scipy's two resampling calls alone.

Run: python tests/benchmarks/bench_command.py [--repeats N]
Target: ``python -m engine analyze FILE --json --resamples 100000 --seed 1`` on 2 x 1,000
values (start-up, imports, reading, checks, every procedure including both permutation tests
and both bootstraps, effect sizes, the JSON) at least 3x faster than
scipy.stats.permutation_test (difference in means, 100,000 resamples, vectorized) followed by
scipy.stats.bootstrap(method="BCa", 100,000 resamples, vectorized) on the same data, in a warm
process that has scipy imported already.

Both sides run in this one run, alternately, each timed as the best of ``--repeats`` rounds, so
that a change of load on a shared machine weighs on both; the processor time of each (user and
system) is printed beside the wall time, as it depends less on what else the machine runs. scipy's permutation test runs with its
default batch (all relabellings at once) unless the machine has less than 8 GB available, in
which case it gets batch=10,000 and the output says so (as bench_resampling.py does). Prints the
figures; asserts nothing.
"""

from __future__ import annotations

import argparse
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
RESAMPLES = 100_000
N = 1_000

SCIPY_CHILD = r"""
import sys, time
import numpy as np
from scipy import stats

path, resamples, repeats, batch = sys.argv[1], int(sys.argv[2]), int(sys.argv[3]), sys.argv[4]
batch = None if batch == "none" else int(batch)
rows = np.genfromtxt(path, delimiter=",", skip_header=1, dtype=None, encoding="utf-8")
x = np.array([float(v) for g, v in rows if g == "line_a"])
y = np.array([float(v) for g, v in rows if g == "line_b"])


def mean_diff(a, b, axis=-1):
    return np.mean(a, axis=axis) - np.mean(b, axis=axis)


def both(rng, count):
    stats.permutation_test((x, y), mean_diff, vectorized=True, n_resamples=count, batch=batch, rng=rng)
    stats.bootstrap((x, y), mean_diff, method="BCa", vectorized=True, n_resamples=count, rng=rng)


both(np.random.default_rng(0), 1000)  # warm-up: scipy's lazy imports and caches
for seed in range(repeats):
    start, cpu = time.perf_counter(), time.process_time()
    both(np.random.default_rng(seed + 1), resamples)
    print(time.perf_counter() - start, time.process_time() - cpu, flush=True)
"""


def _available_gb() -> float:
    try:
        with open("/proc/meminfo") as info:
            for line in info:
                if line.startswith("MemAvailable:"):
                    return int(line.split()[1]) / 1024**2
    except OSError:
        pass
    return float("inf")


def _write_data(folder: Path) -> Path:
    import numpy as np

    data = np.random.default_rng(20261203)
    # invented: lengths (mm) of bolts from two production lines
    a, b = data.normal(60.0, 0.8, N), 59.7 + data.gamma(4.0, 0.25, N)
    path = folder / "bolt_lengths.csv"
    with path.open("w") as out:
        out.write("line,length_mm\n")
        out.writelines(f"line_a,{v:.4f}\n" for v in a)
        out.writelines(f"line_b,{v:.4f}\n" for v in b)
    return path


def _children_cpu() -> float:
    used = resource.getrusage(resource.RUSAGE_CHILDREN)
    return used.ru_utime + used.ru_stime


def _command(path: Path) -> tuple[float, float]:
    """Wall and processor seconds of one whole run of the command."""
    start, cpu = time.perf_counter(), _children_cpu()
    subprocess.run([sys.executable, "-m", "engine", "analyze", str(path), "--json", "--resamples",
                    str(RESAMPLES), "--seed", "1"], cwd=ROOT, check=True, stdout=subprocess.DEVNULL)
    return time.perf_counter() - start, _children_cpu() - cpu


def _scipy(path: Path, batch: str) -> tuple[float, float]:
    """Wall and processor seconds of scipy's two calls in a warm process (imports and a first,
    small call of each left out)."""
    done = subprocess.run([sys.executable, "-c", SCIPY_CHILD, str(path), str(RESAMPLES), "1", batch],
                          check=True, capture_output=True, text=True)
    wall, cpu = done.stdout.split()[-2:]
    return float(wall), float(cpu)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=3, help="rounds; the best of each side counts")
    args = parser.parse_args()
    batch = "none" if _available_gb() >= 8 else "10000"
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    with tempfile.TemporaryDirectory() as folder:
        path = _write_data(Path(folder))
        ours, theirs = [], []
        for _ in range(args.repeats):
            ours.append(_command(path))
            theirs.append(_scipy(path, batch))
    load_after = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    print(f"load average: {load:.2f} at the start, {load_after:.2f} at the end (cores: {os.cpu_count()})")
    for kind, index in (("wall", 0), ("processor", 1)):
        best_ours, best_theirs = min(t[index] for t in ours), min(t[index] for t in theirs)
        ratio = best_theirs / best_ours
        print(f"{kind} time: whole command, 2 x {N:,} values, {RESAMPLES:,} resamples: best "
              f"{best_ours:.2f} s (all: {', '.join(f'{t[index]:.2f}' for t in ours)}); scipy "
              f"permutation_test + bootstrap(BCa) alone{'' if batch == 'none' else ' (batch=10,000)'}: "
              f"best {best_theirs:.2f} s (all: {', '.join(f'{t[index]:.2f}' for t in theirs)}); "
              f"ratio {ratio:.2f}x (target 3x: {'meets' if ratio >= 3 else 'MISSES'})")


if __name__ == "__main__":
    main()
