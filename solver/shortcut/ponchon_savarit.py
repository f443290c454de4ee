"""Enthalpy-composition design of a binary column (Ponchon, Tech. Moderne 13 (1921) 20;
Savarit, Arts et Métiers 75 (1922) 65), on the case's own enthalpies.

Where the McCabe-Thiele construction assumes constant molar overflow, this one keeps the energy
balance of every stage. On the enthalpy-composition diagram of the binary at the design pressure
(the same pressure and equilibrium curve as :mod:`.mccabe_thiele`):

* the saturated-liquid line ``h_L(x)`` (liquid at its bubble point) and the saturated-vapor line
  ``H_V(y)`` (vapor at its dew point) come from the case's thermo package, by default with its
  rigorous model (ideal-gas enthalpies, heats of vaporization and the activity model's excess
  enthalpy); tie lines join equilibrium pairs ``(x, h_L)`` and ``(y, H_V)``;
* the top difference point ``Delta_D = (x_D, h_D + |Q_C| / D)`` and the bottom one
  ``Delta_B = (x_B, h_B - Q_R / B)``; ``Delta_D``, the feed point ``(x_F, h_F)`` and ``Delta_B``
  lie on one line (overall energy balance). The reflux ratio fixes ``Delta_D``:
  ``h_Delta_D = H_2 + R (H_2 - h_1)`` with ``(x_1, h_1)`` the liquid leaving stage 1 (for a total
  condenser the reflux, subcooled if the case says so) and ``H_2 = H_V(y_2)`` the vapor reaching
  it;
* stepping from the top: a tie line down from each vapor to its liquid, then the line from the
  difference point through that liquid up to the saturated-vapor line gives the vapor from the
  stage below; the feed stage switches from ``Delta_D`` to ``Delta_B`` (optimal: the first liquid
  past the line ``Delta_D - Delta_B``);
* liquid and vapor flows of every stage by the lever rule,
  ``V_{n+1} = D (h_Delta_D - h_n) / (H_{n+1} - h_n)`` above the feed and
  ``V_{n+1} = B (h_n - h_Delta_B) / (H_{n+1} - h_n)`` below it;
* minimum reflux where a tie line passes through a difference point: the tie line through the
  feed point (feed pinch) or, higher, a tie line of the rectifying section extended to ``x_D``
  (or of the stripping section to ``x_B``) -- the enthalpy-composition form of a tangent pinch.

Textbook treatment followed: McCabe, Smith & Harriott, *Unit Operations of Chemical
Engineering*, 7th ed., 2005, ch. 21 (enthalpy balances, the Ponchon-Savarit method); Wankat,
*Separation Process Engineering*, ch. 4 (from memory). With equal molar latent heats and no
sensible heat (``enthalpy_model="cmo"``) the construction is exactly McCabe-Thiele's, which the
tests check.

Units are SI: K, Pa, mol/s, W, J/mol.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable, Sequence

import numpy as np
from scipy.interpolate import CubicSpline
from scipy.optimize import brentq

from ..case import Case
from ..errors import SpecError
from ..thermo.package import ThermoPackage
from .binary_case import binary_problem
from .equilibrium_curve import EquilibriumCurve, check_product_purities
from .mccabe_thiele import BinaryDesign
from .pinches import MinimumReflux, refine_extremum
from .stepping import step_stages, stepping_fields

__all__ = [
    "EnthalpyConstruction",
    "SaturatedEnthalpies",
    "design_ponchon_savarit",
    "enthalpy_minimum_reflux",
    "ponchon_savarit",
]

_BISECTIONS = 60
_PINCH_GRID = 4001
_TANGENT_MARGIN = 1e-7


@dataclass(frozen=True, eq=False)
class SaturatedEnthalpies:
    """Saturated-liquid enthalpy ``h_L`` on the curve's ``x`` grid and saturated-vapor enthalpy
    ``H_V`` on its ``y`` grid (J/mol), interpolated by cubic splines."""

    curve: EquilibriumCurve
    liquid: np.ndarray
    vapor: np.ndarray
    _liquid: Callable = field(default=None, repr=False)
    _vapor: Callable = field(default=None, repr=False)

    @classmethod
    def from_arrays(cls, curve: EquilibriumCurve, liquid: np.ndarray, vapor: np.ndarray) -> "SaturatedEnthalpies":
        liquid = np.asarray(liquid, dtype=float)
        vapor = np.asarray(vapor, dtype=float)
        return cls(curve, liquid, vapor, CubicSpline(curve.x, liquid), CubicSpline(curve.y, vapor))

    @classmethod
    def constant_latent_heat(cls, curve: EquilibriumCurve, latent_heat: float) -> "SaturatedEnthalpies":
        """``h_L = 0``, ``H_V = latent_heat``: the constant-molar-overflow diagram."""
        return cls.from_arrays(curve, np.zeros_like(curve.x), np.full_like(curve.y, float(latent_heat)))

    @classmethod
    def from_thermo(
        cls, curve: EquilibriumCurve, thermo: ThermoPackage, light_index: int, model: str = "rigorous"
    ) -> "SaturatedEnthalpies":
        """Liquid and vapor of each equilibrium pair of ``curve`` at its bubble temperature (which
        is the vapor's dew temperature), with enthalpy model ``model``."""
        X = np.empty((curve.x.size, 2))
        X[:, light_index], X[:, 1 - light_index] = curve.x, 1.0 - curve.x
        Y = np.empty((curve.y.size, 2))
        Y[:, light_index], Y[:, 1 - light_index] = curve.y, 1.0 - curve.y
        T = curve.temperature
        liquid = thermo.liquid_enthalpy(T, X, model=model).molar
        vapor = thermo.vapor_enthalpy(T, Y, model=model).molar
        return cls.from_arrays(curve, liquid, vapor)

    def liquid_of_x(self, x) -> np.ndarray:
        return self._liquid(np.clip(np.asarray(x, dtype=float), 0.0, 1.0))

    def vapor_of_y(self, y) -> np.ndarray:
        return self._vapor(np.clip(np.asarray(y, dtype=float), 0.0, 1.0))

    def tie_line_slope(self, x) -> np.ndarray:
        """dH/dx of the tie line from liquid ``x`` to its equilibrium vapor."""
        x = np.asarray(x, dtype=float)
        y = self.curve.y_of_x(x)
        return (self.vapor_of_y(y) - self.liquid_of_x(x)) / (y - x)


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


def _vapor_on_line(enthalpies: SaturatedEnthalpies, x_point: float, h_point: float, x, h, y_high) -> np.ndarray:
    """Vapor composition where the line from the difference point ``(x_point, h_point)``
    through the liquid ``(x, h)`` meets the saturated-vapor line, between ``x`` and ``y_high``
    (vectorized bisection; NaN where the line does not reach it there)."""
    x = np.atleast_1d(np.asarray(x, dtype=float))
    h = np.atleast_1d(np.asarray(h, dtype=float))
    slope = (h - h_point) / (x - x_point)

    def gap(y):
        return enthalpies.vapor_of_y(y) - (h + slope * (y - x))

    low = x.copy()
    high = np.broadcast_to(np.asarray(y_high, dtype=float), x.shape).copy()
    reachable = (gap(low) > 0.0) & (gap(high) <= 0.0)
    for _ in range(_BISECTIONS):
        middle = 0.5 * (low + high)
        above = gap(middle) > 0.0
        low = np.where(above, middle, low)
        high = np.where(above, high, middle)
    return np.where(reachable, 0.5 * (low + high), np.nan)


def _top_pair(
    curve: EquilibriumCurve, enthalpies: SaturatedEnthalpies, x_distillate: float, condenser: str,
    reflux_enthalpy: float | None,
):
    """(x_1, h_1) the liquid leaving stage 1 and the function R -> y_2."""
    if condenser == "total":
        h_1 = float(enthalpies.liquid_of_x(x_distillate)) if reflux_enthalpy is None else float(reflux_enthalpy)
        return x_distillate, h_1, (lambda R: x_distillate)
    x_1 = float(curve.x_of_y(x_distillate))
    return x_1, float(enthalpies.liquid_of_x(x_1)), (lambda R: (R * x_1 + x_distillate) / (R + 1.0))


def _top_difference_enthalpy(enthalpies, reflux_ratio: float, h_1: float, y_2: Callable[[float], float]) -> float:
    H_2 = float(enthalpies.vapor_of_y(y_2(reflux_ratio)))
    return H_2 + reflux_ratio * (H_2 - h_1)


def enthalpy_minimum_reflux(
    curve: EquilibriumCurve,
    enthalpies: SaturatedEnthalpies,
    *,
    x_distillate: float,
    x_bottoms: float,
    x_feed: float,
    feed_enthalpy: float,
    condenser: str = "total",
    reflux_enthalpy: float | None = None,
) -> tuple[MinimumReflux, float]:
    """Minimum reflux of the enthalpy-composition construction and the top difference point's
    enthalpy there (J/mol). Requirements: the tie line through the feed point; every tie line
    with ``x`` between the feed tie line's and ``x_D`` extended to ``x_D`` must not pass above
    ``Delta_D``; every tie line between ``x_B`` and the feed tie line extended to ``x_B`` must not
    pass below ``Delta_B``."""
    low, high = curve.feasible_region(x_feed)
    F_over_D = (x_distillate - x_bottoms) / (x_feed - x_bottoms)
    B_over_D = F_over_D - 1.0

    def through_feed(x):
        return enthalpies.liquid_of_x(x) + enthalpies.tie_line_slope(x) * (x_feed - x) - feed_enthalpy

    grid = np.linspace(max(low, 0.0) + 1e-12, min(high, x_distillate) - 1e-12, 2001)
    values = through_feed(grid)
    crossings = np.nonzero(np.sign(values[:-1]) * np.sign(values[1:]) <= 0)[0]
    if crossings.size == 0:
        raise SpecError(
            f"no tie line passes through the feed point (x = {x_feed:.6g}, h = {feed_enthalpy:.6g} J/mol): the feed is "
            "too far outside the two-phase region for the enthalpy-composition construction"
        )
    k = crossings[np.argmin(np.abs(grid[crossings] - x_feed))]
    if values[k] == 0:
        x_p = float(grid[k])
    else:
        x_p = float(brentq(lambda v: float(through_feed(v)), grid[k], grid[k + 1], xtol=1e-14))
    y_p = float(curve.y_of_x(x_p))

    def extended_to_top(x):
        return enthalpies.liquid_of_x(x) + enthalpies.tie_line_slope(x) * (x_distillate - x)

    def extended_to_bottom(x):
        return enthalpies.liquid_of_x(x) + enthalpies.tie_line_slope(x) * (x_bottoms - x)

    feed_value = float(extended_to_top(x_p))
    best_value, section, x_pinch = feed_value, "feed", x_p
    lower = min(max(x_p, x_bottoms), x_distillate)
    if lower < x_distillate:
        grid = np.linspace(lower, x_distillate, _PINCH_GRID)[:-1]
        k = int(np.argmax(extended_to_top(grid)))
        if k > 0:
            x_t, value = refine_extremum(extended_to_top, grid, k, maximize=True)
            if value > best_value + _TANGENT_MARGIN * abs(best_value) + 1e-9:
                best_value, section, x_pinch = value, "rectifying", x_t
    upper = max(min(x_p, x_distillate), x_bottoms)
    if upper > x_bottoms:
        grid = np.linspace(x_bottoms, upper, _PINCH_GRID)[1:]
        k = int(np.argmin(extended_to_bottom(grid)))
        if k < grid.size - 1:
            x_t, bottom_value = refine_extremum(extended_to_bottom, grid, k, maximize=False)
            value = F_over_D * feed_enthalpy - B_over_D * bottom_value
            if value > best_value + _TANGENT_MARGIN * abs(best_value) + 1e-9:
                best_value, section, x_pinch = value, "stripping", x_t
    _, h_1, y_2 = _top_pair(curve, enthalpies, x_distillate, condenser, reflux_enthalpy)

    def ratio_for(h_delta: float) -> float:
        if condenser == "total":
            H_2 = float(enthalpies.vapor_of_y(x_distillate))
            return (h_delta - H_2) / (H_2 - h_1)
        gap = lambda R: _top_difference_enthalpy(enthalpies, R, h_1, y_2) - h_delta  # noqa: E731
        if gap(0.0) >= 0.0:
            return 0.0
        high_R = 1.0
        while gap(high_R) < 0.0 and high_R < 1e7:
            high_R *= 4.0
        return float(brentq(gap, 0.0, high_R, xtol=1e-13))

    feed_ratio = ratio_for(feed_value)
    ratio = max(ratio_for(best_value), 0.0)
    pinch = MinimumReflux(
        ratio, "feed" if section == "feed" else "tangent", section, x_pinch, float(curve.y_of_x(x_pinch)),
        feed_ratio, x_p, y_p,
    )
    return pinch, best_value


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
    """The enthalpy-composition construction on a given curve and saturated enthalpies.

    ``feed_enthalpy`` J/mol, ``reflux_ratio`` L_1/D (external reflux), ``reflux_enthalpy`` the
    reflux's enthalpy for a total condenser (None: saturated liquid). The result has the shape
    of a McCabe-Thiele design with ``method = "Ponchon-Savarit"``, exact condenser and reboiler
    duties, stage flows from the lever rule, no straight operating lines and the
    :class:`EnthalpyConstruction` in ``enthalpy``."""
    if condenser not in ("total", "partial"):
        raise SpecError(f"the binary design needs a total or partial condenser, not {condenser!r}")
    check_product_purities(curve, x_distillate, x_bottoms, x_feed)
    F = float(feed_flow)
    D = F * (x_feed - x_bottoms) / (x_distillate - x_bottoms)
    B = F - D
    pinch, h_delta_minimum = enthalpy_minimum_reflux(
        curve, enthalpies, x_distillate=x_distillate, x_bottoms=x_bottoms, x_feed=x_feed,
        feed_enthalpy=feed_enthalpy, condenser=condenser, reflux_enthalpy=reflux_enthalpy,
    )
    if not reflux_ratio > pinch.ratio * (1.0 + 1e-9):
        raise SpecError(
            f"reflux ratio {reflux_ratio:.6g} is not above the minimum reflux ratio {pinch.ratio:.6g} of the "
            f"enthalpy-composition construction ({pinch.pinch} pinch at x = {pinch.x:.4f}, y = {pinch.y:.4f} "
            f"{curve.light}): no number of stages meets x_D = {x_distillate:.6g}, x_B = {x_bottoms:.6g}"
        )
    x_1, h_1, y_2 = _top_pair(curve, enthalpies, x_distillate, condenser, reflux_enthalpy)
    h_top = _top_difference_enthalpy(enthalpies, reflux_ratio, h_1, y_2)
    h_distillate = h_1 if condenser == "total" else float(enthalpies.vapor_of_y(x_distillate))
    h_bottom = (F * feed_enthalpy - D * h_top) / B
    h_bottoms = float(enthalpies.liquid_of_x(x_bottoms))
    condenser_duty = -D * (h_top - h_distillate)
    reboiler_duty = B * (h_bottoms - h_bottom)
    if not reboiler_duty > 0.0:
        raise SpecError(
            f"at reflux ratio {reflux_ratio:.6g} the feed brings more heat than the column rejects: the reboiler duty "
            f"would be {reboiler_duty:.6g} W"
        )

    def line(x):
        # the line Delta_D - Delta_B (it passes through the feed point)
        return h_top + (h_bottom - h_top) * (x - x_distillate) / (x_bottoms - x_distillate)

    x_switch = float(brentq(lambda v: float(enthalpies.liquid_of_x(v) - line(v)), x_bottoms, x_distillate, xtol=1e-14))

    def top(x):
        return float(_vapor_on_line(enthalpies, x_distillate, h_top, x, enthalpies.liquid_of_x(x), x_distillate)[0])

    def bottom(x):
        return float(_vapor_on_line(enthalpies, x_bottoms, h_bottom, x, enthalpies.liquid_of_x(x), 1.0)[0])

    what = f"Ponchon-Savarit at R = {reflux_ratio:.6g}"
    steps = step_stages(
        curve, x_distillate, x_bottoms, _nan_is_pinch(top, what), _nan_is_pinch(bottom, what),
        condenser=condenser, feed_stage=feed_stage, x_switch=x_switch, what=what,
    )
    optimal = steps if feed_stage is None else step_stages(
        curve, x_distillate, x_bottoms, _nan_is_pinch(top, what), _nan_is_pinch(bottom, what),
        condenser=condenser, feed_stage=None, x_switch=x_switch, what=what,
    )
    N, f = steps.x.size, steps.feed_stage
    h_liquid = enthalpies.liquid_of_x(steps.x)
    if condenser == "total":
        h_liquid[0] = h_1
    h_vapor = enthalpies.vapor_of_y(steps.y)
    # lever rule between stage n's liquid and stage n+1's vapor (n = 1 .. N-1)
    numbers = np.arange(1, N)
    h_n, H_next = h_liquid[:-1], h_vapor[1:]
    rectifying = numbers < f
    vapor_below = np.where(rectifying, D * (h_top - h_n), B * (h_n - h_bottom)) / (H_next - h_n)
    liquid = np.empty(N)
    vapor = np.empty(N)
    liquid[:-1] = np.where(rectifying, vapor_below - D, vapor_below + B)
    liquid[-1] = B
    vapor[1:] = vapor_below
    vapor[0] = 0.0 if condenser == "total" else D
    grid = np.linspace(x_bottoms, x_distillate, 201)
    inner = grid[1:-1]
    h_inner = enthalpies.liquid_of_x(inner)
    rectifying_y = np.concatenate(
        ([np.nan], _vapor_on_line(enthalpies, x_distillate, h_top, inner, h_inner, x_distillate), [x_distillate])
    )
    stripping_y = np.concatenate(([x_bottoms], _vapor_on_line(enthalpies, x_bottoms, h_bottom, inner, h_inner, 1.0), [np.nan]))
    rectifying_y = np.where(grid >= x_switch, rectifying_y, np.nan)
    stripping_y = np.where(grid <= x_switch, stripping_y, np.nan)
    construction = EnthalpyConstruction(
        saturated=enthalpies,
        feed_enthalpy=float(feed_enthalpy),
        top_difference_point=(float(x_distillate), float(h_top)),
        bottom_difference_point=(float(x_bottoms), float(h_bottom)),
        minimum_top_difference_enthalpy=float(h_delta_minimum),
        reflux_enthalpy=float(h_1) if condenser == "total" else float("nan"),
        distillate_enthalpy=float(h_distillate),
        bottoms_enthalpy=h_bottoms,
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
        feed_flow=F,
        x_feed=float(x_feed),
        q=_thermal_condition(enthalpies, x_feed, feed_enthalpy),
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
        condenser_duty=float(condenser_duty),
        reboiler_duty=float(reboiler_duty),
        enthalpy=construction,
        notes=tuple(notes),
        **stepping_fields(curve, steps, optimal, x_distillate, x_bottoms, condenser),
    )


def _thermal_condition(enthalpies: SaturatedEnthalpies, x_feed: float, feed_enthalpy: float) -> float:
    """q on this diagram: (H_V(x_F) - h_F) / (H_V(x_F) - h_L(x_F))."""
    H, h = float(enthalpies.vapor_of_y(x_feed)), float(enthalpies.liquid_of_x(x_feed))
    return (H - feed_enthalpy) / (H - h)


def _nan_is_pinch(operating: Callable[[float], float], what: str) -> Callable[[float], float]:
    def checked(x: float) -> float:
        y = operating(x)
        if not np.isfinite(y):
            raise SpecError(
                f"{what}: the operating line from liquid x = {x:.6g} does not reach the saturated-vapor line (pinch)"
            )
        return y

    return checked


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
    """Ponchon-Savarit design of a binary case: the same products, pressure, curve and feed as
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
