"""The procedure records that run from summary statistics (each group's n, mean and SD).

A procedure whose arithmetic needs only the means, SDs and counts (z, pooled and Welch t, the two
one-sided tests and the non-inferiority t built on them) runs from two
:class:`engine.group_stats.GroupStats` through the same function as from the values. Its summary
record is its record for the values with ``input="summary"``: the same key, name, assumption and
function, so a result from summaries reads exactly as one from values. The rank, resampling and
paired procedures need the values themselves and have no summary record.
"""

from __future__ import annotations

from dataclasses import replace

from .record import Procedure

__all__ = ["SUMMARY_KEYS", "of"]

# The procedures whose functions take two GroupStats: those of engine.procedures.t and the margin
# procedures built on them (engine.procedures.equivalence).
SUMMARY_KEYS = ("welch_t", "pooled_t", "z", "equivalence_welch", "equivalence_pooled",
                "noninferiority_welch", "noninferiority_pooled")


def of(records: tuple[Procedure, ...]) -> tuple[Procedure, ...]:
    """The summary records of those ``records`` (records for the values) that run from summaries,
    in their order."""
    return tuple(replace(r, input="summary") for r in records
                 if r.key in SUMMARY_KEYS and r.input == "raw" and "independent" in r.designs)
