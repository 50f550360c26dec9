"""The design and a margin question in lines of the command's plain text, above the findings and
saying only what they do not: two independent groups, or what the pairing left out that the
screening did not name; the question asked (the findings open with the verdict against the
margin and say how the margin was entered)."""

from __future__ import annotations

from .numbers import level_text
from .sentences import question_text

__all__ = ["setup_lines", "design_lines", "margin_lines", "PROBLEMS_SHOWN"]

PROBLEMS_SHOWN = 10  # items left out of the pairs listed one by one; the rest are counted


def design_lines(analysis) -> list[str]:
    """The design where the findings below do not say it: "two independent groups"; for paired
    data (whose findings give the design, the pairs and how many were left out) only the IDs or
    rows left out that the screening's lines above do not already name, each once."""
    if analysis.spec.design != "paired":
        return ["Design: two independent groups."]
    pairs = analysis.pairs
    if pairs is None:
        return []
    said = " ".join(finding.text for finding in getattr(analysis.screening, "findings", ()))
    unsaid = [problem for problem in pairs.problems if problem.text not in said]
    lines = [f"  [left out] {problem.text}" for problem in unsaid[:PROBLEMS_SHOWN]]
    if len(unsaid) > PROBLEMS_SHOWN:
        lines.append(f"  and {len(unsaid) - PROBLEMS_SHOWN} more (the --json output's 'pairs' lists every one).")
    return lines


def margin_lines(analysis, procedure: str | None) -> list[str]:
    """For a margin question: the question (the findings below open with the verdict of
    ``procedure`` against the margin and say how the margin was entered), and a line when no
    procedure gave a verdict; nothing for a question without a margin."""
    from ..jsonout import margin_answers

    question = analysis.spec.question
    if not question.has_margin:
        return []
    alpha = level_text(question.alpha)
    kind = "equivalence" if question.kind == "equivalent" else "non-inferiority"
    # the question in the words every report uses (engine.report.sentences)
    lines = [f"Question: {question_text(question, analysis.groups.labels, analysis)} "
             f"({kind}, at the {alpha} level)"]
    if procedure not in margin_answers(analysis):
        lines.append("Verdict: no procedure gave an interval to set against the margin (the notes say why).")
    return lines


def setup_lines(analysis, procedure: str | None) -> list[str]:
    """:func:`design_lines` and :func:`margin_lines`, then a blank line (none when both are
    empty)."""
    lines = design_lines(analysis) + margin_lines(analysis, procedure)
    return lines + [""] if lines else []
