"""The margin band of the interval plot: drawn where the margin lies, beside the no-difference
line, for the (1 - 2 alpha) intervals of the engine's own procedures; a ratio margin on a ratio
axis; copied and saved like the other plots."""

from __future__ import annotations

import math
from xml.etree import ElementTree

import numpy as np
import pytest
from PySide6.QtGui import QImage

from desktop import plots
from engine.analysis import RobustnessRow
from engine.procedures.equivalence import equivalence_t, noninferiority_t
from engine.procedures.equivalence_intervals import equivalence_log_t
from engine.question import Margin


def _groups(seed: int = 3):
    rng = np.random.default_rng(seed)
    return rng.normal(50.0, 4.0, 40), rng.normal(49.0, 4.0, 40)


def _row(result) -> RobustnessRow:
    return RobustnessRow(result.key, result.key, result.estimate, "difference", result.interval,
                         result.p_value, False)


def _band_item(plot):
    return plot._kept_items.get("band")


@pytest.fixture
def plot(qtbot):
    made = plots.IntervalPlot()
    qtbot.addWidget(made)
    made.resize(500, 240)
    return made


def test_an_equivalence_margin_is_a_band_around_no_difference(plot):
    x, y = _groups()
    result = equivalence_t(x, y, low=-3.0, high=3.0, confidence_level=0.95)
    # the interval set against the margin is the 90 % one at alpha = 5 % (two one-sided tests)
    assert result.interval.level == pytest.approx(0.90)
    plot.show_rows([_row(result)], picked=result.key, axis_label="difference", margin=Margin.within(3.0))
    region = _band_item(plot)
    assert region is not None and region.getRegion() == pytest.approx((-3.0, 3.0))
    xs, _ = plot._kept_items["band_edges"].getData()
    assert sorted(set(xs.tolist())) == [-3.0, 3.0]
    zero = plot._kept_items["zero"]
    assert zero.value() == 0.0  # the no-difference line stays, inside the band
    (left, right), _ = plot.getPlotItem().viewRange()
    assert left < -3.0 and right > 3.0  # the whole band is in view
    assert left <= result.interval.low and right >= result.interval.high


def test_an_uneven_margin_beyond_the_intervals_widens_the_view(plot):
    x, y = _groups()
    result = equivalence_t(x, y, low=-2.0, high=25.0)
    plot.show_rows([_row(result)], margin=Margin.within(-2.0, 25.0))
    assert _band_item(plot).getRegion() == pytest.approx((-2.0, 25.0))
    (_, right), _ = plot.getPlotItem().viewRange()
    assert right > 25.0


@pytest.mark.parametrize("worse, open_side", [("lower", "right"), ("higher", "left")])
def test_a_non_inferiority_margin_shades_the_side_that_is_not_worse(plot, worse, open_side):
    x, y = _groups()
    margin = Margin.not_worse_by(2.5, worse)
    result = noninferiority_t(x, y, margin=2.5, worse=worse)
    plot.show_rows([_row(result)], margin=margin)
    low, high = _band_item(plot).getRegion()
    (left, right), _ = plot.getPlotItem().viewRange()
    if open_side == "right":
        assert low == pytest.approx(-2.5) and high >= right - 1e-9 * abs(right) - (right - left) * 0.05
    else:
        assert high == pytest.approx(2.5) and low <= left + (right - left) * 0.05
    xs, _ = plot._kept_items["band_edges"].getData()
    assert sorted(set(xs.tolist())) == [margin.bound]  # one edge: the margin's worse end


def test_the_band_goes_when_the_question_has_no_margin(plot):
    x, y = _groups()
    result = equivalence_t(x, y, low=-3.0, high=3.0)
    plot.show_rows([_row(result)], margin=Margin.within(3.0))
    plot.show_rows([_row(result)])
    assert _band_item(plot) is None and "band_edges" not in plot._kept_items


def test_a_ratio_margin_reads_on_a_ratio_axis(plot):
    rng = np.random.default_rng(11)
    x, y = rng.lognormal(math.log(10.0), 0.2, 30), rng.lognormal(math.log(10.3), 0.2, 30)
    margin = Margin.within(0.8, 1.25, "ratio")
    result = equivalence_log_t(x, y, low=0.8, high=1.25)
    plot.show_rows([_row(result)], margin=margin, axis_label="ratio")
    assert plot.ratio
    # drawn on the log scale: the band's ends sit equally far either side of no difference (1)
    low, high = _band_item(plot).getRegion()
    assert low == pytest.approx(math.log10(0.8)) and high == pytest.approx(math.log10(1.25))
    assert low == pytest.approx(-high, abs=1e-3)
    assert plot._kept_items["zero"].value() == 0.0  # log10(1): no difference
    line = plot._kept_items["line0"].getData()[0]
    assert 10 ** line.min() == pytest.approx(result.interval.low)
    assert 10 ** line.max() == pytest.approx(result.interval.high)
    ticks = plot.getPlotItem().getAxis("bottom")._tickLevels[0]
    written = {text for _, text in ticks}
    assert {"0.8", "1", "1.25"} <= written  # the ticks are ratios, the margin's ends among them
    # the same rows without the margin: back to an ordinary axis of differences
    plot.show_rows([_row(result)], axis_label="difference")
    assert not plot.ratio and plot.getPlotItem().getAxis("bottom")._tickLevels is None


def test_ratio_ticks_keep_one_and_the_margin_and_stay_apart():
    ticks = plots.ratio_ticks(math.log10(0.5), math.log10(2.0), keep=(0.8, 1.25))
    places = [place for place, _ in ticks]
    assert [text for _, text in ticks if text in ("0.8", "1", "1.25")] == ["0.8", "1", "1.25"]
    assert all(b - a >= (math.log10(2.0) - math.log10(0.5)) / 7 - 1e-12 for a, b in zip(places, places[1:]))


def test_the_band_is_in_the_copied_and_saved_picture(plot, tmp_path):
    x, y = _groups()
    result = equivalence_t(x, y, low=-3.0, high=3.0)
    plot.show_rows([_row(result)], margin=Margin.within(3.0))
    plot.show()
    with_band = plots.plot_image(plot)
    png = plots.save_plot(plot, tmp_path / "band.png")
    assert QImage(str(png)).width() == 2 * plot.width()
    svg = plots.save_plot(plot, tmp_path / "band.svg")
    assert ElementTree.parse(svg).getroot().tag.endswith("svg")
    plot.show_rows([_row(result)])
    without = plots.plot_image(plot)

    def tinted(image: QImage) -> int:
        # pixels near the band's tint (the first group colour, faint): there with the band only
        tint = plot.colours.groups[0]
        count = 0
        for px in range(0, image.width(), 4):
            for py in range(0, image.height(), 4):
                colour = image.pixelColor(px, py)
                if colour.blue() > colour.red() + 20 and colour.green() > colour.red():
                    count += 1
        return count

    assert tinted(with_band) > 10 * (tinted(without) + 1)
