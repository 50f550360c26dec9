"""A few hundred generated files through the headless commands, each in a guarded worker.

Every file either gives a result or one line that names the file; none crashes the command,
hangs it, or changes the file. The 10,000-case run is ``tests/fuzz/run.py``.
"""

from __future__ import annotations

import pytest

from findings import Tally
from pool import FuzzPool

CASES = 240
SEED = 2026
MAX_COLUMNS = 200  # thousands of columns take tens of seconds each: for the big run


@pytest.mark.slow
def test_generated_files_give_a_result_or_one_line_naming_the_file():
    counts = Tally()
    for result in FuzzPool(SEED, workers=2, memory=3 << 30, timeout=60.0, max_columns=MAX_COLUMNS).run(range(CASES)):
        counts.add(result)
    assert counts.files == CASES
    assert counts.verdicts["clean"] > CASES // 10  # the generator still makes analysable files
    unexpected = [f"case {p.index} [{p.kind}] {p.key}\n    {p.tag}\n    {p.detail[-800:]}" for p in counts.new]
    assert not unexpected, "\n".join(unexpected[:20]) + "\n\n" + counts.report()
