"""The session holds one analysis spec, announces each change once and lets the spec check it."""

import pytest

from engine.errors import OptionProblem
from engine.question import Question
from engine.session import Session
from engine.spec import AnalysisSpec, Source, Statements


def test_choose_announces_the_new_spec_once():
    session = Session()
    heard = []
    session.subscribe(lambda name, value: heard.append((name, value)))
    session.ask(kind="higher", level=0.9)
    assert heard == [("spec", session.spec)]
    assert session.spec.question == Question("higher", 0.9)
    assert session.spec.alternative == "greater"


def test_choosing_the_same_again_is_silent():
    session = Session()
    heard = []
    session.subscribe(lambda name, value: heard.append(name))
    session.ask(kind="differ")
    session.choose(resamples=session.spec.resamples)
    assert heard == []


def test_the_spec_checks_every_value_once_and_nothing_changes_on_a_refusal():
    session = Session()
    heard = []
    session.subscribe(lambda name, value: heard.append(name))
    # the sentences are the spec's own (engine/spec.py, engine/question.py)
    with pytest.raises(OptionProblem, match="resamples"):
        session.choose(resamples=10)
    with pytest.raises(OptionProblem, match="confidence level"):
        session.ask(level=1.0)
    with pytest.raises(OptionProblem, match="seed"):
        session.choose(seed=-1)
    with pytest.raises(OptionProblem, match="positive"):
        session.state(known_sd=(1.0, 0.0))
    assert heard == [] and session.spec == AnalysisSpec()


def test_store_announces_outputs_and_rejects_unknown_names():
    session = Session()
    heard = []
    session.subscribe(lambda name, value: heard.append((name, value)))
    session.store("problem", "bad file")
    assert heard == [("problem", "bad file")] and session.problem == "bad file"
    with pytest.raises(TypeError):
        session.store("colour", 1)
    with pytest.raises(TypeError):
        session.choose(colour="red")


def test_adopt_takes_a_whole_spec_and_the_path_is_its_source():
    session = Session()
    assert session.path is None
    spec = AnalysisSpec(source=Source("bolts.csv"), seed=7)
    session.adopt(spec)
    assert session.spec is spec and str(session.path) == "bolts.csv"
    with pytest.raises(TypeError):
        session.adopt({"seed": 7})


def test_unsubscribed_listener_hears_nothing():
    session = Session()
    heard = []
    listener = lambda name, value: heard.append(name)  # noqa: E731
    session.subscribe(listener)
    session.unsubscribe(listener)
    session.state(ordinal=True)
    assert heard == [] and session.spec.statements == Statements(ordinal=True)
