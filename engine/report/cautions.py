"""What to keep in mind before relying on the findings, in one place for the window, the
command and every report."""

from __future__ import annotations

__all__ = ["cautions", "GENERAL_CAUTIONS", "CAUTION_LINE"]

CAUTION_LINE = ("A p-value is not the size of an effect; a check that passes does not prove an "
                "assumption; regulated work follows its own rules and needs a qualified "
                "statistician's review.")


# Shown after the suggestion's own cautions (which already cover p-values, passing checks and
# regulated work).
GENERAL_CAUTIONS = (
    "These procedures assume two independent groups; paired or repeated measurements need a "
    "paired procedure.",
)


def cautions(analysis) -> list[str]:
    """What to keep in mind before relying on the findings: the suggestion's own cautions, then
    the ones that hold for every comparison."""
    return list(analysis.recommendation.cautions) + list(GENERAL_CAUTIONS)
