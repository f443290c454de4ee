"""The audit of one rigorous solution that needs no further rigorous solve (what ``traystack
check`` records in its baselines): constant molar overflow stage by stage, the feed condition,
the CMO duty estimates at the solution's own reflux ratio and distillate rate against its
duties, and for a binary the pinch of the McCabe-Thiele and Ponchon-Savarit minimum reflux at
its products."""

from __future__ import annotations

import dataclasses
from typing import Mapping

import numpy as np

from ..case import Case, Spec
from ..errors import SpecError, ThermoError
from ..results import Result
from ..shortcut import MinimumReflux, SaturatedEnthalpies
from ..shortcut.mccabe_thiele import binary_problem, check_simple_column, minimum_reflux
from ..shortcut.ponchon_savarit import enthalpy_minimum_reflux
from ..thermo.package import ThermoPackage
from .basis import light_index
from .cmo import cmo_audit, cmo_duty_estimates
from .flags import (Flag, by_severity, cmo_deviation, duty_difference, feed_condition, pinch_moved_by_enthalpies,
                    predicted_pairs, tangent_pinch, two_liquids)
from .findings import RunFlags, SolutionAudit
from .thresholds import resolve_thresholds

__all__ = ["RunFlags", "SolutionAudit", "audit_solution", "run_flags"]


def run_flags(result: Result) -> tuple[Flag, ...]:
    """The flags any solution raises without the shortcut: stages whose liquid would split
    (TWO_LIQUIDS) and binary parameters predicted rather than given (PREDICTED_PAIRS)."""
    return by_severity([two_liquids(result.liquid_split), predicted_pairs(result.thermo)])


def audit_solution(
    case: Case,
    result: Result,
    *,
    thermo: ThermoPackage | None = None,
    thresholds: Mapping[str, float] | None = None,
) -> Result:
    """The audit of one rigorous solution that needs no further rigorous solve. Returns
    ``result`` with ``extra["audit"]``, a :class:`SolutionAudit`; a case the shortcut does not
    treat (side draws, several feeds, no condenser or reboiler) gets ``applicable`` False and
    no flags."""
    chosen = resolve_thresholds(case, thresholds)
    own = run_flags(result)
    try:
        check_simple_column(case, "audit's")
    except SpecError as exc:
        return result.with_extra(audit=SolutionAudit(False, str(exc), flags=own))
    if not result.converged:
        return result.with_extra(audit=SolutionAudit(False, "the solution did not converge", flags=own))
    thermo = thermo or ThermoPackage.from_case(case)
    try:
        audit = _audit(case, result, thermo, chosen)
    except (SpecError, ThermoError) as exc:
        audit = SolutionAudit(False, str(exc), flags=own)
    else:
        audit = dataclasses.replace(audit, flags=by_severity([*audit.flags, *own]))
    return result.with_extra(audit=audit)


def _audit(case: Case, result: Result, thermo: ThermoPackage, chosen: Mapping[str, float]) -> SolutionAudit:
    light, pinches, error = None, None, ""
    flags: list[Flag | None] = []
    if case.component_count == 2:
        light = light_index(case, thermo)
        try:
            pinches = _minimum_reflux_pinches(case, result, thermo, light)
        except (SpecError, ThermoError) as exc:
            error = str(exc)
        else:
            flags += [tangent_pinch("McCabe-Thiele", pinches[0], chosen), tangent_pinch("Ponchon-Savarit", pinches[1], chosen),
                      pinch_moved_by_enthalpies(*pinches)]
    cmo = cmo_audit(result, light)
    estimates = cmo_duty_estimates(result, thermo)
    flags += [cmo_deviation(cmo, chosen), feed_condition(cmo, chosen),
              duty_difference("condenser", estimates[0], result.condenser_duty, "CMO estimate", chosen),
              duty_difference("reboiler", estimates[1], result.reboiler_duty, "CMO estimate", chosen)]
    return SolutionAudit(True, thresholds=chosen, cmo=cmo, duty_estimates=estimates, minimum_reflux=pinches,
                         minimum_reflux_error=error, flags=by_severity(flags))


def _minimum_reflux_pinches(case: Case, result: Result, thermo: ThermoPackage,
                            light: int) -> tuple[MinimumReflux, MinimumReflux]:
    """The minimum reflux of a binary and its pinch at the solution's own products and feed, by
    McCabe-Thiele (the feed or tangent pinch on the equilibrium curve) and by the
    Ponchon-Savarit construction (with the solution's reflux temperature, if subcooled)."""
    name = case.component_names[light]
    x_D = float(result.distillate_composition[light])
    x_B = float(result.bottoms_composition[light])
    specs = (Spec("mole_fraction", x_D, component=name, product="distillate"),
             Spec("mole_fraction", x_B, component=name, product="bottoms"),
             Spec("reflux_ratio", float(result.reflux_ratio)))
    problem = binary_problem(dataclasses.replace(case, specs=specs), thermo)
    pinch = minimum_reflux(problem.curve, x_D, x_B, problem.x_feed, problem.q)
    enthalpies = SaturatedEnthalpies.from_thermo(problem.curve, thermo, problem.light_index)
    reflux_enthalpy = None
    if problem.reflux_temperature is not None:
        composition = np.zeros((1, 2))
        composition[0, light], composition[0, 1 - light] = x_D, 1.0 - x_D
        reflux_enthalpy = float(thermo.liquid_enthalpy(np.array([problem.reflux_temperature]), composition).molar[0])
    enthalpy_pinch, _ = enthalpy_minimum_reflux(
        problem.curve, enthalpies, x_distillate=x_D, x_bottoms=x_B, x_feed=problem.x_feed,
        feed_enthalpy=problem.feed_enthalpy, condenser=problem.condenser, reflux_enthalpy=reflux_enthalpy,
    )
    return pinch, enthalpy_pinch
