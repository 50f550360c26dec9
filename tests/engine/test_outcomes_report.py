"""The report of several outcomes: every outcome's row with the analysis's own figures, the
adjusted p-values as statsmodels gives them, verdicts that follow the chosen adjustment, each
outcome in short, the cautions; as an HTML page and as text."""

from __future__ import annotations

import re
from datetime import datetime, timezone
from html.parser import HTMLParser

import numpy as np
import pandas as pd
import pytest
from statsmodels.stats.multitest import multipletests

from engine.outcomes import long_outcomes, outcomes_from_file, wide_outcomes
from engine.question import Margin, Question
from engine.report import outcomes_report
from engine.report.cautions import CAUTIONS_ALWAYS, HEADING
from engine.report.numbers import format_interval
from engine.rounding import format_p, level_text
from engine.spec import AnalysisSpec, Source

NAMES = ("strength", "hardness", "elongation", "mass")
WHEN = datetime(2026, 3, 2, 9, 30, tzinfo=timezone.utc)


@pytest.fixture(scope="module")
def bolts(tmp_path_factory):
    """Bolts from two invented lots measured four ways: two outcomes differ clearly, one a
    little, one not; one hardness cell is not a number and the elongation has a far value."""
    rng = np.random.default_rng(21)
    n = 20
    frame = pd.DataFrame({"lot": ["east"] * n + ["west"] * n})
    shifts = {"strength": 3.0, "hardness": 1.5, "elongation": 0.6, "mass": 0.0}
    for name, shift in shifts.items():
        frame[name] = np.r_[rng.normal(50 + shift, 2, n), rng.normal(50, 2, n)].round(3)
    frame = frame.astype({"hardness": object})
    frame.loc[4, "hardness"] = "n/a"
    frame.loc[30, "elongation"] = 80.0
    path = tmp_path_factory.mktemp("report") / "bolt_lots.csv"
    frame.to_csv(path, index=False)
    return path


@pytest.fixture(scope="module")
def found(bolts):
    spec = AnalysisSpec(source=Source(str(bolts)), group_column="lot", resamples=200, seed=5)
    return outcomes_from_file(spec, long_outcomes(NAMES))


class _Page(HTMLParser):
    """The page's text, its headings and whether every tag it opens is closed."""

    def __init__(self) -> None:
        super().__init__()
        self.open: list[str] = []
        self.text: list[str] = []
        self.headings: list[tuple[str, str]] = []
        self._heading: str | None = None

    def handle_starttag(self, tag, attrs):
        if tag not in ("meta", "br", "img", "!doctype"):
            self.open.append(tag)
        if tag in ("h1", "h2", "h3"):
            self._heading = tag

    def handle_endtag(self, tag):
        assert self.open and self.open[-1] == tag, (tag, self.open[-3:])
        self.open.pop()
        if tag == self._heading:
            self._heading = None

    def handle_data(self, data):
        self.text.append(data)
        if self._heading:
            self.headings.append((self._heading, data))


def page(html: str) -> _Page:
    parsed = _Page()
    parsed.feed(html)
    parsed.close()
    assert parsed.open == []
    return parsed


def test_every_row_shows_the_analysis_figures_and_the_statsmodels_adjustments(found):
    raw = [done.p_value for done in found.outcomes]
    # reference: statsmodels.stats.multitest.multipletests(raw, method='holm' / 'fdr_bh')
    holm = multipletests(raw, method="holm")[1]
    bh = multipletests(raw, method="fdr_bh")[1]
    head = outcomes_report.headings(found)
    assert head[0] == "Outcome" and head[-1] == "Verdict by Holm"
    for index, done in enumerate(found.outcomes):
        cells = dict(zip(head, outcomes_report.row_cells(found, index)))
        assert cells["Outcome"] == done.outcome.name
        assert cells["n"] == " and ".join(str(n) for n in done.analysis.groups.n)
        assert cells["Procedure"] == done.result.name
        assert cells["p-value"] == format_p(raw[index])
        assert cells["Holm"] == format_p(holm[index]) and cells["Benjamini-Hochberg"] == format_p(bh[index])
        together = cells[f"Interval at {level_text(found.simultaneous_level)} (Bonferroni)"]
        assert together == format_interval(done.simultaneous.interval,
                                           decimals=outcomes_report.display_numbers(done.analysis, done.key).decimals)
        assert cells["Verdict by Holm"] == ("differ" if holm[index] < 0.05 else "no clear difference")
    # the "n/a" hardness cell is left out of that outcome alone
    assert [outcomes_report.row_cells(found, i)[1] for i in range(4)] == ["20 and 20", "19 and 20",
                                                                         "20 and 20", "20 and 20"]


def test_the_verdicts_follow_the_chosen_adjustment_and_say_how_many_the_other_marks(found):
    raw = [done.p_value for done in found.outcomes]
    bh = multipletests(raw, method="fdr_bh")[1]  # reference: statsmodels
    holm = multipletests(raw, method="holm")[1]
    by_bh = found.with_adjustment("bh")
    assert outcomes_report.headings(by_bh)[-1] == "Verdict by Benjamini-Hochberg"
    verdicts = [outcomes_report.row_cells(by_bh, i)[-1] for i in range(4)]
    assert verdicts == ["differ" if p < 0.05 else "no clear difference" for p in bh]
    text = outcomes_report.plain(by_bh)
    assert (f"The verdicts follow Benjamini and Hochberg's adjusted p-values: an outcome is marked when "
            f"its adjusted p-value is below 0.05 (1 minus the confidence level). {sum(bh < 0.05)} of the 4 "
            f"outcomes with a p-value are marked; by Holm's adjustment {sum(holm < 0.05)} would be.") in text
    for finding in found.findings:  # why one would choose each adjustment
        assert finding.text in text


def test_the_html_page_is_complete_and_holds_every_part(found):
    html = outcomes_report.html(found, when=WHEN)
    assert html.startswith("<!DOCTYPE html>\n<html>") and html.endswith("</body></html>")
    parsed = page(html)
    text = " ".join(parsed.text)
    assert ("h1", "east and west compared on 4 outcomes") in parsed.headings
    assert [h for level, h in parsed.headings if level == "h2"] == [
        "Choices made", "Every outcome", "How the verdicts were reached", "Each outcome in short", HEADING]
    assert [h for level, h in parsed.headings if level == "h3"] == list(NAMES)
    assert "Written on 2026-03-02 09:30 UTC by Twofold." in text
    assert found.spec.source.sha256 in text and "bolt_lots.csv" in text
    for index in range(4):
        for cell in outcomes_report.row_cells(found, index):
            assert cell.replace(" ", "&nbsp;") in html or cell in text
    assert "Welch t-test: difference in means" in text
    # each outcome's suggestion and checks in short; the far elongation value is a check worth reading
    elongation = found.outcomes[2].analysis
    assert f"Suggested: the {elongation.recommendation.name}" in text
    assert any(f.text in text for f in elongation.diagnostics.findings if f.key == "outliers" and f.severity != "info")
    for caution in outcomes_report.SEVERAL_CAUTIONS + CAUTIONS_ALWAYS[:1]:
        assert caution in text


def test_the_text_says_what_the_page_says(found):
    text = outcomes_report.plain(found)
    lines = text.splitlines()
    assert lines[:2] == ["east and west compared on 4 outcomes", "=" * 36]
    for section in ("Choices made", "Every outcome", "How the verdicts were reached", "Each outcome in short", HEADING):
        assert lines[lines.index(section) + 1] == "-" * len(section)
    table = next(i for i, line in enumerate(lines) if line.startswith("Outcome "))
    for index, name in enumerate(NAMES):  # one line per outcome, every cell of its row
        row = lines[table + 1 + index]
        assert row.startswith(name)
        for cell in outcomes_report.row_cells(found, index):
            assert cell in row


def test_an_outcome_that_could_not_be_analysed_is_shown_with_its_reason(tmp_path):
    frame = pd.DataFrame({"lot": ["a"] * 6 + ["b"] * 6, "good": np.arange(12.0) ** 1.5,
                          "blank": [""] * 12})
    frame.loc[0, "blank"] = "x"
    path = tmp_path / "one_bad.csv"
    frame.to_csv(path, index=False)
    spec = AnalysisSpec(source=Source(str(path)), group_column="lot", resamples=200, seed=2)
    found = outcomes_from_file(spec, long_outcomes(["good", "blank"]))
    bad = found.outcomes[1]
    cells = outcomes_report.row_cells(found, 1)
    assert cells[0] == "blank" and cells[2] == cells[-1] == "not analysed"
    text = " ".join(page(outcomes_report.html(found, when=WHEN)).text)
    assert f"Not analysed: {bad.problem}" in text
    assert "1 of the 2 outcomes gave no p-value" in text  # the analysis's own finding


def test_text_from_the_file_is_shown_as_text_never_as_markup(tmp_path):
    rng = np.random.default_rng(4)
    name = "<b>width</b>\u202e"
    frame = pd.DataFrame({"lot": ["<i>old</i>"] * 10 + ["new"] * 10, name: rng.normal(5, 1, 20).round(2)})
    path = tmp_path / "plates.csv"
    frame.to_csv(path, index=False)
    spec = AnalysisSpec(source=Source(str(path)), group_column="lot", resamples=200, seed=2)
    found = outcomes_from_file(spec, long_outcomes([name]))
    html = outcomes_report.html(found, when=WHEN)
    assert "<b>width" not in html and "<i>old" not in html and "\u202e" not in html
    assert "&lt;b&gt;width&lt;/b&gt;" in html
    page(html)
    assert "\u202e" not in outcomes_report.plain(found)


def test_an_equivalence_question_gives_equivalence_verdicts(bolts):
    question = Question(kind="equivalent", margin=Margin.within(-3.0, 3.0))
    spec = AnalysisSpec(source=Source(str(bolts)), group_column="lot", resamples=200, seed=5, question=question)
    found = outcomes_from_file(spec, long_outcomes(["mass", "strength"]), procedure="equivalence_welch")
    verdicts = [outcomes_report.row_cells(found, i)[-1] for i in range(2)]
    assert verdicts == ["equivalent" if row.finding else "not shown equivalent" for row in found.rows]
    text = outcomes_report.plain(found)
    assert "Are east and west equivalent" in text
    assert "An outcome not shown equivalent is not shown to differ either" in text


def test_a_saved_analysis_run_again_says_so_first(found, tmp_path):
    from engine import saved

    target = tmp_path / "four.twofold"
    saved.save(target, found)
    reopened = saved.reopen(saved.load(target))
    assert reopened.status == "same"
    html = outcomes_report.html(reopened.prepared, reopened=reopened, when=WHEN)
    parsed = page(html)
    h2 = [h for level, h in parsed.headings if level == "h2"]
    assert h2[0] == "The saved analysis, run again" and reopened.message in " ".join(parsed.text)
    assert re.search(r"The saved analysis, run again\n-+\n\n- Run again on bolt_lots.csv",
                     outcomes_report.plain(reopened.prepared, reopened=reopened))


def test_the_wide_layout_names_the_groups_by_their_place_and_a_percent_margin_as_entered(tmp_path):
    rng = np.random.default_rng(8)
    frame = pd.DataFrame({f"{name}_{lot}": rng.normal(level, 1, 14).round(3)
                          for name, level in (("width", 10), ("depth", 40)) for lot in ("old", "new")})
    path = tmp_path / "plates.csv"
    frame.to_csv(path, index=False)
    question = Question(kind="equivalent", margin=Margin.within(-5.0, 5.0, unit="percent"))
    spec = AnalysisSpec(source=Source(str(path)), layout="wide", resamples=200, seed=2, question=question)
    outcomes = wide_outcomes([("width_old", "width_new"), ("depth_old", "depth_new")], ["width", "depth"])
    found = outcomes_from_file(spec, outcomes)
    text = outcomes_report.plain(found)
    # not the first outcome's columns as if every outcome had them
    assert text.startswith("Two groups compared on 2 outcomes\n") and "width_old and" not in text
    assert "group 1: the first column of each outcome; group 2: the second" in text
    assert "width (columns width_old, width_new); depth (columns depth_old, depth_new)" in text
    assert "Are group 1 and group 2 equivalent within ±5% of group 2's mean?" in text
