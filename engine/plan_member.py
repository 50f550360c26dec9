"""A plan of the next study as the saved-analysis file keeps it (its optional ``plan`` member):
the plan's inputs (:meth:`engine.planning.Plan.to_dict`), whether its pilot values are the
analysis's own groups, and the key figures of its answer.

Pilot values that are the analysis's own groups are not written again (the data file, checked by
its checksum, holds them): ``pilot_from_analysis`` says so, and :func:`plan_of` takes them from
the groups of the analysis run again. Other pilot values are written with the plan. A simulated
plan is saved with its seed, so that it gives the same answer when computed again.
"""

from __future__ import annotations

import math
from typing import Any, Mapping

import numpy as np

from .errors import DataProblem, OptionProblem, TwofoldError
from .planning import Pilot, Plan, PlanResult

__all__ = ["plan_member", "check_plan_member", "plan_of", "analysis_pilot", "ANSWER_FIGURES"]

# The figures of the answer a saved plan records, beside its sentence and method.
ANSWER_FIGURES = ("n1", "n2", "power", "difference", "effect", "monte_carlo_se", "simulations", "seed")
_MEMBERS = {"inputs", "pilot_from_analysis", "answer"}
_ANSWER = set(ANSWER_FIGURES) | {"method", "sentence"}


def analysis_pilot(groups: Any, design: str = "independent", source: str = "") -> Pilot:
    """The pilot of an analysis's two groups (``x``, ``y``, ``labels``): both groups, or for a
    paired design the pair differences (group 1 minus group 2)."""
    if design == "paired":
        x, y = np.asarray(groups.x, dtype=float), np.asarray(groups.y, dtype=float)
        if x.size != y.size:
            raise DataProblem(f"A paired plan resamples the pair differences, but these groups hold "
                              f"{x.size} and {y.size} values, not pairs; plan two separate groups or give the SD.")
        return Pilot(x - y, None, tuple(groups.labels), source)
    return Pilot.of_groups(groups, source)


def _same(pilot: Pilot, other: Pilot) -> bool:
    if (pilot.group2 is None) != (other.group2 is None):
        return False
    pairs = [(pilot.group1, other.group1)] + ([] if pilot.group2 is None else [(pilot.group2, other.group2)])
    return all(a.shape == b.shape and np.array_equal(a, b) for a, b in pairs)


def _figure(value: Any) -> Any:
    if value is None:
        return None
    if isinstance(value, (int, np.integer)):
        return int(value)
    value = float(value)
    return value if math.isfinite(value) else None


def plan_member(result: PlanResult, groups: Any = None, design: str = "independent") -> dict[str, Any]:
    """The ``plan`` member for ``result``; ``groups`` (the analysis's) let a pilot that is those
    groups be recorded by reference instead of value by value."""
    plan = result.plan
    if plan.simulated and plan.seed is None and result.seed is not None:
        plan = plan.with_(seed=result.seed)
    from_analysis = False
    if plan.pilot is not None and groups is not None:
        try:
            from_analysis = _same(plan.pilot, analysis_pilot(groups, plan.design))
        except TwofoldError:
            from_analysis = False
    inputs = plan.to_dict()
    if from_analysis:
        inputs["pilot"] = None
    answer = {name: _figure(getattr(result, name)) for name in ANSWER_FIGURES}
    answer.update(method=result.method, sentence=result.sentence)
    return {"inputs": inputs, "pilot_from_analysis": from_analysis, "answer": answer}


def _stand_in(inputs: Mapping[str, Any]) -> dict[str, Any]:
    """A pilot of two values per group in place of the analysis's groups, so that every other
    input of the plan is checked when the file is read (before the data are read again)."""
    paired = inputs.get("design") == "paired"
    return Pilot(np.array([0.0, 1.0]), None if paired else np.array([0.0, 1.0])).to_dict()


def check_plan_member(member: Any) -> dict[str, Any]:
    """``member`` checked to be what :func:`plan_member` writes; raises :class:`OptionProblem`
    with the reason in one sentence."""
    if not isinstance(member, Mapping) or set(member) != _MEMBERS:
        raise OptionProblem("its plan of the next study is not inputs, pilot_from_analysis and answer.")
    inputs, from_analysis, answer = member["inputs"], member["pilot_from_analysis"], member["answer"]
    if not isinstance(from_analysis, bool) or not isinstance(inputs, Mapping):
        raise OptionProblem("its plan of the next study has a member of the wrong kind.")
    if from_analysis:
        if inputs.get("pilot") is not None:
            raise OptionProblem("its plan takes the analysis's groups as pilot but lists pilot values too.")
        inputs = {**inputs, "pilot": _stand_in(inputs)}
    Plan.from_dict(inputs)
    if not isinstance(answer, Mapping) or set(answer) != _ANSWER:
        raise OptionProblem(f"the answer of its plan is not {', '.join(sorted(_ANSWER))}.")
    for name in ANSWER_FIGURES:
        value = answer[name]
        if value is not None and (isinstance(value, bool) or not isinstance(value, (int, float))
                                  or not math.isfinite(value)):
            raise OptionProblem(f"the answer of its plan has a {name} that is not a number.")
    if not isinstance(answer["method"], str) or not isinstance(answer["sentence"], str):
        raise OptionProblem("the answer of its plan has a method or sentence that is not text.")
    return dict(member)


def plan_of(member: Mapping[str, Any], groups: Any = None, source: str = "") -> Plan:
    """The :class:`Plan` of a checked ``plan`` member; ``groups`` are the analysis's (needed
    when its pilot is them). Raises :class:`OptionProblem` when they are needed and missing."""
    inputs = dict(member["inputs"])
    if member["pilot_from_analysis"]:
        if groups is None:
            raise OptionProblem("The plan takes its pilot values from the analysis's groups, "
                                "which are not there.")
        pilot = analysis_pilot(groups, inputs.get("design", "independent"), source)
        inputs["pilot"] = pilot.to_dict()
    return Plan.from_dict(inputs)
