"""The plan in words: the procedure's name, the method said in full, and the one sentence that
can be pasted into a study protocol ("With 26 units per group, a Welch t-test at the two-sided
5% level has 80.4% power to detect a difference of 5 MPa if the SD is 6 MPa in both groups.")."""

from __future__ import annotations

import math

from ..rounding import format_number, level_text
from .plan import Plan
from .shapes import SHAPE_WORDS

__all__ = ["procedure_name", "effect_name", "power_text", "protocol_sentence"]

_INDEPENDENT = {"welch": "Welch t-test", "pooled": "pooled t-test", "z": "z-test with known SDs",
                "mann_whitney": "Mann-Whitney U test"}
_PAIRED = {"welch": "paired t-test", "pooled": "paired t-test",
           "z": "paired z-test with the known SD of the differences",
           "mann_whitney": "Wilcoxon signed-rank test"}
_SPREAD = {"welch": "Welch", "pooled": "pooled", "z": "z"}


def procedure_name(plan: Plan) -> str:
    """The planned test in words, without an article."""
    if plan.question.kind == "equivalent":
        base = "paired t" if plan.design == "paired" else f"{_SPREAD[plan.procedure]} t"
        return "two one-sided " + (base.replace(" t", "") + " tests" if plan.procedure == "z" else base + "-tests")
    if plan.question.kind == "not_worse":
        base = (_PAIRED if plan.design == "paired" else _INDEPENDENT)[plan.procedure]
        return f"{base} against the margin"
    return (_PAIRED if plan.design == "paired" else _INDEPENDENT)[plan.procedure]


def effect_name(plan: Plan) -> str:
    return ("d of the differences (d_z): the mean difference over the SD of the pair differences"
            if plan.design == "paired" else
            "Cohen's d: the difference over the root mean square of the two SDs")


def power_text(power: float) -> str:
    """A power as a percentage, cut (never rounded up) to a tenth of a percent: a plan never
    claims more power than it has."""
    tenths = math.floor(power * 1000.0 + 1e-9)
    return f"{tenths / 10:g}%"


def _amount(value: float, unit: str, given: bool) -> str:
    text = f"{value:g}" if given else format_number(value)
    return f"{text} {unit}" if unit else text


def _article(words: str) -> str:
    vowel = words[:1].lower() in "aeiou" and not words.lower().startswith("one")
    return ("an " if vowel else "a ") + words


def _sizes(n1: int, n2: int, paired: bool) -> str:
    if paired:
        return f"With {n1:,} pairs"
    if n1 == n2:
        return f"With {n1:,} units per group"
    return f"With {n1:,} units in group 1 and {n2:,} in group 2"


def _spread(plan: Plan, sd1: float, sd2: float, labels: tuple[str, str]) -> str:
    unit, given = plan.unit, plan.pilot is None
    if plan.pilot is not None:
        if plan.design == "paired":
            return (f"the pair differences vary as the {plan.pilot.group1.size} pilot differences "
                    f"did (SD {_amount(sd1, unit, False)}), resampled")
        return (f"each group varies as its pilot values did (SD {_amount(sd1, unit, False)} in "
                f"{labels[0]} and {_amount(sd2, unit, False)} in {labels[1]}), resampled")
    shape = "" if plan.shape == "normal" else f"the values are {SHAPE_WORDS[plan.shape]} and "
    if plan.design == "paired":
        return f"{shape}the SD of the pair differences is {_amount(sd1, unit, given)}"
    if sd1 == sd2:
        return f"{shape}the SD is {_amount(sd1, unit, given)} in both groups"
    return (f"{shape}the SD is {_amount(sd1, unit, given)} in {labels[0]} and "
            f"{_amount(sd2, unit, given)} in {labels[1]}")


def _goal(plan: Plan, difference: float, given: bool, labels: tuple[str, str]) -> str:
    unit = plan.unit
    margin = plan.question.margin
    kind = plan.question.kind
    what = "mean difference" if plan.design == "paired" else "difference"
    if kind == "equivalent":
        return (f"to show equivalence within {_amount(margin.low, unit, True)} to "
                f"{_amount(margin.high, unit, True)} if the true {what} is "
                f"{_amount(difference, unit, True)}")
    if kind == "not_worse":
        size = margin.high if margin.worse == "higher" else -margin.low
        return (f"to show {labels[0]} not worse than {labels[1]} by more than "
                f"{_amount(size, unit, True)} ({margin.worse} values being worse) if the true "
                f"{what} is {_amount(difference, unit, True)}")
    if kind == "differ":
        return f"to detect a {what} of {_amount(difference, unit, given)}"
    word = "higher" if kind == "higher" else "lower"
    return f"to detect {labels[0]} being {word} by {_amount(abs(difference), unit, given)}"


def _level(plan: Plan) -> str:
    alpha = level_text(plan.alpha)
    if plan.question.kind == "equivalent":
        return f"each at the {alpha} level"
    if plan.question.kind == "not_worse" or plan.alternative != "two-sided":
        return f"at the one-sided {alpha} level"
    return f"at the two-sided {alpha} level"


def protocol_sentence(plan: Plan, *, n1: int, n2: int, power: float, difference: float,
                      sd1: float, sd2: float, method: str, monte_carlo_se: float | None,
                      simulations: int | None, seed: int | None) -> str:
    """The plan in one sentence, for a protocol."""
    labels = plan.pilot.labels if plan.pilot is not None and plan.design != "paired" else ("group 1", "group 2")
    name = procedure_name(plan)
    plural = plan.question.kind == "equivalent"
    verb = "have" if plural else "has"
    subject = name if plural else _article(name)
    given = plan.find != "difference"
    level = f", {_level(plan)}," if plural else f" {_level(plan)}"
    sentence = (f"{_sizes(n1, n2, plan.design == 'paired')}, {subject}{level} {verb} "
                f"{power_text(power)} power {_goal(plan, difference, given, labels)} "
                f"{'and' if plan.has_margin else 'if'} {_spread(plan, sd1, sd2, labels)}")
    if method == "simulation":
        sentence += (f" (found by simulating {simulations:,} studies: Monte Carlo standard error "
                     f"{format_number(100 * monte_carlo_se, digits=2)} percentage points, seed {seed})")
    elif method == "approximation":
        sentence += " (by Noether's asymptotic approximation)"
    return sentence + "."
