"""The headless command's --json document against the JSON Schema shipped with the package.

The schema is checked with the ``jsonschema`` package (a reference validator of JSON Schema
draft 2020-12, json-schema.org), not with checks written here.
"""

import copy
import io
import json
from pathlib import Path

import jsonschema
import numpy as np
import pytest

from engine.cli import main
from engine.jsonout import SCHEMA_VERSION, analysis_schema

DEMO = Path(__file__).resolve().parents[2] / "demo_files"
DEMO_FILES = sorted(p.name for p in DEMO.iterdir() if p.is_file())



def _document(*argv) -> dict:
    out, err = io.StringIO(), io.StringIO()
    code = main(["analyze", *map(str, argv), "--json", "--resamples", "300", "--seed", "5"],
                out=out, err=err)
    assert code == 0, err.getvalue()
    return json.loads(out.getvalue())


def _validator(schema: dict) -> jsonschema.Draft202012Validator:
    jsonschema.Draft202012Validator.check_schema(schema)
    return jsonschema.Draft202012Validator(schema)


def _subschemas(node):
    """Every object in the schema, ``node`` first."""
    if isinstance(node, dict):
        yield node
        for value in node.values():
            yield from _subschemas(value)
    elif isinstance(node, list):
        for value in node:
            yield from _subschemas(value)


def _closed(schema):
    """The schema with every described object closed (no member it does not name), so that a
    member the document gains without being described in the schema fails the check."""
    schema = copy.deepcopy(schema)
    for node in _subschemas(schema):
        if "properties" in node:
            node["additionalProperties"] = False
    return schema


def _check(document: dict) -> None:
    schema = analysis_schema()
    _validator(schema).validate(document)
    # every member the document holds is described in the schema (the shipped schema itself
    # lets readers meet members added later)
    _validator(_closed(schema)).validate(document)
    assert document["schema_version"] == SCHEMA_VERSION
    for key, result in document["procedures"].items():
        assert result["key"] == key
    for key, size in document["effect_sizes"].items():
        assert size["key"] == key


@pytest.fixture(scope="module")
def bolts() -> dict:
    return _document(DEMO / "bolt_strength.csv")


def test_the_schema_is_valid_json_schema_and_ships_in_the_package():
    schema = analysis_schema()
    jsonschema.Draft202012Validator.check_schema(schema)
    assert schema["properties"]["schema_version"]["minimum"] == 1
    # the shipped schema lets members be added: no object in it is closed
    assert not any(node.get("additionalProperties") is False for node in _subschemas(schema))


@pytest.mark.parametrize("name", DEMO_FILES)
def test_every_demo_file_gives_a_document_the_schema_accepts(name):
    document = _document(DEMO / name)
    _check(document)
    assert "brunner_munzel" in document["procedures"]


def test_one_sided_questions_give_open_intervals_the_schema_accepts():
    for alternative, open_end in (("greater", "high"), ("less", "low")):
        document = _document(DEMO / "bolt_strength.csv", "--alternative", alternative)
        _check(document)
        assert document["options"]["alternative"] == alternative
        assert document["procedures"]["welch_t"]["interval"][open_end] is None


def test_known_sds_add_the_z_test_and_the_schema_accepts_it():
    document = _document(DEMO / "bolt_strength.csv", "--known-sd", "15", "27")
    _check(document)
    assert document["options"]["known_sd"] == [15.0, 27.0]
    assert "z" in document["procedures"]


def test_ordered_ratings_give_a_document_the_schema_accepts(tmp_path):
    rng = np.random.default_rng(8)
    rows = [f"rater_{'ab'[i % 2]},{int(r)}" for i, r in enumerate(rng.integers(1, 6, size=40))]
    path = tmp_path / "ratings.csv"
    path.write_text("panel,score\n" + "\n".join(rows) + "\n", encoding="utf-8")
    document = _document(path, "--ordinal")
    _check(document)
    assert document["options"]["ordinal"] is True


def test_an_effect_size_left_out_gives_notes_the_schema_accepts(tmp_path):
    # group 2 has no spread: Glass's delta (over group 2's SD) is not defined
    path = tmp_path / "flat.csv"
    path.write_text("g,v\na,1\na,2\na,3\na,4\nb,6\nb,6\nb,6\nb,6\n", encoding="utf-8")
    document = _document(path)
    _check(document)
    assert "glass_delta" not in document["effect_sizes"]
    assert [note["key"] for note in document["notes"]] == ["effect_size_left_out"]


def test_a_part_that_fails_gives_a_warning_note_the_schema_accepts(monkeypatch):
    from engine.procedures import brunner_munzel

    def fails(*args, **kwargs):
        raise ArithmeticError("a failure nobody foresaw")

    monkeypatch.setattr(brunner_munzel, "brunner_munzel", fails)
    document = _document(DEMO / "bolt_strength.csv")
    _check(document)
    assert "brunner_munzel" not in document["procedures"]
    assert [(n["key"], n["severity"]) for n in document["notes"]] == [("part_not_computed", "warning")]


@pytest.mark.parametrize("path", [
    ("notes",),
    ("source", "value_columns"),
    ("procedures", "welch_t", "p_value"),
    ("procedures", "brunner_munzel", "interval", "low"),
    ("effect_sizes", "cohen_d", "value"),
    ("diagnostics", "shapes", 0, "shapiro_p"),
    ("recommendation", "considered", 0, "why_not"),
    ("robustness", "rows", 0, "finds_difference"),
    ("screening", "findings", 0, "severity"),
])
def test_a_renamed_member_fails_the_schema(bolts, path):
    _renaming_fails(copy.deepcopy(bolts), path)


def _renaming_fails(document: dict, path: tuple) -> None:
    """The document passes the shipped schema, and fails it once the member at ``path`` is renamed."""
    _validator(analysis_schema()).validate(document)
    parent = document
    for step in path[:-1]:
        parent = parent[step]
    parent[path[-1] + "_renamed"] = parent.pop(path[-1])
    with pytest.raises(jsonschema.ValidationError):
        _validator(analysis_schema()).validate(document)


def test_a_member_added_to_the_document_is_allowed_by_the_shipped_schema(bolts):
    document = copy.deepcopy(bolts)
    document["a_later_member"] = {"anything": 1}
    document["procedures"]["welch_t"]["a_later_detail"] = 2
    _validator(analysis_schema()).validate(document)
    with pytest.raises(jsonschema.ValidationError):  # but this test's closed copy sees it
        _validator(_closed(analysis_schema())).validate(document)


def test_a_wrong_type_fails_the_schema(bolts):
    for change in (lambda d: d.__setitem__("schema_version", "1"),
                   lambda d: d["n"].append(3),
                   lambda d: d["procedures"]["welch_t"].__setitem__("p_value", 1.5),
                   lambda d: d["notes"].append({"key": "x", "severity": "loud", "text": "", "group": None})):
        document = copy.deepcopy(bolts)
        change(document)
        with pytest.raises(jsonschema.ValidationError):
            _validator(analysis_schema()).validate(document)


# -- margin questions and paired data ------------------------------------------------------------
@pytest.mark.parametrize("flags", [
    ("--equivalence-margin", "30"),
    ("--equivalence-margin=-3%:4%", "--equal-spreads-known"),
    ("--equivalence-margin", "0.97:1.04", "--margin-as", "ratio"),
    ("--noninferiority-margin", "15", "--worse", "lower"),
    ("--noninferiority-margin", "2%", "--worse", "higher", "--confidence", "0.9"),
])
def test_margin_questions_give_documents_the_schema_accepts(flags):
    document = _document(DEMO / "bolt_strength.csv", *flags)
    _check(document)
    question = document["question"]
    assert question["kind"] in ("equivalent", "not_worse") and question["margin"] is not None
    assert document["spec"]["question"]["margin"] == question["margin"]["entered"]
    assert document["margin_verdicts"] and set(document["margin_verdicts"]) <= set(document["procedures"])
    for verdict in document["margin_verdicts"].values():
        # the interval set against the margin is the two-sided 1 - 2 alpha one
        assert verdict["interval"]["level"] == pytest.approx(1 - 2 * question["alpha"])
    assert document["design"] == "independent" and document["pairs"] is None and document["paired"] is None


def _paired_file(tmp_path) -> Path:
    rng = np.random.default_rng(12)
    before = np.round(rng.normal(20, 2, 15), 2)
    after = np.round(before + rng.normal(0.4, 0.5, 15), 2)
    lines = [f"{float(a)!r},{float(b)!r}" for a, b in zip(before, after)] + ["21.5,", "x,3"]
    path = tmp_path / "paired.csv"
    path.write_text("before,after\n" + "\n".join(lines) + "\n", encoding="utf-8")
    return path


@pytest.mark.parametrize("flags", [(), ("--equivalence-margin", "0.5"), ("--noninferiority-margin", "1", "--worse", "higher")])
def test_paired_data_give_documents_the_schema_accepts(tmp_path, flags):
    document = _document(_paired_file(tmp_path), "--paired", *flags)
    _check(document)
    assert document["design"] == "paired"
    assert document["pairs"]["n_pairs"] == document["paired"]["n_pairs"] == 15
    assert [item["kind"] for item in document["pairs"]["left_out"]] == ["partner_missing", "non_numeric"]
    if not flags:
        assert {"paired_d_z", "paired_d_av"} <= set(document["effect_sizes"])


@pytest.mark.parametrize("path", [
    ("question", "margin", "entered_as"),
    ("margin_verdicts", "equivalence_welch", "case"),
    ("margin_verdicts", "equivalence_welch", "difference_interval"),
    ("pairs", "n_pairs"),
    ("paired", "correlation"),
])
def test_a_renamed_margin_or_paired_member_fails_the_schema(tmp_path, path):
    if path[0] in ("pairs", "paired"):
        document = _document(_paired_file(tmp_path), "--paired")
    else:
        document = _document(DEMO / "bolt_strength.csv", "--equivalence-margin", "30")
    _renaming_fails(document, path)
