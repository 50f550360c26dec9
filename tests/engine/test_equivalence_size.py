"""The Welch two one-sided tests keep their level when the true difference sits on the margin."""

import math

import numpy as np
import pytest

from engine.procedures.equivalence import equivalence_t

REPEATS = 2_500
ALPHA = 0.05
# Monte Carlo standard error of a rejection rate near alpha (binomial).
SE = math.sqrt(ALPHA * (1 - ALPHA) / REPEATS)


def _rejection_rate(seed, n1, n2, sd1, sd2, low, high, true_difference):
    rng = np.random.default_rng(seed)
    rejected = 0
    for _ in range(REPEATS):
        x = rng.normal(true_difference, sd1, n1)
        y = rng.normal(0.0, sd2, n2)
        rejected += equivalence_t(x, y, low=low, high=high, confidence_level=1 - ALPHA).p_value < ALPHA
    return rejected / REPEATS


@pytest.mark.parametrize("n1, n2, sd1, sd2, low, high, at", [
    (6, 9, 1.0, 3.0, -5.0, 5.0, "high"),    # margin wide against the standard error: near alpha
    (12, 7, 2.5, 1.0, -4.0, 6.0, "low"),
    (6, 9, 1.0, 3.0, -1.0, 1.0, "high"),    # margin narrow: far below alpha
])
def test_small_samples_reject_at_most_alpha_on_the_margin(n1, n2, sd1, sd2, low, high, at):
    # the two one-sided tests are an intersection-union test of size at most alpha (Berger and
    # Hsu 1996, Statistical Science 11:283); Welch's approximation keeps it close (common practice:
    # within three Monte Carlo standard errors)
    rate = _rejection_rate(11, n1, n2, sd1, sd2, low, high, high if at == "high" else low)
    assert rate <= ALPHA + 3 * SE
    if high - low > 5:
        assert rate >= ALPHA - 4 * SE  # not conservative where the other end is far away


@pytest.mark.parametrize("true_difference", [-0.3, 0.3])
def test_large_samples_reject_near_alpha_on_the_margin(true_difference):
    # with the margin wide against the standard error only the one-sided test at the near end
    # matters, and its size is alpha (Schuirmann 1987); within four Monte Carlo standard errors
    rate = _rejection_rate(5, 400, 300, 1.0, 2.0, -0.3, 0.3, true_difference)
    assert abs(rate - ALPHA) <= 4 * SE
