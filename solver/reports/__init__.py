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

import importlib
import types

#: public name -> the submodule that defines it; imported on first use, so that reading the
#: general caution (``--help``) does not pay for the result and case modules
_WHERE = {
    **dict.fromkeys(("SIDE_BY_SIDE_NOTE", "audit_markdown", "audit_tables", "basis_rows", "cmo_rows", "flag_rows",
                     "shortcut_rows", "shortcut_tables", "side_by_side_rows"), "audit_tables"),
    **dict.fromkeys(("CAUTION", "cautions"), "cautions"),
    **dict.fromkeys(("DisplayUnits", "display_units"), "display"),
    **dict.fromkeys(("spec_rows", "summary_tables"), "run_tables"),
    **dict.fromkeys(("summary_markdown", "write_summary"), "summary"),
}

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


def __getattr__(name: str):
    if name in _WHERE:
        value = getattr(importlib.import_module(f".{_WHERE[name]}", __name__), name)
        globals()[name] = value
        # importing a submodule binds its name here; where a function has that name, the
        # function is meant (audit_tables, cautions)
        for clash in set(_WHERE) & set(_WHERE.values()):
            if isinstance(globals().get(clash), types.ModuleType):
                globals()[clash] = getattr(globals()[clash], clash)
        return value
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
