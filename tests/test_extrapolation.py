"""Tests of solver.thermo.extrapolation: each property equals its correlation inside the range,
continues it with the same value and slope at the range's end, reaches the critical point, has
analytic derivatives that match central differences, and warns (naming component, property
and range) outside the range."""

from __future__ import annotations

import dataclasses
import math
import warnings
from types import MappingProxyType

import numpy as np
import pytest
from scipy.integrate import quad

from solver.case import Correlation
from solver.thermo import extrapolation as ex
from solver.thermo.extrapolation import evaluate, evaluate_log

# 2-propanol: Wagner constants of Poling et al. (2001) Appendix A; Perry's 8th ed. Table 2-150
# (DIPPR 106) heat of vaporization; Perry's liquid density (DIPPR 105); Poling's cp polynomial;
# IUPAC critical constants (Tc 508.3 K, Pc 4.764 MPa) -- all as chemicals ships them. The
# NARROW copies cut the ranges to test the continuation where the full correlation is known.
TC, PC = 508.3, 4.764e6
WAGNER = Correlation("wagner", MappingProxyType(
    {"A": -8.73656, "B": 2.1624, "C": -8.70785, "D": 4.77927, "Tc": 508.3, "Pc": 4763000.0}), T_min=185.258, T_max=508.3)
NARROW = dataclasses.replace(WAGNER, T_min=300.0, T_max=400.0)
HVAP = Correlation("dippr106", MappingProxyType(
    {"A": 72542.0, "B": 0.79137, "C": -0.66092, "D": 0.34223, "E": 0.0, "Tc": 508.3}), T_min=185.26, T_max=508.3)
HVAP_NARROW = dataclasses.replace(HVAP, T_min=300.0, T_max=420.0)
VOLUME = Correlation("dippr105", MappingProxyType({"A": 1179.9, "B": 0.2644, "C": 508.3, "D": 0.24653}),
                     T_min=185.26, T_max=508.3)
VOLUME_NARROW = dataclasses.replace(VOLUME, T_min=280.0, T_max=420.0)
CP = Correlation("polynomial", MappingProxyType({"c0": 3.334, "c1": 0.018853, "c2": 3.644e-5, "c3": -6.115e-8,
                                                 "c4": 2.543e-11}), value_factor=8.314462618, T_min=300.0, T_max=600.0)  # range cut from 50-1000 K


def quiet(function, *args, **kwargs):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ex.PropertyRangeWarning)
        return function(*args, **kwargs)


def central(function, T, h=1e-4):
    return (function(T + h)[0] - function(T - h)[0]) / (2 * h)


def test_vapor_pressure_inside_the_range_is_the_correlation():
    T = np.array([250.0, 355.0, 450.0])
    ln_p, slope = ex.ln_vapor_pressure(WAGNER, T, Tc=TC, Pc=PC)
    exact, exact_slope = evaluate_log(WAGNER, T)
    assert ln_p == pytest.approx(exact, rel=1e-14) and slope == pytest.approx(exact_slope, rel=1e-14)


def test_vapor_pressure_continues_with_value_and_slope_and_ends_at_the_critical_point():
    function = lambda T: quiet(ex.ln_vapor_pressure, NARROW, T, Tc=TC, Pc=PC)  # noqa: E731
    for end in (300.0, 400.0):
        below, above = function(np.array([end - 1e-7]))[0], function(np.array([end + 1e-7]))[0]
        assert above[0] == pytest.approx(below[0], abs=1e-6)
        slopes = function(np.array([end - 1e-7, end + 1e-7]))[1]
        assert slopes[1] == pytest.approx(slopes[0], rel=1e-5)
    ln_p, _ = function(np.array([TC]))
    assert math.exp(ln_p[0]) == pytest.approx(PC, rel=1e-4)  # Lee-Kesler f0(1), f1(1) are 1e-5 from 0


def test_vapor_pressure_extrapolation_stays_near_the_full_range_correlation():
    """The Lee-Kesler continuation from 400 K and the Wagner equation fitted to data up to Tc
    agree within 3 % at 480 K (a judgement of what the extrapolation should achieve)."""
    T = np.array([480.0])
    extrapolated = quiet(ex.ln_vapor_pressure, NARROW, T, Tc=TC, Pc=PC)[0]
    assert math.exp(extrapolated[0]) == pytest.approx(math.exp(evaluate_log(WAGNER, T)[0][0]), rel=0.03)


@pytest.mark.parametrize("T", [250.0, 350.0, 430.0, 470.0, 505.0, 515.0])
def test_vapor_pressure_derivative_against_finite_differences(T):
    function = lambda x: quiet(ex.ln_vapor_pressure, NARROW, x, Tc=TC, Pc=PC)  # noqa: E731
    assert function(np.array([T]))[1][0] == pytest.approx(central(function, np.array([T]))[0], rel=1e-6)


def test_lee_kesler_passes_through_the_critical_point_and_its_acentric_factor_through_tb():
    ln_pr, _ = ex.lee_kesler_ln_reduced_pressure(np.array([1.0]), 0.3)
    assert abs(ln_pr[0]) < 1e-4
    omega = ex.lee_kesler_acentric_factor(355.4, TC, PC)
    ln_pr, _ = ex.lee_kesler_ln_reduced_pressure(np.array([355.4 / TC]), omega)
    assert math.exp(ln_pr[0]) * PC == pytest.approx(101325.0, rel=1e-12)


def test_acentric_factor_by_definition_for_2_propanol():
    """0.665 in Poling et al. (2001) Appendix A (from memory); 0.01 covers rounding and the
    difference between the Wagner fit and the data."""
    assert ex.acentric_factor(WAGNER, TC, PC) == pytest.approx(0.665, abs=0.01)


def test_heat_of_vaporization_continuation():
    function = lambda T: quiet(ex.heat_of_vaporization, HVAP_NARROW, T, Tc=TC)  # noqa: E731
    for end in (300.0, 420.0):
        values, slopes = function(np.array([end - 1e-7, end + 1e-7]))
        assert values[1] == pytest.approx(values[0], rel=1e-8)  # they differ by 2e-7 K of slope
        assert slopes[1] == pytest.approx(slopes[0], rel=1e-5)
    assert function(np.array([TC, TC + 5.0]))[0] == pytest.approx([0.0, 0.0], abs=1e-9)
    for T in (250.0, 350.0, 460.0, 500.0):
        assert function(np.array([T]))[1][0] == pytest.approx(central(function, np.array([T]))[0], rel=1e-6)
    inside = np.array([350.0])
    assert function(inside)[0] == pytest.approx(evaluate(HVAP, inside, TC)[0], rel=1e-14)


def test_liquid_volume_continuation():
    function = lambda T: quiet(ex.liquid_molar_volume, VOLUME_NARROW, T, Tc=TC, Pc=PC)  # noqa: E731
    for end in (280.0, 420.0):
        values, slopes = function(np.array([end - 1e-7, end + 1e-7]))
        assert values[1] == pytest.approx(values[0], rel=1e-8)  # they differ by 2e-7 K of slope
        assert slopes[1] == pytest.approx(slopes[0], rel=1e-5)
    for T in (250.0, 350.0, 460.0, 500.0):
        assert function(np.array([T]))[1][0] == pytest.approx(central(function, np.array([T]), 1e-5)[0], rel=1e-5)
    # the Rackett continuation stays within 3 % of the full-range DIPPR 105 correlation at 480 K
    full = 1.0 / evaluate(VOLUME, np.array([480.0]))[0][0]
    assert function(np.array([480.0]))[0][0] == pytest.approx(full, rel=0.03)


def test_ideal_gas_cp_and_enthalpy():
    function = lambda T: quiet(ex.ideal_gas_cp, CP, T)  # noqa: E731
    for end in (300.0, 600.0):
        values, slopes = function(np.array([end - 1e-7, end + 1e-7]))
        assert values[1] == pytest.approx(values[0], rel=1e-8)  # they differ by 2e-7 K of slope
        assert slopes[1] == pytest.approx(slopes[0], rel=1e-9)
    T = np.array([250.0, 298.15, 450.0, 700.0])
    h, cp = quiet(ex.ideal_gas_enthalpy, CP, T)
    assert h[1] == pytest.approx(0.0, abs=1e-9)
    assert cp == pytest.approx(function(T)[0], rel=1e-14)
    for k, t in enumerate(T):
        integral, _ = quad(lambda x: function(np.array([x]))[0][0], 298.15, t, points=[300.0, 600.0])
        assert h[k] == pytest.approx(integral, rel=1e-9, abs=1e-9)
    assert cp == pytest.approx(central(lambda x: quiet(ex.ideal_gas_enthalpy, CP, x), T, 1e-3), rel=1e-7)


def test_warning_names_component_property_and_range():
    with pytest.warns(ex.PropertyRangeWarning) as record:
        ex.ln_vapor_pressure(NARROW, np.array([350.0, 450.0]), Tc=TC, Pc=PC, component="isopropanol")
    message = str(record[0].message)
    for text in ("isopropanol", "vapor pressure", "300.00 K", "400.00 K", "above", "Lee-Kesler"):
        assert text in message
    notes = ex.range_notes(NARROW, np.array([250.0, 450.0]), component="isopropanol", prop="vapor pressure")
    assert len(notes) == 2 and "up to 450.00 K" in notes[0] and "down to 250.00 K" in notes[1]


def test_no_warning_inside_the_range():
    with warnings.catch_warnings():
        warnings.simplefilter("error", ex.PropertyRangeWarning)
        ex.ln_vapor_pressure(NARROW, np.array([320.0, 390.0]), Tc=TC, Pc=PC, component="isopropanol")
        ex.heat_of_vaporization(HVAP, np.array([320.0, 505.0]), Tc=TC, component="isopropanol")
