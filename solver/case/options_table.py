"""The tables around the column: ``[check]`` (tolerances of a regression case), ``[display]``
(screen units) and ``[audit]`` (what the shortcut designs for, and the flag thresholds)."""

from __future__ import annotations

from types import MappingProxyType
from typing import Any, Mapping

from solver.case.column_table import MAX_STAGES
from solver.case.fields import At, Field, Reader, quantity, read_choice, read_fields, read_real, read_text
from solver.case.model import AUDIT_THRESHOLD_KEYS, DEFAULT_DISPLAY, TOLERANCE_KEYS, AuditOptions, Spec
from solver.case.specs_table import PRODUCTS, read_product_fractions
from solver.units import UnitParseError, flow_unit_kind, offset_scale, unit_factor

__all__ = ["read_audit_table", "read_check_table", "read_display_table"]

_TOLERANCE_FIELDS = {
    key: Field(quantity("temperature_difference" if key == "temperature_abs" else "dimensionless", above=0.0))
    for key in TOLERANCE_KEYS
}


def read_check_table(value: Any, at: At) -> dict[str, float]:
    """The tolerances given under ``[check] tolerances`` (the others take regress's defaults)."""
    read_fields(value, at, {"tolerances": Field()})
    return read_fields(value.get("tolerances", {}), at.child("tolerances"), _TOLERANCE_FIELDS)


def _unit_of(key: str, kind: str) -> Reader:
    """A reader of the screen unit ``key`` of [display], a unit of ``kind`` ("temperature": a
    temperature scale such as degC)."""

    def read(value: Any, at: At) -> str:
        unit = read_text(value, at, allow_empty=False, max_length=100).strip()
        try:
            if kind in ("temperature", "pressure"):  # may have an offset: degC, barg
                offset_scale(unit, kind)
            elif kind == "molar_flow":  # a molar or a mass flow
                flow_unit_kind(unit)
            else:
                unit_factor(unit, kind)
        except UnitParseError as exc:
            at.fail(str(exc), value, f"a unit such as {DEFAULT_DISPLAY[key]!r}")
        return unit

    return read


_DISPLAY_KINDS = {"temperature": "temperature", "pressure": "pressure", "flow": "molar_flow", "duty": "power"}
_DISPLAY_FIELDS = {key: Field(_unit_of(key, kind), default=DEFAULT_DISPLAY[key]) for key, kind in _DISPLAY_KINDS.items()}
#: How product compositions are shown (no default: the screen's is mole fractions).
_DISPLAY_FIELDS["composition"] = Field(
    lambda value, at: read_choice(value, at, ("mole fraction", "ppm", "mass fraction", "ppmw"))
)


def read_display_table(value: Any, at: At) -> dict[str, str]:
    """Screen units, each checked to be a unit of its kind; missing ones take the defaults."""
    return read_fields(value, at, _DISPLAY_FIELDS)


def _threshold(key: str) -> Reader:
    if key == "serious_factor":
        return quantity("dimensionless", above=1.0)
    if key in ("stage_difference", "pinch_shift"):  # numbers of stages
        return lambda value, at: read_real(value, at, minimum=0.0, maximum=MAX_STAGES)
    return quantity("dimensionless", above=0.0)


_THRESHOLD_FIELDS = {key: Field(_threshold(key)) for key in AUDIT_THRESHOLD_KEYS}
_AUDIT_FIELDS = {
    "distillate": Field(),
    "bottoms": Field(),
    "reflux_ratio": Field(quantity("dimensionless", above=0.0)),
    "reflux_factor": Field(quantity("dimensionless", above=1.0)),
    "thresholds": Field(),
}


def read_audit_table(value: Any, names: tuple[str, ...], at: At, component_data: Mapping | None = None) -> AuditOptions:
    """Product targets, reflux and thresholds for the audit's shortcut (see
    :class:`~solver.case.model.AuditOptions`)."""
    expected = "a table such as { distillate = { methanol = 0.99 }, reflux_factor = 1.3 }"
    fields = read_fields(value, at, _AUDIT_FIELDS, expected)
    products: list[Spec] = []
    for product in PRODUCTS:
        if product in value:
            products.extend(read_product_fractions(value[product], product, names, at.child(product), component_data))
    if len(names) == 2:
        for product in PRODUCTS:
            if len([spec for spec in products if spec.product == product]) > 1:
                at.child(product).fail(
                    "a binary product has one composition: give one of its mole fractions",
                    value[product], "one entry such as { water = 0.995 }",
                )
    if "reflux_ratio" in fields and "reflux_factor" in fields:
        at.child("reflux_factor").fail("cannot be combined with reflux_ratio", value["reflux_factor"], "one of the two")
    thresholds = read_fields(
        value.get("thresholds", {}), at.child("thresholds"), _THRESHOLD_FIELDS, "a table such as { cmo_deviation = 0.05 }"
    )
    return AuditOptions(
        tuple(products), fields.get("reflux_ratio"), fields.get("reflux_factor"), MappingProxyType(thresholds)
    )
