"""Pure-component properties for all components at once, vectorized over temperatures, with
analytic temperature derivatives: vapor pressure, heat of vaporization, ideal-gas enthalpy and
heat capacity, saturated liquid molar volume.

CoolProp components are not evaluated through CoolProp here: their saturation curve and
ideal-gas heat capacity are fitted once per fluid (:mod:`solver.thermo.chebyshev_fits`) and the
fits of all components evaluated in one pass (:mod:`solver.thermo.piecewise_table`). The
ideal-gas enthalpy is the exact piecewise polynomial integral of the cp0 fit from 298.15 K, so
``h_ig(298.15 K) = 0`` and ``dh_ig/dT = cp0``.

Outside the fitted range the evaluation extrapolates smoothly and never raises:
``ln Psat`` linear in 1/T (Clausius-Clapeyron), ``dHvap`` as a power of ``(1 - T/Tc)`` with the
exponent of the fit at its end (zero at and above Tc), ``cp0`` constant, liquid volume constant.
:meth:`PureComponents.check_temperature` is the explicit guard against temperatures at or above
a critical temperature or outside a user correlation's range.

User-defined components use their correlations (:mod:`solver.thermo.user_components`);
handbook components theirs with the documented extrapolation beyond each range
(:mod:`solver.thermo.library_components`).
"""

from __future__ import annotations

import math
from typing import Mapping, Sequence

import numpy as np

from solver.components import ComponentInfo
from solver.errors import ThermoError
from solver.thermo import correlations
from solver.thermo.chebyshev_fits import (
    FIT_TOLERANCE,
    IdealGasFit,
    SaturationFits,
    describe_fit,
    ideal_gas_fit,
    saturation_fits,
)
from solver.thermo.data import ComponentData
from solver.thermo.piecewise_table import PiecewiseTable
from solver.thermo.library_components import LibraryComponent
from solver.thermo.user_components import UserComponent, extend_in_inverse_temperature, rackett_volume

__all__ = ["REFERENCE_TEMPERATURE", "PureComponents", "ideal_gas_fit", "rackett_volume", "saturation_fits"]

#: Reference temperature of the ideal-gas enthalpy (K).
REFERENCE_TEMPERATURE = correlations.REFERENCE_TEMPERATURE
_TAU_FLOOR = 1e-12


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
        self._users: list[tuple[int, UserComponent]] = []
        for index, info in enumerate(self.infos):
            if info.backend == "coolprop":
                if not info.coolprop_name:
                    raise ThermoError(f"component {info.name} is marked coolprop but has no CoolProp name")
            elif info.backend in ("user", "handbook"):
                data = _find_data(info.name, user_data)
                if data is None:
                    raise ThermoError(f"no data given for the {info.backend} component {info.name}")
                kind = LibraryComponent if info.backend == "handbook" else UserComponent
                self._users.append((index, kind(info, data)))
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
        return self.liquid_molar_volume_and_slope(T)[0]

    def liquid_molar_volume_and_slope(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """``(V_L, dV_L/dT)`` in m3/mol and m3/(mol K), each (n, c), as
        :meth:`liquid_molar_volume`."""
        T = _temperatures(T)
        if self._all_coolprop:
            return self._coolprop_liquid_volume(T)
        value = np.empty((T.size, len(self.names)))
        slope = np.empty_like(value)
        if len(self._coolprop):
            value[:, self._coolprop], slope[:, self._coolprop] = self._coolprop_liquid_volume(T)
        for index, user in self._users:
            value[:, index], slope[:, index] = user.liquid_molar_volume_and_slope(T)
        return value, slope

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

    def range_notes(self, T: np.ndarray) -> dict[str, list[str]]:
        """Per handbook component with any: the notes on the properties evaluated beyond their
        correlation's range at the temperatures ``T`` (K), by the documented extrapolation."""
        T = _temperatures(T)
        notes = {}
        for _, user in self._users:
            if isinstance(user, LibraryComponent) and (found := user.range_notes(T)):
                notes[user.info.name] = found
        return notes

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
                    "vapor_pressure": describe_fit(saturation.wagner, saturation),
                    "heat_of_vaporization": describe_fit(saturation.ln_heat_of_vaporization, saturation),
                    "liquid_molar_volume": describe_fit(saturation.ln_liquid_volume, saturation),
                    "ideal_gas_cp": describe_fit(ideal_gas.cp, None),
                }
                entry["fit_tolerance"] = FIT_TOLERANCE
            else:
                entry["correlations"] = users[index].describe()
                if "handbook" in entry["correlations"]:
                    entry["handbook"] = entry["correlations"].pop("handbook")
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
        self._saturation_table = PiecewiseTable([[f.wagner for f in sat], [f.ln_heat_of_vaporization for f in sat]])
        self._volume_table = PiecewiseTable([[f.ln_liquid_volume for f in sat]])
        self._enthalpy_table = PiecewiseTable([cp_fits], integrate=True)
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
            ln_p, slope = extend_in_inverse_temperature(spread, Tcl, ln_p, slope)
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

    def _coolprop_liquid_volume(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        spread, Tcl, tau, outside, _, _, located, constants = self._saturation_state(T)
        values, slopes = self._volume_table.evaluate(*located)
        volume = np.exp(values[0])
        # the fit is in s = ln(1 - T/Tc), ds/dT = -1/(Tc tau); the volume is constant where T was clamped
        slope = volume * slopes[0] * constants["minus_inverse_Tc"] / tau
        if outside:
            slope = np.where(spread == Tcl, slope, 0.0)
        return volume, slope

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




def _find_data(name: str, user_data: Mapping[str, ComponentData] | None) -> ComponentData | None:
    for key, data in (user_data or {}).items():
        if key.strip().lower() == name or data.name.strip().lower() == name:
            return data
    return None


def _temperatures(T: np.ndarray) -> np.ndarray:
    return np.asarray(T, dtype=float).reshape(-1)


def _none_if_nan(value: float) -> float | None:
    return None if not math.isfinite(value) else float(value)
