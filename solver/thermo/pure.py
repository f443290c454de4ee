"""Pure-component properties for all components at once, vectorized over temperatures, with
analytic temperature derivatives: vapor pressure, heat of vaporization, ideal-gas enthalpy and
heat capacity, saturated liquid molar volume.

CoolProp components are not evaluated through CoolProp here. Once per fluid (cached in the
process) their saturation curve and ideal-gas heat capacity are sampled with CoolProp's
``AbstractState`` (reference equations of state; Bell et al. 2014, Ind. Eng. Chem. Res. 53,
2498-2508) and represented by piecewise Chebyshev interpolants (Trefethen 2013, Approximation
Theory and Approximation Practice, SIAM, ch. 3-4), which numpy then evaluates for all stages and
components in one pass:

* saturation properties in the variable ``s = ln(1 - T/Tc)``, which turns the power laws of the
  near-critical region (heat of vaporization ~ (1 - Tr)^0.38, Watson 1943, Ind. Eng. Chem. 35,
  398) into smooth functions: ``Tr ln(Psat/Pc)`` (the quantity of Wagner's vapor-pressure
  equation, Wagner 1973, Cryogenics 13, 470), ``ln dHvap`` and ``ln V_liquid``;
* the ideal-gas heat capacity ``cp0`` in T; the ideal-gas enthalpy is its exact piecewise
  polynomial integral from 298.15 K, so ``h_ig(298.15 K) = 0`` and ``dh_ig/dT = cp0``.

Each interpolant has equal pieces of :data:`SATURATION_TERMS` (saturation) or
:data:`IDEAL_GAS_TERMS` (cp0) Chebyshev coefficients; the number of pieces
doubles until the interpolant matches CoolProp within :data:`FIT_TOLERANCE` at the
Chebyshev-Lobatto points of every piece (where the interpolation error of Chebyshev nodes of the
first kind peaks). The achieved maximum error is kept and reported by
:meth:`PureComponents.describe`. Each piece is evaluated as a power series in its local variable
u in [0, 1] by Horner's rule, which in numpy takes about half the array operations of
Clenshaw's recurrence; the conversion from the Chebyshev coefficients costs ~1e-13 relative at
this degree and is included in the checked error.

Outside the fitted range the evaluation extrapolates smoothly and never raises:
``ln Psat`` linear in 1/T (Clausius-Clapeyron), ``dHvap`` as a power of ``(1 - T/Tc)`` with the
exponent of the fit at its end (zero at and above Tc), ``cp0`` constant, liquid volume constant.
:meth:`PureComponents.check_temperature` is the explicit guard against temperatures at or above
a critical temperature or outside a user correlation's range.

User-defined components use their correlations (:mod:`solver.thermo.correlations`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache
from typing import Callable, Mapping, Sequence

import CoolProp.CoolProp as CP
import numpy as np
from numpy.polynomial import chebyshev, polynomial
from scipy.constants import R as GAS_CONSTANT
from scipy.constants import atm as ATMOSPHERIC_PRESSURE
from scipy.optimize import brentq

from solver.components import ComponentInfo
from solver.errors import ThermoError
from solver.thermo import correlations
from solver.thermo.data import ComponentData, Correlation

#: Chebyshev coefficients per piece of the saturation fits and of the cp0 fit. Few terms and
#: more pieces make the evaluation cheap (it costs ~4 numpy operations per term).
SATURATION_TERMS = 6
IDEAL_GAS_TERMS = 6
#: Target of every fit: relative error (for ln Psat, ln dHvap and ln V: absolute error of the
#: logarithm, which is the relative error of the property) at the check points.
FIT_TOLERANCE = 3e-7
#: The most pieces one interpolant may use.
MAX_PIECES = 256
#: Reference temperature of the ideal-gas enthalpy (K).
REFERENCE_TEMPERATURE = correlations.REFERENCE_TEMPERATURE
#: Closest approach of the saturation fits to Tc, tried in turn: T_high_fit = Tc (1 - gap).
CRITICAL_GAPS = (1e-4, 1e-3, 1e-2)
#: Saturation pressures (Pa) the lower end of the saturation fits is raised to, in turn, when
#: the tolerance cannot be met down to the triple point (a judgement: such pressures play no
#: part in a column; below the fit ln Psat is extrapolated linearly in 1/T).
LOW_END_PRESSURES = (1e-3, 1.0)
_TAU_FLOOR = 1e-12
_LOWEST_TEMPERATURE = 1.0  # K; extrapolation formulas in 1/T use at least this


@dataclass(frozen=True)
class PiecewiseFit:
    """One quantity of one fluid as a piecewise Chebyshev interpolant on ``[low, high]`` of
    ``variable``, in ``pieces`` equal pieces; ``coefficients[i]`` are the Chebyshev coefficients
    of piece i in its local variable t in [-1, 1]."""

    quantity: str
    variable: str
    low: float
    high: float
    pieces: int
    coefficients: np.ndarray  # (pieces, terms)
    max_error: float
    error_measure: str

    @property
    def meets_tolerance(self) -> bool:
        return self.max_error <= FIT_TOLERANCE

    def monomial(self) -> np.ndarray:
        """Power-series coefficients of every piece in u = (t + 1)/2 in [0, 1], (pieces, terms)."""
        return self.coefficients @ _chebyshev_to_monomial(self.coefficients.shape[1])


@dataclass(frozen=True)
class SaturationFits:
    """CoolProp saturation curve of one fluid as fits in ``s = ln(1 - T/Tc)``."""

    fluid: str
    critical_temperature: float
    critical_pressure: float
    T_low: float  # K, lower end of the fits (triple point or CoolProp's Tmin)
    T_high: float  # K, upper end, just below Tc
    wagner: PiecewiseFit  # Tr ln(Psat/Pc)
    ln_heat_of_vaporization: PiecewiseFit  # ln(h_satV - h_satL / (J/mol))
    ln_liquid_volume: PiecewiseFit  # ln(V_satL / (m3/mol))


@dataclass(frozen=True)
class IdealGasFit:
    """CoolProp ideal-gas heat capacity cp0 of one fluid, fitted in T on ``[cp.low, cp.high]``."""

    fluid: str
    cp: PiecewiseFit


class PureComponents:
    """Vectorized pure-component properties of the components of a case, in the order given.

    Every method takes temperatures ``T`` (K, shape (n,); a scalar counts as n = 1) and returns
    arrays of shape (n, c). ``T_low`` and ``T_high`` (K) widen the range over which the
    ideal-gas heat capacity of CoolProp components is fitted (default 200 K to
    max(600 K, 1.5 Tc)); the saturation fits always span the fluid's liquid range.
    """

    def __init__(
        self,
        infos: Sequence[ComponentInfo],
        user_data: Mapping[str, ComponentData] | None = None,
        *,
        T_low: float | None = None,
        T_high: float | None = None,
    ) -> None:
        if not infos:
            raise ThermoError("no components given")
        self.infos: tuple[ComponentInfo, ...] = tuple(infos)
        self.names: tuple[str, ...] = tuple(i.name for i in self.infos)
        self.molar_mass = np.array([i.molar_mass for i in self.infos])
        self.critical_temperature = np.array([i.critical_temperature for i in self.infos])
        self.critical_pressure = np.array([i.critical_pressure for i in self.infos])
        self._coolprop = np.array([i for i, info in enumerate(self.infos) if info.backend == "coolprop"], dtype=np.intp)
        self._users: list[tuple[int, _UserComponent]] = []
        for index, info in enumerate(self.infos):
            if info.backend == "coolprop":
                if not info.coolprop_name:
                    raise ThermoError(f"component {info.name} is marked coolprop but has no CoolProp name")
            elif info.backend == "user":
                data = _find_data(info.name, user_data)
                if data is None:
                    raise ThermoError(f"no data given for the user-defined component {info.name}")
                self._users.append((index, _UserComponent(info, data)))
            else:
                raise ThermoError(f"component {info.name} has an unknown backend {info.backend!r}")
        self._all_coolprop = len(self._users) == 0
        self._saturation: list[SaturationFits] = []
        self._ideal_gas: list[IdealGasFit] = []
        for index in self._coolprop:
            info = self.infos[index]
            saturation = saturation_fits(info.coolprop_name)
            cp_low = min(200.0, saturation.T_low, T_low if T_low is not None else math.inf)
            cp_high = max(600.0, 1.5 * saturation.critical_temperature, T_high if T_high is not None else 0.0)
            self._saturation.append(saturation)
            self._ideal_gas.append(ideal_gas_fit(info.coolprop_name, round(cp_low, 6), round(cp_high, 6)))
        self.normal_boiling_point = np.array([self._normal_boiling_point(i) for i in range(len(self.infos))])
        if len(self._coolprop):
            self._build_coolprop_tables()

    # --- public properties ------------------------------------------------------------------

    def ln_vapor_pressure(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """``(ln Psat, d ln Psat/dT)``, Psat in Pa, each (n, c)."""
        T = _temperatures(T)
        if self._all_coolprop:
            return self._coolprop_ln_vapor_pressure(T)
        ln_p = np.empty((T.size, len(self.names)))
        slope = np.empty_like(ln_p)
        if len(self._coolprop):
            ln_p[:, self._coolprop], slope[:, self._coolprop] = self._coolprop_ln_vapor_pressure(T)
        for index, user in self._users:
            ln_p[:, index], slope[:, index] = user.ln_vapor_pressure(T)
        return ln_p, slope

    def vapor_pressure(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """``(Psat, dPsat/dT)`` in Pa and Pa/K, each (n, c)."""
        ln_p, slope = self.ln_vapor_pressure(T)
        pressure = np.exp(ln_p)
        return pressure, pressure * slope

    def heat_of_vaporization(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """``(dHvap, d dHvap/dT)`` in J/mol and J/(mol K), each (n, c); zero at and above Tc."""
        T = _temperatures(T)
        if self._all_coolprop:
            return self._coolprop_heat_of_vaporization(T)
        value = np.empty((T.size, len(self.names)))
        slope = np.empty_like(value)
        if len(self._coolprop):
            value[:, self._coolprop], slope[:, self._coolprop] = self._coolprop_heat_of_vaporization(T)
        for index, user in self._users:
            value[:, index], slope[:, index] = user.heat_of_vaporization(T)
        return value, slope

    def ideal_gas_enthalpy(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """``(h_ig, cp0)``: ideal-gas enthalpy (J/mol) relative to the ideal gas at 298.15 K
        and its temperature derivative, the ideal-gas heat capacity (J/(mol K)), each (n, c)."""
        T = _temperatures(T)
        if self._all_coolprop:
            return self._coolprop_ideal_gas_enthalpy(T)
        value = np.empty((T.size, len(self.names)))
        slope = np.empty_like(value)
        if len(self._coolprop):
            value[:, self._coolprop], slope[:, self._coolprop] = self._coolprop_ideal_gas_enthalpy(T)
        for index, user in self._users:
            value[:, index], slope[:, index] = user.ideal_gas_enthalpy(T)
        return value, slope

    def liquid_molar_volume(self, T: np.ndarray) -> np.ndarray:
        """Saturated liquid molar volume (m3/mol), (n, c): CoolProp's saturated liquid, the
        user's correlation, or the Rackett equation (Rackett 1970, J. Chem. Eng. Data 15,
        514-517) from the critical constants when the user gave a critical compressibility
        (``critical_compressibility``) or volume (``critical_volume``)."""
        T = _temperatures(T)
        if self._all_coolprop:
            return self._coolprop_liquid_volume(T)
        value = np.empty((T.size, len(self.names)))
        if len(self._coolprop):
            value[:, self._coolprop] = self._coolprop_liquid_volume(T)
        for index, user in self._users:
            value[:, index] = user.liquid_molar_volume(T)
        return value

    def check_temperature(self, T: np.ndarray) -> None:
        """Raise :class:`~solver.errors.ThermoError` naming the component and the temperature
        if any T is not a finite positive temperature, is at or above a component's critical
        temperature, or lies outside the validity range of a user correlation. Below a CoolProp
        fluid's triple point values are extrapolated and no error is raised (a liquid mixture
        may stay liquid below the triple point of one of its components)."""
        T = np.asarray(T, dtype=float).reshape(-1)
        if T.size == 0:
            return
        bad = ~(np.isfinite(T) & (T > 0.0))
        if bad.any():
            raise ThermoError(f"temperature {T[bad][0]!r} K is not a finite positive temperature")
        highest = float(T.max())
        for index, info in enumerate(self.infos):
            if highest >= info.critical_temperature:
                raise ThermoError(
                    f"temperature {highest:.2f} K is at or above the critical temperature of {info.name} "
                    f"({info.critical_temperature:.2f} K): its vapor pressure and heat of vaporization "
                    f"are not defined there"
                )
        for _, user in self._users:
            user.check_temperature(T)

    def describe(self) -> list[dict]:
        """Per component: name, backend, source, constants and, for CoolProp components, the
        fits (variable, range, pieces, degree, achieved maximum error against CoolProp); for
        user components the correlations used. For the result file."""
        described: list[dict] = []
        fits_of = {int(index): k for k, index in enumerate(self._coolprop)}
        users = dict(self._users)
        for index, info in enumerate(self.infos):
            entry: dict = {
                "name": info.name,
                "backend": info.backend,
                "coolprop_name": info.coolprop_name,
                "source": info.source,
                "molar_mass": info.molar_mass,
                "critical_temperature": info.critical_temperature,
                "critical_pressure": info.critical_pressure,
                "normal_boiling_point": _none_if_nan(self.normal_boiling_point[index]),
            }
            if index in fits_of:
                saturation = self._saturation[fits_of[index]]
                ideal_gas = self._ideal_gas[fits_of[index]]
                entry["fits"] = {
                    "vapor_pressure": _describe_fit(saturation.wagner, saturation),
                    "heat_of_vaporization": _describe_fit(saturation.ln_heat_of_vaporization, saturation),
                    "liquid_molar_volume": _describe_fit(saturation.ln_liquid_volume, saturation),
                    "ideal_gas_cp": _describe_fit(ideal_gas.cp, None),
                }
                entry["fit_tolerance"] = FIT_TOLERANCE
            else:
                entry["correlations"] = users[index].describe()
            described.append(entry)
        return described

    # --- CoolProp components ----------------------------------------------------------------

    def _build_coolprop_tables(self) -> None:
        sat = self._saturation
        cp_fits = [f.cp for f in self._ideal_gas]
        self._sat_low = np.array([f.T_low for f in sat])
        self._sat_high = np.array([f.T_high for f in sat])
        self._cp_low = np.array([f.low for f in cp_fits])
        self._cp_high = np.array([f.high for f in cp_fits])
        self._sat_bounds = (float(self._sat_low.max()), float(self._sat_high.min()))
        self._cp_bounds = (float(self._cp_low.max()), float(self._cp_high.min()))
        self._saturation_table = _PiecewiseTable([[f.wagner for f in sat], [f.ln_heat_of_vaporization for f in sat]])
        self._volume_table = _PiecewiseTable([[f.ln_liquid_volume for f in sat]])
        self._enthalpy_table = _PiecewiseTable([cp_fits], integrate=True)
        reference = np.full((1, len(cp_fits)), REFERENCE_TEMPERATURE)
        enthalpy_offset = self._enthalpy_table(reference)[0][0, 0]
        Tc = np.array([f.critical_temperature for f in sat])
        self._constants_by_size: dict[int, dict[str, np.ndarray]] = {}
        self._constant_rows = {
            "sat_low": self._sat_low,
            "sat_high": self._sat_high,
            "cp_low": self._cp_low,
            "cp_high": self._cp_high,
            "inverse_Tc": 1.0 / Tc,
            "minus_inverse_Tc": -1.0 / Tc,
            "ln_Pc": np.log([f.critical_pressure for f in sat]),
            "enthalpy_offset": enthalpy_offset,
        }
        self._saturation_cache: tuple[np.ndarray, tuple] | None = None

    def _constants(self, n: int) -> dict[str, np.ndarray]:
        """Per-component constants spread to (n, c): numpy operations between arrays of one
        shape are several times faster than broadcasting a (c,) row over n stages."""
        constants = self._constants_by_size.get(n)
        if constants is None:
            if len(self._constants_by_size) > 8:
                self._constants_by_size.clear()
            constants = {k: np.ascontiguousarray(np.broadcast_to(v, (n, v.size))) for k, v in self._constant_rows.items()}
            self._constants_by_size[n] = constants
        return constants

    @staticmethod
    def _clamp(
        T: np.ndarray, low: np.ndarray, high: np.ndarray, bounds: tuple[float, float]
    ) -> tuple[np.ndarray, np.ndarray, bool]:
        """(T spread to (n, c), T clamped to each component's [low, high] (n, c), whether any
        was clamped); ``bounds`` = (max of low, min of high)."""
        spread = np.empty(low.shape)
        spread[...] = T[:, None]
        clamped = np.maximum(spread, low)
        np.minimum(clamped, high, out=clamped)
        # the extension formulas are the identity where nothing was clamped
        outside = T.size > 0 and bool(T.min() < bounds[0] or T.max() > bounds[1])
        return spread, clamped, outside

    def _saturation_state(self, T: np.ndarray) -> tuple:
        """The saturation fits evaluated at T: (T (n, c), clamped T, 1 - clamped T/Tc, any
        clamped, values (2, n, c), d values/ds (2, n, c), located pieces, constants) for
        Tr ln(Psat/Pc) and ln dHvap. The last call's result is kept: the solver asks for
        several properties at one T."""
        cached = self._saturation_cache
        if cached is not None and cached[0].shape == T.shape and np.array_equal(cached[0], T):
            return cached[1]
        constants = self._constants(T.size)
        spread, Tcl, outside = self._clamp(T, constants["sat_low"], constants["sat_high"], self._sat_bounds)
        tau = Tcl * constants["minus_inverse_Tc"]
        tau += 1.0
        located = self._saturation_table.locate(np.log(tau))
        values, slopes = self._saturation_table.evaluate(*located)
        state = (spread, Tcl, tau, outside, values, slopes, located, constants)
        self._saturation_cache = (T.copy(), state)
        return state

    def _coolprop_ln_vapor_pressure(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        spread, Tcl, tau, outside, values, slopes, _, constants = self._saturation_state(T)
        wagner, d_wagner = values[0], slopes[0]
        reduced = 1.0 - tau
        ln_p = wagner / reduced
        # d/dT [F(s)/Tr] with s = ln(1 - Tr): -(F'(s)/tau + F/Tr) / (Tc Tr)
        slope = d_wagner / tau
        slope += ln_p
        slope *= constants["minus_inverse_Tc"]
        slope /= reduced
        ln_p += constants["ln_Pc"]
        if outside:
            ln_p, slope = _extend_in_inverse_temperature(spread, Tcl, ln_p, slope)
        return ln_p, slope

    def _coolprop_heat_of_vaporization(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        spread, Tcl, tau, outside, values, slopes, _, constants = self._saturation_state(T)
        d_ln_dh = slopes[1]
        value = np.exp(values[1])
        if outside:
            # ln dH linear in ln(1 - T/Tc) beyond the fit: dH = dH_end (tau/tau_end)^k
            true_tau = 1.0 - spread * constants["inverse_Tc"]
            above = true_tau < _TAU_FLOOR
            true_tau = np.maximum(true_tau, _TAU_FLOOR)
            value = value * (true_tau / tau) ** d_ln_dh
            slope = value * d_ln_dh * constants["minus_inverse_Tc"] / true_tau
            value = np.where(above, 0.0, value)
            slope = np.where(above, 0.0, slope)
            return value, slope
        slope = value * d_ln_dh
        slope *= constants["minus_inverse_Tc"]
        slope /= tau
        return value, slope

    def _coolprop_liquid_volume(self, T: np.ndarray) -> np.ndarray:
        located = self._saturation_state(T)[6]
        values, _ = self._volume_table.evaluate(*located, derivative=False)
        return np.exp(values[0])

    def _coolprop_ideal_gas_enthalpy(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        constants = self._constants(T.size)
        spread, Tcl, outside = self._clamp(T, constants["cp_low"], constants["cp_high"], self._cp_bounds)
        values, slopes = self._enthalpy_table(Tcl)
        enthalpy = values[0]
        cp = slopes[0]
        enthalpy -= constants["enthalpy_offset"]
        if outside:
            enthalpy += cp * (spread - Tcl)
        return enthalpy, cp

    def _normal_boiling_point(self, index: int) -> float:
        info = self.infos[index]
        if info.normal_boiling_point is not None:
            return float(info.normal_boiling_point)
        for position, user in self._users:
            if position == index:
                found = user.normal_boiling_point()
                return math.nan if found is None else found
        return math.nan


# --- the evaluation table ----------------------------------------------------------------------


class _PiecewiseTable:
    """Piecewise polynomials of several quantities and components in one coefficient table
    (padded to the most pieces), evaluated for an (n, c) array of the variable in one Horner pass
    with its derivative. ``fits[q][k]`` is quantity q of component k; the quantities of one
    component share range and pieces, so one piece index serves all. With ``integrate=True``
    the table holds the antiderivatives (in the variable) of the fits, continuous across pieces
    and zero at each fit's lower end."""

    def __init__(self, fits: Sequence[Sequence[PiecewiseFit]], *, integrate: bool = False) -> None:
        first = fits[0]
        count = len(first)
        most = max(f.pieces for f in first)
        fitted_terms = max(f.coefficients.shape[1] for quantity in fits for f in quantity)
        terms = fitted_terms + (1 if integrate else 0)
        table = np.zeros((terms, len(fits), count * most))
        for q, quantity in enumerate(fits):
            for k, fit in enumerate(quantity):
                if (fit.low, fit.high, fit.pieces) != (first[k].low, first[k].high, first[k].pieces):
                    raise ValueError("quantities of one component must share range and pieces")
                local = fit.monomial()
                local = np.pad(local, ((0, 0), (0, fitted_terms - local.shape[1])))
                if integrate:
                    local = _integrate_pieces(local, (fit.high - fit.low) / fit.pieces)
                table[:, q, k * most : k * most + fit.pieces] = local.T
        self.table = table
        self.terms = terms
        self.quantities = len(fits)
        scale = np.array([f.pieces / (f.high - f.low) for f in first])
        self._rows = {
            "scale": scale,
            "low_scaled": np.array([f.low for f in first]) * scale,
            "last_piece": np.array([f.pieces - 1 for f in first], dtype=float),
            "offset": np.arange(count, dtype=float) * most,
        }
        self._by_size: dict[int, dict[str, np.ndarray]] = {}

    def _constants(self, n: int) -> dict[str, np.ndarray]:
        constants = self._by_size.get(n)
        if constants is None:
            if len(self._by_size) > 8:
                self._by_size.clear()
            constants = {k: np.ascontiguousarray(np.broadcast_to(v, (n, v.size))) for k, v in self._rows.items()}
            constants["scale_stacked"] = np.concatenate([constants["scale"]] * self.quantities)
            self._by_size[n] = constants
        return constants

    def locate(self, x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(flat piece index, local variable u in [0, 1]) of ``x`` (n, c), which the caller
        has clamped to the fitted range."""
        constants = self._constants(x.shape[0])
        position = x * constants["scale"]
        position -= constants["low_scaled"]
        piece = np.floor(position)
        np.minimum(piece, constants["last_piece"], out=piece)
        np.maximum(piece, 0.0, out=piece)  # rounding may put the lower end just below 0
        u = position - piece
        piece += constants["offset"]
        return piece.astype(np.intp), u

    def evaluate(
        self, index: np.ndarray, u: np.ndarray, derivative: bool = True
    ) -> tuple[np.ndarray, np.ndarray | None]:
        """Values (quantities, n, c) at located points, and derivatives in x if asked."""
        n, c = index.shape
        q = self.quantities
        # mode="clip" keeps a garbage index (from a NaN temperature) inside the table
        a = np.take(self.table, index, axis=2, mode="clip").reshape(self.terms, q * n, c)
        if q > 1:
            u = np.concatenate([u] * q)
        value = a[-1] * u
        value += a[-2]
        if not derivative:
            for k in range(self.terms - 3, -1, -1):
                value *= u
                value += a[k]
            return value.reshape(q, n, c), None
        slope = a[-1].copy()
        for k in range(self.terms - 3, -1, -1):
            slope *= u
            slope += value
            value *= u
            value += a[k]
        slope *= self._constants(n)["scale_stacked"]
        return value.reshape(q, n, c), slope.reshape(q, n, c)

    def __call__(self, x: np.ndarray, derivative: bool = True) -> tuple[np.ndarray, np.ndarray | None]:
        """Values (quantities, n, c) at ``x`` (n, c), and derivatives in x if asked."""
        index, u = self.locate(x)
        return self.evaluate(index, u, derivative)


def _integrate_pieces(local: np.ndarray, width: float) -> np.ndarray:
    """Antiderivatives in the fit variable of local power series in u in [0, 1] (pieces, terms)
    -> (pieces, terms + 1), each piece's constant making the whole continuous and zero at the
    start."""
    pieces, terms = local.shape
    integrated = np.zeros((pieces, terms + 1))
    integrated[:, 1:] = width * local / np.arange(1, terms + 1)
    gains = integrated.sum(axis=1)  # value at u = 1 of each piece's integral from u = 0
    integrated[:, 0] = np.concatenate([[0.0], np.cumsum(gains)[:-1]])
    return integrated


def _extend_in_inverse_temperature(
    column: np.ndarray, Tcl: np.ndarray, ln_p: np.ndarray, slope: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Continue ln Psat beyond the fitted range linearly in 1/T from the end point (value and
    slope continuous)."""
    T = np.maximum(column, _LOWEST_TEMPERATURE)
    ratio = Tcl / T
    extended = ln_p + slope * Tcl * (1.0 - ratio)
    return extended, slope * ratio**2


# --- fitting CoolProp ---------------------------------------------------------------------------


@lru_cache(maxsize=None)
def saturation_fits(fluid: str) -> SaturationFits:
    """Fits of the CoolProp saturation curve of ``fluid`` (cached per process): ln Psat (as
    Tr ln(Psat/Pc)), ln dHvap and ln V_satL in s = ln(1 - T/Tc), from the triple point (or
    CoolProp's Tmin) to as close to Tc as the tolerance allows (see :data:`CRITICAL_GAPS`). If
    the tolerance cannot be met there, the lower end is raised to where Psat reaches
    :data:`LOW_END_PRESSURES` (far below anything a column sees) before the upper end is moved
    away from Tc."""
    state = CP.AbstractState("HEOS", fluid)
    Tc, Pc = float(state.T_critical()), float(state.p_critical())
    T_floor = max(float(state.Ttriple()), float(state.Tmin()))
    low_ends = [T_floor]
    for pressure in LOW_END_PRESSURES:
        try:
            state.update(CP.PQ_INPUTS, pressure, 0.0)
            low_ends.append(max(T_floor, float(state.T())))
        except ValueError:  # pressure below the triple point: the floor stays
            pass

    def sample(s: np.ndarray) -> dict[str, np.ndarray]:
        T = np.clip(Tc * (1.0 - np.exp(s)), T_floor, Tc)
        p = np.empty_like(T)
        dh = np.empty_like(T)
        rho = np.empty_like(T)
        for i, Ti in enumerate(T):
            state.update(CP.QT_INPUTS, 0.0, float(Ti))
            p[i] = state.p()
            dh[i] = state.saturated_vapor_keyed_output(CP.iHmolar) - state.saturated_liquid_keyed_output(CP.iHmolar)
            rho[i] = state.saturated_liquid_keyed_output(CP.iDmolar)
        return {"wagner": (T / Tc) * np.log(p / Pc), "ln_dh": np.log(dh), "ln_v": -np.log(rho)}

    def inverse_reduced(s: np.ndarray) -> np.ndarray:
        return 1.0 / (1.0 - np.exp(s))

    weights = {"wagner": inverse_reduced, "ln_dh": None, "ln_v": None}
    best: tuple[float, float, float, dict[str, PiecewiseFit]] | None = None
    last_error: Exception | None = None
    attempts = [(gap, T_low) for gap in CRITICAL_GAPS for T_low in dict.fromkeys(low_ends)]
    for gap, T_low in attempts:
        T_high = Tc * (1.0 - gap)
        if T_high <= T_low * 1.01:
            continue
        try:
            fits = _fit_adaptively(sample, math.log(gap), math.log(1.0 - T_low / Tc), weights, SATURATION_TERMS)
        except (ValueError, RuntimeError) as exc:  # CoolProp failed at some sample point
            last_error = exc
            continue
        worst = max(f.max_error for f in fits.values())
        if best is None or worst < best[0]:
            best = (worst, T_low, T_high, fits)
        if worst <= FIT_TOLERANCE:
            break
    if best is None:
        raise ThermoError(f"CoolProp could not compute the saturation curve of {fluid}: {last_error}")
    _, T_low, T_high, fits = best
    variable = "ln(1 - T/Tc)"
    return SaturationFits(
        fluid=fluid,
        critical_temperature=Tc,
        critical_pressure=Pc,
        T_low=T_low,
        T_high=T_high,
        wagner=_named(fits["wagner"], "Tr ln(Psat/Pc)", variable, "absolute error of ln Psat (relative error of Psat)"),
        ln_heat_of_vaporization=_named(fits["ln_dh"], "ln dHvap", variable, "absolute error of ln dHvap (relative error)"),
        ln_liquid_volume=_named(fits["ln_v"], "ln V_satL", variable, "absolute error of ln V (relative error)"),
    )


@lru_cache(maxsize=None)
def ideal_gas_fit(fluid: str, T_low: float, T_high: float) -> IdealGasFit:
    """Fit of CoolProp's ideal-gas heat capacity cp0 (J/(mol K)) of ``fluid`` on [T_low,
    T_high] K (cached per process)."""
    state = CP.AbstractState("HEOS", fluid)
    density = 1e-6  # mol/m3; cp0 depends on T only, the density just makes a valid state

    def sample(T: np.ndarray) -> dict[str, np.ndarray]:
        cp = np.empty_like(T)
        for i, Ti in enumerate(T):
            state.update(CP.DmolarT_INPUTS, density, float(Ti))
            cp[i] = state.cp0molar()
        return {"cp": cp}

    try:
        fits = _fit_adaptively(sample, T_low, T_high, {"cp": "relative"}, IDEAL_GAS_TERMS)
    except (ValueError, RuntimeError) as exc:
        raise ThermoError(f"CoolProp could not compute the ideal-gas heat capacity of {fluid}: {exc}") from None
    return IdealGasFit(fluid, _named(fits["cp"], "cp0", "T", "relative error of cp0"))


def _fit_adaptively(
    sample: Callable[[np.ndarray], dict[str, np.ndarray]],
    low: float,
    high: float,
    weights: Mapping[str, Callable[[np.ndarray], np.ndarray] | str | None],
    terms: int,
) -> dict[str, PiecewiseFit]:
    """Piecewise Chebyshev interpolants of the quantities ``sample`` returns, on ``[low, high]``
    with 1, 2, 4, ... equal pieces until all match at the check points (the quantities share
    their pieces, so one piece index serves all when evaluated). The error of a quantity is
    ``|fit - sample| * weight(x)`` (``None``: absolute; ``"relative"``: divided by the sampled
    value). If :data:`MAX_PIECES` is not enough, the level with the smallest worst error is
    kept (its errors are reported)."""
    nodes = np.cos(np.pi * (np.arange(terms) + 0.5) / terms)  # first kind
    checks = np.cos(np.pi * np.arange(terms + 1) / terms)  # Chebyshev-Lobatto
    to_coefficients = _values_to_chebyshev(terms)
    # checked in the local power form the evaluation uses, so its rounding is included
    at_checks = _chebyshev_to_monomial(terms) @ polynomial.polyvander(0.5 * (checks + 1.0), terms - 1).T
    best: dict[str, PiecewiseFit] | None = None
    pieces = 1
    previous_worst = math.inf
    stalled = 0
    while pieces <= MAX_PIECES:
        edges = np.linspace(low, high, pieces + 1)
        middle = 0.5 * (edges[:-1] + edges[1:])
        half = 0.5 * (edges[1:] - edges[:-1])
        node_x = middle[:, None] + half[:, None] * nodes
        check_x = middle[:, None] + half[:, None] * checks
        sampled = sample(np.concatenate([node_x.ravel(), check_x.ravel()]))
        split = node_x.size
        level: dict[str, PiecewiseFit] = {}
        for name, weight in weights.items():
            values = sampled[name]
            if not np.all(np.isfinite(values)):
                raise ValueError(f"non-finite {name} sampled between {low:g} and {high:g}")
            coefficients = values[:split].reshape(pieces, terms) @ to_coefficients.T
            expected = values[split:].reshape(pieces, terms + 1)
            error = np.abs(coefficients @ at_checks - expected)
            if weight == "relative":
                error /= np.abs(expected)
            elif weight is not None:
                error *= weight(check_x)
            level[name] = PiecewiseFit(name, "", low, high, pieces, coefficients, float(error.max()), "")
        worst = max(f.max_error for f in level.values())
        if best is None or worst < max(f.max_error for f in best.values()):
            best = level
        if worst <= FIT_TOLERANCE:
            break
        # a smooth function loses a factor 2^terms per doubling; much less means noise or a
        # singularity in the sampled data, and more pieces will not help
        stalled = stalled + 1 if pieces >= 16 and worst > 0.25 * previous_worst else 0
        if stalled >= 2:
            break
        previous_worst = worst
        pieces *= 2
    return best


@lru_cache(maxsize=None)
def _values_to_chebyshev(terms: int) -> np.ndarray:
    """Matrix taking values at the first-kind Chebyshev nodes to Chebyshev coefficients."""
    theta = np.pi * (np.arange(terms) + 0.5) / terms
    matrix = (2.0 / terms) * np.cos(np.outer(np.arange(terms), theta))
    matrix[0] *= 0.5
    return matrix


@lru_cache(maxsize=None)
def _chebyshev_to_monomial(terms: int) -> np.ndarray:
    """(terms, terms) matrix M: power-series coefficients in u = (t + 1)/2 of a Chebyshev
    series in t are (Chebyshev coefficients) @ M."""
    matrix = np.zeros((terms, terms))
    t_of_u = polynomial.Polynomial([-1.0, 2.0])
    for k in range(terms):
        unit = np.zeros(terms)
        unit[k] = 1.0
        in_u = polynomial.Polynomial(chebyshev.cheb2poly(unit))(t_of_u).coef
        matrix[k, : in_u.size] = in_u
    return matrix


def _named(fit: PiecewiseFit, quantity: str, variable: str, measure: str) -> PiecewiseFit:
    coefficients = fit.coefficients.copy()
    coefficients.setflags(write=False)
    return PiecewiseFit(quantity, variable, fit.low, fit.high, fit.pieces, coefficients, fit.max_error, measure)


def _describe_fit(fit: PiecewiseFit, saturation: SaturationFits | None) -> dict:
    if saturation is not None:
        T_range = [saturation.T_low, saturation.T_high]
    else:
        T_range = [fit.low, fit.high]
    return {
        "quantity": fit.quantity,
        "variable": fit.variable,
        "T_min": T_range[0],
        "T_max": T_range[1],
        "pieces": fit.pieces,
        "degree": fit.coefficients.shape[1] - 1,
        "max_error": fit.max_error,
        "error_measure": fit.error_measure,
        "meets_tolerance": fit.meets_tolerance,
    }


# --- user components -----------------------------------------------------------------------------


class _UserComponent:
    """A component defined by the user's correlations; evaluation never raises for finite T
    (outside the correlation's range it extrapolates), :meth:`check_temperature` is the guard."""

    def __init__(self, info: ComponentInfo, data: ComponentData) -> None:
        self.info = info
        self.data = data
        Tc = data.critical_temperature
        self.Tc = Tc
        pressure = data.vapor_pressure
        correlations.validate_correlation(pressure, self._label("vapor_pressure"))
        low = pressure.T_min if pressure.T_min is not None else 0.3 * Tc
        high = pressure.T_max if pressure.T_max is not None else Tc
        if pressure.form == "antoine":
            pole = (-pressure.coefficients["C"] - pressure.temperature_intercept) / pressure.temperature_slope
            if pole >= low:
                low = max(low, pole + 0.05 * Tc)
        if high <= low:
            raise ThermoError(f"{self._label('vapor_pressure')} has no usable temperature range below Tc")
        self.pressure_range = (low, high)
        for key in ("heat_of_vaporization", "ideal_gas_cp", "liquid_molar_volume"):
            corr = getattr(data, key)
            if corr is not None:
                correlations.validate_correlation(corr, self._label(key))

    def _label(self, key: str) -> str:
        return f"{key.replace('_', ' ')} correlation of {self.info.name}"

    def _missing(self, key: str, advice: str) -> ThermoError:
        return ThermoError(f"component {self.info.name} has no {key.replace('_', ' ')} correlation; {advice}")

    def ln_vapor_pressure(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        low, high = self.pressure_range
        Tcl = np.clip(T, low, high)
        ln_p, slope = correlations.evaluate_log(self.data.vapor_pressure, Tcl, self.Tc, strict=False)
        if np.any(Tcl != T):
            ln_p, slope = _extend_in_inverse_temperature(T, Tcl, ln_p, slope)
        return ln_p, slope

    def heat_of_vaporization(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        corr = self.data.heat_of_vaporization
        if corr is None:
            raise self._missing("heat_of_vaporization", "give one under [components.data] or use enthalpy = 'cmo'")
        return correlations.evaluate(corr, np.maximum(T, _LOWEST_TEMPERATURE), self.Tc, strict=False)

    def ideal_gas_enthalpy(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        corr = self.data.ideal_gas_cp
        if corr is None:
            raise self._missing("ideal_gas_cp", "give one under [components.data] or use enthalpy = 'cmo'")
        return correlations.integrate_from_reference(corr, np.maximum(T, _LOWEST_TEMPERATURE), self.Tc, strict=False)

    def liquid_molar_volume(self, T: np.ndarray) -> np.ndarray:
        corr = self.data.liquid_molar_volume
        if corr is not None:
            return correlations.liquid_molar_volume(corr, np.maximum(T, _LOWEST_TEMPERATURE), self.Tc, strict=False)[0]
        Zc = _rackett_compressibility(self.data)
        if Zc is None:
            raise self._missing(
                "liquid_molar_volume",
                "give one, or a critical compressibility or critical volume for the Rackett equation",
            )
        return rackett_volume(T, self.data.critical_temperature, self.data.critical_pressure, Zc)

    def check_temperature(self, T: np.ndarray) -> None:
        for key in ("vapor_pressure", "heat_of_vaporization", "ideal_gas_cp", "liquid_molar_volume"):
            corr = getattr(self.data, key)
            if corr is not None:
                correlations.check_range(corr, T, self._label(key))

    def normal_boiling_point(self) -> float | None:
        """Where the vapor-pressure correlation gives 1 atm within its range, or None."""
        low, high = self.pressure_range
        target = math.log(ATMOSPHERIC_PRESSURE)

        def gap(T: float) -> float:
            return float(self.ln_vapor_pressure(np.array([T]))[0][0]) - target

        if gap(low) * gap(high) > 0.0:
            return None
        return float(brentq(gap, low, high, xtol=1e-9))

    def describe(self) -> dict:
        described = {}
        for key in ("vapor_pressure", "heat_of_vaporization", "ideal_gas_cp", "liquid_molar_volume"):
            corr = getattr(self.data, key)
            if corr is not None:
                described[key] = _describe_correlation(corr)
        return described


def rackett_volume(T: np.ndarray, critical_temperature: float, critical_pressure: float, Zc: float) -> np.ndarray:
    """Saturated liquid molar volume (m3/mol) by the Rackett equation
    ``V = (R Tc/Pc) Zc^(1 + (1 - Tr)^(2/7))`` (Rackett 1970, J. Chem. Eng. Data 15, 514-517);
    ``Tr`` is clipped to [0, 1]."""
    reduced = np.clip(np.asarray(T, dtype=float) / critical_temperature, 0.0, 1.0)
    return GAS_CONSTANT * critical_temperature / critical_pressure * Zc ** (1.0 + (1.0 - reduced) ** (2.0 / 7.0))


def _rackett_compressibility(data: ComponentData) -> float | None:
    Zc = getattr(data, "critical_compressibility", None)
    if Zc is not None:
        return float(Zc)
    Vc = getattr(data, "critical_volume", None)
    if Vc is not None:
        return float(data.critical_pressure * Vc / (GAS_CONSTANT * data.critical_temperature))
    return None


def _describe_correlation(corr: Correlation) -> dict:
    return {
        "form": corr.form,
        "coefficients": dict(corr.coefficients),
        "temperature_slope": corr.temperature_slope,
        "temperature_intercept": corr.temperature_intercept,
        "value_factor": corr.value_factor,
        "log_base": corr.log_base,
        "T_min": corr.T_min,
        "T_max": corr.T_max,
    }


def _find_data(name: str, user_data: Mapping[str, ComponentData] | None) -> ComponentData | None:
    for key, data in (user_data or {}).items():
        if key.strip().lower() == name or data.name.strip().lower() == name:
            return data
    return None


def _temperatures(T: np.ndarray) -> np.ndarray:
    return np.asarray(T, dtype=float).reshape(-1)


def _none_if_nan(value: float) -> float | None:
    return None if not math.isfinite(value) else float(value)
