"""Benchmark: many outcomes at once (every procedure on each, then the adjusted p-values).

Run: python tests/benchmarks/bench_outcomes.py [OUTCOMES]
Target (from the project's issue): 50 outcomes x 2 groups x 1,000 rows, every procedure, 10,000
resamples each, under 10 s, with progress and cancelling; the first outcome's row is ready
long before the end. Prints the figures beside one single-outcome analysis of the same size
(the reference from the same run); asserts nothing. Load from other work on the machine skews
the figures: run it on a quiet machine.
"""

from __future__ import annotations

import subprocess
import sys
import time

CHILD = r"""
import sys, time
import numpy as np, pandas as pd
from engine import pipeline
from engine.outcomes import analyze_outcomes, long_outcomes
from engine.spec import AnalysisSpec, Source
m, n, path = int(sys.argv[1]), 1000, sys.argv[2]
rng = np.random.default_rng(1)
frame = pd.DataFrame({"lot": ["east"] * n + ["west"] * n})
for k in range(m):
    frame[f"measure_{k:02d}"] = np.r_[rng.normal(10 + 0.05 * (k % 5), 2, n), rng.gamma(25, 0.4, n)]
frame.to_csv(path, index=False)
spec = AnalysisSpec(source=Source(path), group_column="lot", resamples=10_000, seed=3)
table = pipeline.read(spec)
analyze_outcomes(table, spec.replace(resamples=200), long_outcomes(["measure_00"]))  # warm imports
start = time.perf_counter()
alone = pipeline.from_file(spec=spec.replace(value_columns=("measure_00",)))
single = time.perf_counter() - start
cpu = time.process_time()
first = []
fractions = []
start = time.perf_counter()
found = analyze_outcomes(table, spec, long_outcomes([f"measure_{k:02d}" for k in range(m)]),
                         on_outcome=lambda r: first.append(time.perf_counter() - start) if not first else None,
                         progress=lambda f, what: fractions.append(f))
elapsed = time.perf_counter() - start
cpu = time.process_time() - cpu
procedures = len(found.outcomes[0].analysis.procedures)
print(f"{elapsed:.3f} {first[0]:.3f} {single:.3f} {procedures} {len(fractions)} {cpu:.3f}")
"""


def main() -> None:
    import tempfile
    from pathlib import Path

    m = int(sys.argv[1]) if len(sys.argv) > 1 else 50
    with tempfile.TemporaryDirectory() as folder:
        path = str(Path(folder) / "outcomes.csv")
        out = subprocess.run([sys.executable, "-c", CHILD, str(m), path], capture_output=True,
                             text=True, check=True)
    elapsed, first, single, procedures, reports, cpu = out.stdout.split()
    print(f"{m} outcomes x 2 x 1,000 rows, {procedures} procedures each, 10,000 resamples:")
    print(f"  all outcomes      {float(elapsed):7.2f} s  (target under 10 s)")
    print(f"  processor time    {float(cpu):7.2f} s  (all threads of the process; less skewed by load)")
    print(f"  first outcome in  {float(first):7.2f} s")
    print(f"  per outcome       {float(elapsed) / m:7.3f} s  (one single-outcome pipeline run: {float(single):.3f} s)")
    print(f"  progress reports  {reports}")
    print("Load from other work on the machine skews these figures.")


if __name__ == "__main__":
    main()
