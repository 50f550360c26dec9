"""The headless command: ``python -m engine analyze PATH ...``, ``analyze --spec SAVED``,
``report SAVED_OR_PATH --html OUT`` and ``columns PATH``.

Bad input ends with exit code 2 and one line on stderr; nothing else is printed then. So does a
saved analysis that no longer gives its numbers (a changed data file, other figures): a script
can rely on exit code 0 meaning "the saved numbers were confirmed".
"""

from __future__ import annotations

import argparse
import json
import os
import re
import sys
from pathlib import Path
from typing import Sequence, TextIO

from . import outcomes_cli, plan_cli, question_flags, summary_cli
from .column_flags import COLUMN_FLAGS, add_column_flags
from .errors import TwofoldError, quoted
from .text import visible
from .wording import plural

__all__ = ["main", "build_parser", "spec_from_arguments", "DEFAULTS", "ANALYSIS_FLAGS"]

EXIT_BAD_INPUT = 2
EXIT_UNEXPECTED = 1  # as an uncaught error would exit, but with one line instead of a traceback


class _Parser(argparse.ArgumentParser):
    """An argument parser whose usage errors are one line and exit code 2."""

    def __init__(self, *args, **kwargs) -> None:
        super().__init__(*args, **kwargs)
        # a value that starts with a minus and a digit is a value, never a flag: the margins
        # -0.5:0.8 and -3%:4% as well as argparse's own negative numbers
        self._negative_number_matcher = re.compile(r"^-\.?\d")

    def error(self, message: str) -> None:  # noqa: D401 - argparse's hook
        raise TwofoldError(f"{self.prog}: {message} (see --help)")


# The analysis flags' defaults (None in the parser, so that flags given with --spec are noticed).
DEFAULTS = {"alternative": "two-sided", "confidence": 0.95, "resamples": 10_000}
# Flags that describe a new analysis; a saved one (--spec) already holds all of them.
ANALYSIS_FLAGS = COLUMN_FLAGS + ("alternative", "confidence", "resamples", "seed",
                  "known_sd", "equal_spreads_known", "ordinal") + question_flags.FLAGS


def _analysis_flags(command: argparse.ArgumentParser) -> None:
    add_column_flags(command)
    command.add_argument("--alternative", choices=("two-sided", "less", "greater"),
                         help="two-sided (default): do the groups differ; less/greater: is the first "
                              "group lower/higher")
    command.add_argument("--confidence", type=float, help="confidence level (default 0.95)")
    command.add_argument("--resamples", type=int,
                         help="resamples for the permutation and bootstrap procedures (default 10000)")
    command.add_argument("--seed", type=int, default=None, help="seed for the resampling, for repeatable results")
    command.add_argument("--known-sd", nargs=2, type=float, metavar=("SD1", "SD2"),
                         help="population standard deviations known beforehand (adds the z procedure)")
    command.add_argument("--equal-spreads-known", action="store_true",
                         help="the spreads are known to be equal from prior knowledge")
    command.add_argument("--ordinal", action="store_true", help="the values are ordered ratings, not measurements")
    question_flags.add_flags(command)


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(prog="python -m engine",
                     description="Compare two groups of measurements from a data file: independent groups or "
                                 "pairs, asking whether they differ, are equivalent within a margin, or "
                                 "whether the first is not worse by more than a margin.")
    commands = parser.add_subparsers(dest="command", required=True, parser_class=_Parser)

    analyze = commands.add_parser("analyze", help="run the whole comparison on a file")
    analyze.add_argument("path", type=Path, nargs="?",
                         help="a .csv, .tsv, .txt, .xlsx, .xls or .ods file; with --spec, the data "
                              "file's new place when it has moved")
    _analysis_flags(analyze)
    summary_cli.add_flags(analyze), outcomes_cli.add_flags(analyze)
    analyze.add_argument("--json", action="store_true", help="print one JSON object instead of a summary")
    analyze.add_argument("--save", type=Path, metavar="OUT.twofold",
                         help="also save the analysis (its choices, seed and numbers) to reopen and check later")
    analyze.add_argument("--spec", type=Path, metavar="SAVED.twofold",
                         help="run a saved analysis again; exit code 2 when its data file changed or its "
                              "numbers are not the saved ones")

    report = commands.add_parser("report", help="write the full report of a saved analysis or a data file")
    report.add_argument("path", type=Path, metavar="SAVED_OR_FILE",
                        help="a saved analysis (.twofold) or a data file")
    report.add_argument("--html", type=Path, required=True, metavar="OUT.html", help="where to write the report")
    report.add_argument("--source", type=Path, metavar="FILE",
                        help="the data file's new place, when a saved analysis's data file has moved")
    _analysis_flags(report)

    plan_cli.add_plan_command(commands)
    columns = commands.add_parser("columns", help="show the columns of a file and the suggested roles")
    columns.add_argument("path", type=Path)
    columns.add_argument("--sheet")
    return parser


def spec_from_arguments(args):
    """The analysis spec the command's flags describe (columns left open are proposed later)."""
    from .spec import AnalysisSpec, Source, Statements

    def given(name):
        value = getattr(args, name, None)
        return DEFAULTS[name] if value is None else value

    values = tuple(args.value or ())
    question = question_flags.question_of(args, given("alternative"), given("confidence"))
    design = {"layout": "long" if args.group is not None or len(values) == 1 else "wide",
              **question_flags.design_of(args, values)}
    return AnalysisSpec(
        source=Source(str(args.path), args.sheet),
        group_column=args.group, value_columns=values,
        groups=tuple(args.groups) if args.groups else None,
        question=question,
        resamples=given("resamples"), seed=args.seed,
        statements=Statements(known_sd=tuple(args.known_sd) if args.known_sd else None,
                              equal_spread_known=args.equal_spreads_known, ordinal=args.ordinal),
        **design,
    )


def _refuse_flags_with_saved(args, saved_name: str) -> None:
    given = [name for name in ANALYSIS_FLAGS + outcomes_cli.FLAGS if getattr(args, name, None) not in (None, False)]
    if given:
        flags = ", ".join("--" + name.replace("_", "-") for name in given)
        raise TwofoldError(f"{saved_name} holds every choice of its analysis; leave out {flags} "
                           "(to change a choice, analyse the data file itself).")


def _reopened(saved_path: Path, source_path: Path | None, locate: str):
    """The saved analysis run again; raises a one-line :class:`TwofoldError` unless it gave the
    saved numbers (the same, or within the tolerance)."""
    from . import saved

    reopened = saved.reopen(saved.load(saved_path), source_path=source_path)
    name = saved_path.name
    if reopened.status == "source_missing":
        missing = Path(reopened.saved.spec.source.path).name
        where = f" at {source_path}" if source_path is not None else ""
        raise TwofoldError(f"{name}: the data file {missing} was not found{where}; give its new place: {locate}")
    if reopened.status == "source_changed":
        shown = "; ".join(reopened.differences[:saved.DIFFERENCES_SHOWN])
        more = len(reopened.differences) - saved.DIFFERENCES_SHOWN
        raise TwofoldError(f"{name}: {reopened.message[:-1]}" + (f": {shown}" if shown else "")
                           + (f"; and {more} more." if more > 0 else "."))
    if not reopened.confirmed:
        raise TwofoldError(f"{name}: {reopened.message}")
    return reopened


def _prepared(args, source_path: Path | None, saved_path: Path | None, locate: str = ""):
    """The analysis the arguments ask for: a saved one run again (with its confirmation) or a
    new one from the data file and the flags."""
    from . import pipeline

    if saved_path is not None:
        _refuse_flags_with_saved(args, saved_path.name)
        reopened = _reopened(saved_path, source_path, locate)
        return reopened.prepared, reopened
    if source_path is None:
        raise TwofoldError("python -m engine analyze: give the path of a data file, or a saved analysis "
                           "with --spec (see --help)")
    return pipeline.from_file(spec=spec_from_arguments(args)), None


def _analyze(args, out: TextIO) -> None:
    from .jsonout import analysis_document
    from .report import render

    outcomes_cli.refuse_alone(args)
    if summary_cli.wanted(args) or outcomes_cli.wanted(args):
        question_flags.refuse_with(args, summaries=summary_cli.wanted(args))
        return (summary_cli.run(args, out, DEFAULTS) if summary_cli.wanted(args)
                else outcomes_cli.run(args, out, spec_from_arguments(args)))
    if args.spec is not None:
        from . import saved

        loaded = saved.load(args.spec)
        if loaded.summary_statistics is not None:
            _refuse_flags_with_saved(args, args.spec.name)
            if args.path is not None:
                raise TwofoldError(f"{args.spec.name} is an analysis of summary statistics; it needs no data file.")
            return summary_cli.run_saved(args, out, loaded)
        if loaded.outcomes is not None:  # several outcomes: the table, after the confirmation
            _refuse_flags_with_saved(args, args.spec.name)
            reopened = _reopened(args.spec, args.path, f"python -m engine analyze NEW_PLACE --spec {args.spec}")
            if args.save is not None:
                saved.save(args.save, reopened.prepared)
            lines = [] if args.json else [f"Saved analysis {args.spec.name}: {reopened.message}", ""]
            return outcomes_cli.write(reopened.prepared, args, out, lines)
    prepared, reopened = _prepared(args, args.path, args.spec,
                                   f"python -m engine analyze NEW_PLACE --spec {args.spec}")
    analysis = prepared.analysis
    if args.save is not None:  # before anything is printed: a failed save is then the only line
        from . import saved

        saved.save(args.save, analysis)
    if args.json:
        json.dump(analysis_document(analysis), out, indent=2, allow_nan=False)
        out.write("\n")
        return
    # the suggested procedure is reported; should it have failed (a note then says why), the
    # first one that did not is reported instead, so that the rest still reaches the user
    key = _reported_key(analysis)
    lines = [f"Saved analysis {args.spec.name}: {reopened.message}", ""] if reopened is not None else []
    _write_lines(out, lines + _readable(analysis, render(analysis, procedure=key).plain))


def _reported_key(analysis) -> str:
    """The procedure the user picked (a saved analysis may record one), else the suggested one."""
    for key in (analysis.spec.procedure, analysis.recommendation.key):
        if key in analysis.procedures:
            return key
    if not analysis.procedures:  # every procedure for this question was left out: say why
        reasons = " ".join(note.text for note in analysis.notes)
        raise TwofoldError(f"{analysis.source.get('file') or 'The data'}: no procedure could answer this "
                           "question for these data." + (f" {reasons}" if reasons else ""))
    return next(iter(analysis.procedures))


def _report(args, out: TextIO) -> None:
    from . import audit, saved
    from .report import document

    is_saved = args.path.suffix.lower() == saved.EXTENSION
    if not is_saved and args.source is not None:
        raise TwofoldError("--source gives the new place of a saved analysis's data file; "
                           f"{args.path.name} is not a saved analysis ({saved.EXTENSION}).")
    if is_saved and (loaded := saved.load(args.path)).summary_statistics is not None:
        return summary_cli.write_report(args, out, loaded, ANALYSIS_FLAGS)
    if is_saved:
        locate = f"python -m engine report {args.path} --source NEW_PLACE --html {args.html}"
        if saved.load(args.path).outcomes is not None:  # several outcomes: their own report
            _refuse_flags_with_saved(args, args.path.name)
            return outcomes_cli.write_report(args, out, _reopened(args.path, args.source, locate))
        prepared, reopened = _prepared(args, args.source, args.path, locate)
    else:
        prepared, reopened = _prepared(args, args.path, None)
    keep = [Path(prepared.spec.source.path)] + ([args.path] if is_saved else [])
    audit.refuse_overwriting(args.html, keep)
    html = document.html(prepared.analysis, procedure=_reported_key(prepared.analysis),
                         reopened=reopened)
    saved.write_atomically(args.html, html)
    _write_lines(out, [f"Report written to {args.html}"])


def _write_lines(out: TextIO, lines: Sequence[str]) -> None:
    """Print ``lines``, each one line: text from the file quoted in them cannot break a line,
    move the cursor or turn the text around (see :func:`engine.text.visible`)."""
    out.write("".join(visible(line) + "\n" for line in lines))


def _readable(analysis, report_text: str) -> list[str]:
    """The plain summary: the file and its screening, the report of the suggested procedure
    (which carries every procedure side by side, the reasons for the suggestion and the
    alternatives weighed, the checks and the cautions), worded by ``engine.report.document``."""
    from .report.document import text_lines

    return text_lines(analysis, report_text, procedure=_reported_key(analysis))


def _columns(args, out: TextIO) -> None:
    from . import io

    table = io.read_table(args.path, sheet=args.sheet)
    proposal = io.propose_layout(table)
    lines = [f"{args.path.name}: {len(table.frame)} rows" + (f", sheet '{table.sheet}'" if table.sheet else "")]
    lines += [f"  {name}: {kind}" for name, kind in table.column_kinds.items()]
    lines.append(f"Suggested layout: {proposal.layout}; group column: {proposal.group_column}; "
                 f"{plural(len(proposal.value_columns), 'value column', number=False)}: "
                 f"{', '.join(proposal.value_columns)}")
    lines += [f"  {reason}" for reason in proposal.reasons]
    _write_lines(out, lines)


def main(argv: Sequence[str] | None = None, *, out: TextIO | None = None, err: TextIO | None = None) -> int:
    out = out or sys.stdout
    err = err or sys.stderr
    args = None
    try:
        args = build_parser().parse_args(argv)
        if args.command == "analyze":
            _analyze(args, out)
        elif args.command == "report":
            _report(args, out)
        elif args.command == "plan":
            plan_cli.run_plan(args, out)
        else:
            _columns(args, out)
    except TwofoldError as problem:
        err.write(f"{problem.message}\n")
        return EXIT_BAD_INPUT
    except MemoryError:
        err.write("The file is too large for the memory of this computer.\n")
        return EXIT_BAD_INPUT
    except (KeyboardInterrupt, SystemExit):
        raise
    except BrokenPipeError:
        # the reader went away (``... | head``): nothing more to say, to anyone
        _quiet(out)
        return EXIT_UNEXPECTED
    except BaseException as problem:  # noqa: BLE001 - a library's own error or a Rust panic
        err.write(_unexpected(args, problem) + "\n")
        return EXIT_UNEXPECTED
    return 0


def _quiet(out: TextIO) -> None:
    """Point the process's standard output at the null device once its reader has closed the
    pipe, so that Python's own flush at exit finds nowhere to complain (the way the Python
    documentation advises for SIGPIPE)."""
    if out is not sys.stdout:
        return
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
    except (OSError, ValueError):
        pass


def _unexpected(args, problem: BaseException) -> str:
    """One line for an error the engine did not foresee, naming the file, never a traceback."""
    name = getattr(getattr(args, "path", None), "name", None)
    said = quoted(" ".join(str(problem).split()), 200)
    detail = f"{type(problem).__name__}: {said}" if said else type(problem).__name__
    where = f" while working on {name}" if name else ""
    return (f"Twofold stopped on an unexpected error{where} ({detail}). The file was not changed; "
            "please report this error.")
