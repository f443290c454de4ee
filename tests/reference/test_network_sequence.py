"""Outside check of a distillate sent on by a connection (``from = { column, product =
"distillate" }``): the indirect sequence, whose first column's liquid distillate feeds the
second column, is the same set of equations as its two columns solved one after the other by
the single-column engine (solver/engine.py, an independent assembly of the MESH equations):
the first column alone, then the second fed with the first's distillate, a saturated liquid at
the first's top pressure. No recycle joins them, so the two must agree to the Newton tolerance.

And a Murphree tray that receives liquid distillate mixes only the vapors entering it: on the
example's main column (efficiency 0.8) with a fifth of its distillate sent back to stage 6, the
relation y = E K x + (1 - E) y_in holds there with y_in the vapor of stage 7 alone.
"""

from __future__ import annotations

import numpy as np
import pytest

from conftest import network_example_case
from solver.case import loads_case
from solver.engine import simulate
from solver.network_engine import simulate_network

COMPONENTS = '[components]\nnames = ["benzene", "toluene", "o-xylene"]\n[thermo]\nliquid = "ideal"\nenthalpy = "rigorous"\n'
FEED = "composition = { benzene = 0.33, toluene = 0.34, o-xylene = 0.33 }\n"


def _column(stages: int, top: str, specs: str, table: str) -> str:
    return (f'stages = {stages}\ncondenser = "total"\nreboiler = "partial"\n'
            f'pressure = {{ top = "{top}", drop_per_stage = "0.5 kPa" }}\n[{table}]\n{specs}\n')


FIRST_SPECS = 'reflux_ratio = 2.5\ndistillate_rate = "67 kmol/h"'
SECOND_SPECS = 'reflux_ratio = 3.0\ndistillate_rate = "33 kmol/h"'

NETWORK = (
    'title = "Indirect sequence"\n' + COMPONENTS
    + '[[columns]]\nname = "first"\n' + _column(30, "1.1 bar", FIRST_SPECS, "columns.specs")
    + '[[columns]]\nname = "second"\n' + _column(30, "1.05 bar", SECOND_SPECS, "columns.specs")
    + '[[connections]]\nname = "first-distillate"\nfrom = { column = "first", product = "distillate" }\n'
      'to = { column = "second", stage = 15 }\n'
    + '[[feeds]]\nname = "feed"\ncolumn = "first"\nstage = 15\nflow = "100 kmol/h"\n' + FEED + "vapor_fraction = 0.0\n"
)


def _single(title: str, top: str, specs: str, feed: str) -> str:
    return f'title = "{title}"\n' + COMPONENTS + "[column]\n" + _column(30, top, specs, "specs") + feed


@pytest.fixture(scope="module")
def solved():
    network = simulate_network(loads_case(NETWORK, source_file="indirect.toml"))
    assert network.converged, network.message
    first = simulate(loads_case(_single("first", "1.1 bar", FIRST_SPECS,
                                        '[[feeds]]\nstage = 15\nflow = "100 kmol/h"\n' + FEED + "vapor_fraction = 0.0\n"),
                                source_file="first.toml"))
    assert first.converged, first.message
    D, z = float(first.vapor_flow[0]), first.y[0].tolist()  # the total condenser's vapor slot: its liquid distillate
    composition = ", ".join(f"{name} = {value!r}" for name, value in zip(first.components, z))
    second = simulate(loads_case(_single("second", "1.05 bar", SECOND_SPECS,
                                         f'[[feeds]]\nstage = 15\nflow = "{D!r} mol/s"\ncomposition = {{ {composition} }}\n'
                                         f'vapor_fraction = 0.0\npressure = "{float(first.pressure[0])!r} Pa"\n'),
                                 source_file="second.toml"))
    assert second.converged, second.message
    return network, first, second


def test_the_distillate_leaves_no_product_and_is_reported_as_liquid(solved):
    network, first, _ = solved
    assert set(network.products) == {"first.bottoms", "second.distillate", "second.bottoms"}
    record = network.connections["first-distillate"]
    assert record["from"] == {"column": "first", "stage": 1, "phase": "liquid", "product": "distillate"}
    assert record["flow"] == pytest.approx(67 / 3.6, rel=1e-9)  # the first column's distillate_rate spec


@pytest.mark.parametrize("column", ["first", "second"])
def test_each_column_of_the_sequence_is_the_column_solved_alone(solved, column):
    network, first, second = solved
    alone = first if column == "first" else second
    stages = network.column_stages(column)
    assert np.max(np.abs(network.temperature[stages] - alone.temperature)) < 1e-6  # K
    for mine, theirs in ((network.liquid_flow[stages], alone.liquid_flow), (network.vapor_flow[stages], alone.vapor_flow),
                         (network.x[stages], alone.x), (network.y[stages], alone.y)):
        assert np.max(np.abs(mine - theirs)) <= 1e-7 * max(1.0, float(np.max(np.abs(theirs))))
    assert network.duties[f"{column}.reboiler"] == pytest.approx(alone.duty[-1], rel=1e-7)
    assert network.duties[f"{column}.condenser"] == pytest.approx(alone.duty[0], rel=1e-7)


def test_a_murphree_tray_receiving_distillate_mixes_only_the_vapor():
    def send_back(data):
        data["connections"].append({"name": "distillate-back", "from": {"column": "main", "product": "distillate"},
                                    "to": {"column": "main", "stage": 6}, "fraction": 0.2})

    result = simulate_network(network_example_case(send_back))
    assert result.converged, result.message
    s = 5  # main stage 6; main stage 7's vapor is all that rises into it
    assert result.efficiency[s] == pytest.approx(0.8)
    murphree = result.y[s] - 0.8 * result.K[s] * result.x[s] - 0.2 * result.y[s + 1]
    assert np.max(np.abs(murphree)) < 1e-9
    # mixing the distillate in as if it were vapor would be another equation, far from met here
    distillate = 0.2 * result.vapor_flow[0] * result.y[0]
    mixed = (result.vapor_flow[s + 1] * result.y[s + 1] + distillate) / (result.vapor_flow[s + 1] + distillate.sum())
    assert np.max(np.abs(result.y[s] - 0.8 * result.K[s] * result.x[s] - 0.2 * mixed)) > 1e-4
