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
    from engine import io
    from engine.analysis import Options, analyze
    from engine.errors import TwofoldError
    from engine.session import Session

    session = Session()
    table = io.read_table(path)
    proposal = io.propose_layout(table)
    long = proposal.layout == "long"
    columns = tuple(proposal.value_columns[:1] if long else proposal.value_columns)
    session.choose(path=Path(path), layout=proposal.layout, group_column=proposal.group_column,
                   value_columns=columns)
    session.store("table", table)
    try:
        intake = io.make_groups(table, values=columns[0] if long else columns, group=proposal.group_column)
    except TwofoldError as problem:
        session.store("problem", str(problem))
        return session
    session.store("intake", intake)
    choices = session.choices
    options = Options(alternative=choices.alternative, confidence_level=choices.confidence_level,
                      n_resamples=choices.n_resamples, seed=choices.seed)
    source = {"file": Path(path).name, "sheet": choices.sheet,
              "columns": [c for c in (proposal.group_column, *columns) if c],
              "group_column": proposal.group_column, "value_columns": list(columns)}
    session.store("analysis", analyze(intake.groups, options, screening=intake.screening, source=source))
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
