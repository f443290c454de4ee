"""The sensitivity module's own pieces: the inputs it chooses, what moving each one does to the
case, the shifted vapor pressure, elasticities and the refusals. The derivatives themselves are
checked against re-solves in tests/reference/test_sensitivity_vs_resolves.py."""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np
import pytest

from solver.case import load_case
from solver.engine import simulate
from solver.errors import ConvergenceError, SpecError
from solver.sensitivity import column_sensitivities, operated_case
from solver.sensitivity_inputs import ShiftedVaporPressure, choose_inputs
from solver.thermo.package import ThermoPackage

CASES = Path(__file__).resolve().parent.parent / "cases"


@pytest.fixture(scope="module")
def methanol_water():
    case = load_case(CASES / "methanol_water.toml")
    thermo = ThermoPackage.from_case(case)
    return case, thermo, simulate(case, thermo=thermo)


def test_inputs_of_methanol_water(methanol_water):
    case, _, _ = methanol_water
    keys = [item.key for item in choose_inputs(case)]
    assert keys == [
        "specs.reflux_ratio", "specs.bottoms.water", "feeds[1].flow", "feeds[1].composition.methanol",
        "feeds[1].temperature", "feeds[1].pressure", "column.pressure.top", "column.efficiency",
        "thermo.nrtl.methanol.water.term_over_temperature.ij", "thermo.nrtl.methanol.water.term_over_temperature.ji",
        "thermo.nrtl.methanol.water.alpha", "thermo.vapor_pressure_shift.methanol", "thermo.vapor_pressure_shift.water",
    ]
    # the energy form dg = -253.88 cal/mol becomes the term over temperature dg / R in K
    term = next(i for i in choose_inputs(case, ("binary",)) if i.key.endswith(".ij"))
    assert term.value == pytest.approx(-253.88 * 4.184 / 8.314462618, rel=1e-9)


def test_moving_an_input_moves_only_that_number(methanol_water):
    case, thermo, _ = methanol_water
    by_key = {item.key: item for item in choose_inputs(case)}
    moved, same_thermo = by_key["feeds[1].composition.methanol"].apply(case, thermo, 0.4)
    assert same_thermo is thermo
    assert moved.feeds[0].composition == pytest.approx((0.4, 0.6))
    moved, _ = by_key["column.pressure.top"].apply(case, thermo, 120000.0)
    drops = np.diff(moved.column.pressures)
    assert moved.column.pressures[0] == 120000.0 and drops == pytest.approx(np.diff(case.column.pressures))
    moved, _ = by_key["column.efficiency"].apply(case, thermo, 0.7)
    assert moved.column.efficiencies[0] == 1.0 and moved.column.efficiencies[-1] == 1.0  # condenser, reboiler
    assert set(moved.column.efficiencies[1:-1]) == {0.7}
    moved, moved_thermo = by_key["thermo.nrtl.methanol.water.alpha"].apply(case, thermo, 0.35)
    assert moved.thermo.pairs[0].alpha == 0.35 and moved_thermo is not thermo
    moved, _ = by_key["specs.reflux_ratio"].apply(case, thermo, 2.0)
    assert moved.specs[0].value == 2.0 and moved.specs[1] == case.specs[1]


def test_vapor_pressure_shift_multiplies_psat_only(methanol_water):
    case, thermo, _ = methanol_water
    T = np.array([340.0, 360.0])
    shifted = ShiftedVaporPressure(thermo.pure, np.array([0.1, 0.0]))
    ln_p, slope = thermo.pure.ln_vapor_pressure(T)
    ln_q, slope_q = shifted.ln_vapor_pressure(T)
    assert ln_q[:, 0] - ln_p[:, 0] == pytest.approx([0.1, 0.1]) and ln_q[:, 1] == pytest.approx(ln_p[:, 1])
    assert slope_q == pytest.approx(slope)
    assert shifted.vapor_pressure(T)[0][:, 0] == pytest.approx(np.exp(0.1) * thermo.pure.vapor_pressure(T)[0][:, 0])
    item = next(i for i in choose_inputs(case, ("vapor_pressure",)) if i.key.endswith("water"))
    _, moved_thermo = item.apply(case, thermo, 0.05)
    K = thermo.k_values(T, np.full(2, 1e5), np.full((2, 2), 0.5)).K
    K_moved = moved_thermo.k_values(T, np.full(2, 1e5), np.full((2, 2), 0.5)).K
    assert K_moved[:, 1] / K[:, 1] == pytest.approx(np.exp(0.05)) and K_moved[:, 0] == pytest.approx(K[:, 0])


def test_elasticities_and_operated_case(methanol_water):
    case, thermo, result = methanol_water
    inputs = choose_inputs(case, ("spec", "feed"))
    view = column_sensitivities(case, result, thermo=thermo, inputs=inputs)
    flow = view.inputs.index(next(i for i in inputs if i.key == "feeds[1].flow"))
    # the column scales with its feed: every flow and duty has elasticity 1, compositions 0
    elasticity = view.elasticities()[:, flow]
    for key in ("distillate.flow", "bottoms.flow", "duty.condenser", "duty.reboiler"):
        assert elasticity[view.output_index(key)] == pytest.approx(1.0, rel=1e-7)
    assert abs(elasticity[view.output_index("distillate.mole_fraction.methanol")]) < 1e-7
    operated = operated_case(case, result)
    assert [s.kind for s in operated.specs] == ["reflux_ratio", "boilup_ratio"]
    assert operated.specs[0].value == pytest.approx(1.4, rel=1e-9)


def test_refusals(methanol_water):
    case, thermo, result = methanol_water
    with pytest.raises(ConvergenceError, match="converged"):
        column_sensitivities(case, dataclasses.replace(result, converged=False, message="stopped"), thermo=thermo)
    with pytest.raises(SpecError, match="network"):
        column_sensitivities(dataclasses.replace(case, column=None), result, thermo=thermo)


@pytest.mark.parametrize("name", ["methanol_water", "deethanizer", "naphtha_side_draw"])
def test_output_jacobian_matches_finite_differences(name):
    """The analytic d(outputs)/d(unknowns) (flows, fractions, recoveries, duties from the
    enthalpy balances, temperatures) against central differences of the outputs themselves."""
    from solver.engine import build_system, stage_profile
    from solver.sensitivity import output_jacobian, output_values

    case = load_case(CASES / f"{name}.toml")
    thermo = ThermoPackage.from_case(case)
    result = simulate(case, thermo=thermo)
    assert result.converged
    system = build_system(case, thermo)
    X = system.unknowns(stage_profile(result))
    analytic = output_jacobian(system, X, system.stage_state(X)).toarray()
    numeric = np.empty_like(analytic)
    for k in range(system.size):
        h = 1e-6 * max(abs(X[k]), 1e-3)
        up, down = X.copy(), X.copy()
        up[k] += h
        down[k] -= h
        numeric[:, k] = (output_values(system, up) - output_values(system, down)) / (2 * h)
    scale = np.maximum(np.abs(numeric).max(axis=1, keepdims=True), 1e-12)
    np.testing.assert_allclose(analytic / scale, numeric / scale, atol=1e-6)
    assert np.abs(analytic).sum() > 0


def test_sensitivities_take_the_feeds_the_solve_used(methanol_water):
    """The nominal feeds are read from the result (not flashed again) when they are the case's,
    and the derivatives are the same either way."""
    from solver.sensitivity import _result_feeds

    case, thermo, result = methanol_water
    from_result = _result_feeds(case, result)
    from solver.engine import flash_feeds
    from solver.network import build_stage_graph

    flashed = flash_feeds(case, thermo, build_stage_graph(case))
    assert [f.h for f in from_result] == pytest.approx([f.h for f in flashed], rel=1e-12)
    warmer = dataclasses.replace(case, feeds=(dataclasses.replace(case.feeds[0], temperature=case.feeds[0].temperature + 5),))
    assert _result_feeds(warmer, result) is None
