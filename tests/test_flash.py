"""Tests of solver.thermo.flash: bubble and dew points, Rachford-Rice, flashes and the feed's
thermal condition q.

The mixtures are methanol-water with the NRTL set of Smith, Van Ness & Abbott, *Introduction to
Chemical Engineering Thermodynamics*, 7th ed., Table 12.5 (the conftest case), a
methanol-ethanol-water ternary with that pair only (the others taken as ideal, missing_pairs = "ideal"), and benzene-toluene as an ideal solution.
Saturation temperatures of pure components are checked against CoolProp's ``AbstractState``.
"""

from __future__ import annotations

import CoolProp.CoolProp as CP
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp

from conftest import case_from_text, methanol_water_case
from solver.components import component_info
from solver.errors import ThermoError
from solver.thermo import flash
from solver.thermo.activity import IdealSolution
from solver.thermo.package import ThermoPackage
from solver.thermo.pure import PureComponents

ATMOSPHERE = 101325.0


@pytest.fixture(scope="module")
def binary() -> ThermoPackage:
    return ThermoPackage.from_case(methanol_water_case())


@pytest.fixture(scope="module")
def ternary() -> ThermoPackage:
    case = case_from_text(
        """
        [components]
        names = ["methanol", "ethanol", "water"]
        [thermo]
        liquid = "nrtl"
        missing_pairs = "ideal"
        [thermo.nrtl.methanol.water]
        dg = ["-253.88 cal/mol", "845.21 cal/mol"]
        alpha = 0.2994
        source = "Smith, Van Ness & Abbott, 7th ed., Table 12.5"
        [column]
        stages = 5
        condenser = "total"
        reboiler = "partial"
        pressure.top = "101.325 kPa"
        [[feeds]]
        stage = 3
        flow = "100 kmol/h"
        composition = { methanol = 0.3, ethanol = 0.3, water = 0.4 }
        vapor_fraction = 0.0
        [specs]
        reflux_ratio = 2.0
        distillate_rate = "40 kmol/h"
        """
    )
    return ThermoPackage.from_case(case)


@pytest.fixture(scope="module")
def aromatics() -> ThermoPackage:
    pure = PureComponents([component_info("benzene"), component_info("toluene")])
    return ThermoPackage(pure, IdealSolution(2))


def _packages(request, name: str) -> ThermoPackage:
    return request.getfixturevalue(name)


def _compositions(c: int, n: int, seed: int) -> np.ndarray:
    return np.random.default_rng(seed).dirichlet(np.ones(c), n)


# ------------------------------------------------------------------ bubble and dew points


@pytest.mark.parametrize("name", ["binary", "ternary", "aromatics"])
def test_bubble_point_sums_to_one_and_its_vapor_has_the_same_dew_point(request, name):
    thermo = _packages(request, name)
    c = thermo.component_count
    x = _compositions(c, 8, seed=c)
    pressure = np.array([0.3e5, 0.7e5, ATMOSPHERE, 1.5e5, 2.0e5, 3.0e5, 5.0e5, ATMOSPHERE])
    T, y = flash.bubble_temperature(thermo, pressure, x)
    K = thermo.k_values(T, pressure, x, derivatives=False).K
    np.testing.assert_allclose((K * x).sum(axis=1), 1.0, rtol=0, atol=1e-10)
    np.testing.assert_allclose(y, K * x, rtol=1e-9, atol=1e-12)
    T_dew, x_dew = flash.dew_temperature(thermo, pressure, y)
    np.testing.assert_allclose(T_dew, T, rtol=0, atol=1e-8)
    np.testing.assert_allclose(x_dew, x, rtol=0, atol=1e-8)


@pytest.mark.parametrize("name", ["binary", "ternary", "aromatics"])
def test_dew_point_sums_to_one_and_its_liquid_has_the_same_bubble_point(request, name):
    thermo = _packages(request, name)
    c = thermo.component_count
    y = _compositions(c, 8, seed=10 + c)
    pressure = np.linspace(0.4e5, 4.0e5, 8)
    T, x = flash.dew_temperature(thermo, pressure, y)
    K = thermo.k_values(T, pressure, x, derivatives=False).K
    np.testing.assert_allclose((y / K).sum(axis=1), 1.0, rtol=0, atol=1e-10)
    np.testing.assert_allclose(x, (y / K) / (y / K).sum(axis=1, keepdims=True), rtol=0, atol=1e-10)
    T_bubble, y_bubble = flash.bubble_temperature(thermo, pressure, x)
    np.testing.assert_allclose(T_bubble, T, rtol=0, atol=1e-8)
    np.testing.assert_allclose(y_bubble, y, rtol=0, atol=1e-8)


def test_dew_point_lies_above_bubble_point(binary):
    z = _compositions(2, 10, seed=3)
    pressure = np.full(10, ATMOSPHERE)
    bubble, _ = flash.bubble_temperature(binary, pressure, z)
    dew, _ = flash.dew_temperature(binary, pressure, z)
    assert np.all(dew - bubble > 0.1)


def test_bubble_point_of_methanol_water_rises_with_water_content(binary):
    x_methanol = np.linspace(0.02, 0.98, 13)
    x = np.column_stack([x_methanol, 1 - x_methanol])
    T, y = flash.bubble_temperature(binary, np.full(13, ATMOSPHERE), x)
    assert np.all(np.diff(T) < 0.0)
    assert np.all(y[:, 0] > x[:, 0])  # methanol is the lighter component everywhere (no azeotrope)


@pytest.mark.parametrize("fluid", ["Benzene", "Toluene", "Methanol", "Water"])
def test_pure_component_bubble_and_dew_points_are_its_saturation_temperature(fluid):
    thermo = ThermoPackage(PureComponents([component_info(fluid.lower())]), IdealSolution(1))
    pressure = np.array([0.2e5, 0.5e5, ATMOSPHERE, 2.0e5, 6.0e5])
    ones = np.ones((5, 1))
    bubble, y = flash.bubble_temperature(thermo, pressure, ones)
    dew, x = flash.dew_temperature(thermo, pressure, ones)
    np.testing.assert_allclose(bubble, dew, rtol=0, atol=1e-8)
    np.testing.assert_allclose(x, 1.0)
    np.testing.assert_allclose(y, 1.0)
    # the package's own vapor pressure equals P there ...
    np.testing.assert_allclose(thermo.pure.vapor_pressure(bubble)[0][:, 0], pressure, rtol=1e-10)
    # ... and CoolProp's saturation temperature agrees within the fit tolerance (3e-7 in ln Psat)
    state = CP.AbstractState("HEOS", fluid)
    saturation = []
    for p in pressure:
        state.update(CP.PQ_INPUTS, float(p), 0.0)
        saturation.append(state.T())
    np.testing.assert_allclose(bubble, saturation, rtol=0, atol=1e-4)


def test_pure_component_in_a_mixture_package_boils_at_its_saturation_temperature(aromatics):
    pressure = np.array([ATMOSPHERE, 2.0e5])
    for k in range(2):
        z = np.zeros((2, 2))
        z[:, k] = 1.0
        bubble, _ = flash.bubble_temperature(aromatics, pressure, z)
        dew, _ = flash.dew_temperature(aromatics, pressure, z)
        np.testing.assert_allclose(bubble, dew, rtol=0, atol=1e-8)
        np.testing.assert_allclose(aromatics.pure.vapor_pressure(bubble)[0][:, k], pressure, rtol=1e-10)


def test_bubble_point_that_cannot_converge_raises_thermo_error(binary):
    with pytest.raises(ThermoError, match="bubble point did not converge at 1.013 bar"):
        flash.bubble_temperature(binary, np.array([ATMOSPHERE]), np.array([[0.4, 0.6]]), max_iterations=1)
    with pytest.raises(ThermoError, match="dew point did not converge"):
        flash.dew_temperature(binary, np.array([ATMOSPHERE]), np.array([[0.4, 0.6]]), max_iterations=1)


def test_bubble_point_guess_does_not_change_the_answer(binary):
    x = np.array([[0.3, 0.7], [0.8, 0.2]])
    pressure = np.full(2, ATMOSPHERE)
    plain, _ = flash.bubble_temperature(binary, pressure, x)
    guessed, _ = flash.bubble_temperature(binary, pressure, x, guess=np.array([300.0, 420.0]))
    np.testing.assert_allclose(guessed, plain, rtol=0, atol=1e-8)


# ------------------------------------------------------------------ Rachford-Rice


def _rachford_rice_value(z: np.ndarray, K: np.ndarray, beta: float) -> tuple[float, float]:
    denominator = 1.0 + beta * (K - 1.0)
    value = float(np.sum(z * (K - 1.0) / denominator))
    slope = -float(np.sum(z * (K - 1.0) ** 2 / denominator**2))
    return value, slope


@st.composite
def feeds_and_k_values(draw):
    c = draw(st.integers(2, 6))
    weights = draw(hnp.arrays(float, c, elements=st.floats(0.01, 1.0)))
    log_k = draw(hnp.arrays(float, c, elements=st.floats(-6.0, 6.0)))
    return weights / weights.sum(), np.exp(log_k)


@settings(max_examples=300, deadline=None)
@given(feeds_and_k_values())
def test_rachford_rice_root_or_single_phase_clip(data):
    z, K = data
    beta = float(flash.rachford_rice(z[None, :], K[None, :])[0])
    at_zero = float(np.sum(z * K)) - 1.0  # the RR function at beta = 0
    at_one = 1.0 - float(np.sum(z / K))  # and at beta = 1
    assert 0.0 <= beta <= 1.0
    value, slope = _rachford_rice_value(z, K, beta)
    edge = 1e-12  # within round-off of a phase boundary either answer is right
    if at_zero < -edge:  # subcooled: no vapor
        assert beta == 0.0
    elif at_one > edge:  # superheated: all vapor
        assert beta == 1.0
    elif at_zero > edge and at_one < -edge:  # two phases
        assert 0.0 < beta < 1.0
        # the Newton step left to the root is at round-off level
        assert abs(value / slope) < 1e-12
        x = z / (1.0 + beta * (K - 1.0))
        assert abs(x.sum() - 1.0) < 1e-10 and abs((K * x).sum() - 1.0) < 1e-10
    else:  # at a bubble or dew point (all K = 1 makes every beta a root)
        assert abs(value) < 1e-10 or abs(value / slope) < 1e-12


def test_rachford_rice_is_vectorized_over_rows():
    z = np.array([[0.5, 0.5], [0.2, 0.8], [0.9, 0.1]])
    K = np.array([[2.0, 0.5], [0.5, 0.2], [5.0, 3.0]])
    beta = flash.rachford_rice(z, K)
    # row 0 by hand: 0.5 / (1 + b) = 0.25 / (1 - 0.5 b) gives b = 0.5; row 1 has every K < 1
    # (liquid), row 2 every K > 1 (vapor)
    np.testing.assert_allclose(beta, [0.5, 0.0, 1.0], rtol=0, atol=1e-14)


# ------------------------------------------------------------------ isothermal flash


@pytest.mark.parametrize("name", ["binary", "ternary", "aromatics"])
def test_flash_tp_closes_the_mass_balance_and_satisfies_equilibrium(request, name):
    thermo = _packages(request, name)
    c = thermo.component_count
    rng = np.random.default_rng(20 + c)
    z = rng.dirichlet(np.ones(c), 10)
    pressure = rng.uniform(0.5e5, 3.0e5, 10)
    bubble, _ = flash.bubble_temperature(thermo, pressure, z)
    dew, _ = flash.dew_temperature(thermo, pressure, z)
    T = bubble + rng.uniform(0.05, 0.95, 10) * (dew - bubble)
    result = flash.flash_tp(thermo, T, pressure, z)
    beta = result.vapor_fraction
    assert np.all((beta > 0.0) & (beta < 1.0))
    np.testing.assert_allclose((1 - beta[:, None]) * result.x + beta[:, None] * result.y, z, rtol=0, atol=1e-12)
    K = thermo.k_values(T, pressure, result.x, derivatives=False).K
    np.testing.assert_allclose(result.y, K * result.x, rtol=1e-10, atol=1e-13)
    np.testing.assert_allclose(result.x.sum(axis=1), 1.0, atol=1e-13)
    np.testing.assert_allclose(result.y.sum(axis=1), 1.0, atol=1e-13)
    np.testing.assert_array_equal(result.temperature, T)
    np.testing.assert_array_equal(result.pressure, pressure)


def test_flash_tp_vapor_fraction_rises_from_bubble_to_dew_point(binary):
    z = np.array([0.35, 0.65])
    bubble, _ = flash.bubble_temperature(binary, np.array([ATMOSPHERE]), z)
    dew, _ = flash.dew_temperature(binary, np.array([ATMOSPHERE]), z)
    T = np.linspace(bubble[0] + 0.01, dew[0] - 0.01, 9)
    beta = flash.flash_tp(binary, T, ATMOSPHERE, np.tile(z, (9, 1))).vapor_fraction
    assert np.all(np.diff(beta) > 0.0)
    assert beta[0] < 0.01 and beta[-1] > 0.99


def test_flash_tp_outside_the_two_phase_region_gives_one_phase(binary):
    z = np.tile([0.35, 0.65], (2, 1))
    p = np.full(2, ATMOSPHERE)
    bubble, y_bubble = flash.bubble_temperature(binary, p[:1], z[:1])
    dew, x_dew = flash.dew_temperature(binary, p[:1], z[:1])
    T = np.array([bubble[0] - 10.0, dew[0] + 10.0])
    result = flash.flash_tp(binary, T, p, z)
    np.testing.assert_array_equal(result.vapor_fraction, [0.0, 1.0])
    np.testing.assert_array_equal(result.x[0], z[0])  # subcooled liquid is the feed
    np.testing.assert_array_equal(result.y[1], z[1])  # superheated vapor is the feed
    # the absent phase is the incipient one at the flash temperature: vapor in equilibrium with z ...
    K_liquid = binary.k_values(T[:1], p[:1], z[:1], derivatives=False).K
    np.testing.assert_allclose(result.y[0], (K_liquid[0] * z[0]) / (K_liquid[0] * z[0]).sum(), rtol=1e-10)
    # ... and is close to the incipient phases at the bubble and dew points
    assert np.max(np.abs(result.y[0] - y_bubble[0])) < 0.1
    assert np.max(np.abs(result.x[1] - x_dew[0])) < 0.1


# ------------------------------------------------------------------ flash at given vapor fraction


@pytest.mark.parametrize("name", ["binary", "ternary", "aromatics"])
def test_flash_at_vapor_fraction_zero_and_one_gives_bubble_and_dew_points(request, name):
    thermo = _packages(request, name)
    c = thermo.component_count
    z = _compositions(c, 6, seed=30 + c)
    pressure = np.linspace(0.5e5, 3.0e5, 6)
    bubble, y_bubble = flash.bubble_temperature(thermo, pressure, z)
    dew, x_dew = flash.dew_temperature(thermo, pressure, z)
    at_zero = flash.flash_p_vapor_fraction(thermo, pressure, z, np.zeros(6))
    at_one = flash.flash_p_vapor_fraction(thermo, pressure, z, np.ones(6))
    np.testing.assert_allclose(at_zero.temperature, bubble, rtol=0, atol=1e-8)
    np.testing.assert_allclose(at_one.temperature, dew, rtol=0, atol=1e-8)
    np.testing.assert_allclose(at_zero.x, z, atol=1e-12)
    np.testing.assert_allclose(at_zero.y, y_bubble, atol=1e-8)
    np.testing.assert_allclose(at_one.x, x_dew, atol=1e-8)
    np.testing.assert_allclose(at_one.y, z, atol=1e-8)


@pytest.mark.parametrize("name", ["binary", "ternary"])
def test_flash_at_vapor_fraction_agrees_with_isothermal_flash(request, name):
    thermo = _packages(request, name)
    c = thermo.component_count
    z = _compositions(c, 5, seed=40 + c)
    pressure = np.full(5, 1.2e5)
    beta = np.array([0.1, 0.3, 0.5, 0.7, 0.9])
    result = flash.flash_p_vapor_fraction(thermo, pressure, z, beta)
    np.testing.assert_array_equal(result.vapor_fraction, beta)
    np.testing.assert_allclose((1 - beta[:, None]) * result.x + beta[:, None] * result.y, z, atol=1e-10)
    check = flash.flash_tp(thermo, result.temperature, pressure, z)
    np.testing.assert_allclose(check.vapor_fraction, beta, rtol=0, atol=1e-9)
    np.testing.assert_allclose(check.x, result.x, atol=1e-9)
    np.testing.assert_allclose(check.y, result.y, atol=1e-9)


# ------------------------------------------------------------------ feed thermal condition


def _hand_q(thermo, z, pressure, T, beta, x, y) -> float:
    """q = (h_V,dew - h_F) / (h_V,dew - h_L,bubble) from the package's rigorous enthalpies
    (McCabe, Smith & Harriott, Unit Operations of Chemical Engineering, 7th ed., ch. 21)."""
    z = np.asarray(z, dtype=float)[None, :]
    p = np.array([pressure])
    bubble, _ = flash.bubble_temperature(thermo, p, z)
    dew, _ = flash.dew_temperature(thermo, p, z)
    h_liquid_bubble = thermo.liquid_enthalpy(bubble, z, model="rigorous").molar[0]
    h_vapor_dew = thermo.vapor_enthalpy(dew, z, model="rigorous").molar[0]
    t = np.array([T])
    h_feed = (1 - beta) * thermo.liquid_enthalpy(t, x[None, :], model="rigorous").molar[0] + beta * thermo.vapor_enthalpy(
        t, y[None, :], model="rigorous"
    ).molar[0]
    return (h_vapor_dew - h_feed) / (h_vapor_dew - h_liquid_bubble)


Z = np.array([0.35, 0.65])


def test_feed_at_its_bubble_point_has_q_one_and_at_its_dew_point_q_zero(binary):
    liquid = flash.feed_state(binary, Z, ATMOSPHERE, vapor_fraction=0.0)
    vapor = flash.feed_state(binary, Z, ATMOSPHERE, vapor_fraction=1.0)
    assert liquid.q == pytest.approx(1.0, abs=1e-9)
    assert vapor.q == pytest.approx(0.0, abs=1e-9)
    assert liquid.temperature == pytest.approx(liquid.bubble_temperature, abs=1e-8)
    assert vapor.temperature == pytest.approx(vapor.dew_temperature, abs=1e-8)
    at_bubble = flash.feed_state(binary, Z, ATMOSPHERE, temperature=liquid.bubble_temperature)
    at_dew = flash.feed_state(binary, Z, ATMOSPHERE, temperature=liquid.dew_temperature)
    assert at_bubble.q == pytest.approx(1.0, abs=1e-9) and at_bubble.vapor_fraction == 0.0
    assert at_dew.q == pytest.approx(0.0, abs=1e-9) and at_dew.vapor_fraction == 1.0


def test_subcooled_and_superheated_feeds(binary):
    bubble_point = flash.feed_state(binary, Z, ATMOSPHERE, vapor_fraction=0.0)
    cold = flash.feed_state(binary, Z, ATMOSPHERE, temperature=bubble_point.bubble_temperature - 20.0)
    hot = flash.feed_state(binary, Z, ATMOSPHERE, temperature=bubble_point.dew_temperature + 20.0)
    assert cold.q > 1.0 and cold.vapor_fraction == 0.0
    assert hot.q < 0.0 and hot.vapor_fraction == 1.0
    np.testing.assert_array_equal(cold.x, Z)
    np.testing.assert_array_equal(hot.y, Z)
    assert cold.q == pytest.approx(_hand_q(binary, Z, ATMOSPHERE, cold.temperature, 0.0, Z, Z), rel=1e-12)
    assert hot.q == pytest.approx(_hand_q(binary, Z, ATMOSPHERE, hot.temperature, 1.0, Z, Z), rel=1e-12)
    # 20 K subcooling: q - 1 ~ cp_L * 20 K / latent heat ~ 80 * 20 / 40000 = 0.04 (order of magnitude)
    assert 0.01 < cold.q - 1.0 < 0.2
    assert -0.2 < hot.q < -0.01


@pytest.mark.parametrize("beta", [0.2, 0.5, 0.8])
def test_partly_vaporized_feed_q_matches_the_enthalpies(binary, beta):
    by_fraction = flash.feed_state(binary, Z, ATMOSPHERE, vapor_fraction=beta)
    assert by_fraction.vapor_fraction == beta
    expected = _hand_q(binary, Z, ATMOSPHERE, by_fraction.temperature, beta, by_fraction.x, by_fraction.y)
    assert by_fraction.q == pytest.approx(expected, rel=1e-12)
    assert 0.0 < by_fraction.q < 1.0
    # with unequal latent heats and sensible heat, q differs somewhat from 1 - beta
    assert abs(by_fraction.q - (1 - beta)) < 0.1
    # the same feed given by its temperature
    by_temperature = flash.feed_state(binary, Z, ATMOSPHERE, temperature=by_fraction.temperature)
    assert by_temperature.vapor_fraction == pytest.approx(beta, abs=1e-9)
    assert by_temperature.q == pytest.approx(by_fraction.q, abs=1e-9)
    assert by_temperature.enthalpy == pytest.approx(by_fraction.enthalpy, rel=1e-9)


@pytest.mark.parametrize("beta", [0.0, 0.25, 0.6, 1.0])
def test_pure_component_feed_has_q_equal_to_one_minus_vapor_fraction(aromatics, beta):
    """Liquid and vapor of a pure component at one temperature: q = 1 - beta exactly."""
    state = flash.feed_state(aromatics, [1.0, 0.0], ATMOSPHERE, vapor_fraction=beta)
    assert state.q == pytest.approx(1.0 - beta, abs=1e-9)
    assert state.bubble_temperature == pytest.approx(state.dew_temperature, abs=1e-8)


def test_feed_q_is_judged_with_rigorous_enthalpies_in_a_cmo_package():
    rigorous = ThermoPackage.from_case(methanol_water_case())
    cmo = ThermoPackage.from_case(methanol_water_case(enthalpy="cmo"))
    for kwargs in ({"temperature": 330.0}, {"vapor_fraction": 0.4}, {"temperature": 380.0}):
        a = flash.feed_state(rigorous, Z, ATMOSPHERE, **kwargs)
        b = flash.feed_state(cmo, Z, ATMOSPHERE, **kwargs)
        assert b.q == pytest.approx(a.q, rel=1e-12)
        assert b.enthalpy == pytest.approx(a.enthalpy, rel=1e-12)


def test_reference_pressure_judges_q_at_the_stage_pressure(binary):
    """A liquid feed at 3 bar let down to a 1 atm stage: saturated at 3 bar (q = 1 there), it
    flashes partly on entering the stage (0 < q < 1 at 1 atm), its enthalpy kept."""
    high = 3.0e5
    saturated = flash.feed_state(binary, Z, high, vapor_fraction=0.0)
    assert saturated.q == pytest.approx(1.0, abs=1e-9)
    let_down = flash.feed_state(binary, Z, high, vapor_fraction=0.0, reference_pressure=ATMOSPHERE)
    assert let_down.enthalpy == pytest.approx(saturated.enthalpy, rel=1e-12)
    assert let_down.pressure == high
    assert 0.0 < let_down.q < 1.0
    # by hand: saturated liquid and vapor of z at 1 atm
    p = np.array([ATMOSPHERE])
    bubble, _ = flash.bubble_temperature(binary, p, Z[None, :])
    dew, _ = flash.dew_temperature(binary, p, Z[None, :])
    h_liquid = binary.liquid_enthalpy(bubble, Z[None, :]).molar[0]
    h_vapor = binary.vapor_enthalpy(dew, Z[None, :]).molar[0]
    assert let_down.q == pytest.approx((h_vapor - let_down.enthalpy) / (h_vapor - h_liquid), rel=1e-12)
    # the phase state is still that at the feed's own pressure
    assert let_down.bubble_temperature == pytest.approx(saturated.bubble_temperature, abs=1e-9)
    # reference pressure equal to the feed pressure changes nothing
    same = flash.feed_state(binary, Z, high, temperature=400.0, reference_pressure=high)
    plain = flash.feed_state(binary, Z, high, temperature=400.0)
    assert same.q == plain.q and same.enthalpy == plain.enthalpy


def test_feed_state_needs_exactly_one_of_temperature_and_vapor_fraction(binary):
    with pytest.raises(ValueError, match="exactly one"):
        flash.feed_state(binary, Z, ATMOSPHERE)
    with pytest.raises(ValueError, match="exactly one"):
        flash.feed_state(binary, Z, ATMOSPHERE, temperature=350.0, vapor_fraction=0.5)


def test_feed_state_normalizes_the_composition(binary):
    a = flash.feed_state(binary, [35.0, 65.0], ATMOSPHERE, temperature=355.0)
    b = flash.feed_state(binary, Z, ATMOSPHERE, temperature=355.0)
    assert a.q == pytest.approx(b.q, rel=1e-12)
    np.testing.assert_allclose(a.x, b.x, atol=1e-12)


# ------------------------------------------------------------------ starting points


def test_cryogenic_bubble_and_dew_points():
    """Nitrogen-oxygen (Raoult's law) at 1 atm boils between the pure components' boiling
    points, 77.35 and 90.19 K (CoolProp), well below 100 K."""
    thermo = ThermoPackage(PureComponents([component_info("nitrogen"), component_info("oxygen")]), IdealSolution(2))
    z = np.array([[0.79, 0.21], [0.5, 0.5], [1.0, 0.0]])
    pressure = np.full(3, ATMOSPHERE)
    bubble, y = flash.bubble_temperature(thermo, pressure, z)
    dew, x = flash.dew_temperature(thermo, pressure, z)
    assert np.all((77.0 < bubble) & (bubble < dew + 1e-9) & (dew < 90.5))
    K = thermo.k_values(bubble, pressure, z, derivatives=False).K
    np.testing.assert_allclose((K * z).sum(axis=1), 1.0, atol=1e-10)
    state = CP.AbstractState("HEOS", "Nitrogen")
    state.update(CP.PQ_INPUTS, ATMOSPHERE, 0.0)
    assert bubble[2] == pytest.approx(state.T(), abs=1e-4)


def test_bubble_point_of_a_user_component_without_a_normal_boiling_point():
    """An invented component whose vapor-pressure correlation ends below its boiling point
    (no normal boiling point known, no heat of vaporization given): the bubble point starts
    from the extrapolated vapor pressure and converges."""
    case = case_from_text(
        """
        [components]
        names = ["solvent_a", "toluene"]
        [components.data.solvent_a]
        molar_mass = "0.08 kg/mol"
        critical_temperature = "560 K"
        critical_pressure = "4.5 MPa"
        vapor_pressure = { form = "antoine", A = 4.0, B = 1250.0, C = -50.0, base = 10, pressure_unit = "bar", temperature_unit = "K", T_min = "280 K", T_max = "330 K" }
        source = "invented for this test"
        [thermo]
        liquid = "ideal"
        enthalpy = "cmo"
        [column]
        stages = 5
        condenser = "total"
        reboiler = "partial"
        pressure.top = "101.325 kPa"
        [[feeds]]
        stage = 3
        flow = "100 kmol/h"
        composition = { solvent_a = 0.5, toluene = 0.5 }
        vapor_fraction = 0.0
        [specs]
        reflux_ratio = 2.0
        distillate_rate = "40 kmol/h"
        """
    )
    thermo = ThermoPackage.from_case(case)
    assert np.isnan(thermo.pure.normal_boiling_point[0])
    z = np.array([[0.5, 0.5], [0.9, 0.1]])
    pressure = np.full(2, ATMOSPHERE)
    bubble, y = flash.bubble_temperature(thermo, pressure, z)
    K = thermo.k_values(bubble, pressure, z, derivatives=False).K
    np.testing.assert_allclose((K * z).sum(axis=1), 1.0, atol=1e-10)
    dew, _ = flash.dew_temperature(thermo, pressure, y)
    np.testing.assert_allclose(dew, bubble, atol=1e-8)
