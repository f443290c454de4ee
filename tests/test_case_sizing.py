"""The [sizing] table of a case file (solver.case.sizing_table, read through the case reader)."""

from __future__ import annotations

from pathlib import Path

import pytest

from solver.case import loads_case
from solver.case.sizing_table import DEFAULT_SIZING_THRESHOLDS, SizingOptions
from solver.errors import CaseError

BASE = (Path(__file__).resolve().parent.parent / "cases" / "methanol_water.toml").read_text()


def with_sizing(text: str):
    return loads_case(BASE + "\n[sizing]\n" + text, source_file="demo.toml")


def test_a_case_without_the_table_has_no_sizing_and_the_defaults_are_stated():
    assert loads_case(BASE).sizing is None
    options = SizingOptions()
    assert (options.internals, options.tray_spacing, options.flood_fraction) == ("sieve", 0.6, 0.8)
    assert dict(options.thresholds) == dict(DEFAULT_SIZING_THRESHOLDS) == {"cmo_diameter": 0.05, "flood": 0.85}


def test_values_with_units_are_read_in_si():
    case = with_sizing('internals = "valve"\ntray_spacing = "24 in"\nflood_fraction = "75 %"\n'
                       'downcomer = { rule = "residence_time", residence_time = "5 s", minimum_fraction = 0.08 }\n'
                       'thresholds = { cmo_diameter = 0.03 }\n'
                       '[sizing.components.Water]\nsurface_tension = "60 dyn/cm"\nsource = "a handbook"\n')
    sizing = case.sizing
    assert sizing.internals == "valve" and sizing.tray_spacing == pytest.approx(0.6096)
    assert sizing.flood_fraction == pytest.approx(0.75)
    assert (sizing.downcomer.rule, sizing.downcomer.residence_time, sizing.downcomer.minimum_fraction) == (
        "residence_time", 5.0, 0.08)
    assert sizing.thresholds == {"cmo_diameter": 0.03, "flood": 0.85}
    assert sizing.components["water"].surface_tension == pytest.approx(0.060)


def test_a_packing_is_read_with_its_source():
    case = with_sizing('internals = "random"\npacking = { packing_factor = "24 1/ft", nominal_size = "50 mm", '
                       'source = "maker\'s data sheet" }\n')
    assert case.sizing.packed and case.sizing.packing.packing_factor == pytest.approx(24 / 0.3048)
    assert case.sizing.packing.nominal_size == pytest.approx(0.05)


@pytest.mark.parametrize("text, key, words", [
    ('tray_spaceing = "0.6 m"', "sizing.tray_spaceing", "did you mean 'tray_spacing'"),
    ('internals = "bubble cap"', "sizing.internals", "not a known choice"),
    ('flood_fraction = 1.3', "sizing.flood_fraction", "out of range"),
    ('tray_spacing = "0.6 kg"', "sizing.tray_spacing", "0.6 kg"),
    ('internals = "structured"', "sizing.packing", "needs the packing's data"),
    ('internals = "random"\npacking = { packing_factor = 24, source = "x" }', "sizing.packing", "hetp"),
    ('packing = { packing_factor = 24, hetp = 0.5, source = "x" }', "sizing.packing", "internals = 'sieve'"),
    ('downcomer = { rule = "area" }', "sizing.downcomer.rule", "not a known choice"),
    ('thresholds = { flooding = 0.9 }', "sizing.thresholds.flooding", "unknown key"),
    ('[sizing.components.ethanol]\nsurface_tension = 0.02\nsource = "x"', "sizing.components.ethanol",
     "not a component of this case"),
    ('[sizing.components.water]\nsurface_tension = 0.02', "sizing.components.water.source", "missing"),
])
def test_bad_values_name_file_key_and_value(text, key, words):
    with pytest.raises(CaseError) as caught:
        with_sizing(text)
    message = str(caught.value)
    assert "demo.toml" in message and key in message and words in message
    assert caught.value.exit_code == 2
