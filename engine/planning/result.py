"""The answers of a plan: :class:`PlanResult` (one plan) and :class:`PowerCurve` (power along a
range of sizes or differences). Raw numbers only; the sentence is built from them once."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .plan import Plan

__all__ = ["PlanResult", "PowerCurve", "CURVE_AXES"]

# What a power curve runs along: the size per group (pairs), or the true difference.
CURVE_AXES: tuple[str, ...] = ("n", "difference")


@dataclass(frozen=True)
class PlanResult:
    """What a plan found, with everything it assumed.

    ``plan``: the plan as asked. ``n1``, ``n2``: the group sizes (the answer when the size was
    asked: the smallest whole sizes reaching the power; equal for pairs). ``power``: the power at
    those sizes and ``difference`` (the achieved power when the size was asked). ``difference``:
    the true difference (group 1 minus group 2; the answer when the smallest detectable
    difference was asked). ``sd1``, ``sd2``: the SDs assumed (the pilot values' when planned from
    a pilot; paired: the SD of the differences, twice). ``effect``: the difference over the SD
    (independent: over sqrt((sd1^2 + sd2^2) / 2), Cohen's d; paired: over the SD of the
    differences, d_z), named by ``effect_name``. ``method``: "exact", "approximation" or
    "simulation", said in full by ``method_words``. ``monte_carlo_se``, ``simulations``,
    ``seed``: the simulation's standard error of the power, its number of studies and its seed
    (None when not simulated). ``continuous_n``: the size (group 1) at which the formula reaches
    the power exactly, before rounding up (None when simulated or not asked). ``df``: the test's
    degrees of freedom at the answer (None for z, ranks and simulations). ``formula_power``: for
    comparison beside a simulation, the normal-theory (or asymptotic) power at the same sizes and
    SDs, else None; ``formula_words`` says which formula. ``procedure_name``: the test in words. ``notes``: what the reader should know
    (a method switched, a size at its floor). ``sentence``: the plan in one sentence for a
    protocol.
    """

    plan: Plan
    n1: int
    n2: int
    power: float
    difference: float
    sd1: float
    sd2: float
    effect: float
    effect_name: str
    method: str
    method_words: str
    procedure_name: str
    monte_carlo_se: float | None = None
    simulations: int | None = None
    seed: int | None = None
    continuous_n: float | None = None
    df: float | None = None
    formula_power: float | None = None
    formula_words: str = ""
    notes: tuple[str, ...] = ()
    sentence: str = ""


@dataclass(frozen=True, eq=False)
class PowerCurve:
    """Power along ``over`` ("n": the size of group 1, group 2 following the plan's ratio;
    "difference": the true difference) at the points ``x``; ``power`` and, for a simulation,
    ``monte_carlo_se`` (else None) are arrays of the same length, read-only. ``plan`` is the plan
    whose other inputs stay fixed along the curve."""

    plan: Plan
    over: str
    x: np.ndarray
    power: np.ndarray
    monte_carlo_se: np.ndarray | None
    method: str
