"""A panel on its own (``python -m desktop.<panel> FILE``) gets the session the window would build."""

from __future__ import annotations

from pathlib import Path

import pandas as pd
import pytest
from scipy import stats

from desktop.panel_alone import DEFAULT_FILE, prepared_session

BOLTS = Path(__file__).resolve().parents[2] / "demo_files" / "bolt_strength.csv"


def test_the_session_holds_the_file_its_groups_and_their_comparison():
    session = prepared_session(BOLTS)
    frame = pd.read_csv(BOLTS)  # the file read on its own, as a reference for the groups
    first, second = session.intake.groups.labels
    assert (first, second) == tuple(frame["supplier"].unique()[:2])
    x = frame.loc[frame["supplier"] == first, "strength_mpa"].to_numpy()
    y = frame.loc[frame["supplier"] == second, "strength_mpa"].to_numpy()
    # reference: scipy.stats.ttest_ind with equal_var=False is Welch's test
    expected = stats.ttest_ind(x, y, equal_var=False).pvalue
    assert session.analysis.procedures["welch_t"].p_value == pytest.approx(expected, rel=1e-12)
    assert session.path == BOLTS and session.problem is None


def test_groups_that_cannot_be_formed_are_the_sessions_problem(tmp_path):
    path = tmp_path / "one_site.csv"
    path.write_text("site,yield\nA,1.0\nA,2.0\nA,3.0\n", encoding="utf-8")
    session = prepared_session(path)
    assert session.problem.startswith("one_site.csv: ") and session.analysis is None
    assert session.table is not None  # the data panel still shows the file


def test_the_default_file_is_there():
    assert DEFAULT_FILE.is_file()
