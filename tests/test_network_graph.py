"""The network as one graph (solver/network_graph.py): weighted inflow matrices, rate
connections, products, and the degrees of freedom counted over the whole network."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from conftest import NETWORK_EXAMPLE, network_example_case
from solver.case import load_case
from solver.cli import main
from solver.errors import SpecError
from solver.network import build_stage_graph
from solver.network_graph import build_network_graph, check_network, count_degrees_of_freedom, network_of_case

# the shipped single-column cases (the network cases are [[columns]] files)
CASES = sorted(p for p in (Path(__file__).parent.parent / "cases").glob("*.toml") if "[[columns]]" not in p.read_text())
EXAMPLE = NETWORK_EXAMPLE
network_case = network_example_case


@pytest.mark.parametrize("path", CASES, ids=lambda p: p.stem)
def test_single_column_matrices_equal_todays_builder(path):
    """For every shipped case the network builder gives exactly the matrices and arrays of
    solver/network.py (same stage order, same entries, all weights 1)."""
    case = load_case(path)
    old = build_stage_graph(case)
    new = check_network(case)
    assert new.stage_count == old.stage_count
    for mine, theirs in ((new.liquid_inflow, old.liquid_inflow), (new.vapor_inflow, old.vapor_inflow)):
        assert mine.shape == theirs.shape
        assert (mine != theirs).nnz == 0
        assert np.array_equal(mine.toarray(), theirs.toarray())
    assert new.roles == old.roles
    assert np.array_equal(new.feed_stages, old.feed_stages)
    assert np.array_equal(new.pressures, old.pressures)
    assert np.array_equal(new.liquid_draws, old.liquid_draws) and np.array_equal(new.vapor_draws, old.vapor_draws)
    assert np.array_equal(new.fixed_duties, old.fixed_duties)
    assert new.vapor_product_share[old.top_stage] == 1.0 and new.liquid_product_share[old.bottom_stage] == 1.0
    assert new.transfer_source.shape == (old.stage_count, 0)
    expected = (old.condenser != "none") + old.has_reboiler
    assert len(new.degrees_of_freedom) == expected == len(case.specs)


def test_example_network_graph():
    graph = check_network(load_case(EXAMPLE))
    index = graph.index
    assert graph.stage_count == 25 and index[("stripper", 1)] == 20
    L, V = graph.liquid_inflow.toarray(), graph.vapor_inflow.toarray()
    main8, main9, main6 = index[("main", 8)], index[("main", 9)], index[("main", 6)]
    assert L[main9, main8] == pytest.approx(0.7) and L[main6, main8] == pytest.approx(0.3)
    # all the stripper's top vapor goes to main stage 11; none goes on as a stripper distillate
    top = index[("stripper", 1)]
    assert V[index[("main", 11)], top] == 1.0 and graph.vapor_product_share[top] == 0.0
    # everything leaving a stage for its neighbours goes somewhere, once
    for matrix, share in ((L, graph.liquid_product_share), (V, graph.vapor_product_share)):
        leaving = matrix.sum(axis=0) + share
        assert np.allclose(leaving, 1.0)
    # the free draw to the stripper is a transfer: out of main 12, into stripper 1, rate unknown
    assert graph.transfer_names == ("to-stripper",) and graph.transfer_phases == ("liquid",)
    assert graph.transfer_source.toarray()[index[("main", 12)], 0] == 1.0
    assert graph.transfer_destination.toarray()[top, 0] == 1.0
    assert np.isnan(graph.transfer_rates[0])
    # the main column's liquid from 12 still goes on to 13 (the draw is a rate, not a share)
    assert L[index[("main", 13)], index[("main", 12)]] == 1.0
    assert np.array_equal(graph.feed_stages, [index[("main", 10)]])
    assert ("product", "main.distillate") in graph.graph and ("product", "stripper.bottoms") in graph.graph
    assert ("product", "stripper.distillate") not in graph.graph
    assert [(f.equipment, f.what) for f in graph.degrees_of_freedom] == [
        ("main", "condenser"), ("main", "reboiler"), ("stripper", "reboiler"), ("to-stripper", "free rate")]


def test_two_streams_between_the_same_stages_are_both_kept():
    """A liquid pumped back from stage 12 to 11 runs beside the vapor rising from 12 to 11."""
    def change(data):
        data["connections"][2]["from"]["stage"] = 12
        data["connections"][2]["to"]["stage"] = 11
    graph = build_network_graph(network_of_case(network_case(change)), network_case(change).feeds)
    i12, i11 = graph.index[("main", 12)], graph.index[("main", 11)]
    assert graph.liquid_inflow[i11, i12] == pytest.approx(0.3) and graph.vapor_inflow[i11, i12] == 1.0
    assert graph.graph.number_of_edges(("main", 12), ("main", 11)) == 2


def test_too_few_specs_names_the_equipment_that_lacks_one():
    case = network_case(lambda data: data["columns"][1].pop("specs"))
    with pytest.raises(SpecError) as caught:
        count_degrees_of_freedom(case.network, case.source_file)
    message = str(caught.value)
    assert "4 degree(s) of freedom and 3 spec(s): too few" in message
    assert "connection 'to-stripper' lacks 1 spec(s) (its free rate" in message
    assert "'main'" not in message


def test_too_many_specs_names_the_equipment_that_has_one_too_many():
    case = network_case(lambda data: data["specs"].append({"on": "stripper", "stage": 3, "temperature": "150 degC"}))
    with pytest.raises(SpecError) as caught:
        count_degrees_of_freedom(case.network, case.source_file)
    message = str(caught.value)
    assert "too many" in message and "column 'stripper' has 2 spec(s) too many" in message
    assert "specs[1].temperature" in message


def test_heat_link_takes_the_reboilers_freedom():
    def link(data):
        data["heat_links"] = [{"name": "integration", "from": "main.condenser", "to": "stripper.reboiler"}]
    with pytest.raises(SpecError, match="heated by heat link 'integration'.*two specs"):
        check_network(network_case(link))

    def link_without_boilup(data):
        link(data)
        data["columns"][1].pop("specs")
    graph = check_network(network_case(link_without_boilup))
    assert ("stripper", "reboiler") not in [(f.equipment, f.what) for f in graph.degrees_of_freedom]
    assert len(graph.degrees_of_freedom) == 3


def test_a_free_cooler_needs_a_spec():
    def free_cooler(data):
        data["connections"][2]["cooling"] = {"duty": "free"}
    with pytest.raises(SpecError, match="connection 'pumparound' lacks 1 spec.*cooling duty"):
        check_network(network_case(free_cooler))

    def with_return_temperature(data):
        free_cooler(data)
        data["specs"].append({"on": "pumparound", "return_temperature": "90 degC"})
    graph = check_network(network_case(with_return_temperature))
    assert ("pumparound", "cooling duty") in [(f.equipment, f.what) for f in graph.degrees_of_freedom]


def test_run_solves_a_network_and_writes_schema_2(capsys, tmp_path):
    import json

    assert main(["run", str(EXAMPLE), "--out", str(tmp_path / "out")]) == 0
    screen = capsys.readouterr().out
    assert "stages of main" in screen and "stages of stripper" in screen
    # the example's stripper vapor goes up from 1.15 to 1.17 bar: a caution on screen and in summary.md
    assert "caution:" in screen and "stripper-vapor" in screen
    assert "'stripper-vapor'): vapor from stripper stage 1 at 115 kPa" in (tmp_path / "out" / "summary.md").read_text()
    data = json.loads((tmp_path / "out" / "result.json").read_text())
    assert data["schema"] == "traystack-result/2" and data["converged"] is True
    assert {s["column"] for s in data["stages"]} == {"main", "stripper"}
    assert set(data["products"]) == {"main.distillate", "main.bottoms", "stripper.bottoms"}
    assert abs(data["products"]["stripper.bottoms"]["flow"] - 30 / 3.6) < 1e-9  # the spec "30 kmol/h"
    assert set(data["connections"]) == {"to-stripper", "stripper-vapor", "pumparound"}
    assert data["duties"]["pumparound"] == -0.5e6
    assert (tmp_path / "out" / "network.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"  # the picture of the network


def test_run_reports_a_network_spec_mismatch_with_exit_2(capsys, tmp_path):
    text = EXAMPLE.read_text().replace("boilup_ratio = 0.8", "")
    path = tmp_path / "net.toml"
    path.write_text(text)
    assert main(["run", str(path)]) == 2
    error = capsys.readouterr().err
    assert "too few" in error and "to-stripper" in error and "Traceback" not in error


@pytest.mark.parametrize(
    "spec, parts",
    [
        ({"on": "pumparound", "fraction": 0.2}, ["specs[1].fraction", "'pumparound' already has fraction = 0.3", "two specs"]),
        ({"on": "stripper-vapor", "flow": "5 kmol/h"}, ["'stripper-vapor' already has all of the phase"]),
        ({"on": "pumparound", "return_temperature": "90 degC"}, ["cooling of connection 'pumparound' is already fixed"]),
    ],
)
def test_a_spec_on_a_fixed_connection_is_two_specs(spec, parts):
    def change(data):
        data["columns"][1].pop("specs")  # so that the counts alone would balance
        data["specs"].append(spec)
    with pytest.raises(SpecError) as caught:
        check_network(network_case(change))
    for part in parts:
        assert part in str(caught.value)


def test_check_solves_a_network_case_and_compares_its_baseline(tmp_path):
    import json

    from solver.regress import baseline_path, check_case, write_baseline

    path = tmp_path / "network.toml"
    path.write_text(EXAMPLE.read_text())
    outcome = check_case(path)
    assert outcome.status == "no baseline", outcome.message
    assert set(outcome.current["duties"]) == {"main.condenser", "main.reboiler", "stripper.reboiler", "pumparound"}
    assert len(outcome.current["stage_temperatures"]) == 25
    write_baseline(baseline_path(path), outcome.current)
    assert check_case(path).status == "pass"
    moved = json.loads(baseline_path(path).read_text())
    moved["connections"]["to-stripper"] *= 1.001
    write_baseline(baseline_path(path), moved)
    drift = check_case(path)
    assert drift.status == "drift" and "connections.to-stripper.flow" in [d.quantity for d in drift.deviations]
