"""Smoke test of a built bundle, run by ``.ci/bundle`` on a copy unpacked from the archive.

Every bundled program runs with a clean temporary HOME, ``PYTHONPATH`` unset, a ``PATH`` of the
system's folders only (no venv on it) and ``QT_QPA_PLATFORM=offscreen``. The checks:

1. the window opens each demo file, paints the filled grid, stays up a few seconds and quits
   with exit code 0 and nothing on stderr that looks like a traceback; the first start records
   that it offered the desktop registration, so the offer is made once;
2. the headless command (``twofold-cli analyze FILE --json --seed 1``) prints the same JSON as
   the reference Python's ``python -m engine analyze FILE --json --seed 1`` for each demo file;
3. registering with the desktop in a throwaway HOME writes the entry (its Exec line names the
   bundle's ``Twofold``), the icon and the saved-analysis MIME package; unregistering removes
   them, and a second unregistering says there was nothing to remove;
4. a saved analysis opens: ``analyze FILE --save OUT.twofold`` then ``analyze --spec OUT.twofold
   --json``, against the reference Python's output for the same saved file (skipped, and said
   so, when this build's headless command has no ``--save``).

Usage: ``python packaging/smoke.py BUNDLE_FOLDER --reference PYTHON`` (from the project folder;
PYTHON has Twofold's dependencies). Exit code 1 if any check failed.
"""

from __future__ import annotations

import argparse
import configparser
import json
import os
import shlex
import subprocess
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
DATA_SUFFIXES = {".csv", ".tsv", ".txt", ".xlsx", ".xls", ".ods"}
DEMO_FILES = sorted(p for p in (ROOT / "demo_files").iterdir() if p.suffix.lower() in DATA_SUFFIXES)
STAY_UP_SECONDS = 3
# JSON members that may differ between the bundle and the reference (none so far)
DIFFERING_MEMBERS: tuple[tuple[str, ...], ...] = ()
_SYSTEM_PATH = "/usr/local/bin:/usr/bin:/bin"


def clean_environment(home: Path) -> dict[str, str]:
    """A user's environment with nothing of the project in it."""
    runtime = home / "runtime"
    runtime.mkdir(mode=0o700, exist_ok=True)
    return {"HOME": str(home), "PATH": _SYSTEM_PATH, "LANG": "C.UTF-8", "QT_QPA_PLATFORM": "offscreen",
            "XDG_RUNTIME_DIR": str(runtime)}


def _without(document: dict, members: tuple[tuple[str, ...], ...]) -> dict:
    for path in members:
        node = document
        for key in path[:-1]:
            node = node.get(key, {})
        if isinstance(node, dict):
            node.pop(path[-1], None)
    return document


class Smoke:
    def __init__(self, folder: Path, reference: str, work: Path) -> None:
        self.window = folder / "Twofold"
        self.headless = folder / "twofold-cli"
        self.reference = reference
        self.work = work
        self.failures: list[str] = []

    def check(self, ok: bool, what: str, detail: str = "") -> bool:
        print(f"  {'ok  ' if ok else 'FAIL'} {what}" + (f": {detail}" if detail and not ok else ""), flush=True)
        if not ok:
            self.failures.append(what)
        return ok

    def home(self, name: str) -> Path:
        home = self.work / name
        home.mkdir()
        return home

    def run(self, command: list[str], home: Path, timeout: float = 180) -> subprocess.CompletedProcess:
        return subprocess.run(command, capture_output=True, text=True, timeout=timeout, cwd=home,
                              env=clean_environment(home))

    def reference_run(self, arguments: list[str]) -> subprocess.CompletedProcess:
        env = {key: value for key, value in os.environ.items() if key != "PYTHONPATH"}
        return subprocess.run([self.reference, "-m", "engine", *arguments], capture_output=True,
                              text=True, timeout=300, cwd=ROOT, env=env)

    # 1 ------------------------------------------------------------------------------------
    def window_opens_each_file(self) -> None:
        print("The window opens each demo file (offscreen):")
        home = self.home("window")
        for path in DEMO_FILES:
            done = self.run([str(self.window), "--quit-after-paint", str(STAY_UP_SECONDS), str(path)], home)
            painted = "PAINTED" in done.stdout
            crashed = "Traceback" in done.stderr or done.returncode != 0
            self.check(painted and not crashed, f"{path.name}: painted, stayed up {STAY_UP_SECONDS} s, quit cleanly",
                       f"exit code {done.returncode}\n{done.stdout}\n{done.stderr}")
        settings = home / ".config" / "Twofold" / "Twofold.conf"
        text = settings.read_text(encoding="utf-8") if settings.is_file() else ""
        self.check("registration_offered=true" in text, "the first start offered the desktop registration once",
                   f"{settings}: {text!r}")

    # 2 ------------------------------------------------------------------------------------
    def headless_matches_the_reference(self) -> None:
        print("The headless command gives the reference's JSON:")
        home = self.home("headless")
        for path in DEMO_FILES:
            arguments = ["analyze", str(path), "--json", "--seed", "1"]
            ours = self.run([str(self.headless), *arguments], home)
            theirs = self.reference_run(arguments)
            same = (ours.returncode == theirs.returncode == 0
                    and _without(json.loads(ours.stdout), DIFFERING_MEMBERS)
                    == _without(json.loads(theirs.stdout), DIFFERING_MEMBERS))
            self.check(same, f"{path.name}: the same JSON as the reference",
                       f"exit codes {ours.returncode}/{theirs.returncode}\n{ours.stderr}\n{theirs.stderr}")

    # 3 ------------------------------------------------------------------------------------
    def registration_comes_and_goes(self) -> None:
        print("Registering with the desktop in a throwaway HOME:")
        home = self.home("registration")
        share = home / ".local" / "share"
        done = self.run([str(self.window), "--install-desktop-entry"], home)
        self.check(done.returncode == 0, "--install-desktop-entry succeeds", done.stderr)
        entry_path = share / "applications" / "twofold.desktop"
        if self.check(entry_path.is_file(), "the desktop entry is written"):
            parser = configparser.ConfigParser(interpolation=None)
            parser.optionxform = str
            parser.read_string(entry_path.read_text(encoding="utf-8"))
            entry = parser["Desktop Entry"]
            command = shlex.split(entry["Exec"].replace("\\\\", "\\"))
            self.check(command == [str(self.window), "%f"], "its Exec line starts the bundle's Twofold", entry["Exec"])
            self.check("application/x-twofold+json;" in entry["MimeType"], "it offers Twofold for saved analyses",
                       entry["MimeType"])
        icon = share / "icons" / "hicolor" / "scalable" / "apps" / "twofold.svg"
        self.check(icon.is_file() and "<svg" in icon.read_text(encoding="utf-8"), "the icon comes from the bundle")
        package = share / "mime" / "packages" / "twofold-analysis.xml"
        self.check(package.is_file() and 'pattern="*.twofold"' in package.read_text(encoding="utf-8"),
                   "the saved-analysis MIME package is written")
        globs = share / "mime" / "globs2"
        if globs.parent.joinpath("mime.cache").exists() or globs.exists():
            self.check("*.twofold" in globs.read_text(encoding="utf-8"), "the user's MIME database knows *.twofold")
        done = self.run([str(self.window), "--uninstall-desktop-entry"], home)
        self.check(done.returncode == 0 and "no longer registered" in done.stdout,
                   "--uninstall-desktop-entry removes it", done.stdout + done.stderr)
        left = [str(p.relative_to(share)) for p in share.rglob("*") if "twofold" in p.name.lower()] \
            if share.exists() else []
        self.check(not left and not (share / "mime").exists(), "nothing of Twofold is left", ", ".join(left))
        done = self.run([str(self.window), "--uninstall-desktop-entry"], home)
        self.check(done.returncode == 0 and "nothing to remove" in done.stdout,
                   "a second --uninstall-desktop-entry says there was nothing to remove", done.stdout)

    # 4 ------------------------------------------------------------------------------------
    def saved_analysis_opens(self) -> None:
        print("A saved analysis opens:")
        home = self.home("saved")
        help_text = self.run([str(self.headless), "analyze", "--help"], home).stdout
        if "--save" not in help_text:
            print("  saved-analysis step skipped: this build has no --save")
            return
        source = ROOT / "demo_files" / "bolt_strength.csv"
        saved = home / "bolts.twofold"
        done = self.run([str(self.headless), "analyze", str(source), "--seed", "1", "--save", str(saved)], home)
        if not self.check(done.returncode == 0 and saved.is_file(), "analyze FILE --save OUT.twofold writes it",
                          done.stderr):
            return
        ours = self.run([str(self.headless), "analyze", "--spec", str(saved), "--json"], home)
        theirs = self.reference_run(["analyze", "--spec", str(saved), "--json"])
        same = (ours.returncode == theirs.returncode == 0 and json.loads(ours.stdout) == json.loads(theirs.stdout))
        self.check(same, "analyze --spec OUT.twofold --json gives the reference's JSON",
                   f"exit codes {ours.returncode}/{theirs.returncode}\n{ours.stderr}\n{theirs.stderr}")
        shown = self.run([str(self.window), "--quit-after-paint", str(STAY_UP_SECONDS), str(saved)], home)
        self.check("PAINTED" in shown.stdout and shown.returncode == 0 and "Traceback" not in shown.stderr,
                   "the window opens OUT.twofold, paints its data file's grid and quits cleanly",
                   f"exit code {shown.returncode}\n{shown.stdout}\n{shown.stderr}")


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("folder", type=Path, help="the unpacked bundle folder (holds Twofold and twofold-cli)")
    parser.add_argument("--reference", default=sys.executable, help="a Python with Twofold's dependencies")
    args = parser.parse_args()
    with tempfile.TemporaryDirectory(prefix="twofold-smoke-") as work:
        smoke = Smoke(args.folder.resolve(), args.reference, Path(work))
        smoke.window_opens_each_file()
        smoke.headless_matches_the_reference()
        smoke.registration_comes_and_goes()
        smoke.saved_analysis_opens()
    if smoke.failures:
        print(f"Smoke test FAILED: {len(smoke.failures)} check(s): " + "; ".join(smoke.failures))
        return 1
    print("Smoke test passed.")
    return 0


if __name__ == "__main__":
    sys.exit(main())
