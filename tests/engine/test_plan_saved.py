"""A plan of the next study in the saved-analysis file, and the plan command's JSON against its schema.

The schemas are checked with the ``jsonschema`` package (a reference validator of JSON Schema
draft 2020-12), not with checks written here.
"""

import io
import json
from importlib.resources import files
from pathlib import Path

import jsonschema
import pytest
from statsmodels.stats.power import TTestIndPower

from engine import pipeline, saved
from engine.cli import main
from engine.jsonout import analysis_schema
from engine.plan_member import analysis_pilot, plan_of
from engine.planning import Plan, plan_study
from engine.spec import AnalysisSpec

DEMO = Path(__file__).resolve().parents[2] / "demo_files" / "bolt_strength.csv"


def _schema(name: str) -> jsonschema.Draft202012Validator:
    from referencing import Registry, Resource

    schema = json.loads((files("engine") / "schema" / name).read_text(encoding="utf-8"))
    jsonschema.Draft202012Validator.check_schema(schema)
    registry = Registry().with_resource("analysis.schema.json", Resource.from_contents(analysis_schema()))
    return jsonschema.Draft202012Validator(schema, registry=registry)


@pytest.mark.parametrize("argv", [
    ("--difference", "5", "--sd", "6", "--power", "0.8"),
    ("--difference", "5", "--sd", "6", "--sd2", "8", "--n", "20", "--n2", "25", "--curve", "n", "--points", "5"),
    ("--sd", "6", "--n", "20", "--power", "0.8", "--procedure", "pooled", "--curve", "difference", "--points", "4"),
    ("--sd", "6", "--power", "0.8", "--equivalence-margin=-3:4"),
    ("--sd", "6", "--n", "40", "--noninferiority-margin", "3", "--worse", "lower"),
    ("--difference", "2", "--sd", "3", "--power", "0.9", "--paired", "--procedure", "mann_whitney",
     "--simulations", "300", "--seed", "3"),
    ("--difference", "20", "--n", "12", "--pilot", str(DEMO), "--value", "strength_mpa", "--group", "supplier",
     "--simulations", "300", "--seed", "1", "--curve", "n", "--points", "3"),
])
def test_every_plan_document_follows_its_schema(argv):
    out, err = io.StringIO(), io.StringIO()
    assert main(["plan", *argv, "--json"], out=out, err=err) == 0, err.getvalue()
    _schema("plan.schema.json").validate(json.loads(out.getvalue()))


def test_a_wrong_plan_document_fails_the_schema():
    out = io.StringIO()
    main(["plan", "--difference", "5", "--sd", "6", "--power", "0.8", "--json"], out=out, err=io.StringIO())
    document = json.loads(out.getvalue())
    document["answer"]["power"] = 1.5
    with pytest.raises(jsonschema.ValidationError):
        _schema("plan.schema.json").validate(document)


@pytest.fixture(scope="module")
def prepared():
    spec = AnalysisSpec(source=pipeline.source_for(DEMO), seed=5, resamples=300)
    return pipeline.from_file(None, spec)


def test_a_plan_is_saved_with_the_analysis_and_read_back(prepared, tmp_path):
    result = plan_study(Plan("n", difference=5, sd=6, sd2=7, power=0.8, procedure="welch", unit="MPa"))
    target = tmp_path / "bolts.twofold"
    saved.save(target, prepared, plan=result)
    document = json.loads(target.read_text(encoding="utf-8"))
    _schema("twofold.schema.json").validate(document)
    back = saved.load(target)
    assert back.plan["answer"]["n1"] == result.n1 and back.plan["answer"]["sentence"] == result.sentence
    assert plan_of(back.plan) == result.plan
    # the plan read back gives the same answer (statsmodels has no Welch power; the exact figure
    # of the same plan stands in, and the pooled case is pinned to statsmodels below)
    assert plan_study(plan_of(back.plan)).power == result.power


def test_a_pilot_of_the_analysis_is_kept_by_reference_and_gives_the_same_answer(prepared, tmp_path):
    groups = prepared.analysis.groups
    plan = Plan("power", difference=20.0, n1=10, pilot=analysis_pilot(groups, source="bolt_strength.csv"),
                simulations=400)
    result = plan_study(plan)
    target = tmp_path / "bolts.twofold"
    saved.save(target, prepared, plan=result)
    text = target.read_text(encoding="utf-8")
    member = json.loads(text)["plan"]
    assert member["pilot_from_analysis"] is True and member["inputs"]["pilot"] is None
    assert member["inputs"]["seed"] == result.seed  # a simulated plan keeps its seed
    back = saved.load(target)
    again = plan_study(plan_of(back.plan, groups, "bolt_strength.csv"))
    assert again.power == result.power and again.monte_carlo_se == result.monte_carlo_se


def test_a_file_without_a_plan_still_loads_and_a_damaged_plan_is_refused(prepared, tmp_path):
    target = tmp_path / "old.twofold"
    saved.save(target, prepared)
    assert "plan" not in json.loads(target.read_text(encoding="utf-8"))
    assert saved.load(target).plan is None
    document = json.loads(target.read_text(encoding="utf-8"))
    result = plan_study(Plan("power", difference=5, sd=6, n1=20, procedure="pooled"))
    # statsmodels TTestIndPower().power(5 / 6, 20, 0.05): the figure the saved plan holds
    assert result.power == pytest.approx(TTestIndPower().power(5 / 6, 20, 0.05), abs=1e-10)
    document["plan"] = saved.document_of(prepared, plan=result)["plan"]
    document["plan"]["inputs"]["power"] = 3.0  # a power must lie between 0 and 1
    target.write_text(json.dumps(document), encoding="utf-8")
    with pytest.raises(saved.SavedFileProblem, match="old.twofold is damaged: .*power") as caught:
        saved.load(target)
    assert "\n" not in caught.value.message
    document["plan"]["inputs"]["power"] = None
    document["plan"]["answer"] = {"n1": 3}
    target.write_text(json.dumps(document), encoding="utf-8")
    with pytest.raises(saved.SavedFileProblem, match="damaged: the answer of its plan"):
        saved.load(target)
