"""The procedure records of a margin question (equivalence, non-inferiority).

Gathered into :data:`engine.procedures.registry.RECORDS` after the records of a difference between
two independent groups.
"""

from __future__ import annotations

from .record import Procedure

__all__ = ["RECORDS"]

RECORDS: tuple[Procedure, ...] = ()
