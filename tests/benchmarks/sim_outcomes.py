"""Simulation: the family-wise error of Holm's adjustment and the false discovery rate of
Benjamini-Hochberg's, over 20 independent outcomes of which 12 do not differ (the larger run of
``tests/engine/test_multiplicity.py``).

Run: python tests/benchmarks/sim_outcomes.py [REPLICATIONS]   (default 100,000)
Prints each rate with its Monte Carlo standard error beside the promise: Holm's family-wise error
at most 5% (and at least Bonferroni's 1 - (1 - 0.05/20)^12 for independent tests); without
adjustment 1 - 0.95^12; Benjamini-Hochberg's false discovery rate 5% x 12/20 = 3% exactly for
independent tests. Asserts nothing.
"""

from __future__ import annotations

import sys
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "tests" / "engine"))

from test_multiplicity import M, NULLS, error_rates, simulated_p_values  # noqa: E402


def main() -> None:
    reps = int(sys.argv[1]) if len(sys.argv) > 1 else 100_000
    rng = np.random.default_rng(20261203)
    parts = {"holm": [], "raw": [], "fdp": []}
    for start in range(0, reps, 10_000):
        rates = error_rates(simulated_p_values(rng, min(10_000, reps - start)))
        for key in parts:
            parts[key].append(rates[key])
    rates = {key: np.concatenate(value).astype(float) for key, value in parts.items()}
    alpha = 0.05

    def line(name, values, promise):
        se = values.std(ddof=1) / np.sqrt(values.size)
        print(f"  {name:<42} {values.mean():.4f} +/- {se:.4f}   (promise: {promise})")

    print(f"{reps:,} replications of {M} outcomes ({NULLS} without a difference):")
    line("Holm: any false finding", rates["holm"],
         f"at most {alpha}, at least {1 - (1 - alpha / M) ** NULLS:.4f}")
    line("unadjusted: any false finding", rates["raw"], f"{1 - (1 - alpha) ** NULLS:.4f}")
    line("Benjamini-Hochberg: false share of findings", rates["fdp"], f"{alpha * NULLS / M:.4f}")


if __name__ == "__main__":
    main()
