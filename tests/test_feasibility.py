"""Infeasible specifications are refused before solving, naming the spec and the bound."""

from __future__ import annotations

import pytest

from conftest import methanol_water_case
from solver.errors import SpecError
from solver.engine import simulate

# feed: 100 kmol/h, 35 mol% methanol
INFEASIBLE = [
    ('distillate_rate = "120 kmol/h"\nreflux_ratio = 2.0', r"specs.distillate_rate = 120 kmol/h is impossible.*net feed, 100 kmol/h"),
    ('distillate_rate = "100 kmol/h"\nreflux_ratio = 2.0', r"between 0 and the net feed"),
    ('bottoms_rate = "100 kmol/h"\nreflux_ratio = 2.0', r"specs.bottoms_rate = 100 kmol/h is impossible"),
    ('distillate_rate = "30 kmol/h"\nbottoms_rate = "70 kmol/h"', r"fix one degree of freedom twice: D \+ B"),
    ('distillate = { methanol = 0.99, water = 0.01 }', r"two mole fractions of a binary distillate sum to one"),
    ('recovery = { methanol = { distillate = 0.99, bottoms = 0.01 } }', r"recoveries of methanol .* sum to one"),
    ('distillate_rate = "50 kmol/h"\ndistillate = { methanol = 0.9 }', r"at most 0.7\b"),
    ('bottoms_rate = "40 kmol/h"\ndistillate = { methanol = 0.7 }', r"\(so distillate 60 kmol/h\): at most 0.583333"),
    ('reflux_ratio = 2.0\nreboiler_duty = "5 kW"', r"reboiler_duty = 5 kW is too small to boil anything"),
]


@pytest.mark.parametrize("specs, message", INFEASIBLE)
def test_infeasible_specs_are_explained(specs, message):
    # a feed at 15 degC is subcooled: the reboiler-duty case needs its sensible heat
    case = methanol_water_case(specs=specs, feed_temperature="15 degC")
    with pytest.raises(SpecError, match=message):
        simulate(case)


def test_a_feasible_neighbour_still_solves():
    result = simulate(methanol_water_case(specs='distillate_rate = "34 kmol/h"\ndistillate = { methanol = 0.98 }'))
    assert result.converged


ETHANOL_WATER = """
title = "ethanol-water limits"
[components]
names = ["ethanol", "water"]
[thermo]
liquid = "nrtl"
[thermo.nrtl.ethanol.water]
constant_term = [-0.178, 1.963]
alpha = 0.2974
source = "Gmehling, Kolbe, Kleiber & Rarey 2012, Problem P05.01"
[column]
stages = {stages}
condenser = "total"
reboiler = "partial"
pressure = "1 atm"
[[feeds]]
stage = {feed}
flow = "100 kmol/h"
composition = {{ ethanol = 0.1, water = 0.9 }}
vapor_fraction = 0.0
[specs]
{specs}
"""


@pytest.mark.parametrize(
    "stages, feed, specs, message",
    [
        (40, 30, "reflux_ratio = 8.0\ndistillate = { ethanol = 0.95 }",
         r"specs.distillate.ethanol = 0.95 is beyond the minimum-boiling azeotrope at x = 0.90\d\d ethanol, 78.\d\d degC"),
        (40, 30, "reflux_ratio = 8.0\ndistillate = { water = 0.02 }", r"beyond the minimum-boiling azeotrope"),
        (40, 30, "reflux_ratio = 1.0\ndistillate = { ethanol = 0.85 }",
         r"reflux_ratio = 1 is below the minimum reflux ratio 2.0\d+ .*tangent pinch at x = 0.7\d\d\d"),
        (40, 30, "reflux_ratio = 0.3\ndistillate = { ethanol = 0.6 }", r"below the minimum reflux ratio 0.\d+ .*feed pinch"),
        (6, 4, "distillate = { ethanol = 0.85 }\nbottoms = { ethanol = 0.0001 }", r"needs at least \d+\.\d\d stages even at total reflux; the column has 6"),
    ],
)
def test_binary_limits_from_the_equilibrium_curve(make_case, stages, feed, specs, message):
    with pytest.raises(SpecError, match=message):
        simulate(make_case(ETHANOL_WATER.format(stages=stages, feed=feed, specs=specs)))


def test_reflux_above_the_tangent_pinch_minimum_solves(make_case):
    result = simulate(make_case(ETHANOL_WATER.format(stages=40, feed=30, specs="reflux_ratio = 3.0\ndistillate = { ethanol = 0.85 }")))
    assert result.converged
