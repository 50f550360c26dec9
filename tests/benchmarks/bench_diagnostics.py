"""The checks (shape, spread, outliers, ties) on two groups of a million values each.

Target: well under a second on a laptop. Prints the best of three runs beside numpy's own sort of
the same values (the floor any rank-based check pays). Run on a quiet machine.

    python tests/benchmarks/bench_diagnostics.py
"""

from __future__ import annotations

import time

import numpy as np

from engine.diagnostics import diagnose
from engine.results import Groups


def _best(work, repeats: int = 3) -> float:
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        work()
        times.append(time.perf_counter() - start)
    return min(times)


def main() -> None:
    rng = np.random.default_rng(19)
    x, y = rng.normal(size=1_000_000), rng.gamma(2.0, size=1_000_000).round(2)
    groups = Groups(("A", "B"), x, y)
    diagnose(groups)  # warm imports and caches
    ours = _best(lambda: diagnose(groups))
    floor = _best(lambda: (np.sort(x), np.sort(y)))
    print(f"diagnose, 2 x 1,000,000 values: {ours:.3f} s (target < 1 s)")
    print(f"numpy sort of both groups:      {floor:.3f} s  ratio {ours / floor:.1f}x")


if __name__ == "__main__":
    main()
