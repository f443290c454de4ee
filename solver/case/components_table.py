"""The ``[components]`` table: the component names, and the data of components the user
defines under ``[components.data.NAME]`` with their correlations, checked against the
correlation forms of :mod:`solver.thermo.data` and built into its :class:`ComponentData`.

A listed name not defined under ``[components.data]`` is a CoolProp fluid when CoolProp has it
(its reference equation of state); otherwise, or when ``from_handbook`` lists it, the
compound of the handbook library (:mod:`solver.handbook`) of that name, synonym, CAS number or
formula. An unknown name gets the closest names of both."""

from __future__ import annotations

import math
from dataclasses import replace
from types import MappingProxyType
from typing import Any, Callable, Mapping, NamedTuple

from solver.case.fields import (
    At,
    Field,
    check_keys,
    plausible_quantity,
    quantity,
    read_choice,
    read_component_name,
    read_fields,
    read_list,
    read_quantity,
    read_real,
    read_table,
    read_text,
)
from scipy.constants import R as GAS_CONSTANT

from solver.thermo.handbook_forms import WAGNER_DEFAULT_EXPONENTS
from solver.thermo.data import FORMS, PROPERTY_FORMS, WATSON_EXPONENT, ComponentData, Correlation
from solver.units import UnitParseError, temperature_scale, unit_factor

__all__ = ["read_components_table"]

#: property -> the kind of quantity its correlation gives (the forms allowed for it are
#: solver.thermo.data.PROPERTY_FORMS)
_PROPERTY_KINDS = {
    "vapor_pressure": "pressure",
    "ideal_gas_cp": "molar_heat_capacity",
    "heat_of_vaporization": "molar_energy",
    "liquid_molar_volume": "molar_volume",
}
#: Keys of a correlation table that say in which units its coefficients are, per form
#: (forms not listed take ``units = "VALUE_UNIT, TEMPERATURE_UNIT"``; watson and constant
#: write their values as quantities with units).
_UNIT_KEYS = {"antoine": ("base", "pressure_unit", "temperature_unit"), "watson": (), "constant": (), "wagner": (),
              "trc_gas": ()}
#: The polynomial's coefficients are written as one list.
_POLYNOMIAL_KEY = "coefficients"
#: The heaviest molar mass taken for a distillable component, kg/mol.
_HEAVIEST = 10.0


def read_components_table(value: Any, at: At) -> tuple[tuple[str, ...], dict[str, ComponentData], list[str]]:
    """(names in file order, data of the user-defined components that names lists, warnings
    about defined components that it does not list)."""
    table = read_table(value, at)
    check_keys(table, at, ("names", "data", "from_handbook"), required=("names",))
    names_at = at.child("names")
    written = read_list(table["names"], names_at, min_length=1, max_length=200)
    names: list[str] = []
    for index, item in enumerate(written):
        name = read_component_name(item, names_at.item(index))
        if name in names:
            names_at.item(index).fail("listed twice (names are compared without regard to case)", item)
        names.append(name)
    data_at = at.child("data")
    data_table = read_table(table.get("data", {}), data_at)
    component_data: dict[str, ComponentData] = {}
    warnings: list[str] = []
    seen: set[str] = set()
    for written_name, entry in data_table.items():
        entry_at = data_at.child(written_name)
        name = read_component_name(written_name, entry_at)
        if name in seen:
            entry_at.fail("defined twice (names are compared without regard to case)", written_name)
        seen.add(name)
        data = _read_component_data(name, entry, entry_at)
        if name in names:
            component_data[name] = data
        else:
            warnings.append(
                f"{entry_at.file}: {entry_at.key}: {written_name!r} is defined but not listed in components.names;"
                " it was checked and is not used"
            )
    chosen = _read_from_handbook(table.get("from_handbook", []), names, component_data, at.child("from_handbook"))
    for index, name in enumerate(names):
        if name not in component_data:
            data = _library_component(name, name in chosen, names_at.item(index), written[index])
            if data is not None:
                component_data[name] = data
    return tuple(names), component_data, warnings


def _read_from_handbook(value: Any, names: list[str], defined: Mapping[str, ComponentData], at: At) -> set[str]:
    """``from_handbook = [...]``: listed components to take from the handbook library even
    when CoolProp has them."""
    chosen: set[str] = set()
    for index, item in enumerate(read_list(value, at, max_length=200)):
        name = read_component_name(item, at.item(index))
        if name not in names:
            at.item(index).fail("not one of components.names", item, "a name listed in components.names")
        if name in defined:
            at.item(index).fail("defined under [components.data]; a component has one source", item)
        chosen.add(name)
    return chosen


def _library_component(name: str, handbook: bool, at: At, written: str) -> ComponentData | None:
    """None for a CoolProp fluid (unless ``handbook``); else the handbook compound ``name``,
    every error naming the file, the key and the name as ``written``."""
    from solver.catalog import close_names
    from solver.components import component_info, usable_coolprop_name
    from solver.fluids import coolprop_name
    from solver.errors import CaseError
    from solver.handbook import describe, find, lookup
    from solver.handbook.names import AmbiguousFormula

    if not handbook and usable_coolprop_name(name) is not None:
        return None
    try:
        found = find(name)
    except AmbiguousFormula as exc:
        at.fail(str(exc), written)
    if found is None and not handbook and coolprop_name(name) is not None:
        try:  # a CoolProp fluid a column cannot use: the component registry says why
            component_info(name)
        except CaseError as exc:
            at.fail(exc.problem, written)
        return None
    if found is None:
        close = close_names(name)
        hint = "; did you mean " + " or ".join(repr(n) for n in close) + "?" if close else ""
        where = "in the handbook library" if handbook else "a CoolProp fluid or in the handbook library"
        at.fail(f"unknown component: not {where}, nor defined under [components.data]{hint}", written,
                "a name, synonym, CAS number or formula (list them with `traystack components PATTERN`)")
    try:
        component = lookup(name, key=at.key)
    except CaseError as exc:
        raise CaseError(exc.problem, file=at.file, key=at.key, value=written, expected=exc.expected) from None
    return replace(component.data, provenance=describe(component))


_COMPONENT_FIELDS = {
    "molar_mass": Field(
        plausible_quantity(
            "molar_mass", _HEAVIEST, "a molar mass of a distillable component", "a molar mass such as '100 g/mol' or 0.1"
        ),
        required=True,
    ),
    "critical_temperature": Field(quantity("temperature", above=0.0), required=True),
    "critical_pressure": Field(quantity("pressure", above=0.0), required=True),
    "normal_boiling_point": Field(),  # below the critical temperature: read below
    "vapor_pressure": Field(required=True),
    "ideal_gas_cp": Field(),
    "heat_of_vaporization": Field(),
    "liquid_molar_volume": Field(),
    "source": Field(lambda value, at: read_text(value, at, allow_empty=False), required=True),
    # Pitzer's acentric factor, -log10(Psat/Pc) - 1 at T = 0.7 Tc: only a cubic equation of state uses it
    "acentric_factor": Field(lambda value, at: read_real(value, at, minimum=-0.5, maximum=2.0)),
}


def _read_component_data(name: str, table: Any, at: At) -> ComponentData:
    fields = read_fields(table, at, _COMPONENT_FIELDS)
    critical_temperature = fields["critical_temperature"]
    normal_boiling_point = None
    if "normal_boiling_point" in table:
        normal_boiling_point = read_quantity(
            table["normal_boiling_point"], "temperature", at.child("normal_boiling_point"),
            above=0.0, below=critical_temperature,
        )
    correlations = {
        prop: _read_correlation(table[prop], prop, critical_temperature, at.child(prop))
        for prop in _PROPERTY_KINDS
        if prop in table
    }
    return ComponentData(
        name=name,
        molar_mass=fields["molar_mass"],
        critical_temperature=critical_temperature,
        critical_pressure=fields["critical_pressure"],
        vapor_pressure=correlations["vapor_pressure"],
        ideal_gas_cp=correlations.get("ideal_gas_cp"),
        heat_of_vaporization=correlations.get("heat_of_vaporization"),
        liquid_molar_volume=correlations.get("liquid_molar_volume"),
        normal_boiling_point=normal_boiling_point,
        source=fields["source"],
        acentric_factor=fields.get("acentric_factor"),
    )


# --- correlations -------------------------------------------------------------------------


class _Coefficients(NamedTuple):
    """What a form's reader gives: the coefficients and how to turn them into SI."""

    values: dict[str, float]
    value_factor: float = 1.0
    temperature_slope: float = 1.0
    temperature_intercept: float = 0.0
    log_base: float | None = None


def _read_correlation(value: Any, prop: str, critical_temperature: float, at: At) -> Correlation:
    """One pure-component correlation table; see :class:`~solver.thermo.data.Correlation` for
    what is stored.

    For ``liquid_molar_volume`` the DIPPR 105 form gives a molar *density*
    (rho = A / B^(1 + (1 - T/C)^D)); its value_factor is SI (mol/m**3) per density unit, and
    the molar volume is 1/rho. Watson and DIPPR 106 use the reduced temperature T/Tc with the
    component's critical_temperature."""
    kind, forms = _PROPERTY_KINDS[prop], PROPERTY_FORMS[prop]
    table = read_table(value, at, "a table such as { form = \"" + forms[0] + "\", ... }")
    if "form" not in table:
        at.child("form").fail("missing", expected="one of: " + ", ".join(repr(f) for f in forms))
    form = read_choice(table["form"], at.child("form"), forms)
    required, optional = FORMS[form]
    if form == "polynomial":
        required = (_POLYNOMIAL_KEY,)
    optional += _UNIT_KEYS.get(form, ("units",))
    check_keys(table, at, ("form",) + required + optional + ("T_min", "T_max"), required=required)
    read = _FORM_READERS["dippr" if form in ("dippr101", "dippr106", "dippr107") else form]
    coefficients = read(table, form, kind, critical_temperature, at)

    T_min = read_quantity(table["T_min"], "temperature", at.child("T_min"), above=0.0) if "T_min" in table else None
    T_max = read_quantity(table["T_max"], "temperature", at.child("T_max"), above=0.0) if "T_max" in table else None
    if T_min is not None and T_max is not None and T_min >= T_max:
        at.child("T_max").fail(f"must be above T_min ({T_min:g} K)", table["T_max"], "T_max > T_min")
    return Correlation(
        form=form,
        coefficients=MappingProxyType(coefficients.values),
        temperature_slope=coefficients.temperature_slope,
        temperature_intercept=coefficients.temperature_intercept,
        value_factor=coefficients.value_factor,
        log_base=coefficients.log_base,
        T_min=T_min,
        T_max=T_max,
    )


def _read_units(value: Any, kind: str, at: At, *, with_temperature: bool = True) -> tuple[float, float, float]:
    """``units = "VALUEUNIT, TUNIT"`` -> (value_factor, temperature_slope, temperature_intercept)."""
    if value is None:
        return 1.0, 1.0, 0.0
    text = read_text(value, at, allow_empty=False, max_length=200)
    parts = [part.strip() for part in text.split(",")]
    expected = "'VALUE_UNIT, TEMPERATURE_UNIT' such as 'J/kmol/K, K'" if with_temperature else "a unit such as 'J/kmol'"
    if len(parts) > (2 if with_temperature else 1) or not all(parts):
        if len(parts) == 2 and all(parts) and not with_temperature:
            problem = "this form uses the reduced temperature T/Tc, so it takes no temperature unit"
        else:
            problem = "cannot split into a value unit and a temperature unit"
        at.fail(problem, value, expected)
    try:
        factor = unit_factor(parts[0], kind)
        slope, intercept = temperature_scale(parts[1]) if len(parts) == 2 else (1.0, 0.0)
    except UnitParseError as exc:
        at.fail(str(exc), value, expected)
    return factor, slope, intercept


def _letters(table: Mapping, names: str, at: At, default: float | None = None) -> dict[str, float]:
    """Coefficients named by single letters (the published equations' own names)."""
    return {
        name: read_real(table[name], at.child(name)) if name in table else float(default)
        for name in names
    }


def _antoine(table: Mapping, form: str, kind: str, critical_temperature: float, at: At) -> _Coefficients:
    coefficients = _letters(table, "ABC", at)
    base = table.get("base", 10)
    if isinstance(base, bool) or base not in (10, "10", "e"):
        at.child("base").fail("not a logarithm base this form knows", base, "10 or \"e\"")
    try:
        factor = unit_factor(table.get("pressure_unit", "Pa"), "pressure")
    except UnitParseError as exc:
        at.child("pressure_unit").fail(str(exc), table.get("pressure_unit"), "a pressure unit such as 'mmHg' or 'kPa'")
    try:
        slope, intercept = temperature_scale(table.get("temperature_unit", "K"))
    except UnitParseError as exc:
        at.child("temperature_unit").fail(str(exc), table.get("temperature_unit"), "'K' or 'degC'")
    return _Coefficients(coefficients, factor, slope, intercept, math.e if base == "e" else 10.0)


def _dippr(table: Mapping, form: str, kind: str, critical_temperature: float, at: At) -> _Coefficients:
    """DIPPR 101, 106 and 107 (coefficients A to E, those not given 0)."""
    coefficients = _letters(table, "ABCDE", at, default=0.0)
    if form == "dippr106" and "Tc" in table:
        coefficients["Tc"] = read_quantity(table["Tc"], "temperature", at.child("Tc"), above=0.0)
    units = _read_units(table.get("units"), kind, at.child("units"), with_temperature=form != "dippr106")
    if form == "dippr107":
        if coefficients["C"] == 0.0:
            at.child("C").fail("must not be 0 (it divides in (C/T)/sinh(C/T))", table["C"], "a nonzero number")
        if coefficients["D"] != 0.0 and coefficients["E"] == 0.0:
            at.child("E").fail("must be given and nonzero when D is", table.get("E"), "a nonzero number")
    return _Coefficients(coefficients, *units)


def _dippr105(table: Mapping, form: str, kind: str, critical_temperature: float, at: At) -> _Coefficients:
    coefficients = _letters(table, "ABCD", at)
    units = _read_units(table.get("units"), "molar_density", at.child("units"))
    if coefficients["B"] <= 0.0:
        at.child("B").fail("must be positive (it is raised to a power)", table["B"], "a number > 0")
    if coefficients["C"] == 0.0:
        at.child("C").fail("must not be 0 (it divides T)", table["C"], "a nonzero number")
    return _Coefficients(coefficients, *units)


def _polynomial(table: Mapping, form: str, kind: str, critical_temperature: float, at: At) -> _Coefficients:
    items_at = at.child(_POLYNOMIAL_KEY)
    items = read_list(table[_POLYNOMIAL_KEY], items_at, min_length=1, max_length=20)
    coefficients = {f"c{k}": read_real(item, items_at.item(k)) for k, item in enumerate(items)}
    return _Coefficients(coefficients, *_read_units(table.get("units"), kind, at.child("units")))


def _watson(table: Mapping, form: str, kind: str, critical_temperature: float, at: At) -> _Coefficients:
    at_temperature = read_quantity(table["at"], "temperature", at.child("at"), above=0.0, below=critical_temperature)
    return _Coefficients({
        "value": read_quantity(table["value"], "molar_energy", at.child("value"), above=0.0),
        "at": at_temperature,
        "exponent": read_real(table["exponent"], at.child("exponent")) if "exponent" in table else WATSON_EXPONENT,
    })


def _constant(table: Mapping, form: str, kind: str, critical_temperature: float, at: At) -> _Coefficients:
    return _Coefficients({"value": read_quantity(table["value"], kind, at.child("value"), above=0.0)})


def _wagner(table: Mapping, form: str, kind: str, critical_temperature: float, at: At) -> _Coefficients:
    """Wagner: A to D are numbers, the equation's own Tc and Pc quantities (K and Pa when bare),
    the exponents of the third and fourth terms 2.5 and 5 unless given."""
    coefficients = _letters(table, "ABCD", at)
    coefficients["Tc"] = read_quantity(table["Tc"], "temperature", at.child("Tc"), above=0.0)
    coefficients["Pc"] = read_quantity(table["Pc"], "pressure", at.child("Pc"), above=0.0)
    for key, default in zip(("exponent_C", "exponent_D"), WAGNER_DEFAULT_EXPONENTS):
        coefficients[key] = read_real(table[key], at.child(key)) if key in table else default
    return _Coefficients(coefficients)


def _trc_gas(table: Mapping, form: str, kind: str, critical_temperature: float, at: At) -> _Coefficients:
    """TRC ideal-gas heat capacity: a0 to a7 give cp/R (T in K)."""
    return _Coefficients({f"a{k}": read_real(table[f"a{k}"], at.child(f"a{k}")) for k in range(8)}, GAS_CONSTANT)


_FORM_READERS: dict[str, Callable[..., _Coefficients]] = {
    "wagner": _wagner,
    "trc_gas": _trc_gas,
    "antoine": _antoine,
    "dippr": _dippr,
    "dippr105": _dippr105,
    "polynomial": _polynomial,
    "watson": _watson,
    "constant": _constant,
}
