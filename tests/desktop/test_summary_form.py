"""The form of summary statistics: pasting fills it, its results are analyze_summaries' (checked
against scipy's ttest_ind_from_stats), bad entries are said in one line, copy carries the tables."""

from __future__ import annotations

import math

import pytest
from PySide6.QtGui import QGuiApplication
from scipy import stats as scipy_stats

from desktop.summary_form import SummaryForm, parse_block
from engine.group_stats import GroupStats
from engine.question import Question
from engine.rounding import format_p
from engine.spec import AnalysisSpec
from engine.summary_analysis import analyze_summaries

BLOCK = "A\t12\t41.2\t3.1\nB\t15\t38.0\t4.4\n"


@pytest.fixture
def form(qtbot):
    made = SummaryForm()
    qtbot.addWidget(made)
    yield made
    made.worker.shutdown()


def compared(qtbot, form):
    with qtbot.waitSignal(form.worker.finished, timeout=20_000):
        assert form.run()
    return form.analysis


def test_pasting_a_block_with_labels_fills_the_form(form):
    assert form.paste_block(BLOCK)
    assert [[row[name].text() for name in ("label", "n", "mean", "spread")] for row in form.fields] == \
        [["A", "12", "41.2", "3.1"], ["B", "15", "38.0", "4.4"]]


def test_pasting_three_columns_under_a_header_keeps_the_labels(form):
    form.fields[0]["label"].setText("treated")
    form.fields[1]["label"].setText("control")
    assert form.paste_block("n\tmean\tsd\r\n20\t5,5\t1,2\r\n22\t4,9\t1,0\r\n")
    assert form.fields[0]["label"].text() == "treated"
    assert form.fields[1]["mean"].text() == "4,9"
    assert form.stats()[1] == GroupStats("control", 22, 4.9, sd=1.0)  # the decimal comma read


def test_a_block_of_another_shape_is_said_and_changes_nothing(form):
    form.paste_block(BLOCK)
    assert not form.paste_block("1\t2\n3\t4\n5\t6")
    assert not form.problem.isHidden()
    assert "\n" not in form.problem.text() and "3 rows" in form.problem.text()
    assert form.fields[0]["n"].text() == "12"
    with pytest.raises(Exception, match="Paste two rows"):
        parse_block("12 41.2")


def test_the_results_are_analyze_summaries_and_scipy(qtbot, form):
    form.paste_block(BLOCK)
    analysis = compared(qtbot, form)
    alone = analyze_summaries(form.stats(), AnalysisSpec())
    assert set(analysis.procedures) == set(alone.procedures)
    for key, result in alone.procedures.items():
        ours = analysis.procedures[key]
        assert (ours.estimate, ours.p_value, ours.interval) == (result.estimate, result.p_value, result.interval)
    assert {k: v.value for k, v in analysis.effect_sizes.items()} == {k: v.value for k, v in alone.effect_sizes.items()}
    # reference: scipy.stats.ttest_ind_from_stats, Welch's and the pooled t-test
    welch = scipy_stats.ttest_ind_from_stats(41.2, 3.1, 12, 38.0, 4.4, 15, equal_var=False)
    pooled = scipy_stats.ttest_ind_from_stats(41.2, 3.1, 12, 38.0, 4.4, 15, equal_var=True)
    assert analysis.procedures["welch_t"].p_value == pytest.approx(welch.pvalue, rel=1e-10)
    assert analysis.procedures["pooled_t"].p_value == pytest.approx(pooled.pvalue, rel=1e-10)
    shown = form.results.toPlainText()
    assert format_p(welch.pvalue) in shown
    assert f"Suggested: {analysis.recommendation.name}" in shown
    assert "Mann-Whitney" in shown  # the findings name what needs the values
    assert "shape of each group" in shown


def test_changed_numbers_take_the_results_away(qtbot, form):
    form.paste_block(BLOCK)
    compared(qtbot, form)
    assert "A minus B" in form.results.toPlainText()
    form.fields[1]["n"].setText("16")
    assert form.analysis is None and not form.copy_button.isEnabled()
    assert "press Compare" in form.results.toPlainText()


def test_a_standard_error_is_turned_into_the_sd(qtbot, form):
    form.spread_kind.setCurrentIndex(1)
    form.paste_block("A\t12\t41.2\t0.9\nB\t15\t38.0\t1.1\n")
    analysis = compared(qtbot, form)
    # reference: scipy.stats.ttest_ind_from_stats with SD = SE x sqrt(n)
    welch = scipy_stats.ttest_ind_from_stats(41.2, 0.9 * math.sqrt(12), 12, 38.0, 1.1 * math.sqrt(15), 15,
                                             equal_var=False)
    assert analysis.procedures["welch_t"].p_value == pytest.approx(welch.pvalue, rel=1e-10)
    assert "from its standard error" in form.results.toPlainText()


def test_known_sds_add_the_z_test(qtbot, form):
    form.spread_kind.setCurrentIndex(2)
    form.paste_block(BLOCK)
    analysis = compared(qtbot, form)
    # reference: the two-sided z-test from the normal law, 2 * norm.sf(|z|) (scipy)
    z = (41.2 - 38.0) / math.sqrt(3.1 ** 2 / 12 + 4.4 ** 2 / 15)
    assert analysis.procedures["z"].p_value == pytest.approx(2 * scipy_stats.norm.sf(z), rel=1e-10)
    assert analysis.recommendation.key == "z"


def test_the_window_question_is_taken(qtbot):
    form = SummaryForm(AnalysisSpec(question=Question(kind="differ", level=0.9)))
    qtbot.addWidget(form)
    form.paste_block(BLOCK)
    analysis = compared(qtbot, form)
    assert analysis.procedures["welch_t"].interval.level == 0.9
    assert "90% interval" in form.results.toPlainText()
    form.worker.shutdown()


@pytest.mark.parametrize("box, text, said", [
    ("n", "12.5", "n must be a whole number"),
    ("mean", "forty", "'forty' is not a number"),
    ("spread", "", "SD is missing"),
    ("spread", "-1", "must be a number of 0 or more"),
    ("n", "1", "2 or more"),
])
def test_a_bad_entry_is_said_in_one_line(form, box, text, said):
    form.paste_block(BLOCK)
    form.fields[1][box].setText(text)
    assert not form.run()
    assert said in form.problem.text() and "\n" not in form.problem.text()
    assert not form.worker.busy


def test_the_same_label_twice_is_said(qtbot, form):
    form.paste_block("A\t12\t41.2\t3.1\nA\t15\t38.0\t4.4\n")
    with qtbot.waitSignal(form.worker.failed, timeout=20_000):
        form.run()
    assert "share the label" in form.problem.text()


def test_a_file_of_summaries_fills_the_form(tmp_path, form):
    path = tmp_path / "certificate.csv"
    path.write_text("group,n,mean,se\nlot 7,10,5.25,0.31\nlot 9,11,4.80,0.28\n", encoding="utf-8")
    assert form.open_file(path)
    assert form.spread_kind.currentIndex() == 1
    assert form.stats() == (GroupStats("lot 7", 10, 5.25, se=0.31), GroupStats("lot 9", 11, 4.8, se=0.28))
    bad = tmp_path / "three.csv"
    bad.write_text("label,n,mean,sd\na,3,1,1\nb,3,1,1\nc,3,1,1\n", encoding="utf-8")
    assert not form.open_file(bad)
    assert "three.csv, row 4" in form.problem.text()


def test_copy_puts_the_tables_on_the_clipboard(qtbot, form):
    form.paste_block(BLOCK)
    analysis = compared(qtbot, form)
    form.copy_results()
    data = QGuiApplication.clipboard().mimeData()
    assert "<table" in data.html()
    assert analysis.procedures["welch_t"].name in data.text()
    assert format_p(analysis.procedures["welch_t"].p_value) in data.text()


def test_the_window_menu_opens_the_form_with_its_question(make_window, qtbot):
    window = make_window()
    window.session.ask(level=0.99)
    window.summary_action.trigger()
    form = window.findChild(SummaryForm)
    assert form is not None and form.isVisible()
    assert form.spec.question.level == 0.99
    form.close()
