"""How often the advice leaves Welch's t-test for normal data, by simulation (a script, not a test).

Normal data, n values per group, seeded. Prints the share of data sets given each suggestion, and
the share in which a value lies beyond the 3 IQR fence in either group (what once switched the
suggestion to Mann-Whitney on its own). Run from the project folder:

    python tests/benchmarks/sim_advice.py [data sets] [n]
"""

import collections
import sys

import numpy as np

from engine import advice
from engine.diagnostics import diagnose
from engine.results import Groups


def main(count: int = 4000, n: int = 5) -> None:
    rng = np.random.default_rng(20261203)
    keys = collections.Counter()
    fenced = 0
    for _ in range(count):
        groups = Groups(("A", "B"), rng.normal(10, 1, n), rng.normal(10, 1, n))
        checks = diagnose(groups)
        keys[advice.recommend(checks, groups).key] += 1
        fenced += any(shape.far_outliers for shape in checks.shapes)
    print(f"{count} normal data sets, {n} values per group")
    for key, hits in keys.most_common():
        print(f"  suggested {key}: {hits / count:.3f}")
    print(f"  a value beyond the 3 IQR fence in either group: {fenced / count:.3f}")


if __name__ == "__main__":
    main(*(int(a) for a in sys.argv[1:3]))
