"""The question owns its verdict: when a result answers it, and how that is said."""

import pytest

from engine.question import Answer, Question
from engine.results import Interval

LABELS = ("new", "old")


def test_a_p_value_below_one_minus_the_level_answers_yes():
    question = Question("differ", 0.9)
    assert question.finds(p_value=0.099) is True
    assert question.finds(p_value=0.1) is False
    assert question.finds() is None


def test_an_interval_without_a_test_answers_yes_when_it_leaves_no_difference_out():
    question = Question()
    assert question.finds(interval=Interval(0.2, 1.0, 0.95)) is True
    assert question.finds(interval=Interval(-0.2, 1.0, 0.95)) is False
    # a probability's "no difference" is 1/2
    assert question.finds(interval=Interval(0.3, 0.45, 0.95), no_difference=0.5) is True
    # an end that could not be computed leaves nothing out
    assert question.finds(interval=Interval(float("nan"), 1.0, 0.95)) is False


@pytest.mark.parametrize("kind, estimate, no_difference, other_way", [
    ("higher", -1.0, 0.0, True), ("higher", 1.0, 0.0, False), ("lower", 0.6, 0.5, True),
    ("lower", 0.4, 0.5, False), ("differ", -5.0, 0.0, False), ("higher", float("nan"), 0.0, False),
])
def test_a_one_sided_question_knows_when_the_data_point_the_other_way(kind, estimate, no_difference,
                                                                       other_way):
    assert Question(kind).points_other_way(estimate, no_difference) is other_way


def test_the_answer_gathers_what_a_result_says():
    question = Question("higher", 0.95)
    answer = question.answer(finds=False, estimate=-2.0, p_value=0.99)
    assert answer == Answer(decided=True, yes=False, other_way=True, other_way_clear=True)
    assert question.answer(finds=None, estimate=2.0) == Answer(decided=False)


def test_the_verdict_in_words_follows_the_question():
    two_sided, higher = Question("differ"), Question("higher")
    assert (two_sided.verdict_words(Answer(True, yes=True), LABELS, "95%")
            == "At 95% confidence the data give clear evidence of a difference between the groups.")
    assert (higher.verdict_words(Answer(True), LABELS, "95%")
            == "At 95% confidence the data do not give clear evidence of new being higher than old; "
               "that does not show the groups are the same.")
    said = higher.verdict_words(Answer(True, other_way=True, other_way_clear=True), LABELS, "95%")
    assert said.startswith("At 95% confidence the data give no evidence of new being higher than old")
    assert "The data point clearly the other way: here new was lower than old" in said
    assert two_sided.verdict_words(Answer(False), LABELS, "95%") == ""


def test_the_short_reading_of_a_row():
    assert Question("differ").reading(Answer(True, yes=True), LABELS) == "finds a difference"
    assert Question("lower").reading(Answer(True, yes=True), LABELS) == "finds new lower"
    assert Question("lower").reading(Answer(True, other_way=True), LABELS) == \
        "not clear: the data point the other way"
    assert Question("differ").reading(Answer(True), LABELS) == "no clear difference"
    assert Question("higher").reading(Answer(True), LABELS) == "not clear"
