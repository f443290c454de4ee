"""Sensitivities of a column network (solver.network_sensitivity): the implicit-function-theorem
derivatives against central finite differences of full re-solves of the moved network, the
overall balances they must keep, and ``run --sensitivity`` on a network case."""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import numpy as np
import pytest

from solver.case import load_case
from solver.cli import main
from solver.network_engine import simulate_network
from solver.network_sensitivity import (
    network_inputs, network_output_values, network_sensitivities, network_system_of, network_unknowns,
)
from solver.thermo.package import ThermoPackage

CASES = Path(__file__).resolve().parent.parent / "cases"


def _solved(name: str):
    case = load_case(CASES / name)
    thermo = ThermoPackage.from_case(case)
    result = simulate_network(case, thermo=thermo)
    assert result.converged, result.message
    return case, thermo, result, network_sensitivities(case, result, thermo=thermo)


@pytest.fixture(scope="module")
def pumparound():
    return _solved("aromatics_pumparound.toml")


@pytest.fixture(scope="module")
def side_stripper():
    return _solved("paraffins_side_stripper.toml")


def _resolved_derivative(case, thermo, result, item, relative: float = 1e-4) -> np.ndarray:
    """d outputs / d input by central differences of two full re-solves (warm-started from the
    nominal solution) with the input moved by +-``relative`` of its value."""
    nominal = network_system_of(case, thermo)
    start = network_unknowns(nominal, result)
    h = relative * max(abs(item.value), abs(item.scale))
    values = []
    for value in (item.value + h, item.value - h):
        moved_case, moved_thermo = item.apply(case, thermo, value)
        moved = simulate_network(moved_case, thermo=moved_thermo, start=start)
        assert moved.converged, moved.message
        system = network_system_of(moved_case, moved_thermo, nominal)
        values.append(network_output_values(system, network_unknowns(system, moved)))
    return (values[0] - values[1]) / (2 * h)


@pytest.mark.parametrize(("input_key", "output_keys"), [
    ("columns[0].specs.reflux_ratio", ("duty.main.reboiler", "main.bottoms.mole_fraction.toluene", "stage.main.17.temperature")),
    ("connections[0].cooling.return_temperature", ("duty.pumparound", "duty.main.condenser", "stage.main.6.temperature")),
    ("feeds[1].composition.benzene", ("main.distillate.flow", "main.bottoms.recovery.o-xylene", "duty.main.reboiler")),
    ("main.pressure.top", ("duty.main.reboiler", "stage.main.24.temperature", "main.bottoms.mole_fraction.toluene")),
])
def test_pumparound_derivatives_match_resolves(pumparound, input_key, output_keys):
    case, thermo, result, found = pumparound
    m = [item.key for item in found.inputs].index(input_key)
    resolved = _resolved_derivative(case, thermo, result, found.inputs[m])
    for key in output_keys:
        k = found.output_index(key)
        assert found.derivatives[k, m] == pytest.approx(resolved[k], rel=1e-4), key
        assert abs(found.derivatives[k, m]) > 0  # a derivative that could be missed, not an identity


def test_side_stripper_derivatives_match_resolves(side_stripper):
    case, thermo, result, found = side_stripper
    m = [item.key for item in found.inputs].index("columns[1].specs.boilup_ratio")
    resolved = _resolved_derivative(case, thermo, result, found.inputs[m])
    for key in ("connection.stripper-feed.flow", "duty.stripper.reboiler", "stripper.bottoms.mole_fraction.n-heptane"):
        k = found.output_index(key)
        assert found.derivatives[k, m] == pytest.approx(resolved[k], rel=1e-4), key


def test_petlyuk_connection_fraction_matches_resolves():
    """A connection's fraction moves the weights of the inflow matrices (the graph is built
    again), not a residual's value."""
    case, thermo, result, found = _solved("aromatics_petlyuk.toml")
    m = [item.key for item in found.inputs].index("connections[0].fraction")
    resolved = _resolved_derivative(case, thermo, result, found.inputs[m])
    for key in ("stage.main.9.temperature", "duty.main.reboiler", "main.bottoms.mole_fraction.o-xylene"):
        k = found.output_index(key)
        assert found.derivatives[k, m] == pytest.approx(resolved[k], rel=1e-4), key


def test_inputs_and_outputs_of_the_pumparound(pumparound):
    case, _, _, found = pumparound
    assert [item.key for item in network_inputs(case)] == [
        "columns[0].specs.reflux_ratio", "columns[0].specs.distillate.benzene", "connections[0].flow",
        "connections[0].cooling.return_temperature", "feeds[1].flow", "feeds[1].composition.benzene",
        "feeds[1].composition.toluene", "feeds[1].composition.o-xylene", "main.pressure.top", "main.efficiency",
        "thermo.vapor_pressure_shift.benzene", "thermo.vapor_pressure_shift.toluene", "thermo.vapor_pressure_shift.o-xylene",
    ]
    # 2 products x (flow, 3 fractions, 3 recoveries), 3 duties, 24 stage temperatures
    assert len(found.outputs) == 2 * 7 + 3 + 24
    assert found.derivatives.shape == (41, 13) and np.all(np.isfinite(found.derivatives))


def test_balances_hold_along_the_derivatives(pumparound):
    """The overall balance: the products take all of the feed, so d(D + B)/dF = 1 and every
    input leaves the sum of a component's recoveries at 1 (derivative 0)."""
    _, _, _, found = pumparound
    keys = [item.key for item in found.inputs]
    flows = found.derivatives[found.output_index("main.distillate.flow")] + found.derivatives[found.output_index("main.bottoms.flow")]
    assert flows[keys.index("feeds[1].flow")] == pytest.approx(1.0, rel=1e-6)
    assert np.abs(np.delete(flows, keys.index("feeds[1].flow"))).max() < 1e-6
    for name in ("benzene", "toluene", "o-xylene"):
        total = (found.derivatives[found.output_index(f"main.distillate.recovery.{name}")]
                 + found.derivatives[found.output_index(f"main.bottoms.recovery.{name}")])
        assert np.abs(total).max() < 1e-6, name
    # the distillate purity is a spec: its elasticity to its own spec value is 1, to anything else 0
    row = found.elasticities()[found.output_index("main.distillate.mole_fraction.benzene")]
    assert row[keys.index("columns[0].specs.distillate.benzene")] == pytest.approx(1.0, rel=1e-9)
    assert np.abs(np.delete(row, keys.index("columns[0].specs.distillate.benzene"))).max() < 1e-7


def test_run_with_sensitivity_on_a_network(capsys, tmp_path):
    code = main(["run", str(CASES / "aromatics_pumparound.toml"), "--sensitivity", "--out", str(tmp_path)])
    out, err = capsys.readouterr()
    assert code == 0, err
    assert "Sensitivities, specs held" in out and "pumparound duty" in out
    section = json.loads((tmp_path / "result.json").read_text())["sensitivity"]
    assert section["schema"] == "traystack-sensitivity/1" and list(section["views"]) == ["as_specified"]
    data = section["as_specified"]
    assert len(data["outputs"]) == 41 and all(len(row) == len(data["inputs"]) == 13 for row in data["derivatives"])
    rows = list(csv.DictReader(io.StringIO((tmp_path / "sensitivity.csv").read_text())))
    assert len(rows) == 41 * 13
    spec_row = next(r for r in rows if r["output"] == "main.distillate.mole_fraction.benzene"
                    and r["input"] == "columns[0].specs.distillate.benzene")
    assert float(spec_row["elasticity"]) == pytest.approx(1.0, rel=1e-9)


def test_unconverged_network_has_no_sensitivities(capsys, tmp_path):
    code = main(["run", str(CASES / "aromatics_pumparound.toml"), "--sensitivity", "--max-iterations", "1",
                 "--out", str(tmp_path)])
    out, err = capsys.readouterr()
    assert code == 3 and "Traceback" not in err
    assert "no sensitivities: the network did not converge" in out
    assert "sensitivity" not in json.loads((tmp_path / "result.json").read_text())
