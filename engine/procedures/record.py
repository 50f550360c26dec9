"""What a procedure record is: the :class:`Procedure` fields and the :class:`Context` a run gets.

The records themselves are gathered in :mod:`engine.procedures.registry`; the records of one
kind of procedure may live in a module of their own (e.g. the paired ones, the margin ones),
each building :class:`Procedure` values from this module.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from types import ModuleType
from typing import Any, Callable

import numpy as np

from ..question import ALL_KINDS, KINDS, MARGIN_UNITS, Margin
from ..results import ProcedureResult
from ..spec import DESIGNS, AnalysisSpec
from ..tasks import Task

__all__ = ["Procedure", "Context", "question_arguments", "DESIGNS", "INPUTS", "FAMILIES", "ESTIMATE_KINDS",
           "RESAMPLING_MAX_VALUES", "INTERVAL_ONLY_NOTE", "EXCHANGEABLE_NOTE"]

# The designs a procedure can serve are ``engine.spec.DESIGNS``: "independent", "paired".
# What a procedure needs to be given: the values themselves, or summary statistics of each group.
INPUTS = ("raw", "summary")
FAMILIES = ("t", "rank", "resampling")
# What the estimate is: a difference in means or in medians, a rank-based shift (Hodges-Lehmann),
# or a probability (of a value of group 1 being the larger).
ESTIMATE_KINDS = ("mean", "median", "shift", "probability", "ratio")

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
    ``margin``: the question's margin in the estimate's units (a percentage of group 2's mean
    already converted), for the procedures of a margin question; None otherwise.
    ``differences``: group 1 minus group 2 pair by pair, in a paired design; None otherwise.
    """

    sorted_x: np.ndarray
    sorted_y: np.ndarray
    rng: np.random.Generator
    task: Task = field(default_factory=Task)
    shared_draws: dict = field(default_factory=dict)
    margin: Margin | None = None
    differences: np.ndarray | None = None



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
    ``work``: its share of the progress bar, relative to the others. ``designs``: the designs
    it serves (``engine.spec.DESIGNS``); ``questions``: the question kinds it answers.
    ``counterpart``: for a procedure of a margin question (equivalence, non-inferiority), the key
    of the procedure for a difference whose assumptions it shares (so the advice for a difference
    carries over: "welch_t" for the two one-sided Welch tests). ``margin_units``: the units of
    a margin it accepts (``engine.question.MARGIN_UNITS``; a ratio margin runs only the log-scale
    procedures), None for a procedure of a difference. ``needs_equal_spread``: it runs only when
    the user stated equal spreads (the pooled margin procedures).
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
    counterpart: str | None = None
    margin_units: tuple[str, ...] | None = None
    needs_equal_spread: bool = False

    def __post_init__(self) -> None:
        if self.family not in FAMILIES or self.estimate_kind not in ESTIMATE_KINDS:
            raise ValueError(f"record {self.key!r}: unknown family or estimate kind")
        if self.input not in INPUTS or not set(self.designs) <= set(DESIGNS):
            raise ValueError(f"record {self.key!r}: unknown input or design")
        if not set(self.questions) <= set(ALL_KINDS):
            raise ValueError(f"record {self.key!r}: unknown question kind")
        if self.margin_units is not None and not set(self.margin_units) <= set(MARGIN_UNITS):
            raise ValueError(f"record {self.key!r}: unknown margin unit")
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
        """Whether what the user stated lets it run: the z-test needs known SDs, the pooled margin
        procedures stated equal spreads, and a margin procedure a margin in units it accepts."""
        if self.needs_known_sd and spec.statements.known_sd is None:
            return False
        if self.needs_equal_spread and not spec.statements.equal_spread_known:
            return False
        margin = spec.question.margin
        return self.margin_units is None or margin is None or margin.unit in self.margin_units

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


def question_arguments(spec: AnalysisSpec) -> dict[str, Any]:
    """The keywords every procedure of a difference takes from the question: its direction and
    confidence level."""
    return dict(alternative=spec.question.alternative, confidence_level=spec.question.level)
