"""Tests of solver.handbook: lookups by name, synonym, CAS number and formula; "did you mean"
for unknown names; the boiling-point consistency check and its refusal with the numbers; the
record of sources; the search; and that the package imports ``chemicals`` only on a lookup."""

from __future__ import annotations

import dataclasses
import json
import math
import subprocess
import sys
import warnings

import numpy as np
import pytest

from solver.errors import CaseError
from solver.handbook import find, lookup, property_rows, search, suggest, describe
from solver.handbook.component import BOILING_POINT_TOLERANCE, boiling_point_of, check_normal_boiling_point
from solver.handbook.names import entries
from solver.handbook.sources import EXCLUDED, PREFERENCE, TABLES
from solver.thermo import extrapolation


@pytest.mark.parametrize("name", ["IPA", "isopropanol", "2-propanol", "isopropyl alcohol", "67-63-0",
                                  "Isopropyl Alcohol", "isopropyl-alcohol", "propan-2-ol"])
def test_isopropanol_by_every_name(name):
    component = lookup(name)
    assert component.cas == "67-63-0"
    assert component.formula == "C3H8O"


def test_isopropanol_data_in_si():
    data = lookup("IPA").data
    assert data.molar_mass == pytest.approx(0.060096, rel=1e-5)  # C3H8O, IUPAC atomic weights
    assert data.critical_temperature == pytest.approx(508.3)  # IUPAC series part 4 (Gude and Teja 1995)
    assert data.critical_pressure == pytest.approx(4.764e6)
    assert data.normal_boiling_point == pytest.approx(355.36)  # CRC, physical constants of organic compounds
    for corr in (data.vapor_pressure, data.heat_of_vaporization, data.ideal_gas_cp, data.liquid_molar_volume):
        assert corr is not None and corr.T_max is not None


@pytest.mark.parametrize("name, cas", [("MEK", "78-93-3"), ("methyl ethyl ketone", "78-93-3"),
                                       ("ethyl acetate", "141-78-6"), ("1-propanol", "71-23-8"),
                                       ("n-butanol", "71-36-3"), ("acetic acid", "64-19-7"), ("CH2Cl2", "75-09-2")])
def test_names_coolprop_lacks(name, cas):
    assert lookup(name).cas == cas


def test_unique_formula_finds_the_compound():
    formulas = {}
    for entry in entries():
        formulas.setdefault(entry.formula, []).append(entry)
    unique = [f for f, found in formulas.items() if len(found) == 1 and not found[0].refused]
    assert len(unique) > 50
    for formula in unique[:20]:
        assert find(formula).formula == formula
        assert lookup(formula.lower()).formula == formula


def test_shared_formula_is_refused_with_the_candidates():
    with pytest.raises(CaseError) as error:
        lookup("C3H8O", key="components.names[0]")
    text = str(error.value)
    assert "components.names[0]" in text
    assert "isopropanol (67-63-0)" in text and "1-propanol (71-23-8)" in text


def test_unknown_name_suggests_close_library_names():
    with pytest.raises(CaseError) as error:
        lookup("isopropanl", key="components.names[1]")
    assert "did you mean 'isopropanol'" in str(error.value)
    assert "components.names[1]" in str(error.value)
    assert suggest("etyl acetate")[0] == "ethyl acetate"
    with pytest.raises(CaseError) as error:
        lookup("qqqqzzzz")
    assert "did you mean" not in str(error.value)


def test_search():
    names = [entry.name for entry in search("isoprop")]
    assert "isopropanol" in names and "diisopropyl ether" in names
    globbed = {e.name for e in search("*anol")}  # name or a synonym ends in "anol"
    assert {"isopropanol", "1-butanol", "methanol"} <= globbed and "benzene" not in globbed
    assert [e.cas for e in search("67-63-0")] == ["67-63-0"]
    everything = search()
    assert len(everything) > 250
    assert not any(e.refused for e in everything)
    assert [e.name for e in everything] == sorted((e.name for e in everything), key=str.lower)


def test_boiling_point_check_passes_for_isopropanol():
    data = lookup("IPA").data
    computed = check_normal_boiling_point("isopropanol", data.vapor_pressure, "Wagner", 355.36, "CRC",
                                          data.critical_temperature)
    assert abs(computed - 355.36) <= BOILING_POINT_TOLERANCE
    assert computed == pytest.approx(boiling_point_of(data.vapor_pressure, data.critical_temperature))


def test_boiling_point_check_refuses_with_the_numbers():
    data = lookup("IPA").data
    with pytest.raises(CaseError) as error:
        check_normal_boiling_point("isopropanol", data.vapor_pressure, "Wagner constants", 357.0, "a handbook",
                                   data.critical_temperature)
    text = str(error.value)
    assert "refused" in text and "355.38 K" in text and "357.00 K" in text and "1.62 K" in text


def test_boiling_point_check_refuses_a_correlation_that_misses_one_atmosphere():
    narrow = dataclasses.replace(lookup("IPA").data.vapor_pressure, T_min=250.0, T_max=330.0)
    with pytest.raises(CaseError, match="does not reach 101325 Pa within its range 250.00 to 330.00 K"):
        check_normal_boiling_point("isopropanol", narrow, "Wagner constants", 355.36, "a handbook", 508.3)


def test_a_refused_library_compound_gives_the_numbers():
    refused = [e for e in entries() if e.refused]
    assert refused, "the index marks compounds whose vapor pressure misses Tb"
    with pytest.raises(CaseError) as error:
        lookup(refused[0].cas)
    assert "refused" in str(error.value) and " K" in str(error.value)


def test_critical_table_misprint_is_passed_over():
    """chemicals' copy of the IUPAC table files methylcyclopentane's row under cyclohexane's CAS
    number; the other sources (CRC, PSRK, McGarry's Wagner constants) agree on about 553.5 K
    (Poling et al. 2001, Appendix A: 553.50 K, from memory)."""
    component = lookup("cyclohexane")
    assert component.data.critical_temperature == pytest.approx(553.5, abs=0.5)
    assert any("passed over IUPAC" in note for note in component.notes)


def test_every_property_names_its_source():
    component = lookup("ethyl acetate")
    props = [s.prop for s in component.sources]
    assert props == ["molar mass", "critical temperature", "critical pressure", "normal boiling point",
                     "vapor pressure", "heat of vaporization", "ideal-gas heat capacity", "liquid molar volume"]
    for source in component.sources:
        assert source.table in TABLES and source.citation
    rows = property_rows(component)
    assert {"property", "value", "form", "range", "source", "citation"} <= set(rows[0])
    assert any(r["property"] == "vapor pressure" and r["form"] == "wagner" and " K" in r["range"] for r in rows)
    record = json.loads(json.dumps(describe(component)))
    assert record["cas"] == "141-78-6" and len(record["properties"]) == 8


def test_preference_lists_name_known_tables_and_exclusions_give_reasons():
    for keys in PREFERENCE.values():
        assert all(key in TABLES for key in keys)
    assert any("ChemSep" in what for what, _ in EXCLUDED)
    assert all(reason for _, reason in EXCLUDED)


def test_library_components_evaluate_over_a_column_range_with_derivatives():
    data = lookup("1-butanol").data
    T = np.linspace(300.0, 420.0, 5)
    Tc, Pc = data.critical_temperature, data.critical_pressure
    with warnings.catch_warnings():
        warnings.simplefilter("error", extrapolation.PropertyRangeWarning)
        ln_p, slope = extrapolation.ln_vapor_pressure(data.vapor_pressure, T, Tc=Tc, Pc=Pc, component="1-butanol")
        h_vap, _ = extrapolation.heat_of_vaporization(data.heat_of_vaporization, T, Tc=Tc)
        volume, _ = extrapolation.liquid_molar_volume(data.liquid_molar_volume, T, Tc=Tc, Pc=Pc)
        h_ig, cp = extrapolation.ideal_gas_enthalpy(data.ideal_gas_cp, T)
    assert np.all(np.diff(ln_p) > 0) and np.all(slope > 0)
    assert 40e3 < h_vap[0] < 55e3  # 1-butanol near 300 K (Majer and Svoboda 1985: 52 kJ/mol at 298 K; from memory)
    assert 8.5e-5 < volume[0] < 9.5e-5  # 74.12 g/mol / 0.81 g/cm3 (CRC density, from memory)
    assert 100.0 < cp[0] < 125.0 and math.isfinite(h_ig[-1])


def test_import_does_not_load_chemicals_until_a_lookup():
    code = ("import sys; import solver.handbook as h; h.search('isoprop'); h.suggest('isopropanl');"
            "assert 'chemicals' not in sys.modules, 'imported early';"
            "h.lookup('IPA'); assert 'chemicals' in sys.modules")
    result = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert result.returncode == 0, result.stderr
