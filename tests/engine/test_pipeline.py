"""One pipeline from a file and a spec to the analysis, shared by the command and the window."""

import io
import json
from pathlib import Path

import pytest

from engine import cli, pipeline
from engine.errors import ColumnProblem
from engine.io import file_checksum
from engine.jsonout import analysis_document
from engine.spec import AnalysisSpec, SetAside

DEMO = sorted((Path(__file__).parents[2] / "demo_files").glob("*.*"))


@pytest.mark.parametrize("path", DEMO, ids=lambda p: p.name)
def test_the_command_and_the_pipeline_give_the_same_document(path):
    out = io.StringIO()
    assert cli.main(["analyze", str(path), "--json", "--seed", "7", "--resamples", "300"], out=out) == 0
    by_command = json.loads(out.getvalue())
    prepared = pipeline.from_file(path, AnalysisSpec(seed=7, resamples=300))
    by_pipeline = json.loads(json.dumps(analysis_document(prepared.analysis), allow_nan=False))
    assert by_pipeline == by_command
    assert prepared.spec.source.sha256 == file_checksum(path)


def test_a_run_without_a_seed_records_the_one_it_drew_and_repeats_from_it():
    path = DEMO[0]
    first = pipeline.from_file(path, AnalysisSpec(resamples=300))
    assert first.spec.seed is not None and first.analysis.spec.seed == first.spec.seed
    again = pipeline.from_file(None, first.spec)
    assert analysis_document(again.analysis) == analysis_document(first.analysis)


def _csv(tmp_path, text) -> Path:
    path = tmp_path / "plots.csv"
    path.write_text(text, encoding="utf-8")
    return path


def test_a_cell_set_aside_is_found_by_its_file_row_and_text(tmp_path):
    path = _csv(tmp_path, "plot,yield\nA,1.5\nA,2.5\nA,9.0\nB,3.0\nB,4.0\nB,5.5\n")
    base = pipeline.from_file(path, AnalysisSpec(resamples=300, seed=1))
    assert base.intake.groups.n == (3, 3)
    aside = base.spec.replace(set_aside=(SetAside(row=4, column="yield", text="9", reason="spilled"),))
    prepared = pipeline.from_file(None, aside)
    assert prepared.intake.groups.n == (2, 3)
    assert prepared.analysis.screening.excluded_counts["set_aside"] == 1


def test_a_cell_set_aside_that_changed_is_said_not_skipped(tmp_path):
    path = _csv(tmp_path, "plot,yield\nA,1.5\nA,2.5\nA,9.0\nB,3.0\nB,4.0\nB,5.5\n")
    spec = pipeline.from_file(path, AnalysisSpec(resamples=300, seed=1)).spec
    changed = spec.replace(set_aside=(SetAside(row=4, column="yield", text="8", reason="spilled"),))
    with pytest.raises(ColumnProblem, match="row 4.*was '8' and is now '9'"):
        pipeline.from_file(None, changed)
    gone = spec.replace(set_aside=(SetAside(row=40, column="yield", text="8", reason=""),))
    with pytest.raises(ColumnProblem, match="row 40"):
        pipeline.from_file(None, gone)


def test_the_window_records_cells_set_aside_by_file_row(tmp_path):
    # the grid keys a cell by its frame row; the spec by the row a user sees in the file
    path = _csv(tmp_path, "report,\n\nplot,yield\nA,1.5\nA,2.5\nB,3.0\nB,4.0\n")
    table = pipeline.read(AnalysisSpec(source=pipeline.source_for(path)))
    cells = pipeline.set_aside_cells(table, {(1, "yield"): "checked"})
    assert cells == (SetAside(row=table.file_row(1), column="yield", text="2.5", reason="checked"),)
    assert pipeline.set_aside_keys(table, cells) == {(1, "yield"): "checked"}
