"""The bundle's recipe (packaging/, .ci/bundle) agrees with the program, and its entry point works
from a checkout. The build itself runs only in ``bash .ci/bundle`` (minutes, not part of the suite)."""

from __future__ import annotations

import ast
import os
import pickle
import re
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
SPEC = ROOT / "packaging" / "twofold.spec"
LAUNCH = ROOT / "packaging" / "launch.py"
BUNDLE_SCRIPT = ROOT / ".ci" / "bundle"


def _launch_module():
    import importlib.util

    spec = importlib.util.spec_from_file_location("twofold_launch", LAUNCH)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def _clean_env(**extra: str) -> dict[str, str]:
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    env.update(extra)
    return env


def test_the_bundle_script_builds_the_spec_and_smoke_tests_it_outside_the_ci_run():
    script = BUNDLE_SCRIPT.read_text(encoding="utf-8")
    assert os.access(BUNDLE_SCRIPT, os.X_OK)
    assert "packaging/twofold.spec" in script and "packaging/smoke.py" in script
    assert re.search(r'"pyinstaller>=6[^"]*,<7"', script)
    assert "build/bundle" in script
    assert "bundle" not in (ROOT / ".ci" / "run").read_text(encoding="utf-8")  # .ci/run stays as fast
    ignored = (ROOT / ".gitignore").read_text(encoding="utf-8").split()
    assert "build/" in ignored  # where the venv, the work files, the folder and the archive go


def test_the_spec_is_python_and_ships_what_the_program_reads_at_run_time():
    text = SPEC.read_text(encoding="utf-8")
    ast.parse(text)
    # the files read with importlib.resources or run as a script (pyproject's package-data, and
    # the workbook reader's child)
    for shipped in ('"engine" / "io" / "_workbook_child.py"', '"engine" / "schema" / "*.json"',
                    '"desktop" / "artwork" / "*.svg"'):
        assert shipped in text
    assert '"python_calamine"' in text  # imported by the child script only, which no analysis reads
    for tool in ("pytest", "hypothesis", "statsmodels", "openpyxl", "odf"):
        assert f'"{tool}"' in text
    for module in ("QtQml", "QtQuick", "QtWebEngineCore", "QtMultimedia", "Qt3DCore"):
        assert f'"{module}"' in text


def test_the_macos_document_types_cover_every_file_type():
    from desktop.desktop_entry import FILE_TYPES, MACOS_TYPES

    assert set(FILE_TYPES) <= set(MACOS_TYPES)
    assert "MACOS_TYPES[extension]" in SPEC.read_text(encoding="utf-8")


def test_the_child_flag_is_the_same_on_both_sides():
    from engine.io.sheets import FROZEN_CHILD_FLAG

    assert _launch_module().WORKBOOK_CHILD == FROZEN_CHILD_FLAG


def test_a_source_install_runs_the_workbook_child_as_before(monkeypatch, tmp_path):
    from engine.io import sheets

    monkeypatch.delattr(sys, "frozen", raising=False)
    command = sheets.child_command(tmp_path / "a.xlsx", 1000)
    assert command == [sys.executable, "-I", str(ROOT / "engine" / "io" / "_workbook_child.py"),
                       str(tmp_path / "a.xlsx"), "1000"]


def test_a_bundle_runs_the_workbook_child_through_its_own_executable(monkeypatch, tmp_path):
    from engine.io import sheets

    monkeypatch.setattr(sys, "frozen", True, raising=False)
    monkeypatch.setattr(sys, "executable", "/opt/Twofold/Twofold")
    assert sheets.child_command(tmp_path / "a.xlsx", 1000) == [
        "/opt/Twofold/Twofold", "--workbook-child", str(tmp_path / "a.xlsx"), "1000"]


def test_the_entry_point_answers_as_the_workbook_child(tmp_path):
    # the conversation of engine/io/_workbook_child.py: the sheets first, then a read
    workbook = ROOT / "demo_files" / "fertiliser_yields.xlsx"
    child = subprocess.run([sys.executable, str(LAUNCH), "--workbook-child", str(workbook), str(2 ** 32)],
                           input=b"read 0\n", capture_output=True, timeout=120, cwd=tmp_path, env=_clean_env())
    assert child.returncode == 0, child.stderr
    import io

    answers = io.BytesIO(child.stdout)
    sheets = pickle.load(answers)
    rows = pickle.load(answers)
    assert sheets[0] == "sheets" and len(sheets[1]) >= 1
    assert rows[0] == "rows" and len(rows[1]) > 10


def test_the_entry_point_is_the_headless_command_under_its_name(tmp_path):
    link = tmp_path / "twofold-cli.py"
    link.symlink_to(LAUNCH)
    done = subprocess.run([sys.executable, str(link), "columns", str(ROOT / "demo_files" / "bolt_strength.csv")],
                          capture_output=True, text=True, timeout=120, cwd=tmp_path, env=_clean_env())
    assert done.returncode == 0, done.stderr
    assert done.stdout.startswith("bolt_strength.csv:")


@pytest.mark.parametrize("painted", [True, False])
def test_the_entry_point_reports_the_first_filled_paint_and_quits(tmp_path, painted):
    env = _clean_env(QT_QPA_PLATFORM="offscreen", HOME=str(tmp_path), XDG_CONFIG_HOME=str(tmp_path / "config"))
    if painted:
        arguments = [str(LAUNCH), "--quit-after-paint", "0", str(ROOT / "demo_files" / "bolt_strength.csv")]
    else:
        # with no file there is no filled grid: the watch gives up (here at once), says so, and
        # the exit code says so
        arguments = ["-c", "import importlib.util, sys; "
                     "s = importlib.util.spec_from_file_location('launch', sys.argv[1]); "
                     "m = importlib.util.module_from_spec(s); s.loader.exec_module(m); "
                     "m._PAINT_TIMEOUT_MS = 1; sys.exit(m.main(sys.argv[2:]))",
                     str(LAUNCH), "--quit-after-paint", "0"]
    done = subprocess.run([sys.executable, *arguments], capture_output=True, text=True, timeout=180,
                          cwd=tmp_path, env=env)
    if painted:
        assert done.returncode == 0, done.stderr
        assert re.search(r"^PAINTED \d+\.\d+$", done.stdout, re.MULTILINE)
    else:
        assert done.returncode == 3, done.stderr
        assert "NOT PAINTED" in done.stdout
    assert "Traceback" not in done.stderr
