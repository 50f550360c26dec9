"""The sign-flip permutation test of paired differences, against scipy.stats.permutation_test."""

import numpy as np
import pytest
from scipy import stats

from engine.errors import Cancelled
from engine.procedures.sign_flip import sign_flip_test


def _scipy_p(x, y, alternative, n_resamples, rng=None):
    # reference: scipy.stats.permutation_test with permutation_type="samples" swaps the two
    # measurements within pairs, i.e. flips the sign of each difference
    result = stats.permutation_test((x, y), lambda a, b, axis: np.mean(a - b, axis=axis),
                                    permutation_type="samples", alternative=alternative,
                                    n_resamples=n_resamples, vectorized=True, random_state=rng)
    return result.pvalue


@pytest.mark.parametrize("alternative", ["two-sided", "less", "greater"])
@pytest.mark.parametrize("n", [2, 5, 9, 12])
def test_every_pattern_counted_gives_scipys_exact_p_value(alternative, n):
    rng = np.random.default_rng(n)
    x = rng.normal(10, 1, n)
    y = x - rng.normal(0.4, 1, n)
    ours = sign_flip_test(x - y, alternative=alternative, n_resamples=10_000)
    assert ours.details["exact"]
    assert ours.p_value == pytest.approx(_scipy_p(x, y, alternative, np.inf), rel=1e-12)


def test_ties_within_rounding_count_as_extreme():
    # differences whose patterns give sums equal to the observed one up to rounding
    d = np.array([0.1, 0.2, 0.3, -0.6, 0.1, 0.2])
    x, y = d, np.zeros_like(d)
    for alternative in ("two-sided", "less", "greater"):
        ours = sign_flip_test(d, alternative=alternative, n_resamples=1000).p_value
        assert ours == pytest.approx(_scipy_p(x, y, alternative, np.inf), rel=1e-12)


@pytest.mark.parametrize("alternative", ["two-sided", "greater"])
def test_random_patterns_agree_with_scipy_within_monte_carlo_error(alternative):
    rng = np.random.default_rng(3)
    x = rng.normal(0, 1, 300)
    y = x - rng.normal(0.12, 1, 300)
    ours = sign_flip_test(x - y, alternative=alternative, n_resamples=20_000,
                          rng=np.random.default_rng(1))
    reference = _scipy_p(x, y, alternative, 20_000, np.random.default_rng(2))
    assert not ours.details["exact"]
    # two independent Monte Carlo estimates: their difference within 4 combined standard errors
    se = np.sqrt(2 * reference * (1 - reference) / 20_000)
    assert abs(ours.p_value - reference) < 4 * se + 1e-4


def test_the_same_seed_gives_the_same_p_value_and_cancel_stops():
    d = np.random.default_rng(8).normal(0.1, 1, 500)
    first = sign_flip_test(d, n_resamples=5000, rng=np.random.default_rng(4))
    again = sign_flip_test(d, n_resamples=5000, rng=np.random.default_rng(4))
    assert first.p_value == again.p_value
    with pytest.raises(Cancelled):
        sign_flip_test(d, n_resamples=5000, cancelled=lambda: True)
