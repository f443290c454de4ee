"""The fallback chain on column networks (solver/network_engine.py): when Newton from both
network starts fails, homotopy continuation from ideal K-values and CMO enthalpies solves the
network; when every rung fails, the message names each rung and how far it got; and a heat link
whose condenser ends colder than the reboiler it heats is refused."""

from __future__ import annotations

import re
from pathlib import Path

from solver.case import load_case, loads_case
from solver.network_engine import simulate_network
from solver.newton import NewtonOptions

CASES = Path(__file__).resolve().parent.parent / "cases"


def test_homotopy_solves_a_network_whose_starts_fail():
    # four Newton iterations are too few from either network start (the default solve takes 5),
    # but enough for each short step along the homotopy path
    case = load_case(CASES / "crude_like_side_strippers.toml")
    result = simulate_network(case, options=NewtonOptions(max_iterations=4))
    assert result.strategy["second_start"]["converged"] is False
    assert result.strategy["rung"] == "homotopy"
    assert result.strategy["homotopy_reached"] == 1.0
    steps = result.iterations_by_step
    assert steps[-1] == ("homotopy t=1", result.iterations) and [name for name, _ in steps[:2]] == ["newton", "second_start"]
    assert result.total_iterations == sum(n for _, n in steps) > result.iterations
    assert result.converged and result.post_check["component_balance_max"] < 1e-8
    reference = simulate_network(case)
    assert reference.strategy["rung"] == "newton"
    for name, product in reference.products.items():
        assert abs(result.products[name]["flow"] - product["flow"]) < 1e-7 * product["flow"]
        assert max(abs(a - b) for a, b in zip(result.products[name]["composition"], product["composition"])) < 1e-7


def test_homotopy_is_not_tried_when_switched_off():
    case = load_case(CASES / "crude_like_side_strippers.toml")
    result = simulate_network(case, options=NewtonOptions(max_iterations=4), continuation=False)
    assert not result.converged
    assert "homotopy_path" not in result.strategy


def test_a_network_unsolved_by_every_rung_says_what_was_tried():
    case = load_case(CASES / "methanol_water_pressure_pair.toml")
    result = simulate_network(case, options=NewtonOptions(max_iterations=3))
    assert not result.converged
    assert result.strategy["rung"] is None
    assert "the fallback chain failed on every rung" in result.message
    assert re.search(r"the start from CMO flows \(\d+", result.message) and "homotopy from ideal K-values, which reached t = " in result.message


def test_a_heat_link_from_a_colder_condenser_is_refused():
    # the "high-pressure" column run at 1 bar condenses its methanol near 64 degC, far below
    # the other column's boiling water (about 103 degC): the equations solve, the plant cannot
    text = (CASES / "methanol_water_pressure_pair.toml").read_text().replace('top = "6 bar"', 'top = "1.0 bar"')
    result = simulate_network(loads_case(text, source_file="<cold condenser>"))
    assert not result.converged
    assert "heat would flow from cold to hot" in result.message
    assert "high-pressure.condenser at 64." in result.message and "low-pressure.reboiler at 10" in result.message
