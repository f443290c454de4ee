"""The ``[specs]`` table: the specifications that use up the column's degrees of freedom (in
file order), and the reflux temperature or subcooling of a total condenser (column settings,
not specs). Degrees of freedom are counted by the engine, not here."""

from __future__ import annotations

from typing import Any, Mapping

from solver.case.column_table import stage_number
from solver.case.fields import (
    At,
    Field,
    check_keys,
    component_key,
    read_fields,
    read_list,
    read_quantity,
    read_table,
    quantity,
)
from solver.case.feeds_table import component_molar_mass
from solver.case.model import Column, Spec
from solver.thermo.data import ComponentData
from solver.units import UnitParseError, fraction_and_basis

__all__ = ["PRODUCTS", "read_product_fractions", "read_specs_table"]

PRODUCTS = ("distillate", "bottoms")
#: Spec key -> (kind of quantity, bounds, the column part it needs)
_SINGLE_VALUE_SPECS = {
    "reflux_ratio": ("dimensionless", {"above": 0.0}, "condenser"),
    "boilup_ratio": ("dimensionless", {"above": 0.0}, "reboiler"),
    "distillate_rate": ("molar_flow", {"above": 0.0}, None),
    "bottoms_rate": ("molar_flow", {"above": 0.0}, None),
    "condenser_duty": ("power", {}, "condenser"),
    "reboiler_duty": ("power", {"above": 0.0}, "reboiler"),
}
_SPEC_KEYS = (
    tuple(_SINGLE_VALUE_SPECS) + PRODUCTS + ("recovery", "stage_temperature", "reflux_temperature", "reflux_subcooling")
)


def read_specs_table(
    value: Any, names: tuple[str, ...], column: Column, at: At, component_data: Mapping[str, ComponentData] | None = None
) -> tuple[tuple[Spec, ...], float | None, float | None]:
    """(the specifications in file order, reflux temperature [K] or None, reflux subcooling [K]
    or None)."""
    table = read_table(value, at)
    check_keys(table, at, _SPEC_KEYS)
    specs: list[Spec] = []
    reflux_temperature = reflux_subcooling = None
    for key, item in table.items():
        key_at = at.child(key)
        if key in _SINGLE_VALUE_SPECS:
            kind, bounds, part = _SINGLE_VALUE_SPECS[key]
            if part is not None:
                _needs(column, part, item, key_at)
            number = read_quantity(item, kind, key_at, **bounds)
            if key == "condenser_duty" and number >= 0.0:
                key_at.fail(
                    "the condenser duty is the heat added to the condenser, so it is negative", item,
                    "a negative power such as '-2.5 MW'",
                )
            specs.append(Spec(key, number, key=key_at.key))
        elif key in PRODUCTS:
            specs.extend(read_product_fractions(item, key, names, key_at, component_data))
        elif key == "recovery":
            specs.extend(_read_recoveries(item, names, key_at))
        elif key == "stage_temperature":
            specs.extend(_read_stage_temperatures(item, column, key_at))
        else:  # reflux_temperature, reflux_subcooling
            if column.condenser != "total":
                key_at.fail(
                    f"needs a total condenser (column.condenser is {column.condenser!r})", item, "condenser = 'total'"
                )
            if key == "reflux_temperature":
                reflux_temperature = read_quantity(item, "temperature", key_at, above=0.0)
            else:
                reflux_subcooling = read_quantity(item, "temperature_difference", key_at, minimum=0.0)
            if "reflux_temperature" in table and "reflux_subcooling" in table:
                at.child("reflux_subcooling").fail(
                    "cannot be combined with reflux_temperature", table["reflux_subcooling"], "one of the two"
                )
    return tuple(specs), reflux_temperature, reflux_subcooling


def _needs(column: Column, part: str, value: Any, at: At) -> None:
    present = column.condenser != "none" if part == "condenser" else column.reboiler != "none"
    if not present:
        at.fail(f"this column has no {part} (column.{part} = 'none')", value, f"a column with a {part}")


def read_product_fractions(
    value: Any, product: str, names: tuple[str, ...], at: At, component_data: Mapping[str, ComponentData] | None = None
) -> list[Spec]:
    """``distillate`` or ``bottoms`` = {NAME = mole fraction}: specs of kind mole_fraction. A
    fraction is a number, "99.5 %", "50 ppm" (molar) or "50 ppmw" (by mass: converted to the
    mole fraction it means in a two-component product, with the molar masses)."""
    specs = []
    for written, fraction in read_table(value, at, "a table such as { water = 0.995 }").items():
        fraction_at = at.child(written)
        name = component_key(written, names, fraction_at)
        x = _read_purity(fraction, name, names, component_data, fraction_at)
        specs.append(Spec("mole_fraction", x, component=name, product=product, key=fraction_at.key))
    return specs


def _read_purity(
    value: Any, name: str, names: tuple[str, ...], component_data: Mapping[str, ComponentData] | None, at: At
) -> float:
    """The mole fraction of ``name`` a purity ``value`` means (see :func:`read_product_fractions`)."""
    try:
        fraction, basis = fraction_and_basis(value)
    except UnitParseError as exc:
        at.fail(str(exc), value, "a fraction such as 0.995, '99.5 %', '50 ppm' (molar) or '50 ppmw' (by mass)")
    if basis == "mole":
        return read_quantity(value, "dimensionless", at, above=0.0, below=1.0)
    if not 0.0 < fraction < 1.0:
        at.fail(f"out of range ({fraction:g} by mass)", value, "a mass fraction > 0 and < 1")
    if component_data is None or len(names) != 2:
        at.fail(
            "a mass fraction (ppmw) fixes a product's mole fraction only in a two-component case"
            if component_data is not None else "a mass fraction (ppmw) is not read here",
            value, "a mole fraction such as '50 ppm'",
        )
    other = names[1 - names.index(name)]
    molar_mass = component_molar_mass(name, component_data, at, value, "a mass fraction")
    other_molar_mass = component_molar_mass(other, component_data, at, value, "a mass fraction")
    moles = fraction / molar_mass  # x = (w / M) / (w / M + (1 - w) / M_other)
    return moles / (moles + (1.0 - fraction) / other_molar_mass)


def _read_recoveries(value: Any, names: tuple[str, ...], at: At) -> list[Spec]:
    """recovery = {NAME = {distillate|bottoms = fraction of the feed's NAME}}."""
    specs = []
    for written, products in read_table(value, at, "{ NAME = { distillate = 0.99 } }").items():
        component_at = at.child(written)
        name = component_key(written, names, component_at)
        products = read_table(products, component_at, "a table such as { distillate = 0.99 }")
        check_keys(products, component_at, PRODUCTS)
        for product, fraction in products.items():
            product_at = component_at.child(product)
            recovery = read_quantity(fraction, "dimensionless", product_at, above=0.0, maximum=1.0)
            specs.append(Spec("recovery", recovery, component=name, product=product, key=product_at.key))
    return specs


def _read_stage_temperatures(value: Any, column: Column, at: At) -> list[Spec]:
    """stage_temperature = {stage, value}, or a list of them."""
    fields = {
        "stage": Field(stage_number(column.stages), required=True),
        "value": Field(quantity("temperature", above=0.0), required=True),
    }
    entries = [(value, at)] if isinstance(value, Mapping) else [
        (entry, at.item(k)) for k, entry in enumerate(read_list(value, at, min_length=1))
    ]
    specs = []
    for entry, entry_at in entries:
        read = read_fields(entry, entry_at, fields, "{ stage = 5, value = \"80 degC\" }")
        specs.append(Spec("stage_temperature", read["value"], stage=read["stage"], key=entry_at.key))
    return specs
