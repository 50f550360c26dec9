"""The report of an analysis from summary statistics: a whole HTML
page and its plain text, the verdict against a margin first, the figures as scipy gives them."""

from __future__ import annotations

import re
from datetime import datetime, timezone
from html.parser import HTMLParser

import pytest
from scipy import stats as scipy_stats

from engine.group_stats import GroupStats
from engine.question import Margin, Question
from engine.report import summary_report as report
from engine.report.cautions import CAUTIONS_ALWAYS, MARGIN_CAUTIONS
from engine.rounding import format_p
from engine.spec import AnalysisSpec
from engine.summary_analysis import analyze_summaries

A = GroupStats("Supplier A", 12, 41.2, sd=3.1)
B = GroupStats("Supplier B", 15, 38.0, se=1.1)
WHEN = datetime(2026, 3, 4, 10, 30, tzinfo=timezone.utc)


def _analysis(question: Question = Question(), stats=(A, B)):
    return analyze_summaries(stats, AnalysisSpec(question=question))


class _Text(HTMLParser):
    """The text of an HTML page, and whether its tags close in order."""

    def __init__(self) -> None:
        super().__init__()
        self.parts: list[str] = []
        self.open: list[str] = []
        self.balanced = True

    def handle_starttag(self, tag, attrs):
        if tag not in ("meta", "br", "img"):
            self.open.append(tag)

    def handle_endtag(self, tag):
        if not self.open or self.open.pop() != tag:
            self.balanced = False

    def handle_data(self, data):
        self.parts.append(data)


def _text_of(page: str) -> tuple[str, bool]:
    parser = _Text()
    parser.feed(page)
    return " ".join(parser.parts), parser.balanced and not parser.open


def test_a_difference_question_gives_a_whole_page_with_every_part():
    analysis = _analysis()
    page = report.html(analysis, when=WHEN)
    assert page.startswith("<!DOCTYPE html>") and page.rstrip().endswith("</html>")
    text, balanced = _text_of(page)
    assert balanced
    headings = ["The two groups as entered", "The question and what was stated",
                "Every procedure that works from summary statistics", "Effect sizes",
                "Why the Welch t-test", "What needed the values", "Findings", "Before relying on this"]
    places = [text.index(h) for h in headings]
    assert places == sorted(places)
    assert report.ANSWER_HEADING not in text  # no margin, no verdict against one
    assert "2026-03-04 10:30" in text and "no data file was read" in text
    # reference: scipy.stats.ttest_ind_from_stats (B's SD is its SE x sqrt(n))
    welch = scipy_stats.ttest_ind_from_stats(41.2, 3.1, 12, 38.0, 1.1 * 15 ** 0.5, 15, equal_var=False)
    pooled = scipy_stats.ttest_ind_from_stats(41.2, 3.1, 12, 38.0, 1.1 * 15 ** 0.5, 15, equal_var=True)
    assert format_p(welch.pvalue) in text and format_p(pooled.pvalue) in text
    assert "standard error 1.1" in text and "Mann-Whitney U" in text
    for name in ("Cohen's d", "Hedges' g", "Glass's delta"):
        assert name in text
    # the checks of the values never ran, so their cautions are not given
    assert CAUTIONS_ALWAYS[0] not in text and CAUTIONS_ALWAYS[1] in text


def test_the_plain_text_says_the_same():
    analysis = _analysis()
    page, _ = _text_of(report.html(analysis, when=WHEN))
    text = report.plain(analysis)
    assert text.startswith("Comparison of Supplier A and Supplier B from summary statistics\n")
    for line in report.answer_lines(analysis) + report.summary_cautions(analysis):
        assert line in text and line in page
    assert "At 95% confidence the data give clear evidence of a difference" in text


@pytest.mark.parametrize("question, kind", [
    (Question("equivalent", 0.95, margin=Margin.within(5.0, unit="percent")), "equivalent"),
    (Question("equivalent", 0.9, margin=Margin.within(-1.0, 4.0)), "equivalent"),
    (Question("not_worse", 0.95, margin=Margin.not_worse_by(2.0, "lower")), "not_worse"),
])
def test_a_margin_question_says_its_verdict_first(question, kind):
    analysis = _analysis(question)
    key = analysis.recommendation.key
    answer = analysis.margin_answer(key)
    verdict = question.margin_words(answer, analysis.labels, analysis.procedures[key].estimate_name)
    for text in (_text_of(report.html(analysis, when=WHEN))[0], report.plain(analysis)):
        first = text.index(report.ANSWER_HEADING)
        assert first < text.index(verdict) < text.index("The two groups as entered")
        assert MARGIN_CAUTIONS[0] in text
        assert "Margin as entered" in text


def test_a_percentage_margin_is_said_as_entered_and_in_units():
    analysis = _analysis(Question("equivalent", 0.95, margin=Margin.within(5.0, unit="percent")))
    text = report.plain(analysis)
    # 5% of B's mean 38.0 is 1.9
    assert "-5% to 5% of Supplier B's mean (38), that is -1.90 to 1.90 in the measurement's units" in text
    analysis = _analysis(Question("not_worse", 0.95, margin=Margin.not_worse_by(2.5, "higher", unit="percent")))
    assert ("2.5% of Supplier B's mean (38), that is 0.95 in the measurement's units; higher values "
            "are worse") in report.plain(analysis)


def test_a_reopened_analysis_says_so_first():
    analysis = _analysis()
    said = "Run again from its summary statistics, it gave the saved numbers."
    text, _ = _text_of(report.html(analysis, reopened=said, when=WHEN))
    assert text.index(said) < text.index("The two groups as entered")
    assert report.plain(analysis, reopened=said).split("\n")[2] == said


def test_labels_are_text_never_markup():
    odd = (GroupStats("<b>old</b>", 10, 5.0, sd=1.0), GroupStats("new\u202e", 10, 4.0, sd=1.0))
    analysis = _analysis(stats=odd)
    page = report.html(analysis, when=WHEN)
    assert "<b>old</b>" not in page and "&lt;b&gt;old&lt;/b&gt;" in page
    assert "\u202e" not in page and "\u202e" not in report.plain(analysis)


def test_known_sds_give_the_z_test_and_say_so():
    known = (GroupStats("Line 1", 20, 10.0, sd=2.0, sd_known=True),
             GroupStats("Line 2", 25, 9.0, sd=2.0, sd_known=True))
    text = report.plain(_analysis(stats=known))
    assert "Why the z-test" in text and re.search(r"Known population SDs\s+2\.000 and 2\.000", text)
    assert "SD 2, a known population value" in text
