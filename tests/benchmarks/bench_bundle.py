"""Size and start-up of the built bundle, each start beside the venv's from the same run.

1. The bundle folder's size and the archive's.
2. From launching the window on a file to the first paint of the filled grid: the bundle's
   ``Twofold --quit-after-paint 0 FILE`` against the venv's ``python packaging/launch.py
   --quit-after-paint 0 FILE`` (the same program from the source folder), alternately; the
   first start of each (its files not yet in the page cache, unless an earlier run read them)
   and the median of the rest. Target: the bundle within 1.2x of the venv.
3. The headless command, ``analyze FILE --json --seed 1`` and ``--help``: the bundle's
   ``twofold-cli`` against the venv's ``python -m engine``, wall time from launch to exit.

Usage: ``python tests/benchmarks/bench_bundle.py BUNDLE_FOLDER [--archive FILE] [--reference
PYTHON] [--runs 5] [--file FILE]`` (``bash .ci/bundle --bench`` runs it on the unpacked archive).
Other work on the machine skews the figures: run it on a quiet machine.
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]


def folder_size(folder: Path) -> int:
    return sum(p.stat().st_size for p in folder.rglob("*") if p.is_file() and not p.is_symlink())


def _env(home: Path) -> dict[str, str]:
    env = {k: v for k, v in os.environ.items() if k not in ("PYTHONPATH", "VIRTUAL_ENV")}
    env.update(HOME=str(home), XDG_CONFIG_HOME=str(home / "config"), XDG_DATA_HOME=str(home / "data"))
    if not env.get("DISPLAY") and not env.get("WAYLAND_DISPLAY"):
        env["QT_QPA_PLATFORM"] = "offscreen"
    return env


def to_paint(command: list[str], home: Path) -> float:
    started = time.time()
    done = subprocess.run(command, capture_output=True, text=True, timeout=300, env=_env(home), cwd=home)
    for line in done.stdout.splitlines():
        if line.startswith("PAINTED "):
            return float(line.split()[1]) - started
    raise RuntimeError(f"{command[0]} did not paint:\n{done.stdout}\n{done.stderr}")


def wall(command: list[str], home: Path, cwd: Path) -> float:
    started = time.perf_counter()
    done = subprocess.run(command, capture_output=True, text=True, timeout=300, env=_env(home), cwd=cwd)
    elapsed = time.perf_counter() - started
    if done.returncode != 0:
        raise RuntimeError(f"{' '.join(command)} failed:\n{done.stderr}")
    return elapsed


def compare(title: str, ours: list[float], theirs: list[float], target: float | None = None) -> None:
    own, ref = statistics.median(ours[1:] or ours), statistics.median(theirs[1:] or theirs)
    print(f"{title}:")
    print(f"  venv    first {theirs[0]:.3f} s, median of the rest {ref:.3f} s  (all: {', '.join(f'{t:.3f}' for t in theirs)})")
    print(f"  bundle  first {ours[0]:.3f} s, median of the rest {own:.3f} s  (all: {', '.join(f'{t:.3f}' for t in ours)})")
    goal = f"  (target at most {target:.2f}x)" if target else ""
    print(f"  ratio   {own / ref:.2f}x{goal}")


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("folder", type=Path, help="the bundle folder (holds Twofold)")
    parser.add_argument("--archive", type=Path)
    parser.add_argument("--reference", default=sys.executable, help="the venv's Python")
    parser.add_argument("--runs", type=int, default=5)
    parser.add_argument("--file", type=Path, default=ROOT / "demo_files" / "bolt_strength.csv")
    args = parser.parse_args()
    folder, path = args.folder.resolve(), args.file.resolve()

    print(f"bundle folder  {folder_size(folder) / 1e6:.1f} MB  ({folder})")
    if args.archive:
        print(f"archive        {args.archive.stat().st_size / 1e6:.1f} MB  ({args.archive.name}; target under 150 MB)")

    with tempfile.TemporaryDirectory(prefix="twofold-bench-") as work:
        home = Path(work)
        bundle = [str(folder / "Twofold"), "--quit-after-paint", "0", str(path)]
        venv = [args.reference, str(ROOT / "packaging" / "launch.py"), "--quit-after-paint", "0", str(path)]
        ours, theirs = [], []
        for _ in range(args.runs + 1):
            theirs.append(to_paint(venv, home))
            ours.append(to_paint(bundle, home))
        compare(f"window start to the painted, filled grid ({path.name})", ours, theirs, 1.2)

        for label, arguments in (("analyze --json --seed 1", ["analyze", str(path), "--json", "--seed", "1"]),
                                 ("--help", ["--help"])):
            ours, theirs = [], []
            for _ in range(args.runs + 1):
                theirs.append(wall([args.reference, "-m", "engine", *arguments], home, ROOT))
                ours.append(wall([str(folder / "twofold-cli"), *arguments], home, home))
            compare(f"headless command, {label}", ours, theirs, 1.2)
    return 0


if __name__ == "__main__":
    sys.exit(main())
