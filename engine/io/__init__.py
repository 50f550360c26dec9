"""From a user's file to two clean groups, with a screening report.

``read_table`` reads the file (detecting its format), ``propose_layout`` suggests which columns
hold the groups and the values, and ``make_groups`` builds the two groups the user chose, with a
report of everything left out or worth a second look. Files are only ever opened read-only.
"""

from ._files import SUPPORTED_EXTENSIONS, check_regular, file_checksum
from .groups import Intake, make_groups
from .layout import LayoutProposal, propose_layout
from .read import read_table
from .screening import Exclusion, ScreeningReport
from .table import Table

__all__ = [
    "SUPPORTED_EXTENSIONS",
    "read_table",
    "propose_layout",
    "make_groups",
    "file_checksum",
    "check_regular",
    "Table",
    "LayoutProposal",
    "Intake",
    "Exclusion",
    "ScreeningReport",
]
