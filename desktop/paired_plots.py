"""Plots of paired measurements: the differences against the pair means, the shape of the
differences, and each unit's two values joined by a line.

Each plot draws only what the engine computed for the pairs (``engine.paired_diagnostics``:
the differences, group 1 minus group 2, the pair means, the differences' summary and Q-Q
points) plus the thinning that drawing needs. Every plot here can be copied as a picture or
saved as PNG or SVG from its own right-click menu, with the helpers of :mod:`desktop.plots`.
"""

from __future__ import annotations

import math
from dataclasses import replace
from pathlib import Path
from typing import Sequence

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt
from PySide6.QtGui import QContextMenuEvent
from PySide6.QtWidgets import QFileDialog, QMenu, QWidget

from engine import report
from engine.errors import FileProblem
from engine.text import visible

from . import clipboard
from .plots import MAX_POINTS, PlotColours, QQPlot, ShapePlot, ThemedPlot, plot_image, save_plot_file

__all__ = ["MAX_JOINED", "PLOT_TIPS", "DifferencePlot", "DifferenceShapePlot", "DifferenceQQPlot",
           "JoinedPairsPlot", "pick_points", "joined_segments", "pair_figures"]

# Up to this many pairs each unit's two values are joined by a line; more make a thicket in
# which no single line can be followed (our own choice, from looking at such plots).
MAX_JOINED = 60

COPY_TIP = " Right-click to copy this plot or save it as a picture."

# What each plot shows, said when the pointer rests on it.
PLOT_TIPS = {
    "differences": "Each dot is one pair: across, the mean of its two values; up, its difference. "
                   "The solid line is the mean difference, the dashed line no difference. A spread "
                   "that widens or a trend from left to right means the difference depends on the "
                   "size of the values.",
    "shape": "Bars: how the differences of the pairs spread out; the curve: a bell curve with "
             "their mean and SD. " + report.GLOSSES["density"],
    "qq": "The differences against where a bell-shaped sample of their size would put them: "
          "close to the line means close to bell-shaped.",
    "joined": "Each line is one unit, from its value in group 1 to its value in group 2.",
}


def pick_points(x: np.ndarray, y: np.ndarray, limit: int = MAX_POINTS, *, seed: int = 0) -> np.ndarray:
    """Indices of at most ``limit`` of the points (x, y) for a scatter, in their own order.

    The smallest and largest of each coordinate are always in, the rest drawn at random with a
    fixed seed (so the picture stays the same between redraws).
    """
    n = len(x)
    if n <= limit:
        return np.arange(n)
    ends = np.unique([np.argmin(x), np.argmax(x), np.argmin(y), np.argmax(y)])
    others = np.setdiff1d(np.arange(n), ends, assume_unique=True)
    chosen = np.random.default_rng(seed).choice(others, size=limit - ends.size, replace=False)
    return np.sort(np.concatenate([ends, chosen]))


def joined_segments(x: np.ndarray, y: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """The line of each unit from (0, x[i]) to (1, y[i]), as points drawn in pairs."""
    n = len(x)
    across = np.tile([0.0, 1.0], n)
    up = np.empty(2 * n, dtype=float)
    up[0::2], up[1::2] = x, y
    return across, up


def pair_figures(paired, labels: Sequence[str]) -> list[tuple[str, str]]:
    """The figures beside the plot of the differences: pairs, mean difference, correlation.

    ``paired`` is an ``engine.paired_diagnostics.PairedChecks``; its summary holds the
    differences' mean and SD.
    """
    fmt = report.format_number
    summary = paired.summary
    r = paired.correlation
    return [
        (f"{report.plural(paired.n_pairs, 'pair')}",
         "The units with a value in both groups; a unit left out is listed under Your data."),
        (f"mean difference {fmt(summary.mean)} (the solid line)",
         f"The mean of {visible(labels[0])} minus {visible(labels[1])}, pair by pair; the dashed line "
         "is no difference."),
        (f"SD of the differences {fmt(summary.sd)}",
         "How much the differences vary from pair to pair: the spread the paired procedures work with."),
        (f"correlation r = {fmt(r, digits=2)}" if math.isfinite(r) else "correlation: not defined",
         "How closely a unit's two values go together (Pearson's r). The higher it is, the more "
         "pairing helps: the differences then vary less than the values themselves."),
    ]


class _Copyable:
    """A plot whose right-click menu copies it as a picture or saves it as a file."""

    save_name = "plot.png"

    def copy_picture(self) -> None:
        """Put the plot on the clipboard as a picture."""
        clipboard.copy_image(plot_image(self))

    def save_picture(self, path: str | Path) -> Path:
        """Save the plot as PNG or SVG (by the suffix of ``path``).

        Raises :class:`engine.errors.FileProblem` for another suffix or a failed write.
        """
        return save_plot_file(self, path)

    def ask_save_picture(self) -> Path | None:
        """Ask where to save the plot, then save it; a failure is said in a small box."""
        path, _ = QFileDialog.getSaveFileName(self, "Save this plot", self.save_name,
                                              "PNG picture (*.png);;SVG drawing (*.svg)")
        if not path:
            return None
        try:
            return self.save_picture(path)
        except FileProblem as problem:
            from PySide6.QtWidgets import QMessageBox

            QMessageBox.warning(self, "Save this plot", problem.message)
            return None

    def picture_menu(self) -> QMenu:
        """The plot's right-click menu."""
        menu = QMenu(self)
        menu.addAction("Copy this plot", self.copy_picture)
        menu.addAction("Save this plot…", self.ask_save_picture)
        return menu

    def contextMenuEvent(self, event: QContextMenuEvent) -> None:  # noqa: N802 - Qt's name
        menu = self.picture_menu()
        menu.exec(event.globalPos())
        menu.deleteLater()
        event.accept()


class _DifferenceAxis:
    """A one-sample plot of :mod:`desktop.plots` whose values are differences: the axis it names
    "value" is named as a difference, and it is drawn in the colour of the chosen procedure
    (neither group's colour: a difference belongs to both)."""

    value_name = "difference"

    @property
    def colours(self) -> PlotColours:
        return self._colours

    @colours.setter
    def colours(self, value: PlotColours) -> None:
        self._colours = replace(value, groups=(value.picked, value.picked))

    def set_axis_labels(self, bottom: str = "", left: str = "") -> None:
        super().set_axis_labels(self.value_name if bottom == "value" else bottom,  # type: ignore[misc]
                                self.value_name if left == "value" else left)


class DifferenceShapePlot(_Copyable, _DifferenceAxis, ShapePlot):
    """Histogram of the differences with the normal curve of their mean and SD."""

    save_name = "differences_shape.png"

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setToolTip(PLOT_TIPS["shape"] + COPY_TIP)


class DifferenceQQPlot(_Copyable, _DifferenceAxis, QQPlot):
    """Normal Q-Q points of the differences and the line of their mean and SD."""

    save_name = "differences_qq.png"

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setToolTip(PLOT_TIPS["qq"] + COPY_TIP)


class DifferencePlot(_Copyable, ThemedPlot):
    """Each pair's difference against the mean of its two values, with a solid line at the mean
    difference and a dashed one at no difference; at most :data:`MAX_POINTS` points are drawn."""

    save_name = "differences_and_means.png"

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._data: tuple | None = None
        self.setToolTip(PLOT_TIPS["differences"] + COPY_TIP)

    def show_pairs(self, pair_means: np.ndarray, differences: np.ndarray, *, mean_difference: float,
                   labels: Sequence[str]) -> None:
        """Draw the pairs: ``pair_means`` across, ``differences`` (group 1 minus group 2) up; the
        title names the two groups in the order of the difference."""
        means = np.asarray(pair_means, dtype=float)
        diffs = np.asarray(differences, dtype=float)
        if means.shape != diffs.shape:
            raise ValueError("one mean and one difference per pair")
        self._data = (means, diffs, float(mean_difference), tuple(labels))
        self.set_title(f"{labels[0]} minus {labels[1]}")
        self.redraw()

    @property
    def mean_line(self) -> float | None:
        """Where the line of the mean difference is drawn (None before any pairs)."""
        return None if self._data is None else self._data[2]

    def redraw(self) -> None:
        if self._data is None:
            self._drop_kept()
            return
        means, diffs, mean_difference, labels = self._data
        keep = pick_points(means, diffs)
        self._kept("points", pg.ScatterPlotItem).setData(
            means[keep], diffs[keep], size=5, pen=pg.mkPen(None), brush=pg.mkBrush(self._dot_colour()))
        self._kept("zero", lambda: pg.InfiniteLine(0.0, angle=0)).setPen(
            pg.mkPen(self.colours.faint, width=1.2, style=Qt.PenStyle.DashLine))
        line = self._kept("mean", lambda: pg.InfiniteLine(0.0, angle=0))
        line.setPen(pg.mkPen(self.colours.picked, width=2.0))
        line.setValue(mean_difference if math.isfinite(mean_difference) else 0.0)
        line.setVisible(math.isfinite(mean_difference))
        self._fit_ranges(means, diffs, mean_difference)
        self.set_axis_labels("mean of the pair", "difference")

    def _fit_ranges(self, means: np.ndarray, diffs: np.ndarray, mean_difference: float) -> None:
        """Every point whole, and the lines of no difference and of the mean difference in sight."""
        item = self.getPlotItem()
        finite_means, finite_diffs = means[np.isfinite(means)], diffs[np.isfinite(diffs)]
        if finite_means.size:
            low, high = float(finite_means.min()), float(finite_means.max())
            pad = (high - low) * 0.06 or max(abs(low) * 0.05, 1.0)
            item.setXRange(low - pad, high + pad, padding=0)
        ends = [0.0, *(v for v in (mean_difference,) if math.isfinite(v))]
        if finite_diffs.size:
            ends += [float(finite_diffs.min()), float(finite_diffs.max())]
        low, high = min(ends), max(ends)
        pad = (high - low) * 0.08 or 1.0
        item.setYRange(low - pad, high + pad, padding=0)

    def _dot_colour(self):
        colour = pg.mkColor(self.colours.foreground)
        colour.setAlphaF(0.6)
        return colour

    def shown_points(self) -> tuple[np.ndarray, np.ndarray]:
        """The points drawn (mean of the pair, difference)."""
        item = self._kept_items.get("points")
        if item is None:
            return np.array([]), np.array([])
        x, y = item.getData()
        return np.asarray(x), np.asarray(y)


class JoinedPairsPlot(_Copyable, ThemedPlot):
    """Each unit's value in group 1 and in group 2, joined by a line, when there are at most
    :data:`MAX_JOINED` units; with more it draws nothing and says so (:attr:`drawn`)."""

    save_name = "pairs_joined.png"

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._data: tuple | None = None
        self.setToolTip(PLOT_TIPS["joined"] + COPY_TIP)

    @property
    def drawn(self) -> bool:
        """Whether the pairs are drawn (there are pairs, and few enough of them)."""
        return self._data is not None and 0 < len(self._data[0]) <= MAX_JOINED

    def show_pairs(self, x: np.ndarray, y: np.ndarray, *, labels: Sequence[str]) -> bool:
        """Draw unit i from ``x[i]`` (group 1) to ``y[i]`` (group 2); returns :attr:`drawn`."""
        x, y = np.asarray(x, dtype=float), np.asarray(y, dtype=float)
        if x.shape != y.shape:
            raise ValueError("one value in each group per unit")
        self._data = (x, y, tuple(labels))
        self.redraw()
        return self.drawn

    def redraw(self) -> None:
        if not self.drawn:
            self._drop_kept()
            return
        x, y, labels = self._data
        across, up = joined_segments(x, y)
        self._kept("lines", pg.PlotDataItem).setData(across, up, connect="pairs",
                                                     pen=pg.mkPen(self.colours.faint, width=1.2))
        for place, values in enumerate((x, y)):
            colour = pg.mkColor(self.colours.groups[place])
            self._kept(f"points{place}", pg.ScatterPlotItem).setData(
                np.full(values.size, float(place)), values, size=6, pen=pg.mkPen(None), brush=pg.mkBrush(colour))
        axis = self.getPlotItem().getAxis("bottom")
        axis.setTicks([[(0, visible(labels[0])), (1, visible(labels[1]))]])
        self.getPlotItem().setXRange(-0.3, 1.3, padding=0)
        self.set_axis_labels("", "value")

    def shown_lines(self) -> tuple[np.ndarray, np.ndarray]:
        """The line ends drawn, in pairs (across, up); empty when nothing is drawn."""
        item = self._kept_items.get("lines")
        if item is None:
            return np.array([]), np.array([])
        x, y = item.getData()
        return np.asarray(x), np.asarray(y)
