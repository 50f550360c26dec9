"""``python -m engine``: the headless command (see engine.cli)."""

import sys

from .cli import main

sys.exit(main())
