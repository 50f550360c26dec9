"""``python -m desktop [FILE]`` runs the window (the same as the ``twofold`` command)."""

import sys

from .app import main

__all__: list[str] = []

sys.exit(main())
