"""Outside checks of the network engine.

* Closure: over the whole network, every component's feed equals what leaves in the products,
  and the feeds' enthalpy plus every duty equals the products' enthalpy, to 1e-10 relative,
  recomputed here from the result file alone (the conservation laws, not the solver's own
  report of them), for every shipped network case.
* Identity: the same column built as one chain and as two columns joined by two connections
  (all of the liquid down, all of the vapor up) is the same set of equations; the solutions
  agree to 1e-9 relative. Both also agree with the single-column engine (solver/engine.py),
  an independent assembly of the same equations, to the Newton tolerance.
"""

from __future__ import annotations

import copy
import json
import tomllib
from pathlib import Path

import numpy as np
import pytest

from solver.case import load_case, parse_case
from solver.engine import simulate
from solver.network_engine import simulate_network

CASES = Path(__file__).resolve().parents[2] / "cases"
NETWORK_CASES = sorted(p for p in CASES.glob("*.toml") if "[[columns]]" in p.read_text())


def test_there_are_shipped_network_cases():
    assert {p.stem for p in NETWORK_CASES} >= {"paraffins_side_stripper", "aromatics_pumparound", "aromatics_petlyuk"}


@pytest.mark.parametrize("path", NETWORK_CASES, ids=lambda p: p.stem)
def test_component_and_energy_closure_over_the_network(path):
    data = json.loads(simulate_network(load_case(path)).to_json())
    assert data["schema"] == "traystack-result/2" and data["converged"], data["message"]
    feeds = [feed for stage in data["stages"] for feed in stage["feeds"]]
    component_in = sum(np.array(feed["z"]) * feed["flow"] for feed in feeds)
    component_out = sum(np.array(p["composition"]) * p["flow"] for p in data["products"].values())
    present = component_in > 0
    closure = np.abs(component_in - component_out)[present] / component_in[present]
    assert np.max(closure) < 1e-10, closure
    energy_in = sum(feed["flow"] * feed["h"] for feed in feeds)
    energy_out = sum(p["flow"] * p["h"] for p in data["products"].values())
    duties = [stage["duty"] for stage in data["stages"]]
    scale = abs(energy_in) + abs(energy_out) + sum(abs(q) for q in duties)
    assert abs(energy_in + sum(duties) - energy_out) / scale < 1e-10
    # every named duty is among the stage duties (the exchangers' duties enter their stages)
    assert sum(data["duties"].values()) == pytest.approx(sum(duties), rel=1e-12, abs=1e-6)


#: Murphree efficiency and specs of the two variants (a purity of 0.98 needs all 16 stages at
#: efficiency 1; at 0.7 the splitter runs at a given distillate rate instead).
VARIANTS = {
    "equilibrium stages": (1.0, None),
    "Murphree 0.7": (0.7, {"reflux_ratio": 2.2, "distillate_rate": "66 kmol/h"}),
}


def _single_data(efficiency: float, specs: dict | None) -> dict:
    data = tomllib.loads((CASES / "benzene_toluene.toml").read_text())
    data["column"]["efficiency"] = efficiency
    if specs is not None:
        data["specs"] = specs
    return data


def _chain_data(efficiency: float, specs: dict | None) -> dict:
    """The aromatics splitter of cases/benzene_toluene.toml as a network of one column."""
    data = _single_data(efficiency, specs)
    column = data.pop("column")
    specs = data.pop("specs")
    data["columns"] = [{
        "name": "splitter", "stages": column["stages"], "condenser": "total", "reboiler": "partial",
        "pressure": {"top": column["pressure"]["top"], "drop_per_stage": column["pressure"]["drop_per_stage"]},
        "efficiency": efficiency, "specs": specs,
    }]
    data["feeds"][0]["column"] = "splitter"
    return data


def _two_column_data(efficiency: float, specs: dict | None) -> dict:
    """The same column cut below its feed stage (8 of 16) into two columns: all the liquid of
    the upper column's last stage goes to the lower column's first, all the vapor of that stage
    back up."""
    data = _chain_data(efficiency, specs)
    whole = data["columns"][0]
    upper = dict(copy.deepcopy(whole), name="upper", stages=8, reboiler="none")
    lower = {"name": "lower", "stages": 8, "condenser": "none", "reboiler": "partial", "efficiency": efficiency,
             "pressure": {"top": "106.125 kPa", "drop_per_stage": whole["pressure"]["drop_per_stage"]}}
    data["columns"] = [upper, lower]
    data["connections"] = [
        {"name": "down", "from": {"column": "upper", "stage": 8, "phase": "liquid"}, "to": {"column": "lower", "stage": 1}},
        {"name": "up", "from": {"column": "lower", "stage": 1, "phase": "vapor"}, "to": {"column": "upper", "stage": 8}},
    ]
    data["feeds"][0]["column"] = "upper"
    return data


@pytest.mark.parametrize("variant", list(VARIANTS))
def test_one_chain_and_two_joined_columns_give_the_same_solution(variant):
    efficiency, specs = VARIANTS[variant]
    assert tomllib.loads((CASES / "benzene_toluene.toml").read_text())["column"]["pressure"] == {
        "top": "101.325 kPa", "drop_per_stage": "0.6 kPa"}  # 101.325 + 8 x 0.6 = 106.125 kPa below the cut
    chain = simulate_network(parse_case(_chain_data(efficiency, specs), source_file="chain.toml"))
    joined = simulate_network(parse_case(_two_column_data(efficiency, specs), source_file="joined.toml"))
    assert chain.converged and joined.converged
    assert np.array_equal(chain.pressure, joined.pressure)
    for name in ("temperature", "liquid_flow", "vapor_flow", "x", "y", "duty"):
        a, b = getattr(chain, name), getattr(joined, name)
        assert np.allclose(a, b, rtol=1e-9, atol=1e-9 * np.max(np.abs(a))), name
    assert chain.products["splitter.distillate"]["flow"] == pytest.approx(joined.products["upper.distillate"]["flow"], rel=1e-9)
    assert chain.duties["splitter.reboiler"] == pytest.approx(joined.duties["lower.reboiler"], rel=1e-9)
    # the single-column engine assembles the same equations its own way
    single = simulate(parse_case(_single_data(efficiency, specs), source_file="single.toml"))
    assert single.converged
    assert np.allclose(single.temperature, chain.temperature, rtol=0, atol=1e-6)
    assert np.allclose(single.x, chain.x, rtol=0, atol=1e-8)
    assert single.reboiler_duty == pytest.approx(chain.duties["splitter.reboiler"], rel=1e-7)
