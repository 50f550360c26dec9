"""The entry point: the command line, the desktop registration commands, opening FILE."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

from desktop.app import build_parser, main

ROOT = Path(__file__).resolve().parents[2]


def test_parser():
    args = build_parser().parse_args(["a.csv"])
    assert args.files == [Path("a.csv")] and not args.install_desktop_entry
    assert build_parser().parse_args(["--install-desktop-entry"]).install_desktop_entry


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


def test_start_opens_the_file_of_the_command_line(make_window, qtbot, two_groups_csv):
    window = make_window([two_groups_csv])
    assert window.isVisible()
    qtbot.waitUntil(lambda: window.session.table is not None, timeout=20_000)
    assert window.session.choices.path == two_groups_csv
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
