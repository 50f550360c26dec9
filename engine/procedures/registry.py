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

from typing import Any, Callable, Mapping

from ..results import frozen_mapping
from ..spec import AnalysisSpec
from . import brunner_munzel, ranks, resampling, t
from .record import (DESIGNS, ESTIMATE_KINDS, EXCHANGEABLE_NOTE, FAMILIES, INPUTS,
                     INTERVAL_ONLY_NOTE, RESAMPLING_MAX_VALUES, Context, Procedure,
                     question_arguments)
from . import margin_records, paired_records, summary_records

__all__ = ["Procedure", "Context", "RECORDS", "SUMMARY_RECORDS", "PROCEDURE_NAMES", "record", "find", "applicable",
           "RESAMPLING_MAX_VALUES", "INTERVAL_ONLY_NOTE", "EXCHANGEABLE_NOTE", "DESIGNS", "INPUTS",
           "FAMILIES", "ESTIMATE_KINDS"]


_common = question_arguments


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


_INDEPENDENT: tuple[Procedure, ...] = (
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

# Every record, in the order they are run and shown: the procedures of a difference between two
# independent groups, then those of a paired design, then those of a margin question.
RECORDS: tuple[Procedure, ...] = _INDEPENDENT + paired_records.RECORDS + margin_records.RECORDS
# The same procedures run from each group's summary statistics (``input="summary"``; same keys).
SUMMARY_RECORDS: tuple[Procedure, ...] = summary_records.of(RECORDS)

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


def applicable(spec: AnalysisSpec, *, design: str | None = None,
               input: str = "raw") -> tuple[Procedure, ...]:
    """The records that answer ``spec``'s question for ``design`` (default: the spec's) with what
    the user stated, in the order they are run (the size limits are checked by the caller, who
    says what was left out); ``input="summary"``: those that run from summary statistics."""
    design = spec.design if design is None else design
    pool = SUMMARY_RECORDS if input == "summary" else RECORDS
    return tuple(r for r in pool if r.serves(design, spec.question.kind) and r.runs_for(spec))
