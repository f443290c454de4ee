"""``traystack sweep`` and ``traystack size`` on a network case (solver/sweep.py,
solver/warm_starts.py, solver/cli/network.py), and each column of a network seen alone
(NetworkResult.column_result), which the sizing reads."""

from __future__ import annotations

import csv
import io
import json
import tomllib
from pathlib import Path

import numpy as np
import pytest
from conftest import NETWORK_EXAMPLE, network_example_case

from solver.case import load_case
from solver.cli import main
from solver.network_engine import build_network_system, simulate_network
from solver.network_unknowns import network_start, scaled_start
from solver.sweep import parse_variation, run_sweep
from solver.warm_starts import solve_warm

CASES = Path(__file__).parent.parent / "cases"


class InlineExecutor:
    """Runs each call at once in the caller's thread (any Executor will do)."""

    def submit(self, fn, *args, **kwargs):
        from concurrent.futures import Future

        future = Future()
        future.set_result(fn(*args, **kwargs))
        return future


@pytest.fixture(scope="module")
def example_result():
    result = simulate_network(network_example_case())
    assert result.converged, result.message
    return result


@pytest.mark.parametrize("path", [NETWORK_EXAMPLE, CASES / "aromatics_petlyuk.toml"], ids=["side stripper", "petlyuk"])
def test_each_column_alone_closes_its_own_balances(path):
    """Connections in become feeds, connections out side draws: every column then closes its
    component and energy balances from its own feeds, products and duties (1e-10)."""
    result = simulate_network(load_case(path))
    for column in result.columns:
        alone = result.column_result(column["name"])
        assert alone.stage_count == column["stages"]
        closure = alone.balances()
        assert closure["component_closure_max"] < 1e-10 and closure["energy_closure_rel"] < 1e-10, (column["name"], closure)


def test_the_stripper_alone(example_result):
    stripper = example_result.column_result("stripper")
    (feed,) = stripper.stage_feeds[0]  # the liquid from main stage 12
    assert feed.name == "to-stripper" and feed.q == 1.0
    assert feed.flow == pytest.approx(example_result.connections["to-stripper"]["flow"], rel=1e-12)
    main_12 = example_result.column_stages("main")[11]
    assert feed.z == pytest.approx(tuple(example_result.x[main_12]), rel=1e-12)
    # its top vapor (all of it goes back to main) is its top product, its bottoms the spec'd 30 kmol/h
    assert stripper.distillate_flow == pytest.approx(example_result.connections["stripper-vapor"]["flow"], rel=1e-12)
    assert stripper.bottoms_flow == pytest.approx(30 / 3.6, rel=1e-9)
    main = example_result.column_result("main")
    assert main.liquid_draw[7] == pytest.approx(example_result.connections["pumparound"]["flow"], rel=1e-12)  # 30 % of stage 8
    assert main.liquid_flow[7] == pytest.approx(0.7 * example_result.liquid_flow[7], rel=1e-12)


def test_network_start_round_trips_through_the_scaled_unknowns(example_result):
    case = network_example_case()
    system = build_network_system(case)
    X = scaled_start(system, network_start(example_result))
    assert X is not None and np.all(np.isfinite(X))
    assert np.max(np.abs(system.evaluate(X, jacobian=False).residuals)) < 1e-8  # the converged point still solves the system
    assert scaled_start(system, network_start(simulate_network(load_case(CASES / "aromatics_pumparound.toml")))) is None


def test_warm_network_solve_from_a_neighbour(example_result):
    def higher_reflux(data):
        data["columns"][0]["specs"]["reflux_ratio"] = 2.7
    case = network_example_case(higher_reflux)
    warm = solve_warm(case, network_start(example_result))
    cold = simulate_network(case)
    assert warm.warm and warm.result.converged and cold.converged
    assert warm.result.iterations <= cold.iterations
    assert warm.result.products["main.distillate"]["flow"] == pytest.approx(cold.products["main.distillate"]["flow"], rel=1e-8)


def test_sweep_of_a_network_spec(tmp_path):
    document = tomllib.loads(NETWORK_EXAMPLE.read_text())
    result = run_sweep(document, [parse_variation("columns[0].specs.reflux_ratio=2.3:2.7:3")], InlineExecutor(), warm=True)
    assert [o.status for o in result.outcomes] == ["converged"] * 3
    assert result.network and result.end_products() == ("main.distillate", "main.bottoms")
    assert [o.warm_start for o in result.outcomes] == [False, True, True]
    first = result.outcomes[0]
    assert first.reboiler_duty == pytest.approx(first.duties["main.reboiler"] + first.duties["stripper.reboiler"], rel=1e-12)
    # more reflux at a fixed distillate purity: more condenser duty
    assert abs(result.outcomes[2].condenser_duty) > abs(result.outcomes[0].condenser_duty)
    for outcome in result.outcomes:
        assert outcome.products["main.distillate"][1][0] == pytest.approx(0.98, abs=1e-7)  # the benzene spec holds


def test_sweep_command_on_a_network_feed(tmp_path, capsys):
    out = tmp_path / "sweep"
    assert main(["sweep", str(NETWORK_EXAMPLE), "--vary", "feeds[0].flow=95 kmol/h:105 kmol/h:2", "--out", str(out)]) == 0
    screen = capsys.readouterr().out
    assert "2 of 2 points converged" in screen and "columns)" in screen  # the duties summed over all columns
    rows = list(csv.DictReader(io.StringIO((out / "sweep.csv").read_text())))
    assert [row["status"] for row in rows] == ["converged", "converged"]
    assert "duty_stripper.reboiler_W" in rows[0] and "x_stripper.bottoms_toluene" in rows[0] and "x_distillate_benzene" not in rows[0]
    for row in rows:
        assert float(row["stripper.bottoms_flow_mol_s"]) == pytest.approx(30 / 3.6, rel=1e-8)  # the product-flow spec
        closure = sum(float(row[f"{p}_flow_mol_s"]) for p in ("main.distillate", "main.bottoms", "stripper.bottoms"))
        assert closure == pytest.approx(float(row["feeds[0].flow [kmol/h]"]) / 3.6, rel=1e-7)  # the feed (CSV: 9 digits)


def test_size_command_sizes_every_column(tmp_path, capsys):
    out = tmp_path / "size"
    assert main(["size", str(CASES / "paraffins_side_stripper.toml"), "--out", str(out)]) == 0
    screen = capsys.readouterr().out
    assert "column main" in screen and "column stripper" in screen
    sizing = json.loads((out / "result.json").read_text())["sizing"]
    assert set(sizing) == {"main", "stripper"}
    # sections of main break at the stripper's vapor return (13), the liquid drawn for it (14) and the feed (18)
    assert [(s["first_stage"], s["last_stage"]) for s in sizing["main"]["sections"]] == [(2, 12), (13, 13), (14, 17), (18, 29)]
    assert [(s["first_stage"], s["last_stage"]) for s in sizing["stripper"]["sections"]] == [(1, 4)]
    assert all(0.1 < s["diameter"] < 5 for c in sizing.values() for s in c["sections"])
    text = (out / "summary.md").read_text()
    assert "## Sizing of column main" in text and "## Sizing of column stripper" in text
    for name in ("flood_main.png", "flood_stripper.png"):
        assert (out / name).read_bytes()[:4] == b"\x89PNG"


def test_a_network_without_distillate_products_shows_two_different_products():
    """Pressure swing: both distillates go on through connections, so the study's two shown
    products are the two bottoms, not one bottoms twice."""
    from solver.sweep import PointOutcome, SweepResult

    products = {"low-pressure.bottoms": (13.9, (0.005, 0.995)), "high-pressure.bottoms": (13.9, (0.995, 0.005))}
    outcome = PointOutcome(0, (3.0,), "converged", products=products, duties={"low-pressure.reboiler": 1.0})
    result = SweepResult((), ("acetone", "methanol"), (outcome,))
    assert result.end_products() == ("low-pressure.bottoms", "high-pressure.bottoms")
    assert result.key_components() == (1, 0)
