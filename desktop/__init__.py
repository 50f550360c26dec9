"""Twofold's desktop window (PySide6) on top of the GUI-free ``engine`` package.

Importing this package loads nothing heavy; ``desktop.app.main`` starts the program.
"""

__all__: list[str] = []
