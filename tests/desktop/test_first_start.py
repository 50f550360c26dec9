"""The bundled program's first start: the desktop registration offered once; Finder's file-open events."""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QCoreApplication
from PySide6.QtGui import QFileOpenEvent

from desktop import desktop_entry
from desktop.first_start import OFFERED_KEY, FileOpenEvents, add_unregister_action, offer_registration


def test_the_registration_is_offered_once_and_the_answer_registers(make_window, tmp_path, monkeypatch):
    monkeypatch.setattr(desktop_entry.shutil, "which", lambda name: None)
    monkeypatch.setattr(desktop_entry.sys, "platform", "linux")
    window = make_window()
    assert offer_registration(window, platform="linux")
    assert window.message_bar.key == "offer_registration"
    assert ".twofold" in window.message_bar.text and window.message_bar.action_text
    assert window.settings.value(OFFERED_KEY, False, type=bool)
    # the next start does not ask again, whatever the answer was
    window.message_bar.clear()
    assert not offer_registration(window, platform="linux")
    assert window.message_bar.key is None
    # the offered step is the menu item's: the entry is written for this user
    window.install_desktop_entry()
    assert (tmp_path / "xdg-data" / "applications" / "twofold.desktop").is_file()
    assert window.message_bar.key == "registered"


def test_macos_is_not_asked(make_window):
    window = make_window()
    assert not offer_registration(window, platform="darwin")
    assert window.message_bar.key is None


def test_a_moved_bundle_registration_is_brought_up_to_date_at_start(make_window, tmp_path, monkeypatch):
    monkeypatch.setattr(desktop_entry.shutil, "which", lambda name: None)
    home = tmp_path / "xdg-data"
    desktop_entry.install_linux(home, command=["/old/place/Twofold"])
    monkeypatch.setattr(desktop_entry, "launch_command", lambda **_: ["/new/place/Twofold"])
    offer_registration(make_window(), platform="linux")
    assert "Exec=/new/place/Twofold %f" in (home / "applications" / "twofold.desktop").read_text(encoding="utf-8")


def test_a_file_open_event_opens_the_file(make_window, qtbot, two_groups_csv):
    window = make_window()
    watch = FileOpenEvents(window)
    app = QCoreApplication.instance()
    app.installEventFilter(watch)
    try:
        # what macOS sends the application when Finder opens a file with it
        QCoreApplication.sendEvent(app, QFileOpenEvent(str(two_groups_csv)))
        qtbot.waitUntil(lambda: window.session.path == Path(two_groups_csv), timeout=20_000)
    finally:
        app.removeEventFilter(watch)


def test_the_registration_is_taken_away_from_the_menu(make_window, tmp_path, monkeypatch):
    monkeypatch.setattr(desktop_entry.shutil, "which", lambda name: None)
    monkeypatch.setattr(desktop_entry.sys, "platform", "linux")
    window = make_window()
    action = add_unregister_action(window)
    file_menu = next(menu for menu in window.menuBar().findChildren(type(window.recent_menu))
                     if window.entry_action in menu.actions())
    items = file_menu.actions()
    assert items.index(action) == items.index(window.entry_action) + 1
    window.install_desktop_entry()
    entry = tmp_path / "xdg-data" / "applications" / "twofold.desktop"
    assert entry.is_file()
    action.trigger()
    assert not entry.exists() and window.message_bar.key == "unregistered"
    action.trigger()  # a second time nothing is said to be removed
    assert window.message_bar.key == "not_registered"
