"""Equivalence on a published data set against an independent implementation.

The "clinic" data: 30 patients in two groups of 15 (columns var1 and var2 of the data set as it
ships with the statsmodels test suite, statsmodels/stats/tests/test_tost.py), with the reference
values of two one-sided tests that the same file records (Welch and pooled, margin +-0.6; and on
the log scale with margin log 1.25). These are a reference library's recorded values on real data,
not a textbook's worked example.
"""

import math

import pytest

from engine.procedures.equivalence import equivalence_t
from engine.procedures.equivalence_intervals import equivalence_log_t
from engine.question import Margin, Question

VAR1 = [2.84, 2.51, 2.41, 2.95, 3.14, 3.79, 4.14, 3.85, 3.02, 3.45, 5.37, 3.81, 4.19, 3.16, 3.84, 2.60, 2.82, 2.18, 3.46, 4.01, 3.04, 3.47, 4.06, 2.91, 3.59, 4.51, 3.16, 3.86, 3.31, 3.02]
VAR2 = [4.00, 3.26, 4.14, 3.42, 3.25, 4.34, 4.97, 4.31, 3.11, 3.41, 5.02, 4.21, 4.59, 5.30, 4.32, 3.76, 3.66, 3.65, 3.60, 3.48, 2.87, 3.24, 3.92, 3.99, 4.21, 4.21, 3.31, 3.61, 2.97, 2.73]
LABELS = ("group 1", "group 2")


def _split(values):
    return values[:15], values[15:]


@pytest.mark.parametrize("values, spread, p, low, high, df, case", [
    # statsmodels test_tost.py reference, var1 split 15/15, margin 0.6: equivalence shown
    (VAR1, "welch", 0.04853083976236974, -0.2666862980722534, 0.596019631405587, 26.7484787582315,
     "equivalent"),
    # the same with var.equal = TRUE
    (VAR1, "pooled", 0.04827315100761467, -0.2659960620757337, 0.595329395409067, 28, "equivalent"),
    # statsmodels test_tost.py reference, var2 split 15/15, margin 0.6: equivalence not shown
    (VAR2, "welch", 0.4317936812594803, 0.194916250699966, 0.930417082633366, 24.11000151062728,
     "different_not_equivalent"),
    (VAR2, "pooled", 0.43169347692374, 0.1969453064978777, 0.928388026835454, 28,
     "different_not_equivalent"),
])
def test_the_clinic_data_match_the_recorded_reference(values, spread, p, low, high, df, case):
    x, y = _split(values)
    result = equivalence_t(x, y, low=-0.6, high=0.6, spread=spread)
    assert result.p_value == pytest.approx(p, rel=1e-9)
    assert (result.interval.low, result.interval.high) == pytest.approx((low, high), rel=1e-9)
    assert result.df == pytest.approx(df, rel=1e-9)
    question = Question("equivalent", 0.95, Margin.within(0.6))
    wide = equivalence_t(x, y, low=-0.6, high=0.6, spread=spread, confidence_level=0.975).interval
    answer = question.margin_answer(result.interval, wide)
    assert answer.case == case
    words = question.margin_words(answer, LABELS)
    assert words.startswith("Equivalent within" if answer.yes else "Not shown to be equivalent")


def test_the_clinic_data_on_the_log_scale_match_rs_equivalence_package():
    # statsmodels test_tost.py reference, log(var1) split 15/15, margin log 1.25: equivalence shown
    x, y = _split(VAR1)
    result = equivalence_log_t(x, y, low=0.8, high=1.25)
    assert result.p_value == pytest.approx(0.01047085593138891, rel=1e-9)
    assert result.details["log_difference"] == pytest.approx(0.04312233182252334, rel=1e-9)
    assert (math.log(result.interval.low), math.log(result.interval.high)) == pytest.approx(
        (-0.0819851930203655, 0.1682298566654122), rel=1e-9)
    assert result.df == pytest.approx(27.61177037646526, rel=1e-9)
