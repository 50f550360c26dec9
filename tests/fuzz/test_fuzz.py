"""A few hundred generated files through the headless commands, each in a guarded worker.

Every file either gives a result or one line that names the file; none crashes the command,
hangs it, or changes the file. The 10,000-case run is ``tests/fuzz/run.py``.
"""

from __future__ import annotations

import pytest

from findings import Tally, problems_of, verdict_of
from pool import FuzzPool

CASES = 240
SEED = 2026
MAX_COLUMNS = 200  # thousands of columns take tens of seconds each: for the big run


@pytest.mark.slow
def test_generated_files_give_a_result_or_one_line_naming_the_file():
    counts = Tally()
    pool = FuzzPool(SEED, workers=2, memory=3 << 30, timeout=60.0, max_columns=MAX_COLUMNS)
    for result in pool.run(range(CASES)):
        counts.add(result)
    assert counts.files == CASES
    # the generator still makes analysable files (about one in nine in the big run)
    assert counts.verdicts["clean"] > CASES // 20
    unexpected = [f"case {p.index} [{p.kind}] {p.key}\n    {p.tag}\n    {p.detail[-800:]}"
                  for p in counts.new]
    assert not unexpected, "\n".join(unexpected[:20]) + "\n\n" + counts.report()


@pytest.mark.slow
def test_the_guard_sees_a_crash_an_abort_a_hang_and_a_changed_file(tmp_path):
    # a file refused at once ("no rows of data"), so that only the hang takes the time limit
    names = tmp_path / "names.csv"
    names.write_text("supplier,strength\n", encoding="utf-8")
    faults = [(names, "raise"), (names, "change"), (names, "abort"), (names, "hang"), (names, None)]
    results = sorted(FuzzPool(0, workers=1, timeout=10.0).run(faults=faults), key=lambda r: -r["index"])
    verdicts = [verdict_of(r) for r in results]
    kinds = [sorted({p.kind for p in problems_of(r)}) for r in results]
    assert verdicts == ["crash", "typed error", "crash", "hang", "typed error"]
    assert kinds == [["crash"], ["changed"], ["crash"], ["hang"], []]
    # the command turns the raised error into its one line with exit code 1; the run still
    # counts it as a crash, grouped by the error's type and message
    assert [o["code"] for o in results[0]["outcomes"]] == [1, 1, 1]
    assert "RuntimeError: a fault on purpose" in problems_of(results[0])[0].key
    assert "SIGABRT" in problems_of(results[2])[0].key
