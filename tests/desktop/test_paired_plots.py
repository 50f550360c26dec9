"""The plots of paired measurements: what they draw, thinning, the limit on joined lines, and
copying and saving them."""

from __future__ import annotations

import numpy as np
import pytest
from PySide6.QtGui import QGuiApplication
from scipy import stats

from desktop.paired_plots import (MAX_JOINED, DifferencePlot, DifferenceQQPlot, DifferenceShapePlot,
                                  JoinedPairsPlot, joined_segments, pick_points)
from engine.errors import FileProblem


def _pairs(n: int, seed: int = 3) -> tuple[np.ndarray, np.ndarray]:
    rng = np.random.default_rng(seed)
    base = rng.normal(50.0, 4.0, n)
    return base + rng.normal(0.0, 0.8, n), base - 1.2 + rng.normal(0.0, 0.8, n)


@pytest.fixture
def plot(qtbot):
    def make(kind):
        made = kind()
        qtbot.addWidget(made)
        made.resize(420, 300)
        return made
    return make


def test_differences_against_means_draws_every_pair_and_the_mean_line(plot):
    x, y = _pairs(25)
    d, m = x - y, (x + y) / 2
    # the mean difference the paired t-test tests: scipy's ttest_rel statistic times its
    # standard error (SD of the differences over root n) gives it back
    t = stats.ttest_rel(x, y).statistic
    mean_difference = t * np.std(d, ddof=1) / np.sqrt(d.size)
    shown = plot(DifferencePlot)
    shown.show_pairs(m, d, mean_difference=mean_difference, labels=("before", "after"))
    across, up = shown.shown_points()
    assert sorted(zip(across, up)) == sorted(zip(m, d))  # each dot one pair, never x against y's partner
    assert shown.mean_line == pytest.approx(np.mean(d), rel=1e-12)
    assert "before minus after" in shown.plotItem.titleLabel.text
    (x_low, x_high), (y_low, y_high) = shown.getPlotItem().viewRange()
    assert x_low < m.min() and m.max() < x_high  # every point whole
    assert y_low < min(0.0, d.min()) and max(0.0, d.max()) < y_high  # and the line of no difference
    with pytest.raises(ValueError):
        shown.show_pairs(m, d[:-1], mean_difference=0.0, labels=("a", "b"))


def test_large_sets_of_pairs_are_thinned_keeping_the_extremes():
    rng = np.random.default_rng(8)
    m, d = rng.normal(size=50_000), rng.standard_t(3, size=50_000)
    keep = pick_points(m, d, limit=2000)
    assert keep.size == 2000 and np.all(np.diff(keep) > 0)
    for values in (m, d):
        assert {int(np.argmin(values)), int(np.argmax(values))} <= set(keep.tolist())
    assert np.array_equal(keep, pick_points(m, d, limit=2000))  # the same picture on every redraw
    assert np.array_equal(pick_points(m[:10], d[:10]), np.arange(10))


def test_each_unit_is_one_line_from_group_1_to_group_2(plot):
    x, y = _pairs(12)
    across, up = joined_segments(x, y)
    assert np.array_equal(across, np.tile([0.0, 1.0], 12))
    assert np.array_equal(up[0::2], x) and np.array_equal(up[1::2], y)
    shown = plot(JoinedPairsPlot)
    assert shown.show_pairs(x, y, labels=("before", "after")) and shown.drawn
    drawn_across, drawn_up = shown.shown_lines()
    assert np.array_equal(drawn_across, across) and np.array_equal(drawn_up, up)


def test_too_many_units_are_not_joined(plot):
    shown = plot(JoinedPairsPlot)
    x, y = _pairs(MAX_JOINED)
    assert shown.show_pairs(x, y, labels=("a", "b"))
    x, y = _pairs(MAX_JOINED + 1)
    assert not shown.show_pairs(x, y, labels=("a", "b"))  # a thicket: nothing drawn, the caller says so
    assert shown.shown_lines()[0].size == 0


def test_the_shape_of_the_differences_is_named_as_differences(plot):
    x, y = _pairs(30)
    d = x - y
    shape = plot(DifferenceShapePlot)
    shape.show_group(d, mean=float(np.mean(d)), sd=float(np.std(d, ddof=1)))
    assert shape.getPlotItem().getAxis("bottom").labelText == "difference"
    qq = plot(DifferenceQQPlot)
    res = stats.probplot(d)  # scipy's normal Q-Q coordinates
    qq.show_points(res[0][0], res[0][1], mean=float(np.mean(d)), sd=float(np.std(d, ddof=1)))
    assert qq.getPlotItem().getAxis("left").labelText == "difference"
    # a difference belongs to both groups: drawn in neither group's colour
    assert shape.colours.groups[0] == shape.colours.picked


@pytest.mark.parametrize("kind", [DifferencePlot, JoinedPairsPlot, DifferenceShapePlot])
def test_every_paired_plot_copies_and_saves(plot, tmp_path, kind):
    x, y = _pairs(10)
    shown = plot(kind)
    if kind is DifferencePlot:
        shown.show_pairs((x + y) / 2, x - y, mean_difference=float(np.mean(x - y)), labels=("a", "b"))
    elif kind is JoinedPairsPlot:
        shown.show_pairs(x, y, labels=("a", "b"))
    else:
        shown.show_group(x - y, mean=float(np.mean(x - y)), sd=float(np.std(x - y, ddof=1)))
    assert [a.text() for a in shown.picture_menu().actions()] == ["Copy this plot", "Save this plot…"]
    QGuiApplication.clipboard().clear()
    shown.copy_picture()
    assert not QGuiApplication.clipboard().image().isNull()
    png = shown.save_picture(tmp_path / "pairs.png")
    assert png.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    svg = shown.save_picture(tmp_path / "pairs.svg")
    assert b"<svg" in svg.read_bytes()[:2000]
    with pytest.raises(FileProblem, match=r"\.png or \.svg"):
        shown.save_picture(tmp_path / "pairs.jpg")
    with pytest.raises(FileProblem, match="Could not save the plot"):
        shown.save_picture(tmp_path / "no_such_folder" / "pairs.png")


def test_a_right_click_on_a_plot_opens_its_own_menu(plot, monkeypatch):
    from PySide6.QtCore import QPoint
    from PySide6.QtGui import QContextMenuEvent
    from PySide6.QtWidgets import QApplication

    shown = plot(DifferencePlot)
    shown.show()
    menu = shown.picture_menu()
    opened = []
    monkeypatch.setattr(menu, "exec", lambda *where: opened.append([a.text() for a in menu.actions()]))
    monkeypatch.setattr(shown, "picture_menu", lambda: menu)
    event = QContextMenuEvent(QContextMenuEvent.Reason.Mouse, QPoint(40, 40), shown.mapToGlobal(QPoint(40, 40)))
    QApplication.sendEvent(shown.viewport(), event)  # where a right-click lands
    assert opened == [["Copy this plot", "Save this plot…"]]
