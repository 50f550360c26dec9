"""The procedure records of a margin question (equivalence, non-inferiority).

Gathered into :data:`engine.procedures.registry.RECORDS` after the records of a difference between
two independent groups. Each kind of procedure gives two records, one per question kind
(``equivalent``: the "equivalence_..." key; ``not_worse``: the "noninferiority_..." key), which
share their function's module, their ``counterpart`` (the procedure of a difference whose
assumptions they share) and their assumption. Every record reads the margin from
``Context.margin`` (in the estimate's units, a percentage already converted) and says how it was
entered (``Margin.note``) in its result's method and ``details["margin_note"]``.
"""

from __future__ import annotations

from dataclasses import dataclass
from types import ModuleType
from typing import Any, Callable

import numpy as np

from ..question import Margin
from ..spec import AnalysisSpec
from . import equivalence, equivalence_intervals, paired_margin
from .record import RESAMPLING_MAX_VALUES, Context, Procedure

__all__ = ["RECORDS", "MARGIN_INTERVAL_NOTE"]

# Why a bootstrap interval against a margin does not vote: with small groups it is too narrow, so
# it lies inside a margin more often than its level allows.
MARGIN_INTERVAL_NOTE = ("It gives an interval but no test, and with small groups a bootstrap "
                        "interval is too narrow, so it can lie inside the margin more often than "
                        "its level allows; it is shown for its interval, not counted.")

_DIFFERENCE_UNITS = ("units", "percent")
_RATIO_UNITS = ("ratio",)
_MEAN_EFFECTS = ("hedges_g", "cohen_d")
_ORDER_EFFECTS = ("rank_biserial", "common_language")
_PAIRED_EFFECTS = ("paired_d_z", "paired_d_av")


def _margin(spec: AnalysisSpec, context: Context) -> tuple[Margin, str]:
    """The margin in the estimate's units and the words for how it was entered."""
    given = spec.question.margin
    reference = float(np.mean(context.sorted_y)) if context.sorted_y.size else float("nan")
    margin = context.margin if context.margin is not None else given.in_units(reference)
    return margin, given.note(reference)


def _margin_arguments(spec: AnalysisSpec, context: Context) -> dict[str, Any]:
    """The margin (``low``/``high``, or ``margin``/``worse``), the level and the margin's note."""
    margin, note = _margin(spec, context)
    if spec.question.kind == "equivalent":
        ends = dict(low=margin.low, high=margin.high)
    else:
        size = margin.bound if margin.unit == "ratio" else abs(margin.bound)
        ends = dict(margin=size, worse=margin.worse)
    return dict(ends, confidence_level=spec.question.level, margin_note=note)


def _with(extra: Callable[[AnalysisSpec, Context], dict[str, Any]]):
    def arguments(spec: AnalysisSpec, context: Context) -> dict[str, Any]:
        return dict(_margin_arguments(spec, context), **extra(spec, context))
    return arguments


@dataclass(frozen=True)
class _Kind:
    """One kind of margin procedure: its functions for each question kind and what its records
    share."""

    stem: str                       # "welch": keys "equivalence_welch", "noninferiority_welch"
    module: ModuleType
    functions: tuple[str, str]      # equivalence, non-inferiority
    keys: tuple[str, str]
    counterpart: str
    family: str
    estimate_name: str
    estimate_kind: str
    effect_sizes: tuple[str, ...]
    assumption: str
    extra: Callable[[AnalysisSpec, Context], dict[str, Any]] = lambda spec, context: {}
    statistic_label: str | None = None
    design: str = "independent"
    units: tuple[str, ...] = _DIFFERENCE_UNITS
    resampled: bool = False
    needs_equal_spread: bool = False


def _records(kind: _Kind) -> tuple[Procedure, Procedure]:
    fields: dict[str, Any] = {}
    if kind.resampled:
        fields = dict(resampled="bootstrap", votes=False, not_voting_because=MARGIN_INTERVAL_NOTE,
                      max_values=RESAMPLING_MAX_VALUES, work=10.0)
    return tuple(
        Procedure(key=key, name=kind.module.NAMES[key], family=kind.family, module=kind.module,
                  function=function, arguments=_with(kind.extra), estimate_name=kind.estimate_name,
                  estimate_kind=kind.estimate_kind, effect_sizes=kind.effect_sizes,
                  assumption=kind.assumption, statistic_label=kind.statistic_label,
                  no_difference=1.0 if kind.estimate_kind == "ratio" else 0.0,
                  designs=(kind.design,), questions=(question,), counterpart=kind.counterpart,
                  margin_units=kind.units, needs_equal_spread=kind.needs_equal_spread, **fields)
        for key, function, question in zip(kind.keys, kind.functions, ("equivalent", "not_worse")))


def _t_kind(stem: str, counterpart: str, label: str, assumption: str, **fields: Any) -> _Kind:
    spread = "welch" if "welch" in stem else "pooled"
    log = stem.startswith("log")
    module = equivalence_intervals if log else equivalence
    names = ("equivalence_log_t", "noninferiority_log_t") if log else ("equivalence_t", "noninferiority_t")
    return _Kind(stem=stem, module=module, functions=names,
                 keys=(f"equivalence_{stem}", f"noninferiority_{stem}"), counterpart=counterpart,
                 family="t", estimate_name=(equivalence_intervals.RATIO_NAME if log else "difference in means"),
                 estimate_kind="ratio" if log else "mean", effect_sizes=() if log else _MEAN_EFFECTS,
                 assumption=assumption, extra=lambda spec, context: dict(spread=spread),
                 statistic_label=label, **fields)


def _ranked(spec: AnalysisSpec, context: Context) -> dict[str, Any]:
    return dict(method=spec.rank_method, cancelled=context.task.cancelled)


def _signed_ranked(spec: AnalysisSpec, context: Context) -> dict[str, Any]:
    return dict(method=spec.rank_method, zero_rule=spec.zero_rule)


def _resampled(spec: AnalysisSpec, context: Context) -> dict[str, Any]:
    return dict(n_resamples=spec.resamples, rng=context.rng, progress=context.task)


_KINDS: tuple[_Kind, ...] = (
    _t_kind("welch", "welch_t", "Welch t", (
        "Assumes independent values and a mean close to normally distributed, the spreads allowed "
        "to differ, and a margin fixed from the subject matter before the data were seen.")),
    _t_kind("pooled", "pooled_t", "pooled t", (
        "Assumes independent values, a mean close to normally distributed, the same spread in "
        "both groups, and a margin fixed from the subject matter before the data were seen."),
        needs_equal_spread=True),
    _Kind(stem="ranks", module=equivalence_intervals,
          functions=("equivalence_ranks", "noninferiority_ranks"),
          keys=("equivalence_ranks", "noninferiority_ranks"), counterpart="mann_whitney",
          family="rank", estimate_name=equivalence_intervals.SHIFT_NAME, estimate_kind="shift",
          effect_sizes=_ORDER_EFFECTS, extra=_ranked, assumption=(
              "Assumes independent values that can be put in order and two groups of the same "
              "shape and spread, one shifted against the other, so that the Hodges-Lehmann shift "
              "is the difference set against the margin.")),
    _Kind(stem="bootstrap_bca", module=equivalence_intervals,
          functions=("equivalence_bootstrap", "noninferiority_bootstrap"),
          keys=("equivalence_bootstrap_bca", "noninferiority_bootstrap_bca"),
          counterpart="bootstrap_mean", family="resampling", estimate_name="difference in means",
          estimate_kind="mean", effect_sizes=_MEAN_EFFECTS, extra=_resampled, resampled=True,
          assumption=(
              "Assumes independent values and groups large enough to stand in for their "
              "populations; it gives an interval to set against the margin but no p-value, and "
              "with fewer than about 10 values in a group that interval is too narrow.")),
    _t_kind("log_welch", "welch_t", "Welch t", (
        "Assumes positive values whose logarithms have a mean close to normally distributed, so "
        "that the ratio of the geometric means is what the ratio margin bounds."),
        units=_RATIO_UNITS),
    _Kind(stem="paired", module=paired_margin,
          functions=("paired_equivalence", "paired_noninferiority"),
          keys=("paired_equivalence", "paired_noninferiority"), counterpart="paired_t",
          family="t", estimate_name=paired_margin.MEAN_NAME, estimate_kind="mean",
          effect_sizes=_PAIRED_EFFECTS, statistic_label="paired t", design="paired", assumption=(
              "Assumes independent pairs and a mean of the pair differences close to normally "
              "distributed, with a margin fixed from the subject matter before the data were "
              "seen.")),
    _Kind(stem="paired_ranks", module=paired_margin,
          functions=("paired_equivalence_ranks", "paired_noninferiority_ranks"),
          keys=("paired_equivalence_ranks", "paired_noninferiority_ranks"), counterpart="signed_rank",
          family="rank", estimate_name=paired_margin.WALSH_NAME, estimate_kind="shift",
          effect_sizes=(), extra=_signed_ranked, design="paired", assumption=(
              "Assumes independent pairs whose differences are spread symmetrically about their "
              "centre, the Hodges-Lehmann estimate of which is set against the margin.")),
    _Kind(stem="paired_bootstrap", module=paired_margin,
          functions=("paired_equivalence_bootstrap", "paired_noninferiority_bootstrap"),
          keys=("paired_equivalence_bootstrap", "paired_noninferiority_bootstrap"),
          counterpart="paired_bootstrap_mean", family="resampling",
          estimate_name=paired_margin.MEAN_NAME, estimate_kind="mean", effect_sizes=_PAIRED_EFFECTS,
          extra=_resampled, design="paired", resampled=True, assumption=(
              "Assumes independent pairs, enough of them to stand in for their population; it "
              "gives an interval to set against the margin but no p-value, and with fewer than "
              "about 10 pairs that interval is too narrow.")),
)

# Every margin record: the equivalence ones, then the non-inferiority ones, each in the order
# of ``_KINDS``.
RECORDS: tuple[Procedure, ...] = tuple(
    pair[0] for pair in map(_records, _KINDS)) + tuple(pair[1] for pair in map(_records, _KINDS))
