"""``python -m engine plan ...``: plan the next study from the command line.

Two of the difference, the size and the power say what is found: ``--difference D --sd S
--power P`` the size per group; ``--difference D --sd S --n N`` the power; ``--sd S --n N
--power P`` the smallest detectable difference. ``--pilot FILE`` (with the analyze command's
column flags) takes the spread and shape from pilot values instead of ``--sd``; a saved analysis
of summary statistics as the pilot gives the SDs, and the sizes and the difference where they are
not given, with the normal-theory power (what would need the values, such as resampling or a
rank test, is refused in one line). With a pilot of two groups a margin may be a percentage of
group 2's mean. ``--curve`` adds the power along the size or the difference. Bad input ends with
one line, as for the other commands (:mod:`engine.cli` prints it).
"""

from __future__ import annotations

import argparse
import json
import math
from pathlib import Path
from typing import Any, NamedTuple, TextIO

from .column_flags import COLUMN_FLAGS, add_column_flags
from .errors import OptionProblem, quoted
from .text import visible

__all__ = ["add_plan_command", "run_plan", "plan_from_arguments", "plan_document"]


def add_plan_command(commands: Any) -> None:
    """Add the ``plan`` command to the subcommands of ``python -m engine``."""
    plan = commands.add_parser("plan", help="plan the next study: sample size, power or smallest "
                               "detectable difference")
    given = plan.add_argument_group("what is known (two of --difference, --n, --power say what is found)")
    given.add_argument("--difference", type=float, metavar="D",
                       help="the true difference of means to detect, group 1 minus group 2 (for an "
                            "equivalence or non-inferiority plan: the one expected, default 0)")
    given.add_argument("--sd", type=float, metavar="S",
                       help="the SD of the measurements (paired: of the pair differences)")
    given.add_argument("--sd2", type=float, metavar="S2", help="the SD of group 2, when it differs")
    given.add_argument("--n", type=int, metavar="N", help="units per group (pairs when --paired)")
    given.add_argument("--n2", type=int, metavar="N2", help="units in group 2, when it differs")
    given.add_argument("--power", type=float, metavar="P", help="the power wanted, such as 0.8")
    given.add_argument("--ratio", type=float, metavar="R",
                       help="group 2's size over group 1's when the size is found (default 1)")
    test = plan.add_argument_group("the test")
    test.add_argument("--level", type=float, metavar="ALPHA",
                      help="the test's level: the chance of a false finding (default 0.05)")
    test.add_argument("--alternative", choices=("two-sided", "less", "greater"),
                      help="two-sided (default); less/greater: is group 1 lower/higher")
    test.add_argument("--equivalence-margin", metavar="M|LOW:HIGH",
                      help="plan to show equivalence within -M to M (or LOW to HIGH; a negative LOW "
                           "goes after an equals sign: --equivalence-margin=-3:4); with a --pilot of two "
                           "groups a %% after a number makes it a percentage of group 2's mean (5%%)")
    test.add_argument("--noninferiority-margin", metavar="M",
                      help="plan to show group 1 not worse than group 2 by more than M (with a --pilot "
                           "of two groups M may be a percentage of group 2's mean: 5%%)")
    test.add_argument("--worse", choices=("lower", "higher"),
                      help="with --noninferiority-margin: which direction is worse")
    test.add_argument("--paired", action="store_true",
                      help="a paired design (the same units measured twice); sizes are pairs")
    test.add_argument("--procedure", choices=("welch", "pooled", "z", "mann_whitney"),
                      help="welch (default), pooled, z (known SDs) or mann_whitney (paired: the "
                           "signed-rank test)")
    plan.set_defaults(margin_as=None)  # a margin's unit follows its % (engine.question_flags reads it)
    how = plan.add_argument_group("how the power is found")
    how.add_argument("--method", choices=("auto", "exact", "approximation", "simulation"),
                     help="auto (default): exact for the t and z tests, simulation otherwise; "
                          "approximation: Noether's formula for Mann-Whitney")
    how.add_argument("--shape", choices=("normal", "skewed", "heavy_tailed"),
                     help="how the values vary, for a simulation (default normal)")
    how.add_argument("--simulations", type=int, metavar="K", help="simulated studies (default 10000)")
    how.add_argument("--seed", type=int, help="seed of the simulation, for repeatable results")
    pilot = plan.add_argument_group("pilot values (their spread and shape, resampled), or a pilot's "
                                    "summary statistics (their SDs, sizes and difference)")
    pilot.add_argument("--pilot", type=Path, metavar="FILE",
                       help="a data file of pilot values, or a saved analysis (.twofold) whose groups are the "
                            "pilot; a saved analysis of summary statistics gives the SDs, and the sizes and "
                            "difference when not given, with the normal-theory power")
    add_column_flags(pilot)
    out = plan.add_argument_group("output")
    out.add_argument("--unit", default="", help="the measurement's unit for the sentences, such as MPa")
    out.add_argument("--curve", choices=("n", "difference"),
                     help="also give the power along the size per group or the difference")
    out.add_argument("--points", type=int, default=None, metavar="K",
                     help="points of the curve (default 50)")
    out.add_argument("--json", action="store_true", help="print one JSON object instead of text")


def _question(args):
    """The question the flags ask; its margin parsed and checked as ``analyze`` does
    (:func:`engine.question_flags.question_of`: one wording for every margin flag)."""
    from .question_flags import question_of

    if args.level is not None and not 0 < args.level < 0.5:
        raise OptionProblem(f"--level is the test's level, above 0 and below 0.5, such as 0.05; "
                            f"not {args.level:g}.")
    return question_of(args, args.alternative or "two-sided", 1.0 - (0.05 if args.level is None else args.level))


def _in_units(question, pilot):
    """The question with a percentage margin turned into the measurement's units, by group 2's
    mean in the pilot; and the note that says so ("" when nothing was turned)."""
    from .planning import SummaryPilot
    from .question import Question

    margin = question.margin
    if margin is None or margin.unit != "percent":
        return question, ""
    if isinstance(pilot, SummaryPilot):
        mean = pilot.stats[1].mean
    elif pilot is not None and pilot.group2 is not None:
        mean = float(pilot.group2.mean())
    else:
        flag = "--equivalence-margin" if question.kind == "equivalent" else "--noninferiority-margin"
        raise OptionProblem(f"{flag}: a percentage is of group 2's mean, which the plan knows only from a "
                            "--pilot of two groups; give the margin in the measurement's units.")
    return Question(question.kind, question.level, margin.in_units(mean)), f"The margin: {margin.note(mean)}."


def _find(args, has_margin: bool) -> str:
    known = {"difference": args.difference is not None or has_margin, "n": args.n is not None,
             "power": args.power is not None}
    if known["n"] and known["power"] and not (args.difference is None and not has_margin):
        raise OptionProblem("Give two of --difference, --n and --power: the third is found.")
    missing = [name for name, there in known.items() if not there]
    if len(missing) != 1:
        raise OptionProblem("Give two of --difference, --n and --power: the third is found "
                            "(with a margin the difference defaults to 0).")
    return missing[0]


def _pilot(args):
    """The pilot values from --pilot FILE (a data file with the column flags, or a saved
    analysis, whose data file is read again and must still be the one it analysed)."""
    from . import pipeline, saved
    from .planning import Pilot
    from .spec import AnalysisSpec, Source

    name = args.pilot.name
    if args.pilot.suffix.lower() == saved.EXTENSION:
        loaded = saved.load(args.pilot)
        if any(getattr(args, flag) is not None for flag in COLUMN_FLAGS):
            what = ("holds summary statistics, not columns" if loaded.summary_statistics is not None
                    else "names its own columns and groups")
            raise OptionProblem(f"{name} {what}; leave out --value, --group, --groups and --sheet.")
        if loaded.summary_statistics is not None:
            from .planning import SummaryPilot

            return SummaryPilot(loaded.summary_statistics, name)
        reopened = saved.reopen(loaded)
        if reopened.prepared is None or reopened.status == "source_changed":
            raise OptionProblem(f"{name}: {reopened.message}")
        prepared = reopened.prepared
        return _pilot_of(args, prepared.table, prepared.spec, prepared.intake.groups, name)
    values = tuple(args.value or ())
    spec = AnalysisSpec(source=Source(str(args.pilot), args.sheet),
                        layout="long" if args.group is not None or len(values) == 1 else "wide",
                        group_column=args.group, value_columns=values,
                        groups=tuple(args.groups) if args.groups else None)
    table = pipeline.read(spec)
    spec = pipeline.complete(table, spec)
    return _pilot_of(args, table, spec, None if args.paired else pipeline.form_groups(table, spec).groups, name)


def _pilot_of(args, table, spec, groups, name: str):
    """Two pilot groups, or with --paired the pair differences row by row (wide layout)."""
    from .io.pairs import pairs_by_row
    from .planning import Pilot

    if args.paired:
        if spec.layout != "wide":
            raise OptionProblem(f"{name}: a paired pilot takes two value columns, one per group and "
                                "one row per pair (--value FIRST --value SECOND).")
        pairs = pairs_by_row(table, columns=tuple(spec.value_columns))
        return Pilot(pairs.differences, None, pairs.labels, name)
    return Pilot(groups.x, groups.y, groups.labels, name)


def plan_from_arguments(args):
    """The :class:`engine.planning.Plan` the flags describe."""
    return _planned(args).plan


class _Planned(NamedTuple):
    """A plan with what the command says beside it: the summary statistics it took numbers from
    (or None), the names of the inputs taken from them, and notes of its own."""

    plan: Any
    summaries: Any = None
    taken: tuple[str, ...] = ()
    notes: tuple[str, ...] = ()


def _planned(args) -> _Planned:
    from .planning import Plan, SummaryPilot

    if args.pilot is None and any(getattr(args, flag) is not None for flag in COLUMN_FLAGS):
        raise OptionProblem("--value, --group, --groups and --sheet name the columns of a pilot "
                            "file; give it with --pilot FILE.")
    question = _question(args)
    pilot = _pilot(args) if args.pilot is not None else None
    question, margin_note = _in_units(question, pilot)
    notes = (margin_note,) if margin_note else ()
    if isinstance(pilot, SummaryPilot):
        plan, taken = _from_summaries(args, question, pilot)
        return _Planned(plan, pilot, taken, notes)
    find = _find(args, question.has_margin)
    optional = {name: getattr(args, name) for name in ("procedure", "method", "shape", "simulations",
                                                       "ratio") if getattr(args, name) is not None}
    return _Planned(Plan(find, difference=args.difference, sd=args.sd, sd2=args.sd2, n1=args.n, n2=args.n2,
                         power=args.power, question=question, design="paired" if args.paired else "independent",
                         seed=args.seed, unit=args.unit, pilot=pilot, **optional), notes=notes)


def _from_summaries(args, question, summaries):
    """A plan from a pilot's summary statistics: their SDs always; the sizes when the power is
    found and --n is not given; the difference observed (turned the way a one-sided question
    asks) when --difference is not given and the question has no margin."""
    from .planning import Plan

    name = summaries.source
    if args.sd is not None or args.sd2 is not None:
        raise OptionProblem(f"{name} gives the SDs from its summary statistics; leave out --sd and "
                            "--sd2, or leave out --pilot to give your own.")
    procedure = args.procedure or ("z" if summaries.known else "welch")
    summaries.refuse(procedure=procedure, design="paired" if args.paired else "independent",
                     method=args.method or "auto", shape=args.shape or "normal")
    if args.power is None:
        find = "power"
    else:
        find = _find(args, question.has_margin) if args.n is not None else "n"
    taken = ["sd1", "sd2"]
    difference = args.difference
    if difference is None and not question.has_margin and find != "difference":
        difference = summaries.expected_difference(question.kind)
        taken.append("difference")
        if difference == 0:
            raise OptionProblem(f"{name}: the two means are the same, so there is no difference to take "
                                "from them; give the difference that matters with --difference.")
    sizes = {"n1": args.n, "n2": args.n2}
    if find == "power" and args.n is None:
        sizes = {"n1": summaries.sizes[0], "n2": summaries.sizes[1] if args.n2 is None else args.n2}
        taken += ["n1"] + ([] if args.n2 is not None else ["n2"])
    sd, sd2 = summaries.sds_for(procedure)
    for label, value in zip(summaries.labels, (sd, sd if sd2 is None else sd2)):
        if value == 0:
            said = "the pooled SD" if procedure == "pooled" else f"the SD of group '{quoted(label)}'"
            raise OptionProblem(f"{name}: {said} is 0, so there is no spread to plan with; give the SD "
                                "expected with --sd instead of --pilot.")
    optional = {name: getattr(args, name) for name in ("method", "simulations", "ratio")
                if getattr(args, name) is not None}
    plan = Plan(find, difference=difference, sd=sd, sd2=sd2, power=args.power, question=question,
                procedure=procedure, seed=args.seed, unit=args.unit, **sizes, **optional)
    return plan, tuple(taken)


def _finite(value: float | None) -> float | None:
    return None if value is None or not math.isfinite(value) else float(value)


def plan_document(result, curve=None, summaries=None, taken: tuple[str, ...] = (),
                  notes: tuple[str, ...] = ()) -> dict[str, Any]:
    """The ``--json`` document of a plan (members are added, never renamed); ``summaries``: the
    pilot's summary statistics the plan took ``taken`` (input names) from, if so; ``notes``: the
    command's own, after the plan's."""
    from .plan_words import summary_notes

    plan = result.plan
    margin = plan.question.margin
    document = {
        "find": plan.find,
        "answer": {"n1": result.n1, "n2": result.n2, "power": result.power,
                   "difference": result.difference,
                   "effect": result.effect, "effect_name": result.effect_name,
                   "continuous_n": _finite(result.continuous_n), "df": _finite(result.df),
                   "monte_carlo_se": result.monte_carlo_se, "simulations": result.simulations,
                   "seed": result.seed, "formula_power": result.formula_power,
                   "formula_words": result.formula_words},
        "inputs": {"difference": plan.difference, "sd1": result.sd1, "sd2": result.sd2,
                   "n1": plan.n1, "n2": plan.n2, "ratio": plan.ratio, "power": plan.power,
                   "level": plan.alpha, "question": plan.question.kind,
                   "alternative": plan.alternative,
                   "margin": None if margin is None else {"low": margin.low, "high": margin.high,
                                                          "worse": margin.worse},
                   "design": plan.design, "procedure": plan.procedure, "shape": plan.shape,
                   "unit": plan.unit,
                   "pilot": None if plan.pilot is None else {
                       "source": plan.pilot.source, "labels": list(plan.pilot.labels),
                       "n": [int(plan.pilot.group1.size)] + ([] if plan.pilot.group2 is None
                                                             else [int(plan.pilot.group2.size)])}},
        "method": result.method,
        "method_words": result.method_words,
        "procedure_name": result.procedure_name,
        "sentence": result.sentence,
        "notes": list(result.notes) + summary_notes(summaries, taken) + list(notes),
    }
    document["inputs"]["summaries"] = None if summaries is None else {**summaries.to_dict(), "taken": list(taken)}
    if curve is not None:
        document["curve"] = {"over": curve.over, "x": curve.x.tolist(), "power": curve.power.tolist(),
                             "monte_carlo_se": None if curve.monte_carlo_se is None
                             else curve.monte_carlo_se.tolist()}
    return document


def _readable(result, curve, planned: _Planned) -> list[str]:
    from .plan_words import answer_lines, summary_lines, summary_notes

    summaries, taken = planned.summaries, planned.taken
    notes = [f"Note: {note}" for note in summary_notes(summaries, taken) + list(planned.notes)]
    lines = answer_lines(result, curve)
    if summaries is None:
        return lines + notes
    return summary_lines(summaries, taken, result.plan.procedure) + notes + [""] + lines


def run_plan(args, out: TextIO) -> None:
    """Run ``python -m engine plan`` with the parsed ``args``, writing to ``out``."""
    from .planning import plan_study, power_curve

    planned = _planned(args)
    plan = planned.plan
    result = plan_study(plan)
    curve = None
    if args.curve is not None:
        kwargs = {} if args.points is None else {"points": args.points}
        curve = power_curve(plan.with_(seed=result.seed) if result.seed is not None else plan,
                            args.curve, **kwargs)
    if args.json:
        json.dump(plan_document(result, curve, planned.summaries, planned.taken, planned.notes), out, indent=2, allow_nan=False)
        out.write("\n")
        return
    out.write("".join(visible(line) + "\n" for line in _readable(result, curve, planned)))


