"""Pure-component correlations used beyond their temperature range: each property keeps its
correlation inside the range and continues smoothly (value and temperature derivative) from
the range's end outside it, toward the critical point, with a warning that names the
component, the property and the range. All functions are vectorized over T (K, any shape) and
return ``(value, d value/dT)``.

Vapor pressure (:func:`ln_vapor_pressure`)
    Above the range, toward and through the critical point, the corresponding-states vapor
    pressure of Lee, B. I. and Kesler, M. G. (1975), AIChE J. 21, 510-527 (their eq. 14,
    ``ln Pr = f0(Tr) + omega f1(Tr)``), plus a cubic Hermite correction of ``ln P`` that matches
    the correlation's value and slope at the range's end and vanishes, with its slope, at
    ``Tc`` (so the curve ends at the critical point ``(Tc, Pc)`` of the component). The
    acentric factor is the one of its definition (Pitzer 1955, J. Am. Chem. Soc. 77, 3427:
    ``omega = -log10(Psat(0.7 Tc)/Pc) - 1``) from the correlation when ``0.7 Tc`` lies in its
    range, else Lee and Kesler's estimate from the normal boiling point (same paper, eq. 16).
    Below the range, Clausius-Clapeyron (``ln P`` linear in ``1/T``, the heat of vaporization
    held at its value at the range's end).
Heat of vaporization (:func:`heat_of_vaporization`)
    Watson's law ``dH = dH_end ((Tc - T)/(Tc - T_end))^n`` (Watson, K. M. (1943), Ind. Eng.
    Chem. 35, 398-406) on both sides, its exponent n chosen to match the correlation's slope at
    the end (kept within [0.2, 0.8]; Watson's 0.38 when the slope gives nothing usable); zero
    at and above Tc.
Liquid molar volume (:func:`liquid_molar_volume`)
    Above the range, the Rackett equation (Rackett, H. G. (1970), J. Chem. Eng. Data 15,
    514-517) with its compressibility chosen to pass through the correlation's end value, plus
    the Hermite correction of ``ln V`` for the slope; below, ``ln V`` linear in T (constant
    thermal expansivity).
Ideal-gas heat capacity (:func:`ideal_gas_cp`, :func:`ideal_gas_enthalpy`)
    Linear in T from the range's end (first-order Taylor continuation); the enthalpy is the
    exact integral of that continuation, from 298.15 K.

Saturation properties switch to the continuation at ``0.995 Tc`` (of the component, and of the
correlation's own ``Tc`` coefficient where it has one) at the latest, so that the critical
singularities of the tabulated forms are never evaluated; no warning is given there while T is
inside the stated range.
"""

from __future__ import annotations

from scipy.constants import R as GAS_CONSTANT, atm
import math
import warnings

import numpy as np

from solver.thermo.data import Correlation
from solver.thermo import correlations

__all__ = [
    "CRITICAL_APPROACH",
    "PropertyRangeWarning",
    "acentric_factor",
    "evaluate",
    "evaluate_log",
    "heat_of_vaporization",
    "ideal_gas_cp",
    "ideal_gas_enthalpy",
    "lee_kesler_acentric_factor",
    "lee_kesler_ln_reduced_pressure",
    "liquid_molar_volume",
    "ln_vapor_pressure",
    "range_notes",
]

#: Closest reduced temperature at which a saturation correlation is still evaluated.
CRITICAL_APPROACH = 0.995
#: Reference temperature of the ideal-gas enthalpy, K.
REFERENCE_TEMPERATURE = correlations.REFERENCE_TEMPERATURE
ATMOSPHERE = atm  # Pa
WATSON_EXPONENT_BOUNDS = (0.2, 0.8)

_METHODS = {
    "vapor pressure": ("Lee-Kesler corresponding states (AIChE J. 1975) toward the critical point",
                       "Clausius-Clapeyron (ln P linear in 1/T)"),
    "heat of vaporization": ("Watson's law (Ind. Eng. Chem. 1943) toward the critical point",
                             "Watson's law (Ind. Eng. Chem. 1943)"),
    "liquid molar volume": ("the Rackett equation (J. Chem. Eng. Data 1970) toward the critical point",
                            "constant thermal expansivity"),
    "ideal-gas heat capacity": ("linear continuation", "linear continuation"),
}


class PropertyRangeWarning(UserWarning):
    """A correlation was used outside its stated temperature range and continued by the
    documented extrapolation; the message names the component, property, range and method."""


def range_notes(corr: Correlation, T: np.ndarray, *, component: str, prop: str) -> list[str]:
    """One sentence per side on which some T (K) lies outside ``[T_min, T_max]`` of ``corr``,
    naming the component, the property (one of "vapor pressure", "heat of vaporization",
    "liquid molar volume", "ideal-gas heat capacity"), the range, the extrapolation used and
    the farthest temperature asked for."""
    T = np.asarray(T, dtype=float)
    notes = []
    if corr.T_max is not None and np.any(T > corr.T_max):
        notes.append(_note(corr, component, prop, "above") + f" (up to {float(np.max(T)):.2f} K)")
    if corr.T_min is not None and np.any(T < corr.T_min):
        notes.append(_note(corr, component, prop, "below") + f" (down to {float(np.min(T)):.2f} K)")
    return notes


def _note(corr: Correlation, component: str, prop: str, side: str) -> str:
    above_method, below_method = _METHODS[prop]
    bound, method = (corr.T_max, above_method) if side == "above" else (corr.T_min, below_method)
    return (f"{component}: {prop} correlation is valid from {_bound(corr.T_min)} to {_bound(corr.T_max)}; "
            f"temperatures {side} {bound:.2f} K use {method}")


def lee_kesler_ln_reduced_pressure(Tr: np.ndarray, omega: float) -> tuple[np.ndarray, np.ndarray]:
    """``(ln(P/Pc), d ln(P/Pc)/dTr)`` by Lee and Kesler (1975), AIChE J. 21, 510, eq. 14."""
    Tr = np.maximum(np.asarray(Tr, dtype=float), 1e-6)
    ln_Tr, Tr5 = np.log(Tr), Tr**5
    f0 = 5.92714 - 6.09648 / Tr - 1.28862 * ln_Tr + 0.169347 * Tr5 * Tr
    f1 = 15.2518 - 15.6875 / Tr - 13.4721 * ln_Tr + 0.43577 * Tr5 * Tr
    d_f0 = 6.09648 / Tr**2 - 1.28862 / Tr + 6.0 * 0.169347 * Tr5
    d_f1 = 15.6875 / Tr**2 - 13.4721 / Tr + 6.0 * 0.43577 * Tr5
    return f0 + omega * f1, d_f0 + omega * d_f1


def lee_kesler_acentric_factor(Tb: float, Tc: float, Pc: float) -> float:
    """Acentric factor from the normal boiling point (K) and the critical constants (K, Pa) by
    Lee and Kesler (1975), AIChE J. 21, 510, eq. 16 (their vapor pressure through (Tb, 1 atm))."""
    f0, _ = lee_kesler_ln_reduced_pressure(np.array([Tb / Tc]), 0.0)
    f_both, _ = lee_kesler_ln_reduced_pressure(np.array([Tb / Tc]), 1.0)
    return float((math.log(ATMOSPHERE / Pc) - f0[0]) / (f_both[0] - f0[0]))


def acentric_factor(corr: Correlation, Tc: float, Pc: float, Tb: float | None = None) -> float:
    """Acentric factor by its definition from the vapor-pressure correlation when ``0.7 Tc``
    lies in its range; else from ``Tb`` by Lee and Kesler; else fitted to Lee and Kesler's
    vapor pressure at the upper end of the range (0 when that end is too close to Tc to tell)."""
    low, high = _saturation_range(corr, Tc)
    T7 = 0.7 * Tc
    if low <= T7 <= high:
        ln_p, _ = evaluate_log(corr, np.array([T7]), Tc)
        return float(-(ln_p[0] - math.log(Pc)) / math.log(10.0) - 1.0)
    if Tb is not None:
        return lee_kesler_acentric_factor(Tb, Tc, Pc)
    end = min(high, 0.9 * Tc)
    ln_p, _ = evaluate_log(corr, np.array([end]), Tc)
    f0, _ = lee_kesler_ln_reduced_pressure(np.array([end / Tc]), 0.0)
    f_both, _ = lee_kesler_ln_reduced_pressure(np.array([end / Tc]), 1.0)
    f1 = f_both[0] - f0[0]
    return float((ln_p[0] - math.log(Pc) - f0[0]) / f1) if abs(f1) > 0.1 else 0.0


def ln_vapor_pressure(
    corr: Correlation,
    T: np.ndarray,
    *,
    Tc: float,
    Pc: float,
    omega: float | None = None,
    Tb: float | None = None,
    component: str = "component",
    warn: bool = True,
) -> tuple[np.ndarray, np.ndarray]:
    """``(ln(Psat/Pa), d ln Psat/dT)`` from the correlation in its range and the continuation
    described in the module docstring outside it. ``omega`` (acentric factor) is computed by
    :func:`acentric_factor` (with ``Tb``, K) when not given."""
    T = _array(T)
    _warn_outside(corr, T, component, "vapor pressure", warn)
    low, high = _saturation_range(corr, Tc)
    ln_p, slope = evaluate_log(corr, np.clip(T, low, high), Tc)
    above, below = T > high, T < low
    if above.any():
        if omega is None:
            omega = acentric_factor(corr, Tc, Pc, Tb)
        ln_end, slope_end = evaluate_log(corr, np.array([high]), Tc)
        ln_cs, d_cs = lee_kesler_ln_reduced_pressure(np.array([high / Tc]), omega)
        d0 = ln_end[0] - (math.log(Pc) + ln_cs[0])
        d1 = slope_end[0] - d_cs[0] / Tc
        ln_cs, d_cs = lee_kesler_ln_reduced_pressure(T[above] / Tc, omega)
        delta, d_delta = _toward_critical(T[above], high, Tc, d0, d1)
        ln_p[above] = math.log(Pc) + ln_cs + delta
        slope[above] = d_cs / Tc + d_delta
    if below.any():
        ln_end, slope_end = evaluate_log(corr, np.array([low]), Tc)
        B = slope_end[0] * low * low  # ln P = a - B/T
        ln_p[below] = ln_end[0] + B * (1.0 / low - 1.0 / T[below])
        slope[below] = B / T[below] ** 2
    return ln_p, slope


def heat_of_vaporization(
    corr: Correlation, T: np.ndarray, *, Tc: float, component: str = "component", warn: bool = True
) -> tuple[np.ndarray, np.ndarray]:
    """Heat of vaporization (J/mol) and its temperature derivative; Watson's law outside the
    range (see the module docstring)."""
    T = _array(T)
    _warn_outside(corr, T, component, "heat of vaporization", warn)
    low, high = _saturation_range(corr, Tc)
    value, slope = evaluate(corr, np.clip(T, low, high), Tc)
    for end, side in ((high, T > high), (low, T < low)):
        if side.any():
            value[side], slope[side] = _watson_from(corr, end, T[side], Tc)
    return value, slope


def liquid_molar_volume(
    corr: Correlation, T: np.ndarray, *, Tc: float, Pc: float, component: str = "component", warn: bool = True
) -> tuple[np.ndarray, np.ndarray]:
    """Saturated liquid molar volume (m3/mol) and its temperature derivative; the dippr105
    form gives a molar density whose reciprocal is taken (as in
    :func:`solver.thermo.correlations.liquid_molar_volume`)."""
    T = _array(T)
    _warn_outside(corr, T, component, "liquid molar volume", warn)
    low, high = _saturation_range(corr, Tc)
    volume, slope = _volume(corr, np.clip(T, low, high), Tc)
    above, below = T > high, T < low
    if above.any():
        v_end, s_end = _volume(corr, np.array([high]), Tc)
        ln_scale = math.log(GAS_CONSTANT * Tc / Pc)
        ln_z = (math.log(v_end[0]) - ln_scale) / (1.0 + (1.0 - high / Tc) ** (2.0 / 7.0))
        ln_r, d_r = _ln_rackett(T[above], Tc, ln_scale, ln_z)
        _, d_r_end = _ln_rackett(np.array([high]), Tc, ln_scale, ln_z)
        delta, d_delta = _toward_critical(T[above], high, Tc, 0.0, s_end[0] / v_end[0] - d_r_end[0])
        volume[above] = np.exp(ln_r + delta)
        slope[above] = volume[above] * (d_r + d_delta)
    if below.any():
        v_end, s_end = _volume(corr, np.array([low]), Tc)
        expansivity = s_end[0] / v_end[0]
        volume[below] = v_end[0] * np.exp(expansivity * (T[below] - low))
        slope[below] = expansivity * volume[below]
    return volume, slope


def ideal_gas_cp(
    corr: Correlation, T: np.ndarray, *, component: str = "component", warn: bool = True
) -> tuple[np.ndarray, np.ndarray]:
    """Ideal-gas heat capacity (J/(mol K)) and its temperature derivative, continued linearly
    outside the range."""
    T = _array(T)
    _warn_outside(corr, T, component, "ideal-gas heat capacity", warn)
    low, high = _cp_range(corr)
    end = np.clip(T, low, high)
    value, slope = evaluate(corr, end)
    value = value + slope * (T - end)
    return value, slope


def ideal_gas_enthalpy(
    corr: Correlation,
    T: np.ndarray,
    *,
    component: str = "component",
    warn: bool = True,
    T_ref: float = REFERENCE_TEMPERATURE,
) -> tuple[np.ndarray, np.ndarray]:
    """``(h_ig, cp)``: the ideal-gas enthalpy (J/mol) relative to the ideal gas at ``T_ref``,
    the integral of :func:`ideal_gas_cp`, and its derivative. The part inside the range is
    integrated by 24-point Gauss-Legendre quadrature (Abramowitz and Stegun 1964, 25.4.29; exact
    for the polynomial forms, to rounding for the smooth others)."""
    T = _array(T)
    cp, _ = ideal_gas_cp(corr, T, component=component, warn=warn)
    low, high = _cp_range(corr)
    anchor = float(np.clip(T_ref, low, high))
    return _cp_antiderivative(corr, T, anchor, low, high) - _cp_antiderivative(corr, np.array([T_ref]), anchor, low, high)[0], cp


# --- helpers ---------------------------------------------------------------------------------


def _array(T) -> np.ndarray:
    return np.maximum(np.array(T, dtype=float, ndmin=1), 1e-3)


def _bound(value: float | None) -> str:
    return "(no bound)" if value is None else f"{value:.2f} K"


def _warn_outside(corr: Correlation, T: np.ndarray, component: str, prop: str, warn: bool) -> None:
    """Warn once per component, property and side (the message carries no temperature, so
    Python's default filter shows it once per call site)."""
    if not warn:
        return
    if corr.T_max is not None and np.any(T > corr.T_max):
        warnings.warn(_note(corr, component, prop, "above"), PropertyRangeWarning, stacklevel=3)
    if corr.T_min is not None and np.any(T < corr.T_min):
        warnings.warn(_note(corr, component, prop, "below"), PropertyRangeWarning, stacklevel=3)


def evaluate(corr: Correlation, T: np.ndarray, Tc: float | None = None) -> tuple[np.ndarray, np.ndarray]:
    """SI value and temperature derivative of the correlation, without a range check."""
    return correlations.evaluate(corr, T, Tc, strict=False)


def evaluate_log(corr: Correlation, T: np.ndarray, Tc: float | None = None) -> tuple[np.ndarray, np.ndarray]:
    """``(ln Y, d ln Y/dT)`` of the correlation, without a range check."""
    return correlations.evaluate_log(corr, T, Tc, strict=False)


def _saturation_range(corr: Correlation, Tc: float) -> tuple[float, float]:
    """Where a saturation correlation is evaluated as it is: its range, cut at
    CRITICAL_APPROACH of the component's Tc and of the correlation's own Tc, and kept 5 % of
    Tc above the pole of an Antoine equation."""
    high = CRITICAL_APPROACH * Tc
    if "Tc" in corr.coefficients:
        own = (float(corr.coefficients["Tc"]) - corr.temperature_intercept) / corr.temperature_slope
        high = min(high, CRITICAL_APPROACH * own)
    if corr.T_max is not None:
        high = min(high, corr.T_max)
    low = corr.T_min if corr.T_min is not None else 0.2 * Tc
    if corr.form == "antoine":
        pole = (-corr.coefficients["C"] - corr.temperature_intercept) / corr.temperature_slope
        low = max(low, pole + 0.05 * Tc)
    return min(low, high), high


def _cp_range(corr: Correlation) -> tuple[float, float]:
    low = corr.T_min if corr.T_min is not None else 1.0
    high = corr.T_max if corr.T_max is not None else 1e5
    return low, high


def _toward_critical(T: np.ndarray, end: float, Tc: float, d0: float, d1: float) -> tuple[np.ndarray, np.ndarray]:
    """Cubic Hermite correction on [end, Tc]: d0 and slope d1 at ``end``, 0 with zero slope at
    ``Tc`` and above. In ``u = (Tc - T)/(Tc - end)``: ``delta = u^2 (d0 + c (1 - u))`` with
    ``c = 2 d0 + d1 (Tc - end)``."""
    span = Tc - end
    u = np.clip((Tc - T) / span, 0.0, 1.0)
    c = 2.0 * d0 + d1 * span
    delta = u * u * (d0 + c * (1.0 - u))
    d_delta_du = 2.0 * u * (d0 + c * (1.0 - u)) - u * u * c
    return delta, -d_delta_du / span


def _watson_from(corr: Correlation, end: float, T: np.ndarray, Tc: float) -> tuple[np.ndarray, np.ndarray]:
    value_end, slope_end = evaluate(corr, np.array([end]), Tc)
    h, s = float(value_end[0]), float(slope_end[0])
    span = Tc - end
    n = -s * span / h if h > 0.0 and math.isfinite(s) else 0.38
    n = min(max(n, WATSON_EXPONENT_BOUNDS[0]), WATSON_EXPONENT_BOUNDS[1]) if math.isfinite(n) else 0.38
    ratio = np.maximum((Tc - T) / span, 0.0)
    value = h * ratio**n
    safe = np.maximum(ratio, 1e-12)
    slope = np.where(ratio > 0.0, -n * h * safe ** (n - 1.0) / span, 0.0)
    return value, slope


def _volume(corr: Correlation, T: np.ndarray, Tc: float) -> tuple[np.ndarray, np.ndarray]:
    return correlations.liquid_molar_volume(corr, T, Tc, strict=False)


def _ln_rackett(T: np.ndarray, Tc: float, ln_scale: float, ln_z: float) -> tuple[np.ndarray, np.ndarray]:
    tau = np.maximum(1.0 - T / Tc, 0.0)
    safe = np.maximum(tau, 1e-12)
    ln_v = ln_scale + (1.0 + tau ** (2.0 / 7.0)) * ln_z
    slope = np.where(tau > 0.0, -ln_z * (2.0 / 7.0) * safe ** (-5.0 / 7.0) / Tc, 0.0)
    return ln_v, slope


_NODES, _WEIGHTS = np.polynomial.legendre.leggauss(24)


def _cp_antiderivative(corr: Correlation, x: np.ndarray, anchor: float, low: float, high: float) -> np.ndarray:
    """Integral of the continued cp from ``anchor`` (inside the range) to each x."""
    end = np.clip(x, low, high)
    half = 0.5 * (end - anchor)
    points = (0.5 * (end + anchor))[..., None] + half[..., None] * _NODES
    cp_points, _ = evaluate(corr, points)
    inside = half * (cp_points @ _WEIGHTS)
    cp_end, slope_end = evaluate(corr, end)
    step = x - end
    return inside + cp_end * step + 0.5 * slope_end * step * step
