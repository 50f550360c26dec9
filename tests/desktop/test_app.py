"""The entry point: the command line, the desktop registration commands, opening FILE."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest

from desktop.app import build_parser, main

ROOT = Path(__file__).resolve().parents[2]


def test_parser():
    args = build_parser().parse_args(["a.csv"])
    assert args.files == [Path("a.csv")] and not args.install_desktop_entry
    assert build_parser().parse_args(["--install-desktop-entry"]).install_desktop_entry


def test_install_and_uninstall_together_are_refused_and_nothing_is_written(tmp_path, monkeypatch,
                                                                          capsys):
    share = tmp_path / "share"
    monkeypatch.setenv("XDG_DATA_HOME", str(share))
    with pytest.raises(SystemExit) as refused:
        main(["--install-desktop-entry", "--uninstall-desktop-entry"])
    assert refused.value.code == 2
    assert "not allowed with argument" in capsys.readouterr().err  # argparse's own line
    assert not share.exists()


def test_install_and_uninstall_commands(tmp_path, monkeypatch, capsys):
    share = tmp_path / "share"
    monkeypatch.setenv("XDG_DATA_HOME", str(share))
    assert main(["--install-desktop-entry"]) == 0
    entry = share / "applications" / "twofold.desktop"
    said = capsys.readouterr().out
    assert str(entry) in said and "Open With" in said and "default" in said
    assert "MimeType=text/csv;" in entry.read_text(encoding="utf-8")
    assert main(["--uninstall-desktop-entry"]) == 0
    assert not entry.exists()
    assert "no longer registered" in capsys.readouterr().out
    assert main(["--uninstall-desktop-entry"]) == 0  # a second time: nothing is said to be removed
    said = capsys.readouterr().out
    assert "nothing to remove" in said and "no longer registered" not in said


def test_start_opens_the_file_of_the_command_line(make_window, qtbot, two_groups_csv):
    window = make_window([two_groups_csv])
    assert window.isVisible()
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=20_000)
    assert window.session.path == two_groups_csv
    assert window.windowTitle().startswith("plots.csv")


def test_module_help_runs_without_a_display():
    done = subprocess.run([sys.executable, "-m", "desktop", "--help"], cwd=ROOT, capture_output=True,
                          text=True, timeout=60)
    assert done.returncode == 0
    assert "--install-desktop-entry" in done.stdout


def test_importing_the_window_does_not_load_the_statistics_or_plots():
    # the first paint must not wait for scipy.stats or pyqtgraph (they load after it)
    code = ("import sys, desktop.app, desktop.main_window, engine.io; "
            "print(sorted(m for m in ('scipy.stats', 'pyqtgraph') if m in sys.modules))")
    done = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, timeout=60,
                          env={"QT_QPA_PLATFORM": "offscreen", "PATH": "/usr/bin:/bin"})
    assert done.returncode == 0, done.stderr
    assert done.stdout.strip() == "[]"


# Runs `twofold FILE` as the command does, records the thread of every import, quits once the
# first analysis is shown and reports what it saw.
_START_AND_QUIT = r'''
import sys, threading
sys.path.insert(0, sys.argv[2])
imported_off_main = []


class Recorder:
    def find_spec(self, name, path=None, target=None):
        if threading.current_thread() is not threading.main_thread():
            imported_off_main.append(name)
        return None


sys.meta_path.insert(0, Recorder())
import desktop.app as app_module

keep_running = app_module._keep_running
seen = {}


def keep_running_and_watch(window):
    from PySide6.QtCore import QTimer

    seen["window"] = window

    def check():
        if window.findings_panel is not None and window.session.analysis is not None and not window.busy:
            window.quit_action.trigger()
        else:
            QTimer.singleShot(20, check)

    check()
    return keep_running(window)


app_module._keep_running = keep_running_and_watch
code = app_module.main([sys.argv[1]])
import shiboken6
qt_made = [n for n in imported_off_main if n.split(".")[0] in ("PySide6", "shiboken6", "pyqtgraph", "desktop")]
print("QT_MODULES_OFF_MAIN", sorted(set(qt_made)))
print("WINDOW_ALIVE_AFTER_MAIN", shiboken6.isValid(seen["window"]))
print("HOOK_RESTORED", sys.excepthook is sys.__excepthook__)
sys.exit(code)
'''


def test_start_imports_qt_modules_on_the_gui_thread_only_and_quits_clean(tmp_path):
    # A module that defines Qt classes, imported in a worker, races PySide6's type table against
    # the GUI thread (a crash in about one start in twenty; tests/benchmarks/bench_start_loop.py
    # counts them over hundreds of starts). And quitting tears the window down while the
    # application still exists, not at the interpreter's exit.
    script = tmp_path / "start_and_quit.py"
    script.write_text(_START_AND_QUIT, encoding="utf-8")
    env = {"QT_QPA_PLATFORM": "offscreen", "PATH": "/usr/bin:/bin", "XDG_CONFIG_HOME": str(tmp_path),
           "PYTHONFAULTHANDLER": "1"}
    done = subprocess.run([sys.executable, str(script), str(ROOT / "demo_files" / "bolt_strength.csv"), str(ROOT)],
                          cwd=tmp_path, capture_output=True, text=True, timeout=240, env=env)
    assert done.returncode == 0, done.stderr
    assert "QT_MODULES_OFF_MAIN []" in done.stdout, done.stdout
    assert "WINDOW_ALIVE_AFTER_MAIN False" in done.stdout
    assert "HOOK_RESTORED True" in done.stdout
