"""Azeotropes and isothermal VLE of alcohol systems against published experimental data.

Model: modified Raoult's law (ideal vapor) with NRTL and CoolProp vapor pressures, as built by
``ThermoPackage.from_case``. Azeotropes are found as the root of y1(x1) - x1 = 0 along bubble
points at 101.325 kPa (``flash.bubble_temperature``), with scipy's brentq.

Sources are named beside each value. The computed azeotropes are printed (run with ``-s``).
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import brentq

from conftest import case_from_text
from solver.thermo import flash
from solver.thermo.package import ThermoPackage

ATMOSPHERE = 101325.0
CELSIUS = 273.15

CASE = """
[components]
names = ["{first}", "{second}"]
[thermo]
liquid = "nrtl"
[thermo.nrtl.{first}.{second}]
{parameters}
source = "{source}"
[column]
stages = 5
condenser = "total"
reboiler = "partial"
pressure.top = "101.325 kPa"
[[feeds]]
stage = 3
flow = "100 kmol/h"
composition = {{ {first} = 0.5, {second} = 0.5 }}
vapor_fraction = 0.0
[specs]
reflux_ratio = 2.0
distillate_rate = "40 kmol/h"
"""


def _package(first: str, second: str, parameters: str, source: str) -> ThermoPackage:
    text = CASE.format(first=first, second=second, parameters=parameters, source=source)
    return ThermoPackage.from_case(case_from_text(text, name=f"{first}-{second} reference"))


def _bubble(thermo: ThermoPackage, x1: float, pressure: float = ATMOSPHERE) -> tuple[float, float]:
    """(bubble temperature K, y1) of the binary liquid (x1, 1 - x1)."""
    T, y = flash.bubble_temperature(thermo, np.array([pressure]), np.array([[x1, 1.0 - x1]]))
    return float(T[0]), float(y[0, 0])


def _azeotrope(thermo: ThermoPackage, low: float, high: float) -> tuple[float, float]:
    """(x1, T / K) where y1 = x1 between x1 = low and high at 101.325 kPa."""
    x1 = brentq(lambda x: _bubble(thermo, x)[1] - x, low, high, xtol=1e-12)
    return x1, _bubble(thermo, x1)[0]


def _assert_minimum_boiling(thermo: ThermoPackage, x_az: float, T_az: float) -> None:
    """A positive-deviation azeotrope boils lower than the liquids around it and than both
    pure components."""
    for x1 in (x_az - 0.03, x_az + 0.03, 1e-9, 1.0 - 1e-9):
        assert _bubble(thermo, x1)[0] > T_az


# ------------------------------------------------------------------ ethanol(1)-water(2)

# NRTL at 70 degC from Gmehling, Kolbe, Kleiber & Rarey, "Chemical Thermodynamics for Process
# Simulation", Wiley-VCH 2012, Problem P05.01: tau12 = -0.178, tau21 = 1.963, alpha = 0.2974,
# used here as temperature-independent tau (a_ij). (Quoted second-hand in the research notes,
# from the unit test tests/test_nrtl.py of the open-source `thermo` package, which cites that
# problem; the book itself was not re-read.)
ETHANOL_WATER_NRTL = "constant_term = [-0.178, 1.963]\nalpha = 0.2974"
ETHANOL_WATER_SOURCE = "Gmehling, Kolbe, Kleiber & Rarey 2012, Problem P05.01 (70 degC, tau constant)"
# Experimental azeotrope at 1 atm: x = y = 0.894, 78.15 degC; Perry's Chemical Engineers'
# Handbook, 6th ed. (Perry & Green), p. 13-12, last row of the ethanol-water table.
ETHANOL_WATER_AZEOTROPE_X = 0.894
ETHANOL_WATER_AZEOTROPE_T = 78.15 + CELSIUS  # 351.30 K


def test_ethanol_water_azeotrope_matches_perry():
    thermo = _package("ethanol", "water", ETHANOL_WATER_NRTL, ETHANOL_WATER_SOURCE)
    x_az, T_az = _azeotrope(thermo, 0.5, 0.99)
    print(f"\nethanol-water azeotrope at 101.325 kPa: x_ethanol = {x_az:.4f}, T = {T_az:.3f} K ({T_az - CELSIUS:.2f} degC)")
    # CoolProp's ethanol boils ~0.15 K above the accepted normal boiling point (research notes,
    # computed), which puts the computed azeotrope ~0.15 K high; hence 0.3 K.
    assert abs(x_az - ETHANOL_WATER_AZEOTROPE_X) <= 0.01
    assert abs(T_az - ETHANOL_WATER_AZEOTROPE_T) <= 0.3
    _assert_minimum_boiling(thermo, x_az, T_az)
    # below the azeotrope ethanol is the lighter component, above it water is
    assert _bubble(thermo, 0.5)[1] > 0.5
    assert _bubble(thermo, 0.97)[1] < 0.97


# ------------------------------------------------------------------ ethanol(1)-toluene(2)

# NRTL: Smith, Van Ness & Abbott, Introduction to Chemical Engineering Thermodynamics, 7th ed.,
# Table 12.5 (values recommended by Gmehling et al., DECHEMA Chemistry Data Series vol. I):
# b12 = 713.57, b21 = 1147.86 cal/mol, alpha = 0.5292, tau_ij = b_ij / RT.
ETHANOL_TOLUENE_NRTL = 'dg = ["713.57 cal/mol", "1147.86 cal/mol"]\nalpha = 0.5292'
# Experimental azeotrope at 1 atm: 76.7 degC, 68 wt% ethanol (x_ethanol = 0.810 with M = 46.069
# and 92.141 g/mol); Horsley, Azeotropic Data, Adv. Chem. Ser. 6 (1952) / CRC Handbook, azeotrope
# table -- FROM MEMORY (not re-read), so the tolerances are wider.
ETHANOL_TOLUENE_AZEOTROPE_X = 0.810
ETHANOL_TOLUENE_AZEOTROPE_T = 76.7 + CELSIUS


def test_ethanol_toluene_azeotrope():
    thermo = _package("ethanol", "toluene", ETHANOL_TOLUENE_NRTL, "Smith, Van Ness & Abbott, 7th ed., Table 12.5")
    x_az, T_az = _azeotrope(thermo, 0.4, 0.99)
    print(f"\nethanol-toluene azeotrope at 101.325 kPa: x_ethanol = {x_az:.4f}, T = {T_az:.3f} K ({T_az - CELSIUS:.2f} degC)")
    assert abs(x_az - ETHANOL_TOLUENE_AZEOTROPE_X) <= 0.02
    assert abs(T_az - ETHANOL_TOLUENE_AZEOTROPE_T) <= 0.5
    _assert_minimum_boiling(thermo, x_az, T_az)


# ------------------------------------------------------------------ acetone(1)-methanol(2)

# NRTL: Smith, Van Ness & Abbott, 7th ed., Table 12.5: b12 = 184.70, b21 = 222.64 cal/mol,
# alpha = 0.3084.
ACETONE_METHANOL_NRTL = 'dg = ["184.70 cal/mol", "222.64 cal/mol"]\nalpha = 0.3084'
# Experimental azeotrope at 1 atm: 55.5 degC, 88 wt% acetone (x_acetone ~ 0.80); CRC Handbook /
# Lange's Handbook azeotrope tables -- FROM MEMORY (not re-read).
ACETONE_METHANOL_AZEOTROPE_X = 0.80
ACETONE_METHANOL_AZEOTROPE_T = 55.5 + CELSIUS


def test_acetone_methanol_azeotrope():
    thermo = _package("acetone", "methanol", ACETONE_METHANOL_NRTL, "Smith, Van Ness & Abbott, 7th ed., Table 12.5")
    x_az, T_az = _azeotrope(thermo, 0.4, 0.99)
    print(f"\nacetone-methanol azeotrope at 101.325 kPa: x_acetone = {x_az:.4f}, T = {T_az:.3f} K ({T_az - CELSIUS:.2f} degC)")
    assert abs(x_az - ACETONE_METHANOL_AZEOTROPE_X) <= 0.02
    assert abs(T_az - ACETONE_METHANOL_AZEOTROPE_T) <= 0.5
    _assert_minimum_boiling(thermo, x_az, T_az)


# ------------------------------------------------------------------ methanol(1)-water(2)

# NRTL: Smith, Van Ness & Abbott, 7th ed., Table 12.5: b12 = -253.88, b21 = 845.21 cal/mol,
# alpha = 0.2994.
METHANOL_WATER_NRTL = 'dg = ["-253.88 cal/mol", "845.21 cal/mol"]\nalpha = 0.2994'
KURIHARA_TEMPERATURE = 333.15  # K
# Isothermal P-x-y at 333.15 K: Kurihara, Minoura, Takeda & Kojima (Kurihara et al.), J. Chem.
# Eng. Data 40 (1995) 679, as quoted in a Smith, Van Ness & Abbott problem (research notes,
# item 7, verified there). Columns: P / kPa, x_methanol, y_methanol.
KURIHARA_333K = [
    (39.223, 0.1686, 0.5714),
    (42.984, 0.2167, 0.6268),
    (48.852, 0.3039, 0.6943),
    (52.784, 0.3681, 0.7345),
    (56.652, 0.4461, 0.7742),
    (60.614, 0.5282, 0.8085),
    (63.614, 0.6044, 0.8383),
    (67.924, 0.6804, 0.8733),
    (70.229, 0.7255, 0.8922),
    (72.832, 0.7776, 0.9141),
]


@pytest.fixture(scope="module")
def methanol_water() -> ThermoPackage:
    return _package("methanol", "water", METHANOL_WATER_NRTL, "Smith, Van Ness & Abbott, 7th ed., Table 12.5")


def _bubble_pressure(thermo: ThermoPackage, temperature: float, x: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Modified Raoult's law at fixed T: P = sum_i gamma_i x_i Psat_i, y_i = gamma_i x_i Psat_i / P."""
    T = np.full(x.shape[0], temperature)
    psat = thermo.pure.vapor_pressure(T)[0]
    gamma = np.exp(thermo.activity.evaluate(T, x, derivatives=False).ln_gamma)
    partial = gamma * x * psat
    pressure = partial.sum(axis=1)
    return pressure, partial / pressure[:, None]


def test_methanol_water_bubble_pressures_match_kurihara_at_333_K(methanol_water):
    data = np.array(KURIHARA_333K)
    x = np.column_stack([data[:, 1], 1.0 - data[:, 1]])
    pressure, y = _bubble_pressure(methanol_water, KURIHARA_TEMPERATURE, x)
    measured_pressure = data[:, 0] * 1e3
    deviation = pressure / measured_pressure - 1.0
    print(f"\nmethanol-water at 333.15 K: max |dP/P| = {np.max(np.abs(deviation)):.4f}, max |dy| = {np.max(np.abs(y[:, 0] - data[:, 2])):.4f}")
    assert np.all(np.abs(deviation) <= 0.03)
    assert np.all(np.abs(y[:, 0] - data[:, 2]) <= 0.01)
    # the flash module agrees: at the computed pressure the liquid boils at 333.15 K
    T, y_flash = flash.bubble_temperature(methanol_water, pressure, x)
    np.testing.assert_allclose(T, KURIHARA_TEMPERATURE, rtol=0, atol=1e-7)
    np.testing.assert_allclose(y_flash, y, rtol=0, atol=1e-9)


def test_methanol_water_has_no_azeotrope(methanol_water):
    x1 = np.concatenate([[1e-4, 1e-3], np.linspace(0.01, 0.99, 99), [0.999, 0.9999]])
    x = np.column_stack([x1, 1.0 - x1])
    _, y = flash.bubble_temperature(methanol_water, np.full(x1.size, ATMOSPHERE), x)
    assert np.all(y[:, 0] > x1)
    _, y_isothermal = _bubble_pressure(methanol_water, KURIHARA_TEMPERATURE, x)
    assert np.all(y_isothermal[:, 0] > x1)
