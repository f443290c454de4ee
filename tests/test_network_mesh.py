"""The network's Newton system (solver/network_mesh.py, network_specs.py, network_start.py):
every Jacobian entry against central differences for every kind of connection, exchanger and
spec, and Newton from the network's default start converging on each variant."""

from __future__ import annotations

import numpy as np
import pytest
import scipy.sparse as sp

from conftest import network_example_case
from solver.network_engine import build_network_system, network_post_check, network_result, simulate_network
from solver.network_mesh import SparseAssembly
from solver.network_start import network_initial_estimate
from solver.newton import solve_system


def _pumparound(**entries):
    def change(data):
        connection = data["connections"][2]
        connection.pop("fraction", None)
        connection.pop("cooling", None)
        connection.update(entries)
    return change


def _add_specs(*specs):
    def change(data):
        data["specs"].extend(specs)
    return change


def _column_specs(index, **specs):
    def change(data):
        data["columns"][index]["specs"] = specs
    return change


def _heat_link(data):
    data["heat_links"] = [{"name": "integration", "from": "main.condenser", "to": "stripper.reboiler"}]
    data["columns"][1].pop("specs")
    data["columns"][0]["specs"] = {"reflux_ratio": 1.2, "distillate_rate": "39 kmol/h"}
    # the main column at 4 bar, so that its condenser is warmer than the stripper's reboiler (a
    # heat link the other way round is refused; the stripper's vapor would need a compressor to
    # return, which the equations do not model)
    data["columns"][0]["pressure"] = {"top": "4 bar", "drop_per_stage": "0.7 kPa"}


def _vapor_rate(data):
    data["connections"][1]["flow"] = "5 kmol/h"  # a fixed vapor rate; the rest leaves as stripper.distillate


def _side_draw(data):
    data["columns"][0]["side_draws"] = [{"name": "toluene cut", "stage": 15, "phase": "liquid", "flow": "10 kmol/h"}]
    data["specs"].append({"on": "toluene cut", "recovery": {"toluene": 0.2}})
    data["columns"][0]["specs"] = {"reflux_ratio": 2.5}


def _partial_condenser(data):
    data["columns"][0]["condenser"] = "partial"


def _free_feed(data):
    # a make-up whose rate is an unknown: the main column's bottoms rate sets it
    data["feeds"].append({"name": "make-up", "column": "main", "stage": 14, "flow": "free",
                          "composition": {"toluene": 0.5, "o-xylene": 0.5}, "temperature": "90 degC"})
    data["specs"].append({"on": "main.bottoms", "flow": "36 kmol/h"})
    data["columns"][0]["specs"] = {"reflux_ratio": 2.5, "distillate_rate": "39 kmol/h"}


def _distillate_sent(**size):
    """Part of the main column's liquid distillate sent by a connection (it travels in the total
    condenser's vapor slot): a share back to main stage 6, a tray of efficiency 0.8 whose
    Murphree relation must not mix it with the vapor, or a rate to the stripper."""
    def change(data):
        to = {"column": "main", "stage": 6} if "fraction" in size else {"column": "stripper", "stage": 3}
        data["connections"].append({"name": "distillate-sent", "from": {"column": "main", "product": "distillate"}, "to": to, **size})
    return change


def _compose(*changes):
    def change(data):
        for one in changes:
            one(data)
    return change


#: Each connection kind, exchanger and spec kind at least once (name: change of the example).
VARIANTS = {
    "example (free rate, fraction with fixed cooling duty, all of a vapor)": None,
    "fixed-rate pumparound with a return temperature": _pumparound(flow="40 kmol/h", cooling={"return_temperature": "60 degC"}),
    "free pumparound rate by connection_flow": _compose(_pumparound(flow="free", cooling={"duty": "-0.3 MW"}),
                                                        _add_specs({"on": "pumparound", "flow": "35 kmol/h"})),
    "free pumparound rate by connection_fraction": _compose(_pumparound(flow="free"), _add_specs({"on": "pumparound", "fraction": 0.25})),
    "free cooler by exchanger_duty": _compose(_pumparound(fraction=0.3, cooling={"duty": "free"}),
                                              _add_specs({"on": "pumparound", "duty": "-0.2 MW"})),
    "free cooler by return_temperature": _compose(_pumparound(flow="30 kmol/h", cooling={"duty": "free"}),
                                                  _add_specs({"on": "pumparound", "return_temperature": "70 degC"})),
    "recovery, bottoms purity": _column_specs(0, recovery={"benzene": {"distillate": 0.93}}, bottoms={"benzene": 0.002}),
    "stage temperature and condenser duty": _column_specs(0, condenser_duty="-1.2 MW", stage_temperature={"stage": 15, "value": "119 degC"}),
    "reboiler duty of the stripper": _column_specs(1, reboiler_duty="0.2 MW"),
    "reboiler duty and distillate rate": _column_specs(0, reboiler_duty="1.5 MW", distillate_rate="39 kmol/h"),
    "heat link": _heat_link,
    "vapor rate connection": _vapor_rate,
    "side draw recovery": _side_draw,
    "partial condenser": _partial_condenser,
    "free feed rate (a make-up)": _free_feed,
    "subcooled reflux": _column_specs(0, reflux_ratio=2.5, distillate={"benzene": 0.98}, reflux_subcooling="5 K"),
    "reflux temperature": _column_specs(0, reflux_ratio=2.5, distillate={"benzene": 0.98}, reflux_temperature="70 degC"),
    "a share of the distillate back to a Murphree tray": _distillate_sent(fraction=0.2),
    "a rate of the distillate to the stripper": _distillate_sent(flow="5 kmol/h"),
}


def _numerical_jacobian(system, X, step=1e-7):
    J = np.zeros((system.size, system.size))
    for k in range(system.size):
        h = step * max(1.0, abs(X[k]))
        up, down = X.copy(), X.copy()
        up[k] += h
        down[k] -= h
        J[:, k] = (system.evaluate(up, False).residuals - system.evaluate(down, False).residuals) / (2 * h)
    return J


@pytest.mark.parametrize("name", list(VARIANTS))
def test_jacobian_matches_central_differences(name):
    system = build_network_system(network_example_case(VARIANTS[name]))
    X = network_initial_estimate(system)
    analytic = system.evaluate(X).jacobian.toarray()
    numeric = _numerical_jacobian(system, X)
    error = np.abs(analytic - numeric)
    worst = np.unravel_index(np.argmax(error - 1e-6 * np.abs(numeric)), error.shape)
    assert np.all(error <= 1e-6 + 1e-6 * np.abs(numeric)), (
        f"{system.equation_name(worst[0])} by {system.variable_name(worst[1])}: "
        f"{analytic[worst]} analytic, {numeric[worst]} numeric")


@pytest.mark.parametrize("name", list(VARIANTS))
def test_newton_converges_from_the_network_start(name):
    case = network_example_case(VARIANTS[name])
    result = simulate_network(case)
    assert result.converged, result.message
    assert result.iterations <= 15
    assert result.post_check["component_closure_max"] < 1e-10
    assert result.post_check["energy_closure_rel"] < 1e-10


def test_specs_hold_at_the_solution():
    change = _compose(_pumparound(flow="free", cooling={"duty": "free"}),
                      _add_specs({"on": "pumparound", "fraction": 0.25}, {"on": "pumparound", "return_temperature": "70 degC"}))
    case = network_example_case(change)
    system = build_network_system(case)
    newton = solve_system(system, network_initial_estimate(system))
    result = network_result(case, system, newton, {})
    pumparound = result.connections["pumparound"]
    main8 = result.stage_column.index("main") + 7
    leaving = result.liquid_flow[main8] + result.transfer_liquid[main8]
    assert pumparound["flow"] == pytest.approx(0.25 * leaving, rel=1e-9)
    # the cooler brings the drawn liquid from stage 8's temperature to 70 degC: its duty is the enthalpy change
    thermo = system.thermo
    h = thermo.liquid_enthalpy(np.array([result.temperature[main8], 343.15]), np.tile(result.x[main8], (2, 1)),
                               pressure=np.full(2, result.pressure[main8])).molar
    assert pumparound["duty"] == pytest.approx(pumparound["flow"] * (h[1] - h[0]), rel=1e-8)
    assert result.products["stripper.bottoms"]["flow"] == pytest.approx(30 / 3.6, rel=1e-9)
    assert max(network_post_check(result, system).values()) < 1e-8


def test_cached_jacobian_layout_gives_the_triplet_matrix():
    """SparseAssembly (the Jacobian's CSC layout found once) against scipy's own triplet build:
    the same entries (duplicates summed, zeros dropped) and the same values to rounding (scipy
    may sum three or more duplicates in another order)."""
    rng = np.random.default_rng(7)
    size = 40
    rows, cols = rng.integers(0, size, 600), rng.integers(0, size, 600)
    assembly = SparseAssembly(rows, cols, size)
    for _ in range(3):
        vals = rng.normal(size=600)
        vals[rng.random(600) < 0.2] = 0.0
        built = assembly.matrix(vals)
        keep = vals != 0.0
        expected = sp.csc_matrix((vals[keep], (rows[keep], cols[keep])), shape=(size, size))
        expected.sum_duplicates()
        assert built.has_sorted_indices and built.nnz == expected.nnz
        assert np.array_equal(built.indptr, expected.indptr) and np.array_equal(built.indices, expected.indices)
        np.testing.assert_allclose(built.data, expected.data, rtol=1e-13, atol=1e-15)
    # the same nonzeros again: the kept layout, not shared with a matrix handed out before
    built.indices[:], built.indptr[:] = 0, 0
    again = assembly.matrix(vals)
    assert np.array_equal(again.indptr, expected.indptr) and np.array_equal(again.indices, expected.indices)
    np.testing.assert_allclose(again.data, expected.data, rtol=1e-13, atol=1e-15)
    assert assembly.matches(rows, cols) and not assembly.matches(rows[::-1], cols)
