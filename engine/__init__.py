"""Twofold's engine: from a data file to a defensible two-group comparison, with no GUI.

Importing this package is cheap: the heavy modules (scipy, the procedures) load only when a
submodule that needs them is imported.
"""

__version__ = "0.1.0"
