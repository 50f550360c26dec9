"""Error messages are single lines a user can read."""

from engine.errors import Cancelled, DataProblem, TwofoldError


def test_an_error_message_stays_on_one_line():
    # a group label read from a quoted cell can hold a line break
    problem = DataProblem("Group 'north\nside' has 1 usable value;\r\n2 are needed.")
    assert "\n" not in str(problem) and "\r" not in problem.message
    assert "north\\nside" in problem.message


def test_cancelled_has_a_sentence_of_its_own():
    assert isinstance(Cancelled(), TwofoldError)
    assert Cancelled().message.endswith(".")
