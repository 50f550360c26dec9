"""The direction sentence of the rank procedures follows U, and claims only what the test shows.

Reference: U1 / (n1 n2), the share of pairs in which group 1 gives the larger value (ties half),
counted directly; p-values from scipy.stats.mannwhitneyu where the data have no ties.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy import stats

from engine import report
from engine.analysis import analyze
from engine.question import Question
from engine.spec import AnalysisSpec, Statements
from engine.results import Groups


def _spec(alternative="two-sided", **statements):
    return AnalysisSpec(seed=1, resamples=200, question=Question.from_alternative(alternative),
                        statements=Statements(**statements))


def _analysis(x, y, **options):
    return analyze(Groups(("A", "B"), x, y), _spec(**options))


def _share(x, y):
    x, y = np.asarray(x, float), np.asarray(y, float)
    return (np.sum(x[:, None] > y[None, :]) + 0.5 * np.sum(x[:, None] == y[None, :])) / (x.size * y.size)


@pytest.mark.parametrize("key", ["mann_whitney", "brunner_munzel"])
def test_equal_medians_and_no_clear_test_give_a_description_not_a_tendency(key):
    # the shift estimate is 1.00 here, yet the medians are equal and p = 0.75
    x, y = [2, 3, 4, 6, 7], [1, 3, 4, 5, 6]
    text = report.render(_analysis(x, y, ordinal=True), procedure=key).paragraph
    assert "tended to be" not in text
    assert text.startswith("In these samples, values of A")
    assert f"in {100 * _share(x, y):.0f}% of pairs (ties counting half)" in text


@pytest.mark.parametrize("key", ["mann_whitney", "brunner_munzel"])
def test_a_clear_test_with_a_zero_shift_still_says_which_group_was_higher(key):
    # Hodges-Lehmann shift 0 while the tie-aware exact test rejects (p = 0.0087)
    x, y = [4.0] * 16 + [5.0] * 4, [3.0] * 4 + [4.0] * 16
    analysis = _analysis(x, y, ordinal=True)
    assert analysis.procedures[key].p_value < 0.05
    text = report.render(analysis, procedure=key).paragraph
    assert "Values of A (median" in text and "tended to be higher than those of B" in text
    assert "neither higher nor lower" not in text


def test_lower_and_half_shares():
    rng = np.random.default_rng(3)
    x, y = rng.normal(0, 1, 30), rng.normal(2, 1, 30)
    assert stats.mannwhitneyu(x, y).pvalue < 0.05  # reference: scipy
    text = report.render(_analysis(x, y), procedure="mann_whitney").paragraph
    assert "tended to be lower than those of B" in text
    half = report.render(_analysis([1.0, 2.0, 3.0, 4.0], [1.5, 3.5, 2.0, 3.0]),
                         procedure="mann_whitney").paragraph
    assert _share([1.0, 2.0, 3.0, 4.0], [1.5, 3.5, 2.0, 3.0]) == 0.5
    assert "in as many pairs as they were lower" in half


def test_a_share_near_one_half_never_reads_fifty_percent():
    assert report._pair_share(0.5) == "50%"
    assert report._pair_share(0.501) == "50.1%"
    assert report._pair_share(0.49996) == "49.996%"
    assert report._pair_share(0.5 + 1e-9) == "just over 50%"


def test_an_interval_end_the_test_rejects_is_written_as_left_out():
    x, y = [4.0] * 16 + [5.0] * 4, [3.0] * 4 + [4.0] * 16
    text = report.render(_analysis(x, y, ordinal=True), procedure="mann_whitney").paragraph
    assert "Hodges-Lehmann shift 0.00, 95% CI from above 0.00 to 1.00" in text
    one_sided = report.render(_analysis(x, y, ordinal=True, alternative="greater"),
                              procedure="mann_whitney").paragraph
    assert "one-sided 95% CI above 0;" in one_sided


def test_an_open_end_away_from_zero_reads_as_a_plain_interval():
    # values to one decimal: the inverted test leaves an end out, but only an end at 0 (no
    # difference) changes the reading, so the interval reads "a to b" as it usually would
    rng = np.random.default_rng(0)
    x, y = rng.normal(12.0, 1.0, 15).round(1), rng.normal(10.0, 1.0, 15).round(1)
    analysis = _analysis(list(x), list(y))
    result = analysis.procedures["mann_whitney"]
    assert result.interval.high_open and result.interval.high != 0
    text = report.render(analysis, procedure="mann_whitney").paragraph
    assert " CI from above" not in text and " to below " not in text
    assert report.format_interval(result.interval) in text
