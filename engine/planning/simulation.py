"""Power by simulation: many studies drawn at once, each judged by the engine's own test.

A study's values come from a shape (:mod:`engine.planning.shapes`, scaled by the plan's SDs) or
from pilot values resampled with replacement, each group centred on 0 and widened by
sqrt(n / (n - 1)) so that the resampled population has the pilot's sample SD; group 1 (or each
pair difference) is then shifted by the true difference. The studies run in batches of about
``BATCH_VALUES`` values, so memory stays bounded whatever the number of studies; progress is
reported and a cancel request honoured after each batch.

The same seed gives the same studies: searches for a size or a difference therefore compare
powers on common random numbers, and the power found by simulation grows with the difference
study by study (shifting group 1 up never lowers a t statistic or U).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..tasks import Task
from . import batch_tests
from .plan import Plan
from .shapes import draw

__all__ = ["Simulated", "StudySource", "simulate_power", "BATCH_VALUES"]

# Values drawn per batch (both groups): 2 MB of float64 for each array a test forms, and a
# batch of rank tests takes some tens of milliseconds, so progress and a cancel request are
# seen often.
BATCH_VALUES = 250_000


@dataclass(frozen=True)
class Simulated:
    """The simulated power, its Monte Carlo standard error sqrt(p (1 - p) / studies), the number
    of studies, and how many of them had ties judged by the normal approximation."""

    power: float
    se: float
    studies: int
    tied_by_normal: int


class StudySource:
    """Draws the values of simulated studies for one plan (no difference added)."""

    def __init__(self, plan: Plan) -> None:
        self.paired = plan.design == "paired"
        self.shape = plan.shape
        self.sd1, self.sd2 = plan.sds
        self.pools: tuple[np.ndarray, ...] | None = None
        if plan.pilot is not None:
            groups = [plan.pilot.group1] + ([] if self.paired else [plan.pilot.group2])
            self.pools = tuple((g - g.mean()) * math.sqrt(g.size / (g.size - 1.0)) for g in groups)

    def draw(self, rng: np.random.Generator, studies: int, n1: int, n2: int
             ) -> tuple[np.ndarray, np.ndarray | None]:
        if self.pools is not None:
            first = self.pools[0][rng.integers(0, self.pools[0].size, (studies, n1))]
            if self.paired:
                return first, None
            return first, self.pools[1][rng.integers(0, self.pools[1].size, (studies, n2))]
        first = draw(self.shape, rng, (studies, n1))
        first *= self.sd1
        if self.paired:
            return first, None
        second = draw(self.shape, rng, (studies, n2))
        second *= self.sd2
        return first, second


def _p_values(plan: Plan, x: np.ndarray, y: np.ndarray | None,
              sds: tuple[float, float]) -> batch_tests.RankPValues:
    question = plan.question
    alternative = question.alternative
    if plan.procedure == "mann_whitney":
        if y is None:
            return batch_tests.signed_rank_p(x, alternative)
        return batch_tests.mann_whitney_p(x, y, alternative)
    if y is None:
        moments = batch_tests.paired_moments(x, plan.procedure, sds[0])
    else:
        moments = batch_tests.two_group_moments(x, y, plan.procedure, sds)
    if question.has_margin:
        margin = question.margin
        p = batch_tests.margin_p_values(moments, question.kind, margin.low, margin.high,
                                        margin.bound, alternative)
    else:
        p = batch_tests.t_p_values(moments, alternative)
    return batch_tests.RankPValues(p, 0)


def simulate_power(plan: Plan, source: StudySource, n1: int, n2: int, difference: float, *,
                   seed: int, task: Task | None = None) -> Simulated:
    """The share of ``plan.simulations`` simulated studies of sizes ``n1``, ``n2`` (pairs: n1)
    whose test answers the plan's question with "yes" (p below alpha) at the true ``difference``.
    """
    task = task or Task()
    rng = np.random.default_rng(seed)
    total = plan.simulations
    per_batch = max(1, BATCH_VALUES // (n1 + (0 if source.paired else n2)))
    alpha = plan.alpha
    yes = tied = done = 0
    while done < total:
        task.report(done / total)
        studies = min(per_batch, total - done)
        x, y = source.draw(rng, studies, n1, n2)
        x += difference
        result = _p_values(plan, x, y, (source.sd1, source.sd2))
        yes += int(np.count_nonzero(result.p < alpha))
        tied += result.tied_by_normal
        done += studies
    task.report(1.0)
    power = yes / total
    return Simulated(power, math.sqrt(power * (1.0 - power) / total), total, tied)
