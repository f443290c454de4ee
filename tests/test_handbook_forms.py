"""Tests of the Wagner and TRC forms against the independent
implementations of the registry package ``chemicals`` (chemicals.vapor_pressure.Wagner and
Wagner_original, chemicals.heat_capacity.TRCCp), and their analytic temperature derivatives
against central finite differences."""

from __future__ import annotations

from types import MappingProxyType

import numpy as np
import pytest
from chemicals.heat_capacity import TRCCp
from chemicals.vapor_pressure import Wagner, Wagner_original

from solver.case import Correlation
from solver.thermo import correlations
from solver.thermo.data import FORMS, PROPERTY_FORMS
from solver.thermo.extrapolation import evaluate, evaluate_log

R = 8.314462618

# Wagner (2.5, 5) constants of 2-propanol as printed in Poling et al. (2001), Appendix A, read
# here from chemicals' copy of that table (Wagner Collection Poling.tsv).
IPA_WAGNER = Correlation("wagner", MappingProxyType(
    {"A": -8.73656, "B": 2.1624, "C": -8.70785, "D": 4.77927, "Tc": 508.3, "Pc": 4763000.0}), T_min=185.258, T_max=508.3)
# Wagner (3, 6) constants of ethyl acetate, McGarry (1983), from chemicals' copy of the table.
ETHYL_ACETATE_WAGNER = Correlation("wagner", MappingProxyType(
    {"A": -7.68521, "B": 1.36511, "C": -4.0898, "D": -1.75342, "Tc": 523.2, "Pc": 3830100.0,
     "exponent_C": 3.0, "exponent_D": 6.0}), T_min=289.0, T_max=523.2)
# Invented TRC coefficients of a plausible size (not a substance's).
TRC = Correlation("trc_gas", MappingProxyType(
    {"a0": 4.0, "a1": 1.45e6, "a2": 455.0, "a3": 36.0, "a4": -8.1, "a5": 3.46e6, "a6": 143.0, "a7": 166.0}),
    value_factor=R, T_min=50.0, T_max=3000.0)

TEMPERATURES = np.array([200.0, 290.0, 350.0, 420.0, 480.0, 505.0])


def test_wagner_2_5_5_matches_chemicals():
    c = IPA_WAGNER.coefficients
    value, _ = evaluate(IPA_WAGNER, TEMPERATURES)
    expected = [Wagner(T, c["Tc"], c["Pc"], c["A"], c["B"], c["C"], c["D"]) for T in TEMPERATURES]
    assert value == pytest.approx(expected, rel=1e-12)


def test_wagner_3_6_matches_chemicals_original_form():
    c = ETHYL_ACETATE_WAGNER.coefficients
    T = TEMPERATURES[1:]
    value, _ = evaluate(ETHYL_ACETATE_WAGNER, T)
    expected = [Wagner_original(t, c["Tc"], c["Pc"], c["A"], c["B"], c["C"], c["D"]) for t in T]
    assert value == pytest.approx(expected, rel=1e-12)


def test_wagner_ends_at_its_critical_point_and_stays_there():
    value, _ = evaluate(IPA_WAGNER, np.array([508.3, 520.0]))
    assert value == pytest.approx([4763000.0, 4763000.0], rel=1e-12)


@pytest.mark.parametrize("corr", [IPA_WAGNER, ETHYL_ACETATE_WAGNER])
def test_wagner_log_derivative_against_finite_differences(corr):
    T = TEMPERATURES[1:]
    ln_p, slope = evaluate_log(corr, T)
    h = 1e-4
    numeric = (evaluate_log(corr, T + h)[0] - evaluate_log(corr, T - h)[0]) / (2 * h)
    assert slope == pytest.approx(numeric, rel=1e-7)
    value, d_value = evaluate(corr, T)
    assert np.log(value) == pytest.approx(ln_p, rel=1e-13)
    assert d_value == pytest.approx(value * slope, rel=1e-12)


def test_trc_matches_chemicals():
    a = [TRC.coefficients[f"a{k}"] for k in range(8)]
    T = np.array([100.0, 166.0, 250.0, 400.0, 800.0, 1500.0])
    value, _ = evaluate(TRC, T)
    # 1e-9: chemicals' gas constant has more digits than CODATA's exact 8.314462618
    assert value == pytest.approx([TRCCp(t, *a) for t in T], rel=1e-9)


def test_trc_derivative_against_finite_differences():
    T = np.array([120.0, 250.0, 400.0, 800.0, 1500.0])
    _, slope = evaluate(TRC, T)
    h = 1e-3
    numeric = (evaluate(TRC, T + h)[0] - evaluate(TRC, T - h)[0]) / (2 * h)
    assert slope == pytest.approx(numeric, rel=1e-6)


def test_built_in_forms_pass_through_to_correlations():
    corr = Correlation("polynomial", MappingProxyType({"c0": 30.0, "c1": 0.1}))
    value, slope = evaluate(corr, np.array([300.0]))
    assert value[0] == pytest.approx(60.0) and slope[0] == pytest.approx(0.1)


def test_forms_table_entries_name_every_coefficient_the_functions_read():
    required, optional = FORMS["wagner"]
    assert set(IPA_WAGNER.coefficients) <= set(required + optional)
    assert set(ETHYL_ACETATE_WAGNER.coefficients) <= set(required + optional)
    assert set(TRC.coefficients) == set(FORMS["trc_gas"][0])
    assert "wagner" in PROPERTY_FORMS["vapor_pressure"] and "trc_gas" in PROPERTY_FORMS["ideal_gas_cp"]


@pytest.mark.parametrize("corr", [IPA_WAGNER, ETHYL_ACETATE_WAGNER, TRC])
def test_the_one_evaluation_dispatches_the_new_forms_with_derivatives(corr):
    """solver.thermo.correlations evaluates the new forms (strict range check included), and
    its analytic derivative matches central differences (step 1e-3 K)."""
    T = np.array([300.0, 400.0, 480.0])
    value, slope = correlations.evaluate(corr, T, strict=True)
    plus, _ = correlations.evaluate(corr, T + 1e-3, strict=True)
    minus, _ = correlations.evaluate(corr, T - 1e-3, strict=True)
    assert slope == pytest.approx((plus - minus) / 2e-3, rel=1e-6)
    ln_value, ln_slope = correlations.evaluate_log(corr, T)
    assert ln_value == pytest.approx(np.log(value), rel=1e-12)
    assert ln_slope == pytest.approx(slope / value, rel=1e-6)


def test_the_one_evaluation_checks_the_range_of_the_new_forms():
    from solver.errors import ThermoError

    with pytest.raises(ThermoError, match="valid from 289.00 K"):
        correlations.evaluate(ETHYL_ACETATE_WAGNER, np.array([250.0]))
