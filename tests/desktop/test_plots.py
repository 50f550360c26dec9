"""The plots: bins, whiskers, thinning, palette colours, the interval rows, saving, large groups."""

from __future__ import annotations

import os

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

import time  # noqa: E402
import xml.etree.ElementTree as ElementTree  # noqa: E402

import numpy as np  # noqa: E402
import pytest  # noqa: E402
from PySide6.QtGui import QColor, QImage, QPalette  # noqa: E402

from engine.analysis import RobustnessRow  # noqa: E402
from engine.results import Interval  # noqa: E402
from engine.summary import summarize  # noqa: E402
from desktop import plots  # noqa: E402


def _palette(base: str, text: str) -> QPalette:
    palette = QPalette()
    palette.setColor(QPalette.ColorRole.Base, QColor(base))
    palette.setColor(QPalette.ColorRole.Text, QColor(text))
    return palette


def test_histogram_matches_numpy_density():
    values = np.random.default_rng(3).gamma(2.0, 1.5, 500)
    edges, density = plots.histogram(values)
    # reference: numpy.histogram(values, bins=edges, density=True)
    expected, _ = np.histogram(values, bins=edges, density=True)
    np.testing.assert_allclose(density, expected)
    assert np.sum(density * np.diff(edges)) == pytest.approx(1.0)


def test_histogram_keeps_bins_few_and_handles_constant_values():
    values = np.random.default_rng(4).standard_cauchy(200_000)
    edges, _ = plots.histogram(values)
    assert edges.size - 1 <= 80
    edges, density = plots.histogram(np.full(10, 2.5))
    assert edges[0] < 2.5 < edges[-1] and np.sum(density * np.diff(edges)) == pytest.approx(1.0)


def test_whiskers_reach_the_last_values_inside_tukeys_fences():
    values = np.concatenate([np.random.default_rng(5).normal(0, 1, 200), [8.0, -9.0]])
    # reference: numpy.percentile (linear interpolation, as engine.summary uses) and Tukey's
    # 1.5 IQR fences (common practice)
    q1, q3 = np.percentile(values, [25, 75])
    fence_low, fence_high = q1 - 1.5 * (q3 - q1), q3 + 1.5 * (q3 - q1)
    low, high, inside = plots.whisker_reach(values, q1, q3)
    assert low == values[values >= fence_low].min()
    assert high == values[values <= fence_high].max()
    assert not inside[-1] and not inside[-2] and inside.sum() == np.count_nonzero(
        (values >= fence_low) & (values <= fence_high))


def test_thinning_keeps_both_ends_and_the_limit():
    ordered = np.sort(np.random.default_rng(6).normal(size=100_000))
    index = plots.thin_sorted(ordered, 500)
    assert index.size <= 500 and index[0] == 0 and index[-1] == ordered.size - 1
    assert np.all(np.diff(index) > 0)
    assert plots.thin_sorted(ordered[:10], 500).tolist() == list(range(10))


def test_sampled_points_keep_the_extremes_and_leave_room_for_the_rest():
    values = np.random.default_rng(12).normal(size=200_000)
    keep = np.abs(values) > 2.5  # about 2,500 values, more than a tenth of the room
    shown = plots.sample_points(values, 1000, keep=keep)
    assert shown.size == 1000
    assert values.min() in shown and values.max() in shown
    assert np.count_nonzero(np.abs(shown) > 2.5) <= 100 + 20  # a tenth, plus chance picks


def test_sampled_points_keep_every_flagged_value():
    values = np.arange(50_000, dtype=float)
    keep = values > 49_990
    shown = plots.sample_points(values, 300, keep=keep)
    assert shown.size == 300
    assert set(values[keep]) <= set(shown)
    np.testing.assert_array_equal(shown, plots.sample_points(values, 300, keep=keep))  # same each time


def test_colours_follow_the_palette_light_and_dark():
    light = plots.plot_colours(_palette("#ffffff", "#000000"))
    dark = plots.plot_colours(_palette("#1d1f23", "#e4e6ea"))
    assert not light.dark and dark.dark
    assert dark.background == QColor("#1d1f23") and dark.foreground == QColor("#e4e6ea")
    # the group colours change shade with the background and always differ from each other
    assert light.groups != dark.groups
    for colours in (light, dark):
        assert colours.groups[0] != colours.groups[1]
        contrast = abs(colours.groups[0].lightnessF() - colours.background.lightnessF())
        assert contrast > 0.25


def test_plot_redraws_in_a_new_palette(qtbot):
    plot = plots.ShapePlot()
    qtbot.addWidget(plot)
    summary = summarize("a", np.arange(20.0))
    plot.show_group(np.arange(20.0), mean=summary.mean, sd=summary.sd)
    plot.setPalette(_palette("#101010", "#f0f0f0"))
    assert plot.colours.dark
    assert plot.backgroundBrush().color() == QColor("#101010")
    assert len(plot.getPlotItem().listDataItems()) == 2  # histogram and normal curve drawn again


def test_qq_plot_draws_the_engines_points(qtbot):
    theoretical = np.linspace(-2, 2, 30)
    observed = 5 + 2 * theoretical
    plot = plots.QQPlot()
    qtbot.addWidget(plot)
    plot.show_points(theoretical, observed, mean=5.0, sd=2.0)
    scatter = [item for item in plot.getPlotItem().items if isinstance(item, plots.pg.ScatterPlotItem)][0]
    xs, ys = scatter.getData()
    np.testing.assert_array_equal(xs, theoretical)
    np.testing.assert_array_equal(ys, observed)


def _rows():
    return [
        RobustnessRow("welch_t", "Welch t-test", 1.0, "difference in means", Interval(0.2, 1.8, 0.95), 0.01, True),
        RobustnessRow("bootstrap_mean", "bootstrap", 1.1, "difference in means", Interval(0.3, None, 0.95), None, True),
        RobustnessRow("mann_whitney", "ranks", 0.9, "shift", Interval(None, 2.5, 0.95), 0.04, True),
    ]


def test_interval_plot_names_every_row_and_runs_open_ends_to_the_edge(qtbot):
    plot = plots.IntervalPlot()
    qtbot.addWidget(plot)
    plot.show_rows(_rows(), picked="welch_t", axis_label="difference")
    assert plot.row_names() == ["Welch t-test", "bootstrap", "ranks"]
    assert plot.getPlotItem().getAxis("bottom").labelText == "difference"
    (left, right), _ = plot.getPlotItem().viewRange()
    lines = [item.getData() for item in plot.getPlotItem().listDataItems()
             if isinstance(item, plots.pg.PlotDataItem) and len(item.getData()[0]) == 2]
    # one line per row; an open end reaches past every finite end, inside the view
    ends = sorted((float(xs.min()), float(xs.max())) for xs, _ in lines)
    assert len(lines) == 3
    assert min(low for low, _ in ends) < 0.2 and max(high for _, high in ends) > 2.5
    assert left < min(low for low, _ in ends) and right > max(high for _, high in ends)


def test_new_rows_are_set_on_the_items_already_in_the_plot(qtbot):
    plot = plots.IntervalPlot()
    qtbot.addWidget(plot)
    plot.show_rows(_rows(), picked="welch_t")
    before = list(plot.getPlotItem().items)
    plot.show_rows(_rows()[::-1], picked="mann_whitney")
    assert plot.getPlotItem().items == before  # the same items, none made or dropped
    assert plot.row_names() == ["ranks", "bootstrap", "Welch t-test"]
    plot.show_rows(_rows()[:1], picked="welch_t")
    assert plot.row_names() == ["Welch t-test"]
    assert len(plot.getPlotItem().items) == len(before) - 4  # two rows' lines and names gone


def test_the_wheel_over_a_plot_is_left_to_the_panel_around_it(qtbot):
    from PySide6.QtCore import QPoint, QPointF, Qt
    from PySide6.QtGui import QWheelEvent

    plot = plots.IntervalPlot()
    qtbot.addWidget(plot)
    plot.resize(400, 300)
    plot.show_rows(_rows(), picked="welch_t")
    before = plot.getPlotItem().viewRange()
    event = QWheelEvent(QPointF(200, 150), QPointF(200, 150), QPoint(0, 0), QPoint(0, -120),
                        Qt.MouseButton.NoButton, Qt.KeyboardModifier.NoModifier, Qt.ScrollPhase.NoScrollPhase, False)
    event.accept()
    plot.wheelEvent(event)
    assert not event.isAccepted()  # ignored: Qt hands it on to the scrolling panel
    assert plot.getPlotItem().viewRange() == before  # and the plot did not zoom


def test_save_png_and_svg_and_refuse_other_suffixes(qtbot, tmp_path):
    plot = plots.IntervalPlot()
    qtbot.addWidget(plot)
    plot.resize(400, 250)
    plot.show_rows(_rows(), picked="welch_t")
    png = plots.save_plot(plot, tmp_path / "p.png")
    image = QImage(str(png))
    assert image.width() == 2 * plot.width()  # drawn at twice the size for documents
    svg = plots.save_plot(plot, tmp_path / "p.svg")
    root = ElementTree.parse(svg).getroot()
    assert root.tag.endswith("svg")
    with pytest.raises(ValueError, match="png or .svg"):
        plots.save_plot(plot, tmp_path / "p.gif")


def test_many_qt_calls_leave_none_alive(qtbot):
    # PySide6 6.12.0 on Python 3.11 drops a reference to None on each call of a Qt method that
    # returns nothing, and this loop then ends the interpreter ("deallocating None");
    # pyproject.toml keeps that release out. This guards against a binding with the fault.
    plot = plots.ThemedPlot()
    qtbot.addWidget(plot)
    for _ in range(200_000):
        plot.setToolTip("")
    assert plot.toolTip() == ""


@pytest.mark.slow
def test_two_million_values_draw_quickly(qtbot):
    rng = np.random.default_rng(8)
    x, y = rng.normal(10, 2, 1_000_000), rng.lognormal(2, 0.4, 1_000_000)
    sx, sy = summarize("x", x), summarize("y", y)
    box, shape = plots.BoxPlot(), plots.ShapePlot()
    qtbot.addWidget(box)
    qtbot.addWidget(shape)
    start = time.perf_counter()
    box.show_groups([("x", x, sx), ("y", y, sy)])
    shape.show_group(x, mean=sx.mean, sd=sx.sd)
    elapsed = time.perf_counter() - start
    scatters = [item for item in box.getPlotItem().items if isinstance(item, plots.pg.ScatterPlotItem)]
    assert all(len(item.getData()[0]) <= plots.MAX_POINTS for item in scatters)
    assert elapsed < 3.0, f"drawing took {elapsed:.2f} s"


def _tick_texts(axis) -> list[list[str]]:
    """The tick texts of each level, as the axis draws them for its current range."""
    low, high = axis.range
    return [axis.tickStrings(values, 1.0, spacing) for spacing, values in axis.tickValues(low, high, 400)]


def test_ticks_near_a_billion_are_distinct_and_short(qtbot):
    from desktop.plots import BoxPlot, QQPlot

    values = 1e9 + np.arange(11.0)
    summary = type("Summary", (), {"q1": 1e9 + 2.5, "median": 1e9 + 5, "q3": 1e9 + 7.5})()
    box = BoxPlot()
    qtbot.addWidget(box)
    box.resize(300, 400)
    box.show_groups([("press A", values, summary), ("press B", values + 1, summary)])
    qq = QQPlot()
    qtbot.addWidget(qq)
    qq.resize(300, 400)
    qq.show_points(np.linspace(-1.5, 1.5, 11), values, mean=1e9 + 5, sd=3.3)
    for axis in (box.getPlotItem().getAxis("left"), qq.getPlotItem().getAxis("left")):
        axis.linkedView().updateAutoRange()
        qtbot.waitUntil(lambda axis=axis: axis.range[0] > 1e8, timeout=5_000)
        levels = _tick_texts(axis)
        major = levels[0]
        assert len(major) >= 2 and len(set(major)) == len(major), major  # "1e+09" on every tick before
        for texts in levels:
            assert all("e" not in text and len(text) <= 6 for text in texts), texts
        # the ticks count from a round number the axis label names
        assert "1\u2009000\u2009000\u2009000" in axis.labelText and axis.labelText.startswith("value")


def test_axis_offset_and_scale_only_where_needed():
    from desktop.plots import ReadableAxis, axis_offset

    assert axis_offset(826.0, 862.0) == 0.0  # ordinary data read as they are
    assert axis_offset(0.0, 5e9) == 0.0  # a wide span needs a scale, not an offset
    assert axis_offset(1e9 - 0.5, 1e9 + 10.5) == 1e9
    assert axis_offset(-1e9 - 5, -1e9 + 5) == -1e9
    wide = ReadableAxis("left")
    wide.set_name("value")
    wide.setRange(0.0, 5e9)
    assert wide.labelText == "value (× 10⁹)"
    assert wide.tickStrings([0.0, 2e9, 4e9], 1.0, 2e9) == ["0", "2", "4"]
    plain = ReadableAxis("bottom")
    plain.setRange(826.0, 862.0)
    assert plain.tickStrings([830.0, 840.0, 850.0], 1.0, 10.0) == ["830", "840", "850"]
