"""The window and the headless command run the same pipeline: one file and one spec give the same
numbers, member for member, in the window's analysis and in ``python -m engine analyze --json``."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

from engine.jsonout import analysis_document

ROOT = Path(__file__).resolve().parents[2]
SEED = 8_675_309  # any seed typed by the user


def command_document(path: Path, *extra: str) -> dict:
    done = subprocess.run([sys.executable, "-m", "engine", "analyze", str(path), "--json", *extra],
                          cwd=ROOT, capture_output=True, text=True, timeout=300)
    assert done.returncode == 0, done.stderr
    return json.loads(done.stdout)


def window_document(analysis) -> dict:
    return json.loads(json.dumps(analysis_document(analysis), allow_nan=False))  # as the command prints it


def type_seed(window, seed) -> None:
    edit = window.setup_panel.seed
    edit.setText(str(seed))
    edit.setModified(True)
    edit.editingFinished.emit()


def test_the_window_and_the_command_give_the_same_numbers(make_window, qtbot, demo_path):
    window = make_window([demo_path])
    qtbot.waitUntil(lambda: window.session.analysis is not None, timeout=60_000)
    drawn = window.session.analysis.spec.seed
    assert window.setup_panel.seed.text() == str(drawn)  # the new analysis shows the seed it drew
    type_seed(window, SEED)
    qtbot.waitUntil(lambda: window.session.analysis is not None and window.session.analysis.spec.seed == SEED
                    and not window.busy, timeout=60_000)
    expected = command_document(demo_path, "--seed", str(SEED))
    got = window_document(window.session.analysis)
    assert got["spec"] == expected["spec"]
    assert got == expected


def test_the_windows_spec_with_a_value_set_aside_runs_again_to_the_same_numbers(make_window, qtbot, tmp_path):
    window = make_window([ROOT / "demo_files" / "bolt_strength.csv"])
    qtbot.waitUntil(lambda: window.session.analysis is not None, timeout=60_000)
    state = window.session
    state.ask(kind="lower", level=0.9)
    state.choose(resamples=2_000)
    window.data_panel.set_aside(2, state.spec.value_columns[0], "slip of the pen")
    type_seed(window, SEED)
    qtbot.waitUntil(lambda: state.analysis is not None and state.analysis.spec.seed == SEED
                    and bool(state.analysis.spec.set_aside) and not window.busy, timeout=60_000)
    spec = state.analysis.spec
    assert spec.set_aside[0].reason == "slip of the pen" and spec.question.kind == "lower"
    # the window's spec, written out as plain values and read back, runs the whole pipeline again
    saved = tmp_path / "spec.json"
    saved.write_text(json.dumps(spec.to_dict()), encoding="utf-8")
    from engine import pipeline
    from engine.spec import AnalysisSpec

    again = pipeline.from_file(spec=AnalysisSpec.from_dict(json.loads(saved.read_text(encoding="utf-8"))))
    assert window_document(again.analysis) == window_document(state.analysis)
