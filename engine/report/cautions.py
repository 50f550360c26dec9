"""What to keep in mind before relying on the findings, in one place for the window, the
command's text and JSON, and every report.

The suggestion (``engine.advice``) adds the cautions that depend on the data; the ones here hold
for every comparison and follow them.
"""

from __future__ import annotations

from ..margin_advice import MARGIN_CAUTION

__all__ = ["cautions", "caution_blocks", "HEADING", "CAUTIONS_ALWAYS", "GENERAL_CAUTIONS", "MARGIN_CAUTIONS",
           "PAIRED_CAUTIONS"]

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

# The same for matched pairs.
PAIRED_CAUTIONS = (
    "These procedures assume the pairs are independent of one another: each pair a different unit, "
    "measured once in each group; several pairs from one unit, or units measured more than twice, "
    "need another design.",
)

# For an equivalence or non-inferiority question, in place of the p-value and regulated-work
# cautions above (which speak of a difference).
MARGIN_CAUTIONS = (
    MARGIN_CAUTION,  # the margin's own caution, said once wherever a margin is
    "A p-value of the one-sided tests says how surprising the data would be if the true difference lay "
    "at the edge of the margin; it is not the size of the difference. Read the estimate and its "
    "interval against the margin for that.",
    "Regulated equivalence and non-inferiority work (bioequivalence, clinical and safety-critical "
    "studies) follows its own rules for the margin, the level, the design and the procedure, and needs "
    "a qualified statistician's review; these findings do not replace either.",
)
# The cautions of CAUTIONS_ALWAYS that a margin question says in its own words.
_SAID_FOR_A_MARGIN = (CAUTIONS_ALWAYS[1], CAUTIONS_ALWAYS[3])


def cautions(analysis) -> list[str]:
    """What to keep in mind before relying on the findings: the suggestion's own cautions (those
    the data call for), then the ones that hold for every comparison of its kind (a question with
    a margin, a paired design). Without an analysis, only the usual ones."""
    if analysis is None:
        return list(CAUTIONS_ALWAYS) + list(GENERAL_CAUTIONS)
    own = list(analysis.recommendation.cautions)
    always = list(CAUTIONS_ALWAYS)
    if getattr(analysis, "margin", None) is not None:
        always = list(MARGIN_CAUTIONS) + [c for c in always if c not in _SAID_FOR_A_MARGIN]
    paired = getattr(analysis.spec, "design", "independent") == "paired"
    # a caution the suggestion already gave (the margin's) is said once
    return list(dict.fromkeys(own + always + list(PAIRED_CAUTIONS if paired else GENERAL_CAUTIONS)))


def caution_blocks(analysis) -> list[tuple]:
    """The cautions as report blocks (see ``engine.report.tables``): a heading and a list."""
    return [("h", HEADING), ("list", cautions(analysis))]
