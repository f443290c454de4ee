"""The enthalpy-composition diagram of a binary (Ponchon, Tech. Moderne 13 (1921) 20; Savarit,
Arts et Métiers 75 (1922) 65): the saturated-liquid line ``h_L(x)`` (liquid at its bubble
point) and the saturated-vapor line ``H_V(y)`` (vapor at its dew point) over the equilibrium
curve's pairs, tie lines joining ``(x, h_L)`` and ``(y, H_V)``, the vapor where a line through a
difference point meets the saturated-vapor line, the top of the column (the liquid leaving
stage 1, the vapor reaching it and the top difference point ``h_Delta_D = H_2 + R (H_2 - h_1)``),
and the feed's thermal condition read off the diagram.

Enthalpies J/mol; compositions mole fractions of the light component.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable

import numpy as np
from scipy.interpolate import CubicSpline

from ..thermo.package import ThermoPackage
from .equilibrium_curve import EquilibriumCurve

__all__ = ["SaturatedEnthalpies", "thermal_condition", "top_difference_enthalpy", "top_of_column", "vapor_on_line"]

#: Halvings of the bracket in :func:`vapor_on_line` (from a bracket below 1 to below 1e-18).
_BISECTIONS = 60


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
        """From ``liquid`` enthalpies on ``curve.x`` and ``vapor`` enthalpies on ``curve.y``."""
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
        """Saturated-liquid enthalpy h_L (J/mol) at light fraction ``x``."""
        return self._liquid(np.clip(np.asarray(x, dtype=float), 0.0, 1.0))

    def vapor_of_y(self, y) -> np.ndarray:
        """Saturated-vapor enthalpy H_V (J/mol) at light fraction ``y``."""
        return self._vapor(np.clip(np.asarray(y, dtype=float), 0.0, 1.0))

    def tie_line_slope(self, x) -> np.ndarray:
        """dH/dx of the tie line from liquid ``x`` to its equilibrium vapor."""
        x = np.asarray(x, dtype=float)
        y = self.curve.y_of_x(x)
        return (self.vapor_of_y(y) - self.liquid_of_x(x)) / (y - x)


def vapor_on_line(enthalpies: SaturatedEnthalpies, x_point: float, h_point: float, x, h, y_high) -> np.ndarray:
    """Vapor composition where the line from the difference point ``(x_point, h_point)``
    through the liquid ``(x, h)`` meets the saturated-vapor line, between ``x`` and ``y_high``
    (NaN where the line does not reach it there)."""
    x = np.atleast_1d(np.asarray(x, dtype=float))
    h = np.atleast_1d(np.asarray(h, dtype=float))
    slope = (h - h_point) / (x - x_point)

    def gap(y):
        return enthalpies.vapor_of_y(y) - (h + slope * (y - x))

    low = x.copy()
    high = np.broadcast_to(np.asarray(y_high, dtype=float), x.shape).copy()
    reachable = (gap(low) > 0.0) & (gap(high) <= 0.0)
    # bisection, not brentq: it runs on whole arrays of liquids at once (the curved operating lines)
    for _ in range(_BISECTIONS):
        middle = 0.5 * (low + high)
        above = gap(middle) > 0.0
        low = np.where(above, middle, low)
        high = np.where(above, high, middle)
    return np.where(reachable, 0.5 * (low + high), np.nan)


def thermal_condition(enthalpies: SaturatedEnthalpies, x_feed: float, feed_enthalpy: float) -> float:
    """q on this diagram: (H_V(x_F) - h_F) / (H_V(x_F) - h_L(x_F))."""
    H, h = float(enthalpies.vapor_of_y(x_feed)), float(enthalpies.liquid_of_x(x_feed))
    return (H - feed_enthalpy) / (H - h)


def top_of_column(
    curve: EquilibriumCurve, enthalpies: SaturatedEnthalpies, x_distillate: float, condenser: str,
    reflux_enthalpy: float | None,
):
    """``(x_1, h_1)`` the liquid leaving stage 1 (a total condenser's: the reflux, at
    ``reflux_enthalpy`` when subcooled) and the function ``R -> y_2``, the vapor reaching it."""
    if condenser == "total":
        h_1 = float(enthalpies.liquid_of_x(x_distillate)) if reflux_enthalpy is None else float(reflux_enthalpy)
        return x_distillate, h_1, (lambda R: x_distillate)
    x_1 = float(curve.x_of_y(x_distillate))
    return x_1, float(enthalpies.liquid_of_x(x_1)), (lambda R: (R * x_1 + x_distillate) / (R + 1.0))


def top_difference_enthalpy(enthalpies: SaturatedEnthalpies, reflux_ratio: float, h_1: float, y_2: Callable[[float], float]) -> float:
    """``h_Delta_D = H_2 + R (H_2 - h_1)``."""
    H_2 = float(enthalpies.vapor_of_y(y_2(reflux_ratio)))
    return H_2 + reflux_ratio * (H_2 - h_1)
