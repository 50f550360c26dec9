"""Registering Twofold with the desktop, so that a double-click on a data file opens it.

On Linux and other freedesktop systems :func:`install_linux` writes, under ``$XDG_DATA_HOME``
(by default ``~/.local/share``), a desktop entry ``applications/twofold.desktop`` that accepts
one file (``%f``) of the seven types, the icon ``icons/hicolor/scalable/apps/twofold.svg`` and
a MIME package ``mime/packages/twofold-analysis.xml`` that declares the saved analysis
(``*.twofold``); then it runs ``update-desktop-database`` and ``update-mime-database`` where they
are installed. The six data types are all defined by the system's shared MIME database, so the
package declares none of them: the user's database keeps every other program's names and
patterns for them. On Windows :func:`windows_registry_entries` lists the per-user file
associations (a ProgID under ``HKCU\\Software\\Classes`` and an ``OpenWithProgids`` value
for each data type; a ProgID of its own for the saved analysis) and :func:`install_windows`
writes them with ``winreg``. Nothing needs administrator rights, and no data type gets Twofold
as its default program unless the user makes it so; :func:`next_steps` says how.

In the bundle (``packaging/``) the command is the bundle's ``Twofold`` executable, wherever the
folder was unpacked.

References
----------
freedesktop.org, "Desktop Entry Specification", version 1.5 (the Exec key and its quoting).
freedesktop.org, "Shared MIME-info Database", version 0.21, and the freedesktop.org.xml it ships
(the six types and their file-name patterns).
freedesktop.org, "Association between MIME types and applications", version 1.0.1
(``mimeapps.list`` and its ``[Default Applications]`` group).
Microsoft, "File Types and File Associations" and "OpenWithProgids" (Win32 shell documentation).
"""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
import unicodedata
from dataclasses import dataclass
from pathlib import Path
from typing import Mapping, Sequence

from engine.text import visible

from .artwork import svg_file

__all__ = [
    "FILE_TYPES",
    "SAVED_ANALYSIS",
    "DATA_TYPES",
    "MACOS_TYPES",
    "PROG_ID",
    "ANALYSIS_PROG_ID",
    "RegistrationProblem",
    "RegistryValue",
    "data_home",
    "launch_command",
    "bundle_executable",
    "exec_line",
    "linux_files",
    "install_linux",
    "uninstall_linux",
    "refresh_moved_linux_entry",
    "windows_command_line",
    "windows_registry_entries",
    "install_windows",
    "uninstall_windows",
    "install",
    "uninstall",
    "next_steps",
]

# extension -> (MIME type, what the type is called): every kind of file Twofold reads
FILE_TYPES: Mapping[str, tuple[str, str]] = {
    ".csv": ("text/csv", "comma-separated values"),
    ".tsv": ("text/tab-separated-values", "tab-separated values"),
    ".txt": ("text/plain", "plain text"),
    ".xlsx": ("application/vnd.openxmlformats-officedocument.spreadsheetml.sheet", "spreadsheet workbook"),
    ".xls": ("application/vnd.ms-excel", "older spreadsheet workbook"),
    ".ods": ("application/vnd.oasis.opendocument.spreadsheet", "OpenDocument spreadsheet"),
    ".twofold": ("application/x-twofold+json", "saved Twofold analysis"),
}
# Twofold's own file type: a saved analysis (JSON); no system database knows it, so it is
# declared here (a MIME package on Linux, an exported type on macOS) and Twofold owns it
SAVED_ANALYSIS = ".twofold"
# the data files Twofold reads: every other program's claims on them are left as they are
DATA_TYPES: tuple[str, ...] = tuple(extension for extension in FILE_TYPES if extension != SAVED_ANALYSIS)
# macOS uniform type identifiers of the same types, and the application's own identifier
MACOS_TYPES: Mapping[str, str] = {
    ".csv": "public.comma-separated-values-text",
    ".tsv": "public.tab-separated-values-text",
    ".txt": "public.plain-text",
    ".xlsx": "org.openxmlformats.spreadsheetml.sheet",
    ".xls": "com.microsoft.excel.xls",
    ".ods": "org.oasis-open.opendocument.spreadsheet",
    ".twofold": "org.twofold.analysis",
    "app": "org.twofold.Twofold",
}
# a MIME package that earlier versions wrote; it is removed on the next install or uninstall
_OLD_MIME_PACKAGE = "mime/packages/twofold.xml"
# the MIME package that declares the saved analysis, and only it
MIME_PACKAGE = "mime/packages/twofold-analysis.xml"
PROG_ID = "Twofold.DataFile"
ANALYSIS_PROG_ID = "Twofold.Analysis"
APP_ID = "twofold"
_ROOT = Path(__file__).resolve().parent.parent


def data_home(environ: Mapping[str, str] | None = None) -> Path:
    """``$XDG_DATA_HOME``, or ``~/.local/share`` when it is unset or not absolute."""
    environ = os.environ if environ is None else environ
    value = environ.get("XDG_DATA_HOME", "")
    if value and Path(value).is_absolute():
        return Path(value)
    home = environ.get("HOME") or str(Path.home())
    return Path(home) / ".local" / "share"


def _installed() -> bool:
    from importlib.metadata import PackageNotFoundError, distribution

    try:
        distribution("twofold")
    except PackageNotFoundError:
        return False
    return True


def launch_command(*, windowed: bool = False) -> list[str]:
    """The command that starts Twofold, without the file argument.

    The bundle's ``Twofold`` executable when this is the bundle; the ``twofold`` script where it
    is installed; otherwise this Python running the package from the source folder.
    ``windowed`` picks ``pythonw.exe`` on Windows (no console window).
    """
    if getattr(sys, "frozen", False):
        return [str(bundle_executable())]
    script = shutil.which("twofold")
    if script and _installed():
        return [script]
    python = sys.executable
    if windowed and python.lower().endswith("python.exe"):
        candidate = Path(python).with_name("pythonw.exe")
        python = str(candidate) if candidate.exists() else python
    if _installed():
        return [python, "-m", "desktop"]
    starter = f"import sys; sys.path.insert(0, {str(_ROOT)!r}); from desktop.app import main; sys.exit(main())"
    return [python, "-c", starter]


def bundle_executable() -> Path:
    """The bundle's window executable, also when the headless ``twofold-cli`` beside it runs."""
    program = Path(sys.executable)
    if program.stem.lower() == "twofold-cli":
        return program.with_name("Twofold" + program.suffix)
    return program


_RESERVED = set(" \t\n\"'\\><~|&;$*?#()`")


class RegistrationProblem(OSError):
    """The registration cannot be written as it stands; the message says why and what to do."""


def _check_argument(argument: str) -> None:
    """Refuse what a desktop entry cannot hold: a value is one line of UTF-8 text without control
    characters (Desktop Entry Specification 1.5, "Possible value types")."""
    for character in argument:
        category = unicodedata.category(character)
        if category not in ("Cc", "Cs"):
            continue
        if character in "\n\r":
            what = "a line break"
        elif category == "Cs":
            what = "bytes that are not UTF-8 text"
        else:
            what = f"a control character (U+{ord(character):04X})"
        place = str(_ROOT) if str(_ROOT) in argument else argument
        raise RegistrationProblem(
            f"the path {visible(place)} holds {what}, which a desktop entry cannot hold. "
            "Move Twofold to a folder whose name is plain text on one line, then run "
            "twofold --install-desktop-entry again.")


def _exec_quote(argument: str) -> str:
    """One argument quoted by the desktop-entry rules (then escaped as a string value)."""
    _check_argument(argument)
    argument = argument.replace("%", "%%")
    if argument and not (_RESERVED & set(argument)):
        quoted = argument
    else:
        inner = "".join("\\" + ch if ch in '"`$\\' else ch for ch in argument)
        quoted = f'"{inner}"'
    return quoted.replace("\\", "\\\\")


def exec_line(command: Sequence[str]) -> str:
    """The ``Exec`` value: the command, quoted, followed by ``%f`` (one local file).

    Raises :class:`RegistrationProblem` when a part holds a line break, another control
    character or bytes that are not UTF-8: the format has no way to write them.
    """
    return " ".join(_exec_quote(part) for part in command) + " %f"


def _mime_package() -> str:
    """The shared-MIME-info package that declares the saved analysis (a JSON file)."""
    mime, name = FILE_TYPES[SAVED_ANALYSIS]
    return "\n".join([
        '<?xml version="1.0" encoding="UTF-8"?>',
        '<mime-info xmlns="http://www.freedesktop.org/standards/shared-mime-info">',
        f'  <mime-type type="{mime}">',
        f"    <comment>{name}</comment>",
        '    <sub-class-of type="application/json"/>',
        f'    <icon name="{APP_ID}"/>',
        f'    <glob pattern="*{SAVED_ANALYSIS}"/>',
        "  </mime-type>",
        "</mime-info>",
        "",
    ])


def _desktop_entry(command: Sequence[str]) -> str:
    types = "".join(f"{mime};" for mime, _ in FILE_TYPES.values())
    return "\n".join([
        "[Desktop Entry]",
        "Type=Application",
        "Version=1.5",
        "Name=Twofold",
        "GenericName=Two-group comparison",
        "Comment=Compare two groups of measurements and write up the result",
        f"Exec={exec_line(command)}",
        f"Icon={APP_ID}",
        "Terminal=false",
        "StartupNotify=true",
        "Categories=Office;Science;Math;",
        "Keywords=compare;groups;measurements;data;",
        f"MimeType={types}",
        "",
    ])


_FALLBACK_ICON = ('<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 64 64">'
                  '<rect x="12" y="24" width="14" height="28"/><rect x="38" y="14" width="14" height="38"/></svg>\n')


def linux_files(command: Sequence[str] | None = None) -> dict[str, str]:
    """The files to write, as {path under the data home: text}."""
    source = svg_file("app")
    icon = source.read_text(encoding="utf-8") if source.is_file() else _FALLBACK_ICON
    return {
        f"applications/{APP_ID}.desktop": _desktop_entry(command or launch_command()),
        f"icons/hicolor/scalable/apps/{APP_ID}.svg": icon,
        MIME_PACKAGE: _mime_package(),
    }


def _drop_old_mime_package(home: Path) -> bool:
    """Remove the MIME package an earlier version wrote (it renamed common types); True if it was there."""
    old = home / _OLD_MIME_PACKAGE
    if not old.is_file():
        return False
    old.unlink()
    return True


def _refresh_linux(home: Path, *, mime: bool = False) -> None:
    """Rebuild the desktop's caches where the tools exist; their absence is harmless."""
    tools = [("update-desktop-database", home / "applications")]
    if mime:
        tools.append(("update-mime-database", home / "mime"))
    for tool, folder in tools:
        program = shutil.which(tool)
        if program is None:
            continue
        try:
            subprocess.run([program, str(folder)], check=False, capture_output=True, timeout=60)
        except (OSError, subprocess.SubprocessError):
            pass


def install_linux(home: Path | None = None, *, command: Sequence[str] | None = None) -> Path:
    """Write the desktop entry and the icon; returns the desktop entry's path.

    Nothing is written when the entry cannot be (:class:`RegistrationProblem`).
    """
    home = home or data_home()
    files = linux_files(command)  # refuses a command the entry cannot hold, before any writing
    for relative, text in files.items():
        target = home / relative
        target.parent.mkdir(parents=True, exist_ok=True)
        target.write_text(text, encoding="utf-8")
    _drop_old_mime_package(home)
    _refresh_linux(home, mime=True)
    return home / "applications" / f"{APP_ID}.desktop"


def refresh_moved_linux_entry(home: Path | None = None) -> bool:
    """Rewrite the registration when it is in place but differs from this program's (the bundle
    was moved or unpacked anew elsewhere); True if it was rewritten. Nothing is written when
    Twofold is not registered."""
    home = home or data_home()
    if not (home / "applications" / f"{APP_ID}.desktop").is_file():
        return False
    files = linux_files()
    if all((home / relative).is_file() and (home / relative).read_text(encoding="utf-8") == text
           for relative, text in files.items()):
        return False
    install_linux(home)
    return True


# what update-mime-database generates in a MIME folder from its packages/ (shared-mime-info 0.21)
_GENERATED_MIME_FILES = ("aliases", "generic-icons", "globs", "globs2", "icons", "magic", "mime.cache",
                         "subclasses", "treemagic", "types", "version", "XMLnamespaces")


def _drop_empty_mime_database(home: Path) -> None:
    """Remove the user's MIME database when no package is left to generate it from.

    Every file in it is generated from ``packages/``; with that empty they describe only what
    was just removed. A folder holding anything else is left as it is.
    """
    mime = home / "mime"
    packages = mime / "packages"
    if not mime.is_dir() or (packages.is_dir() and any(packages.iterdir())):
        return
    entries = list(mime.iterdir())
    generated = [e for e in entries if e.is_file() and e.name in _GENERATED_MIME_FILES]
    media = [e for e in entries if e.is_dir() and e.name != "packages"
             and all(f.is_file() and f.suffix == ".xml" for f in e.iterdir())]
    if len(generated) + len(media) + packages.is_dir() != len(entries):
        return
    for entry in generated:
        entry.unlink()
    for folder in media:
        shutil.rmtree(folder)
    if packages.is_dir():
        packages.rmdir()
    mime.rmdir()


def uninstall_linux(home: Path | None = None) -> tuple[Path, ...]:
    """Remove the files again; returns those that were there (none when nothing was registered)."""
    home = home or data_home()
    removed = []
    for relative in linux_files(["twofold"]):
        target = home / relative
        if target.is_file():
            target.unlink()
            removed.append(target)
    if _drop_old_mime_package(home):
        removed.append(home / _OLD_MIME_PACKAGE)
    if removed:
        _refresh_linux(home, mime=True)
        _drop_empty_mime_database(home)
    return tuple(removed)


@dataclass(frozen=True)
class RegistryValue:
    """One value to write under ``HKEY_CURRENT_USER``: key path, value name ("" = default), text."""

    key: str
    name: str
    value: str


def _windows_quote(argument: str) -> str:
    if argument and not any(ch in argument for ch in ' \t"'):
        return argument
    return '"' + argument.replace('"', '\\"') + '"'


def windows_command_line(command: Sequence[str]) -> str:
    """The shell's open command: the quoted program and arguments, then ``"%1"`` (the file)."""
    return " ".join(_windows_quote(part) for part in command) + ' "%1"'


def windows_registry_entries(command: Sequence[str], *, icon: str | None = None) -> list[RegistryValue]:
    """The per-user registry values that offer Twofold for the data types and open saved analyses.

    A ProgID ``Twofold.DataFile`` with its name, icon and open command, and for each data type's
    extension an empty ``OpenWithProgids`` value naming the ProgID (which adds Twofold to "Open
    with" without taking the type over from the program that has it). The saved analysis is
    Twofold's own type: its extension names the ProgID ``Twofold.Analysis`` as its program.
    """
    base = "Software\\Classes"
    entries = []
    for prog_id, name in ((PROG_ID, "Twofold data file"), (ANALYSIS_PROG_ID, FILE_TYPES[SAVED_ANALYSIS][1])):
        entries += [
            RegistryValue(f"{base}\\{prog_id}", "", name),
            *([RegistryValue(f"{base}\\{prog_id}\\DefaultIcon", "", icon)] if icon else []),
            RegistryValue(f"{base}\\{prog_id}\\shell\\open", "FriendlyAppName", "Twofold"),
            RegistryValue(f"{base}\\{prog_id}\\shell\\open\\command", "", windows_command_line(command)),
        ]
    for extension in DATA_TYPES:
        entries.append(RegistryValue(f"{base}\\{extension}\\OpenWithProgids", PROG_ID, ""))
    saved = f"{base}\\{SAVED_ANALYSIS}"
    entries += [
        RegistryValue(saved, "", ANALYSIS_PROG_ID),
        RegistryValue(saved, "Content Type", FILE_TYPES[SAVED_ANALYSIS][0]),
        RegistryValue(f"{saved}\\OpenWithProgids", ANALYSIS_PROG_ID, ""),
    ]
    return entries


def _notify_windows_shell() -> None:  # pragma: no cover - Windows only
    import ctypes

    shcne_assocchanged, shcnf_idlist = 0x08000000, 0x0000
    ctypes.windll.shell32.SHChangeNotify(shcne_assocchanged, shcnf_idlist, None, None)


def install_windows(entries: Sequence[RegistryValue] | None = None) -> str:  # pragma: no cover - Windows only
    """Write ``entries`` (by default those for this installation) under HKEY_CURRENT_USER."""
    import winreg

    entries = entries or windows_registry_entries(launch_command(windowed=True))
    for entry in entries:
        with winreg.CreateKeyEx(winreg.HKEY_CURRENT_USER, entry.key, 0, winreg.KEY_SET_VALUE) as key:
            winreg.SetValueEx(key, entry.name, 0, winreg.REG_SZ, entry.value)
    _notify_windows_shell()
    return f"HKEY_CURRENT_USER\\Software\\Classes\\{PROG_ID}"


def _delete_tree(winreg: object, root: object, path: str) -> bool:  # pragma: no cover - Windows only
    """Delete the key ``path`` with everything under it; True if it was there."""
    try:
        with winreg.OpenKey(root, path, 0, winreg.KEY_ALL_ACCESS) as key:
            while True:
                try:
                    child = winreg.EnumKey(key, 0)
                except OSError:
                    break
                _delete_tree(winreg, root, f"{path}\\{child}")
        winreg.DeleteKey(root, path)
    except FileNotFoundError:
        return False
    return True


def uninstall_windows() -> str | None:  # pragma: no cover - Windows only
    """Remove the ProgIDs, the ``OpenWithProgids`` values and the saved analysis's extension
    written by :func:`install_windows`; None when none of them was there."""
    import winreg

    root = winreg.HKEY_CURRENT_USER
    found = [_delete_tree(winreg, root, f"Software\\Classes\\{prog_id}") for prog_id in (PROG_ID, ANALYSIS_PROG_ID)]
    for extension in DATA_TYPES:
        try:
            with winreg.OpenKey(root, f"Software\\Classes\\{extension}\\OpenWithProgids", 0,
                                winreg.KEY_SET_VALUE) as key:
                winreg.DeleteValue(key, PROG_ID)
            found.append(True)
        except FileNotFoundError:
            pass
    found.append(_delete_tree(winreg, root, f"Software\\Classes\\{SAVED_ANALYSIS}"))
    if not any(found):
        return None
    _notify_windows_shell()
    return f"HKEY_CURRENT_USER\\Software\\Classes\\{PROG_ID}"


def install() -> str:
    """Register Twofold for this user on this system; returns where it was written."""
    if sys.platform == "win32":
        return install_windows()
    if sys.platform == "darwin":
        raise OSError("on macOS, choose Twofold once with Finder's Open With > Other…; "
                      "there is nothing to install")
    return str(install_linux())


def uninstall() -> str | None:
    """Undo :func:`install`; returns where it was removed from, or None when Twofold was not
    registered (so there was nothing to remove)."""
    if sys.platform == "win32":
        return uninstall_windows()
    if sys.platform == "darwin":
        raise OSError("on macOS there is nothing to remove")
    return str(data_home()) if uninstall_linux() else None


def _extensions() -> str:
    names = list(DATA_TYPES)
    return ", ".join(names[:-1]) + " and " + names[-1]


def _config_home(environ: Mapping[str, str]) -> Path:
    """``$XDG_CONFIG_HOME``, or ``~/.config`` when it is unset or not absolute."""
    value = environ.get("XDG_CONFIG_HOME", "")
    if value and Path(value).is_absolute():
        return Path(value)
    return Path(environ.get("HOME") or str(Path.home())) / ".config"


def next_steps(where: str, *, platform: str | None = None, environ: Mapping[str, str] | None = None,
               has_xdg_mime: bool | None = None) -> list[str]:
    """What to tell the user after :func:`install`, one sentence a line: what was written where,
    where Twofold now appears, and how to make it the program a double-click opens."""
    platform = sys.platform if platform is None else platform
    environ = os.environ if environ is None else environ
    lines = [f"Twofold is registered for your user only (written to {visible(where)})."]
    if platform == "win32":
        return lines + [
            f"It now appears under Open with for {_extensions()} files; your current program for "
            f"each type stays the default. Saved analyses ({SAVED_ANALYSIS}) open in Twofold with a double-click.",
            "To open a type with a double-click: right-click such a file in Explorer, choose Open with, "
            "then Choose another app, pick Twofold and tick Always use this app.",
            "twofold --uninstall-desktop-entry takes the registration away again.",
        ]
    lines += [
        f"It now appears in your applications menu and under Open With for {_extensions()} files "
        "(some desktops show it only after you log out and back in); your current program for "
        f"each type stays the default. Saved analyses ({SAVED_ANALYSIS}) open in Twofold with a double-click.",
        "To open a type with a double-click: right-click such a file in your file manager, choose "
        "Open With, pick Twofold and choose to use it always or set it as the default (the words "
        "differ from one desktop to another).",
    ]
    if has_xdg_mime is None:
        has_xdg_mime = shutil.which("xdg-mime") is not None
    # the two types that are data tables and nothing else; workbooks and .txt files usually
    # belong to another program, which the user can change the same way
    tables = [FILE_TYPES[".csv"][0], FILE_TYPES[".tsv"][0]]
    if has_xdg_mime:
        lines.append(f"Or from a terminal, for comma- and tab-separated files: "
                     f"xdg-mime default {APP_ID}.desktop {' '.join(tables)}")
    else:
        mimeapps = _config_home(environ) / "mimeapps.list"
        entries = " and ".join(f"{mime}={APP_ID}.desktop" for mime in tables)
        lines.append(f"Or by hand, for comma- and tab-separated files: add the lines {entries} under the "
                     f"heading [Default Applications] in {visible(mimeapps)} (xdg-mime, the usual tool "
                     "for this, is not installed here).")
    lines.append("twofold --uninstall-desktop-entry takes the registration away again.")
    return lines
