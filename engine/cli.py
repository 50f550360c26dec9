"""The headless command: ``python -m engine analyze PATH ...``.

Bad input ends with exit code 2 and one line on stderr; nothing else is printed then.
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path
from typing import Sequence, TextIO

from .errors import TwofoldError, quoted
from .text import visible
from .wording import plural

__all__ = ["main", "build_parser", "spec_from_arguments"]

EXIT_BAD_INPUT = 2
EXIT_UNEXPECTED = 1  # as an uncaught error would exit, but with one line instead of a traceback


class _Parser(argparse.ArgumentParser):
    """An argument parser whose usage errors are one line and exit code 2."""

    def error(self, message: str) -> None:  # noqa: D401 - argparse's hook
        raise TwofoldError(f"{self.prog}: {message} (see --help)")


def build_parser() -> argparse.ArgumentParser:
    parser = _Parser(prog="python -m engine",
                     description="Compare two independent groups of measurements from a data file.")
    commands = parser.add_subparsers(dest="command", required=True, parser_class=_Parser)

    analyze = commands.add_parser("analyze", help="run the whole comparison on a file")
    analyze.add_argument("path", type=Path, help="a .csv, .tsv, .txt, .xlsx, .xls or .ods file")
    analyze.add_argument("--value", action="append", metavar="COLUMN",
                         help="the column of measurements; give it twice, once per group column, "
                              "for a file with one column per group")
    analyze.add_argument("--group", metavar="COLUMN", help="the column that says which group a row is in")
    analyze.add_argument("--groups", nargs=2, metavar=("FIRST", "SECOND"),
                         help="the two group labels to compare; every difference is FIRST minus SECOND")
    analyze.add_argument("--sheet", help="the sheet of a workbook (default: the first)")
    analyze.add_argument("--alternative", default="two-sided", choices=("two-sided", "less", "greater"),
                         help="two-sided: do the groups differ; less/greater: is the first group lower/higher")
    analyze.add_argument("--confidence", type=float, default=0.95, help="confidence level (default 0.95)")
    analyze.add_argument("--resamples", type=int, default=10_000,
                         help="resamples for the permutation and bootstrap procedures (default 10000)")
    analyze.add_argument("--seed", type=int, default=None, help="seed for the resampling, for repeatable results")
    analyze.add_argument("--known-sd", nargs=2, type=float, metavar=("SD1", "SD2"),
                         help="population standard deviations known beforehand (adds the z procedure)")
    analyze.add_argument("--equal-spreads-known", action="store_true",
                         help="the spreads are known to be equal from prior knowledge")
    analyze.add_argument("--ordinal", action="store_true", help="the values are ordered ratings, not measurements")
    analyze.add_argument("--json", action="store_true", help="print one JSON object instead of a summary")

    columns = commands.add_parser("columns", help="show the columns of a file and the suggested roles")
    columns.add_argument("path", type=Path)
    columns.add_argument("--sheet")
    return parser


def spec_from_arguments(args):
    """The analysis spec the command's flags describe (columns left open are proposed later)."""
    from .question import Question
    from .spec import AnalysisSpec, Source, Statements

    values = tuple(args.value or ())
    return AnalysisSpec(
        source=Source(str(args.path), args.sheet),
        layout="long" if args.group is not None or len(values) == 1 else "wide",
        group_column=args.group, value_columns=values,
        groups=tuple(args.groups) if args.groups else None,
        question=Question.from_alternative(args.alternative, args.confidence),
        resamples=args.resamples, seed=args.seed,
        statements=Statements(known_sd=tuple(args.known_sd) if args.known_sd else None,
                              equal_spread_known=args.equal_spreads_known, ordinal=args.ordinal),
    )


def _analyze(args, out: TextIO) -> None:
    from . import pipeline
    from .jsonout import analysis_document
    from .report import render

    analysis = pipeline.from_file(spec=spec_from_arguments(args)).analysis
    if args.json:
        json.dump(analysis_document(analysis), out, indent=2, allow_nan=False)
        out.write("\n")
        return
    # the suggested procedure is reported; should it have failed (a note then says why), the
    # first one that did not is reported instead, so that the rest still reaches the user
    key = analysis.recommendation.key
    if key not in analysis.procedures:
        key = next(iter(analysis.procedures))
    _write_lines(out, _readable(analysis, render(analysis, procedure=key).plain))


def _write_lines(out: TextIO, lines: Sequence[str]) -> None:
    """Print ``lines``, each one line: text from the file quoted in them cannot break a line,
    move the cursor or turn the text around (see :func:`engine.text.visible`)."""
    out.write("".join(visible(line) + "\n" for line in lines))


def _readable(analysis, report_text: str) -> list[str]:
    """The plain summary: the file and its screening, the report of the suggested procedure
    (which carries every procedure side by side, the reasons for the suggestion and the
    alternatives weighed, the checks and the cautions), worded by ``engine.report.document``."""
    from .report.document import text_lines

    return text_lines(analysis, report_text)


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
    except BaseException as problem:  # noqa: BLE001 - a library's own error or a Rust panic
        err.write(_unexpected(args, problem) + "\n")
        return EXIT_UNEXPECTED
    return 0


def _unexpected(args, problem: BaseException) -> str:
    """One line for an error the engine did not foresee, naming the file, never a traceback."""
    name = getattr(getattr(args, "path", None), "name", None)
    said = quoted(" ".join(str(problem).split()), 200)
    detail = f"{type(problem).__name__}: {said}" if said else type(problem).__name__
    where = f" while working on {name}" if name else ""
    return (f"Twofold stopped on an unexpected error{where} ({detail}). The file was not changed; "
            "please report this error.")
