"""The optional ``outcomes`` member of a saved analysis: several outcomes compared at once.

It records what the analysis of several outcomes decided beyond its spec (the outcomes with their
columns, the adjustment the verdicts follow, the one procedure read for all or none) and each
outcome's key figures, unrounded: the procedure read, its estimate and interval, the interval at
the Bonferroni level, the raw and adjusted p-values and the standardised effect. The file's
``numbers`` member holds the first analysed outcome's full figures (:func:`engine.saved.numbers_of`),
so that the file keeps the shape of a one-outcome file.
"""

from __future__ import annotations

import math
from typing import Any, Callable, Mapping

from .errors import OptionProblem, quoted

__all__ = ["outcomes_member", "check_outcomes_member", "outcome_figures", "outcomes_of", "FIGURES"]

# each outcome's figures (a missing one is None, a non-finite one a text, as in "numbers")
FIGURES = ("estimate", "low", "high", "simultaneous_low", "simultaneous_high", "p_value", "p_holm",
           "p_bh", "effect", "effect_low", "effect_high")
_MEMBERS = {"list", "adjustment", "procedure", "figures"}
_TEXTS = ("NaN", "Infinity", "-Infinity")


def outcome_figures(found, _figure: Callable[[Any], Any]) -> list[dict[str, Any]]:
    """Each outcome's key figures (an ``engine.outcomes.OutcomesAnalysis``), in its order, each
    number as ``_figure`` writes it (the saved file's way, ``engine.saved``)."""
    def ends(interval, prefix: str = "") -> dict[str, Any]:
        low = None if interval is None else _figure(interval.low)
        high = None if interval is None else _figure(interval.high)
        return {f"{prefix}low": low, f"{prefix}high": high}

    figures = []
    for row in found.rows:
        effect = row.effect
        figures.append({
            "name": row.name, "key": row.key, "problem": row.problem,
            "estimate": _figure(row.estimate), **ends(row.interval),
            **ends(row.simultaneous_interval, "simultaneous_"),
            "p_value": _figure(row.p_value), "p_holm": _figure(row.p_holm), "p_bh": _figure(row.p_bh),
            "effect": None if effect is None else _figure(effect.value),
            **ends(None if effect is None else effect.interval, "effect_")})
    return figures


def outcomes_member(found, figure: Callable[[Any], Any]) -> dict[str, Any]:
    """The ``outcomes`` member of ``found`` (an ``OutcomesAnalysis``)."""
    return {"list": [{"name": d.outcome.name, "columns": list(d.outcome.columns)} for d in found.outcomes],
            "adjustment": found.adjustment, "procedure": found.procedure,
            "figures": outcome_figures(found, figure)}


def _figure_ok(value: Any) -> bool:
    number = isinstance(value, (int, float)) and not isinstance(value, bool) and math.isfinite(value)
    return value is None or number or value in _TEXTS


def check_outcomes_member(member: Any) -> dict[str, Any]:
    """The member checked; raises OptionProblem (one sentence) when it is not what
    :func:`outcomes_member` writes."""
    if not isinstance(member, dict) or set(member) != _MEMBERS:
        raise OptionProblem("its 'outcomes' are not list, adjustment, procedure and figures.")
    listed, figures = member["list"], member["figures"]
    if not isinstance(listed, list) or not listed:
        raise OptionProblem("its 'outcomes' list no outcome.")
    outcomes_of(member)  # each a name and one or two columns
    if member["adjustment"] not in ("holm", "bh"):
        raise OptionProblem("the adjustment of its 'outcomes' is not 'holm' or 'bh'.")
    if member["procedure"] is not None and not isinstance(member["procedure"], str):
        raise OptionProblem("the procedure of its 'outcomes' is not named.")
    if not isinstance(figures, list) or len(figures) != len(listed):
        raise OptionProblem("its 'outcomes' do not hold figures for every outcome.")
    for number, (entry, row) in enumerate(zip(listed, figures), start=1):
        if not isinstance(row, dict) or set(row) != {"name", "key", "problem", *FIGURES} \
                or row["name"] != entry["name"]:
            raise OptionProblem(f"the figures of outcome {number} are not those Twofold writes.")
        for key in ("key", "problem"):
            if row[key] is not None and not isinstance(row[key], str):
                raise OptionProblem(f"outcome {number}'s {key} is not a text.")
        for key in FIGURES:
            if not _figure_ok(row[key]):
                raise OptionProblem(f"outcome {number}'s {key} is not a number.")
    return member


def outcomes_of(member: Mapping[str, Any]):
    """The recorded outcomes as ``engine.outcomes.Outcome`` objects."""
    from .outcomes import Outcome

    found = []
    for number, entry in enumerate(member["list"], start=1):
        if not isinstance(entry, dict) or set(entry) != {"name", "columns"} \
                or not isinstance(entry["columns"], list) \
                or not all(isinstance(c, str) for c in entry["columns"]):
            raise OptionProblem(f"outcome {number} of its 'outcomes' is not a name and its columns.")
        try:
            found.append(Outcome(entry["name"], tuple(entry["columns"])))
        except OptionProblem:
            raise OptionProblem(f"outcome {number} ({quoted(str(entry['name']))}) needs a name and one "
                                "or two columns.") from None
    return tuple(found)


def flat(figures: list[Mapping[str, Any]]) -> dict[str, Any]:
    """Each outcome's figures under a name a reader can find: "hardness p_holm"."""
    named: dict[str, Any] = {}
    for row in figures:
        named[f"{row['name']} procedure"] = row["key"]
        for key in FIGURES:
            named[f"{row['name']} {key}"] = row[key]
    return named
