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
