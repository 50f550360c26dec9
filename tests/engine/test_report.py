"""The report text: rounding, p-values, the paragraph per procedure, the HTML and plain tables."""

import re
from html.parser import HTMLParser

import numpy as np
import pytest
from scipy import stats

from engine import report
from engine.spec import AnalysisSpec, Statements
from engine.question import Question
from engine.advice import recommend
from engine.analysis import Analysis, PROCEDURE_NAMES, Robustness
from engine.diagnostics import diagnose
from engine.errors import OptionProblem
from engine.procedures import t
from engine.report import format_number, format_p, render
from engine.results import EffectSize, Groups, Interval, ProcedureResult
from engine.summary import summarize


# -- format_p and format_number ------------------------------------------------------------------

@pytest.mark.parametrize("p, text", [
    # convention: exact p to two significant digits, "< 0.001" below one in a thousand
    # (APA Publication Manual, 7th ed., section 6.36 - common practice)
    (0.031, "0.031"),
    (0.0042, "0.0042"),
    (0.001, "0.0010"),
    (0.0009999, "< 0.001"),
    (1e-300, "< 0.001"),
    (0.0, "< 0.001"),
    (1.0, "1.0"),
    (0.27, "0.27"),
    (0.04999, "0.050"),
    (0.0099996, "0.010"),
    (0.5, "0.50"),
    (float("nan"), "n/a"),
    (None, "n/a"),
])
def test_format_p(p, text):
    assert format_p(p) == text


def test_p_clause_reads_in_a_sentence():
    assert report.p_clause(0.031) == "p = 0.031"
    assert report.p_clause(1e-9) == "p < 0.001"


@pytest.mark.parametrize("value, digits, text", [
    (4.1234, 3, "4.12"),
    (1234.56, 3, "1235"),        # digits left of the point are kept
    (0.012345, 3, "0.0123"),
    (-7.0, 3, "-7.00"),
    (9.996, 3, "10.0"),          # rounding carries into a new digit
    (0.0001234, 3, "0.000123"),
    (1.23e-5, 3, "1.23e-05"),
    (2.5e12, 2, "2.5e+12"),
    (0.0, 3, "0"),
    (-0.0004, 1, "-0.0004"),
    (float("nan"), 3, "n/a"),
    (float("inf"), 3, "infinity"),
])
def test_format_number(value, digits, text):
    assert format_number(value, digits=digits) == text


def test_format_number_agrees_with_python_significant_rounding():
    # reference: Python's own "g" formatting rounds to the same significant digits
    rng = np.random.default_rng(1)
    for value in rng.normal(0, 50, 200):
        assert float(format_number(value, digits=3)) == pytest.approx(float(f"{value:.3g}"), abs=0.5)
        if abs(value) < 100:
            assert float(format_number(value, digits=3)) == float(f"{value:.3g}")


def _shown(value, *shared):
    """A value rounded as the report documents it: with the decimals that show the largest of
    ``shared`` (default: the value) to three significant digits."""
    # reference: the rounding rule of engine.report.render's Notes, written out independently
    largest = max(abs(v) for v in (shared or (value,)))
    decimals = max(0, 2 - int(np.floor(np.log10(largest))))
    return f"{value:.{decimals}f}"


# -- building analyses ----------------------------------------------------------------------------

def _effect(key, name, value, low, high, alternative):
    return EffectSize(key, name, value, Interval.for_alternative(low, high, 0.95, alternative), "test")


def _analysis(groups, *, alternative="two-sided", extra=None, screening=None, source=None, **flags):
    """An analysis with the real t procedures and hand-made results for the others."""
    x, y = groups.x, groups.y
    common = dict(alternative=alternative)
    procedures = {"welch_t": t.welch_t(x, y, **common), "pooled_t": t.pooled_t(x, y, **common)}
    if flags.get("known_sd"):
        procedures["z"] = t.z_test(x, y, sd=flags["known_sd"], **common)
    procedures.update(extra or {})
    sizes = {"hedges_g": _effect("hedges_g", "Hedges' g", 0.6612, 0.1874, 1.1349, alternative),
             "rank_biserial": _effect("rank_biserial", "rank-biserial correlation", 0.41, 0.12, 0.63,
                                      alternative)}
    checks = diagnose(groups)
    return Analysis(
        groups=groups, spec=AnalysisSpec(question=Question.from_alternative(alternative), seed=1,
                                          statements=Statements(**flags)),
        summaries=(summarize(groups.labels[0], x), summarize(groups.labels[1], y)),
        diagnostics=checks, recommendation=recommend(checks, groups, **flags),
        procedures=procedures, effect_sizes=sizes, robustness=Robustness((), True, 0.95),
        screening=screening, source=source or {})


def _resampled(alternative="two-sided"):
    interval = Interval.for_alternative(0.512, 2.437, 0.95, alternative)
    return {
        "mann_whitney": ProcedureResult(
            "mann_whitney", PROCEDURE_NAMES["mann_whitney"], 1.43, "Hodges-Lehmann shift", 1032.5,
            "U", None, 0.0041, interval, alternative, "exact distribution of the rank sum"),
        "permutation_mean": ProcedureResult(
            "permutation_mean", PROCEDURE_NAMES["permutation_mean"], 1.52, "difference in means", 1.52,
            "difference in means", None, 0.0042, interval, alternative, "random reshuffles of labels",
            mc_standard_error=0.00065),
        "bootstrap_mean": ProcedureResult(
            "bootstrap_mean", PROCEDURE_NAMES["bootstrap_mean"], 1.52, "difference in means", None,
            None, None, None, interval, alternative, "BCa bootstrap"),
    }


@pytest.fixture
def groups():
    rng = np.random.default_rng(7)
    return Groups(("adhesive <new> & co", "adhesive old"), rng.normal(12.0, 2.0, 40),
                  rng.normal(10.5, 2.5, 35))


class _Balance(HTMLParser):
    """Checks that every opened tag is closed in order; records tags and text."""

    def __init__(self):
        super().__init__()
        self.stack, self.tags, self.text, self.problems = [], [], [], []

    def handle_starttag(self, tag, attrs):
        self.stack.append(tag)
        self.tags.append(tag)

    def handle_endtag(self, tag):
        if not self.stack or self.stack.pop() != tag:
            self.problems.append(tag)

    def handle_data(self, data):
        self.text.append(data)


def _parse(fragment):
    parser = _Balance()
    parser.feed(fragment)
    parser.close()
    return parser


# -- the paragraph --------------------------------------------------------------------------------

def test_welch_paragraph_has_the_reference_numbers_rounded(groups):
    text = render(_analysis(groups)).paragraph
    # reference: scipy.stats.ttest_ind(x, y, equal_var=False) with its Welch df and interval
    expected = stats.ttest_ind(groups.x, groups.y, equal_var=False)
    ci = expected.confidence_interval(0.95)
    assert f"Welch t({expected.df:.1f}) = {expected.statistic:.2f}" in text
    assert f"p = {format_p(expected.pvalue)}" in text
    diff = groups.x.mean() - groups.y.mean()
    ends = (diff, ci.low, ci.high)
    assert (f"difference in means {_shown(diff, *ends)}, 95% CI {_shown(ci.low, *ends)} to "
            f"{_shown(ci.high, *ends)}") in text
    assert "Hedges' g = 0.66, 95% CI 0.19 to 1.13" in text
    # the group means carry at least the decimals of the difference (here two)
    assert _shown(diff, *ends).split(".")[1].__len__() == 2
    assert f"mean {groups.x.mean():.2f}, SD {np.std(groups.x, ddof=1):.2f}, n = 40" in text
    assert "was higher than" in text
    assert "suggested" not in text  # the recommended procedure needs no remark


def test_a_negative_difference_reads_lower(groups):
    swapped = Groups(groups.labels[::-1], groups.y, groups.x)
    text = render(_analysis(swapped)).paragraph
    assert "was lower than" in text
    # reference: scipy.stats.ttest_ind(y, x, equal_var=False); the sign follows group 1 - group 2
    assert f"= {stats.ttest_ind(groups.y, groups.x, equal_var=False).statistic:.2f}" in text


def test_pooled_paragraph_has_whole_degrees_of_freedom(groups):
    text = render(_analysis(groups, equal_spread_known=True)).paragraph
    # reference: scipy.stats.ttest_ind(x, y, equal_var=True), df = n1 + n2 - 2 = 73
    expected = stats.ttest_ind(groups.x, groups.y, equal_var=True)
    assert f"pooled t(73) = {expected.statistic:.2f}" in text


def test_one_sided_intervals_name_their_open_end(groups):
    analysis = _analysis(groups, alternative="greater", extra=_resampled("greater"))
    text = render(analysis).paragraph
    # reference: scipy.stats.ttest_ind(..., equal_var=False, alternative="greater")
    expected = stats.ttest_ind(groups.x, groups.y, equal_var=False, alternative="greater")
    ci = expected.confidence_interval(0.95)
    diff = groups.x.mean() - groups.y.mean()
    assert f"one-sided 95% CI at least {_shown(ci.low, diff, ci.low)}" in text
    assert "to infinity" not in text
    assert f"one-sided p = {format_p(expected.pvalue)}" in text
    assert "testing whether adhesive <new> & co is higher than adhesive old" in text
    assert "Hedges' g = 0.66, one-sided 95% CI at least 0.19" in text
    less = render(_analysis(groups, alternative="less")).paragraph
    assert "at most" in less and "is lower than" in less


def test_rank_paragraph_gives_u_the_shift_and_medians(groups):
    analysis = _analysis(groups, extra=_resampled())
    text = render(analysis, procedure="mann_whitney").paragraph
    assert "Mann-Whitney U = 1032.5, p = 0.0041" in text
    assert "Hodges-Lehmann shift 1.43, 95% CI 0.51 to 2.44" in text
    assert "tended to be higher" in text
    assert f"median {np.median(groups.x):.2f}" in text
    assert "Rank-biserial correlation = 0.41, 95% CI 0.12 to 0.63" in text
    # a procedure other than the suggestion is reported as such
    assert "suggested for these data was the Welch t-test" in text


def test_a_narrow_effect_size_interval_gets_more_decimals(groups):
    analysis = _analysis(groups)
    narrow = {"hedges_g": _effect("hedges_g", "Hedges' g", 0.0512, 0.0483, 0.0541, "two-sided")}
    analysis = Analysis(**{**{f: getattr(analysis, f) for f in ("groups", "spec", "summaries",
                          "diagnostics", "recommendation", "procedures", "robustness")},
                          "effect_sizes": narrow})
    assert "Hedges' g = 0.051, 95% CI 0.048 to 0.054" in render(analysis).paragraph


def test_permutation_gives_p_with_its_monte_carlo_error(groups):
    text = render(_analysis(groups, extra=_resampled()), procedure="permutation_mean").paragraph
    assert "permutation p = 0.0042 (Monte Carlo standard error 0.00065)" in text


def test_bootstrap_has_an_interval_but_no_p_value(groups):
    text = render(_analysis(groups, extra=_resampled()), procedure="bootstrap_mean").paragraph
    assert "bootstrap 95% CI 0.51 to 2.44" in text
    assert "p =" not in text and "no p-value" in text
    assert "10,000 resamples" in text


def test_z_paragraph_has_no_degrees_of_freedom(groups):
    text = render(_analysis(groups, known_sd=(2.0, 2.5))).paragraph
    # reference: z = (mean1 - mean2) / sqrt(s1^2/n1 + s2^2/n2) with the known sds
    z = (groups.x.mean() - groups.y.mean()) / np.sqrt(4.0 / 40 + 6.25 / 35)
    assert f"z = {z:.2f}" in text and "z(" not in text


def test_values_left_out_are_mentioned(groups):
    from engine.io.screening import ScreeningReport

    screening = ScreeningReport(rows_read=80, labels=groups.labels, n_used=(40, 35),
                                excluded_counts={"missing": 3, "set_aside": 1}, exclusions=(),
                                other_group_rows=0, duplicate_rows=0, possible_slips=(), paired=None)
    text = render(_analysis(groups, screening=screening)).paragraph
    assert ("4 values were left out before the comparison (3 empty or missing, 1 set aside after "
            "review).") in text
    assert "left out" not in render(_analysis(groups)).paragraph


def test_a_procedure_that_was_not_run_is_refused_with_a_sentence(groups):
    with pytest.raises(OptionProblem, match="bootstrap_median.*not run"):
        render(_analysis(groups), procedure="bootstrap_median")


def test_display_numbers_are_the_figures_of_the_paragraph(groups):
    analysis = _analysis(groups, extra=_resampled())
    # reference: scipy.stats.ttest_ind(x, y, equal_var=False) and its confidence_interval(0.95)
    expected = stats.ttest_ind(groups.x, groups.y, equal_var=False)
    ci = expected.confidence_interval(0.95)
    shown = report.display_numbers(analysis)  # the suggested procedure: Welch here
    assert analysis.recommendation.key == "welch_t"
    ends = (groups.x.mean() - groups.y.mean(), ci.low, ci.high)
    assert shown.estimate == _shown(ends[0], *ends)
    assert shown.interval == f"{_shown(ci.low, *ends)} to {_shown(ci.high, *ends)}"
    assert shown.statistic == f"{expected.statistic:.2f}" and shown.df == f"{expected.df:.1f}"
    assert shown.p == format_p(expected.pvalue) and shown.level == "95%"
    assert (shown.effect_key, shown.effect, shown.effect_interval) == ("hedges_g", "0.66", "0.19 to 1.13")
    paragraph = render(analysis).paragraph
    for text in (shown.estimate, shown.interval, shown.statistic, shown.df, shown.p):
        assert text in paragraph
    ranks = report.display_numbers(analysis, "mann_whitney")
    assert (ranks.statistic, ranks.effect_key, ranks.mc_se) == ("1032.5", "rank_biserial", None)
    assert report.display_numbers(analysis, "permutation_mean").mc_se == "0.00065"
    with pytest.raises(OptionProblem, match="bootstrap_median.*not run"):
        report.display_numbers(analysis, "bootstrap_median")


# -- HTML and plain text --------------------------------------------------------------------------

@pytest.mark.parametrize("key", ["welch_t", "mann_whitney", "permutation_mean", "bootstrap_mean"])
def test_html_is_well_formed_with_tables_and_escaped_labels(groups, key):
    analysis = _analysis(groups, extra=_resampled(), source={"file": "glue <trial>.csv"})
    fragment = render(analysis, procedure=key).html
    parsed = _parse(fragment)
    assert not parsed.problems and not parsed.stack
    assert parsed.tags.count("table") == 2
    assert "&lt;new&gt; &amp; co" in fragment and "<new>" not in fragment
    assert "glue &lt;trial&gt;.csv" in fragment
    assert set(parsed.tags) <= {"p", "h3", "ul", "li", "table", "thead", "tbody", "tr", "th", "td"}
    text = "".join(parsed.text)
    assert "adhesive <new> & co" in text  # unescaped back by the parser: the label survives intact
    assert "not the size of an effect" in text


def test_html_tables_share_the_width_and_keep_short_cells_on_one_line(groups):
    # pasted into a word processor, a table takes the column widths it asks for; LibreOffice
    # Writer 7.4, which reads width attributes but not the nowrap style, was the check by eye
    fragment = render(_analysis(groups)).html
    tables = fragment.split("<table")[1:]
    assert len(tables) == 2
    for table in tables:
        first_row = re.split(r"<tr[^>]*>", table, maxsplit=1)[1].split("</tr>")[0]
        shares = [int(w) for w in re.findall(r'width="(\d+)%"', first_row)]
        assert len(shares) >= 2 and abs(sum(shares) - 100) <= len(shares)
    summary = tables[1]
    assert summary.count("<td nowrap") == summary.count("<td") == 14  # two groups of seven
    assert len(re.findall(r"<th[^>]* nowrap", summary)) == 7
    heading, *_ = re.findall(r'<th[^>]*width="(\d+)%"[^>]*>n</th>', summary)
    # on a page some 640 px wide, 5% (32 px) holds two digits and the cell's 16 px of padding
    assert int(heading) >= 5


def test_result_table_rows_hold_the_numbers(groups):
    analysis = _analysis(groups)
    plain = render(analysis).plain
    # reference: scipy.stats.ttest_ind(x, y, equal_var=False)
    expected = stats.ttest_ind(groups.x, groups.y, equal_var=False)
    lines = plain.splitlines()
    row = {line.split("  ")[0].strip(): line.split("  ", 1)[1].strip() for line in lines
           if "  " in line and not line.startswith(" ")}
    assert row["Degrees of freedom"] == f"{expected.df:.1f}"
    assert row["p-value"] == format_p(expected.pvalue)
    assert row["Test statistic"] == f"t = {expected.statistic:.2f}"


def test_plain_text_tables_are_aligned(groups):
    plain = render(_analysis(groups)).plain
    lines = plain.splitlines()
    start = next(i for i, line in enumerate(lines) if line.startswith("Group "))
    header, first, second = lines[start:start + 3]
    # numbers are right-aligned under their headings: every line of the table ends together
    assert len(header) == len(first) == len(second)
    assert first.startswith("adhesive <new> & co") and "40" in first


def test_the_report_does_not_depend_on_a_missing_measure_name(groups):
    with_name = render(_analysis(groups, source={"group_column": "batch", "value_columns": ["peel force"]}))
    assert with_name.paragraph.startswith("The mean peel force of adhesive <new> & co")
    assert render(_analysis(groups)).paragraph.startswith("The mean of adhesive <new> & co")


# -- the whole analysis, once every procedure is in place ----------------------------------------

def test_render_a_full_analysis_from_analyze(groups):
    pytest.importorskip("engine.procedures.ranks", reason="rank procedures not in place yet")
    pytest.importorskip("engine.procedures.resampling", reason="resampling not in place yet")
    pytest.importorskip("engine.effects", reason="effect sizes not in place yet")
    from engine.analysis import analyze

    analysis = analyze(groups, AnalysisSpec(resamples=500, seed=3))
    for key in analysis.procedures:
        text = render(analysis, procedure=key)
        assert text.paragraph and not _parse(text.html).problems
        assert text.plain.endswith("\n")
    # reference: scipy.stats.ttest_ind(x, y, equal_var=False)
    expected = stats.ttest_ind(groups.x, groups.y, equal_var=False)
    assert f"= {expected.statistic:.2f}" in render(analysis, procedure="welch_t").paragraph


@pytest.mark.parametrize("interval, text", [
    # convention: both ends share the decimals that show the larger end to three digits
    (Interval(0.1234, 1.9876, 0.95), "0.12 to 1.99"),
    (Interval(-12.345, -1.2, 0.95), "-12.3 to -1.2"),
    (Interval.for_alternative(0.1234, 9.0, 0.95, "greater"), "at least 0.123"),
    (Interval.for_alternative(0.1234, 9.0, 0.95, "less"), "at most 9.00"),
    (Interval(None, None, 0.95), "unbounded"),
    (None, None),
])
def test_format_interval(interval, text):
    assert report.format_interval(interval) == text


@pytest.mark.parametrize("shift, alternative", [(0.0, "two-sided"), (3.0, "two-sided"), (3.0, "greater")])
def test_the_paragraph_says_what_the_result_means_at_the_chosen_level(shift, alternative):
    from engine.analysis import analyze

    rng = np.random.default_rng(31)
    groups = Groups(("treated", "control"), rng.normal(10 + shift, 2, 30), rng.normal(10, 2, 30))
    analysis = analyze(groups, AnalysisSpec(question=Question.from_alternative(alternative), resamples=200, seed=1))
    text = render(analysis, procedure="welch_t").paragraph
    # reference: scipy.stats.ttest_ind(x, y, equal_var=False) at the 5% level
    p = stats.ttest_ind(groups.x, groups.y, equal_var=False, alternative=alternative).pvalue
    if p < 0.05:
        assert "the data give clear evidence of" in text
        if alternative == "greater":
            assert "treated being higher than control" in text
    else:
        assert "do not give clear evidence" in text and "does not show the groups are the same" in text


@pytest.mark.parametrize("value, text", [(-9.2e-15, "0.00"), (0.0049, "0.0049"), (-0.0051, "-0.0051"),
                                         (4.567, "4.6"), (-1.2, "-1.2"), (21.3, "21"), (float("nan"), "n/a")])
def test_format_shape_hides_rounding_noise_only(value, text):
    assert report.format_shape(value) == text


# -- what a reviewer asks for ---------------------------------------------------------------------

@pytest.fixture
def full_analysis():
    from engine.analysis import analyze

    rng = np.random.default_rng(12)
    groups = Groups(("north_forge", "south_forge"), rng.normal(840, 15, 32), rng.normal(818, 27, 30))
    return analyze(groups, AnalysisSpec(resamples=400, seed=2))


def test_plain_paragraphs_are_single_lines(full_analysis):
    text = render(full_analysis)
    lines = text.plain.splitlines()
    assert len(text.paragraph) > 120 and text.paragraph in lines
    assert report.CAUTION_LINE in lines
    assert report.agreement(full_analysis) in lines
    for reason in full_analysis.recommendation.reasons:
        assert f"- {reason}" in lines


@pytest.mark.parametrize("form", ["html", "plain"])
def test_the_report_carries_every_procedure_the_reasons_and_the_checks(full_analysis, form):
    analysis = full_analysis
    text = getattr(render(analysis), form)
    if form == "html":
        text = "".join(_parse(text).text).replace("\xa0", " ")  # numbers keep to one line
    assert "Estimate, north_forge minus south_forge" in text
    assert "Difference in means, north_forge minus south_forge" in text
    for row in analysis.robustness.rows:
        shown = report.display_numbers(analysis, row.key)
        assert report.capital(row.name) in text and shown.estimate in text
        if shown.interval is not None:
            assert shown.interval in text
        if shown.p is not None:
            assert shown.p in text
    # the Welch p-value as scipy gives it (reference: scipy.stats.ttest_ind(equal_var=False))
    welch = stats.ttest_ind(analysis.groups.x, analysis.groups.y, equal_var=False).pvalue
    assert format_p(welch) in text
    for reason in analysis.recommendation.reasons:
        assert reason in text
    for option in analysis.recommendation.considered:
        assert report.capital(option.name) in text and option.why_not in text
    for finding in analysis.diagnostics.findings:
        assert finding.text in text
    assert "interquartile range (IQR) is the width of the middle half" in text
    assert "Excess kurtosis measures how heavy the tails are" in text


def test_a_row_without_an_interval_says_why(full_analysis):
    assert full_analysis.procedures["permutation_median"].interval is None
    plain = render(full_analysis).plain
    row = next(line for line in plain.splitlines() if line.startswith("Permutation test, difference in medians"))
    assert " none " in row
    assert "gives a p-value but no interval" in plain


def test_a_one_sided_question_against_the_data_is_not_read_as_no_difference():
    from engine.analysis import analyze

    rng = np.random.default_rng(5)
    # group 2 clearly higher; the question "is group 1 higher?" (the same as "is group 2 lower?")
    groups = Groups(("a", "b"), rng.normal(10, 1, 20), rng.normal(12, 1, 20))
    analysis = analyze(groups, AnalysisSpec(question=Question.from_alternative("greater"), resamples=300, seed=1))
    # reference: scipy.stats.ttest_ind(x, y, equal_var=False): t far below 0 (about -5.5)
    two_sided = stats.ttest_ind(groups.x, groups.y, equal_var=False)
    assert two_sided.statistic < -4
    text = render(analysis, procedure="welch_t")
    assert "The data point clearly the other way: here a was lower than b" in text.paragraph
    assert "two-sided question has to be chosen before the data are seen" in text.paragraph
    assert "does not show the groups are the same" not in text.paragraph
    agreement = report.agreement(analysis)
    assert "none finds a clear difference" not in agreement
    assert "every one of them puts a lower than b, the other way" in agreement
    assert "not clear: the data point the other way" in text.plain
    # asked the right way round, the same data give the ordinary verdict
    right = analyze(groups, AnalysisSpec(question=Question.from_alternative("less"), resamples=300, seed=1))
    assert "other way" not in render(right, procedure="welch_t").paragraph
    assert "all find clear evidence of a being lower than b" in report.agreement(right)
