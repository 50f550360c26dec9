"""The summary form saves its analysis, and a saved one opens the form filled in with results."""

from __future__ import annotations

import json

from scipy import stats as scipy_stats

from desktop.summary_form import SummaryForm
from engine import saved
from engine.group_stats import GroupStats

BLOCK = "Batch 1\t12\t41.2\t3.1\nBatch 2\t15\t38.0\t4.4\n"


def test_the_form_saves_and_a_saved_file_opens_it_filled_in(make_window, qtbot, tmp_path):
    window = make_window()
    window.summary_action.trigger()
    form = window.findChild(SummaryForm)
    assert not form.save_button.isEnabled()  # nothing to save before the results
    assert form.paste_block(BLOCK)
    with qtbot.waitSignal(form.worker.finished, timeout=20_000):
        assert form.run()
    assert form.save_button.isEnabled()
    assert form.save_analysis(tmp_path / "batches")  # the suffix is added
    target = tmp_path / "batches.twofold"
    document = json.loads(target.read_text(encoding="utf-8"))
    assert document["summary_statistics"][0] == {"label": "Batch 1", "n": 12, "mean": 41.2, "sd": 3.1,
                                                 "se": None, "sd_known": False}
    first = form.analysis
    form.close()

    assert window.open_file(target)
    qtbot.waitUntil(lambda: window.message_bar.key == "reopen_summary_same", timeout=60_000)
    opened = [f for f in window.findChildren(SummaryForm) if f.isVisible()]
    assert len(opened) == 1
    again = opened[0]
    assert [[row[name].text() for name in ("label", "n", "mean", "spread")] for row in again.fields] == \
        [["Batch 1", "12", "41.2", "3.1"], ["Batch 2", "15", "38.0", "4.4"]]
    assert saved.numbers_of(again.analysis) == saved.numbers_of(first)
    # reference: scipy.stats.ttest_ind_from_stats (Welch)
    welch = scipy_stats.ttest_ind_from_stats(41.2, 3.1, 12, 38.0, 4.4, 15, equal_var=False)
    assert abs(again.analysis.procedures["welch_t"].p_value - welch.pvalue) <= 1e-12 * welch.pvalue
    assert again.analysis.stats == (GroupStats("Batch 1", 12, 41.2, sd=3.1), GroupStats("Batch 2", 15, 38.0, sd=4.4))
    assert again.save_button.isEnabled()
    again.close()


def test_a_damaged_summary_file_is_said_in_one_line(make_window, qtbot, tmp_path):
    window = make_window()
    window.summary_action.trigger()
    form = window.findChild(SummaryForm)
    form.paste_block(BLOCK)
    with qtbot.waitSignal(form.worker.finished, timeout=20_000):
        form.run()
    target = tmp_path / "batches.twofold"
    assert form.save_analysis(target)
    form.close()
    document = json.loads(target.read_text(encoding="utf-8"))
    document["summary_statistics"][1]["n"] = 1
    target.write_text(json.dumps(document), encoding="utf-8")
    window.open_file(target)
    qtbot.waitUntil(lambda: window.message_bar.key is not None and not window.busy, timeout=60_000)
    text = window.message_bar.text
    assert "batches.twofold is damaged" in text and "group 2" in text and "\n" not in text

