"""Registration with the desktop: freedesktop files on Linux, per-user registry values on Windows."""

from __future__ import annotations

import configparser
import re
import shlex
import shutil
import xml.etree.ElementTree as ElementTree

import pytest

from desktop import desktop_entry
from desktop.desktop_entry import (
    ANALYSIS_PROG_ID,
    DATA_TYPES,
    FILE_TYPES,
    PROG_ID,
    SAVED_ANALYSIS,
    RegistrationProblem,
    data_home,
    exec_line,
    install_linux,
    linux_files,
    next_steps,
    refresh_moved_linux_entry,
    uninstall_linux,
    windows_command_line,
    windows_registry_entries,
)

# reference: the MIME types registered with IANA for the six formats (RFC 4180 for text/csv;
# RFC 2046 for text/plain; IANA media-type registry for the others); each is also defined, with
# its file-name pattern, in shared-mime-info's freedesktop.org.xml
IANA_TYPES = {
    ".csv": "text/csv",
    ".tsv": "text/tab-separated-values",
    ".txt": "text/plain",
    ".xlsx": "application/vnd.openxmlformats-officedocument.spreadsheetml.sheet",
    ".xls": "application/vnd.ms-excel",
    ".ods": "application/vnd.oasis.opendocument.spreadsheet",
}
# Twofold's own saved analysis: an unregistered subtype ("x-", common practice for types not
# registered with IANA, as in shared-mime-info's own list) with the "+json" structured-syntax
# suffix of RFC 6838, section 4.2.8
OWN_TYPE = (".twofold", "application/x-twofold+json")
MIME_NS = "{http://www.freedesktop.org/standards/shared-mime-info}"


def read_entry(text: str) -> dict[str, str]:
    parser = configparser.ConfigParser(interpolation=None, strict=True)
    parser.optionxform = str  # keys are case-sensitive in desktop entries
    parser.read_string(text)
    return dict(parser["Desktop Entry"])


def test_data_home_follows_xdg_rules(tmp_path):
    # reference: XDG Base Directory Specification 0.8 - an unset or relative $XDG_DATA_HOME
    # means $HOME/.local/share
    assert data_home({"XDG_DATA_HOME": str(tmp_path), "HOME": "/home/x"}) == tmp_path
    assert str(data_home({"HOME": "/home/x"})) == "/home/x/.local/share"
    assert str(data_home({"XDG_DATA_HOME": "relative/dir", "HOME": "/home/x"})) == "/home/x/.local/share"


def test_install_writes_the_entry_and_the_icon(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_DATA_HOME", str(tmp_path / "share"))
    monkeypatch.setattr(desktop_entry.shutil, "which", lambda name: None)  # no cache tools here
    entry_path = install_linux(data_home(), command=["/opt/tf/bin/twofold"])
    share = tmp_path / "share"
    assert entry_path == share / "applications" / "twofold.desktop"

    entry = read_entry(entry_path.read_text(encoding="utf-8"))
    # reference: Desktop Entry Specification 1.5 - required keys Type and Name, Exec with %f for
    # one local file, MimeType a ;-terminated list
    assert entry["Type"] == "Application"
    assert entry["Name"] == "Twofold"
    assert entry["Exec"] == "/opt/tf/bin/twofold %f"
    assert entry["Icon"] == "twofold"
    assert entry["Terminal"] == "false"
    assert entry["MimeType"].endswith(";")
    assert set(entry["MimeType"].rstrip(";").split(";")) == {*IANA_TYPES.values(), OWN_TYPE[1]}

    # the data types are the system's own: the user's MIME database gets one package, which
    # declares the saved analysis and nothing else
    package = share / "mime" / "packages" / "twofold-analysis.xml"
    assert [p.name for p in (share / "mime").rglob("*") if p.is_file()] == [package.name]
    # reference: Shared MIME-info Database 0.21, "The source XML files": mime-info root in its
    # namespace; a glob pattern, a sub-class-of, a comment per type
    root = ElementTree.fromstring(package.read_text(encoding="utf-8"))
    assert root.tag == f"{MIME_NS}mime-info"
    (declared,) = root.findall(f"{MIME_NS}mime-type")
    assert declared.get("type") == OWN_TYPE[1]
    assert [g.get("pattern") for g in declared.findall(f"{MIME_NS}glob")] == ["*" + OWN_TYPE[0]]
    assert declared.find(f"{MIME_NS}sub-class-of").get("type") == "application/json"
    assert declared.find(f"{MIME_NS}comment").text

    icon = share / "icons" / "hicolor" / "scalable" / "apps" / "twofold.svg"
    assert icon.read_text(encoding="utf-8").lstrip().startswith("<svg")

    removed = uninstall_linux(data_home())
    assert set(removed) == {entry_path, icon, package}
    assert not entry_path.exists() and not icon.exists() and not (share / "mime").exists()
    assert uninstall_linux(data_home()) == ()  # a second time there is nothing to remove


@pytest.mark.skipif(shutil.which("update-mime-database") is None, reason="shared-mime-info is not installed")
def test_the_users_mime_database_knows_the_saved_analysis_and_forgets_it_again(tmp_path, monkeypatch):
    which = shutil.which
    monkeypatch.setattr(desktop_entry.shutil, "which",
                        lambda name: which(name) if name == "update-mime-database" else None)
    install_linux(tmp_path, command=["twofold"])
    # reference: Shared MIME-info Database 0.21, "The globs2 files": weight:type:pattern lines
    globs = (tmp_path / "mime" / "globs2").read_text(encoding="utf-8")
    assert f"{OWN_TYPE[1]}:*{OWN_TYPE[0]}" in globs
    assert uninstall_linux(tmp_path)
    assert not (tmp_path / "mime").exists()  # the generated database went with its only package


def test_a_mime_folder_with_another_package_is_left_alone(tmp_path, monkeypatch):
    monkeypatch.setattr(desktop_entry.shutil, "which", lambda name: None)
    install_linux(tmp_path, command=["twofold"])
    other = tmp_path / "mime" / "packages" / "someone-else.xml"
    other.write_text("<mime-info/>")
    (tmp_path / "mime" / "globs2").write_text("50:text/x-else:*.else\n")
    uninstall_linux(tmp_path)
    assert other.exists() and (tmp_path / "mime" / "globs2").exists()
    assert not (tmp_path / "mime" / "packages" / "twofold-analysis.xml").exists()


def test_uninstall_says_whether_anything_was_registered(tmp_path, monkeypatch):
    monkeypatch.setenv("XDG_DATA_HOME", str(tmp_path))
    monkeypatch.setattr(desktop_entry.shutil, "which", lambda name: None)
    monkeypatch.setattr(desktop_entry.sys, "platform", "linux")
    assert desktop_entry.uninstall() is None
    install_linux(tmp_path, command=["twofold"])
    assert desktop_entry.uninstall() == str(tmp_path)
    assert desktop_entry.uninstall() is None
    assert not any(p.is_file() for p in tmp_path.rglob("*"))


def test_the_bundle_registers_its_own_window_executable(monkeypatch):
    # in the bundle sys.executable is the program itself; the headless twofold-cli beside it
    # registers the window's executable
    monkeypatch.setattr(desktop_entry.sys, "frozen", True, raising=False)
    for name, suffix in (("twofold-cli", ""), ("Twofold", ""), ("twofold-cli", ".exe")):
        monkeypatch.setattr(desktop_entry.sys, "executable", f"/opt/apps/Twofold/{name}{suffix}")
        assert desktop_entry.launch_command() == [f"/opt/apps/Twofold/Twofold{suffix}"]


def test_a_moved_bundle_brings_its_registration_up_to_date(tmp_path, monkeypatch):
    monkeypatch.setattr(desktop_entry.shutil, "which", lambda name: None)
    monkeypatch.setattr(desktop_entry, "launch_command", lambda **_: ["/new/place/Twofold"])
    assert not refresh_moved_linux_entry(tmp_path)  # not registered: nothing is written
    assert not tmp_path.joinpath("applications").exists()
    install_linux(tmp_path, command=["/old/place/Twofold"])
    assert refresh_moved_linux_entry(tmp_path)
    entry = read_entry((tmp_path / "applications" / "twofold.desktop").read_text(encoding="utf-8"))
    assert entry["Exec"] == "/new/place/Twofold %f"
    assert not refresh_moved_linux_entry(tmp_path)  # up to date: left as it is


def test_install_runs_the_cache_tools_when_present(tmp_path, monkeypatch):
    calls = []
    monkeypatch.setattr(desktop_entry.shutil, "which", lambda name: f"/usr/bin/{name}")
    monkeypatch.setattr(desktop_entry.subprocess, "run", lambda args, **kw: calls.append(args))
    install_linux(tmp_path, command=["twofold"])
    assert calls == [["/usr/bin/update-desktop-database", str(tmp_path / "applications")],
                     ["/usr/bin/update-mime-database", str(tmp_path / "mime")]]


def test_the_mime_package_of_earlier_versions_is_taken_away(tmp_path, monkeypatch):
    # it gave text/csv and the other common types comments of its own, over every other
    # program's names for them in the user's MIME database
    calls = []
    monkeypatch.setattr(desktop_entry.shutil, "which", lambda name: f"/usr/bin/{name}")
    monkeypatch.setattr(desktop_entry.subprocess, "run", lambda args, **kw: calls.append(args))
    old = tmp_path / "mime" / "packages" / "twofold.xml"
    old.parent.mkdir(parents=True)
    old.write_text('<mime-info><mime-type type="text/csv"><comment>x</comment></mime-type></mime-info>')
    other = old.with_name("someone-else.xml")
    other.write_text("<mime-info/>")
    install_linux(tmp_path, command=["twofold"])
    assert not old.exists() and other.exists()
    assert ["/usr/bin/update-mime-database", str(tmp_path / "mime")] in calls


def test_file_types_are_the_registered_ones_and_our_own():
    assert {ext: FILE_TYPES[ext][0] for ext in DATA_TYPES} == IANA_TYPES
    assert (SAVED_ANALYSIS, FILE_TYPES[SAVED_ANALYSIS][0]) == OWN_TYPE
    assert set(FILE_TYPES) == {*IANA_TYPES, OWN_TYPE[0]}


def test_macos_type_identifiers():
    # reference: Apple, "System-declared uniform type identifiers" (public.comma-separated-values-text,
    # public.tab-separated-values-text, public.plain-text, org.openxmlformats.spreadsheetml.sheet,
    # com.microsoft.excel.xls, org.oasis-open.opendocument.spreadsheet)
    assert {ext: desktop_entry.MACOS_TYPES[ext] for ext in DATA_TYPES} == {
        ".csv": "public.comma-separated-values-text", ".tsv": "public.tab-separated-values-text",
        ".txt": "public.plain-text", ".xlsx": "org.openxmlformats.spreadsheetml.sheet",
        ".xls": "com.microsoft.excel.xls", ".ods": "org.oasis-open.opendocument.spreadsheet"}
    assert not desktop_entry.MACOS_TYPES[SAVED_ANALYSIS].startswith(("public.", "com.apple."))


@pytest.mark.parametrize("command, expected", [
    (["/usr/bin/twofold"], "/usr/bin/twofold %f"),
    (["/home/a b/py", "-m", "desktop"], '"/home/a b/py" -m desktop %f'),
    # reference: Desktop Entry Specification 1.5, "The Exec key": inside quotes, " ` $ \ take a
    # backslash, and string-value escaping then doubles every backslash
    (["/x/py", "-c", 'say "$HOME"'], '/x/py -c "say \\\\"\\\\$HOME\\\\"" %f'),
    (["/x/100%/py"], "/x/100%%/py %f"),
])
def test_exec_line_quoting(command, expected):
    assert exec_line(command) == expected


@pytest.mark.parametrize("folder, words", [
    ("/home/a\nb", "a line break"),
    ("/home/a\rb", "a line break"),
    ("/home/a\x1bb", "control character (U+001B)"),
    ("/home/a\tb", "control character (U+0009)"),
    ("/home/caf\udce9", "not UTF-8"),  # a Latin-1 byte in a UTF-8 system's file name
])
def test_a_path_the_entry_cannot_hold_is_refused_before_anything_is_written(folder, words, tmp_path):
    # reference: Desktop Entry Specification 1.5, "Possible value types": values are UTF-8 and
    # hold no control characters; a line break would end the Exec line and start a new key
    command = [f"{folder}/.venv/bin/python", "-m", "desktop"]
    with pytest.raises(RegistrationProblem, match=re.escape(words)) as caught:
        exec_line(command)
    message = str(caught.value)
    assert "\n" not in message and "\x1b" not in message and "\udce9" not in message
    assert "Move Twofold" in message
    with pytest.raises(OSError):  # what the command and the window catch
        install_linux(tmp_path / "share", command=command)
    assert not (tmp_path / "share").exists()


def test_exec_line_round_trips_through_a_shell_like_split():
    command = ["/opt/my apps/python3", "-c", "import sys; sys.path.insert(0, '/src'); main()"]
    line = exec_line(command)
    unescaped = line.replace("\\\\", "\\")  # undo the string-value escaping
    # reference: the quoting rules of the spec are those of a POSIX shell's double quotes
    assert shlex.split(unescaped) == [*command, "%f"]


def test_the_default_command_starts_the_program():
    files = linux_files()
    exec_value = read_entry(files["applications/twofold.desktop"])["Exec"]
    assert exec_value.endswith(" %f")
    assert "desktop" in exec_value or "twofold" in exec_value


def test_windows_registry_entries():
    command = [r"C:\Program Files\Python311\pythonw.exe", "-m", "desktop"]
    entries = windows_registry_entries(command, icon=r"C:\Twofold\twofold.ico")
    by_key = {(e.key, e.name): e.value for e in entries}
    base = "Software\\Classes"
    # reference: Microsoft Win32 docs "Programmatic Identifiers" and "OpenWithProgids": a ProgID key
    # with a default value (its name), DefaultIcon, shell\open\command holding "%1"; each
    # .ext\OpenWithProgids gets a value named after the ProgID (its data is ignored)
    assert by_key[(f"{base}\\{PROG_ID}", "")] == "Twofold data file"
    assert by_key[(f"{base}\\{PROG_ID}\\DefaultIcon", "")] == r"C:\Twofold\twofold.ico"
    assert by_key[(f"{base}\\{PROG_ID}\\shell\\open\\command", "")] == \
        r'"C:\Program Files\Python311\pythonw.exe" -m desktop "%1"'
    for extension in IANA_TYPES:
        assert by_key[(f"{base}\\{extension}\\OpenWithProgids", PROG_ID)] == ""
    # no data type is taken over from its default program (the .ext key's own default value)
    assert not any(e.key in {f"{base}\\{x}" for x in DATA_TYPES} and e.name == "" for e in entries)
    assert all(e.key.startswith(base + "\\") for e in entries)
    # the saved analysis is Twofold's own type: its extension names Twofold's ProgID
    assert by_key[(f"{base}\\.twofold", "")] == ANALYSIS_PROG_ID
    assert by_key[(f"{base}\\.twofold", "Content Type")] == OWN_TYPE[1]
    assert by_key[(f"{base}\\{ANALYSIS_PROG_ID}\\shell\\open\\command", "")] == \
        r'"C:\Program Files\Python311\pythonw.exe" -m desktop "%1"'



def test_windows_command_line_quotes_only_what_needs_it():
    assert windows_command_line([r"C:\tf\twofold.exe"]) == r'C:\tf\twofold.exe "%1"'
    assert windows_command_line([r"C:\a b\py.exe", "-c", 'x = "1"']) == r'"C:\a b\py.exe" -c "x = \"1\"" "%1"'


def test_install_picks_the_system(monkeypatch, tmp_path):
    monkeypatch.setattr(desktop_entry.sys, "platform", "win32")
    written = []
    monkeypatch.setattr(desktop_entry, "install_windows", lambda: written.append("registry") or "HKCU")
    assert desktop_entry.install() == "HKCU" and written == ["registry"]
    monkeypatch.setattr(desktop_entry.sys, "platform", "darwin")
    with pytest.raises(OSError, match="Open With"):
        desktop_entry.install()


def test_main_reports_a_failed_registration(monkeypatch, capsys):
    from desktop.app import main

    monkeypatch.setattr(desktop_entry.sys, "platform", "darwin")
    assert main(["--install-desktop-entry"]) == 1
    assert "Open With" in capsys.readouterr().err


@pytest.mark.parametrize("has_xdg_mime", [True, False])
def test_next_steps_say_where_it_appears_and_how_to_make_it_the_default(has_xdg_mime):
    lines = next_steps("/home/x/.local/share/applications/twofold.desktop", platform="linux",
                       environ={"HOME": "/home/x"}, has_xdg_mime=has_xdg_mime)
    text = "\n".join(lines)
    assert "/home/x/.local/share/applications/twofold.desktop" in lines[0]
    assert "Open With" in text and "applications menu" in text and "default" in text
    for extension in IANA_TYPES:
        assert extension in text
    if has_xdg_mime:
        assert "xdg-mime default twofold.desktop text/csv text/tab-separated-values" in text
    else:
        # reference: "Association between MIME types and applications" 1.0.1 - defaults are
        # "type=entry.desktop" lines under [Default Applications] in $XDG_CONFIG_HOME/mimeapps.list
        assert "xdg-mime" in text and "not installed" in text
        assert "text/csv=twofold.desktop" in text and "[Default Applications]" in text
        assert "/home/x/.config/mimeapps.list" in text
    windows = "\n".join(next_steps("HKEY_CURRENT_USER\\Software\\Classes\\Twofold.DataFile", platform="win32"))
    assert "Open with" in windows and "Always use this app" in windows and "xdg" not in windows
