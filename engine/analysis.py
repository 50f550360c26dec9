"""The whole comparison in one call: summaries, checks, advice, every procedure, effect sizes.

``analyze`` is what the headless command and the window both run. It is the only place that
knows the list of procedures, so adding one means adding it here (see DEVELOPERS.md).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any, Callable, Mapping, TypeVar

import numpy as np

from .errors import Cancelled, TwofoldError, names_its_source
from .results import (EffectSize, Finding, GroupSummary, Groups, Interval, ProcedureResult,
                      frozen_mapping)
from .spec import AnalysisSpec
from .summary import summarize

__all__ = ["RobustnessRow", "Robustness", "Analysis", "analyze", "PROCEDURE_NAMES"]

# Above this many values in all, resampling is left out (and the user told why): the large-sample
# procedures are then accurate, and 10,000 resamples of millions of values would take minutes.
# A practical limit of this program, not a statistical rule.
RESAMPLING_MAX_VALUES = 200_000

T = TypeVar("T")
Progress = Callable[[float, str], None]
CancelCheck = Callable[[], bool]

# Plain names for every procedure key the engine knows, in the order they are shown.
PROCEDURE_NAMES: Mapping[str, str] = frozen_mapping({
    "welch_t": "Welch t-test",
    "pooled_t": "pooled t-test",
    "z": "z-test with known SDs",
    "mann_whitney": "Mann-Whitney U with Hodges-Lehmann shift",
    "brunner_munzel": "Brunner-Munzel test, probability of a larger value",
    "permutation_mean": "permutation test, difference in means",
    "permutation_median": "permutation test, difference in medians",
    "bootstrap_mean": "bootstrap interval, difference in means",
    "bootstrap_median": "bootstrap interval, difference in medians",
})


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


# Why an interval without a test does not vote: under no difference a bootstrap interval misses 0
# far more often than 1 - level with small groups (7.6 to 13.5% at 95% in simulations of 5 to 25
# values per group), so counting it would report disagreement that is not there.
INTERVAL_ONLY_NOTE = ("It gives an interval but no test, and with small groups such an interval "
                      "excludes zero more often than its level allows when the groups do not differ; "
                      "it is shown for its estimate and interval, not counted.")
EXCHANGEABLE_NOTE = ("It tests that the groups are interchangeable, spread included; with spreads "
                     "this different a difference in spread alone can make it reject, so it is not "
                     "counted.")


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

    def __post_init__(self) -> None:
        object.__setattr__(self, "procedures", frozen_mapping(self.procedures))
        object.__setattr__(self, "effect_sizes", frozen_mapping(self.effect_sizes))
        object.__setattr__(self, "source", frozen_mapping(self.source))

    @property
    def chosen(self) -> ProcedureResult | None:
        """The recommended procedure's result."""
        return self.procedures.get(self.recommendation.key)


def _robustness(procedures: Mapping[str, ProcedureResult], level: float, *,
                spreads_differ: bool = False) -> Robustness:
    """Every procedure with a p-value or an interval; only tests that hold here vote.

    ``spreads_differ``: the spreads argue against treating the groups as interchangeable, so
    the permutation tests (which test exactly that) do not vote.
    """
    rows = []
    for key, result in procedures.items():
        votes, because = True, None
        if result.p_value is not None:
            finds = result.p_value < 1 - level
            if spreads_differ and key.startswith("permutation"):
                votes, because = False, EXCHANGEABLE_NOTE
        elif result.interval is not None:
            # an end that could not be computed (NaN) cannot be said to leave zero out
            ends = (result.interval.low, result.interval.high)
            finds = (not any(end is not None and end != end for end in ends)
                     and not result.interval.contains(0.0))
            votes, because = False, INTERVAL_ONLY_NOTE
        else:
            continue
        rows.append(RobustnessRow(key, result.name, result.estimate, result.estimate_name,
                                  result.interval, result.p_value, bool(finds), votes, because))
    verdicts = {row.finds_difference for row in rows if row.votes}
    return Robustness(tuple(rows), agree=len(verdicts) <= 1, level=level)


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
    progress: Progress | None = None,
    cancelled: CancelCheck | None = None,
) -> Analysis:
    """Run every applicable procedure, the checks, the effect sizes and the recommendation.

    ``progress(fraction, what)`` is called as the work advances; ``cancelled()`` is polled and a
    True answer raises :class:`engine.errors.Cancelled`. A spec without a seed gets a fresh
    one, recorded in ``Analysis.spec``: every analysis can be run again to the same numbers.
    """
    spec = spec.with_seed()
    question, statements = spec.question, spec.statements
    from . import advice, diagnostics, effects
    from .procedures import brunner_munzel, ranks, resampling, t

    x, y = groups.x, groups.y
    report = progress or (lambda fraction, what: None)
    stop = cancelled or (lambda: False)

    def step(fraction: float, what: str) -> None:
        if stop():
            raise Cancelled()
        report(fraction, what)

    common = dict(alternative=question.alternative, confidence_level=question.level)
    notes: list[Finding] = []
    # Each group is sorted once; the summaries, checks, rank test and effect sizes share the copies.
    ordered = dict(sorted_x=np.sort(x), sorted_y=np.sort(y))
    with np.errstate(all="ignore"):
        summaries = (summarize(groups.labels[0], x, ordered=ordered["sorted_x"]),
                     summarize(groups.labels[1], y, ordered=ordered["sorted_y"]))
        step(0.02, "checking shape and spread")
        checks = diagnostics.diagnose(groups, **ordered)
    procedures: dict[str, ProcedureResult] = {}

    def run(key: str, compute: Callable[[], ProcedureResult]) -> None:
        result = _part(PROCEDURE_NAMES[key], compute, notes)
        if result is not None:
            procedures[key] = result

    step(0.08, "t procedures")
    run("welch_t", lambda: t.welch_t(x, y, **common))
    run("pooled_t", lambda: t.pooled_t(x, y, **common))
    if statements.known_sd is not None:
        run("z", lambda: t.z_test(x, y, sd=statements.known_sd, **common))
    step(0.12, "rank procedure")
    run("mann_whitney", lambda: ranks.mann_whitney(x, y, method=spec.rank_method, **common,
                                                   cancelled=stop, **ordered))
    run("brunner_munzel", lambda: brunner_munzel.brunner_munzel(x, y, **common, **ordered))

    rng = np.random.default_rng(spec.seed)
    resampled = [
        ("permutation_mean", resampling.permutation_test, "mean"),
        ("permutation_median", resampling.permutation_test, "median"),
        ("bootstrap_mean", resampling.bootstrap_interval, "mean"),
        ("bootstrap_median", resampling.bootstrap_interval, "median"),
    ]
    if x.size + y.size > RESAMPLING_MAX_VALUES:
        notes.append(Finding(
            "resampling_left_out", "note",
            f"The permutation and bootstrap procedures were left out: with {x.size + y.size:,} values "
            "the large-sample procedures are accurate, and resampling would take minutes."))
        resampled = []
    start, span = 0.2, 0.7 / max(len(resampled), 1)
    for i, (key, compute, statistic) in enumerate(resampled):
        begin = start + i * span
        step(begin, PROCEDURE_NAMES[key])
        run(key, lambda compute=compute, statistic=statistic, begin=begin, key=key: compute(
            x, y, statistic=statistic, n_resamples=spec.resamples, rng=rng, **common,
            progress=lambda f, what="", b=begin, k=key: report(b + f * span, PROCEDURE_NAMES[k]),
            cancelled=stop,
        ))
    step(0.92, "effect sizes")
    rank_test = procedures.get("mann_whitney")
    found = _part("effect sizes", lambda: effects.effect_sizes_with_reasons(
        x, y, **common, **ordered, u1=None if rank_test is None else rank_test.details["U1"]),
        notes)
    sizes, missing = found if found is not None else ({}, {})
    for reason in missing.values():
        notes.append(Finding("effect_size_left_out", "note", reason))
    with np.errstate(all="ignore"):
        recommendation = advice.recommend(
            checks, groups, equal_spread_known=statements.equal_spread_known,
            ordinal=statements.ordinal, known_sd=statements.known_sd,
        )
    step(1.0, "done")
    return Analysis(
        groups=groups,
        spec=spec,
        summaries=summaries,
        diagnostics=checks,
        recommendation=recommendation,
        procedures=procedures,
        effect_sizes=sizes,
        robustness=_robustness(procedures, question.level,
                               spreads_differ=advice.spreads_differ(checks, groups)),
        screening=screening,
        source=source or {},
        notes=tuple(notes),
    )
