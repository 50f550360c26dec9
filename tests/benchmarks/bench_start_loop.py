"""Start the window many times and count the starts that end in a signal (a crash or an abort).

Each start is a fresh process that runs ``twofold FILE`` exactly as the command does
(``desktop.app.main``), offscreen, with Python's fault handler on. Once the window has been
painted, the late panels are in and the first analysis of the file is shown, it closes the
window as the user would (the Quit action) after a short random pause, so that the quitting
lands at different moments of the window's own start-up work; the process then ends through
the program's normal exit path. A start counts as:

- clean: exit code 0 and the analysis was reached;
- crashed: the process ended by a signal (SIGSEGV, SIGABRT, ...); its Python stacks from the
  fault handler are saved beside the report;
- hung: it did not end within the time limit;
- failed: any other exit code, or it ended before the analysis was shown.

Usage: ``python tests/benchmarks/bench_start_loop.py [FILE] [--starts 200] [--jobs 2]
[--keep DIR] [--quit-early] [--on-display]`` (``--quit-early`` also quits at random moments before the
analysis is done, to test quitting in the middle of the work). Exit code 1 if any start was not
clean. Run it on a quiet machine if the times matter; the counts do not depend on the load.
"""

from __future__ import annotations

import argparse
import os
import random
import signal
import subprocess
import sys
import tempfile
import time
from collections import Counter
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]

# Run in each child as its main script: argv = FILE ROOT SEED QUIT_EARLY
CHILD = r'''
import random, sys, time
sys.path.insert(0, sys.argv[2])
started = time.monotonic()
rng = random.Random(int(sys.argv[3]))
quit_early = sys.argv[4] == "1"
import desktop.app as app_module

keep_running = app_module._keep_running


def keep_running_and_watch(window):
    keep_running(window)
    from PySide6.QtCore import QEvent, QObject, QTimer

    state = {"painted": False, "quitting": False}

    class Painted(QObject):
        def eventFilter(self, watched, event):
            if event.type() == QEvent.Type.Paint:
                state["painted"] = True
            return False

    watch = Painted(window)
    window.installEventFilter(watch)
    window.data_panel.grid.viewport().installEventFilter(watch)

    def quit_now(why):
        if not state["quitting"]:
            state["quitting"] = True
            print(f"QUIT {why} {time.monotonic() - started:.3f}", flush=True)
            window.quit_action.trigger()

    def check():
        done = (state["painted"] and window.findings_panel is not None
                and window.session.analysis is not None and not window.busy)
        if done:
            print(f"ANALYSED {time.monotonic() - started:.3f}", flush=True)
            QTimer.singleShot(rng.randrange(0, 300), lambda: quit_now("after-analysis"))
        else:
            QTimer.singleShot(10, check)

    check()
    if quit_early and rng.random() < 0.5:
        QTimer.singleShot(rng.randrange(0, 1500), lambda: quit_now("early"))


app_module._keep_running = keep_running_and_watch
sys.exit(app_module.main([sys.argv[1]]))
'''


# What the offscreen platform itself prints; not a sign of trouble.
_PLATFORM_NOISE = ("This plugin does not support propagateSizeHints()",)


def _own_stderr(stderr: str) -> str:
    return "\n".join(line for line in stderr.splitlines() if line.strip() not in _PLATFORM_NOISE)


def _environment(settings_home: str, on_display: bool) -> dict[str, str]:
    env = dict(os.environ)
    if not on_display:
        env["QT_QPA_PLATFORM"] = "offscreen"
    env["XDG_CONFIG_HOME"] = settings_home  # the recent list of the runs stays out of the user's
    env["PYTHONFAULTHANDLER"] = "1"
    return env


def _one_start(number: int, seed: int, script: Path, path: Path, timeout: float, quit_early: bool,
               keep: Path, on_display: bool) -> tuple[str, float, str]:
    with tempfile.TemporaryDirectory() as home:
        started = time.monotonic()
        child = subprocess.Popen([sys.executable, "-X", "faulthandler", str(script), str(path), str(ROOT),
                                  str(seed), "1" if quit_early else "0"],
                                 stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                                 env=_environment(home, on_display), cwd=home)
        try:
            stdout, stderr = child.communicate(timeout=timeout)
        except subprocess.TimeoutExpired:
            child.send_signal(signal.SIGABRT)  # the fault handler prints every thread's stack
            try:
                stdout, stderr = child.communicate(timeout=30)
            except subprocess.TimeoutExpired:
                child.kill()
                stdout, stderr = child.communicate()
            (keep / f"start_{number:04d}_hung.txt").write_text(stdout + "\n----- stderr -----\n" + stderr)
            return "hung", time.monotonic() - started, ""
        done = subprocess.CompletedProcess(child.args, child.returncode, stdout, stderr)
    took = time.monotonic() - started
    if done.returncode < 0:
        name = signal.Signals(-done.returncode).name
        (keep / f"start_{number:04d}_{name}.txt").write_text(done.stdout + "\n----- stderr -----\n" + done.stderr)
        return f"crashed ({name})", took, done.stderr
    early = "QUIT early" in done.stdout
    if done.returncode != 0 or ("ANALYSED" not in done.stdout and not early):
        (keep / f"start_{number:04d}_failed.txt").write_text(done.stdout + "\n----- stderr -----\n" + done.stderr)
        return f"failed (exit {done.returncode})", took, done.stderr
    if _own_stderr(done.stderr).strip():
        (keep / f"start_{number:04d}_stderr.txt").write_text(done.stderr)
    return "clean (quit early)" if early else "clean", took, _own_stderr(done.stderr)


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("file", nargs="?", type=Path, default=ROOT / "demo_files" / "bolt_strength.csv")
    parser.add_argument("--starts", type=int, default=200)
    parser.add_argument("--jobs", type=int, default=2, help="starts run side by side")
    parser.add_argument("--timeout", type=float, default=120.0, help="seconds before a start counts as hung")
    parser.add_argument("--keep", type=Path, default=None, help="folder for the output of bad starts")
    parser.add_argument("--quit-early", action="store_true")
    parser.add_argument("--seed", type=int, default=0)
    parser.add_argument("--on-display", action="store_true",
                        help="use the display of the environment (say, under xvfb-run) instead of offscreen")
    args = parser.parse_args()
    keep = args.keep or Path(tempfile.mkdtemp(prefix="twofold_starts_"))
    keep.mkdir(parents=True, exist_ok=True)
    script = keep / "start_child.py"
    script.write_text(CHILD)
    path = args.file.resolve()
    counts: Counter[str] = Counter()
    times: list[float] = []
    noisy = 0
    begun = time.monotonic()
    seeds = random.Random(args.seed)
    numbers = [(n, seeds.randrange(1 << 30)) for n in range(args.starts)]

    def run(item: tuple[int, int]) -> tuple[str, float, str]:
        number, seed = item
        return _one_start(number, seed, script, path, args.timeout, args.quit_early, keep, args.on_display)

    with ThreadPoolExecutor(max_workers=max(1, args.jobs)) as pool:
        for index, (outcome, took, stderr) in enumerate(pool.map(run, numbers), start=1):
            counts[outcome] += 1
            times.append(took)
            noisy += bool(stderr.strip()) and outcome.startswith("clean")
            if not outcome.startswith("clean") or index % 20 == 0:
                print(f"  {index:4d}/{args.starts}: {outcome} ({took:.1f} s)", flush=True)
    total = sum(counts.values())
    bad = sum(n for what, n in counts.items() if not what.startswith("clean"))
    times.sort()
    print(f"{total} starts of twofold {path.name} in {time.monotonic() - begun:.0f} s "
          f"({args.jobs} at a time; median {times[len(times) // 2]:.2f} s, longest {times[-1]:.2f} s):")
    for what, n in sorted(counts.items()):
        print(f"  {what:24s} {n}")
    print(f"  clean but wrote to stderr {noisy}")
    print(f"  not clean                 {bad}   (output of each kept in {keep})")
    return 1 if bad else 0


if __name__ == "__main__":
    sys.exit(main())
