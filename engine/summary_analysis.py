"""The comparison of two groups known only by their summary statistics (n, mean, SD or SE).

``analyze_summaries(stats, spec)`` runs every procedure that works from summaries (the records of
``engine.procedures.registry.SUMMARY_RECORDS``: z with known SDs, pooled and Welch t, the margin
procedures built on them) and the mean-based effect sizes (Cohen's d, Hedges' g, Glass's delta),
suggests one procedure, and says what could not be done without the values: the rank and
resampling procedures and the checks of shape, spread, outliers and ties.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any, Mapping, Sequence

import numpy as np

from . import effects
from .advice import ConsideredOption, Recommendation
from .analysis import Robustness, _part, _robustness, margin_answer_of
from .errors import DataProblem, OptionProblem
from .group_stats import GroupStats
from .margin_advice import CLOSEST
from .procedures import registry
from .question import Margin, MarginAnswer
from .results import EffectSize, Finding, ProcedureResult, frozen_mapping
from .spec import AnalysisSpec
from .tasks import CancelCheck, Progress, Task

__all__ = ["SummaryAnalysis", "analyze_summaries", "MEAN_EFFECTS"]

# The effect sizes that summaries support, in the order they are shown.
MEAN_EFFECTS = ("cohen_d", "hedges_g", "glass_delta")
_EFFECTS_SHARE = 0.2


@dataclass(frozen=True, eq=False)
class SummaryAnalysis:
    """What could be found from two groups' summary statistics.

    ``stats``: the two groups as entered (group 1 first). ``spec``: the analysis as run (the
    groups' labels, and the known SDs among the statements when both were entered as known).
    ``procedures`` and ``effect_sizes``: as in :class:`engine.analysis.Analysis`, keyed alike.
    ``needs_values``: the procedures (key -> plain name) that would have run on the values but
    cannot run from summaries. ``findings``: what the user must know (the shape could not be
    checked, what needs the values, a standard error turned into an SD); ``notes``: what the
    analysis itself decided (a part that could not be computed).
    """

    stats: tuple[GroupStats, GroupStats]
    spec: AnalysisSpec
    procedures: Mapping[str, ProcedureResult]
    effect_sizes: Mapping[str, EffectSize]
    recommendation: Recommendation
    robustness: Robustness
    needs_values: Mapping[str, str]
    findings: tuple[Finding, ...]
    notes: tuple[Finding, ...] = ()
    margin: Margin | None = None
    input: str = "summary"

    def __post_init__(self) -> None:
        for name in ("procedures", "effect_sizes", "needs_values"):
            object.__setattr__(self, name, frozen_mapping(getattr(self, name)))

    @property
    def labels(self) -> tuple[str, str]:
        return (self.stats[0].label, self.stats[1].label)

    @property
    def n(self) -> tuple[int, int]:
        return (self.stats[0].n, self.stats[1].n)

    @property
    def chosen(self) -> ProcedureResult | None:
        """The suggested procedure's result."""
        return self.procedures.get(self.recommendation.key)

    def margin_answer(self, key: str) -> MarginAnswer | None:
        """What procedure ``key``'s result says against the margin (None without a margin question
        or such a result)."""
        result = self.procedures.get(key)
        if self.margin is None or result is None or result.interval is None:
            return None
        return margin_answer_of(self.spec.question, result, self.margin)


def _check_stats(stats: Sequence[Any]) -> tuple[GroupStats, GroupStats]:
    stats = tuple(stats)
    if len(stats) != 2 or not all(isinstance(s, GroupStats) for s in stats):
        raise OptionProblem("Give the summary statistics of exactly two groups, group 1 first.")
    if stats[0].label == stats[1].label:
        raise DataProblem(f"The two groups of summary statistics share the label '{stats[0].label}'; "
                          "give each its own.")
    return stats  # type: ignore[return-value]


def _spec_for(stats: tuple[GroupStats, GroupStats], spec: AnalysisSpec) -> AnalysisSpec:
    """The spec with the groups' labels and, when both SDs were entered as known, those SDs as the
    statement of known SDs (which adds the z procedure)."""
    if spec.design != "independent":
        raise OptionProblem("Summary statistics of two groups serve two independent groups; a paired "
                            "comparison needs the pairs' values.")
    margin = spec.question.margin
    if margin is not None and margin.unit == "ratio":
        raise OptionProblem("A margin given as a ratio is judged on the log scale of the values (the "
                            "ratio of their geometric means), which summary statistics do not give; give "
                            "the margin in the measurement's units or as a percentage of group 2's mean.")
    known = spec.statements.known_sd
    if all(s.sd_known for s in stats):
        known = (stats[0].standard_deviation, stats[1].standard_deviation)
    elif any(s.sd_known for s in stats):
        raise DataProblem("Only one group's standard deviation is marked as known; the z procedure "
                          "needs both known, so mark both or neither.")
    statements = replace(spec.statements, known_sd=known) if known != spec.statements.known_sd \
        else spec.statements
    return spec.replace(groups=(stats[0].label, stats[1].label), statements=statements,
                        layout="long", design="independent").with_seed()


def _needs_values(spec: AnalysisSpec) -> dict[str, str]:
    """The procedures a run on the values would have had that summaries cannot give."""
    from_summaries = {r.key for r in registry.applicable(spec, input="summary")}
    return {r.key: r.name for r in registry.applicable(spec) if r.key not in from_summaries}


def _findings(stats: tuple[GroupStats, GroupStats], needs: Mapping[str, str]) -> list[Finding]:
    found = [Finding(
        "shape_not_checked", "warning",
        "Only summary statistics were given, so the shape of each group, its outliers and its ties "
        "could not be checked: the procedures take for granted that each group's mean is "
        "close to normally distributed (bell-shaped values, or larger groups).")]
    if needs:
        found.append(Finding(
            "needs_values", "note",
            "These need the values themselves and were not run: " + "; ".join(needs.values())
            + ". Nor could the checks of shape, spread, outliers and ties be run."))
    for index, s in enumerate(stats):
        if s.given_as == "se":
            found.append(Finding(
                "sd_from_se", "info",
                f"The standard deviation of group '{s.label}' was found from its standard error: "
                f"SE x sqrt(n) = {s.se:g} x sqrt({s.n}).", group=index))
    return found


def _recommend(spec: AnalysisSpec, stats: tuple[GroupStats, GroupStats],
               records: Sequence[registry.Procedure], needs: Mapping[str, str]) -> Recommendation:
    """The suggestion from what was stated alone: z with known SDs, pooled t with spreads known to
    be equal, Welch t otherwise; for a margin question, the margin procedure built on it."""
    statements = spec.statements
    if statements.known_sd is not None:
        base, why = "z", ("Both standard deviations were given as known population values, so the "
                          "z-test uses them as they are.")
    elif statements.equal_spread_known:
        base, why = "pooled_t", ("The spreads were stated to be equal, so one variance is pooled "
                                 "from both groups.")
    else:
        base, why = "welch_t", ("Welch's t-test does not take the two spreads to be equal; from "
                                "summaries it is the safe choice.")
    key = base
    closest = CLOSEST.get(base, base)  # the z-test has no margin version: Welch's t comes closest
    margin_keys = [r.key for r in records if r.counterpart == closest]
    if spec.question.has_margin and margin_keys:
        key = margin_keys[0]
        name = registry.record(key).name
        why = (why + f" The margin question is answered by the procedure built on it ({name})."
               if closest == base else
               "Both standard deviations were given as known population values, but there is no margin "
               f"version of the z-test here: the margin question is answered by the {name}, with the "
               "spreads taken as estimates from the summaries.")
    reasons = [why, "Only summary statistics were given, so the shape of the groups could not be "
               "checked and the suggestion rests on what was stated alone."]
    if needs:
        reasons.append("The rank and resampling procedures need the values and were not weighed.")
    name = registry.record(key).name if registry.find(key) else key
    considered = tuple(ConsideredOption(r.key, r.name, why)
                       for r in records if r.key != key)
    return Recommendation(key, name, tuple(reasons), considered, ())


def analyze_summaries(
    stats: Sequence[GroupStats],
    spec: AnalysisSpec = AnalysisSpec(),
    *,
    progress: Progress | Task | None = None,
    cancelled: CancelCheck | None = None,
) -> SummaryAnalysis:
    """Every procedure and effect size that works from the two groups' summary statistics.

    Parameters
    ----------
    stats : two GroupStats
        Group 1 and group 2; every difference is group 1 minus group 2.
    spec : AnalysisSpec
        The question (direction, level, margin) and the statements (spreads known to be equal);
        its source, columns and layout are not used.
    progress, cancelled
        As for :func:`engine.analysis.analyze`.

    Returns
    -------
    SummaryAnalysis
    """
    stats = _check_stats(stats)
    spec = _spec_for(stats, spec)
    task = Task.of(progress, cancelled)
    question = spec.question
    margin = question.margin.in_units(stats[1].mean) if question.has_margin else None
    records = registry.applicable(spec, input="summary")
    # no summary record reads the sorted values; each group's mean stands in for them, so that
    # a record reading group 2's mean from them (a percentage margin's note) finds it
    context = registry.Context(sorted_x=np.array([stats[0].mean]), sorted_y=np.array([stats[1].mean]),
                               rng=np.random.default_rng(spec.seed), margin=margin)
    notes: list[Finding] = []
    procedures: dict[str, ProcedureResult] = {}
    share = (1.0 - _EFFECTS_SHARE) / max(len(records), 1)
    for record in records:
        step = replace(context, task=task.step(share, record.name))
        result = _part(record.name, lambda: record.run(stats[0], stats[1], spec, step), notes)
        if result is not None:
            procedures[record.key] = result
    task.step(_EFFECTS_SHARE, "effect sizes")
    found = _part("effect sizes", lambda: effects.effect_sizes_with_reasons(
        stats[0], stats[1], alternative=question.alternative, confidence_level=question.level), notes)
    sizes, missing = found if found is not None else ({}, {})
    sizes = {key: sizes[key] for key in MEAN_EFFECTS if key in sizes}
    for key in MEAN_EFFECTS:
        if key in missing:
            notes.append(Finding("effect_size_left_out", "note", missing[key]))
    needs = _needs_values(spec)
    task.report(1.0, "done")
    return SummaryAnalysis(
        stats=stats, spec=spec, procedures=procedures, effect_sizes=sizes,
        recommendation=_recommend(spec, stats, records, needs),
        robustness=_robustness(procedures, question.level, question=question, margin=margin),
        needs_values=needs, findings=tuple(_findings(stats, needs)), notes=tuple(notes),
        margin=margin)
