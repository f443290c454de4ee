"""The gamma-phi package (activity model for the liquid, cubic equation of state for the
vapor): derivatives against finite differences, the consistency of phi^sat, the low-pressure
limit, the enthalpy convention, the case reader's combinations and the MESH Jacobian."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from conftest import case_from_text, methanol_water_case
from solver.errors import CaseError
from solver.thermo.cubic import cubic_phase
from solver.thermo.flash import bubble_temperature
from solver.thermo.gamma_phi_package import GammaPhiThermoPackage
from solver.thermo.package import ThermoPackage
from test_mesh import assert_jacobian_matches


def _with_vapor(case, vapor="peng-robinson"):
    return dataclasses.replace(case, thermo=dataclasses.replace(case.thermo, vapor=vapor))


@pytest.fixture(scope="module")
def packages():
    case = methanol_water_case()
    return ThermoPackage.from_case(_with_vapor(case)), ThermoPackage.from_case(case)


STATES = dict(
    T=np.array([340.0, 380.0, 420.0, 450.0]),
    P=np.array([1.2e5, 4e5, 8e5, 1.2e6]),
    x=np.array([[0.3, 0.7], [0.1, 0.9], [0.6, 0.4], [0.2, 0.8]]),
    y=np.array([[0.6, 0.4], [0.4, 0.6], [0.8, 0.2], [0.5, 0.5]]),
)


def test_built_from_the_case(packages):
    gp, ideal = packages
    assert isinstance(gp, GammaPhiThermoPackage) and gp.vapor_dependent
    assert not isinstance(ideal, GammaPhiThermoPackage)
    assert gp.describe()["equation_of_state"]["model"] == "peng-robinson"
    assert "gamma-phi" in gp.describe()["k_value_model"]


@pytest.mark.parametrize("vapor", ["peng-robinson", "soave-redlich-kwong"])
def test_ln_k_derivatives_against_finite_differences(vapor):
    gp = ThermoPackage.from_case(_with_vapor(methanol_water_case(), vapor))
    T, P, x, y = STATES["T"], STATES["P"], STATES["x"], STATES["y"]
    k = gp.k_values(T, P, x, y=y)
    h = 1e-4
    numeric = (np.log(gp.k_values(T + h, P, x, y=y).K) - np.log(gp.k_values(T - h, P, x, y=y).K)) / (2 * h)
    assert np.allclose(k.d_ln_K_dT, numeric, rtol=1e-6, atol=1e-9)
    for j in range(2):
        step = np.zeros_like(x)
        step[:, j] = 1e-6
        dx = (np.log(gp.k_values(T, P, x + step, y=y).K) - np.log(gp.k_values(T, P, x - step, y=y).K)) / 2e-6
        dy = (np.log(gp.k_values(T, P, x, y=y + step).K) - np.log(gp.k_values(T, P, x, y=y - step).K)) / 2e-6
        assert np.allclose(k.d_ln_K_dx[:, :, j], dx, rtol=1e-6, atol=1e-8)
        assert np.allclose(k.d_ln_K_dy[:, :, j], dy, rtol=1e-6, atol=1e-8)
    assert np.abs(k.d_ln_K_dy).max() > 1e-3  # the vapor matters at these pressures


def test_enthalpy_derivatives_and_stage_properties_agree(packages):
    gp, _ = packages
    T, P, x, y = STATES["T"], STATES["P"], STATES["x"], STATES["y"]
    props = gp.stage_properties(T, P, x, y)
    k = gp.k_values(T, P, x, y=y)
    assert np.allclose(props.k_values.K, k.K, rtol=1e-13)
    h = 1e-3
    for phase, evaluate, composition in (
        (props.liquid, lambda t, c: gp.liquid_enthalpy(t, c), x),
        (props.vapor, lambda t, c: gp.vapor_enthalpy(t, c, pressure=P), y),
    ):
        assert np.allclose(phase.molar, evaluate(T, composition).molar, rtol=1e-13)
        numeric = (evaluate(T + h, composition).molar - evaluate(T - h, composition).molar) / (2 * h)
        assert np.allclose(phase.d_dT, numeric, rtol=1e-6)
        for j in range(2):
            step = np.zeros_like(composition)
            step[:, j] = 1e-6
            numeric = (evaluate(T, composition + step).molar - evaluate(T, composition - step).molar) / 2e-6
            assert np.allclose(phase.d_dx[:, j], numeric, rtol=1e-6, atol=1e-3)


def test_departure_pressure_derivative_against_finite_differences(packages):
    gp, _ = packages
    T, P, y = STATES["T"], STATES["P"], STATES["y"]
    phase = cubic_phase(gp.parameters, T, P, y, "vapor")
    up = cubic_phase(gp.parameters, T, P * (1 + 1e-6), y, "vapor").departure_enthalpy
    down = cubic_phase(gp.parameters, T, P * (1 - 1e-6), y, "vapor").departure_enthalpy
    assert np.allclose(phase.d_departure_dP, (up - down) / (2e-6 * P), rtol=1e-6)


def test_pure_component_at_its_vapor_pressure_has_k_one(packages):
    """phi^sat from the same equation as phi^V: K_i = 1 for pure i at Psat_i, to 1e-8."""
    gp, _ = packages
    T = np.array([330.0, 400.0, 470.0])
    psat = np.exp(gp.pure.ln_vapor_pressure(T)[0])
    for i in range(2):
        pure = np.zeros((3, 2))
        pure[:, i] = 1.0
        assert np.allclose(gp.k_values(T, psat[:, i], pure, y=pure).K[:, i], 1.0, rtol=0, atol=1e-8)
        assert np.allclose(gp.k_values(T, psat[:, i], pure).K[:, i], 1.0, rtol=0, atol=1e-8)


def test_latent_heat_of_a_pure_component_is_its_data(packages):
    """The liquid convention: h_V(sat) - h_L = dHvap of the pure-component data."""
    gp, _ = packages
    T = np.array([350.0, 420.0])
    psat = np.exp(gp.pure.ln_vapor_pressure(T)[0])
    latent = gp.pure.heat_of_vaporization(T)[0]
    for i in range(2):
        pure = np.zeros((2, 2))
        pure[:, i] = 1.0
        difference = gp.vapor_enthalpy(T, pure, pressure=psat[:, i]).molar - gp.liquid_enthalpy(T, pure).molar
        assert np.allclose(difference, latent[:, i], rtol=1e-10)


def test_low_pressure_limit_is_the_ideal_vapor(packages):
    """At 1 kPa phi ~ 1 and Poynting ~ 1: K within 0.3 % of modified Raoult's law. At 1 atm the
    K of a component whose vapor pressure is 2-3 atm at the stage temperature moves by up to
    about 3 % (its phi^sat, the second-virial term B Psat/RT), but bubble temperatures within
    0.3 K."""
    gp, ideal = packages
    x1 = np.linspace(0.05, 0.95, 7)
    x = np.column_stack([x1, 1.0 - x1])
    for pressure, k_tolerance, t_tolerance in ((1e3, 3e-3, 0.02), (101325.0, 0.035, 0.3)):
        P = np.full(7, pressure)
        T0, y0 = bubble_temperature(ideal, P, x)
        T1, _ = bubble_temperature(gp, P, x)
        ratio = gp.k_values(T0, P, x, y=y0).K / ideal.k_values(T0, P, x).K
        assert np.abs(ratio - 1.0).max() < k_tolerance
        assert np.abs(T1 - T0).max() < t_tolerance
    assert np.abs(ratio - 1.0).max() > 3e-3  # at 1 atm the vapor is measurably non-ideal


def test_audit_comparison_keeps_the_activity_model():
    from solver.audit.ideal_vapor import ideal_vapor_case

    case = _with_vapor(methanol_water_case())
    plain = ideal_vapor_case(case)
    assert (plain.thermo.liquid, plain.thermo.vapor) == ("nrtl", "ideal")
    assert type(ThermoPackage.from_case(plain)) is ThermoPackage


GAMMA_PHI_CASE = """
[components]
names = ["methanol", "water"]
[thermo]
liquid = "{liquid}"
vapor = "{vapor}"
{extra}
[column]
stages = 6
condenser = "{condenser}"
reboiler = "partial"
pressure.top = "8 bar"
pressure.drop_per_stage = "1 kPa"
[[feeds]]
stage = 3
flow = "10 mol/s"
composition = {{ methanol = 0.4, water = 0.6 }}
vapor_fraction = 0.2
[specs]
reflux_ratio = 2.0
distillate_rate = "4 mol/s"
"""
NRTL = ('[thermo.nrtl.methanol.water]\ndg = ["-253.88 cal/mol", "845.21 cal/mol"]\nalpha = 0.2994\n'
        'source = "Smith, Van Ness & Abbott, 7th ed., Table 12.5"\n')
INTERACTION = '[thermo.interaction.methanol.water]\nk = -0.07\nsource = "invented for this test"\n'


def test_case_reader_takes_an_equation_of_state_for_the_vapor_and_its_k_ij():
    case = case_from_text(GAMMA_PHI_CASE.format(liquid="nrtl", vapor="soave-redlich-kwong", extra=NRTL + INTERACTION,
                                                condenser="total"))
    assert case.thermo.vapor == "soave-redlich-kwong"
    package = ThermoPackage.from_case(case)
    assert package.parameters.variant == "soave-redlich-kwong"
    assert package.parameters.interaction[0, 1] == pytest.approx(-0.07)


@pytest.mark.parametrize("liquid, vapor, extra, key, value", [
    ("nrtl", "van-der-waals", NRTL, "thermo.vapor", "van-der-waals"),
    ("peng-robinson", "soave-redlich-kwong", "", "thermo.vapor", "soave-redlich-kwong"),
    ("nrtl", "ideal", NRTL + INTERACTION, "thermo.interaction", "interaction"),
])
def test_case_reader_refuses_wrong_combinations(liquid, vapor, extra, key, value):
    with pytest.raises(CaseError) as caught:
        case_from_text(GAMMA_PHI_CASE.format(liquid=liquid, vapor=vapor, extra=extra, condenser="total"))
    assert caught.value.key == key and value in str(caught.value)


@pytest.mark.parametrize("condenser", ["total", "partial"])
def test_mesh_jacobian_with_a_gamma_phi_vapor(condenser):
    text = GAMMA_PHI_CASE.format(liquid="nrtl", vapor="peng-robinson", extra=NRTL + INTERACTION, condenser=condenser)
    assert_jacobian_matches(case_from_text(text), seed=3)
