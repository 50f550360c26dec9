"""What the bundled program does as it starts (``packaging/``): it offers, once, to register
Twofold with the desktop, and on macOS it hands the files Finder opens to the window.

A source install registers with ``twofold --install-desktop-entry`` instead (see the README).
"""

from __future__ import annotations

import sys
from typing import Any

from PySide6.QtCore import QEvent, QObject

__all__ = ["OFFERED_KEY", "offer_registration", "FileOpenEvents", "bundle_started"]

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
    offer_registration(window)
