"""The optional ``[sizing]`` table of a case file: what ``traystack size`` (and ``run`` and
``audit`` when the table is there) needs to turn the column's traffic into hardware.

Read by :func:`read_sizing_table`, called from the case reader with the table, the case's
component names and its place in the file (an object with ``child(name)`` and
``fail(problem, value, expected)``, as the case reader's). Every error names the file, the
key, the value and what was expected. Values are SI after reading.

Keys (defaults in brackets; the reasons are in :mod:`solver.sizing`):

- ``internals``: "sieve" | "valve" | "random" | "structured" ["sieve"];
- ``tray_spacing`` ["0.6 m"], ``flood_fraction`` (design fraction of flood, [0.8]),
  ``system_factor`` (foaming derating, [1.0]), ``hole_area_fraction`` (hole area over active
  area, [0.1]), ``weir_height`` ["50 mm"];
- ``downcomer`` = {``rule`` = "flow_parameter" | "residence_time" | "velocity",
  ``residence_time`` ["4 s"], ``velocity`` ["0.1 m/s"], ``minimum_fraction`` [0.1]};
- ``packing`` = {``packing_factor`` (Robbins' dry packing factor, e.g. "24 1/ft"),
  ``flood_packing_factor`` (for the flood pressure drop; else ``packing_factor``),
  ``nominal_size`` (random) or ``specific_area`` (structured) for the HETP rule of thumb, or
  ``hetp``; ``source`` (required)} -- needed for random and structured packings;
- ``diameter``: rate a column of this diameter instead of sizing one;
- ``thresholds`` = {``cmo_diameter`` [0.05], ``flood`` [0.85]};
- ``[sizing.components.NAME]``: ``liquid_density``, ``surface_tension``, ``liquid_viscosity``
  (values at column conditions, for components whose data lack them) and ``source``.
"""

from __future__ import annotations

import difflib
import math
from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Any, Mapping

from solver.case.fields import check_keys, read_choice, read_table, read_text
from solver.units import UnitParseError, to_si

__all__ = [
    "DEFAULT_SIZING_THRESHOLDS",
    "DOWNCOMER_RULES",
    "INTERNALS",
    "PACKED",
    "ComponentHydraulicData",
    "DowncomerRule",
    "PackingData",
    "SizingOptions",
    "read_sizing_table",
]

#: Kinds of column internals.
INTERNALS = ("sieve", "valve", "random", "structured")
#: The packed ones.
PACKED = ("random", "structured")
#: Rules for the downcomer area.
DOWNCOMER_RULES = ("flow_parameter", "residence_time", "velocity")
#: Thresholds of the sizing flags: a section whose CMO-sized diameter is smaller than the
#: rigorous one by more than ``cmo_diameter`` (relative), a stage above ``flood`` of flood.
DEFAULT_SIZING_THRESHOLDS: Mapping[str, float] = MappingProxyType({"cmo_diameter": 0.05, "flood": 0.85})

_KEYS = ("internals", "tray_spacing", "flood_fraction", "system_factor", "hole_area_fraction", "weir_height",
         "downcomer", "packing", "diameter", "thresholds", "components")
_DOWNCOMER_KEYS = ("rule", "residence_time", "velocity", "minimum_fraction")
_PACKING_KEYS = ("packing_factor", "flood_packing_factor", "nominal_size", "specific_area", "hetp", "source")
_COMPONENT_KEYS = ("liquid_density", "surface_tension", "liquid_viscosity", "source")
_EXAMPLES = {
    "length": "a length such as '0.6 m', '24 in' or '50 mm' (a plain number is m)",
    "time": "a time such as '4 s' (a plain number is s)",
    "velocity": "a velocity such as '0.1 m/s' (a plain number is m/s)",
    "mass_density": "a density such as '790 kg/m**3' (a plain number is kg/m**3)",
    "surface_tension": "a surface tension such as '22 mN/m' or '22 dyn/cm' (a plain number is N/m)",
    "viscosity": "a viscosity such as '0.4 mPa*s' or '0.4 cP' (a plain number is Pa*s)",
    "inverse_length": "a packing factor or area such as '24 1/ft' or '250 m**2/m**3' (a plain number is 1/m)",
    "dimensionless": "a number such as 0.8 or '80 %'",
}


@dataclass(frozen=True)
class DowncomerRule:
    """How the downcomer area is set: ``flow_parameter`` (a fraction of the column area from
    the flow parameter), ``residence_time`` (clear liquid held ``residence_time`` s over the
    tray spacing) or ``velocity`` (clear liquid at most ``velocity`` m/s), the last two never
    below ``minimum_fraction`` of the column area."""

    rule: str = "flow_parameter"
    residence_time: float = 4.0  # s
    velocity: float = 0.1  # m/s
    minimum_fraction: float = 0.1


@dataclass(frozen=True)
class PackingData:
    """A packing: Robbins' dry packing factor ``packing_factor`` (1/m), the packing factor of
    the flood pressure drop ``flood_packing_factor`` (1/m; None: the same), ``nominal_size``
    (m, random) or ``specific_area`` (1/m, structured) for the HETP rule of thumb, or
    ``hetp`` (m), and the ``source`` of the numbers."""

    packing_factor: float
    source: str
    flood_packing_factor: float | None = None
    nominal_size: float | None = None
    specific_area: float | None = None
    hetp: float | None = None


@dataclass(frozen=True)
class ComponentHydraulicData:
    """Values given for one component at column conditions (SI; None: not given)."""

    name: str
    liquid_density: float | None = None  # kg/m3
    surface_tension: float | None = None  # N/m
    liquid_viscosity: float | None = None  # Pa s
    source: str = ""


@dataclass(frozen=True)
class SizingOptions:
    """The ``[sizing]`` table in SI (see the module docstring)."""

    internals: str = "sieve"
    tray_spacing: float = 0.6  # m
    flood_fraction: float = 0.8
    system_factor: float = 1.0
    hole_area_fraction: float = 0.1
    weir_height: float = 0.05  # m
    downcomer: DowncomerRule = DowncomerRule()
    packing: PackingData | None = None
    diameter: float | None = None  # m
    thresholds: Mapping[str, float] = field(default_factory=lambda: MappingProxyType(dict(DEFAULT_SIZING_THRESHOLDS)))
    components: Mapping[str, ComponentHydraulicData] = field(default_factory=lambda: MappingProxyType({}))

    @property
    def packed(self) -> bool:
        return self.internals in PACKED


def read_sizing_table(value: Any, names: tuple[str, ...], at: Any) -> SizingOptions:
    """The ``[sizing]`` table ``value`` of a case whose components are ``names``; ``at`` is
    its place in the file (``child``, ``fail``)."""
    table = read_table(value, at)
    check_keys(table, at, _KEYS)
    internals = read_choice(table.get("internals", "sieve"), at.child("internals"), INTERNALS)
    options: dict[str, Any] = {"internals": internals}
    for key, kind, low, high in (("tray_spacing", "length", 0.15, 1.5), ("flood_fraction", "dimensionless", 0.3, 1.0),
                                 ("system_factor", "dimensionless", 0.3, 1.0),
                                 ("hole_area_fraction", "dimensionless", 0.04, 0.25),
                                 ("weir_height", "length", 0.0, 0.15), ("diameter", "length", 0.05, 20.0)):
        if key in table:
            options[key] = _quantity(table[key], kind, at.child(key), low, high)
    if "downcomer" in table:
        options["downcomer"] = _read_downcomer(table["downcomer"], at.child("downcomer"))
    if "packing" in table:
        options["packing"] = _read_packing(table["packing"], internals, at.child("packing"))
    elif internals in PACKED:
        at.child("packing").fail(f"missing: internals = {internals!r} needs the packing's data",
                                 expected="packing = { packing_factor = '...', nominal_size or specific_area or hetp, "
                                          "source = '...' }")
    if "thresholds" in table:
        options["thresholds"] = _read_thresholds(table["thresholds"], at.child("thresholds"))
    if "components" in table:
        options["components"] = _read_components(table["components"], names, at.child("components"))
    return SizingOptions(**options)


# --- the parts of the table ---------------------------------------------------------------


def _read_downcomer(value: Any, at: Any) -> DowncomerRule:
    table = read_table(value, at)
    check_keys(table, at, _DOWNCOMER_KEYS)
    rule = read_choice(table.get("rule", "flow_parameter"), at.child("rule"), DOWNCOMER_RULES)
    values: dict[str, Any] = {"rule": rule}
    for key, kind, low, high in (("residence_time", "time", 1.0, 30.0), ("velocity", "velocity", 0.01, 1.0),
                                 ("minimum_fraction", "dimensionless", 0.02, 0.4)):
        if key in table:
            values[key] = _quantity(table[key], kind, at.child(key), low, high)
    return DowncomerRule(**values)


def _read_packing(value: Any, internals: str, at: Any) -> PackingData:
    table = read_table(value, at)
    check_keys(table, at, _PACKING_KEYS)
    if internals not in PACKED:
        at.fail(f"a packing is given but internals = {internals!r}", expected="internals = 'random' or 'structured'")
    for required in ("packing_factor", "source"):
        if required not in table:
            at.child(required).fail("missing", expected=f"a value for {required!r} (packing factors are the packing "
                                                        "maker's or a handbook's: name it in source)")
    values: dict[str, Any] = {"source": read_text(table["source"], at.child("source"), allow_empty=False, max_length=2000)}
    for key, kind, low, high in (("packing_factor", "inverse_length", 1.0, 3000.0),
                                 ("flood_packing_factor", "inverse_length", 1.0, 3000.0),
                                 ("nominal_size", "length", 0.005, 0.2), ("specific_area", "inverse_length", 20.0, 1500.0),
                                 ("hetp", "length", 0.05, 3.0)):
        if key in table:
            values[key] = _quantity(table[key], kind, at.child(key), low, high)
    if not any(key in table for key in ("hetp", "nominal_size", "specific_area")):
        at.fail("the packing needs hetp, or nominal_size (random) or specific_area (structured) for the HETP rule",
                expected="hetp = '0.5 m', nominal_size = '50 mm' or specific_area = '250 m**2/m**3'")
    if "hetp" not in table:
        wanted = "nominal_size" if internals == "random" else "specific_area"
        if wanted not in table:
            at.child(wanted).fail(f"missing: the HETP rule of thumb for {internals} packings needs it", expected=
                                  "'50 mm' (nominal size)" if wanted == "nominal_size" else "'250 m**2/m**3' (area)")
    return PackingData(**values)


def _read_thresholds(value: Any, at: Any) -> Mapping[str, float]:
    table = read_table(value, at)
    check_keys(table, at, tuple(DEFAULT_SIZING_THRESHOLDS))
    chosen = dict(DEFAULT_SIZING_THRESHOLDS)
    for key, item in table.items():
        chosen[key] = _quantity(item, "dimensionless", at.child(key), 0.0, 1.0)
    return MappingProxyType(chosen)


def _read_components(value: Any, names: tuple[str, ...], at: Any) -> Mapping[str, ComponentHydraulicData]:
    table = read_table(value, at)
    found: dict[str, ComponentHydraulicData] = {}
    for written, entry in table.items():
        where = at.child(written)
        name = str(written).strip().lower()
        if name not in names:
            close = difflib.get_close_matches(name, names, n=1, cutoff=0.6)
            hint = f"; did you mean {close[0]!r}?" if close else ""
            where.fail(f"not a component of this case{hint}", written, "one of components.names: " + ", ".join(names))
        entry = read_table(entry, where)
        check_keys(entry, where, _COMPONENT_KEYS)
        values: dict[str, Any] = {"name": name, "source": read_text(entry.get("source", ""), where.child("source"), max_length=2000)}
        for key, kind, low, high in (("liquid_density", "mass_density", 100.0, 3000.0),
                                     ("surface_tension", "surface_tension", 1e-4, 0.2),
                                     ("liquid_viscosity", "viscosity", 1e-5, 1.0)):
            if key in entry:
                values[key] = _quantity(entry[key], kind, where.child(key), low, high)
        if len(values) > 2 and not values["source"]:
            where.child("source").fail("missing", expected="where the values come from (handbook, paper, measurement)")
        found[name] = ComponentHydraulicData(**values)
    return MappingProxyType(found)


# --- single values -----------------------------------------------------------------------


def _quantity(value: Any, kind: str, at: Any, low: float, high: float) -> float:
    """A number in the SI unit of ``kind`` or a string with units, within [low, high] (SI)."""
    try:
        number = to_si(value, kind)
    except UnitParseError as exc:
        at.fail(str(exc), value, _EXAMPLES[kind])
    if not (math.isfinite(number) and low <= number <= high):
        at.fail("out of range", value, f"a value from {low:g} to {high:g} in SI units ({_EXAMPLES[kind]})")
    return number
