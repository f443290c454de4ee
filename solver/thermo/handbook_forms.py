"""Correlation forms the handbook tables need beyond those of :mod:`solver.thermo.correlations`:
the Wagner vapor-pressure equation and the TRC ideal-gas heat capacity, vectorized, with
analytic temperature derivatives.

``wagner``
    ``ln(P/Pc) = (A tau + B tau^1.5 + C tau^m + D tau^n) / Tr`` with ``Tr = T/Tc``,
    ``tau = 1 - Tr``; coefficients ``A, B, C, D, Tc`` (K), ``Pc`` (Pa) and the exponents of the
    third and fourth terms ``exponent_C`` (m, default 2.5) and ``exponent_D`` (n, default 5).
    Wagner, W. (1973), Cryogenics 13, 470-482 (the form with m = 3, n = 6, as fitted by McGarry,
    J. (1983), Ind. Eng. Chem. Process Des. Dev. 22, 313-322); the form with m = 2.5, n = 5 is
    the one of Poling, Prausnitz and O'Connell (2001), The Properties of Gases and Liquids, 5th
    ed., eq. 7-3.3 and Appendix A, and of the VDI Heat Atlas, 2nd ed. (2010), section D3.1.
    At and above the equation's own ``Tc`` the value is ``Pc`` (tau is held at 0).
``trc_gas``
    ``cp/R = a0 + (a1/T^2) exp(-a2/T) + a3 y^2 + (a4 - a5/(T - a7)^2) y^8`` with
    ``y = (T - a7)/(T + a6)`` for ``T > a7`` and 0 otherwise (T in K); ``value_factor`` is the
    gas constant. Frenkel, M., Kabo, G. J., Marsh, K. N., Roganov, G. N. and Wilhoit, R. C.
    (1994), Thermodynamics of Organic Compounds in the Gas State, TRC Data Series, Thermodynamics
    Research Center, College Station TX, vol. I, eq. (2.9).

Each form function has the signature of the form functions of
:mod:`solver.thermo.correlations`, which dispatches to them: ``(corr, T, critical_temperature,
label) -> (f, df/dT)`` before ``value_factor``; both take T in K (``temperature_slope`` and
``temperature_intercept`` are not used: the Wagner equation carries its own Tc in K).
"""

from __future__ import annotations

import math
import numpy as np

from solver.thermo.data import Correlation

__all__ = ["WAGNER_DEFAULT_EXPONENTS", "trc_gas", "wagner", "wagner_log"]

#: Exponents of the third and fourth Wagner terms unless the correlation gives them.
WAGNER_DEFAULT_EXPONENTS = (2.5, 5.0)


def wagner_log(corr: Correlation, T: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """``(ln(P/Pa), d ln P/dT)`` of the Wagner equation at T (K), before ``value_factor``."""
    c = corr.coefficients
    Tc, Pc = float(c["Tc"]), float(c["Pc"])
    m = float(c.get("exponent_C", WAGNER_DEFAULT_EXPONENTS[0]))
    n = float(c.get("exponent_D", WAGNER_DEFAULT_EXPONENTS[1]))
    T = np.maximum(np.asarray(T, dtype=float), 1e-6)
    Tr = T / Tc
    tau = np.maximum(1.0 - Tr, 0.0)
    root = np.sqrt(tau)
    f = tau * (c["A"] + c["B"] * root) + c["C"] * tau**m + c["D"] * tau**n
    df_dtau = c["A"] + 1.5 * c["B"] * root + m * c["C"] * tau ** (m - 1.0) + n * c["D"] * tau ** (n - 1.0)
    # d(f/Tr)/dT with dtau/dT = -1/Tc and dTr/dT = 1/Tc
    slope = -(df_dtau * Tr + f) / (Tr * Tr * Tc)
    return math.log(Pc) + f / Tr, slope


def wagner(corr: Correlation, T: np.ndarray, critical_temperature, label) -> tuple[np.ndarray, np.ndarray]:
    """Vapor pressure (Pa) and its temperature derivative by the Wagner equation."""
    ln_p, slope = wagner_log(corr, T)
    value = np.exp(ln_p)
    return value, value * slope


def trc_gas(corr: Correlation, T: np.ndarray, critical_temperature, label) -> tuple[np.ndarray, np.ndarray]:
    """``cp/R`` and its temperature derivative by the TRC ideal-gas heat-capacity equation."""
    c = corr.coefficients
    a0, a1, a2, a3, a4, a5, a6, a7 = (float(c[f"a{k}"]) for k in range(8))
    T = np.maximum(np.asarray(T, dtype=float), 1e-6)
    with np.errstate(all="ignore"):
        first = a1 / T**2 * np.exp(-a2 / T)
        d_first = first * (a2 / T**2 - 2.0 / T)
        above = T > a7
        y = np.where(above, (T - a7) / (T + a6), 0.0)
        dy = np.where(above, (a6 + a7) / (T + a6) ** 2, 0.0)
        gap = np.where(above, T - a7, 1.0)
        bracket = a4 - a5 / gap**2
        y7 = y**7
        value = a0 + first + a3 * y * y + bracket * y7 * y
        slope = d_first + 2.0 * a3 * y * dy + np.where(above, 2.0 * a5 / gap**3, 0.0) * y7 * y + bracket * 8.0 * y7 * dy
    return value, slope
