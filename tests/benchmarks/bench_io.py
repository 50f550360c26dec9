"""Loading speed and memory of ``engine.io`` against plain pandas, measured side by side.

Run from the repository root: ``python tests/benchmarks/bench_io.py`` (``--quick`` for smaller
files). The script writes its own data into a temporary folder:

* a 1,000,000-row, 6-column CSV (about 90 MB, full-precision values and a running number):
  ``read_table`` + ``propose_layout`` + ``make_groups`` against a plain ``pandas.read_csv(path)``;
  target ratio at most 1.3, and peak memory of the load at most 3 times the file size;
* the same rows rounded to lab precision with a repeating batch number (about 38 MB): every
  column repeats values, so only the full repeated-row check can tell that no row repeats;
* a 100,000-row .xlsx: ``read_table`` (calamine) against ``pandas.read_excel`` with openpyxl;
  target under 1.5 s;
* a 20,000-row .ods: ``read_table`` (calamine) against ``pandas.read_excel`` with odfpy.

Each CSV is timed twice: loads alternating with pandas in this process (median of the runs),
and the first load in a fresh process after a warm-up on the file's first rows, which is what
a user opening the file meets. Peak memory is measured in a fresh child process with
``tracemalloc`` (numpy and pandas report their buffers to it) and, as a cross-check, the
growth of the peak resident set (VmHWM), which also holds the allocator's and the parser
threads' spare memory.
"""

from __future__ import annotations

import argparse
import json
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402

from engine.io import make_groups, propose_layout, read_table  # noqa: E402

__all__ = ["main"]


def write_csv(path: Path, rows: int, *, rounded: bool = False) -> None:
    """Six columns of bolt measurements; ``rounded``: written to lab precision with a batch
    code instead of a running number, so that every column repeats values (the harder case for
    the repeated-row check)."""
    rng = np.random.default_rng(20261202)
    first = (rng.integers(1, 400, rows) if rounded else np.arange(1, rows + 1))
    frame = pd.DataFrame({
        "batch_no" if rounded else "bolt_no": first,
        "supplier": np.where(rng.random(rows) < 0.5, "north_forge", "south_forge"),
        "strength_mpa": rng.normal(830.0, 35.0, rows),
        "elongation_pct": rng.normal(14.0, 2.0, rows),
        "hardness_hrc": rng.normal(32.0, 3.0, rows),
        "diameter_mm": rng.normal(10.0, 0.05, rows),
    })
    if rounded:
        frame = frame.round({"strength_mpa": 1, "elongation_pct": 1, "hardness_hrc": 1, "diameter_mm": 3})
    frame.to_csv(path, index=False)


def write_sheet(path: Path, rows: int, engine: str) -> None:
    rng = np.random.default_rng(7)
    frame = pd.DataFrame({
        "regime": np.where(rng.random(rows) < 0.5, "slow_release", "split_dose"),
        "yield_t_ha": np.round(rng.normal(7.5, 0.8, rows), 2),
        "plot": np.arange(1, rows + 1),
    })
    frame.to_excel(path, index=False, engine=engine)


def ours(path: Path):
    table = read_table(path)
    proposal = propose_layout(table)
    if proposal.layout == "long":
        return make_groups(table, values=proposal.value_columns[0], group=proposal.group_column)
    return make_groups(table, values=proposal.value_columns[:2])


def timed_call(fn, *args) -> float:
    start = time.perf_counter()
    fn(*args)
    return time.perf_counter() - start


def side_by_side(a, b, path: Path, repeats: int) -> tuple[list[float], list[float]]:
    """Alternate the two loaders so that both see the same machine load."""
    first, second = [], []
    a(path), b(path)  # warm the file cache and the imports
    for _ in range(repeats):
        first.append(timed_call(a, path))
        second.append(timed_call(b, path))
    return first, second


def _rss_bytes() -> int:
    with open("/proc/self/statm") as handle:
        return int(handle.read().split()[1]) * os.sysconf("SC_PAGE_SIZE")


def _peak_rss_bytes() -> int:
    """This process's peak resident set (VmHWM). Not ``ru_maxrss``: Linux carries that over
    from the parent at fork and across exec, so a child of a large parent reports the
    parent's size."""
    with open("/proc/self/status") as handle:
        for line in handle:
            if line.startswith("VmHWM:"):
                return int(line.split()[1]) * 1024
    raise RuntimeError("no VmHWM line in /proc/self/status")


def child(path: Path, which: str, timed: bool) -> None:
    """Run one load in this fresh process and print, as JSON, its peak memory or (``timed``)
    its time after a warm-up on the file's first rows."""
    load = ours if which == "ours" else pd.read_csv
    if timed:
        with tempfile.TemporaryDirectory() as folder:
            small = Path(folder) / "first_rows.csv"
            pd.read_csv(path, nrows=2000).to_csv(small, index=False)
            load(small)
        print(json.dumps({"seconds": timed_call(load, path)}))
        return
    import tracemalloc

    before = _rss_bytes()
    tracemalloc.start()
    if which == "ours":
        ours(path)
    else:
        pd.read_csv(path)
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    grown = _peak_rss_bytes() - before
    print(json.dumps({"tracemalloc_peak": peak, "rss_growth": grown}))


def in_child(path: Path, which: str, *, timed: bool = False) -> dict:
    command = [sys.executable, __file__, "--child", which, str(path)] + (["--timed"] if timed else [])
    out = subprocess.run(command, capture_output=True, text=True, check=True)
    return json.loads(out.stdout.strip().splitlines()[-1])


def compare_csv(big: Path, csv_rows: int, label: str, repeats: int) -> None:
    size = big.stat().st_size
    mine, plain = side_by_side(ours, pd.read_csv, big, repeats)
    m, p = statistics.median(mine), statistics.median(plain)
    print(f"CSV {csv_rows:,} rows x 6 columns ({label}), {size / 1e6:.1f} MB, median of {repeats}:")
    print(f"  read_table + propose_layout + make_groups  {m:.3f} s  (runs: "
          + ", ".join(f"{t:.3f}" for t in mine) + ")")
    print(f"  pandas.read_csv(path)                      {p:.3f} s  (runs: "
          + ", ".join(f"{t:.3f}" for t in plain) + ")")
    paired = statistics.median(a / b for a, b in zip(mine, plain))
    print(f"  ratio of medians {m / p:.2f}, median of run-by-run ratios {paired:.2f}, "
          f"ratio of best runs {min(mine) / min(plain):.2f} (target at most 1.30)")
    first = {"ours": [], "plain": []}
    for _ in range(repeats):
        for which in first:
            first[which].append(in_child(big, which, timed=True)["seconds"])
    m, p = statistics.median(first["ours"]), statistics.median(first["plain"])
    print(f"  first load in a fresh process (the user's case), median of {repeats}: "
          f"{m:.3f} s against {p:.3f} s, ratio {m / p:.2f}")
    for which in ("ours", "plain"):
        figures = in_child(big, which)
        print(f"  peak memory, {which:5s}: tracemalloc {figures['tracemalloc_peak'] / 1e6:.0f} MB "
              f"({figures['tracemalloc_peak'] / size:.2f} x file), resident growth "
              f"{figures['rss_growth'] / 1e6:.0f} MB ({figures['rss_growth'] / size:.2f} x file)")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="smaller files")
    parser.add_argument("--repeats", type=int, default=5)
    parser.add_argument("--child", nargs=2, metavar=("WHICH", "PATH"), help=argparse.SUPPRESS)
    parser.add_argument("--timed", action="store_true", help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.child:
        child(Path(args.child[1]), args.child[0], args.timed)
        return
    csv_rows = 100_000 if args.quick else 1_000_000
    xlsx_rows = 10_000 if args.quick else 100_000
    ods_rows = 2_000 if args.quick else 20_000
    with tempfile.TemporaryDirectory() as folder:
        folder = Path(folder)
        for rounded in (False, True):
            big = folder / ("bolts_rounded.csv" if rounded else "bolts_big.csv")
            write_csv(big, csv_rows, rounded=rounded)
            label = "rounded to lab precision, a batch code" if rounded else "full precision, a running number"
            compare_csv(big, csv_rows, label, args.repeats)

        book = folder / "plots.xlsx"
        write_sheet(book, xlsx_rows, "openpyxl")
        fast = min(timed_call(read_table, book) for _ in range(3))
        slow = timed_call(lambda path: pd.read_excel(path, engine="openpyxl"), book)
        raw = min(timed_call(lambda path: pd.read_excel(path, engine="calamine"), book) for _ in range(3))
        print(f"XLSX {xlsx_rows:,} rows x 3 columns ({book.stat().st_size / 1e6:.1f} MB):")
        print(f"  read_table (calamine)          {fast:.3f} s  (target under 1.5 s)")
        print(f"  pandas.read_excel, calamine    {raw:.3f} s")
        print(f"  pandas.read_excel, openpyxl    {slow:.3f} s  ({slow / fast:.1f} x read_table)")

        sheet = folder / "plots.ods"
        write_sheet(sheet, ods_rows, "odf")
        fast = min(timed_call(read_table, sheet) for _ in range(3))
        slow = timed_call(lambda path: pd.read_excel(path, engine="odf"), sheet)
        print(f"ODS {ods_rows:,} rows x 3 columns ({sheet.stat().st_size / 1e6:.1f} MB):")
        print(f"  read_table (calamine)          {fast:.3f} s")
        print(f"  pandas.read_excel, odfpy       {slow:.3f} s  ({slow / fast:.1f} x read_table)")


if __name__ == "__main__":
    main()
