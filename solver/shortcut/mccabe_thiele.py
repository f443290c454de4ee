"""Binary operating-line design (McCabe & Thiele, Ind. Eng. Chem. 17 (1925) 605) on the case's
own thermodynamics.

What is built, and from what:

* **Equilibrium curve** ``y(x)`` of the light component at one column pressure, the arithmetic
  mean of the stage pressures (``pressure=`` overrides it), from bubble points of the case's
  thermo package (modified Raoult's law with its activity model, so non-ideal curves and
  azeotropes come out as the model has them). The relative volatility ``alpha = K_L / K_H`` is
  tabulated on 801 Chebyshev-Lobatto points in ``x`` (dense near both pure ends, where
  high-purity products step) and interpolated as ``ln alpha`` by cubic splines, in ``x`` for
  ``y(x)`` and in ``y`` for the inverse ``x(y)``; ``y = alpha x / (1 + (alpha - 1) x)``.
* **Feed thermal condition** ``q`` from the feed's rigorous enthalpy
  (:func:`solver.thermo.flash.feed_state`, judged at the feed stage's pressure as the rigorous
  engine does).
* **Operating lines** under constant molar overflow: rectifying ``y = (L/V) x + D x_D / V``
  through ``(x_D, x_D)``; stripping ``y = (L'/V') x - B x_B / V'`` through ``(x_B, x_B)`` with
  ``L' = L + q F`` and ``V' = V - (1 - q) F`` (e.g. McCabe, Smith & Harriott, *Unit Operations of
  Chemical Engineering*, 7th ed., 2005, ch. 21).
* **Stage stepping** from the top, counted as traystack counts stages: the condenser is stage 1
  and the reboiler stage N. A total condenser is not an equilibrium stage (its liquid is
  ``x_D`` and the vapor from stage 2 is ``y_2 = x_D``); a partial condenser and the partial
  reboiler are. The feed stage is the first stage whose liquid is paired with the stripping
  line; by default the optimal one (the step that crosses the intersection of the operating
  lines), or the one given. The last step is also reported as a fraction, the usual ratio of
  horizontal distances ``(x_{N-1} - x_B) / (x_{N-1} - x_N)``.
* **Minimum stages** at total reflux (the operating lines on the diagonal).
* **Minimum reflux** from the pinch: the feed pinch, where the q-line meets the equilibrium
  curve, and a tangent pinch of a non-ideal curve away from the feed -- the rectifying line from
  ``(x_D, x_D)`` touching the curve between the feed pinch and ``x_D`` (ethanol-water near its
  azeotrope is the classic case), or the stripping line from ``(x_B, x_B)`` touching it between
  ``x_B`` and the feed pinch. The minimum reflux is the largest of the three requirements.
* **Azeotropes** on the curve (``alpha = 1``); a product purity beyond one is a
  :class:`~solver.errors.SpecError` naming the azeotrope's composition and temperature.

The stepping is a recurrence (each stage needs the one above it), so it runs stage by stage;
everything evaluated over many compositions at once (the curve, pinch searches) is vectorized.

Units are SI: K, Pa, mol/s, W, J/mol. Compositions are mole fractions of the light component.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable, Sequence

import numpy as np
from scipy.interpolate import CubicSpline
from scipy.optimize import brentq, minimize_scalar

from ..case import Case, Spec
from ..errors import SpecError, ThermoError
from ..thermo.flash import bubble_temperature, feed_state
from ..thermo.package import ThermoPackage

__all__ = [
    "Azeotrope",
    "BinaryDesign",
    "BinaryProblem",
    "EquilibriumCurve",
    "MinimumReflux",
    "OperatingLine",
    "binary_problem",
    "design_binary",
    "mccabe_thiele",
    "minimum_reflux",
    "total_reflux_stages",
]

#: Points of the tabulated equilibrium curve (Chebyshev-Lobatto in x).
CURVE_POINTS = 801
#: Most equilibrium stages the stepping takes before it reports a pinch.
MAX_EQUILIBRIUM_STAGES = 1000
#: Points of the vectorized pinch searches.
_PINCH_GRID = 4001
#: Relative margin by which a tangent requirement must exceed the feed pinch to be reported.
_TANGENT_MARGIN = 1e-7


# =======================================================================================
# Equilibrium curve
# =======================================================================================


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
            f"{_celsius(azeotrope.temperature)}: distillation cannot separate it"
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


def _celsius(temperature: float) -> str:
    if not np.isfinite(temperature):
        return "temperature not known"
    return f"{temperature:.2f} K ({temperature - 273.15:.2f} degC)"


# =======================================================================================
# Operating lines and results
# =======================================================================================


@dataclass(frozen=True)
class OperatingLine:
    """``y = slope x + intercept``."""

    slope: float
    intercept: float

    def __call__(self, x):
        return self.slope * np.asarray(x, dtype=float) + self.intercept


@dataclass(frozen=True)
class MinimumReflux:
    """The minimum reflux ratio and where the column pinches.

    ``pinch`` is "feed" (the q-line meets the equilibrium curve) or "tangent" (an operating
    line touches the curve away from the feed); ``section`` is "feed", "rectifying" or
    "stripping"; ``x, y`` is the pinch point on the curve. ``feed_pinch_ratio`` is what the feed
    pinch alone asks for, so a tangent pinch shows by how much it raises the minimum."""

    ratio: float
    pinch: str
    section: str
    x: float
    y: float
    feed_pinch_ratio: float
    feed_pinch_x: float
    feed_pinch_y: float


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


# =======================================================================================
# The construction on given curve, compositions, q and reflux
# =======================================================================================


def feed_pinch(
    curve: EquilibriumCurve, x_feed: float, q: float, region: tuple[float, float] | None = None
) -> tuple[float, float]:
    """Where the q-line ``q x + (1 - q) y = x_F`` meets the equilibrium curve, (x, y)."""
    low, high = region if region is not None else curve.feasible_region(x_feed)
    if abs(q - 1.0) < 1e-12:
        return float(x_feed), float(curve.y_of_x(x_feed))

    def gap(x: float) -> float:
        return float(q * x + (1.0 - q) * curve.y_of_x(x) - x_feed)

    if q > 1.0:
        a, b = x_feed, high
    else:
        a, b = low, x_feed
    if gap(a) * gap(b) > 0.0:
        # no crossing inside the region (a q far from 0..1 with a feed near an end)
        x = a if abs(gap(a)) < abs(gap(b)) else b
    else:
        x = brentq(gap, a, b, xtol=1e-14)
    return float(x), float(curve.y_of_x(x))


def minimum_reflux(curve: EquilibriumCurve, x_distillate: float, x_bottoms: float, x_feed: float, q: float) -> MinimumReflux:
    """Minimum reflux ratio of the binary under constant molar overflow.

    Three requirements, the largest wins: the feed pinch ``R = (x_D - y_p) / (y_p - x_p)``; the
    rectifying line from ``(x_D, x_D)`` must stay below the curve for ``x_p <= x < x_D``, i.e.
    ``R >= max (x_D - y) / (y - x)`` there (a tangent pinch when the maximum is not at x_p); the
    stripping line from ``(x_B, x_B)`` must stay below the curve for ``x_B < x <= x_p``, i.e.
    ``L'/V' <= min (y - x_B) / (x - x_B)``, turned into a reflux ratio through
    ``L' = R D + q F``, ``V' = (R + 1) D - (1 - q) F`` (McCabe, Smith & Harriott, 7th ed.,
    ch. 21, on minimum reflux and tangent pinches)."""
    region = curve.feasible_region(x_feed)
    x_p, y_p = feed_pinch(curve, x_feed, q, region)
    feed_ratio = (x_distillate - y_p) / (y_p - x_p)
    best = MinimumReflux(feed_ratio, "feed", "feed", x_p, y_p, feed_ratio, x_p, y_p)

    def rectifying_requirement(x):
        y = curve.y_of_x(x)
        return (x_distillate - y) / (y - x)

    low = min(max(x_p, x_bottoms), x_distillate)
    if low < x_distillate:
        grid = np.linspace(low, x_distillate, _PINCH_GRID)[:-1]
        values = rectifying_requirement(grid)
        k = int(np.argmax(values))
        if k > 0:
            x_t, value = _refine_extremum(rectifying_requirement, grid, k, maximize=True)
            if value > feed_ratio * (1.0 + _TANGENT_MARGIN) + 1e-12 and value > best.ratio:
                best = MinimumReflux(value, "tangent", "rectifying", x_t, float(curve.y_of_x(x_t)), feed_ratio, x_p, y_p)

    F_over_D = (x_distillate - x_bottoms) / (x_feed - x_bottoms)

    def stripping_slope(x):
        return (curve.y_of_x(x) - x_bottoms) / (x - x_bottoms)

    high = max(min(x_p, x_distillate), x_bottoms)
    if high > x_bottoms:
        grid = np.linspace(x_bottoms, high, _PINCH_GRID)[1:]
        values = stripping_slope(grid)
        k = int(np.argmin(values))
        if k < grid.size - 1:
            x_t, slope = _refine_extremum(stripping_slope, grid, k, maximize=False)
            if slope > 1.0:
                # L'/V' = s  ->  R from the section balances
                ratio = (slope - slope * (1.0 - q) * F_over_D - q * F_over_D) / (1.0 - slope)
                if ratio > feed_ratio * (1.0 + _TANGENT_MARGIN) + 1e-12 and ratio > best.ratio:
                    best = MinimumReflux(ratio, "tangent", "stripping", x_t, float(curve.y_of_x(x_t)), feed_ratio, x_p, y_p)
    if best.ratio < 0.0:
        best = MinimumReflux(0.0, best.pinch, best.section, best.x, best.y, feed_ratio, x_p, y_p)
    return best


def _refine_extremum(function, grid: np.ndarray, k: int, *, maximize: bool) -> tuple[float, float]:
    """Refine a grid extremum at index k by a bounded scalar search (Brent) between its
    neighbours."""
    a = float(grid[max(k - 1, 0)])
    b = float(grid[min(k + 1, grid.size - 1)])
    sign = -1.0 if maximize else 1.0
    found = minimize_scalar(lambda v: sign * float(function(v)), bounds=(a, b), method="bounded", options={"xatol": 1e-13})
    x_best, value = float(found.x), float(function(found.x))
    grid_value = float(function(grid[k]))
    if (maximize and grid_value > value) or (not maximize and grid_value < value):
        return float(grid[k]), grid_value
    return x_best, value


@dataclass(frozen=True)
class _Steps:
    x: np.ndarray  # liquid leaving each stage, traystack numbering (a total condenser's is x_D)
    y: np.ndarray  # vapor leaving each stage (a total condenser's set to x_D)
    feed_stage: int
    fractional_stages: float


def _step_stages(
    curve: EquilibriumCurve,
    x_distillate: float,
    x_bottoms: float,
    top: Callable,
    bottom: Callable,
    *,
    condenser: str,
    feed_stage: int | None,
    x_switch: float,
    what: str,
    max_equilibrium_stages: int = MAX_EQUILIBRIUM_STAGES,
) -> _Steps:
    """Step from the top: ``x_n = x(y_n)`` on the curve, then ``y_{n+1}`` on the rectifying
    line while n is above the feed stage, on the stripping line from the feed stage on; stop
    at the first liquid at or below ``x_B`` (that stage is the reboiler)."""
    xs: list[float] = []
    ys: list[float] = []
    n = 0
    if condenser == "total":
        xs.append(x_distillate)
        ys.append(x_distillate)
        n = 1
    previous = x_distillate
    y = x_distillate
    switched = False
    chosen = feed_stage
    while True:
        n += 1
        x = float(curve.x_of_y(y))
        xs.append(x)
        ys.append(y)
        if x <= x_bottoms:
            break
        if x >= previous - 1e-13 or len(xs) > max_equilibrium_stages:
            hint = f"; with the feed on stage {feed_stage}, that stage may be too far from the optimum" if feed_stage else ""
            raise SpecError(
                f"{what}: the stepping pinches at x = {x:.6g}, y = {y:.6g} {curve.light} after {n} stages "
                f"(an operating line meets the equilibrium curve before x_B = {x_bottoms:.6g}){hint}"
            )
        if feed_stage is None:
            if not switched and x <= x_switch:
                switched, chosen = True, n
        else:
            switched = n >= feed_stage
        y = float(bottom(x) if switched else top(x))
        previous = x
    if chosen is None:
        chosen = n
    if feed_stage is not None and feed_stage > n:
        raise SpecError(
            f"{what}: the feed stage {feed_stage} is below the bottom of the column the stepping gives "
            f"({n} stages reach x_B = {x_bottoms:.6g} on the rectifying line alone)"
        )
    x_before = xs[-2] if len(xs) >= 2 else x_distillate
    fraction = (x_before - x_bottoms) / (x_before - xs[-1]) if x_before > xs[-1] else 1.0
    return _Steps(np.array(xs), np.array(ys), int(chosen), float(n - 1 + fraction))


def total_reflux_stages(curve: EquilibriumCurve, x_distillate: float, x_bottoms: float, condenser: str = "total") -> float:
    """Minimum stages at total reflux (operating lines on the diagonal), fractional, counted as
    traystack counts (a total condenser is stage 1; subtract 1 for the equilibrium stages)."""
    identity = lambda x: x  # noqa: E731
    steps = _step_stages(
        curve, x_distillate, x_bottoms, identity, identity, condenser=condenser, feed_stage=None,
        x_switch=-1.0, what="total reflux",
    )
    return steps.fractional_stages


def _staircase(steps: _Steps, x_distillate: float, condenser: str) -> np.ndarray:
    first = 1 if condenser == "total" else 0
    points = [(x_distillate, x_distillate)]
    xs, ys = steps.x, steps.y
    for n in range(first, xs.size):
        points.append((xs[n], ys[n]))
        if n + 1 < xs.size:
            points.append((xs[n], ys[n + 1]))
    return np.array(points)


def stepping_fields(curve: EquilibriumCurve, steps: _Steps, optimal: _Steps, x_distillate: float, x_bottoms: float,
                    condenser: str) -> dict:
    """The BinaryDesign fields that follow from a stage stepping, the same for every binary
    construction: stage counts (traystack numbering and equilibrium stages), the minimum at
    total reflux, feed stages, the stage compositions and temperatures, the staircase."""
    minimum = total_reflux_stages(curve, x_distillate, x_bottoms, condenser)
    offset = 1.0 if condenser == "total" else 0.0
    return dict(
        minimum_stages=minimum,
        minimum_equilibrium_stages=minimum - offset,
        stages=steps.x.size,
        fractional_stages=steps.fractional_stages,
        equilibrium_stages=steps.fractional_stages - offset,
        feed_stage=steps.feed_stage,
        optimal_feed_stage=optimal.feed_stage,
        stage_x=steps.x,
        stage_y=steps.y,
        stage_temperature=curve.temperature_of_x(steps.x),
        staircase=_staircase(steps, x_distillate, condenser),
    )


def _check_products(curve: EquilibriumCurve, x_distillate: float, x_bottoms: float, x_feed: float) -> None:
    """Product purities inside the feed's distillation region, x_B < x_F < x_D."""
    if not (0.0 < x_bottoms < x_feed < x_distillate < 1.0):
        raise SpecError(
            f"the binary design needs 0 < x_B < x_F < x_D < 1 in {curve.light}: got x_B = {x_bottoms:.6g}, "
            f"x_F = {x_feed:.6g}, x_D = {x_distillate:.6g} (a pure product needs infinitely many stages)"
        )
    low, high = curve.feasible_region(x_feed)
    if x_distillate >= high and high < 1.0:
        azeotrope = curve.azeotrope_above(x_feed)
        raise SpecError(
            f"distillate purity x_D = {x_distillate:.6g} {curve.light} is beyond the {azeotrope.boiling}-boiling azeotrope "
            f"at x = {azeotrope.x:.4f} {curve.light}, {_celsius(azeotrope.temperature)}, {azeotrope.pressure / 1e3:.4g} kPa: "
            f"no number of stages reaches it (the distillate can at best approach the azeotrope)"
        )
    if x_bottoms <= low and low > 0.0:
        azeotrope = curve.azeotrope_below(x_feed)
        raise SpecError(
            f"bottoms x_B = {x_bottoms:.6g} {curve.light} is beyond the {azeotrope.boiling}-boiling azeotrope "
            f"at x = {azeotrope.x:.4f} {curve.light}, {_celsius(azeotrope.temperature)}, {azeotrope.pressure / 1e3:.4g} kPa: "
            f"no number of stages reaches it (the bottoms can at best approach the azeotrope)"
        )


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
    """The McCabe-Thiele construction on a given equilibrium curve.

    ``x_*`` are light mole fractions, ``q`` the feed's thermal condition, ``reflux_ratio`` L/D,
    ``feed_flow`` mol/s, ``condenser`` "total" or "partial" (for a partial condenser ``x_D`` is
    the vapor product). ``feed_stage`` (traystack numbering) fixes where the lines switch;
    None takes the optimal stage. ``latent_heat(x)`` (J/mol, saturated vapor of composition x to
    saturated liquid) gives the CMO duty estimates ``Q_C = -V lambda(x_D)`` (total condenser; a
    partial one condenses only the reflux, ``-L lambda(x_D)``) and ``Q_R = V' lambda(x_B)``; NaN
    without it."""
    if condenser not in ("total", "partial"):
        raise SpecError(f"the binary design needs a total or partial condenser, not {condenser!r}")
    _check_products(curve, x_distillate, x_bottoms, x_feed)
    F = float(feed_flow)
    D = F * (x_feed - x_bottoms) / (x_distillate - x_bottoms)
    B = F - D
    pinch = minimum_reflux(curve, x_distillate, x_bottoms, x_feed, q)
    if not reflux_ratio > pinch.ratio * (1.0 + 1e-9):
        raise SpecError(
            f"reflux ratio {reflux_ratio:.6g} is not above the minimum reflux ratio {pinch.ratio:.6g} "
            f"({pinch.pinch} pinch at x = {pinch.x:.4f}, y = {pinch.y:.4f} {curve.light}): no number of stages meets "
            f"x_D = {x_distillate:.6g}, x_B = {x_bottoms:.6g}"
        )
    L = reflux_ratio * D
    V = L + D
    L_strip = L + q * F
    V_strip = V - (1.0 - q) * F
    if V_strip <= 0.0:
        raise SpecError(
            f"reflux ratio {reflux_ratio:.6g} leaves no vapor in the stripping section with a feed of q = {q:.4g} "
            f"(V' = V - (1 - q) F = {V_strip:.6g} mol/s)"
        )
    top = OperatingLine(L / V, D * x_distillate / V)
    bottom = OperatingLine(L_strip / V_strip, -B * x_bottoms / V_strip)
    x_int = (bottom.intercept - top.intercept) / (top.slope - bottom.slope)
    intersection = (float(x_int), float(top(x_int)))
    what = f"McCabe-Thiele at R = {reflux_ratio:.6g}"
    steps = _step_stages(
        curve, x_distillate, x_bottoms, top, bottom, condenser=condenser, feed_stage=feed_stage, x_switch=x_int, what=what
    )
    optimal = steps if feed_stage is None else _step_stages(
        curve, x_distillate, x_bottoms, top, bottom, condenser=condenser, feed_stage=None, x_switch=x_int, what=what
    )
    N = steps.x.size
    f = steps.feed_stage
    numbers = np.arange(1, N + 1)
    liquid = np.where(numbers < f, L, L_strip)
    vapor = np.where(numbers <= f, V, V_strip)
    liquid[-1] = B
    vapor[0] = 0.0 if condenser == "total" else D
    if latent_heat is not None:
        latent_top, latent_bottom = latent_heat(x_distillate), latent_heat(x_bottoms)
        condenser_duty = -(V if condenser == "total" else L) * latent_top
        reboiler_duty = V_strip * latent_bottom
    else:
        condenser_duty = reboiler_duty = float("nan")
    return BinaryDesign(
        method="McCabe-Thiele",
        light=curve.light,
        heavy=curve.heavy,
        pressure=curve.pressure,
        condenser=condenser,
        curve=curve,
        feed_flow=F,
        x_feed=float(x_feed),
        q=float(q),
        distillate_flow=D,
        bottoms_flow=B,
        x_distillate=float(x_distillate),
        x_bottoms=float(x_bottoms),
        reflux_ratio=float(reflux_ratio),
        boilup_ratio=V_strip / B,
        minimum_reflux=pinch,
        liquid_flow=liquid,
        vapor_flow=vapor,
        rectifying_line=top,
        stripping_line=bottom,
        intersection=intersection,
        condenser_duty=float(condenser_duty),
        reboiler_duty=float(reboiler_duty),
        notes=tuple(notes),
        **stepping_fields(curve, steps, optimal, x_distillate, x_bottoms, condenser),
    )


# =======================================================================================
# From a case: the binary, its feed, its products and reflux
# =======================================================================================


@dataclass(frozen=True, eq=False)
class BinaryProblem:
    """Everything the binary shortcuts take from a case: the curve at the design pressure, the
    feed (flow mol/s, light fraction, q, rigorous molar enthalpy J/mol), the products and the
    reflux ratio from the specs, the column's condenser, and the latent heat function."""

    thermo: ThermoPackage
    curve: EquilibriumCurve
    light_index: int
    pressure: float
    condenser: str
    feed_flow: float
    x_feed: float
    q: float
    feed_enthalpy: float
    distillate_flow: float
    x_distillate: float
    x_bottoms: float
    reflux_ratio: float | None
    reflux_factor: float | None
    latent_heat: Callable[[float], float]
    reflux_temperature: float | None
    notes: tuple[str, ...]


def _describe_spec(spec: Spec) -> str:
    key = f" ({spec.key})" if spec.key else ""
    if spec.kind == "mole_fraction":
        return f"{spec.product} mole fraction of {spec.component} = {spec.value:.6g}{key}"
    if spec.kind == "recovery":
        return f"recovery of {spec.component} in the {spec.product} = {spec.value:.6g}{key}"
    return f"{spec.kind} = {spec.value:.6g}{key}"


def check_simple_column(case: Case, method: str) -> list[str]:
    """The shortcuts treat one feed, a condenser and a partial reboiler, no side draws; side
    heaters are left out with a note (returned)."""
    column = case.column
    where = case.source_file or "<case>"
    rigorous = "; `traystack run` solves such a column rigorously, the shortcut comparison needs a simple one"
    if len(case.feeds) != 1:
        raise SpecError(f"{where}: feeds: the {method} shortcut handles one feed; this case has {len(case.feeds)}{rigorous}")
    if column.condenser not in ("total", "partial") or column.reboiler != "partial":
        raise SpecError(
            f"{where}: column: the {method} shortcut needs a condenser (total or partial) and a partial reboiler; "
            f"this column has condenser = {column.condenser!r}, reboiler = {column.reboiler!r}{rigorous}"
        )
    if column.side_draws:
        raise SpecError(
            f"{where}: column.side_draws: the {method} shortcut handles no side draws; this column has "
            f"{len(column.side_draws)}{rigorous}"
        )
    notes = []
    if column.stage_duties:
        notes.append(f"{len(column.stage_duties)} side heater(s)/cooler(s) of the case are not in the shortcut")
    if any(e < 1.0 for e in column.efficiencies):
        notes.append("the shortcut counts equilibrium stages; the case's Murphree efficiencies are not applied")
    return notes


def feed_condition(case: Case, thermo: ThermoPackage):
    """The case's single feed flashed at its own pressure, q judged at its stage's pressure (as
    :func:`solver.engine.feed_data` does)."""
    feed = case.feeds[0]
    stage_pressure = float(case.column.pressures[feed.stage - 1])
    pressure = feed.pressure if feed.pressure is not None else stage_pressure
    return feed_state(
        thermo, np.asarray(feed.composition, dtype=float), pressure,
        temperature=feed.temperature, vapor_fraction=feed.vapor_fraction, reference_pressure=stage_pressure,
    )


def _binary_rows(specs, names, light: str, F: float, z: float, q: float, condenser: str, latent_top: float,
                 latent_bottom: float):
    """One linear row per usable spec in the unknowns (D, d, V): distillate rate, light
    component in the distillate, vapor from the top tray. Returns (split rows, energy rows,
    ignored specs)."""
    split, energy, ignored = [], [], []
    for spec in specs:
        v = spec.value
        label = _describe_spec(spec)
        if spec.kind == "mole_fraction":
            xl = v if spec.component == light else 1.0 - v
            if spec.product == "distillate":
                split.append(([-xl, 1.0, 0.0], 0.0, label))
            else:
                split.append(([xl, -1.0, 0.0], xl * F - F * z, label))
        elif spec.kind == "recovery":
            is_light = spec.component == light
            if spec.product == "distillate":
                split.append(([0.0, 1.0, 0.0], v * F * z, label) if is_light else ([1.0, -1.0, 0.0], v * F * (1 - z), label))
            else:
                split.append(
                    ([0.0, 1.0, 0.0], (1 - v) * F * z, label) if is_light else ([-1.0, 1.0, 0.0], (v - 1) * F * (1 - z), label)
                )
        elif spec.kind == "distillate_rate":
            split.append(([1.0, 0.0, 0.0], v, label))
        elif spec.kind == "bottoms_rate":
            split.append(([1.0, 0.0, 0.0], F - v, label))
        elif spec.kind == "reflux_ratio":
            energy.append(([-(v + 1.0), 0.0, 1.0], 0.0, label))
        elif spec.kind == "boilup_ratio":
            energy.append(([v, 0.0, 1.0], v * F + (1.0 - q) * F, label))
        elif spec.kind == "condenser_duty":
            if condenser == "total":
                energy.append(([0.0, 0.0, 1.0], abs(v) / latent_top, label))
            else:
                energy.append(([-1.0, 0.0, 1.0], abs(v) / latent_top, label))
        elif spec.kind == "reboiler_duty":
            energy.append(([0.0, 0.0, 1.0], v / latent_bottom + (1.0 - q) * F, label))
        else:
            ignored.append(label)
    return split, energy, ignored


def _solve_split(case, light, F, z, q, condenser, latent, reflux_ratio, reflux_factor):
    """(D, x_D, x_B, R or None, notes) from the case's specs, with the keyword reflux (ratio or
    factor) replacing the case's reflux, boilup and duty specs."""
    names = case.component_names
    notes: list[str] = []
    override = reflux_ratio is not None or reflux_factor is not None
    latent_top = latent_bottom = latent(z)
    for _ in range(6):
        split, energy, ignored = _binary_rows(case.specs, names, light, F, z, q, condenser, latent_top, latent_bottom)
        if override:
            if energy:
                notes.append("the case's " + ", ".join(row[2] for row in energy) + " replaced by the reflux given")
            energy = []
            if reflux_ratio is not None:
                energy = [([-(reflux_ratio + 1.0), 0.0, 1.0], 0.0, f"reflux_ratio = {reflux_ratio:.6g} (given)")]
        rows = split + energy
        need_energy = reflux_factor is None or reflux_ratio is not None
        wanted = 3 if need_energy else 2
        if len(rows) != wanted or len(split) < (1 if need_energy else 2) or len(split) > 2:
            given = [row[2] for row in rows] or ["none"]
            if len(rows) > wanted or len(split) > 2:
                advice = "remove one"
            else:
                wants = []
                if len(split) < 2:
                    wants.append("a product purity, recovery or product rate")
                if need_energy and not energy:
                    wants.append("a reflux (reflux_ratio, boilup_ratio or a duty spec, or reflux_ratio=/reflux_factor= here)")
                advice = "add " + " and ".join(wants)
            raise SpecError(
                "the binary shortcut needs specifications that fix x_D, x_B and the reflux: two product specs and a "
                "reflux (or one product spec with two of reflux/boilup/duty); the case gives "
                f"{len(rows)} it can use: " + "; ".join(given) + "; " + advice
                + ((" (not usable here: " + "; ".join(ignored) + ")") if ignored else "")
            )
        A = np.array([row[0] for row in rows], dtype=float)
        b = np.array([row[1] for row in rows], dtype=float)
        if not need_energy:
            A = A[:, :2]
        if np.linalg.cond(A) > 1e12:
            raise SpecError(
                "these specifications do not fix the product split (two of them say the same thing): "
                + "; ".join(row[2] for row in rows)
            )
        u = np.linalg.solve(A, b)
        D, d = float(u[0]), float(u[1])
        if not 0.0 < D < F:
            raise SpecError(
                f"the specifications give a distillate rate of {D:.6g} mol/s, outside (0, F = {F:.6g} mol/s): "
                + "; ".join(row[2] for row in rows)
            )
        x_D, x_B = d / D, (F * z - d) / (F - D)
        R = float(u[2]) / D - 1.0 if need_energy else None
        if not any(k in ("condenser_duty", "reboiler_duty") for k in (s.kind for s in case.specs)) or override:
            break
        new_top, new_bottom = latent(min(max(x_D, 0.0), 1.0)), latent(min(max(x_B, 0.0), 1.0))
        if abs(new_top - latent_top) < 1e-9 * latent_top and abs(new_bottom - latent_bottom) < 1e-9 * latent_bottom:
            break
        latent_top, latent_bottom = new_top, new_bottom
    if ignored:
        notes.append("not used by the shortcut: " + "; ".join(ignored))
    converted = ("boilup_ratio", "condenser_duty", "reboiler_duty")
    if not override and any(row[2].split(" ")[0] in converted for row in energy):
        notes.append("the reflux ratio was found from the boilup/duty spec by the CMO balances")
    if R is not None and not R > 0.0:
        raise SpecError(f"the specifications give a reflux ratio of {R:.6g}; it must be positive")
    return D, x_D, x_B, R, notes


def _light_index(thermo: ThermoPackage, pressure: float, z: np.ndarray) -> int:
    """The component that is more volatile at the feed's bubble point (on the feed's side of
    any azeotrope)."""
    T, _ = bubble_temperature(thermo, np.array([pressure]), z[None, :])
    K = thermo.k_values(T, np.array([pressure]), z[None, :], derivatives=False).K[0]
    return 0 if K[0] >= K[1] else 1


def binary_problem(
    case: Case,
    thermo: ThermoPackage | None = None,
    *,
    reflux_ratio: float | None = None,
    reflux_factor: float | None = None,
    pressure: float | None = None,
    enthalpy_model: str | None = None,
    method: str = "binary",
) -> BinaryProblem:
    """Read a binary case for the shortcut designs (see :func:`design_binary`)."""
    if case.component_count != 2:
        raise SpecError(f"the {method} shortcut is for binaries; this case has {case.component_count} components")
    notes = check_simple_column(case, method)
    thermo = thermo or ThermoPackage.from_case(case)
    model = enthalpy_model or thermo.enthalpy_model
    P = float(np.mean(case.column.pressures)) if pressure is None else float(pressure)
    state = feed_condition(case, thermo)
    z_vector = np.asarray(case.feeds[0].composition, dtype=float)
    light_index = _light_index(thermo, P, z_vector)
    curve = EquilibriumCurve.from_thermo(thermo, P, light_index)
    light = case.component_names[light_index]
    z = float(z_vector[light_index])
    F = float(case.feeds[0].flow)

    def latent_heat(x: float) -> float:
        """Saturated vapor of composition x (at its dew point) minus saturated liquid of
        composition x (at its bubble point), J/mol, with the enthalpy model in use."""
        composition = np.zeros((1, 2))
        composition[0, light_index], composition[0, 1 - light_index] = x, 1.0 - x
        T_bubble = curve.temperature_of_x(np.array([x]))
        T_dew = curve.dew_temperature_of_y(np.array([x]))
        h_liquid = thermo.liquid_enthalpy(T_bubble, composition, model=model).molar[0]
        h_vapor = thermo.vapor_enthalpy(T_dew, composition, model=model).molar[0]
        return float(h_vapor - h_liquid)

    D, x_D, x_B, R, split_notes = _solve_split(
        case, light, F, z, state.q, case.column.condenser, latent_heat, reflux_ratio, reflux_factor
    )
    feed_enthalpy = state.enthalpy if model == "rigorous" else (1.0 - state.q) * thermo.cmo_latent_heat
    reflux_temperature = None
    column = case.column
    if column.condenser == "total" and (column.reflux_temperature is not None or column.reflux_subcooling):
        bubble = float(curve.temperature_of_x(np.array([x_D]))[0])
        if column.reflux_temperature is not None:
            reflux_temperature = column.reflux_temperature
        else:
            reflux_temperature = bubble - column.reflux_subcooling
    where = "mean column pressure" if pressure is None else "given"
    notes = notes + split_notes + [f"equilibrium curve at {P / 1e3:.6g} kPa ({where})"]
    return BinaryProblem(
        thermo=thermo, curve=curve, light_index=light_index, pressure=P, condenser=case.column.condenser,
        feed_flow=F, x_feed=z, q=float(state.q), feed_enthalpy=float(feed_enthalpy), distillate_flow=D,
        x_distillate=x_D, x_bottoms=x_B, reflux_ratio=R, reflux_factor=reflux_factor, latent_heat=latent_heat,
        reflux_temperature=reflux_temperature, notes=tuple(notes),
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
    """McCabe-Thiele design of a binary case.

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
        _check_products(problem.curve, problem.x_distillate, problem.x_bottoms, problem.x_feed)
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
