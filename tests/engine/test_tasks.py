"""One progress/cancel object with nested steps."""

import numpy as np
import pytest

from engine.analysis import analyze
from engine.errors import Cancelled
from engine.procedures.resampling import permutation_test
from engine.results import Groups
from engine.spec import AnalysisSpec
from engine.tasks import Task


def test_a_step_maps_its_own_fractions_onto_its_slice_of_the_parent():
    seen = []
    task = Task(lambda fraction, what: seen.append((round(fraction, 12), what)))
    first = task.step(0.25, "first")
    first.report(0.5)
    second = task.step(0.5, "second")
    inner = second.step(0.5, "inner")
    inner.report(1.0, "inner done")
    task.report(1.0, "done")
    assert seen == [(0.0, "first"), (0.125, "first"), (0.25, "second"), (0.25, "inner"),
                    (0.5, "inner done"), (1.0, "done")]


def test_a_share_beyond_what_is_left_is_cut_and_fractions_are_clipped():
    seen = []
    task = Task(lambda fraction, what: seen.append(fraction))
    task.step(0.75, "a")
    rest = task.step(0.5, "b")  # only a quarter is left
    rest.report(2.0)
    assert seen == [0.0, 0.75, 1.0]


def test_check_raises_cancelled_when_asked_to_stop_and_steps_stop_too():
    stop = []
    task = Task(None, lambda: bool(stop))
    child = task.step(0.5, "work")
    child.check()
    stop.append(True)
    assert child.cancelled()
    with pytest.raises(Cancelled):
        child.check()
    with pytest.raises(Cancelled):
        task.step(0.1, "more")


def test_of_takes_a_task_as_it_is_or_wraps_plain_callables():
    task = Task()
    assert Task.of(task) is task
    wrapped = Task.of(lambda f, w: None, lambda: False)
    assert isinstance(wrapped, Task) and not wrapped.cancelled()


def test_a_procedure_reports_inside_the_slice_it_is_given():
    seen = []
    rng = np.random.default_rng(3)
    parent = Task(lambda fraction, what: seen.append((fraction, what)))
    parent.step(0.5, "before")
    permutation_test(rng.normal(size=40), rng.normal(size=40), n_resamples=20_000, rng=rng,
                     progress=parent.step(0.25, "shuffling"))
    fractions = [f for f, _ in seen]
    assert fractions == sorted(fractions)
    assert 0.5 <= min(fractions[1:]) and max(fractions) == pytest.approx(0.75)
    assert {what for _, what in seen[1:]} == {"shuffling"}


def test_analyze_takes_a_task_and_stops_inside_a_procedure():
    rng = np.random.default_rng(5)
    groups = Groups(("a", "b"), rng.normal(size=30), rng.normal(size=30))
    asked = []

    def cancelled():
        asked.append(1)
        return len(asked) > 8  # after the checks and the first procedures

    with pytest.raises(Cancelled):
        analyze(groups, AnalysisSpec(resamples=20_000, seed=1), progress=Task(None, cancelled))
    assert len(asked) == 9
