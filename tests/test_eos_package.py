"""The equation-of-state thermo package (both phases from Peng-Robinson or SRK): reading the
case, bubble points and enthalpies against CoolProp's cubic backend (an independent
implementation), the pressure columns of issue 12, and the honesty checks near the critical
point."""

from __future__ import annotations

import re
from pathlib import Path

import CoolProp.CoolProp as CP
import numpy as np
import pytest

from conftest import case_from_text
from solver.case import load_case, loads_case
from solver.engine import simulate
from solver.errors import CaseError, ThermoError
from solver.thermo.flash import bubble_temperature, dew_temperature
from solver.thermo.package import ThermoPackage

CASES = Path(__file__).resolve().parents[1] / "cases"

BINARY = """
title = "propane / n-butane"
[components]
names = ["propane", "n-butane"]
[thermo]
liquid = "{model}"
{extra}
[column]
stages = 10
condenser = "total"
reboiler = "partial"
pressure.top = "{pressure}"
[[feeds]]
stage = 5
flow = "100 kmol/h"
composition = {{ propane = 0.4, n-butane = 0.6 }}
vapor_fraction = 0.0
[specs]
reflux_ratio = 2.5
distillate_rate = "40 kmol/h"
"""


def binary(model="peng-robinson", extra="", pressure="10 bar"):
    return case_from_text(BINARY.format(model=model, extra=extra, pressure=pressure))


COOLPROP_BACKEND = {"peng-robinson": "PR", "soave-redlich-kwong": "SRK"}


@pytest.mark.parametrize("model", sorted(COOLPROP_BACKEND))
def test_bubble_and_dew_points_match_coolprop_cubic_backend(model):
    """CoolProp's PR and SRK backends (independent implementations, same critical constants
    and acentric factors, k_ij = 0) at 10 bar for 40/60 propane/n-butane."""
    thermo = ThermoPackage.from_case(binary(model))
    state = CP.AbstractState(COOLPROP_BACKEND[model], "Propane&n-Butane")
    state.set_mole_fractions([0.4, 0.6])
    state.update(CP.PQ_INPUTS, 10e5, 0.0)
    expected_bubble = state.T()
    state.update(CP.PQ_INPUTS, 10e5, 1.0)
    expected_dew = state.T()
    z = np.array([[0.4, 0.6]])
    bubble, _ = bubble_temperature(thermo, np.array([10e5]), z)
    dew, _ = dew_temperature(thermo, np.array([10e5]), z)
    assert bubble[0] == pytest.approx(expected_bubble, abs=0.05)
    assert dew[0] == pytest.approx(expected_dew, abs=0.05)


def test_liquid_departure_enthalpy_matches_coolprop_peng_robinson():
    """Residual molar enthalpy of the compressed liquid at 300 K and 10 bar (CoolProp PR)."""
    thermo = ThermoPackage.from_case(binary())
    state = CP.AbstractState("PR", "Propane&n-Butane")
    state.set_mole_fractions([0.4, 0.6])
    state.update(CP.PT_INPUTS, 10e5, 300.0)
    liquid = thermo.liquid_enthalpy(np.array([300.0]), np.array([[0.4, 0.6]]), pressure=np.array([10e5]))
    assert liquid.excess[0] == pytest.approx(state.hmolar_residual(), rel=2e-3)


def test_k_values_depend_on_the_vapor_and_report_it():
    thermo = ThermoPackage.from_case(binary())
    T, P, x = np.array([330.0]), np.array([10e5]), np.array([[0.4, 0.6]])
    lean = thermo.k_values(T, P, x, y=np.array([[0.5, 0.5]]))
    rich = thermo.k_values(T, P, x, y=np.array([[0.9, 0.1]]))
    assert lean.d_ln_K_dy is not None and lean.d_ln_K_dy.shape == (1, 2, 2)
    assert not np.allclose(lean.K, rich.K, rtol=1e-4)
    incipient = thermo.k_values(T, P, x)  # the vapor in equilibrium with x at T
    y = incipient.K * x / np.sum(incipient.K * x)
    again = thermo.k_values(T, P, x, y=y)
    np.testing.assert_allclose(again.K, incipient.K, rtol=1e-9)


def test_interaction_pairs_are_read_with_their_source_and_used():
    extra = '[thermo.interaction.propane.n-butane]\nk = 0.003\nsource = "a test value"\n'
    thermo = ThermoPackage.from_case(binary(extra=extra))
    described = thermo.describe()["equation_of_state"]["interaction"]
    assert described == [{"i": "propane", "j": "n-butane", "k_ij": 0.003, "source": "a test value"}]
    plain = ThermoPackage.from_case(binary())
    T, P, x = np.array([330.0]), np.array([10e5]), np.array([[0.4, 0.6]])
    assert not np.allclose(thermo.k_values(T, P, x).K, plain.k_values(T, P, x).K, rtol=1e-5)


@pytest.mark.parametrize(
    ("extra", "model", "match"),
    [
        ('[thermo.interaction.propane.n-butane]\nk = 0.003\n', "peng-robinson", "source"),
        ('[thermo.interaction.propane.n-butane]\nk = 0.003\nsource = "x"\n', "ideal", "not used"),
        ('[thermo.interaction.propane.propane]\nk = 0.003\nsource = "x"\n', "peng-robinson", "two different"),
        ('vapor = "ideal"\n', "peng-robinson", "both phases"),
    ],
)
def test_bad_interaction_and_vapor_keys_name_the_key(extra, model, match):
    text = BINARY.format(model=model, extra="", pressure="10 bar").replace(f'liquid = "{model}"\n', f'liquid = "{model}"\n{extra}')
    with pytest.raises(CaseError, match=match):
        case_from_text(text)


def test_depropanizer_solves_with_components_above_their_critical_temperature():
    """Issue 12's acceptance case: ethane (Tc 305 K) and propane (Tc 370 K) are present on the
    stages near the 385 K reboiler; the equation of state needs no vapor pressure there."""
    result = simulate(load_case(CASES / "depropanizer.toml"))
    assert result.converged, result.message
    assert result.iterations <= 10
    assert max(v for k, v in result.post_check.items() if k != "enthalpy_recomputed_max") < 1e-8
    assert result.temperature[-1] > 305.3  # above ethane's critical temperature
    names = list(result.components)
    feed_propane = 0.38 * 100 / 3.6
    assert result.distillate_flow * result.x[0, names.index("propane")] == pytest.approx(0.99 * feed_propane, rel=1e-6)


def test_c3_splitter_converges_from_the_default_start_in_ten_iterations():
    result = simulate(load_case(CASES / "c3_splitter.toml"))
    assert result.converged, result.message
    assert result.strategy["rung"] == "newton"  # the first rung: Newton from the default start
    assert result.iterations <= 10
    assert result.reflux_ratio > 8.0  # relative volatility about 1.1


def test_a_stage_with_one_phase_is_reported_with_its_numbers():
    """The trivial solution (liquid = vapor, K = 1) is never a converged stage."""
    thermo = ThermoPackage.from_case(binary())
    T = np.array([330.0, 420.0])
    P = np.array([10e5, 10e5])
    x = np.array([[0.4, 0.6], [0.4, 0.6]])
    assert thermo.range_problem(T[:1], P[:1], x[:1], np.array([[0.6, 0.4]])) is None
    message = thermo.range_problem(T, P, x, x)
    assert message is not None and "stage 2 has one phase" in message and "Z_liquid" in message


def test_column_above_the_mixture_critical_pressure_is_refused_with_a_reason():
    """Propane/n-butane at 60 bar: above the critical pressure of every mixture of the pair
    (the cricondenbar of the binary is about 42 bar, e.g. Kay 1940 as plotted in the GPSA
    Engineering Data Book; from memory). No column there: not converged, and the message says why."""
    result = simulate(binary(pressure="60 bar"))
    assert not result.converged
    assert "one phase, not two" in result.message and "60 bar" in result.message
    # the stage's mixture critical point with its numbers: a propane/n-butane critical pressure
    # lies between the pure ones (42.5 and 38.0 bar, CoolProp) and the binary's maximum (~43 bar)
    found = re.search(r"at 60 bar is above the critical pressure of its mixture, ([0-9.]+) bar "
                      r"\(critical temperature ([0-9.]+) K", result.message)
    assert found, result.message
    assert 37.5 < float(found.group(1)) < 44.0 and 369.0 < float(found.group(2)) < 425.5


def test_feed_above_its_critical_pressure_is_refused_before_solving():
    """The deethanizer at 60 bar: its feed cannot split into liquid and vapor there (above the
    critical pressure of its mixture, about 50 bar by the equation of state): a ThermoError
    (exit 2) that says so with the numbers, not a division by zero."""
    text = (CASES / "deethanizer.toml").read_text().replace('pressure.top = "25 bar"', 'pressure.top = "60 bar"')
    with pytest.raises(ThermoError, match=r"feed at 60.* bar is above the critical pressure of its mixture, [0-9.]+ bar"):
        simulate(loads_case(text, source_file="deethanizer.toml"))


USER_COMPONENT = """
title = "a user component with Peng-Robinson"
[components]
names = ["propane", "solventX"]
[components.data.solventX]
molar_mass = "100 g/mol"
critical_temperature = "560 K"
critical_pressure = "3.5 MPa"
vapor_pressure = { form = "antoine", A = 7.1, B = 1500.0, C = 220.0, base = 10, pressure_unit = "mmHg", temperature_unit = "degC", T_min = "20 degC", T_max = "150 degC" }
ideal_gas_cp = { form = "polynomial", coefficients = [30.0, 0.1], units = "J/mol/K, K" }
heat_of_vaporization = { form = "watson", value = "35 kJ/mol", at = "350 K" }
{acentric}
source = "invented for tests"
[thermo]
liquid = "peng-robinson"
[column]
stages = 6
condenser = "total"
reboiler = "partial"
pressure.top = "5 bar"
[[feeds]]
stage = 3
flow = "10 mol/s"
composition = { propane = 0.5, solventX = 0.5 }
vapor_fraction = 0.0
[specs]
reflux_ratio = 1.0
distillate_rate = "5 mol/s"
"""


def test_user_component_gives_its_acentric_factor_to_the_equation_of_state():
    thermo = ThermoPackage.from_case(case_from_text(USER_COMPONENT.replace("{acentric}", "acentric_factor = 0.35")))
    described = {c["name"]: c for c in thermo.describe()["equation_of_state"]["components"]}
    assert described["solventx"]["acentric_factor"] == 0.35
    assert described["solventx"]["critical_temperature_K"] == 560.0
    with pytest.raises(CaseError, match="acentric_factor"):
        ThermoPackage.from_case(case_from_text(USER_COMPONENT.replace("{acentric}", "")))
