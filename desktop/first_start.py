"""What the bundled program does as it starts (``packaging/``): it offers, once, to register
Twofold with the desktop, adds the menu item that takes the registration away again (so no
terminal is needed either way), and on macOS it hands the files Finder opens to the window.

A source install registers with ``twofold --install-desktop-entry`` instead (see the README).
"""

from __future__ import annotations

import sys
from typing import Any

from PySide6.QtCore import QEvent, QObject

__all__ = ["OFFERED_KEY", "offer_registration", "add_unregister_action", "unregister", "FileOpenEvents",
           "bundle_started"]

# set once the offer was shown: it is not shown again, whatever the answer
OFFERED_KEY = "desktop/registration_offered"


def offer_registration(window: Any, *, platform: str | None = None) -> bool:
    """Offer the desktop registration in the message bar the first time; True if it was shown.

    A registration that is already in place but names another folder (the bundle was moved or
    unpacked anew) is brought up to date without asking.
    """
    from .desktop_entry import refresh_moved_linux_entry

    platform = sys.platform if platform is None else platform
    if platform.startswith("linux"):
        try:
            refresh_moved_linux_entry()
        except OSError:
            pass  # the menu item says what is wrong when the user asks for it
    if platform == "darwin" or window.settings.value(OFFERED_KEY, False, type=bool):
        return False  # a macOS application's document types are in its Info.plist
    window.settings.setValue(OFFERED_KEY, True)
    window.settings.sync()
    window.message_bar.show_message("offer_registration", action=("Set it up", window.install_desktop_entry))
    return True


def unregister(window: Any) -> None:
    """Take the desktop registration away and say so in the message bar."""
    from .desktop_entry import uninstall

    try:
        where = uninstall()
    except OSError as problem:
        window.message_bar.show_message("save_failed", name="the desktop registration", reason=str(problem))
        return
    window.message_bar.show_message("unregistered" if where else "not_registered", where=where or "")


def add_unregister_action(window: Any) -> Any:
    """Put "Stop opening data files with a double-click" after the menu item that registers."""
    from PySide6.QtGui import QAction
    from PySide6.QtWidgets import QMenu

    action = QAction("Stop opening data files with a double-click", window)
    action.setStatusTip("Take Twofold away from your desktop's Open With lists and the applications menu.")
    action.triggered.connect(lambda: unregister(window))
    for menu in window.menuBar().findChildren(QMenu):
        actions = menu.actions()
        if window.entry_action in actions:
            following = actions.index(window.entry_action) + 1
            if following < len(actions):
                menu.insertAction(actions[following], action)
            else:
                menu.addAction(action)
            break
    window.unregister_action = action
    return action


class FileOpenEvents(QObject):
    """Passes the application's file-open events (macOS Finder's double-click) to the window."""

    def __init__(self, window: Any) -> None:
        super().__init__(window)
        self.window = window

    def eventFilter(self, watched: QObject, event: QEvent) -> bool:  # noqa: N802 - Qt's name
        if event.type() == QEvent.Type.FileOpen:
            path = event.file()
            if path:
                self.window.open_file(path)
            return True
        return False


def bundle_started(window: Any) -> None:
    """Everything the bundled program does once its window is shown."""
    from PySide6.QtCore import QCoreApplication

    watch = FileOpenEvents(window)
    QCoreApplication.instance().installEventFilter(watch)
    if not sys.platform == "darwin":
        add_unregister_action(window)
    offer_registration(window)
