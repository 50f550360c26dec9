"""The big fuzz run: many generated files through the headless commands, each guarded.

    python tests/fuzz/run.py --cases 10000 --workers 2 --keep /tmp/fuzz-kept
    python tests/fuzz/run.py --case 1234            # write and run one case again
    python tests/fuzz/run.py --file some.csv ...    # run existing files the same way

Each case is written by ``cases.write_case`` and run by ``python -m engine columns FILE`` and
``python -m engine analyze FILE --json`` (in a worker process with an address-space limit and a
per-case time limit). Prints the figures: files, clean, typed errors, crashes grouped by exception
and message, hangs, changed files, bad error messages, warnings, peak memory, run time.
"""

from __future__ import annotations

import argparse
import json
import resource
import signal
import sys
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))

from findings import Tally, problems_of  # noqa: E402
from pool import FuzzPool  # noqa: E402


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--cases", type=int, default=10_000)
    parser.add_argument("--start", type=int, default=0, help="first case number")
    parser.add_argument("--case", type=int, action="append", help="run only this case (repeatable)")
    parser.add_argument("--file", type=Path, action="append", help="run an existing file (repeatable)")
    parser.add_argument("--seed", type=int, default=8)
    parser.add_argument("--workers", type=int, default=2)
    parser.add_argument("--memory-gb", type=float, default=3.0, help="address-space limit per worker")
    parser.add_argument("--timeout", type=float, default=60.0, help="seconds per case")
    parser.add_argument("--max-columns", type=int, help="cap the width of generated tables")
    parser.add_argument("--keep", type=Path, help="copy files that crash, hang or change here")
    parser.add_argument("--log", type=Path, help="write every result as a JSON line here")
    parser.add_argument("--show", action="store_true", help="print each problem as it is found")
    parser.add_argument("--from-log", type=Path, help="count the results of an earlier --log again")
    args = parser.parse_args()

    if args.from_log:
        counts = Tally()
        with open(args.from_log) as log:
            for line in log:
                counts.add(json.loads(line))
        print(counts.report())
        return 0

    # a run started in the background ignores Ctrl-C by default: stop cleanly on either signal
    signal.signal(signal.SIGINT, signal.default_int_handler)
    signal.signal(signal.SIGTERM, lambda *_: sys.exit(1))
    if args.case or args.file:
        indices = args.case or []
    else:
        indices = range(args.start, args.start + args.cases)
    pool = FuzzPool(args.seed, workers=args.workers, memory=int(args.memory_gb * (1 << 30)),
                    timeout=args.timeout, keep=args.keep, max_columns=args.max_columns)
    counts = Tally()
    log = open(args.log, "w") if args.log else None
    began = time.monotonic()
    for result in pool.run(indices, args.file or ()):
        counts.add(result)
        if log:
            log.write(json.dumps(result) + "\n")
        if args.show or args.case or args.file:
            for problem in problems_of(result):
                print(f"case {problem.index} [{problem.kind}] {problem.key}\n    {problem.tag}\n"
                      f"    {problem.detail[-1500:]}", flush=True)
        if counts.files % 500 == 0:
            print(f"... {counts.files} files, {time.monotonic() - began:.0f} s", file=sys.stderr, flush=True)
    children = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss
    print(counts.report(children, time.monotonic() - began))
    print(f"workers started: {pool.started_workers}")
    return 1 if counts.count("crash") or counts.count("hang") or counts.count("changed") else 0


if __name__ == "__main__":
    sys.exit(main())
