"""The saved-analysis file: save -> load -> reopen gives the saved numbers; a changed, moved or
missing data file and a damaged, foreign or newer saved file are said in one line.

Round trips check the program against itself (the saved numbers against a second run); the
numbers themselves are pinned to outside references in the procedures' own tests.
"""

import json
import math
import shutil
import tempfile
from pathlib import Path

import pytest
from hypothesis import HealthCheck, event, given, settings, strategies as st

from engine import __version__, pipeline, saved
from engine.errors import DataProblem
from engine.io import file_checksum
from engine.question import Question
from engine.saved import SavedFileProblem
from engine.spec import AnalysisSpec, Statements

DEMO = sorted((Path(__file__).parents[2] / "demo_files").glob("*.*"))
FEW = 200  # resamples: enough to exercise the resampling, quick for CI


def _saved_run(data: Path, folder: Path, spec: AnalysisSpec = AnalysisSpec(resamples=FEW)):
    prepared = pipeline.from_file(data, spec)
    target = folder / "run.twofold"
    saved.save(target, prepared.analysis)
    return prepared, target


def _copy(path: Path, folder: Path) -> Path:
    folder.mkdir(parents=True, exist_ok=True)
    return Path(shutil.copy(path, folder / path.name))


@pytest.mark.parametrize("demo", DEMO, ids=lambda p: p.name)
def test_every_demo_file_reopens_to_the_same_numbers(demo, tmp_path):
    data = _copy(demo, tmp_path / "data")
    prepared, target = _saved_run(data, tmp_path)
    loaded = saved.load(target)
    assert loaded.spec == prepared.spec
    assert loaded.numbers == saved.numbers_of(prepared.analysis)
    assert loaded.program_version == __version__
    again = saved.reopen(loaded)
    assert again.status == "same", again.message
    assert again.differences == () and again.confirmed and not again.found_elsewhere
    assert saved.numbers_of(again.prepared.analysis) == loaded.numbers
    # every procedure that ran is recorded, with the figures named in the contract
    assert set(loaded.numbers["procedures"]) == set(prepared.analysis.procedures)
    assert loaded.numbers["suggested"] == prepared.analysis.recommendation.key


def test_the_file_is_sorted_indented_utf8_json_and_the_data_file_is_untouched(tmp_path):
    data = tmp_path / "plots.csv"
    data.write_text("plot,yield\nÅsa,1.5\nÅsa,2.5\nÅsa,2.0\nBö,3.0\nBö,4.0\nBö,5.5\n", encoding="utf-8")
    before = data.read_bytes()
    _, target = _saved_run(data, tmp_path)
    raw = target.read_bytes()
    text = raw.decode("utf-8")
    assert "Åsa" in text  # written as UTF-8, not escaped
    document = json.loads(text)
    assert text == json.dumps(document, indent=2, sort_keys=True, ensure_ascii=False) + "\n"
    assert document["format"] == "twofold-analysis" and document["version"] == 1
    assert document["spec"]["source"]["sha256"] == file_checksum(data)
    assert data.read_bytes() == before
    assert [p.name for p in tmp_path.iterdir() if p.name.endswith(".part")] == []


def test_saving_twice_gives_the_same_bytes_but_the_time(tmp_path):
    _, target = _saved_run(DEMO[0], tmp_path)
    first = json.loads(target.read_text(encoding="utf-8"))
    saved.save(target, pipeline.from_file(None, saved.load(target).spec).analysis)
    second = json.loads(target.read_text(encoding="utf-8"))
    first.pop("saved_at"), second.pop("saved_at")
    assert first == second


def test_saving_over_the_data_file_is_refused(tmp_path):
    data = _copy(DEMO[0], tmp_path)
    before = data.read_bytes()
    prepared = pipeline.from_file(data, AnalysisSpec(resamples=FEW))
    with pytest.raises(SavedFileProblem, match="is the data file itself"):
        saved.save(data, prepared.analysis)
    assert data.read_bytes() == before


def test_a_failed_write_leaves_the_old_file_whole_and_no_part_behind(tmp_path, monkeypatch):
    target = tmp_path / "kept.twofold"
    target.write_text("old", encoding="utf-8")
    target.chmod(0o600)

    def full_disk(_):
        raise OSError(28, "No space left on device")

    monkeypatch.setattr(saved.os, "fsync", full_disk)
    with pytest.raises(SavedFileProblem, match="kept.twofold could not be written .*No space left"):
        saved.write_atomically(target, "new")
    monkeypatch.undo()
    assert target.read_text(encoding="utf-8") == "old"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["kept.twofold"]
    saved.write_atomically(target, "new")
    assert target.read_text(encoding="utf-8") == "new" and target.stat().st_mode & 0o777 == 0o600


def test_a_new_file_gets_the_permissions_the_umask_allows(tmp_path):
    import os

    mask = os.umask(0o027)
    try:
        saved.write_atomically(tmp_path / "new.twofold", "{}")
    finally:
        os.umask(mask)
    assert (tmp_path / "new.twofold").stat().st_mode & 0o777 == 0o640


def test_a_folder_that_cannot_be_written_is_one_line(tmp_path):
    prepared = pipeline.from_file(DEMO[0], AnalysisSpec(resamples=FEW))
    with pytest.raises(SavedFileProblem, match=r"run.twofold could not be written in .*missing"):
        saved.save(tmp_path / "missing" / "run.twofold", prepared.analysis)


def test_a_changed_byte_in_the_data_file_is_never_called_the_same(tmp_path):
    data = _copy(DEMO[0], tmp_path / "data")
    _, target = _saved_run(data, tmp_path)
    raw = bytearray(data.read_bytes())
    at = raw.index(b".") + 1  # a digit after the first decimal point: still a valid file
    raw[at] = ord("7") if raw[at] != ord("7") else ord("3")
    data.write_bytes(bytes(raw))
    again = saved.reopen(saved.load(target))
    assert again.status == "source_changed"
    assert not again.confirmed and again.prepared is not None
    assert "changed since the analysis was saved" in again.message


def test_a_file_changed_only_in_a_column_not_used_still_counts_as_changed(tmp_path):
    data = tmp_path / "plots.csv"
    data.write_text("plot,yield,note\nA,1.5,x\nA,2.5,x\nA,2.0,x\nB,3.0,x\nB,4.0,x\nB,5.5,x\n", encoding="utf-8")
    _, target = _saved_run(data, tmp_path, AnalysisSpec(resamples=FEW, group_column="plot",
                                                        value_columns=("yield",)))
    data.write_text(data.read_text(encoding="utf-8").replace(",x\nB,5.5", ",y\nB,5.5"), encoding="utf-8")
    again = saved.reopen(saved.load(target))
    assert again.status == "source_changed" and again.differences == ()


def test_a_moved_data_file_is_missing_then_located(tmp_path):
    data = _copy(DEMO[1], tmp_path / "data")
    _, target = _saved_run(data.resolve(), tmp_path)  # an absolute path, as the window records
    moved = _copy(data, tmp_path / "elsewhere")
    data.unlink()
    loaded = saved.load(target)
    missing = saved.reopen(loaded)
    assert missing.status == "source_missing" and missing.prepared is None
    assert data.name in missing.message
    located = saved.reopen(loaded, source_path=moved)
    assert located.status == "same" and located.found_elsewhere
    assert located.source_used == str(moved)
    assert located.prepared.spec.source.path == str(moved)


def test_a_located_file_with_another_checksum_is_changed(tmp_path):
    data = _copy(DEMO[1], tmp_path / "data")
    _, target = _saved_run(data, tmp_path)
    edited = _copy(data, tmp_path / "other")
    edited.write_bytes(edited.read_bytes() + b"north_forge,830.5,104\n")
    data.unlink()
    located = saved.reopen(saved.load(target), source_path=edited)
    assert located.status == "source_changed" and located.prepared.analysis.groups.n[0] == 33
    other = _copy(DEMO[0], tmp_path / "another")
    with pytest.raises(SavedFileProblem, match="no longer fits"):  # its columns are not the spec's
        saved.reopen(saved.load(target), source_path=other)
    nowhere = saved.reopen(saved.load(target), source_path=tmp_path / "nowhere.csv")
    assert nowhere.status == "source_missing" and "nowhere.csv" in nowhere.message


def test_a_relative_path_is_found_from_the_saved_file_and_beside_it(tmp_path, monkeypatch):
    project = tmp_path / "project"
    data = _copy(DEMO[0], project / "data")
    monkeypatch.chdir(project)
    prepared = pipeline.from_file(Path("data") / data.name, AnalysisSpec(resamples=FEW))
    (project / "out").mkdir()
    target = project / "out" / "run.twofold"
    saved.save(target, prepared.analysis)
    document = json.loads(target.read_text(encoding="utf-8"))
    assert document["spec"]["source"]["path"] == str(Path("data") / data.name)  # as given
    assert document["source_from_here"] == f"../data/{data.name}"
    monkeypatch.chdir(tmp_path)  # from anywhere else: found from the saved file's folder
    assert saved.reopen(saved.load(target)).status == "same"
    # the saved file and the data file travel together, side by side: found by name, checksum checked
    trip = tmp_path / "trip"
    shutil.copy(target, _copy(data, trip).parent / "run.twofold")
    shutil.rmtree(project)
    beside = saved.reopen(saved.load(trip / "run.twofold"))
    assert beside.status == "same" and beside.found_elsewhere
    assert "new place" in beside.message
    # a file of that name beside it with other bytes is not taken for it
    (trip / data.name).write_text("supplier,strength_mpa\na,1\na,2\nb,3\nb,4\n", encoding="utf-8")
    assert saved.reopen(saved.load(trip / "run.twofold")).status == "source_missing"


def test_a_spec_naming_a_column_that_is_gone_is_one_line(tmp_path):
    data = tmp_path / "plots.csv"
    data.write_text("plot,yield\nA,1.5\nA,2.5\nA,2.0\nB,3.0\nB,4.0\nB,5.5\n", encoding="utf-8")
    _, target = _saved_run(data, tmp_path)
    data.write_text("plot,harvest\nA,1.5\nA,2.5\nA,2.0\nB,3.0\nB,4.0\nB,5.5\n", encoding="utf-8")
    with pytest.raises(SavedFileProblem, match="run.twofold: the analysis no longer fits its data: .*yield") as caught:
        saved.reopen(saved.load(target))
    assert "\n" not in str(caught.value)


def test_a_group_that_is_gone_is_one_line(tmp_path):
    data = tmp_path / "plots.csv"
    data.write_text("plot,yield\nA,1.5\nA,2.5\nA,2.0\nB,3.0\nB,4.0\nB,5.5\nC,1.0\nC,2.0\n", encoding="utf-8")
    _, target = _saved_run(data, tmp_path, AnalysisSpec(resamples=FEW, groups=("A", "C")))
    data.write_text("plot,yield\nA,1.5\nA,2.5\nA,2.0\nB,3.0\nB,4.0\nB,5.5\n", encoding="utf-8")
    with pytest.raises(SavedFileProblem, match="no longer fits its data") as caught:
        saved.reopen(saved.load(target))
    assert "\n" not in str(caught.value) and "'C'" in str(caught.value)


# -- comparing the numbers ------------------------------------------------------------------------
def _numbers(tmp_path):
    _, target = _saved_run(DEMO[1], tmp_path)
    return saved.load(target).numbers


def test_numbers_within_the_tolerance_are_close_and_beyond_it_differ(tmp_path):
    numbers = _numbers(tmp_path)
    p = numbers["procedures"]["welch_t"]["p_value"]
    nudged = json.loads(json.dumps(numbers))
    nudged["procedures"]["welch_t"]["p_value"] = p * (1 + 4e-13)
    status, differences = saved.compare_numbers(numbers, nudged)
    assert status == "close" and differences == (f"welch_t p_value: saved {p!r}, now {p * (1 + 4e-13)!r}",)
    nudged["procedures"]["welch_t"]["p_value"] = p * (1 + 4e-12)
    assert saved.compare_numbers(numbers, nudged)[0] == "numbers_differ"
    assert saved.compare_numbers(numbers, json.loads(json.dumps(numbers))) == ("same", ())


def test_a_procedure_gone_or_added_and_another_suggestion_differ(tmp_path):
    numbers = _numbers(tmp_path)
    fewer = json.loads(json.dumps(numbers))
    fewer["procedures"].pop("welch_t")
    fewer["suggested"] = "zzz"
    status, differences = saved.compare_numbers(numbers, fewer)
    assert status == "numbers_differ"
    assert "welch_t: saved computed, now not computed" in differences
    assert any(d.startswith("suggested procedure: saved") for d in differences)
    assert saved.compare_numbers(fewer, numbers)[0] == "numbers_differ"


def test_a_number_and_a_text_never_compare_close():
    numbers = {"groups": [], "procedures": {"x": {"p_value": 0.5}}, "effect_sizes": {}, "suggested": "x"}
    other = {"groups": [], "procedures": {"x": {"p_value": "NaN"}}, "effect_sizes": {}, "suggested": "x"}
    assert saved.compare_numbers(numbers, other)[0] == "numbers_differ"


def test_numbers_differ_when_the_saved_figures_were_edited(tmp_path):
    _, target = _saved_run(DEMO[1], tmp_path)
    document = json.loads(target.read_text(encoding="utf-8"))
    document["numbers"]["procedures"]["welch_t"]["estimate"] += 1.0
    target.write_text(json.dumps(document), encoding="utf-8")
    again = saved.reopen(saved.load(target))
    assert again.status == "numbers_differ" and not again.confirmed
    assert again.differences[0].startswith("welch_t estimate: saved")
    assert "welch_t estimate" in again.message and "is unchanged" in again.message


def test_a_changed_verdict_against_the_margin_differs_and_is_named():
    verdict = {"case": "equivalent", "yes": True, "difference_low": -0.5, "difference_high": 0.25}
    numbers = {"groups": [], "procedures": {}, "effect_sizes": {}, "suggested": "x",
               "margins": {"equivalence_welch": verdict}}
    other = json.loads(json.dumps(numbers))
    other["margins"]["equivalence_welch"].update(case="inconclusive", yes=False)
    status, differences = saved.compare_numbers(numbers, other)
    assert status == "numbers_differ"
    assert differences == ("equivalence_welch margin case: saved equivalent, now inconclusive",
                           "equivalence_welch margin yes: saved True, now False")
    # a saved file without verdicts (a question without a margin) against one with them
    plain = {key: value for key, value in numbers.items() if key != "margins"}
    assert saved.compare_numbers(plain, numbers)[0] == "numbers_differ"
    assert saved.compare_numbers(numbers, json.loads(json.dumps(numbers))) == ("same", ())


def test_a_question_without_a_margin_saves_no_verdicts(tmp_path):
    assert "margins" not in _numbers(tmp_path)


def test_non_finite_figures_are_kept_as_texts():
    assert [saved._figure(v) for v in (math.nan, math.inf, -math.inf, None, 2)] == \
        ["NaN", "Infinity", "-Infinity", None, 2.0]


# -- files that are not (good) saved analyses -------------------------------------------------------
@pytest.fixture
def good(tmp_path):
    _, target = _saved_run(DEMO[1], tmp_path)
    return target, json.loads(target.read_text(encoding="utf-8"))


def _written(path: Path, document) -> Path:
    path.write_text(json.dumps(document), encoding="utf-8")
    return path


def _one_line_problem(path: Path, pattern: str) -> str:
    with pytest.raises(SavedFileProblem, match=pattern) as caught:
        saved.load(path)
    message = str(caught.value)
    assert "\n" not in message and path.name in message
    return message


@pytest.mark.parametrize("damage, pattern", [
    (lambda text: text[: len(text) // 2], "cut short"),
    (lambda text: text[: text.index('"sha256": "') + 20], "cut short"),
    (lambda text: text.rstrip()[:-1], "cut short"),
    (lambda text: text.replace(":", ";", 1), "not valid JSON at line"),
    (lambda text: "", "is empty"),
    (lambda text: "[1, 2, 3]", "no set of named members"),
    (lambda text: "NaN", "not a JSON number"),
    (lambda text: '{"format": "twofold-analysis", "format": "x"}', "given twice"),
    (lambda text: "[" * 100_000 + "]" * 100_000, "nests too deeply|not valid JSON"),
    (lambda text: text.replace("twofold-analysis", "something-else"), "is not a Twofold analysis"),
])
def test_a_damaged_text_is_one_line(good, damage, pattern):
    target, _ = good
    target.write_text(damage(target.read_text(encoding="utf-8")), encoding="utf-8")
    _one_line_problem(target, pattern)


def test_bytes_that_are_not_utf8_are_one_line(good):
    target, _ = good
    target.write_bytes(b"\xff\xfe" + target.read_bytes())
    _one_line_problem(target, "not UTF-8")


def test_a_newer_version_asks_for_a_newer_twofold(good):
    target, document = good
    message = _one_line_problem(_written(target, {**document, "version": 2}), "made by a newer Twofold")
    assert "update Twofold" in message


@pytest.mark.parametrize("version", [0, -1, "1", 1.0, True, None])
def test_an_unknown_or_ill_kinded_version_is_refused(good, version):
    target, document = good
    _one_line_problem(_written(target, {**document, "version": version}), "version")


@pytest.mark.parametrize("edit, pattern", [
    (lambda d: d["spec"].update(resamples=-3), "its analysis cannot be used.*resamples, not -3"),
    (lambda d: d["spec"]["question"].update(kind="maybe"), "In 'question'"),
    (lambda d: d["spec"].update(colour="red"), "Unknown member.*colour"),
    (lambda d: d["spec"]["source"].update(sha256="abc"), "checksum"),
    (lambda d: d["spec"]["source"].update(sha256=None), "checksum"),
    (lambda d: d["spec"].update(seed=None), "seed"),
    (lambda d: d["spec"].update(source=None), "data file"),
    (lambda d: d.update(spec=[1]), "'spec' has a value of the wrong kind"),
    (lambda d: d.pop("numbers"), "'numbers' is missing"),
    (lambda d: d["numbers"].pop("suggested"), "numbers"),
    (lambda d: d["numbers"]["procedures"]["welch_t"].update(p_value="small"), "welch_t p_value is not a number"),
    (lambda d: d["numbers"]["procedures"]["welch_t"].pop("df"), "figures of welch_t"),
    (lambda d: d["numbers"].update(groups=[]), "two groups"),
    (lambda d: d["numbers"]["groups"][0].update(n="many"), "group 1"),
    (lambda d: d.pop("saved_at"), "'saved_at' is missing"),
    (lambda d: d.update(program_version=3), "program_version"),
    (lambda d: d.update(source_from_here=7), "source_from_here"),
    (lambda d: d["numbers"].update(margins=[1]), "'margins' verdicts"),
    (lambda d: d["numbers"].update(margins={"welch_t": {"case": "equivalent", "yes": "yes",
                                                       "difference_low": 1.0, "difference_high": 2.0}}),
     "verdict of welch_t against the margin"),
    (lambda d: d["numbers"].update(margins={"welch_t": {"case": "equivalent", "yes": True}}),
     "verdict of welch_t against the margin"),
    (lambda d: d["numbers"].update(margins={"welch_t": {"case": "equivalent", "yes": True,
                                                       "difference_low": "low", "difference_high": 2.0}}),
     "welch_t difference_low is not a number"),
    (lambda d: d["numbers"].update(verdicts={}), "numbers"),
])
def test_a_hand_edited_file_is_one_line_naming_what_is_wrong(good, edit, pattern):
    target, document = good
    edit(document)
    _one_line_problem(_written(target, document), pattern)


def test_a_number_too_large_for_a_float_is_refused(good):
    target, document = good
    document["numbers"]["procedures"]["welch_t"]["df"] = 123.25
    target.write_text(json.dumps(document).replace("123.25", "1e400"), encoding="utf-8")
    _one_line_problem(target, "welch_t df is not a number")


def test_an_unknown_top_level_member_is_ignored(good):
    target, document = good
    assert saved.load(_written(target, {**document, "comment": "checked by the lab"})).spec.seed is not None


def test_a_huge_file_is_refused_without_reading_it_whole(tmp_path):
    target = tmp_path / "huge.twofold"
    with open(target, "wb") as handle:
        handle.write(b'{"format": "twofold-analysis", "pad": "')
        handle.truncate(saved.SIZE_LIMIT + 10)
    _one_line_problem(target, "larger than 10 MB")


def test_a_missing_file_a_folder_and_a_pipe_are_one_line(tmp_path):
    with pytest.raises(SavedFileProblem, match="nothing.twofold was not found"):
        saved.load(tmp_path / "nothing.twofold")
    (tmp_path / "folder.twofold").mkdir()
    with pytest.raises(SavedFileProblem, match="is a folder"):
        saved.load(tmp_path / "folder.twofold")
    import os
    os.mkfifo(tmp_path / "pipe.twofold")
    with pytest.raises(SavedFileProblem, match="named pipe"):
        saved.load(tmp_path / "pipe.twofold")


# -- generated specs ---------------------------------------------------------------------------------
_ROWS = st.lists(st.floats(min_value=-1e3, max_value=1e3, allow_nan=False, width=32), min_size=3, max_size=12)


@settings(max_examples=12, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(first=_ROWS, second=_ROWS, kind=st.sampled_from(["differ", "lower", "higher"]),
       level=st.sampled_from([0.9, 0.95, 0.99]), seed=st.integers(0, 2**63 - 1),
       known=st.booleans(), ordinal=st.booleans(), equal=st.booleans(), wide=st.booleans(),
       aside=st.booleans(), rank=st.sampled_from(["auto", "exact", "normal"]))
def test_generated_specs_reopen_to_the_same_numbers(tmp_path, first, second, kind, level, seed, known,
                                                    ordinal, equal, wide, aside, rank):
    folder = Path(tempfile.mkdtemp(dir=tmp_path))
    data = folder / "values.csv"
    if wide:
        rows = [f"{a if a is not None else ''},{b if b is not None else ''}"
                for a, b in zip(first + [None] * len(second), second + [None] * len(first))]
        data.write_text("one,two\n" + "\n".join(r for r in rows if r != ",") + "\n", encoding="utf-8")
        columns = dict(value_columns=("one", "two"))
    else:
        rows = [f"g1,{v!r}" for v in first] + [f"g2,{v!r}" for v in second]
        data.write_text("group,value\n" + "\n".join(rows) + "\n", encoding="utf-8")
        columns = dict(group_column="group", value_columns=("value",))
    spec = AnalysisSpec(question=Question(kind, level), resamples=FEW, seed=seed, rank_method=rank,
                        statements=Statements(known_sd=(1.5, 2.5) if known else None,
                                              equal_spread_known=equal, ordinal=ordinal), **columns)
    try:
        prepared = pipeline.from_file(data, spec)
    except DataProblem:  # values all the same, say: refused, as they should be
        return
    if aside and not wide:
        cells = pipeline.set_aside_cells(prepared.table, {(0, "value"): "checked"})
        spec = prepared.spec.replace(set_aside=cells)
        try:
            prepared = pipeline.from_file(None, spec)
        except DataProblem:  # too few values left: the same refusal as above
            return
    event("saved and reopened")
    target = folder / "generated.twofold"
    saved.save(target, prepared.analysis)
    loaded = saved.load(target)
    assert loaded.spec == prepared.spec
    again = saved.reopen(loaded)
    assert again.status == "same", again.differences
    assert saved.numbers_of(again.prepared.analysis) == saved.numbers_of(prepared.analysis)


# -- the schema -----------------------------------------------------------------------------------------
def _schema_validator():
    """The shipped schema, its spec resolved in the shipped --json schema (validated with the
    ``jsonschema`` package, a reference validator of JSON Schema draft 2020-12)."""
    import jsonschema
    from referencing import Registry, Resource

    from engine.jsonout import analysis_schema

    registry = Registry().with_resource("analysis.schema.json", Resource.from_contents(analysis_schema()))
    schema = saved.saved_schema()
    jsonschema.Draft202012Validator.check_schema(schema)
    return jsonschema.Draft202012Validator(schema, registry=registry)


@pytest.mark.parametrize("demo", DEMO, ids=lambda p: p.name)
def test_a_saved_file_validates_against_its_shipped_schema(demo, tmp_path):
    _, target = _saved_run(demo, tmp_path)
    _schema_validator().validate(json.loads(target.read_text(encoding="utf-8")))


@pytest.mark.parametrize("edit", [
    lambda d: d.update(version=2),
    lambda d: d.update(format="other"),
    lambda d: d["spec"].update(seed=None),
    lambda d: d["spec"]["source"].update(sha256=None),
    lambda d: d["spec"].update(layout="diagonal"),
    lambda d: d["numbers"]["procedures"]["welch_t"].update(p_value="small"),
    lambda d: d["numbers"]["groups"].pop(),
    lambda d: d.update(saved_at="yesterday"),
    lambda d: d["numbers"].update(margins={"welch_t": {"case": "equivalent", "yes": "yes",
                                                       "difference_low": 1.0, "difference_high": 2.0}}),
    lambda d: d["numbers"].update(margins={"welch_t": {"case": "equivalent", "yes": True}}),
])
def test_the_schema_refuses_what_load_refuses(good, edit):
    import jsonschema

    target, document = good
    edit(document)
    with pytest.raises(jsonschema.ValidationError):
        _schema_validator().validate(document)
    with pytest.raises(SavedFileProblem):
        saved.load(_written(target, document))


def test_the_schema_is_among_the_package_data_the_wheel_ships():
    import fnmatch
    import tomllib

    project = Path(__file__).parents[2]
    patterns = tomllib.loads((project / "pyproject.toml").read_text(encoding="utf-8"))[
        "tool"]["setuptools"]["package-data"]["engine"]
    assert any(fnmatch.fnmatch("schema/twofold.schema.json", pattern) for pattern in patterns)
    assert (project / "engine" / "schema" / "twofold.schema.json").is_file()
