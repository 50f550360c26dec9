"""Plain JSON-ready structures from the engine's result objects.

The headless command's ``--json`` document is a public interface: its members are described in
the JSON Schema ``engine/schema/analysis.schema.json`` (shipped with the package, read by
:func:`analysis_schema`). Members are added, never renamed or removed; ``SCHEMA_VERSION`` grows
by one with each release that adds members.
"""

from __future__ import annotations

import dataclasses
import json
import math
from collections.abc import Mapping
from importlib.resources import files
from pathlib import Path
from typing import Any

import numpy as np

__all__ = ["SCHEMA_VERSION", "to_plain", "analysis_document", "analysis_schema", "intake_document",
           "question_member", "margin_answers", "margin_verdicts", "pairs_member", "paired_member"]

# the "schema_version" member of the --json document (see the module's note)
SCHEMA_VERSION = 2

# Arrays kept out of the JSON document: they can be long and are for plotting, not reporting.
_LEFT_OUT = {"distribution", "qq_theoretical", "qq_observed"}


def to_plain(value: Any) -> Any:
    """Dataclasses, mappings, tuples and numpy scalars as dicts, lists and floats.

    Non-finite floats become None (JSON has no NaN); numpy arrays become lists.
    """
    if dataclasses.is_dataclass(value) and not isinstance(value, type):
        return {f.name: to_plain(getattr(value, f.name))
                for f in dataclasses.fields(value) if f.name not in _LEFT_OUT}
    if isinstance(value, Mapping):
        return {str(k): to_plain(v) for k, v in value.items() if k not in _LEFT_OUT}
    if isinstance(value, (list, tuple)):
        return [to_plain(v) for v in value]
    if isinstance(value, np.ndarray):
        return [to_plain(v) for v in value.tolist()]
    if isinstance(value, (bool, np.bool_)):
        return bool(value)
    if isinstance(value, (int, np.integer)):
        return int(value)
    if isinstance(value, (float, np.floating)):
        value = float(value)
        return value if math.isfinite(value) else None
    if isinstance(value, Path):
        return str(value)
    return value


def _summary(summaries) -> list[dict]:
    return [to_plain(s) for s in summaries]


def intake_document(intake) -> dict[str, Any]:
    """The data part of the document: labels, counts, exclusions and summaries."""
    from .summary import summarize

    groups, screening = intake.groups, intake.screening
    return {
        "groups": list(groups.labels),
        "n": list(groups.n),
        "excluded": dict(to_plain(screening.excluded_counts)),
        "summary": _summary((summarize(groups.labels[0], groups.x),
                             summarize(groups.labels[1], groups.y))),
        "screening": to_plain(screening),
    }


def options_member(spec) -> dict[str, Any]:
    """The ``options`` member: the analysis settings under the names the command's first
    documents used (kept so that scripts reading them go on working)."""
    statements = spec.statements
    return {
        "alternative": spec.question.alternative,
        "confidence_level": spec.question.level,
        "n_resamples": spec.resamples,
        "seed": spec.seed,
        "known_sd": None if statements.known_sd is None else list(statements.known_sd),
        "equal_spread_known": statements.equal_spread_known,
        "ordinal": statements.ordinal,
        "rank_method": spec.rank_method,
    }


def _labels(analysis) -> tuple[str, str]:
    """The two group labels (an analysis from summary statistics has no groups of values)."""
    return tuple(analysis.labels if _from_summaries(analysis) else analysis.groups.labels)


def _from_summaries(analysis) -> bool:
    return getattr(analysis, "input", None) == "summary"


def _reference_mean(analysis) -> float | None:
    """Group 2's mean, the reference of a margin given as a percentage (as the analysis took it)."""
    if _from_summaries(analysis):
        return float(analysis.stats[1].mean)
    y = np.asarray(analysis.groups.y, dtype=float)
    return float(np.mean(y)) if y.size else None


def question_member(analysis) -> dict[str, Any]:
    """The ``question`` member: its kind, level, alpha and the procedures' alternative; for a
    margin question the margin as entered, how it was entered, in the measurement's units (a
    percentage of group 2's mean converted; a ratio stays a ratio) and the note saying so."""
    question = analysis.spec.question
    plain: dict[str, Any] = {"kind": question.kind, "level": question.level, "alpha": question.alpha,
                             "alternative": question.alternative, "margin": None}
    entered = question.margin
    if entered is None:
        return plain
    reference = _reference_mean(analysis) if entered.unit == "percent" else None
    used = analysis.margin
    plain["margin"] = {
        "entered": entered.to_dict(),
        "entered_as": entered.unit,
        "reference_mean": to_plain(reference),
        "in_units": None if used is None else {"low": used.low, "high": used.high, "unit": used.unit,
                                               "worse": used.worse},
        "note": entered.note(reference),
        "text": None if used is None else question.margin_text(used, _labels(analysis)),
    }
    return plain


def margin_answers(analysis) -> dict[str, Any]:
    """What each margin procedure's result says against the margin (``MarginAnswer`` by key), in
    the order the procedures ran; empty for a question without a margin."""
    from .procedures import registry

    if getattr(analysis, "margin", None) is None:
        return {}
    kind = analysis.spec.question.kind
    answers = {}
    for key in analysis.procedures:
        record = registry.find(key)
        if record is not None and kind not in record.questions:
            continue
        answer = analysis.margin_answer(key)
        if answer is not None:
            answers[key] = answer
    return answers


def margin_verdicts(analysis) -> dict[str, Any]:
    """The ``margin_verdicts`` member: for a margin question, what each procedure's interval says
    against the margin (``case``, ``yes``, ``reading`` in a few words, ``words`` in sentences),
    with the (1 - 2 alpha) ``interval`` set against it and the (1 - alpha)
    ``difference_interval``; empty for a question without a margin."""
    question = analysis.spec.question
    labels = _labels(analysis)
    verdicts: dict[str, Any] = {}
    for key, answer in margin_answers(analysis).items():
        result = analysis.procedures[key]
        verdicts[key] = {
            "case": answer.case,
            "yes": answer.yes,
            "beyond": answer.beyond,
            "reading": question.margin_reading(answer),
            "words": question.margin_words(answer, labels, result.estimate_name),
            "interval": to_plain(answer.interval),
            "difference_interval": to_plain(answer.difference_interval),
        }
    return verdicts


def pairs_member(analysis) -> dict[str, Any] | None:
    """The ``pairs`` member: how the pairs were formed from the file (by the ID column or row by
    row), how many, and every ID or row left out with its file rows and what was done; None
    for independent groups or groups not read from a file."""
    pairs = analysis.pairs
    if pairs is None:
        return None
    from .io.pairs import PAIR_PROBLEMS

    column = analysis.spec.pair_column
    return {
        "formed_by": "id_column" if column is not None else "row",
        "pair_column": column,
        "labels": list(pairs.labels),
        "n_pairs": int(pairs.n_pairs),
        "left_out_counts": {kind: int(count) for kind, count in pairs.counts.items()},
        "left_out": [{"kind": p.kind, "kind_text": PAIR_PROBLEMS.get(p.kind, p.kind), "pair_id": p.pair_id,
                      "file_rows": list(p.file_rows), "text": p.text} for p in pairs.problems],
    }


def paired_member(analysis) -> dict[str, Any] | None:
    """The ``paired`` member: the checks on the differences (group 1 minus group 2, pair by pair):
    how many pairs, their summary and shape, the correlation of the two members of a pair, the
    findings; None for independent groups. The differences themselves are left out."""
    checks = analysis.paired
    if checks is None:
        return None
    return {"n_pairs": int(checks.n_pairs), "summary": to_plain(checks.summary),
            "shape": to_plain(checks.shape), "correlation": to_plain(checks.correlation),
            "findings": to_plain(checks.findings)}


def analysis_document(analysis) -> dict[str, Any]:
    """The whole analysis as one JSON-ready object (the headless command's ``--json``)."""
    from .report.cautions import cautions

    document: dict[str, Any] = {
        "schema_version": SCHEMA_VERSION,
        "groups": list(analysis.groups.labels),
        "n": list(analysis.groups.n),
        "excluded": dict(to_plain(analysis.screening.excluded_counts)) if analysis.screening else {},
        "summary": _summary(analysis.summaries),
        "options": options_member(analysis.spec),
        "spec": analysis.spec.to_dict(),
        "procedures": to_plain(analysis.procedures),
        "effect_sizes": to_plain(analysis.effect_sizes),
        "diagnostics": to_plain(analysis.diagnostics),
        # its cautions: the suggestion's own and those for every comparison, as every report lists them
        "recommendation": {**to_plain(analysis.recommendation), "cautions": cautions(analysis)},
        "robustness": to_plain(analysis.robustness),
        "screening": to_plain(analysis.screening) if analysis.screening else None,
        "source": to_plain(analysis.source),
        "notes": to_plain(analysis.notes),
        # added within schema version 2: the question, the verdicts against a margin, the design
        "question": question_member(analysis),
        "margin_verdicts": margin_verdicts(analysis),
        "design": analysis.spec.design,
        "pairs": pairs_member(analysis),
        "paired": paired_member(analysis),
    }
    return document


def analysis_schema() -> dict[str, Any]:
    """The JSON Schema of :func:`analysis_document`'s output, as shipped with the package."""
    text = (files(__package__) / "schema" / "analysis.schema.json").read_text(encoding="utf-8")
    return json.loads(text)
