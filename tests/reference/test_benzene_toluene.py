"""Benzene(1)-toluene(2) bubble points at 101.325 kPa with Raoult's law (ideal liquid, ideal
vapor): the package (CoolProp vapor pressures) against the same calculation done here with the
NIST Chemistry WebBook Antoine constants, and against the Antoine function of the `chemicals`
package (Caleb Bell's independent implementation; only its equation is used, none of its data).

Antoine form of the NIST Chemistry WebBook: log10(P / bar) = A - B / (T / K + C). Constants
FROM MEMORY (research notes, item 3a: the WebBook pages were seen to use this form, but the
coefficient rows were not re-read; they agree with CoolProp to 0.2 %):
- benzene: A = 4.72583, B = 1660.652, C = -1.461, 333.4-373.5 K (Eon, Pommier & Jacques, 1971);
- toluene: A = 4.07827, B = 1343.943, C = -53.773, 308.52-384.66 K (Williamham, Taylor,
  Pignocco & Rossini, J. Res. NBS 35 (1945) 219).
At x_benzene = 0.1 the bubble point (379 K) lies 6 K above the benzene range: the equation is
extrapolated there, as it is by every implementation compared here.
"""

from __future__ import annotations

import CoolProp.CoolProp as CP
import numpy as np
import pytest
from scipy.optimize import brentq

from conftest import case_from_text
from solver.components import component_info
from solver.thermo import flash
from solver.thermo.activity import IdealSolution
from solver.thermo.package import ThermoPackage
from solver.thermo.pure import PureComponents

ATMOSPHERE = 101325.0
BAR = 1e5
X_BENZENE = np.round(np.arange(0.1, 0.91, 0.1), 10)

# NIST Chemistry WebBook Antoine constants, from memory (see the module docstring)
BENZENE_ANTOINE = (4.72583, 1660.652, -1.461)  # Eon, Pommier & Jacques 1971, 333.4-373.5 K
TOLUENE_ANTOINE = (4.07827, 1343.943, -53.773)  # Williamham et al. 1945, 308.52-384.66 K


def _antoine_pressure(T: float, constants: tuple[float, float, float]) -> float:
    """Pa, from log10(P / bar) = A - B / (T + C)."""
    A, B, C = constants
    return BAR * 10.0 ** (A - B / (T + C))


def _raoult_bubble(x1: float, vapor_pressure) -> tuple[float, float]:
    """(T / K, y1) where x1 P1(T) + (1 - x1) P2(T) = 101.325 kPa; vapor_pressure(T) -> (P1, P2)."""

    def excess(T: float) -> float:
        p1, p2 = vapor_pressure(T)
        return x1 * p1 + (1.0 - x1) * p2 - ATMOSPHERE

    T = brentq(excess, 330.0, 400.0, xtol=1e-12, rtol=1e-15)
    p1, _ = vapor_pressure(T)
    return T, x1 * p1 / ATMOSPHERE


def _nist(T: float) -> tuple[float, float]:
    return _antoine_pressure(T, BENZENE_ANTOINE), _antoine_pressure(T, TOLUENE_ANTOINE)


@pytest.fixture(scope="module")
def package() -> ThermoPackage:
    pure = PureComponents([component_info("benzene"), component_info("toluene")])
    return ThermoPackage(pure, IdealSolution(2))


@pytest.fixture(scope="module")
def computed(package) -> tuple[np.ndarray, np.ndarray]:
    x = np.column_stack([X_BENZENE, 1.0 - X_BENZENE])
    T, y = flash.bubble_temperature(package, np.full(X_BENZENE.size, ATMOSPHERE), x)
    return T, y[:, 0]


def test_bubble_points_with_coolprop_match_nist_antoine(computed):
    T, y1 = computed
    reference = np.array([_raoult_bubble(x1, _nist) for x1 in X_BENZENE])
    print(f"\nbenzene-toluene vs NIST Antoine: max |dT| = {np.max(np.abs(T - reference[:, 0])):.3f} K, "
          f"max |dy| = {np.max(np.abs(y1 - reference[:, 1])):.4f}")
    np.testing.assert_allclose(T, reference[:, 0], rtol=0, atol=0.2)
    np.testing.assert_allclose(y1, reference[:, 1], rtol=0, atol=0.003)
    # the pure-component ends as well: benzene 353.2 K, toluene 383.8 K (NIST Antoine above)
    assert np.all(np.diff(T) < 0) and 353.0 < T[-1] and T[0] < 384.0


def test_bubble_points_match_the_chemicals_antoine_function(computed):
    chemicals_pressure = pytest.importorskip("chemicals.vapor_pressure")

    def vapor_pressure(T: float) -> tuple[float, float]:
        # chemicals' Antoine is log10(P / Pa) = A - B / (T + C): A(bar) + log10(1e5)
        benzene, toluene = BENZENE_ANTOINE, TOLUENE_ANTOINE
        return (
            chemicals_pressure.Antoine(T, benzene[0] + 5.0, benzene[1], benzene[2]),
            chemicals_pressure.Antoine(T, toluene[0] + 5.0, toluene[1], toluene[2]),
        )

    # our own coding of the equation agrees with the independent one ...
    for T in (340.0, 360.0, 380.0):
        np.testing.assert_allclose(vapor_pressure(T), _nist(T), rtol=1e-12)
    T, y1 = computed
    reference = np.array([_raoult_bubble(x1, vapor_pressure) for x1 in X_BENZENE])
    # ... and the package's bubble points agree with it to the same tolerances
    np.testing.assert_allclose(T, reference[:, 0], rtol=0, atol=0.2)
    np.testing.assert_allclose(y1, reference[:, 1], rtol=0, atol=0.003)


def test_package_with_the_nist_antoine_equation_reproduces_the_hand_calculation():
    """The same NIST Antoine constants as user-defined components ([components.data]) go through
    the package's correlation and bubble-point code: the result must equal the brentq solution
    above to solver precision. Critical constants (used only to bound the iteration) are
    CoolProp's."""
    critical = {name: (CP.PropsSI("Tcrit", fluid), CP.PropsSI("pcrit", fluid), CP.PropsSI("molemass", fluid))
                for name, fluid in (("benzene_nist", "Benzene"), ("toluene_nist", "Toluene"))}
    blocks = []
    for name, (A, B, C) in (("benzene_nist", BENZENE_ANTOINE), ("toluene_nist", TOLUENE_ANTOINE)):
        Tc, Pc, M = critical[name]
        blocks.append(
            f"[components.data.{name}]\n"
            f'molar_mass = "{M} kg/mol"\ncritical_temperature = "{Tc} K"\ncritical_pressure = "{Pc} Pa"\n'
            f'vapor_pressure = {{ form = "antoine", A = {A}, B = {B}, C = {C}, base = 10, pressure_unit = "bar", '
            f'temperature_unit = "K" }}\n'
            f'source = "NIST Chemistry WebBook Antoine constants (from memory); critical constants from CoolProp"\n'
        )
    text = (
        '[components]\nnames = ["benzene_nist", "toluene_nist"]\n'
        + "".join(blocks)
        + '[thermo]\nliquid = "ideal"\nenthalpy = "cmo"\n'
        '[column]\nstages = 5\ncondenser = "total"\nreboiler = "partial"\npressure.top = "101.325 kPa"\n'
        '[[feeds]]\nstage = 3\nflow = "100 kmol/h"\ncomposition = { benzene_nist = 0.5, toluene_nist = 0.5 }\n'
        'vapor_fraction = 0.0\n[specs]\nreflux_ratio = 2.0\ndistillate_rate = "40 kmol/h"\n'
    )
    package = ThermoPackage.from_case(case_from_text(text))
    x = np.column_stack([X_BENZENE, 1.0 - X_BENZENE])
    T, y = flash.bubble_temperature(package, np.full(X_BENZENE.size, ATMOSPHERE), x)
    reference = np.array([_raoult_bubble(x1, _nist) for x1 in X_BENZENE])
    np.testing.assert_allclose(T, reference[:, 0], rtol=0, atol=1e-7)
    np.testing.assert_allclose(y[:, 0], reference[:, 1], rtol=0, atol=1e-9)
    # no heat-of-vaporization correlation was given: the constant latent heat of the cmo model
    # comes from the Antoine slope (Clausius-Clapeyron), ~30.7 and ~33.2 kJ/mol at the normal
    # boiling points (benzene and toluene, NIST WebBook, from memory), within a few per cent
    assert "Clausius-Clapeyron" in package.cmo_latent_heat_basis
    assert package.cmo_latent_heat == pytest.approx(0.5 * (30.7e3 + 33.2e3), rel=0.05)


def test_relative_volatility_of_benzene_to_toluene(package):
    """alpha = Psat_benzene / Psat_toluene from CoolProp against NIST Antoine inside the ranges
    of both equations (333.4-373.5 K), to 1 %; it falls with temperature."""
    T = np.array([335.0, 353.15, 365.0, 373.0])
    psat = package.pure.vapor_pressure(T)[0]
    alpha = psat[:, 0] / psat[:, 1]
    nist = np.array([_nist(t)[0] / _nist(t)[1] for t in T])
    np.testing.assert_allclose(alpha, nist, rtol=0.01)
    assert np.all(np.diff(alpha) < 0.0) and np.all(np.diff(nist) < 0.0)
