"""Type I error at the margin of every margin procedure with a test, by simulation.

Run from the repository root: ``python tests/benchmarks/sim_margin.py [repeats]`` (default
20,000; the rank rows use a tenth of that, their exact laws being slower). Prints figures; it is
not a test (the seeded, smaller version is tests/engine/test_margin_size.py).

Each row puts the true difference (or ratio, or centre of the pair differences) on one end of
the margin and counts how often the procedure answers "yes" at alpha = 0.05, with the Monte
Carlo standard error. Two one-sided tests are an intersection-union test of size at most alpha
(Berger and Hsu 1996, Statistical Science 11:283): near alpha when the other end of the margin
is far against the standard error (large groups, or a wide margin), below it when it is near.
A one-sided non-inferiority test at its margin end has size alpha when its law is exact (the
t-tests under normality) and at most alpha for the exact rank laws, which are discrete.
"""

from __future__ import annotations

import math
import sys
import time
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from engine.procedures.equivalence import equivalence_t, noninferiority_t  # noqa: E402
from engine.procedures.equivalence_intervals import (  # noqa: E402
    equivalence_log_t, equivalence_ranks, noninferiority_log_t, noninferiority_ranks)
from engine.procedures.paired_margin import (  # noqa: E402
    paired_equivalence, paired_equivalence_ranks, paired_noninferiority, paired_noninferiority_ranks)

ALPHA = 0.05


def _independent(n1, n2, sd1, sd2, centre):
    return lambda rng: (rng.normal(centre, sd1, n1), rng.normal(0.0, sd2, n2))


def _shifted(n1, n2, centre):
    return lambda rng: (rng.standard_t(4, n1) + centre, rng.standard_t(4, n2))


def _ratio(n1, n2, ratio):
    return lambda rng: (rng.lognormal(math.log(ratio), 0.2, n1), rng.lognormal(0.0, 0.3, n2))


def _paired(n, centre, noise="normal"):
    def draw(rng):
        base = rng.normal(20.0, 4.0, n)
        spread = rng.normal(0.0, 1.0, n) if noise == "normal" else rng.laplace(0.0, 1.0, n)
        return base + centre + spread, base
    return draw


ROWS = (
    # (what, draw, test, repeats share)
    ("equivalence Welch, n 6/9, SD 1/3, margin +-5, at +5", _independent(6, 9, 1, 3, 5.0),
     lambda x, y: equivalence_t(x, y, low=-5, high=5), 1.0),
    ("equivalence Welch, n 6/9, SD 1/3, margin +-1, at +1", _independent(6, 9, 1, 3, 1.0),
     lambda x, y: equivalence_t(x, y, low=-1, high=1), 1.0),
    ("equivalence Welch, n 400/300, SD 1/2, margin +-0.3, at -0.3", _independent(400, 300, 1, 2, -0.3),
     lambda x, y: equivalence_t(x, y, low=-0.3, high=0.3), 1.0),
    ("equivalence pooled, n 10/10, SD 1/1, margin +-1.5, at +1.5", _independent(10, 10, 1, 1, 1.5),
     lambda x, y: equivalence_t(x, y, low=-1.5, high=1.5, spread="pooled"), 1.0),
    ("non-inferiority Welch, n 6/9, SD 1/3, lower worse by 0.8, at -0.8", _independent(6, 9, 1, 3, -0.8),
     lambda x, y: noninferiority_t(x, y, margin=0.8, worse="lower"), 1.0),
    ("non-inferiority Welch, n 400/300, higher worse by 0.2, at +0.2", _independent(400, 300, 1, 2, 0.2),
     lambda x, y: noninferiority_t(x, y, margin=0.2, worse="higher"), 1.0),
    ("equivalence ranks (t4 shift), n 10/12, margin +-3, at +3", _shifted(10, 12, 3.0),
     lambda x, y: equivalence_ranks(x, y, low=-3, high=3), 0.1),
    ("non-inferiority ranks (t4 shift), n 10/12, lower worse by 0.7", _shifted(10, 12, -0.7),
     lambda x, y: noninferiority_ranks(x, y, margin=0.7, worse="lower", method="exact"), 0.1),
    ("non-inferiority ranks (t4 shift), n 200/150, normal law, at -0.3", _shifted(200, 150, -0.3),
     lambda x, y: noninferiority_ranks(x, y, margin=0.3, worse="lower", method="normal"), 0.1),
    ("equivalence log Welch, n 15/18, ratio margin 0.8-1.25, at 1.25", _ratio(15, 18, 1.25),
     lambda x, y: equivalence_log_t(x, y, low=0.8, high=1.25), 1.0),
    ("non-inferiority log Welch, n 200/200, lower worse at 0.9", _ratio(200, 200, 0.9),
     lambda x, y: noninferiority_log_t(x, y, margin=0.9, worse="lower"), 1.0),
    ("paired equivalence t, n 10, margin +-2, at +2", _paired(10, 2.0),
     lambda x, y: paired_equivalence(x, y, low=-2, high=2), 1.0),
    ("paired non-inferiority t, n 8, lower worse by 0.5", _paired(8, -0.5),
     lambda x, y: paired_noninferiority(x, y, margin=0.5, worse="lower"), 1.0),
    ("paired equivalence ranks (Laplace), n 12, margin +-2.5, at -2.5", _paired(12, -2.5, "laplace"),
     lambda x, y: paired_equivalence_ranks(x, y, low=-2.5, high=2.5), 0.1),
    ("paired non-inferiority ranks (Laplace), n 12, higher worse by 0.6", _paired(12, 0.6, "laplace"),
     lambda x, y: paired_noninferiority_ranks(x, y, margin=0.6, worse="higher"), 0.1),
    ("paired non-inferiority ranks (Laplace), n 500, normal law", _paired(500, 0.1, "laplace"),
     lambda x, y: paired_noninferiority_ranks(x, y, margin=0.1, worse="higher"), 0.1),
)


def main(repeats: int) -> None:
    print(f"alpha = {ALPHA}; rate of 'yes' with the truth on the margin's end (Monte Carlo SE)")
    for seed, (what, draw, test, share) in enumerate(ROWS):
        rng = np.random.default_rng(1000 + seed)
        count = max(100, int(repeats * share))
        start = time.perf_counter()
        hits = sum(test(*draw(rng)).p_value < ALPHA for _ in range(count))
        rate = hits / count
        se = math.sqrt(ALPHA * (1 - ALPHA) / count)
        print(f"{what:70s} {rate:.4f} (SE {se:.4f}, {count:,} repeats, {time.perf_counter() - start:.0f} s)")


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 20_000)
