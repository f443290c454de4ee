"""The audit as plain data: what result.json holds under "shortcut" and "audit" (and
shortcut.json under "shortcut"), built from the audit's typed findings only when a file is
written. SI units; NaN and infinity become null in the file (:func:`solver.results.json_safe`).
"""

from __future__ import annotations

import dataclasses
from typing import TYPE_CHECKING, Any, Sequence

import numpy as np

from ..results import json_safe
from ..shortcut import BinaryDesign, MulticomponentDesign
from .cmo import CMOAudit
from .flags import Flag, two_liquids
from .search import StageSearch
from .thresholds import THRESHOLD_REASONS
from .variants import RigorousRun

if TYPE_CHECKING:  # the three kinds of record below; their modules import this one
    from .basis import ShortcutReport
    from .full import AuditReport
    from .solution import SolutionAudit

__all__ = [
    "cmo_record",
    "flag_record",
    "full_audit_record",
    "run_record",
    "shortcut_record",
    "solution_audit_record",
    "stage_search_record",
]


def flag_record(flag: Flag) -> dict[str, Any]:
    """A flag: code, severity, message and its numbers."""
    return {"code": flag.code, "severity": flag.severity, "message": flag.message, "numbers": dict(flag.numbers)}


def run_record(run: RigorousRun, components: Sequence[str]) -> dict[str, Any]:
    """A rigorous run, its product compositions keyed by component name."""
    return {
        "label": run.label,
        "stages": run.stages,
        "feed_stage": run.feed_stage,
        "specs": list(run.specs),
        "converged": run.converged,
        "message": run.message,
        "reflux_ratio": run.reflux_ratio,
        "distillate_flow": run.distillate_flow,
        "bottoms_flow": run.bottoms_flow,
        "distillate_composition": dict(zip(components, run.distillate_composition)),
        "bottoms_composition": dict(zip(components, run.bottoms_composition)),
        "condenser_duty": run.condenser_duty,
        "reboiler_duty": run.reboiler_duty,
        "impurity_ratios": list(run.impurity_ratios),
    }


def stage_search_record(search: StageSearch, components: Sequence[str]) -> dict[str, Any]:
    """The stage search: its answer, every (stages, feed stage) tried, the run it found."""
    return {
        "reflux_ratio": search.reflux_ratio,
        "distillate_flow": search.distillate_flow,
        "stages": search.stages,
        "feed_stage": search.feed_stage,
        "complete": search.complete,
        "largest_infeasible_stages": search.largest_infeasible,
        "tried": [{"stages": n, "feed_stage": f, "worst_impurity_ratio": s} for n, f, s in search.tried],
        "run": None if search.run is None else run_record(search.run, components),
    }


def cmo_record(cmo: CMOAudit) -> dict[str, Any]:
    """The CMO audit: its basis, the largest deviations and every stage."""
    stages = []
    for j in range(cmo.liquid.size):
        stages.append({
            "stage": j + 1,
            "L": float(cmo.liquid[j]),
            "L_cmo": float(cmo.liquid_cmo[j]),
            "liquid_deviation": json_safe(cmo.liquid_deviation[j]),
            "V": float(cmo.vapor[j]),
            "V_cmo": float(cmo.vapor_cmo[j]),
            "vapor_deviation": json_safe(cmo.vapor_deviation[j]),
            "line_distance": None if cmo.line_distance is None else json_safe(cmo.line_distance[j]),
        })
    liquid, liquid_stage = cmo.largest_liquid_deviation
    vapor, vapor_stage = cmo.largest_vapor_deviation
    distance, distance_stage = cmo.largest_line_distance
    return {
        "feed_stage": cmo.feed_stage,
        "q": cmo.q,
        "q_effective": cmo.q_effective,
        "reflux_ratio": cmo.reflux_ratio,
        "distillate_flow": cmo.distillate_flow,
        "feed_flow": cmo.feed_flow,
        "largest_liquid_deviation": {"value": json_safe(liquid), "stage": liquid_stage},
        "largest_vapor_deviation": {"value": json_safe(vapor), "stage": vapor_stage},
        "largest_line_distance": {"value": json_safe(distance), "stage": distance_stage},
        "stages": stages,
    }


def _cmo_deviation_record(cmo: CMOAudit) -> list[dict[str, Any]]:
    """The relative deviation of the liquid and the vapor from CMO, stage by stage."""
    return [
        {"stage": j + 1, "liquid": json_safe(cmo.liquid_deviation[j]), "vapor": json_safe(cmo.vapor_deviation[j])}
        for j in range(cmo.liquid.size)
    ]


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
        "cmo_deviation": _cmo_deviation_record(audit.cmo),
        "cmo_duty_estimates": {"condenser": condenser, "reboiler": reboiler},
        "minimum_reflux": minimum_reflux,
        "flags": [flag_record(flag) for flag in audit.flags],
    }


def full_audit_record(report: AuditReport) -> dict[str, Any]:
    """result.json "audit" of :func:`~.full.audit_case` (``scope`` "full")."""
    names = list(report.shortcut.case.component_names)
    basis, cmo, case_run = report.shortcut.basis, report.cmo, report.case_run
    needed, search = report.reflux_needed, report.stages_needed
    return {
        "scope": "full",
        "applicable": True,
        "basis": {
            "method": basis.method,
            "targets": list(basis.described_targets),
            "reflux_ratio": report.shortcut.design.reflux_ratio,
            "reflux_factor": basis.reflux_factor,
            "sources": dict(basis.sources),
        },
        "thresholds": dict(report.thresholds),
        "threshold_reasons": dict(THRESHOLD_REASONS),
        "shortcut_reflux_at_shortcut_stages": report.shortcut_reflux_at_stages,
        "rigorous_at_shortcut_design": run_record(report.at_design, names),
        "reflux_at_shortcut_stages": None if needed is None else run_record(needed, names),
        "stages_at_shortcut_reflux": None if search is None else stage_search_record(search, names),
        "case_as_specified": None if case_run is None else run_record(case_run, names),
        "cmo": None if cmo is None else cmo_record(cmo),
        "cmo_deviation": None if cmo is None else _cmo_deviation_record(cmo),
        "flags": [flag_record(flag) for flag in report.flags],
        "rigorous_solves": report.solves,
        "seconds": report.seconds,
        "notes": list(report.notes),
    }


def _binary_record(design: BinaryDesign) -> dict[str, Any]:
    pinch = design.minimum_reflux
    record = {
        "method": design.method,
        "light": design.light,
        "heavy": design.heavy,
        "pressure": design.pressure,
        "condenser": design.condenser,
        "feed_flow": design.feed_flow,
        "x_feed": design.x_feed,
        "q": design.q,
        "distillate_flow": design.distillate_flow,
        "bottoms_flow": design.bottoms_flow,
        "x_distillate": design.x_distillate,
        "x_bottoms": design.x_bottoms,
        "reflux_ratio": design.reflux_ratio,
        "boilup_ratio": design.boilup_ratio,
        "reflux_factor": design.reflux_factor,
        "minimum_reflux": dataclasses.asdict(pinch),
        "minimum_stages": design.minimum_stages,
        "minimum_equilibrium_stages": design.minimum_equilibrium_stages,
        "stages": design.stages,
        "fractional_stages": design.fractional_stages,
        "equilibrium_stages": design.equilibrium_stages,
        "feed_stage": design.feed_stage,
        "optimal_feed_stage": design.optimal_feed_stage,
        "stage_x": design.stage_x,
        "stage_y": design.stage_y,
        "stage_temperature": design.stage_temperature,
        "liquid_flow": design.liquid_flow,
        "vapor_flow": design.vapor_flow,
        "staircase": design.staircase,
        "rectifying_line": None if design.rectifying_line is None else dataclasses.asdict(design.rectifying_line),
        "stripping_line": None if design.stripping_line is None else dataclasses.asdict(design.stripping_line),
        "intersection": list(design.intersection),
        "condenser_duty": design.condenser_duty,
        "reboiler_duty": design.reboiler_duty,
        "notes": list(design.notes),
    }
    if design.enthalpy is not None:
        e = design.enthalpy
        record["enthalpy"] = {
            "feed_enthalpy": e.feed_enthalpy,
            "top_difference_point": list(e.top_difference_point),
            "bottom_difference_point": list(e.bottom_difference_point),
            "minimum_top_difference_enthalpy": e.minimum_top_difference_enthalpy,
            "reflux_enthalpy": e.reflux_enthalpy,
            "stage_liquid_enthalpy": e.stage_liquid_enthalpy,
            "stage_vapor_enthalpy": e.stage_vapor_enthalpy,
        }
    return record


def _multicomponent_record(design: MulticomponentDesign) -> dict[str, Any]:
    names = design.components
    per = lambda values: dict(zip(names, np.asarray(values, dtype=float).tolist()))  # noqa: E731
    return {
        "method": "Fenske-Underwood-Gilliland-Kirkbride",
        "light_key": design.light_key,
        "heavy_key": design.heavy_key,
        "condenser": design.condenser,
        "top_pressure": design.top_pressure,
        "bottom_pressure": design.bottom_pressure,
        "feed_flow": design.feed_flow,
        "feed_composition": per(design.feed_composition),
        "q": design.q,
        "distillate_flow": design.distillate_flow,
        "bottoms_flow": design.bottoms_flow,
        "x_distillate": per(design.x_distillate),
        "x_bottoms": per(design.x_bottoms),
        "top_temperature": design.top_temperature,
        "bottom_temperature": design.bottom_temperature,
        "relative_volatility": per(design.relative_volatility),
        "relative_volatility_top": per(design.relative_volatility_top),
        "relative_volatility_bottom": per(design.relative_volatility_bottom),
        "minimum_equilibrium_stages": design.minimum_equilibrium_stages,
        "minimum_stages": design.minimum_stages,
        "underwood_roots": list(design.underwood_roots),
        "distributing_components": list(design.distributing_components),
        "minimum_reflux": design.minimum_reflux,
        "minimum_vapor_flow": design.minimum_vapor_flow,
        "minimum_reflux_distillate_flows": per(design.minimum_reflux_distillate_flows),
        "reflux_ratio": design.reflux_ratio,
        "gilliland_x": design.gilliland_x,
        "gilliland_y": design.gilliland_y,
        "equilibrium_stages": design.equilibrium_stages,
        "stages": design.stages,
        "rectifying_stages": design.rectifying_stages,
        "stripping_stages": design.stripping_stages,
        "feed_stage": design.feed_stage,
        "condenser_duty": design.condenser_duty,
        "reboiler_duty": design.reboiler_duty,
        "notes": list(design.notes),
    }


def shortcut_record(report: ShortcutReport) -> dict[str, Any]:
    """The shortcut designs and their basis as plain data (SI): result.json and shortcut.json
    "shortcut"."""
    design = report.design
    record = _binary_record(design) if isinstance(design, BinaryDesign) else _multicomponent_record(design)
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
        record["ponchon_savarit"] = None if report.enthalpy_design is None else _binary_record(report.enthalpy_design)
        if report.enthalpy_message:
            record["ponchon_savarit_error"] = report.enthalpy_message
    return record
