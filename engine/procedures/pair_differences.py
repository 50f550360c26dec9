"""The procedures of matched pairs that work on the differences alone, called as every procedure
record calls its function: with the two matched samples first.

- :func:`signed_rank_pairs`: the Wilcoxon signed-rank test with the one-sample Hodges-Lehmann
  estimate (:func:`.signed_rank.signed_rank`) under the zero rule asked for, with the p-value
  under the other rule in ``details`` too, so that both rules are offered;
- :func:`sign_flip_pairs`: the sign-flip permutation test of the mean difference
  (:func:`.sign_flip.sign_flip_test`).

Each takes the differences (group 1 minus group 2, pair by pair) when the analysis has formed
them once (``differences``); otherwise it forms them from ``x`` and ``y``, checking that both
hold one number per pair.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from ..results import ProcedureResult, frozen_mapping
from ..tasks import CancelCheck, Progress, Task
from .paired import paired_differences
from .sign_flip import sign_flip_test
from .signed_rank import ZERO_RULES, signed_rank, signed_rank_test

__all__ = ["NAMES", "signed_rank_pairs", "sign_flip_pairs", "other_zero_rule"]

# The plain name of each procedure in this module, as its result gives it.
NAMES = frozen_mapping({
    "signed_rank": "Wilcoxon signed-rank test with Hodges-Lehmann estimate",
    "sign_flip_mean": "sign-flip permutation test, mean difference",
})


def _differences(x: Any, y: Any, differences: Any) -> np.ndarray:
    """The differences as given, else ``x - y`` pair by pair after the pair checks."""
    if differences is not None:
        return np.asarray(differences, dtype=float)
    return paired_differences(x, y, minimum=1)


def other_zero_rule(zero_rule: str) -> str:
    """The rule for zero differences that is not ``zero_rule``: "drop" <-> "pratt"."""
    return ZERO_RULES[1 - ZERO_RULES.index(zero_rule)]


def signed_rank_pairs(x: Any, y: Any, *, differences: Any = None, zero_rule: str = "drop",
                      alternative: str = "two-sided", confidence_level: float = 0.95,
                      method: str = "auto", correction: bool = True) -> ProcedureResult:
    """The signed-rank test of the pair differences under ``zero_rule``, with both rules offered.

    ``details`` gains, for each rule ("drop": zeros removed before ranking, Wilcoxon's;
    "pratt": zeros ranked, then given no sign), the p-value (``p_value_drop``,
    ``p_value_pratt``), the statistic T+ (``statistic_drop``, ``statistic_pratt``) and whether
    the p-value is exact (``exact_drop``, ``exact_pratt``); the result's own p-value is the one
    of ``zero_rule``. Without zero differences the two rules agree.

    References
    ----------
    Wilcoxon, F. (1945). Individual comparisons by ranking methods. Biometrics Bulletin 1, 80-83.
    Pratt, J. W. (1959). Remarks on zeros and ties in the Wilcoxon signed rank procedures.
    JASA 54, 655-667.
    """
    d = _differences(x, y, differences)
    result = signed_rank(d, zero_rule=zero_rule, alternative=alternative,
                         confidence_level=confidence_level, method=method, correction=correction)
    other = other_zero_rule(zero_rule)
    second = signed_rank_test(d, zero_rule=other, alternative=alternative, method=method,
                              correction=correction)
    by_rule = {zero_rule: (result.p_value, result.statistic, result.details["exact"]),
               other: (second.p_value, second.statistic, second.exact)}
    details = dict(result.details)
    for rule, (p_value, statistic, exact) in by_rule.items():
        details[f"p_value_{rule}"] = p_value
        details[f"statistic_{rule}"] = statistic
        details[f"exact_{rule}"] = exact
    return ProcedureResult(
        key=result.key, name=result.name, estimate=result.estimate,
        estimate_name=result.estimate_name, statistic=result.statistic,
        statistic_name=result.statistic_name, df=result.df, p_value=result.p_value,
        interval=result.interval, alternative=result.alternative, method=result.method,
        details=details, warnings=result.warnings)


def sign_flip_pairs(x: Any, y: Any, *, differences: Any = None, alternative: str = "two-sided",
                    n_resamples: int = 10_000, rng: np.random.Generator | None = None,
                    progress: Progress | Task | None = None,
                    cancelled: CancelCheck | None = None) -> ProcedureResult:
    """The sign-flip permutation test of the mean pair difference (every sign pattern counted
    when there are no more of them than ``n_resamples``, else that many random ones)."""
    return sign_flip_test(_differences(x, y, differences), alternative=alternative,
                          n_resamples=n_resamples, rng=rng, progress=progress,
                          cancelled=cancelled)
