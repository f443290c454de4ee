"""Every MESH equation of two converged columns, re-checked from the result.json document alone.

The document is ``json.loads(result.to_json())``. Nothing else of traystack is used after the
solve: the properties are recomputed here from outside sources and our own code.

* Vapor pressure ``Psat_i(T)`` and heat of vaporization ``dH_vap,i(T) = h_satV - h_satL``: CoolProp
  8 ``AbstractState("HEOS", fluid)`` directly, with the reference equations of state (Bell,
  Wronski, Quoilin & Lemort, Ind. Eng. Chem. Res. 53 (2014) 2498). traystack itself uses
  Chebyshev fits of these curves.
* Ideal-gas enthalpy ``h_ig,i(T)``: CoolProp's ``cp0molar`` integrated from 298.15 K with
  ``scipy.integrate.quad`` (ideal gas at 298.15 K = 0).
* Activity coefficients and excess enthalpy: the independent implementation in the ``thermo``
  package (Caleb Bell, version 0.6.1 as installed), ``thermo.nrtl.NRTL`` and
  ``thermo.wilson.Wilson``. Only its model equations are used, with the parameters read from
  the document. None of its data tables are used.
* Energy-form parameters as written in the case (``dg``, ``dlambda`` in cal/mol) are converted
  here with the thermochemical calorie (4.184 J) and R = 8.31446261815324 J/(mol K) (CODATA 2018, exact).

Conventions of thermo (from its source, ``thermo/nrtl.py`` and ``thermo/wilson.py``):
``tau_ij = A + B/T + E ln T + F T`` and ``alpha_ij = c + d T`` for NRTL, and ``Lambda_ij =
exp(a + b/T + c ln T + d T)`` for Wilson, indexed [i][j]. traystack writes ``p_ij =
constant_term + term_over_temperature/T + term_in_ln_temperature ln T + term_times_temperature T``
(here a, b, e, f) and ``alpha = alpha + alpha_slope (T - alpha_reference_temperature)``.

Model equations re-checked, for stages numbered from the top:
  component balance  (L_j + U_j) x_j + (V_j + W_j) y_j - L_(j-1) x_(j-1) - V_(j+1) y_(j+1) - F_j z_j = 0
  Murphree relation  y_j = E_j K_j x_j + (1 - E_j) y_(j+1),  K = gamma Psat / P
  summation          sum x = sum y = 1, sum (E K x + (1 - E) y_in) = 1
  enthalpy balance   (L_j + U_j) h_L,j + (V_j + W_j) h_V,j - L_(j-1) h_L,(j-1) - V_(j+1) h_V,(j+1)
                     - F_j h_F,j - Q_j = 0
  h_L = sum x_i (h_ig,i - dH_vap,i) + h_E,   h_V = sum y_i h_ig,i
The document's convention for a total condenser: V = 0, the liquid distillate is in
``liquid_draw``, ``y`` holds its composition and ``h_V`` its (liquid) enthalpy. The reflux leaves
at its bubble point, so sum K x = 1 there.

Tolerances are our own judgement. Balances: 1e-9 of the total feed. Equilibrium: 1e-6
relative, because traystack's CoolProp fits are accurate to about 3e-7 relative. Enthalpies:
1e-5 of a latent heat. The latent heat is the mean of the components' dH_vap at their normal
boiling points, from CoolProp.
"""

from __future__ import annotations

import copy
import json
import math
import re
from functools import lru_cache
from pathlib import Path

import CoolProp.CoolProp as CP
import numpy as np
import pytest
from scipy.integrate import quad

from conftest import case_from_text
from solver.case import load_case
from solver.engine import simulate

thermo = pytest.importorskip("thermo")
from thermo.nrtl import NRTL as ThermoNRTL  # noqa: E402
from thermo.uniquac import UNIQUAC as ThermoUNIQUAC  # noqa: E402
from thermo.wilson import Wilson as ThermoWilson  # noqa: E402

CASES_DIR = Path(__file__).resolve().parents[2] / "cases"

GAS_CONSTANT = 8.31446261815324  # J/(mol K), CODATA 2018: N_A k, exact
REFERENCE_TEMPERATURE = 298.15  # K, ideal gas = 0
ENERGY_UNITS = {"J/mol": 1.0, "kJ/mol": 1000.0, "cal/mol": 4.184, "kcal/mol": 4184.0}  # thermochemical calorie

BALANCE_TOLERANCE = 1e-9  # of the total feed
EQUILIBRIUM_TOLERANCE = 1e-6  # relative
ENTHALPY_TOLERANCE = 1e-5  # of a latent heat

# A ternary scenario of our own invention: acetone-methanol-water, Wilson, Murphree 0.7 on the
# trays, a liquid side draw, a vapor side draw and a side heater. Wilson parameters and liquid
# molar volumes: Smith, Van Ness & Abbott, Introduction to Chemical Engineering Thermodynamics,
# 7th ed. (2005), Table 12.5 (8th ed. Table 13.10), values recommended by Gmehling et al.,
# DECHEMA Chemistry Data Series vol. I; Lambda_ij = (V_j/V_i) exp(-dlambda_ij/RT).
TERNARY_CASE = """
title = "Acetone-methanol-water column with side draws and a side heater (test scenario)"
[components]
names = ["acetone", "methanol", "water"]
[thermo]
liquid = "wilson"
enthalpy = "rigorous"
[thermo.wilson_volumes]
acetone = "74.05 cm**3/mol"
methanol = "40.73 cm**3/mol"
water = "18.07 cm**3/mol"
[thermo.wilson.acetone.methanol]
dlambda = ["-161.88 cal/mol", "583.11 cal/mol"]
source = "Smith, Van Ness & Abbott, 7th ed. (2005), Table 12.5"
[thermo.wilson.acetone.water]
dlambda = ["291.27 cal/mol", "1448.01 cal/mol"]
source = "Smith, Van Ness & Abbott, 7th ed. (2005), Table 12.5"
[thermo.wilson.methanol.water]
dlambda = ["107.38 cal/mol", "469.55 cal/mol"]
source = "Smith, Van Ness & Abbott, 7th ed. (2005), Table 12.5"
[column]
stages = 12
condenser = "total"
reboiler = "partial"
pressure.top = "101.325 kPa"
pressure.drop_per_stage = "0.6 kPa"
efficiency = 0.7
[[column.side_draws]]
stage = 4
phase = "liquid"
flow = "6 kmol/h"
[[column.side_draws]]
stage = 10
phase = "vapor"
flow = "4 kmol/h"
[[column.heaters]]
stage = 8
duty = "120 kW"
[[feeds]]
stage = 6
flow = "100 kmol/h"
composition = { acetone = 0.25, methanol = 0.25, water = 0.50 }
temperature = "45 degC"
[specs]
reflux_ratio = 2.5
distillate_rate = "30 kmol/h"
"""

CASE_NAMES = ("methanol_water", "ternary_wilson")


@lru_cache(maxsize=None)
def _document_text(name: str) -> str:
    if name == "methanol_water":
        case = load_case(CASES_DIR / "methanol_water.toml")
    else:
        case = case_from_text(TERNARY_CASE, "ternary Wilson test case")
    return simulate(case).to_json()


def _document(name: str) -> dict:
    return json.loads(_document_text(name))


# ---------------------------------------------------------------------------------------------
# independent properties
# ---------------------------------------------------------------------------------------------


def energy_per_mole(text: str) -> float:
    """'-253.88 cal/mol' -> J/mol (thermochemical calorie)."""
    match = re.fullmatch(r"\s*([-+0-9.eE]+)\s*([A-Za-z]+/mol)\s*", text)
    assert match, f"cannot read the energy {text!r}"
    return float(match.group(1)) * ENERGY_UNITS[match.group(2)]


def parameter_matrices(document: dict) -> dict[str, np.ndarray]:
    """The four terms a (constant), b (over T, K), e (in ln T), f (times T, 1/K) and alpha,
    alpha_slope (1/K), alpha_reference (K) as (c, c) matrices, from the document's pair records.
    An energy form as written is converted here, not taken from traystack's term over
    temperature."""
    names = document["components"]
    index = {name: k for k, name in enumerate(names)}
    c = len(names)
    matrices = {key: np.zeros((c, c)) for key in ("a", "b", "e", "f", "alpha", "alpha_slope", "alpha_reference")}
    model = document["thermo"]["liquid"]
    volumes = document["case"]["thermo"]["wilson_volumes"]
    for pair in document["thermo"]["pairs"]:
        if pair["model"] != model:
            continue
        i, j = index[pair["i"]], index[pair["j"]]
        written = pair["as_written"]
        a, b = list(pair["constant_term"]), list(pair["term_over_temperature_K"])
        if "dg" in written:  # NRTL: tau_ij = dg_ij / RT
            b = [energy_per_mole(text) / GAS_CONSTANT for text in written["dg"]]
        elif "dlambda" in written:  # Wilson: Lambda_ij = (V_j / V_i) exp(-dlambda_ij / RT)
            b = [-energy_per_mole(text) / GAS_CONSTANT for text in written["dlambda"]]
            a = [math.log(volumes[pair["j"]] / volumes[pair["i"]]), math.log(volumes[pair["i"]] / volumes[pair["j"]])]
        elif "du" in written:  # UNIQUAC: tau_ij = exp(-du_ij / RT)
            b = [-energy_per_mole(text) / GAS_CONSTANT for text in written["du"]]
        terms = (("a", a), ("b", b), ("e", pair["term_in_ln_temperature"]), ("f", pair["term_times_temperature_per_K"]))
        for key, values in terms:
            matrices[key][i, j], matrices[key][j, i] = values
        matrices["alpha"][i, j] = matrices["alpha"][j, i] = pair["alpha"]
        matrices["alpha_slope"][i, j] = matrices["alpha_slope"][j, i] = pair["alpha_slope_per_K"]
        reference = pair["alpha_reference_temperature_K"] or 0.0
        matrices["alpha_reference"][i, j] = matrices["alpha_reference"][j, i] = reference
    return matrices


class IndependentProperties:
    """Psat, dH_vap, h_ig from CoolProp, gamma and h_E from the thermo package, for the
    components and parameters named in a result document. SI units."""

    def __init__(self, document: dict) -> None:
        self.fluids = [component["coolprop_name"] for component in document["thermo"]["components"]]
        self.states = [CP.AbstractState("HEOS", fluid) for fluid in self.fluids]
        self.model = document["thermo"]["liquid"]
        self.parameters = parameter_matrices(document)
        structure = document["thermo"]["uniquac_structure"]
        self.r = [structure[name][0] for name in document["components"]] if self.model == "uniquac" else None
        self.q = [structure[name][1] for name in document["components"]] if self.model == "uniquac" else None
        boiling = [CP.PropsSI("T", "P", 101325.0, "Q", 0.0, fluid) for fluid in self.fluids]
        self.latent_heat = float(np.mean([self.heat_of_vaporization(t)[k] for k, t in enumerate(boiling)]))

    def vapor_pressure(self, temperature: float) -> np.ndarray:
        values = []
        for state in self.states:
            state.update(CP.QT_INPUTS, 0.0, temperature)
            values.append(state.p())
        return np.array(values)

    def heat_of_vaporization(self, temperature: float) -> np.ndarray:
        values = []
        for state in self.states:
            state.update(CP.QT_INPUTS, 1.0, temperature)
            vapor = state.hmolar()
            state.update(CP.QT_INPUTS, 0.0, temperature)
            values.append(vapor - state.hmolar())
        return np.array(values)

    def ideal_gas_enthalpy(self, temperature: float) -> np.ndarray:
        values = []
        for state in self.states:

            def cp0(t: float, state=state) -> float:
                state.update(CP.DmolarT_INPUTS, 1e-3, t)  # cp0 depends on T only
                return state.cp0molar()

            value, _ = quad(cp0, REFERENCE_TEMPERATURE, temperature, epsabs=1e-9, epsrel=1e-12, limit=200)
            values.append(value)
        return np.array(values)

    def activity_model(self, temperature: float, x: np.ndarray):
        p = self.parameters
        xs = list(np.asarray(x, dtype=float))
        if self.model == "nrtl":
            return ThermoNRTL(
                T=temperature, xs=xs, tau_as=p["a"].tolist(), tau_bs=p["b"].tolist(), tau_es=p["e"].tolist(),
                tau_fs=p["f"].tolist(), alpha_cs=(p["alpha"] - p["alpha_reference"] * p["alpha_slope"]).tolist(),
                alpha_ds=p["alpha_slope"].tolist(),
            )
        if self.model == "wilson":
            return ThermoWilson(
                T=temperature, xs=xs, lambda_as=p["a"].tolist(), lambda_bs=p["b"].tolist(),
                lambda_cs=p["e"].tolist(), lambda_ds=p["f"].tolist(),
            )
        if self.model == "uniquac":
            return ThermoUNIQUAC(
                T=temperature, xs=xs, rs=self.r, qs=self.q, tau_as=p["a"].tolist(), tau_bs=p["b"].tolist(),
                tau_cs=p["e"].tolist(), tau_ds=p["f"].tolist(),
            )
        raise AssertionError(f"no independent implementation for the liquid model {self.model!r}")

    def k_values(self, temperature: float, pressure: float, x: np.ndarray) -> np.ndarray:
        gamma = np.array(self.activity_model(temperature, x).gammas())
        return gamma * self.vapor_pressure(temperature) / pressure

    def liquid_enthalpy(self, temperature: float, x: np.ndarray) -> float:
        pure = self.ideal_gas_enthalpy(temperature) - self.heat_of_vaporization(temperature)
        return float(np.dot(x, pure) + self.activity_model(temperature, x).HE())

    def vapor_enthalpy(self, temperature: float, y: np.ndarray) -> float:
        return float(np.dot(y, self.ideal_gas_enthalpy(temperature)))


# ---------------------------------------------------------------------------------------------
# the re-check, from the document
# ---------------------------------------------------------------------------------------------


class Column:
    """The stage records of a result document as arrays (SI), top stage first."""

    def __init__(self, document: dict) -> None:
        stages = document["stages"]
        self.document = document
        self.count = len(stages)
        self.roles = [s["role"] for s in stages]
        self.T = np.array([s["T"] for s in stages])
        self.P = np.array([s["P"] for s in stages])
        self.L = np.array([s["L"] for s in stages])
        self.V = np.array([s["V"] for s in stages])
        self.U = np.array([s["liquid_draw"] for s in stages])
        self.W = np.array([s["vapor_draw"] for s in stages])
        self.x = np.array([s["x"] for s in stages])
        self.y = np.array([s["y"] for s in stages])
        self.K = np.array([s["K"] for s in stages])
        self.h_L = np.array([s["h_L"] for s in stages])
        self.h_V = np.array([s["h_V"] for s in stages])
        self.E = np.array([s["efficiency"] for s in stages])
        self.Q = np.array([s["duty"] for s in stages])
        self.feeds = [s["feeds"] for s in stages]
        self.feed_components = np.array([sum((f["flow"] * np.array(f["z"]) for f in fs), np.zeros(self.x.shape[1])) for fs in self.feeds])
        self.total_feed = float(self.feed_components.sum())
        self.total_condenser = self.roles[0] == "total_condenser"

    def inflows(self, liquid: np.ndarray, vapor: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """What enters each stage from its neighbours: liquid from above, vapor from below."""
        from_above = np.zeros_like(liquid)
        from_below = np.zeros_like(vapor)
        from_above[1:] = liquid[:-1]
        from_below[:-1] = vapor[1:]
        return from_above, from_below


@lru_cache(maxsize=None)
def _recomputed(name: str) -> dict:
    """Independent K-values, enthalpies and feed enthalpies of every stage of a document."""
    document = _document(name)
    column = Column(document)
    props = IndependentProperties(document)
    K = np.array([props.k_values(t, p, x) for t, p, x in zip(column.T, column.P, column.x)])
    h_L = np.array([props.liquid_enthalpy(t, x) for t, x in zip(column.T, column.x)])
    h_V = np.array([props.vapor_enthalpy(t, y) for t, y in zip(column.T, column.y)])
    if column.total_condenser:
        h_V[0] = props.liquid_enthalpy(column.T[0], column.y[0])  # the liquid distillate
    feed_enthalpy = np.zeros(column.count)
    feed_checks = []
    for j, feeds in enumerate(column.feeds):
        for feed in feeds:
            assert feed["temperature"] is not None, "this re-check handles feeds given by temperature"
            z = np.array(feed["z"])
            pressure = feed["pressure"] if feed["pressure"] is not None else column.P[j]
            bubble_sum = float(np.dot(props.k_values(feed["temperature"], pressure, z), z))
            h = props.liquid_enthalpy(feed["temperature"], z)
            feed_checks.append({"bubble_sum": bubble_sum, "h": h, "reported_h": feed["h"], "vapor_fraction": feed["vapor_fraction"]})
            feed_enthalpy[j] += feed["flow"] * h
    return {
        "K": K, "h_L": h_L, "h_V": h_V, "feed_enthalpy": feed_enthalpy, "feeds": feed_checks,
        "latent_heat": props.latent_heat,
    }


def component_balance_violation(column: Column) -> np.ndarray:
    """(N, c) residual of every stage's component balance, divided by the total feed."""
    liquid, vapor = column.L[:, None] * column.x, column.V[:, None] * column.y
    from_above, from_below = column.inflows(liquid, vapor)
    out = (column.L + column.U)[:, None] * column.x + (column.V + column.W)[:, None] * column.y
    return (out - from_above - from_below - column.feed_components) / column.total_feed


def equilibrium_violation(column: Column, K: np.ndarray) -> np.ndarray:
    """(N, c) relative residual of the Murphree relations (the total condenser's row is y = x)."""
    y_in = np.zeros_like(column.y)
    y_in[:-1] = column.y[1:]
    E = column.E[:, None]
    predicted = E * K * column.x + (1 - E) * y_in
    if column.total_condenser:
        predicted[0] = column.x[0]
    return (column.y - predicted) / np.maximum(predicted, 1e-300)


def enthalpy_balance_violation(column: Column, h_L: np.ndarray, h_V: np.ndarray, feed_enthalpy: np.ndarray, latent_heat: float) -> np.ndarray:
    """(N,) residual of every stage's enthalpy balance with the given enthalpies, divided by
    total feed times a latent heat."""
    from_above, from_below = column.inflows(column.L * h_L, column.V * h_V)
    out = (column.L + column.U) * h_L + (column.V + column.W) * h_V
    return (out - from_above - from_below - feed_enthalpy - column.Q) / (column.total_feed * latent_heat)


# ---------------------------------------------------------------------------------------------
# tests
# ---------------------------------------------------------------------------------------------


@pytest.mark.parametrize("name", CASE_NAMES)
def test_document_is_a_converged_result_in_si_units(name):
    document = _document(name)
    assert document["schema"] == "traystack-result/1"
    assert document["converged"] is True, document["message"]
    assert document["units"]["temperature"] == "K" and document["units"]["flow"] == "mol/s"
    assert document["units"]["duty"] == "W" and document["units"]["enthalpy"] == "J/mol"
    column = Column(document)
    assert column.total_condenser and column.roles[-1] == "reboiler"
    assert column.V[0] == 0.0  # the document's total-condenser convention


@pytest.mark.parametrize("name", CASE_NAMES)
def test_parameters_used_are_the_parameters_as_written(name):
    document = _document(name)
    ours = parameter_matrices(document)
    index = {n: k for k, n in enumerate(document["components"])}
    for pair in document["thermo"]["pairs"]:
        i, j = index[pair["i"]], index[pair["j"]]
        np.testing.assert_allclose([ours["b"][i, j], ours["b"][j, i]], pair["term_over_temperature_K"], rtol=1e-12)
        np.testing.assert_allclose([ours["a"][i, j], ours["a"][j, i]], pair["constant_term"], rtol=1e-12, atol=1e-15)


@pytest.mark.parametrize("name", CASE_NAMES)
def test_reported_k_values_match_independent_ones(name):
    column = Column(_document(name))
    K = _recomputed(name)["K"]
    relative = np.abs(column.K / K - 1)
    print(f"{name}: max relative K difference {relative.max():.2e}")
    assert relative.max() < EQUILIBRIUM_TOLERANCE


@pytest.mark.parametrize("name", CASE_NAMES)
def test_component_balances_of_every_stage(name):
    violation = np.abs(component_balance_violation(Column(_document(name))))
    print(f"{name}: max component balance residual {violation.max():.2e} of the feed")
    assert violation.max() < BALANCE_TOLERANCE


@pytest.mark.parametrize("name", CASE_NAMES)
def test_overall_component_balance(name):
    column = Column(_document(name))
    products = column.document["products"]
    out = sum(np.array(p["composition"]) * p["flow"] for p in products.values())
    violation = np.abs(column.feed_components.sum(axis=0) - out) / column.total_feed
    assert violation.max() < BALANCE_TOLERANCE
    # the products section says the same as the stage records
    distillate = products["distillate"]["flow"]
    side_liquid_at_top = sum(p["flow"] for k, p in products.items() if k.startswith("liquid_draw") and p["stage"] == 1)
    assert distillate + side_liquid_at_top == pytest.approx(column.U[0], rel=1e-12)
    assert products["bottoms"]["flow"] == pytest.approx(column.L[-1], rel=1e-12)


@pytest.mark.parametrize("name", CASE_NAMES)
def test_murphree_equilibrium_of_every_stage(name):
    column = Column(_document(name))
    violation = np.abs(equilibrium_violation(column, _recomputed(name)["K"]))
    print(f"{name}: max relative Murphree residual {violation.max():.2e}")
    assert violation.max() < EQUILIBRIUM_TOLERANCE
    if name == "ternary_wilson":
        assert np.allclose(column.E[1:-1], 0.7) and column.E[0] == column.E[-1] == 1.0


@pytest.mark.parametrize("name", CASE_NAMES)
def test_summations_and_bubble_points(name):
    column = Column(_document(name))
    K = _recomputed(name)["K"]
    assert np.abs(column.x.sum(axis=1) - 1).max() < 1e-12
    assert np.abs(column.y.sum(axis=1) - 1).max() < 1e-12
    y_in = np.zeros_like(column.y)
    y_in[:-1] = column.y[1:]
    E = column.E[:, None]
    stage_sums = (E * K * column.x + (1 - E) * y_in).sum(axis=1)
    stage_sums[0] = float(K[0] @ column.x[0])  # the reflux leaves at its bubble point
    print(f"{name}: max |sum - 1| {np.abs(stage_sums - 1).max():.2e}")
    assert np.abs(stage_sums - 1).max() < EQUILIBRIUM_TOLERANCE


@pytest.mark.parametrize("name", CASE_NAMES)
def test_reported_enthalpies_match_independent_ones(name):
    column = Column(_document(name))
    again = _recomputed(name)
    scale = again["latent_heat"]
    worst = max(np.abs(column.h_L - again["h_L"]).max(), np.abs(column.h_V - again["h_V"]).max()) / scale
    print(f"{name}: max stage enthalpy difference {worst:.2e} of {scale:.0f} J/mol")
    assert worst < ENTHALPY_TOLERANCE


@pytest.mark.parametrize("name", CASE_NAMES)
def test_feeds_are_subcooled_liquids_with_the_reported_enthalpy(name):
    again = _recomputed(name)
    assert again["feeds"]
    for feed in again["feeds"]:
        assert feed["bubble_sum"] < 1.0  # below its bubble point at the feed pressure
        assert feed["vapor_fraction"] == 0.0
        assert abs(feed["reported_h"] - feed["h"]) < ENTHALPY_TOLERANCE * again["latent_heat"]


@pytest.mark.parametrize("name", CASE_NAMES)
def test_enthalpy_balances_of_every_stage(name):
    column = Column(_document(name))
    again = _recomputed(name)
    violation = np.abs(
        enthalpy_balance_violation(column, again["h_L"], again["h_V"], again["feed_enthalpy"], again["latent_heat"])
    )
    print(f"{name}: max enthalpy balance residual {violation.max():.2e} of feed x latent heat")
    assert violation.max() < ENTHALPY_TOLERANCE


@pytest.mark.parametrize("name", CASE_NAMES)
def test_side_duties_are_those_of_the_case(name):
    document = _document(name)
    column = Column(document)
    heaters = {d["stage"]: d["duty"] for d in document["case"]["column"]["stage_duties"]}
    expected = np.array([heaters.get(j + 1, 0.0) for j in range(column.count)])
    inner = slice(1, column.count - 1)
    assert np.abs(column.Q[inner] - expected[inner]).max() < 1e-6 * abs(column.Q[-1])
    assert document["duties"]["condenser"] == column.Q[0] < 0.0
    assert document["duties"]["reboiler"] == column.Q[-1] > 0.0
    if name == "ternary_wilson":
        assert column.Q[7] == pytest.approx(120e3, rel=1e-9)  # recomputed from the stage balance
        assert column.U[3] == pytest.approx(6 / 3.6, rel=1e-12) and column.W[9] == pytest.approx(4 / 3.6, rel=1e-12)


@pytest.mark.parametrize("name", CASE_NAMES)
def test_reported_duties_close_the_overall_energy_balance(name):
    document = _document(name)
    column = Column(document)
    again = _recomputed(name)
    duties = document["duties"]
    heaters = sum(d["duty"] for d in document["case"]["column"]["stage_duties"])
    energy_in = float(again["feed_enthalpy"].sum()) + duties["condenser"] + duties["reboiler"] + heaters
    # products and side draws, with the independent enthalpies; the distillate is in U[0]
    energy_out = float(column.U @ again["h_L"] + column.W @ again["h_V"]) + column.L[-1] * again["h_L"][-1]
    relative = abs(energy_in - energy_out) / duties["reboiler"]
    print(
        f"{name}: Q_c = {duties['condenser'] / 1e3:.3f} kW, Q_R = {duties['reboiler'] / 1e3:.3f} kW, "
        f"overall energy balance closes to {relative:.2e} of Q_R"
    )
    assert relative < ENTHALPY_TOLERANCE


def test_the_recheck_detects_small_errors():
    """Each check can fail. It catches a 1e-8 relative error in one liquid flow, 1e-3 K in one
    temperature, and 1 J/mol (3e-5 of the latent heat) in one vapor enthalpy."""
    document = _document("ternary_wilson")
    again = _recomputed("ternary_wilson")
    props = IndependentProperties(document)
    column = Column(document)

    changed = copy.deepcopy(document)
    changed["stages"][5]["L"] *= 1 + 1e-8
    assert np.abs(component_balance_violation(Column(changed))).max() > BALANCE_TOLERANCE

    K = again["K"].copy()
    K[6] = props.k_values(column.T[6] + 1e-3, column.P[6], column.x[6])
    assert np.abs(equilibrium_violation(column, K)).max() > EQUILIBRIUM_TOLERANCE

    h_V = again["h_V"].copy()
    h_V[4] += 1.0
    assert np.abs(column.h_V - h_V).max() / again["latent_heat"] > ENTHALPY_TOLERANCE
    violation = enthalpy_balance_violation(column, again["h_L"], h_V, again["feed_enthalpy"], again["latent_heat"])
    assert np.abs(violation).max() > ENTHALPY_TOLERANCE
