"""Tests for solver.units: reading case-file quantities and converting them to SI."""

from __future__ import annotations

import math
import time

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from solver.units import (
    MAX_TEXT_LENGTH,
    SI_UNITS,
    UnitParseError,
    convert,
    example_unit,
    temperature_scale,
    to_si,
    unit_factor,
)

# Conversion factors below are exact by definition (NIST SP 811, 2008 edition, appendix B):
# 1 bar = 1e5 Pa, 1 atm = 760 torr = 101325 Pa, 1 mmHg = 133.322387415 Pa, 1 cal (thermochemical) = 4.184 J,
# 1 h = 3600 s, 0 degC = 273.15 K, 1 degF = 5/9 K, 0 degF = 459.67 degR.


@pytest.mark.parametrize(
    ("text", "kind", "expected"),
    [
        ("100 kmol/h", "molar_flow", 100_000 / 3600),
        ("65 degC", "temperature", 338.15),
        ("212 degF", "temperature", 373.15),
        ("671.67 degR", "temperature", 373.15),
        ("1.5 bar", "pressure", 150_000.0),
        ("1 atm", "pressure", 101_325.0),
        ("760 torr", "pressure", 101_325.0),
        ("1 mmHg", "pressure", 133.322387415),
        ("101.325 kPa", "pressure", 101_325.0),
        ("-250 cal/mol", "molar_energy", -1046.0),
        ("35 kJ/mol", "molar_energy", 35_000.0),
        ("2.5 MW", "power", 2.5e6),
        ("-800 kW", "power", -8e5),
        ("100 g/mol", "molar_mass", 0.1),
        ("40.7 cm**3/mol", "molar_volume", 40.7e-6),
        ("12 kmol/m**3", "molar_density", 12_000.0),
        ("75 J/mol/K", "molar_heat_capacity", 75.0),
        ("75 kJ/kmol/K", "molar_heat_capacity", 75.0),
        ("0.001 1/K", "inverse_temperature", 0.001),
        ("5 K", "temperature_difference", 5.0),
        ("9 delta_degF", "temperature_difference", 5.0),
        ("50 %", "dimensionless", 0.5),
        ("1.5bar", "pressure", 150_000.0),
        (".5 bar", "pressure", 50_000.0),
        ("  2 bar  ", "pressure", 200_000.0),
        ("1e5", "pressure", 100_000.0),
    ],
)
def test_to_si_converts_strings_with_units(text, kind, expected):
    assert to_si(text, kind) == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize("kind", sorted(SI_UNITS))
def test_plain_numbers_and_number_strings_are_taken_in_si(kind):
    assert to_si(3, kind) == 3.0
    assert to_si(2.5, kind) == 2.5
    assert to_si("3", kind) == 3.0


def test_temperature_inside_a_compound_unit_is_a_difference():
    # A plain pint expression would read "75 J/mol/degC" as 75 J/mol per 274.15 K.
    assert to_si("75 J/mol/degC", "molar_heat_capacity") == pytest.approx(75.0)
    assert to_si("1 J/mol/degF", "molar_heat_capacity") == pytest.approx(1.8)
    assert to_si("0.001 1/degC", "inverse_temperature") == pytest.approx(0.001)


def test_offset_unit_in_a_temperature_difference_is_read_as_a_difference():
    assert to_si("5 degC", "temperature_difference") == pytest.approx(5.0)
    assert to_si("9 degF", "temperature_difference") == pytest.approx(5.0)


def test_difference_unit_is_refused_for_a_temperature():
    with pytest.raises(UnitParseError, match="temperature difference"):
        to_si("5 delta_degC", "temperature")


@pytest.mark.parametrize(
    ("value", "kind", "message"),
    [
        (True, "pressure", "true/false"),
        (False, "dimensionless", "true/false"),
        (None, "pressure", "a number or a string"),
        ([1.0], "pressure", "a number or a string"),
        ({"a": 1}, "pressure", "a number or a string"),
        (float("nan"), "pressure", "finite"),
        (float("inf"), "temperature", "finite"),
        (10**400, "pressure", "too large"),
        ("1e999 Pa", "pressure", "finite"),
        ("nan Pa", "pressure", "start with a number"),
        ("kmol/h", "molar_flow", "start with a number"),
        ("", "pressure", "start with a number"),
        ("1,5 bar", "pressure", "not a unit"),
        ("2 bar 3", "pressure", "not a unit"),
        ("1 furlong", "pressure", "not a pressure"),
        ("100 kmol/h", "pressure", "not a pressure"),
        ("5 bar", "temperature", "not a temperature"),
        ("50 %", "pressure", "not a pressure"),
        ("9**9**9 Pa", "pressure", "powers"),
        ("1 Pa**9**9**9", "pressure", "powers"),
        ("1 (m/s)**2", "dimensionless", "powers"),
        ("1 " + "m" * (MAX_TEXT_LENGTH + 1), "pressure", "too long"),
    ],
)
def test_to_si_refuses_bad_values_with_a_plain_message(value, kind, message):
    with pytest.raises(UnitParseError, match=message):
        to_si(value, kind)


def test_power_tower_is_refused_quickly():
    start = time.perf_counter()
    for text in ("9**9**9 Pa", "9^9^9 Pa", "1 Pa**9**99999999", "(9**99)**99 Pa"):
        with pytest.raises(UnitParseError):
            to_si(text, "pressure")
    assert time.perf_counter() - start < 1.0


def test_to_si_error_is_a_value_error():
    assert issubclass(UnitParseError, ValueError)


@pytest.mark.parametrize(
    ("unit", "kind", "factor"),
    [
        ("Pa", "pressure", 1.0),
        ("kPa", "pressure", 1000.0),
        ("mmHg", "pressure", 133.322387415),
        ("bar", "pressure", 1e5),
        ("J/kmol/K", "molar_heat_capacity", 1e-3),
        ("J/mol/degC", "molar_heat_capacity", 1.0),
        ("cal/mol", "molar_energy", 4.184),
        ("kmol/m**3", "molar_density", 1000.0),
        ("cm**3/mol", "molar_volume", 1e-6),
        ("kmol/h", "molar_flow", 1 / 3.6),
        ("kW", "power", 1000.0),
        ("degR", "temperature", 5 / 9),
    ],
)
def test_unit_factor(unit, kind, factor):
    assert unit_factor(unit, kind) == pytest.approx(factor, rel=1e-12)


@pytest.mark.parametrize(
    ("unit", "kind", "message"),
    [
        ("2 bar", "pressure", "not a unit"),  # a number is not part of a unit
        ("degC", "temperature", "offset"),
        ("kg", "pressure", "not a unit of pressure"),
        ("florb", "pressure", "not a unit"),
        (5, "pressure", "as text"),
        ("m**9**9**9", "dimensionless", "powers"),
    ],
)
def test_unit_factor_refuses(unit, kind, message):
    with pytest.raises(UnitParseError, match=message):
        unit_factor(unit, kind)


@pytest.mark.parametrize(
    ("unit", "slope", "intercept"),
    [("K", 1.0, 0.0), ("degC", 1.0, -273.15), ("degF", 1.8, -459.67), ("degR", 1.8, 0.0), ("kelvin", 1.0, 0.0)],
)
def test_temperature_scale(unit, slope, intercept):
    got_slope, got_intercept = temperature_scale(unit)
    assert got_slope == pytest.approx(slope, rel=1e-12)
    assert got_intercept == pytest.approx(intercept, abs=1e-9)


@pytest.mark.parametrize("unit", ["delta_degC", "2 K", "Pa", "K**2", "", 1.0, "K**9**9**9"])
def test_temperature_scale_refuses(unit):
    with pytest.raises(UnitParseError):
        temperature_scale(unit)


@settings(max_examples=60, deadline=None)
@given(
    kelvin=st.floats(min_value=1.0, max_value=5000.0),
    unit=st.sampled_from(["K", "degC", "degF", "degR"]),
)
def test_temperature_scale_agrees_with_to_si(kelvin, unit):
    slope, intercept = temperature_scale(unit)
    in_unit = slope * kelvin + intercept
    assert to_si(f"{in_unit!r} {unit}", "temperature") == pytest.approx(kelvin, rel=1e-9, abs=1e-9)


@settings(max_examples=60, deadline=None)
@given(
    value=st.floats(min_value=-1e9, max_value=1e9, allow_nan=False),
    kind_unit=st.sampled_from(
        [("pressure", "bar"), ("molar_flow", "kmol/h"), ("power", "kW"), ("temperature", "degC"), ("molar_energy", "cal/mol")]
    ),
)
def test_convert_is_the_inverse_of_to_si(value, kind_unit):
    kind, unit = kind_unit
    shown = convert(value, kind, unit)
    assert to_si(f"{shown!r} {unit}", kind) == pytest.approx(value, rel=1e-9, abs=1e-6)


@settings(max_examples=300, deadline=None)
@given(
    text=st.one_of(
        st.text(max_size=40),
        st.text(alphabet="0123456789.eE+-*/^() %_ KkPamolbrhgdegCFJWs", max_size=30),
    ),
    kind=st.sampled_from(sorted(SI_UNITS)),
)
def test_to_si_raises_only_unit_parse_error_and_returns_finite(text, kind):
    try:
        number = to_si(text, kind)
    except UnitParseError:
        return
    assert isinstance(number, float) and math.isfinite(number)


@settings(max_examples=150, deadline=None)
@given(text=st.text(alphabet="0123456789.*/^() KkPamolbrhgdeCFJWs%", max_size=25), kind=st.sampled_from(sorted(SI_UNITS)))
def test_unit_readers_raise_only_unit_parse_error(text, kind):
    for reader in (lambda: unit_factor(text, kind), lambda: temperature_scale(text)):
        try:
            result = reader()
        except UnitParseError:
            continue
        assert all(math.isfinite(x) for x in (result if isinstance(result, tuple) else (result,)))


@pytest.mark.parametrize("kind", sorted(SI_UNITS))
def test_every_kind_has_an_example_unit(kind):
    assert example_unit(kind)
