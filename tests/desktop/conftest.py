"""Shared set-up of the window tests: an offscreen Qt platform, private settings, ready windows."""

from __future__ import annotations

import gc
import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")  # before anything imports Qt

from pathlib import Path  # noqa: E402

import numpy as np  # noqa: E402
import pytest  # noqa: E402
from PySide6.QtCore import QSettings  # noqa: E402

ROOT = Path(__file__).resolve().parents[2]
DEMO_DIR = ROOT / "demo_files"
DATA_SUFFIXES = {".csv", ".tsv", ".txt", ".xlsx", ".xls", ".ods"}


def demo_files() -> list[Path]:
    """Every data file in demo_files/ (the list grows as demo data are added)."""
    if not DEMO_DIR.is_dir():
        return []
    return sorted(p for p in DEMO_DIR.iterdir() if p.suffix.lower() in DATA_SUFFIXES)


def pytest_generate_tests(metafunc):
    """A test that takes ``demo_path`` runs once per demo file."""
    if "demo_path" in metafunc.fixturenames:
        metafunc.parametrize("demo_path", demo_files(), ids=lambda p: p.name)


@pytest.fixture(autouse=True)
def _collect_only_between_tests():
    """No automatic cycle collection while a test runs: it could start in a worker thread and
    free an earlier test's widgets there, which can deadlock Qt (see desktop/collector.py).
    After each test, on the main thread, the generations that are due are collected."""
    from desktop.collector import collect_due

    was_enabled = gc.isenabled()
    gc.disable()
    yield
    collect_due()
    if was_enabled:
        gc.enable()


@pytest.fixture(autouse=True)
def _private_desktop_home(tmp_path, monkeypatch):
    """Keep every test away from the real user's settings and desktop folders."""
    monkeypatch.setenv("XDG_DATA_HOME", str(tmp_path / "xdg-data"))
    monkeypatch.setenv("XDG_CONFIG_HOME", str(tmp_path / "xdg-config"))


@pytest.fixture
def settings(tmp_path) -> QSettings:
    return QSettings(str(tmp_path / "settings.ini"), QSettings.Format.IniFormat)


@pytest.fixture
def sheets_asked() -> list:
    return []


@pytest.fixture
def make_window(qtbot, settings, sheets_asked):
    """``make_window(argv)`` starts the program as ``twofold ARGV`` would, without its event loop."""
    from desktop.app import start

    made = []

    def ask_sheet(names, current):
        sheets_asked.append(list(names))
        return current

    def make(argv=(), **options):
        options.setdefault("settings", settings)
        options.setdefault("ask_sheet", ask_sheet)
        options.setdefault("ask_reason", lambda where: "slip of the pen")
        window = start([str(a) for a in argv], **options)
        qtbot.addWidget(window)
        made.append(window)
        return window

    yield make
    for window in made:
        window.cleanup()


@pytest.fixture
def settle(qtbot):
    """``settle(window)`` waits until no worker of the window is busy."""
    def wait(window, timeout: int = 20_000) -> None:
        qtbot.waitUntil(lambda: not window.busy, timeout=timeout)
    return wait


def write_csv(path: Path, rows: list[tuple], header: tuple) -> Path:
    lines = [",".join(header)] + [",".join("" if v is None else str(v) for v in row) for row in rows]
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path


@pytest.fixture
def csv_file(tmp_path):
    """``csv_file(name, rows, header)`` writes a small CSV file in the test's folder."""
    return lambda name, rows, header: write_csv(tmp_path / name, rows, header)


@pytest.fixture
def three_groups_csv(tmp_path) -> Path:
    """A long-layout file with three adhesive batches and a few awkward cells."""
    rng = np.random.default_rng(7)
    rows = []
    for batch, centre in (("A", 20.0), ("B", 22.0), ("C", 25.0)):
        for value in rng.normal(centre, 1.5, 12):
            rows.append((batch, round(float(value), 2)))
    rows[3] = ("A", None)           # a blank measurement
    rows[15] = ("B", "n/a text")    # a word where a number belongs
    return write_csv(tmp_path / "adhesive_batches.csv", rows, ("batch", "peel_strength"))


@pytest.fixture
def two_groups_csv(tmp_path) -> Path:
    rng = np.random.default_rng(11)
    rows = [("north", round(float(v), 3)) for v in rng.normal(5.0, 1.0, 15)]
    rows += [("south", round(float(v), 3)) for v in rng.normal(6.0, 1.0, 14)]
    return write_csv(tmp_path / "plots.csv", rows, ("field", "yield_t"))
