"""The headless command for several outcomes:
``python -m engine analyze FILE --outcomes strength hardness elongation --group lot [--adjust holm|bh]``
(long layout: one value column per outcome) or ``--outcome-columns NAME COLUMN1 COLUMN2`` once per
outcome (wide layout: one column per group). ``--same-procedure KEY`` reads one procedure for every
outcome instead of each outcome's suggestion.

The ``--json`` document: ``input`` ("outcomes"), ``adjustment``, ``procedure``,
``simultaneous_level``, ``options``, ``spec``, ``findings``, and ``outcomes``: one member per
outcome with its name, columns, the procedure read (``key``) and its ``result``, ``p_value``,
``p_holm``, ``p_bh``, ``finding`` (the verdict by the chosen adjustment), the
``simultaneous_interval`` at the Bonferroni level, the standardised ``effect``, a ``problem`` when
it could not be analysed, and ``analysis``: the whole single-outcome document
(:func:`engine.jsonout.analysis_document`). Members are added, never renamed.
"""

from __future__ import annotations

import argparse
import difflib
import json
from typing import Any, TextIO

from .errors import TwofoldError, quoted

__all__ = ["add_flags", "wanted", "run", "write", "outcomes_document", "outcomes_lines", "FLAGS",
           "refuse_alone", "check_same_procedure", "write_report"]

# The flags that only several outcomes take (a saved analysis holds their choices already).
FLAGS = ("adjust", "same_procedure")


def add_flags(command: argparse.ArgumentParser) -> None:
    """The outcome flags of ``analyze``."""
    command.add_argument("--outcomes", nargs="+", metavar="COLUMN",
                         help="compare the two groups on each of these value columns (with --group), "
                              "with p-values adjusted for testing them all")
    command.add_argument("--outcome-columns", nargs=3, action="append",
                         metavar=("NAME", "COLUMN1", "COLUMN2"),
                         help="one outcome of a file with one column per group; give it once per outcome")
    command.add_argument("--adjust", choices=("holm", "bh"),
                         help="the adjustment the verdicts follow: holm (family-wise error, default) "
                              "or bh (Benjamini-Hochberg, false discovery rate)")
    command.add_argument("--same-procedure", metavar="KEY",
                         help="read this procedure (e.g. welch_t) for every outcome instead of each "
                              "outcome's suggestion")


def wanted(args) -> bool:
    """Whether the arguments ask for several outcomes."""
    return bool(getattr(args, "outcomes", None) or getattr(args, "outcome_columns", None))


def _given(args) -> list[str]:
    return ["--" + name.replace("_", "-") for name in FLAGS if getattr(args, name, None) is not None]


def refuse_alone(args) -> None:
    """One line for --adjust or --same-procedure without --outcomes or --outcome-columns (a
    saved analysis given with --spec refuses them with its other choices)."""
    given = _given(args)
    if given and not wanted(args) and getattr(args, "spec", None) is None:
        both = len(given) > 1
        raise TwofoldError(f"python -m engine analyze: {' and '.join(given)} {'are' if both else 'is'} for "
                           "several outcomes; add --outcomes (with --group) or --outcome-columns, or leave "
                           f"{'them' if both else 'it'} out")


def check_same_procedure(key: str | None, spec) -> None:
    """One line, before the data are read, for a --same-procedure key that does not answer the
    question ``spec`` asks, naming the keys that do."""
    from .procedures import registry

    if key is None:
        return
    fits = [record.key for record in registry.applicable(spec)]
    if key in fits:
        return
    known = registry.find(key)
    if known is None:
        close = difflib.get_close_matches(key, fits, n=1)
        why = "no procedure has that key" + (f" (perhaps {close[0]})" if close else "")
    else:
        why = _why_not(known, spec)
    raise TwofoldError(f"python -m engine analyze: --same-procedure '{quoted(key)}' does not answer this "
                       f"question: {why}; the keys that fit: {', '.join(fits)}")


_DESIGN_WORDS = {"independent": "two independent groups", "paired": "matched pairs"}
_QUESTION_WORDS = {"differ": "whether the groups differ", "lower": "a one-sided question",
                   "higher": "a one-sided question", "equivalent": "an equivalence question",
                   "not_worse": "a non-inferiority question"}


def _why_not(record, spec) -> str:
    """Why the procedure ``record`` does not answer the question ``spec`` asks, in a few words."""
    if spec.design not in record.designs:
        return f"it is for {' or '.join(_DESIGN_WORDS.get(d, d) for d in record.designs)}"
    if spec.question.kind not in record.questions:
        asked = dict.fromkeys(_QUESTION_WORDS.get(q, q) for q in record.questions)
        return f"it is for {' or '.join(asked)}"
    if record.needs_known_sd and spec.statements.known_sd is None:
        return "it needs the groups' known SDs (--known-sd)"
    if record.needs_equal_spread and not spec.statements.equal_spread_known:
        return "it needs the spreads known to be equal (--equal-spreads-known)"
    return "it does not take a margin given this way"


def _outcomes(args):
    from .outcomes import long_outcomes, wide_outcomes

    given = [flag for flag, value in (("--spec", args.spec), ("--value", args.value)) if value]
    if given:
        raise TwofoldError(f"python -m engine analyze: with several outcomes leave out {', '.join(given)}; "
                           "the outcomes name the value columns (see --help)")
    if args.outcomes and args.outcome_columns:
        raise TwofoldError("python -m engine analyze: give --outcomes (with --group) or "
                           "--outcome-columns, not both")
    if args.path is None:
        raise TwofoldError("python -m engine analyze: give the path of the data file the outcomes are in")
    if args.outcomes:
        if args.group is None:
            raise TwofoldError("python -m engine analyze: --outcomes needs --group, the column that "
                               "says which group each row is in")
        return long_outcomes(args.outcomes)
    if args.group is not None:
        raise TwofoldError("python -m engine analyze: --outcome-columns is for a file with one column "
                           "per group; leave out --group (or use --outcomes)")
    return wide_outcomes([(a, b) for _, a, b in args.outcome_columns],
                         [name for name, _, _ in args.outcome_columns])


def outcomes_document(found) -> dict[str, Any]:
    """The ``--json`` document of several outcomes."""
    from .jsonout import SCHEMA_VERSION, analysis_document, options_member, to_plain

    rows = found.rows
    return {
        "schema_version": SCHEMA_VERSION,
        "input": "outcomes",
        "adjustment": found.adjustment,
        "procedure": found.procedure,
        "simultaneous_level": found.simultaneous_level,
        "options": options_member(found.spec),
        "spec": found.spec.to_dict(),
        "findings": to_plain(found.findings),
        "outcomes": [{
            "name": done.outcome.name,
            "columns": list(done.outcome.columns),
            "key": done.key,
            "result": to_plain(done.result),
            "p_value": to_plain(row.p_value),
            "p_holm": to_plain(row.p_holm),
            "p_bh": to_plain(row.p_bh),
            "finding": row.finding,
            "simultaneous_interval": to_plain(row.simultaneous_interval),
            "effect": to_plain(row.effect),
            "problem": done.problem,
            "analysis": None if done.analysis is None else analysis_document(done.analysis),
        } for done, row in zip(found.outcomes, rows)],
    }


def outcomes_lines(found) -> list[str]:
    """The plain table: one line per outcome (its cells as the report writes them), then why one
    would choose each adjustment."""
    from .report.outcomes_report import ADJUSTMENT_SHORT, row_cells
    from .rounding import level_text

    lines = [f"{len(found.outcomes)} outcomes; verdicts by {ADJUSTMENT_SHORT[found.adjustment]}'s adjustment at "
             f"{level_text(found.level)}; intervals at {level_text(found.level)} and, together, at "
             f"{level_text(found.simultaneous_level)} (Bonferroni)."]
    for index, (done, row) in enumerate(zip(found.outcomes, found.rows)):
        if done.result is None:
            lines.append(f"{row.name}: not analysed: {row.problem}")
            continue
        name, n, procedure, estimate, together, p, holm, bh, effect, verdict = row_cells(found, index)
        effect_words = "" if done.effect is None else f"; {done.effect.name} {effect}"
        lines.append(f"{name}: n {n}; {procedure}: {row.estimate_name} {estimate}, together {together}; "
                     f"p {p}, Holm {holm}, Benjamini-Hochberg {bh}; verdict: {verdict}{effect_words}")
    lines += [finding.text for finding in found.findings]
    return lines


def run(args, out: TextIO, spec) -> None:
    """``analyze`` on several outcomes: ``spec`` is the analysis the other flags describe
    (``engine.cli.spec_from_arguments``)."""
    from .outcomes import outcomes_from_file

    outcomes = _outcomes(args)
    check_same_procedure(args.same_procedure, spec)
    found = outcomes_from_file(spec, outcomes, procedure=args.same_procedure,
                               adjustment=args.adjust or "holm")
    if args.save is not None:  # before anything is printed: a failed save is then the only line
        from . import saved

        saved.save(args.save, found)
    write(found, args, out)


def write_report(args, out: TextIO, reopened) -> None:
    """``report SAVED --html OUT`` of a saved analysis of several outcomes, run again and
    confirmed (``reopened``): the page of :func:`engine.report.outcomes_report.html`, never over
    the data file or the saved analysis."""
    from . import audit, saved
    from .report import outcomes_report
    from .text import visible

    audit.refuse_overwriting(args.html, [reopened.source_used, args.path])
    saved.write_atomically(args.html, outcomes_report.html(reopened.prepared, reopened=reopened))
    out.write(visible(f"Report written to {args.html}") + "\n")


def write(found, args, out: TextIO, lines: list[str] | None = None) -> None:
    """``found`` printed as JSON, or as plain lines after ``lines``."""
    from .text import visible

    if args.json:
        json.dump(outcomes_document(found), out, indent=2, allow_nan=False)
        out.write("\n")
        return
    out.write("".join(visible(line) + "\n" for line in (lines or []) + outcomes_lines(found)))
