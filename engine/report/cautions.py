"""What to keep in mind before relying on the findings, in one place for the window, the
command's text and JSON, and every report.

The suggestion (``engine.advice``) adds the cautions that depend on the data; the ones here hold
for every comparison and follow them.
"""

from __future__ import annotations

__all__ = ["cautions", "caution_blocks", "HEADING", "CAUTIONS_ALWAYS", "GENERAL_CAUTIONS"]

# The heading of the cautions wherever they are shown.
HEADING = "Before relying on this"

# About checks, p-values and regulated work: true whatever the data.
CAUTIONS_ALWAYS = (
    "Checks of normality such as Shapiro-Wilk have little power with small groups (they miss real "
    "departures) and with large groups flag departures too small to matter, so the choice does not "
    "rest on their p-value alone.",
    "A p-value says how surprising the data would be if there were no difference; it is not the size "
    "of the difference. Read the estimate, its interval and the effect size for that.",
    "A check that passes does not prove an assumption holds; it only finds no clear sign against it.",
    "Regulated work (clinical, pharmaceutical, safety-critical) follows its own prescribed methods and "
    "needs a qualified statistician's review; this suggestion does not replace either.",
)

# About the design every procedure here assumes.
GENERAL_CAUTIONS = (
    "These procedures assume two independent groups; paired or repeated measurements need a "
    "paired procedure.",
)


def cautions(analysis) -> list[str]:
    """What to keep in mind before relying on the findings: the suggestion's own cautions (those
    the data call for), then the ones that hold for every comparison. Without an analysis, only
    the latter."""
    own = list(analysis.recommendation.cautions) if analysis is not None else []
    return own + list(CAUTIONS_ALWAYS) + list(GENERAL_CAUTIONS)


def caution_blocks(analysis) -> list[tuple]:
    """The cautions as report blocks (see ``engine.report.tables``): a heading and a list."""
    return [("h", HEADING), ("list", cautions(analysis))]
