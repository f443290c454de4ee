"""UNIFAC wired into cases: the [thermo] keys, predicted binary pairs, and the two-liquid check
of every solution (TWO_LIQUIDS) and of the shortcut's equilibrium curve."""

from __future__ import annotations

import json

import numpy as np
import pytest
from scipy.constants import R, calorie

from conftest import case_from_text
from solver.audit import audit_solution
from solver.audit.flags import two_liquids
from solver.audit.solution import run_flags
from solver.cli import main
from solver.engine import simulate
from solver.errors import CaseError
from solver.thermo.activity import NRTL, Wilson
from solver.thermo.liquid_split import check_liquids
from solver.thermo.package import ThermoPackage
from solver.thermo.predicted_pairs import predict_pair
from solver.thermo.unifac import DortmundUNIFAC, UNIFAC

COLUMN = """
[column]
stages = {stages}
condenser = "total"
reboiler = "partial"
pressure.top = "101.325 kPa"
[[feeds]]
stage = {feed}
flow = "100 kmol/h"
composition = {composition}
vapor_fraction = 0.0
[specs]
reflux_ratio = {reflux}
bottoms = {{ water = {purity} }}
"""

# n-butanol is not a CoolProp fluid: correlations of our own choosing, values from memory of
# the handbooks named (Antoine constants as listed in the NIST Chemistry WebBook for 1-butanol,
# after Kemme & Kreps, J. Chem. Eng. Data 14 (1969) 98; Tc, Pc, heat of vaporization at the
# normal boiling point as in Poling, Prausnitz & O'Connell, The Properties of Gases and
# Liquids, 5th ed. (2001), Appendix A; ideal-gas heat capacity a straight line through
# about 108 J/mol/K at 298 K) -- all from memory, adequate for a test of the split.
BUTANOL = """
title = "n-butanol stripper (test)"
[components]
names = ["n-butanol", "water"]
[components.data.n-butanol]
molar_mass = "74.12 g/mol"
critical_temperature = "563.1 K"
critical_pressure = "4.414 MPa"
vapor_pressure = { form = "antoine", A = 4.54607, B = 1351.555, C = -93.34, base = 10, pressure_unit = "bar", temperature_unit = "K", T_min = "296 K", T_max = "391 K" }
ideal_gas_cp = { form = "polynomial", coefficients = [48.5, 0.2], units = "J/mol/K, K" }
heat_of_vaporization = { form = "watson", value = "43.3 kJ/mol", at = "390.9 K" }
source = "from memory: NIST Chemistry WebBook (Antoine), Poling et al. 5th ed. Appendix A (Tc, Pc, dHvap)"
[thermo]
liquid = "unifac"
"""


def _case(head: str, *, stages=8, feed=3, composition, reflux=1.0, purity=0.999):
    return case_from_text(head + COLUMN.format(stages=stages, feed=feed, composition=composition, reflux=reflux,
                                               purity=purity))


def _thermo(liquid: str, extra: str = "", names='["acetone", "methanol", "water"]') -> str:
    return f'[components]\nnames = {names}\n[thermo]\nliquid = "{liquid}"\n{extra}\n'


# ------------------------------------------------------------------ the [thermo] keys


@pytest.mark.parametrize("liquid, model", [("unifac", UNIFAC), ("unifac-dortmund", DortmundUNIFAC)])
def test_unifac_liquid_builds_the_model_with_built_in_groups(liquid, model):
    case = _case(_thermo(liquid), composition="{ acetone = 0.2, methanol = 0.3, water = 0.5 }")
    package = ThermoPackage.from_case(case)
    assert type(package.activity) is model
    described = package.describe()["activity_parameters"]
    # methanol and water are groups of their own in both published tables
    assert described["groups"][1] == {"CH3OH": 1}
    assert described["groups"][2] == {"H2O": 1}
    assert described["source"] and described["interactions"]


def test_groups_written_in_the_case_replace_the_built_in_ones():
    text = _thermo("unifac", '[thermo.groups.methanol]\nCH3 = 1\nOH = 1\n')
    package = ThermoPackage.from_case(_case(text, composition="{ acetone = 0.2, methanol = 0.3, water = 0.5 }"))
    assert package.describe()["activity_parameters"]["groups"][1] == {"CH3": 1, "OH": 1}


def test_unknown_subgroup_names_file_key_and_nearest_names():
    text = _thermo("unifac", '[thermo.groups.methanol]\nCH3 = 1\nOHH = 1\n')
    with pytest.raises(CaseError) as caught:
        _case(text, composition="{ acetone = 0.2, methanol = 0.3, water = 0.5 }")
    message = str(caught.value)
    assert "<test case>" in message and "thermo.groups.methanol.OHH" in message
    assert "nearest published names" in message and "OH" in message


def test_a_component_without_groups_is_an_error_naming_it():
    text = BUTANOL.replace('names = ["n-butanol", "water"]', 'names = ["solventx", "water"]').replace(
        "components.data.n-butanol", "components.data.solventx")
    with pytest.raises(CaseError, match=r"thermo\.groups\.solventx.*give its subgroups"):
        _case(text, composition="{ solventx = 0.05, water = 0.95 }")


def test_a_missing_pair_is_an_error_saying_how_to_give_or_predict_it():
    text = _thermo("nrtl", '[thermo.nrtl.methanol.water]\nterm_over_temperature = ["-128 K", "425 K"]\nalpha = 0.3\n')
    with pytest.raises(CaseError) as caught:
        _case(text, composition="{ acetone = 0.2, methanol = 0.3, water = 0.5 }")
    message = str(caught.value)
    assert "acetone.methanol" in message and "acetone.water" in message and "methanol.water" not in message
    assert "missing_pairs" in message and "unifac" in message


def test_groups_without_a_unifac_model_are_refused():
    text = _thermo("ideal", '[thermo.groups.methanol]\nCH3 = 1\nOH = 1\n')
    with pytest.raises(CaseError, match="thermo.groups"):
        _case(text, composition="{ acetone = 0.2, methanol = 0.3, water = 0.5 }")


# ------------------------------------------------------------------ predicted pairs


def test_predicted_acetone_water_nrtl_is_close_to_the_published_pair():
    """NRTL fitted to modified UNIFAC against the published acetone(1)-water(2) NRTL of Smith,
    Van Ness & Abbott, 7th ed. (2005), Table 12.5: b12 = 631.05, b21 = 1197.41 cal/mol,
    alpha = 0.5343 (the pair of cases/acetone_subcooled_reflux.toml)."""
    predicted = predict_pair("nrtl", ("acetone", "water"), "unifac-dortmund", (329.2, 376.2))
    p = predicted.parameters
    assert predicted.rms_ln_gamma < 0.05 and p.alpha == 0.3
    fitted = NRTL(np.array([[0, p.constant_term[0]], [p.constant_term[1], 0]]),
                  np.array([[0, p.term_over_temperature[0]], [p.term_over_temperature[1], 0]]),
                  alpha=np.array([[0, 0.3], [0.3, 0]]))
    published = NRTL(np.zeros((2, 2)), np.array([[0, 631.05 * calorie / R], [1197.41 * calorie / R, 0]]),
                     alpha=np.array([[0, 0.5343], [0.5343, 0]]))
    T = np.array([330.0, 350.0, 370.0])
    for x, tolerance in (([1e-6, 1 - 1e-6], 0.3), ([1 - 1e-6, 1e-6], 0.3), ([0.5, 0.5], 0.07)):
        X = np.tile(x, (3, 1))
        np.testing.assert_allclose(fitted.evaluate(T, X, False).ln_gamma, published.evaluate(T, X, False).ln_gamma,
                                   atol=tolerance)


def test_predicted_wilson_pair_reproduces_unifac_at_infinite_dilution():
    """Wilson fitted to original UNIFAC (the infinite-dilution conditions of Schreiber &
    Eckert 1971 are the ends of the grid) reproduces UNIFAC's ln gamma-infinity."""
    predicted = predict_pair("wilson", ("acetone", "methanol"), "unifac", (329.0, 338.0))
    p = predicted.parameters
    wilson = Wilson(np.array([[0, p.constant_term[0]], [p.constant_term[1], 0]]),
                    np.array([[0, p.term_over_temperature[0]], [p.term_over_temperature[1], 0]]))
    unifac = UNIFAC.from_components(["acetone", "methanol"])
    T = np.array([330.0, 337.0])
    for x in ([1e-5, 1 - 1e-5], [1 - 1e-5, 1e-5]):
        X = np.tile(x, (2, 1))
        np.testing.assert_allclose(wilson.evaluate(T, X, False).ln_gamma, unifac.ln_gamma(T, X), atol=0.01)


def test_predicted_pair_enters_the_model_the_record_and_a_flag():
    text = _thermo("nrtl", 'missing_pairs = "unifac-dortmund"\n[thermo.nrtl.methanol.water]\n'
                   'dg = ["-253.88 cal/mol", "845.21 cal/mol"]\nalpha = 0.2994\nsource = "SVNA 7th ed. Table 12.5"\n')
    case = _case(text, stages=12, feed=6, composition="{ acetone = 0.15, methanol = 0.25, water = 0.60 }",
                 reflux=1.5, purity=0.995)
    result = simulate(case)
    assert result.converged
    origins = {tuple(o["pair"]): o for o in result.thermo["pair_origins"]}
    assert origins[("methanol", "water")]["origin"] == "case file"
    assert origins[("methanol", "water")]["source"] == "SVNA 7th ed. Table 12.5"
    assert {("acetone", "methanol"), ("acetone", "water")} <= {k for k, o in origins.items() if o["origin"] == "predicted"}
    # the activity model holds the predicted tau: acetone-water non-ideal, not zero
    gamma = result.thermo["activity_parameters"]
    assert gamma["model"] == "nrtl"
    codes = {flag.code: flag for flag in run_flags(result)}
    assert codes["PREDICTED_PAIRS"].severity == "info"
    assert "acetone-water" in codes["PREDICTED_PAIRS"].message


# ------------------------------------------------------------------ two liquid phases


def test_butanol_water_column_raises_two_liquids_in_run_and_check():
    """n-butanol and water are partly miscible (from memory: about 2 mol% butanol in the
    water-rich liquid and about 50 mol% water in the butanol-rich one near 90 degC): liquids of
    5-30 mol% butanol split under UNIFAC, nearly pure water does not."""
    case = _case(BUTANOL, composition='{ n-butanol = 0.05, water = 0.95 }')
    result = simulate(case)
    assert result.converged
    flag = two_liquids(result.liquid_split)
    assert flag is not None and flag.severity == "serious"
    stages = flag.numbers["stages"]
    assert 1 in stages and 8 not in stages  # the top splits, the nearly pure water at the bottom does not
    first, second = np.array(flag.numbers["liquids"]), np.array(flag.numbers["second_liquids"])
    # the incipient second liquid lies across the gap: water-rich (a few mol% butanol) for the
    # butanol-rich top liquids, butanol-rich (about half) for the others
    assert np.all(np.abs(second[:, 0] - first[:, 0]) > 0.15)
    assert np.all((second[:, 0] < 0.05) | (second[:, 0] > 0.4))
    audited = audit_solution(case, result)
    assert "TWO_LIQUIDS" in {f.code for f in audited.extra["audit"].flags}


@pytest.mark.parametrize("alcohol", ["methanol", "ethanol"])
@pytest.mark.parametrize("liquid", ["unifac", "unifac-dortmund"])
def test_alcohol_water_columns_do_not_split(alcohol, liquid):
    case = _case(_thermo(liquid, names=f'["{alcohol}", "water"]'), stages=10, feed=5,
                 composition=f"{{ {alcohol} = 0.2, water = 0.8 }}", reflux=2.0, purity=0.995)
    result = simulate(case)
    assert result.converged and result.liquid_split.tested
    assert result.liquid_split.split == () and two_liquids(result.liquid_split) is None
    assert np.all(result.liquid_split.minimum_tpd > -1e-7)


def test_wilson_and_ideal_are_not_tested():
    check = check_liquids(Wilson(np.zeros((2, 2)), np.zeros((2, 2))), np.array([350.0]), np.array([[0.5, 0.5]]),
                          [1], ("a", "b"))
    assert not check.tested and "cannot predict two liquid" in check.reason and check.split == ()


def test_shortcut_curve_guard_raises_the_same_flag():
    """Butanol-water's equilibrium curve liquids, tested as the shortcut tests them."""
    package = ThermoPackage.from_case(_case(BUTANOL, composition='{ n-butanol = 0.05, water = 0.95 }'))
    x = np.linspace(0.0, 1.0, 21)
    liquids = np.column_stack([x, 1.0 - x])
    T = np.full(x.size, 366.0)
    flag = two_liquids(check_liquids(package.activity, T, liquids, x.round(3).tolist(), package.names),
                       "equilibrium-curve point")
    assert flag is not None and "equilibrium-curve point" in flag.message
    assert 0.0 not in flag.numbers["equilibrium-curve points"] and 0.2 in flag.numbers["equilibrium-curve points"]


def test_run_command_writes_the_flag_and_the_stability_record(tmp_path):
    path = tmp_path / "butanol.toml"
    path.write_text(BUTANOL + COLUMN.format(stages=8, feed=3, composition='{ n-butanol = 0.05, water = 0.95 }',
                                            reflux=1.0, purity=0.999))
    assert main(["run", str(path), "--out", str(tmp_path / "out"), "--quiet"]) == 0
    document = json.loads((tmp_path / "out" / "result.json").read_text())
    assert [f["code"] for f in document["flags"]] == ["TWO_LIQUIDS"]
    assert document["liquid_stability"]["tested"] and 1 in document["liquid_stability"]["split"]
    assert "TWO_LIQUIDS" in (tmp_path / "out" / "summary.md").read_text()


def test_dortmund_heat_of_mixing_of_methanol_water():
    """Modified UNIFAC's h^E of an equimolar methanol-water liquid at 25 degC against the
    calorimetric value, about -0.8 kJ/mol (e.g. the heats of mixing collected by Christensen,
    Hanks & Izatt, Handbook of Heats of Mixing, Wiley 1982; from memory)."""
    model = DortmundUNIFAC.from_components(["methanol", "water"])
    h_excess = model.evaluate(np.array([298.15]), np.array([[0.5, 0.5]])).excess_enthalpy[0]
    assert -1000.0 < h_excess < -600.0
