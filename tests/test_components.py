"""Tests of solver.components: name and alias resolution, constants, user components, the
list of usable CoolProp fluids and the "did you mean" errors."""

from __future__ import annotations

import CoolProp
import CoolProp.CoolProp as CP
import pytest

from solver.thermo.data import ComponentData, Correlation
from solver.components import ComponentInfo, component_info, coolprop_name, coolprop_source, list_components
from solver.errors import CaseError

SOLVENT_X = ComponentData(  # an invented component
    name="solventX",
    molar_mass=0.1,
    critical_temperature=560.0,
    critical_pressure=3.5e6,
    vapor_pressure=Correlation("antoine", {"A": 7.1, "B": 1500.0, "C": 220.0}, 1.0, -273.15, 133.322387415, 10.0, 293.15, 423.15),
    source="invented for the tests",
)


@pytest.mark.parametrize(
    "written, fluid",
    [
        ("n-heptane", "n-Heptane"),
        ("N-HEPTANE", "n-Heptane"),
        ("heptane", "n-Heptane"),
        ("nHeptane", "n-Heptane"),
        ("  n-Heptane ", "n-Heptane"),
        ("n heptane", "n-Heptane"),
        ("water", "Water"),
        ("H2O", "Water"),
        ("METHANOL", "Methanol"),
        ("ethanol", "Ethanol"),
        ("n-butane", "n-Butane"),
        ("butane", "n-Butane"),
        ("acetone", "Acetone"),
        ("benzene", "Benzene"),
        ("toluene", "Toluene"),
    ],
)
def test_coolprop_name_resolves_names_and_aliases_ignoring_case(written, fluid):
    assert coolprop_name(written) == fluid


def test_coolprop_name_of_unknown_is_none():
    assert coolprop_name("unobtainium") is None
    assert coolprop_name("") is None


def test_component_info_of_water_has_the_reference_constants():
    info = component_info("Water")
    assert isinstance(info, ComponentInfo)
    assert info.name == "water"
    assert info.backend == "coolprop" and info.coolprop_name == "Water"
    # IAPWS-95 critical point and molar mass (Wagner and Pruss 2002, J. Phys. Chem. Ref. Data 31, 387; from memory)
    assert info.critical_temperature == pytest.approx(647.096, abs=1e-3)
    assert info.critical_pressure == pytest.approx(22.064e6, rel=1e-5)
    assert info.molar_mass == pytest.approx(0.018015268, rel=1e-9)
    assert info.triple_temperature == pytest.approx(273.16, abs=1e-6)
    assert info.normal_boiling_point == pytest.approx(373.124, abs=2e-3)


def test_component_info_keeps_the_users_spelling_in_lower_case():
    assert component_info("N-HEPTANE").name == "n-heptane"
    assert component_info("heptane").name == "heptane"
    assert component_info("heptane").coolprop_name == "n-Heptane"


def test_source_names_coolprop_version_and_equation_of_state():
    info = component_info("methanol")
    assert info.source.startswith(f"CoolProp {CoolProp.__version__}")
    assert CP.get_fluid_param_string("Methanol", "BibTeX-EOS") in info.source
    assert "Methanol" in coolprop_source("Methanol")


def test_constants_agree_with_coolprop():
    state = CP.AbstractState("HEOS", "Toluene")
    info = component_info("toluene")
    assert info.critical_temperature == state.T_critical()
    assert info.critical_pressure == state.p_critical()
    assert info.molar_mass == state.molar_mass()
    state.update(CP.PQ_INPUTS, 101325.0, 0.0)
    assert info.normal_boiling_point == pytest.approx(state.T(), abs=1e-9)


def test_unknown_name_is_a_case_error_with_a_suggestion():
    with pytest.raises(CaseError) as error:
        component_info("methanoll")
    assert "unknown component 'methanoll'" in str(error.value)
    assert "did you mean 'methanol'" in str(error.value)
    assert error.value.key == "components.names"


def test_misspelt_heptane_suggests_n_heptane():
    with pytest.raises(CaseError, match="n-heptane"):
        component_info("heptan")


def test_suggestion_includes_user_defined_names():
    with pytest.raises(CaseError, match="solventx"):
        component_info("solventy", {"solventX": SOLVENT_X})


def test_no_suggestion_for_nonsense():
    with pytest.raises(CaseError) as error:
        component_info("qqqqqqqq")
    assert "did you mean" not in str(error.value)


@pytest.mark.parametrize("name", ["air", "R404A", "R410A"])
def test_pseudo_pure_fluids_are_refused(name):
    with pytest.raises(CaseError, match="pseudo-pure"):
        component_info(name)


def test_empty_name_is_a_case_error():
    with pytest.raises(CaseError):
        component_info("  ")


def test_user_component_takes_precedence_and_matches_ignoring_case():
    info = component_info("SOLVENTX", {"solventX": SOLVENT_X})
    assert info.backend == "user"
    assert info.name == "solventx"
    assert info.coolprop_name is None
    assert info.critical_temperature == 560.0 and info.critical_pressure == 3.5e6 and info.molar_mass == 0.1
    assert info.source == "invented for the tests"
    assert info.normal_boiling_point is None and info.triple_temperature is None
    water_override = ComponentData("water", 0.018, 647.0, 22e6, SOLVENT_X.vapor_pressure)
    assert component_info("Water", {"water": water_override}).backend == "user"


def test_user_component_without_source_says_so():
    data = ComponentData("y", 0.1, 500.0, 3e6, SOLVENT_X.vapor_pressure)
    assert "no source" in component_info("y", {"y": data}).source


def test_list_components_holds_only_usable_pure_fluids():
    infos = list_components()
    names = [i.name for i in infos]
    assert names == sorted(names)
    assert len(infos) > 100
    for expected in ("water", "methanol", "ethanol", "benzene", "toluene", "n-heptane", "n-butane", "acetone"):
        assert expected in names
    for excluded in ("air", "r404a", "r407c", "r410a", "r507a", "ses36"):
        assert excluded not in names
    assert all(i.backend == "coolprop" and i.critical_temperature > 0 and i.molar_mass > 0 for i in infos)


def test_list_components_substring_and_glob():
    xylenes = [i.name for i in list_components("XYL")]
    assert xylenes == ["m-xylene", "o-xylene", "p-xylene"]
    glob = [i.name for i in list_components("n-*ane")]
    assert "n-heptane" in glob and "n-butane" in glob and "methanol" not in glob
    assert "n-heptane" in [i.name for i in list_components("nC7")]  # an alias matches
    assert list_components("no-such-fluid") == []
