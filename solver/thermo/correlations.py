"""Pure-component correlations written by the user, evaluated vectorized with analytic
temperature derivatives.

A :class:`~solver.thermo.data.Correlation` is evaluated as ``value_SI = value_factor * f(T_u)`` with
``T_u = temperature_slope * T + temperature_intercept`` the temperature (T in K) in the unit the
coefficients were fitted in. The forms and their published sources:

``antoine``
    ``log_base P = A - B / (T_u + C)`` (base 10 unless ``log_base`` says otherwise).
    Antoine, C. (1888), Comptes Rendus 107, 681-684 (from memory).
``dippr101``
    ``Y = exp(A + B/T_u + C ln T_u + D T_u^E)``; DIPPR 801 equation 101 (Design Institute
    for Physical Property Data, AIChE; the same equation numbers are used in Perry's Chemical
    Engineers' Handbook, 8th ed., Section 2).
``polynomial``
    ``Y = sum_k c_k T_u^k`` with coefficients named ``c0``, ``c1``, ... (DIPPR 801 equation 100
    when five terms are given).
``dippr107``
    ``Y = A + B [(C/T_u)/sinh(C/T_u)]^2 + D [(E/T_u)/cosh(E/T_u)]^2``, the ideal-gas heat
    capacity of Aly, F. A. and Lee, L. L. (1981), Fluid Phase Equilibria 6, 169-179; DIPPR 801
    equation 107.
``watson``
    ``dH = value ((Tc - T)/(Tc - at))^n`` with ``n = 0.38`` unless given (coefficient
    ``exponent``); Watson, K. M. (1943), Ind. Eng. Chem. 35, 398-406. ``at`` is in K.
``dippr106``
    ``Y = A (1 - Tr)^(B + C Tr + D Tr^2 + E Tr^3)`` with ``Tr = T/Tc``; DIPPR 801 equation 106.
    ``Tc`` is the correlation's own coefficient (K) when it has one (Perry's Table 2-150
    gives it), else the component's critical temperature.
``dippr105``
    molar density ``rho = A / B^(1 + (1 - T_u/C)^D)``; DIPPR 801 equation 105 (a Rackett-type
    form). The liquid molar volume is ``1/rho`` (see :func:`liquid_molar_volume`).
``constant``
    ``Y = value``.
``wagner``
    ``ln(P/Pc) = (A tau + B tau^1.5 + C tau^m + D tau^n)/Tr``, ``Tr = T/Tc``, ``tau = 1 - Tr``
    with the equation's own ``Tc`` (K) and ``Pc`` (Pa); m = 2.5, n = 5 unless ``exponent_C``,
    ``exponent_D`` say otherwise. Wagner, W. (1973), Cryogenics 13, 470-482; Poling, Prausnitz
    and O'Connell (2001), The Properties of Gases and Liquids, 5th ed., eq. 7-3.3. T in K.
``trc_gas``
    ``cp/R`` by the TRC equation (coefficients a0 to a7; ``value_factor`` the gas constant):
    Frenkel, M. et al. (1994), Thermodynamics of Organic Compounds in the Gas State, TRC Data
    Series, vol. I, eq. (2.9). T in K.

Both are evaluated in :mod:`solver.thermo.handbook_forms`.

Validity range: with ``strict=True`` (the default) a temperature outside ``[T_min, T_max]``
raises :class:`~solver.errors.ThermoError` naming the correlation, the temperature and the
range. With ``strict=False`` the formula is evaluated anyway (extrapolated); the caller (the
thermo package) decides which to use, because a Newton solver probes trial points slightly
outside the range.
"""

from __future__ import annotations

import math
import re
from typing import Callable

import numpy as np

from solver.errors import CaseError, ThermoError
from solver.thermo.data import FORMS, WATSON_EXPONENT, Correlation
from solver.thermo.handbook_forms import trc_gas, wagner, wagner_log

__all__ = [
    "FORMS",
    "REFERENCE_TEMPERATURE",
    "check_range",
    "evaluate",
    "evaluate_log",
    "integrate_from_reference",
    "liquid_molar_volume",
    "validate_correlation",
]

#: Reference temperature of the ideal-gas enthalpy, K.
REFERENCE_TEMPERATURE = 298.15

_POLYNOMIAL_KEY = re.compile(r"^c(\d+)$")
_TINY = 1e-300


def validate_correlation(corr: Correlation, label: str = "correlation") -> None:
    """Check that ``corr`` has a known form and the coefficients that form needs; raise
    :class:`~solver.errors.CaseError` naming ``label``, the form and the missing or unknown
    coefficient otherwise."""
    if corr.form not in FORMS:
        raise CaseError(
            f"unknown correlation form for {label}",
            value=corr.form,
            expected="one of " + ", ".join(sorted(FORMS)),
        )
    required, optional = FORMS[corr.form]
    names = set(corr.coefficients)
    if corr.form == "polynomial":
        bad = sorted(n for n in names if not _POLYNOMIAL_KEY.match(n))
        if bad or not names:
            raise CaseError(
                f"polynomial coefficients of {label} must be named c0, c1, ...",
                value=bad or sorted(names),
            )
    else:
        missing = [n for n in required if n not in names]
        if missing:
            raise CaseError(f"{label} ({corr.form}) lacks coefficient(s) {', '.join(missing)}")
        unknown = sorted(names - set(required) - set(optional))
        if unknown:
            raise CaseError(
                f"{label} ({corr.form}) has unknown coefficient(s) {', '.join(unknown)}",
                expected="coefficients " + ", ".join(required + optional),
            )
    for key, value in corr.coefficients.items():
        if not math.isfinite(float(value)):
            raise CaseError(f"coefficient {key} of {label} is not a finite number", value=value)
    if corr.temperature_slope == 0.0 or not math.isfinite(corr.temperature_slope):
        raise CaseError(f"temperature unit of {label} has a zero or non-finite scale", value=corr.temperature_slope)
    if corr.log_base is not None and (corr.log_base <= 0.0 or corr.log_base == 1.0):
        raise CaseError(f"log base of {label} must be positive and not 1", value=corr.log_base)
    if corr.T_min is not None and corr.T_max is not None and corr.T_min >= corr.T_max:
        raise CaseError(f"validity range of {label} is empty", value=(corr.T_min, corr.T_max))


def check_range(corr: Correlation, T: np.ndarray, label: str | None = None) -> None:
    """Raise :class:`~solver.errors.ThermoError` if any temperature (K) lies outside the
    correlation's validity range ``[T_min, T_max]`` (either bound may be absent)."""
    T = np.asarray(T, dtype=float)
    if T.size == 0:
        return
    low = corr.T_min if corr.T_min is not None else -math.inf
    high = corr.T_max if corr.T_max is not None else math.inf
    outside = ~((T >= low) & (T <= high))
    if outside.any():
        bad = float(T[outside].flat[0])
        raise ThermoError(
            f"{_label(corr, label)} is valid from {_format_bound(corr.T_min)} to "
            f"{_format_bound(corr.T_max)}; asked for T = {bad:.2f} K"
        )


def evaluate(
    corr: Correlation,
    T: np.ndarray,
    critical_temperature: float | None = None,
    *,
    strict: bool = True,
    label: str | None = None,
) -> tuple[np.ndarray, np.ndarray]:
    """Value (SI) of the correlation at temperatures ``T`` (K, any shape) and its derivative
    with respect to T (SI per K). ``critical_temperature`` (K) is needed by the watson and
    dippr106 forms."""
    T = np.asarray(T, dtype=float)
    if strict:
        check_range(corr, T, label)
    function = _FORM_FUNCTIONS.get(corr.form)
    if function is None:
        validate_correlation(corr, _label(corr, label))
    try:
        with np.errstate(all="ignore"):
            value, slope = function(corr, T, critical_temperature, _label(corr, label))
    except KeyError:
        validate_correlation(corr, _label(corr, label))
        raise
    return corr.value_factor * value, corr.value_factor * slope


def evaluate_log(
    corr: Correlation,
    T: np.ndarray,
    critical_temperature: float | None = None,
    *,
    strict: bool = True,
    label: str | None = None,
) -> tuple[np.ndarray, np.ndarray]:
    """Natural logarithm of the (positive) SI value and its temperature derivative,
    ``(ln Y, d ln Y/dT)``. Exact for antoine and dippr101 (no overflow for tiny or huge
    values); exact for wagner as well; for other forms computed from :func:`evaluate`."""
    T = np.asarray(T, dtype=float)
    if strict:
        check_range(corr, T, label)
    if corr.form == "wagner":
        ln_value, slope = wagner_log(corr, T)
        with np.errstate(divide="ignore"):
            return ln_value + np.log(corr.value_factor), slope
    if corr.form in ("antoine", "dippr101"):
        try:
            return _log_of_exponential_form(corr, T)
        except KeyError:
            validate_correlation(corr, _label(corr, label))
            raise
    value, slope = evaluate(corr, T, critical_temperature, strict=False, label=label)
    with np.errstate(all="ignore"):
        return np.log(value), slope / value


def _log_of_exponential_form(corr: Correlation, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    c = corr.coefficients
    s = corr.temperature_slope
    ln_factor = math.log(corr.value_factor) if corr.value_factor > 0 else -math.inf
    with np.errstate(all="ignore"):
        if corr.form == "antoine":
            ln_base = math.log(corr.log_base if corr.log_base is not None else 10.0)
            shifted = _user_temperature(corr, T) + c["C"]
            ln_value = ln_factor + ln_base * (c["A"] - c["B"] / shifted)
            return ln_value, ln_base * c["B"] * s / shifted**2
        if corr.form == "dippr101":
            Tu = _user_temperature(corr, T)
            exponent, d_exponent = _dippr101_exponent(c, Tu)
            return ln_factor + exponent, d_exponent * s
    raise ValueError(corr.form)


def integrate_from_reference(
    corr: Correlation,
    T: np.ndarray,
    critical_temperature: float | None = None,
    *,
    T_ref: float = REFERENCE_TEMPERATURE,
    strict: bool = True,
    label: str | None = None,
) -> tuple[np.ndarray, np.ndarray]:
    """``(integral from T_ref to T of Y dT, Y(T))`` for a heat-capacity correlation, so that
    the ideal-gas enthalpy is ``h_ig(T) = int_298.15^T cp dT`` (J/mol) and ``dh/dT = cp``.

    Analytic for polynomial, dippr107 and constant: the dippr107 antiderivative
    ``A T + B C coth(C/T) - D E tanh(E/T)`` is the one given with the equation by Aly and Lee
    (1981), Fluid Phase Equilibria 6, 169-179 (DIPPR 801 documentation of equation 107).
    Other forms are integrated with 24-point Gauss-Legendre quadrature (Abramowitz and Stegun
    1964, Handbook of Mathematical Functions, 25.4.29), exact to rounding for the smooth
    correlations used for heat capacities over column temperature ranges.
    """
    T = np.asarray(T, dtype=float)
    if strict:
        check_range(corr, T, label)
    value, _ = evaluate(corr, T, critical_temperature, strict=False, label=label)
    c = corr.coefficients
    s = corr.temperature_slope
    with np.errstate(all="ignore"):
        if corr.form == "polynomial":
            powers = _polynomial_coefficients(c)
            antiderivative = np.zeros(len(powers) + 1)
            antiderivative[1:] = powers / np.arange(1, len(powers) + 1)
            Tu, Tu_ref = _user_temperature(corr, T), _user_temperature(corr, np.float64(T_ref))
            integral = (np.polynomial.polynomial.polyval(Tu, antiderivative)
                        - np.polynomial.polynomial.polyval(Tu_ref, antiderivative)) / s
            return corr.value_factor * integral, value
        if corr.form == "dippr107":
            Tu, Tu_ref = _user_temperature(corr, T), _user_temperature(corr, np.float64(T_ref))
            integral = (_dippr107_antiderivative(c, Tu) - _dippr107_antiderivative(c, Tu_ref)) / s
            return corr.value_factor * integral, value
        if corr.form == "constant":
            return corr.value_factor * c["value"] * (T - T_ref), value
    nodes, weights = np.polynomial.legendre.leggauss(24)
    half = 0.5 * (T - T_ref)
    points = (0.5 * (T + T_ref))[..., None] + half[..., None] * nodes
    integrand, _ = evaluate(corr, points, critical_temperature, strict=False, label=label)
    return half * (integrand @ weights), value


def liquid_molar_volume(
    corr: Correlation,
    T: np.ndarray,
    critical_temperature: float | None = None,
    *,
    strict: bool = True,
    label: str | None = None,
) -> tuple[np.ndarray, np.ndarray]:
    """Liquid molar volume (m3/mol) and its temperature derivative from a correlation. For the
    dippr105 form the correlation gives the molar density (``value_factor`` converts the
    user's density unit to mol/m3) and the volume is its reciprocal; every other form gives
    the volume itself (``value_factor`` converts to m3/mol)."""
    value, slope = evaluate(corr, T, critical_temperature, strict=strict, label=label)
    if corr.form == "dippr105":
        with np.errstate(all="ignore"):
            return 1.0 / value, -slope / value**2
    return value, slope


# --- the forms: each returns (f(T_u), d f/dT) with T in K, before value_factor -----------------


def _user_temperature(corr: Correlation, T: np.ndarray) -> np.ndarray:
    return corr.temperature_slope * T + corr.temperature_intercept


def _antoine(corr, T, critical_temperature, label):
    ln_value, d_ln_value = _log_of_exponential_form(
        Correlation(corr.form, corr.coefficients, corr.temperature_slope, corr.temperature_intercept,
                    1.0, corr.log_base),
        T,
    )
    value = np.exp(ln_value)
    return value, value * d_ln_value


def _dippr101_exponent(c, Tu):
    B, C, D, E = c["B"], c.get("C", 0.0), c.get("D", 0.0), c.get("E", 0.0)
    Tu = np.maximum(Tu, _TINY)
    power = Tu**E
    exponent = c["A"] + B / Tu + C * np.log(Tu) + D * power
    d_exponent = -B / Tu**2 + C / Tu + D * E * power / Tu
    return exponent, d_exponent


def _dippr101(corr, T, critical_temperature, label):
    exponent, d_exponent = _dippr101_exponent(corr.coefficients, _user_temperature(corr, T))
    value = np.exp(exponent)
    return value, value * d_exponent * corr.temperature_slope


def _polynomial_coefficients(c) -> np.ndarray:
    indices = {int(_POLYNOMIAL_KEY.match(k).group(1)): float(v) for k, v in c.items()}
    powers = np.zeros(max(indices) + 1)
    for k, v in indices.items():
        powers[k] = v
    return powers


def _polynomial(corr, T, critical_temperature, label):
    powers = _polynomial_coefficients(corr.coefficients)
    Tu = _user_temperature(corr, T)
    value = np.polynomial.polynomial.polyval(Tu, powers)
    slope = np.polynomial.polynomial.polyval(Tu, np.polynomial.polynomial.polyder(powers)) if len(powers) > 1 else np.zeros_like(Tu)
    return value, slope * corr.temperature_slope


def _x_over_sinh_squared(x):
    """[x/sinh x]^2 and its derivative in x, without overflow for large |x|."""
    ax = np.maximum(np.abs(x), 1e-8)
    e = np.exp(-2.0 * ax)
    ratio = 2.0 * ax * np.exp(-ax) / (1.0 - e)  # x / sinh x
    coth = (1.0 + e) / (1.0 - e)
    value = ratio**2
    return value, 2.0 * value * (1.0 / ax - coth) * np.sign(x + (x == 0))


def _x_over_cosh_squared(x):
    ax = np.abs(x)
    e = np.exp(-2.0 * ax)
    ratio = 2.0 * ax * np.exp(-ax) / (1.0 + e)  # x / cosh x
    tanh = (1.0 - e) / (1.0 + e)
    value = ratio**2
    with np.errstate(all="ignore"):
        derivative = np.where(ax > 0, 2.0 * value * (1.0 / np.maximum(ax, _TINY) - tanh), 0.0)
    return value, derivative * np.sign(x)


def _dippr107(corr, T, critical_temperature, label):
    c = corr.coefficients
    Tu = np.maximum(_user_temperature(corr, T), _TINY)
    A, B, C, D, E = c["A"], c["B"], c["C"], c.get("D", 0.0), c.get("E", 0.0)
    value = np.full_like(Tu, A, dtype=float)
    slope = np.zeros_like(Tu, dtype=float)
    x = C / Tu
    g, dg = _x_over_sinh_squared(x)
    value += B * g
    slope += B * dg * (-x / Tu)
    if D != 0.0:
        y = E / Tu
        k, dk = _x_over_cosh_squared(y)
        value += D * k
        slope += D * dk * (-y / Tu)
    return value, slope * corr.temperature_slope


def _dippr107_antiderivative(c, Tu):
    A, B, C, D, E = c["A"], c["B"], c["C"], c.get("D", 0.0), c.get("E", 0.0)
    Tu = np.maximum(Tu, _TINY)
    x = np.maximum(np.abs(C / Tu), 1e-8)
    e = np.exp(-2.0 * x)
    coth_term = B * abs(C) * (1.0 + e) / (1.0 - e)  # B C coth(C/T), even in C
    result = A * Tu + coth_term
    if D != 0.0:
        result = result - D * E * np.tanh(E / Tu)
    return result


def _critical(corr, critical_temperature, label) -> float:
    if critical_temperature is None:
        raise ThermoError(f"{label} ({corr.form}) needs the critical temperature of the component")
    return float(critical_temperature)


def _watson(corr, T, critical_temperature, label):
    c = corr.coefficients
    Tc = _critical(corr, critical_temperature, label)
    at = c["at"]
    n = c.get("exponent", WATSON_EXPONENT)
    span = Tc - at
    if span <= 0.0:
        raise ThermoError(f"{label} (watson): reference temperature {at:.2f} K is not below Tc = {Tc:.2f} K")
    ratio = np.maximum((Tc - T) / span, 0.0)
    value = c["value"] * ratio**n
    safe = np.maximum(ratio, 1e-12)
    slope = np.where(ratio > 0.0, -n * c["value"] * safe ** (n - 1.0) / span, 0.0)
    return value, slope


def _dippr106(corr, T, critical_temperature, label):
    c = corr.coefficients
    Tc = float(c["Tc"]) if "Tc" in c else _critical(corr, critical_temperature, label)
    A, B, C, D, E = c["A"], c["B"], c.get("C", 0.0), c.get("D", 0.0), c.get("E", 0.0)
    Tr = T / Tc
    tau = np.maximum(1.0 - Tr, 0.0)
    safe = np.maximum(tau, 1e-12)
    exponent = B + Tr * (C + Tr * (D + Tr * E))
    d_exponent = (C + Tr * (2.0 * D + 3.0 * E * Tr)) / Tc
    value = np.where(tau > 0.0, A * safe**exponent, 0.0)
    slope = np.where(tau > 0.0, value * (d_exponent * np.log(safe) - exponent / (Tc * safe)), 0.0)
    return value, slope


def _dippr105(corr, T, critical_temperature, label):
    c = corr.coefficients
    A, B, C, D = c["A"], c["B"], c["C"], c["D"]
    Tu = _user_temperature(corr, T)
    base = np.maximum(1.0 - Tu / C, 0.0)
    safe = np.maximum(base, 1e-12)
    power = safe**D
    value = A / B ** (1.0 + power)
    # d/dT of -(1 + (1-Tu/C)^D) ln B = ln B * D (1-Tu/C)^(D-1) / C * slope
    slope = np.where(base > 0.0, value * math.log(B) * D * power / safe / C, 0.0)
    return value, slope * corr.temperature_slope


def _constant(corr, T, critical_temperature, label):
    return np.full_like(T, corr.coefficients["value"], dtype=float), np.zeros_like(T, dtype=float)


_FORM_FUNCTIONS: dict[str, Callable] = {
    "antoine": _antoine,
    "dippr101": _dippr101,
    "polynomial": _polynomial,
    "dippr107": _dippr107,
    "watson": _watson,
    "dippr106": _dippr106,
    "dippr105": _dippr105,
    "constant": _constant,
    "wagner": wagner,
    "trc_gas": trc_gas,
}


def _label(corr: Correlation, label: str | None) -> str:
    return label if label else f"{corr.form} correlation"


def _format_bound(bound: float | None) -> str:
    return "(no bound)" if bound is None else f"{bound:.2f} K"
