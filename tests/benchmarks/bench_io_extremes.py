"""Files at the edges of what Twofold reads: time and peak memory from open to the first answer.

Run from the repository root: ``python tests/benchmarks/bench_io_extremes.py``. The script
writes its own files into a temporary folder and loads each in a fresh process (read_table,
propose_layout, make_groups as the window does), reporting the seconds of each stage and the
process's peak resident set (VmHWM):

* a CSV of 100,000 columns and 5 rows (4 MB): target well under 2 s to open;
* a CSV of 1,000,000 rows whose group column holds a million distinct labels (16 MB): target
  well under 2 s to the one-line refusal ("holds 1,000,000 groups; pick two");
* hostile workbooks (a cell in the last row and column, a zip bomb): the time to refuse them
  and the peak memory, which must stay near the interpreter's own.

Both targets are for an idle machine; on a busy one the figures grow with the load.
"""

from __future__ import annotations

import argparse
import json
import subprocess
import sys
import tempfile
import time
import zipfile
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

__all__ = ["main"]


def _peak_rss_bytes() -> int:
    with open("/proc/self/status") as handle:
        for line in handle:
            if line.startswith("VmHWM:"):
                return int(line.split()[1]) * 1024
    raise RuntimeError("no VmHWM line in /proc/self/status")


def write_wide(path: Path, columns: int = 100_000, rows: int = 5) -> None:
    import numpy as np

    rng = np.random.default_rng(3)
    with open(path, "w", encoding="utf-8") as handle:
        handle.write(",".join(f"plot_{j}" for j in range(columns)) + "\n")
        for _ in range(rows):
            handle.write(",".join(f"{x:.3f}" for x in rng.normal(7.5, 0.8, columns)) + "\n")


def write_labels(path: Path, rows: int = 1_000_000) -> None:
    import numpy as np

    rng = np.random.default_rng(5)
    values = rng.normal(812, 20, rows)
    with open(path, "w", encoding="utf-8") as handle:
        handle.write("batch,strength_mpa\n")
        handle.write("".join(f"B{i:07d},{values[i]:.2f}\n" for i in range(rows)))


def write_corner(path: Path) -> None:
    import openpyxl

    book = openpyxl.Workbook()
    book.active["A1"] = "yield"
    book.active.cell(row=1_048_576, column=16_384, value=1.5)
    book.save(path)


def write_bomb(path: Path, unpacked: int = 700_000_000) -> None:
    with zipfile.ZipFile(path, "w", zipfile.ZIP_DEFLATED) as archive:
        archive.writestr("xl/worksheets/sheet1.xml", "<worksheet>" + " " * unpacked + "</worksheet>")


def child(path: Path) -> None:
    """One load in this fresh process, as the window does it; prints JSON with the stages."""
    from engine.errors import TwofoldError
    from engine.io import make_groups, propose_layout, read_table

    stages: dict[str, float] = {}
    outcome = "opened and split into two groups"
    start = time.perf_counter()
    try:
        table = read_table(path)
        stages["read"] = time.perf_counter() - start
        mark = time.perf_counter()
        proposal = propose_layout(table)
        stages["layout"] = time.perf_counter() - mark
        mark = time.perf_counter()
        if proposal.layout == "wide":
            make_groups(table, values=list(proposal.value_columns[:2]))
        else:
            group = proposal.group_column or table.frame.columns[0]
            make_groups(table, values=proposal.value_columns[0], group=group)
        stages["groups"] = time.perf_counter() - mark
    except TwofoldError as problem:
        outcome = f"refused: {problem.message[:110]}"
    stages["total"] = time.perf_counter() - start
    print(json.dumps({"stages": stages, "outcome": outcome, "peak_rss": _peak_rss_bytes()}))


def measure(path: Path, repeats: int) -> dict:
    runs = []
    for _ in range(repeats):
        out = subprocess.run([sys.executable, __file__, "--child", str(path)], capture_output=True,
                             text=True, check=True, cwd=ROOT)
        runs.append(json.loads(out.stdout.strip().splitlines()[-1]))
    return min(runs, key=lambda run: run["stages"]["total"])


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=3)
    parser.add_argument("--child", metavar="PATH", help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.child:
        child(Path(args.child))
        return
    with tempfile.TemporaryDirectory() as folder:
        folder = Path(folder)
        cases = [
            ("CSV, 100,000 columns x 5 rows", folder / "plots_wide.csv", write_wide),
            ("CSV, 1,000,000 distinct group labels", folder / "batches.csv", write_labels),
            (".xlsx, one cell in the last row and column", folder / "corner.xlsx", write_corner),
            (".xlsx zip bomb, 700 MB of blanks", folder / "bomb.xlsx", write_bomb),
        ]
        for title, path, write in cases:
            write(path)
            run = measure(path, args.repeats)
            stages = ", ".join(f"{name} {seconds:.2f} s" for name, seconds in run["stages"].items())
            print(f"{title} ({path.stat().st_size / 1e6:.1f} MB):")
            print(f"  best of {args.repeats}: {stages}; peak memory {run['peak_rss'] / 1e6:.0f} MB")
            print(f"  {run['outcome']}")


if __name__ == "__main__":
    main()
