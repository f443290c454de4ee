"""Infeasible specifications are refused before solving, naming the spec and the bound."""

from __future__ import annotations

import re
from pathlib import Path

import numpy as np
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


BENZENE_TOLUENE = Path(__file__).resolve().parent.parent / "cases" / "benzene_toluene.toml"


def benzene_toluene_text(stages: int = 16, feed: int = 14, specs: str = "reflux_ratio = 2.2\nbottoms = { toluene = 0.999999999 }") -> str:
    text = BENZENE_TOLUENE.read_text().replace("stages = 16", f"stages = {stages}").replace("stage = 8", f"stage = {feed}")
    return text.replace("reflux_ratio = 2.2\ndistillate = { benzene = 0.98 }", specs)


def test_total_reflux_bound_refuses_a_bottoms_purity_beyond_the_column(make_case):
    """Fenske by hand: from the feed's benzene/toluene ratio 0.45/0.55 to 1e-9 in the bottoms
    takes ln(0.818e9)/ln(alpha) stages; alpha of benzene/toluene at 1 atm lies between 2.3 and
    2.65 over the column (handbook figures, from memory), so 21.1 to 24.6 stages; 15 are there."""
    with pytest.raises(SpecError) as caught:
        simulate(make_case(benzene_toluene_text()))
    message = str(caught.value)
    found = re.search(r"specs.bottoms.toluene = 0.999999999 needs at least ([\d.]+) equilibrium stages even at total "
                      r"reflux; the column has 15 \(2 of them on the bottoms side of the feed\)", message)
    assert found, message
    assert 21.1 < float(found.group(1)) < 24.6
    alpha = float(re.search(r"benzene/toluene at its largest in the column, ([\d.]+)", message).group(1))
    assert 2.3 < alpha < 2.65


def test_total_reflux_bound_is_the_fenske_stage_count(make_case):
    """Just above and below the bound: the check refuses exactly where the Fenske count
    (read from its own message) exceeds the column's equilibrium stages."""
    from solver.engine import build_system

    with pytest.raises(SpecError) as caught:
        build_system(make_case(benzene_toluene_text()))
    needed = float(re.search(r"needs at least ([\d.]+)", str(caught.value)).group(1))
    enough = int(np.ceil(needed)) + 1  # equilibrium stages = stages - 1 (total condenser)
    build_system(make_case(benzene_toluene_text(stages=enough, feed=enough - 2)))
    with pytest.raises(SpecError, match="needs at least"):
        build_system(make_case(benzene_toluene_text(stages=enough - 1, feed=enough - 3)))


def test_total_reflux_bound_on_a_multicomponent_distillate_purity(make_case):
    """n-pentane at 1 - 1e-7 in the distillate of a C5-C8 cut: the closest heavier component,
    n-hexane, sets the bound (pentane/hexane alpha about 2.6-3.2 at 1 atm, from memory:
    ln((1e7)/(0.25/0.30))/ln(alpha) = 14 to 17 stages)."""
    text = (Path(__file__).resolve().parent.parent / "cases" / "paraffins_fug.toml").read_text()
    text = text.replace("stages = 18", "stages = 9").replace("stage = 9", "stage = 5").replace(
        "recovery = { n-hexane = { distillate = 0.98 }, n-heptane = { bottoms = 0.98 } }",
        "reflux_ratio = 3.0\ndistillate = { n-pentane = 0.9999999 }")
    with pytest.raises(SpecError) as caught:
        simulate(make_case(text))
    message = str(caught.value)
    found = re.search(r"specs.distillate.n-pentane = 0.9999999 needs at least ([\d.]+) equilibrium stages.*the column "
                      r"has 8 \(3 of them on the distillate side.*n-pentane/n-hexane", message)
    assert found, message
    assert 14.0 < float(found.group(1)) < 17.0


def test_total_reflux_bound_lets_a_wrong_way_purity_be_refused_and_a_loose_one_pass(make_case):
    """Toluene (the heavier one) at 0.99 in the distillate: no stage count enriches the
    distillate in the heavier component, while 0.98 benzene needs only a few stages."""
    from solver.engine import build_system

    with pytest.raises(SpecError, match="toluene = 0.99 needs no number of equilibrium stages"):
        build_system(make_case(benzene_toluene_text(specs="reflux_ratio = 2.2\ndistillate = { toluene = 0.99 }")))
    build_system(make_case(benzene_toluene_text(stages=8, feed=4, specs="reflux_ratio = 2.2\ndistillate = { benzene = 0.98 }")))
