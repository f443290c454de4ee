"""Enthalpy-composition design of a binary column (Ponchon, Tech. Moderne 13 (1921) 20;
Savarit, Arts et Métiers 75 (1922) 65), on the case's own enthalpies.

Where the McCabe-Thiele construction assumes constant molar overflow, this one keeps the energy
balance of every stage. On the enthalpy-composition diagram of the binary at the design pressure
(the same pressure and equilibrium curve as :mod:`.mccabe_thiele`):

* the saturated-liquid line ``h_L(x)`` (liquid at its bubble point) and the saturated-vapor line
  ``H_V(y)`` (vapor at its dew point) come from the case's thermo package, by default with its
  rigorous model (ideal-gas enthalpies, heats of vaporization and the activity model's excess
  enthalpy); tie lines join equilibrium pairs ``(x, h_L)`` and ``(y, H_V)``
  (:mod:`.enthalpy_diagram`);
* the top difference point ``Delta_D = (x_D, h_D + |Q_C| / D)`` and the bottom one
  ``Delta_B = (x_B, h_B - Q_R / B)``; ``Delta_D``, the feed point ``(x_F, h_F)`` and ``Delta_B``
  lie on one line (overall energy balance). The reflux ratio fixes ``Delta_D``:
  ``h_Delta_D = H_2 + R (H_2 - h_1)`` with ``(x_1, h_1)`` the liquid leaving stage 1 (for a total
  condenser the reflux, subcooled if the case says so) and ``H_2 = H_V(y_2)`` the vapor reaching
  it;
* stepping from the top (:mod:`.stepping`): a tie line down from each vapor to its liquid, then
  the line from the difference point through that liquid up to the saturated-vapor line gives
  the vapor from the stage below; the feed stage switches from ``Delta_D`` to ``Delta_B``
  (optimal: the first liquid past the line ``Delta_D - Delta_B``);
* liquid and vapor flows of every stage by the lever rule,
  ``V_{n+1} = D (h_Delta_D - h_n) / (H_{n+1} - h_n)`` above the feed and
  ``V_{n+1} = B (h_n - h_Delta_B) / (H_{n+1} - h_n)`` below it;
* minimum reflux where a tie line passes through a difference point: the tie line through the
  feed point (feed pinch) or, higher, a tie line of the rectifying section extended to ``x_D``
  (or of the stripping section to ``x_B``) -- the enthalpy-composition form of a tangent pinch
  (:mod:`.enthalpy_pinches`).

Textbook treatment followed: McCabe, Smith & Harriott, *Unit Operations of Chemical
Engineering*, 7th ed., 2005, ch. 21 (enthalpy balances, the Ponchon-Savarit method); Wankat,
*Separation Process Engineering*, ch. 4 (from memory). With equal molar latent heats and no
sensible heat (``enthalpy_model="cmo"``) the construction is exactly McCabe-Thiele's, which the
tests check.

Units are SI: K, Pa, mol/s, W, J/mol.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Sequence

import numpy as np
from scipy.optimize import brentq

from ..case import Case
from ..errors import SpecError
from ..thermo.package import ThermoPackage
from .binary_case import binary_problem
from .enthalpy_diagram import SaturatedEnthalpies, thermal_condition, top_difference_enthalpy, top_of_column, vapor_on_line
from .enthalpy_pinches import enthalpy_minimum_reflux
from .equilibrium_curve import EquilibriumCurve, check_product_purities
from .mccabe_thiele import BinaryDesign
from .operating_lines import product_flows
from .pinches import check_reflux_above_minimum
from .stepping import StageSteps, step_with_optimal_feed, stepping_fields

# SaturatedEnthalpies (from .enthalpy_diagram) and enthalpy_minimum_reflux (from .enthalpy_pinches)
# stay importable from here.
__all__ = [
    "EnthalpyConstruction",
    "SaturatedEnthalpies",
    "design_ponchon_savarit",
    "enthalpy_minimum_reflux",
    "ponchon_savarit",
]


@dataclass(frozen=True, eq=False)
class EnthalpyConstruction:
    """The enthalpy-composition part of a Ponchon-Savarit design (J/mol; compositions light
    mole fractions): the saturated lines, the feed point, both difference points (and the top
    one at minimum reflux), the products' and the reflux's enthalpies, each stage's liquid and
    vapor enthalpy, and the curved operating lines ``y_{n+1}(x_n)`` on the y-x diagram
    (``operating_x`` with ``rectifying_y``/``stripping_y``, NaN where a section has none)."""

    saturated: SaturatedEnthalpies
    feed_enthalpy: float
    top_difference_point: tuple[float, float]
    bottom_difference_point: tuple[float, float]
    minimum_top_difference_enthalpy: float
    reflux_enthalpy: float
    distillate_enthalpy: float
    bottoms_enthalpy: float
    stage_liquid_enthalpy: np.ndarray
    stage_vapor_enthalpy: np.ndarray
    operating_x: np.ndarray
    rectifying_y: np.ndarray
    stripping_y: np.ndarray


# =======================================================================================
# The construction at a given reflux
# =======================================================================================


@dataclass(frozen=True)
class _DifferencePoints:
    """What the reflux ratio fixes by the energy balances: the enthalpies (J/mol) of both
    difference points, of the liquid leaving stage 1 and of the products, and the duties (W)."""

    top: float
    bottom: float
    stage_one_liquid: float
    distillate: float
    bottoms: float
    condenser_duty: float
    reboiler_duty: float


def _difference_points(
    curve: EquilibriumCurve, enthalpies: SaturatedEnthalpies, *, reflux_ratio: float, feed_flow: float,
    distillate_flow: float, x_distillate: float, x_bottoms: float, feed_enthalpy: float, condenser: str,
    reflux_enthalpy: float | None,
) -> _DifferencePoints:
    """``Delta_D`` from the reflux ratio, ``Delta_B`` on the line from it through the feed point,
    and the duties ``Q_C = -D (h_Delta_D - h_D)``, ``Q_R = B (h_B - h_Delta_B)``. Raises
    :class:`SpecError` when the reboiler would have to remove heat."""
    F, D = float(feed_flow), distillate_flow
    B = F - D
    _, h_1, y_2 = top_of_column(curve, enthalpies, x_distillate, condenser, reflux_enthalpy)
    h_top = top_difference_enthalpy(enthalpies, reflux_ratio, h_1, y_2)
    h_distillate = h_1 if condenser == "total" else float(enthalpies.vapor_of_y(x_distillate))
    h_bottom = (F * feed_enthalpy - D * h_top) / B
    h_bottoms = float(enthalpies.liquid_of_x(x_bottoms))
    reboiler_duty = B * (h_bottoms - h_bottom)
    if not reboiler_duty > 0.0:
        raise SpecError(
            f"at reflux ratio {reflux_ratio:.6g} the feed brings more heat than the column rejects: the reboiler duty "
            f"would be {reboiler_duty:.6g} W"
        )
    return _DifferencePoints(
        top=h_top, bottom=h_bottom, stage_one_liquid=h_1, distillate=h_distillate, bottoms=h_bottoms,
        condenser_duty=-D * (h_top - h_distillate), reboiler_duty=reboiler_duty,
    )


def _nan_is_pinch(operating: Callable[[float], float], what: str) -> Callable[[float], float]:
    """``operating`` that raises a pinch :class:`SpecError` where it has no vapor (NaN)."""

    def checked(x: float) -> float:
        y = operating(x)
        if not np.isfinite(y):
            raise SpecError(
                f"{what}: the operating line from liquid x = {x:.6g} does not reach the saturated-vapor line (pinch)"
            )
        return y

    return checked


def _lever_rule_flows(
    steps: StageSteps, h_liquid: np.ndarray, h_vapor: np.ndarray, points: _DifferencePoints, distillate_flow: float,
    bottoms_flow: float, condenser: str,
) -> tuple[np.ndarray, np.ndarray]:
    """Liquid and vapor leaving each stage (mol/s) by the lever rule between stage n's liquid
    and stage n+1's vapor: ``V_{n+1} = D (h_Delta_D - h_n) / (H_{n+1} - h_n)`` above the feed,
    ``V_{n+1} = B (h_n - h_Delta_B) / (H_{n+1} - h_n)`` from it down."""
    D, B = distillate_flow, bottoms_flow
    N = steps.x.size
    numbers = np.arange(1, N)
    h_n, H_next = h_liquid[:-1], h_vapor[1:]
    rectifying = numbers < steps.feed_stage
    vapor_below = np.where(rectifying, D * (points.top - h_n), B * (h_n - points.bottom)) / (H_next - h_n)
    liquid = np.empty(N)
    vapor = np.empty(N)
    liquid[:-1] = np.where(rectifying, vapor_below - D, vapor_below + B)
    liquid[-1] = B
    vapor[1:] = vapor_below
    vapor[0] = 0.0 if condenser == "total" else D
    return liquid, vapor


def _curved_operating_lines(
    enthalpies: SaturatedEnthalpies, points: _DifferencePoints, x_distillate: float, x_bottoms: float, x_switch: float
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """The operating lines ``y_{n+1}(x_n)`` of both sections on 201 liquids from ``x_B`` to
    ``x_D`` for the y-x diagram: (x, rectifying y, stripping y), NaN outside each section."""
    grid = np.linspace(x_bottoms, x_distillate, 201)
    inner = grid[1:-1]
    h_inner = enthalpies.liquid_of_x(inner)
    rectifying_y = np.concatenate(
        ([np.nan], vapor_on_line(enthalpies, x_distillate, points.top, inner, h_inner, x_distillate), [x_distillate])
    )
    stripping_y = np.concatenate(([x_bottoms], vapor_on_line(enthalpies, x_bottoms, points.bottom, inner, h_inner, 1.0), [np.nan]))
    rectifying_y = np.where(grid >= x_switch, rectifying_y, np.nan)
    stripping_y = np.where(grid <= x_switch, stripping_y, np.nan)
    return grid, rectifying_y, stripping_y


def ponchon_savarit(
    curve: EquilibriumCurve,
    enthalpies: SaturatedEnthalpies,
    *,
    x_distillate: float,
    x_bottoms: float,
    x_feed: float,
    feed_enthalpy: float,
    reflux_ratio: float,
    feed_flow: float = 1.0,
    condenser: str = "total",
    feed_stage: int | None = None,
    reflux_enthalpy: float | None = None,
    notes: Sequence[str] = (),
) -> BinaryDesign:
    """The enthalpy-composition construction (Ponchon 1921, Savarit 1922) on a given curve and
    saturated enthalpies.

    ``feed_enthalpy`` J/mol, ``reflux_ratio`` L_1/D (external reflux), ``reflux_enthalpy`` the
    reflux's enthalpy for a total condenser (None: saturated liquid). The result has the shape
    of a McCabe-Thiele design with ``method = "Ponchon-Savarit"``, exact condenser and reboiler
    duties, stage flows from the lever rule, no straight operating lines and the
    :class:`EnthalpyConstruction` in ``enthalpy``."""
    if condenser not in ("total", "partial"):
        raise SpecError(f"the binary design needs a total or partial condenser, not {condenser!r}")
    check_product_purities(curve, x_distillate, x_bottoms, x_feed)
    D, B = product_flows(feed_flow, x_feed, x_distillate, x_bottoms)
    pinch, h_delta_minimum = enthalpy_minimum_reflux(
        curve, enthalpies, x_distillate=x_distillate, x_bottoms=x_bottoms, x_feed=x_feed,
        feed_enthalpy=feed_enthalpy, condenser=condenser, reflux_enthalpy=reflux_enthalpy,
    )
    check_reflux_above_minimum(
        reflux_ratio, pinch, curve, x_distillate, x_bottoms, construction=" of the enthalpy-composition construction"
    )
    points = _difference_points(
        curve, enthalpies, reflux_ratio=reflux_ratio, feed_flow=feed_flow, distillate_flow=D,
        x_distillate=x_distillate, x_bottoms=x_bottoms, feed_enthalpy=feed_enthalpy, condenser=condenser,
        reflux_enthalpy=reflux_enthalpy,
    )

    def line(x):
        # the line Delta_D - Delta_B (it passes through the feed point)
        return points.top + (points.bottom - points.top) * (x - x_distillate) / (x_bottoms - x_distillate)

    x_switch = float(brentq(lambda v: float(enthalpies.liquid_of_x(v) - line(v)), x_bottoms, x_distillate, xtol=1e-14))

    def top(x):
        return float(vapor_on_line(enthalpies, x_distillate, points.top, x, enthalpies.liquid_of_x(x), x_distillate)[0])

    def bottom(x):
        return float(vapor_on_line(enthalpies, x_bottoms, points.bottom, x, enthalpies.liquid_of_x(x), 1.0)[0])

    what = f"Ponchon-Savarit at R = {reflux_ratio:.6g}"
    steps, optimal = step_with_optimal_feed(
        curve, x_distillate, x_bottoms, _nan_is_pinch(top, what), _nan_is_pinch(bottom, what),
        condenser=condenser, feed_stage=feed_stage, x_switch=x_switch, what=what,
    )
    h_liquid = enthalpies.liquid_of_x(steps.x)
    if condenser == "total":
        h_liquid[0] = points.stage_one_liquid
    h_vapor = enthalpies.vapor_of_y(steps.y)
    liquid, vapor = _lever_rule_flows(steps, h_liquid, h_vapor, points, D, B, condenser)
    grid, rectifying_y, stripping_y = _curved_operating_lines(enthalpies, points, x_distillate, x_bottoms, x_switch)
    construction = EnthalpyConstruction(
        saturated=enthalpies,
        feed_enthalpy=float(feed_enthalpy),
        top_difference_point=(float(x_distillate), float(points.top)),
        bottom_difference_point=(float(x_bottoms), float(points.bottom)),
        minimum_top_difference_enthalpy=float(h_delta_minimum),
        reflux_enthalpy=float(points.stage_one_liquid) if condenser == "total" else float("nan"),
        distillate_enthalpy=float(points.distillate),
        bottoms_enthalpy=points.bottoms,
        stage_liquid_enthalpy=h_liquid,
        stage_vapor_enthalpy=h_vapor,
        operating_x=grid,
        rectifying_y=rectifying_y,
        stripping_y=stripping_y,
    )
    return BinaryDesign(
        method="Ponchon-Savarit",
        light=curve.light,
        heavy=curve.heavy,
        pressure=curve.pressure,
        condenser=condenser,
        curve=curve,
        feed_flow=float(feed_flow),
        x_feed=float(x_feed),
        q=thermal_condition(enthalpies, x_feed, feed_enthalpy),
        distillate_flow=D,
        bottoms_flow=B,
        x_distillate=float(x_distillate),
        x_bottoms=float(x_bottoms),
        reflux_ratio=float(reflux_ratio),
        boilup_ratio=float(vapor[-1] / B),
        minimum_reflux=pinch,
        liquid_flow=liquid,
        vapor_flow=vapor,
        rectifying_line=None,
        stripping_line=None,
        intersection=(x_switch, top(x_switch)),
        condenser_duty=float(points.condenser_duty),
        reboiler_duty=float(points.reboiler_duty),
        enthalpy=construction,
        notes=tuple(notes),
        **stepping_fields(curve, steps, optimal, x_distillate, x_bottoms, condenser),
    )


# =======================================================================================
# From a case
# =======================================================================================


def design_ponchon_savarit(
    case: Case,
    thermo: ThermoPackage | None = None,
    *,
    reflux_ratio: float | None = None,
    reflux_factor: float | None = None,
    feed_stage: int | None = None,
    pressure: float | None = None,
    enthalpy_model: str = "rigorous",
) -> BinaryDesign:
    """Ponchon-Savarit design (Ponchon 1921, Savarit 1922) of a binary case: the same products, pressure, curve and feed as
    :func:`~solver.shortcut.mccabe_thiele.design_binary`, with the case's enthalpies
    (``enthalpy_model`` "rigorous" by default, or "cmo"), the feed's own enthalpy and a
    subcooled reflux where the case has one. A reflux from a boilup or duty spec is found by the
    CMO balances (as for McCabe-Thiele); ``reflux_factor`` multiplies this construction's own
    minimum reflux."""
    if enthalpy_model not in ("rigorous", "cmo"):
        raise ValueError(f"enthalpy_model must be 'rigorous' or 'cmo', not {enthalpy_model!r}")
    problem = binary_problem(
        case, thermo, reflux_ratio=reflux_ratio, reflux_factor=reflux_factor, pressure=pressure,
        enthalpy_model=enthalpy_model, method="Ponchon-Savarit",
    )
    thermo = problem.thermo
    enthalpies = SaturatedEnthalpies.from_thermo(problem.curve, thermo, problem.light_index, enthalpy_model)
    notes = list(problem.notes) + [f"enthalpies: {enthalpy_model} model"]
    reflux_enthalpy = None
    if problem.reflux_temperature is not None:
        composition = np.zeros((1, 2))
        composition[0, problem.light_index] = problem.x_distillate
        composition[0, 1 - problem.light_index] = 1.0 - problem.x_distillate
        reflux_enthalpy = float(
            thermo.liquid_enthalpy(np.array([problem.reflux_temperature]), composition, model=enthalpy_model).molar[0]
        )
        notes.append(f"reflux returned at {problem.reflux_temperature:.2f} K")
    R = problem.reflux_ratio
    if R is None:
        check_product_purities(problem.curve, problem.x_distillate, problem.x_bottoms, problem.x_feed)
        pinch, _ = enthalpy_minimum_reflux(
            problem.curve, enthalpies, x_distillate=problem.x_distillate, x_bottoms=problem.x_bottoms,
            x_feed=problem.x_feed, feed_enthalpy=problem.feed_enthalpy, condenser=problem.condenser,
            reflux_enthalpy=reflux_enthalpy,
        )
        R = problem.reflux_factor * pinch.ratio
        notes.append(f"reflux ratio = {problem.reflux_factor:.6g} x minimum reflux ratio {pinch.ratio:.6g}")
    return ponchon_savarit(
        problem.curve,
        enthalpies,
        x_distillate=problem.x_distillate,
        x_bottoms=problem.x_bottoms,
        x_feed=problem.x_feed,
        feed_enthalpy=problem.feed_enthalpy,
        reflux_ratio=R,
        feed_flow=problem.feed_flow,
        condenser=problem.condenser,
        feed_stage=feed_stage,
        reflux_enthalpy=reflux_enthalpy,
        notes=notes,
    )
