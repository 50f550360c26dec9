"""Display rounding: never a changed sign, never a false certainty, never distinct values alike."""

import math

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from engine import report
from engine.spec import AnalysisSpec
from engine.rounding import fixed, format_number, format_p, shared_decimals

_FINITE = st.floats(allow_nan=False, allow_infinity=False, min_value=-1e300, max_value=1e300)
_NONZERO = _FINITE.filter(lambda v: v != 0 and abs(v) > 1e-300)


def _sign_of_text(text: str) -> int:
    value = float(text)
    return (value > 0) - (value < 0)


def _sign(value: float) -> int:
    return (value > 0) - (value < 0)


# -- the cases that were reported -----------------------------------------------------------------

def test_a_small_negative_limit_keeps_its_sign():
    # a rank-biserial lower limit of -0.0023 shown with the two decimals of effect sizes
    assert fixed(-0.0023, 2) in ("-0.002", "-0.0023")
    assert fixed(0.0023, 2) in ("0.002", "0.0023")
    assert fixed(-3e-7, 2) == "-3e-07"


@pytest.mark.parametrize("p, text", [
    (0.9965, "0.997"),          # two digits would claim "1.0"
    (0.9949, "0.99"),
    (0.99951, "> 0.999"),       # the mirror of "< 0.001"
    (1 - 1e-12, "> 0.999"),
    (1.0, "1.0"),               # exactly one may say so
])
def test_a_large_p_value_never_reads_as_certain(p, text):
    # convention: the APA floor "< .001" mirrored at the top (common practice)
    assert format_p(p) == text
    assert report.p_clause(0.99999) == "p > 0.999"


def test_values_near_a_billion_are_told_apart():
    values = [1e9 + 2.0, 1e9 + 5.5, 1e9 + 9.0]  # quartiles and median of a 1e9 offset
    decimals = shared_decimals(values)
    texts = [fixed(v, decimals) for v in values]
    assert len(set(texts)) == 3
    assert texts[0] == "1000000002"  # fixed digits, not 1.00e+09 three times


def test_the_report_tells_the_quartiles_of_offset_data_apart():
    from engine.analysis import analyze
    from engine.results import Groups

    rng = np.random.default_rng(4)
    groups = Groups(("line a", "line b"), 1e9 + rng.normal(10, 3, 20), 1e9 + rng.normal(5, 3, 20))
    analysis = analyze(groups, AnalysisSpec(resamples=200, seed=1))
    text = report.render(analysis, procedure="mann_whitney").paragraph
    first = text.split("line a (", 1)[1].split(")", 1)[0]
    numbers = [part.split()[-1] for part in first.replace(" to ", ", ").split(", ")[:3]]
    assert len(set(numbers)) == 3, first


def test_an_effect_interval_that_crosses_zero_says_so():
    from engine.results import EffectSize, Interval

    effect = EffectSize("rank_biserial", "rank-biserial correlation", 0.31,
                        Interval(-0.0023, 0.58, 0.95), "test")
    decimals = report._effect_decimals(effect)
    assert report.format_interval(effect.interval, decimals=decimals).startswith("-0.002")


# -- the three rules as properties ---------------------------------------------------------------

@settings(max_examples=400, deadline=None)
@given(value=_NONZERO, decimals=st.integers(min_value=0, max_value=8))
def test_rounding_never_changes_a_sign(value, decimals):
    assert _sign_of_text(fixed(value, decimals)) == _sign(value)
    assert _sign_of_text(format_number(value, digits=3)) == _sign(value)


@settings(max_examples=300, deadline=None)
@given(values=st.lists(_NONZERO, min_size=1, max_size=6))
def test_shared_rounding_never_changes_a_sign(values):
    decimals = shared_decimals(values)
    for value in values:
        assert _sign_of_text(fixed(value, decimals)) == _sign(value)


@settings(max_examples=400, deadline=None)
@given(p=st.floats(min_value=0, max_value=1, exclude_min=True, exclude_max=True))
def test_a_p_value_strictly_between_0_and_1_never_reads_as_0_or_1(p):
    text = format_p(p)
    if text[:1] in "<>":
        bound = float(text[2:])
        assert 0 < bound < 1 and (p < bound if text[0] == "<" else p > bound)
    else:
        assert 0 < float(text) < 1


@settings(max_examples=300, deadline=None)
@given(base=st.floats(min_value=-1e12, max_value=1e12, allow_nan=False),
       offsets=st.lists(st.floats(min_value=-1e4, max_value=1e4, allow_nan=False), min_size=2, max_size=6),
       scale=st.sampled_from([1e-9, 1e-6, 1e-3, 1.0, 1e3]))
def test_distinct_values_shown_together_read_differently(base, offsets, scale):
    values = sorted({base + offset * scale for offset in offsets})
    largest = max(abs(v) for v in values)
    gaps = [b - a for a, b in zip(values, values[1:])]
    # within the 15 significant digits a float holds reliably
    assume(not gaps or min(gaps) > largest * 1e-13)
    decimals = shared_decimals(values)
    texts = [fixed(v, decimals) for v in values]
    assert len(set(texts)) == len(values), (values, texts)
    for value, text in zip(values, texts):  # and each still reads as itself
        if decimals is None:
            assert math.isclose(float(text), value, rel_tol=0.01)
        else:
            assert abs(float(text) - value) <= 0.5 * 10.0 ** -decimals * (1 + 1e-9) + largest * 1e-15
