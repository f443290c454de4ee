"""Binary operating-line design (McCabe & Thiele, Ind. Eng. Chem. 17 (1925) 605) on the case's
own thermodynamics.

The construction, each step in its own module:

* the **equilibrium curve** at the design pressure from the case's thermo package, its
  azeotropes and the product purities they allow (:mod:`.equilibrium_curve`);
* the case's **feed, products and reflux** (:mod:`.binary_case`);
* the **operating lines** under constant molar overflow, rectifying ``y = (L/V) x + D x_D / V``
  and stripping ``y = (L'/V') x - B x_B / V'`` with ``L' = L + q F``, ``V' = V - (1 - q) F``
  (:mod:`.operating_lines`);
* the **minimum reflux** from the feed pinch or a tangent pinch (:mod:`.pinches`);
* the **stage stepping** from the top, counted as traystack counts stages (a total condenser is
  stage 1, the reboiler stage N), with the optimal or a given feed stage, and the minimum
  stages at total reflux (:mod:`.stepping`).

This module puts them together: :func:`mccabe_thiele` on a given curve, compositions, q and
reflux, :func:`design_binary` from a case. The condenser and reboiler duties are CMO estimates
from the products' latent heats.

Units are SI: K, Pa, mol/s, W, J/mol. Compositions are mole fractions of the light component.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Sequence

import numpy as np

from ..case import Case
from ..errors import SpecError
from ..thermo.package import ThermoPackage
from .binary_case import BinaryProblem, binary_problem
from .equilibrium_curve import Azeotrope, EquilibriumCurve, check_product_purities
from .operating_lines import OperatingLine, SectionFlows, product_flows, section_flows
from .pinches import MinimumReflux, check_reflux_above_minimum, feed_pinch, minimum_reflux
from .simple_column import check_simple_column, feed_condition
from .stepping import step_with_optimal_feed, stepping_fields, total_reflux_stages

# The names from Azeotrope to total_reflux_stages below are defined in the modules above and
# stay importable from here, where the rest of the package has always found them.
__all__ = [
    "BinaryDesign",
    "design_binary",
    "mccabe_thiele",
    "Azeotrope",
    "BinaryProblem",
    "EquilibriumCurve",
    "MinimumReflux",
    "OperatingLine",
    "binary_problem",
    "check_simple_column",
    "feed_condition",
    "feed_pinch",
    "minimum_reflux",
    "stepping_fields",
    "total_reflux_stages",
]


@dataclass(frozen=True, eq=False)
class BinaryDesign:
    """A binary shortcut design. Flows mol/s, duties W (heat added: the condenser's is
    negative), temperatures K, pressures Pa, compositions light-component mole fractions.

    Stage arrays run from the top, traystack numbering (stage 1 is the condenser, stage N the
    reboiler): ``stage_x`` liquid leaving each stage (a total condenser's is ``x_D``), ``stage_y``
    vapor leaving each stage (for a total condenser, ``x_D`` by convention: its vapor flow is
    zero), ``liquid_flow``/``vapor_flow`` as in the result file (a total condenser's liquid is
    the reflux, the reboiler's the bottoms). The last stage usually steps past ``x_B``;
    ``fractional_stages`` counts it as the fraction actually needed.

    ``stages`` and ``minimum_stages`` count as traystack does (condenser + trays + reboiler);
    ``equilibrium_stages`` and ``minimum_equilibrium_stages`` leave out a total condenser (they
    are the textbook counts, reboiler included). ``staircase`` holds the vertices of the
    McCabe-Thiele steps for plotting, starting at ``(x_D, x_D)``."""

    method: str
    light: str
    heavy: str
    pressure: float
    condenser: str
    curve: EquilibriumCurve
    feed_flow: float
    x_feed: float
    q: float
    distillate_flow: float
    bottoms_flow: float
    x_distillate: float
    x_bottoms: float
    reflux_ratio: float
    boilup_ratio: float
    minimum_reflux: MinimumReflux
    minimum_stages: float
    minimum_equilibrium_stages: float
    stages: int
    fractional_stages: float
    equilibrium_stages: float
    feed_stage: int
    optimal_feed_stage: int
    stage_x: np.ndarray
    stage_y: np.ndarray
    stage_temperature: np.ndarray
    liquid_flow: np.ndarray
    vapor_flow: np.ndarray
    staircase: np.ndarray
    rectifying_line: OperatingLine | None
    stripping_line: OperatingLine | None
    intersection: tuple[float, float]
    condenser_duty: float
    reboiler_duty: float
    enthalpy: object | None = None  # ponchon_savarit.EnthalpyConstruction for that method
    notes: tuple[str, ...] = ()

    @property
    def minimum_reflux_ratio(self) -> float:
        return self.minimum_reflux.ratio

    @property
    def reflux_factor(self) -> float:
        """R / R_min."""
        return self.reflux_ratio / self.minimum_reflux.ratio if self.minimum_reflux.ratio > 0 else float("inf")


def _cmo_duties(
    sections: SectionFlows, condenser: str, latent_heat: Callable[[float], float] | None, x_distillate: float,
    x_bottoms: float,
) -> tuple[float, float]:
    """Condenser and reboiler duties (W) under constant molar overflow: ``Q_C = -V lambda(x_D)``
    for a total condenser (a partial one condenses only the reflux, ``-L lambda(x_D)``) and
    ``Q_R = V' lambda(x_B)``; NaN without a latent heat."""
    if latent_heat is None:
        return float("nan"), float("nan")
    latent_top, latent_bottom = latent_heat(x_distillate), latent_heat(x_bottoms)
    condenser_duty = -(sections.vapor if condenser == "total" else sections.liquid) * latent_top
    reboiler_duty = sections.stripping_vapor * latent_bottom
    return float(condenser_duty), float(reboiler_duty)


def mccabe_thiele(
    curve: EquilibriumCurve,
    *,
    x_distillate: float,
    x_bottoms: float,
    x_feed: float,
    q: float,
    reflux_ratio: float,
    feed_flow: float = 1.0,
    condenser: str = "total",
    feed_stage: int | None = None,
    latent_heat: Callable[[float], float] | None = None,
    notes: Sequence[str] = (),
) -> BinaryDesign:
    """The McCabe-Thiele construction (McCabe & Thiele 1925) on a given equilibrium curve.

    ``x_*`` are light mole fractions, ``q`` the feed's thermal condition, ``reflux_ratio`` L/D,
    ``feed_flow`` mol/s, ``condenser`` "total" or "partial" (for a partial condenser ``x_D`` is
    the vapor product). ``feed_stage`` (traystack numbering) fixes where the lines switch;
    None takes the optimal stage. ``latent_heat(x)`` (J/mol, saturated vapor of composition x to
    saturated liquid) gives the CMO duty estimates ``Q_C = -V lambda(x_D)`` (total condenser; a
    partial one condenses only the reflux, ``-L lambda(x_D)``) and ``Q_R = V' lambda(x_B)``; NaN
    without it."""
    if condenser not in ("total", "partial"):
        raise SpecError(f"the binary design needs a total or partial condenser, not {condenser!r}")
    check_product_purities(curve, x_distillate, x_bottoms, x_feed)
    D, B = product_flows(feed_flow, x_feed, x_distillate, x_bottoms)
    pinch = minimum_reflux(curve, x_distillate, x_bottoms, x_feed, q)
    check_reflux_above_minimum(reflux_ratio, pinch, curve, x_distillate, x_bottoms)
    sections = section_flows(reflux_ratio, q, feed_flow, D, x_distillate, x_bottoms)
    top, bottom = sections.rectifying_line, sections.stripping_line
    intersection = sections.intersection
    steps, optimal = step_with_optimal_feed(
        curve, x_distillate, x_bottoms, top, bottom, condenser=condenser, feed_stage=feed_stage,
        x_switch=intersection[0], what=f"McCabe-Thiele at R = {reflux_ratio:.6g}",
    )
    liquid, vapor = sections.stage_flows(steps.x.size, steps.feed_stage, condenser)
    condenser_duty, reboiler_duty = _cmo_duties(sections, condenser, latent_heat, x_distillate, x_bottoms)
    return BinaryDesign(
        method="McCabe-Thiele",
        light=curve.light,
        heavy=curve.heavy,
        pressure=curve.pressure,
        condenser=condenser,
        curve=curve,
        feed_flow=float(feed_flow),
        x_feed=float(x_feed),
        q=float(q),
        distillate_flow=D,
        bottoms_flow=B,
        x_distillate=float(x_distillate),
        x_bottoms=float(x_bottoms),
        reflux_ratio=float(reflux_ratio),
        boilup_ratio=sections.stripping_vapor / B,
        minimum_reflux=pinch,
        liquid_flow=liquid,
        vapor_flow=vapor,
        rectifying_line=top,
        stripping_line=bottom,
        intersection=intersection,
        condenser_duty=condenser_duty,
        reboiler_duty=reboiler_duty,
        notes=tuple(notes),
        **stepping_fields(curve, steps, optimal, x_distillate, x_bottoms, condenser),
    )


def design_binary(
    case: Case,
    thermo: ThermoPackage | None = None,
    *,
    reflux_ratio: float | None = None,
    reflux_factor: float | None = None,
    feed_stage: int | None = None,
    pressure: float | None = None,
) -> BinaryDesign:
    """McCabe-Thiele design (McCabe & Thiele 1925) of a binary case.

    The products come from the case's specs: two of distillate/bottoms mole fractions,
    recoveries and product rates (or one of them and two of reflux/boilup/duty), the reflux
    from ``reflux_ratio``, a boilup ratio (CMO balances with the feed's q) or a duty (through
    the latent heats of the products). ``reflux_ratio=`` here, or ``reflux_factor=`` (R/R_min),
    replaces the case's reflux, boilup and duty specs. ``feed_stage`` (traystack numbering)
    fixes the feed; None takes the optimal one. ``pressure`` (Pa) overrides the mean column
    pressure. Raises :class:`SpecError` when the specs do not fix x_D, x_B and R, when a purity
    is beyond an azeotrope, or when the reflux is not above the minimum."""
    problem = binary_problem(
        case, thermo, reflux_ratio=reflux_ratio, reflux_factor=reflux_factor, pressure=pressure, method="McCabe-Thiele"
    )
    R = problem.reflux_ratio
    notes = list(problem.notes)
    if problem.reflux_temperature is not None:
        notes.append("subcooled reflux is not in the CMO construction (the Ponchon-Savarit design takes it)")
    if R is None:
        check_product_purities(problem.curve, problem.x_distillate, problem.x_bottoms, problem.x_feed)
        pinch = minimum_reflux(problem.curve, problem.x_distillate, problem.x_bottoms, problem.x_feed, problem.q)
        R = problem.reflux_factor * pinch.ratio
        notes.append(f"reflux ratio = {problem.reflux_factor:.6g} x minimum reflux ratio {pinch.ratio:.6g}")
    return mccabe_thiele(
        problem.curve,
        x_distillate=problem.x_distillate,
        x_bottoms=problem.x_bottoms,
        x_feed=problem.x_feed,
        q=problem.q,
        reflux_ratio=R,
        feed_flow=problem.feed_flow,
        condenser=problem.condenser,
        feed_stage=feed_stage,
        latent_heat=problem.latent_heat,
        notes=notes,
    )
