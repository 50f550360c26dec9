"""Two one-sided t-tests against statsmodels and against their interval duality."""

import numpy as np
import pytest
from statsmodels.stats.weightstats import ttost_ind, ttest_ind

from engine.errors import OptionProblem
from engine.procedures.equivalence import equivalence_t, noninferiority_t


def _samples(seed, n1=14, n2=19, shift=0.4):
    rng = np.random.default_rng(seed)
    return rng.normal(10.0, 1.2, n1), rng.normal(10.0 + shift, 2.0, n2)


@pytest.mark.parametrize("spread, usevar", [("welch", "unequal"), ("pooled", "pooled")])
@pytest.mark.parametrize("seed", range(6))
def test_both_one_sided_p_values_match_statsmodels(spread, usevar, seed):
    # reference: statsmodels.stats.weightstats.ttost_ind (Schuirmann's two one-sided tests)
    x, y = _samples(seed)
    low, high = -1.1, 0.8
    p, (t1, p1, df1), (t2, p2, df2) = ttost_ind(x, y, low, high, usevar=usevar)
    ours = equivalence_t(x, y, low=low, high=high, spread=spread)
    assert ours.p_value == pytest.approx(p, rel=1e-10, abs=1e-300)
    assert ours.details["p_lower"] == pytest.approx(p1, rel=1e-10, abs=1e-300)
    assert ours.details["p_upper"] == pytest.approx(p2, rel=1e-10, abs=1e-300)
    assert ours.details["t_lower"] == pytest.approx(t1, rel=1e-10)
    assert ours.details["t_upper"] == pytest.approx(t2, rel=1e-10)
    assert ours.df == pytest.approx(df1, rel=1e-10)


@pytest.mark.parametrize("seed", range(20))
def test_equivalence_at_alpha_is_the_1_minus_2_alpha_interval_inside_the_margin(seed):
    # the duality of the two one-sided tests (Schuirmann 1987, Journal of Pharmacokinetics and
    # Biopharmaceutics 15:657): p < alpha exactly when the (1 - 2 alpha) interval lies inside
    x, y = _samples(seed, shift=0.1 * (seed % 7) - 0.3)
    for low, high in ((-0.5, 0.5), (-1.0, 1.5), (-2.0, 0.3)):
        result = equivalence_t(x, y, low=low, high=high, confidence_level=0.95)
        inside = low < result.interval.low and result.interval.high < high
        assert result.interval.level == pytest.approx(0.90)
        assert (result.p_value < 0.05) == inside


@pytest.mark.parametrize("worse, alternative, sign", [("lower", "larger", -1), ("higher", "smaller", 1)])
def test_non_inferiority_is_one_shifted_one_sided_test(worse, alternative, sign):
    # reference: statsmodels ttest_ind with the null difference at the margin (value=...)
    x, y = _samples(3)
    margin = 0.9
    _, p, _ = ttest_ind(x, y, alternative=alternative, usevar="unequal", value=sign * margin)
    ours = noninferiority_t(x, y, margin=margin, worse=worse)
    assert ours.p_value == pytest.approx(p, rel=1e-10)


@pytest.mark.parametrize("call, words", [
    (lambda x, y: equivalence_t(x, y, low=1.0, high=-1.0), "lower end"),
    (lambda x, y: equivalence_t(x, y, low=-1.0, high=float("inf")), "finite"),
    (lambda x, y: equivalence_t(x, y, low=-1.0, high=1.0, spread="mixed"), "spread"),
    (lambda x, y: noninferiority_t(x, y, margin=-2.0, worse="lower"), "positive"),
    (lambda x, y: noninferiority_t(x, y, margin=2.0, worse="bigger"), "worse"),
])
def test_bad_margins_are_refused_with_a_sentence(call, words):
    x, y = _samples(1)
    with pytest.raises(OptionProblem, match=words):
        call(x, y)
