"""The margin of an equivalence or non-inferiority question: checked, converted, saved, read back."""

import json

import pytest

from engine.errors import OptionProblem
from engine.procedures.registry import RECORDS
from engine.question import ALL_KINDS, KINDS, MARGIN_KINDS, Margin, Question
from engine.spec import AnalysisSpec


@pytest.mark.parametrize("question", [
    Question("equivalent", 0.95, Margin.within(0.5)),
    Question("equivalent", 0.9, Margin.within(-0.4, 0.7, "percent")),
    Question("equivalent", 0.95, Margin.within(0.8, 1.25, "ratio")),
    Question("not_worse", 0.95, Margin.not_worse_by(2.0, "lower")),
    Question("not_worse", 0.975, Margin.not_worse_by(10, "higher", "percent")),
    Question("not_worse", 0.95, Margin.not_worse_by(0.8, "lower", "ratio")),
])
def test_a_margin_question_survives_json_unchanged(question):
    spec = AnalysisSpec(question=question)
    again = AnalysisSpec.from_dict(json.loads(json.dumps(spec.to_dict())))
    assert again == spec
    assert again.question.margin == question.margin


def test_a_saved_question_without_a_margin_still_reads_and_writes_no_margin():
    old = AnalysisSpec().to_dict()
    old["question"] = {"kind": "lower", "level": 0.9}
    spec = AnalysisSpec.from_dict(old)
    assert spec.question == Question("lower", 0.9)
    assert "margin" not in spec.to_dict()["question"]


@pytest.mark.parametrize("data, words", [
    ({"kind": "equivalent", "level": 0.95}, "needs a margin"),
    ({"kind": "differ", "level": 0.95, "margin": {"low": -1, "high": 1}}, "belongs to"),
    ({"kind": "equivalent", "level": 0.95, "margin": {"low": 1, "high": 2}}, "either side of 0"),
    ({"kind": "equivalent", "level": 0.95, "margin": {"low": -1, "high": 1, "size": 3}}, "Unknown member"),
    ({"kind": "equivalent", "level": 0.95, "margin": {"low": -1, "high": 1, "worse": "lower"}}, "does not"),
    ({"kind": "not_worse", "level": 0.95, "margin": {"low": -1, "high": 1}}, "which direction"),
    ({"kind": "equivalent", "level": 0.95, "margin": {"low": 0.0, "high": 1.25, "unit": "ratio"}}, "above 0"),
    ({"kind": "equivalent", "level": 0.95, "margin": {"low": 1.1, "high": 1.25, "unit": "ratio"}}, "either side of 1"),
    ({"kind": "equivalent", "level": 0.5, "margin": {"low": -1, "high": 1}}, "above 0.5"),
    ({"kind": "equivalent", "level": 0.95, "margin": {"low": -1, "high": 1, "unit": "mm"}}, "must be in"),
])
def test_a_bad_margin_is_named_in_one_line(data, words):
    raw = AnalysisSpec().to_dict()
    raw["question"] = data
    with pytest.raises(OptionProblem) as caught:
        AnalysisSpec.from_dict(raw)
    assert words in caught.value.message and "question" in caught.value.message


def test_a_percentage_margin_converts_with_group_2s_mean():
    margin = Margin.within(-5, 10, "percent").in_units(-40.0)
    assert (margin.low, margin.high, margin.unit) == (-2.0, 4.0, "units")
    worse = Margin.not_worse_by(10, "higher", "percent").in_units(8.0)
    assert worse.bound == pytest.approx(0.8) and worse.worse == "higher"
    assert Margin.within(0.5).in_units(3.0) == Margin.within(0.5)
    with pytest.raises(OptionProblem, match="percentage"):
        Margin.within(5, unit="percent").in_units(0.0)


def test_the_bound_is_the_end_on_the_worse_side():
    assert Margin.not_worse_by(2, "lower").bound == -2
    assert Margin.not_worse_by(2, "higher").bound == 2
    assert Margin.not_worse_by(0.8, "lower", "ratio").bound == 0.8
    assert Margin.not_worse_by(0.8, "higher", "ratio").bound == 1.25
    assert Margin.within(1.25, unit="ratio") == Margin(0.8, 1.25, "ratio")


def test_the_margin_kinds_say_their_alternative():
    assert Question("equivalent", 0.95, Margin.within(1)).alternative == "two-sided"
    assert Question("not_worse", 0.95, Margin.not_worse_by(1, "lower")).alternative == "greater"
    assert Question("not_worse", 0.95, Margin.not_worse_by(1, "higher")).alternative == "less"


def test_only_the_margin_procedures_claim_a_margin_kind():
    # the registry reads KINDS as what a procedure answers by default: the margin kinds are
    # answered only by the records built for them, each naming the procedure of a difference
    # whose assumptions it shares
    assert KINDS == ("differ", "lower", "higher")
    assert set(MARGIN_KINDS).isdisjoint(KINDS) and ALL_KINDS == KINDS + MARGIN_KINDS
    keys = {record.key for record in RECORDS}
    for record in RECORDS:
        if record.counterpart is None:
            assert set(record.questions) <= set(KINDS), record.key
        else:
            assert len(record.questions) == 1 and record.questions[0] in MARGIN_KINDS, record.key
            assert record.counterpart in keys or record.counterpart in (
                "paired_t", "signed_rank", "paired_bootstrap_mean"), record.key
