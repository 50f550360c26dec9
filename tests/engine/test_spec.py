"""The analysis spec: checked once, written to plain values and read back unchanged."""

import json

import pytest

from engine.errors import OptionProblem
from engine.question import Question
from engine.spec import AnalysisSpec, SetAside, Source, Statements


def _full_spec() -> AnalysisSpec:
    return AnalysisSpec(
        source=Source("data/bolts.csv", None, "a" * 64), layout="long", group_column="supplier",
        value_columns=("strength",), groups=("north", "south"),
        set_aside=(SetAside(row=7, column="strength", text="812.5", reason="gauge slipped"),),
        question=Question("higher", 0.9), resamples=2_000, seed=12345,
        statements=Statements(known_sd=(1.5, 2.0), equal_spread_known=True, ordinal=False),
        rank_method="exact", procedure="welch_t")


def test_a_spec_survives_json_unchanged():
    spec = _full_spec()
    again = AnalysisSpec.from_dict(json.loads(json.dumps(spec.to_dict())))
    assert again == spec


def test_members_left_out_take_their_defaults():
    assert AnalysisSpec.from_dict({}) == AnalysisSpec()


@pytest.mark.parametrize("change, words", [
    (lambda d: d.update(resamples=5), "resamples"),
    (lambda d: d.update(resamples=2.5), "resamples"),
    (lambda d: d.update(seed=-1), "seed"),
    (lambda d: d.update(seed=True), "seed"),
    (lambda d: d.update(layout="diagonal"), "layout"),
    (lambda d: d["question"].update(kind="bigger"), "question"),
    (lambda d: d["question"].update(level=1.0), "confidence level"),
    (lambda d: d["statements"].update(known_sd=[1.0]), "Known standard deviations"),
    (lambda d: d["statements"].update(ordinal="yes"), "ordinal"),
    (lambda d: d.update(colour="blue"), "Unknown member"),
    (lambda d: d["source"].update(sha256="xyz"), "checksum"),
    (lambda d: d.update(set_aside=[{"row": 0, "column": "a", "text": "", "reason": ""}]), "row number"),
    (lambda d: d.update(set_aside="row 3"), "list"),
    (lambda d: d.update(groups=["only one"]), "two labels"),
    (lambda d: d.update(value_columns="strength"), "list of column names"),
    (lambda d: d.update(question=[0.95]), "named members"),
])
def test_a_damaged_spec_is_refused_with_one_line_naming_the_member(change, words):
    data = _full_spec().to_dict()
    change(data)
    with pytest.raises(OptionProblem, match=words) as caught:
        AnalysisSpec.from_dict(data)
    assert "\n" not in str(caught.value)


def test_a_new_spec_draws_a_seed_once_and_keeps_it():
    spec = AnalysisSpec()
    assert spec.seed is None
    drawn = spec.with_seed()
    assert isinstance(drawn.seed, int) and drawn.with_seed() is drawn


def test_the_question_speaks_the_procedures_alternative():
    assert [Question(kind).alternative for kind in ("differ", "lower", "higher")] == [
        "two-sided", "less", "greater"]
    assert Question.from_alternative("less", 0.9) == Question("lower", 0.9)
