"""What a person reads about a column solution: screen tables (rich) and ``summary.md``.

Everything is built from a :class:`~solver.results.Result` alone (with the shortcut designs and
the audit when they are attached to it), shown in the display units of the case's
``[display]`` table or of the ``--units`` option; values inside stay SI, only the text is
converted.

* :mod:`.display` -- screen units, table cells, Markdown and screen tables;
* :mod:`.cautions` -- the cautions shown with a result, the general one last;
* :mod:`.run_tables` -- the screen tables of a solution (``traystack run``);
* :mod:`.audit_tables` -- the shortcut's and the audit's tables and summary sections;
* :mod:`.summary` -- ``summary.md``.
"""

from .audit_tables import (SIDE_BY_SIDE_NOTE, audit_markdown, audit_tables, basis_rows, cmo_rows, flag_rows,
                           shortcut_rows, shortcut_tables, side_by_side_rows)
from .cautions import CAUTION, cautions
from .display import DisplayUnits, display_units
from .run_tables import spec_rows, summary_tables
from .summary import summary_markdown, write_summary

__all__ = [
    "CAUTION",
    "SIDE_BY_SIDE_NOTE",
    "DisplayUnits",
    "audit_markdown",
    "audit_tables",
    "basis_rows",
    "cautions",
    "cmo_rows",
    "display_units",
    "flag_rows",
    "shortcut_rows",
    "shortcut_tables",
    "side_by_side_rows",
    "spec_rows",
    "summary_markdown",
    "summary_tables",
    "write_summary",
]
