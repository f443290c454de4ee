"""The handbook library wired into traystack: the case reader takes names from CoolProp or the
handbook (``from_handbook`` chooses), every error names the file, key and value, did-you-mean
over CoolProp and the library together, the thermo package evaluates handbook components with
the documented extrapolation, result.json records each property's source, and
``traystack components`` searches both catalogs without importing CoolProp or chemicals."""

from __future__ import annotations

import math
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest
from chemicals.vapor_pressure import Wagner

from solver.case import load_case
from solver.case.components_table import read_components_table
from solver.case.fields import At
from solver.catalog import close_names, coolprop_fluid, matches
from solver.cli import main
from solver.components import component_info
from solver.errors import CaseError
from solver.thermo import extrapolation
from solver.thermo.pure import PureComponents

ROOT = Path(__file__).resolve().parents[1]
CASES = ROOT / "cases"


def components(table: dict, file: str = "plant.toml"):
    return read_components_table(table, At(file).child("components"))


def pure(names, data) -> PureComponents:
    return PureComponents([component_info(n, data) for n in names], data)


# --- case reader ------------------------------------------------------------------------------


def test_names_come_from_coolprop_first_and_the_handbook_otherwise():
    names, data, _ = components({"names": ["ethanol", "ethyl acetate", "IPA"]})
    assert names == ("ethanol", "ethyl acetate", "ipa")
    assert "ethanol" not in data  # CoolProp's reference equation of state
    assert data["ethyl acetate"].origin == "handbook" and data["ipa"].origin == "handbook"
    assert data["ipa"].name == "isopropanol"
    # the handbook's 2-propanol: CRC normal boiling point 355.36 K (82.2 degC, CRC Handbook)
    assert data["ipa"].normal_boiling_point == pytest.approx(355.36, abs=0.01)
    infos = [component_info(n, data) for n in names]
    assert [i.backend for i in infos] == ["coolprop", "handbook", "handbook"]


def test_isopropanol_by_any_of_its_names():
    for written in ("isopropanol", "IPA", "2-propanol", "isopropyl alcohol", "67-63-0"):
        _, data, _ = components({"names": [written]})
        assert data[written.lower()].name == "isopropanol"


def test_from_handbook_chooses_the_library_for_a_coolprop_fluid():
    _, data, _ = components({"names": ["ethanol", "water"], "from_handbook": ["Ethanol"]})
    assert data["ethanol"].origin == "handbook" and "water" not in data
    provenance = data["ethanol"].provenance
    tables = {p["property"]: p["table"] for p in provenance["properties"]}
    assert tables["vapor pressure"] == "wagner-poling" and tables["critical temperature"] == "iupac"


def test_from_handbook_must_name_a_listed_component_with_no_other_source():
    with pytest.raises(CaseError) as info:
        components({"names": ["ethanol"], "from_handbook": ["methanol"]})
    assert (info.value.file, info.value.key, info.value.value) == ("plant.toml", "components.from_handbook[0]", "methanol")
    data = {"molar_mass": 0.1, "critical_temperature": 500.0, "critical_pressure": 3e6, "source": "invented",
            "vapor_pressure": {"form": "antoine", "A": 9.0, "B": 1500.0, "C": -50.0}}
    with pytest.raises(CaseError, match="one source") as info:
        components({"names": ["x"], "data": {"x": data}, "from_handbook": ["x"]})
    assert info.value.key == "components.from_handbook[0]"


def test_an_unknown_name_names_file_key_value_and_the_closest_names_of_both_catalogs():
    with pytest.raises(CaseError) as info:
        components({"names": ["water", "isopropanl"]})
    error = info.value
    assert (error.file, error.key, error.value) == ("plant.toml", "components.names[1]", "isopropanl")
    assert "isopropanol" in str(error) and "plant.toml" in str(error)
    with pytest.raises(CaseError, match="in the handbook library") as info:
        components({"names": ["water", "unobtainium"], "from_handbook": ["unobtainium"]})
    assert info.value.key == "components.names[1]"


def test_a_coolprop_fluid_a_column_cannot_use_is_refused_with_the_reason_and_the_file():
    with pytest.raises(CaseError, match="pseudo-pure mixture") as info:
        components({"names": ["R404A", "water"]})
    assert (info.value.file, info.value.key, info.value.value) == ("plant.toml", "components.names[0]", "R404A")


def test_a_compound_the_boiling_point_check_refuses_is_refused_with_the_numbers_and_the_file():
    """3-heptanone is in the index as refused: no vapor-pressure table reproduces its CRC normal
    boiling point within 0.5 K; the case reader re-raises the library's numbers with the file."""
    with pytest.raises(CaseError) as info:
        components({"names": ["3-heptanone"]})
    error = info.value
    assert error.file == "plant.toml" and error.key == "components.names[0]" and error.value == "3-heptanone"
    assert "refused" in error.problem and " K" in error.problem


def test_did_you_mean_covers_coolprop_and_the_library():
    assert close_names("isopropanl")[0] == "isopropanol"
    assert "ethyl acetate" in close_names("ethylacetat")
    assert close_names("watr")[0] == "water"
    with pytest.raises(CaseError, match="isopropanol"):
        component_info("isopropanl")


def test_a_wagner_and_trc_correlation_can_be_written_under_components_data():
    """Poling et al. (2001) Appendix A Wagner constants of 2-propanol, as in test_handbook_forms;
    the value checked against chemicals' independent Wagner_original."""
    table = {"molar_mass": "60.096 g/mol", "critical_temperature": "508.3 K", "critical_pressure": "47.63 bar",
             "source": "Poling et al. (2001) Appendix A",
             "vapor_pressure": {"form": "wagner", "A": -8.73656, "B": 2.1624, "C": -8.70785, "D": 4.77927,
                                "Tc": "508.3 K", "Pc": "47.63 bar", "T_min": 250.0, "T_max": 508.3},
             "ideal_gas_cp": {"form": "trc_gas", "a0": 4.0, "a1": 1.45e6, "a2": 455.0, "a3": 36.0, "a4": -8.1,
                              "a5": 3.46e6, "a6": 143.0, "a7": 166.0}}
    _, data, _ = components({"names": ["solvent"], "data": {"solvent": table}})
    props = pure(["solvent"], data)
    ln_p, _ = props.ln_vapor_pressure(np.array([350.0]))
    expected = Wagner(350.0, 508.3, 4.763e6, -8.73656, 2.1624, -8.70785, 4.77927)
    assert math.exp(ln_p[0, 0]) == pytest.approx(expected, rel=1e-12)
    _, cp = props.ideal_gas_enthalpy(np.array([400.0]))
    assert cp[0, 0] > 8.314 * 4.0


# --- thermo -----------------------------------------------------------------------------------


def test_handbook_components_use_the_documented_extrapolation_and_say_so():
    _, data, _ = components({"names": ["ethyl acetate"]})
    props = pure(["ethyl acetate"], data)
    corr = data["ethyl acetate"].vapor_pressure  # McGarry's Wagner, valid from 289 K
    T = np.array([250.0, 300.0, 400.0])
    ln_p, slope = props.ln_vapor_pressure(T)
    expected, expected_slope = extrapolation.ln_vapor_pressure(corr, T, Tc=data["ethyl acetate"].critical_temperature,
                                                               Pc=data["ethyl acetate"].critical_pressure, warn=False)
    assert ln_p[:, 0] == pytest.approx(expected, rel=1e-12) and slope[:, 0] == pytest.approx(expected_slope, rel=1e-12)
    props.check_temperature(T)  # outside a range is not an error for a handbook component
    notes = props.range_notes(T)["ethyl acetate"]
    assert any("vapor pressure" in n and "289.00 K" in n and "250.00 K" in n for n in notes)
    assert props.range_notes(np.array([300.0, 350.0])) == {}


@pytest.mark.parametrize("method", ["ln_vapor_pressure", "heat_of_vaporization", "ideal_gas_enthalpy"])
def test_handbook_component_derivatives_match_finite_differences(method):
    _, data, _ = components({"names": ["ethyl acetate", "IPA"]})
    props = pure(["ethyl acetate", "ipa"], data)
    T = np.array([230.0, 300.0, 360.0, 480.0])  # below, inside, and near the top of the ranges
    value, slope = getattr(props, method)(T)
    plus, _ = getattr(props, method)(T + 1e-4)
    minus, _ = getattr(props, method)(T - 1e-4)
    assert slope == pytest.approx((plus - minus) / 2e-4, rel=1e-5, abs=1e-9)


def test_result_records_each_property_source_of_a_handbook_component():
    from solver.engine import simulate

    result = simulate(load_case(CASES / "ethyl_acetate_ethanol.toml"))
    assert result.converged
    entry = result.thermo["components"][0]
    assert entry["backend"] == "handbook" and entry["handbook"]["cas"] == "141-78-6"
    by_property = {p["property"]: p for p in entry["handbook"]["properties"]}
    assert by_property["vapor pressure"]["table"] == "wagner-mcgarry"
    assert by_property["vapor pressure"]["form"] == "wagner" and by_property["vapor pressure"]["T_min"] == 289.0
    assert "McGarry" in by_property["vapor pressure"]["citation"]
    assert result.thermo["components"][1]["backend"] == "handbook"  # from_handbook = ["ethanol"]
    assert "range_notes" not in result.thermo  # 345-355 K lies inside every range


def test_range_notes_reach_the_result_and_the_cautions():
    from solver.engine import _with_range_notes

    _, data, _ = components({"names": ["ethyl acetate"]})
    props = pure(["ethyl acetate"], data)
    record = _with_range_notes({"components": props.describe()}, props, np.array([270.0, 300.0]))
    assert record["components"][0]["range_notes"] == record["range_notes"]
    vapor_pressure, cp = record["range_notes"]  # Wagner from 289 K, Poling's cp polynomial from 298 K
    assert vapor_pressure.startswith("ethyl acetate: vapor pressure") and "below 289.00 K" in vapor_pressure
    assert cp.startswith("ethyl acetate: ideal-gas heat capacity") and "below 298.00 K" in cp


# --- the components command -------------------------------------------------------------------


def run(capsys, *args):
    code = main(list(args))
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def test_components_searches_both_catalogs(capsys):
    code, out, _ = run(capsys, "components", "isoprop")
    assert code == 0 and "isopropanol" in out and "cumene" in out  # cumene is isopropylbenzene
    code, out, _ = run(capsys, "components", "C4H8O2")
    assert code == 0 and "ethyl acetate" in out
    code, out, _ = run(capsys, "components", "meth*")
    assert code == 0 and "methanol" in out and "methane" in out


def test_components_name_shows_each_property_with_source_and_range(capsys):
    code, out, _ = run(capsys, "components", "IPA")
    assert code == 0 and "isopropanol" in out and "67-63-0" in out
    assert "Wagner constants, Poling" in out and "185.26-508.30 K" in out and "IUPAC critical-data" in out
    code, out, _ = run(capsys, "components", "ethanol")
    assert code == 0 and "Schroeder" in out and "used when from_handbook lists it" in out


def test_components_without_a_match_exits_2_with_the_closest_names(capsys):
    code, out, err = run(capsys, "components", "isopropanl")
    assert code == 2 and "isopropanol" in err and "Traceback" not in err
    code, out, err = run(capsys, "components", "[bold]zzzq")
    assert code == 2 and "[bold]zzzq" in err


def test_components_search_imports_neither_coolprop_nor_chemicals():
    code = ("import sys; from solver.cli import main; main(['components', 'isoprop']); "
            "assert 'CoolProp' not in sys.modules and 'chemicals' not in sys.modules, 'heavy import'")
    done = subprocess.run([sys.executable, "-c", code], cwd=ROOT, capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr


def test_the_catalog_lists_coolprop_fluids_from_the_shipped_index():
    assert coolprop_fluid("n-heptane").coolprop_name == "n-Heptane"
    assert matches("heptane").handbook and matches("heptane").coolprop
