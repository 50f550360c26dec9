"""The report's words for a question with a margin (are the groups equivalent within it; is
group 1 not worse than group 2 by more than it): the verdict of a procedure against the margin,
the one-sided tests behind it, the margin as the user entered it, the question in words, and
the paragraph that follows a "differ" question answered "no clear evidence".

The verdict sentences themselves are the question's (:meth:`engine.question.Question.margin_words`);
this module places them and says the rest.
"""

from __future__ import annotations

import math

from ..side_by_side import alpha_number
from ..rounding import entered_decimals, fixed, p_clause, shared_decimals
from .numbers import _numbers, _summary_decimals, level_text, margin_decimals

__all__ = ["has_margin", "margin_size", "margin_entered", "margin_verdict", "margin_tests",
           "margin_decimals", "margin_question", "sameness_paragraph", "estimate_is_ratio"]


def has_margin(analysis) -> bool:
    """Whether the analysis answers a question with a margin (its procedures are margin ones)."""
    return getattr(analysis, "margin", None) is not None


def estimate_is_ratio(analysis) -> bool:
    """Whether the estimates are ratios (group 1 over group 2), as for a margin given as a ratio."""
    return has_margin(analysis) and analysis.margin.unit == "ratio"


def _question(analysis):
    return analysis.spec.question


def margin_size(analysis, question=None, labels: tuple[str, str] | None = None) -> str:
    """The margin as the verdict names it, its numbers as entered: "±0.5", "-0.4 to 0.7", "a
    ratio of 0.8 to 1.25", "±0.42 (±5% of old's mean)". Without an analysis (``question`` and
    ``labels`` given) a percentage is said as a percentage alone: "±5% of old's mean"."""
    if analysis is not None:
        question, labels, margin = _question(analysis), analysis.groups.labels, analysis.margin
    else:
        margin = question.margin
        if margin.unit == "percent":
            return f"{_percent_span(question)} of {labels[1]}'s mean"
    if question.margin.unit == "percent":  # converted: written as the verdict writes it
        decimals = _converted_decimals(analysis, None)
    else:
        decimals = entered_decimals([margin.low, margin.high])
    return question.margin_text(margin, labels, decimals)


def _percent_span(question) -> str:
    """A percentage margin as entered, each number with its sign: "±5%", "-2% to 3%", "4%"."""
    margin = question.margin
    if question.kind == "not_worse":
        (size,) = _entered(abs(margin.bound))
        return f"{size}%"
    low, high = _entered(margin.low, margin.high)
    if margin.symmetric:
        return f"±{high}%"
    return f"{low}% to {high}%"


def _converted_decimals(analysis, key: str | None) -> int | None:
    """Decimals for a percentage margin converted to units: those of the verdict of procedure
    ``key`` (default: the suggested one), so that the margin reads alike in every sentence."""
    answer = analysis.margin_answer(key or analysis.recommendation.key)
    if answer is not None:
        return margin_decimals(answer)
    return shared_decimals([analysis.margin.low, analysis.margin.high])


def _group2_mean(analysis, key: str | None) -> str:
    """Group 2's mean as the table of the groups shows it in the report of procedure ``key``."""
    result = analysis.procedures.get(key) if key is not None else None
    decimals = _numbers(analysis, key, result).decimals if result is not None else None
    return fixed(analysis.summaries[1].mean, _summary_decimals(analysis, decimals, key))


def _entered(*values: float) -> list[str]:
    decimals = entered_decimals(values)
    return [fixed(v, decimals) for v in values]


def margin_entered(analysis, key: str | None = None) -> str:
    """The margin as the user entered it, with its value in the measurement's units where it was
    a percentage: "-0.5 to 0.5 in the measurement's units", "-5% to 5% of old's mean (8.40), that
    is -0.42 to 0.42 in the measurement's units", "0.8 to 1.25 as a ratio of new's geometric
    mean to old's"; for a non-inferiority question the size on the worse side and which
    direction is worse. ``key``: the procedure whose report it is in (group 2's mean is then
    written as that report's table of the groups writes it)."""
    question = _question(analysis)
    given, units = question.margin, analysis.margin
    first, second = analysis.groups.labels
    ratio = f"as a ratio of {first}'s geometric mean to {second}'s"
    if question.kind == "not_worse":
        worse = f"{given.worse} values are worse"
        if given.unit == "ratio":
            (bound,) = _entered(given.bound)
            return f"{bound} {ratio}; {worse}"
        size = abs(given.bound)
        if given.unit == "units":
            (text,) = _entered(size)
            return f"{text} in the measurement's units; {worse}"
        (text,) = _entered(size)
        converted = abs(units.bound)
        shown = fixed(converted, _converted_decimals(analysis, key))
        return (f"{text}% of {second}'s mean ({_group2_mean(analysis, key)}), that is {shown} in the "
                f"measurement's units; {worse}")
    low, high = _entered(given.low, given.high)
    if given.unit == "ratio":
        return f"{low} to {high} {ratio}"
    if given.unit == "units":
        return f"{low} to {high} in the measurement's units"
    decimals = _converted_decimals(analysis, key)
    return (f"{low}% to {high}% of {second}'s mean ({_group2_mean(analysis, key)}), that is "
            f"{fixed(units.low, decimals)} to {fixed(units.high, decimals)} in the measurement's units")


def margin_verdict(analysis, key: str) -> str:
    """The verdict of procedure ``key`` against the margin, in the question's sentences
    ("Equivalent within ±0.5 at the 5% level: the 90% confidence interval ... lies inside the
    margin ..."), or why it gives none."""
    result = analysis.procedures[key]
    answer = analysis.margin_answer(key)
    if answer is None:
        return (f"The {result.name} gave no interval to set against the margin, so it does not "
                "answer the question.")
    return _question(analysis).margin_words(answer, analysis.groups.labels, result.estimate_name)


def margin_tests(analysis, key: str) -> str:
    """The one-sided tests behind the verdict and what the verdict needs of them, or that the
    procedure gives no p-value and the verdict rests on its interval."""
    question, result = _question(analysis), analysis.procedures[key]
    answer = analysis.margin_answer(key)
    alpha, below = level_text(question.alpha), alpha_number(question)
    details = result.details
    if result.p_value is None or answer is None:
        if answer is None:
            return ""
        return "This procedure gives no p-value; the verdict rests on its interval against the margin."
    decimals = margin_decimals(answer)
    margin = answer.margin
    if question.kind == "equivalent":
        p_lower, p_upper = details.get("p_lower"), details.get("p_upper")
        if p_lower is None or p_upper is None:
            return (f"The two one-sided tests give {p_clause(result.p_value)} (the larger of their "
                    f"p-values); equivalence at the {alpha} level needs it below {below}.")
        return (f"The one-sided tests give {p_clause(p_lower)} against the lower end of the margin, "
                f"{fixed(margin.low, decimals)}, and {p_clause(p_upper)} against the upper end, "
                f"{fixed(margin.high, decimals)}; equivalence at the {alpha} level needs both below {below}.")
    return (f"The one-sided test against the margin, {fixed(margin.bound, decimals)}, gives "
            f"{p_clause(result.p_value)}; non-inferiority at the {alpha} level needs it below {below}.")


def margin_question(question, labels: tuple[str, str], size: str) -> str:
    """The question in the user's words: "Are new and old equivalent within ±0.5?", "Is new not
    worse than old by more than 0.5, where lower values are worse?"."""
    first, second = labels
    if question.kind == "equivalent":
        return f"Are {first} and {second} equivalent within {size}?"
    return (f"Is {first} not worse than {second} by more than {size}, where {question.margin.worse} "
            "values are worse?")


def sameness_paragraph(analysis, key: str, numbers) -> str:
    """After a "differ" question the data do not answer with "yes": a short paragraph saying
    that a difference not shown is not sameness, and how to show sameness (the equivalence
    question, with a margin from the subject matter, not from these data). "" otherwise."""
    question = _question(analysis)
    if question.kind != "differ" or has_margin(analysis):
        return ""
    row = next((r for r in analysis.robustness.rows if r.key == key), None)
    if row is None or row.finds_difference:
        return ""
    result = analysis.procedures[key]
    room = ""
    if numbers.interval is not None and result.interval is not None and all(
            end is not None and math.isfinite(end) for end in (result.interval.low, result.interval.high)):
        room = (f" the {numbers.level} interval of the {result.estimate_name}, {numbers.interval}, "
                "still leaves room for differences that may matter.")
    else:
        room = " the data leave room for differences that may matter."
    first, second = analysis.groups.labels
    return (f"A difference that is not shown is not sameness:{room} To show that {first} and {second} are "
            "the same within a margin that matters, ask whether they are equivalent, with a margin "
            "taken from the subject matter (the largest difference that would make no practical "
            "difference), not from these data: a margin chosen after seeing them can be made to pass.")
