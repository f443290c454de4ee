"""Plant units: mass feed flows, gauge pressures, MMBtu/h, lb/h and klb/h, ppm (molar) and
ppmw (mass) purities, and showing product flows in mass units.

Check values: the standard atmosphere 101325 Pa (ISO 2533; NIST SP 811, appendix B.8); psi =
6894.757293168361 Pa (0.45359237 kg x 9.80665 m/s2 per (0.0254 m)2, NIST SP 811 B.8); Btu =
1055.056 J (ISO 31-4, the value pint names Btu); lb = 0.45359237 kg (NIST SP 811). Molar masses
as an independent source: the `chemicals` package (CAS look-up of its own data, not CoolProp's).
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from solver.case import loads_case
from solver.cli import main
from solver.errors import CaseError
from solver.reports.display import display_units
from solver.units import ATMOSPHERE, UnitParseError, fraction_and_basis, offset_scale, to_si, unit_factor

PSI = 0.45359237 * 9.80665 / 0.0254**2  # Pa, NIST SP 811
BTU = 1055.056  # J, ISO 31-4
POUND = 0.45359237  # kg

CASE = Path(__file__).resolve().parents[1] / "cases" / "methanol_water.toml"


def chemicals_molar_mass(cas: str) -> float:
    """kg/mol from the chemicals package (independent of CoolProp)."""
    from chemicals.elements import molecular_weight, simple_formula_parser
    from chemicals.identifiers import search_chemical

    return molecular_weight(simple_formula_parser(search_chemical(cas).formula)) / 1000.0


METHANOL, WATER = chemicals_molar_mass("67-56-1"), chemicals_molar_mass("7732-18-5")


def demo_text(**replace: str) -> str:
    text = CASE.read_text()
    for old, new in replace.items():
        assert old in text
        text = text.replace(old, new)
    return text


@pytest.mark.parametrize(
    ("text", "kind", "expected"),
    [
        ("0 barg", "pressure", ATMOSPHERE),
        ("2 barg", "pressure", 2e5 + 101325.0),
        ("-0.5 barg", "pressure", 101325.0 - 0.5e5),
        ("14.7 psig", "pressure", 14.7 * PSI + 101325.0),
        ("0 psig", "pressure", 101325.0),
        ("50 kPag", "pressure", 151325.0),
        ("3 MMBtu/h", "power", 3e6 * BTU / 3600.0),
        ("-2.5 MMBtu/h", "power", -2.5e6 * BTU / 3600.0),
        ("6000 lb/h", "mass_flow", 6000 * POUND / 3600.0),
        ("13 klb/h", "mass_flow", 13000 * POUND / 3600.0),
        ("6000 kg/h", "mass_flow", 6000 / 3600.0),
        ("50 ppm", "dimensionless", 50e-6),
    ],
)
def test_plant_units_convert_to_si(text, kind, expected):
    assert to_si(text, kind) == pytest.approx(expected, rel=1e-12, abs=1e-9)


def test_ppmw_is_a_mass_fraction_and_ppm_a_mole_fraction():
    assert fraction_and_basis("50 ppmw") == (pytest.approx(50e-6), "mass")
    assert fraction_and_basis("50 wppm") == (pytest.approx(50e-6), "mass")
    assert fraction_and_basis("50 ppm") == (pytest.approx(50e-6), "mole")
    assert fraction_and_basis(0.995) == (0.995, "mole")


@pytest.mark.parametrize(
    ("text", "kind", "message"),
    [
        ("1 MBtu/h", "power", "thousand Btu"),  # US usage and the SI prefix disagree
        ("0.7 barg", "pressure_difference", "gauge pressure"),
        ("6000 kg/h", "molar_flow", "not a molar flow"),
    ],
)
def test_ambiguous_or_misplaced_plant_units_are_refused(text, kind, message):
    with pytest.raises(UnitParseError, match=message):
        to_si(text, kind)


def test_a_gauge_unit_cannot_scale_a_value():
    with pytest.raises(UnitParseError, match="offset"):
        unit_factor("barg", "pressure")  # e.g. an Antoine pressure_unit: vapor pressures are absolute


def test_gauge_display_scale_is_against_the_standard_atmosphere():
    slope, intercept = offset_scale("psig", "pressure")
    assert slope * (101325.0 + 10 * PSI) + intercept == pytest.approx(10.0, rel=1e-12)
    units = display_units(None, "pressure=barg")
    assert units.P(101325.0) == 0.0
    assert units.P(np.array([201325.0, 151325.0])) == pytest.approx([1.0, 0.5], rel=1e-12)


def test_a_mass_feed_flow_is_divided_by_the_feeds_molar_mass():
    case = loads_case(demo_text(**{'flow = "100 kmol/h"': 'flow = "2500 kg/h"'}), "mass.toml")
    mixture = 0.35 * METHANOL + 0.65 * WATER
    assert case.feeds[0].flow == pytest.approx(2500 / 3600 / mixture, rel=1e-4)


def test_a_mass_feed_flow_with_a_mass_basis_composition():
    text = demo_text(**{
        'flow = "100 kmol/h"': 'flow = "13 klb/h"\nbasis = "mass"',
        "composition = { methanol = 0.35, water = 0.65 }": "composition = { methanol = 0.5, water = 0.5 }",
    })
    case = loads_case(text, "mass.toml")
    moles = 13000 * POUND / 3600 * (0.5 / METHANOL + 0.5 / WATER)  # mol/s of both components
    assert case.feeds[0].flow == pytest.approx(moles, rel=1e-4)
    assert case.feeds[0].composition[0] == pytest.approx((0.5 / METHANOL) / (0.5 / METHANOL + 0.5 / WATER), rel=1e-4)


def test_gauge_pressures_in_a_case():
    case = loads_case(demo_text(**{'pressure.top = "101.325 kPa"': 'pressure.top = "0.2 barg"',
                                   'pressure = "1.5 bar"': 'pressure = "25 psig"'}), "gauge.toml")
    assert case.column.pressures[0] == pytest.approx(121325.0)
    assert case.feeds[0].pressure == pytest.approx(25 * PSI + 101325.0)


def test_ppm_purities_molar_and_by_mass():
    molar = loads_case(demo_text(**{"bottoms = { water = 0.995 }": 'bottoms = { methanol = "500 ppm" }'}), "ppm.toml")
    assert molar.specs[-1].value == pytest.approx(500e-6)
    mass = loads_case(demo_text(**{"bottoms = { water = 0.995 }": 'bottoms = { methanol = "500 ppmw" }'}), "ppmw.toml")
    x = mass.specs[-1].value
    # back to a mass fraction with the independent molar masses
    assert x * METHANOL / (x * METHANOL + (1 - x) * WATER) == pytest.approx(500e-6, rel=1e-4)
    assert x < 500e-6  # methanol is heavier than water: fewer moles than mass


def test_ppmw_needs_a_two_component_product():
    text = demo_text(**{
        'names = ["methanol", "water"]': 'names = ["methanol", "water", "ethanol"]',
        'liquid = "nrtl"': 'liquid = "nrtl"\nmissing_pairs = "ideal"',
        "bottoms = { water = 0.995 }": 'bottoms = { methanol = "500 ppmw" }',
    })
    with pytest.raises(CaseError) as info:
        loads_case(text, "three.toml")
    assert info.value.key == "specs.bottoms.methanol" and info.value.value == "500 ppmw"
    assert "two-component" in str(info.value)


@pytest.mark.parametrize(
    ("old", "new", "key", "value"),
    [
        ('flow = "100 kmol/h"', 'flow = "6000 kg"', "feeds[0].flow", "6000 kg"),
        ('pressure.drop_per_stage = "0.5 kPa"', 'pressure.drop_per_stage = "0.5 barg"',
         "column.pressure.drop_per_stage", "0.5 barg"),
        ("bottoms = { water = 0.995 }", 'bottoms = { water = "2 ppmx" }', "specs.bottoms.water", "2 ppmx"),
        ('pressure = "1.5 bar"', 'pressure = "1.5 MBtu"', "feeds[0].pressure", "1.5 MBtu"),
    ],
)
def test_bad_plant_units_exit_2_naming_file_key_and_value(tmp_path, capsys, old, new, key, value):
    path = tmp_path / "bad.toml"
    path.write_text(demo_text(**{old: new}))
    assert main(["run", str(path), "--out", str(tmp_path / "out"), "--quiet"]) == 2
    err = capsys.readouterr().err
    assert str(path) in err and key in err and value in err


def test_bad_units_option_exits_2(tmp_path, capsys):
    assert main(["run", str(CASE), "--out", str(tmp_path / "out"), "--units", "flow=kg", "--quiet"]) == 2
    err = capsys.readouterr().err
    assert "--units flow" in err and "kg" in err


def test_display_table_takes_mass_flows_gauge_pressures_and_ppm():
    case = loads_case(demo_text(**{"[specs]": '[display]\nflow = "klb/h"\npressure = "psig"\ncomposition = "ppmw"\n\n[specs]'}),
                      "display.toml")
    assert dict(case.display)["flow"] == "klb/h"
    with pytest.raises(CaseError) as info:
        loads_case(demo_text(**{"[specs]": '[display]\ncomposition = "percent"\n\n[specs]'}), "display.toml")
    assert info.value.key == "display.composition"


@pytest.fixture(scope="module")
def mass_feed_result():
    from solver.engine import simulate

    case = loads_case(demo_text(**{'flow = "100 kmol/h"': 'flow = "2500 kg/h"'}), "mass.toml")
    result = simulate(case)
    assert result.converged
    return result


def test_product_flows_in_mass_units_close_the_mass_balance(mass_feed_result):
    from solver.reports.run_tables import product_cells

    units = display_units(None, "flow=kg/h,composition=mass fraction")
    cells = product_cells(mass_feed_result, units)
    total = sum(float(text[0]) for text in cells.values())
    assert total == pytest.approx(2500.0, rel=1e-4)  # the feed's 2500 kg/h leaves as products
    for text in cells.values():  # mass fractions add up to 1
        assert sum(float(value) for value in text[3:]) == pytest.approx(1.0, abs=2e-6)
    klb = display_units(None, "flow=klb/h")
    assert sum(float(text[0]) for text in product_cells(mass_feed_result, klb).values()) == pytest.approx(
        2500.0 / POUND / 1000, rel=1e-4
    )


def test_run_shows_products_in_kg_per_hour(tmp_path, capsys):
    path = tmp_path / "mass.toml"
    path.write_text(demo_text(**{'flow = "100 kmol/h"': 'flow = "2500 kg/h"'}))
    assert main(["run", str(path), "--out", str(tmp_path / "out"), "--units", "flow=kg/h,composition=ppm"]) == 0
    out = capsys.readouterr().out
    assert "flow / kg/h" in out and "ppm methanol" in out and "L / kg/h" in out
