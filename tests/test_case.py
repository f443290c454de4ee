"""Tests for solver.case: reading, checking and converting case files.

All numbers in the fixtures are invented for the tests (as in the format example of README.md). Unit
factors used in hand calculations are exact by definition (NIST SP 811, 2008, appendix B):
1 cal (thermochemical) = 4.184 J, 1 mmHg = 133.322387415 Pa, 1 h = 3600 s. The gas constant
R = 8.31446261815324 J/(mol K) is exact in the SI since 2019 (CODATA 2018).
"""

from __future__ import annotations

import copy
import dataclasses
import math
import re
import tomllib
from types import MappingProxyType

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from solver.case import (
    GAS_CONSTANT,
    Case,
    load_case,
    loads_case,
    molar_mass_of,
    parse_case,
)
from solver.errors import CaseError

# The format example of the case file: every section once, as README.md shows it.
FORMAT_CASE = '''\
title = "Solvent recovery column (demo)"

[components]
names = ["methanol", "water"]          # CoolProp names or names defined under [components.data]

[components.data.solventX]              # a component CoolProp lacks (omit for CoolProp fluids)
molar_mass = "0.1 kg/mol"
critical_temperature = "560 K"
critical_pressure = "3.5 MPa"
vapor_pressure = { form = "antoine", A = 7.1, B = 1500.0, C = 220.0, base = 10, pressure_unit = "mmHg", temperature_unit = "degC", T_min = "20 degC", T_max = "150 degC" }
ideal_gas_cp = { form = "polynomial", coefficients = [30.0, 0.1], units = "J/mol/K, K" }
heat_of_vaporization = { form = "watson", value = "35 kJ/mol", at = "350 K" }
source = "handbook and edition, or paper"  # invented numbers above

[thermo]
liquid = "nrtl"                        # ideal | wilson | nrtl | uniquac
vapor = "ideal"
enthalpy = "rigorous"                  # rigorous | cmo (equal molar latent heats, no sensible heat)
missing_pairs = "ideal"                # the pairs with solventX are taken as ideal knowingly
[thermo.nrtl.methanol.water]           # pair (i, j) = (methanol, water)
term_over_temperature = ["-120.0 K", "420.0 K"]   # tau_ij = constant_term + term_over_temperature/T + ...; invented numbers
# or energy form: dg = ["-250 cal/mol", "850 cal/mol"]   -> tau_ij = dg_ij / (R T)
alpha = 0.3
source = "where the numbers come from"

[column]
stages = 20                            # equilibrium stages, condenser and reboiler included
condenser = "total"                    # total | partial | none
reboiler = "partial"                   # partial | none
pressure.top = "101.325 kPa"
pressure.drop_per_stage = "0.7 kPa"
efficiency = 1.0                       # Murphree vapor efficiency, per stage or a table

[[feeds]]
stage = 10
flow = "100 kmol/h"
composition = { methanol = 0.35, water = 0.65 }   # mole fractions (or mass with basis="mass")
temperature = "65 degC"                # or vapor_fraction = 0.0
pressure = "1.5 bar"

[specs]                                # as many as the column has degrees of freedom
reflux_ratio = 1.4
bottoms = { water = 0.995 }            # mole fraction of a component in a product
# others: boilup_ratio, distillate_rate, bottoms_rate, condenser_duty, reboiler_duty,
#         recovery = { methanol = { distillate = 0.99 } }, stage_temperature, reflux_temperature

[check]                                # only for regression cases
tolerances = { duty_rel = 1e-4, composition_abs = 1e-6, temperature_abs = 0.01 }
'''

# A case that uses nearly every key: a user component with every correlation form, the NRTL
# energy form, side draws, heaters, an efficiency table and most spec kinds.
FULL_CASE = '''\
title = "Everything case (invented numbers)"

[components]
names = ["Methanol", "water", "solventX"]

[components.data.solventX]
molar_mass = "100 g/mol"
critical_temperature = "560 K"
critical_pressure = "3.5 MPa"
normal_boiling_point = "120 degC"
vapor_pressure = { form = "dippr101", A = 70.0, B = -7000.0, C = -7.0, D = 4e-6, E = 2, units = "Pa, K", T_min = 250, T_max = "550 K" }
ideal_gas_cp = { form = "dippr107", A = 40000.0, B = 90000.0, C = 1500.0, D = 60000.0, E = 700.0, units = "J/kmol/K, K" }
heat_of_vaporization = { form = "dippr106", A = 5.0e7, B = 0.38, C = 0.0, units = "J/kmol" }
liquid_molar_volume = { form = "dippr105", A = 1.0, B = 0.27, C = 560.0, D = 0.28, units = "kmol/m**3, K" }
source = "invented for tests"

[thermo]
liquid = "nrtl"
enthalpy = "rigorous"
missing_pairs = "ideal"
[thermo.nrtl.methanol.water]
dg = ["-250 cal/mol", "850 cal/mol"]
alpha = { value = 0.3, slope = "0.001 1/K", reference_temperature = "350 K" }
source = "invented"
[thermo.nrtl.water.solventX]
constant_term = [0.5, -0.5]
term_over_temperature = [300.0, "-100 K"]
term_in_ln_temperature = [0.01, 0.02]
term_times_temperature = ["0.0001 1/K", 0.0]
alpha = [0.2, 0.2]

[column]
stages = 12
condenser = "partial"
reboiler = "partial"
pressure = { profile = ["1.0 bar", "1.0 bar", "1.1 bar", "1.1 bar", "1.2 bar", "1.2 bar", "1.3 bar", "1.3 bar", "1.4 bar", "1.4 bar", "1.5 bar", "1.5 bar"] }
efficiency = { default = 0.7, "5" = 0.5, 6 = "60 %" }

[[column.side_draws]]
stage = 4
phase = "liquid"
flow = "5 kmol/h"
name = "pasteurized"

[[column.side_draws]]
stage = 8
phase = "Vapor"
flow = 0.5

[[column.heaters]]
stage = 7
duty = "-50 kW"

[[feeds]]
name = "main"
stage = 6
flow = "100 kmol/h"
composition = { methanol = 35, water = 60, SOLVENTX = 5 }
normalize = true
vapor_fraction = 0.25

[[feeds]]
stage = 3
flow = 1.0
composition = { water = 1.0 }
temperature = 300

[specs]
distillate_rate = "30 kmol/h"
boilup_ratio = 2.0
distillate = { methanol = 0.99 }
recovery = { methanol = { distillate = 0.98 }, water = { bottoms = 1.0 } }
stage_temperature = [{ stage = 5, value = "80 degC" }, { stage = 9, value = 360.0 }]
reboiler_duty = "1.2 MW"
condenser_duty = "-1 MW"

[check]
tolerances = { duty_rel = 1e-4, composition_abs = 1e-6, temperature_abs = "0.01 K", flow_rel = 1e-5 }

[display]
temperature = "degF"
pressure = "kPa"
'''

WILSON_CASE = '''\
[components]
names = ["methanol", "water"]
[thermo]
liquid = "wilson"
[thermo.wilson_volumes]
methanol = "40.7 cm**3/mol"
water = "18.07 cm**3/mol"
[thermo.wilson.methanol.water]
dlambda = ["0.5 kJ/mol", "2000 J/mol"]
[column]
stages = 10
condenser = "total"
reboiler = "partial"
pressure = "1 atm"
[[feeds]]
stage = 5
flow = 1.0
composition = { methanol = 0.5, water = 0.5 }
vapor_fraction = 0
[specs]
reflux_ratio = 2
reflux_subcooling = "5 degC"
'''

UNIQUAC_CASE = '''\
[components]
names = ["methanol", "water"]
[thermo]
liquid = "uniquac"
enthalpy = "cmo"
[thermo.uniquac_structure]
methanol = { r = 1.4311, q = 1.432 }
water = { r = 0.92, q = 1.4 }
[thermo.uniquac.water.methanol]
du = ["-1 kJ/mol", "500 J/mol"]
[column]
stages = 3
condenser = "none"
reboiler = "none"
pressure.top = 200000
[[feeds]]
stage = 1
flow = "1 mol/s"
composition = { methanol = 0.5, water = 0.5 }
temperature = "70 degC"
'''


def format_data() -> dict:
    return tomllib.loads(FORMAT_CASE)


def full_data() -> dict:
    return tomllib.loads(FULL_CASE)


def case_error(data: dict, source_file: str = "case.toml") -> CaseError:
    with pytest.raises(CaseError) as info:
        parse_case(data, source_file=source_file)
    return info.value


_TOKEN = re.compile(r"([^.\[\]]+)|\[(\d+)\]")


def _tokens(path: str) -> list:
    return [name if name else int(index) for name, index in _TOKEN.findall(path)]


DELETE = object()


def mutated(data: dict, path: str, value) -> dict:
    """A deep copy of ``data`` with the value at ``path`` replaced (or deleted)."""
    data = copy.deepcopy(data)
    tokens = _tokens(path)
    node = data
    for token in tokens[:-1]:
        node = node[token]
    if value is DELETE:
        del node[tokens[-1]]
    else:
        node[tokens[-1]] = value
    return data


# --- the format example ---------------------------------------------------------------------


def test_format_example_parses_with_values_in_si():
    case = loads_case(FORMAT_CASE, source_file="format.toml")
    assert case.title == "Solvent recovery column (demo)"
    assert case.component_names == ("methanol", "water")
    assert case.component_count == 2
    assert case.source_file == "format.toml"
    column = case.column
    assert (column.stages, column.condenser, column.reboiler) == (20, "total", "partial")
    assert column.pressures[0] == pytest.approx(101_325.0)
    assert column.pressures[9] == pytest.approx(101_325.0 + 9 * 700.0)
    assert column.pressures[-1] == pytest.approx(101_325.0 + 19 * 700.0)
    assert len(column.pressures) == 20
    assert column.efficiencies == (1.0,) * 20
    (feed,) = case.feeds
    assert feed.stage == 10
    assert feed.temperature == pytest.approx(338.15)
    assert feed.flow == pytest.approx(27.7778, rel=1e-5)
    assert feed.pressure == pytest.approx(1.5e5)
    assert feed.composition == pytest.approx((0.35, 0.65))
    assert feed.vapor_fraction is None
    thermo = case.thermo
    assert (thermo.liquid, thermo.vapor, thermo.enthalpy) == ("nrtl", "ideal", "rigorous")
    (pair,) = thermo.pairs
    assert (pair.model, pair.first, pair.second) == ("nrtl", "methanol", "water")
    assert pair.term_over_temperature == pytest.approx((-120.0, 420.0))
    assert pair.constant_term == pair.term_in_ln_temperature == pair.term_times_temperature == (0.0, 0.0)
    assert pair.alpha == 0.3 and pair.alpha_slope == 0.0 and pair.alpha_reference_temperature is None
    assert pair.source == "where the numbers come from"
    assert [(s.kind, s.value, s.component, s.product, s.key) for s in case.specs] == [
        ("reflux_ratio", 1.4, None, None, "specs.reflux_ratio"),
        ("mole_fraction", 0.995, "water", "bottoms", "specs.bottoms.water"),
    ]
    assert dict(case.check) == {"duty_rel": 1e-4, "composition_abs": 1e-6, "temperature_abs": 0.01}
    assert dict(case.display) == {"temperature": "degC", "pressure": "bar", "flow": "kmol/h", "duty": "kW"}


def test_format_example_unused_component_data_is_checked_and_reported():
    case = loads_case(FORMAT_CASE, source_file="format.toml")
    assert dict(case.component_data) == {}
    (warning,) = case.warnings
    assert "components.data.solventX" in warning and "not listed" in warning
    broken = mutated(format_data(), "components.data.solventX.critical_pressure", "hot")
    assert case_error(broken).key == "components.data.solventX.critical_pressure"


def test_format_component_block_converts_when_used():
    data = mutated(format_data(), "components.names", ["methanol", "water", "solventX"])
    case = parse_case(data)
    solvent = case.component_data["solventx"]
    assert case.component_names == ("methanol", "water", "solventx")
    assert solvent.name == "solventx"
    assert solvent.molar_mass == pytest.approx(0.1)
    assert solvent.critical_temperature == pytest.approx(560.0)
    assert solvent.critical_pressure == pytest.approx(3.5e6)
    assert solvent.source == "handbook and edition, or paper"
    vapor_pressure = solvent.vapor_pressure
    assert vapor_pressure.form == "antoine"
    assert dict(vapor_pressure.coefficients) == {"A": 7.1, "B": 1500.0, "C": 220.0}
    assert vapor_pressure.log_base == 10.0
    assert vapor_pressure.value_factor == pytest.approx(133.322387415)
    assert (vapor_pressure.temperature_slope, vapor_pressure.temperature_intercept) == pytest.approx((1.0, -273.15))
    assert (vapor_pressure.T_min, vapor_pressure.T_max) == pytest.approx((293.15, 423.15))
    # evaluate at 100 degC by hand: log10 P[mmHg] = 7.1 - 1500/(100 + 220)
    t_unit = vapor_pressure.temperature_slope * 373.15 + vapor_pressure.temperature_intercept
    coefficients = vapor_pressure.coefficients
    pressure = vapor_pressure.value_factor * 10 ** (coefficients["A"] - coefficients["B"] / (t_unit + coefficients["C"]))
    assert pressure == pytest.approx(133.322387415 * 10 ** (7.1 - 1500.0 / 320.0))
    cp = solvent.ideal_gas_cp
    assert cp.form == "polynomial" and dict(cp.coefficients) == {"c0": 30.0, "c1": 0.1}
    assert cp.value_factor == 1.0 and cp.temperature_slope == 1.0 and cp.temperature_intercept == 0.0
    latent = solvent.heat_of_vaporization
    assert latent.form == "watson"
    assert dict(latent.coefficients) == pytest.approx({"value": 35_000.0, "at": 350.0, "exponent": 0.38})
    assert solvent.liquid_molar_volume is None and solvent.normal_boiling_point is None
    assert case.warnings == ()


def test_format_energy_form_dg_is_converted_to_the_term_over_temperature():
    data = format_data()
    del data["thermo"]["nrtl"]["methanol"]["water"]["term_over_temperature"]
    data["thermo"]["nrtl"]["methanol"]["water"]["dg"] = ["-250 cal/mol", "850 cal/mol"]
    (pair,) = parse_case(data).thermo.pairs
    # dg / R: -250 * 4.184 / 8.31446261815324 = -125.805 K; 850 * 4.184 / 8.31446261815324 = 427.737 K
    over = pair.term_over_temperature
    assert over[0] == pytest.approx(-125.805, abs=0.001)
    assert over[1] == pytest.approx(427.737, abs=0.001)
    assert over == pytest.approx((-250 * 4.184 / GAS_CONSTANT, 850 * 4.184 / GAS_CONSTANT), rel=1e-12)
    assert pair.energy_form["dg"] == ("-250 cal/mol", "850 cal/mol")
    assert pair.energy_form["dg_J_per_mol"] == pytest.approx((-1046.0, 3556.4))


def test_case_is_frozen_and_read_only():
    case = loads_case(FORMAT_CASE)
    with pytest.raises(dataclasses.FrozenInstanceError):
        case.title = "x"  # type: ignore[misc]
    with pytest.raises(dataclasses.FrozenInstanceError):
        case.feeds[0].flow = 1.0  # type: ignore[misc]
    assert isinstance(case.raw, MappingProxyType)
    with pytest.raises(TypeError):
        case.raw["title"] = "x"  # type: ignore[index]
    with pytest.raises(TypeError):
        case.check["duty_rel"] = 1.0  # type: ignore[index]
    assert isinstance(case.feeds, tuple) and isinstance(case.column.pressures, tuple)
    assert case.raw["column"]["pressure"] == {"top": "101.325 kPa", "drop_per_stage": "0.7 kPa"}


def test_raw_is_a_copy_of_the_input():
    data = format_data()
    case = parse_case(data)
    data["title"] = "changed afterwards"
    assert case.raw["title"] == "Solvent recovery column (demo)"


def test_parse_case_accepts_a_case_raw_mapping_again():
    case = loads_case(FULL_CASE)
    assert parse_case(case.raw) == dataclasses.replace(case, source_file="<string>")


# --- the full case: every key --------------------------------------------------------------


def test_full_case_components_and_correlations():
    case = loads_case(FULL_CASE)
    assert case.component_names == ("methanol", "water", "solventx")
    solvent = case.component_data["solventx"]
    assert solvent.molar_mass == pytest.approx(0.1)
    assert solvent.normal_boiling_point == pytest.approx(393.15)
    vapor_pressure = solvent.vapor_pressure
    assert vapor_pressure.form == "dippr101" and vapor_pressure.log_base is None
    assert dict(vapor_pressure.coefficients) == {"A": 70.0, "B": -7000.0, "C": -7.0, "D": 4e-6, "E": 2.0}
    assert (vapor_pressure.T_min, vapor_pressure.T_max) == (250.0, 550.0)
    cp = solvent.ideal_gas_cp
    assert cp.form == "dippr107" and cp.value_factor == pytest.approx(1e-3)
    latent = solvent.heat_of_vaporization
    assert latent.form == "dippr106" and latent.value_factor == pytest.approx(1e-3)
    assert dict(latent.coefficients) == {"A": 5.0e7, "B": 0.38, "C": 0.0, "D": 0.0, "E": 0.0}
    volume = solvent.liquid_molar_volume
    assert volume.form == "dippr105" and volume.value_factor == pytest.approx(1000.0)  # kmol/m3 -> mol/m3
    assert dict(volume.coefficients) == {"A": 1.0, "B": 0.27, "C": 560.0, "D": 0.28}


def test_full_case_thermo_pairs():
    case = loads_case(FULL_CASE)
    first, second = case.thermo.pairs
    assert (first.first, first.second) == ("methanol", "water")
    assert first.alpha == 0.3 and first.alpha_slope == pytest.approx(0.001)
    assert first.alpha_reference_temperature == pytest.approx(350.0)
    assert first.term_over_temperature == pytest.approx((-1046.0 / GAS_CONSTANT, 3556.4 / GAS_CONSTANT))
    assert first.source == "invented"
    assert (second.first, second.second) == ("water", "solventx")
    assert second.constant_term == (0.5, -0.5) and second.term_over_temperature == (300.0, -100.0)
    assert second.term_in_ln_temperature == (0.01, 0.02) and second.term_times_temperature == (0.0001, 0.0)
    assert second.alpha == 0.2 and second.energy_form == {}


def test_alpha_slope_about_a_stated_reference_temperature():
    """alpha(T) = value + slope (T - reference_temperature); the same line stated about another
    temperature (here the 273.15 K of earlier versions of the file) is the same alpha(T)."""
    data = format_data()
    pair = data["thermo"]["nrtl"]["methanol"]["water"]
    pair["alpha"] = {"value": 0.3, "slope": "0.002 1/K", "reference_temperature": "77 degC"}
    (stated,) = parse_case(data).thermo.pairs
    assert (stated.alpha, stated.alpha_slope) == (0.3, pytest.approx(0.002))
    assert stated.alpha_reference_temperature == pytest.approx(350.15)
    pair["alpha"] = {"value": 0.3 - 0.002 * 77.0, "slope": 0.002, "reference_temperature": "273.15 K"}
    (moved,) = parse_case(data).thermo.pairs
    for temperature in (300.0, 350.15, 400.0):
        assert moved.alpha + moved.alpha_slope * (temperature - moved.alpha_reference_temperature) == pytest.approx(
            stated.alpha + stated.alpha_slope * (temperature - stated.alpha_reference_temperature), rel=1e-14
        )


def test_an_old_pair_key_is_a_case_error_with_exit_code_2(tmp_path):
    text = FORMAT_CASE.replace('term_over_temperature = ["-120.0 K", "420.0 K"]', 'b = ["-120.0 K", "420.0 K"]')
    path = tmp_path / "old.toml"
    path.write_text(text, encoding="utf-8")
    with pytest.raises(CaseError) as info:
        load_case(path)
    message = str(info.value)
    assert message.startswith(f"{path}: thermo.nrtl.methanol.water.b: ")
    assert "term_over_temperature" in message and info.value.exit_code == 2


def test_full_case_column():
    column = loads_case(FULL_CASE).column
    assert column.stages == 12 and column.condenser == "partial"
    assert column.pressures[0] == pytest.approx(1e5) and column.pressures[-1] == pytest.approx(1.5e5)
    expected = [0.7] * 12
    expected[4], expected[5] = 0.5, 0.6
    expected[0] = expected[-1] = 1.0  # condenser and reboiler are equilibrium stages
    assert column.efficiencies == pytest.approx(tuple(expected))
    first, second = column.side_draws
    assert (first.stage, first.phase, first.name) == (4, "liquid", "pasteurized")
    assert first.flow == pytest.approx(5 / 3.6)
    assert (second.stage, second.phase, second.flow, second.name) == (8, "vapor", 0.5, "side_draw_2")
    (heater,) = column.stage_duties
    assert (heater.stage, heater.duty) == (7, -50_000.0)
    assert column.reflux_temperature is None and column.reflux_subcooling is None


def test_full_case_feeds_normalized():
    main, second = loads_case(FULL_CASE).feeds
    assert main.name == "main" and main.vapor_fraction == 0.25 and main.temperature is None
    assert main.composition == pytest.approx((0.35, 0.60, 0.05))
    assert math.fsum(main.composition) == pytest.approx(1.0, abs=1e-15)
    assert main.pressure is None
    assert second.name == "feed_2" and second.composition == (0.0, 1.0, 0.0) and second.temperature == 300.0


def test_full_case_specs_in_file_order_with_keys():
    specs = loads_case(FULL_CASE).specs
    got = [(s.kind, pytest.approx(s.value), s.component, s.product, s.stage, s.key) for s in specs]
    assert got == [
        ("distillate_rate", 30 / 3.6, None, None, None, "specs.distillate_rate"),
        ("boilup_ratio", 2.0, None, None, None, "specs.boilup_ratio"),
        ("mole_fraction", 0.99, "methanol", "distillate", None, "specs.distillate.methanol"),
        ("recovery", 0.98, "methanol", "distillate", None, "specs.recovery.methanol.distillate"),
        ("recovery", 1.0, "water", "bottoms", None, "specs.recovery.water.bottoms"),
        ("stage_temperature", 353.15, None, None, 5, "specs.stage_temperature[0]"),
        ("stage_temperature", 360.0, None, None, 9, "specs.stage_temperature[1]"),
        ("reboiler_duty", 1.2e6, None, None, None, "specs.reboiler_duty"),
        ("condenser_duty", -1e6, None, None, None, "specs.condenser_duty"),
    ]


def test_full_case_check_and_display():
    case = loads_case(FULL_CASE)
    assert dict(case.check) == {"duty_rel": 1e-4, "composition_abs": 1e-6, "temperature_abs": 0.01, "flow_rel": 1e-5}
    assert dict(case.display) == {"temperature": "degF", "pressure": "kPa", "flow": "kmol/h", "duty": "kW"}


def test_wilson_energy_form_uses_liquid_volumes():
    case = loads_case(WILSON_CASE)
    (pair,) = case.thermo.pairs
    v_methanol, v_water = 40.7e-6, 18.07e-6
    assert case.thermo.wilson_volumes == pytest.approx({"methanol": v_methanol, "water": v_water})
    # Lambda_ij = V_j/V_i exp(-dlambda_ij/(R T)): constant term ln(V_j/V_i), term over T -dlambda_ij/R
    assert pair.constant_term == pytest.approx((math.log(v_water / v_methanol), math.log(v_methanol / v_water)))
    assert pair.term_over_temperature == pytest.approx((-500.0 / GAS_CONSTANT, -2000.0 / GAS_CONSTANT))
    assert case.column.pressures == pytest.approx((101_325.0,) * 10)
    assert case.column.reflux_subcooling == pytest.approx(5.0)
    assert case.feeds[0].vapor_fraction == 0.0


def test_uniquac_energy_form_and_structure():
    case = loads_case(UNIQUAC_CASE)
    (pair,) = case.thermo.pairs
    assert (pair.first, pair.second) == ("water", "methanol")
    # tau_ij = exp(-du_ij/(R T)): ln tau_ij is a term over T, -du_ij / R
    assert pair.term_over_temperature == pytest.approx((1000.0 / GAS_CONSTANT, -500.0 / GAS_CONSTANT))
    assert dict(case.thermo.uniquac_structure) == {"methanol": (1.4311, 1.432), "water": (0.92, 1.4)}
    assert case.thermo.enthalpy == "cmo"
    assert case.column.stages == 3 and case.column.efficiencies == (1.0, 1.0, 1.0)
    assert case.specs == ()


def test_reflux_temperature_goes_to_the_column_not_the_specs():
    data = tomllib.loads(WILSON_CASE)
    del data["specs"]["reflux_subcooling"]
    data["specs"]["reflux_temperature"] = "40 degC"
    case = parse_case(data)
    assert case.column.reflux_temperature == pytest.approx(313.15)
    assert [s.kind for s in case.specs] == ["reflux_ratio"]


def test_pressure_profile_and_efficiency_list():
    data = mutated(format_data(), "column.pressure", {"profile": [f"{100 + k} kPa" for k in range(20)]})
    data = mutated(data, "column.efficiency", [0.5] * 20)
    column = parse_case(data).column
    assert column.pressures == pytest.approx(tuple(1000.0 * (100 + k) for k in range(20)))
    assert column.efficiencies == (1.0,) + (0.5,) * 18 + (1.0,)


def test_case_insensitive_names_and_choices():
    data = mutated(format_data(), "feeds[0].composition", {"MeThanol": 0.35, "Water": 0.65})
    data = mutated(data, "thermo.liquid", "NRTL")
    case = parse_case(data)
    assert case.feeds[0].composition == pytest.approx((0.35, 0.65))
    assert case.thermo.liquid == "nrtl"


# --- mass basis ------------------------------------------------------------------------------


def test_molar_mass_of_coolprop_fluids_case_insensitive():
    # CoolProp 6+ fluid files: methanol 32.04216 g/mol, water 18.015268 g/mol
    assert molar_mass_of("Methanol") == pytest.approx(0.03204216, rel=1e-9)
    assert molar_mass_of("METHANOL") == pytest.approx(0.03204216, rel=1e-9)
    assert molar_mass_of("h2o") == pytest.approx(0.018015268, rel=1e-9)
    with pytest.raises(CaseError, match="not a CoolProp fluid"):
        molar_mass_of("unobtainium")


def test_mass_basis_feed_converted_by_hand():
    data = mutated(format_data(), "feeds[0].composition", {"methanol": 0.5, "water": 0.5})
    data["feeds"][0]["basis"] = "mass"
    (feed,) = parse_case(data).feeds
    # per kg: 0.5/0.03204216 = 15.6044 mol methanol, 0.5/0.018015268 = 27.7542 mol water;
    # x = 15.6044 / 43.3587 = 0.359892
    moles_methanol, moles_water = 0.5 / 0.03204216, 0.5 / 0.018015268
    assert moles_methanol == pytest.approx(15.6045, abs=1e-4) and moles_water == pytest.approx(27.7542, abs=1e-4)
    assert feed.composition[0] == pytest.approx(15.6045 / (15.6045 + 27.7542), rel=1e-5)
    assert feed.composition[0] == pytest.approx(0.359892, abs=1e-6)
    assert sum(feed.composition) == pytest.approx(1.0)


def test_mass_basis_with_a_user_component():
    data = mutated(format_data(), "components.names", ["water", "solventX"])
    data = mutated(data, "thermo.liquid", "ideal")
    del data["thermo"]["nrtl"]
    data = mutated(data, "feeds[0].composition", {"water": 0.6, "solventx": 0.4})
    data["feeds"][0]["basis"] = "mass"
    data["specs"] = {"reflux_ratio": 1.0}
    (feed,) = parse_case(data).feeds
    moles = (0.6 / 0.018015268, 0.4 / 0.1)  # solventX molar mass 0.1 kg/mol from its data
    assert feed.composition == pytest.approx((moles[0] / sum(moles), moles[1] / sum(moles)))


def test_an_unknown_component_is_refused_by_the_case_reader_whatever_the_basis():
    """Every listed name is now resolved when the case is read (CoolProp, the handbook library,
    or [components.data]), so an unknown one is named at components.names with the file, on a
    mass basis (which needs its molar mass) and on a mole basis alike."""
    data = mutated(format_data(), "components.names", ["methanol", "unobtainium"])
    data = mutated(data, "thermo.liquid", "ideal")
    del data["thermo"]["nrtl"]
    data = mutated(data, "feeds[0].composition", {"methanol": 0.5, "unobtainium": 0.5})
    data = mutated(data, "specs.bottoms", {"unobtainium": 0.995})
    for basis in ("mass", "mole"):
        data["feeds"][0]["basis"] = basis
        error = case_error(data)
        assert error.file == "case.toml" and error.key == "components.names[1]" and error.value == "unobtainium"
        assert "unknown component" in error.problem and "handbook library" in error.problem


# --- errors: file problems ------------------------------------------------------------------


def test_missing_file(tmp_path):
    path = tmp_path / "absent.toml"
    with pytest.raises(CaseError, match="file not found") as info:
        load_case(path)
    assert info.value.file == str(path) and str(path) in str(info.value)


def test_directory_is_not_a_case(tmp_path):
    with pytest.raises(CaseError, match="directory") as info:
        load_case(tmp_path)
    assert info.value.file == str(tmp_path)


def test_file_that_is_not_utf8(tmp_path):
    path = tmp_path / "latin1.toml"
    path.write_bytes('title = "Kolonne f\u00fcr L\u00f6sungsmittel"\n'.encode("latin-1"))
    with pytest.raises(CaseError, match="not UTF-8") as info:
        load_case(path)
    assert info.value.file == str(path)
    assert "line 1, column 19" in info.value.problem  # the u-umlaut is the 19th character


def test_broken_toml_names_line_and_column(tmp_path):
    path = tmp_path / "broken.toml"
    path.write_text('title = "x"\n[column]\nstages = = 3\n', encoding="utf-8")
    with pytest.raises(CaseError) as info:
        load_case(path)
    assert info.value.file == str(path)
    assert "line 3, column" in str(info.value) and "not valid TOML" in str(info.value)


def test_utf8_byte_order_mark_is_accepted(tmp_path):
    path = tmp_path / "bom.toml"
    path.write_bytes(b"\xef\xbb\xbf" + FORMAT_CASE.encode("utf-8"))
    assert load_case(path).title == "Solvent recovery column (demo)"


def test_load_case_reads_a_file(tmp_path):
    path = tmp_path / "format.toml"
    path.write_text(FORMAT_CASE, encoding="utf-8")
    case = load_case(str(path))
    assert isinstance(case, Case) and case.source_file == str(path)


@pytest.mark.parametrize("bad", [None, 3, b"\x00".decode() + "x.toml"])
def test_load_case_bad_path(bad):
    with pytest.raises(CaseError):
        load_case(bad)


def test_loads_case_needs_text():
    with pytest.raises(CaseError, match="string"):
        loads_case(b"title = 'x'")  # type: ignore[arg-type]


def test_deeply_nested_toml_is_a_case_error():
    with pytest.raises(CaseError, match="nested too deeply|not valid TOML"):
        loads_case("a = " + "[" * 50_000)


def test_parse_case_needs_a_table():
    error = case_error([1, 2, 3])  # type: ignore[arg-type]
    assert error.file == "case.toml" and "table" in error.problem


# --- errors: every kind names file, key and value ---------------------------------------------

# (path, new value or DELETE, key in the error, value in the error, text in the message)
FORMAT_ERRORS = [
    ("titel", "x", "titel", "titel", "did you mean 'title'"),
    ("title", 5, "title", 5, "string"),
    ("components", DELETE, "components", None, "missing"),
    ("components.names", [], "components.names", [], "at least 1"),
    ("components.names", "methanol", "components.names", "methanol", "list"),
    ("components.names", ["methanol", "Methanol"], "components.names[1]", "Methanol", "twice"),
    ("components.names", ["methanol", 3], "components.names[1]", 3, "string"),
    ("components.names", ["methanol", " water"], "components.names[1]", " water", "usable"),
    ("components.names", ["methanol", "water&ethanol"], "components.names[1]", "water&ethanol", "usable"),
    ("components.nmaes", ["water"], "components.nmaes", "nmaes", "did you mean 'names'"),
    ("components.data.solventX.molar_mass", "-1 kg/mol", "components.data.solventX.molar_mass", "-1 kg/mol", "range"),
    ("components.data.solventX.molar_mass", 100, "components.data.solventX.molar_mass", 100, "kg/mol"),
    ("components.data.solventX.molar_mass", True, "components.data.solventX.molar_mass", True, "true/false"),
    ("components.data.solventX.critical_temperature", "hot", "components.data.solventX.critical_temperature", "hot", "number"),
    ("components.data.solventX.critical_pressure", math.nan, "components.data.solventX.critical_pressure", math.nan, "finite"),
    ("components.data.solventX.vapor_pressure.form", "antonie", "components.data.solventX.vapor_pressure.form", "antonie", "did you mean 'antoine'"),
    ("components.data.solventX.vapor_pressure.form", "watson", "components.data.solventX.vapor_pressure.form", "watson", "choice"),
    ("components.data.solventX.vapor_pressure.base", 2, "components.data.solventX.vapor_pressure.base", 2, "base"),
    ("components.data.solventX.vapor_pressure.pressure_unit", "kg", "components.data.solventX.vapor_pressure.pressure_unit", "kg", "pressure"),
    ("components.data.solventX.vapor_pressure.temperature_unit", "delta_degC", "components.data.solventX.vapor_pressure.temperature_unit", "delta_degC", "temperature unit"),
    ("components.data.solventX.vapor_pressure.A", "7.1", "components.data.solventX.vapor_pressure.A", "7.1", "number"),
    ("components.data.solventX.vapor_pressure.B", math.inf, "components.data.solventX.vapor_pressure.B", math.inf, "finite"),
    ("components.data.solventX.vapor_pressure.C", DELETE, "components.data.solventX.vapor_pressure.C", None, "missing"),
    ("components.data.solventX.vapor_pressure.T_max", "10 degC", "components.data.solventX.vapor_pressure.T_max", "10 degC", "T_min"),
    ("components.data.solventX.vapor_pressure.Tmax", "10 degC", "components.data.solventX.vapor_pressure.Tmax", "Tmax", "did you mean 'T_max'"),
    ("components.data.solventX.vapor_pressure", 7.1, "components.data.solventX.vapor_pressure", 7.1, "table"),
    ("components.data.solventX.vapor_pressure", DELETE, "components.data.solventX.vapor_pressure", None, "missing"),
    ("components.data.solventX.ideal_gas_cp.units", "J/mol, K", "components.data.solventX.ideal_gas_cp.units", "J/mol, K", "heat capacity"),
    ("components.data.solventX.ideal_gas_cp.units", "J/mol/K, K, s", "components.data.solventX.ideal_gas_cp.units", "J/mol/K, K, s", "split"),
    ("components.data.solventX.ideal_gas_cp.coefficients", [], "components.data.solventX.ideal_gas_cp.coefficients", [], "at least 1"),
    ("components.data.solventX.ideal_gas_cp.coefficients", [30.0, "x"], "components.data.solventX.ideal_gas_cp.coefficients[1]", "x", "number"),
    ("components.data.solventX.ideal_gas_cp.form", "dippr105", "components.data.solventX.ideal_gas_cp.form", "dippr105", "choice"),
    ("components.data.solventX.heat_of_vaporization.at", "600 K", "components.data.solventX.heat_of_vaporization.at", "600 K", "range"),
    ("components.data.solventX.heat_of_vaporization.value", "35 kJ/kg", "components.data.solventX.heat_of_vaporization.value", "35 kJ/kg", "molar energy"),
    ("components.data.solventX.source", "", "components.data.solventX.source", "", "empty"),
    ("components.data.solventX.source", DELETE, "components.data.solventX.source", None, "missing"),
    ("components.data.solventX.colour", "red", "components.data.solventX.colour", "colour", "unknown key"),
    ("components.data.solventX.normal_boiling_point", "600 K", "components.data.solventX.normal_boiling_point", "600 K", "range"),
    ("components.data.solventX.liquid_molar_volume", {"form": "constant", "value": "1 kg"}, "components.data.solventX.liquid_molar_volume.value", "1 kg", "molar volume"),
    ("thermo.liquid", "nrlt", "thermo.liquid", "nrlt", "did you mean 'nrtl'"),
    ("thermo.vapor", "srk", "thermo.vapor", "srk", "choice"),
    ("thermo.enthalpy", "cmoo", "thermo.enthalpy", "cmoo", "did you mean 'cmo'"),
    ("thermo.enthalpy", 1, "thermo.enthalpy", 1, "string"),
    ("thermo.nrtl.methanol.water.term_over_temperature", ["-120.0 K"], "thermo.nrtl.methanol.water.term_over_temperature", ["-120.0 K"], "2 entries"),
    ("thermo.nrtl.methanol.water.term_over_temperature", ["-120 kg", "420 K"], "thermo.nrtl.methanol.water.term_over_temperature[0]", "-120 kg", "temperature difference"),
    ("thermo.nrtl.methanol.water.term_over_temperature", -120.0, "thermo.nrtl.methanol.water.term_over_temperature", -120.0, "list"),
    ("thermo.nrtl.methanol.water.term_times_temperature", ["1 K", 0], "thermo.nrtl.methanol.water.term_times_temperature[0]", "1 K", "inverse temperature"),
    ("thermo.nrtl.methanol.water.alpha", [0.3, 0.4], "thermo.nrtl.methanol.water.alpha", [0.3, 0.4], "equal"),
    ("thermo.nrtl.methanol.water.alpha", True, "thermo.nrtl.methanol.water.alpha", True, "true/false"),
    ("thermo.nrtl.methanol.water.alpha", DELETE, "thermo.nrtl.methanol.water.alpha", None, "missing"),
    ("thermo.nrtl.methanol.water.dg", ["1 J/mol", "2 J/mol"], "thermo.nrtl.methanol.water.term_over_temperature", ["-120.0 K", "420.0 K"], "energy form"),
    ("thermo.nrtl.methanol.water.dlambda", ["1 J/mol", "2 J/mol"], "thermo.nrtl.methanol.water.dlambda", "dlambda", "WILSON"),
    ("thermo.nrtl.methanol.water.alpha", {"value": 0.3, "slope": "0.001 1/K"}, "thermo.nrtl.methanol.water.alpha.reference_temperature", None, "missing"),
    ("thermo.nrtl.methanol.water.alpha", {"value": 0.3, "reference_temperature": "350 K"}, "thermo.nrtl.methanol.water.alpha.slope", None, "missing"),
    ("thermo.nrtl.methanol.water.alpha", {"slope": 0.001, "reference_temperature": 350}, "thermo.nrtl.methanol.water.alpha.value", None, "missing"),
    ("thermo.nrtl.methanol.water.alpha", {"value": 0.3, "slope": "1 K", "reference_temperature": 350}, "thermo.nrtl.methanol.water.alpha.slope", "1 K", "inverse temperature"),
    ("thermo.nrtl.methanol.water.alpha", {"value": 0.3, "slope": 0.001, "reference_temperature": -5}, "thermo.nrtl.methanol.water.alpha.reference_temperature", -5, "range"),
    ("thermo.nrtl.methanol.water.alpha", {"value": 0.3, "slop": 0.001}, "thermo.nrtl.methanol.water.alpha.slop", "slop", "did you mean 'slope'"),
    # names of earlier versions of the pair table: each error says what to write instead
    ("thermo.nrtl.methanol.water.a", [0.1, 0.2], "thermo.nrtl.methanol.water.a", [0.1, 0.2], "written 'constant_term'"),
    ("thermo.nrtl.methanol.water.b", ["-1 K", "4 K"], "thermo.nrtl.methanol.water.b", ["-1 K", "4 K"], "written 'term_over_temperature'"),
    ("thermo.nrtl.methanol.water.e", [0.1, 0.2], "thermo.nrtl.methanol.water.e", [0.1, 0.2], "written 'term_in_ln_temperature'"),
    ("thermo.nrtl.methanol.water.f", [0.0, 1e-4], "thermo.nrtl.methanol.water.f", [0.0, 1e-4], "written 'term_times_temperature'"),
    ("thermo.nrtl.methanol.water.alpha_T", 0.001, "thermo.nrtl.methanol.water.alpha_T", 0.001, "reference_temperature"),
    ("thermo.nrtl.methanol.water.sauce", "x", "thermo.nrtl.methanol.water.sauce", "sauce", "did you mean 'source'"),
    ("thermo.nrtl.methanol.water.source", 42, "thermo.nrtl.methanol.water.source", 42, "string"),
    ("thermo.nrtl.methanol.ethanol", {"alpha": 0.3}, "thermo.nrtl.methanol.ethanol", "ethanol", "not a component"),
    ("thermo.nrtl.methanl", {"water": {"alpha": 0.3}}, "thermo.nrtl.methanl", "methanl", "did you mean 'methanol'"),
    ("thermo.nrtl.water", {"methanol": {"alpha": 0.3}}, "thermo.nrtl.water.methanol", "methanol", "twice"),
    ("thermo.nrtl.methanol.methanol", {"alpha": 0.3}, "thermo.nrtl.methanol.methanol", "methanol", "two different"),
    ("thermo.nrtl.methanol", 0.3, "thermo.nrtl.methanol", 0.3, "table"),
    ("thermo.wilson", {}, "thermo.wilson", "wilson", "not used"),
    ("thermo.uniquac_structure", {}, "thermo.uniquac_structure", "uniquac_structure", "not used"),
    ("thermo.wilson_volumes", {}, "thermo.wilson_volumes", "wilson_volumes", "not used"),
    ("column.stgaes", 20, "column.stgaes", "stgaes", "did you mean 'stages'"),
    ("column.stages", 20.0, "column.stages", 20.0, "decimal point"),
    ("column.stages", "20", "column.stages", "20", "whole number"),
    ("column.stages", 2, "column.stages", 2, "range"),
    ("column.stages", 5000, "column.stages", 5000, "2000"),
    ("column.stages", True, "column.stages", True, "whole number"),
    ("column.stages", DELETE, "column.stages", None, "missing"),
    ("column.condenser", "full", "column.condenser", "full", "choice"),
    ("column.reboiler", "total", "column.reboiler", "total", "choice"),
    ("column.pressure.top", "-1 bar", "column.pressure.top", "-1 bar", "range"),
    ("column.pressure.top", "1 bar/h", "column.pressure.top", "1 bar/h", "not a pressure"),
    ("column.pressure.top", DELETE, "column.pressure.top", None, "missing"),
    ("column.pressure.drop_per_stage", "-0.1 kPa", "column.pressure.drop_per_stage", "-0.1 kPa", "range"),
    ("column.pressure.profile", ["1 bar"] * 20, "column.pressure.top", "101.325 kPa", "profile"),
    ("column.pressure.bottom", "2 bar", "column.pressure.bottom", "bottom", "unknown key"),
    ("column.efficiency", 1.5, "column.efficiency", 1.5, "range"),
    ("column.efficiency", 0, "column.efficiency", 0, "range"),
    ("column.efficiency", [0.5] * 19, "column.efficiency", [0.5] * 19, "20 entries"),
    ("column.efficiency", {"default": 0.7, "25": 0.5}, "column.efficiency.25", "25", "no such stage"),
    ("column.efficiency", {"default": 0.7, "1": 0.5}, "column.efficiency.1", "1", "condenser"),
    ("column.efficiency", {"default": 0.7, "20": 0.5}, "column.efficiency.20", "20", "reboiler"),
    ("column.efficiency", {"defualt": 0.7}, "column.efficiency.defualt", "defualt", "did you mean 'default'"),
    ("column.efficiency", {"default": 0.7, "5": -0.5}, "column.efficiency.5", -0.5, "range"),
    ("column.side_draws", [{"stage": 21, "phase": "liquid", "flow": 1}], "column.side_draws[0].stage", 21, "range"),
    ("column.side_draws", [{"stage": 5, "phase": "solid", "flow": 1}], "column.side_draws[0].phase", "solid", "choice"),
    ("column.side_draws", [{"stage": 5, "phase": "vapor", "flow": -1}], "column.side_draws[0].flow", -1, "range"),
    ("column.side_draws", {"stage": 5}, "column.side_draws", {"stage": 5}, "list"),
    ("column.heaters", [{"stage": 1, "duty": "1 kW"}], "column.heaters[0].stage", 1, "condenser"),
    ("column.heaters", [{"stage": 5, "duty": "1 kmol/h"}], "column.heaters[0].duty", "1 kmol/h", "not a power"),
    ("column.heaters", [{"stage": 5, "duty": 1}, {"stage": 5, "duty": 2}], "column.heaters[1].stage", 5, "another heater"),
    ("feeds", {"stage": 10}, "feeds", "a table", "[[feeds]]"),
    ("feeds", [], "feeds", [], "at least 1"),
    ("feeds[0].stage", 0, "feeds[0].stage", 0, "range"),
    ("feeds[0].stage", 21, "feeds[0].stage", 21, "range"),
    ("feeds[0].stage", "10", "feeds[0].stage", "10", "whole number"),
    ("feeds[0].flow", "-5 kmol/h", "feeds[0].flow", "-5 kmol/h", "range"),
    ("feeds[0].flow", 0, "feeds[0].flow", 0, "range"),
    ("feeds[0].flow", "100 kg", "feeds[0].flow", "100 kg", "not a molar flow"),
    ("feeds[0].flow", [100], "feeds[0].flow", [100], "a number or a string"),
    ("feeds[0].composition", {"methanol": 0.35, "water": 0.6}, "feeds[0].composition", {"methanol": 0.35, "water": 0.6}, "add up to 0.95"),
    ("feeds[0].composition", {"methanl": 0.35, "water": 0.65}, "feeds[0].composition.methanl", "methanl", "did you mean 'methanol'"),
    ("feeds[0].composition", {"methanol": 0.35, "Methanol": 0.65}, "feeds[0].composition.Methanol", "Methanol", "twice"),
    ("feeds[0].composition", {"methanol": 0.0}, "feeds[0].composition", {"methanol": 0.0}, "zero"),
    ("feeds[0].composition.water", -0.1, "feeds[0].composition.water", -0.1, "range"),
    ("feeds[0].composition.water", 1.65, "feeds[0].composition.water", 1.65, "range"),
    ("feeds[0].composition.water", True, "feeds[0].composition.water", True, "true/false"),
    ("feeds[0].composition", [0.35, 0.65], "feeds[0].composition", [0.35, 0.65], "table"),
    ("feeds[0].basis", "volume", "feeds[0].basis", "volume", "choice"),
    ("feeds[0].normalize", "yes", "feeds[0].normalize", "yes", "true or false"),
    ("feeds[0].vapor_fraction", 0.0, "feeds[0]", {"temperature": "65 degC", "vapor_fraction": 0.0}, "both"),
    ("feeds[0].temperature", DELETE, "feeds[0]", None, "exactly one"),
    ("feeds[0].temperature", "-300 degC", "feeds[0].temperature", "-300 degC", "range"),
    ("feeds[0].temperature", "5 delta_degC", "feeds[0].temperature", "5 delta_degC", "difference"),
    ("feeds[0].pressure", "0 bar", "feeds[0].pressure", "0 bar", "range"),
    ("feeds[0].temperatur", "65 degC", "feeds[0].temperatur", "temperatur", "did you mean 'temperature'"),
    ("feeds[0].name", "", "feeds[0].name", "", "empty"),
    ("specs.reflux_ratio", 0, "specs.reflux_ratio", 0, "range"),
    ("specs.reflux_ratio", -1.4, "specs.reflux_ratio", -1.4, "range"),
    ("specs.reflux_ratio", "abc", "specs.reflux_ratio", "abc", "number"),
    ("specs.reflux_ratoi", 1.4, "specs.reflux_ratoi", "reflux_ratoi", "did you mean 'reflux_ratio'"),
    ("specs.bottoms", {"water": 1.0}, "specs.bottoms.water", 1.0, "range"),
    ("specs.bottoms", {"ethanol": 0.99}, "specs.bottoms.ethanol", "ethanol", "not a component"),
    ("specs.bottoms", 0.995, "specs.bottoms", 0.995, "table"),
    ("specs.recovery", {"methanol": {"distillat": 0.99}}, "specs.recovery.methanol.distillat", "distillat", "did you mean 'distillate'"),
    ("specs.recovery", {"methanol": {"distillate": 1.2}}, "specs.recovery.methanol.distillate", 1.2, "range"),
    ("specs.recovery", {"methanol": 0.99}, "specs.recovery.methanol", 0.99, "table"),
    ("specs.condenser_duty", "5 MW", "specs.condenser_duty", "5 MW", "negative"),
    ("specs.reboiler_duty", "-5 MW", "specs.reboiler_duty", "-5 MW", "range"),
    ("specs.stage_temperature", {"stage": 50, "value": "80 degC"}, "specs.stage_temperature.stage", 50, "range"),
    ("specs.stage_temperature", {"stage": 5}, "specs.stage_temperature.value", None, "missing"),
    ("specs.stage_temperature", [{"stage": 5, "value": "80 bar"}], "specs.stage_temperature[0].value", "80 bar", "not a temperature"),
    ("specs.reflux_subcooling", "-5 K", "specs.reflux_subcooling", "-5 K", "range"),
    ("specs.distillate_rate", "1 kW", "specs.distillate_rate", "1 kW", "not a molar flow"),
    ("check.tolerances.duty_rel", 0, "check.tolerances.duty_rel", 0, "range"),
    ("check.tolerances.speed", 1, "check.tolerances.speed", "speed", "unknown key"),
    ("check.tolerance", {}, "check.tolerance", "tolerance", "did you mean 'tolerances'"),
    ("display", {"pressure": "kmol/h"}, "display.pressure", "kmol/h", "not a unit of pressure"),
    ("display", {"temperature": "2 degC"}, "display.temperature", "2 degC", "not a unit"),
    ("display", {"duty": "kW", "colour": "red"}, "display.colour", "colour", "unknown key"),
]


@pytest.mark.parametrize(("path", "value", "key", "shown", "text"), FORMAT_ERRORS, ids=[e[0] + "-" + repr(e[1])[:20] for e in FORMAT_ERRORS])
def test_error_names_file_key_and_value(path, value, key, shown, text):
    error = case_error(mutated(format_data(), path, value))
    assert error.file == "case.toml"
    assert error.key == key
    if isinstance(shown, float) and math.isnan(shown):
        assert math.isnan(error.value)
    else:
        assert error.value == shown
    message = str(error)
    assert message.startswith(f"case.toml: {key}: ")
    assert text in message
    if shown is not None:
        assert "got " in message
    assert error.exit_code == 2


# Errors that need more than one change from the format example.
def _combined(*changes):
    data = format_data()
    for path, value in changes:
        data = mutated(data, path, value)
    return data


COMBINED_ERRORS = [
    ([("column.condenser", "partial"), ("specs.reflux_temperature", "50 degC")], "specs.reflux_temperature", "50 degC", "total condenser"),
    ([("specs.reflux_temperature", "50 degC"), ("specs.reflux_subcooling", "5 K")], "specs.reflux_subcooling", "5 K", "cannot be combined"),
    ([("column.condenser", "none"), ("column.stages", 20)], "specs.reflux_ratio", 1.4, "no condenser"),
    ([("column.reboiler", "none"), ("specs.boilup_ratio", 2.0)], "specs.boilup_ratio", 2.0, "no reboiler"),
    ([("column.reboiler", "none"), ("specs.reboiler_duty", "1 MW")], "specs.reboiler_duty", "1 MW", "no reboiler"),
    ([("column.condenser", "none"), ("specs", {"condenser_duty": "-1 MW"})], "specs.condenser_duty", "-1 MW", "no condenser"),
    ([("thermo.liquid", "wilson"), ("thermo.nrtl", DELETE), ("thermo.wilson", {"methanol": {"water": {"dlambda": [1, 2]}}})],
     "thermo.wilson_volumes", None, "liquid molar volume of 'methanol' and 'water'"),
    ([("thermo.liquid", "wilson"), ("thermo.nrtl", DELETE), ("thermo.wilson_volumes", {"methanol": 40.7})],
     "thermo.wilson_volumes.methanol", 40.7, "m**3/mol"),
    ([("thermo.liquid", "wilson"), ("thermo.nrtl", DELETE), ("thermo.wilson", {"methanol": {"water": {"dg": [1, 2]}}})],
     "thermo.wilson.methanol.water.dg", "dg", "'dlambda'"),
    ([("thermo.liquid", "ideal")], "thermo.nrtl", "nrtl", "not used"),
    ([("thermo.liquid", "uniquac"), ("thermo.nrtl", DELETE)], "thermo.uniquac_structure", None, "r and q"),
    ([("thermo.liquid", "uniquac"), ("thermo.nrtl", DELETE), ("thermo.uniquac_structure", {"methanol": {"r": 1.4, "q": 1.4}})],
     "thermo.uniquac_structure", None, "missing for water"),
    ([("thermo.liquid", "uniquac"), ("thermo.nrtl", DELETE), ("thermo.uniquac_structure", {"methanol": {"r": -1.4, "q": 1.4}})],
     "thermo.uniquac_structure.methanol.r", -1.4, "range"),
    ([("column.pressure", {"profile": ["1 bar"] * 10 + ["0.9 bar"] * 10})], "column.pressure.profile[10]", "0.9 bar", "falls"),
    ([("column.stages", 5), ("feeds[0].stage", 3), ("column.pressure", {"profile": [1e5] * 4})],
     "column.pressure.profile", [1e5] * 4, "5 entries"),
    ([("feeds[0].basis", "mass"), ("components.names", ["methanol", "nosuchfluid"]), ("thermo.liquid", "ideal"),
      ("thermo.nrtl", DELETE), ("feeds[0].composition", {"methanol": 0.5, "nosuchfluid": 0.5})],
     "components.names[1]", "nosuchfluid", "unknown component"),
    ([("components.data.solventx", {"molar_mass": 0.1})], "components.data.solventx", "solventx", "defined twice"),
    ([("column.side_draws", [{"stage": 5, "phase": "liquid", "flow": 1, "name": "a"}, {"stage": 6, "phase": "liquid", "flow": 1, "name": "a"}])],
     "column.side_draws[1].name", "a", "another side draw"),
]


@pytest.mark.parametrize(("changes", "key", "shown", "text"), COMBINED_ERRORS, ids=[e[1] for e in COMBINED_ERRORS])
def test_error_after_several_changes_names_key_and_value(changes, key, shown, text):
    error = case_error(_combined(*changes))
    assert (error.file, error.key, error.value) == ("case.toml", key, shown)
    assert text in str(error)


def test_feeds_second_entry_is_named_by_index():
    data = format_data()
    data["feeds"].append(dict(data["feeds"][0], stage=99))
    error = case_error(data)
    assert error.key == "feeds[1].stage" and error.value == 99


def test_duplicate_feed_names():
    data = format_data()
    data["feeds"][0]["name"] = "F"
    data["feeds"].append(dict(data["feeds"][0]))
    assert case_error(data).key == "feeds[1].name"


def test_unknown_key_lists_allowed_keys_and_suggests():
    error = case_error(mutated(format_data(), "column.stgaes", 20))
    assert error.problem == "unknown key; did you mean 'stages'?"
    assert error.expected is not None
    for allowed in ("stages", "condenser", "reboiler", "pressure", "efficiency", "side_draws", "heaters"):
        assert allowed in error.expected


def test_unknown_key_without_a_close_match_has_no_suggestion():
    error = case_error(mutated(format_data(), "column.xyzzy", 1))
    assert "did you mean" not in error.problem and "stages" in error.expected


def test_unknown_key_at_the_top_level_and_in_a_correlation():
    error = case_error(mutated(format_data(), "spec", {}))
    assert error.key == "spec" and "did you mean 'specs'" in error.problem
    data = mutated(format_data(), "components.data.solventX.ideal_gas_cp.coefficent", [1.0])
    error = case_error(data)
    assert error.key == "components.data.solventX.ideal_gas_cp.coefficent" and "'coefficients'" in error.problem


def test_composition_sum_tolerance():
    ok = mutated(format_data(), "feeds[0].composition", {"methanol": 0.35, "water": 0.65 + 0.9e-6})
    assert sum(parse_case(ok).feeds[0].composition) == pytest.approx(1.0, abs=1e-15)
    bad = mutated(format_data(), "feeds[0].composition", {"methanol": 0.35, "water": 0.65 + 2e-6})
    assert "normalize = true" in case_error(bad).problem


def test_toml_syntax_error_from_text_names_line():
    with pytest.raises(CaseError) as info:
        loads_case("[column]\nstages = 20\nstages = 21\n", source_file="dup.toml")
    assert info.value.file == "dup.toml" and "line 3" in str(info.value)


def test_long_values_are_shortened_in_messages():
    error = case_error(mutated(format_data(), "title", ["x" * 1000]))
    assert len(str(error)) < 400


# --- property tests --------------------------------------------------------------------------


def _paths(node, prefix=()):
    """Every path (tuple of keys/indices) into a nested dict/list."""
    yield prefix
    if isinstance(node, dict):
        for key, value in node.items():
            yield from _paths(value, prefix + (key,))
    elif isinstance(node, list):
        for index, value in enumerate(node):
            yield from _paths(value, prefix + (index,))


def _replace_at(data, path, value):
    data = copy.deepcopy(data)
    if not path:
        return value
    node = data
    for token in path[:-1]:
        node = node[token]
    node[path[-1]] = value
    return data


def _delete_at(data, path):
    data = copy.deepcopy(data)
    node = data
    for token in path[:-1]:
        node = node[token]
    del node[path[-1]]
    return data


BASE_CASES = [tomllib.loads(text) for text in (FORMAT_CASE, FULL_CASE, WILSON_CASE, UNIQUAC_CASE)]
BASE_PATHS = [(index, path) for index, data in enumerate(BASE_CASES) for path in _paths(data)]

_scalars = st.one_of(
    st.none(),
    st.booleans(),
    st.integers(),
    st.integers(min_value=-(10**400), max_value=10**400),
    st.floats(),
    st.text(max_size=30),
    st.sampled_from(
        ["", "nan", "1e999 K", "-5 degC", "9**9**9", "100 kmol/h", "1.5 bar", "0", "-1", "mass", "none", "total",
         "methanol", "water", "e", "10", "J/kmol, K", "degC", "5 delta_degC", "1 1/K", "70 %", "x" * 300]
    ),
    st.datetimes(),
    st.dates(),
    st.times(),
)
_garbage = st.recursive(
    _scalars,
    lambda children: st.one_of(
        st.lists(children, max_size=4), st.dictionaries(st.text(max_size=12), children, max_size=4)
    ),
    max_leaves=8,
)


@settings(max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(where=st.sampled_from(BASE_PATHS), value=_garbage)
def test_garbage_in_a_valid_case_raises_only_case_error(where, value):
    index, path = where
    data = _replace_at(BASE_CASES[index], path, value)
    try:
        case = parse_case(data, source_file="garbage.toml")
    except CaseError as error:
        assert error.file == "garbage.toml"
        assert str(error).startswith("garbage.toml")
        return
    assert isinstance(case, Case)


@settings(max_examples=200, deadline=None)
@given(where=st.sampled_from([w for w in BASE_PATHS if w[1]]))
def test_deleting_any_key_raises_only_case_error(where):
    index, path = where
    data = _delete_at(BASE_CASES[index], path)
    try:
        parse_case(data, source_file="deleted.toml")
    except CaseError as error:
        assert error.file == "deleted.toml"


def _get(data, path):
    for token in path:
        data = data[token]
    return data


TABLE_PATHS = [(i, p) for i, p in BASE_PATHS if isinstance(_get(BASE_CASES[i], p), dict)]


@settings(max_examples=200, deadline=None)
@given(where=st.sampled_from(TABLE_PATHS), key=st.text(min_size=1, max_size=15), value=_garbage)
def test_extra_keys_anywhere_raise_only_case_error(where, key, value):
    index, path = where
    data = copy.deepcopy(BASE_CASES[index])
    table = _get(data, path)
    table[key] = value
    try:
        parse_case(data, source_file="extra.toml")
    except CaseError as error:
        assert error.file == "extra.toml"


_toml_fragments = st.sampled_from(
    [
        "[components]\n", 'names = ["methanol", "water"]\n', "[column]\n", "stages = 20\n", 'condenser = "total"\n',
        'reboiler = "partial"\n', 'pressure = "1 atm"\n', "[[feeds]]\n", "stage = 5\n", 'flow = "1 mol/s"\n',
        "composition = { methanol = 0.5, water = 0.5 }\n", "vapor_fraction = 0\n", "[specs]\n", "reflux_ratio = 2\n",
        "[thermo]\n", 'liquid = "nrtl"\n', "[thermo.nrtl.methanol.water]\n", "alpha = 0.3\n", "term_over_temperature = [1, 2]\n",
        'title = "t"\n', "x = [\n", "]\n", "= 1\n", '"\n', "[[column.side_draws]]\n", "efficiency = { default = 0.5 }\n",
        "1979-05-27T07:32:00Z\n", "a.b.c = 1\n", "\\u0000\n", "inf\n", "nan = nan\n",
    ]
)


@settings(max_examples=300, deadline=None)
@given(text=st.one_of(st.text(max_size=200), st.lists(_toml_fragments, max_size=25).map("".join)))
def test_any_toml_text_raises_only_case_error(text):
    try:
        case = loads_case(text, source_file="random.toml")
    except CaseError as error:
        assert error.file == "random.toml"
        return
    assert isinstance(case, Case)


def test_valid_case_assembled_from_fragments_parses():
    text = "".join(
        [
            "[components]\n", 'names = ["methanol", "water"]\n', "[column]\n", "stages = 20\n", 'condenser = "total"\n',
            'reboiler = "partial"\n', 'pressure = "1 atm"\n', "[[feeds]]\n", "stage = 5\n", 'flow = "1 mol/s"\n',
            "composition = { methanol = 0.5, water = 0.5 }\n", "vapor_fraction = 0\n", "[specs]\n", "reflux_ratio = 2\n",
        ]
    )
    assert loads_case(text).feeds[0].composition == (0.5, 0.5)


@settings(max_examples=150, deadline=None)
@given(content=st.one_of(st.binary(max_size=300), st.text(max_size=100).map(lambda t: t.encode("utf-16"))))
def test_random_bytes_in_a_file_raise_only_case_error(tmp_path_factory, content):
    path = tmp_path_factory.mktemp("bytes") / "random.toml"
    path.write_bytes(content)
    try:
        load_case(path)
    except CaseError as error:
        assert error.file == str(path)


@settings(max_examples=80, deadline=None)
@given(weights=st.lists(st.floats(min_value=0.0, max_value=1e3), min_size=2, max_size=2).filter(lambda w: sum(w) > 1e-3))
def test_normalized_composition_is_proportional_and_sums_to_one(weights):
    data = mutated(format_data(), "feeds[0].composition", {"methanol": weights[0], "water": weights[1]})
    data["feeds"][0]["normalize"] = True
    composition = parse_case(data).feeds[0].composition
    assert math.fsum(composition) == pytest.approx(1.0, abs=1e-12)
    assert composition[0] == pytest.approx(weights[0] / sum(weights), abs=1e-12)


@settings(max_examples=80, deadline=None)
@given(
    stages=st.integers(min_value=3, max_value=200),
    top=st.floats(min_value=1e3, max_value=1e7),
    drop=st.floats(min_value=0.0, max_value=1e4),
)
def test_pressure_profile_from_top_and_drop(stages, top, drop):
    data = mutated(format_data(), "column.stages", stages)
    data = mutated(data, "column.pressure", {"top": top, "drop_per_stage": drop})
    data = mutated(data, "feeds[0].stage", 2)
    pressures = parse_case(data).column.pressures
    assert len(pressures) == stages
    assert pressures[0] == top
    assert pressures[-1] == pytest.approx(top + drop * (stages - 1), rel=1e-12)
    assert all(b >= a for a, b in zip(pressures, pressures[1:]))


# --- correlation forms one by one ------------------------------------------------------------


def _with_solvent_property(prop: str, table) -> dict:
    data = mutated(format_data(), "components.names", ["methanol", "water", "solventX"])
    return mutated(data, f"components.data.solventX.{prop}", table)


@pytest.mark.parametrize(
    ("prop", "table", "form", "coefficients", "factor", "slope", "intercept", "log_base"),
    [
        ("vapor_pressure", {"form": "antoine", "A": 9.0, "B": 1500.0, "C": -50.0, "base": "e"},
         "antoine", {"A": 9.0, "B": 1500.0, "C": -50.0}, 1.0, 1.0, 0.0, math.e),
        ("vapor_pressure", {"form": "antoine", "A": 4.0, "B": 1500.0, "C": -50.0, "pressure_unit": "bar"},
         "antoine", {"A": 4.0, "B": 1500.0, "C": -50.0}, 1e5, 1.0, 0.0, 10.0),
        ("vapor_pressure", {"form": "dippr101", "A": 70.0, "B": -7000.0, "units": "kPa"},
         "dippr101", {"A": 70.0, "B": -7000.0, "C": 0.0, "D": 0.0, "E": 0.0}, 1000.0, 1.0, 0.0, None),
        ("ideal_gas_cp", {"form": "polynomial", "coefficients": [30, 0.1, -1e-5], "units": "J/kmol/K, degC"},
         "polynomial", {"c0": 30.0, "c1": 0.1, "c2": -1e-5}, 1e-3, 1.0, -273.15, None),
        ("ideal_gas_cp", {"form": "constant", "value": "75 J/mol/degC"}, "constant", {"value": 75.0}, 1.0, 1.0, 0.0, None),
        ("heat_of_vaporization", {"form": "watson", "value": "35 kJ/mol", "at": "77 degC", "exponent": 0.375},
         "watson", {"value": 35_000.0, "at": 350.15, "exponent": 0.375}, 1.0, 1.0, 0.0, None),
        ("heat_of_vaporization", {"form": "dippr106", "A": 5e4, "B": 0.38, "units": "kJ/kmol"},
         "dippr106", {"A": 5e4, "B": 0.38, "C": 0.0, "D": 0.0, "E": 0.0}, 1.0, 1.0, 0.0, None),
        ("heat_of_vaporization", {"form": "polynomial", "coefficients": [40.0], "units": "kJ/mol, degF"},
         "polynomial", {"c0": 40.0}, 1000.0, 1.8, -459.67, None),
        ("liquid_molar_volume", {"form": "constant", "value": "100 cm**3/mol"}, "constant", {"value": 1e-4}, 1.0, 1.0, 0.0, None),
        ("liquid_molar_volume", {"form": "polynomial", "coefficients": [0.1, 1e-4], "units": "L/mol, K"},
         "polynomial", {"c0": 0.1, "c1": 1e-4}, 1e-3, 1.0, 0.0, None),
        ("liquid_molar_volume", {"form": "dippr105", "A": 1.0, "B": 0.27, "C": 560.0, "D": 0.28, "units": "mol/L, degC"},
         "dippr105", {"A": 1.0, "B": 0.27, "C": 560.0, "D": 0.28}, 1000.0, 1.0, -273.15, None),
    ],
)
def test_correlation_forms(prop, table, form, coefficients, factor, slope, intercept, log_base):
    correlation = getattr(parse_case(_with_solvent_property(prop, table)).component_data["solventx"], prop)
    assert correlation.form == form
    assert dict(correlation.coefficients) == pytest.approx(coefficients)
    assert correlation.value_factor == pytest.approx(factor, rel=1e-12)
    assert (correlation.temperature_slope, correlation.temperature_intercept) == pytest.approx((slope, intercept))
    assert correlation.log_base == (pytest.approx(log_base) if log_base else None)
    assert isinstance(correlation.coefficients, MappingProxyType)


@pytest.mark.parametrize(
    ("prop", "table", "key", "text"),
    [
        ("heat_of_vaporization", {"form": "dippr106", "A": 5e4, "B": 0.38, "units": "J/kmol, K"}, "units", "reduced temperature"),
        ("ideal_gas_cp", {"form": "polynomial", "coefficients": [1.0], "units": "J/mol/K,"}, "units", "split"),
        ("ideal_gas_cp", {"form": "dippr107", "A": 1.0, "B": 1.0, "C": 0.0}, "C", "must not be 0"),
        ("ideal_gas_cp", {"form": "dippr107", "A": 1.0, "B": 1.0, "C": 1.0, "D": 2.0}, "E", "nonzero when D"),
        ("liquid_molar_volume", {"form": "dippr105", "A": 1.0, "B": -0.27, "C": 560.0, "D": 0.28}, "B", "positive"),
        ("liquid_molar_volume", {"form": "dippr105", "A": 1.0, "B": 0.27, "C": 560.0, "D": 0.28, "units": "m**3/mol"},
         "units", "molar density"),
        ("ideal_gas_cp", {"form": "constant", "value": "-1 J/mol/K"}, "value", "range"),
        ("ideal_gas_cp", {"A": 1.0}, "form", "missing"),
        ("vapor_pressure", {"form": "antoine", "A": 1, "B": 1, "C": 1, "base": True}, "base", "base"),
        ("vapor_pressure", {"form": "antoine", "A": 1, "B": 1, "C": 1, "temperature_unit": 5}, "temperature_unit", "text"),
    ],
)
def test_correlation_errors(prop, table, key, text):
    error = case_error(_with_solvent_property(prop, table))
    assert error.key == f"components.data.solventX.{prop}.{key}"
    assert text in str(error)


@pytest.mark.parametrize(
    ("condenser", "reboiler", "fewest"), [("total", "partial", 3), ("partial", "none", 2), ("none", "none", 1)]
)
def test_fewest_stages_depends_on_condenser_and_reboiler(condenser, reboiler, fewest):
    data = mutated(format_data(), "column.condenser", condenser)
    data = mutated(data, "column.reboiler", reboiler)
    data = mutated(data, "column.stages", fewest)
    data = mutated(data, "feeds[0].stage", 1)
    data["specs"] = {}
    assert parse_case(data).column.stages == fewest
    error = case_error(mutated(data, "column.stages", fewest - 1))
    assert error.key == "column.stages" and f"from {fewest} to 2000" in error.expected


def test_single_pressure_value_means_no_drop():
    data = mutated(format_data(), "column.pressure", "2 bar")
    assert parse_case(data).column.pressures == (2e5,) * 20


# ------------------------------------------------------------------ [audit]


def test_audit_table_reads_targets_reflux_and_thresholds():
    data = mutated(format_data(), "audit", {
        "distillate": {"Methanol": 0.99}, "bottoms": {"water": "99.5 %"}, "reflux_factor": 1.3,
        "thresholds": {"cmo_deviation": 0.08, "stage_difference": 2},
    })
    case = parse_case(data)
    audit = case.audit
    assert [(s.product, s.component, s.value, s.key) for s in audit.products] == [
        ("distillate", "methanol", 0.99, "audit.distillate.Methanol"),
        ("bottoms", "water", pytest.approx(0.995), "audit.bottoms.water"),
    ]
    assert audit.reflux_factor == 1.3 and audit.reflux_ratio is None
    assert dict(audit.thresholds) == {"cmo_deviation": 0.08, "stage_difference": 2.0}
    assert parse_case(format_data()).audit is None


@pytest.mark.parametrize(
    "table, key, words",
    [
        ({"reflux_factor": 1.0}, "audit.reflux_factor", "expected a value > 1"),
        ({"reflux_ratio": 2.0, "reflux_factor": 1.2}, "audit.reflux_factor", "cannot be combined"),
        ({"reflux_ratio": -1.0}, "audit.reflux_ratio", "expected a value > 0"),
        ({"distillate": {"methanol": 0.9, "water": 0.1}}, "audit.distillate", "one composition"),
        ({"distillate": {"ethanol": 0.9}}, "audit.distillate.ethanol", "not a component"),
        ({"bottoms": {"water": 1.0}}, "audit.bottoms.water", "< 1"),
        ({"thresholds": {"cmo_deviaton": 0.1}}, "audit.thresholds.cmo_deviaton", "did you mean 'cmo_deviation'"),
        ({"thresholds": {"duty_difference": 0}}, "audit.thresholds.duty_difference", "expected a value > 0"),
        ({"thresholds": {"serious_factor": 0.5}}, "audit.thresholds.serious_factor", "expected a value > 1"),
        ({"reflux_facter": 1.3}, "audit.reflux_facter", "did you mean 'reflux_factor'"),
    ],
)
def test_audit_table_errors_name_the_key(table, key, words):
    error = case_error(mutated(format_data(), "audit", table))
    assert error.key == key and error.file == "case.toml"
    assert words in str(error)


def test_a_free_feed_rate_in_one_column_says_it_needs_a_network():
    text = re.sub(r'(?m)^flow = .*$', 'flow = "free"', FORMAT_CASE, count=1)
    assert 'flow = "free"' in text
    with pytest.raises(CaseError) as error:
        loads_case(text, source_file="one_column.toml")
    message = str(error.value)
    assert "one_column.toml" in message and "feeds[0].flow" in message and "column network" in message
