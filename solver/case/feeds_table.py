"""The ``[[feeds]]`` tables: stage, flow (molar, or mass with the feed's molar mass),
composition (mole or mass fractions), thermal condition and pressure of each feed; and the
molar masses a mass basis needs ([components.data], the handbook, or CoolProp's)."""

from __future__ import annotations

import difflib
import math
from typing import Any, Mapping

from solver.case.column_table import MAX_STAGES, stage_number
from solver.case.fields import (
    At,
    Field,
    component_key,
    plain,
    quantity,
    read_boolean,
    read_choice,
    read_fields,
    read_list,
    read_quantity,
    read_quantity_of_kinds,
    read_table,
    read_text,
)
from solver.case.model import Column, Feed
from solver.errors import CaseError
from solver.thermo.data import ComponentData

__all__ = ["COMPOSITION_TOLERANCE", "component_molar_mass", "molar_mass_of", "read_feeds_table"]

#: How far the fractions of a composition may add up away from 1 (without normalize = true).
COMPOSITION_TOLERANCE = 1e-6
_FLOW_KINDS = ("molar_flow", "mass_flow")


def read_feeds_table(
    value: Any, names: tuple[str, ...], component_data: Mapping[str, ComponentData], column: Column, at: At
) -> tuple[Feed, ...]:
    if isinstance(value, Mapping):
        at.fail("must be a list of tables: write [[feeds]], not [feeds]", "a table", "[[feeds]] tables")
    items = read_list(value, at, min_length=1, max_length=MAX_STAGES)
    feeds: list[Feed] = []
    for index, entry in enumerate(items):
        if isinstance(entry, Mapping) and entry.get("flow") == "free":
            at.item(index).child("flow").fail(
                "a free feed rate (a make-up that a spec sets) belongs to a column network: one column's feeds have "
                "fixed rates", "free", "a molar or mass flow such as '100 kmol/h', or a network case ([[columns]])")
        feed = _read_feed(entry, index, names, component_data, column, at.item(index))
        if any(f.name == feed.name for f in feeds):
            at.item(index).child("name").fail("another feed has this name", feed.name, "a unique name")
        feeds.append(feed)
    return tuple(feeds)


def _feed_fields(index: int, column: Column) -> dict[str, Field]:
    return {
        "stage": Field(stage_number(column.stages), required=True),
        "flow": Field(lambda value, at: read_quantity_of_kinds(value, _FLOW_KINDS, at, above=0.0), required=True),
        "composition": Field(required=True),  # read with the basis, below
        "basis": Field(lambda value, at: read_choice(value, at, ("mole", "mass")), default="mole"),
        "normalize": Field(read_boolean),
        "temperature": Field(quantity("temperature", above=0.0)),
        "vapor_fraction": Field(quantity("dimensionless", minimum=0.0, maximum=1.0)),
        "pressure": Field(quantity("pressure", above=0.0)),
        "name": Field(
            lambda value, at: read_text(value, at, allow_empty=False, max_length=100), default=f"feed_{index + 1}"
        ),
    }


def _read_feed(
    value: Any,
    index: int,
    names: tuple[str, ...],
    component_data: Mapping[str, ComponentData],
    column: Column,
    at: At,
) -> Feed:
    fields = read_fields(value, at, _feed_fields(index, column), "a [[feeds]] table")
    composition = _read_composition(value["composition"], names, fields.get("normalize", False), at.child("composition"))
    if fields["basis"] == "mass":
        composition = _mass_to_mole_fractions(composition, names, component_data, at.child("basis"))
    flow, flow_kind = fields["flow"]
    if flow_kind == "mass_flow":  # kg/s over the feed's molar mass sum z_i M_i
        flow_at = at.child("flow")
        molar_mass = sum(
            z * component_molar_mass(name, component_data, flow_at, value["flow"], "a mass flow")
            for name, z in zip(names, composition) if z > 0.0
        )
        flow = flow / molar_mass
    has_temperature, has_vapor_fraction = "temperature" in fields, "vapor_fraction" in fields
    if has_temperature == has_vapor_fraction:
        both = {"temperature": value["temperature"], "vapor_fraction": value["vapor_fraction"]} if has_temperature else None
        at.fail(
            "give exactly one of temperature and vapor_fraction" + (" (both given)" if has_temperature else ""),
            both,
            "temperature = \"65 degC\" or vapor_fraction = 0.0",
        )
    return Feed(
        stage=fields["stage"],
        flow=flow,
        composition=composition,
        temperature=fields.get("temperature"),
        vapor_fraction=fields.get("vapor_fraction"),
        pressure=fields.get("pressure"),
        name=fields["name"],
    )


def _read_composition(value: Any, names: tuple[str, ...], normalize: bool, at: At) -> tuple[float, ...]:
    """{name = fraction}; components not named are 0. The fractions must add up to 1 within
    :data:`COMPOSITION_TOLERANCE` unless ``normalize``; they are then scaled to add up to 1."""
    table = read_table(value, at, "a table such as { methanol = 0.35, water = 0.65 }")
    fractions = dict.fromkeys(names, 0.0)
    seen: set[str] = set()
    for written, item in table.items():
        item_at = at.child(written)
        name = component_key(written, names, item_at)
        if name in seen:
            item_at.fail("component given twice (names are compared without regard to case)", written)
        seen.add(name)
        if normalize:
            fractions[name] = read_quantity(item, "dimensionless", item_at, minimum=0.0)
        else:
            fractions[name] = read_quantity(item, "dimensionless", item_at, minimum=0.0, maximum=1.0)
    total = sum(fractions.values())
    if not math.isfinite(total) or total <= 0.0:
        at.fail("the fractions add up to zero", plain(table), "fractions that add up to 1")
    if not normalize and abs(total - 1.0) > COMPOSITION_TOLERANCE:
        at.fail(
            f"the fractions add up to {total:.9g}, not 1 (write normalize = true in this feed to scale them)",
            plain(table),
            f"fractions that add up to 1 within {COMPOSITION_TOLERANCE:g}",
        )
    return tuple(fractions[name] / total for name in names)


def _mass_to_mole_fractions(
    mass_fractions: tuple[float, ...], names: tuple[str, ...], component_data: Mapping[str, ComponentData], at: At
) -> tuple[float, ...]:
    """x_i = (w_i / M_i) / sum_j (w_j / M_j); M from [components.data] or CoolProp."""
    moles = [
        fraction / component_molar_mass(name, component_data, at, "mass", "a mass basis") if fraction > 0.0 else 0.0
        for name, fraction in zip(names, mass_fractions)
    ]
    total = sum(moles)
    return tuple(m / total for m in moles)


def component_molar_mass(
    name: str, component_data: Mapping[str, ComponentData], at: At, value: Any, needs: str = "a mass basis"
) -> float:
    """Molar mass [kg/mol] of the case's component ``name``: from [components.data] or the
    handbook (``component_data``), else CoolProp's; a component without one fails at ``at``
    (``value`` the value shown, ``needs`` what asked for it)."""
    if name in component_data:
        return component_data[name].molar_mass
    try:
        return molar_mass_of(name)
    except CaseError as exc:
        at.fail(
            f"{needs} needs the molar mass of {name!r}: {exc.problem}; define it under [components.data]",
            value,
            "molar units and fractions, or components with known molar masses",
        )


def molar_mass_of(name: str) -> float:
    """Molar mass in kg/mol of the CoolProp fluid ``name``, matched case-insensitively against
    CoolProp's fluid names and their aliases (``AbstractState("HEOS", name).molar_mass()``, from
    the index of :mod:`solver.fluids`).
    Raises :class:`CaseError` (without a file) when CoolProp has no such fluid."""
    if not isinstance(name, str):
        raise CaseError("a component name is needed", value=name)
    from solver.fluids import coolprop_name, fluid_entry, name_index

    try:
        fluid = coolprop_name(name)
        names = name_index()[0]
    except Exception as exc:  # CoolProp not importable or not answering
        raise CaseError(f"CoolProp is not usable here ({exc})") from None
    if fluid is None:
        close = difflib.get_close_matches(name.strip().lower(), list(names), n=3, cutoff=0.7)
        hint = f" (did you mean {', '.join(repr(names[c]) for c in close)}?)" if close else ""
        raise CaseError(f"{name!r} is not a CoolProp fluid{hint}", value=name, expected="a CoolProp fluid name")
    molar_mass = fluid_entry(fluid)["molar_mass"]
    if not molar_mass > 0.0:
        raise CaseError(f"CoolProp cannot give the molar mass of {fluid!r}", value=name)
    return molar_mass
