"""The full audit of a case: the shortcut design set beside the rigorous columns it stands for,
with flags where the simple method misleads.

For a case with one feed, a condenser and a partial reboiler (no side draws) :func:`audit_case`

1. designs the column by the shortcut for the targets and reflux of :func:`~.basis.audit_basis`;
2. solves the shortcut's column rigorously -- its stage count and feed stage, its reflux ratio
   and its distillate rate -- and reads what purities that column really delivers, how far its
   flows are from constant molar overflow, its duties and where it pinches;
3. finds the reflux ratio the rigorous column needs at the shortcut's stage count and feed
   stage (the product targets as specs) against the shortcut's own reflux for that count;
4. finds the stage count the rigorous column needs at the shortcut's reflux ratio (integer
   search on N, the distillate rate held, the feed stage moved: :mod:`.search`);
5. raises the flags of :mod:`.flags` against the thresholds of :mod:`.thresholds`;
6. for a vapor from an equation of state, asks steps 3 and 4 once more with ideal-vapor
   K-values and flags how far they would move the design (:mod:`.ideal_vapor`).

A binary whose activity model splits the liquid (n-butanol/water) has no monotonic equilibrium
curve, so no shortcut design; when the case as specified then solves to liquids that split, the
audit reports that solution with its TWO_LIQUIDS flag and the reason the shortcut is missing.

Units are SI: K, Pa, mol/s, W, J/mol; compositions are mole fractions.
"""

from __future__ import annotations

import math
import time
from dataclasses import dataclass
from typing import Mapping, Sequence

import numpy as np
from scipy.optimize import brentq

from ..case import Case, Spec
from ..errors import SpecError, ThermoError
from ..results import Result
from ..shortcut import BinaryDesign, MulticomponentDesign
from ..shortcut.fug import gilliland_stages
from ..shortcut.mccabe_thiele import mccabe_thiele
from ..thermo.package import ThermoPackage
from .basis import audit_basis, shortcut_designs
from .cmo import CMOAudit, cmo_audit
from .flags import (Flag, by_severity, cmo_deviation, duty_difference, feed_condition, pinch_moved_by_enthalpies,
                    pinch_moved_in_column, purity_shortfall, reflux_difference, search_incomplete, solve_failed,
                    stage_difference, tangent_pinch, two_liquids)
from .findings import AuditBasis, AuditReport, ShortcutReport
from .ideal_vapor import IdealVaporComparison, ideal_vapor_comparison, ideal_vapor_shift
from .search import StageSearch, stage_search
from .solution import run_flags
from .targets import describe_spec
from .thresholds import resolve_thresholds
from .variants import MAX_SOLVES, MIN_SOLVES, RigorousColumns, RigorousRun, run_summary, try_solve

__all__ = ["AuditReport", "audit_case", "shortcut_reflux_at"]


@dataclass(frozen=True)
class _DesignColumn:
    """The shortcut's column as the rigorous solves take it (SI)."""

    stages: int
    feed_stage: int
    reflux_ratio: float
    distillate_flow: float
    targets: tuple[Spec, ...]
    feed_composition: np.ndarray

    @classmethod
    def of(cls, shortcut: ShortcutReport) -> _DesignColumn:
        design = shortcut.design
        return cls(int(design.stages), int(design.feed_stage), float(design.reflux_ratio), float(design.distillate_flow),
                   shortcut.basis.targets, np.asarray(shortcut.case.feeds[0].composition, dtype=float))

    @property
    def specs(self) -> tuple[Spec, Spec]:
        return (Spec("reflux_ratio", self.reflux_ratio, key="reflux_ratio"),
                Spec("distillate_rate", self.distillate_flow, key="distillate_rate"))

    def summary(self, label: str, result: Result | None, specs: Sequence[Spec], message: str = "") -> RigorousRun:
        """The :class:`RigorousRun` of a solve of this column with ``specs``."""
        return run_summary(label, result, self.stages, self.feed_stage, specs, self.targets, self.feed_composition,
                           message)


def audit_case(
    case: Case,
    *,
    thresholds: Mapping[str, float] | None = None,
    thermo: ThermoPackage | None = None,
    max_solves: int = MAX_SOLVES,
) -> AuditReport:
    """The full audit of ``case``, steps 1-5 of the module docstring. Raises
    :class:`SpecError` for a case the shortcut does not treat or whose specs the shortcut
    cannot meet (a purity beyond an azeotrope, a reflux below the minimum)."""
    if max_solves < MIN_SOLVES:
        raise ValueError(f"the audit needs at least {MIN_SOLVES} rigorous solves, not {max_solves}")
    started = time.perf_counter()
    chosen = resolve_thresholds(case, thresholds)
    thermo = thermo or ThermoPackage.from_case(case)
    columns = RigorousColumns(case, thermo, max_solves)
    basis = audit_basis(case, thermo, columns.solve_case)
    try:
        shortcut = shortcut_designs(case, basis, thermo)
    except ThermoError as exc:
        return _without_shortcut(case, basis, columns, chosen, str(exc), started, exc)
    column = _DesignColumn.of(shortcut)
    solution, at_design = _solve_at_design(columns, column)
    cmo = reflux_needed = search = shortcut_reflux = ideal_vapor = None
    if solution.converged:
        light = case.component_names.index(shortcut.basis.light) if shortcut.basis.light else None
        cmo = cmo_audit(solution, light)
        flags = _flags_at_design(shortcut, column, solution, at_design, cmo, chosen)
        shortcut_reflux = shortcut_reflux_at(shortcut.design, column.stages)
        reflux_needed = _reflux_needed(columns, column)
        search = _stages_needed(columns, column, reflux_needed)
        flags += [
            reflux_difference(reflux_needed, shortcut_reflux, column.reflux_ratio,
                              [describe_spec(t) for t in column.targets], chosen),
            stage_difference(search, column.stages, column.feed_stage, chosen),
            search_incomplete(search, columns.count, max_solves),
        ]
        ideal_vapor = _ideal_vapor(case, thermo, columns, column, reflux_needed, search, max_solves)
        flags.append(ideal_vapor_shift(ideal_vapor, chosen))
    else:
        flags = [solve_failed(column.stages, column.feed_stage, column.reflux_ratio, solution.message)]
    case_result = shortcut.basis.case_result
    flags += run_flags(case_result if case_result is not None and case_result.converged else solution)
    flags.append(two_liquids(shortcut.liquid_split, "equilibrium-curve point"))
    case_run = None if case_result is None else run_summary(
        "rigorous, the case as specified", case_result, case.column.stages, case.feeds[0].stage, case.specs,
        column.targets, column.feed_composition)
    return AuditReport(
        shortcut=shortcut, thresholds=chosen, shortcut_reflux_at_stages=shortcut_reflux, at_design=at_design,
        reflux_needed=reflux_needed, stages_needed=search, cmo=cmo, flags=by_severity(flags), solves=columns.count,
        seconds=time.perf_counter() - started, solution=solution, case_run=case_run,
        notes=shortcut.basis.notes + tuple(shortcut.design.notes) + tuple(columns.notes), ideal_vapor=ideal_vapor,
    )


def _without_shortcut(case: Case, basis: AuditBasis, columns: RigorousColumns, chosen: Mapping[str, float], reason: str,
                      started: float, error: ThermoError) -> AuditReport:
    """The audit of a case the shortcut cannot design for because the liquid splits: the case as
    specified, solved rigorously, with its own flags. Any other property failure is raised."""
    solution = basis.case_result if basis.case_result is not None else columns.solve_case(case)
    if not (solution.converged and solution.liquid_split is not None and solution.liquid_split.split):
        raise error
    feed = case.feeds[0]
    case_run = run_summary("rigorous, the case as specified", solution, case.column.stages, feed.stage, case.specs,
                           basis.targets, np.asarray(feed.composition, dtype=float))
    return AuditReport(
        shortcut=None, thresholds=chosen, shortcut_reflux_at_stages=None, at_design=case_run, reflux_needed=None,
        stages_needed=None, cmo=None, flags=by_severity(list(run_flags(solution))), solves=columns.count,
        seconds=time.perf_counter() - started, solution=solution, case_run=case_run,
        notes=basis.notes + tuple(columns.notes), shortcut_error=reason,
    )


def _ideal_vapor(case: Case, thermo: ThermoPackage, columns: RigorousColumns, column: _DesignColumn,
                 reflux_needed: RigorousRun, search: StageSearch, budget: int) -> IdealVaporComparison | None:
    """For a vapor from an equation of state: the design questions once more with ideal-vapor
    K-values (:mod:`.ideal_vapor`), warm-started from the solutions already found."""
    if not thermo.vapor_dependent:
        return None
    return ideal_vapor_comparison(case, column.stages, column.feed_stage, column.reflux_ratio, column.distillate_flow,
                                  column.targets, column.feed_composition, reflux_needed, search, budget,
                                  seeds=columns.solutions)


def _solve_at_design(columns: RigorousColumns, column: _DesignColumn) -> tuple[Result, RigorousRun]:
    """The shortcut's column solved rigorously at its reflux ratio and distillate rate."""
    result, message = try_solve(columns, column.stages, column.feed_stage, column.specs)
    if result is None:
        raise SpecError(f"the shortcut's column ({column.stages} stages, feed on stage {column.feed_stage}, "
                        f"R = {column.reflux_ratio:.4g}, D = {column.distillate_flow:.6g} mol/s) cannot be solved "
                        f"rigorously: {message}")
    return result, column.summary("rigorous at the shortcut's design", result, column.specs)


def _flags_at_design(shortcut: ShortcutReport, column: _DesignColumn, solution: Result, at_design: RigorousRun,
                     cmo: CMOAudit, chosen: Mapping[str, float]) -> list[Flag | None]:
    """The flags read off the rigorous column at the shortcut's design: purities, CMO, feed
    condition, duties and (binary) the pinches."""
    design = shortcut.design
    N, f, R = column.stages, column.feed_stage, column.reflux_ratio
    estimate = "CMO estimate" if shortcut.basis.method == "binary" else "FUGK CMO estimate"
    flags = [purity_shortfall(describe_spec(target), ratio, N, f, R, chosen)
             for target, ratio in zip(column.targets, at_design.impurity_ratios)]
    flags += [
        cmo_deviation(cmo, chosen),
        feed_condition(cmo, chosen),
        duty_difference("condenser", design.condenser_duty, solution.condenser_duty, estimate, chosen),
        duty_difference("reboiler", design.reboiler_duty, solution.reboiler_duty, estimate, chosen),
    ]
    if isinstance(design, BinaryDesign):
        enthalpy_design = shortcut.enthalpy_design
        flags.append(tangent_pinch("McCabe-Thiele", design.minimum_reflux, chosen))
        if enthalpy_design is not None:
            flags += [tangent_pinch("Ponchon-Savarit", enthalpy_design.minimum_reflux, chosen),
                      pinch_moved_by_enthalpies(design.minimum_reflux, enthalpy_design.minimum_reflux)]
        flags.append(pinch_moved_in_column(solution.x[:, cmo.light], design.stage_x, f, chosen))
    return flags


def _reflux_needed(columns: RigorousColumns, column: _DesignColumn) -> RigorousRun:
    """The rigorous column at the shortcut's stage count and feed stage with the product
    targets as its specs: the reflux it needs."""
    result, message = try_solve(columns, column.stages, column.feed_stage, column.targets)
    return column.summary("reflux needed at the shortcut's stages", result, column.targets, message)


def _stages_needed(columns: RigorousColumns, column: _DesignColumn, reflux_needed: RigorousRun) -> StageSearch:
    """The stage count the rigorous column needs at the shortcut's reflux ratio, the
    distillate rate that of the reflux-needed column (the shortcut's, if that failed)."""
    distillate_flow = float(reflux_needed.distillate_flow) if reflux_needed.converged else column.distillate_flow
    return stage_search(columns, column.reflux_ratio, distillate_flow, column.targets, column.stages,
                        column.feed_stage, column.feed_composition)


def shortcut_reflux_at(design: BinaryDesign | MulticomponentDesign, stages: int) -> float:
    """The shortcut's own reflux ratio for exactly ``stages`` stages (its integer count, so
    that the rigorous reflux at that count is compared like with like): McCabe-Thiele stepping
    with the optimal feed, or the Gilliland-Molokanov correlation, solved for R between the
    minimum and the design reflux by Brent's method (Brent, *Algorithms for Minimization
    without Derivatives*, 1973, ch. 4); the design reflux if its column needs no more stages."""
    if isinstance(design, MulticomponentDesign):
        target = stages - (1 if design.condenser == "total" else 0)

        def gap(R: float) -> float:
            try:
                return gilliland_stages(design.minimum_equilibrium_stages, design.minimum_reflux, R) - target
            except ZeroDivisionError:  # so near the minimum reflux that the correlation's Y rounds to 1
                return math.inf
    else:
        def gap(R: float) -> float:
            try:
                steps = mccabe_thiele(
                    design.curve, x_distillate=design.x_distillate, x_bottoms=design.x_bottoms, x_feed=design.x_feed,
                    q=design.q, reflux_ratio=R, feed_flow=design.feed_flow, condenser=design.condenser,
                )
            except SpecError:
                return math.inf  # below the minimum reflux: no number of stages is enough
            return steps.fractional_stages - stages
    low = design.minimum_reflux_ratio * (1.0 + 1e-9)
    high = design.reflux_ratio
    if gap(high) >= 0.0:
        return float(high)
    if not gap(low) > 0.0:
        return float(low)
    return float(brentq(gap, low, high, xtol=1e-12))
