"""One panel on its own over a file, for a quick look by hand: ``python -m desktop.<panel> FILE``.

Each panel's ``__main__`` calls :func:`show_alone`; the panels import this module, never the
program's entry point or the main window above them.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any, Sequence

__all__ = ["DEFAULT_FILE", "prepared_session", "show_alone"]

DEFAULT_FILE = Path(__file__).resolve().parent.parent / "demo_files" / "adhesive_cure_times.csv"


def prepared_session(path: Path) -> Any:
    """A session over ``path`` with the engine's proposed layout, the groups and the analysis.

    Runs on the calling thread (for pictures and quick looks, not for the window). When the
    groups cannot be formed the session holds the reason as its ``problem``, as in the window.
    """
    from engine import pipeline
    from engine.errors import TwofoldError
    from engine.session import Session
    from engine.spec import AnalysisSpec

    session = Session()
    spec = AnalysisSpec(source=pipeline.source_for(path))
    table = pipeline.read(spec)
    session.store("table", table)
    try:
        spec = pipeline.complete(table, spec).with_seed()
        session.adopt(spec)
        intake = pipeline.form_groups(table, spec)
    except TwofoldError as problem:
        session.store("problem", str(problem))
        return session
    if spec.layout == "long":
        spec = spec.replace(groups=tuple(intake.groups.labels))
        session.adopt(spec)
    session.store("intake", intake)
    session.store("analysis", pipeline.run(intake, spec))
    return session


def show_alone(panel_class: type, argv: Sequence[str]) -> int:  # pragma: no cover - a look by hand
    """Show one panel over the file ``argv[1]`` (default: :data:`DEFAULT_FILE`) until it is closed."""
    from PySide6.QtWidgets import QApplication

    app = QApplication.instance() or QApplication(list(argv[:1]))
    session = prepared_session(Path(argv[1]) if len(argv) > 1 else DEFAULT_FILE)
    panel = panel_class(session)
    panel.resize(1000, 900)
    panel.show()
    return app.exec()
