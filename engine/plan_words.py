"""A plan of the next study in words for a document: what was assumed (one row per input), the
answer in a few lines, and the power curve as a table. The command's text output and the
window's copy both read them, so a plan reads the same wherever it is pasted from.

The sentence for a protocol itself is :attr:`engine.planning.PlanResult.sentence`. A plan from a
pilot's summary statistics says first which of its inputs came from them (:func:`summary_lines`)
and adds their cautions (:func:`summary_notes`).
"""

from __future__ import annotations

from html import escape

from .planning import PlanResult, PowerCurve, SummaryPilot
from .planning.sentence import power_text
from .rounding import format_number, level_text
from .text import visible, visible_html

__all__ = ["input_rows", "answer_lines", "curve_rows", "plan_plain", "plan_html", "summary_lines",
           "summary_notes", "FIND_WORDS",
           "QUESTION_WORDS", "DESIGN_WORDS", "SHAPE_NAMES"]

# What a plan works out, in words.
FIND_WORDS = {"n": "how many to measure for the power wanted",
              "power": "the power of the sizes given",
              "difference": "the smallest difference the sizes can find"}
# The question the next study will answer.
QUESTION_WORDS = {"differ": "do the groups differ (either way)",
                  "lower": "is group 1 lower",
                  "higher": "is group 1 higher",
                  "equivalent": "are the groups the same within a margin",
                  "not_worse": "is group 1 no worse than group 2 beyond a margin"}
DESIGN_WORDS = {"independent": "two separate groups", "paired": "pairs (each unit measured twice)"}
SHAPE_NAMES = {"normal": "bell-shaped (normal)", "skewed": "skewed to the right",
               "heavy_tailed": "with heavy tails"}


def _amount(value: float | None, unit: str) -> str:
    text = format_number(value, digits=4)
    return f"{text} {unit}" if unit else text


def _question(result: PlanResult) -> str:
    plan = result.plan
    question, unit = plan.question, plan.unit
    words = QUESTION_WORDS[question.kind]
    margin = question.margin
    if question.kind == "equivalent":
        words += f": {_amount(margin.low, unit)} to {_amount(margin.high, unit)}"
    elif question.kind == "not_worse":
        size = margin.high if margin.worse == "higher" else -margin.low
        words += f": {_amount(size, unit)}, {margin.worse} values being worse"
    return words


def _spread(result: PlanResult) -> str:
    plan = result.plan
    unit = plan.unit
    if plan.pilot is not None:
        pilot = plan.pilot
        counts = " and ".join(str(v.size) for v in (pilot.group1, pilot.group2) if v is not None)
        origin = f" of {visible(pilot.source)}" if pilot.source else ""
        what = "pair differences" if plan.design == "paired" else "values"
        return (f"resampled from the {counts} pilot {what}{origin} (SD {_amount(result.sd1, unit)}"
                + ("" if plan.design == "paired" else f" and {_amount(result.sd2, unit)}") + ")")
    if plan.design == "paired":
        return f"SD of the pair differences {_amount(result.sd1, unit)}"
    if result.sd1 == result.sd2:
        return f"SD {_amount(result.sd1, unit)} in both groups"
    return f"SD {_amount(result.sd1, unit)} in group 1, {_amount(result.sd2, unit)} in group 2"


def input_rows(result: PlanResult) -> list[tuple[str, str]]:
    """What the plan assumed, as (what, value) rows; the plan's answer is marked "worked out"."""
    plan = result.plan
    unit = plan.unit
    found = "worked out"
    paired = plan.design == "paired"
    rows = [("Worked out", FIND_WORDS[plan.find]),
            ("Question", _question(result)),
            ("Chance of a false finding (level)", level_text(plan.alpha)
             + (", each side" if plan.question.kind == "equivalent" else "")),
            ("Design", DESIGN_WORDS[plan.design]),
            ("Test", result.procedure_name),
            ("True difference (group 1 minus group 2)",
             found if plan.find == "difference" else _amount(plan.difference, unit)),
            ("Spread", _spread(result))]
    if plan.pilot is None and plan.shape != "normal":
        rows.append(("Shape of the values", SHAPE_NAMES[plan.shape]))
    if plan.find == "n":
        rows.append(("Sizes", found + ("" if paired or plan.ratio == 1 else
                                       f", group 2 {format_number(plan.ratio, digits=4)} times group 1")))
    else:
        rows.append(("Sizes", f"{plan.n1:,} pairs" if paired else
                     f"{plan.n1:,} per group" if plan.n1 == plan.n2 else
                     f"{plan.n1:,} in group 1, {plan.n2:,} in group 2"))
    rows.append(("Power wanted", found if plan.find == "power" else power_text(plan.power)))
    if result.method == "simulation":
        rows.append(("Simulated studies", f"{result.simulations:,} (seed {result.seed})"))
    return rows


def answer_lines(result: PlanResult, curve: PowerCurve | None = None) -> list[str]:
    """The sentence, then the answer and its figures one per line, then the curve's points."""
    plan = result.plan
    unit = f" {plan.unit}" if plan.unit else ""
    sizes = (f"{result.n1} pairs" if plan.design == "paired" else
             f"{result.n1} per group" if result.n1 == result.n2 else
             f"{result.n1} in group 1, {result.n2} in group 2")
    lines = [result.sentence, ""]
    answer = {"n": f"Sample size: {sizes}", "power": f"Power: {power_text(result.power)}",
              "difference": f"Smallest detectable difference: {format_number(result.difference)}{unit}"}
    lines.append(answer[plan.find])
    if plan.find == "n":
        lines.append(f"Achieved power: {power_text(result.power)}")
    if result.continuous_n is not None:
        lines.append(f"Size before rounding up: {format_number(result.continuous_n, digits=5)}")
    lines.append(f"Standardised effect: {format_number(result.effect)} ({result.effect_name})")
    if result.monte_carlo_se is not None:
        lines.append(f"Monte Carlo standard error: {format_number(100 * result.monte_carlo_se, digits=2)} "
                     f"percentage points ({result.simulations:,} studies, seed {result.seed})")
    if result.formula_power is not None:
        lines.append(f"For comparison, {result.formula_words}: {power_text(result.formula_power)}")
    lines.append(f"Method: {result.method_words}")
    lines += [f"Note: {note}" for note in result.notes]
    if curve is not None:
        lines += ["", f"Power curve ({curve_heading(curve)}, power):"]
        lines += [f"  {x}  {p}" for x, p in curve_rows(curve)]
    return lines


_TAKEN_WORDS = {"sd1": "the SDs", "n1": "the sizes", "difference": "the difference of the means"}


def summary_lines(summaries: SummaryPilot, taken: tuple[str, ...], procedure: str = "welch") -> list[str]:
    """What a plan took from a pilot's summary statistics: the groups as entered, then which
    inputs came from them."""
    origin = f" in {summaries.source}" if summaries.source else ""
    lines = [f"From the summary statistics{origin}:"]
    for number, (stats, sd) in enumerate(zip(summaries.stats, summaries.sds()), start=1):
        lines.append(f"  group {number}, {stats.label}: n {stats.n}, mean {stats.mean:.12g}, SD {sd:.12g}"
                     + (" (from its standard error)" if stats.given_as == "se" else "")
                     + (" (known)" if stats.sd_known else ""))
    words = [_TAKEN_WORDS[name] for name in ("sd1", "n1", "difference") if name in taken]
    if procedure == "pooled" and "sd1" in taken:
        words[0] = f"the SDs pooled ({format_number(summaries.pooled_sd)})"
    lines.append("Taken from them: " + ", ".join(words) + ". The power is worked out under normal "
                 "spread: summaries do not show the shape of the values, so nothing is resampled.")
    return lines


def summary_notes(summaries: SummaryPilot | None, taken: tuple[str, ...]) -> list[str]:
    """The cautions of a plan that took numbers from a pilot's summary statistics (none without)."""
    if summaries is None:
        return []
    n1, n2 = summaries.sizes
    notes = [f"The pilot's SDs are estimates from {n1} and {n2} values: the power found carries "
             "their uncertainty."]
    if "difference" in taken:
        notes.append(f"The difference to detect is the one the pilot showed "
                     f"({format_number(summaries.difference)}); it is uncertain too, and a study "
                     "planned on it alone may be too small if the true difference is smaller.")
    return notes


def curve_heading(curve: PowerCurve) -> str:
    """What the curve runs along, in words with the unit."""
    if curve.over == "n":
        if curve.plan.design == "paired":
            return "pairs"
        return "units per group" if curve.plan.ratio == 1 else "units in group 1"
    unit = f", {curve.plan.unit}" if curve.plan.unit else ""
    return f"difference{unit}"


def curve_rows(curve: PowerCurve) -> list[tuple[str, str]]:
    """The curve's points as shown: (size or difference, power)."""
    return [(format_number(x, digits=4), power_text(p)) for x, p in zip(curve.x, curve.power)]


def plan_plain(result: PlanResult, curve: PowerCurve | None = None) -> str:
    """The plan as plain text: the inputs, the answer and the curve."""
    width = max(len(what) for what, _ in input_rows(result))
    lines = ["Plan of the next study", ""]
    lines += [f"{what.ljust(width)}  {value}" for what, value in input_rows(result)]
    lines += [""] + answer_lines(result, curve)
    return "".join(visible(line) + "\n" for line in lines)


def plan_html(result: PlanResult, curve: PowerCurve | None = None) -> str:
    """The plan as an HTML fragment: a table of the inputs, the sentence, the figures, the curve."""
    rows = "".join(f"<tr><td>{escape(what)}</td><td>{visible_html(value)}</td></tr>"
                   for what, value in input_rows(result))
    lines = answer_lines(result, None)
    sentence, figures = lines[0], [line for line in lines[2:] if line]
    parts = ["<h3>Plan of the next study</h3>", f"<table>{rows}</table>",
             f"<p>{visible_html(sentence)}</p>",
             "<ul>" + "".join(f"<li>{visible_html(line)}</li>" for line in figures) + "</ul>"]
    if curve is not None:
        body = "".join(f"<tr><td>{escape(x)}</td><td>{escape(p)}</td></tr>" for x, p in curve_rows(curve))
        parts.append(f"<table><tr><th>{escape(curve_heading(curve))}</th><th>power</th></tr>{body}</table>")
    return "".join(parts)
