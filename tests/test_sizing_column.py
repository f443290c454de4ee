"""A column sized from its rigorous traffic beside the CMO traffic (solver.sizing.column,
.traffic, .flags, .record, .figure), on the shipped methanol-water case and variants of it."""

from __future__ import annotations

import dataclasses
import json
from pathlib import Path

import numpy as np
import pytest

from solver.audit import cmo_audit
from solver.case import load_case, loads_case
from solver.case.sizing_table import SizingOptions
from solver.engine import simulate
from solver.errors import SpecError
from solver.sizing import size_column
from solver.sizing.figure import flood_profile
from solver.sizing.flags import cmo_undersized, near_flood
from solver.sizing.traffic import Section, cmo_traffic, rigorous_traffic, sections_of, tray_stages
from solver.thermo.package import ThermoPackage

CASES = Path(__file__).resolve().parent.parent / "cases"


@pytest.fixture(scope="module")
def methanol_water():
    case = load_case(CASES / "methanol_water.toml")
    thermo = ThermoPackage.from_case(case)
    result = simulate(case)
    return case, result, thermo, size_column(case, result, thermo)


def test_sections_and_traffic(methanol_water):
    case, result, _, _ = methanol_water
    assert list(tray_stages(result)) == list(range(2, 20))  # condenser 1 and reboiler 20 are not trays
    assert sections_of(result) == (Section("rectifying", 2, 11), Section("stripping", 12, 19))
    cmo = cmo_audit(result)
    traffic = cmo_traffic(result)
    assert traffic.vapor_flow == pytest.approx(cmo.vapor_cmo[1:19])
    assert traffic.liquid_flow == pytest.approx(cmo.liquid_cmo[1:19])
    rigorous = rigorous_traffic(result)
    assert rigorous.vapor_flow == pytest.approx(result.vapor_flow[1:19])
    # the observation: the rigorous vapor falls down the stripping section, CMO holds it
    stripping = slice(11, 18)
    assert rigorous.vapor_flow[stripping][-1] < 0.95 * rigorous.vapor_flow[stripping][1]
    assert np.ptp(traffic.vapor_flow[stripping]) == pytest.approx(0.0, abs=1e-12)


def test_diameters_controlling_stages_and_rating(methanol_water):
    _, _, _, sizing = methanol_water
    for k, section in enumerate(sizing.sections):
        mask = section.section.mask(sizing.stages)
        needed = sizing.rigorous.needed_diameter[mask]
        assert sizing.rigorous.section_diameters[k] == pytest.approx(needed.max())
        assert sizing.rigorous.controlling_stages[k] == sizing.stages[mask][np.argmax(needed)]
        # the controlling stage runs at the design fraction, every other stage below it
        assert section.largest_fraction_of_flood == pytest.approx(0.8, rel=1e-9)
        assert section.largest_flood_stage == section.controlling_stage
        assert np.all(sizing.rating.fraction_of_flood[mask] <= 0.8 + 1e-12)
    rectifying, stripping = sizing.sections
    assert 0.4 < rectifying.diameter < 1.0 and 0.4 < stripping.diameter < 1.0  # 100 kmol/h at 1 atm
    assert rectifying.real_trays == int(np.ceil(10 / sizing.efficiency.value))
    assert 0.3 < sizing.efficiency.value < 0.7 and sizing.efficiency.light_key == "methanol"
    assert 0.5e3 * rectifying.real_trays < rectifying.pressure_drop < 2e3 * rectifying.real_trays


def test_cmo_comparison_headline(methanol_water):
    _, _, _, sizing = methanol_water
    differences = sizing.cmo_differences
    assert len(differences) == 2
    for k in range(2):
        assert differences[k] == pytest.approx(sizing.cmo.section_diameters[k] / sizing.rigorous.section_diameters[k] - 1)
    # the stripping section is set at its top tray, where the rigorous vapor is still near CMO's:
    # CMO sizes it a little larger there, so no CMO_UNDERSIZED flag
    assert 0.0 < differences[1] < 0.05
    assert sizing.flags == ()
    record = json.loads(json.dumps(sizing.as_json()))
    assert [row["section"] for row in record["diameters"]] == ["rectifying", "stripping"]
    assert record["diameters"][1]["larger"] == "cmo"
    assert record["flags"] == [] and record["cmo_basis"].startswith("CMO traffic")
    assert len(record["stages"]) == 18 and "cmo" in record["stages"][0]
    assert {row["property"] for row in record["property_sources"]} == {"surface_tension", "liquid_viscosity",
                                                                       "liquid_density"}


def test_flags_when_the_design_runs_closer_to_flood(methanol_water):
    case, result, thermo, _ = methanol_water
    tight = dataclasses.replace(case, sizing=SizingOptions(flood_fraction=0.9))
    sizing = size_column(tight, result, thermo)
    codes = [flag.code for flag in sizing.flags]
    assert codes.count("NEAR_FLOOD") == 2  # as sized, and the CMO-sized column
    assert all(flag.severity == "warning" for flag in sizing.flags)


def test_rating_a_given_diameter(methanol_water):
    case, result, thermo, sized = methanol_water
    small = dataclasses.replace(case, sizing=SizingOptions(diameter=0.55))
    sizing = size_column(small, result, thermo)
    assert all(s.diameter == 0.55 for s in sizing.sections)
    flood = [flag for flag in sizing.flags if flag.code == "NEAR_FLOOD" and "rated" in flag.message]
    assert flood and flood[0].severity == "serious"  # 0.65 m needed at 80 %: 0.55 m floods
    # same needed diameters as when sizing
    assert sizing.rigorous.section_diameters == pytest.approx(sized.rigorous.section_diameters)


def test_cmo_undersized_flag_constructor():
    section = Section("stripping", 12, 19)
    thresholds = {"cmo_diameter": 0.05, "flood": 0.85}
    assert cmo_undersized(section, 1.0, 0.97, 13, 13, 0.85, 13, thresholds) is None
    assert cmo_undersized(section, 1.0, 1.02, 13, 13, 0.77, 13, thresholds) is None
    flag = cmo_undersized(section, 1.0, 0.90, 19, 12, 0.99, 19, thresholds)
    assert flag.code == "CMO_UNDERSIZED" and flag.severity == "warning" and "10.0 % smaller" in flag.message
    assert cmo_undersized(section, 1.0, 0.8, 19, 12, 1.2, 19, thresholds).severity == "serious"
    assert near_flood("x", np.array([2, 3]), np.array([0.5, 0.84]), thresholds) is None
    assert near_flood("x", np.array([2, 3]), np.array([0.5, 1.01]), thresholds).severity == "serious"


def test_packed_column(methanol_water):
    case, result, thermo, _ = methanol_water
    options = loads_case((CASES / "methanol_water.toml").read_text() + '\n[sizing]\ninternals = "structured"\n'
                         'packing = { packing_factor = "20 1/ft", specific_area = "250 m**2/m**3", '
                         'source = "our own numbers for a test" }\n').sizing
    sizing = size_column(dataclasses.replace(case, sizing=options), result, thermo)
    rectifying = sizing.sections[0]
    assert rectifying.hetp == pytest.approx(100 / 250 + 0.1016)
    assert rectifying.packed_height == pytest.approx(10 * rectifying.hetp)
    assert rectifying.real_trays is None and rectifying.largest_fraction_of_flood == pytest.approx(0.8)
    assert 0.0 < rectifying.pressure_drop / rectifying.packed_height < 1000.0  # Pa/m, structured packing


def test_a_column_with_side_draws_is_sized_without_cmo():
    case = load_case(CASES / "naphtha_side_draw.toml")
    thermo = ThermoPackage.from_case(case)
    result = simulate(case)
    sizing = size_column(case, result, thermo)
    assert sizing.cmo is None and "side draws" in sizing.cmo_reason
    assert all(s.section.name.startswith("section") for s in sizing.sections) and len(sizing.sections) >= 2
    assert all(np.isnan(d) for d in sizing.cmo_differences)


def test_unconverged_results_are_refused(methanol_water):
    case, result, thermo, _ = methanol_water
    with pytest.raises(SpecError):
        size_column(case, dataclasses.replace(result, converged=False), thermo)


def test_flood_figure(methanol_water, tmp_path):
    _, result, _, sizing = methanol_water
    path = flood_profile(sizing, result.stage_count, tmp_path / "flood.png")
    assert path.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n" and path.stat().st_size > 5000


def test_murphree_stages_are_real_trays_and_the_report_says_so():
    text = (CASES / "methanol_water.toml").read_text().replace("efficiency = 1.0", "efficiency = 0.7")
    case = loads_case(text)
    result = simulate(case)
    sizing = size_column(case, result, ThermoPackage.from_case(case))
    assert [s.real_trays for s in sizing.sections] == [s.theoretical_stages for s in sizing.sections]
    from solver.reports.sizing_tables import sizing_markdown

    lines = "\n".join(sizing_markdown(result.with_extra(sizing=sizing)))
    assert "Murphree vapor efficiencies 0.7" in lines and "## Diameters: rigorous against CMO traffic" in lines
