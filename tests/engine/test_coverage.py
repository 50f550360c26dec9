"""Simulated coverage of the 95% intervals of Welch, bootstrap BCa and Hodges-Lehmann.

Theory (the definition of a confidence interval): over repeated samples, a 95% interval covers the
true difference about 95% of the time. The bounds allow for simulation error (binomial standard
error sqrt(.95 * .05 / reps)) and for the known small-sample undercoverage of bootstrap intervals
(Efron & Tibshirani 1993, An Introduction to the Bootstrap, ch. 14: BCa is second-order accurate,
so a slight shortfall at n = 25 is expected).
"""

import numpy as np
import pytest

from engine.procedures.ranks import mann_whitney
from engine.procedures.resampling import bootstrap_interval
from engine.procedures.t import welch_t

SHIFT = 1.5
LEVEL = 0.95


def _normal_unequal(rng, n1, n2):
    return rng.normal(10 + SHIFT, 2.0, n1), rng.normal(10, 1.0, n2)


def _lognormal_shifted(rng, n1, n2):
    # same skewed shape in both groups, moved by SHIFT: the mean difference and the
    # Hodges-Lehmann shift are both SHIFT
    return rng.lognormal(0, 0.75, n1) + SHIFT, rng.lognormal(0, 0.75, n2)


def _coverage(make, procedure, reps, seed, n1=25, n2=20):
    rng = np.random.default_rng(seed)
    hits = 0
    for _ in range(reps):
        x, y = make(rng, n1, n2)
        hits += procedure(x, y, rng).interval.contains(SHIFT)
    return hits / reps


@pytest.mark.slow
@pytest.mark.parametrize("make", [_normal_unequal, _lognormal_shifted], ids=["normal", "skewed"])
def test_welch_interval_covers_the_mean_difference(make):
    rate = _coverage(make, lambda x, y, rng: welch_t(x, y, confidence_level=LEVEL), 3000, 11)
    # 3000 reps: simulation SE 0.004; Welch is near exact under normality, and slightly
    # liberal under skew at these n (common practice: within about one point)
    assert 0.925 <= rate <= 0.965


@pytest.mark.slow
@pytest.mark.parametrize("make", [_normal_unequal, _lognormal_shifted], ids=["normal", "skewed"])
def test_hodges_lehmann_interval_covers_the_shift(make):
    rate = _coverage(make, lambda x, y, rng: mann_whitney(x, y, confidence_level=LEVEL), 2000, 12)
    # distribution-free under a pure shift (the skewed case); under unequal normal spreads the
    # difference X - Y is still symmetric about SHIFT, so the interval stays close to nominal
    assert 0.925 <= rate <= 0.975


@pytest.mark.slow
@pytest.mark.parametrize("make, lowest", [(_normal_unequal, 0.91), (_lognormal_shifted, 0.87)],
                         ids=["normal", "skewed"])
def test_bootstrap_bca_interval_covers_the_mean_difference(make, lowest):
    def run(x, y, rng):
        return bootstrap_interval(x, y, statistic="mean", confidence_level=LEVEL, n_resamples=1000, rng=rng)

    rate = _coverage(make, run, 800, 13)
    # 800 reps: simulation SE 0.008. BCa at n = 25 and 20 undercovers by a point or two under
    # normality, and more under skew: scipy.stats.bootstrap(method="BCa") itself covered 0.90 of
    # 300 data sets of this skewed scenario (measured beside ours, which covered 0.92)
    assert lowest <= rate <= 0.975
