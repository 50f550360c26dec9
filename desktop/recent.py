"""The list of recently opened files, kept in the user's settings (never beside the data)."""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import QSettings

__all__ = ["RecentFiles", "MAX_RECENT", "menu_labels"]

MAX_RECENT = 8
_KEY = "recent/files"


class RecentFiles:
    """Most recent first, without duplicates, at most :data:`MAX_RECENT` paths."""

    def __init__(self, settings: QSettings) -> None:
        self._settings = settings

    def paths(self) -> list[Path]:
        stored = self._settings.value(_KEY, [])
        if isinstance(stored, str):  # QSettings returns a lone entry as a string
            stored = [stored]
        return [Path(item) for item in (stored or []) if item]

    def _write(self, paths: list[Path]) -> None:
        self._settings.setValue(_KEY, [str(p) for p in paths[:MAX_RECENT]])
        self._settings.sync()

    def add(self, path: Path) -> None:
        path = Path(path).resolve()
        self._write([path, *(p for p in self.paths() if p != path)])

    def remove(self, path: Path) -> None:
        path = Path(path).resolve()
        self._write([p for p in self.paths() if p != path])

    def clear(self) -> None:
        self._write([])


def menu_labels(paths: list[Path]) -> list[str]:
    """The text of each path in the recent menu: its name, and where two or more share a name,
    the end of its folder as well, as far back as it takes to tell them apart."""
    labels = [path.name for path in paths]
    for name in {label for label in labels if labels.count(label) > 1}:
        places = [i for i, path in enumerate(paths) if path.name == name]
        folders = [paths[i].parent.parts for i in places]
        depth = 1
        while depth < max(len(parts) for parts in folders) and \
                len({parts[-depth:] for parts in folders}) < len(folders):
            depth += 1
        for i, parts in zip(places, folders):
            shown = "/".join(parts[-depth:]).replace("//", "/")
            labels[i] = f"{name}  ({'…/' if depth < len(parts) else ''}{shown})"
    return labels
