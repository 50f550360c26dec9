"""Speed of the paired procedures, ours beside scipy's in one run.

- exact signed-rank p-value with ties and zeros, 200 pairs (target < 0.5 s);
- one-sample Hodges-Lehmann estimate and interval, 100,000 pairs (target < 1 s, memory linear).

    python tests/benchmarks/bench_paired.py
"""

from __future__ import annotations

import time
import tracemalloc

import numpy as np
from scipy import stats

from engine.procedures.signed_rank import signed_rank, signed_rank_test


def _timed(work):
    start = time.perf_counter()
    result = work()
    return time.perf_counter() - start, result


def main() -> None:
    rng = np.random.default_rng(5)
    d = rng.integers(-6, 7, 200).astype(float)
    seconds, result = _timed(lambda: signed_rank_test(d, zero_rule="pratt", method="exact"))
    reference, _ = _timed(lambda: stats.wilcoxon(d, zero_method="pratt", method="approx"))
    print(f"exact signed-rank, 200 pairs with ties and zeros: {seconds:.3f} s (exact={result.exact}); "
          f"scipy's normal approximation {reference:.3f} s")
    big = rng.lognormal(0.1, 1.0, 100_000)
    tracemalloc.start()
    seconds, result = _timed(lambda: signed_rank(big, method="normal"))
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    print(f"Hodges-Lehmann estimate and interval, 100,000 pairs: {seconds:.3f} s, "
          f"peak {peak / 1e6:.0f} MB (the 5e9 averages listed would take 40 GB)")
    reference, _ = _timed(lambda: stats.wilcoxon(big, method="approx"))
    print(f"scipy's signed-rank test alone on the same pairs: {reference:.3f} s")


if __name__ == "__main__":
    main()
