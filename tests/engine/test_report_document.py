"""The whole report of an analysis built in the engine, and each sentence of it written once."""

import hashlib
import io
import json
from dataclasses import replace
from html.parser import HTMLParser
from pathlib import Path

import pytest

from engine import pipeline, report
from engine.io.screening import EXCLUSION_WORDS
from engine.cli import main
from engine.question import KINDS, Question
from engine.report import document
from engine.spec import AnalysisSpec, Source

DEMO = Path(__file__).resolve().parents[2] / "demo_files"
BOLTS = DEMO / "bolt_strength.csv"


def _spec(**changes) -> AnalysisSpec:
    return AnalysisSpec(resamples=300, seed=4, **changes)


@pytest.fixture(scope="module")
def bolts():
    return pipeline.from_file(BOLTS, _spec()).analysis


def _command(*argv) -> str:
    out, err = io.StringIO(), io.StringIO()
    assert main(["analyze", str(BOLTS), "--resamples", "300", "--seed", "4", *argv], out=out, err=err) == 0, \
        err.getvalue()
    return out.getvalue()


class _Page(HTMLParser):
    """The tags left open or closed out of turn, and the text of each list item."""

    VOID = {"meta", "img", "br"}

    def __init__(self):
        super().__init__()
        self.stack, self.problems, self.items, self._item = [], [], [], None

    def handle_starttag(self, tag, attrs):
        if tag not in self.VOID:
            self.stack.append(tag)
        if tag == "li":
            self._item = []

    def handle_endtag(self, tag):
        if not self.stack or self.stack.pop() != tag:
            self.problems.append(tag)
        if tag == "li":
            self.items.append("".join(self._item))
            self._item = None

    def handle_data(self, data):
        if self._item is not None:
            self._item.append(data)


def test_the_page_records_the_file_the_choices_and_the_cautions(bolts):
    page = document.html(bolts)
    parsed = _Page()
    parsed.feed(page)
    assert not parsed.problems and parsed.stack == []
    # reference: hashlib.sha256 of the file's bytes
    assert hashlib.sha256(BOLTS.read_bytes()).hexdigest() in page
    rows = dict(document.choice_rows(bolts))
    first, second = bolts.groups.labels
    assert rows["Question"] == f"Do {first} and {second} differ?"
    assert rows["Confidence level"] == "95%"
    assert rows["Procedure followed"].endswith("(the suggested procedure)")
    assert rows["Resamples for permutation and bootstrap"] == "300 (random seed 4)"
    # the cautions close the page, each once
    cautions = report.cautions(bolts)
    assert parsed.items[-len(cautions):] == cautions


def test_the_page_follows_the_procedure_the_spec_picked():
    analysis = pipeline.from_file(BOLTS, _spec(procedure="mann_whitney")).analysis
    rows = dict(document.choice_rows(analysis))
    assert "picked by the user" in rows["Procedure followed"]
    assert rows["Procedure followed"].startswith(analysis.procedures["mann_whitney"].name)
    assert document.procedure_key(analysis) == "mann_whitney"
    assert document.procedure_key(analysis, "welch_t") == "welch_t"


def test_a_value_set_aside_carries_the_reason_the_spec_records():
    column = "strength_mpa"
    table = pipeline.from_file(BOLTS, _spec()).table
    cells = pipeline.set_aside_cells(table, {(0, column): "thread stripped"})
    analysis = pipeline.from_file(BOLTS, _spec(set_aside=cells)).analysis
    rows = document.set_aside_rows(analysis)
    assert any(where.startswith(f"row {cells[0].row} of the file, column {column}")
               and why == f"{EXCLUSION_WORDS['set_aside']} (thread stripped)" for where, why in rows)
    assert "thread stripped" in document.html(analysis)


def test_a_checksum_is_computed_when_the_spec_has_none(bolts, tmp_path):
    recorded = dict(document.file_rows(bolts))[document.CHECKSUM_NAME]
    unrecorded = replace(bolts, spec=bolts.spec.replace(source=Source(str(BOLTS))))
    again = dict(document.file_rows(unrecorded))[document.CHECKSUM_NAME]
    # reference: hashlib.sha256 of the file's bytes, the same whether recorded or read again
    assert recorded == again == hashlib.sha256(BOLTS.read_bytes()).hexdigest()
    gone = replace(bolts, spec=bolts.spec.replace(source=Source(str(tmp_path / "moved.csv"))))
    assert dict(document.file_rows(gone))[document.CHECKSUM_NAME].startswith("not available")


def test_the_command_text_is_the_documents_text(bolts):
    assert _command() == document.text(bolts)


def test_the_cautions_are_the_same_strings_in_every_output(bolts):
    cautions = report.cautions(bolts)
    assert cautions[:len(bolts.recommendation.cautions)] == list(bolts.recommendation.cautions)
    assert set(report.CAUTIONS_ALWAYS) <= set(cautions) and set(report.GENERAL_CAUTIONS) <= set(cautions)
    lines = _command().splitlines()
    assert lines[-len(cautions):] == [f"- {c}" for c in cautions]
    assert lines[-len(cautions) - 2] == "Before relying on this"
    plain = report.render(bolts).plain.splitlines()
    assert plain[-len(cautions):] == [f"- {c}" for c in cautions]
    parsed = _Page()
    parsed.feed(document.html(bolts))
    assert parsed.items[-len(cautions):] == cautions
    json_cautions = json.loads(_command("--json"))["recommendation"]["cautions"]
    assert json_cautions == cautions


def test_the_question_is_worded_once():
    labels = ("wax", "resin")
    assert [report.question_text(q.alternative, labels) for q in map(Question, ("differ", "lower", "higher"))] == [
        "Do wax and resin differ?", "Is wax lower than resin?", "Is wax higher than resin?"]
    assert [words.format(a="wax", b="resin") for kind, words in report.QUESTIONS if kind in KINDS] == [
        report.question_text(alternative, labels) for alternative in ("two-sided", "less", "greater")]


@pytest.mark.parametrize("level, shown", [
    (0.95, "95%"), (0.975, "97.5%"), (0.9, "90%"), (0.5, "50%"), (0.99, "99%"),
    (0.12345678, "12.3457%"),
    # a level below 1 never reads as 100%: enough decimals to tell it apart
    (0.9999999, "99.99999%"), (0.999999999, "99.9999999%"),
])
def test_a_level_is_written_one_way(level, shown):
    assert report.level_text(level) == shown


def test_the_level_in_the_page_the_table_and_the_agreement_is_one_text():
    analysis = pipeline.from_file(BOLTS, _spec(question=Question("differ", 0.9999999))).analysis
    assert dict(document.choice_rows(analysis))["Confidence level"] == "99.99999%"
    assert "99.99999%" in report.agreement(analysis)
    assert report.display_numbers(analysis).level == "99.99999%"
