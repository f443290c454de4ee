"""The audit: the shortcut design set beside the rigorous solution, with flags where the simple
method misleads.

* :mod:`.thresholds` -- the flags' thresholds, why each is where it is, how a difference is graded;
* :mod:`.targets` -- product targets: how one reads, how far a solution is from it;
* :mod:`.cmo` -- constant molar overflow checked stage by stage, the CMO duties, pinches;
* :mod:`.variants` -- the rigorous columns of an audit: variants of the case, warm starts, the
  solve budget;
* :mod:`.search` -- the integer search for the stage count a rigorous column needs;
* :mod:`.flags` -- the flags, one constructor per code;
* :mod:`.record` -- the audit as plain data for result.json;
* :mod:`.basis` -- what the shortcut designs for, and its designs (``traystack shortcut``);
* :mod:`.solution` -- the audit of one solution without further solves (``traystack check``);
* :mod:`.full` -- the full audit of a case (``traystack audit``);
* :mod:`.ideal_vapor` -- a vapor from an equation of state against ideal-vapor K-values.
"""

from .basis import audit_basis, shortcut_case, shortcut_designs
from .cmo import CMOAudit, cmo_audit, composition_steps, effective_q, pinch_stage
from .flags import Flag
from .full import audit_case, shortcut_reflux_at
from .findings import AuditBasis, AuditReport, ShortcutReport, SolutionAudit, shortcut_record
from .search import _next_count  # noqa: F401 -- the step rule of the search, which tests check on its own
from .search import CountSearch, StageSearch, search_stage_count, stage_search
from .solution import audit_solution
from .targets import describe_spec, impurity_ratio
from .thresholds import DEFAULT_THRESHOLDS, SEVERITIES, THRESHOLD_REASONS, resolve_thresholds
from .variants import MAX_SOLVES, MIN_SOLVES, RigorousColumns, RigorousRun, column_variant, warm_start

__all__ = [
    "DEFAULT_THRESHOLDS",
    "MAX_SOLVES",
    "MIN_SOLVES",
    "SEVERITIES",
    "THRESHOLD_REASONS",
    "AuditBasis",
    "AuditReport",
    "CMOAudit",
    "CountSearch",
    "Flag",
    "RigorousColumns",
    "RigorousRun",
    "ShortcutReport",
    "SolutionAudit",
    "StageSearch",
    "audit_basis",
    "audit_case",
    "audit_solution",
    "cmo_audit",
    "column_variant",
    "composition_steps",
    "describe_spec",
    "effective_q",
    "impurity_ratio",
    "pinch_stage",
    "resolve_thresholds",
    "search_stage_count",
    "shortcut_case",
    "shortcut_designs",
    "shortcut_record",
    "shortcut_reflux_at",
    "stage_search",
    "warm_start",
]
