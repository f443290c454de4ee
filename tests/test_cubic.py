"""Tests of solver.thermo.cubic and solver.thermo.cubic_roots: the critical conditions behind
Omega_a and Omega_b, the root finder against numpy.roots, every analytic derivative against
central finite differences, Gibbs-Duhem and Euler identities, the Peneloux shift (volumes move,
K-values do not), limits, input errors and describe().

Mixtures here are invented (random constants of light-hydrocarbon size); the comparisons with
independent implementations and with data are in tests/reference/test_cubic_reference.py."""

from __future__ import annotations

import numpy as np
import pytest

from solver.errors import CaseError, ThermoError
from solver.thermo.cubic import (
    CUBIC_FORMS,
    GAS_CONSTANT,
    CubicParameters,
    cubic_k_values,
    cubic_phase,
    cubic_phase_enthalpy,
    cubic_stage_properties,
    peneloux_volume_shift,
)
from solver.thermo.cubic_roots import cubic_real_roots, phase_roots

VARIANTS = tuple(CUBIC_FORMS)


def random_parameters(rng: np.random.Generator, c: int, variant: str, shift: bool = False) -> CubicParameters:
    tc = rng.uniform(190.0, 620.0, c)
    pc = rng.uniform(2.0e6, 5.0e6, c)
    omega = rng.uniform(0.0, 0.65, c)  # both branches of the Peng-Robinson m(omega)
    k = np.triu(rng.uniform(-0.05, 0.1, (c, c)), 1)
    volume_shift = rng.uniform(-5e-6, 1e-5, c) if shift else None
    return CubicParameters(tuple(f"c{i}" for i in range(c)), tc, pc, omega, variant, k + k.T, volume_shift)


def random_states(rng: np.random.Generator, parameters: CubicParameters, n: int):
    T = rng.uniform(0.55, 1.1, n) * np.mean(parameters.critical_temperature)
    P = rng.uniform(5e4, 4e6, n)
    x = rng.dirichlet(np.ones(parameters.component_count), n)
    return T, P, x


# ----------------------------------------------------------------------------- constants


@pytest.mark.parametrize("variant", VARIANTS)
def test_omega_constants_meet_the_critical_conditions(variant):
    """At Tc the pressure-explicit equation has dP/dv = d2P/dv2 = 0 and P = Pc at one volume
    (the definition of Omega_a, Omega_b in Peng & Robinson 1976 and Soave 1972)."""
    form = CUBIC_FORMS[variant]
    tc, pc, R = 400.0, 4.0e6, GAS_CONSTANT
    a, b = form.omega_a * (R * tc) ** 2 / pc, form.omega_b * R * tc / pc
    d1, d2 = form.delta1, form.delta2

    def derivatives(v):
        g = (v + d1 * b) * (v + d2 * b)
        dg, d2g = 2 * v + (d1 + d2) * b, 2.0
        p = R * tc / (v - b) - a / g
        dp = -R * tc / (v - b) ** 2 + a * dg / g**2
        ddp = 2 * R * tc / (v - b) ** 3 + a * (d2g * g - 2 * dg**2) / g**3
        return p, dp, ddp

    # the critical volume is the root of d2P/dv2 = 0 between 2b and 6b
    from scipy.optimize import brentq

    vc = brentq(lambda v: derivatives(v)[2], 2.0 * b, 6.0 * b, xtol=1e-20)
    p, dp, _ = derivatives(vc)
    assert p == pytest.approx(pc, rel=1e-12)
    assert abs(dp) * vc / pc < 1e-10
    z_c = pc * vc / (R * tc)
    expected = {"peng-robinson": 0.307401308698, "soave-redlich-kwong": 1.0 / 3.0}[variant]  # from memory
    assert z_c == pytest.approx(expected, rel=1e-9)


def test_peng_robinson_m_switches_to_the_1978_form_above_omega_0491():
    names = ("light", "heavy")
    par = CubicParameters(names, [400.0, 600.0], [4e6, 2e6], [0.3, 0.6], "peng-robinson")
    m = [component["m"] for component in par.describe()["components"]]
    assert m[0] == pytest.approx(0.37464 + 1.54226 * 0.3 - 0.26992 * 0.09, rel=1e-15)
    assert m[1] == pytest.approx(0.379642 + 1.48503 * 0.6 - 0.164423 * 0.36 + 0.016666 * 0.216, rel=1e-15)


# ----------------------------------------------------------------------------- roots


def test_cubic_roots_match_numpy_roots():
    rng = np.random.default_rng(3)
    three = np.sort(rng.uniform(-2.0, 3.0, (500, 3)), axis=1)  # three real roots
    c2 = -three.sum(axis=1)
    c1 = three[:, 0] * three[:, 1] + three[:, 0] * three[:, 2] + three[:, 1] * three[:, 2]
    c0 = -three.prod(axis=1)
    largest, middle, smallest, single = cubic_real_roots(c2, c1, c0)
    assert not single.any()
    scale = np.abs(three).max(axis=1)
    for ours, column in ((largest, 2), (middle, 1), (smallest, 0)):
        gap = np.minimum(np.abs(three[:, column] - three[:, column - 1]), np.abs(three[:, column] - three[:, (column + 1) % 3]))
        # the closed form loses digits only where two roots nearly coincide
        ok = gap > 1e-3 * scale
        assert np.max(np.abs(ours - three[:, column])[ok] / scale[ok]) < 1e-10

    # one real root: (Z - r)(Z^2 + s Z + t) with s^2 < 4t
    r, s = rng.uniform(-2.0, 2.0, 500), rng.uniform(-1.0, 1.0, 500)
    t = s**2 / 4.0 + rng.uniform(0.01, 2.0, 500)
    largest, middle, smallest, single = cubic_real_roots(s - r, t - r * s, -r * t)
    assert single.all()
    assert np.allclose(largest, r, rtol=0.0, atol=1e-12) and np.array_equal(largest, smallest)
    for row in range(20):
        real = [z.real for z in np.roots([1.0, s[row] - r[row], t[row] - r[row] * s[row], -r[row] * t[row]]) if abs(z.imag) < 1e-9]
        assert real == [pytest.approx(r[row], abs=1e-10)]


def test_phase_roots_pick_the_smallest_root_above_the_covolume_for_the_liquid():
    # roots 0.01, 0.05 and 0.9 with B = 0.02: the liquid takes 0.05, the vapor 0.9
    roots = np.array([0.01, 0.05, 0.9])
    c2, c1, c0 = -roots.sum(), roots[0] * roots[1] + roots[0] * roots[2] + roots[1] * roots[2], -roots.prod()
    chosen = phase_roots(np.array([c2, c2]), np.array([c1, c1]), np.array([c0, c0]), np.array([0.02, 0.005]))
    assert chosen.liquid == pytest.approx([0.05, 0.01], rel=1e-12)
    assert chosen.vapor == pytest.approx([0.9, 0.9], rel=1e-12)
    assert not chosen.single_root.any()


# ----------------------------------------------------------------------------- derivatives


def _central(function, value, step):
    return (function(value + step) - function(value - step)) / (2.0 * step)


@pytest.mark.parametrize("variant", VARIANTS)
@pytest.mark.parametrize("phase", ["liquid", "vapor"])
@pytest.mark.parametrize("seed", [0, 1, 2])
def test_analytic_derivatives_match_central_differences(variant, phase, seed):
    rng = np.random.default_rng(seed)
    c = 4
    par = random_parameters(rng, c, variant, shift=seed == 2)
    T, P, x = random_states(rng, par, 30)
    x = x * rng.uniform(0.8, 1.2, (30, 1))  # off the simplex: a function of x / sum(x)
    base = cubic_phase(par, T, P, x, phase)

    def value(T_, P_, x_):
        result = cubic_phase(par, T_, P_, x_, phase, derivatives=False)
        return result.ln_phi, result.departure_enthalpy, result.single_root

    h_T, h_P, h_x = 1e-5 * T, 1e-6 * P, 1e-5

    def stencil(shifted):
        """Fourth-order central difference (states near a spinodal have large higher derivatives);
        the single-root flag must not change across the stencil."""
        points = [value(*shifted(s)) for s in (-2, -1, 1, 2)]
        same = np.all([p[2] == base.single_root for p in points], axis=0)
        return [(points[0][j] - 8 * points[1][j] + 8 * points[2][j] - points[3][j]) / 12.0 for j in (0, 1)], same

    (fd_T, fd_hT), keep = stencil(lambda s: (T + s * h_T, P, x))
    (fd_P, _), same = stencil(lambda s: (T, P + s * h_P, x))
    keep &= same
    assert keep.sum() >= 25
    assert np.allclose(base.d_ln_phi_dT[keep], (fd_T / h_T[:, None])[keep], rtol=1e-6, atol=1e-10)
    assert np.allclose(base.d_departure_dT[keep], (fd_hT / h_T)[keep], rtol=1e-6, atol=1e-6)
    assert np.allclose(base.d_ln_phi_dP[keep], (fd_P / h_P[:, None])[keep], rtol=1e-6, atol=1e-15)

    for k in range(c):
        dx = np.zeros_like(x)
        dx[:, k] = h_x
        (fd, fd_h), same = stencil(lambda s: (T, P, x + s * dx))
        assert np.all(same[keep])
        assert np.allclose(base.d_ln_phi_dx[keep, :, k], fd[keep] / h_x, rtol=1e-6, atol=1e-9)
        assert np.allclose(base.d_departure_dx[keep, k], fd_h[keep] / h_x, rtol=1e-6, atol=1e-5)


@pytest.mark.parametrize("variant", VARIANTS)
def test_gibbs_duhem_symmetry_and_euler(variant):
    """sum_i x_i d ln phi_i/dx_k = 0 (Gibbs-Duhem at fixed T, P), d ln phi_i/dx_k symmetric on
    the simplex (a Hessian of n G^R/RT), and sum_k x_k dH^R/dx_k = H^R (Euler)."""
    rng = np.random.default_rng(11)
    par = random_parameters(rng, 5, variant)
    T, P, x = random_states(rng, par, 40)
    for phase in ("liquid", "vapor"):
        result = cubic_phase(par, T, P, x, phase)
        assert np.abs(np.einsum("ni,nik->nk", x, result.d_ln_phi_dx)).max() < 1e-11
        assert np.allclose(result.d_ln_phi_dx, result.d_ln_phi_dx.transpose(0, 2, 1), rtol=1e-9, atol=1e-12)
        euler = np.einsum("nk,nk->n", x, result.d_departure_dx)
        assert np.allclose(euler, result.departure_enthalpy, rtol=1e-10, atol=1e-8)


def test_k_value_derivatives_in_liquid_and_vapor_compositions():
    rng = np.random.default_rng(5)
    par = random_parameters(rng, 3, "peng-robinson")
    T, P, x = random_states(rng, par, 20)
    y = rng.dirichlet(np.ones(3), 20)
    k = cubic_k_values(par, T, P, x, y)
    liquid = cubic_phase(par, T, P, x, "liquid")
    vapor = cubic_phase(par, T, P, y, "vapor")
    assert np.allclose(np.log(k.K), liquid.ln_phi - vapor.ln_phi, rtol=1e-13, atol=1e-13)
    h = 1e-6
    for j in range(3):
        dy = np.zeros_like(y)
        dy[:, j] = h
        fd = (np.log(cubic_k_values(par, T, P, x, y + dy, False).K) - np.log(cubic_k_values(par, T, P, x, y - dy, False).K)) / (2 * h)
        assert np.allclose(k.d_ln_K_dy[:, :, j], fd, rtol=1e-6, atol=1e-8)
        fd = (np.log(cubic_k_values(par, T, P, x + dy, y, False).K) - np.log(cubic_k_values(par, T, P, x - dy, y, False).K)) / (2 * h)
        assert np.allclose(k.d_ln_K_dx[:, :, j], fd, rtol=1e-6, atol=1e-8)
    fd = (np.log(cubic_k_values(par, T + 1e-3, P, x, y, False).K) - np.log(cubic_k_values(par, T - 1e-3, P, x, y, False).K)) / 2e-3
    assert np.allclose(k.d_ln_K_dT, fd, rtol=1e-6, atol=1e-9)


# ----------------------------------------------------------------------------- Peneloux


@pytest.mark.parametrize("variant", VARIANTS)
def test_peneloux_shift_moves_volumes_not_equilibria(variant):
    rng = np.random.default_rng(21)
    par = random_parameters(rng, 4, variant)
    shift = rng.uniform(-5e-6, 2e-5, 4)
    shifted = par.with_volume_shift(shift, "invented for the test")
    T, P, x = random_states(rng, par, 25)
    y = rng.dirichlet(np.ones(4), 25)
    plain, moved = cubic_k_values(par, T, P, x, y), cubic_k_values(shifted, T, P, x, y)
    assert np.allclose(moved.K, plain.K, rtol=1e-13, atol=0.0)
    assert np.allclose(moved.d_ln_K_dT, plain.d_ln_K_dT, rtol=1e-10, atol=1e-15)
    assert np.allclose(moved.d_ln_K_dP, plain.d_ln_K_dP, rtol=1e-10, atol=1e-18)
    for ours, theirs, composition in ((moved.liquid, plain.liquid, x), (moved.vapor, plain.vapor, y)):
        assert np.array_equal(ours.Z, theirs.Z)
        assert np.allclose(theirs.molar_volume - ours.molar_volume, composition @ shift, rtol=1e-9, atol=0.0)
        assert np.allclose(theirs.ln_phi - ours.ln_phi, shift * (P / (GAS_CONSTANT * T))[:, None], rtol=1e-9, atol=1e-15)
        assert np.allclose(theirs.departure_enthalpy - ours.departure_enthalpy, P * (composition @ shift), rtol=1e-8)
        assert np.allclose(ours.d_departure_dT, theirs.d_departure_dT, rtol=1e-12)


def test_peneloux_correlation_for_soave_redlich_kwong():
    # propane with Z_RA = 0.2766 (Spencer & Danner 1972, from memory): c = 0.40768 R Tc/Pc (0.29441 - Z_RA)
    c = peneloux_volume_shift(369.83, 4.248e6, 0.2766)
    assert c == pytest.approx(0.40768 * GAS_CONSTANT * 369.83 / 4.248e6 * (0.29441 - 0.2766), rel=1e-14)
    assert 4e-6 < c < 6e-6  # a few cm3/mol, the size Peneloux et al. report for light alkanes


# ----------------------------------------------------------------------------- limits and flags


@pytest.mark.parametrize("variant", VARIANTS)
def test_ideal_gas_limit(variant):
    rng = np.random.default_rng(8)
    par = random_parameters(rng, 3, variant)
    T = np.full(5, 400.0)
    x = rng.dirichlet(np.ones(3), 5)
    vapor = cubic_phase(par, T, np.full(5, 1.0), x, "vapor")
    assert np.allclose(vapor.Z, 1.0, atol=1e-5)
    assert np.abs(vapor.ln_phi).max() < 1e-5
    assert np.abs(vapor.departure_enthalpy).max() < 0.05
    assert np.allclose(vapor.molar_volume, GAS_CONSTANT * T, rtol=1e-5)


def test_single_root_is_flagged_and_both_phases_get_it():
    par = CubicParameters(("a", "b"), [300.0, 350.0], [4e6, 4e6], [0.1, 0.2])
    T = np.array([250.0, 500.0])  # subcritical two-root region, then supercritical
    P = np.array([5e5, 5e6])
    x = np.array([[0.5, 0.5], [0.5, 0.5]])
    k = cubic_k_values(par, T, P, x, x)
    assert k.liquid.single_root.tolist() == [False, True]
    assert k.liquid.Z[0] < 0.1 < 0.8 < k.vapor.Z[0]
    assert k.liquid.Z[1] == k.vapor.Z[1]
    assert np.allclose(k.K[1], 1.0, rtol=1e-14)


# ----------------------------------------------------------------------------- enthalpy


def test_stage_properties_combine_ideal_gas_and_departure():
    rng = np.random.default_rng(13)
    par = random_parameters(rng, 3, "peng-robinson")
    T, P, x = random_states(rng, par, 10)
    y = rng.dirichlet(np.ones(3), 10)
    cp = np.array([70.0, 90.0, 110.0])

    def ideal_gas(temperature):
        return (temperature[:, None] - 298.15) * cp, np.broadcast_to(cp, (temperature.shape[0], 3))

    stage = cubic_stage_properties(par, T, P, x, y, ideal_gas)
    vapor = cubic_phase(par, T, P, y, "vapor")
    assert np.allclose(stage.vapor.molar, y @ cp * (T - 298.15) + vapor.departure_enthalpy, rtol=1e-12)
    assert np.allclose(stage.vapor.d_dT, y @ cp + vapor.d_departure_dT, rtol=1e-12)
    liquid = cubic_phase_enthalpy(cubic_phase(par, T, P, x, "liquid"), x, ideal_gas(T))
    assert np.allclose(stage.liquid.molar, liquid.molar, rtol=1e-12)
    assert np.allclose(stage.liquid.d_dx, liquid.d_dx, rtol=1e-12)
    # liquid below the vapor by roughly a heat of vaporization where both roots exist
    two = ~stage.k_values.liquid.single_root
    assert np.all(stage.liquid.departure[two] < stage.vapor.departure[two])


# ----------------------------------------------------------------------------- input and description


def test_bad_parameters_raise_case_errors_naming_the_key():
    with pytest.raises(CaseError, match="unknown cubic equation of state.*peng-robinson or soave-redlich-kwong"):
        CubicParameters(("a",), [300.0], [4e6], [0.1], "van-der-waals")
    with pytest.raises(CaseError, match="symmetric"):
        CubicParameters(("a", "b"), [300.0, 350.0], [4e6, 4e6], [0.1, 0.2], interaction=[[0.0, 0.01], [0.02, 0.0]])
    with pytest.raises(CaseError, match="critical_pressure"):
        CubicParameters(("a", "b"), [300.0, 350.0], [4e6, -1.0], [0.1, 0.2])
    par = CubicParameters(("a", "b"), [300.0, 350.0], [4e6, 4e6], [0.1, 0.2])
    with pytest.raises(ThermoError, match=r"shape \(n, 2\)"):
        cubic_phase(par, 300.0, 1e5, [[0.2, 0.3, 0.5]], "liquid")
    with pytest.raises(ThermoError, match="phase must be"):
        cubic_phase(par, 300.0, 1e5, [0.5, 0.5], "solid")


def test_describe_names_every_parameter_and_its_source():
    par = CubicParameters(
        ("propane", "n-butane"), [369.89, 425.125], [4.2512e6, 3.796e6], [0.1521, 0.2008],
        interaction=[[0.0, 0.003], [0.003, 0.0]],
        constant_sources=("source one", "source two"),
        interaction_sources={"n-butane/propane": "a table"},
    )
    text = par.describe()
    assert text["model"] == "peng-robinson" and "Peng and D. B. Robinson" in text["source"]
    assert [c["source"] for c in text["components"]] == ["source one", "source two"]
    assert text["components"][1]["critical_pressure_Pa"] == 3.796e6
    assert text["interaction"] == [{"i": "propane", "j": "n-butane", "k_ij": 0.003, "source": "a table"}]
    assert text["volume_shift"] is None
    assert text["omega_a"] == CUBIC_FORMS["peng-robinson"].omega_a


def test_parameters_pickle_for_worker_processes():
    import pickle

    rng = np.random.default_rng(17)
    par = random_parameters(rng, 3, "peng-robinson", shift=True)
    T, P, x = random_states(rng, par, 6)
    copy = pickle.loads(pickle.dumps(par))
    assert copy.describe() == par.describe()
    assert np.array_equal(cubic_phase(copy, T, P, x, "liquid").d_ln_phi_dx, cubic_phase(par, T, P, x, "liquid").d_ln_phi_dx)
