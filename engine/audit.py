"""Where the headless command may write a report: never over a file it reads.

The report itself is ``engine.report.document.html``, the same page the window writes.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Iterable

from .errors import TwofoldError

__all__ = ["refuse_overwriting"]

def refuse_overwriting(target: str | Path, keep: Iterable[str | Path]) -> None:
    """Raise a one-line :class:`TwofoldError` when ``target`` is one of the files in ``keep``
    (the data file, the saved analysis): a report never replaces them."""
    target = Path(target)
    for path in keep:
        try:
            same = target.exists() and Path(path).exists() and os.path.samefile(target, path)
        except OSError:
            same = False
        if same:
            raise TwofoldError(f"The report would replace {Path(path).name}, which it reads; "
                               "write the report to a file of its own (.html).")
