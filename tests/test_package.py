"""Tests of solver.thermo.package: K-values, phase enthalpies and their analytic derivatives.

Derivatives are checked against central finite differences at random states with random but
realistic binary parameters (invented here, not taken from any data set). Pure-component
enthalpies are checked against CoolProp's reference equations of state through
``AbstractState`` (the same source the package fits, evaluated independently here).
"""

from __future__ import annotations

import json

import CoolProp.CoolProp as CP
import numpy as np
import pytest

from conftest import USER_SOLVENT_A, case_from_text, methanol_water_case
from solver.components import component_info
from solver.thermo.activity import NRTL, UNIQUAC, IdealSolution, Wilson
from solver.thermo.package import KValues, PhaseEnthalpy, StageProperties, ThermoPackage
from solver.thermo.pure import PureComponents

NAMES = ("methanol", "ethanol", "water")
COOLPROP_NAMES = {"methanol": "Methanol", "ethanol": "Ethanol", "water": "Water", "benzene": "Benzene", "toluene": "Toluene"}
STATES = 12
ATMOSPHERE = 101325.0  # Pa


@pytest.fixture(scope="module")
def pure() -> PureComponents:
    return PureComponents([component_info(name) for name in NAMES])


def _off_diagonal(rng: np.random.Generator, c: int, low: float, high: float) -> np.ndarray:
    matrix = rng.uniform(low, high, (c, c))
    np.fill_diagonal(matrix, 0.0)
    return matrix


def _activity(kind: str, c: int, seed: int):
    """An activity model with random parameters of realistic size for alcohol/water-like systems
    (invented numbers: tau of NRTL around -1..4, Lambda of Wilson around 0.05..3, tau of UNIQUAC
    around 0.2..3 near 350 K), with small ln T and T terms so that every term of the temperature
    dependence is exercised."""
    rng = np.random.default_rng(seed)
    e = _off_diagonal(rng, c, -0.05, 0.05)
    f = _off_diagonal(rng, c, -2e-4, 2e-4)
    if kind == "ideal":
        return IdealSolution(c)
    if kind == "nrtl":
        alpha = np.triu(rng.uniform(0.2, 0.47, (c, c)), 1)
        alpha_slope = np.triu(rng.uniform(-1e-3, 1e-3, (c, c)), 1)
        return NRTL(
            _off_diagonal(rng, c, -0.5, 0.5),
            _off_diagonal(rng, c, -300.0, 1200.0),
            e,
            f,
            alpha=alpha + alpha.T,
            alpha_slope=alpha_slope + alpha_slope.T,
            alpha_reference_temperature=320.0,  # K, invented
        )
    if kind == "wilson":
        return Wilson(_off_diagonal(rng, c, -0.8, 0.8), _off_diagonal(rng, c, -700.0, 150.0), e, f)
    if kind == "uniquac":
        return UNIQUAC(
            _off_diagonal(rng, c, -0.3, 0.3),
            _off_diagonal(rng, c, -400.0, 150.0),
            e,
            f,
            r=rng.uniform(0.9, 3.5, c),
            q=rng.uniform(1.0, 3.2, c),
        )
    raise ValueError(kind)


def _states(seed: int, c: int = len(NAMES), n: int = STATES):
    rng = np.random.default_rng(1000 + seed)
    temperature = rng.uniform(300.0, 420.0, n)
    pressure = rng.uniform(0.5e5, 3.0e5, n)
    x = rng.dirichlet(np.ones(c), n)
    y = rng.dirichlet(np.ones(c), n)
    return temperature, pressure, x, y


MODELS = ["ideal", "nrtl", "wilson", "uniquac"]
SEEDS = [0, 1, 2]


# ------------------------------------------------------------------ K-values


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("kind", MODELS)
def test_d_ln_k_dT_matches_central_difference(pure, kind, seed):
    package = ThermoPackage(pure, _activity(kind, len(NAMES), seed))
    T, P, x, _ = _states(seed)
    step = 1e-3
    analytic = package.k_values(T, P, x).d_ln_K_dT
    numeric = (
        np.log(package.k_values(T + step, P, x, derivatives=False).K)
        - np.log(package.k_values(T - step, P, x, derivatives=False).K)
    ) / (2 * step)
    np.testing.assert_allclose(analytic, numeric, rtol=1e-6, atol=1e-9)


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("kind", MODELS)
def test_d_ln_k_dx_matches_central_difference(pure, kind, seed):
    package = ThermoPackage(pure, _activity(kind, len(NAMES), seed))
    T, P, x, _ = _states(seed)
    step = 1e-6
    analytic = package.k_values(T, P, x).d_ln_K_dx
    assert analytic.shape == (STATES, 3, 3)
    for k in range(3):
        up, down = x.copy(), x.copy()
        up[:, k] += step
        down[:, k] -= step  # the other mole fractions held fixed, as documented
        numeric = (
            np.log(package.k_values(T, P, up, derivatives=False).K)
            - np.log(package.k_values(T, P, down, derivatives=False).K)
        ) / (2 * step)
        np.testing.assert_allclose(analytic[:, :, k], numeric, rtol=1e-6, atol=1e-8)


@pytest.mark.parametrize("kind", MODELS)
def test_stage_properties_k_value_derivatives_match_central_differences(pure, kind):
    package = ThermoPackage(pure, _activity(kind, len(NAMES), 7))
    T, P, x, y = _states(7)
    props = package.stage_properties(T, P, x, y)
    step_T, step_x = 1e-3, 1e-6
    numeric_T = (
        np.log(package.stage_properties(T + step_T, P, x, y).k_values.K)
        - np.log(package.stage_properties(T - step_T, P, x, y).k_values.K)
    ) / (2 * step_T)
    np.testing.assert_allclose(props.k_values.d_ln_K_dT, numeric_T, rtol=1e-6, atol=1e-9)
    for k in range(3):
        up, down = x.copy(), x.copy()
        up[:, k] += step_x
        down[:, k] -= step_x
        numeric_x = (
            np.log(package.stage_properties(T, P, up, y).k_values.K)
            - np.log(package.stage_properties(T, P, down, y).k_values.K)
        ) / (2 * step_x)
        np.testing.assert_allclose(props.k_values.d_ln_K_dx[:, :, k], numeric_x, rtol=1e-6, atol=1e-8)


def test_k_values_are_modified_raoult(pure):
    """K_i = gamma_i Psat_i / P, with the package's own pure and activity objects."""
    activity = _activity("nrtl", 3, 3)
    package = ThermoPackage(pure, activity)
    T, P, x, _ = _states(3)
    expected = np.exp(activity.ln_gamma(T, x)) * pure.vapor_pressure(T)[0] / P[:, None]
    np.testing.assert_allclose(package.k_values(T, P, x).K, expected, rtol=1e-13)


def test_ideal_solution_k_values_depend_on_temperature_and_pressure_only(pure):
    package = ThermoPackage(pure, IdealSolution(3))
    T, P, x, _ = _states(4)
    k = package.k_values(T, P, x)
    np.testing.assert_allclose(k.K, pure.vapor_pressure(T)[0] / P[:, None], rtol=1e-13)
    assert np.all(k.d_ln_K_dx == 0.0)
    np.testing.assert_allclose(k.d_ln_K_dT, pure.ln_vapor_pressure(T)[1], rtol=1e-14)


def test_k_values_without_derivatives_give_the_same_k_and_no_derivatives(pure):
    package = ThermoPackage(pure, _activity("wilson", 3, 5))
    T, P, x, _ = _states(5)
    full = package.k_values(T, P, x, derivatives=True)
    bare = package.k_values(T, P, x, derivatives=False)
    np.testing.assert_allclose(bare.K, full.K, rtol=1e-14)
    # no partial derivative (only the vapor-pressure part would be wrong) is handed out
    assert bare.d_ln_K_dT is None
    assert bare.d_ln_K_dx is None


def test_k_values_scale_inversely_with_pressure(pure):
    package = ThermoPackage(pure, _activity("nrtl", 3, 6))
    T, P, x, _ = _states(6)
    np.testing.assert_allclose(
        package.k_values(T, 2.0 * P, x, derivatives=False).K,
        0.5 * package.k_values(T, P, x, derivatives=False).K,
        rtol=1e-13,
    )


# ------------------------------------------------------------------ enthalpy derivatives


@pytest.mark.parametrize("seed", SEEDS)
@pytest.mark.parametrize("kind", MODELS)
def test_liquid_enthalpy_derivatives_match_central_differences(pure, kind, seed):
    package = ThermoPackage(pure, _activity(kind, 3, seed))
    T, _, x, _ = _states(seed)
    h = package.liquid_enthalpy(T, x)
    step_T, step_x = 1e-3, 1e-6
    numeric_T = (package.liquid_enthalpy(T + step_T, x).molar - package.liquid_enthalpy(T - step_T, x).molar) / (
        2 * step_T
    )
    np.testing.assert_allclose(h.d_dT, numeric_T, rtol=1e-6, atol=1e-6)
    for k in range(3):
        up, down = x.copy(), x.copy()
        up[:, k] += step_x
        down[:, k] -= step_x
        numeric_x = (package.liquid_enthalpy(T, up).molar - package.liquid_enthalpy(T, down).molar) / (2 * step_x)
        # J/mol; the pure-component parts are ~ -40 kJ/mol
        np.testing.assert_allclose(h.d_dx[:, k], numeric_x, rtol=1e-7, atol=1e-4)


@pytest.mark.parametrize("seed", SEEDS)
def test_vapor_enthalpy_derivatives_match_central_differences(pure, seed):
    package = ThermoPackage(pure, _activity("nrtl", 3, seed))
    T, _, _, y = _states(seed)
    h = package.vapor_enthalpy(T, y)
    step_T, step_y = 1e-3, 1e-6
    numeric_T = (package.vapor_enthalpy(T + step_T, y).molar - package.vapor_enthalpy(T - step_T, y).molar) / (
        2 * step_T
    )
    np.testing.assert_allclose(h.d_dT, numeric_T, rtol=1e-7, atol=1e-7)
    for k in range(3):
        up, down = y.copy(), y.copy()
        up[:, k] += step_y
        down[:, k] -= step_y
        numeric_y = (package.vapor_enthalpy(T, up).molar - package.vapor_enthalpy(T, down).molar) / (2 * step_y)
        np.testing.assert_allclose(h.d_dx[:, k], numeric_y, rtol=1e-7, atol=1e-4)


@pytest.mark.parametrize("kind", MODELS)
def test_excess_enthalpy_is_gibbs_helmholtz(pure, kind):
    """h_L - sum x (h_ig - dHvap) = h^E = -R T^2 sum_i x_i d ln gamma_i / dT, with the
    temperature derivative of ln gamma taken by central differences here."""
    activity = _activity(kind, 3, 11)
    package = ThermoPackage(pure, activity)
    T, _, x, _ = _states(11)
    h = package.liquid_enthalpy(T, x)
    step = 1e-3
    d_ln_gamma_dT = (activity.ln_gamma(T + step, x) - activity.ln_gamma(T - step, x)) / (2 * step)
    expected = -8.31446261815324 * T**2 * np.einsum("nc,nc->n", x, d_ln_gamma_dT)
    np.testing.assert_allclose(h.excess, expected, rtol=1e-6, atol=1e-6)
    np.testing.assert_allclose(h.molar, np.einsum("nc,nc->n", x, h.pure) + h.excess, rtol=1e-13, atol=1e-9)
    if kind == "ideal":
        assert np.all(h.excess == 0.0)
    else:
        assert np.max(np.abs(h.excess)) > 1.0  # the random parameters do give a heat of mixing


# ------------------------------------------------------------------ enthalpy model


def test_vapor_enthalpy_is_the_mole_fraction_sum_of_ideal_gas_enthalpies(pure):
    package = ThermoPackage(pure, _activity("nrtl", 3, 0))
    T, _, _, y = _states(0)
    h_ig, cp = pure.ideal_gas_enthalpy(T)
    h = package.vapor_enthalpy(T, y)
    np.testing.assert_allclose(h.molar, (y * h_ig).sum(axis=1), rtol=1e-15, atol=1e-10)
    np.testing.assert_allclose(h.d_dT, (y * cp).sum(axis=1), rtol=1e-15, atol=1e-13)
    np.testing.assert_array_equal(h.pure, h_ig)
    np.testing.assert_array_equal(h.d_dx, h_ig)
    assert np.all(h.excess == 0.0)


def test_ideal_gas_enthalpy_reference_is_zero_at_298_15_K(pure):
    package = ThermoPackage(pure, IdealSolution(3))
    T = np.full(3, 298.15)
    h = package.vapor_enthalpy(T, np.eye(3))
    np.testing.assert_allclose(h.molar, 0.0, atol=1e-9)
    np.testing.assert_allclose(pure.ideal_gas_enthalpy(T)[0], 0.0, atol=1e-9)
    # and the reference is not trivially zero everywhere
    assert np.all(np.abs(package.vapor_enthalpy(np.full(3, 350.0), np.eye(3)).molar) > 1000.0)


@pytest.mark.parametrize("name", ["methanol", "ethanol", "water", "benzene", "toluene"])
def test_ideal_gas_enthalpy_against_coolprop(name):
    """h_ig(T) - h_ig(298.15 K) against CoolProp's equation of state at vanishing density
    (residual enthalpy ~ density, negligible at 1e-6 mol/m3)."""
    package = ThermoPackage(PureComponents([component_info(name)]), IdealSolution(1))
    state = CP.AbstractState("HEOS", COOLPROP_NAMES[name])

    def coolprop_enthalpy(T: float) -> float:
        state.update(CP.DmolarT_INPUTS, 1e-6, T)
        return state.hmolar()

    temperatures = np.array([280.0, 320.0, 355.5, 400.0, 470.0])
    h = package.vapor_enthalpy(temperatures, np.ones((5, 1))).molar
    expected = np.array([coolprop_enthalpy(T) - coolprop_enthalpy(298.15) for T in temperatures])
    np.testing.assert_allclose(h, expected, rtol=1e-6, atol=1e-3)


@pytest.mark.parametrize("name", ["methanol", "ethanol", "water", "benzene", "toluene"])
def test_pure_liquid_enthalpy_is_ideal_gas_minus_latent_heat_from_coolprop(name):
    """For a pure component h_V - h_L is CoolProp's h_satV - h_satL (1e-6 relative), and h_L is
    exactly h_ig - dHvap of the pure-component fits (no excess enthalpy at x_i = 1)."""
    state = CP.AbstractState("HEOS", COOLPROP_NAMES[name])
    # a second component with a nonideal NRTL pair: at x = (1, 0) there is no heat of mixing
    other = "water" if name != "water" else "ethanol"
    pure = PureComponents([component_info(name), component_info(other)])
    activity = NRTL(np.zeros((2, 2)), np.array([[0.0, 300.0], [600.0, 0.0]]), alpha=0.3)
    package = ThermoPackage(pure, activity)
    temperatures = np.linspace(300.0, 0.85 * state.T_critical(), 7)
    x = np.tile([1.0, 0.0], (7, 1))
    h_L = package.liquid_enthalpy(temperatures, x)
    h_V = package.vapor_enthalpy(temperatures, x)
    h_ig = pure.ideal_gas_enthalpy(temperatures)[0][:, 0]
    dh_vap = pure.heat_of_vaporization(temperatures)[0][:, 0]
    np.testing.assert_allclose(h_L.molar, h_ig - dh_vap, rtol=1e-13, atol=1e-8)
    expected = []
    for T in temperatures:
        state.update(CP.QT_INPUTS, 0.0, float(T))
        expected.append(state.saturated_vapor_keyed_output(CP.iHmolar) - state.saturated_liquid_keyed_output(CP.iHmolar))
    np.testing.assert_allclose(h_V.molar - h_L.molar, expected, rtol=1e-6)


# ------------------------------------------------------------------ the cmo model


def _cmo_package(pure, latent_heat=None) -> ThermoPackage:
    return ThermoPackage(pure, _activity("nrtl", 3, 2), enthalpy="cmo", cmo_latent_heat=latent_heat)


def test_cmo_latent_heat_defaults_to_mean_latent_heat_at_normal_boiling_points(pure):
    latent = []
    for name in NAMES:
        state = CP.AbstractState("HEOS", COOLPROP_NAMES[name])
        state.update(CP.PQ_INPUTS, 101325.0, 0.0)
        latent.append(state.saturated_vapor_keyed_output(CP.iHmolar) - state.saturated_liquid_keyed_output(CP.iHmolar))
    package = _cmo_package(pure)
    assert package.cmo_latent_heat == pytest.approx(np.mean(latent), rel=1e-6)
    assert _cmo_package(pure, 31_000.0).cmo_latent_heat == 31_000.0


@pytest.mark.parametrize("latent_heat", [None, 31_000.0])
def test_cmo_enthalpies_are_lambda_and_zero_for_any_composition_and_temperature(pure, latent_heat):
    package = _cmo_package(pure, latent_heat)
    lam = package.cmo_latent_heat
    T, P, x, y = _states(8)
    vapor = package.vapor_enthalpy(T, y)
    liquid = package.liquid_enthalpy(T, x)
    np.testing.assert_allclose(vapor.molar, lam, rtol=1e-14)
    assert np.all(liquid.molar == 0.0)
    assert np.all(vapor.d_dT == 0.0) and np.all(liquid.d_dT == 0.0)
    assert np.all(liquid.d_dx == 0.0)
    # d h_V / d y_k = lambda for every k: zero along any change of composition that keeps sum(y) = 1
    np.testing.assert_allclose(vapor.d_dx, lam, rtol=1e-15)
    direction = np.array([1.0, -0.4, -0.6])
    assert np.allclose(vapor.d_dx @ direction, 0.0, atol=1e-9 * lam)
    assert np.all(vapor.excess == 0.0) and np.all(liquid.excess == 0.0)
    # with the derivatives checked by difference as well
    step = 1e-3
    assert np.allclose(package.vapor_enthalpy(T + step, y).molar, vapor.molar, rtol=0, atol=0)
    props = package.stage_properties(T, P, x, y)
    np.testing.assert_allclose(props.vapor.molar, lam, rtol=1e-14)
    assert np.all(props.liquid.molar == 0.0)
    assert np.all(props.vapor.d_dT == 0.0) and np.all(props.liquid.d_dT == 0.0) and np.all(props.liquid.d_dx == 0.0)


def test_model_override_and_rigorous_enthalpies_of_a_cmo_package(pure):
    cmo = _cmo_package(pure)
    rigorous = ThermoPackage(pure, _activity("nrtl", 3, 2))
    T, _, x, y = _states(9)
    h_L, h_V = cmo.rigorous_enthalpies(T, x, y)
    np.testing.assert_allclose(h_L, rigorous.liquid_enthalpy(T, x).molar, rtol=1e-14)
    np.testing.assert_allclose(h_V, rigorous.vapor_enthalpy(T, y).molar, rtol=1e-14)
    np.testing.assert_allclose(cmo.liquid_enthalpy(T, x, model="rigorous").molar, h_L, rtol=1e-14)
    np.testing.assert_allclose(rigorous.vapor_enthalpy(T, y, model="cmo").molar, rigorous.cmo_latent_heat, rtol=1e-14)
    assert np.all(rigorous.liquid_enthalpy(T, x, model="cmo").molar == 0.0)


def test_unknown_enthalpy_model_is_refused(pure):
    with pytest.raises(ValueError, match="enthalpy"):
        ThermoPackage(pure, IdealSolution(3), enthalpy="adiabatic")


# ------------------------------------------------------------------ stage_properties


def _assert_phase_equal(a: PhaseEnthalpy, b: PhaseEnthalpy) -> None:
    for field in ("molar", "d_dT", "d_dx", "pure", "excess"):
        np.testing.assert_allclose(getattr(a, field), getattr(b, field), rtol=1e-13, atol=1e-9, err_msg=field)


@pytest.mark.parametrize("enthalpy", ["rigorous", "cmo"])
@pytest.mark.parametrize("kind", MODELS)
def test_stage_properties_agree_with_the_separate_calls(pure, kind, enthalpy):
    package = ThermoPackage(pure, _activity(kind, 3, 4), enthalpy=enthalpy)
    T, P, x, y = _states(4)
    props = package.stage_properties(T, P, x, y)
    assert isinstance(props, StageProperties) and isinstance(props.k_values, KValues)
    k = package.k_values(T, P, x)
    np.testing.assert_allclose(props.k_values.K, k.K, rtol=1e-14)
    np.testing.assert_allclose(props.k_values.d_ln_K_dT, k.d_ln_K_dT, rtol=1e-14, atol=1e-16)
    np.testing.assert_allclose(props.k_values.d_ln_K_dx, k.d_ln_K_dx, rtol=1e-14, atol=1e-16)
    _assert_phase_equal(props.liquid, package.liquid_enthalpy(T, x))
    _assert_phase_equal(props.vapor, package.vapor_enthalpy(T, y))
    assert props.liquid.molar.shape == (STATES,) and props.vapor.d_dx.shape == (STATES, 3)


# ------------------------------------------------------------------ built from a case


def test_from_case_builds_nrtl_with_the_case_parameters():
    package = ThermoPackage.from_case(methanol_water_case())
    assert package.names == ("methanol", "water")
    assert package.enthalpy_model == "rigorous"
    described = package.activity.describe()
    assert described["model"] == "nrtl"
    # dg = -253.88 and 845.21 cal/mol (conftest, Smith, Van Ness & Abbott Table 12.5): the term
    # over temperature is dg / R
    calorie = 4.184
    np.testing.assert_allclose(
        described["term_over_temperature"],
        [[0.0, -253.88 * calorie / 8.31446261815324], [845.21 * calorie / 8.31446261815324, 0.0]],
    )
    np.testing.assert_allclose(described["alpha"], [[0.0, 0.2994], [0.2994, 0.0]])
    assert ThermoPackage.from_case(methanol_water_case(enthalpy="cmo")).enthalpy_model == "cmo"


CASE_TAIL = """
[column]
stages = 5
condenser = "total"
reboiler = "partial"
pressure.top = "101.325 kPa"
[[feeds]]
stage = 3
flow = "100 kmol/h"
composition = {composition}
vapor_fraction = 0.0
[specs]
reflux_ratio = 2.0
distillate_rate = "40 kmol/h"
"""


def test_pair_order_in_the_case_does_not_matter():
    """[thermo.nrtl.water.methanol] with the values swapped is the same model as
    [thermo.nrtl.methanol.water] (invented parameters)."""
    tail = CASE_TAIL.format(composition="{ methanol = 0.5, water = 0.5 }")
    forward = case_from_text(
        '[components]\nnames = ["methanol", "water"]\n[thermo]\nliquid = "nrtl"\n'
        '[thermo.nrtl.methanol.water]\nterm_over_temperature = [-100.0, 450.0]\nalpha = 0.3\nsource = "invented"\n' + tail
    )
    backward = case_from_text(
        '[components]\nnames = ["methanol", "water"]\n[thermo]\nliquid = "nrtl"\n'
        '[thermo.nrtl.water.methanol]\nterm_over_temperature = [450.0, -100.0]\nalpha = 0.3\nsource = "invented"\n' + tail
    )
    T, P, x, _ = _states(1, c=2)
    k_forward = ThermoPackage.from_case(forward).k_values(T, P, x).K
    k_backward = ThermoPackage.from_case(backward).k_values(T, P, x).K
    np.testing.assert_allclose(k_forward, k_backward, rtol=1e-14)
    # and the parameters do make the liquid nonideal
    ideal = ThermoPackage(PureComponents([component_info("methanol"), component_info("water")]), IdealSolution(2))
    assert np.max(np.abs(k_forward / ideal.k_values(T, P, x).K - 1.0)) > 0.05


def test_a_pair_taken_as_ideal_is_ideal():
    """In a ternary NRTL case that gives only the methanol-water pair and takes the missing
    pairs as ideal (missing_pairs = "ideal"), a methanol-ethanol liquid (no water) is an ideal
    solution."""
    case = case_from_text(
        '[components]\nnames = ["methanol", "ethanol", "water"]\n[thermo]\nliquid = "nrtl"\nmissing_pairs = "ideal"\n'
        '[thermo.nrtl.methanol.water]\ndg = ["-253.88 cal/mol", "845.21 cal/mol"]\nalpha = 0.2994\n'
        'source = "Smith, Van Ness & Abbott, 7th ed., Table 12.5"\n'
        + CASE_TAIL.format(composition="{ methanol = 0.3, ethanol = 0.3, water = 0.4 }")
    )
    package = ThermoPackage.from_case(case)
    x = np.array([[0.4, 0.6, 0.0], [0.8, 0.2, 0.0]])
    ln_gamma = package.ln_gamma(np.array([340.0, 350.0]), x)
    np.testing.assert_allclose(ln_gamma[:, :2], 0.0, atol=1e-14)
    assert np.all(np.abs(package.ln_gamma(np.array([340.0]), np.array([[0.4, 0.0, 0.6]]))) > 0.01)


def test_describe_is_json_and_names_the_sources():
    package = ThermoPackage.from_case(methanol_water_case())
    text = json.dumps(package.describe(), allow_nan=False)
    described = json.loads(text)
    assert described["liquid"] == "nrtl" and described["enthalpy"] == "rigorous"
    assert described["pairs"][0]["source"] == "Smith, Van Ness & Abbott, 7th ed., Table 12.5"
    assert described["pairs"][0]["as_written"]["dg"] == ["-253.88 cal/mol", "845.21 cal/mol"]
    assert [c["name"] for c in described["components"]] == ["methanol", "water"]
    assert all("CoolProp" in c["source"] for c in described["components"])
    assert "Renon" in described["activity_parameters"]["source"]
    assert "cmo_latent_heat_J_per_mol" not in described

    cmo = ThermoPackage.from_case(methanol_water_case(enthalpy="cmo")).describe()
    assert json.loads(json.dumps(cmo, allow_nan=False))["cmo_latent_heat_J_per_mol"] > 30_000.0


@pytest.mark.parametrize("kind", ["wilson", "uniquac"])
def test_describe_of_a_directly_built_package_is_json(pure, kind):
    described = json.loads(json.dumps(ThermoPackage(pure, _activity(kind, 3, 0)).describe(), allow_nan=False))
    assert described["activity_parameters"]["model"] == kind
    assert "source" in described["activity_parameters"]
    assert len(described["components"]) == 3


# ------------------------------------------------------------------ saturation temperatures, reference latent heat


def test_saturation_temperatures_match_coolprop(pure):
    package = ThermoPackage(pure, IdealSolution(3))
    pressure = np.array([0.2e5, ATMOSPHERE, 5.0e5, 40.0e5])
    T = package.saturation_temperatures(pressure)
    assert T.shape == (4, 3)
    for k, name in enumerate(NAMES):
        state = CP.AbstractState("HEOS", COOLPROP_NAMES[name])
        for row, p in enumerate(pressure):
            state.update(CP.PQ_INPUTS, float(p), 0.0)
            assert T[row, k] == pytest.approx(state.T(), abs=1e-4)
    # above the critical pressure there is no saturation temperature: Tc
    above = package.saturation_temperatures(np.array([3.0 * pure.critical_pressure.max()]))
    np.testing.assert_allclose(above[0], pure.critical_temperature)


USER_LIGHT = USER_SOLVENT_A


def _user_case(t_max: str, enthalpy: str = "cmo"):
    """An invented component (Antoine constants of our own, boiling at 362.95 K) with toluene."""
    return case_from_text(
        '[components]\nnames = ["solvent_a", "toluene"]\n'
        + USER_LIGHT.format(t_max=t_max)
        + f'[thermo]\nliquid = "ideal"\nenthalpy = "{enthalpy}"\n'
        + CASE_TAIL.format(composition="{ solvent_a = 0.5, toluene = 0.5 }")
    )


def test_cmo_package_builds_without_a_heat_of_vaporization_correlation():
    """The constant latent heat then comes from the vapor-pressure slope at the normal boiling
    points (Clausius-Clapeyron), for every component alike."""
    package = ThermoPackage.from_case(_user_case("400 K"))
    boiling = package.pure.normal_boiling_point
    assert np.all(np.isfinite(boiling))
    own = np.arange(2)
    expected = 8.31446261815324 * boiling**2 * package.pure.ln_vapor_pressure(boiling)[1][own, own]
    assert package.cmo_latent_heat == pytest.approx(expected.mean(), rel=1e-12)
    assert package.reference_latent_heat() == pytest.approx(expected.mean(), rel=1e-12)
    assert 25e3 < package.cmo_latent_heat < 40e3
    assert "Clausius-Clapeyron" in package.describe()["cmo_latent_heat_basis"]
    # a CoolProp-only package uses the heats of vaporization themselves
    assert "heat of vaporization" in ThermoPackage.from_case(methanol_water_case(enthalpy="cmo")).describe()["cmo_latent_heat_basis"]


def test_reference_latent_heat_without_a_normal_boiling_point_in_range():
    """The user's vapor-pressure range ends below 1 atm: the boiling point is extrapolated."""
    package = ThermoPackage.from_case(_user_case("330 K"))
    assert np.isnan(package.pure.normal_boiling_point[0])
    saturation = package.saturation_temperatures(np.array([ATMOSPHERE]))[0]
    # the Antoine equation itself would give 362.95 K; beyond 330 K it is continued linearly in 1/T
    assert 355.0 < saturation[0] < 370.0
    np.testing.assert_allclose(package.pure.vapor_pressure(saturation)[0][[0, 1], [0, 1]], ATMOSPHERE, rtol=1e-10)
    assert np.isfinite(package.cmo_latent_heat) and package.cmo_latent_heat > 20e3
