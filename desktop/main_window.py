"""The main window: the panels around one session, the menus, and the flow from file to findings.

The flow runs the steps of ``engine.pipeline`` in workers: opening a file reads it
(``pipeline.read``, after asking for the sheet of a workbook with several), records its checksum,
fills the spec's columns from the engine's proposal (``pipeline.complete``) and draws the new
analysis's seed. Each change of the columns, the two groups or the values set aside forms the
groups again (``pipeline.form_groups``); each new set of groups, and each change of the spec that
shapes the analysis, runs ``pipeline.run`` with a progress bar and a Stop button. The choice of
procedure only changes what is shown, so it runs nothing. A newer run replaces an older one; a
failure shows in the message bar and leaves the window as it was.

A saved analysis (``.twofold``, ``engine.saved``) is written from the analysis on show, and opened
by every way a data file is opened: reopening reads the source again, checks its checksum, runs
the recorded spec in a worker and says in the message bar what it found. Only a reopen that ran
replaces what is on show; a damaged file or a missing source leaves the window as it was.

The procedure and findings panels load after the window is first painted, because their plotting
library and the engine's statistics take about two seconds to import. A worker imports the
statistics (no Qt in them); the panels and pyqtgraph are imported on the GUI thread, because a
module that defines Qt classes must never be imported in another thread (see
:data:`WARM_IN_WORKER`).
"""

from __future__ import annotations

import importlib
from pathlib import Path
from typing import Any, Callable, Sequence

from PySide6.QtCore import QCoreApplication, QSettings, Qt, QTimer
from PySide6.QtGui import QAction, QCloseEvent, QDragEnterEvent, QDropEvent, QGuiApplication, QKeySequence
from PySide6.QtWidgets import (
    QFileDialog,
    QInputDialog,
    QLabel,
    QMainWindow,
    QMenu,
    QProgressBar,
    QSplitter,
    QTabWidget,
    QToolButton,
    QVBoxLayout,
    QWidget,
)

from engine.rounding import level_text
from engine.session import Session
from engine.spec import AnalysisSpec
from engine.text import visible

from .data_panel import DataPanel
from .margin_entry import question_words
from .messages import MessageBar, message_text
from .plain_text import plain_label, tooltip
from .recent import RecentFiles, menu_labels
from .setup_panel import SetupPanel
from .workers import Worker

__all__ = ["MainWindow", "OPEN_FILTER", "ANALYSIS_FILTER", "SAVED_SUFFIX", "differences_words", "GROUP_FIELDS",
           "ANALYSIS_FIELDS", "LATE_PANELS", "PROBLEM_KEYS", "WARM_IN_WORKER"]

DATA_PATTERNS = "*.csv *.tsv *.txt *.xlsx *.xls *.ods"
SAVED_SUFFIX = ".twofold"  # engine.saved.EXTENSION (the engine module is imported when first used)
OPEN_FILTER = (f"Data files and saved analyses ({DATA_PATTERNS} *{SAVED_SUFFIX});;"
               f"Data files ({DATA_PATTERNS});;Saved analyses (*{SAVED_SUFFIX});;All files (*)")
DATA_FILTER = f"Data files ({DATA_PATTERNS});;All files (*)"
ANALYSIS_FILTER = f"Saved analysis (*{SAVED_SUFFIX})"
MAX_DIFFERENCES_SHOWN = 3  # numbers that came out differently, listed by name in the message bar
WORKBOOK_KINDS = ("xlsx", "xls", "ods")
SAVE_FILTER = "Web page (*.html);;PDF document (*.pdf)"
PLOT_FILTER = "Picture (*.png);;Drawing (*.svg)"

# Fields of the spec that change the two groups, and fields that change only the analysis of them.
GROUP_FIELDS = ("layout", "group_column", "value_columns", "groups", "set_aside", "design", "pair_column")
ANALYSIS_FIELDS = ("question", "resamples", "seed", "statements", "rank_method", "zero_rule")

# The settings of the comparison that each new file starts from afresh (the defaults of
# ``AnalysisSpec``) unless the user ticks "Keep these settings for the next file". A new file
# always draws a new seed, and the statements about one file's data never carry over.
CARRIED_FIELDS = ("question", "resamples")
KEEP_SETTINGS_KEY = "comparison/keep_settings"

# Messages that say why there is no comparison; the bar drops them once the session's problem is gone.
PROBLEM_KEYS = ("groups_problem", "groups_crashed", "analysis_failed", "analysis_crashed")

# The panels that load after the first paint: (attribute, module, class, tab title, tooltip).
LATE_PANELS = (
    ("choice_panel", "desktop.choice_panel", "ChoicePanel", "Which procedure",
     "The checks on shape and spread, and the procedure they point to."),
    ("findings_panel", "desktop.findings_panel", "FindingsPanel", "Findings",
     "The result in words and numbers, ready to copy into a report."),
    ("plan_panel", "desktop.plan_panel", "PlanPanel", "Next study",
     "How many to measure next time, or what given sizes can find, from these data or from SDs you give."),
)

# What the import worker loads ahead of the late panels: the slow, Qt-free part of their imports.
# Nothing that defines a Qt class may be imported off the GUI thread: each new Qt subclass is
# entered in a table of PySide6's that the GUI thread reads without a lock whenever Qt asks a
# widget made from Python for its meta-object (as the destructor of a layout animation of the
# main window does), and a concurrent entry crashed about one start in twenty.
WARM_IN_WORKER = ("scipy.stats", "engine.analysis", "engine.advice", "engine.diagnostics", "engine.effects",
                  "engine.procedures.ranks", "engine.procedures.resampling", "engine.procedures.t", "engine.report",
                  "engine.planning", "engine.plan_member", "engine.plan_words")

SCREEN_SHARE = 0.9  # of the available screen, each way, that the window opens at
LEFT_SHARE = 0.47   # of the window's width for the data and set-up; the rest for the checks and findings
LATE_DELAY_MS = 150   # after the first paint, before importing the plotting panels
GROUPS_DELAY_MS = 20  # lets the freshly filled grid paint before the groups are formed
ANALYSIS_DELAY_MS = 120  # a burst of set-up changes runs one analysis

AskSheet = Callable[[Sequence[str], str | None], "str | None"]


def _changed(old: AnalysisSpec, new: AnalysisSpec, names: Sequence[str]) -> bool:
    return any(getattr(old, name) != getattr(new, name) for name in names)


def settings_words(spec: AnalysisSpec) -> str:
    """The carried settings of ``spec`` in a few words, e.g. "one-sided (group 1 lower), 90 %"."""
    sides = {"two-sided": "two-sided", "less": "one-sided (group 1 lower)",
             "greater": "one-sided (group 1 higher)"}
    margin = question_words(spec.question, ("group 1", "group 2"))  # "the same within ±2"
    words = [margin or sides.get(spec.alternative, spec.alternative), level_text(spec.level)]
    if spec.resamples != AnalysisSpec().resamples:
        words.append(f"{spec.resamples:,} resampling rounds")
    return ", ".join(words)


def differences_words(differences: Sequence[str], limit: int = MAX_DIFFERENCES_SHOWN) -> str:
    """The numbers that came out differently, the first ``limit`` by name and the rest counted."""
    shown = "; ".join(differences[:limit])
    rest = len(differences) - limit
    return f"{shown}; and {rest} more" if rest > 0 else shown


# What a reopened analysis's check found -> the message that says it: (one outcome, several).
REOPEN_MESSAGES = {
    "same": ("reopen_same", "reopen_outcomes_same"),
    "close": ("reopen_close", "reopen_outcomes_close"),
    "source_changed": ("reopen_source_changed", "reopen_outcomes_changed"),
    "source_changed_alike": ("reopen_source_changed_alike", "reopen_outcomes_changed_alike"),
    "numbers_differ": ("reopen_numbers_differ", "reopen_outcomes_differ"),
}


def reopen_message(status: str, differences: Sequence[str], engine_sentence: str, *,
                   several: bool = False) -> tuple[str, dict[str, str]]:
    """The message key and its values (beside the file's and the data file's names) that say what
    reopening found; a status this window does not know is never called the same."""
    listed = differences_words(differences)
    if status == "source_changed" and not listed:
        status = "source_changed_alike"
    keys = REOPEN_MESSAGES.get(status, REOPEN_MESSAGES["numbers_differ"])
    return keys[several], {"differences": listed or engine_sentence}


def _workbook_sheets(path: Path) -> tuple[tuple[str, ...], str | None]:
    """The visible sheets of a workbook and the one to offer first (the first that holds
    numbers); nothing for a text file or a workbook that cannot be read: reading it then says
    what is wrong."""
    kind = path.suffix.lower().lstrip(".")
    if kind not in WORKBOOK_KINDS:
        return (), None
    from engine.errors import TwofoldError
    from engine.io.sheets import workbook_sheets

    try:
        sheets = workbook_sheets(path)
    except TwofoldError:
        return (), None
    return sheets.visible, sheets.first_with_numbers


def _refuse_replacing_outcomes(target: Path) -> None:
    """Raise when ``target`` is a saved analysis of several outcomes: the window's one-outcome
    analysis must not take its place (the outcomes panel saves those)."""
    from engine import saved as saved_files
    from engine.errors import TwofoldError

    if not target.is_file():
        return
    try:
        outcomes = saved_files.load(target).outcomes
    except TwofoldError:  # not a saved analysis Twofold can read: the dialog asked to replace it
        return
    if outcomes is not None:
        raise TwofoldError(f"it holds an analysis of {len(outcomes['list'])} outcomes, and this window "
                           "holds one; save it under another name, or save the outcomes from their panel")


def _open_folder(folder: Path) -> None:
    """Show ``folder`` in the desktop's file manager."""
    from PySide6.QtCore import QUrl
    from PySide6.QtGui import QDesktopServices

    QDesktopServices.openUrl(QUrl.fromLocalFile(str(folder)))


class MainWindow(QMainWindow):
    """Twofold's window over one :class:`engine.session.Session`."""

    def __init__(self, session: Session | None = None, *, settings: QSettings | None = None,
                 ask_sheet: AskSheet | None = None, ask_reason: Callable[[str], str | None] | None = None) -> None:
        super().__init__()
        self.session = session or Session()
        self.settings = settings or QSettings("Twofold", "Twofold")
        self.recent = RecentFiles(self.settings)
        self._ask_sheet = ask_sheet or self._choose_sheet
        self._quiet = False
        self._seen = self.session.spec
        self._late_started = False
        self._opening = ""
        self._reopening = False  # the file being opened is a saved analysis
        self._closed = False

        self.setWindowTitle("Twofold")
        self.setAcceptDrops(True)
        self._balanced = False
        self.fit_to_screen()
        self._icons_wanted: list[tuple[Any, str]] = [(self, "app")]

        self.load_worker = Worker(self)
        self.groups_worker = Worker(self)
        self.analysis_worker = Worker(self)
        self.import_worker = Worker(self)
        # an analysis asked for by a change of set-up starts a moment later, so that a burst of
        # changes runs it once and the panels have repainted before the worker gets going
        self._analysis_soon = QTimer(self)
        self._analysis_soon.setSingleShot(True)
        self._analysis_soon.setInterval(ANALYSIS_DELAY_MS)
        self._analysis_soon.timeout.connect(self.run_analysis)
        self._groups_soon = QTimer(self)
        self._groups_soon.setSingleShot(True)
        self._groups_soon.setInterval(GROUPS_DELAY_MS)
        self._groups_soon.timeout.connect(self.form_groups)

        self.message_bar = MessageBar(self)
        self.data_panel = DataPanel(self.session, self, ask_reason=ask_reason)
        self.setup_panel = SetupPanel(self.session, self)
        self.tabs = QTabWidget(self)
        self.tabs.setDocumentMode(True)
        self.choice_panel: Any = None
        self.findings_panel: Any = None
        self.plan_panel: Any = None
        for attribute, _module, _name, title, tip in LATE_PANELS:
            placeholder = QLabel("Loading…", self)
            placeholder.setAlignment(Qt.AlignmentFlag.AlignCenter)
            index = self.tabs.addTab(placeholder, title)
            self.tabs.setTabToolTip(index, tip)

        left = QSplitter(Qt.Orientation.Vertical, self)
        left.addWidget(self.data_panel)
        left.addWidget(self.setup_panel)
        left.setStretchFactor(0, 3)
        left.setStretchFactor(1, 0)
        left.setChildrenCollapsible(False)
        self.splitter = QSplitter(Qt.Orientation.Horizontal, self)
        self.splitter.addWidget(left)
        self.splitter.addWidget(self.tabs)
        self.splitter.setStretchFactor(0, 1)
        self.splitter.setStretchFactor(1, 1)
        centre = QWidget(self)
        column = QVBoxLayout(centre)
        column.setContentsMargins(6, 6, 6, 0)
        column.addWidget(self.message_bar)
        column.addWidget(self.splitter, 1)
        self.setCentralWidget(centre)

        self._build_status()
        self._build_actions()
        self._build_menus()
        self.setTabOrder(self.data_panel.grid, self.setup_panel.long_radio)
        self.setTabOrder(self.setup_panel.resamples, self.tabs)

        self.load_worker.finished.connect(self._on_loaded)
        self.load_worker.failed.connect(self._on_load_failed)
        self.groups_worker.finished.connect(self._on_groups)
        self.groups_worker.failed.connect(self._on_groups_failed)
        self.analysis_worker.finished.connect(self._on_analysis)
        self.analysis_worker.failed.connect(self._on_analysis_failed)
        self.analysis_worker.progress.connect(self._on_progress)
        self.load_worker.progress.connect(self._on_progress)  # a reopen runs the analysis too
        self.import_worker.finished.connect(lambda _: self._add_late_panels())
        self.import_worker.failed.connect(lambda *_: self._add_late_panels())
        for worker in (self.load_worker, self.groups_worker, self.analysis_worker):
            worker.busy_changed.connect(self._on_busy)
        self.session.subscribe(self._on_session)

    # -- building ------------------------------------------------------------------------------
    def fit_to_screen(self, share: float = SCREEN_SHARE) -> None:
        """Take ``share`` of the available screen each way, centred (1400 x 900 without a screen)."""
        screen = self.screen() or QGuiApplication.primaryScreen()
        if screen is None:
            self.resize(1400, 900)
            return
        room = screen.availableGeometry()
        width, height = round(room.width() * share), round(room.height() * share)
        self.setGeometry(room.x() + (room.width() - width) // 2, room.y() + (room.height() - height) // 2,
                         width, height)

    def balance_panes(self) -> None:
        """Give the data and set-up about half the width and the checks and findings the rest."""
        total = max(self.splitter.width(), self.width() - 12)
        left = round(total * LEFT_SHARE)
        self.splitter.setSizes([left, total - left])
        QTimer.singleShot(0, self.data_panel.share_width)

    def apply_icons(self) -> None:
        """Give the window and its actions their icons (drawn after the first paint: it takes a
        noticeable moment to render them)."""
        from .icons import icon

        for target, name in self._icons_wanted:
            try:
                picture = icon(name)
            except (OSError, KeyError):
                continue
            if target is self:
                self.setWindowIcon(picture)
                QGuiApplication.setWindowIcon(picture)
            else:
                target.setIcon(picture)
        self._icons_wanted = []

    def _build_status(self) -> None:
        bar = self.statusBar()
        self.busy_label = plain_label(parent=self)  # it names the file being opened
        self.progress = QProgressBar(self)
        self.progress.setMaximumWidth(260)
        self.progress.setRange(0, 1000)
        self.progress.setTextVisible(False)
        self.progress.setToolTip("How far the current work has got.")
        self.cancel_button = QToolButton(self)
        self.cancel_button.setText("Stop")
        self.cancel_button.setToolButtonStyle(Qt.ToolButtonStyle.ToolButtonTextBesideIcon)
        self._icons_wanted.append((self.cancel_button, "cancel"))
        self.cancel_button.setToolTip("Stop the work in progress (Esc); nothing already shown is lost.")
        self.cancel_button.clicked.connect(self.cancel)
        bar.addPermanentWidget(self.busy_label)
        bar.addPermanentWidget(self.progress)
        bar.addPermanentWidget(self.cancel_button)
        # always in place (so the window never re-lays itself out when work starts): idle, the
        # bar is hidden but keeps its room, and Stop is greyed out
        policy = self.progress.sizePolicy()
        policy.setRetainSizeWhenHidden(True)
        self.progress.setSizePolicy(policy)
        self.progress.setVisible(False)
        self.cancel_button.setEnabled(False)
        self.progress.setValue(0)

    def _action(self, text: str, tip: str, slot: Callable[[], Any], shortcut: Any = None,
                icon_name: str | None = None) -> QAction:
        action = QAction(text, self)
        action.setToolTip(tip)
        action.setStatusTip(tip)
        if shortcut is not None:
            action.setShortcut(QKeySequence(shortcut))
        if icon_name:
            self._icons_wanted.append((action, icon_name))
        action.triggered.connect(lambda checked=False: slot())
        self.addAction(action)
        return action

    def _build_actions(self) -> None:
        self.open_action = self._action("&Open…", "Open a data file (.csv, .tsv, .xlsx, .ods…) or a saved "
                                        "analysis (.twofold).",
                                        self.open_dialog, QKeySequence.StandardKey.Open, "open")
        self.copy_action = self._action("&Copy findings", "Copy the findings as text for a report.",
                                        self.copy_findings, "Ctrl+Shift+C", "copy")
        self.copy_plot_action = self._action("Copy the &plot",
                                             "Copy the plot of every procedure's interval, side by side, as a picture.",
                                             self.copy_plot, "Ctrl+Shift+P")
        self.save_analysis_action = self._action(
            "&Save the analysis…", "Keep this analysis as a .twofold file: what you decided, the seed and the "
            "numbers it gave, so that it can be opened again and checked.",
            self.save_analysis, QKeySequence.StandardKey.Save, "save")
        self.export_action = self._action("&Export report…", "Save the findings as a web page or a PDF file.",
                                          self.export_report, "Ctrl+E", "export")
        self.save_plot_action = self._action("Save the p&lot…",
                                             "Save the plot of every procedure's interval, side by side, "
                                             "as a picture file.", self.save_plot)
        self.redo_action = self._action("&Redo the comparison", "Run the comparison again with the current set-up.",
                                        self.run_analysis, "F5")
        self.keep_settings_action = self._action(
            "&Keep these settings for the next file",
            "When ticked, the next file opened is compared with the same question, confidence level "
            "and resampling as this one; when not, each new file starts from two-sided at 95 %.",
            self._keep_settings_toggled)
        self.keep_settings_action.setCheckable(True)
        self.keep_settings_action.setChecked(self.settings.value(KEEP_SETTINGS_KEY, False, type=bool))
        self.plan_action = self._action("&Plan the next study",
                                        "How many to measure next time, or what given sizes can find.",
                                        self.show_plan, "Ctrl+L")
        self.summary_action = self._action(
            "Compare from s&ummary statistics…", "Compare two groups known only by their counts, means "
            "and spreads (from a certificate, a paper or an older report).", self.open_summary_form)
        self.outcomes_action = self._action(
            "Compare several &measurement columns…", "Compare the same two groups on several columns of "
            "the file at once, with p-values adjusted for testing them all.", self.open_outcomes)
        self.cancel_action = self._action("&Stop", "Stop the work in progress.", self.cancel, "Esc")
        self.cancel_action.setEnabled(False)
        self.quit_action = self._action("&Quit", "Close Twofold.", self.close, QKeySequence.StandardKey.Quit)
        self.entry_action = self._action("Open data files with a double-click",
                                         "Register Twofold with your desktop for .csv, .tsv, .txt, .xlsx, .xls and .ods files.",
                                         self.install_desktop_entry)

    def _build_menus(self) -> None:
        menus = self.menuBar()
        file_menu = menus.addMenu("&File")
        file_menu.addAction(self.open_action)
        self.recent_menu = QMenu("Open &recent", self)
        self.recent_menu.setToolTipsVisible(True)
        self.recent_menu.aboutToShow.connect(self._fill_recent)
        file_menu.addMenu(self.recent_menu)
        file_menu.addSeparator()
        file_menu.addAction(self.save_analysis_action)
        file_menu.addAction(self.export_action)
        file_menu.addAction(self.save_plot_action)
        file_menu.addSeparator()
        file_menu.addAction(self.entry_action)
        file_menu.addSeparator()
        file_menu.addAction(self.quit_action)
        edit_menu = menus.addMenu("&Edit")
        edit_menu.addAction(self.copy_action)
        edit_menu.addAction(self.copy_plot_action)
        run_menu = menus.addMenu("&Comparison")
        run_menu.addAction(self.redo_action)
        run_menu.addAction(self.cancel_action)
        run_menu.addSeparator()
        run_menu.addAction(self.plan_action)
        run_menu.addSeparator()
        run_menu.addAction(self.keep_settings_action)
        run_menu.addSeparator()
        run_menu.addAction(self.summary_action)
        run_menu.addAction(self.outcomes_action)
        tools = self.addToolBar("Main")
        tools.setObjectName("main_tools")
        tools.setMovable(False)
        tools.setToolButtonStyle(Qt.ToolButtonStyle.ToolButtonTextBesideIcon)
        for action in (self.open_action, self.copy_action, self.export_action):
            tools.addAction(action)

    def _keep_settings_toggled(self) -> None:
        self.settings.setValue(KEEP_SETTINGS_KEY, self.keep_settings_action.isChecked())
        self.settings.sync()

    def _fill_recent(self) -> None:
        self.recent_menu.clear()
        paths = self.recent.paths()
        for path, label in zip(paths, menu_labels(paths)):
            action = self.recent_menu.addAction(label.replace("&", "&&"))  # "&" marks a shortcut key
            action.setToolTip(tooltip(str(path)))
            action.triggered.connect(lambda checked=False, p=path: self.open_recent(p))
        if not paths:
            self.recent_menu.addAction("(no files yet)").setEnabled(False)

    def open_summary_form(self, spec: AnalysisSpec | None = None) -> Any:
        """Open the form of two groups' summary statistics (the window's question carried over,
        or that of ``spec``, a saved analysis's)."""
        from .summary_form import SummaryForm

        form = SummaryForm(spec or self.session.spec, self)
        form.setAttribute(Qt.WidgetAttribute.WA_DeleteOnClose)
        form.show()
        return form

    def open_outcomes(self) -> Any:
        """Open the comparison of several measurement columns of the file on show."""
        if self.session.table is None:
            self.message_bar.show_message("outcomes_need_file")
            return None
        from .outcomes_panel import OutcomesPanel

        panel = OutcomesPanel(self.session, self)
        panel.setAttribute(Qt.WidgetAttribute.WA_DeleteOnClose)
        panel.show()
        return panel

    # -- the panels that load late -------------------------------------------------------------
    def showEvent(self, event: Any) -> None:  # noqa: N802 - Qt's name
        super().showEvent(event)
        if not self._balanced:  # once: later the user's own division of the window stands
            self._balanced = True
            self.balance_panes()
        if not self.load_worker.busy:
            self._load_late_soon()

    def _load_late_soon(self) -> None:
        """Load the late panels once the window (and the grid, if a file is on its way) is painted."""
        if not self._late_started:
            self._late_started = True
            QTimer.singleShot(LATE_DELAY_MS, self.load_late_panels)

    def load_late_panels(self) -> None:
        """Import the statistics of the two late panels in a worker, then the panels themselves
        (on the GUI thread) and put them in their tabs."""
        self.apply_icons()
        if self.choice_panel is not None or self.import_worker.busy:
            return

        def warm_up(progress: Any, cancelled: Any) -> None:
            for module in WARM_IN_WORKER:
                importlib.import_module(module)

        self.import_worker.run(warm_up)

    def _add_late_panels(self) -> None:
        if all(getattr(self, attribute) is not None for attribute, *_ in LATE_PANELS):
            return  # already in (asked for early by copy or export)
        for index, (attribute, module, name, title, tip) in enumerate(LATE_PANELS):
            if getattr(self, attribute) is not None:
                continue
            panel = getattr(importlib.import_module(module), name)(self.session, self)
            setattr(self, attribute, panel)
            old = self.tabs.widget(index)
            self.tabs.removeTab(index)
            old.deleteLater()
            self.tabs.insertTab(index, panel, title)
            self.tabs.setTabToolTip(index, tip)
            if attribute == "findings_panel":
                panel.margin_question_wanted.connect(self.ask_margin_question)
        self.tabs.setCurrentIndex(1 if self.session.analysis is not None else 0)

    def ask_margin_question(self) -> None:
        """Take up the findings' offer: the question of sameness in the set-up, with the cursor in
        the margin's field."""
        self.setup_panel.margin_entry.focus_entry("equivalent")
        self.setup_panel.refresh()

    # -- planning the next study ---------------------------------------------------------------
    def show_plan(self, *, from_data: bool | None = None) -> None:
        """Show the plan of the next study; ``from_data`` True fills it in to resample the
        comparison's groups ("plan a follow-up from these data")."""
        self._add_late_panels()
        if from_data is not None and self.session.analysis is not None:
            self.plan_panel.fill_from_analysis(from_data=from_data)
        self.tabs.setCurrentWidget(self.plan_panel)

    def plan_follow_up(self) -> None:
        """Plan a follow-up study from the groups of the comparison on show."""
        self.show_plan(from_data=True)

    def plan_from_summaries(self, analysis: Any) -> None:
        """Plan the next study from a comparison of summary statistics (a ``SummaryAnalysis``):
        the Next study tab, filled in from its SDs, sizes, difference and question, comes to the front."""
        self._add_late_panels()
        self.plan_panel.fill_from_summaries(analysis)
        self.tabs.setCurrentWidget(self.plan_panel)
        self.raise_()
        self.activateWindow()

    # -- opening -------------------------------------------------------------------------------
    def open_dialog(self) -> None:
        start = str(self.session.path.parent) if self.session.path else ""
        path, _ = QFileDialog.getOpenFileName(self, "Open a data file or a saved analysis", start, OPEN_FILTER)
        if path:
            self.open_file(path)

    def open_recent(self, path: Path) -> None:
        if not Path(path).is_file():
            self.recent.remove(path)
            self.message_bar.show_message("recent_gone", name=Path(path).name)
            return
        self.open_file(path)

    def open_file(self, path: str | Path, *, sheet: str | None = None) -> bool:
        """Read ``path`` in a worker and show it; every way of opening a file ends here.

        Returns False (with a message) when ``path`` is not a file, else True: the reading has
        started and its outcome arrives as a table in the session or a message in the bar.
        """
        from engine.errors import FileProblem
        from engine.io import check_regular

        path = Path(path).expanduser()
        try:
            check_regular(path)  # the check the command makes too: no folder, pipe or device
        except FileProblem:
            self.message_bar.show_message("not_a_file", name=path.name or str(path))
            return False
        if path.suffix.lower() == SAVED_SUFFIX:
            return self.reopen(path)
        self.groups_worker.cancel()
        self.analysis_worker.cancel()
        self._analysis_soon.stop()
        self._groups_soon.stop()
        self._opening = path.name
        self._reopening = False
        self.busy_label.setText(f"Opening {visible(path.name)}…")
        ask = sheet is None

        def read(progress: Any, cancelled: Any) -> tuple:
            from engine import pipeline
            from engine.errors import ColumnProblem
            from engine.spec import Source

            if ask:
                names, first = _workbook_sheets(path)
                if len(names) > 1:
                    return ("sheets", path, names, first)
            spec = AnalysisSpec(source=Source(str(path), sheet))
            table = pipeline.read(spec)  # first: it refuses what is not a regular, readable data file
            spec = spec.replace(source=pipeline.source_for(path, sheet))
            try:
                spec = pipeline.complete(table, spec)
            except ColumnProblem:  # no proposal for the columns: the user chooses them
                spec = spec.replace(source=Source(str(path), table.sheet, spec.source.sha256))
            return ("table", path, table, spec)

        self.load_worker.run(read)
        return True

    def reopen(self, path: str | Path, *, source_path: str | Path | None = None, saved: Any = None) -> bool:
        """Reopen the saved analysis ``path`` in a worker: read it, read its data file again (or
        ``source_path``, where the user found a moved one), check the checksum and run the recorded
        spec. The outcome arrives in the message bar; what is on show changes only if it ran."""
        path = Path(path).expanduser()
        self._opening = path.name
        self._reopening = True
        self.busy_label.setText(f"Reopening {visible(path.name)}…")

        def reopen(progress: Any, cancelled: Any) -> tuple:
            from engine import saved as saved_files

            found = saved if saved is not None else saved_files.load(path)
            if found.summary_statistics is not None:  # no data file: run again from its numbers
                return ("summary_reopened", path, found, *saved_files.rerun_summaries(found))
            # several outcomes are run again all together, as one
            return ("reopened", path, saved_files.reopen(found, source_path=source_path, progress=progress,
                                                         cancelled=cancelled))

        self.load_worker.run(reopen)
        return True

    def _on_reopened(self, path: Path, reopened: Any) -> Any:
        """Show a saved analysis run again (one outcome in the window's panels; several in the
        panel of several measurements, over the file's table) and say what the check found.
        Returns the panel of several measurements when one opened."""
        name = path.name
        source = Path(reopened.saved.spec.source.path).name
        if reopened.found_elsewhere:
            source += f" (found at {reopened.source_used})"
        if reopened.prepared is None:  # the data file is not where it was: nothing ran, nothing changes
            self.message_bar.show_message(
                "reopen_source_missing", name=name, source=source,
                action=("Find the data file…", lambda: self.locate_source(path, reopened.saved)))
            return None
        several = reopened.saved.outcomes is not None
        prepared = reopened.prepared
        if several:  # the window shows the first outcome compared; the panel shows them all
            prepared = next((d.prepared for d in prepared.outcomes if d.prepared is not None), None)
            if prepared is None:
                problem = next((d.problem for d in reopened.prepared.outcomes if d.problem), "")
                self.message_bar.show_message("reopen_refused", name=name,
                                              reason=f"no measurement could be compared again. {problem}")
                return None
        self._show_prepared(prepared)
        self.setWindowTitle(f"{visible(name)} - Twofold")
        self.recent.add(path)
        self._load_late_soon()
        if reopened.saved.plan is not None:
            self._add_late_panels()
            self.plan_panel.restore_saved(reopened.saved.plan)
        key, values = reopen_message(reopened.status, reopened.differences, reopened.message, several=several)
        values.update(name=name, source=source)
        self.message_bar.show_message(key, **values)
        if not several:
            return None
        panel = self.open_outcomes()
        panel.show_saved(reopened.prepared, said=message_text(key, **values), reopened=reopened)
        return panel

    def _show_prepared(self, prepared: Any) -> None:
        """Put a reopened analysis (an ``engine.pipeline.Prepared``) on show as it is, running
        nothing again."""
        self.groups_worker.cancel()
        self.analysis_worker.cancel()
        self._analysis_soon.stop()
        self._groups_soon.stop()
        self._quiet = True
        try:
            for output in ("analysis", "intake", "problem"):
                self.session.store(output, None)
            self.session.adopt(prepared.spec)
            self.session.store("table", prepared.table)
            self.session.store("intake", prepared.intake)
            self.session.store("analysis", prepared.analysis)
        finally:
            self._quiet = False
            self._seen = self.session.spec

    def _on_summary_reopened(self, path: Path, saved: Any, analysis: Any, status: str,
                             differences: tuple) -> Any:
        """A saved analysis from summary statistics, run again: the summary form opens filled in
        with its numbers and results; the message bar says whether they are the saved ones."""
        form = self.open_summary_form(saved.spec)
        form.show_saved(saved.summary_statistics, analysis)
        self.recent.add(path)
        name = path.name
        if status == "same":
            self.message_bar.show_message("reopen_summary_same", name=name)
        elif status == "close":
            self.message_bar.show_message("reopen_summary_close", name=name)
        else:
            self.message_bar.show_message("reopen_summary_differ", name=name,
                                          differences=differences_words(differences))
        return form

    def locate_source(self, path: Path, saved: Any) -> None:
        """Ask where the data file of the saved analysis ``path`` went, then reopen it from there."""
        start = str(path.parent)
        found, _ = QFileDialog.getOpenFileName(self, "Find the data file of the saved analysis", start, DATA_FILTER)
        if found:
            self.reopen(path, source_path=found, saved=saved)

    def save_analysis(self, path: str | Path | None = None) -> bool:
        """Save the analysis on show as a ``.twofold`` file (asks for the path when none is given)."""
        analysis = self.session.analysis
        if analysis is None:
            self.message_bar.show_message("nothing_yet")
            return False
        from dataclasses import replace

        # the pick only changes what is shown, so the analysis carries the pick of its own run
        analysis = replace(analysis, spec=analysis.spec.replace(procedure=self.session.spec.procedure))

        plan = self.plan_panel.result if self.plan_panel is not None else None

        def write(target: Path) -> None:
            from engine import saved as saved_files

            _refuse_replacing_outcomes(target)
            saved_files.save(target, analysis, plan=plan)

        return self._save(path, "Save the analysis", ANALYSIS_FILTER, SAVED_SUFFIX, write, own_suffix=True)

    def wait_for_file(self, msecs: int) -> bool:
        """Block up to ``msecs`` for the file being read, then take its table at once.

        Used before the window is first shown, so that a small file is painted with the window
        itself; a large one goes on reading in the background. True if the reading ended.
        """
        if not self.load_worker.busy:
            return True
        ended = self.load_worker.wait(msecs)
        if ended:
            QCoreApplication.sendPostedEvents()  # delivers the worker's queued result
        return ended

    def _choose_sheet(self, names: Sequence[str], current: str | None) -> str | None:
        at = list(names).index(current) if current in names else 0
        name, ok = QInputDialog.getItem(self, "Choose a sheet",
                                        "This workbook has several sheets. Which one holds your data?",
                                        list(names), at, False)
        return name if ok else None

    def _on_loaded(self, result: tuple) -> None:
        if result[0] == "sheets":
            if not self.isVisible():  # at start-up: ask once the window is on the screen
                QTimer.singleShot(0, lambda: self._on_loaded(result))
                return
            _, path, names, first = result
            wanted = self._ask_sheet(list(names), first if first in names else names[0])
            if wanted:
                self.open_file(path, sheet=wanted)
            return
        if result[0] == "reopened":
            self._on_reopened(result[1], result[2])
            return
        if result[0] == "summary_reopened":
            self._on_summary_reopened(*result[1:])
            return
        _, path, table, spec = result
        self.message_bar.clear()
        before = self.session.spec
        keep = self.keep_settings_action.isChecked()
        if keep:
            spec = spec.replace(**{name: getattr(before, name) for name in CARRIED_FIELDS})
        self._quiet = True
        try:
            for name in ("analysis", "intake", "problem"):
                self.session.store(name, None)
            self.session.adopt(spec.with_seed())  # a new analysis draws its seed
            self.session.store("table", table)
        finally:
            self._quiet = False
            self._seen = self.session.spec
        self._say_which_settings(before, path.name, keep)
        for panel in (self.choice_panel, self.findings_panel):
            scroll = getattr(panel, "scroll", None)
            if scroll is not None:  # a new file is read from the top
                scroll.verticalScrollBar().setValue(0)
        self.setWindowTitle(f"{visible(path.name)} - Twofold")
        self.recent.add(path)
        # paint the grid first; the groups, the analysis and the late panels follow at once
        self._groups_soon.start()
        self._load_late_soon()

    def _say_which_settings(self, before: AnalysisSpec, name: str, kept: bool) -> None:
        """Say in the message bar which settings the new file is compared with, when the last
        file's differed from the usual ones (otherwise there is nothing to choose between)."""
        usual = AnalysisSpec()
        if before.source is None or not _changed(before, usual, CARRIED_FIELDS):
            return
        if kept:
            self.message_bar.show_message("settings_kept", name=name, settings=settings_words(self.session.spec))
        else:
            self.message_bar.show_message("settings_fresh", name=name, settings=settings_words(usual),
                                          before=settings_words(before))

    def _on_load_failed(self, message: str, expected: bool) -> None:
        self._load_late_soon()
        if self._reopening:
            named = visible(self._opening) in message  # the engine's sentence names the file: say it once
            self.message_bar.show_message("reopen_refused" if expected else "reopen_crashed",
                                          name="the file" if named else self._opening, reason=message)
        elif expected:  # the engine's sentence names the file as a rule: say it once
            self.message_bar.show_message("open_failed", reason=message,
                                          name="the file" if visible(self._opening) in message else self._opening)
        else:
            self.message_bar.show_message("open_crashed", name=self._opening, reason=message)

    # -- forming the groups --------------------------------------------------------------------
    def _on_session(self, name: str, value: Any) -> None:
        if name == "problem":
            self._show_problem(value)
        if name in ("spec", "analysis", "table") and self.message_bar.key == "copied":
            self.message_bar.clear()  # what was copied no longer matches what is shown
        if name != "spec" or self._quiet:
            return
        old, self._seen = self._seen, value
        if _changed(old, value, GROUP_FIELDS):
            self.form_groups()
        elif _changed(old, value, ANALYSIS_FIELDS):
            self._analysis_soon.start()

    def _show_problem(self, problem: str | None) -> None:
        """Put the session's problem in the message bar, or take it away once it is solved."""
        bar = self.message_bar
        if problem is None:
            if bar.key in PROBLEM_KEYS:
                bar.clear()
        elif not (bar.key in PROBLEM_KEYS and problem in bar.text):
            bar.show_message("groups_problem", reason=problem)

    def _missing_columns(self) -> str | None:
        """What the spec still lacks before the groups can be formed, in a sentence; None if nothing."""
        spec = self.session.spec
        columns = spec.value_columns
        if spec.layout == "wide":
            if len(columns) != 2 or columns[0] == columns[1]:
                return "Choose two different columns, one for each group."
            return None
        if not columns:
            return "Choose the column of measurements."
        if not spec.group_column:
            return "Choose the column that names the groups."
        if spec.group_column == columns[0]:
            return "The groups and the measurements must be in different columns."
        if spec.design == "paired" and not spec.pair_column:
            return "Choose the column that names each unit, so that its two rows can be paired."
        return None

    def form_groups(self) -> None:
        """Form the two groups the session's spec describes, in a worker."""
        table = self.session.table
        if table is None:
            return
        self.analysis_worker.cancel()
        self._analysis_soon.stop()
        self._groups_soon.stop()
        missing = self._missing_columns()
        if missing is not None:
            self.groups_worker.cancel()
            self._no_groups(missing)
            return
        spec = self.session.spec
        self.busy_label.setText("Forming the groups…")

        def form(progress: Any, cancelled: Any) -> Any:
            from engine import pipeline

            return pipeline.form_groups(table, spec)

        self.groups_worker.run(form)

    def _no_groups(self, message: str) -> None:
        self.session.store("intake", None)
        self.session.store("analysis", None)
        self.session.store("problem", message)

    def _on_groups(self, intake: Any) -> None:
        if self.message_bar.key == "analysis_stopped":
            self.message_bar.clear()
        spec = self.session.spec
        if spec.layout == "long" and spec.groups is None:  # the spec records the two groups formed
            self._quietly(groups=tuple(intake.groups.labels))
        self.session.store("problem", None)
        self.session.store("intake", intake)
        self._analysis_soon.start()

    def _on_groups_failed(self, message: str, expected: bool) -> None:
        self._no_groups(message)
        self.message_bar.show_message("groups_problem" if expected else "groups_crashed", reason=message)

    # -- the analysis --------------------------------------------------------------------------
    def run_analysis(self) -> None:
        """Run (or run again) the analysis of the current groups with the current options."""
        self._analysis_soon.stop()
        intake = self.session.intake
        if intake is None:
            return
        if self.session.spec.seed is None:
            self._quietly(seed=self.session.spec.with_seed().seed)
        spec = self.session.spec
        self.busy_label.setText("Comparing…")
        self.progress.setValue(0)

        def compare(progress: Any, cancelled: Any) -> Any:
            from engine import pipeline

            return pipeline.run(intake, spec, progress=progress, cancelled=cancelled)

        self.analysis_worker.run(compare)

    def _quietly(self, **changes: Any) -> None:
        """Complete the spec with what the engine found, without forming or running anything again."""
        self._quiet = True
        try:
            self.session.choose(**changes)
        finally:
            self._quiet = False
            self._seen = self.session.spec

    def _on_analysis(self, analysis: Any) -> None:
        if self.message_bar.key == "analysis_stopped":
            self.message_bar.clear()
        self.session.store("problem", None)
        self.session.store("analysis", analysis)

    def _on_analysis_failed(self, message: str, expected: bool) -> None:
        self.session.store("analysis", None)
        self.session.store("problem", message)
        self.message_bar.show_message("analysis_failed" if expected else "analysis_crashed", reason=message)

    def _on_progress(self, fraction: float, what: str) -> None:
        self.progress.setRange(0, 1000)
        self.progress.setValue(int(fraction * 1000))
        self.busy_label.setText(f"Comparing: {what}…")

    def cancel(self) -> None:
        """Stop whatever is running; the window keeps what it showed before."""
        self._analysis_soon.stop()
        self._groups_soon.stop()
        running = [w for w in (self.load_worker, self.groups_worker, self.analysis_worker) if w.busy]
        for worker in running:
            worker.cancel()
        if self.analysis_worker in running or self.groups_worker in running:
            self.message_bar.show_message("analysis_stopped")

    @property
    def busy(self) -> bool:
        """True while a file is read, groups are formed or an analysis runs or is about to."""
        return self._analysis_soon.isActive() or self._groups_soon.isActive() or any(
            w.busy for w in (self.load_worker, self.groups_worker, self.analysis_worker))

    def _on_busy(self, _: bool) -> None:
        busy = self.busy
        self.cancel_button.setEnabled(busy)
        self.progress.setVisible(busy)
        if not busy:
            self.busy_label.setText("")
            self.progress.setRange(0, 1000)
            self.progress.setValue(0)
        elif not self.analysis_worker.busy:
            self.progress.setRange(0, 0)  # no measure of progress while reading: a moving bar
        self.cancel_action.setEnabled(busy)
        self.redo_action.setEnabled(not busy)
        self.open_action.setEnabled(True)

    # -- copy and export -----------------------------------------------------------------------
    def _findings(self) -> Any:
        if self.session.analysis is None:
            self.message_bar.show_message("nothing_yet")
            return None
        if self.findings_panel is None:  # asked for before the late panels came in: bring them now
            self._add_late_panels()
        return self.findings_panel

    def copy_findings(self) -> None:
        panel = self._findings()
        if panel is not None:
            panel.copy_findings()
            self.message_bar.show_message("copied", what="the findings")

    def copy_plot(self) -> None:
        panel = self._findings()
        if panel is not None:
            panel.copy_plot()
            self.message_bar.show_message("copied", what="the plot of the intervals")

    def _save(self, path: str | Path | None, title: str, name_filter: str, suffix: str,
              write: Callable[[Path], Any], *, own_suffix: bool = False) -> bool:
        if path is None:
            from .export import save_start

            start = save_start(self.settings, self.session.path, suffix)
            chosen, _ = QFileDialog.getSaveFileName(self, title, str(start), name_filter)
            if not chosen:
                return False
            path = chosen
        path = Path(path)
        if own_suffix and path.suffix.lower() != suffix:  # a file of this kind is known by its suffix
            path = path.with_name(path.name + suffix)
        data_file = self.session.path
        if data_file is not None and path.resolve() == data_file.resolve():
            self.message_bar.show_message("save_failed", name=path.name, reason="that is your data file")
            return False
        try:
            write(path)
        except Exception as problem:  # noqa: BLE001 - a failed save must never end the program
            self.message_bar.show_message("save_failed", name=path.name, reason=str(problem))
            return False
        from .export import remember_save_folder

        remember_save_folder(self.settings, path)
        folder = path.resolve().parent
        self.message_bar.show_message("saved", name=path.name, folder=str(folder),
                                      action=("Open the folder", lambda: _open_folder(folder)))
        return True

    def export_report(self, path: str | Path | None = None) -> bool:
        """Save the report (.html or .pdf by the suffix); asks for the path when none is given."""
        panel = self._findings()
        return panel is not None and self._save(path, "Export the report", SAVE_FILTER, ".html",
                                                panel.export_report)

    def save_plot(self, path: str | Path | None = None) -> bool:
        panel = self._findings()
        return panel is not None and self._save(path, "Save the plot", PLOT_FILTER, ".png", panel.save_plot)

    def install_desktop_entry(self) -> None:
        from .desktop_entry import install

        try:
            where = install()
        except OSError as problem:
            self.message_bar.show_message("save_failed", name="the desktop registration", reason=str(problem))
        else:
            self.message_bar.show_message("registered", where=where)

    # -- drag and drop -------------------------------------------------------------------------
    def dragEnterEvent(self, event: QDragEnterEvent) -> None:  # noqa: N802 - Qt's name
        if any(url.isLocalFile() for url in event.mimeData().urls()):
            event.acceptProposedAction()

    def dropEvent(self, event: QDropEvent) -> None:  # noqa: N802 - Qt's name
        files = [url.toLocalFile() for url in event.mimeData().urls() if url.isLocalFile()]
        if files:
            event.acceptProposedAction()
            self.open_file(files[0])

    # -- closing -------------------------------------------------------------------------------
    def cleanup(self) -> None:
        """Stop the workers and let every panel stop listening."""
        if self._closed:
            return
        self._closed = True
        self.session.unsubscribe(self._on_session)
        for worker in (self.load_worker, self.groups_worker, self.analysis_worker, self.import_worker):
            worker.shutdown()
        for panel in (self.data_panel, self.setup_panel, self.choice_panel, self.findings_panel, self.plan_panel):
            if panel is not None and hasattr(panel, "cleanup"):
                panel.cleanup()

    def closeEvent(self, event: QCloseEvent) -> None:  # noqa: N802 - Qt's name
        self.cleanup()
        super().closeEvent(event)
