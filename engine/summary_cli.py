"""The headless command from summary statistics:
``python -m engine analyze --summary "A n=12 mean=41.2 sd=3.1" --summary "B n=15 mean=38.0 sd=4.4"``
(label first; ``se=`` instead of ``sd=``; ``--sd-known`` for known population SDs, which adds the
z procedure) or ``analyze --summary-file FILE`` (one row per group).

The ``--json`` document shares its members with the analysis of values where they mean the same
(``groups``, ``n``, ``options``, ``spec``, ``procedures``, ``effect_sizes``, ``recommendation``,
``robustness``, ``notes``) and adds ``input`` ("summary"), ``summary_statistics`` (the numbers as
entered), ``needs_values`` and ``findings``. Members are added, never renamed.
"""

from __future__ import annotations

import argparse
import json
from typing import Any, TextIO

from .errors import TwofoldError

__all__ = ["add_flags", "wanted", "run", "summary_document", "summary_lines"]


def add_flags(command: argparse.ArgumentParser) -> None:
    """The summary flags of ``analyze``."""
    command.add_argument("--summary", action="append", metavar='"LABEL n=N mean=M sd=S"',
                         help="one group's summary statistics instead of a data file, label first "
                              "(se=S for a standard error); give it twice, group 1 first")
    command.add_argument("--summary-file", metavar="FILE",
                         help="a file of two groups' summary statistics, one row each, with the "
                              "columns label, n, mean and sd (or se)")
    command.add_argument("--sd-known", action="store_true",
                         help="the SDs of --summary are known population values (adds the z procedure)")


def wanted(args) -> bool:
    """Whether the arguments ask for an analysis from summary statistics."""
    return bool(getattr(args, "summary", None) or getattr(args, "summary_file", None))


def _refuse_others(args) -> None:
    given = [flag for flag, value in (("a data file", args.path), ("--spec", args.spec),
                                      ("--value", args.value),
                                      ("--group", args.group), ("--groups", args.groups),
                                      ("--outcomes", getattr(args, "outcomes", None)))
             if value]
    if given:
        raise TwofoldError(f"python -m engine analyze: summary statistics stand in for the data; "
                           f"leave out {', '.join(given)} (see --help)")
    if args.summary and args.summary_file:
        raise TwofoldError("python -m engine analyze: give --summary twice or --summary-file, not both")


def _stats(args):
    from .group_stats import parse_stats
    from .io.summaries import read_summaries

    if args.summary_file:
        first, second = read_summaries(args.summary_file)
        if args.sd_known:
            from dataclasses import replace

            first, second = replace(first, sd_known=True), replace(second, sd_known=True)
        return first, second
    if len(args.summary) != 2:
        raise TwofoldError(f"python -m engine analyze: give --summary twice, once per group "
                           f"(group 1 first), not {len(args.summary)} time{'s' if len(args.summary) != 1 else ''}")
    return tuple(parse_stats(text, sd_known=args.sd_known) for text in args.summary)


def _spec(args, defaults):
    from .question import Question
    from .spec import AnalysisSpec, Statements

    def given(name):
        value = getattr(args, name, None)
        return defaults[name] if value is None else value

    if args.known_sd:
        raise TwofoldError("python -m engine analyze: with summary statistics mark known SDs with "
                           "--sd-known (the sd= values are then the known ones), not --known-sd")
    return AnalysisSpec(question=Question.from_alternative(given("alternative"), given("confidence")),
                        seed=args.seed,
                        statements=Statements(equal_spread_known=args.equal_spreads_known,
                                              ordinal=args.ordinal))


def summary_document(analysis) -> dict[str, Any]:
    """The ``--json`` document of an analysis from summary statistics."""
    from .jsonout import SCHEMA_VERSION, options_member, to_plain

    return {
        "schema_version": SCHEMA_VERSION,
        "input": "summary",
        "groups": list(analysis.labels),
        "n": list(analysis.n),
        "summary_statistics": [s.to_dict() for s in analysis.stats],
        "options": options_member(analysis.spec),
        "spec": analysis.spec.to_dict(),
        "procedures": to_plain(analysis.procedures),
        "effect_sizes": to_plain(analysis.effect_sizes),
        "recommendation": to_plain(analysis.recommendation),
        "robustness": to_plain(analysis.robustness),
        "needs_values": dict(analysis.needs_values),
        "findings": to_plain(analysis.findings),
        "notes": to_plain(analysis.notes),
    }


def summary_lines(analysis) -> list[str]:
    """The plain summary: the groups as entered, every procedure, the effect sizes, the
    suggestion and what needed the values."""
    from .report.numbers import format_interval
    from .rounding import format_number, format_p, level_text

    lines = ["From summary statistics:"]
    for s in analysis.stats:
        spread = (f"sd {format_number(s.sd)}" if s.given_as == "sd" else f"se {format_number(s.se)}")
        lines.append(f"  {s.label}: n {s.n}, mean {format_number(s.mean)}, {spread}"
                     + (" (known)" if s.sd_known else ""))
    chosen = analysis.recommendation.key
    for key, result in analysis.procedures.items():
        mark = "*" if key == chosen else " "
        interval = format_interval(result.interval) if result.interval is not None else None
        lines.append(f"{mark} {result.name}: {result.estimate_name} {format_number(result.estimate)}"
                     + (f", {level_text(result.interval.level)} interval {interval}" if interval else "")
                     + (f", p {format_p(result.p_value)}" if result.p_value is not None else ""))
    for size in analysis.effect_sizes.values():
        lines.append(f"  {size.name}: {format_number(size.value)}, {level_text(size.interval.level)} "
                     f"interval {format_interval(size.interval)}")
    lines.append(f"Suggested (*): {analysis.recommendation.name}.")
    lines += [f"  {reason}" for reason in analysis.recommendation.reasons]
    lines += [finding.text for finding in analysis.findings + analysis.notes]
    return lines


def run(args, out: TextIO, defaults: dict[str, Any]) -> None:
    """``analyze`` from summary statistics: the analysis, printed as JSON or as plain lines;
    ``defaults``: the analysis flags' defaults (``engine.cli.DEFAULTS``)."""
    from .summary_analysis import analyze_summaries
    from .text import visible

    _refuse_others(args)
    analysis = analyze_summaries(_stats(args), _spec(args, defaults))
    if args.save is not None:  # before anything is printed: a failed save is then the only line
        from . import saved

        saved.save(args.save, analysis)
    _write(analysis, args, out)


def run_saved(args, out: TextIO, loaded) -> None:
    """``analyze --spec SAVED`` of a saved analysis from summary statistics: run again from the
    recorded numbers; a one-line :class:`TwofoldError` unless it gave the saved figures."""
    from . import saved

    analysis, status, differences = saved.rerun_summaries(loaded)
    name = args.spec.name
    if status == "numbers_differ":
        shown = "; ".join(differences[:saved.DIFFERENCES_SHOWN])
        more = len(differences) - saved.DIFFERENCES_SHOWN
        raise TwofoldError(f"{name}: run again from its summary statistics, the numbers differ: {shown}"
                           + (f" (and {more} more)" if more > 0 else ""))
    if args.save is not None:
        saved.save(args.save, analysis)
    if not args.json:
        word = "gave the saved numbers" if status == "same" else "gave the saved numbers within rounding"
        out.write(f"Saved analysis {name}: run again from its summary statistics, it {word}.\n\n")
    _write(analysis, args, out)


def _write(analysis, args, out: TextIO) -> None:
    from .text import visible

    if args.json:
        json.dump(summary_document(analysis), out, indent=2, allow_nan=False)
        out.write("\n")
        return
    out.write("".join(visible(line) + "\n" for line in summary_lines(analysis)))
