"""Type I error and interval coverage of the rank procedures under unequal spreads.

Run from the repository root: ``python tests/benchmarks/sim_ranks.py [reps]``. Prints figures;
it is not a test (the seeded, smaller version is tests/engine/test_brunner_munzel.py).

Scenarios (both with P(X > Y) = 1/2 and equal medians, so no procedure of stochastic order
should find a difference):
  H  : normal, SDs 4 : 1, n 8 / 25, the small group the noisy one (means equal too, and X - Y is
       symmetric about 0, so the Hodges-Lehmann target is 0);
  LN : lognormal, sdlog 1.2 with n = 8 against sdlog 0.4 with n = 25, both medians 1.
For each: the rejection rate at alpha = 0.05 of Mann-Whitney and Brunner-Munzel; coverage of 1/2
by the Brunner-Munzel logit interval and by Newcombe's interval (the common-language effect
size); coverage of 0 by the Hodges-Lehmann interval (H only); which procedure the advice
suggests, and how often the suggested one rejects (when it is one with a p-value here).
References: Brunner and Munzel (2000), Biometrical Journal 42:17; Pratt (1964), JASA 59:665;
Fagerland and Sandvik (2009), Statistics in Medicine 28:1487.
"""

from __future__ import annotations

import sys
from collections import Counter
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from engine.advice import recommend  # noqa: E402
from engine.diagnostics import diagnose  # noqa: E402
from engine.effects import common_language  # noqa: E402
from engine.procedures.brunner_munzel import brunner_munzel  # noqa: E402
from engine.procedures.ranks import mann_whitney  # noqa: E402
from engine.procedures.t import welch_t  # noqa: E402
from engine.results import Groups  # noqa: E402

ALPHA = 0.05


def scenario_h(rng):
    return rng.normal(0, 4, 8), rng.normal(0, 1, 25)


def scenario_ln(rng):
    return rng.lognormal(0, 1.2, 8), rng.lognormal(0, 0.4, 25)


def run(name, make, reps, seed, hl_target):
    rng = np.random.default_rng(seed)
    mw_reject = bm_reject = bm_cover = cl_cover = hl_cover = 0
    suggested: Counter = Counter()
    suggested_reject: Counter = Counter()
    for _ in range(reps):
        x, y = make(rng)
        mw = mann_whitney(x, y)
        bm = brunner_munzel(x, y)
        mw_reject += mw.p_value < ALPHA
        bm_reject += bm.p_value < ALPHA
        bm_cover += bm.interval.contains(0.5)
        cl_cover += common_language(x, y).interval.contains(0.5)
        if hl_target is not None:
            hl_cover += mw.interval.contains(hl_target)
        groups = Groups(("1", "2"), x, y)
        key = recommend(diagnose(groups), groups).key
        suggested[key] += 1
        p = {"mann_whitney": mw.p_value, "brunner_munzel": bm.p_value,
             "welch_t": None}.get(key)
        if key == "welch_t":
            p = welch_t(x, y).p_value
        if p is not None:
            suggested_reject[key] += p < ALPHA
    se = np.sqrt(0.05 * 0.95 / reps)
    print(f"{name}: {reps} data sets (binomial SE about {se:.4f} near 0.05 and 0.95)")
    print(f"  Mann-Whitney rejects            {mw_reject / reps:.4f}")
    print(f"  Brunner-Munzel rejects          {bm_reject / reps:.4f}")
    print(f"  Brunner-Munzel interval covers  {bm_cover / reps:.4f}  (P(X > Y) = 1/2)")
    print(f"  Newcombe (common-language)      {cl_cover / reps:.4f}")
    if hl_target is not None:
        print(f"  Hodges-Lehmann interval covers  {hl_cover / reps:.4f}  (shift 0)")
    for key, count in suggested.most_common():
        rate = (f", rejects {suggested_reject[key] / count:.4f}" if key in suggested_reject
                or key in ("mann_whitney", "brunner_munzel", "welch_t") else "")
        print(f"  suggested {key:<20} {count:5d}{rate}")


def main() -> None:
    reps = int(sys.argv[1]) if len(sys.argv) > 1 else 4000
    run("H", scenario_h, reps, 1, 0.0)
    run("LN", scenario_ln, reps, 2, None)


if __name__ == "__main__":
    main()
