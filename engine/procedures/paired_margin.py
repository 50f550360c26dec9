"""Equivalence and non-inferiority on matched pairs (the differences, group 1 minus group 2).

- :func:`paired_equivalence`, :func:`paired_noninferiority`: one-sided t-tests of the mean
  difference at the margin's ends (Schuirmann 1987), on the paired t of :mod:`.paired`;
- :func:`paired_equivalence_ranks`, :func:`paired_noninferiority_ranks`: the one-sample
  Hodges-Lehmann interval of :mod:`.signed_rank` (the median of the Walsh averages, counted, never
  listed: :mod:`.walsh`) at 1 - 2 alpha, with one-sided signed-rank tests of the differences
  minus each margin end;
- :func:`paired_equivalence_bootstrap`, :func:`paired_noninferiority_bootstrap`: the percentile
  bootstrap interval of the mean difference at 1 - 2 alpha, the pairs resampled whole; no p-value.

Each is put together as the margin procedures of two independent groups are
(:func:`engine.procedures.equivalence.margin_result`): the interval at 1 - 2 alpha, the
(1 - alpha) ``difference_interval`` for an equivalence margin, ``margin_note``.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from ..results import ProcedureResult, frozen_mapping
from ..tasks import Progress, Task
from .equivalence import (Ends, MarginTest, margin_alpha, margin_ends, margin_result, narrow_level,
                          t_margin, worse_end)
from .equivalence_intervals import bootstrap_margin
from .paired import paired_bootstrap_mean, paired_differences, paired_t
from .signed_rank import signed_rank, signed_rank_test

__all__ = ["paired_equivalence", "paired_noninferiority", "paired_equivalence_ranks",
           "paired_noninferiority_ranks", "paired_equivalence_bootstrap",
           "paired_noninferiority_bootstrap", "NAMES"]

# The plain name of each procedure in this module.
NAMES = frozen_mapping({
    "paired_equivalence": "two one-sided tests on the pair differences",
    "paired_noninferiority": "non-inferiority t-test on the pair differences",
    "paired_equivalence_ranks": "equivalence of the pair differences' Hodges-Lehmann estimate",
    "paired_noninferiority_ranks": "non-inferiority of the pair differences' Hodges-Lehmann estimate",
    "paired_equivalence_bootstrap": "equivalence by the bootstrap of the pair differences",
    "paired_noninferiority_bootstrap": "non-inferiority by the bootstrap of the pair differences",
})
MEAN_NAME = "mean of the pair differences"
WALSH_NAME = "median of the pairwise averages of the differences"


def _t(x: Any, y: Any, ends: Ends, confidence_level: float, margin_note: str | None) -> ProcedureResult:
    test = t_margin(paired_t, x, y, ends, confidence_level=confidence_level)
    tests = "two one-sided t-tests" if ends.equivalence else "a one-sided t-test"
    return margin_result(test, ends, keys=("paired_equivalence", "paired_noninferiority"), names=NAMES,
                         estimate_name=MEAN_NAME, statistic_name="paired t",
                         how=f"{tests} of the mean pair difference", margin_note=margin_note)


def paired_equivalence(x: Any, y: Any, *, low: float, high: float, confidence_level: float = 0.95,
                       margin_note: str | None = None) -> ProcedureResult:
    """Two one-sided t-tests on the pair differences: H0 mean(d) <= low or mean(d) >= high.

    ``confidence_level`` is 1 - alpha of the whole test; the interval is the two-sided
    (1 - 2 alpha) one, inside the margin exactly when both one-sided tests reject. The p-value is
    the larger one-sided p-value; ``details`` holds both.
    """
    return _t(x, y, margin_ends(low, high), confidence_level, margin_note)


def paired_noninferiority(x: Any, y: Any, *, margin: float, worse: str, confidence_level: float = 0.95,
                          margin_note: str | None = None) -> ProcedureResult:
    """The one-sided t-test of the mean pair difference at the margin's end on the ``worse`` side
    (lower worse: H0 mean(d) <= -``margin``; higher worse: H0 mean(d) >= ``margin``)."""
    return _t(x, y, worse_end(margin, worse), confidence_level, margin_note)


def _ranks(x: Any, y: Any, ends: Ends, confidence_level: float, zero_rule: str, method: str,
           margin_note: str | None) -> ProcedureResult:
    alpha = margin_alpha(confidence_level)
    d = paired_differences(x, y)
    options = dict(zero_rule=zero_rule, method=method)
    narrow = signed_rank(d, confidence_level=narrow_level(alpha), **options)
    wide = signed_rank(d, confidence_level=1.0 - alpha, **options) if ends.equivalence else None
    # the signed-rank tests of the differences shifted by each margin end
    p_lower = (None if ends.low is None else
               signed_rank_test(d - ends.low, alternative="greater", **options).p_value)
    p_upper = (None if ends.high is None else
               signed_rank_test(d - ends.high, alternative="less", **options).p_value)
    test = MarginTest(estimate=narrow.estimate, interval=narrow.interval,
                      difference_interval=None if wide is None else wide.interval,
                      p_lower=p_lower, p_upper=p_upper,
                      details=dict(zero_rule=zero_rule, exact=narrow.details["exact"],
                                   pairs=int(d.size)),
                      warnings=narrow.warnings)
    tests = "two one-sided signed-rank tests" if ends.equivalence else "a one-sided signed-rank test"
    return margin_result(test, ends, keys=("paired_equivalence_ranks", "paired_noninferiority_ranks"),
                         names=NAMES, estimate_name=WALSH_NAME, statistic_name=None,
                         how=(f"the one-sample Hodges-Lehmann interval of the pair differences with "
                              f"{tests} of the differences minus the margin end ({narrow.method})"),
                         margin_note=margin_note)


def paired_equivalence_ranks(x: Any, y: Any, *, low: float, high: float, confidence_level: float = 0.95,
                             zero_rule: str = "drop", method: str = "auto",
                             margin_note: str | None = None) -> ProcedureResult:
    """Equivalence of the pair differences' Hodges-Lehmann estimate: its (1 - 2 alpha)
    distribution-free interval inside the margin. The p-value is the larger of the one-sided
    signed-rank p-values of d - ``low`` above 0 and d - ``high`` below 0 (``zero_rule`` for the
    differences equal to an end; ``method`` "auto", "exact" or "normal"). Without ties among the
    Walsh averages the interval inverts those tests, so p < alpha goes with it inside the margin."""
    return _ranks(x, y, margin_ends(low, high), confidence_level, zero_rule, method, margin_note)


def paired_noninferiority_ranks(x: Any, y: Any, *, margin: float, worse: str,
                                confidence_level: float = 0.95, zero_rule: str = "drop",
                                method: str = "auto", margin_note: str | None = None) -> ProcedureResult:
    """Non-inferiority by the signed-rank test of the differences minus the margin's worse end,
    with the (1 - 2 alpha) Hodges-Lehmann interval."""
    return _ranks(x, y, worse_end(margin, worse), confidence_level, zero_rule, method, margin_note)


def _bootstrap(x: Any, y: Any, ends: Ends, confidence_level: float, n_resamples: int,
               rng: np.random.Generator | None, progress: Progress | Task | None,
               margin_note: str | None) -> ProcedureResult:
    def run(level: float, generator: np.random.Generator, task: Task) -> ProcedureResult:
        task.check()
        result = paired_bootstrap_mean(x, y, confidence_level=level, n_resamples=n_resamples,
                                       rng=generator)
        task.report(1.0)
        return result

    test = bootstrap_margin(run, ends, confidence_level=confidence_level, rng=rng, progress=progress)
    return margin_result(test, ends, keys=("paired_equivalence_bootstrap", "paired_noninferiority_bootstrap"),
                         names=NAMES, estimate_name=MEAN_NAME, statistic_name=None,
                         how=(f"the percentile bootstrap interval of the mean pair difference "
                              f"({n_resamples:,} resamples of whole pairs)"),
                         margin_note=margin_note)


def paired_equivalence_bootstrap(x: Any, y: Any, *, low: float, high: float,
                                 confidence_level: float = 0.95, n_resamples: int = 10_000,
                                 rng: np.random.Generator | None = None,
                                 progress: Progress | Task | None = None,
                                 margin_note: str | None = None) -> ProcedureResult:
    """Equivalence of the mean pair difference by its percentile bootstrap interval at
    1 - 2 alpha inside the margin; no p-value."""
    return _bootstrap(x, y, margin_ends(low, high), confidence_level, n_resamples, rng, progress,
                      margin_note)


def paired_noninferiority_bootstrap(x: Any, y: Any, *, margin: float, worse: str,
                                    confidence_level: float = 0.95, n_resamples: int = 10_000,
                                    rng: np.random.Generator | None = None,
                                    progress: Progress | Task | None = None,
                                    margin_note: str | None = None) -> ProcedureResult:
    """Non-inferiority of the mean pair difference by its percentile bootstrap interval at
    1 - 2 alpha; no p-value."""
    return _bootstrap(x, y, worse_end(margin, worse), confidence_level, n_resamples, rng, progress,
                      margin_note)
