"""Every procedure Twofold runs, one record each: what it is, when it applies, how it is run and
how it is read.

The analysis runs the records that apply (``applicable``); the advice, the report, the
side-by-side view and the window read what they need to know of a procedure from its record
(``record(key)``) instead of from tables of their own. A result's ``key`` names its record, and
the record names the function that computed it (``record(key).computed_by``, e.g.
``"engine.procedures.t.welch_t"``).

Adding a procedure: its function in the module of its family (with its plain name in that
module's ``NAMES``), one record below, and one rule in ``engine/advice.py`` saying when to
suggest it (see DEVELOPERS.md, "Adding a procedure").
"""

from __future__ import annotations

from dataclasses import dataclass, field
from types import ModuleType
from typing import Any, Callable, Mapping

import numpy as np

from ..question import KINDS
from ..results import ProcedureResult, frozen_mapping
from ..spec import AnalysisSpec
from ..tasks import Task
from . import brunner_munzel, ranks, resampling, t

__all__ = ["Procedure", "Context", "RECORDS", "PROCEDURE_NAMES", "record", "find", "applicable",
           "RESAMPLING_MAX_VALUES", "INTERVAL_ONLY_NOTE", "EXCHANGEABLE_NOTE", "DESIGNS", "INPUTS",
           "FAMILIES", "ESTIMATE_KINDS"]

# The designs a procedure can serve: two independent groups ("paired" comes next).
DESIGNS = ("independent",)
# What a procedure needs to be given: the values themselves, or summary statistics of each group.
INPUTS = ("raw", "summary")
FAMILIES = ("t", "rank", "resampling")
# What the estimate is: a difference in means or in medians, a rank-based shift (Hodges-Lehmann),
# or a probability (of a value of group 1 being the larger).
ESTIMATE_KINDS = ("mean", "median", "shift", "probability")

# Above this many values in all, resampling is left out (and the user told why): the large-sample
# procedures are then accurate, and 10,000 resamples of millions of values would take minutes.
# A practical limit of this program, not a statistical rule.
RESAMPLING_MAX_VALUES = 200_000

# Why an interval without a test does not vote: under no difference a bootstrap interval misses 0
# far more often than 1 - level with small groups (7.6 to 13.5% at 95% in simulations of 5 to 25
# values per group), so counting it would report disagreement that is not there.
INTERVAL_ONLY_NOTE = ("It gives an interval but no test, and with small groups such an interval "
                      "excludes zero more often than its level allows when the groups do not differ; "
                      "it is shown for its estimate and interval, not counted.")
EXCHANGEABLE_NOTE = ("It tests that the groups are interchangeable, spread included; with spreads "
                     "this different a difference in spread alone can make it reject, so it is not "
                     "counted.")


@dataclass(frozen=True)
class Context:
    """What a procedure's run may use besides the two samples and the spec.

    ``sorted_x``/``sorted_y``: each group sorted once for every step; ``rng``: the one random
    source of the analysis (the resampling procedures draw from it in the registry's order);
    ``task``: this procedure's share of the analysis's progress and cancelling;
    ``shared_draws``: random relabellings the permutation tests of the analysis share (the
    first draws them from ``rng``, the next uses them). What the user stated (known SDs among
    it) is in the spec each run is given with the context.
    """

    sorted_x: np.ndarray
    sorted_y: np.ndarray
    rng: np.random.Generator
    task: Task = field(default_factory=Task)
    shared_draws: dict = field(default_factory=dict)


def _common(spec: AnalysisSpec) -> dict[str, Any]:
    return dict(alternative=spec.question.alternative, confidence_level=spec.question.level)


def _means(spec: AnalysisSpec, context: Context) -> dict[str, Any]:
    return _common(spec)


def _known_sds(spec: AnalysisSpec, context: Context) -> dict[str, Any]:
    return dict(_common(spec), sd=spec.statements.known_sd)


def _sorted(spec: AnalysisSpec, context: Context) -> dict[str, Any]:
    return dict(_common(spec), sorted_x=context.sorted_x, sorted_y=context.sorted_y)


def _ranked(spec: AnalysisSpec, context: Context) -> dict[str, Any]:
    return dict(_sorted(spec, context), method=spec.rank_method, cancelled=context.task.cancelled)


def _resampled(statistic: str, kind: str) -> Callable[[AnalysisSpec, Context], dict[str, Any]]:
    def arguments(spec: AnalysisSpec, context: Context) -> dict[str, Any]:
        shared = dict(shared_draws=context.shared_draws) if kind == "permutation" else {}
        return dict(_common(spec), statistic=statistic, n_resamples=spec.resamples,
                    rng=context.rng, progress=context.task, **shared)
    return arguments


@dataclass(frozen=True)
class Procedure:
    """One procedure: what it is, when it applies, how it is run, how its result is read.

    ``module`` and ``function`` name the function that computes it (looked up when it runs);
    ``arguments(spec, context)`` gives the keywords it is called with besides the two samples.
    ``statistic_label``: how its statistic is written ("Welch t"), None when it is not;
    ``statistic_in_halves``: the statistic is a whole or half number (U).
    ``no_difference``: the estimate's value when the groups do not differ (1/2 for a
    probability). ``resampled``: "permutation" or "bootstrap" when its p-value or interval is
    found by resampling. ``votes``: whether it counts towards the side-by-side agreement, with
    ``not_voting_because`` when it never does; ``exchangeable``: it tests that the groups are
    interchangeable, so it does not vote when the spreads differ. ``max_values``: above this
    many values in all it is left out. ``needs_known_sd``: it runs only with known SDs.
    ``work``: its share of the progress bar, relative to the others.
    """

    key: str
    name: str
    family: str
    module: ModuleType
    function: str
    arguments: Callable[[AnalysisSpec, Context], dict[str, Any]]
    estimate_name: str
    estimate_kind: str
    effect_sizes: tuple[str, ...]
    assumption: str
    statistic_label: str | None = None
    statistic_in_halves: bool = False
    no_difference: float = 0.0
    resampled: str | None = None
    votes: bool = True
    not_voting_because: str | None = None
    exchangeable: bool = False
    max_values: int | None = None
    needs_known_sd: bool = False
    designs: tuple[str, ...] = ("independent",)
    input: str = "raw"
    questions: tuple[str, ...] = KINDS
    work: float = 1.0

    def __post_init__(self) -> None:
        if self.family not in FAMILIES or self.estimate_kind not in ESTIMATE_KINDS:
            raise ValueError(f"record {self.key!r}: unknown family or estimate kind")
        if self.input not in INPUTS or not set(self.designs) <= set(DESIGNS):
            raise ValueError(f"record {self.key!r}: unknown input or design")
        if not self.votes and not self.not_voting_because:
            raise ValueError(f"record {self.key!r}: a procedure that never votes says why")

    @property
    def computed_by(self) -> str:
        """The dotted name of the function that computes it: "engine.procedures.t.welch_t"."""
        return f"{self.module.__name__}.{self.function}"

    @property
    def compute(self) -> Callable[..., ProcedureResult]:
        """The function that computes it (looked up now, so a replaced function is the one run)."""
        return getattr(self.module, self.function)

    def run(self, x: np.ndarray, y: np.ndarray, spec: AnalysisSpec, context: Context) -> ProcedureResult:
        """Its result for group 1 ``x`` and group 2 ``y`` as ``spec`` asks."""
        return self.compute(x, y, **self.arguments(spec, context))

    def serves(self, design: str, question_kind: str) -> bool:
        """Whether it answers ``question_kind`` for ``design``."""
        return design in self.designs and question_kind in self.questions

    def runs_for(self, spec: AnalysisSpec) -> bool:
        """Whether what the user stated lets it run (the z-test needs known SDs)."""
        return not self.needs_known_sd or spec.statements.known_sd is not None

    def fits_size(self, n_values: int) -> bool:
        """Whether it runs for ``n_values`` values in all (resampling has a limit)."""
        return self.max_values is None or n_values <= self.max_values

    def not_voting(self, *, spreads_differ: bool) -> str | None:
        """Why it does not count towards the agreement of the procedures here, or None."""
        if not self.votes:
            return self.not_voting_because
        if self.exchangeable and spreads_differ:
            return EXCHANGEABLE_NOTE
        return None


_MEAN_EFFECTS = ("hedges_g", "cohen_d")
_ORDER_EFFECTS = ("rank_biserial", "common_language")


def _means_record(key: str, function: str, label: str, **fields: Any) -> Procedure:
    """The record of a t or z procedure (``engine.procedures.t``) of a difference in means."""
    return Procedure(
        key=key, name=t.NAMES[key], family="t", module=t, function=function,
        **{"arguments": _means, **fields}, estimate_name="difference in means", estimate_kind="mean",
        effect_sizes=_MEAN_EFFECTS, statistic_label=label)


def _resampling(key: str, kind: str, statistic: str, assumption: str) -> Procedure:
    """The record of a resampling procedure (``kind`` "permutation": a test of interchangeable
    groups; "bootstrap": an interval without a test) of a difference in means or medians."""
    permutation = kind == "permutation"
    return Procedure(
        key=key, name=resampling.NAMES[key], family="resampling", module=resampling,
        function="permutation_test" if permutation else "bootstrap_interval",
        arguments=_resampled(statistic, kind), estimate_name=f"difference in {statistic}s",
        estimate_kind=statistic, effect_sizes=_MEAN_EFFECTS if statistic == "mean" else _ORDER_EFFECTS,
        assumption=assumption, resampled=kind, exchangeable=permutation, votes=permutation,
        not_voting_because=None if permutation else INTERVAL_ONLY_NOTE,
        max_values=RESAMPLING_MAX_VALUES, work=10.0)


RECORDS: tuple[Procedure, ...] = (
    _means_record(
        "welch_t", "welch_t", "Welch t",
        assumption=("Assumes independent values and a mean that is close to normally distributed "
                    "(true for bell-shaped values, or for larger groups); the spreads may differ.")),
    _means_record(
        "pooled_t", "pooled_t", "pooled t",
        assumption=("Assumes independent values, a mean close to normally distributed, and the same "
                    "spread (standard deviation) in both groups.")),
    _means_record(
        "z", "z_test", "z", arguments=_known_sds, needs_known_sd=True,
        assumption=("Assumes independent values, a mean close to normally distributed, and that the "
                    "two standard deviations given are the true ones, known from outside these "
                    "data.")),
    Procedure(
        key="mann_whitney", name=ranks.NAMES["mann_whitney"], family="rank", module=ranks,
        function="mann_whitney", arguments=_ranked, estimate_name="Hodges-Lehmann shift",
        estimate_kind="shift", effect_sizes=_ORDER_EFFECTS, statistic_label="Mann-Whitney U",
        statistic_in_halves=True, work=2.0,
        assumption=("Assumes independent values that can be put in order, and that the two "
                    "groups have the same shape and spread if they do not differ: only then does "
                    "a small p-value mean that values of one group tend to be larger, since with "
                    "unequal spreads it can reject although neither group tends to be larger "
                    "(Pratt 1964, JASA 59:665); its shift estimate (Hodges-Lehmann) also reads "
                    "best for groups of the same shape and spread.")),
    Procedure(
        key="brunner_munzel", name=brunner_munzel.NAMES["brunner_munzel"], family="rank",
        module=brunner_munzel, function="brunner_munzel", arguments=_sorted,
        estimate_name="probability that the first group's value is the larger (ties count half)",
        estimate_kind="probability", no_difference=0.5,
        effect_sizes=(),  # its estimate and interval are the common-language effect size
        statistic_label="Brunner-Munzel W",
        assumption=("Assumes independent values that can be put in order; it tests whether a "
                    "value of one group is more likely to be the larger than a value of the "
                    "other, allows the groups different spreads and shapes (Brunner and "
                    "Munzel 2000, Biometrical Journal 42:17), and gives an approximate "
                    "p-value with fewer than about 10 values in a group.")),
    _resampling("permutation_mean", "permutation", "mean", (
        "Assumes independent values, and tests that the two groups are interchangeable (the same "
        "distribution, spread and shape included), not only that the means are equal: with "
        "different spreads, above all with unequal group sizes, it can report a difference when "
        "the means are equal (Romano 1990, JASA 85:686).")),
    _resampling("permutation_median", "permutation", "median", (
        "Assumes independent values, and tests that the two groups are interchangeable (the same "
        "distribution, spread and shape included), not that the medians are equal: with "
        "different spreads it can report a difference when the medians are equal (Romano 1990, "
        "JASA 85:686).")),
    _resampling("bootstrap_mean", "bootstrap", "mean", (
        "Assumes independent values and that each group is large enough to stand in for its "
        "population; it gives an interval for the difference in means but no p-value, and with "
        "fewer than about 10 values in a group the interval is too narrow (it misses the true "
        "difference more often than stated; Hesterberg 2015, The American Statistician 69:371).")),
    _resampling("bootstrap_median", "bootstrap", "median", (
        "Assumes independent values and groups large enough to stand in for their populations; it "
        "gives an interval for the difference in medians but no p-value, and is coarse when there "
        "are many ties.")),
)

_BY_KEY: Mapping[str, Procedure] = frozen_mapping({r.key: r for r in RECORDS})
if len(_BY_KEY) != len(RECORDS):  # pragma: no cover - a mistake in the table above
    raise ValueError("two procedure records share a key")

# Plain names for every procedure key, in the order they are run and shown.
PROCEDURE_NAMES: Mapping[str, str] = frozen_mapping({r.key: r.name for r in RECORDS})


def record(key: str) -> Procedure:
    """The record of the procedure ``key`` (KeyError for a key no procedure has)."""
    return _BY_KEY[key]


def find(key: str) -> Procedure | None:
    """The record of ``key``, or None."""
    return _BY_KEY.get(key)


def applicable(spec: AnalysisSpec, *, design: str = "independent") -> tuple[Procedure, ...]:
    """The records that answer ``spec``'s question for ``design`` with what the user stated, in
    the order they are run (the size limits are checked by the caller, who says what was left
    out)."""
    return tuple(r for r in RECORDS if r.serves(design, spec.question.kind) and r.runs_for(spec))
