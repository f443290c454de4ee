"""Every network case of the hard-case suite converges from the network's default start, and
its answer passes the post-check; the 120-stage divided-wall column from the first start (issue
13, item 8), within 12 iterations."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent))
from network_hard_cases import NETWORK_HARD_CASES  # noqa: E402
from solver.case import loads_case
from solver.network_engine import simulate_network


def test_the_network_suite_has_ten_cases():
    assert len(NETWORK_HARD_CASES) >= 10


@pytest.mark.parametrize("name", sorted(NETWORK_HARD_CASES))
def test_network_hard_case_converges(name):
    result = simulate_network(loads_case(NETWORK_HARD_CASES[name], source_file=f"<network hard case {name}>"))
    assert result.converged, f"{name}: {result.message} ({result.strategy})"
    assert result.post_check["enthalpy_balance_max"] < 1e-8
    assert result.post_check["component_balance_max"] < 1e-8
    assert result.strategy["rung"] in ("newton", "damped newton", "second start", "continued", "homotopy")
    # the reported count is the last run's; every run of the chain is listed, with the total
    steps = result.iterations_by_step
    assert steps[-1][1] == result.iterations and len(result.iteration_log) == result.iterations + 1
    if result.strategy["rung"] == "homotopy":
        assert steps[-1][0] == "homotopy t=1"
    else:
        assert [name for name, _ in steps] == {"second start": ["newton", "second_start"],
                                               "continued": ["newton", "second_start", "continued"]}.get(result.strategy["rung"], ["newton"])
    assert result.total_iterations == sum(n for _, n in steps) == result.to_dict()["total_iterations"]


def test_divided_wall_column_of_120_stages():
    result = simulate_network(loads_case(NETWORK_HARD_CASES["divided_wall_120"], source_file="<divided wall>"))
    assert result.stage_count == 120 and result.converged
    assert result.strategy["rung"] in ("newton", "damped newton") and "second_start" not in result.strategy, result.strategy
    assert result.iterations <= 12, result.strategy
    assert result.iterations_by_step == (("newton", result.iterations),)
    assert result.to_dict()["iterations_by_step"] == [{"step": "newton", "iterations": result.iterations}]
