"""The procedure records of a paired design (the pair differences, group 1 minus group 2).

Gathered into :data:`engine.procedures.registry.RECORDS` after the records of a difference between
two independent groups. Each record's function is called with the two matched samples (pair i in
place i of each); those that work on the differences alone also get them from the analysis
(``Context.differences``), formed once.
"""

from __future__ import annotations

from typing import Any

from ..spec import AnalysisSpec
from . import pair_differences, paired
from .record import (INTERVAL_ONLY_NOTE, RESAMPLING_MAX_VALUES, Context, Procedure,
                     question_arguments)

__all__ = ["RECORDS", "PAIRED_EFFECTS"]

# The effect sizes of a difference in means of matched pairs (engine.paired_effects).
PAIRED_EFFECTS = ("paired_d_z", "paired_d_av")
_DESIGN = ("paired",)
_MEAN_OF_DIFFERENCES = paired.NAMES  # the plain names of paired.py's procedures


def _means(spec: AnalysisSpec, context: Context) -> dict[str, Any]:
    return question_arguments(spec)


def _ranked(spec: AnalysisSpec, context: Context) -> dict[str, Any]:
    return dict(question_arguments(spec), differences=context.differences,
                zero_rule=spec.zero_rule, method=spec.rank_method)


def _sign_flips(spec: AnalysisSpec, context: Context) -> dict[str, Any]:
    return dict(alternative=spec.question.alternative, differences=context.differences,
                n_resamples=spec.resamples, rng=context.rng, progress=context.task)


def _bootstrap(spec: AnalysisSpec, context: Context) -> dict[str, Any]:
    return dict(question_arguments(spec), n_resamples=spec.resamples, rng=context.rng,
                progress=context.task)


RECORDS: tuple[Procedure, ...] = (
    Procedure(
        key="paired_t", name=_MEAN_OF_DIFFERENCES["paired_t"], family="t", module=paired,
        function="paired_t", arguments=_means, estimate_name="mean of the pair differences",
        estimate_kind="mean", effect_sizes=PAIRED_EFFECTS, statistic_label="paired t",
        designs=_DESIGN,
        assumption=("Assumes that the pairs are independent of one another (each unit measured "
                    "once in each group) and that the mean of the differences is close to "
                    "normally distributed (true for bell-shaped differences, or for many pairs); "
                    "only the shape of the differences matters, not those of the two groups.")),
    Procedure(
        key="signed_rank", name=pair_differences.NAMES["signed_rank"], family="rank",
        module=pair_differences, function="signed_rank_pairs", arguments=_ranked,
        estimate_name="median of the pairwise averages of the differences",
        estimate_kind="shift", effect_sizes=(), statistic_label="Wilcoxon T+",
        statistic_in_halves=True, designs=_DESIGN, work=2.0,
        assumption=("Assumes independent pairs whose differences can be put in order by size, "
                    "and tests whether they are spread symmetrically around zero: a small "
                    "p-value says they lean to one side, its estimate (Hodges-Lehmann, the median "
                    "of the averages of every two differences) is a typical shift close to the "
                    "median difference, and for lopsided differences it is no test of the mean; "
                    "pairs with no difference are dropped, or ranked and given no sign, as "
                    "chosen, and the p-value under the other rule is reported too.")),
    Procedure(
        key="sign_flip_mean", name=pair_differences.NAMES["sign_flip_mean"], family="resampling",
        module=pair_differences, function="sign_flip_pairs", arguments=_sign_flips,
        estimate_name="mean of the pair differences", estimate_kind="mean", effect_sizes=PAIRED_EFFECTS,
        resampled="permutation", max_values=RESAMPLING_MAX_VALUES, designs=_DESIGN, work=10.0,
        assumption=("Assumes independent pairs and that, if the groups did not differ, each "
                    "pair's difference would be as likely to come out positive as negative "
                    "(differences symmetric about zero); it compares the mean difference without "
                    "needing a bell shape, counting every pattern of signs when there are few "
                    "pairs, and far values still pull the mean it compares.")),
    Procedure(
        key="paired_bootstrap_mean", name=_MEAN_OF_DIFFERENCES["paired_bootstrap_mean"],
        family="resampling", module=paired, function="paired_bootstrap_mean",
        arguments=_bootstrap, estimate_name="mean of the pair differences", estimate_kind="mean",
        effect_sizes=PAIRED_EFFECTS, resampled="bootstrap", votes=False,
        not_voting_because=INTERVAL_ONLY_NOTE, max_values=RESAMPLING_MAX_VALUES, designs=_DESIGN,
        work=10.0,
        assumption=("Assumes independent pairs, enough of them to stand in for all such units "
                    "(the pairs are resampled whole); it gives an interval for the mean "
                    "difference but no p-value, and with fewer than about 10 pairs the interval "
                    "is too narrow, missing the true difference more often than stated "
                    "(Hesterberg 2015, The American Statistician 69:371).")),
)
