"""The equilibrium curve of a binary for the shortcut designs, its azeotropes, and the product
purities they allow.

* **Curve** ``y(x)`` of the light component at one pressure, from bubble points of the case's
  thermo package (modified Raoult's law with its activity model, so non-ideal curves and
  azeotropes come out as the model has them). The relative volatility ``alpha = K_L / K_H`` is
  tabulated on 801 Chebyshev-Lobatto points in ``x`` (dense near both pure ends, where
  high-purity products step) and interpolated as ``ln alpha`` by cubic splines, in ``x`` for
  ``y(x)`` and in ``y`` for the inverse ``x(y)``; ``y = alpha x / (1 + (alpha - 1) x)``. A curve
  of constant relative volatility, or through a table of equilibrium pairs, is built the same
  way.
* **Azeotropes** where ``alpha = 1``, found as sign changes of ``ln alpha`` on the grid and
  refined on exact bubble points by Brent's method (Brent, *Algorithms for Minimization without
  Derivatives*, 1973).
* **Limits**: the products of one column lie between the azeotropes (or pure components) on
  either side of the feed; a purity beyond one is a :class:`~solver.errors.SpecError` naming the
  azeotrope's composition and temperature.

Units are SI: K, Pa. Compositions are mole fractions of the light component.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable

import numpy as np
from scipy.interpolate import CubicSpline
from scipy.optimize import brentq

from ..errors import SpecError, ThermoError
from ..thermo.flash import bubble_temperature
from ..thermo.package import ThermoPackage

__all__ = [
    "CURVE_POINTS",
    "Azeotrope",
    "EquilibriumCurve",
    "check_product_purities",
    "describe_temperature",
]

#: Points of the tabulated equilibrium curve (Chebyshev-Lobatto in x).
CURVE_POINTS = 801


@dataclass(frozen=True)
class Azeotrope:
    """An azeotrope of the binary: ``x`` is the mole fraction of the design's light component
    (the one that is lighter on the feed's side of the azeotrope), ``temperature`` K and
    ``pressure`` Pa; ``boiling`` is "minimum" (positive deviation, e.g. ethanol-water) or
    "maximum"."""

    x: float
    temperature: float
    pressure: float
    boiling: str


@dataclass(frozen=True, eq=False)
class EquilibriumCurve:
    """Vapor-liquid equilibrium of a binary at one pressure, as the light component's mole
    fractions: tabulated ``x``, ``y``, bubble ``temperature`` (K; NaN for a constant-alpha
    curve) and ``relative_volatility`` (K_light / K_heavy), with interpolation both ways."""

    x: np.ndarray
    y: np.ndarray
    temperature: np.ndarray
    relative_volatility: np.ndarray
    pressure: float
    light: str
    heavy: str
    azeotropes: tuple[Azeotrope, ...] = ()
    _ln_alpha_of_x: Callable[[np.ndarray], np.ndarray] = field(default=None, repr=False)
    _ln_alpha_of_y: Callable[[np.ndarray], np.ndarray] = field(default=None, repr=False)
    _temperature_of_x: Callable[[np.ndarray], np.ndarray] | None = field(default=None, repr=False)

    # ------------------------------------------------------------------ construction
    @classmethod
    def constant_alpha(
        cls, alpha: float, *, light: str = "light", heavy: str = "heavy", points: int = 201
    ) -> "EquilibriumCurve":
        """``y = alpha x / (1 + (alpha - 1) x)``: the ideal curve of constant relative
        volatility (no temperatures)."""
        if not alpha > 1.0:
            raise ValueError(f"a constant relative volatility must exceed 1, not {alpha}")
        x = _lobatto(points)
        ln_alpha = math.log(alpha)
        y = alpha * x / (1.0 + (alpha - 1.0) * x)

        def constant(values):
            return np.full(np.shape(values), ln_alpha)

        return cls(
            x=x, y=y, temperature=np.full_like(x, np.nan), relative_volatility=np.full_like(x, alpha),
            pressure=float("nan"), light=light, heavy=heavy, azeotropes=(),
            _ln_alpha_of_x=constant, _ln_alpha_of_y=constant, _temperature_of_x=None,
        )

    @classmethod
    def from_points(
        cls, x, y, *, light: str = "light", heavy: str = "heavy", pressure: float = float("nan")
    ) -> "EquilibriumCurve":
        """A curve through tabulated equilibrium pairs (e.g. a textbook's x-y table): ``ln alpha``
        of the points strictly inside (0, 1) interpolated by cubic splines (extrapolated to the
        pure ends); no temperatures, no azeotrope search."""
        x = np.asarray(x, dtype=float)
        y = np.asarray(y, dtype=float)
        inside = (x > 0.0) & (x < 1.0)
        x, y = x[inside], y[inside]
        order = np.argsort(x)
        x, y = x[order], y[order]
        if x.size < 4 or not np.all(np.diff(y) > 0.0):
            raise ValueError("an equilibrium table needs at least 4 points inside (0, 1) with y increasing in x")
        ln_alpha = np.log(y * (1.0 - x) / (x * (1.0 - y)))
        return cls(
            x=x, y=y, temperature=np.full_like(x, np.nan), relative_volatility=np.exp(ln_alpha),
            pressure=float(pressure), light=light, heavy=heavy, azeotropes=(),
            _ln_alpha_of_x=CubicSpline(x, ln_alpha), _ln_alpha_of_y=CubicSpline(y, ln_alpha), _temperature_of_x=None,
        )

    @classmethod
    def from_thermo(
        cls, thermo: ThermoPackage, pressure: float, light_index: int, points: int = CURVE_POINTS
    ) -> "EquilibriumCurve":
        """The curve from bubble points of ``thermo`` (a binary package) at ``pressure`` Pa, with
        component ``light_index`` (0 or 1) as the light one."""
        if thermo.component_count != 2:
            raise ValueError("an equilibrium curve needs a binary thermo package")
        heavy_index = 1 - light_index
        x = _lobatto(points)
        T, alpha = _bubble_alpha(thermo, pressure, light_index, x)
        y = alpha * x / (1.0 + (alpha - 1.0) * x)
        if not np.all(np.diff(y) > 0.0):
            bad = int(np.argmin(np.diff(y)))
            raise ThermoError(
                f"the equilibrium curve y(x) of {thermo.names[light_index]} is not increasing near x = {x[bad]:.4g} "
                f"at {pressure / 1e3:.4g} kPa: the activity model predicts a liquid split there, which the binary "
                "shortcut cannot treat"
            )
        ln_alpha = np.log(alpha)
        azeotropes = _find_azeotropes(thermo, pressure, light_index, x, ln_alpha)
        return cls(
            x=x, y=y, temperature=T, relative_volatility=alpha, pressure=float(pressure),
            light=thermo.names[light_index], heavy=thermo.names[heavy_index], azeotropes=azeotropes,
            _ln_alpha_of_x=CubicSpline(x, ln_alpha), _ln_alpha_of_y=CubicSpline(y, ln_alpha),
            _temperature_of_x=CubicSpline(x, T),
        )

    # ------------------------------------------------------------------ evaluation
    def y_of_x(self, x) -> np.ndarray:
        """Vapor in equilibrium with liquid ``x`` (light mole fractions)."""
        x = np.clip(np.asarray(x, dtype=float), 0.0, 1.0)
        alpha = np.exp(self._ln_alpha_of_x(x))
        return alpha * x / (1.0 + (alpha - 1.0) * x)

    def x_of_y(self, y) -> np.ndarray:
        """Liquid in equilibrium with vapor ``y``."""
        y = np.clip(np.asarray(y, dtype=float), 0.0, 1.0)
        alpha = np.exp(self._ln_alpha_of_y(y))
        return y / (alpha - (alpha - 1.0) * y)

    def alpha_of_x(self, x) -> np.ndarray:
        return np.exp(self._ln_alpha_of_x(np.clip(np.asarray(x, dtype=float), 0.0, 1.0)))

    def temperature_of_x(self, x) -> np.ndarray:
        """Bubble temperature (K) of liquid ``x``; NaN on a constant-alpha curve."""
        x = np.clip(np.asarray(x, dtype=float), 0.0, 1.0)
        if self._temperature_of_x is None:
            return np.full(np.shape(x), np.nan)
        return self._temperature_of_x(x)

    def dew_temperature_of_y(self, y) -> np.ndarray:
        """Dew temperature (K) of vapor ``y``: the bubble temperature of the liquid in
        equilibrium with it."""
        return self.temperature_of_x(self.x_of_y(y))

    def feasible_region(self, x_feed: float) -> tuple[float, float]:
        """The light-fraction interval around ``x_feed`` bounded by azeotropes (or the pure
        components): the products of one column lie inside it."""
        bounds = [0.0] + [a.x for a in self.azeotropes] + [1.0]
        for low, high in zip(bounds[:-1], bounds[1:]):
            if low < x_feed < high:
                return low, high
        azeotrope = min(self.azeotropes, key=lambda a: abs(a.x - x_feed))
        raise SpecError(
            f"the feed (x = {x_feed:.6g} {self.light}) is at the azeotrope x = {azeotrope.x:.6g}, "
            f"{describe_temperature(azeotrope.temperature)}: distillation cannot separate it"
        )

    def azeotrope_above(self, x: float) -> Azeotrope | None:
        above = [a for a in self.azeotropes if a.x > x]
        return min(above, key=lambda a: a.x) if above else None

    def azeotrope_below(self, x: float) -> Azeotrope | None:
        below = [a for a in self.azeotropes if a.x < x]
        return max(below, key=lambda a: a.x) if below else None


def _lobatto(points: int) -> np.ndarray:
    """``(1 - cos(pi t)) / 2`` on an even grid in t: exactly 0 and 1 at the ends, spacing about
    ``(pi / points)^2 / 4`` there."""
    t = np.linspace(0.0, 1.0, points)
    x = 0.5 * (1.0 - np.cos(np.pi * t))
    x[0], x[-1] = 0.0, 1.0
    return x


def _bubble_alpha(thermo: ThermoPackage, pressure: float, light_index: int, x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Bubble temperature and ``K_light / K_heavy`` of liquids with light fraction ``x``."""
    x = np.atleast_1d(np.asarray(x, dtype=float))
    X = np.empty((x.shape[0], 2))
    X[:, light_index] = x
    X[:, 1 - light_index] = 1.0 - x
    P = np.full(x.shape[0], float(pressure))
    T, _ = bubble_temperature(thermo, P, X)
    K = thermo.k_values(T, P, X, derivatives=False).K
    return T, K[:, light_index] / K[:, 1 - light_index]


def _find_azeotropes(thermo, pressure, light_index, x, ln_alpha) -> tuple[Azeotrope, ...]:
    """Where ln alpha changes sign on the grid, refined on exact bubble points (Brent 1973)."""
    found = []
    sign = np.sign(ln_alpha)
    for k in np.nonzero(sign[:-1] * sign[1:] < 0)[0]:
        def gap(value: float) -> float:
            return float(np.log(_bubble_alpha(thermo, pressure, light_index, np.array([value]))[1][0]))

        x_az = brentq(gap, float(x[k]), float(x[k + 1]), xtol=1e-13)
        T_az = float(_bubble_alpha(thermo, pressure, light_index, np.array([x_az]))[0][0])
        boiling = "minimum" if ln_alpha[k] > 0 else "maximum"
        found.append(Azeotrope(float(x_az), T_az, float(pressure), boiling))
    return tuple(found)


def describe_temperature(temperature: float) -> str:
    """``"351.23 K (78.08 degC)"``, or "temperature not known" on a curve without temperatures."""
    if not np.isfinite(temperature):
        return "temperature not known"
    return f"{temperature:.2f} K ({temperature - 273.15:.2f} degC)"


def check_product_purities(curve: EquilibriumCurve, x_distillate: float, x_bottoms: float, x_feed: float) -> None:
    """Product purities inside the feed's distillation region, x_B < x_F < x_D, and not beyond
    an azeotrope (which no number of stages reaches)."""
    if not (0.0 < x_bottoms < x_feed < x_distillate < 1.0):
        raise SpecError(
            f"the binary design needs 0 < x_B < x_F < x_D < 1 in {curve.light}: got x_B = {x_bottoms:.6g}, "
            f"x_F = {x_feed:.6g}, x_D = {x_distillate:.6g} (a pure product needs infinitely many stages)"
        )
    low, high = curve.feasible_region(x_feed)
    if x_distillate >= high and high < 1.0:
        raise _beyond_azeotrope(curve, f"distillate purity x_D = {x_distillate:.6g}", curve.azeotrope_above(x_feed), "distillate")
    if x_bottoms <= low and low > 0.0:
        raise _beyond_azeotrope(curve, f"bottoms x_B = {x_bottoms:.6g}", curve.azeotrope_below(x_feed), "bottoms")


def _beyond_azeotrope(curve: EquilibriumCurve, purity: str, azeotrope: Azeotrope, product: str) -> SpecError:
    return SpecError(
        f"{purity} {curve.light} is beyond the {azeotrope.boiling}-boiling azeotrope at x = {azeotrope.x:.4f} "
        f"{curve.light}, {describe_temperature(azeotrope.temperature)}, {azeotrope.pressure / 1e3:.4g} kPa: "
        f"no number of stages reaches it (the {product} can at best approach the azeotrope)"
    )
