"""Every message the window shows a user, declared in one place, and the bar that shows them.

A message is a named entry with a level and a sentence that may hold ``{placeholders}``. Code
elsewhere refers to messages by key (``bar.show_message("open_failed", name=..., reason=...)``),
so the wording lives here alone and tests can check which message appeared.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Mapping

from PySide6.QtCore import Qt, Signal
from PySide6.QtGui import QColor, QPalette
from PySide6.QtWidgets import QFrame, QHBoxLayout, QLabel, QPushButton, QStyle, QToolButton, QWidget

from engine.text import visible

from .plain_text import plain_label
from .table_model import blend

__all__ = ["Message", "MESSAGES", "message_text", "MessageBar"]


@dataclass(frozen=True)
class Message:
    """One message: a stable ``key``, a ``level`` ("info", "warning", "error") and its sentence."""

    key: str
    level: str
    text: str


_DECLARED = (
    # opening files
    Message("open_failed", "error", "Could not open {name}: {reason}"),
    Message("open_crashed", "error",
            "Something unexpected stopped the opening of {name} ({reason}). Your file was not changed."),
    Message("not_a_file", "warning", "{name} is not a file that can be opened."),
    Message("recent_gone", "warning", "{name} is no longer there, so it was taken off the recent list."),
    # the settings a new file starts with
    Message("settings_fresh", "info",
            "{name} is compared with the usual settings ({settings}); the last file's were {before}. "
            "To carry settings over to the next file, tick Comparison > Keep these settings for the next file."),
    Message("settings_kept", "info",
            "{name} is compared with the settings kept from the last file ({settings}); "
            "Comparison > Keep these settings for the next file turns this off."),
    # forming the two groups
    Message("groups_problem", "warning", "{reason}"),
    Message("groups_crashed", "error", "Something unexpected stopped the forming of the groups ({reason})."),
    # the comparison
    Message("analysis_failed", "warning", "The comparison could not be made: {reason}"),
    Message("analysis_crashed", "error",
            "Something unexpected stopped the comparison ({reason}). Change a setting or press Redo."),
    Message("analysis_stopped", "info", "The comparison was stopped. Press Redo to run it again."),
    # reopening a saved analysis: what the check found, said plainly (never taken silently)
    Message("reopen_same", "info",
            "{name} reopened: its data file {source} has the checksum it was saved with, and every number "
            "came out exactly as saved."),
    Message("reopen_close", "info",
            "{name} reopened: its data file {source} has the checksum it was saved with, and every number "
            "agrees with the saved one to 12 significant digits (the last digits can differ a little on "
            "another computer)."),
    Message("reopen_summary_same", "info",
            "{name} reopened: run again from its summary statistics, every number came out exactly as saved."),
    Message("reopen_summary_close", "info",
            "{name} reopened: run again from its summary statistics, every number came out as saved to within "
            "rounding in the last digits."),
    Message("reopen_summary_differ", "warning",
            "{name} reopened, but run again from its summary statistics some numbers came out differently "
            "from the saved ones: {differences}. The results shown are the new ones; the saved file was "
            "not changed."),
    Message("reopen_outcomes_same", "info",
            "{name} reopened: its data file {source} has the checksum it was saved with, and every number of "
            "every measurement came out exactly as saved."),
    Message("reopen_outcomes_close", "info",
            "{name} reopened: its data file {source} has the checksum it was saved with, and every number of "
            "every measurement agrees with the saved one to 12 significant digits (the last digits can differ "
            "a little on another computer)."),
    Message("reopen_outcomes_differ", "warning",
            "{name} reopened from the unchanged data file {source}, but some numbers came out differently "
            "from the saved ones: {differences}. The table shown holds the new ones; the saved file was "
            "not changed."),
    Message("reopen_outcomes_changed", "warning",
            "{name} reopened, but its data file {source} has changed since the analysis was saved (its "
            "checksum differs). The table shown comes from the file as it is now; numbers that differ "
            "from the saved ones: {differences}."),
    Message("reopen_outcomes_changed_alike", "warning",
            "{name} reopened, but its data file {source} has changed since the analysis was saved (its "
            "checksum differs). The table shown comes from the file as it is now, although its numbers "
            "came out as saved."),
    Message("reopen_numbers_differ", "warning",
            "{name} reopened from the unchanged data file {source}, but some numbers came out differently "
            "from the saved ones: {differences}. The findings shown are the new ones; the saved file was "
            "not changed."),
    Message("reopen_source_changed", "warning",
            "{name} reopened, but its data file {source} has changed since the analysis was saved (its "
            "checksum differs). The findings shown come from the file as it is now; numbers that differ "
            "from the saved ones: {differences}."),
    Message("reopen_source_changed_alike", "warning",
            "{name} reopened, but its data file {source} has changed since the analysis was saved (its "
            "checksum differs). The findings shown come from the file as it is now, although its numbers "
            "came out as saved."),
    Message("reopen_source_missing", "warning",
            "{name} was saved from the data file {source}, which is not there any more. Find the file to "
            "check the saved numbers; what is on show stays as it was."),
    Message("reopen_refused", "error", "Could not reopen {name}: {reason} What is on show stays as it was."),
    Message("reopen_crashed", "error",
            "Something unexpected stopped the reopening of {name} ({reason}). What is on show stays as it was."),
    # the margin of an equivalence or non-inferiority question, said under its fields
    Message("margin_missing", "warning", "Type the {what} of the margin."),
    Message("margin_not_number", "warning", "\u201c{text}\u201d is not a number; type one such as 0.5."),
    Message("margin_ratio_below_zero", "warning", "A ratio margin must be above 0, not {value}."),
    Message("margin_no_room", "warning", "A margin of {value} leaves no room either side of no difference."),
    Message("margin_refused", "warning", "{reason} Still in force: {question}"),
    Message("margin_wanted", "info", "Type a margin to ask this. Still in force: {question}"),
    # the groups swapped under a percentage margin (always of group 2's mean)
    Message("swap_percent_margin", "info",
            "Same margin after the swap, now in units. It was {before}; {second}'s mean is {mean}."),
    Message("swap_percent_why", "info",
            "A percentage margin is always of group 2's mean. After the swap that is {first}'s mean, "
            "which would make another margin, so the margin is kept as the amounts it stood for: {after}."),
    Message("swap_percent_unknown", "warning",
            "Swapped: the margin is a percentage of group 2's mean, which is now {after}'s instead "
            "of {before}'s, so in the measurement's units it is not the same margin as before."),
    # planning the next study (said in one line under the plan's inputs)
    Message("plan_input", "warning", "{reason}"),
    Message("plan_crashed", "error", "Something unexpected stopped the working out of the plan ({reason})."),
    Message("plan_stopped", "info", "Stopped. Change an input or press Work it out to start again."),
    Message("plan_no_pilot", "warning",
            "There are no groups to resample yet: open a file and compare two groups, or give the SDs."),
    Message("plan_saved_differs", "warning",
            "Worked out again, the saved plan gives other figures: saved {saved}; now {now}."),
    Message("plan_from_summaries", "info",
            "Filled in from the summary statistics of {first} (group 1) and {second} (group 2): their SDs, "
            "sizes and difference of means. There are no values behind them, so they cannot be resampled; "
            "the power is worked out from the SDs."),
    Message("plan_summaries_no_pilot", "warning",
            "The inputs come from summary statistics, which hold no values to resample; give the SDs."),
    # copy and export
    Message("nothing_yet", "info", "There is nothing to copy or save yet: open a file and set up the comparison."),
    Message("copied", "info", "Copied {what} to the clipboard."),
    Message("saved", "info", "Saved {name} in {folder}."),
    Message("save_failed", "error", "Could not save {name}: {reason}"),
    Message("registered", "info",
            "Twofold now appears under Open With for data files ({where}). To make it the default for a "
            "type, right-click such a file, choose Open With, pick Twofold and choose to use it always."),
    Message("offer_registration", "info",
            "Twofold can open your data files (.csv, .tsv, .txt, .xlsx, .xls, .ods) and saved analyses "
            "(.twofold) when you double-click them. This is asked only once: File > Open data files with "
            "a double-click does the same later."),
    Message("unregistered", "info",
            "Twofold no longer opens files with a double-click and is gone from Open With ({where})."),
    Message("not_registered", "info",
            "Twofold was not set up to open files with a double-click: there was nothing to take away."),
    Message("outcomes_need_file", "info",
            "Open a data file first: the measurements compared are columns of the file."),
    Message("window_crashed", "error",
            "Something unexpected went wrong ({reason}). The window carries on; your file was not changed."),
)

MESSAGES: Mapping[str, Message] = {message.key: message for message in _DECLARED}


def message_text(key: str, **values: object) -> str:
    """The sentence of message ``key`` with its placeholders filled in.

    The values (a file's name, an error that quotes a label) are shown as text: their control
    and direction characters are written as escapes, and the bar never reads them as markup.
    """
    return MESSAGES[key].text.format(**{name: visible(value) for name, value in values.items()})


_TINTS = {"info": QPalette.ColorRole.Highlight, "warning": None, "error": None}
_HUES = {"warning": QColor(214, 150, 20), "error": QColor(205, 55, 45)}
_ICONS = {
    "info": QStyle.StandardPixmap.SP_MessageBoxInformation,
    "warning": QStyle.StandardPixmap.SP_MessageBoxWarning,
    "error": QStyle.StandardPixmap.SP_MessageBoxCritical,
}


class MessageBar(QFrame):
    """A strip above the panels that shows one message at a time, with a button to close it.

    Its background is the window's own base colour tinted towards the message's level, so it
    reads in light and dark themes alike.
    """

    closed = Signal()

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setFrameShape(QFrame.Shape.StyledPanel)
        self.setAutoFillBackground(True)
        self._key: str | None = None
        self._icon = QLabel(self)
        self._text = plain_label(parent=self)
        self._text.setWordWrap(True)
        self._text.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self._action = QPushButton(self)  # a step the message offers, such as opening a folder
        self._action.hide()
        self._action.clicked.connect(lambda: self._act and self._act())
        self._act: Callable[[], object] | None = None
        self._close = QToolButton(self)
        self._close.setAutoRaise(True)
        self._close.setIcon(self.style().standardIcon(QStyle.StandardPixmap.SP_TitleBarCloseButton))
        self._close.setToolTip("Hide this message.")
        self._close.clicked.connect(self.clear)
        row = QHBoxLayout(self)
        row.setContentsMargins(8, 4, 4, 4)
        row.addWidget(self._icon)
        row.addWidget(self._text, 1)
        row.addWidget(self._action)
        row.addWidget(self._close)
        self.hide()

    @property
    def key(self) -> str | None:
        """The key of the message on show, or None."""
        return self._key

    @property
    def text(self) -> str:
        return self._text.text() if self._key else ""

    @property
    def action_text(self) -> str:
        """The text of the button the message offers, or "" when it offers none."""
        return self._action.text() if self._act is not None else ""

    def show_message(self, key: str, *, action: tuple[str, Callable[[], object]] | None = None,
                     **values: object) -> None:
        """Show message ``key`` with ``values`` in its placeholders; ``action`` is an optional
        (button text, callback) pair for a step the message offers."""
        message = MESSAGES[key]
        self._key = key
        self._act = action[1] if action else None
        self._action.setText(action[0] if action else "")
        self._action.setVisible(action is not None)
        self._text.setText(message_text(key, **values))
        size = self.style().pixelMetric(QStyle.PixelMetric.PM_SmallIconSize)
        self._icon.setPixmap(self.style().standardIcon(_ICONS[message.level]).pixmap(size, size))
        self._paint(message.level)
        self.setAccessibleDescription(self._text.text())
        self.show()

    def clear(self) -> None:
        was_showing = self._key is not None
        self._key = None
        self._act = None
        self._action.hide()
        self._text.clear()
        self.hide()
        if was_showing:
            self.closed.emit()

    def _paint(self, level: str) -> None:
        palette = self.palette()
        base = self.window().palette().color(QPalette.ColorRole.Base) if self.window() else \
            palette.color(QPalette.ColorRole.Base)
        role = _TINTS[level]
        tint = palette.color(role) if role is not None else _HUES[level]
        palette.setColor(QPalette.ColorRole.Window, blend(base, tint, 0.22))
        self.setPalette(palette)
