"""The session announces each change once, and refuses unknown names."""

import pytest

from engine.session import Choices, Session


def test_choose_announces_the_new_choices_once():
    session = Session()
    heard = []
    session.subscribe(lambda name, value: heard.append((name, value)))
    session.choose(alternative="greater", confidence_level=0.9)
    assert heard == [("choices", session.choices)]
    assert session.choices.alternative == "greater" and session.choices.confidence_level == 0.9


def test_choosing_the_same_again_is_silent():
    session = Session()
    heard = []
    session.subscribe(lambda name, value: heard.append(name))
    session.choose(alternative="two-sided")
    assert heard == []


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


def test_unsubscribed_listener_hears_nothing():
    session = Session()
    heard = []
    listener = lambda name, value: heard.append(name)  # noqa: E731
    session.subscribe(listener)
    session.unsubscribe(listener)
    session.choose(ordinal=True)
    assert heard == [] and session.choices == Choices(ordinal=True)
