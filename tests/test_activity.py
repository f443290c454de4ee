"""Tests of solver.thermo.activity: analytic derivatives against central finite differences,
Gibbs-Duhem, limits, the published binary forms of each model, energy-form conversions and the
array conventions (stage first, no aliasing between calls)."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from solver.errors import CaseError, ThermoError
from solver.thermo.activity import (
    GAS_CONSTANT,
    NRTL,
    TERMS,
    UNIQUAC,
    ActivityResult,
    IdealSolution,
    Wilson,
    nrtl_energy_form,
    uniquac_energy_form,
    wilson_energy_form,
)

MODEL_KINDS = ("ideal", "wilson", "nrtl", "uniquac")
NONIDEAL_KINDS = ("wilson", "nrtl", "uniquac")
SEEDS = st.integers(min_value=0, max_value=2**32 - 1)
COMPONENT_COUNTS = st.integers(min_value=2, max_value=6)


def _off_diagonal(rng: np.random.Generator, c: int, low: float, high: float) -> np.ndarray:
    matrix = rng.uniform(low, high, (c, c))
    np.fill_diagonal(matrix, 0.0)
    return matrix


def _symmetric(rng: np.random.Generator, c: int, low: float, high: float) -> np.ndarray:
    matrix = rng.uniform(low, high, (c, c))
    return np.triu(matrix, 1) + np.triu(matrix, 1).T


def random_model(kind: str, c: int, rng: np.random.Generator):
    """A model with random parameters of realistic size and full temperature dependence
    (invented numbers; ranges are common practice for fitted parameters)."""
    if kind == "ideal":
        return IdealSolution(c)
    e = _off_diagonal(rng, c, -0.2, 0.2)
    f = _off_diagonal(rng, c, -1e-3, 1e-3)
    if kind == "nrtl":
        return NRTL(
            _off_diagonal(rng, c, -2.0, 2.0),
            _off_diagonal(rng, c, -500.0, 1500.0),
            e,
            f,
            alpha=_symmetric(rng, c, 0.2, 0.47),
            alpha_slope=_symmetric(rng, c, -1e-3, 1e-3),
            alpha_reference_temperature=320.0,  # K, invented
        )
    if kind == "wilson":
        return Wilson(_off_diagonal(rng, c, -0.5, 0.5), _off_diagonal(rng, c, -800.0, 400.0), e, f)
    return UNIQUAC(
        _off_diagonal(rng, c, -0.5, 0.5),
        _off_diagonal(rng, c, -600.0, 300.0),
        e,
        f,
        r=rng.uniform(0.9, 6.0, c),
        q=rng.uniform(0.9, 5.0, c),
    )


def random_states(rng: np.random.Generator, n: int, c: int, *, normalized: bool) -> tuple[np.ndarray, np.ndarray]:
    temperature = rng.uniform(290.0, 450.0, n)
    x = rng.uniform(0.02, 1.0, (n, c))
    x /= x.sum(axis=1, keepdims=True)
    if not normalized:
        x *= rng.uniform(0.9, 1.1, (n, 1))
    return temperature, x


def assert_close_scaled(analytic: np.ndarray, numeric: np.ndarray, rtol: float = 1e-6) -> None:
    """Relative agreement, with entries near zero judged against the largest entry."""
    scale = float(np.max(np.abs(numeric))) if numeric.size else 0.0
    np.testing.assert_allclose(analytic, numeric, rtol=rtol, atol=rtol * scale + 1e-12)


# --------------------------------------------------------------------------------------------
# derivatives against central finite differences


@pytest.mark.parametrize("kind", MODEL_KINDS)
@pytest.mark.parametrize("normalized", [True, False], ids=["on_simplex", "off_simplex"])
@settings(max_examples=15, deadline=None)
@given(seed=SEEDS, c=COMPONENT_COUNTS)
def test_derivatives_match_central_differences(kind: str, normalized: bool, seed: int, c: int) -> None:
    rng = np.random.default_rng(seed)
    model = random_model(kind, c, rng)
    temperature, x = random_states(rng, 5, c, normalized=normalized)
    result = model.evaluate(temperature, x)

    step_t = 1e-5 * temperature
    up, down = model.evaluate(temperature + step_t, x), model.evaluate(temperature - step_t, x)
    assert_close_scaled(result.d_ln_gamma_dT, (up.ln_gamma - down.ln_gamma) / (2 * step_t[:, None]))
    assert_close_scaled(result.d_excess_enthalpy_dT, (up.excess_enthalpy - down.excess_enthalpy) / (2 * step_t))

    step_x = 1e-6
    d_ln_gamma_dx = np.empty((5, c, c))
    d_excess_enthalpy_dx = np.empty((5, c))
    for k in range(c):
        x_up, x_down = x.copy(), x.copy()
        x_up[:, k] += step_x
        x_down[:, k] -= step_x
        up, down = model.evaluate(temperature, x_up), model.evaluate(temperature, x_down)
        d_ln_gamma_dx[:, :, k] = (up.ln_gamma - down.ln_gamma) / (2 * step_x)
        d_excess_enthalpy_dx[:, k] = (up.excess_enthalpy - down.excess_enthalpy) / (2 * step_x)
    assert_close_scaled(result.d_ln_gamma_dx, d_ln_gamma_dx)
    assert_close_scaled(result.d_excess_enthalpy_dx, d_excess_enthalpy_dx)


@pytest.mark.parametrize("kind", NONIDEAL_KINDS)
@settings(max_examples=15, deadline=None)
@given(seed=SEEDS, c=COMPONENT_COUNTS)
def test_excess_enthalpy_is_gibbs_helmholtz_of_excess_gibbs_energy(kind: str, seed: int, c: int) -> None:
    """h^E = -R T^2 d(g^E/RT)/dT with g^E/RT = sum_i x_i ln gamma_i, by finite differences of
    ln gamma alone (independent of d_ln_gamma_dT)."""
    rng = np.random.default_rng(seed)
    model = random_model(kind, c, rng)
    temperature, x = random_states(rng, 4, c, normalized=True)
    step = 1e-5 * temperature

    def reduced_excess_gibbs(t: np.ndarray) -> np.ndarray:
        return np.sum(x * model.ln_gamma(t, x), axis=1)

    numeric = -GAS_CONSTANT * temperature**2 * (
        reduced_excess_gibbs(temperature + step) - reduced_excess_gibbs(temperature - step)
    ) / (2 * step)
    assert_close_scaled(model.evaluate(temperature, x).excess_enthalpy, numeric)


# --------------------------------------------------------------------------------------------
# thermodynamic consistency


@pytest.mark.parametrize("kind", NONIDEAL_KINDS)
@settings(max_examples=20, deadline=None)
@given(seed=SEEDS, c=COMPONENT_COUNTS)
def test_gibbs_duhem_on_the_simplex(kind: str, seed: int, c: int) -> None:
    """sum_i x_i (d ln gamma_i/dx_k - d ln gamma_i/dx_m) = 0 for normalized x, every k, m."""
    rng = np.random.default_rng(seed)
    model = random_model(kind, c, rng)
    temperature, x = random_states(rng, 6, c, normalized=True)
    weighted = np.einsum("si,sik->sk", x, model.evaluate(temperature, x).d_ln_gamma_dx)
    differences = weighted[:, :, None] - weighted[:, None, :]
    scale = np.abs(model.evaluate(temperature, x).d_ln_gamma_dx).max()
    assert np.abs(differences).max() <= 1e-12 * max(scale, 1.0)


@pytest.mark.parametrize("kind", NONIDEAL_KINDS)
@settings(max_examples=20, deadline=None)
@given(seed=SEEDS, c=COMPONENT_COUNTS, factor=st.floats(min_value=0.5, max_value=2.0))
def test_mole_number_form_off_the_simplex(kind: str, seed: int, c: int, factor: float) -> None:
    """ln gamma depends on x / sum(x) only, so for any x: ln gamma(factor x) = ln gamma(x),
    sum_i x_i d ln gamma_i/dx_k = 0 (Euler), d ln gamma_i/dx_k is symmetric (a Hessian) and
    h^E(factor x) = factor h^E(x)."""
    rng = np.random.default_rng(seed)
    model = random_model(kind, c, rng)
    temperature, x = random_states(rng, 6, c, normalized=False)
    result = model.evaluate(temperature, x)
    scaled = model.evaluate(temperature, factor * x)
    np.testing.assert_allclose(scaled.ln_gamma, result.ln_gamma, rtol=1e-12, atol=1e-12)
    np.testing.assert_allclose(scaled.excess_enthalpy, factor * result.excess_enthalpy, rtol=1e-11, atol=1e-9)
    scale = max(np.abs(result.d_ln_gamma_dx).max(), 1.0)
    assert np.abs(np.einsum("si,sik->sk", x, result.d_ln_gamma_dx)).max() <= 1e-12 * scale
    np.testing.assert_allclose(result.d_ln_gamma_dx, result.d_ln_gamma_dx.transpose(0, 2, 1), rtol=0, atol=1e-12 * scale)


@pytest.mark.parametrize("kind", NONIDEAL_KINDS)
@settings(max_examples=15, deadline=None)
@given(seed=SEEDS, c=COMPONENT_COUNTS)
def test_excess_enthalpy_uses_x_as_passed(kind: str, seed: int, c: int) -> None:
    rng = np.random.default_rng(seed)
    model = random_model(kind, c, rng)
    temperature, x = random_states(rng, 4, c, normalized=False)
    result = model.evaluate(temperature, x)
    expected = -GAS_CONSTANT * temperature**2 * np.sum(x * result.d_ln_gamma_dT, axis=1)
    np.testing.assert_allclose(result.excess_enthalpy, expected, rtol=1e-13, atol=1e-10)


@pytest.mark.parametrize("kind", NONIDEAL_KINDS)
@pytest.mark.parametrize("c", [2, 3, 5])
def test_pure_component_has_unit_activity_coefficient(kind: str, c: int) -> None:
    rng = np.random.default_rng(11 + c)
    model = random_model(kind, c, rng)
    x = np.eye(c)
    temperature = rng.uniform(300.0, 400.0, c)
    result = model.evaluate(temperature, x)
    np.testing.assert_allclose(np.diag(result.ln_gamma), 0.0, atol=1e-13)
    np.testing.assert_allclose(np.diag(result.d_ln_gamma_dT), 0.0, atol=1e-15)
    np.testing.assert_allclose(result.excess_enthalpy, 0.0, atol=1e-9)
    assert np.all(np.isfinite(result.ln_gamma)) and np.any(np.abs(result.ln_gamma) > 1e-3)


def test_ideal_solution_gives_zeros() -> None:
    model = IdealSolution(3)
    result = model.evaluate(np.array([300.0, 350.0]), np.array([[0.2, 0.3, 0.5], [0.6, 0.3, 0.2]]))
    assert result.ln_gamma.shape == (2, 3) and result.d_ln_gamma_dx.shape == (2, 3, 3)
    for array in (result.ln_gamma, result.d_ln_gamma_dT, result.d_ln_gamma_dx, result.excess_enthalpy,
                  result.d_excess_enthalpy_dT, result.d_excess_enthalpy_dx):
        assert not np.any(array)


def test_uniquac_with_unit_tau_and_unit_size_is_ideal() -> None:
    model = UNIQUAC(np.zeros((3, 3)), np.zeros((3, 3)), r=np.ones(3), q=np.ones(3))
    result = model.evaluate(np.array([320.0]), np.array([[0.2, 0.3, 0.5]]))
    np.testing.assert_allclose(result.ln_gamma, 0.0, atol=1e-15)
    np.testing.assert_allclose(result.excess_enthalpy, 0.0, atol=1e-12)


# --------------------------------------------------------------------------------------------
# published binary forms


def binary_nrtl(x1: float, tau12: float, tau21: float, alpha: float) -> tuple[float, float]:
    """Binary NRTL, Renon and Prausnitz (1968), AIChE J. 14, 135."""
    x2 = 1.0 - x1
    g12, g21 = math.exp(-alpha * tau12), math.exp(-alpha * tau21)
    ln_gamma1 = x2**2 * (tau21 * (g21 / (x1 + x2 * g21)) ** 2 + tau12 * g12 / (x2 + x1 * g12) ** 2)
    ln_gamma2 = x1**2 * (tau12 * (g12 / (x2 + x1 * g12)) ** 2 + tau21 * g21 / (x1 + x2 * g21) ** 2)
    return ln_gamma1, ln_gamma2


def binary_wilson(x1: float, lambda12: float, lambda21: float) -> tuple[float, float]:
    """Binary Wilson, Wilson (1964), J. Am. Chem. Soc. 86, 127."""
    x2 = 1.0 - x1
    bracket = lambda12 / (x1 + lambda12 * x2) - lambda21 / (x2 + lambda21 * x1)
    return -math.log(x1 + lambda12 * x2) + x2 * bracket, -math.log(x2 + lambda21 * x1) - x1 * bracket


def binary_uniquac(x1: float, tau12: float, tau21: float, r: tuple, q: tuple, z: float = 10.0) -> tuple[float, float]:
    """Binary UNIQUAC, Abrams and Prausnitz (1975), AIChE J. 21, 116."""
    x = (x1, 1.0 - x1)
    phi = [r[i] * x[i] / (r[0] * x[0] + r[1] * x[1]) for i in range(2)]
    theta = [q[i] * x[i] / (q[0] * x[0] + q[1] * x[1]) for i in range(2)]
    l = [z / 2 * (r[i] - q[i]) - (r[i] - 1.0) for i in range(2)]
    tau = {(0, 1): tau12, (1, 0): tau21}
    out = []
    for i, j in ((0, 1), (1, 0)):
        out.append(
            math.log(phi[i] / x[i])
            + z / 2 * q[i] * math.log(theta[i] / phi[i])
            + phi[j] * (l[i] - r[i] / r[j] * l[j])
            - q[i] * math.log(theta[i] + theta[j] * tau[j, i])
            + theta[j] * q[i] * (tau[j, i] / (theta[i] + theta[j] * tau[j, i]) - tau[i, j] / (theta[j] + theta[i] * tau[i, j]))
        )
    return out[0], out[1]


@pytest.mark.parametrize("x1", [0.05, 0.3, 0.62, 0.97])
def test_binary_nrtl_matches_closed_form(x1: float) -> None:
    b = np.array([[0.0, -120.0], [420.0, 0.0]])  # K, invented
    a = np.array([[0.0, 0.4], [-0.2, 0.0]])
    temperature, alpha = 351.0, 0.31
    model = NRTL(a, b, alpha=alpha)
    tau12, tau21 = 0.4 - 120.0 / temperature, -0.2 + 420.0 / temperature
    expected = binary_nrtl(x1, tau12, tau21, alpha)
    np.testing.assert_allclose(model.ln_gamma(np.array([temperature]), np.array([[x1, 1 - x1]]))[0], expected, rtol=1e-13)


def test_binary_nrtl_infinite_dilution() -> None:
    """ln gamma_1 at x_1 -> 0 is tau_21 + tau_12 exp(-alpha tau_12) (Renon and Prausnitz 1968)."""
    model = NRTL(np.zeros((2, 2)), np.array([[0.0, 300.0], [150.0, 0.0]]), alpha=0.3)
    temperature = 330.0
    tau12, tau21 = 300.0 / temperature, 150.0 / temperature
    ln_gamma = model.ln_gamma(np.array([temperature, temperature]), np.array([[0.0, 1.0], [1.0, 0.0]]))
    assert ln_gamma[0, 0] == pytest.approx(tau21 + tau12 * math.exp(-0.3 * tau12), rel=1e-13)
    assert ln_gamma[1, 1] == pytest.approx(tau12 + tau21 * math.exp(-0.3 * tau21), rel=1e-13)


@pytest.mark.parametrize("x1", [0.1, 0.45, 0.9])
def test_binary_wilson_matches_closed_form_and_energy_form(x1: float) -> None:
    volumes = np.array([4.07e-5, 1.81e-5])  # m3/mol, invented round numbers
    dlambda = np.array([[0.0, 1500.0], [-300.0, 0.0]])  # J/mol, invented
    temperature = 340.0
    model = Wilson(*wilson_energy_form(dlambda, volumes))
    lambda12 = volumes[1] / volumes[0] * math.exp(-1500.0 / (GAS_CONSTANT * temperature))
    lambda21 = volumes[0] / volumes[1] * math.exp(300.0 / (GAS_CONSTANT * temperature))
    expected = binary_wilson(x1, lambda12, lambda21)
    np.testing.assert_allclose(model.ln_gamma(np.array([temperature]), np.array([[x1, 1 - x1]]))[0], expected, rtol=1e-12)


def test_binary_wilson_infinite_dilution() -> None:
    """ln gamma_1 at x_1 -> 0 is 1 - ln Lambda_12 - Lambda_21 (Wilson 1964)."""
    model = Wilson(np.zeros((2, 2)), np.array([[0.0, -200.0], [100.0, 0.0]]))
    temperature = 310.0
    lambda12, lambda21 = math.exp(-200.0 / temperature), math.exp(100.0 / temperature)
    ln_gamma = model.ln_gamma(np.array([temperature]), np.array([[0.0, 1.0]]))
    assert ln_gamma[0, 0] == pytest.approx(1.0 - math.log(lambda12) - lambda21, rel=1e-13)


@pytest.mark.parametrize("x1", [0.08, 0.5, 0.85])
def test_binary_uniquac_matches_closed_form_and_energy_form(x1: float) -> None:
    r, q = (2.1, 0.92), (1.97, 1.4)  # invented
    du = np.array([[0.0, 2400.0], [-600.0, 0.0]])  # J/mol, invented
    temperature = 360.0
    model = UNIQUAC(*uniquac_energy_form(du), r=r, q=q)
    tau12 = math.exp(-2400.0 / (GAS_CONSTANT * temperature))
    tau21 = math.exp(600.0 / (GAS_CONSTANT * temperature))
    expected = binary_uniquac(x1, tau12, tau21, r, q)
    np.testing.assert_allclose(model.ln_gamma(np.array([temperature]), np.array([[x1, 1 - x1]]))[0], expected, rtol=1e-12)


def test_nrtl_energy_form_gives_tau_dg_over_rt() -> None:
    dg = np.array([[0.0, -250.0 * 4.184], [850.0 * 4.184, 0.0]])  # J/mol, invented
    a, b = nrtl_energy_form(dg)
    assert not np.any(a)
    np.testing.assert_allclose(b, dg / 8.31446261815324, rtol=1e-15)
    temperature, x1 = 345.0, 0.3
    expected = binary_nrtl(x1, dg[0, 1] / (GAS_CONSTANT * temperature), dg[1, 0] / (GAS_CONSTANT * temperature), 0.3)
    model = NRTL(a, b, alpha=0.3)
    np.testing.assert_allclose(model.ln_gamma(np.array([temperature]), np.array([[x1, 1 - x1]]))[0], expected, rtol=1e-13)


def test_energy_form_conversions_give_expected_matrices() -> None:
    du = np.array([[0.0, 100.0, 200.0], [300.0, 0.0, -50.0], [10.0, 20.0, 0.0]])
    a, b = uniquac_energy_form(du)
    assert not np.any(a)
    np.testing.assert_allclose(b, -du / 8.31446261815324, rtol=1e-15)
    a, b = wilson_energy_form(du, [1e-4, 5e-5, 2e-5])
    assert a[0, 1] == pytest.approx(math.log(0.5)) and a[2, 0] == pytest.approx(math.log(5.0))
    np.testing.assert_allclose(np.diag(a), 0.0, atol=0)
    np.testing.assert_allclose(b, -du / 8.31446261815324, rtol=1e-15)


def test_energy_forms_reject_a_nonzero_diagonal() -> None:
    with pytest.raises(CaseError, match="zero diagonal"):
        nrtl_energy_form([[1.0, 2.0], [3.0, 0.0]])
    with pytest.raises(CaseError, match="molar_volumes"):
        wilson_energy_form([[0.0, 2.0], [3.0, 0.0]], [1e-4, -1.0])


# --------------------------------------------------------------------------------------------
# array conventions and interface


@pytest.mark.parametrize("kind", MODEL_KINDS)
def test_stages_are_independent_and_results_do_not_alias_between_calls(kind: str) -> None:
    rng = np.random.default_rng(7)
    model = random_model(kind, 4, rng)
    temperature, x = random_states(rng, 9, 4, normalized=False)
    together = model.evaluate(temperature, x)
    kept = {name: np.copy(getattr(together, name)) for name in ActivityResult.__dataclass_fields__}
    for s in range(9):
        alone = model.evaluate(temperature[s : s + 1], x[s : s + 1])
        for name in ActivityResult.__dataclass_fields__:
            np.testing.assert_allclose(getattr(alone, name)[0], kept[name][s], rtol=1e-13, atol=1e-13)
    model.evaluate(temperature[::-1] + 5.0, x[::-1])
    for name in ActivityResult.__dataclass_fields__:
        np.testing.assert_array_equal(getattr(together, name), kept[name])
        assert getattr(together, name).shape[0] == 9


@pytest.mark.parametrize("kind", MODEL_KINDS)
def test_values_only_matches_full_evaluation(kind: str) -> None:
    rng = np.random.default_rng(3)
    model = random_model(kind, 3, rng)
    temperature, x = random_states(rng, 5, 3, normalized=True)
    full, values = model.evaluate(temperature, x), model.evaluate(temperature, x, derivatives=False)
    np.testing.assert_allclose(values.ln_gamma, full.ln_gamma, rtol=1e-14, atol=1e-15)
    np.testing.assert_allclose(values.excess_enthalpy, full.excess_enthalpy, rtol=1e-13, atol=1e-12)
    np.testing.assert_allclose(model.ln_gamma(temperature, x), full.ln_gamma, rtol=1e-14, atol=1e-15)
    assert values.d_ln_gamma_dx is None and values.d_ln_gamma_dT is None and values.d_excess_enthalpy_dT is None


def test_single_state_shapes() -> None:
    model = NRTL(np.zeros((3, 3)), _off_diagonal(np.random.default_rng(1), 3, -100.0, 600.0))
    one = model.evaluate(330.0, [0.2, 0.3, 0.5])
    assert one.ln_gamma.shape == (1, 3) and one.d_ln_gamma_dx.shape == (1, 3, 3) and one.excess_enthalpy.shape == (1,)
    same = model.evaluate(np.array([330.0]), np.array([[0.2, 0.3, 0.5]]))
    np.testing.assert_array_equal(one.ln_gamma, same.ln_gamma)


def test_bad_states_raise_thermo_error() -> None:
    model = Wilson(np.zeros((2, 2)), np.array([[0.0, 100.0], [-50.0, 0.0]]))
    with pytest.raises(ThermoError, match="shape"):
        model.evaluate(np.array([300.0, 310.0]), np.array([[0.5, 0.5]]))
    with pytest.raises(ThermoError, match="shape"):
        model.evaluate(np.array([300.0]), np.array([[0.2, 0.3, 0.5]]))
    with pytest.raises(ThermoError, match="positive"):
        model.evaluate(np.array([-1.0]), np.array([[0.5, 0.5]]))


def test_bad_parameters_raise_case_error() -> None:
    b = np.array([[0.0, 100.0], [-50.0, 0.0]])
    with pytest.raises(CaseError, match="zero diagonal"):
        NRTL(np.zeros((2, 2)), np.array([[1.0, 100.0], [-50.0, 0.0]]))
    with pytest.raises(CaseError, match="symmetric"):
        NRTL(np.zeros((2, 2)), b, alpha=np.array([[0.0, 0.3], [0.2, 0.0]]))
    with pytest.raises(CaseError, match="shape"):
        Wilson(np.zeros((2, 2)), np.zeros((3, 3)))
    with pytest.raises(CaseError, match="finite"):
        Wilson(np.zeros((2, 2)), np.array([[0.0, np.nan], [1.0, 0.0]]))
    with pytest.raises(CaseError, match="positive"):
        UNIQUAC(np.zeros((2, 2)), b, r=[1.0, 0.0], q=[1.0, 1.0])
    with pytest.raises(CaseError, match="positive whole number"):
        IdealSolution(0)


@pytest.mark.parametrize("kind", MODEL_KINDS)
def test_describe_is_json_and_rebuilds_the_model(kind: str) -> None:
    model = random_model(kind, 3, np.random.default_rng(5))
    text = json.dumps(model.describe())
    data = json.loads(text)
    assert data["model"] == model.name == kind and data["component_count"] == 3
    if kind == "ideal":
        return
    arguments = {key: np.array(data[key]) for key in TERMS}
    if kind == "nrtl":
        alpha = {key: data[key] for key in ("alpha", "alpha_slope", "alpha_reference_temperature")}
        rebuilt = NRTL(**arguments, **alpha)
    elif kind == "wilson":
        rebuilt = Wilson(**arguments)
    else:
        rebuilt = UNIQUAC(**arguments, r=data["r"], q=data["q"])
    temperature, x = random_states(np.random.default_rng(6), 3, 3, normalized=True)
    np.testing.assert_array_equal(rebuilt.ln_gamma(temperature, x), model.ln_gamma(temperature, x))


def test_nrtl_alpha_default_and_scalar() -> None:
    b = np.array([[0.0, 200.0], [400.0, 0.0]])
    default, given_scalar = NRTL(np.zeros((2, 2)), b), NRTL(np.zeros((2, 2)), b, alpha=0.3)
    assert default.describe()["alpha"] == [[0.0, 0.3], [0.3, 0.0]]
    state = (np.array([330.0]), np.array([[0.4, 0.6]]))
    np.testing.assert_array_equal(default.ln_gamma(*state), given_scalar.ln_gamma(*state))
    np.testing.assert_allclose(default.ln_gamma(*state)[0], binary_nrtl(0.4, 200 / 330, 400 / 330, 0.3), rtol=1e-13)


def test_nrtl_alpha_temperature_dependence_is_about_the_stated_reference() -> None:
    b = np.array([[0.0, 200.0], [400.0, 0.0]])
    temperature = 350.0
    model = NRTL(np.zeros((2, 2)), b, alpha=0.3, alpha_slope=2e-3, alpha_reference_temperature=320.0)
    alpha = 0.3 + 2e-3 * (temperature - 320.0)
    expected = binary_nrtl(0.4, 200 / temperature, 400 / temperature, alpha)
    np.testing.assert_allclose(model.ln_gamma(np.array([temperature]), np.array([[0.4, 0.6]]))[0], expected, rtol=1e-13)
    # the same straight line stated about another temperature is the same model
    moved = NRTL(np.zeros((2, 2)), b, alpha=0.3 + 2e-3 * (400.0 - 320.0), alpha_slope=2e-3, alpha_reference_temperature=400.0)
    state = (np.array([300.0, 350.0, 420.0]), np.array([[0.4, 0.6], [0.1, 0.9], [0.7, 0.3]]))
    np.testing.assert_allclose(moved.ln_gamma(*state), model.ln_gamma(*state), rtol=1e-13)


def test_nrtl_alpha_slope_needs_its_reference_temperature() -> None:
    b = np.array([[0.0, 200.0], [400.0, 0.0]])
    with pytest.raises(CaseError, match="alpha_reference_temperature"):
        NRTL(np.zeros((2, 2)), b, alpha=0.3, alpha_slope=2e-3)
