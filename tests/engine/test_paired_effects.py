"""d_z and d_av of paired data against hand computation and scipy.stats.nct."""

import math

import numpy as np
import pytest
from scipy import stats

from engine.errors import DataProblem
from engine.paired_effects import paired_d_av, paired_d_z, paired_effect_sizes

# Six invented bolt pairs, before and after a coating (group 1 after, group 2 before).
AFTER = [12.1, 11.4, 13.0, 12.6, 11.9, 12.8]
BEFORE = [11.5, 11.2, 12.1, 12.4, 11.0, 12.3]


def test_d_z_by_hand():
    # hand computation: d = 0.6, 0.2, 0.9, 0.2, 0.9, 0.5; mean 3.3 / 6 = 0.55;
    # squared deviations 0.0025, 0.1225, 0.1225, 0.1225, 0.1225, 0.0025 sum 0.495;
    # sd = sqrt(0.495 / 5) = sqrt(0.099)
    result = paired_d_z(AFTER, BEFORE)
    assert result.value == pytest.approx(0.55 / math.sqrt(0.099), rel=1e-12)
    assert result.details["df"] == 5
    assert result.details["t"] == pytest.approx(0.55 / math.sqrt(0.099) * math.sqrt(6), rel=1e-12)


@pytest.mark.parametrize("level", [0.9, 0.95, 0.99])
@pytest.mark.parametrize("seed", [1, 2, 3])
def test_d_z_interval_puts_the_observed_t_at_the_nct_quantiles(level, seed):
    # reference: scipy.stats.nct: at the lower end the observed t is the 1 - alpha/2 quantile,
    # at the upper end the alpha/2 quantile
    rng = np.random.default_rng(seed)
    x = rng.normal(1.0, 1.0, 14)
    y = x - rng.normal(0.5, 1.0, 14)
    result = paired_d_z(x, y, confidence_level=level)
    n, t, alpha = 14, result.details["t"], 1 - level
    low, high = result.interval.low * math.sqrt(n), result.interval.high * math.sqrt(n)
    assert stats.nct.cdf(t, n - 1, low) == pytest.approx(1 - alpha / 2, abs=1e-9)
    assert stats.nct.cdf(t, n - 1, high) == pytest.approx(alpha / 2, abs=1e-9)


def test_d_z_one_sided_interval_opens_one_end():
    # reference: scipy.stats.nct, the whole alpha in the one tail
    result = paired_d_z(AFTER, BEFORE, alternative="greater", confidence_level=0.95)
    assert result.interval.high is None
    nc = result.interval.low * math.sqrt(6)
    assert stats.nct.cdf(result.details["t"], 5, nc) == pytest.approx(0.95, abs=1e-9)


def test_d_av_by_hand_and_labelled_apart_from_d_z():
    # hand computation with numpy's sample SDs (ddof=1)
    sd_1, sd_2 = np.std(AFTER, ddof=1), np.std(BEFORE, ddof=1)
    result = paired_d_av(AFTER, BEFORE)
    assert result.value == pytest.approx(0.55 / ((sd_1 + sd_2) / 2), rel=1e-12)
    assert result.details["interval_approximate"] is True
    z = paired_d_z(AFTER, BEFORE)
    assert result.key != z.key and result.name != z.name
    assert "d_av" in result.name and "d_z" in z.name
    assert "approximate" in result.method
    # the rescaled interval: d_z's ends times sd(d) / average SD
    factor = math.sqrt(0.099) / ((sd_1 + sd_2) / 2)
    assert result.interval.low == pytest.approx(z.interval.low * factor, rel=1e-12)
    assert result.interval.high == pytest.approx(z.interval.high * factor, rel=1e-12)


def test_intervals_cover_at_about_the_stated_level():
    # coverage by simulation (seeded): bivariate normal pairs, equal SDs, correlation 0.5;
    # d_z's interval is exact (coverage 0.95 within Monte Carlo error, 3 SE = 0.015 at 2000
    # runs); d_av's is approximate: within 0.03 of 0.95 here
    rng = np.random.default_rng(2026)
    n, runs, rho, shift = 12, 2000, 0.5, 0.6
    true_d_z = shift / math.sqrt(2 - 2 * rho)
    true_d_av = shift
    cover_z = cover_av = 0
    for _ in range(runs):
        common = rng.normal(size=n)
        x = shift + math.sqrt(rho) * common + math.sqrt(1 - rho) * rng.normal(size=n)
        y = math.sqrt(rho) * common + math.sqrt(1 - rho) * rng.normal(size=n)
        cover_z += paired_d_z(x, y).interval.contains(true_d_z)
        cover_av += paired_d_av(x, y).interval.contains(true_d_av)
    assert abs(cover_z / runs - 0.95) < 0.015
    assert abs(cover_av / runs - 0.95) < 0.03


def test_constant_differences_leave_both_out_with_reasons():
    sizes, reasons = paired_effect_sizes([1.0, 2.0, 4.0], [0.0, 1.0, 3.0])
    assert sizes == {}
    assert set(reasons) == {"paired_d_z", "paired_d_av"}
    with pytest.raises(DataProblem, match="no spread"):
        paired_d_z([1.0, 2.0, 4.0], [0.0, 1.0, 3.0])
