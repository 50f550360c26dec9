"""The worker: results, failures and stops come back as signals; a newer run replaces an older."""

from __future__ import annotations

import threading
import time

import pytest

from desktop.workers import Worker
from engine.errors import Cancelled, FileProblem


@pytest.fixture
def worker(qtbot):
    made = Worker()
    yield made
    made.shutdown()


def test_result_arrives_on_the_gui_thread(qtbot, worker):
    threads = []

    def job(progress, cancelled):
        threads.append(threading.get_ident())
        progress(0.5, "half")
        return 41 + 1

    seen = []
    worker.finished.connect(lambda result: seen.append((result, threading.get_ident())))
    with qtbot.waitSignal(worker.finished, timeout=5000):
        worker.run(job)
    assert seen == [(42, threading.get_ident())]
    assert threads and threads[0] != threading.get_ident()
    assert not worker.busy


def test_engine_error_is_expected_and_other_errors_are_not(qtbot, worker):
    def broken_file(progress, cancelled):
        raise FileProblem("bolts.csv: the file is empty.")

    with qtbot.waitSignal(worker.failed, timeout=5000) as blocker:
        worker.run(broken_file)
    assert blocker.args == ["bolts.csv: the file is empty.", True]

    def made_up_failure(progress, cancelled):
        return {}["no such key"]

    with qtbot.waitSignal(worker.failed, timeout=5000) as blocker:
        worker.run(made_up_failure)
    message, expected = blocker.args
    assert expected is False and "KeyError" in message


class PanicException(BaseException):
    """Stands for pyo3_runtime.PanicException: a Rust panic reaches Python as a BaseException."""


def test_a_base_exception_from_a_job_is_reported_not_left_hanging(qtbot, worker):
    def panics(progress, cancelled):
        raise PanicException("range start index 2264925837 out of range for slice of length 4946")

    with qtbot.waitSignal(worker.failed, timeout=5000) as blocker:
        worker.run(panics)
    message, expected = blocker.args
    assert expected is False and message.startswith("PanicException: range start index")
    assert not worker.busy


def test_an_unexpected_failure_is_reported_in_at_most_a_few_hundred_characters(qtbot, worker):
    def wordy(progress, cancelled):
        raise ValueError("x" * 100_000)

    with qtbot.waitSignal(worker.failed, timeout=5000) as blocker:
        worker.run(wordy)
    assert len(blocker.args[0]) < 400


def test_cancel_stops_a_long_run(qtbot, worker):
    ended = threading.Event()

    def long_job(progress, cancelled):
        try:
            for step in range(10_000):
                if cancelled():
                    raise Cancelled()
                progress(step / 10_000, "working")
                time.sleep(0.005)
            return "finished"
        finally:
            ended.set()

    finished = []
    worker.finished.connect(finished.append)
    with qtbot.waitSignal(worker.progress, timeout=5000):
        worker.run(long_job)
    assert worker.busy
    with qtbot.waitSignal(worker.stopped, timeout=5000):
        worker.cancel()
    assert not worker.busy
    assert ended.wait(5)
    qtbot.wait(50)
    assert finished == []


def test_a_newer_run_replaces_the_older(qtbot, worker):
    release = threading.Event()

    def slow(progress, cancelled):
        release.wait(5)  # this job cannot stop early; its result must be dropped
        return "old"

    results = []
    worker.finished.connect(results.append)
    worker.run(slow)
    with qtbot.waitSignal(worker.finished, timeout=5000):
        worker.run(lambda progress, cancelled: "new")
    release.set()
    worker.wait(5000)
    qtbot.wait(50)
    assert results == ["new"]


def test_busy_changes_once_per_run(qtbot, worker):
    changes = []
    worker.busy_changed.connect(changes.append)
    with qtbot.waitSignal(worker.finished, timeout=5000):
        worker.run(lambda progress, cancelled: None)
    assert changes == [True, False]
