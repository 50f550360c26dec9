"""The suggestion for an equivalence or non-inferiority question.

The checks of the data do not change with the question: what they suggest for a difference
(:func:`engine.advice.recommend`, or the paired advice) carries over to the margin procedure
that shares its assumptions, the record whose ``counterpart`` it is. A ratio margin is judged
on the log scale, so its suggestion is the log-scale record. The other margin procedures that
ran are the alternatives weighed, each with the reason its counterpart was not suggested; the
cautions add that a margin must come from the subject matter and be fixed before the data are
seen.
"""

from __future__ import annotations

from typing import Iterable, Mapping

from .advice import ConsideredOption, Recommendation
from .errors import OptionProblem
from .procedures.registry import Procedure, find
from .spec import AnalysisSpec

__all__ = ["for_margin", "check_runnable", "MARGIN_CAUTION", "CLOSEST"]

MARGIN_CAUTION = (
    "The margin must come from the subject matter (the largest difference that would not matter "
    "in use, from a specification, a regulation or earlier work) and be fixed before the data are "
    "seen; a margin chosen after looking at the data can be made to give any answer.")

# For a procedure of a difference with no margin version of its own, the one whose margin
# version comes closest in what it compares (a mean, an order, the pair differences).
CLOSEST: Mapping[str, str] = {
    "z": "welch_t",
    "permutation_mean": "welch_t",
    "brunner_munzel": "mann_whitney",
    "permutation_median": "mann_whitney",
    "bootstrap_median": "mann_whitney",
    "sign_flip_mean": "paired_t",
}

_WHY_CLOSEST: Mapping[str, str] = {
    "z": "there is no margin version of the z-test here, and Welch's t estimates the spreads "
         "from the data",
    "permutation_mean": "a permutation test has no margin to test against, and Welch's t compares "
                        "the same means",
    "brunner_munzel": "the Brunner-Munzel test has no margin version here, and the Hodges-Lehmann "
                      "shift also works with the order of the values; with spreads this different "
                      "read its shift with care",
    "permutation_median": "a permutation test has no margin to test against, and the "
                          "Hodges-Lehmann shift also resists extreme values",
    "bootstrap_median": "there is no margin version of the median bootstrap here, and the "
                        "Hodges-Lehmann shift also resists extreme values",
    "sign_flip_mean": "a sign-flip test has no margin to test against, and the paired t compares "
                      "the same mean difference",
}


def check_runnable(records: Iterable[Procedure], spec: AnalysisSpec) -> None:
    """Refuse, in one line, a margin question no procedure can answer here (a ratio margin for
    paired data)."""
    if not any(True for _ in records):
        unit = spec.question.margin.unit
        raise OptionProblem(
            f"No procedure answers this margin question for a {spec.design} design with a margin "
            f"given as a {unit}; give the margin in the measurement's units or as a percentage.")


def _pick(records: tuple[Procedure, ...], wanted: str) -> Procedure:
    for record in records:
        if record.counterpart == wanted:
            return record
    return records[0]


def for_margin(base: Recommendation, records: Iterable[Procedure], spec: AnalysisSpec) -> Recommendation:
    """The margin record to suggest among ``records`` (those that ran), from ``base``, the
    suggestion for a difference in the same data."""
    records = tuple(records)
    if not records:
        return base
    wanted = CLOSEST.get(base.key, base.key)
    chosen = _pick(records, wanted)
    ratio = spec.question.margin.unit == "ratio"
    asked = "equivalence" if spec.question.kind == "equivalent" else "non-inferiority"
    if ratio:
        first = (f"The margin is a ratio, so the groups are compared on the log scale, by the "
                 f"{chosen.name}: it sets the ratio of the geometric means against the margin.")
    elif chosen.counterpart == base.key:
        first = (f"For a difference, the checks of these data suggest the {base.name}; the "
                 f"{asked} question is answered on the same assumptions by the {chosen.name}.")
    else:
        first = (f"For a difference, the checks of these data suggest the {base.name}; the "
                 f"closest answer to the {asked} question is the {chosen.name}, as "
                 f"{_WHY_CLOSEST.get(base.key, 'it compares the same quantity')}.")
    reasons = (first,) + base.reasons
    why_not = {option.key: option.why_not for option in base.considered}
    considered = tuple(
        ConsideredOption(r.key, r.name, _why_not(r, chosen, base, why_not))
        for r in records if r.key != chosen.key)
    cautions = tuple(base.cautions) + (MARGIN_CAUTION,)
    return Recommendation(chosen.key, chosen.name, reasons, considered, cautions,
                          base.assumptions, looks_like_ratings=base.looks_like_ratings)


def _why_not(record: Procedure, chosen: Procedure, base: Recommendation,
             why_not: Mapping[str, str]) -> str:
    if record.counterpart == chosen.counterpart:
        return "It answers the same question on the same assumptions; it is shown beside it."
    known = why_not.get(record.counterpart or "")
    counterpart = find(record.counterpart or "")
    if known and counterpart is not None:
        return f"It shares the assumptions of the {counterpart.name}. {known}"
    return f"It rests on other assumptions than the suggested {chosen.name}; it serves as a cross-check."
