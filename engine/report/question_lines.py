"""The design and a margin question in lines of the command's plain text: how the pairs were
formed and what the pairing left out; the margin, how it was entered, and the verdict of the
reported procedure against it (:meth:`engine.question.Question.margin_words`)."""

from __future__ import annotations

from ..wording import plural
from .margins import margin_entered
from .numbers import level_text
from .sentences import question_text

__all__ = ["setup_lines", "design_lines", "margin_lines", "PROBLEMS_SHOWN"]

PROBLEMS_SHOWN = 10  # items left out of the pairs listed one by one; the rest are counted


def design_lines(analysis) -> list[str]:
    """The design, and for paired data the pairs formed and every ID or row left out."""
    if analysis.spec.design != "paired":
        return ["Design: two independent groups."]
    pairs = analysis.pairs
    column = analysis.spec.pair_column
    how = f"by the pair ID column '{column}'" if column is not None else "row by row"
    if pairs is None:
        return [f"Design: paired, {plural(int(analysis.groups.n[0]), 'pair')} {how}."]
    left = len(pairs.problems)
    # the items the screening's lines above do not already name, each once
    said = " ".join(finding.text for finding in getattr(analysis.screening, "findings", ()))
    unsaid = [problem for problem in pairs.problems if problem.text not in said]
    if not left:
        return [f"Design: paired, {plural(pairs.n_pairs, 'pair')} formed {how}; nothing left out."]
    where = "" if unsaid else " (listed above)"
    lines = [f"Design: paired, {plural(pairs.n_pairs, 'pair')} formed {how}; {left} left out{where}"
             + (":" if unsaid else ".")]
    lines += [f"  [left out] {problem.text}" for problem in unsaid[:PROBLEMS_SHOWN]]
    if len(unsaid) > PROBLEMS_SHOWN:
        lines.append(f"  and {len(unsaid) - PROBLEMS_SHOWN} more (the --json output's 'pairs' lists every one).")
    return lines


def margin_lines(analysis, procedure: str | None) -> list[str]:
    """For a margin question: the question, the margin and how it was entered, and the verdict of
    ``procedure`` against the margin; nothing for a question without a margin."""
    from ..jsonout import margin_answers

    question = analysis.spec.question
    if not question.has_margin:
        return []
    first, second = analysis.groups.labels
    alpha = level_text(question.alpha)
    kind = "equivalence" if question.kind == "equivalent" else "non-inferiority"
    # the question and the margin in the words every report uses (engine.report.margins)
    lines = [f"Question: {question_text(question, (first, second), analysis)} ({kind}, at the {alpha} level)",
             f"Margin as entered: {margin_entered(analysis, procedure)}."]
    answers = margin_answers(analysis)
    if procedure in answers:
        result = analysis.procedures[procedure]
        lines.append(f"Verdict by {result.name}: "
                     + question.margin_words(answers[procedure], (first, second), result.estimate_name))
    else:
        lines.append("Verdict: no procedure gave an interval to set against the margin (the notes say why).")
    return lines


def setup_lines(analysis, procedure: str | None) -> list[str]:
    """:func:`design_lines` and :func:`margin_lines`, then a blank line."""
    return design_lines(analysis) + margin_lines(analysis, procedure) + [""]
