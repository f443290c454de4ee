"""The audit's typed findings: what the shortcut designs for (:class:`AuditBasis`), the
shortcut designs (:class:`ShortcutReport`), the audit of one solution (:class:`SolutionAudit`)
and the full audit of a case (:class:`AuditReport`), each with ``as_json()``, the section of
result.json it becomes (SI units; NaN and infinity become null). They travel on
``Result.extra`` and are turned into JSON only when a file is written.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from functools import cached_property
from typing import Any, ClassVar, Mapping

from ..case import Case, Spec
from ..results import Result
from ..shortcut import BinaryDesign, MinimumReflux, MulticomponentDesign
from .cmo import CMOAudit
from ..thermo.liquid_split import LiquidSplitCheck
from .flags import Flag, two_liquids
from .ideal_vapor import IdealVaporComparison, ideal_vapor_record
from .record import binary_design_record, cmo_deviation_record, multicomponent_design_record, cmo_record, flag_record, run_record, stage_search_record
from .search import StageSearch
from .targets import describe_spec
from .thresholds import THRESHOLD_REASONS
from .variants import RigorousRun

__all__ = [
    "AuditBasis",
    "AuditReport",
    "RunFlags",
    "ShortcutReport",
    "SolutionAudit",
    "full_audit_record",
    "shortcut_record",
    "solution_audit_record",
]


@dataclass(frozen=True)
class AuditBasis:
    """What the shortcut designs for: the product ``targets`` (specs of kind mole_fraction,
    recovery or product rate), the reflux (``reflux_ratio`` or ``reflux_factor`` times the
    minimum), where each came from (``sources``: quantity -> "audit table" | "case specs" |
    "rigorous solution of the case as specified"), and the rigorous solution of the case as
    specified when one was needed (``case_result``)."""

    method: str  # "binary" | "multicomponent"
    targets: tuple[Spec, ...]
    reflux_ratio: float | None
    reflux_factor: float | None
    sources: Mapping[str, str]
    light: str | None = None  # binary: the light component
    case_result: Result | None = None
    notes: tuple[str, ...] = ()

    @property
    def described_targets(self) -> tuple[str, ...]:
        """The targets as lines of text (:func:`~.targets.describe_spec`)."""
        return tuple(describe_spec(t) for t in self.targets)

    def design_case(self, case: Case) -> Case:
        """The case with its specs replaced by the targets (and the reflux ratio, if fixed)."""
        specs = self.targets + ((Spec("reflux_ratio", self.reflux_ratio, key="reflux_ratio"),) if self.reflux_ratio else ())
        return dataclasses.replace(case, specs=specs)


@dataclass(frozen=True, eq=False)
class ShortcutReport:
    """The shortcut designs of a case: ``design`` (McCabe-Thiele or FUGK), for a binary also
    ``enthalpy_design`` (Ponchon-Savarit, None if it failed, with ``enthalpy_message``), and the
    basis they were designed for. ``as_json()`` is result.json's "shortcut"."""

    case: Case
    basis: AuditBasis
    design: BinaryDesign | MulticomponentDesign
    enthalpy_design: BinaryDesign | None = None
    enthalpy_message: str = ""
    liquid_split: LiquidSplitCheck | None = None  # the binary equilibrium curve's liquids tested for a split

    @property
    def is_binary(self) -> bool:
        return isinstance(self.design, BinaryDesign)

    def as_json(self) -> dict[str, Any]:
        return shortcut_record(self)


def shortcut_record(report: ShortcutReport) -> dict[str, Any]:
    """The shortcut designs and their basis as plain data (SI): result.json and shortcut.json
    "shortcut"."""
    design = report.design
    record = binary_design_record(design) if isinstance(design, BinaryDesign) else multicomponent_design_record(design)
    record["basis"] = {
        "targets": list(report.basis.described_targets),
        "reflux_ratio": report.basis.reflux_ratio,
        "reflux_factor": report.basis.reflux_factor,
        "sources": dict(report.basis.sources),
        "notes": list(report.basis.notes),
    }
    if report.liquid_split is not None:
        record["liquid_stability"] = report.liquid_split.as_json()
        flag = two_liquids(report.liquid_split, "equilibrium-curve point")
        record["flags"] = [] if flag is None else [flag_record(flag)]
    if report.is_binary:
        record["ponchon_savarit"] = None if report.enthalpy_design is None else binary_design_record(report.enthalpy_design)
        if report.enthalpy_message:
            record["ponchon_savarit_error"] = report.enthalpy_message
    return record



@dataclass(frozen=True)
class RunFlags:
    """The flags of :func:`~.solution.run_flags`, attached to a result by ``traystack run`` under
    ``extra["flags"]``; ``as_json()`` is result.json's "flags"."""

    flags: tuple[Flag, ...] = ()

    def as_json(self) -> list[dict[str, Any]]:
        return [flag_record(flag) for flag in self.flags]


@dataclass(frozen=True, eq=False)
class SolutionAudit:
    """What :func:`audit_solution` found. ``applicable`` False (with the ``reason``) for a case
    the shortcut does not treat or a solution that did not converge; otherwise the ``cmo``
    audit, the CMO ``duty_estimates`` (condenser, reboiler; W), for a binary the
    ``minimum_reflux`` pinches (McCabe-Thiele, Ponchon-Savarit) or the ``minimum_reflux_error``
    that prevented them, and the ``flags``. ``as_json()`` is result.json's "audit"."""

    scope: ClassVar[str] = "solution"

    applicable: bool
    reason: str = ""
    thresholds: Mapping[str, float] = field(default_factory=dict)
    cmo: CMOAudit | None = None
    duty_estimates: tuple[float, float] | None = None
    minimum_reflux: tuple[MinimumReflux, MinimumReflux] | None = None
    minimum_reflux_error: str = ""
    flags: tuple[Flag, ...] = ()

    def as_json(self) -> dict[str, Any]:
        return solution_audit_record(self)


def solution_audit_record(audit: SolutionAudit) -> dict[str, Any]:
    """result.json "audit" of :func:`~.solution.audit_solution` (``scope`` "solution")."""
    if not audit.applicable:
        return {"scope": "solution", "applicable": False, "reason": audit.reason,
                "flags": [flag_record(flag) for flag in audit.flags]}
    if audit.minimum_reflux_error:
        minimum_reflux: dict[str, Any] | None = {"error": audit.minimum_reflux_error}
    elif audit.minimum_reflux is not None:
        mccabe_thiele, ponchon_savarit = audit.minimum_reflux
        minimum_reflux = {"mccabe_thiele": dataclasses.asdict(mccabe_thiele),
                          "ponchon_savarit": dataclasses.asdict(ponchon_savarit)}
    else:
        minimum_reflux = None
    condenser, reboiler = audit.duty_estimates
    return {
        "scope": "solution",
        "applicable": True,
        "thresholds": dict(audit.thresholds),
        "cmo": cmo_record(audit.cmo),
        "cmo_deviation": cmo_deviation_record(audit.cmo),
        "cmo_duty_estimates": {"condenser": condenser, "reboiler": reboiler},
        "minimum_reflux": minimum_reflux,
        "flags": [flag_record(flag) for flag in audit.flags],
    }


@dataclass(frozen=True, eq=False)
class AuditReport:
    """Everything :func:`audit_case` found: the ``shortcut`` designs, the rigorous runs (at
    the shortcut's design, the reflux needed at its stage count, the stage search at its
    reflux, the case as specified when it was solved), the CMO audit of the run at the design,
    the flags, the solves used and the time taken. ``solution`` is the rigorous solution of the
    shortcut's column; ``result`` is that solution with ``extra["shortcut"]`` and
    ``extra["audit"]`` (this report) attached. ``as_json()`` is result.json's "audit".
    ``shortcut`` None (with ``shortcut_error``, why): no shortcut design was possible, and
    ``solution`` is the case as specified."""

    scope: ClassVar[str] = "full"
    applicable: ClassVar[bool] = True

    shortcut: ShortcutReport | None
    thresholds: Mapping[str, float]
    shortcut_reflux_at_stages: float | None
    at_design: RigorousRun
    reflux_needed: RigorousRun | None
    stages_needed: StageSearch | None
    cmo: CMOAudit | None
    flags: tuple[Flag, ...]
    solves: int
    seconds: float
    solution: Result
    case_run: RigorousRun | None = None
    notes: tuple[str, ...] = ()
    shortcut_error: str = ""
    ideal_vapor: IdealVaporComparison | None = None  # a vapor from an equation of state against an ideal vapor

    @cached_property
    def result(self) -> Result:
        if self.shortcut is None:
            return self.solution.with_extra(audit=self)
        return self.solution.with_extra(shortcut=self.shortcut, audit=self)

    def as_json(self) -> dict[str, Any]:
        return full_audit_record(self)


def full_audit_record(report: AuditReport) -> dict[str, Any]:
    """result.json "audit" of :func:`~.full.audit_case` (``scope`` "full")."""
    names = list(report.solution.components)
    cmo, case_run = report.cmo, report.case_run
    needed, search = report.reflux_needed, report.stages_needed
    basis = None if report.shortcut is None else report.shortcut.basis
    return {
        "scope": "full",
        "applicable": True,
        "basis": None if basis is None else {
            "method": basis.method,
            "targets": list(basis.described_targets),
            "reflux_ratio": report.shortcut.design.reflux_ratio,
            "reflux_factor": basis.reflux_factor,
            "sources": dict(basis.sources),
        },
        "shortcut_error": report.shortcut_error or None,
        "thresholds": dict(report.thresholds),
        "threshold_reasons": dict(THRESHOLD_REASONS),
        "shortcut_reflux_at_shortcut_stages": report.shortcut_reflux_at_stages,
        "rigorous_at_shortcut_design": run_record(report.at_design, names),
        "reflux_at_shortcut_stages": None if needed is None else run_record(needed, names),
        "stages_at_shortcut_reflux": None if search is None else stage_search_record(search, names),
        "case_as_specified": None if case_run is None else run_record(case_run, names),
        "cmo": None if cmo is None else cmo_record(cmo),
        "cmo_deviation": None if cmo is None else cmo_deviation_record(cmo),
        "flags": [flag_record(flag) for flag in report.flags],
        "ideal_vapor": None if report.ideal_vapor is None else ideal_vapor_record(report.ideal_vapor, names,
                                                                                   report.thresholds),
        "rigorous_solves": report.solves,
        "seconds": report.seconds,
        "notes": list(report.notes),
    }
