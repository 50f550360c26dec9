"""Every applicable procedure side by side: the table of estimates, intervals and p-values, the
sentence on whether they agree, and what to say when a one-sided question was asked against the
direction of the data.

GUI-free. The numbers in the table are written by ``engine.report`` (passed in as
``numbers_for``), so that each row reads exactly as that procedure's own report.
"""

from __future__ import annotations

from typing import Callable

from .procedures.registry import RECORDS, find
from .question import Question
from .rounding import entered_decimals, fixed, format_p, level_text
from .wording import capital, name_list, plural

__all__ = ["PROBABILITY_KEYS", "against_question", "reverse_is_clear", "question_claim", "row_reading",
           "agreement_text", "against_sentence", "procedure_table", "NO_INTERVAL_WHY", "NO_P_VALUE_WHY",
           "margin_claim", "margin_agreement_text", "alpha_number", "margin_table", "NO_MARGIN_P_VALUE_WHY"]

# Why a procedure gives a p-value but no interval, for the rows that have none.
NO_INTERVAL_WHY = {
    "permutation_median": ("The permutation test of medians gives a p-value but no interval: "
                           "turning it into an interval would take the two groups to have the "
                           "same shape and spread; the bootstrap interval of medians gives one."),
}
_NO_INTERVAL_DEFAULT = "This procedure gives a p-value but no interval."
# Why the bootstrap rows have no p-value, and how they are read without one.
NO_P_VALUE_WHY = ("A bootstrap gives an interval but no p-value; its row reads as finding a "
                  "difference when the interval leaves out zero.")
# The same for a question with a margin.
NO_MARGIN_P_VALUE_WHY = ("A row without a p-value reads from its interval alone: inside the margin, "
                         "or past its worse end, as for the rows with tests.")


# Procedures whose estimate is a probability (of a value of group 1 being the larger), centred
# on 1/2 when the groups do not differ, where the others estimate a difference centred on 0
# (their records' ``estimate_kind`` and ``no_difference``).
PROBABILITY_KEYS = tuple(r.key for r in RECORDS if r.estimate_kind == "probability")


def _question(alternative: str, level: float = 0.95) -> Question:
    return Question.from_alternative(alternative, level)


def _no_difference(key: str | None) -> float:
    known = None if key is None else find(key)
    return 0.0 if known is None else known.no_difference


def against_question(alternative: str, estimate: float | None, key: str | None = None) -> bool:
    """Whether a one-sided question points the other way from an estimate (group 1 minus
    group 2, or for ``PROBABILITY_KEYS`` the chance that group 1's value is the larger):
    "is group 1 higher?" with group 1 lower in the data, or the reverse
    (:meth:`engine.question.Question.points_other_way`)."""
    return _question(alternative).points_other_way(estimate, _no_difference(key))


def reverse_is_clear(p_value: float | None, level: float) -> bool:
    """Whether the one-sided question in the other direction would have been clear at the
    same level (:meth:`engine.question.Question.other_way_clear`)."""
    return Question(level=level).other_way_clear(p_value)


def question_claim(alternative: str, labels: tuple[str, str]) -> str:
    """What the question looks for: "a difference between the groups" or "A being lower than B"."""
    return _question(alternative).claim(labels)


def against_sentence(alternative: str, labels: tuple[str, str], clear: bool) -> str:
    """The sentences for a one-sided question asked against the direction of the data."""
    return _question(alternative).other_way_words(labels, clear)


def _other(alternative: str) -> str:
    return "lower" if alternative == "greater" else "higher"


def row_reading(row, alternative: str, labels: tuple[str, str]) -> str:
    """The verdict of one side-by-side row in a few words (:meth:`Question.reading`)."""
    question = _question(alternative)
    answer = question.answer(finds=row.finds_difference, estimate=row.estimate,
                             no_difference=_no_difference(row.key))
    return question.reading(answer, labels)


def agreement_text(robustness, alternative: str, labels: tuple[str, str], level_text: str) -> str:
    """One sentence (or three) on whether the procedures agree at the chosen level.

    A one-sided question that none of them answers while the data point the other way is said
    so, never read as "no difference".
    """
    return _counted(robustness, "No procedure gave an interval or a p-value.",
                    lambda rows: _agreement(robustness, rows, alternative, labels, level_text))


def _counted(robustness, nothing: str, say: Callable) -> str:
    """``say(rows)`` of the rows that count, followed by the names of those that do not;
    ``nothing`` when there are no rows at all."""
    if not robustness.rows:
        return nothing
    rows = _voting(robustness)
    aside = [capital(row.name) for row in robustness.rows if row not in rows]
    note = (f" Not counted: {'; '.join(aside)} (the notes under the table say why)." if aside else "")
    if not rows:
        return "No procedure gave a test that holds for these data." + note
    return say(rows) + note


def _voting(robustness) -> tuple:
    """The rows that count towards whether the procedures agree."""
    return tuple(getattr(robustness, "voting", robustness.rows))


def _agreement(robustness, rows, alternative: str, labels: tuple[str, str], level_text: str) -> str:
    count = plural(len(rows), "procedure")
    finding = [row.name for row in rows if row.finds_difference]
    claim = question_claim(alternative, labels)
    if not finding and alternative != "two-sided":
        other = [row for row in rows if against_question(alternative, row.estimate, row.key)]
        if other:
            every = "every one of them puts" if len(other) == len(rows) else f"{len(other)} of them put"
            return (f"None of the {count} finds clear evidence of {claim}, the direction asked "
                    f"about, at the {level_text} level; {every} {labels[0]} "
                    f"{_other(alternative)} than {labels[1]}, the other way. A one-sided question "
                    "cannot find that direction: to look for a difference either way, the "
                    "two-sided question has to be chosen before the data are seen.")
    if len(rows) == 1:  # one procedure cannot agree or disagree with itself
        if finding:
            verdict = "finds a difference" if alternative == "two-sided" else f"finds clear evidence of {claim}"
        else:
            verdict = ("finds no clear difference" if alternative == "two-sided"
                       else f"finds no clear evidence of {claim}")
        return f"At the {level_text} level the {rows[0].name} {verdict}."
    if robustness.agree:
        if finding:
            verdict = ("all find a difference" if alternative == "two-sided"
                       else f"all find clear evidence of {claim}")
        else:
            verdict = ("none finds a clear difference" if alternative == "two-sided"
                       else f"none finds clear evidence of {claim}")
        return f"The {count} agree at the {level_text} level: {verdict}."
    others = [row.name for row in rows if not row.finds_difference]
    found = "A difference is found" if alternative == "two-sided" else f"Clear evidence of {claim} is found"
    return (f"The procedures disagree at the {level_text} level. {found} by "
            f"{name_list(finding)}. It is not found by {name_list(others)}. The answer depends "
            "on the procedure, so lean on the size of the difference and its interval.")


def _each(because: str) -> str:
    """A reason written for one procedure ("It gives ...") said of several ("Each gives ...")."""
    return "Each" + because[2:] if because.startswith("It ") else because


def procedure_table(robustness, alternative: str, labels: tuple[str, str], level_text: str,
                    numbers_for: Callable) -> tuple[list[str], list[list[str]], list[str]]:
    """The side-by-side table: a heading row, one row per procedure, and notes under it.

    ``numbers_for(key)`` gives the procedure's :class:`engine.report.DisplayNumbers`. Columns:
    the procedure (with what it estimates, where its name does not say), the estimate (labelled
    with the direction of the difference), its interval, the p-value and the reading at the chosen level. A row without an
    interval or a p-value says "none", and why in a note under the table.
    """
    sided = "one-sided " if alternative != "two-sided" else ""
    head = ["Procedure", f"Estimate, {labels[0]} minus {labels[1]}",
            f"{sided}{level_text} interval".capitalize(), "p-value" if not sided else "One-sided p-value",
            f"At {level_text}"]
    body, notes = [], []
    aside: dict[str, list[str]] = {}  # why some rows are not counted -> their names
    for row in robustness.rows:
        numbers = numbers_for(row.key)
        if numbers.interval is None:
            interval = "none"
            notes.append(NO_INTERVAL_WHY.get(row.key, _NO_INTERVAL_DEFAULT))
        else:
            interval = numbers.interval
        if row.p_value is None:
            p = "none"
            notes.append(NO_P_VALUE_WHY)
        else:
            p = format_p(row.p_value)
        name = capital(row.name)
        if row.estimate_name.lower() not in row.name.lower() and row.key not in PROBABILITY_KEYS:  # what it estimates, if not named
            name += f" ({row.estimate_name})"
        reading = row_reading(row, alternative, labels)
        if not getattr(row, "votes", True):
            reading += " (not counted)"
            aside.setdefault(row.not_voting_because, []).append(capital(row.name))
        body.append([name, numbers.estimate, interval, p, reading])
    notes += [f"Not counted in whether the procedures agree: {'; '.join(names)}. "
              + (because if len(names) == 1 else _each(because))
              for because, names in aside.items()]
    return head, body, notes


# -- a question with a margin ---------------------------------------------------------------------

def alpha_number(question) -> str:
    """The question's alpha as a number to compare a p-value with: "0.05"."""
    return fixed(question.alpha, entered_decimals([question.alpha]))


def margin_claim(question, labels: tuple[str, str], size: str) -> str:
    """What a margin question looks for: "the groups equivalent within ±0.5", "new not worse
    than old by more than 0.5"."""
    if question.kind == "equivalent":
        return f"the groups equivalent within {size}"
    return f"{labels[0]} not worse than {labels[1]} by more than {size}"


def margin_agreement_text(robustness, question, labels: tuple[str, str], size: str) -> str:
    """Whether the procedures of a margin question give the same verdict against the margin,
    at the question's level (its alpha), in one to three sentences."""
    return _counted(robustness, "No procedure gave an interval to set against the margin.",
                    lambda rows: _margin_agreement(robustness, rows, question, labels, size))


def _margin_agreement(robustness, rows, question, labels: tuple[str, str], size: str) -> str:
    count, alpha = plural(len(rows), "procedure"), level_text(question.alpha)
    claim = margin_claim(question, labels, size)
    showing = [row.name for row in rows if row.finds_difference]
    if len(rows) == 1:  # a name may be plural ("two one-sided tests"): the verdict is said of the claim
        first, second = labels
        shown = "shown" if showing else "not shown"
        said = (f"the groups are {shown} to be equivalent within {size}" if question.kind == "equivalent"
                else f"{first} is {shown} to be not worse than {second} by more than {size}")
        return f"By the {rows[0].name}, {said} at the {alpha} level."
    if robustness.agree:
        verdict = f"each shows {claim}" if showing else f"none shows {claim}"
        return f"The {count} agree at the {alpha} level: {verdict}."
    others = [row.name for row in rows if not row.finds_difference]
    return (f"The procedures disagree at the {alpha} level. {capital(claim)} is shown by "
            f"{name_list(showing)}; it is not shown by {name_list(others)}. The answer depends on "
            "the procedure, so read each interval against the margin.")


def margin_table(robustness, question, labels: tuple[str, str], numbers_for: Callable,
                 result_for: Callable, answer_for: Callable, ratio: bool = False
                 ) -> tuple[list[str], list[list[str]], list[str]]:
    """The side-by-side table of a margin question: a heading row, one row per procedure, and
    notes under it.

    Columns: the procedure, the estimate, its two-sided (1 - 2 alpha) interval (the one set
    against the margin), the margin in the estimate's units, the one-sided p-values (the two of
    an equivalence test, lower end first; the one of a non-inferiority test) and the reading
    against the margin. ``numbers_for(key)``: the procedure's ``DisplayNumbers``;
    ``result_for(key)``: its ``ProcedureResult``; ``answer_for(key)``: its ``MarginAnswer``.
    ``ratio``: the estimates are ratios, group 1 over group 2.
    """
    alpha = level_text(question.alpha)
    narrow = level_text(1 - 2 * question.alpha)
    equivalence = question.kind == "equivalent"
    direction = f"{labels[0]} over {labels[1]}" if ratio else f"{labels[0]} minus {labels[1]}"
    head = ["Procedure", f"Estimate, {direction}", f"{narrow} interval", "Margin",
            "One-sided p-values, lower end; upper end" if equivalence else "One-sided p-value",
            f"At the {alpha} level"]
    body, notes = [], []
    aside: dict[str, list[str]] = {}
    for row in robustness.rows:
        numbers, result, answer = numbers_for(row.key), result_for(row.key), answer_for(row.key)
        margin = answer.margin
        if equivalence:
            margin_cell = f"{fixed(margin.low, numbers.decimals)} to {fixed(margin.high, numbers.decimals)}"
        else:
            margin_cell = f"{fixed(margin.bound, numbers.decimals)} ({margin.worse} is worse)"
        p_lower, p_upper = result.details.get("p_lower"), result.details.get("p_upper")
        if row.p_value is None:
            p = "none"
            notes.append(NO_MARGIN_P_VALUE_WHY)
        elif equivalence and p_lower is not None and p_upper is not None:
            p = f"{format_p(p_lower)}; {format_p(p_upper)}"
        else:
            p = format_p(row.p_value)
        name = capital(row.name)
        if row.estimate_name.lower() not in row.name.lower():
            name += f", {row.estimate_name}"
        reading = question.margin_reading(answer)
        if not getattr(row, "votes", True):
            reading += " (not counted)"
            aside.setdefault(row.not_voting_because, []).append(capital(row.name))
        body.append([name, numbers.estimate, numbers.interval or "none", margin_cell, p, reading])
    rule = (f"Each interval is the two-sided {narrow} one (1 - 2 × {alpha}). "
            + (f"The groups are shown equivalent at the {alpha} level when it lies inside the margin, "
               f"as when both one-sided p-values are below {alpha_number(question)}."
               if equivalence else
               f"Non-inferiority is shown at the {alpha} level when it lies wholly on the better "
               f"side of the margin, as when the one-sided p-value is below {alpha_number(question)}."))
    notes.insert(0, rule)
    notes += [f"Not counted in whether the procedures agree: {'; '.join(names)}. "
              + (because if len(names) == 1 else _each(because))
              for because, names in aside.items()]
    return head, body, notes
