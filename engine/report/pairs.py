"""The report's words for a paired design: how the pairs were formed and how many, what the
pairing left out and why, the pair differences (their summary, their checks, who was higher in
how many pairs), and the two standardised sizes of paired data, labelled so that d_z is never
read as d_av.
"""

from __future__ import annotations

import numpy as np

from ..io.pairs import PAIR_PROBLEMS
from ..rounding import fixed, shared_decimals
from ..summary import summarize
from ..wording import GLOSSES, gloss_line, plural, sentence_start
from .numbers import EFFECT_DECIMALS, _effect_decimals, format_interval, level_text

__all__ = ["is_paired", "n_pairs", "design_text", "left_out_sentence", "left_out_items",
           "difference_summary", "difference_row", "with_differences", "paired_opening", "check_blocks", "effect_blocks",
           "EFFECT_SCALE", "PAIRED_EFFECTS", "DIFFERENCES_CHECKS_HEADING", "LEFT_OUT_HEADING"]

# The paired effect sizes, in the order the report lists them.
PAIRED_EFFECTS = ("paired_d_z", "paired_d_av")
# What each paired effect size is standardised by, said wherever its value is written.
EFFECT_SCALE = {
    "paired_d_z": "standardised by the SD of the pair differences",
    "paired_d_av": "standardised by the average SD of the two groups",
}
_GLOSS_OF = {"paired_d_z": "d_z", "paired_d_av": "d_av"}
DIFFERENCES_CHECKS_HEADING = "Checks on the pair differences"
LEFT_OUT_HEADING = "Pairs left out"


def is_paired(analysis) -> bool:
    """Whether the analysis compares matched pairs."""
    return getattr(analysis.spec, "design", "independent") == "paired"


def _differences(analysis) -> np.ndarray:
    checks = getattr(analysis, "paired", None)
    if checks is not None:
        return np.asarray(checks.differences, dtype=float)
    with np.errstate(all="ignore"):
        return np.asarray(analysis.groups.x, dtype=float) - np.asarray(analysis.groups.y, dtype=float)


def n_pairs(analysis) -> int:
    checks = getattr(analysis, "paired", None)
    return int(checks.n_pairs) if checks is not None else int(analysis.groups.n[0])


def design_text(analysis) -> str:
    """The design in a few words: "two independent groups", "paired: 12 pairs, matched by ID
    column 'part'", "paired: 12 pairs, row by row"."""
    if not is_paired(analysis):
        return "two independent groups"
    pairs = plural(n_pairs(analysis), "pair")
    column = getattr(analysis.spec, "pair_column", None)
    if column:
        return f"paired: {pairs}, matched by ID column '{column}'"
    if getattr(analysis, "pairs", None) is not None or analysis.spec.source is not None:
        return f"paired: {pairs}, row by row"
    return f"paired: {pairs}, value by value in the order given"


def _problems(analysis) -> tuple:
    intake = getattr(analysis, "pairs", None)
    return tuple(getattr(intake, "problems", ())) if intake is not None else ()


def left_out_sentence(analysis) -> str:
    """ "3 IDs or rows were left out of the pairs (ID in one group only: 2; pair with one value
    blank: 1)." ("" when none was)."""
    problems = _problems(analysis)
    if not problems:
        return ""
    counts: dict[str, int] = {}
    for problem in problems:
        counts[problem.kind] = counts.get(problem.kind, 0) + 1
    detail = "; ".join(f"{PAIR_PROBLEMS.get(kind, kind.replace('_', ' '))}: {n:,}" for kind, n in counts.items())
    total = len(problems)
    verb = plural(total, "was", number=False)
    return f"{plural(total, 'ID or row', 'IDs or rows')} {verb} left out of the pairs ({detail})."


def left_out_items(analysis) -> list[str]:
    """Each ID or row the pairing left out, with its file rows and what was done with it."""
    return [problem.text for problem in _problems(analysis)]


def difference_summary(analysis):
    """The summary of the pair differences (a ``GroupSummary``): the paired checks' own, else
    worked out from the groups."""
    checks = getattr(analysis, "paired", None)
    if checks is not None and getattr(checks, "summary", None) is not None:
        return checks.summary
    return summarize("differences", _differences(analysis))


def with_differences(analysis, decimals: int | None) -> int | None:
    """Decimals for the table of the groups that show the pair differences too (they are often
    much smaller than the values themselves)."""
    s = difference_summary(analysis)
    own = shared_decimals([s.mean, s.sd, s.median, s.q1, s.q3])
    if own is None or decimals is None:  # scientific notation for either: for all
        return None
    return max(own, decimals)


def difference_row(analysis, decimals: int | None) -> list[str]:
    """The row of the pair differences in the table of the groups."""
    first, second = analysis.groups.labels
    s = difference_summary(analysis)
    return [f"Differences, {first} minus {second}", f"{s.n:,}", fixed(s.mean, decimals), fixed(s.sd, decimals),
            fixed(s.median, decimals), f"{fixed(s.q1, decimals)} to {fixed(s.q3, decimals)}",
            f"{fixed(s.min, decimals)} to {fixed(s.max, decimals)}"]


def paired_opening(analysis, estimate: float, decimals: int | None, *, by_signs: bool) -> str:
    """The opening clause of a paired result: who was higher, over how many pairs.

    ``by_signs`` (rank procedures): in how many pairs each group was the higher, with the median
    difference; otherwise on average, with the SD of the differences."""
    first, second = analysis.groups.labels
    d = _differences(analysis)
    d = d[np.isfinite(d)]
    pairs = plural(d.size, "pair")
    s = difference_summary(analysis)
    if by_signs:
        higher, lower = int(np.count_nonzero(d > 0)), int(np.count_nonzero(d < 0))
        equal = d.size - higher - lower
        places = shared_decimals([s.median, estimate]) if decimals is None else decimals
        tail = f" and equal in {equal:,}" if equal else ""
        return (f"Of {pairs}, {first} was higher than {second} in {higher:,}, lower in {lower:,}{tail} "
                f"(median of the pair differences {fixed(s.median, places)})")
    places = decimals if decimals is not None else shared_decimals([s.sd, estimate])
    spread = f"SD of the pair differences {fixed(s.sd, places)}"
    if estimate > 0:
        return f"In {pairs}, {first} was higher than {second} on average ({spread})"
    if estimate < 0:
        return f"In {pairs}, {first} was lower than {second} on average ({spread})"
    return f"In {pairs}, {first} and {second} were the same on average ({spread})"


def check_blocks(analysis, notes: list[str]) -> list[tuple]:
    """The checks on the pair differences (their shape, values apart, zeros, how closely the two
    values of a pair go together: the paired checks' own findings) as report blocks, followed by
    the analysis's own ``notes``."""
    checks = getattr(analysis, "paired", None)
    readings = [finding.text for finding in getattr(checks, "findings", ())] if checks is not None else []
    readings += notes
    if not readings:
        return []
    return [("h", DIFFERENCES_CHECKS_HEADING), ("list", readings),
            ("small", gloss_line("skewness", "excess kurtosis", "interquartile range"))]


def effect_blocks(analysis) -> list[tuple]:
    """Both standardised sizes of the pairs, each with what it is standardised by, so that d_z
    (by the SD of the pair differences) is not mistaken for d_av (by the average SD of the two
    groups)."""
    items = []
    for key in PAIRED_EFFECTS:
        effect = analysis.effect_sizes.get(key)
        if effect is None:
            continue
        decimals = _effect_decimals(effect)
        decimals = EFFECT_DECIMALS if decimals is None else decimals
        interval = format_interval(effect.interval, decimals=decimals)
        items.append(f"{sentence_start(effect.name)} = {fixed(effect.value, decimals)} "
                     f"({level_text(effect.interval.level)} CI {interval}), {EFFECT_SCALE[key]}. "
                     f"{GLOSSES[_GLOSS_OF[key]]}")
    if not items:
        return []
    return [("h", "Standardised sizes of the pair differences"), ("list", items)]
