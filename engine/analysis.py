"""The whole comparison in one call: summaries, checks, advice, every procedure, effect sizes.

``analyze`` is what the headless command and the window both run. It runs the procedures of
``engine.procedures.registry`` that apply to the design and the question; adding a procedure is
adding a record there (see DEVELOPERS.md).
"""

from __future__ import annotations

from dataclasses import dataclass, field, replace
from typing import Any, Callable, Mapping, TypeVar

import numpy as np

from . import (advice, diagnostics, effects, margin_advice, paired_advice, paired_diagnostics,
               paired_effects)
from .errors import DataProblem, TwofoldError, names_its_source, quoted
from .procedures import registry
from .question import Margin, MarginAnswer, Question
from .procedures.registry import (EXCHANGEABLE_NOTE, INTERVAL_ONLY_NOTE, PROCEDURE_NAMES,
                                  RESAMPLING_MAX_VALUES)
from .results import (EffectSize, Finding, GroupSummary, Groups, Interval, ProcedureResult,
                      frozen_mapping)
from .spec import AnalysisSpec
from .summary import summarize
from .tasks import CancelCheck, Progress, Task

__all__ = ["RobustnessRow", "Robustness", "Analysis", "analyze", "margin_in_units", "margin_answer_of", "PROCEDURE_NAMES",
           "RESAMPLING_MAX_VALUES", "INTERVAL_ONLY_NOTE", "EXCHANGEABLE_NOTE"]

T = TypeVar("T")

# Shares of the progress bar: the checks before the procedures and the effect sizes after them;
# the procedures share the rest by their records' ``work``.
_CHECKS_SHARE = 0.08
_EFFECTS_SHARE = 0.08


@dataclass(frozen=True)
class RobustnessRow:
    """One procedure in the side-by-side view.

    ``finds_difference``: p below 1 - level, or, for an interval without a test, the interval
    excludes zero. ``votes`` says whether the row counts towards ``Robustness.agree``;
    ``not_voting_because`` gives the reason in a sentence when it does not.
    """

    key: str
    name: str
    estimate: float
    estimate_name: str
    interval: Interval | None
    p_value: float | None
    finds_difference: bool
    votes: bool = True
    not_voting_because: str | None = None


@dataclass(frozen=True)
class Robustness:
    """Every applicable procedure side by side, and whether the tests among them agree.

    ``agree`` compares the voting rows only: procedures with a test whose error rate holds for
    these data. An interval without a test (the bootstrap) is shown but does not vote.
    """

    rows: tuple[RobustnessRow, ...]
    agree: bool
    level: float

    @property
    def voting(self) -> tuple[RobustnessRow, ...]:
        return tuple(row for row in self.rows if row.votes)


@dataclass(frozen=True, eq=False)
class Analysis:
    groups: Groups
    spec: AnalysisSpec        # what was asked, with the seed the resampling used
    summaries: tuple[GroupSummary, GroupSummary]
    diagnostics: Any          # engine.diagnostics.Diagnostics
    recommendation: Any       # engine.advice.Recommendation
    procedures: Mapping[str, ProcedureResult]
    effect_sizes: Mapping[str, EffectSize]
    robustness: Robustness
    screening: Any = None     # engine.io.ScreeningReport, when the groups came from a file
    source: Mapping[str, Any] = field(default_factory=frozen_mapping)  # file name, sheet, columns
    notes: tuple[Finding, ...] = ()  # what the analysis itself decided (e.g. resampling left out)
    margin: Margin | None = None  # a margin question's margin in the estimate's units
    pairs: Any = None         # engine.io.pairs.PairedIntake, in a paired design from a file
    paired: Any = None        # engine.paired_diagnostics.PairedChecks, in a paired design

    def __post_init__(self) -> None:
        object.__setattr__(self, "procedures", frozen_mapping(self.procedures))
        object.__setattr__(self, "effect_sizes", frozen_mapping(self.effect_sizes))
        object.__setattr__(self, "source", frozen_mapping(self.source))

    @property
    def chosen(self) -> ProcedureResult | None:
        """The recommended procedure's result."""
        return self.procedures.get(self.recommendation.key)

    @property
    def design(self) -> str:
        return self.spec.design

    def margin_answer(self, key: str) -> MarginAnswer | None:
        """What procedure ``key``'s result says against the margin (None: no margin question, no
        such result, or a result without an interval)."""
        result = self.procedures.get(key)
        if self.margin is None or result is None or result.interval is None:
            return None
        return margin_answer_of(self.spec.question, result, self.margin)


def margin_answer_of(question: Question, result: ProcedureResult, margin: Margin) -> MarginAnswer:
    """What ``result`` of a margin procedure says against ``margin`` (in the estimate's units):
    its ``interval`` is the two-sided (1 - 2 alpha) one; ``details["difference_interval"]`` the
    two-sided (1 - alpha) one an equivalence verdict also needs."""
    return question.margin_answer(result.interval, result.details.get("difference_interval"),
                                  margin=margin)


def margin_in_units(question: Question, groups: Groups) -> Margin | None:
    """The question's margin in the measurement's units: a percentage of group 2's mean converted
    (for a ratio margin, the ratio itself); None for a question without a margin."""
    if not question.has_margin:
        return None
    y = groups.y
    return question.margin.in_units(float(np.mean(y)) if y.size else float("nan"))


def _robustness(procedures: Mapping[str, ProcedureResult], level: float, *,
                spreads_differ: bool = False, question: Question | None = None,
                margin: Margin | None = None) -> Robustness:
    """Every procedure with a p-value or an interval; only tests that hold here vote.

    ``spreads_differ``: the spreads argue against treating the groups as interchangeable, so
    the procedures that test exactly that (the permutation tests) do not vote. Whether a row
    votes, and why not, is its record's (``registry.Procedure.not_voting``); whether it finds
    what the question looks for is the question's (``Question.finds``).
    """
    question = question or Question(level=level)
    rows = []
    for key, result in procedures.items():
        known = registry.find(key)
        because = None if known is None else known.not_voting(spreads_differ=spreads_differ)
        if margin is not None:
            if result.interval is None:
                continue
            finds = margin_answer_of(question, result, margin).yes
        else:
            finds = question.finds(p_value=result.p_value, interval=result.interval,
                                   no_difference=0.0 if known is None else known.no_difference)
        if finds is None:
            continue
        if result.p_value is None:
            because = because or INTERVAL_ONLY_NOTE
        rows.append(RobustnessRow(key, result.name, result.estimate, result.estimate_name,
                                  result.interval, result.p_value, bool(finds), because is None,
                                  because))
    verdicts = {row.finds_difference for row in rows if row.votes}
    return Robustness(tuple(rows), agree=len(verdicts) <= 1, level=level)


def _pairing(groups: Groups, spec: AnalysisSpec):
    """The checks of the pairs in a paired design (``engine.paired_diagnostics.PairedChecks``),
    None for independent groups; groups of different sizes cannot be pairs."""
    if spec.design != "paired":
        return None
    (first, second), (n1, n2) = groups.labels, groups.n
    if n1 != n2:
        raise DataProblem(f"A paired design needs one value of each group per pair, but "
                          f"'{quoted(first)}' has {n1:,} values and '{quoted(second)}' has {n2:,}.")
    if n1 < 2:
        raise DataProblem(f"A paired design needs at least 2 pairs; there {'is' if n1 == 1 else 'are'} "
                          f"{n1}.")
    if not np.any(groups.x != groups.y):
        raise DataProblem("No pair shows any difference (both values of every pair are equal), "
                          "so there is nothing for the paired procedures to test.")
    with np.errstate(all="ignore"):
        return paired_diagnostics.check_pairs(groups.x, groups.y, labels=groups.labels)


def _paired_sizes(groups: Groups, question: Question) -> tuple[dict[str, EffectSize], dict[str, str]]:
    """d_z and d_av of the pairs, and the reason for each left out."""
    return paired_effects.paired_effect_sizes(groups.x, groups.y, alternative=question.alternative,
                                              confidence_level=question.level)


def _paired_advice(pairing, groups: Groups, spec: AnalysisSpec):
    statements = spec.statements
    return paired_advice.recommend_paired(
        pairing, groups, ordinal=statements.ordinal, zero_rule=spec.zero_rule,
        known_sd=statements.known_sd, equal_spread_known=statements.equal_spread_known)


def _part(name: str, run: Callable[[], T], notes: list[Finding]) -> T | None:
    """``run()``, or None with a note that says why when it fails in a way nobody foresaw.

    One part of the analysis (a procedure, the effect sizes) that raises an unexpected error
    must not take the others down: the failure becomes a warning note naming the part, and the
    rest is reported. Problems with the data or the options (``TwofoldError``), a stop asked
    for by the user and a lack of memory still end the whole analysis with their own message.
    Floating-point warnings are kept from the terminal: every part checks its own numbers.
    """
    try:
        with np.errstate(all="ignore"):
            return run()
    except (TwofoldError, MemoryError):
        raise
    except Exception as problem:  # noqa: BLE001 - any other failure is reported, not raised
        reason = str(problem).strip().rstrip(".") or type(problem).__name__
        notes.append(Finding("part_not_computed", "warning",
                             f"The {name} could not be computed: {reason}."))
        return None


@names_its_source
def analyze(
    groups: Groups,
    spec: AnalysisSpec = AnalysisSpec(),
    *,
    screening: Any = None,
    source: Mapping[str, Any] | None = None,
    pairs: Any = None,
    progress: Progress | Task | None = None,
    cancelled: CancelCheck | None = None,
    rng: np.random.Generator | None = None,
) -> Analysis:
    """Run every applicable procedure, the checks, the effect sizes and the recommendation.

    ``progress(fraction, what)`` is called as the work advances; ``cancelled()`` is polled and a
    True answer raises :class:`engine.errors.Cancelled` (``progress`` may also be an
    :class:`engine.tasks.Task`). A spec without a seed gets a fresh one, recorded in
    ``Analysis.spec``: every analysis can be run again to the same numbers. ``rng``, if given,
    is a generator of the seed's own stream (``engine.draw_log`` hands out such generators);
    by default one is made from the seed.

    With ``spec.design == "paired"`` the groups are matched pairs (x[i] and y[i] one unit;
    groups of different sizes raise :class:`engine.errors.DataProblem`): the paired procedures
    run on the differences, ``Analysis.paired`` holds the checks of the pairs, the effect sizes
    are d_z and d_av and the suggestion is the paired advice's. ``pairs`` is the pairing of the
    file (``engine.io.pairs.PairedIntake``) when the pairs came from one.
    """
    spec = spec.with_seed()
    question, statements = spec.question, spec.statements
    x, y = groups.x, groups.y
    task = Task.of(progress, cancelled)
    pairing = _pairing(groups, spec)

    notes: list[Finding] = []
    # Each group is sorted once; the summaries, checks, rank test and effect sizes share the copies.
    ordered = dict(sorted_x=np.sort(x), sorted_y=np.sort(y))
    with np.errstate(all="ignore"):
        summaries = (summarize(groups.labels[0], x, ordered=ordered["sorted_x"]),
                     summarize(groups.labels[1], y, ordered=ordered["sorted_y"]))
        task.step(_CHECKS_SHARE, "checking shape and spread")
        checks = diagnostics.diagnose(groups, **ordered)

    candidates = registry.applicable(spec)
    if question.has_margin:
        margin_advice.check_runnable(candidates, spec)
    records = [r for r in candidates if r.fits_size(x.size + y.size)]
    if pairing is not None and pairing.common_difference is not None:
        # no spread in the differences: no t (the pairing's "same_difference" finding says so)
        records = [r for r in records if r.family != "t"]
    if any(r.family == "resampling" for r in candidates if r not in records):
        notes.append(Finding(
            "resampling_left_out", "note",
            f"The permutation and bootstrap procedures were left out: with {x.size + y.size:,} values "
            "the large-sample procedures are accurate, and resampling would take minutes."))
    margin = margin_in_units(question, groups)
    rng = np.random.default_rng(spec.seed) if rng is None else rng
    context = registry.Context(rng=rng, margin=margin, **ordered,
                               differences=None if pairing is None else pairing.differences)
    procedures: dict[str, ProcedureResult] = {}
    share = (1.0 - _CHECKS_SHARE - _EFFECTS_SHARE) / max(sum(r.work for r in records), 1.0)
    for record in records:
        step = replace(context, task=task.step(share * record.work, record.name))
        result = _part(record.name, lambda: record.run(x, y, spec, step), notes)
        if result is not None:
            procedures[record.key] = result

    task.step(_EFFECTS_SHARE, "effect sizes")
    common = dict(alternative=question.alternative, confidence_level=question.level)
    rank_test = procedures.get("mann_whitney")
    found = _part("effect sizes", lambda: effects.effect_sizes_with_reasons(
        x, y, **common, **ordered, u1=None if rank_test is None else rank_test.details["U1"])
        if pairing is None else _paired_sizes(groups, question), notes)
    sizes, missing = found if found is not None else ({}, {})
    for reason in dict.fromkeys(missing.values()):  # one note for sizes left out for one reason
        notes.append(Finding("effect_size_left_out", "note", reason))
    with np.errstate(all="ignore"):
        recommendation = advice.recommend(
            checks, groups, equal_spread_known=statements.equal_spread_known,
            ordinal=statements.ordinal, known_sd=statements.known_sd,
        ) if pairing is None else _paired_advice(pairing, groups, spec)
    if question.has_margin:
        recommendation = margin_advice.for_margin(
            recommendation, [r for r in records if r.key in procedures], spec)
    task.report(1.0, "done")
    return Analysis(
        groups=groups,
        spec=spec,
        summaries=summaries,
        diagnostics=checks,
        recommendation=recommendation,
        procedures=procedures,
        effect_sizes=sizes,
        robustness=_robustness(procedures, question.level, question=question,
                               spreads_differ=advice.spreads_differ(checks, groups), margin=margin),
        screening=screening,
        source=source or {},
        notes=tuple(notes),
        margin=margin,
        pairs=None if pairing is None else pairs,
        paired=pairing,
    )
