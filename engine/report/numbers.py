"""The figures of one procedure's result as the report writes them, and the rules behind them.

Every number the report, the window and the command show passes through here or through
``engine.rounding``: the estimate and its interval share decimals, effect sizes keep two (more
while a narrow interval would read as one number), p-values follow ``format_p``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..procedures.registry import RECORDS
from ..rounding import fixed, format_number, format_p, level_text, shared_decimals

__all__ = ["DisplayNumbers", "display_numbers", "format_interval", "level_text", "margin_decimals", "EFFECT_DECIMALS",
           "DIGITS", "EFFECT_FOR", "STATISTIC_LABEL", "RANK_KEYS", "U_KEYS", "MEDIAN_KEYS"]

# Standardised effect sizes are shown with two decimals (common practice), more when a narrow
# interval would otherwise show the same number at both ends (very large groups).
EFFECT_DECIMALS = 2
# Significant digits of estimates, intervals and statistics in the text.
DIGITS = 3

# What the report needs to know of each procedure, from its record (engine.procedures.registry).
# The effect sizes that go with each procedure's question.
EFFECT_FOR: dict[str, tuple[str, ...]] = {r.key: r.effect_sizes for r in RECORDS}
# How each procedure's statistic is written ("Welch t(52.3) = 2.84"); None: not written.
STATISTIC_LABEL: dict[str, str | None] = {r.key: r.statistic_label for r in RECORDS}
RANK_KEYS = tuple(r.key for r in RECORDS if r.family == "rank")
# Procedures whose statistic is U, a whole or half number.
U_KEYS = tuple(r.key for r in RECORDS if r.statistic_in_halves)
MEDIAN_KEYS = tuple(r.key for r in RECORDS if r.estimate_kind == "median")


@dataclass(frozen=True)
class DisplayNumbers:
    """The display strings of one procedure's result, shared by the paragraph and the tables.

    ``effect_key`` and ``effect_name`` name the effect size paired with the procedure (None
    when none was computed), ``effect_level`` the level of its interval (which may differ from
    the result's: a margin question sets the (1 - 2 alpha) interval against its margin);
    ``decimals`` is shared by the estimate, its interval and the group summaries (None: each in
    scientific notation), and for a margin question by the margin as well.
    """

    level: str
    estimate: str
    interval: str | None
    statistic: str | None
    df: str | None
    p: str | None
    mc_se: str | None
    effect_key: str | None
    effect_name: str | None
    effect: str | None
    effect_interval: str | None
    decimals: int | None
    effect_level: str | None = None


def _decimals_shared(values, digits: int = DIGITS) -> int | None:
    """Decimals for numbers shown together (see :func:`engine.rounding.shared_decimals`)."""
    return shared_decimals(values, digits)


def _fixed(value: float | None, decimals: int | None, digits: int = DIGITS) -> str:
    return fixed(value, decimals, digits=digits)


def format_interval(interval, *, decimals: int | None = None, digits: int = DIGITS) -> str | None:
    """An interval in words and numbers: "1.2 to 7.0", "at least 1.2" or "at most 7.0".

    Parameters
    ----------
    interval : engine.results.Interval or None
        None gives None; an open end (one-sided interval) is written in words.
    decimals : int or None, keyword-only
        Decimals of both ends; None: enough to show the larger end to ``digits`` significant
        digits, shared by both ends.
    digits : int, keyword-only
        Significant digits when ``decimals`` is None.
    """
    if interval is None:
        return None
    low, high = interval.low, interval.high
    if decimals is None:
        decimals = _decimals_shared([low, high], digits)
    if low is None and high is None:
        return "unbounded"
    # An end the test rejects is left out of the interval; that is said where it decides the
    # reading (an end at 0, no difference). Elsewhere the open end lies as close to the value
    # shown as the rounding allows, and "from above 10.6" would only puzzle a reader.
    low_open = getattr(interval, "low_open", False) and low == 0
    high_open = getattr(interval, "high_open", False) and high == 0
    if high is None:
        return f"{'above' if low_open else 'at least'} {_fixed(low, decimals)}"
    if low is None:
        return f"{'below' if high_open else 'at most'} {_fixed(high, decimals)}"
    if low_open or high_open:
        return (f"from {'above ' if low_open else ''}{_fixed(low, decimals)} to "
                f"{'below ' if high_open else ''}{_fixed(high, decimals)}")
    return f"{_fixed(low, decimals)} to {_fixed(high, decimals)}"


def _df_text(df: float | None) -> str | None:
    if df is None or not math.isfinite(df):
        return None
    if abs(df - round(df)) < 1e-9:
        return f"{int(round(df))}"
    return format_number(df, digits=DIGITS)


def _statistic_text(key: str, value: float | None) -> str | None:
    if value is None or not math.isfinite(value):
        return None
    if key in U_KEYS and abs(value * 2 - round(value * 2)) < 1e-9:
        return f"{value:.1f}".removesuffix(".0")  # U is a whole or half number
    return format_number(value, digits=DIGITS)


def _effect_decimals(effect) -> int:
    """Two decimals, or more until the value and the interval's ends that differ read
    differently."""
    values = [effect.value, effect.interval.low, effect.interval.high]
    decimals = shared_decimals(values, start=EFFECT_DECIMALS)
    return EFFECT_DECIMALS if decimals is None else decimals


def _effect_for(analysis, key: str):
    paired = getattr(analysis.spec, "design", "independent") == "paired"
    for name in EFFECT_FOR.get(key, ("paired_d_z",) if paired else ("hedges_g",)):
        effect = analysis.effect_sizes.get(name)
        if effect is not None:
            return effect
    return None


def display_numbers(analysis, procedure: str | None = None) -> DisplayNumbers:
    """The figures of one procedure's result as the report writes them.

    Parameters
    ----------
    analysis : engine.analysis.Analysis
        The finished analysis.
    procedure : str or None, optional
        A procedure key; None takes the recommended one.

    Returns
    -------
    DisplayNumbers
        The confidence level, the estimate, its interval, the test statistic, degrees of
        freedom, p-value, Monte Carlo error and the paired effect size with its interval, each as
        text (None where the procedure gives none), exactly as in :func:`render`'s paragraph and
        tables, so that a window showing them reads the same as the copied report.

    Raises
    ------
    engine.errors.OptionProblem
        When ``procedure`` was not run for these data.

    Notes
    -----
    The estimate and both interval ends share one number of decimals: enough to show the largest
    of them to three significant digits, more while two of them that differ would read alike
    (:func:`engine.rounding.shared_decimals`). Standardised effect sizes get two decimals, more
    while the value and the ends of their interval would otherwise read alike. p-values follow
    :func:`format_p`.

    References
    ----------
    American Psychological Association (2020). Publication Manual, 7th ed., chapter 6 (numbers
    and statistics in text).
    """
    key = procedure or analysis.recommendation.key
    _check_procedure(analysis, key)
    return _numbers(analysis, key, analysis.procedures[key])


def _ends(interval) -> list[float]:
    if interval is None:
        return []
    return [float(end) for end in (interval.low, interval.high) if end is not None]


def margin_decimals(answer) -> int | None:
    """The decimals the verdict against a margin (:meth:`engine.question.Question.margin_words`)
    writes its numbers with: shared by the margin and the intervals, so that every table shows
    the figures of the verdict."""
    margin = answer.margin
    return shared_decimals([margin.low, margin.high, *_ends(answer.interval),
                            *_ends(answer.difference_interval)])


def _numbers(analysis, key: str, result) -> DisplayNumbers:
    interval = result.interval
    answer = analysis.margin_answer(key) if getattr(analysis, "margin", None) is not None else None
    if answer is not None:
        decimals = margin_decimals(answer)
    else:
        decimals = _decimals_shared([result.estimate] + _ends(interval))
    effect = _effect_for(analysis, key)
    effect_decimals = EFFECT_DECIMALS if effect is None else _effect_decimals(effect)
    return DisplayNumbers(
        level=level_text(interval.level if interval is not None else analysis.spec.level),
        estimate=_fixed(result.estimate, decimals),
        interval=format_interval(interval, decimals=decimals),
        statistic=_statistic_text(key, result.statistic) if STATISTIC_LABEL.get(key) else None,
        df=_df_text(result.df),
        p=None if result.p_value is None else format_p(result.p_value),
        mc_se=(None if result.mc_standard_error is None
               else format_number(result.mc_standard_error, digits=2)),
        effect_key=None if effect is None else effect.key,
        effect_name=None if effect is None else effect.name,
        effect=None if effect is None else _fixed(effect.value, effect_decimals),
        effect_interval=None if effect is None else format_interval(effect.interval,
                                                                    decimals=effect_decimals),
        decimals=decimals,
        effect_level=None if effect is None else level_text(effect.interval.level),
    )


# Estimates that are not in the values' own units (their decimals say nothing of the values').
_UNITLESS = {r.key for r in RECORDS if r.estimate_kind in ("probability", "ratio")}


def _summary_decimals(analysis, numbers_decimals: int | None, key: str | None = None) -> int | None:
    """Decimals of the group summaries: their own, or more to match those of procedure ``key``'s
    estimate when it is in the values' units (a probability or a ratio is not)."""
    if key in _UNITLESS:
        numbers_decimals = None
    values = []
    for s in analysis.summaries:
        values += [s.mean, s.sd, s.median, s.q1, s.q3]
    own = _decimals_shared(values)
    if own is None or numbers_decimals is None:
        return own
    return max(own, numbers_decimals)


def _check_procedure(analysis, key: str) -> None:
    if key not in analysis.procedures:
        from ..errors import OptionProblem

        raise OptionProblem(f"The procedure '{key}' was not run for these data, so it cannot be reported.")
