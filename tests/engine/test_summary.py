"""engine.summary.summarize against numpy/pandas and the NIST StRD AtmWtAg certified values."""

from __future__ import annotations

import math
import os
import re
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
import scipy

from engine.results import GroupSummary
from engine.summary import centred_variance, summarize


@pytest.mark.parametrize("seed, n", [(1, 2), (2, 7), (3, 50), (4, 1001)])
def test_summary_against_numpy_and_pandas(seed, n):
    rng = np.random.default_rng(seed)
    values = rng.lognormal(3.0, 0.6, n)
    summary = summarize("adhesive", values)
    assert isinstance(summary, GroupSummary)
    assert (summary.label, summary.n) == ("adhesive", n)
    # reference: numpy mean, std(ddof=1), median, min, max, quantile (linear, type 7)
    assert summary.mean == pytest.approx(np.mean(values), rel=1e-13)
    assert summary.sd == pytest.approx(np.std(values, ddof=1), rel=1e-12)
    assert summary.median == pytest.approx(np.median(values), rel=1e-14)
    assert (summary.min, summary.max) == (values.min(), values.max())
    # reference: pandas.Series.describe (also type 7 quartiles)
    described = pd.Series(values).describe()
    assert summary.q1 == pytest.approx(described["25%"], rel=1e-14)
    assert summary.q3 == pytest.approx(described["75%"], rel=1e-14)
    assert summary.sd == pytest.approx(described["std"], rel=1e-12)


def test_summary_of_one_and_of_none():
    one = summarize("solo", np.array([4.5]))
    assert (one.n, one.mean, one.median, one.min, one.max) == (1, 4.5, 4.5, 4.5, 4.5)
    assert math.isnan(one.sd)
    empty = summarize("none", np.array([]))
    assert empty.n == 0 and math.isnan(empty.mean) and math.isnan(empty.q3)


def test_variance_with_many_constant_leading_digits():
    # values with nine shared leading digits: the one-pass formula loses them, two-pass does not
    rng = np.random.default_rng(9)
    values = 1e9 + rng.normal(0, 1e-3, 200)
    # reference: numpy's two-pass var(ddof=1) on the deviations from a rounded offset
    expected = np.var(values - 1e9, ddof=1)
    assert centred_variance(values) == pytest.approx(expected, rel=1e-6)


def _nist_atmwtag() -> tuple[dict[str, float], np.ndarray, np.ndarray]:
    path = Path(os.path.dirname(scipy.__file__)) / "stats/tests/data/nist_anova/AtmWtAg.dat"
    if not path.is_file():
        pytest.skip(f"the NIST StRD AtmWtAg data are not installed with scipy here ({path})")
    lines = path.read_text().splitlines()
    certified = {}
    for line in lines:
        within = re.match(r"\s*Within Instrument\s+(\d+)\s+(\S+)\s+(\S+)", line)
        if within:
            certified["df"], certified["ss"], certified["ms"] = float(within[1]), float(within[2]), float(within[3])
        sd = re.match(r"\s*Standard Deviation\s+(\S+)", line)
        if sd:
            certified["residual_sd"] = float(sd[1])
    start = next(i for i, line in enumerate(lines) if line.startswith("Data:  Instrument"))
    rows = [line.split() for line in lines[start + 1:] if line.strip()]
    instrument = np.array([int(r[0]) for r in rows])
    weight = np.array([float(r[1]) for r in rows])
    return certified, weight[instrument == 1], weight[instrument == 2]


def test_pooled_variance_against_nist_atmwtag():
    # reference: NIST StRD, Analysis of Variance, data set AtmWtAg (certified values in the
    # file's header): within-instrument mean square 2.28155932971014E-10 with 46 df
    certified, first, second = _nist_atmwtag()
    assert (first.size, second.size) == (24, 24)
    a, b = summarize("instrument 1", first), summarize("instrument 2", second)
    pooled = ((a.n - 1) * a.sd ** 2 + (b.n - 1) * b.sd ** 2) / (a.n + b.n - 2)
    assert a.n + b.n - 2 == certified["df"]
    assert pooled == pytest.approx(certified["ms"], rel=1e-10)  # at least 10 significant digits
    assert math.sqrt(pooled) == pytest.approx(certified["residual_sd"], rel=1e-10)


def test_summary_with_a_sorted_copy_is_identical():
    rng = np.random.default_rng(11)
    values = rng.gamma(2.0, 3.0, 2001)
    # reference: numpy quantile (linear, type 7) on the unsorted values, min and max
    assert summarize("bolts", values, ordered=np.sort(values)) == summarize("bolts", values)
    q1, q3 = np.quantile(values, [0.25, 0.75])
    given = summarize("bolts", values, ordered=np.sort(values))
    assert (given.q1, given.q3, given.min, given.max) == (q1, q3, values.min(), values.max())


@pytest.mark.parametrize("bad", ["unsorted", "short"])
def test_summary_refuses_a_sorted_copy_that_does_not_match(bad):
    from engine.errors import OptionProblem
    values = np.array([3.0, 1.0, 2.0, 5.0])
    ordered = values if bad == "unsorted" else np.sort(values)[:3]
    with pytest.raises(OptionProblem, match="sorted copy of group 'bolts'"):
        summarize("bolts", values, ordered=ordered)


def test_sd_of_huge_finite_values_is_finite():
    # reference: hand computation: the SD of 3.5 and 1e308 is |1e308 - 3.5| / sqrt(2), about
    # 7.07e307, which fits a float although its square does not
    import math
    import warnings

    with warnings.catch_warnings():
        warnings.simplefilter("error")  # no numpy RuntimeWarning either
        summary = summarize("a", np.array([3.5, 1e308]))
    assert summary.sd == pytest.approx(1e308 / math.sqrt(2), rel=1e-15)
    assert summary.mean == pytest.approx(5e307, rel=1e-15)
    assert summary.median == pytest.approx(5e307, rel=1e-15)
