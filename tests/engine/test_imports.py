"""The engine stays free of Qt, and the parts the window needs before its first paint stay light."""

import json
import subprocess
import sys

import pytest

ENGINE_MODULES = [
    "engine", "engine.errors", "engine.results", "engine.summary", "engine.io", "engine.session",
    "engine.analysis", "engine.diagnostics", "engine.advice", "engine.effects", "engine.report",
    "engine.procedures.t", "engine.procedures.ranks", "engine.procedures.resampling",
    "engine.cli", "engine.jsonout",
]


def _loaded_after(imports: list[str]) -> set[str]:
    code = (
        "import importlib, json, sys\n"
        f"for name in {imports!r}: importlib.import_module(name)\n"
        "print(json.dumps(sorted(sys.modules)))\n"
    )
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    return set(json.loads(done.stdout))


def test_engine_never_loads_qt_or_the_window():
    loaded = _loaded_after(ENGINE_MODULES)
    forbidden = {name for name in loaded
                 if name.split(".")[0] in {"PySide6", "shiboken6", "pyqtgraph", "desktop", "PyQt5", "PyQt6"}}
    assert forbidden == set()


@pytest.mark.parametrize("module", ["engine.io", "engine.session", "engine.results"])
def test_what_the_window_needs_first_does_not_load_scipy(module):
    # scipy.stats takes about a second to import; the window loads it after its first paint.
    loaded = _loaded_after([module])
    assert not any(name == "scipy.stats" or name.startswith("scipy.stats.") for name in loaded)


def test_the_headless_analysis_loads_neither_scipy_stats_nor_scipy_optimize():
    # scipy.stats (about 0.7 s) and scipy.optimize (about 0.3 s, with scipy.linalg behind it)
    # were most of the import time of a run; the engine takes its distributions from
    # scipy.special and has its own Shapiro-Wilk and root finder
    code = (
        "import contextlib, io, json, sys\n"
        "from engine.cli import main\n"
        "with contextlib.redirect_stdout(io.StringIO()):\n"
        "    main(['analyze', 'demo_files/bolt_strength.csv', '--json', '--resamples', '200', '--seed', '1'])\n"
        "print(json.dumps(sorted(sys.modules)))\n"
    )
    from pathlib import Path

    root = Path(__file__).resolve().parents[2]
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True, cwd=root)
    loaded = set(json.loads(done.stdout.strip().splitlines()[-1]))
    assert "engine.analysis" in loaded and "scipy.special" in loaded
    heavy = {name for name in loaded if name.split(".")[:2] in (["scipy", "stats"], ["scipy", "optimize"])}
    assert heavy == set()
