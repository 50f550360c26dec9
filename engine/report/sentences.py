"""The report's sentences: the paragraph of one procedure's result (who was higher, the
estimate with its interval, the test, the verdict at the chosen level, the values left out) and
whether the procedures agree.
"""

from __future__ import annotations

from ..io.screening import EXCLUSION_WORDS
from ..question import Question
from ..rounding import p_clause
from ..procedures.registry import find as _record
from ..side_by_side import PROBABILITY_KEYS, agreement_text, margin_agreement_text
from .margins import (estimate_is_ratio, has_margin, margin_entered, margin_question, margin_size,
                      margin_tests, margin_verdict)
from .numbers import MEDIAN_KEYS, RANK_KEYS, STATISTIC_LABEL, DisplayNumbers, _fixed, _summary_decimals, level_text
from ..wording import sentence_start
from .pairs import EFFECT_SCALE, is_paired, left_out_sentence, n_pairs, paired_opening

__all__ = ["paragraph", "agreement", "question_text", "procedure_followed", "estimate_label", "p_label",
           "effect_level_words",
           "QUESTIONS", "EXCLUSION_WORDS", "STATISTIC_ROW", "DF_ROW", "MC_SE_ROW"]

# The names of the rows of a result, in the report's table and the window's.
STATISTIC_ROW = "Test statistic"
DF_ROW = "Degrees of freedom"
MC_SE_ROW = "Monte Carlo standard error of p"

# The question in the user's words for each kind of engine.question.Question: {a} is group 1, {b} group 2.
QUESTIONS: tuple[tuple[str, str], ...] = (
    ("differ", "Do {a} and {b} differ?"),
    ("lower", "Is {a} lower than {b}?"),
    ("higher", "Is {a} higher than {b}?"),
    ("equivalent", "Are {a} and {b} the same within a margin you set?"),
    ("not_worse", "Is {a} no worse than {b} by more than a margin you set?"),
)


def question_text(alternative, labels: tuple[str, str], analysis=None) -> str:
    """The question asked of the two groups, in words: "Do wax and resin differ?".

    ``alternative``: the procedures' direction, or the :class:`Question` itself; a question
    with a margin is said with it ("Are wax and resin equivalent within ±0.5?"), a percentage
    with its value in units when ``analysis`` (which knows group 2's mean) is given."""
    question = alternative if isinstance(alternative, Question) else Question.from_alternative(alternative)
    if question.has_margin:
        return margin_question(question, labels, margin_size(analysis, question, labels))
    return dict(QUESTIONS)[question.kind].format(a=labels[0], b=labels[1])


def _measure(analysis) -> str:
    """The name of the measured quantity when the source gives a single one, else ""."""
    source = analysis.source or {}
    values = source.get("value_columns") or ()
    if source.get("group_column") and len(values) == 1:
        return str(values[0])
    return ""


def _interval_phrase(numbers: DisplayNumbers, alternative: str, prefix: str = "") -> str:
    if numbers.interval is None:
        return "no confidence interval"
    sided = "one-sided " if alternative != "two-sided" else ""
    return f"{sided}{prefix}{numbers.level} CI {numbers.interval}"


def _group_phrase(summary, key: str, decimals: int | None) -> str:
    if key in RANK_KEYS or key in MEDIAN_KEYS:
        return (f"{summary.label} (median {_fixed(summary.median, decimals)}, quartiles "
                f"{_fixed(summary.q1, decimals)} to {_fixed(summary.q3, decimals)}, n = {summary.n:,})")
    return (f"{summary.label} (mean {_fixed(summary.mean, decimals)}, SD "
            f"{_fixed(summary.sd, decimals)}, n = {summary.n:,})")



def _pair_share(share: float) -> str:
    """A share of pairs as a percentage that never reads as one half unless it is one half."""
    for decimals in range(0, 4):
        text = f"{100 * share:.{decimals}f}"
        if share == 0.5 or float(text) != 50:
            return text + "%"
    return ("just over" if share > 0.5 else "just under") + " 50%"


def _rank_direction(analysis, key: str, a: str, b: str) -> str:
    """Who tended to be higher, from U (the share of pairs in which group 1 is the larger, ties
    counting half), not from the shift estimate: a claim when the test is clear, otherwise a
    description of the samples."""
    result = analysis.procedures[key]
    n1, n2 = analysis.groups.n
    u1 = result.details.get("U1")
    if u1 is None:
        from ..effects import mann_whitney_u1
        u1 = mann_whitney_u1(analysis.groups.x, analysis.groups.y)
    share = u1 / (n1 * n2)
    # the robustness view's rule: the test is clear when p is below 1 - level
    clear = (result.p_value is not None
             and result.p_value < 1 - analysis.spec.level)
    if clear and share != 0.5:
        word = "higher" if share > 0.5 else "lower"
        return f"Values of {a} tended to be {word} than those of {b}"
    if share == 0.5:
        return (f"In these samples, values of {a} were higher than those of {b} in as many "
                "pairs as they were lower")
    return (f"In these samples, values of {a} were higher than those of {b} in "
            f"{_pair_share(share)} of pairs (ties counting half)")


def _direction(analysis, key: str, estimate: float, result_decimals: int | None) -> str:
    """The opening clause: who was higher, in the words of the procedure's quantity."""
    if is_paired(analysis):
        return paired_opening(analysis, estimate, result_decimals, by_signs=key in RANK_KEYS)
    first, second = analysis.summaries
    decimals = _summary_decimals(analysis, result_decimals, key)
    measure = _measure(analysis)
    a, b = _group_phrase(first, key, decimals), _group_phrase(second, key, decimals)
    if key in RANK_KEYS:
        return _rank_direction(analysis, key, a, b)
    quantity = "median" if key in MEDIAN_KEYS else "mean"
    quantity = f"{quantity} {measure}" if measure else quantity
    if estimate > 0:
        return f"The {quantity} of {a} was higher than that of {b}"
    if estimate < 0:
        return f"The {quantity} of {a} was lower than that of {b}"
    return f"The {quantity} of {a} was the same as that of {b}"


def _resampled(key: str) -> str | None:
    """ "permutation" or "bootstrap" when the procedure's p-value or interval comes from
    resampling (its record's ``resampled``), else None."""
    known = _record(key)
    return None if known is None else known.resampled


def _test_phrase(analysis, key: str, result, numbers: DisplayNumbers) -> str:
    """ "Welch t(52.3) = 2.84, p = 0.006" and its kin."""
    alternative = result.alternative
    first, second = analysis.groups.labels
    parts = []
    label = STATISTIC_LABEL.get(key)
    if label and numbers.statistic is not None:
        df = f"({numbers.df})" if numbers.df is not None and key != "z" else ""
        parts.append(f"{label}{df} = {numbers.statistic}")
    if numbers.p is not None:
        sided = "one-sided " if alternative != "two-sided" else ""
        method = "permutation " if _resampled(key) == "permutation" else ""
        p = f"{sided}{method}{p_clause(result.p_value)}"
        if method:
            if numbers.mc_se is not None:
                p += f" (Monte Carlo standard error {numbers.mc_se})"
        parts.append(p)
        if alternative != "two-sided":
            word = "higher" if alternative == "greater" else "lower"
            parts.append(f"testing whether {first} is {word} than {second}")
    elif _resampled(key) == "bootstrap":
        parts.append("the bootstrap gives an interval but no p-value")
    return ", ".join(parts)


def _is_ratio(result) -> bool:
    known = _record(result.key)
    return (known.estimate_kind == "ratio") if known is not None else result.estimate_name.startswith("ratio")


def _direction_words(result, labels: tuple[str, str]) -> str:
    """ "wax minus resin", or "wax over resin" for a ratio."""
    return f"{labels[0]} {'over' if _is_ratio(result) else 'minus'} {labels[1]}"


def estimate_label(result, labels: tuple[str, str]) -> str:
    """The name of a result's estimate with the direction of a difference: "Difference in
    means, wax minus resin", "Ratio of geometric means, wax over resin" (a probability has no
    direction to name)."""
    name = result.estimate_name[:1].upper() + result.estimate_name[1:]
    return name if result.key in PROBABILITY_KEYS else f"{name}, {_direction_words(result, labels)}"


def p_label(alternative: str) -> str:
    """ "p-value", or "One-sided p-value" for a one-sided question."""
    return "p-value" if alternative == "two-sided" else "One-sided p-value"


def procedure_followed(analysis, key: str) -> str:
    """Which procedure the findings follow and whether it is the suggested one:
    "Welch t-test (the suggested procedure)"."""
    suggested = analysis.recommendation
    name = analysis.procedures[key].name if key in analysis.procedures else key
    if key == suggested.key:
        return f"{name} (the suggested procedure)"
    return f"{name} (picked by the user; the suggestion was {suggested.name})"




def _exclusions(analysis) -> str:
    """ "4 values were left out before the comparison (3 blank or marked as missing, 1 not a number)." """
    screening = analysis.screening
    counts = getattr(screening, "excluded_counts", None) if screening is not None else None
    if not counts:
        return ""
    pairs = list(counts.items()) if hasattr(counts, "items") else list(counts)
    pairs = [(EXCLUSION_WORDS.get(str(reason), str(reason).replace("_", " ")), int(n))
             for reason, n in pairs if n]
    if not pairs:
        return ""
    total = sum(n for _, n in pairs)
    detail = ", ".join(f"{n:,} {words}" for words, n in pairs)
    verb = "value was" if total == 1 else "values were"
    return f"{total:,} {verb} left out before the comparison ({detail})."


def _verdict(analysis, key: str, result, numbers: DisplayNumbers) -> str:
    """What the result says at the chosen level, so that a sample difference is not read as a
    finding when the data cannot tell it from chance (and the reverse)."""
    row = next((r for r in analysis.robustness.rows if r.key == key), None)
    known = _record(key)
    question = analysis.spec.question
    answer = question.answer(finds=None if row is None else row.finds_difference,
                             estimate=result.estimate, p_value=result.p_value,
                             no_difference=0.0 if known is None else known.no_difference)
    return question.verdict_words(answer, analysis.groups.labels, numbers.level)


def _difference_sentences(analysis, key: str, result, numbers: DisplayNumbers) -> list[str]:
    """Who was higher, the estimate with its interval and the test; the verdict at the level."""
    opening = _direction(analysis, key, result.estimate, numbers.decimals)
    estimate_name = result.estimate_name
    bootstrap = _resampled(key) == "bootstrap"
    prefix = "bootstrap " if bootstrap else ""
    body = f"{estimate_name} {numbers.estimate}, {_interval_phrase(numbers, result.alternative, prefix)}"
    if bootstrap:
        body += f" ({analysis.spec.resamples:,} resamples)"
    test = _test_phrase(analysis, key, result, numbers)
    sentences = [f"{opening}: {body}" + (f"; {test}." if test else ".")]
    verdict = _verdict(analysis, key, result, numbers)
    if verdict:
        sentences.append(verdict)
    return sentences


def _margin_sentences(analysis, key: str, result, numbers: DisplayNumbers) -> list[str]:
    """The verdict against the margin first, then the estimate, the one-sided tests and the
    margin as it was entered."""
    sentences = [margin_verdict(analysis, key)]
    over = f" over {n_pairs(analysis):,} pairs" if is_paired(analysis) else ""
    estimate = (f"The {result.estimate_name}, {_direction_words(result, analysis.groups.labels)}, "
                f"is {numbers.estimate}{over}")
    if _resampled(key) == "bootstrap":
        estimate += f" ({analysis.spec.resamples:,} bootstrap resamples)"
    sentences.append(estimate + ".")
    tests = margin_tests(analysis, key)
    if tests:
        sentences.append(tests)
    sentences.append(f"Margin as entered: {margin_entered(analysis, key)}.")
    return sentences


def effect_level_words(analysis, result, numbers: DisplayNumbers) -> str:
    """The level of the effect size's interval, "one-sided 95%" or "95%": the effect sizes
    follow the question's direction and level (a margin question's result may not)."""
    alternative = analysis.spec.question.alternative if has_margin(analysis) else result.alternative
    sided = "one-sided " if alternative != "two-sided" else ""
    return f"{sided}{numbers.effect_level or numbers.level}"


def _effect_sentence(analysis, result, numbers: DisplayNumbers) -> str:
    if numbers.effect is None:
        return ""
    effect = f"{numbers.effect_name} = {numbers.effect}"
    if numbers.effect_interval is not None:
        effect += f", {effect_level_words(analysis, result, numbers)} CI {numbers.effect_interval}"
    if numbers.effect_key in EFFECT_SCALE:
        effect += f" ({EFFECT_SCALE[numbers.effect_key]})"
    return sentence_start(effect) + "."


def paragraph(analysis, key: str, result, numbers: DisplayNumbers) -> str:
    """The findings of one procedure in one paragraph: for a question with a margin its verdict
    against the margin first; for a difference who was higher, the estimate, the test and the
    verdict; then the effect size, the procedure's warnings, what was left out and whether the
    procedure is the suggested one."""
    if has_margin(analysis):
        sentences = _margin_sentences(analysis, key, result, numbers)
    else:
        sentences = _difference_sentences(analysis, key, result, numbers)
    effect = _effect_sentence(analysis, result, numbers)
    if effect:
        sentences.append(effect)
    sentences.extend(w if w.endswith(".") else w + "." for w in result.warnings)
    # in a paired design a cell left out takes its pair with it: the pairs say it all
    for left_out in ((left_out_sentence(analysis),) if is_paired(analysis) else (_exclusions(analysis),)):
        if left_out:
            sentences.append(left_out)
    recommended = analysis.recommendation.key
    if key != recommended:
        sentences.append(f"This report uses the {result.name}; the procedure suggested for these "
                         f"data was the {analysis.recommendation.name}.")
    return " ".join(sentences)



def agreement(analysis) -> str:
    """Whether every applicable procedure gives the same answer, in one to three sentences."""
    robustness = analysis.robustness
    if has_margin(analysis):
        return margin_agreement_text(robustness, analysis.spec.question, analysis.groups.labels,
                                     margin_size(analysis))
    return agreement_text(robustness, analysis.spec.alternative, analysis.groups.labels,
                          level_text(robustness.level))
