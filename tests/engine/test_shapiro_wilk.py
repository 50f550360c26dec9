"""The Shapiro-Wilk check (Royston's AS R94) against scipy, the exact law for n = 3 and a published example."""

import math

import numpy as np
import pytest
from scipy import stats

from engine.shapiro_wilk import shapiro_wilk


@pytest.mark.parametrize("n", [4, 5, 6, 7, 11, 12, 20, 50, 200, 1000, 5000])
def test_w_and_p_match_scipy(n):
    # reference: scipy.stats.shapiro, the same algorithm (AS R94); scipy's normal scores come
    # from a shorter approximation of the normal quantile than scipy.special.ndtri, which moves
    # W in about the ninth digit and p in about the seventh
    rng = np.random.default_rng(n)
    for values in (rng.normal(50.0, 4.0, n), rng.lognormal(0.0, 0.7, n), rng.standard_t(3, n)):
        w, p = shapiro_wilk(np.sort(values))
        expected = stats.shapiro(values)
        assert w == pytest.approx(expected.statistic, rel=1e-8)
        assert p == pytest.approx(expected.pvalue, rel=2e-6, abs=1e-300)


def test_three_values_follow_the_exact_law():
    # reference: for n = 3, W = (x3 - x1)^2 / (2 S) with S the sum of squared deviations,
    # worked by hand for 1, 2, 4: 9 / (2 * 42/9) = 27/28; and P(W <= w) = 6/pi (arcsin sqrt(w)
    # - pi/3) exactly (Shapiro and Wilk 1965)
    w, p = shapiro_wilk(np.array([1.0, 2.0, 4.0]))
    assert w == pytest.approx(27 / 28, rel=1e-15)
    assert p == pytest.approx(6 / math.pi * (math.asin(math.sqrt(27 / 28)) - math.pi / 3), rel=1e-14)


def test_the_weights_of_eleven_men_from_the_original_paper():
    # reference: Shapiro and Wilk (1965), Biometrika 52, 591-611, the worked example of 11
    # weights in pounds: W = 0.79, below the 1% point 0.792 (recalled from memory)
    weights = np.array([148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236], dtype=float)
    w, p = shapiro_wilk(weights)
    assert round(w, 2) == 0.79
    assert p < 0.01


def test_neither_scale_nor_shift_changes_w():
    # W is invariant under x -> a x + b (Shapiro and Wilk 1965)
    values = np.sort(np.random.default_rng(8).gamma(2.0, 3.0, 40))
    w, p = shapiro_wilk(values)
    for a, b in ((1e-6, 3.0), (2.0**40, -1e5)):
        other = shapiro_wilk(a * values + b)
        assert other == pytest.approx((w, p), rel=1e-9)
