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

__all__ = ["SCHEMA_VERSION", "to_plain", "analysis_document", "analysis_schema", "intake_document"]

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
    }
    return document


def analysis_schema() -> dict[str, Any]:
    """The JSON Schema of :func:`analysis_document`'s output, as shipped with the package."""
    text = (files(__package__) / "schema" / "analysis.schema.json").read_text(encoding="utf-8")
    return json.loads(text)
