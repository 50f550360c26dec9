"""Type I error at the margin: with the true difference on the margin's end, a margin procedure
answers "yes" at most alpha of the time (within Monte Carlo error), and near alpha where only one
end matters and the test is exact or the groups are large. Sized for CI (about a second each);
tests/benchmarks/sim_margin.py runs the same with many more repeats. The Welch two one-sided
tests themselves are checked in test_equivalence_size.py."""

import math

import numpy as np
import pytest

from engine.procedures.equivalence import noninferiority_t
from engine.procedures.equivalence_intervals import equivalence_log_t, noninferiority_ranks
from engine.procedures.paired_margin import paired_noninferiority, paired_noninferiority_ranks

ALPHA = 0.05


def _se(repeats):
    """The Monte Carlo standard error of a rejection rate near alpha (binomial)."""
    return math.sqrt(ALPHA * (1 - ALPHA) / repeats)


def _rate(seed, repeats, draw, test):
    rng = np.random.default_rng(seed)
    return sum(test(*draw(rng)).p_value < ALPHA for _ in range(repeats)) / repeats


@pytest.mark.parametrize("worse, n1, n2, sd1, sd2", [("lower", 6, 9, 1.0, 3.0), ("higher", 12, 7, 2.5, 1.0)])
def test_the_welch_non_inferiority_test_keeps_alpha_at_the_margin(worse, n1, n2, sd1, sd2):
    # a one-sided Welch test at the margin's worse end: its size is alpha up to Welch's
    # approximation (common practice: within three Monte Carlo standard errors either way)
    repeats = 3000
    bound = -0.8 if worse == "lower" else 0.8

    def draw(rng):
        return rng.normal(bound, sd1, n1), rng.normal(0.0, sd2, n2)

    rate = _rate(7, repeats, draw, lambda x, y: noninferiority_t(x, y, margin=0.8, worse=worse))
    assert abs(rate - ALPHA) <= 3 * _se(repeats)


def test_the_rank_non_inferiority_test_rejects_at_most_alpha_at_the_margin():
    # groups of one shape, group 1 shifted to the margin's worse end: the exact Mann-Whitney
    # test of x - end against y has size at most alpha (its law is discrete)
    repeats = 600

    def draw(rng):
        return rng.standard_t(4, 10) - 0.7, rng.standard_t(4, 12)

    rate = _rate(8, repeats, draw,
                 lambda x, y: noninferiority_ranks(x, y, margin=0.7, worse="lower", method="exact"))
    assert rate <= ALPHA + 3 * _se(repeats)


def test_the_log_scale_test_rejects_at_most_alpha_at_the_ratio_margin():
    # the ratio of the true geometric means on the margin's upper end 1.25; the far end 0.8
    # makes the two one-sided tests conservative only by a little at these sizes
    repeats = 2000

    def draw(rng):
        return rng.lognormal(np.log(1.25), 0.2, 15), rng.lognormal(0.0, 0.3, 18)

    rate = _rate(9, repeats, draw, lambda x, y: equivalence_log_t(x, y, low=0.8, high=1.25))
    assert rate <= ALPHA + 3 * _se(repeats)
    assert rate >= ALPHA - 4 * _se(repeats)


@pytest.mark.parametrize("n", [8, 400])
def test_the_paired_non_inferiority_t_keeps_alpha_at_the_margin(n):
    # normal differences centred on the margin's worse end: the one-sided t-test is exact
    repeats = 3000

    def draw(rng):
        base = rng.normal(20.0, 4.0, n)
        return base - 0.5 + rng.normal(0.0, 1.0, n), base

    rate = _rate(10, repeats, draw, lambda x, y: paired_noninferiority(x, y, margin=0.5, worse="lower"))
    assert abs(rate - ALPHA) <= 3 * _se(repeats)


def test_the_signed_rank_non_inferiority_test_rejects_at_most_alpha_at_the_margin():
    # differences symmetric about the margin's worse end (the signed-rank null there)
    repeats = 600

    def draw(rng):
        base = rng.normal(20.0, 4.0, 12)
        return base + 0.6 + rng.laplace(0.0, 1.0, 12), base

    rate = _rate(11, repeats, draw,
                 lambda x, y: paired_noninferiority_ranks(x, y, margin=0.6, worse="higher"))
    assert rate <= ALPHA + 3 * _se(repeats)
