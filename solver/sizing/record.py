"""The sizing as plain data (SI) for result.json "sizing", and its flags.

The section "sizing" of result.json holds: the inputs used (``options``) and the basis of the
CMO comparison, the source of every pure-component property, per section the rigorous and the
CMO diameters with their controlling stages and the difference (the headline), the section as
built (diameter, largest fraction of flood, pressure drop, real trays or packed height), the
overall efficiency, per stage the properties, both traffics and the fractions of flood, the
flags and notes.
"""

from __future__ import annotations

import dataclasses
from typing import TYPE_CHECKING, Any

import numpy as np

from ..audit.flags import Flag, by_severity
from ..audit.record import flag_record
from ..results import json_safe
from .flags import cmo_undersized, near_flood

if TYPE_CHECKING:
    from .column import ColumnSizing

__all__ = ["CMO_BASIS", "sizing_flags", "sizing_record"]

#: How the CMO traffic is taken (for the record and the reports).
CMO_BASIS = ("CMO traffic: the operating-line section flows L = R D, V = (R + 1) D above the feed, L + q F and "
             "V - (1 - q) F below it, at the rigorous column's reflux ratio, distillate rate and feed q; sized with "
             "the same physical properties (rigorous stage temperatures and compositions)")


def sizing_flags(sizing: ColumnSizing) -> tuple[Flag, ...]:
    """CMO_UNDERSIZED for each section the CMO traffic sizes too small, NEAR_FLOOD for the
    column as sized (or rated) and for the CMO-sized column."""
    thresholds = sizing.options.thresholds
    stages = sizing.stages
    flags: list[Flag | None] = [near_flood("the column as " + ("rated" if sizing.options.diameter else "sized"),
                                           stages, sizing.rating.fraction_of_flood, thresholds)]
    if sizing.cmo is not None and sizing.cmo_column_rating is not None:
        flood = sizing.cmo_column_rating.fraction_of_flood
        for k, section in enumerate(sizing.sections):
            mask = section.section.mask(stages)
            worst = int(np.argmax(np.where(mask, flood, -np.inf)))
            flags.append(cmo_undersized(section.section, sizing.rigorous.section_diameters[k],
                                        sizing.cmo.section_diameters[k], sizing.rigorous.controlling_stages[k],
                                        sizing.cmo.controlling_stages[k], float(flood[worst]), int(stages[worst]),
                                        thresholds))
        flags.append(near_flood("the column the CMO traffic would have sized", stages, flood, thresholds))
    return by_severity(flags)


def _headline(sizing: ColumnSizing) -> list[dict[str, Any]]:
    rows = []
    for k, section in enumerate(sizing.sections):
        s = section.section
        row = {"section": s.name, "first_stage": s.first, "last_stage": s.last,
               "rigorous_diameter": sizing.rigorous.section_diameters[k],
               "rigorous_controlling_stage": sizing.rigorous.controlling_stages[k],
               "cmo_diameter": None, "cmo_controlling_stage": None, "cmo_difference": None, "larger": None}
        if sizing.cmo is not None:
            difference = sizing.cmo_differences[k]
            row.update(cmo_diameter=sizing.cmo.section_diameters[k],
                       cmo_controlling_stage=sizing.cmo.controlling_stages[k], cmo_difference=difference,
                       larger="rigorous" if difference < 0 else ("cmo" if difference > 0 else "equal"))
        rows.append(row)
    return rows


def _sections(sizing: ColumnSizing) -> list[dict[str, Any]]:
    return [{"section": s.section.name, "first_stage": s.section.first, "last_stage": s.section.last,
             "diameter": s.diameter, "controlling_stage": s.controlling_stage,
             "largest_fraction_of_flood": s.largest_fraction_of_flood, "largest_flood_stage": s.largest_flood_stage,
             "pressure_drop": s.pressure_drop, "theoretical_stages": s.theoretical_stages, "real_trays": s.real_trays,
             "packed_height": s.packed_height, "hetp": s.hetp} for s in sizing.sections]


def _stages(sizing: ColumnSizing) -> list[dict[str, Any]]:
    props, rigorous, cmo = sizing.properties, sizing.rigorous, sizing.cmo
    rows = []
    for k, stage in enumerate(sizing.stages):
        j = int(stage) - 1
        row = {
            "stage": int(stage), "liquid_density": props.liquid_density[j], "vapor_density": props.vapor_density[j],
            "surface_tension": props.surface_tension[j], "liquid_viscosity": props.liquid_viscosity[j],
            "vapor_flow": rigorous.traffic.vapor_flow[k], "liquid_flow": rigorous.traffic.liquid_flow[k],
            "vapor_mass_flow": rigorous.vapor_mass_flow[k], "liquid_mass_flow": rigorous.liquid_mass_flow[k],
            "needed_diameter": rigorous.needed_diameter[k], "fraction_of_flood": sizing.rating.fraction_of_flood[k],
            "pressure_drop": sizing.rating.pressure_drop[k], "liquid_load": sizing.rating.liquid_load[k],
        }
        if cmo is not None:
            row["cmo"] = {"vapor_flow": cmo.traffic.vapor_flow[k], "liquid_flow": cmo.traffic.liquid_flow[k],
                          "needed_diameter": cmo.needed_diameter[k],
                          "fraction_of_flood_of_rigorous_traffic_in_cmo_column":
                              sizing.cmo_column_rating.fraction_of_flood[k]}
        rows.append(row)
    return rows


def _plain(value: Any) -> Any:
    """Dataclasses and mappings (read-only ones too) as plain dicts."""
    if dataclasses.is_dataclass(value):
        return {f.name: _plain(getattr(value, f.name)) for f in dataclasses.fields(value)}
    if hasattr(value, "items"):
        return {str(k): _plain(v) for k, v in value.items()}
    return value


def sizing_record(sizing: ColumnSizing) -> dict[str, Any]:
    """result.json "sizing" (module docstring)."""
    options = _plain(sizing.options)
    efficiency = sizing.efficiency
    return json_safe({
        "internals": sizing.options.internals,
        "options": options,
        "units": {"diameter": "m", "pressure_drop": "Pa (section); Pa per tray or Pa/m of packing (stages)",
                  "density": "kg/m3", "surface_tension": "N/m", "viscosity": "Pa s", "flow": "mol/s",
                  "mass_flow": "kg/s", "liquid_load": "m3/(h m) weir loading (trays), Robbins' Lf (packing)"},
        "cmo_basis": CMO_BASIS if sizing.cmo is not None else None,
        "cmo_not_applicable": sizing.cmo_reason or None,
        "diameters": _headline(sizing),
        "sections": _sections(sizing),
        "efficiency": None if efficiency is None else {
            "method": "O'Connell (1946), Lockett's fit E = 0.492 (alpha mu)^-0.245",
            "value": efficiency.value, "relative_volatility": efficiency.relative_volatility,
            "viscosity": efficiency.viscosity, "temperature": efficiency.temperature,
            "light_key": efficiency.light_key, "heavy_key": efficiency.heavy_key, "in_range": efficiency.in_range},
        "efficiency_note": sizing.efficiency_note or None,
        "property_sources": list(sizing.property_sources),
        "stages": _stages(sizing),
        "flags": [flag_record(flag) for flag in sizing.flags],
        "notes": list(sizing.notes),
    })
