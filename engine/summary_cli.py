"""The headless command from summary statistics:
``python -m engine analyze --summary "A n=12 mean=41.2 sd=3.1" --summary "B n=15 mean=38.0 sd=4.4"``
(label first; ``se=`` instead of ``sd=``; ``--sd-known`` for known population SDs, which adds the
z procedure) or ``analyze --summary-file FILE`` (one row per group). The margin flags of
``engine.question_flags`` ask for equivalence or non-inferiority (a margin in units or a
percentage of group 2's mean; a ratio margin and the paired flags are refused in one line).

The ``--json`` document shares its members with the analysis of values where they mean the same
(``groups``, ``n``, ``options``, ``spec``, ``procedures``, ``effect_sizes``, ``recommendation``,
``robustness``, ``notes``, ``question``, ``margin_verdicts``) and adds ``input`` ("summary"),
``summary_statistics`` (the numbers as entered), ``needs_values`` and ``findings``
(``engine/schema/summary.schema.json``). Members are added, never renamed.
"""

from __future__ import annotations

import argparse
import json
from typing import Any, TextIO

from .errors import TwofoldError
from .text import visible

__all__ = ["add_flags", "wanted", "run", "run_saved", "write_report", "summary_document", "summary_schema",
           "summary_lines"]


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
    from .question_flags import question_of
    from .spec import AnalysisSpec, Statements

    def given(name):
        value = getattr(args, name, None)
        return defaults[name] if value is None else value

    if args.known_sd:
        raise TwofoldError("python -m engine analyze: with summary statistics mark known SDs with "
                           "--sd-known (the sd= values are then the known ones), not --known-sd")
    return AnalysisSpec(question=question_of(args, given("alternative"), given("confidence")),
                        seed=args.seed,
                        statements=Statements(equal_spread_known=args.equal_spreads_known,
                                              ordinal=args.ordinal))


def summary_document(analysis) -> dict[str, Any]:
    """The ``--json`` document of an analysis from summary statistics."""
    from .jsonout import SCHEMA_VERSION, margin_verdicts, options_member, question_member, to_plain

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
        # as in the document of an analysis of values: what was asked, the verdicts against a margin
        "question": question_member(analysis),
        "margin_verdicts": margin_verdicts(analysis),
    }


def summary_schema() -> dict[str, Any]:
    """The JSON Schema of :func:`summary_document`'s output, as shipped with the package (it refers
    to ``analysis.schema.json`` for the members the two documents share)."""
    from importlib.resources import files

    return json.loads((files(__package__) / "schema" / "summary.schema.json").read_text(encoding="utf-8"))


def _question_lines(analysis) -> list[str]:
    """The question; for a margin question also the margin as entered and each margin
    procedure's verdict against it (in the words of every report)."""
    from .jsonout import margin_answers
    from .report.from_summaries import margin_texts, question_sentence
    from .rounding import level_text

    question = analysis.spec.question
    if not question.has_margin:
        return [f"Question: {question_sentence(analysis)}"]
    size, entered = margin_texts(analysis)
    kind = "equivalence" if question.kind == "equivalent" else "non-inferiority"
    lines = [f"Question: {question_sentence(analysis, size)} ({kind}, at the {level_text(question.alpha)} level)",
             f"Margin as entered: {entered}."]
    answers = margin_answers(analysis)
    for key, answer in answers.items():
        result = analysis.procedures[key]
        lines.append(f"Verdict by {result.name}: "
                     + question.margin_words(answer, analysis.labels, result.estimate_name))
    if not answers:
        lines.append("Verdict: no procedure gave an interval to set against the margin (the notes say why).")
    return lines


def summary_lines(analysis) -> list[str]:
    """The plain summary: the groups as entered, the question (and for a margin question each
    procedure's verdict against the margin), every procedure, the effect sizes, the suggestion
    and what needed the values."""
    from .report.numbers import format_interval
    from .rounding import format_number, format_p, level_text

    lines = ["From summary statistics:"]
    for s in analysis.stats:
        spread = (f"sd {format_number(s.sd)}" if s.given_as == "sd" else f"se {format_number(s.se)}")
        lines.append(f"  {s.label}: n {s.n}, mean {format_number(s.mean)}, {spread}"
                     + (" (known)" if s.sd_known else ""))
    lines += _question_lines(analysis)
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

    _refuse_others(args)
    analysis = analyze_summaries(_stats(args), _spec(args, defaults))
    if args.save is not None:  # before anything is printed: a failed save is then the only line
        from . import saved

        _refuse_saving_over(args.save, args.summary_file)
        saved.save(args.save, analysis)
    _write(analysis, args, out)


def _refuse_saving_over(target, summary_file) -> None:
    """A one-line :class:`TwofoldError` when ``--save`` names the file of summaries it reads."""
    import os
    from pathlib import Path

    if summary_file is None:
        return
    try:
        same = Path(target).exists() and os.path.samefile(target, summary_file)
    except OSError:
        same = False
    if same:
        raise TwofoldError(f"--save {Path(target).name} would replace the file of summary statistics "
                           "it reads; save the analysis to a .twofold file of its own.")


def _rerun(name: str, loaded):
    """A saved analysis from summary statistics run again from its recorded numbers: (the
    analysis, what running it again found in a sentence); a one-line :class:`TwofoldError`
    unless it gave the saved figures (the same, or within the tolerance)."""
    from . import saved

    analysis, status, differences = saved.rerun_summaries(loaded)
    if status == "numbers_differ":
        shown = "; ".join(differences[:saved.DIFFERENCES_SHOWN])
        more = len(differences) - saved.DIFFERENCES_SHOWN
        raise TwofoldError(f"{name}: run again from its summary statistics, the numbers differ: {shown}"
                           + (f" (and {more} more)" if more > 0 else ""))
    word = "gave the saved numbers" if status == "same" else "gave the saved numbers within rounding"
    return analysis, f"Saved analysis {name}: run again from its summary statistics, it {word}."


def run_saved(args, out: TextIO, loaded) -> None:
    """``analyze --spec SAVED`` of a saved analysis from summary statistics: run again from the
    recorded numbers; a one-line :class:`TwofoldError` unless it gave the saved figures."""
    from . import saved

    analysis, said = _rerun(args.spec.name, loaded)
    if args.save is not None:
        saved.save(args.save, analysis)
    if not args.json:
        out.write(f"{said}\n\n")
    _write(analysis, args, out)


def write_report(args, out: TextIO, loaded, flags: tuple[str, ...]) -> None:
    """``report SAVED --html OUT`` of a saved analysis from summary statistics: run again from its
    recorded numbers and, when it gave them, the whole report written to OUT
    (the page of a summary analysis in ``engine.report``). The flags of a data file (``flags``, the
    analysis flags, and --source) are refused in one line: the saved file holds every choice."""
    from . import audit, saved
    from .report.from_summaries import html as page_of

    name = args.path.name
    given = [flag for flag in flags if getattr(args, flag, None) not in (None, False)]
    if args.source is not None:
        given.insert(0, "source")
    if given:
        listed = ", ".join("--" + flag.replace("_", "-") for flag in given)
        raise TwofoldError(f"{name} is an analysis of summary statistics and holds every choice of it; "
                           f"leave out {listed}.")
    analysis, said = _rerun(name, loaded)
    audit.refuse_overwriting(args.html, [args.path])
    saved.write_atomically(args.html, page_of(analysis, reopened=said))
    out.write(f"Report written to {visible(str(args.html))}\n")


def _write(analysis, args, out: TextIO) -> None:
    if args.json:
        json.dump(summary_document(analysis), out, indent=2, allow_nan=False)
        out.write("\n")
        return
    out.write("".join(visible(line) + "\n" for line in summary_lines(analysis)))
