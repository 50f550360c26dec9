"""From a :class:`Plan` to its :class:`PlanResult`: the power at given sizes, the smallest sizes
reaching a power, or the smallest difference detectable with it; and power curves.

Exact and approximate powers come from formulas (:mod:`.exact_power`, :mod:`.equivalence_power`,
:mod:`.rank_approximation`); sizes and differences from a monotone root search on them (Brent's
method on a continuous size, then the smallest whole size that reaches the power). Simulated
powers come from :mod:`.simulation`; their searches bisect on whole sizes or on the difference
with the same simulated studies at every step (common random numbers).

Long work takes ``progress(fraction, what)`` and ``cancelled()`` (or an :class:`engine.tasks.Task`)
and raises :class:`engine.errors.Cancelled` when asked to stop.
"""

from __future__ import annotations

import math
import secrets
from typing import Callable

import numpy as np

from ..errors import OptionProblem
from ..results import readonly_array
from ..root_finding import brent_root
from ..tasks import CancelCheck, Progress, Task
from .equivalence_power import equivalence_power
from .exact_power import power_of_shift, root_mean_square, spread, test_shift
from .plan import MAX_N, MIN_N, Plan
from .rank_approximation import noether_power, probability_greater
from .result import CURVE_AXES, PlanResult, PowerCurve
from .sentence import effect_name, procedure_name, protocol_sentence
from .simulation import StudySource, simulate_power
from .shapes import SHAPE_WORDS

__all__ = ["plan_study", "power_curve", "CURVE_POINTS"]

CURVE_POINTS = 50
# A simulated search for a size or a difference gives each trial this share of the progress.
_SEARCH_SHARE = 1 / 12
# A simulated search for a difference stops when its bracket is this narrow, relative to its top.
_DIFFERENCE_TOLERANCE = 0.005


class _Powers:
    """The power of one plan at any sizes and difference, by the plan's method."""

    def __init__(self, plan: Plan, seed: int | None) -> None:
        self.plan = plan
        self.sd1, self.sd2 = plan.sds
        self.simulated = plan.simulated
        self.seed = seed
        self.source = StudySource(plan) if self.simulated else None
        self.known: dict[tuple[int, int, float], tuple[float, float, int]] = {}
        if self.simulated:
            self.method = "simulation"
        elif plan.procedure == "mann_whitney":
            self.method = "approximation"
        else:
            self.method = "exact"

    # -- formulas ------------------------------------------------------------------------------

    def normal_theory(self, n1: float, n2: float, difference: float) -> float:
        """The t or z test's power under normal spread (for the rank tests, the t-test's: a
        starting point for their searches)."""
        plan = self.plan
        procedure = "welch" if plan.procedure == "mann_whitney" else plan.procedure
        spread_ = spread(procedure, plan.design, self.sd1, self.sd2, n1, n2)
        question = plan.question
        if question.kind == "equivalent":
            return equivalence_power(difference, question.margin.low, question.margin.high,
                                     spread_, plan.alpha)
        bound = question.margin.bound if question.margin is not None else None
        return power_of_shift(test_shift(difference, question.kind, bound), spread_, plan.alpha,
                              plan.alternative)

    def formula(self, n1: float, n2: float, difference: float) -> float | None:
        """The formula's power: exact for t and z, Noether's for Mann-Whitney (independent);
        None for the signed-rank test, which has no formula here."""
        plan = self.plan
        if plan.procedure != "mann_whitney":
            return self.normal_theory(n1, n2, difference)
        if plan.design == "paired":
            return None
        shape = plan.shape if plan.pilot is None else "normal"
        return noether_power(probability_greater(difference, self.sd1, self.sd2, shape),
                             n1, n2, plan.alpha, plan.alternative)

    def guide(self, n1: float, n2: float, difference: float) -> float:
        """A formula to start a simulated search from."""
        value = self.formula(n1, n2, difference)
        return self.normal_theory(n1, n2, difference) if value is None else value

    # -- the power by the plan's method ----------------------------------------------------------

    def at(self, n1: int, n2: int, difference: float, task: Task) -> tuple[float, float | None]:
        if not self.simulated:
            task.check()
            return self.formula(n1, n2, difference), None
        key = (n1, n2, float(difference))
        if key not in self.known:
            found = simulate_power(self.plan, self.source, n1, n2, difference, seed=self.seed,
                                   task=task)
            self.known[key] = (found.power, found.se, found.tied_by_normal)
        power, se, _ = self.known[key]
        return power, se

    def tied(self, n1: int, n2: int, difference: float) -> int:
        return self.known.get((n1, n2, float(difference)), (0, 0, 0))[2]


# -- checks of what can be reached -------------------------------------------------------------

def _check_reachable(plan: Plan, difference: float) -> None:
    """Refuse a difference no size can detect, in words that say what to change."""
    kind, margin, unit = plan.question.kind, plan.question.margin, plan.unit
    said = f"{difference:g}" + (f" {unit}" if unit else "")
    if kind == "differ" and difference == 0:
        raise OptionProblem("A difference of 0 cannot be detected; give the difference that matters.")
    if kind == "higher" and difference <= 0:
        raise OptionProblem(f"The question asks whether group 1 is higher, so the difference to "
                            f"detect must be above 0, not {said}.")
    if kind == "lower" and difference >= 0:
        raise OptionProblem(f"The question asks whether group 1 is lower, so the difference to "
                            f"detect must be below 0, not {said}.")
    if kind == "equivalent" and not margin.low < difference < margin.high:
        raise OptionProblem(f"The true difference {said} lies outside the margin {margin.low:g} to "
                            f"{margin.high:g}, so equivalence cannot be shown at any size.")
    if kind == "not_worse":
        beyond = difference <= margin.bound if margin.worse == "lower" else difference >= margin.bound
        if beyond:
            raise OptionProblem(f"The true difference {said} is as bad as the margin "
                                f"{margin.bound:g} or worse, so non-inferiority cannot be shown "
                                "at any size.")


# -- searches ----------------------------------------------------------------------------------

def _too_large() -> OptionProblem:
    return OptionProblem(f"The power wanted would need more than {MAX_N:,} per group; a larger "
                         "difference, a smaller SD or a lower power can be planned.")


def _size_by_formula(plan: Plan, power_at: Callable[[float, float], float]
                     ) -> tuple[int, float | None]:
    """The smallest whole size of group 1 reaching the power, and the continuous root."""
    target = plan.power

    def gap(n: float) -> float:
        return power_at(n, n * plan.ratio if plan.design != "paired" else n) - target

    def whole(n: int) -> float:
        return power_at(*plan.sizes_for(n)) - target

    low = float(MIN_N)
    if gap(low) >= 0:
        return MIN_N, None
    high = 4.0
    while gap(high) < 0:
        low, high = high, high * 2
        if high > MAX_N:
            if gap(float(MAX_N)) < 0:
                raise _too_large()
            high = float(MAX_N)
    root = brent_root(gap, low, high, xtol=1e-10, rtol=1e-13)
    n = max(MIN_N, math.ceil(root - 1e-9))
    while whole(n) < 0:
        n += 1
        if n > MAX_N:
            raise _too_large()
    while n > MIN_N and whole(n - 1) >= 0:
        n -= 1
    return n, root


def _size_by_simulation(plan: Plan, powers: _Powers, difference: float, task: Task) -> int:
    """The smallest whole size of group 1 whose simulated power reaches the plan's, by bisection
    on common random numbers, starting from the formula's size."""
    target = plan.power

    def reaches(n: int) -> bool:
        n1, n2 = plan.sizes_for(n)
        return powers.at(n1, n2, difference, task.step(_SEARCH_SHARE, f"simulating {n1} per group"))[0] >= target

    try:
        guess, _ = _size_by_formula(plan, lambda a, b: powers.guide(a, b, difference))
    except OptionProblem:
        guess = 10
    if reaches(guess):
        high, low = guess, guess
        while low > MIN_N:
            low = max(MIN_N, low // 2)
            if not reaches(low):
                break
            high = low
        else:
            return MIN_N
    else:
        low, high = guess, guess * 2
        while not reaches(high):
            if high >= MAX_N:
                raise _too_large()
            low, high = high, min(MAX_N, high * 2)
    while high - low > 1:
        middle = (low + high) // 2
        if reaches(middle):
            high = middle
        else:
            low = middle
    return high


def _difference_by_formula(plan: Plan, power_at: Callable[[float], float], start: float) -> float:
    """The smallest |difference| (signed as the question asks) whose power reaches the plan's."""
    sign = -1.0 if plan.alternative == "less" else 1.0
    target = plan.power

    def gap(size: float) -> float:
        return power_at(sign * size) - target

    high = start
    while gap(high) < 0:
        high *= 2
    return sign * brent_root(gap, 0.0, high, xtol=1e-12 * start, rtol=1e-12)


def _difference_by_simulation(plan: Plan, powers: _Powers, n1: int, n2: int, task: Task) -> float:
    sign = -1.0 if plan.alternative == "less" else 1.0
    target = plan.power

    def reaches(size: float) -> bool:
        step = task.step(_SEARCH_SHARE, f"simulating a difference of {sign * size:.4g}")
        return powers.at(n1, n2, sign * size, step)[0] >= target

    guess = abs(_difference_by_formula(plan, lambda d: powers.guide(n1, n2, d), max(powers.sd1, powers.sd2)))
    low, high = 0.0, guess
    while not reaches(high):
        low, high = high, high * 2
    while high - low > _DIFFERENCE_TOLERANCE * high:
        middle = (low + high) / 2
        if reaches(middle):
            high = middle
        else:
            low = middle
    return sign * high


# -- the answer --------------------------------------------------------------------------------

def _method_words(plan: Plan, powers: _Powers) -> str:
    name = procedure_name(plan)
    if powers.method == "simulation":
        if plan.pilot is not None:
            origin = ("pair differences resampled from the pilot differences" if plan.design == "paired"
                      else "each group resampled from its pilot values")
        else:
            origin = f"values {SHAPE_WORDS[plan.shape]}"
        shifted = "each difference" if plan.design == "paired" else "group 1"
        return (f"simulation of {plan.simulations:,} studies, each judged by the {name} as the "
                f"analysis computes it; {origin}, {shifted} shifted by the true difference")
    if powers.method == "approximation":
        return ("Noether's asymptotic formula for the Mann-Whitney test, an approximation (it "
                "keeps U's null variance and ignores its discreteness)")
    if plan.procedure == "z":
        return "normal distribution, in closed form"
    welch = plan.procedure == "welch" and plan.design != "paired"
    if plan.question.kind == "equivalent":
        words = ("integral of the two one-sided tests' power over the sample SD (the integral "
                 "form of Owen's Q)")
        return words + ("; Welch's sample variance taken as scaled chi-squared with the "
                        "Welch-Satterthwaite degrees of freedom at the planned SDs" if welch else "")
    if welch:
        return ("noncentral t distribution with the Welch-Satterthwaite degrees of freedom at the "
                "planned SDs (the usual approximation for Welch's test)")
    return "noncentral t distribution (exact under normal spread)"


def _notes(plan: Plan, powers: _Powers, n1: int, n2: int, difference: float,
           reached_floor: bool) -> tuple[str, ...]:
    notes = []
    if reached_floor:
        notes.append(f"Even the smallest size planned here, {MIN_N} per group, reaches the power "
                     "wanted; its achieved power is given.")
    tied = powers.tied(n1, n2, difference)
    if tied:
        notes.append(f"{tied:,} of the {plan.simulations:,} simulated studies had tied values and "
                     "were judged by the normal approximation with the tie correction; the "
                     "analysis of one such study may count the exact law of its ties instead.")
    if plan.pilot is not None:
        sizes = [plan.pilot.group1.size] + ([] if plan.pilot.group2 is None else [plan.pilot.group2.size])
        notes.append(f"The pilot's spread and shape are estimates from {' and '.join(map(str, sizes))} "
                     "values: the power found carries their uncertainty beyond the Monte Carlo "
                     "error (a rank test's power, which hangs on the values' finer shape, most of all).")
    return tuple(notes)


def _fresh_seed() -> int:
    return secrets.randbits(32)


def plan_study(plan: Plan, *, progress: Progress | Task | None = None,
               cancelled: CancelCheck | None = None) -> PlanResult:
    """Find what ``plan`` asks (sizes, power or smallest detectable difference).

    Raises
    ------
    OptionProblem
        When no size reaches the power (a difference of the wrong sign for a one-sided question,
        a true difference outside an equivalence margin, more than ``MAX_N`` per group).
    engine.errors.Cancelled
        When ``cancelled()`` answered True.
    """
    task = Task.of(progress, cancelled, what="planning")
    seed = (plan.seed if plan.seed is not None else _fresh_seed()) if plan.simulated else None
    powers = _Powers(plan, seed)
    continuous = None
    reached_floor = False
    difference = plan.difference
    if plan.find == "n":
        _check_reachable(plan, difference)
        if powers.simulated:
            n = _size_by_simulation(plan, powers, difference, task)
        else:
            n, continuous = _size_by_formula(plan, lambda a, b: powers.formula(a, b, difference))
        n1, n2 = plan.sizes_for(n)
        reached_floor = n == MIN_N
    else:
        n1, n2 = plan.n1, plan.n2
        if plan.find == "difference":
            if powers.simulated:
                difference = _difference_by_simulation(plan, powers, n1, n2, task)
            else:
                difference = _difference_by_formula(plan, lambda d: powers.formula(n1, n2, d),
                                                    max(powers.sd1, powers.sd2))
    power, se = powers.at(n1, n2, difference, task.step(1.0, "the power at the answer"))
    task.report(1.0)
    sd1, sd2 = powers.sd1, powers.sd2
    standardiser = sd1 if plan.design == "paired" else root_mean_square(sd1, sd2)
    formula_power = powers.formula(n1, n2, difference) if powers.simulated else None
    formula_words = ""
    if formula_power is not None:
        formula_words = ("Noether's asymptotic approximation under normal spread at the same SDs"
                         if plan.procedure == "mann_whitney" and (plan.pilot is not None or plan.shape == "normal")
                         else "Noether's asymptotic approximation for the same shape and SDs"
                         if plan.procedure == "mann_whitney"
                         else "the exact power under normal spread at the same SDs")
    df = None
    if powers.method == "exact" and plan.procedure != "z":
        df = spread(plan.procedure, plan.design, sd1, sd2, n1, n2).df
    simulations = plan.simulations if powers.simulated else None
    return PlanResult(
        plan=plan, n1=n1, n2=n2, power=power, difference=difference, sd1=sd1, sd2=sd2,
        effect=difference / standardiser, effect_name=effect_name(plan), method=powers.method,
        method_words=_method_words(plan, powers), procedure_name=procedure_name(plan),
        monte_carlo_se=se, simulations=simulations, seed=seed, continuous_n=continuous, df=df,
        formula_power=formula_power, formula_words=formula_words, notes=_notes(plan, powers, n1, n2, difference, reached_floor),
        sentence=protocol_sentence(plan, n1=n1, n2=n2, power=power, difference=difference,
                                   sd1=sd1, sd2=sd2, method=powers.method, monte_carlo_se=se,
                                   simulations=simulations, seed=seed),
    )


def _curve_points(plan: Plan, over: str, answer: PlanResult, points: int,
                  start: float | None, stop: float | None) -> np.ndarray:
    if over == "n":
        first = MIN_N if start is None else max(MIN_N, int(math.ceil(start)))
        last = max(first + 1, int(stop) if stop is not None else 2 * answer.n1 + 2)
        if last > MAX_N:
            raise OptionProblem(f"A power curve runs up to {MAX_N:,} per group, not {last:,}.")
        return np.unique(np.round(np.linspace(first, last, points)).astype(np.int64)).astype(float)
    margin = plan.question.margin
    if start is None or stop is None:
        if plan.question.kind == "equivalent":
            span = (margin.high - margin.low) * 0.1
            default = (margin.low - span, margin.high + span)
        elif plan.question.kind == "not_worse":
            size = abs(margin.bound)
            default = (margin.bound, -2 * margin.bound) if margin.worse == "lower" else (margin.bound, -2 * size)
            default = tuple(sorted(default))
        else:
            reach = 2 * abs(answer.difference)
            default = (-reach, 0.0) if plan.alternative == "less" else (0.0, reach)
            if plan.alternative == "two-sided":
                default = (-reach, reach)
        start = default[0] if start is None else start
        stop = default[1] if stop is None else stop
    if not (math.isfinite(start) and math.isfinite(stop) and start < stop):
        raise OptionProblem(f"A power curve needs a start below its end, not {start:g} to {stop:g}.")
    return np.linspace(float(start), float(stop), points)


def power_curve(plan: Plan, over: str = "n", *, points: int = CURVE_POINTS,
                start: float | None = None, stop: float | None = None,
                progress: Progress | Task | None = None,
                cancelled: CancelCheck | None = None) -> PowerCurve:
    """Power along the size of group 1 (``over`` "n"; group 2 follows the plan's ratio) or the
    true difference ("difference"), the plan's other inputs fixed (a size or difference the plan
    asks for is found first). ``start``/``stop`` default to 2 .. about twice the size, or a range
    around the difference (the margin, for equivalence). Simulated plans simulate every point
    on the same seed."""
    if over not in CURVE_AXES:
        raise OptionProblem(f"A power curve runs along {' or '.join(CURVE_AXES)}, not '{over}'.")
    if not isinstance(points, (int, np.integer)) or not 2 <= points <= 1000:
        raise OptionProblem(f"A power curve takes 2 to 1000 points, not {points}.")
    task = Task.of(progress, cancelled, what="power curve")
    seed = (plan.seed if plan.seed is not None else _fresh_seed()) if plan.simulated else None
    fixed = plan.with_(seed=seed) if seed is not None else plan
    answer = plan_study(fixed, progress=task.step(0.2 if plan.simulated else 0.0, "the plan"))
    xs = _curve_points(plan, over, answer, points, start, stop)
    powers = _Powers(fixed, seed)
    power, errors = np.empty(xs.size), np.empty(xs.size)
    share = 1.0 / xs.size
    for i, value in enumerate(xs):
        step = task.step(share, "power curve")
        if over == "n":
            n1, n2 = plan.sizes_for(int(value))
            power[i], se = powers.at(n1, n2, answer.difference, step)
        else:
            power[i], se = powers.at(answer.n1, answer.n2, float(value), step)
        errors[i] = np.nan if se is None else se
    task.report(1.0)
    return PowerCurve(fixed, over, readonly_array(xs), readonly_array(power),
                      readonly_array(errors) if powers.simulated else None, powers.method)
