"""Holm and Benjamini-Hochberg adjusted p-values against statsmodels, and their promises (family-wise
error, false discovery rate) by seeded simulation."""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats
from statsmodels.stats.multitest import multipletests

from engine.errors import OptionProblem
from engine.multiplicity import adjusted, benjamini_hochberg, bonferroni_level, holm

SM_METHOD = {"holm": "holm", "bh": "fdr_bh"}


@pytest.mark.parametrize("method", ["holm", "bh"])
@pytest.mark.parametrize("m", [1, 2, 5, 20, 137])
def test_adjusted_p_values_match_statsmodels_multipletests(method, m):
    rng = np.random.default_rng(m)
    # statsmodels' holm takes about 0.1 s a call: fewer draws for it
    for _ in range(4 if method == "holm" else 30):
        p = rng.uniform(size=m) ** rng.uniform(0.2, 3)
        if m > 3:  # ties, zeros and ones too
            p[: m // 3] = p[m // 3]
            p[-1], p[-2] = 0.0, 1.0
            rng.shuffle(p)
        # reference: statsmodels.stats.multitest.multipletests(p, method='holm' | 'fdr_bh')
        reference = multipletests(p, alpha=0.05, method=SM_METHOD[method])[1]
        ours = adjusted(p, method)
        np.testing.assert_allclose(ours, reference, rtol=1e-12, atol=0)


def test_named_functions_are_the_two_adjustments():
    p = [0.01, 0.04, 0.03, 0.005]
    # statsmodels.stats.multitest.multipletests(p, method='holm') -> [0.03, 0.06, 0.06, 0.02]
    np.testing.assert_allclose(holm(p), [0.03, 0.06, 0.06, 0.02], rtol=1e-12)
    # statsmodels.stats.multitest.multipletests(p, method='fdr_bh') -> [0.02, 0.04, 0.04, 0.02]
    np.testing.assert_allclose(benjamini_hochberg(p), [0.02, 0.04, 0.04, 0.02], rtol=1e-12)


def test_bonferroni_level_and_bad_input():
    assert bonferroni_level(0.95, 20) == pytest.approx(1 - 0.05 / 20, rel=1e-15)
    assert bonferroni_level(0.95, 1) == 0.95
    with pytest.raises(OptionProblem, match="from 0 to 1"):
        holm([0.1, 1.2])
    with pytest.raises(OptionProblem, match="'holm' or 'bh'"):
        adjusted([0.1], "sidak")


# --- the promises, by simulation ---------------------------------------------------------------

M, NULLS, N_PER_GROUP, SHIFT = 20, 12, 20, 0.8


def simulated_p_values(rng: np.random.Generator, reps: int) -> np.ndarray:
    """Welch t p-values (scipy.stats.ttest_ind, equal_var=False) of M independent outcomes per
    replication, the first NULLS without a difference, the rest shifted by SHIFT SDs."""
    x = rng.normal(size=(reps, M, N_PER_GROUP))
    y = rng.normal(size=(reps, M, N_PER_GROUP))
    x[:, NULLS:, :] += SHIFT
    return stats.ttest_ind(x, y, axis=2, equal_var=False).pvalue


def error_rates(p: np.ndarray, alpha: float = 0.05) -> dict[str, np.ndarray]:
    """Per replication: any false finding (Holm, raw) and the false share among findings (BH)."""
    holm_false = np.array([(holm(row)[:NULLS] < alpha).any() for row in p])
    raw_false = (p[:, :NULLS] < alpha).any(axis=1)
    bh = np.array([benjamini_hochberg(row) < alpha for row in p])
    found = bh.sum(axis=1)
    false_share = np.where(found > 0, bh[:, :NULLS].sum(axis=1) / np.maximum(found, 1), 0.0)
    return dict(holm=holm_false, raw=raw_false, fdp=false_share)


@pytest.mark.slow
def test_holm_keeps_family_wise_error_and_bh_the_false_discovery_rate():
    rng = np.random.default_rng(20261203)
    reps = 4000
    rates = error_rates(simulated_p_values(rng, reps))
    alpha = 0.05
    fwer = rates["holm"].mean()
    se = np.sqrt(alpha * (1 - alpha) / reps)
    # Holm (1979): FWER <= alpha; and at least Bonferroni's 1 - (1 - alpha/M)^NULLS (independent tests)
    bonferroni = 1 - (1 - alpha / M) ** NULLS
    assert bonferroni - 3 * se <= fwer <= alpha + 3 * se
    # unadjusted, the family-wise error is 1 - (1 - alpha)^NULLS = 0.46 (the test can tell)
    assert abs(rates["raw"].mean() - (1 - (1 - alpha) ** NULLS)) < 4 * np.sqrt(0.25 / reps)
    # Benjamini and Hochberg (1995): for independent tests FDR = alpha * NULLS / M exactly
    fdr, fdr_se = rates["fdp"].mean(), rates["fdp"].std(ddof=1) / np.sqrt(reps)
    assert abs(fdr - alpha * NULLS / M) < 3.5 * fdr_se
