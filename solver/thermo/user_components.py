"""Pure components the user defines by correlations (:mod:`solver.thermo.correlations`):
evaluation with the extrapolations the solver needs, the Rackett liquid volume, and the
Clausius-Clapeyron continuation of ln Psat that CoolProp fits use as well."""

from __future__ import annotations

import math

import numpy as np
from scipy.constants import R as GAS_CONSTANT
from scipy.constants import atm as ATMOSPHERIC_PRESSURE
from scipy.optimize import brentq

from solver.components import ComponentInfo
from solver.errors import ThermoError
from solver.thermo import correlations
from solver.thermo.data import ComponentData, Correlation

__all__ = ["LOWEST_TEMPERATURE", "UserComponent", "extend_in_inverse_temperature", "rackett_volume",
           "rackett_volume_and_slope"]

#: K; extrapolation formulas in 1/T use at least this
LOWEST_TEMPERATURE = 1.0


class UserComponent:
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
            ln_p, slope = extend_in_inverse_temperature(T, Tcl, ln_p, slope)
        return ln_p, slope

    def heat_of_vaporization(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        corr = self.data.heat_of_vaporization
        if corr is None:
            raise self._missing("heat_of_vaporization", "give one under [components.data] or use enthalpy = 'cmo'")
        return correlations.evaluate(corr, np.maximum(T, LOWEST_TEMPERATURE), self.Tc, strict=False)

    def ideal_gas_enthalpy(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        corr = self.data.ideal_gas_cp
        if corr is None:
            raise self._missing("ideal_gas_cp", "give one under [components.data] or use enthalpy = 'cmo'")
        return correlations.integrate_from_reference(corr, np.maximum(T, LOWEST_TEMPERATURE), self.Tc, strict=False)

    def liquid_molar_volume(self, T: np.ndarray) -> np.ndarray:
        return self.liquid_molar_volume_and_slope(T)[0]

    def liquid_molar_volume_and_slope(self, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """``(V_L, dV_L/dT)`` (m3/mol, m3/(mol K)): the user's correlation, else Rackett."""
        corr = self.data.liquid_molar_volume
        if corr is not None:
            return correlations.liquid_molar_volume(corr, np.maximum(T, LOWEST_TEMPERATURE), self.Tc, strict=False)
        Zc = _rackett_compressibility(self.data)
        if Zc is None:
            raise self._missing(
                "liquid_molar_volume",
                "give one, or a critical compressibility or critical volume for the Rackett equation",
            )
        return rackett_volume_and_slope(T, self.data.critical_temperature, self.data.critical_pressure, Zc)

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


def rackett_volume_and_slope(T: np.ndarray, critical_temperature: float, critical_pressure: float,
                             Zc: float) -> tuple[np.ndarray, np.ndarray]:
    """:func:`rackett_volume` and its temperature derivative (m3/(mol K); zero where ``Tr`` is
    clipped, and taken as zero at ``Tr = 1`` where it is infinite)."""
    T = np.asarray(T, dtype=float)
    volume = rackett_volume(T, critical_temperature, critical_pressure, Zc)
    reduced = T / critical_temperature
    inside = (reduced > 0.0) & (reduced < 1.0)
    gap = np.where(inside, 1.0 - reduced, 1.0)
    slope = np.where(inside, -volume * math.log(Zc) * (2.0 / 7.0) * gap ** (-5.0 / 7.0) / critical_temperature, 0.0)
    return volume, slope


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



def extend_in_inverse_temperature(
    column: np.ndarray, Tcl: np.ndarray, ln_p: np.ndarray, slope: np.ndarray
) -> tuple[np.ndarray, np.ndarray]:
    """Continue ln Psat beyond the fitted range linearly in 1/T from the end point (value and
    slope continuous)."""
    T = np.maximum(column, LOWEST_TEMPERATURE)
    ratio = Tcl / T
    extended = ln_p + slope * Tcl * (1.0 - ratio)
    return extended, slope * ratio**2
