"""The headless command's flags for the question and the design.

A margin question: ``--equivalence-margin M`` (equivalent within -M to +M) or ``LOW:HIGH`` (an
asymmetric margin; ``-0.5:0.8`` parses), ``--noninferiority-margin M --worse lower|higher``. A
``%`` after a number makes it a percentage of group 2's mean (``5%``, ``-3%:4%``);
``--margin-as units|percent|ratio`` says the same explicitly (a ratio margin: ``0.8:1.25``, or
``1.25`` for 0.8 to 1.25). The paired design: ``--paired-by COLUMN`` (a group column and a pair ID
column) or ``--paired`` (one column per group, one row per unit), with ``--zero-rule drop|pratt``
for the signed-rank test.

Each wrong combination raises :class:`engine.errors.OptionProblem` with one line naming the
flags; the command ends with its exit code for bad options.
"""

from __future__ import annotations

import argparse
import math
from typing import Any

from .errors import OptionProblem, quoted
from .question import MARGIN_UNITS, WORSE, Margin, Question
from .spec import ZERO_RULES

__all__ = ["FLAGS", "add_flags", "question_of", "design_of", "parse_margin", "refuse_with"]

# The flags this module adds, as argparse names them (a saved analysis refuses each of them).
FLAGS = ("equivalence_margin", "noninferiority_margin", "worse", "margin_as", "paired_by", "paired",
         "zero_rule")

_EQUIVALENCE = "--equivalence-margin"
_NONINFERIORITY = "--noninferiority-margin"
_FORMS = "a number, a percentage such as 5%, or LOW:HIGH"


def add_flags(command: argparse.ArgumentParser) -> None:
    """Add the question's margin flags and the design's flags to ``command``."""
    command.add_argument(_EQUIVALENCE, metavar="M|LOW:HIGH",
                         help="ask whether the groups are equivalent: their difference lies within -M to "
                              "+M, or LOW to HIGH (negative numbers allowed: -0.5:0.8); a %% after a number "
                              "makes it a percentage of the second group's mean (5%%, -3%%:4%%)")
    command.add_argument(_NONINFERIORITY, metavar="M",
                         help="ask whether the first group is not worse than the second by more than M "
                              "(M in the measurement's units, or a percentage: 5%%); needs --worse")
    command.add_argument("--worse", choices=WORSE,
                         help="for --noninferiority-margin: which direction is worse (lower strength, "
                              "higher defect rate)")
    command.add_argument("--margin-as", choices=MARGIN_UNITS,
                         help="how the margin is given: units (the measurement's, the default), percent "
                              "(of the second group's mean; the same as a %% suffix) or ratio (of the first "
                              "group's mean to the second's: 0.8:1.25, or 1.25 for 0.8 to 1.25)")
    command.add_argument("--paired-by", metavar="COLUMN",
                         help="the data are paired: COLUMN holds the pair ID, each ID once in each group "
                              "(a file with a group column)")
    command.add_argument("--paired", action="store_true",
                         help="the data are paired row by row: each row holds one unit's two values "
                              "(a file with one column per group)")
    command.add_argument("--zero-rule", choices=ZERO_RULES,
                         help="paired data: the signed-rank test drops pairs with no difference (drop, "
                              "the default) or ranks them without a sign (pratt)")


def _flag(name: str) -> str:
    return "--" + name.replace("_", "-")


def _given(args: Any, name: str) -> bool:
    return getattr(args, name, None) not in (None, False)


def _number(part: str, flag: str, text: str) -> tuple[float, bool]:
    """One end of a margin: (its number, whether it carried a %)."""
    body = part.strip()
    percent = body.endswith("%")
    if percent:
        body = body[:-1].strip()
    try:
        value = float(body)
    except ValueError:
        value = math.nan
    if not body or not math.isfinite(value) or "_" in body:
        raise OptionProblem(f"{flag} {quoted(text)}: '{quoted(part)}' is not a number; give {_FORMS}.")
    return value, percent


def parse_margin(text: str, margin_as: str | None, flag: str = _EQUIVALENCE) -> tuple[tuple[float, ...], str]:
    """The numbers of a margin as written (one, or LOW and HIGH) and its unit: ``margin_as`` when
    given, "percent" when the numbers carry a %, else "units". Raises :class:`OptionProblem`
    naming ``flag`` for text that is not a margin."""
    parts = str(text).split(":")
    if len(parts) > 2:
        raise OptionProblem(f"{flag} {quoted(text)}: give one number or LOW:HIGH, with one colon.")
    ends = [_number(part, flag, text) for part in parts]
    marked = {percent for _, percent in ends}
    if len(marked) > 1:
        raise OptionProblem(f"{flag} {quoted(text)}: give both ends as percentages or neither.")
    percent = marked.pop()
    if percent and margin_as not in (None, "percent"):
        raise OptionProblem(f"{flag} {quoted(text)} is a percentage, but --margin-as says {margin_as}; "
                            "leave out the % or --margin-as.")
    unit = margin_as or ("percent" if percent else "units")
    numbers = tuple(value for value, _ in ends)
    if len(numbers) == 1 and numbers[0] == (1.0 if unit == "ratio" else 0.0):
        raise OptionProblem(f"{flag} {quoted(text)}: a margin of {quoted(text)} leaves no room for any "
                            "difference; give the largest difference that does not matter.")
    return numbers, unit


def _margin(args: Any) -> tuple[str, Margin] | None:
    """The kind and margin the flags ask for (None: no margin question)."""
    if _given(args, "equivalence_margin"):
        text = args.equivalence_margin
        numbers, unit = parse_margin(text, args.margin_as, _EQUIVALENCE)
        try:
            return "equivalent", Margin.within(*numbers, unit=unit)
        except OptionProblem as problem:
            raise OptionProblem(f"{_EQUIVALENCE} {quoted(text)}: {problem.message}") from None
    if _given(args, "noninferiority_margin"):
        text = args.noninferiority_margin
        numbers, unit = parse_margin(text, args.margin_as, _NONINFERIORITY)
        if len(numbers) != 1:
            raise OptionProblem(f"{_NONINFERIORITY} {quoted(text)}: give one size, the most the first "
                                "group may be worse by (--worse says which direction is worse), not LOW:HIGH.")
        try:
            return "not_worse", Margin.not_worse_by(numbers[0], args.worse, unit=unit)
        except OptionProblem as problem:
            raise OptionProblem(f"{_NONINFERIORITY} {quoted(text)}: {problem.message}") from None
    return None


def _check_question_flags(args: Any) -> None:
    equivalence, noninferiority = _given(args, "equivalence_margin"), _given(args, "noninferiority_margin")
    if equivalence and noninferiority:
        raise OptionProblem(f"Give {_EQUIVALENCE} or {_NONINFERIORITY}, not both: each asks its own question.")
    if _given(args, "worse") and not noninferiority:
        raise OptionProblem(f"--worse goes with {_NONINFERIORITY}; give that margin too, or leave out --worse.")
    if noninferiority and not _given(args, "worse"):
        raise OptionProblem(f"{_NONINFERIORITY} needs --worse lower or --worse higher: which direction "
                            "is worse for the first group.")
    margin = equivalence or noninferiority
    if _given(args, "margin_as") and not margin:
        raise OptionProblem(f"--margin-as says how a margin is given; give {_EQUIVALENCE} or "
                            f"{_NONINFERIORITY} too, or leave out --margin-as.")
    if margin and _given(args, "alternative"):
        flag = _EQUIVALENCE if equivalence else _NONINFERIORITY
        raise OptionProblem(f"--alternative does not go with {flag}: the margin question has its own "
                            "direction (--worse for non-inferiority); leave out --alternative.")


def question_of(args: Any, alternative: str, level: float) -> Question:
    """The question the flags ask: a margin question, or the difference question of
    ``alternative`` (the flag's value or its default) at ``level``."""
    _check_question_flags(args)
    found = _margin(args)
    if found is None:
        return Question.from_alternative(alternative, level)
    kind, margin = found
    return Question(kind, level, margin=margin)


def design_of(args: Any, values: tuple[str, ...]) -> dict[str, Any]:
    """The spec's ``design``, ``pair_column`` and ``zero_rule`` (and the layout the pairing
    implies) from the flags; ``values`` are the --value columns given."""
    by_id, by_row = _given(args, "paired_by"), _given(args, "paired")
    group = getattr(args, "group", None)
    if by_id and by_row:
        raise OptionProblem("Give --paired-by COLUMN (a file with a group column) or --paired (one column "
                            "per group, paired row by row), not both.")
    if by_id:
        column = args.paired_by
        if len(values) > 1 and group is None:
            raise OptionProblem(f"--paired-by names the pair ID column of a file with a group column; with "
                                f"{len(values)} --value columns (one per group) the pairs are the rows: "
                                "use --paired instead.")
        if column == group or column in values:
            role = "--group" if column == group else "--value"
            raise OptionProblem(f"--paired-by '{quoted(column)}' is also the {role} column; the pair ID "
                                "needs a column of its own.")
    if by_row and (group is not None or len(values) == 1):
        said = f"--group '{quoted(group)}'" if group is not None else "a single --value column"
        raise OptionProblem(f"--paired pairs the rows of a file with one column per group, not a file "
                            f"with {said}; name the pair ID column with --paired-by.")
    if _given(args, "zero_rule") and not (by_id or by_row):
        raise OptionProblem("--zero-rule applies to paired data; give --paired-by COLUMN or --paired too, "
                            "or leave out --zero-rule.")
    design: dict[str, Any] = {"design": "paired" if by_id or by_row else "independent",
                              "pair_column": args.paired_by if by_id else None}
    if _given(args, "zero_rule"):
        design["zero_rule"] = args.zero_rule
    if by_id:
        design["layout"] = "long"
    elif by_row:
        design["layout"] = "wide"
    return design


# The flags summary statistics cannot honour: pairs need the values of each unit.
_PAIRED_FLAGS = ("paired_by", "paired", "zero_rule")
_MARGIN_FLAGS = ("equivalence_margin", "noninferiority_margin", "worse", "margin_as")


def refuse_with(args: Any, *, summaries: bool) -> None:
    """Refuse the flags that summary statistics or several outcomes cannot honour, in one line
    naming them. Summaries: the paired design (pairs need each unit's values) and a margin given
    as a ratio (judged on the log scale of the values); a margin in units or percent is answered.
    Several outcomes: every margin flag (the outcomes' verdicts and joint intervals are those of a
    difference)."""
    names = _PAIRED_FLAGS if summaries else _MARGIN_FLAGS
    given = [_flag(name) for name in names if _given(args, name)]
    what = "summary statistics" if summaries else "several outcomes"
    if given:
        them = "them" if len(given) > 1 else "it"
        why = (f"leave {them} out: pairs need each unit's two values, which summaries do not give"
               if summaries else f"leave {them} out, or analyse the data file's values themselves")
        raise OptionProblem(f"python -m engine analyze: {', '.join(given)} cannot be used with {what}; {why}.")
    if summaries and getattr(args, "margin_as", None) == "ratio":
        raise OptionProblem("python -m engine analyze: --margin-as ratio cannot be used with summary "
                            "statistics: a ratio margin is judged on the log scale of the values, which "
                            "summaries do not give; give the margin in units or as a percentage (5%).")
