"""Tests of solver.thermo.unifac and solver.thermo.unifac_tables: analytic derivatives against
central finite differences (x, T, excess enthalpy) for both variants, Gibbs-Duhem, symmetry,
homogeneity off the simplex, infinite dilution, the shipped tables, the group input and its
errors. Outside checks (published examples, an independent implementation, handbook data) are
in tests/reference/test_unifac_reference.py."""

from __future__ import annotations

import json
import pickle
from pathlib import Path

import numpy as np
import pytest

from solver.errors import CaseError, ThermoError
from solver.thermo.activity import GAS_CONSTANT, ActivityResult
from solver.thermo.unifac import UNIFAC, DortmundUNIFAC
from solver.thermo.unifac_tables import builtin_components, builtin_groups, load_tables

DATA = Path(__file__).resolve().parent.parent / "solver" / "thermo" / "data"
MODELS = (UNIFAC, DortmundUNIFAC)
EIGHT = ["methanol", "ethanol", "water", "acetone", "benzene", "toluene", "n-heptane", "n-hexane"]
MIXTURES = [
    EIGHT,
    ["2-propanol", "water", "ethyl acetate"],
    ["chloroform", "acetone", "methanol", "cyclohexane"],
    ["acetic acid", "water", "2-butanone", "tetrahydrofuran", "1-butanol"],
]


def _states(rng: np.random.Generator, c: int, n: int = 6, off_simplex: bool = True):
    x = rng.dirichlet(np.ones(c), n)
    if off_simplex:
        x *= rng.uniform(0.5, 2.0, (n, 1))
    return rng.uniform(290.0, 420.0, n), x


@pytest.mark.parametrize("cls", MODELS)
@pytest.mark.parametrize("names", MIXTURES, ids=lambda names: f"{len(names)}c")
def test_derivatives_match_central_differences(cls, names):
    model = cls.from_components(names)
    rng = np.random.default_rng(len(names))
    T, x = _states(rng, len(names))
    result = model.evaluate(T, x)
    c = len(names)
    h = 1e-6
    numeric_dx = np.empty((len(T), c, c))
    numeric_h_dx = np.empty((len(T), c))
    for k in range(c):
        step = np.zeros(c)
        step[k] = h
        plus, minus = model.evaluate(T, x + step, False), model.evaluate(T, x - step, False)
        numeric_dx[:, :, k] = (plus.ln_gamma - minus.ln_gamma) / (2 * h)
        numeric_h_dx[:, k] = (plus.excess_enthalpy - minus.excess_enthalpy) / (2 * h)
    dT = 1e-3
    plus, minus = model.evaluate(T + dT, x, False), model.evaluate(T - dT, x, False)
    np.testing.assert_allclose(result.d_ln_gamma_dx, numeric_dx, rtol=1e-6, atol=1e-8)
    np.testing.assert_allclose(result.d_ln_gamma_dT, (plus.ln_gamma - minus.ln_gamma) / (2 * dT), rtol=1e-6, atol=1e-11)
    np.testing.assert_allclose(
        result.d_excess_enthalpy_dT, (plus.excess_enthalpy - minus.excess_enthalpy) / (2 * dT), rtol=1e-6, atol=1e-7
    )
    np.testing.assert_allclose(result.d_excess_enthalpy_dx, numeric_h_dx, rtol=1e-6, atol=1e-5)


@pytest.mark.parametrize("cls", MODELS)
def test_gibbs_duhem_symmetry_and_homogeneity(cls):
    model = cls.from_components(EIGHT)
    T, x = _states(np.random.default_rng(3), 8, n=10)
    result = model.evaluate(T, x)
    # sum_i x_i d ln gamma_i / d x_k = 0 for any x (Gibbs-Duhem), off the simplex too
    assert np.abs(np.einsum("si,sik->sk", x, result.d_ln_gamma_dx)).max() < 1e-12
    # the Hessian of n g^E / RT is symmetric
    np.testing.assert_allclose(result.d_ln_gamma_dx, result.d_ln_gamma_dx.transpose(0, 2, 1), atol=1e-12)
    # ln gamma of x and of x / sum(x) agree (degree zero); h^E scales with sum(x) (degree one)
    normalized = model.evaluate(T, x / x.sum(axis=1, keepdims=True))
    np.testing.assert_allclose(result.ln_gamma, normalized.ln_gamma, rtol=1e-13, atol=1e-14)
    np.testing.assert_allclose(result.excess_enthalpy, normalized.excess_enthalpy * x.sum(axis=1), rtol=1e-12)
    # Gibbs-Helmholtz as stated
    expected = -GAS_CONSTANT * T**2 * np.einsum("si,si->s", x, result.d_ln_gamma_dT)
    np.testing.assert_allclose(result.excess_enthalpy, expected, rtol=1e-14)


@pytest.mark.parametrize("cls", MODELS)
def test_pure_components_and_infinite_dilution(cls):
    model = cls.from_components(["ethanol", "water", "benzene"])
    T = np.full(3, 340.0)
    pure = model.evaluate(T, np.eye(3))
    # a pure liquid is its own reference: ln gamma_i = 0 and no heat of mixing
    assert np.abs(np.diag(pure.ln_gamma)).max() < 1e-13
    assert np.abs(pure.excess_enthalpy).max() < 1e-9
    # x_i = 0 is no special case: the limit of small x_i
    x0 = np.array([[0.0, 0.6, 0.4]])
    small = np.array([[1e-9, 0.6, 0.4]])
    np.testing.assert_allclose(model.ln_gamma(340.0, x0), model.ln_gamma(340.0, small), rtol=1e-6)
    assert np.all(np.isfinite(model.evaluate(340.0, x0).d_ln_gamma_dx))


def test_original_has_no_heat_of_mixing_from_temperature_terms_but_dortmund_does():
    # original UNIFAC's Psi = exp(-a/T) still gives h^E; Dortmund adds b and c terms
    original = UNIFAC.from_components(["ethanol", "water"])
    dortmund = DortmundUNIFAC.from_components(["ethanol", "water"])
    description = dortmund.describe()
    assert any(entry["b"] != 0.0 or entry["c"] != 0.0 for entry in description["interactions"])
    assert all(entry["b"] == 0.0 and entry["c"] == 0.0 for entry in original.describe()["interactions"])
    x = np.array([[0.5, 0.5]])
    assert original.evaluate(298.15, x).excess_enthalpy[0] != dortmund.evaluate(298.15, x).excess_enthalpy[0]


def test_vectorized_matches_state_by_state_and_result_types():
    model = DortmundUNIFAC.from_components(EIGHT)
    T, x = _states(np.random.default_rng(11), 8, n=7, off_simplex=False)
    together = model.evaluate(T, x)
    assert isinstance(together, ActivityResult)
    assert together.ln_gamma.shape == (7, 8) and together.d_ln_gamma_dx.shape == (7, 8, 8)
    assert together.excess_enthalpy.shape == (7,) and together.d_excess_enthalpy_dx.shape == (7, 8)
    for s in range(7):
        alone = model.evaluate(T[s], x[s])
        np.testing.assert_allclose(alone.ln_gamma[0], together.ln_gamma[s], rtol=1e-14, atol=1e-15)
        np.testing.assert_allclose(alone.d_ln_gamma_dx[0], together.d_ln_gamma_dx[s], rtol=1e-12, atol=1e-13)
    no_derivatives = model.evaluate(T, x, derivatives=False)
    assert no_derivatives.d_ln_gamma_dx is None and no_derivatives.d_excess_enthalpy_dT is None
    np.testing.assert_array_equal(no_derivatives.ln_gamma, together.ln_gamma)
    np.testing.assert_array_equal(model.ln_gamma(T, x), together.ln_gamma)
    clone = pickle.loads(pickle.dumps(model))
    np.testing.assert_array_equal(clone.ln_gamma(T, x), together.ln_gamma)


def test_bad_states_raise_thermo_error():
    model = UNIFAC.from_components(["ethanol", "water"])
    with pytest.raises(ThermoError, match="shape"):
        model.evaluate(np.array([300.0, 310.0]), np.array([[0.5, 0.5]]))
    with pytest.raises(ThermoError, match="positive"):
        model.evaluate(np.array([-1.0]), np.array([[0.5, 0.5]]))


# ------------------------------------------------------------------------------ tables, groups


@pytest.mark.parametrize("variant", ["original", "dortmund"])
def test_shipped_tables_are_complete_and_name_their_sources(variant):
    raw = json.loads((DATA / f"unifac_{variant}.json").read_text())
    assert raw["sources"]["subgroups"] and raw["sources"]["interactions"] and raw["model_source"]
    tables = load_tables(variant)
    names = [s.name for s in tables.subgroups.values()]
    assert len(names) == len(set(names)) > 100
    for (m, n), terms in tables.interactions.items():
        assert m != n and str(m) in raw["main_groups"] and str(n) in raw["main_groups"] and len(terms) == 3
    # a few published values (Hansen et al. 1991, Table 1 and 2; Gmehling, Li & Schiller 1993)
    if variant == "original":
        assert (tables.subgroup("CH3").volume, tables.subgroup("CH3").area) == (0.9011, 0.848)
        assert tables.subgroup("H2O").area == 1.4
        assert tables.interaction(1, 7) == (1318.0, 0.0, 0.0)  # CH2 - H2O (Hansen et al. 1991, from memory)
        assert tables.interaction(7, 1) == (300.0, 0.0, 0.0)
    else:
        assert (tables.subgroup("CH3").volume, tables.subgroup("CH3").area) == (0.6325, 1.0608)
        assert tables.interaction(1, 2) == (189.66, -0.2723, 0.0)


def test_group_names_numbers_case_and_errors():
    tables = load_tables("original")
    assert tables.subgroup("ch3co") is tables.subgroup(18) is tables.subgroup("18")
    assert tables.subgroup("HCO").main_group == 10 and tables.subgroup("CHO").main_group == 13
    with pytest.raises(CaseError) as error:
        UNIFAC([{"CH3": 1, "CH2": 1, "OHH": 1}, {"H2O": 1}], component_names=["ethanol", "water"])
    message = str(error.value)
    assert "'OHH'" in message and "OH" in message and "ethanol" in message
    with pytest.raises(CaseError, match="number"):
        UNIFAC([{9999: 1}])
    with pytest.raises(CaseError, match="positive whole number"):
        UNIFAC([{"CH3": 1.5}])
    with pytest.raises(CaseError, match="positive whole number"):
        UNIFAC([{"CH3": 0}])
    with pytest.raises(CaseError, match="table of subgroup"):
        UNIFAC([{}])
    with pytest.raises(CaseError, match="OH\\(P\\)"):
        DortmundUNIFAC([{"CH3": 1, "CH2": 1, "OHP": 1}])


def test_missing_interaction_parameters_are_an_error_not_zero():
    # original UNIFAC has no published CNH - CCl3 pair (Resa et al., J. Chem. Eng. Data 45
    # (2000) 867, note this gap after the Hansen et al. 1991 revision)
    tables = load_tables("original")
    assert tables.interaction(15, 23) is None
    with pytest.raises(CaseError, match="no published interaction parameters"):
        UNIFAC([{"CH3": 2, "CH2NH": 1, "CH2": 1}, {"CH3": 1, "CCL3": 1}])


def test_from_components_uses_builtin_groups_and_user_groups_override():
    model = UNIFAC.from_components(["Ethanol", "WATER"])
    assert model.groups() == [{"CH3": 1, "CH2": 1, "OH": 1}, {"H2O": 1}]
    assert DortmundUNIFAC.from_components(["isopropanol"]).groups() == [{"CH3": 2, "CH": 1, "OH(S)": 1}]
    assert builtin_groups("67-64-1", "original") == {"CH3": 1, "CH3CO": 1}
    assert len(builtin_components()) >= 30
    custom = UNIFAC.from_components(["solventX", "water"], {"SolventX": {"CH3": 2, "CH2": 2}})
    assert custom.groups()[0] == {"CH3": 2, "CH2": 2}
    with pytest.raises(CaseError, match="no built-in original UNIFAC groups for component 'unobtainium'"):
        UNIFAC.from_components(["unobtainium", "water"])


def test_describe_has_everything_to_recheck():
    model = DortmundUNIFAC.from_components(["acetone", "chloroform"])
    description = json.loads(json.dumps(model.describe()))
    assert description["model"] == "unifac-dortmund" and description["components"] == ["acetone", "chloroform"]
    assert description["groups"] == [{"CH3": 1, "CH3CO": 1}, {"CHCL3": 1}]
    assert {s["name"] for s in description["subgroups"]} == {"CH3", "CH3CO", "CHCL3"}
    pairs = {tuple(entry["main_groups"]) for entry in description["interactions"]}
    assert pairs == {(1, 9), (9, 1), (1, 45), (45, 1), (9, 45), (45, 9)}
    assert "Weidlich" in description["source"] and description["parameter_sources"]["subgroups"]
    # r_i = sum_k nu_ki R_k with the Dortmund R of CH3, CH3CO and CHCl3
    np.testing.assert_allclose(description["r"], [0.6325 + 1.7048, 2.45], rtol=1e-12)
