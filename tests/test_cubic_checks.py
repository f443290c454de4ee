"""Tests of the equation-of-state helpers: bubble points (solver.thermo.cubic_flash), the
trivial-solution and near-critical checks (solver.thermo.cubic_critical) and the k_ij table
(solver.thermo.cubic_kij). Comparisons with CoolProp are in tests/reference/test_cubic_reference.py."""

from __future__ import annotations

import numpy as np
import pytest

from solver.thermo.cubic import CUBIC_FORMS, CubicParameters, cubic_k_values
from solver.thermo.cubic_critical import (
    critical_points,
    near_critical,
    phase_identification,
    pseudo_critical,
    trivial_solution,
)
from solver.thermo.cubic_flash import bubble_pressure, bubble_temperature, wilson_k_values
from solver.thermo.cubic_kij import PENG_ROBINSON_HYDROCARBONS, interaction_matrix

# rounded critical constants and acentric factors of propane, n-butane, n-pentane (from memory;
# only self-consistency is tested here)
LIGHT = CubicParameters(
    ("propane", "n-butane", "n-pentane"), [369.8, 425.1, 469.7], [4.25e6, 3.80e6, 3.37e6], [0.152, 0.200, 0.251],
    interaction=interaction_matrix(("propane", "n-butane", "n-pentane"))[0],
)


@pytest.mark.parametrize("variant", tuple(CUBIC_FORMS))
def test_bubble_temperature_inverts_bubble_pressure(variant):
    par = CubicParameters(LIGHT.names, LIGHT.critical_temperature, LIGHT.critical_pressure, LIGHT.acentric_factor, variant)
    rng = np.random.default_rng(4)
    x = rng.dirichlet(np.ones(3), 12)
    T = rng.uniform(280.0, 380.0, 12)
    forward = bubble_pressure(par, T, x)
    assert forward.converged.all() and not forward.trivial.any()
    # at the bubble point the vapor in equilibrium sums to one with K from the cubic
    k = cubic_k_values(par, T, forward.pressure, x, forward.y, derivatives=False)
    assert np.allclose((k.K * x).sum(axis=1), 1.0, atol=1e-10)
    assert np.allclose(forward.y, k.K * x, atol=1e-10)
    back = bubble_temperature(par, forward.pressure, x)
    assert back.converged.all()
    assert np.allclose(back.temperature, T, rtol=1e-9)


def test_bubble_point_of_a_pure_component_is_its_vapor_pressure_on_the_equation():
    """For a single component the bubble pressure is where phi_L = phi_V (the equation's own
    vapor pressure), near the measured one: propane at 300 K, 0.998 MPa (reference equation,
    from memory), PR within 2 %."""
    par = CubicParameters(("propane",), [369.8], [4.25e6], [0.152])
    point = bubble_pressure(par, [300.0], [[1.0]])
    assert point.converged.all()
    assert point.K[0, 0] == pytest.approx(1.0, abs=1e-10)
    assert point.pressure[0] == pytest.approx(0.998e6, rel=0.02)
    phases = cubic_k_values(par, [300.0], point.pressure, [[1.0]], [[1.0]])
    assert phases.liquid.Z[0] < 0.1 < 0.7 < phases.vapor.Z[0]


def test_no_bubble_point_above_every_critical_temperature_is_reported_not_hidden():
    point = bubble_pressure(LIGHT, [520.0], [[0.3, 0.3, 0.4]])
    assert not point.converged[0]


def test_wilson_k_values_give_the_critical_pressure_at_the_critical_temperature():
    K = wilson_k_values(LIGHT, LIGHT.critical_temperature[1], 1e6)
    assert K[0, 1] == pytest.approx(3.80, rel=1e-12)
    assert K[0, 0] > K[0, 1] > K[0, 2]


# ----------------------------------------------------------------------------- trivial solution


def test_trivial_solution_flags_only_coinciding_phases():
    z_liquid = np.array([0.3, 0.5, 0.5, 0.5])
    z_vapor = np.array([0.8, 0.5 + 1e-8, 0.5 + 1e-3, 0.5])
    K = np.array([[2.0, 0.5], [1.0 + 1e-9, 1.0 - 1e-9], [1.0, 1.0], [1.01, 0.99]])
    check = trivial_solution(z_liquid, z_vapor, K)
    assert check.trivial.tolist() == [False, True, False, False]
    assert check.z_gap[2] == pytest.approx(1e-3)
    assert check.largest_ln_k[3] == pytest.approx(-np.log(0.99), rel=1e-12)


def test_single_root_stage_is_trivial():
    k = cubic_k_values(LIGHT, [480.0], [6e6], [[0.3, 0.3, 0.4]], [[0.3, 0.3, 0.4]])
    assert k.liquid.single_root[0]
    assert trivial_solution(k.liquid.Z, k.vapor.Z, k.K).trivial[0]


def test_phase_identification_tells_liquid_like_from_vapor_like_roots():
    """Venkatarathnam and Oellrich (2011): Pi > 1 liquid-like, Pi < 1 vapor-like, Pi = 1 for an
    ideal gas; for the cubic's only root above the critical point it decides what the root is."""
    par = CubicParameters(("a", "b"), [300.0, 350.0], [4e6, 4e6], [0.1, 0.2])
    x = np.full((4, 2), 0.5)
    T = np.array([250.0, 500.0, 320.0, 400.0])
    P = np.array([5e5, 5e6, 9e6, 1.0])
    liquid = phase_identification(par, T, P, x, "liquid")
    vapor = phase_identification(par, T, P, x, "vapor")
    assert liquid[0] > 1.0 > vapor[0]  # both roots exist: each is what it is called
    assert liquid[1] == vapor[1] < 1.0  # hot, one root: gas-like
    assert liquid[2] == vapor[2] > 1.0  # dense, one root: liquid-like
    assert vapor[3] == pytest.approx(1.0, abs=1e-5)  # ideal-gas limit
    k = cubic_k_values(par, T, P, x, x)
    assert k.single_root_stages.tolist() == [1, 2, 3]


def test_mixture_attraction_and_its_temperature_derivative():
    a, da, b = LIGHT.mixture_attraction([300.0, 350.0], [[0.2, 0.3, 0.5], [0.6, 0.2, 0.2]])
    up, _, _ = LIGHT.mixture_attraction([300.001, 350.001], [[0.2, 0.3, 0.5], [0.6, 0.2, 0.2]])
    down, _, _ = LIGHT.mixture_attraction([299.999, 349.999], [[0.2, 0.3, 0.5], [0.6, 0.2, 0.2]])
    assert np.allclose(da, (up - down) / 0.002, rtol=1e-7)
    pure = LIGHT.attraction([300.0])[0]
    assert a[0] < 0.2 * pure[0] + 0.3 * pure[1] + 0.5 * pure[2]  # sqrt mean below the arithmetic mean
    assert b[1] == pytest.approx(LIGHT.covolume @ [0.6, 0.2, 0.2], rel=1e-14)


# ----------------------------------------------------------------------------- critical points


@pytest.mark.parametrize("variant", tuple(CUBIC_FORMS))
def test_critical_point_of_a_mixture_of_identical_components_is_the_pure_critical_point(variant):
    """Two copies of one component make a pure fluid: the Heidemann-Khalil point must be the
    equation's pure critical point, which is (Tc, Pc) by construction of Omega_a, Omega_b."""
    par = CubicParameters(("a", "b"), [400.0, 400.0], [4e6, 4e6], [0.2, 0.2], variant)
    found = critical_points(par, [[0.5, 0.5], [0.2, 0.8]])
    assert found.converged.all()
    assert np.allclose(found.temperature, 400.0, rtol=1e-8)
    assert np.allclose(found.pressure, 4e6, rtol=1e-7)
    z_c = {"peng-robinson": 0.307401308698, "soave-redlich-kwong": 1.0 / 3.0}[variant]  # from memory
    assert np.allclose(found.molar_volume * 4e6 / (8.314462618 * 400.0), z_c, rtol=1e-6)


def test_binary_critical_locus_lies_between_the_pure_critical_temperatures_and_above_kay():
    x1 = np.linspace(0.05, 0.95, 7)
    par = CubicParameters(LIGHT.names[:2], LIGHT.critical_temperature[:2], LIGHT.critical_pressure[:2], LIGHT.acentric_factor[:2])
    found = critical_points(par, np.c_[x1, 1 - x1])
    assert found.converged.all()
    assert np.all(np.diff(found.temperature) < 0.0)
    assert np.all((found.temperature > 369.8) & (found.temperature < 425.1))
    kay_temperature, kay_pressure = pseudo_critical(par, np.c_[x1, 1 - x1])
    assert np.all(found.pressure > kay_pressure)  # the known shape of the alkane critical locus
    assert np.all(np.abs(found.temperature / kay_temperature - 1.0) < 0.02)


def test_near_critical_flags_stages_at_and_above_the_mixture_critical_point():
    x = np.array([[0.5, 0.5, 0.0], [0.5, 0.5, 0.0], [0.5, 0.5, 0.0]]) + 1e-12
    critical = critical_points(LIGHT, x[:1])
    T = np.array([330.0, critical.temperature[0] * 0.995, 380.0])
    P = np.array([1.5e6, critical.pressure[0] * 0.99, critical.pressure[0] * 1.05])
    check = near_critical(LIGHT, T, P, x)
    assert check.near.tolist() == [False, True, True]
    assert check.above_critical_pressure.tolist() == [False, False, True]
    assert check.reduced_pressure[2] == pytest.approx(1.05, rel=1e-6)


# ----------------------------------------------------------------------------- k_ij table


def test_kij_table_entries_are_small_sourced_and_marked():
    assert len(PENG_ROBINSON_HYDROCARBONS) >= 10
    pairs = set()
    for entry in PENG_ROBINSON_HYDROCARBONS:
        assert -0.03 <= entry.value <= 0.03  # hydrocarbon pairs: common practice
        assert entry.status in ("verified", "from memory")
        assert "DECHEMA" in entry.source
        pair = frozenset((entry.first, entry.second))
        assert len(pair) == 2 and pair not in pairs
        pairs.add(pair)


def test_interaction_matrix_is_symmetric_with_synonyms_and_zero_default():
    matrix, sources = interaction_matrix(["Propene", "propane", "water", "Butane"])
    assert matrix[0, 1] == matrix[1, 0] == 0.0074
    assert matrix[1, 3] == matrix[3, 1] == 0.0033
    assert np.all(matrix[2] == 0.0) and np.all(np.diag(matrix) == 0.0)
    assert set(sources) == {"Propene/propane", "propane/Butane"}
    assert "from memory" in sources["Propene/propane"]
    assert np.all(interaction_matrix(["propane", "n-butane"], equation="soave-redlich-kwong")[0] == 0.0)
