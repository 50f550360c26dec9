"""The same two groups compared on several measurements (outcomes) at once, with p-values
adjusted for testing them all.

Each outcome is one run of :mod:`engine.pipeline` (its screening, checks, suggested procedure and
every procedure), exactly the run a single-outcome analysis of that column would make with the
same spec and seed. From each run one procedure is read: the one the user picked for all outcomes,
or each outcome's own suggestion. Across the outcomes their p-values are adjusted by Holm's
method (family-wise error) and by Benjamini and Hochberg's (false discovery rate); the verdict of
each outcome follows the adjustment the user chose, and each procedure's interval is also given at
Bonferroni's level, so that all of them cover together.

In the long layout an outcome is a value column beside the one group column; in the wide layout
it is a pair of columns, one per group. Outcomes are reported one by one through ``on_outcome``
as they finish (raw p-values); the adjusted ones come with the whole :class:`OutcomesAnalysis`.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Any, Callable, Sequence

import numpy as np

from . import multiplicity, pipeline
from .draw_log import DrawLog
from .errors import Cancelled, ColumnProblem, DataProblem, OptionProblem, TwofoldError, quoted
from .procedures import registry
from .results import EffectSize, Finding, Interval, ProcedureResult
from .spec import AnalysisSpec
from .tasks import CancelCheck, Progress, Task
from .wording import plural

__all__ = ["Outcome", "OutcomeResult", "OutcomeRow", "OutcomesAnalysis", "analyze_outcomes",
           "outcomes_from_file", "long_outcomes", "wide_outcomes", "STANDARDISED", "ADJUSTMENTS"]

ADJUSTMENTS = multiplicity.ADJUSTMENTS
# The standardised effect each outcome shows (one kind for all, so that they can be set side by
# side): Hedges' g for independent groups, d of the differences for pairs.
STANDARDISED = ("hedges_g", "paired_d_z")


@dataclass(frozen=True)
class Outcome:
    """One measurement compared: its name and its column (long layout) or its two columns, group
    1's first (wide layout)."""

    name: str
    columns: tuple[str, ...]

    def __post_init__(self) -> None:
        object.__setattr__(self, "columns", tuple(self.columns))
        if not isinstance(self.name, str) or not self.name or len(self.columns) not in (1, 2):
            raise OptionProblem("An outcome needs a name and one value column (or two, one per group).")


def long_outcomes(columns: Sequence[str]) -> tuple[Outcome, ...]:
    """One outcome per value column (the long layout, beside one group column)."""
    return tuple(Outcome(str(c), (str(c),)) for c in columns)


def wide_outcomes(pairs: Sequence[tuple[str, str]], names: Sequence[str] | None = None) -> tuple[Outcome, ...]:
    """One outcome per pair of columns (the wide layout: group 1's column, then group 2's),
    named by ``names`` or by its two columns."""
    pairs = [tuple(p) for p in pairs]
    names = list(names) if names is not None else [f"{a} vs {b}" for a, b in pairs]
    if len(names) != len(pairs):
        raise OptionProblem("Give one name per pair of columns.")
    return tuple(Outcome(n, p) for n, p in zip(names, pairs))


@dataclass(frozen=True, eq=False)
class OutcomeResult:
    """One outcome's run: ``prepared`` holds its spec, table, intake (the screening) and analysis
    (the checks, the suggestion, every procedure), as :func:`engine.pipeline.from_file` makes
    them. ``key``: the procedure read for this outcome; ``result``: its result (None when it
    could not run here, ``problem`` says why); ``simultaneous``: the same procedure at the
    Bonferroni level of all the outcomes; ``effect``: the standardised effect (Hedges' g)."""

    index: int
    outcome: Outcome
    prepared: pipeline.Prepared | None
    key: str | None
    result: ProcedureResult | None
    simultaneous: ProcedureResult | None
    effect: EffectSize | None
    problem: str | None = None

    @property
    def analysis(self):
        return None if self.prepared is None else self.prepared.analysis

    @property
    def p_value(self) -> float | None:
        return None if self.result is None else self.result.p_value


@dataclass(frozen=True)
class OutcomeRow:
    """One row of the table of outcomes: the raw numbers, unrounded.

    ``finding``: the verdict by the chosen adjustment (adjusted p-value below 1 - level); None
    where the procedure gives no p-value or the outcome could not be analysed."""

    name: str
    n: tuple[int, int] | None
    key: str | None
    procedure: str | None
    estimate: float | None
    estimate_name: str | None
    interval: Interval | None
    simultaneous_interval: Interval | None
    p_value: float | None
    p_holm: float | None
    p_bh: float | None
    effect: EffectSize | None
    finding: bool | None
    problem: str | None = None


@dataclass(frozen=True, eq=False)
class OutcomesAnalysis:
    """Every outcome's run and the adjusted p-values.

    ``p_holm`` and ``p_bh`` are in the order of ``outcomes`` (None for an outcome without a
    p-value; the adjustment counts only the outcomes with one). ``simultaneous_level`` is the
    Bonferroni level 1 - (1 - level) / m of the ``simultaneous`` intervals. ``adjustment`` is
    the one the verdicts follow; ``findings`` say why one would choose each.
    """

    spec: AnalysisSpec
    outcomes: tuple[OutcomeResult, ...]
    procedure: str | None
    adjustment: str
    p_holm: tuple[float | None, ...]
    p_bh: tuple[float | None, ...]
    simultaneous_level: float
    findings: tuple[Finding, ...]

    @property
    def level(self) -> float:
        return self.spec.question.level

    def adjusted(self, method: str | None = None) -> tuple[float | None, ...]:
        """The p-values adjusted by ``method`` (default: the chosen adjustment)."""
        method = method or self.adjustment
        if method not in ADJUSTMENTS:
            raise OptionProblem(f"The adjustment must be 'holm' or 'bh', not '{quoted(method)}'.")
        return self.p_holm if method == "holm" else self.p_bh

    def with_adjustment(self, method: str) -> "OutcomesAnalysis":
        """The same outcomes with the verdicts following ``method`` (nothing is run again)."""
        self.adjusted(method)
        return replace(self, adjustment=method)

    @property
    def rows(self) -> tuple[OutcomeRow, ...]:
        chosen = self.adjusted()
        alpha = self.spec.question.alpha
        rows = []
        for index, done in enumerate(self.outcomes):
            result, analysis = done.result, done.analysis
            p = chosen[index]
            rows.append(OutcomeRow(
                name=done.outcome.name,
                n=None if analysis is None else analysis.groups.n,
                key=done.key,
                procedure=None if result is None else result.name,
                estimate=None if result is None else result.estimate,
                estimate_name=None if result is None else result.estimate_name,
                interval=None if result is None else result.interval,
                simultaneous_interval=None if done.simultaneous is None else done.simultaneous.interval,
                p_value=done.p_value, p_holm=self.p_holm[index], p_bh=self.p_bh[index],
                effect=done.effect, finding=None if p is None else bool(p < alpha),
                problem=done.problem))
        return tuple(rows)


def _adjustment_findings(m: int, tested: int, level: float) -> list[Finding]:
    alpha = 1.0 - level
    found = [
        Finding("adjust_holm", "info",
                f"Holm's adjustment keeps the chance of even one false finding among the {tested} "
                f"outcomes tested at most {alpha:.0%}: choose it when any single false claim is "
                "costly, as when each outcome will be acted on."),
        Finding("adjust_bh", "info",
                f"Benjamini and Hochberg's adjustment keeps the expected share of false findings "
                f"among the outcomes reported at most {alpha:.0%}: choose it when screening many "
                "outcomes for the ones worth a closer look; it finds more, and allows a few false "
                "ones among them."),
        Finding("simultaneous_intervals", "info",
                f"The intervals at the Bonferroni level ({multiplicity.bonferroni_level(level, max(m, 1)):.4g}) "
                f"cover all {m} true differences together with at least {level:.0%} confidence."),
    ]
    if tested < m:
        found.append(Finding("outcomes_untested", "note",
                             f"{m - tested} of the {m} outcomes gave no p-value and are left out of "
                             "the adjustment; their verdict is not given."))
    return found


def _check_procedure(procedure: str | None, spec: AnalysisSpec) -> None:
    if procedure is None:
        return
    keys = [r.key for r in registry.applicable(spec)]
    if procedure not in keys:
        raise OptionProblem(f"The procedure '{quoted(procedure)}' does not answer this question; "
                            f"use one of {', '.join(keys)}.")


def _check_columns(table, outcomes: Sequence[Outcome], spec: AnalysisSpec) -> None:
    if not outcomes:
        raise OptionProblem("Name at least one outcome column.")
    names = [o.name for o in outcomes]
    if len(set(names)) != len(names):
        raise OptionProblem("Two outcomes share a name; give each its own.")
    columns = set(table.frame.columns)
    file = table.path.name
    wanted = 1 if spec.layout == "long" else 2
    if spec.layout == "long" and spec.group_column is not None and spec.group_column not in columns:
        raise ColumnProblem(f"{file}: there is no group column '{quoted(spec.group_column)}'.")
    compared: dict[tuple[str, ...], str] = {}
    for outcome in outcomes:
        if len(outcome.columns) != wanted:
            raise OptionProblem(f"In the {spec.layout} layout each outcome takes {wanted} "
                                f"column{'s' if wanted > 1 else ''}; '{quoted(outcome.name)}' has "
                                f"{len(outcome.columns)}.")
        for column in outcome.columns:
            if column not in columns:
                raise ColumnProblem(f"{file}: there is no column '{quoted(column)}'.")
        if len(set(outcome.columns)) < len(outcome.columns):
            raise ColumnProblem(f"{file}: the outcome '{quoted(outcome.name)}' names the column "
                                f"'{quoted(outcome.columns[0])}' for both groups; give one column per group.")
        if outcome.columns in compared:
            raise ColumnProblem(f"{file}: the outcomes '{quoted(compared[outcome.columns])}' and "
                                f"'{quoted(outcome.name)}' compare the same "
                                f"column{'s' if wanted > 1 else ''}; keep one, or the adjustment "
                                "counts it twice.")
        compared[outcome.columns] = outcome.name
    if spec.layout == "long" and spec.group_column in {c for o in outcomes for c in o.columns}:
        raise ColumnProblem(f"{file}: the group column '{quoted(spec.group_column)}' "
                            "cannot also be an outcome.")


def _check_some_analysed(done: Sequence[OutcomeResult], file: str) -> None:
    """Refuse a run in which no outcome could be analysed (a table of reasons alone answers
    nothing): one line with the first outcome's reason, which names what went wrong for all of
    them when the cause is shared (three groups in the group column, a group label not there)."""
    if not done or any(d.prepared is not None for d in done):
        return
    first = done[0]
    reason = first.problem or "it could not be analysed."
    if file not in reason:
        reason = f"{file}: {reason}"
    others = sum(d.problem != first.problem for d in done[1:])
    more = (f" ({plural(others, 'other outcome')} could not be analysed for "
            f"{'another reason' if others == 1 else 'other reasons'}.)" if others else "")
    lead = ("" if len(done) == 1 else f"None of the {len(done)} outcomes could be analysed; "
            f"'{quoted(first.outcome.name)}': ")
    raise DataProblem(lead + reason + more)


def _rerun(prepared: pipeline.Prepared, key: str, level: float) -> ProcedureResult | None:
    """The procedure ``key`` again on the same groups, at ``level`` (its own seed)."""
    analysis = prepared.analysis
    spec = prepared.spec
    question = replace(spec.question, level=level)
    spec = spec.replace(question=question)
    x, y = analysis.groups.x, analysis.groups.y
    context = registry.Context(sorted_x=np.sort(x), sorted_y=np.sort(y),
                               rng=np.random.default_rng(spec.seed), margin=analysis.margin,
                               differences=(x - y) if spec.design == "paired" else None)
    with np.errstate(all="ignore"):
        return registry.record(key).run(x, y, spec, context)


def _one(table, spec: AnalysisSpec, outcome: Outcome, index: int, procedure: str | None,
         bonferroni: float, task: Task, draws: DrawLog) -> OutcomeResult:
    columns = outcome.columns
    spec = spec.replace(value_columns=columns)
    try:
        spec = pipeline.complete(table, spec)
        intake = pipeline.form_groups(table, spec)
        if spec.layout == "long" and spec.groups is None:
            spec = spec.replace(groups=tuple(intake.groups.labels))
        analysis = pipeline.run(intake, spec, progress=task.step(0.9, "every procedure"),
                                rng=draws.generator())
    except Cancelled:
        raise
    except TwofoldError as problem:
        return OutcomeResult(index, outcome, None, procedure, None, None, None, problem.message)
    prepared = pipeline.Prepared(spec=spec, table=table, intake=intake, analysis=analysis)
    key = procedure or analysis.recommendation.key
    result = analysis.procedures.get(key)
    effect = next((analysis.effect_sizes[k] for k in STANDARDISED if k in analysis.effect_sizes), None)
    if result is None:
        return OutcomeResult(index, outcome, prepared, key, None, None, effect,
                             f"The {registry.record(key).name} could not be run on this outcome.")
    task.step(0.1, "interval at the Bonferroni level")
    simultaneous = result if bonferroni == spec.question.level else _rerun(prepared, key, bonferroni)
    return OutcomeResult(index, outcome, prepared, key, result, simultaneous, effect)


def _adjusted_all(p_values: list[float | None], method: str) -> tuple[float | None, ...]:
    tested = [i for i, p in enumerate(p_values) if p is not None]
    out: list[float | None] = [None] * len(p_values)
    if tested:
        for i, value in zip(tested, multiplicity.adjusted([p_values[i] for i in tested], method)):
            out[i] = float(value)
    return tuple(out)


def analyze_outcomes(
    table,
    spec: AnalysisSpec,
    outcomes: Sequence[Outcome],
    *,
    procedure: str | None = None,
    adjustment: str = "holm",
    on_outcome: Callable[[OutcomeResult], None] | None = None,
    progress: Progress | Task | None = None,
    cancelled: CancelCheck | None = None,
) -> OutcomesAnalysis:
    """Compare the same two groups on every outcome, then adjust the p-values.

    Parameters
    ----------
    table : engine.io.Table
        The data, as :func:`engine.pipeline.read` gives it.
    spec : AnalysisSpec
        The analysis each outcome runs (its layout, group column and groups, question, statements,
        resamples and seed); its value columns are replaced by each outcome's. A spec without a
        seed gets one, shared by every outcome, so that each outcome gives what a single-outcome
        run of its column with this spec gives.
    outcomes : sequence of Outcome
        :func:`long_outcomes` or :func:`wide_outcomes`.
    procedure : str or None
        The key of one procedure to read for every outcome (e.g. "welch_t"); None follows each
        outcome's own suggestion.
    adjustment : {"holm", "bh"}
        The adjustment the verdicts follow (both are computed).
    on_outcome : callable(OutcomeResult), optional
        Called as each outcome finishes, in order.
    progress, cancelled
        As for :func:`engine.analysis.analyze`; cancelling stops before the next step.

    Returns
    -------
    OutcomesAnalysis
    """
    if adjustment not in ADJUSTMENTS:
        raise OptionProblem(f"The adjustment must be 'holm' or 'bh', not '{quoted(adjustment)}'.")
    outcomes = tuple(outcomes)
    spec = spec.with_seed()
    _check_columns(table, outcomes, spec)
    _check_procedure(procedure, spec)
    task = Task.of(progress, cancelled)
    m = len(outcomes)
    bonferroni = multiplicity.bonferroni_level(spec.question.level, m)
    done: list[OutcomeResult] = []
    # every outcome draws from the same seed: what the first draws, the next ones are handed
    draws = DrawLog(spec.seed)
    for index, outcome in enumerate(outcomes):
        step = task.step(1.0 / m, f"outcome {index + 1} of {m}: {outcome.name}")
        result = _one(table, spec, outcome, index, procedure, bonferroni, step, draws)
        if spec.layout == "long" and spec.groups is None and result.prepared is not None:
            spec = spec.replace(groups=result.prepared.spec.groups)  # the same two groups for all
        done.append(result)
        if on_outcome is not None:
            on_outcome(result)
    _check_some_analysed(done, table.path.name)
    task.report(1.0, "done")
    p_values = [d.p_value for d in done]
    tested = sum(p is not None for p in p_values)
    return OutcomesAnalysis(
        spec=spec, outcomes=tuple(done), procedure=procedure, adjustment=adjustment,
        p_holm=_adjusted_all(p_values, "holm"), p_bh=_adjusted_all(p_values, "bh"),
        simultaneous_level=bonferroni,
        findings=tuple(_adjustment_findings(m, tested, spec.question.level)))


def outcomes_from_file(spec: AnalysisSpec, outcomes: Sequence[Outcome], **options: Any) -> OutcomesAnalysis:
    """:func:`analyze_outcomes` on the spec's source file (read once, its checksum recorded)."""
    if spec.source is None:
        raise OptionProblem("No data file was named.")
    table = pipeline.read(spec)
    if spec.source.sha256 is None:
        spec = spec.replace(source=pipeline.source_for(spec.source.path, spec.source.sheet))
    return analyze_outcomes(table, spec, outcomes, **options)
