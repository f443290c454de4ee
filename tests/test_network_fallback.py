"""The fallback chain on column networks (solver/network_engine.py): when Newton from both
network starts fails, homotopy continuation from ideal K-values and CMO enthalpies solves the
network; when homotopy fails too, the network with every column shortened is solved first and
Newton starts the full network from its solution stretched; when every rung fails, the message names each rung and how far it got; and a heat link
whose condenser ends colder than the reboiler it heats is refused."""

from __future__ import annotations

import re
from pathlib import Path

from solver.case import load_case, loads_case
from solver.network_engine import simulate_network
from solver.network_shortening import network_special_stages, shortened_network
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
    assert re.search(r"the shorter column \(32 stages solved, then 3 on the full network\)", result.message)


def test_the_shorter_column_solves_a_network_whose_starts_and_homotopy_fail():
    # seven Newton iterations are too few from either start of the 60-stage pressure pair (the
    # default solve takes 8) and for homotopy's first point; the pair with every section halved
    # (32 stages) solves in 2, and the full pair from its stretched solution in 7
    case = load_case(CASES / "methanol_water_pressure_pair.toml")
    result = simulate_network(case, options=NewtonOptions(max_iterations=7))
    assert result.strategy["second_start"]["converged"] is False
    assert result.strategy["homotopy_reached"] < 1.0
    assert result.strategy["rung"] == "shorter column"
    shorter = result.strategy["shorter_column"]
    assert shorter["stages"] == 32 and shorter["converged"] is True
    steps = result.iterations_by_step
    assert steps[-1] == ("shorter column", result.iterations) and steps[-2][0] == "shortened network: newton"
    assert result.total_iterations == sum(n for _, n in steps)
    assert result.converged and result.post_check["component_balance_max"] < 1e-8
    reference = simulate_network(case)
    assert reference.strategy["rung"] == "damped newton"  # the default solve: damped Newton from the first start
    for name, product in reference.products.items():
        assert abs(result.products[name]["flow"] - product["flow"]) < 1e-7 * product["flow"]
        assert max(abs(a - b) for a, b in zip(result.products[name]["composition"], product["composition"])) < 1e-7
    for name, duty in reference.duties.items():
        assert abs(result.duties[name] - duty) < 1e-7 * abs(duty)
    assert max(abs(result.temperature - reference.temperature)) < 1e-7


def test_a_shortened_network_keeps_every_special_stage_and_a_stage_of_every_section():
    case = load_case(CASES / "crude_like_side_strippers.toml")
    short, positions = shortened_network(case, 0.5)
    for full, cut in zip(case.network.columns, short.network.columns):
        special = network_special_stages(case, full.name)
        at = positions[full.name]
        assert len(at) == cut.column.stages < full.column.stages or len(special) == full.column.stages
        assert all(s in at for s in special)
        # each section between special stages keeps about half its plain stages, at least one
        for a, b in zip(special[:-1], special[1:]):
            kept = int(((at > a) & (at < b)).sum())
            assert kept == (0 if b - a == 1 else max(1, round((b - a - 1) * 0.5)))
        assert cut.column.pressures[0] == full.column.pressures[0] and cut.column.pressures[-1] == full.column.pressures[-1]
    for old, new in zip(case.network.connections, short.network.connections):
        assert positions[old.from_column][new.from_stage - 1] == old.from_stage
        assert positions[old.to_column][new.to_stage - 1] == old.to_stage
    for old, new, owner in zip(case.feeds, short.feeds, case.network.feed_columns):
        assert positions[owner][new.stage - 1] == old.stage


def test_the_shorter_column_is_not_tried_when_switched_off():
    case = load_case(CASES / "methanol_water_pressure_pair.toml")
    result = simulate_network(case, options=NewtonOptions(max_iterations=7), shortening=0)
    assert not result.converged
    assert "shorter_column" not in result.strategy
    assert "shorter column" not in result.message and all(not name.startswith("short") for name, _ in result.iterations_by_step)


def test_a_heat_link_from_a_colder_condenser_is_refused():
    # the "high-pressure" column run at 1 bar condenses its methanol near 64 degC, far below
    # the other column's boiling water (about 103 degC): the equations solve, the plant cannot
    text = (CASES / "methanol_water_pressure_pair.toml").read_text().replace('top = "6 bar"', 'top = "1.0 bar"')
    result = simulate_network(loads_case(text, source_file="<cold condenser>"))
    assert not result.converged
    assert "heat would flow from cold to hot" in result.message
    assert "high-pressure.condenser at 64." in result.message and "low-pressure.reboiler at 10" in result.message
