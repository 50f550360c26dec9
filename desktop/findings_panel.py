"""The findings: a headline, a compact table, every procedure side by side, and the cautions.

The panel shows the result of the procedure the user follows (``session.spec.procedure``, or
the suggested one). Every number comes from the engine and is written by ``engine.report``;
the panel lays them out and offers them to a document: copy the findings (a table and plain
text), copy or save the plot, export an HTML or PDF report.

Run on its own for a quick look: ``python -m desktop.findings_panel``.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path
from typing import Any

from PySide6.QtCore import Qt, Signal
from PySide6.QtGui import QImage
from PySide6.QtWidgets import (QAbstractItemView, QApplication, QFileDialog, QFrame, QHeaderView, QPushButton,
                               QSizePolicy, QTableWidget, QTableWidgetItem, QVBoxLayout, QWidget)

from engine import report
from engine.procedures import registry
from engine.errors import FileProblem
from engine.text import visible, visible_html
from engine.side_by_side import NO_INTERVAL_WHY

from . import clipboard, export
from .icons import icon
from .panel_parts import FlowLayout, heading, hint_and_body, text_label
from .plots import BoxPlot, IntervalPlot, document_palette, plot_image, save_plot_file

__all__ = ["FindingsPanel", "STATISTIC_TIPS", "MARGIN_OFFER_BUTTON", "MARGIN_PLOT_NOTE",
           "NOTHING_ANSWERS"]

# One sentence per statistic, shown when the pointer rests on a row of the table.
STATISTIC_TIPS = {
    "difference": "The procedure's estimate of how far the first group lies above the second "
                  "(a negative value means below).",
    "statistic": "The procedure's own measure of how far the data sit from no difference, on "
                 "the scale its p-value is read from.",
    "df": "How much information the t distribution behind the p-value rests on; larger groups "
          "give more degrees of freedom.",
    "p": "How often chance alone would give a difference at least this far from zero if the "
         "groups did not differ; small values speak against no difference.",
    "mc_se": "How much the resampled p-value could move with another random seed (its Monte "
             "Carlo standard error).",
    "interval": "The range of differences these data are consistent with at the chosen "
                "confidence level.",
    "cohen_d": "The difference in means measured in pooled standard deviations.",
    "hedges_g": "Cohen's d with a small-sample correction: the difference in means in pooled "
                "standard deviations.",
    "glass_delta": "The difference in means measured in the second group's standard deviation.",
    "rank_biserial": "From -1 to 1: how much more often a value of the first group exceeds one "
                     "of the second than the other way round.",
    "common_language": "The chance that a value drawn from the first group exceeds one drawn "
                       "from the second.",
}

_HINT = "Pick the columns and the two groups; the findings appear here."

# Offered under the findings of a "do they differ?" question that found no clear difference.
MARGIN_OFFER_BUTTON = "Ask whether they are the same within a margin…"
# Shown when no procedure gave a result for the question asked.
NOTHING_ANSWERS = "No procedure could answer this question with these data."

_PLOT_TIP = ("Each line is one procedure's interval for the difference, its dot the estimate; the dashed "
             "line is no difference. The highlighted line is the procedure the findings follow.")
# Under the plot of a margin question: how to read the band.
MARGIN_PLOT_NOTE = {
    "equivalent": "Each line is a {level} interval. A line wholly inside the shaded margin shows the "
                  "groups are the same within it; a line reaching past it does not.",
    "not_worse": "Each line is a {level} interval. A line wholly inside the shaded side shows group 1 "
                 "is no worse than the margin allows; a line reaching past the margin's edge does not.",
}
_MARGIN_PLOT_TIP = ("Each line is one procedure's {level} interval (the one set against the margin), its "
                    "dot the estimate; the dashed line is no difference and the shaded band the margin. "
                    "A line wholly inside the band answers yes. The highlighted line is the procedure the "
                    "findings follow.")


class FindingsPanel(QWidget):
    """What the comparison found, ready to copy into a document.

    Parameters
    ----------
    session : engine.session.Session
        Read for the analysis and the procedure to follow; never written.

    ``margin_question_wanted`` is emitted when the user takes up the offer to ask whether the
    groups are the same within a margin (the window opens the margin's entry).
    """

    margin_question_wanted = Signal()

    def __init__(self, session, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.session = session
        self._shown_key: str | None = None
        self._build()
        session.subscribe(self._on_session)
        self.refresh()

    # -- building ------------------------------------------------------------------------------
    def _build(self) -> None:
        self.hint, self.scroll, layout = hint_and_body(self, _HINT)

        buttons = FlowLayout(spacing=8)
        self.copy_button = QPushButton(icon("copy"), "Copy findings")
        self.copy_button.setToolTip("Put the findings on the clipboard as a table and as plain "
                                    "text, ready to paste into a document.")
        self.copy_plot_button = QPushButton(icon("copy"), "Copy plot")
        self.copy_plot_button.setToolTip("Put the side-by-side plot on the clipboard as a picture.")
        self.save_plot_button = QPushButton("Save plot...")
        self.save_plot_button.setToolTip("Save the side-by-side plot as a PNG picture or an SVG drawing.")
        self.export_button = QPushButton(icon("export"), "Export report...")
        self.export_button.setToolTip("Write the whole report, with the file's checksum and the "
                                      "choices made, as an HTML page or a PDF.")
        self.copy_button.clicked.connect(self.copy_findings)
        self.copy_plot_button.clicked.connect(self.copy_plot)
        self.save_plot_button.clicked.connect(self.ask_save_plot)
        self.export_button.clicked.connect(self.ask_export_report)
        self.plan_button = QPushButton("Plan a follow-up from these data")
        self.plan_button.setToolTip("How many to measure next time, resampling these two groups.")
        self.plan_button.clicked.connect(lambda: self._window_saves("plan_follow_up"))
        for button in (self.copy_button, self.copy_plot_button, self.save_plot_button, self.export_button,
                       self.plan_button):
            buttons.addWidget(button)
        layout.addLayout(buttons)
        self.status = text_label()
        self.status.setVisible(False)  # until a save or export from here reports how it went
        layout.addWidget(self.status)

        self.verdict = text_label()  # a margin question's verdict against the margin, first and bold
        self.verdict.setVisible(False)
        self.headline = text_label()
        font = self.headline.font()
        font.setPointSizeF(font.pointSizeF() * 1.1)
        self.headline.setFont(font)
        font.setBold(True)
        self.verdict.setFont(font)
        layout.addWidget(self.verdict)
        layout.addWidget(self.headline)
        self.followed = text_label()
        layout.addWidget(self.followed)
        self.offer = QFrame()  # after "no clear difference": the question of sameness, and why a margin
        self.offer.setFrameShape(QFrame.Shape.StyledPanel)
        offer_layout = QVBoxLayout(self.offer)
        self.offer_text = text_label("")
        self.offer_button = QPushButton(MARGIN_OFFER_BUTTON)
        self.offer_button.setToolTip("Opens the question of sameness in the set-up, with the cursor in "
                                     "the margin's field.")
        self.offer_button.clicked.connect(self.margin_question_wanted)
        offer_layout.addWidget(self.offer_text)
        offer_layout.addWidget(self.offer_button, 0, Qt.AlignmentFlag.AlignLeft)
        self.offer.setVisible(False)
        layout.addWidget(self.offer)

        self.table = QTableWidget(0, 3)
        self.table.verticalHeader().setVisible(False)
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.table.setSelectionMode(QAbstractItemView.SelectionMode.ContiguousSelection)
        self.table.setWordWrap(True)
        header = self.table.horizontalHeader()
        header.setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
        header.setSectionResizeMode(0, QHeaderView.ResizeMode.Stretch)
        # the first column wraps: the rows grow or shrink with its width
        header.sectionResized.connect(lambda *_: self._fit_table())
        self.table.setSizePolicy(QSizePolicy.Policy.Preferred, QSizePolicy.Policy.Fixed)
        self.table.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self.table.setVerticalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        layout.addWidget(self.table)

        self.side_heading = heading("Every applicable procedure side by side")
        layout.addWidget(self.side_heading)
        self.agreement = text_label()
        layout.addWidget(self.agreement)
        self.plot = IntervalPlot()
        self.plot.setToolTip(_PLOT_TIP)
        layout.addWidget(self.plot)
        self.plot_note = text_label()  # how to read the margin's band
        self.plot_note.setVisible(False)
        layout.addWidget(self.plot_note)
        self.no_interval = text_label()  # why a row of the plot has a dot but no line
        self.no_interval.setVisible(False)
        layout.addWidget(self.no_interval)

        layout.addWidget(heading("About this procedure"))
        self.method = text_label()
        layout.addWidget(self.method)

        layout.addWidget(heading("Before relying on this"))
        self.cautions = text_label()
        self.cautions.setTextFormat(Qt.TextFormat.RichText)
        layout.addWidget(self.cautions)
        layout.addStretch(1)

    # -- listening -----------------------------------------------------------------------------
    def _on_session(self, name: str, value: Any) -> None:
        if name == "analysis":
            self.refresh()
        elif name == "spec" and self.session.analysis is not None:
            if self.procedure_key() != self._shown_key:
                self.refresh()

    def cleanup(self) -> None:
        """Stop listening to the session."""
        self.session.unsubscribe(self._on_session)

    # -- what is shown -------------------------------------------------------------------------
    def procedure_key(self) -> str | None:
        """The key of the procedure the findings follow (the user's pick if the analysis has it)."""
        analysis = self.session.analysis
        if analysis is None:
            return None
        picked = self.session.spec.procedure
        if picked in analysis.procedures:
            return picked
        return analysis.recommendation.key

    def report_text(self) -> report.ReportText:
        """The engine's words for the findings being shown."""
        return report.render(self.session.analysis, procedure=self.procedure_key())

    def cautions_list(self) -> list[str]:
        """The suggestion's own cautions, then the ones that hold for every comparison (as every
        report lists them)."""
        return report.cautions(self.session.analysis)

    def refresh(self) -> None:
        """Show the current analysis (or the hint when there is none)."""
        analysis = self.session.analysis
        ready = analysis is not None
        self.hint.setVisible(not ready)
        self.scroll.setVisible(ready)
        for button in (self.copy_button, self.copy_plot_button, self.save_plot_button, self.export_button):
            button.setEnabled(ready)
        self.plan_button.setVisible(ready and self.window() is not self)
        if not ready:
            self._shown_key = None
            return
        key = self.procedure_key()
        self._shown_key = key
        result = analysis.procedures.get(key)
        if result is None:
            self._show_nothing(analysis)
            return
        for widget in (self.table, self.followed, self.side_heading, self.plot):
            widget.setVisible(True)
        text = self.report_text()
        paragraph = text.paragraph
        verdict = _margin_verdict(analysis, key)
        if verdict and paragraph.startswith(verdict):  # the paragraph opens with it: said once, above
            paragraph = paragraph[len(verdict):].lstrip()
        self.verdict.setText(verdict)
        self.verdict.setVisible(bool(verdict))
        self.headline.setText(paragraph)
        # after "no clear difference": the report's paragraph on sameness, with the way to ask it
        self.offer_text.setText(text.sameness)
        self.offer.setVisible(bool(text.sameness))
        self.followed.setText(f"Procedure followed: {report.procedure_followed(analysis, key)}.")
        self._fill_table(analysis, result)
        self._show_robustness(analysis, key)
        notes = [result.method[:1].upper() + result.method[1:] + "."] if result.method else []
        notes += list(result.warnings)
        self.method.setText("\n".join(notes))
        self.cautions.setText("<ul>" + "".join(f"<li>{visible_html(c)}</li>" for c in self.cautions_list()) + "</ul>")

    def _show_nothing(self, analysis) -> None:
        """No procedure gave a result for the question: say so, and why where the analysis knows."""
        why = [note.text for note in analysis.notes if note.key == "part_not_computed"]
        self.headline.setText(" ".join([NOTHING_ANSWERS, *why]))
        for widget in (self.verdict, self.offer, self.table, self.followed, self.no_interval, self.side_heading,
                       self.plot, self.plot_note):
            widget.setVisible(False)
        for button in (self.copy_button, self.copy_plot_button, self.save_plot_button, self.export_button):
            button.setEnabled(False)
        self.plot.show_rows([])
        self.agreement.setText("")
        self.method.setText("")
        self.cautions.setText("<ul>" + "".join(f"<li>{visible_html(c)}</li>" for c in self.cautions_list()) + "</ul>")

    def _fill_table(self, analysis, result) -> None:
        labels = [visible(label) for label in analysis.groups.labels]
        # the interval's own level: a margin procedure's is the (1 - 2 alpha) one set against the margin
        level = report.level_text(result.interval.level if result.interval is not None else analysis.spec.level)
        shown = report.display_numbers(analysis, result.key)
        missing = report.NOT_AVAILABLE
        statistic = report.STATISTIC_ROW
        rows = [
            (report.estimate_label(result, labels), shown.estimate, shown.interval or "none given",
             STATISTIC_TIPS["difference"] + " " + STATISTIC_TIPS["interval"]),
            (f"{statistic} ({result.statistic_name})" if result.statistic_name else statistic,
             shown.statistic, "", STATISTIC_TIPS["statistic"]),
            (report.DF_ROW, shown.df, "", STATISTIC_TIPS["df"]),
            (report.p_label(result.alternative), shown.p, "", STATISTIC_TIPS["p"]),
        ]
        rows = [row for row in rows if row[1] is not None]  # what a procedure does not give takes no row
        if shown.mc_se is not None:
            rows.append((report.MC_SE_ROW, shown.mc_se, "", STATISTIC_TIPS["mc_se"]))
        if shown.effect_name is not None:
            rows.append((shown.effect_name[:1].upper() + shown.effect_name[1:], shown.effect or missing,
                         shown.effect_interval or "", STATISTIC_TIPS.get(shown.effect_key, "")))
        self.table.setHorizontalHeaderLabels(["", "Value", f"{level} interval"])
        self.table.setRowCount(len(rows))
        for row, (what, value, interval, tip) in enumerate(rows):
            for column, text in enumerate((what, value, interval)):
                item = QTableWidgetItem(text)
                item.setToolTip(tip)
                if column:
                    item.setTextAlignment(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
                self.table.setItem(row, column, item)
        metrics = self.table.fontMetrics()
        natural = sum(max(metrics.horizontalAdvance(text) for text in column) + 32
                      for column in zip(*[row[:3] for row in rows], ("", "Value", f"{level} interval")))
        self.table.setMaximumWidth(natural + 2 * self.table.frameWidth())
        self._fit_table()

    def _fit_table(self) -> None:
        """Row heights for the current width (the first column wraps), and a height to match."""
        self.table.resizeRowsToContents()
        height = self.table.horizontalHeader().sizeHint().height() + 2 * self.table.frameWidth()
        height += sum(self.table.rowHeight(r) for r in range(self.table.rowCount()))
        self.table.setFixedHeight(height)

    def resizeEvent(self, event) -> None:  # noqa: N802 - Qt's name
        super().resizeEvent(event)
        if self.session.analysis is not None:
            self._fit_table()

    def showEvent(self, event) -> None:  # noqa: N802 - Qt's name
        super().showEvent(event)
        if self.session.analysis is not None:
            self._fit_table()  # the rows were fitted while the tab was hidden, at another width

    def _show_robustness(self, analysis, key: str) -> None:
        robustness = analysis.robustness
        self.plot.show_rows(_difference_rows(robustness), picked=key, axis_label=_axis_label(analysis),
                            margin=analysis.margin)
        if analysis.margin is not None:
            level = report.level_text(1.0 - 2.0 * analysis.spec.question.alpha)
            self.plot.setToolTip(_MARGIN_PLOT_TIP.format(level=level))
            self.plot_note.setText(MARGIN_PLOT_NOTE[analysis.spec.question.kind].format(level=level))
        else:
            self.plot.setToolTip(_PLOT_TIP)
            self.plot_note.setText("")
        self.plot_note.setVisible(bool(self.plot_note.text()))
        self.agreement.setText(report.agreement(analysis))
        why = [NO_INTERVAL_WHY.get(row.key, "") for row in robustness.rows if row.interval is None]
        why = [text for text in dict.fromkeys(why) if text]
        self.no_interval.setText(" ".join(why))
        self.no_interval.setVisible(bool(why))

    # -- into a document -----------------------------------------------------------------------
    def copy_findings(self) -> None:
        """Put the findings on the clipboard: HTML with a table, and plain text."""
        analysis = self.session.analysis
        if analysis is None:
            return
        if self.procedure_key() not in analysis.procedures:  # nothing answers: say so
            clipboard.copy_findings_text(visible_html(self.headline.text()), self.headline.text())
            return
        text = self.report_text()
        clipboard.copy_findings_text(text.html, text.plain)

    def copy_plot(self) -> None:
        """Put the side-by-side plot on the clipboard as an image."""
        if self.session.analysis is None:
            return
        clipboard.copy_image(plot_image(self.plot))

    def save_plot(self, path: str | Path) -> Path:
        """Save the side-by-side plot as PNG or SVG (by the suffix of ``path``).

        Raises :class:`engine.errors.FileProblem` for another suffix or a failed write.
        """
        return save_plot_file(self.plot, path)

    def export_report(self, path: str | Path) -> Path:
        """Write the report as HTML or PDF (by the suffix of ``path``) and return the path.

        Raises :class:`engine.errors.FileProblem` for another suffix or a failed write.
        """
        analysis = self.session.analysis
        if analysis is None or self.procedure_key() not in analysis.procedures:
            raise FileProblem("There are no findings to export yet.")
        images = _report_images(analysis, self.procedure_key())
        return export.export_report(path, analysis, procedure=self.procedure_key(), images=images)

    def _window_saves(self, name: str) -> bool:
        """Let the window do a save (it remembers the folder and says where the file went)."""
        owner = self.window()
        save = getattr(owner, name, None) if owner is not self else None
        if save is None:
            return False
        save()
        return True

    def ask_save_plot(self) -> None:
        """Ask where to save the plot, then save it (the outcome shows under the buttons)."""
        if self._window_saves("save_plot"):
            return
        path, _ = QFileDialog.getSaveFileName(self, "Save the plot", "difference.png",
                                              "PNG picture (*.png);;SVG drawing (*.svg)")
        if path:
            self._attempt(self.save_plot, path)

    def ask_export_report(self) -> None:
        """Ask where to write the report, then write it (the outcome shows under the buttons)."""
        if self._window_saves("export_report"):
            return
        path, _ = QFileDialog.getSaveFileName(self, "Export the report", "comparison.html",
                                              "HTML page (*.html);;PDF document (*.pdf)")
        if path:
            self._attempt(self.export_report, path)

    def _attempt(self, action, path: str) -> None:
        try:
            written = action(path)
        except FileProblem as error:
            self.status.setText(error.message)
        else:
            self.status.setText(f"Saved {Path(written).name} in {Path(written).resolve().parent}.")
        self.status.setVisible(True)


def _axis_label(analysis) -> str:
    """The name of the plot's axis: the difference, or for a ratio margin the ratio."""
    first, second = analysis.groups.labels
    if analysis.margin is not None and analysis.margin.unit == "ratio":
        return f"ratio of geometric means, {first} / {second} (log scale)"
    return f"difference, {first} minus {second}"


def _margin_verdict(analysis, key: str) -> str:
    """A margin question's verdict against the margin for procedure ``key``, in sentences ("" for
    another question, or a result without an interval to judge by)."""
    answer = analysis.margin_answer(key)
    if answer is None:
        return ""
    result = analysis.procedures[key]
    return analysis.spec.question.margin_words(answer, analysis.groups.labels, result.estimate_name)


def _difference_rows(robustness) -> list:
    """The rows whose estimate is a difference (the plot's axis), with their names as labels (a
    capital first letter); a probability is left out."""
    return [replace(row, name=report.capital(row.name)) for row in robustness.rows
            if not _is_probability(row.key)]


def _is_probability(key: str) -> bool:
    """Whether the procedure estimates a probability rather than a difference (its record)."""
    known = registry.find(key)
    return known is not None and known.estimate_kind == "probability"


def _document_image(plot, draw) -> QImage:
    """``plot`` drawn off screen in black on white (as a printed page has it) by ``draw(plot)``."""
    plot.setAttribute(Qt.WidgetAttribute.WA_DontShowOnScreen, True)
    plot.setPalette(document_palette())
    plot.resize(620, 340)
    plot.show()
    draw(plot)
    plot.resize(620, plot.height())  # a plot may fix its own height for its rows
    for _ in range(3):
        QApplication.processEvents()  # let the plot lay itself out before it is drawn
    image = plot_image(plot)
    plot.close()
    plot.deleteLater()
    return image


def _report_images(analysis, key: str) -> list[tuple[str, QImage]]:
    """The side-by-side plot and the box plot of both groups, for the report."""
    groups = analysis.groups
    axis = _axis_label(analysis)
    boxes = [(groups.labels[0], groups.x, analysis.summaries[0]),
             (groups.labels[1], groups.y, analysis.summaries[1])]
    return [
        ("Every applicable procedure: the difference and its interval",
         _document_image(IntervalPlot(), lambda plot: plot.show_rows(_difference_rows(analysis.robustness),
                                                                     picked=key, axis_label=axis,
                                                                     margin=analysis.margin))),
        ("The two groups: boxes and the values",
         _document_image(BoxPlot(), lambda plot: plot.show_groups(boxes))),
    ]


if __name__ == "__main__":  # pragma: no cover - a quick look by hand
    import sys

    from .panel_alone import show_alone

    sys.exit(show_alone(FindingsPanel, sys.argv))
