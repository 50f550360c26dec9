"""Draws kept once and handed out again: every generator of a log gives numpy's own stream of the
seed (numpy.random.default_rng(seed) is the reference), whatever calls it makes."""

from __future__ import annotations

import numpy as np
import pytest

from engine.analysis import analyze
from engine.draw_log import DrawLog
from engine.results import Groups
from engine.spec import AnalysisSpec


def calls(generator, sizes=(5, 7)):
    """A run's draws: the kinds of calls the resampling procedures make."""
    return [generator.integers(0, 100, (3, sizes[0]), dtype=np.int16).tolist(),
            generator.random(sizes[1]).tolist(),
            generator.bit_generator.random_raw(4).tolist(),
            generator.integers(0, 10, 6).tolist(),
            generator.integers(0, 10),
            generator.normal(size=3).tolist()]


@pytest.mark.parametrize("limit", [1 << 20, 40])
def test_every_generator_of_a_log_gives_the_seed_stream(limit):
    log = DrawLog(12, limit_bytes=limit)
    reference = calls(np.random.default_rng(12))  # numpy's stream of seed 12
    for _ in range(3):  # the recorder, then two that replay
        assert calls(log.generator()) == reference


def test_a_run_that_draws_otherwise_goes_on_from_the_right_state():
    log = DrawLog(3)
    calls(log.generator())
    assert calls(log.generator(), sizes=(5, 8)) == calls(np.random.default_rng(3), sizes=(5, 8))
    assert calls(log.generator(), sizes=(6, 7)) == calls(np.random.default_rng(3), sizes=(6, 7))


def test_replayed_draws_cannot_be_changed():
    log = DrawLog(1)
    log.generator().integers(0, 9, 4)
    replayed = log.generator().integers(0, 9, 4)
    with pytest.raises(ValueError):
        replayed[0] = 1


def test_analysis_with_a_replaying_generator_is_the_analysis_of_its_seed():
    rng = np.random.default_rng(8)
    groups = Groups(("a", "b"), rng.normal(0, 1, 40), rng.gamma(3, 1, 35))
    spec = AnalysisSpec(seed=21, resamples=500)
    reference = analyze(groups, spec)  # its own numpy.random.default_rng(21)
    log = DrawLog(21)
    for _ in range(2):
        again = analyze(groups, spec, rng=log.generator())
        for key, result in reference.procedures.items():
            ours = again.procedures[key]
            assert (ours.p_value, ours.interval, ours.estimate) == (result.p_value, result.interval, result.estimate)


def test_kept_relabellings_serve_only_runs_of_the_same_sizes():
    rng = np.random.default_rng(9)
    x, y = rng.normal(0, 1, 40), rng.normal(0, 1, 35)
    spec = AnalysisSpec(seed=5, resamples=300)
    log = DrawLog(5)
    analyze(Groups(("a", "b"), x, y), spec, rng=log.generator())
    assert any(entry[0][0] == "kept" for entry in log.entries)
    for other in (Groups(("a", "b"), x, y[:-1]), Groups(("a", "b"), x + 1.0, y)):
        reference = analyze(other, spec)  # its own numpy.random.default_rng(5)
        again = analyze(other, spec, rng=log.generator())
        for key, result in reference.procedures.items():
            assert again.procedures[key].p_value == result.p_value
            assert again.procedures[key].interval == result.interval


def test_a_single_draw_is_replayed_as_a_number():
    log = DrawLog(4)
    first = log.generator().integers(0, 10)
    again = log.generator().integers(0, 10)
    # numpy.random.default_rng(4).integers(0, 10) is a numpy integer, not an array
    assert again == first and not isinstance(again, np.ndarray)
