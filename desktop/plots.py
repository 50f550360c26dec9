"""Small pyqtgraph plots for the checks and the findings, coloured from the window's palette.

Every plot only draws what the engine computed (summaries, Q-Q points, intervals) plus the
bins, jitter and thinning that drawing needs. Large groups stay quick: histograms come from
``numpy.histogram``, and scatter overlays show at most :data:`MAX_POINTS` points per group.
This module and ``desktop/paired_plots.py`` (the plots of a paired design) are the ones that
import pyqtgraph.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from pathlib import Path
from typing import Sequence

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import QEvent, QPoint, Qt
from PySide6.QtGui import QColor, QGuiApplication, QImage, QPainter, QPalette
from PySide6.QtWidgets import QWidget

from engine.stats_basics import MILD_FENCE, tukey_fences
from engine.text import visible, visible_html

__all__ = [
    "MAX_POINTS",
    "PlotColours",
    "plot_colours",
    "document_palette",
    "thin_sorted",
    "sample_points",
    "histogram",
    "whisker_reach",
    "WHISKER_IQR",
    "ReadableAxis",
    "axis_offset",
    "ThemedPlot",
    "ShapePlot",
    "QQPlot",
    "BoxPlot",
    "IntervalPlot",
    "BAND_WORDS",
    "ratio_ticks",
    "plot_image",
    "save_plot",
    "save_plot_file",
]

MAX_POINTS = 2000
_MAX_BINS = 80
# Whiskers reach the last value within this many interquartile ranges of the box (Tukey's rule).
WHISKER_IQR = MILD_FENCE

# Our own pair of group colours: a sea blue and a clay orange, each in a shade for light and one
# for dark backgrounds. They differ in lightness as well as hue, so they stay apart in grey.
_GROUP_SHADES = {False: ("#1f6f8b", "#c45a1c"), True: ("#5ab8d6", "#f0a060")}
_PICKED_SHADE = {False: "#6b3fa0", True: "#c9a6f2"}


@dataclass(frozen=True)
class PlotColours:
    """Colours for one plot, taken from a palette (``groups`` are our own two colours)."""

    background: QColor
    foreground: QColor
    faint: QColor
    groups: tuple[QColor, QColor]
    picked: QColor
    dark: bool


def plot_colours(palette: QPalette | None = None) -> PlotColours:
    """Background and ink from ``palette`` (the application's by default), plus group colours."""
    palette = palette if palette is not None else QGuiApplication.palette()
    background = palette.color(QPalette.ColorRole.Base)
    foreground = palette.color(QPalette.ColorRole.Text)
    dark = background.lightnessF() < 0.5
    faint = QColor(foreground)
    faint.setAlphaF(0.35)
    shades = _GROUP_SHADES[dark]
    return PlotColours(background, foreground, faint, (QColor(shades[0]), QColor(shades[1])),
                       QColor(_PICKED_SHADE[dark]), dark)


def document_palette() -> QPalette:
    """Black ink on white, for plots that go into a printed or pasted document."""
    palette = QPalette()
    for role, colour in ((QPalette.ColorRole.Base, "#ffffff"), (QPalette.ColorRole.Window, "#ffffff"),
                         (QPalette.ColorRole.Text, "#000000"), (QPalette.ColorRole.WindowText, "#000000")):
        palette.setColor(role, QColor(colour))
    return palette


def _with_alpha(colour: QColor, alpha: float) -> QColor:
    result = QColor(colour)
    result.setAlphaF(alpha)
    return result


def thin_sorted(values: np.ndarray, limit: int = MAX_POINTS) -> np.ndarray:
    """Indices of at most ``limit`` evenly spaced entries of a sorted array, both ends kept."""
    n = len(values)
    if n <= limit:
        return np.arange(n)
    return np.unique(np.linspace(0, n - 1, limit).round().astype(np.intp))


def sample_points(values: np.ndarray, limit: int = MAX_POINTS, *, keep: np.ndarray | None = None,
                  seed: int = 0) -> np.ndarray:
    """At most ``limit`` of ``values`` for a scatter overlay.

    The ``keep`` values (those beyond the whiskers) come first, but they take at most a tenth of
    the room, so that a large group's overlay still shows where most values lie; the smallest and
    largest value are always in. The rest are drawn at random. The seed is fixed so the picture
    does not change between redraws.
    """
    values = np.asarray(values, dtype=float)
    if values.size <= limit:
        return values
    rng = np.random.default_rng(seed)
    flagged = np.flatnonzero(keep) if keep is not None else np.array([], dtype=np.intp)
    room = max(2, limit // 10)
    if flagged.size > room:
        ends = np.array([flagged[np.argmin(values[flagged])], flagged[np.argmax(values[flagged])]])
        flagged = np.union1d(ends, rng.choice(flagged, size=room - 2, replace=False))
    others = np.setdiff1d(np.arange(values.size), flagged, assume_unique=True)
    chosen = rng.choice(others, size=min(limit - flagged.size, others.size), replace=False)
    return np.concatenate([values[flagged], values[chosen]])


def histogram(values: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Bin edges and densities of ``values`` (numpy's "auto" bins, at most 80 of them)."""
    values = np.asarray(values, dtype=float)
    if values.size == 0:
        return np.array([0.0, 1.0]), np.array([0.0])
    low, high = float(values.min()), float(values.max())
    if low == high:
        low, high = low - 0.5, high + 0.5
    edges = np.histogram_bin_edges(values, bins="auto", range=(low, high))
    if edges.size - 1 > _MAX_BINS:
        edges = np.linspace(low, high, _MAX_BINS + 1)
    density, edges = np.histogram(values, bins=edges, density=True)
    return edges, density


def whisker_reach(values: np.ndarray, q1: float, q3: float) -> tuple[float, float, np.ndarray]:
    """Whisker ends (the most extreme values within 1.5 IQR of the quartiles, common practice)
    and which values lie within those fences."""
    values = np.asarray(values, dtype=float)
    inside = ~tukey_fences(q1, q3).beyond_mild(values)
    if not inside.any():
        return q1, q3, inside
    kept = values[inside]
    return float(kept.min()), float(kept.max()), inside


_SUPERSCRIPT = str.maketrans("-0123456789", "⁻⁰¹²³⁴⁵⁶⁷⁸⁹")


def _grouped(number: float, places: int) -> str:
    """``number`` with ``places`` decimals and its thousands set apart by thin spaces (the SI way,
    which reads the same whatever the decimal mark)."""
    return f"{number:,.{places}f}".replace(",", "\u2009")


def axis_offset(low: float, high: float) -> float:
    """A round number to take off every tick of an axis from ``low`` to ``high``, or 0.

    Needed when the ticks differ only far to the right of their first digit (values near 1e9
    that span ten), where every tick would otherwise read the same ("1e+09"). The offset is the
    roundest number within the span's reach, so the ticks left over are short.
    """
    if not (math.isfinite(low) and math.isfinite(high)) or high <= low:
        return 0.0
    size, span = max(abs(low), abs(high)), high - low
    if size < 1e4 or span * 1e3 > size:
        return 0.0
    middle = (low + high) / 2
    for power in range(int(math.floor(math.log10(size))), int(math.floor(math.log10(span))) - 2, -1):
        offset = round(middle / 10.0 ** power) * 10.0 ** power
        if max(abs(low - offset), abs(high - offset)) <= 10 * span:
            return offset
    return middle


def _scale_power(low: float, high: float) -> int:
    """The power of ten (a multiple of 3) that the ticks are divided by, so that none needs more
    than five digits before its point or starts with many zeros; 0 for ordinary numbers."""
    size = max(abs(low), abs(high))
    if not math.isfinite(size) or size == 0 or 1e-3 <= size < 1e5:
        return 0
    return 3 * int(math.floor(math.log10(size) / 3))


class ReadableAxis(pg.AxisItem):
    """An axis whose ticks stay distinct and short at any magnitude.

    Near a large value with a small span the ticks show the distance from a round offset named
    in the axis label ("value − 1 000 000 000"); very large or small ticks are scaled by a power
    of ten named there too ("× 10^9"). Ordinary ranges read as pyqtgraph writes them.
    """

    def __init__(self, orientation: str, **options) -> None:
        self.offset = 0.0
        self.power = 0
        self._name = ""
        super().__init__(orientation, **options)

    def set_name(self, text: str, **style) -> None:
        """The axis label before any offset or scale is added to it."""
        self._name = text
        self.setLabel(self._label_text(), **style)

    def _label_text(self) -> str:
        text = self._name
        if self.offset:
            places = max(0, -int(math.floor(math.log10(abs(self.offset) or 1))))
            sign = "−" if self.offset > 0 else "+"
            text = f"{text} {sign} {_grouped(abs(self.offset), min(places, 12))}".strip()
        if self.power:
            text = f"{text} (× 10{str(self.power).translate(_SUPERSCRIPT)})".strip()
        return text

    def setRange(self, mn: float, mx: float) -> None:  # noqa: N802 - pyqtgraph's name
        offset = axis_offset(mn, mx)
        power = _scale_power(mn - offset, mx - offset)
        if (offset, power) != (self.offset, self.power):
            self.offset, self.power = offset, power
            if self._name or offset or power:
                self.labelText = self._label_text()
                self.showLabel(True)
                self._updateLabel()
        super().setRange(mn, mx)

    def tickStrings(self, values, scale, spacing):  # noqa: N802 - pyqtgraph's name
        if not self.offset and not self.power:
            return super().tickStrings(values, scale, spacing)
        factor = 10.0 ** -self.power
        step = spacing * scale * factor
        places = max(0, int(math.ceil(-math.log10(step)))) if step > 0 else 0
        texts = []
        for value in values:
            text = f"{(value * scale - self.offset) * factor:.{min(places, 12)}f}"
            if text.startswith("-") and not text.strip("-0."):
                text = text[1:]  # no "-0" for a tick that rounds to zero
            texts.append(text.replace("-", "−"))
        return texts


class ThemedPlot(pg.PlotWidget):
    """A ``PlotWidget`` whose background, axes and text follow the palette, redrawn on change."""

    def __init__(self, parent: QWidget | None = None, *, title: str = "") -> None:
        self._ready = False
        super().__init__(parent, axisItems={side: ReadableAxis(side) for side in ("left", "bottom")})
        self._kept_items: dict[str, object] = {}
        self._written: dict[str, tuple[str, str]] = {}  # title and axis names as last set, with their ink
        self._title = title
        self.setMenuEnabled(False)
        self.setMouseEnabled(x=False, y=False)
        self.hideButtons()
        self.setMinimumSize(180, 150)
        self.colours = plot_colours(self.palette())
        self._restyle()
        self._ready = True

    def wheelEvent(self, event) -> None:  # noqa: N802 (Qt's name)
        # the plots neither zoom nor pan: the wheel scrolls the panel the plot sits in
        event.ignore()

    def changeEvent(self, event: QEvent) -> None:  # noqa: N802 (Qt's name)
        super().changeEvent(event)
        if self._ready and event.type() == QEvent.Type.PaletteChange:
            self.colours = plot_colours(self.palette())
            self._restyle()
            self.redraw()

    def _restyle(self) -> None:
        colours = self.colours
        self.setBackground(colours.background)
        for name in ("left", "bottom"):
            axis = self.getPlotItem().getAxis(name)
            axis.setPen(pg.mkPen(colours.faint))
            axis.setTextPen(pg.mkPen(colours.foreground))
            axis.enableAutoSIPrefix(False)
        self.set_title(self._title)

    def set_title(self, text: str) -> None:
        ink = self.colours.foreground.name()
        if self._written.get("title") == (text, ink):
            return  # laying out a title again takes a noticeable moment
        self._title = text
        self._written["title"] = (text, ink)
        # pyqtgraph draws titles and axis names as HTML: text from the file is escaped
        self.getPlotItem().setTitle(visible_html(text) if text else None, color=ink, size="9pt")

    def set_axis_labels(self, bottom: str = "", left: str = "") -> None:
        """Name the axes; an empty name leaves that axis as it is."""
        ink = self.colours.foreground.name()
        for side, text in (("bottom", bottom), ("left", left)):
            if text and self._written.get(side) != (text, ink):
                self._written[side] = (text, ink)
                axis = self.getPlotItem().getAxis(side)
                if isinstance(axis, ReadableAxis):
                    axis.set_name(visible_html(text), color=ink)
                else:
                    self.getPlotItem().setLabel(side, visible_html(text), color=ink)

    def redraw(self) -> None:
        """Draw the current data again (after a palette change); subclasses override."""

    def _kept(self, name: str, make):
        """The plot item called ``name``: made by ``make()`` and added on first use, then reused.

        New data and pens set on an item already in the plot cost a fraction of removing the
        old items and adding new ones, which is what keeps a new analysis quick to show.
        """
        item = self._kept_items.get(name)
        if item is None:
            item = self._kept_items[name] = make()
            self.addItem(item)
        return item

    def _drop_kept(self, *, keep: int | None = None, prefixes: Sequence[str] = ()) -> None:
        """Take kept items out of the plot: all of them, or those named ``prefix + number`` whose
        number is ``keep`` or more."""
        for name in list(self._kept_items):
            if keep is not None:
                stem = name.rstrip("0123456789")
                if stem not in prefixes or int(name[len(stem):]) < keep:
                    continue
            self.removeItem(self._kept_items.pop(name))


class ShapePlot(ThemedPlot):
    """Histogram of one group (as a density) with the normal curve of its mean and SD."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._data: tuple | None = None

    def show_group(self, values: np.ndarray, *, mean: float, sd: float, group: int = 0) -> None:
        self._data = (np.asarray(values, dtype=float), float(mean), float(sd), int(group))
        self.redraw()

    def redraw(self) -> None:
        if self._data is None:
            self._drop_kept()
            return
        values, mean, sd, group = self._data
        colour = self.colours.groups[group]
        edges, density = histogram(values)
        bars = self._kept("bars", pg.PlotDataItem)
        bars.setData(edges, density, stepMode="center", fillLevel=0,
                     brush=_with_alpha(colour, 0.35), pen=pg.mkPen(colour, width=1.5))
        curve = self._kept("curve", pg.PlotDataItem)
        if math.isfinite(sd) and sd > 0:
            grid = np.linspace(edges[0], edges[-1], 200)
            heights = np.exp(-0.5 * ((grid - mean) / sd) ** 2) / (sd * math.sqrt(2 * math.pi))
        else:
            grid = heights = np.array([])
        curve.setData(grid, heights, pen=pg.mkPen(self.colours.foreground, width=1.2,
                                                  style=Qt.PenStyle.DashLine))
        self.set_axis_labels("value", "density")


class QQPlot(ThemedPlot):
    """Normal Q-Q points of one group and the line of its mean and SD."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._data: tuple | None = None

    def show_points(self, theoretical: np.ndarray | None, observed: np.ndarray | None, *,
                    mean: float, sd: float, group: int = 0) -> None:
        t = np.asarray(theoretical if theoretical is not None else [], dtype=float)
        o = np.asarray(observed if observed is not None else [], dtype=float)
        self._data = (t, o, float(mean), float(sd), int(group))
        self.redraw()

    def redraw(self) -> None:
        if self._data is None:
            self._drop_kept()
            return
        theoretical, observed, mean, sd, group = self._data
        colour = self.colours.groups[group]
        keep = thin_sorted(theoretical)
        points = self._kept("points", pg.ScatterPlotItem)
        points.setData(theoretical[keep], observed[keep], size=5, pen=pg.mkPen(None),
                       brush=_with_alpha(colour, 0.8))
        ends = np.array([theoretical[keep[0]], theoretical[keep[-1]]]) if keep.size else np.array([])
        line = self._kept("line", pg.PlotDataItem)
        line.setData(ends, mean + sd * ends if math.isfinite(sd) else np.full(ends.shape, np.nan),
                     pen=pg.mkPen(self.colours.foreground, width=1.2, style=Qt.PenStyle.DashLine))
        self.set_axis_labels("normal quantile", "value")


class BoxPlot(ThemedPlot):
    """A box per group (quartiles and median from the engine) with the points laid over it.

    Whiskers reach the most extreme value within 1.5 IQR of the box (common practice); points
    beyond them are always drawn, the others thinned to :data:`MAX_POINTS` per group.
    """

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._data: list | None = None

    def show_groups(self, groups: Sequence[tuple[str, np.ndarray, object]]) -> None:
        """``groups``: (label, values, summary) pairs; summary has q1, median and q3."""
        self._data = [(label, np.asarray(values, dtype=float), summary) for label, values, summary in groups]
        self.redraw()

    def redraw(self) -> None:
        if not self._data:
            self._drop_kept()
            return
        ink = self.colours.foreground
        colours = [self.colours.groups[place % 2] for place in range(len(self._data))]
        summaries = [summary for _, _, summary in self._data]
        self._kept("boxes", lambda: pg.BarGraphItem(x=[], height=[], width=0.5)).setOpts(
            x=list(range(len(self._data))), y0=[s.q1 for s in summaries],
            height=[s.q3 - s.q1 for s in summaries], width=0.5,
            pens=[pg.mkPen(colour, width=1.5) for colour in colours],
            brushes=[pg.mkBrush(_with_alpha(colour, 0.18)) for colour in colours])
        for place, ((label, values, summary), colour) in enumerate(zip(self._data, colours)):
            q1, median, q3 = summary.q1, summary.median, summary.q3
            reach_low, reach_high, inside = whisker_reach(values, q1, q3)
            self._kept(f"median{place}", pg.PlotDataItem).setData(
                [place - 0.25, place + 0.25], [median, median], pen=pg.mkPen(colour, width=2.5))
            # the two stems and their caps, drawn as pairs of points
            self._kept(f"whiskers{place}", pg.PlotDataItem).setData(
                [place, place, place - 0.1, place + 0.1] * 2,
                [q1, reach_low, reach_low, reach_low, q3, reach_high, reach_high, reach_high],
                connect="pairs", pen=pg.mkPen(ink, width=1.2))
            shown = sample_points(values, keep=~inside, seed=place)
            jitter = np.random.default_rng(place).uniform(-0.18, 0.18, shown.size)
            self._kept(f"points{place}", pg.ScatterPlotItem).setData(
                place + jitter, shown, size=4, pen=pg.mkPen(None), brush=_with_alpha(colour, 0.55))
        self._drop_kept(keep=len(self._data), prefixes=("median", "whiskers", "points"))
        axis = self.getPlotItem().getAxis("bottom")
        axis.setTicks([[(i, visible(group[0])) for i, group in enumerate(self._data)]])
        self.getPlotItem().setXRange(-0.6, len(self._data) - 0.4, padding=0)
        self.set_axis_labels("", "value")


# The words on the margin's band: what an interval inside it would show.
BAND_WORDS = {"equivalent": "same, within the margin", "not_worse": "no worse, within the margin"}

# Ratios a ratio axis may mark, besides 1 and the margin's ends: coarse ones first, then steps of
# 0.01 near 1 for a narrow axis.
_RATIO_MARKS = (0.01, 0.02, 0.05, 0.1, 0.2, 0.25, 0.5, 0.67, 0.8, 0.9, 1.1, 1.25, 1.5, 2.0, 4.0, 5.0, 10.0,
                20.0, 50.0, 100.0, 0.95, 1.05, *(round(1 + step / 100, 2) for step in range(-9, 10) if step))


def ratio_ticks(low: float, high: float, *, keep: Sequence[float] = (), count: int = 7) -> list[tuple[float, str]]:
    """Ticks for a ratio axis drawn on the log scale from ``low`` to ``high`` (both log10):
    (position, the ratio written out). 1 and the ``keep`` ratios come first (the margin's ends);
    round ratios fill the rest, none nearer another than a ``count``-th of the span."""
    gap = (high - low) / count
    chosen: list[float] = []
    for ratio in (1.0, *keep, *_RATIO_MARKS):
        if not (ratio > 0 and math.isfinite(ratio)):
            continue
        place = math.log10(ratio)
        if low <= place <= high and all(abs(place - other) >= gap for other in chosen):
            chosen.append(place)
    return [(place, f"{10 ** place:.3g}") for place in sorted(chosen)]


@dataclass(frozen=True)
class _Row:
    name: str
    estimate: float
    low: float | None
    high: float | None
    finds_difference: bool
    picked: bool


class IntervalPlot(ThemedPlot):
    """The difference and its confidence interval for each procedure, one row each.

    A vertical line marks no difference; an open end of a one-sided interval runs to the edge of
    the plot and ends in an arrow. The procedure the findings follow is drawn in its own colour.
    For an equivalence or non-inferiority question the margin is a shaded band: the differences
    that count as the same (or as no worse), its edges drawn as lines. A ratio margin puts the
    rows on a ratio axis: log scale, ticks written as ratios, no difference at 1.
    """

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._rows: list[_Row] = []
        self._labels: list = []
        self._axis_label = ""
        self._margin = None  # engine.question.Margin in the estimate's units, or None
        self.setMinimumSize(320, 200)

    @property
    def ratio(self) -> bool:
        """Whether the axis is a ratio axis (a ratio margin's rows)."""
        return self._margin is not None and self._margin.unit == "ratio"

    def show_rows(self, rows: Sequence[object], *, picked: str | None = None, axis_label: str = "",
                  margin: object = None) -> None:
        """``rows``: the engine's ``RobustnessRow`` objects; ``picked`` is the key to highlight;
        ``margin``: a margin question's ``engine.question.Margin`` in the estimate's units
        (``Analysis.margin``), drawn as a band."""
        self._margin = margin
        place = self._place
        self._rows = []
        for row in rows:
            interval = row.interval
            self._rows.append(_Row(row.name, place(row.estimate),
                                   None if interval is None else place(interval.low),
                                   None if interval is None else place(interval.high),
                                   row.finds_difference, row.key == picked))
        self._axis_label = axis_label
        self.redraw()

    def _place(self, value: float | None) -> float | None:
        """Where ``value`` goes along the axis: itself, or its log10 on a ratio axis (a ratio at
        or below 0, which no ratio procedure gives, is left out)."""
        if value is None or not self.ratio:
            return value
        return math.log10(value) if value > 0 else math.nan

    def band(self) -> tuple[float, float] | None:
        """The shaded span along the axis (log10 on a ratio axis; an open side as an infinity), or
        None without a margin."""
        margin = self._margin
        if margin is None:
            return None
        low, high = self._place(margin.low), self._place(margin.high)
        if margin.worse == "lower":
            return low, math.inf
        if margin.worse == "higher":
            return -math.inf, high
        return low, high

    def _span(self) -> tuple[float, float]:
        ends = [0.0]
        for row in self._rows:
            ends += [v for v in (row.estimate, row.low, row.high) if v is not None and math.isfinite(v)]
        band = self.band()
        if band is not None:
            ends += [v for v in band if math.isfinite(v)]
        low, high = min(ends), max(ends)
        margin = (high - low) * 0.12 or 1.0
        return low - margin, high + margin

    def _draw_band(self, left: float, right: float) -> None:
        band = self.band()
        if band is None:
            for name in ("band", "band_edges", "band_label"):
                if name in self._kept_items:
                    self.removeItem(self._kept_items.pop(name))
            return
        low, high = max(band[0], left), min(band[1], right)
        tint = QColor(self.colours.groups[0])
        region = self._kept("band", lambda: pg.LinearRegionItem(movable=False))
        region.setZValue(-20)
        region.setRegion((low, high))
        region.setBrush(pg.mkBrush(_with_alpha(tint, 0.16)))
        for line in region.lines:
            line.setPen(pg.mkPen(None))
        region.setHoverBrush(pg.mkBrush(_with_alpha(tint, 0.16)))
        edges = [v for v in band if math.isfinite(v)]
        xs = [v for v in edges for _ in (0, 1)]
        ys = [-0.5, len(self._rows)] * len(edges)
        self._kept("band_edges", pg.PlotDataItem).setData(xs, ys, connect="pairs",
                                                          pen=pg.mkPen(_with_alpha(tint, 0.9), width=1.4))
        label = self._kept("band_label", lambda: pg.TextItem(anchor=(0, 0)))
        words = BAND_WORDS["equivalent" if self._margin.worse is None else "not_worse"]
        if label.toPlainText() != words:
            label.setText(words)
        label.setColor(tint.lighter(130) if self.colours.dark else tint)
        # written inside the band from its closed end, away from the procedures' names on the left
        from_right = not math.isfinite(band[0])
        label.setAnchor((1, 0) if from_right else (0, 0))
        label.setPos(high if from_right else low, len(self._rows) - 0.1)

    def redraw(self) -> None:
        if not self._rows:
            self._drop_kept()
            self._labels = []
            return
        left, right = self._span()
        ink, faint = self.colours.foreground, self.colours.faint
        self._kept("zero", lambda: pg.InfiniteLine(0.0, angle=90)).setPen(
            pg.mkPen(faint, width=1.2, style=Qt.PenStyle.DashLine))
        count = len(self._rows)
        pad = 0.03 * (right - left)
        self._draw_band(left - pad, right + pad)
        marks: dict[str, list] = {"x": [], "y": [], "symbol": [], "size": [], "pen": [], "brush": []}

        def mark(x: float, y: float, symbol: str, size: int, pen, colour) -> None:
            for key, value in zip(marks, (x, y, symbol, size, pen, pg.mkBrush(colour))):
                marks[key].append(value)

        self._labels = []
        for place, row in enumerate(self._rows):
            y = count - 1 - place
            colour = self.colours.picked if row.picked else ink
            pen = pg.mkPen(colour, width=3.0 if row.picked else 1.8)
            line = self._kept(f"line{place}", pg.PlotDataItem)
            if row.low is not None or row.high is not None:
                low = row.low if row.low is not None else left
                high = row.high if row.high is not None else right
                line.setData([low, high], [y, y], pen=pen)
                for end, value, symbol in ((low, row.low, "t3"), (high, row.high, "t2")):
                    mark(end, y, "|" if value is not None else symbol, 12, pen, colour)
            else:
                line.setData([], [], pen=pen)
            mark(row.estimate, y, "o", 10 if row.picked else 8, pg.mkPen(colour), colour)
            # each procedure's name sits above its line, at the left edge
            label = self._kept(f"label{place}", lambda: pg.TextItem(anchor=(0, 1)))
            if label.toPlainText() != row.name:
                label.setText(row.name)
            label.setColor(colour)
            label.setPos(left - pad, y + 0.05)
            self._labels.append(label)
        self._drop_kept(keep=count, prefixes=("line", "label"))
        self._kept("marks", pg.ScatterPlotItem).setData(**marks)
        self.getPlotItem().showAxis("left", False)
        self.getPlotItem().setYRange(-0.5, count - 0.1, padding=0)
        self.getPlotItem().setXRange(left - pad, right + pad, padding=0)
        self.getPlotItem().getAxis("bottom").setTicks(
            [ratio_ticks(left - pad, right + pad, keep=(self._margin.low, self._margin.high))]
            if self.ratio else None)
        self.setFixedHeight(80 + 46 * count)
        self.set_axis_labels(self._axis_label)

    def row_names(self) -> list[str]:
        """The names written beside the rows, top to bottom."""
        return [label.toPlainText() for label in self._labels]


def plot_image(widget: QWidget, *, scale: float = 2.0) -> QImage:
    """The widget drawn into an image ``scale`` times its size (sharp when pasted into a document)."""
    size = widget.size()
    image = QImage(round(size.width() * scale), round(size.height() * scale), QImage.Format.Format_ARGB32)
    image.setDevicePixelRatio(scale)
    image.fill(widget.palette().color(QPalette.ColorRole.Base))
    painter = QPainter(image)
    try:
        painter.setRenderHint(QPainter.RenderHint.Antialiasing)
        # QWidget's own render (the view's frame and all), not QGraphicsView's scene-only one
        QWidget.render(widget, painter, QPoint(0, 0))
    finally:
        painter.end()
    return image


def save_plot(widget: ThemedPlot, path: str | Path) -> Path:
    """Write ``widget`` to ``path`` as PNG or SVG, chosen by the suffix; returns the path.

    Raises ``ValueError`` for another suffix and ``OSError`` when the file cannot be written.
    """
    path = Path(path)
    suffix = path.suffix.lower()
    if suffix == ".png":
        if not plot_image(widget).save(str(path), "PNG"):
            raise OSError(f"could not write {path}")
    elif suffix == ".svg":
        from PySide6.QtSvg import QSvgGenerator

        if not path.parent.is_dir():
            raise OSError(f"no folder {path.parent}")
        generator = QSvgGenerator()
        generator.setFileName(str(path))
        generator.setSize(widget.size())
        generator.setViewBox(widget.rect())
        generator.setTitle("Twofold plot")
        painter = QPainter(generator)
        try:
            painter.fillRect(widget.rect(), widget.palette().color(QPalette.ColorRole.Base))
            QWidget.render(widget, painter, QPoint(0, 0))
        finally:
            painter.end()
        if not path.is_file() or path.stat().st_size == 0:
            raise OSError(f"could not write {path}")
    else:
        raise ValueError(f"a plot is saved as .png or .svg, not '{path.suffix}'")
    return path


def save_plot_file(widget: ThemedPlot, path: str | Path, what: str = "plot") -> Path:
    """:func:`save_plot`, its failures said as :class:`engine.errors.FileProblem` sentences that
    name the file (``what``: the plot's name in them)."""
    from engine.errors import FileProblem

    path = Path(path)
    try:
        return save_plot(widget, path)
    except ValueError as error:
        raise FileProblem(f"{str(error)[:1].upper()}{str(error)[1:]} ({path.name}).") from None
    except OSError as error:
        raise FileProblem(f"Could not save the {what} to {path}: {error.strerror or error}.") from None
