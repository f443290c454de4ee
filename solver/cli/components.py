"""``traystack components``: search CoolProp's fluids and the handbook library, or show one
component's properties with their sources."""

from __future__ import annotations

import argparse

from rich.table import Table

from ..errors import CaseError
from .common import console_for

__all__ = ["add_components_command", "command_components"]


def command_components(args: argparse.Namespace) -> int:
    """List the CoolProp fluids and handbook compounds a pattern finds, or show one component's
    properties with their sources. Reads shipped indexes; CoolProp or ``chemicals`` is imported
    only to show one component's properties."""
    from ..catalog import close_names, coolprop_fluid, exact_handbook, matches

    console = console_for()
    pattern = args.pattern
    if pattern and not any(ch in pattern for ch in "*?["):
        fluid, entry = coolprop_fluid(pattern), exact_handbook(pattern)
        if fluid is not None or entry is not None:
            if fluid is not None:
                _show_coolprop_fluid(console, fluid)
            if entry is not None:
                _show_handbook_compound(console, entry.name, used=fluid is None)
            return 0
    found = matches(pattern)
    if not found.coolprop and not found.handbook:
        close = close_names(pattern or "")
        hint = "; did you mean " + " or ".join(repr(n) for n in close) + "?" if close else ""
        raise CaseError(f"no CoolProp fluid or handbook compound matches {pattern!r}{hint}", key="PATTERN")
    if found.coolprop:
        table = Table(title="CoolProp fluids (reference equations of state; used by default)", header_style="bold")
        for column in ("name", "M / g/mol", "Tb / °C", "Tc / °C", "Pc / bar", "source"):
            table.add_column(column, justify="left" if column in ("name", "source") else "right")
        for fluid in found.coolprop:
            Tb = fluid.normal_boiling_point
            table.add_row((fluid.name), f"{fluid.molar_mass * 1000:.3f}", f"{Tb - 273.15:.2f}" if Tb else "-",
                          f"{fluid.critical_temperature - 273.15:.2f}", f"{fluid.critical_pressure / 1e5:.3f}",
                          f"CoolProp {(fluid.coolprop_name)} reference EOS")
        console.print(table)
    if found.handbook:
        table = Table(title="handbook library (correlations from published tables; estimates)", header_style="bold")
        for column in ("name", "CAS", "formula", "also called", "source"):
            table.add_column(column)
        for entry in found.handbook:
            table.add_row((entry.name), entry.cas, (entry.formula), (", ".join(entry.synonyms[:3])),
                          "handbook tables per property")
        console.print(table)
    console.print((
        f"{len(found.coolprop)} CoolProp fluid(s), {len(found.handbook)} handbook compound(s). "
        "`traystack components NAME` shows one component's properties with their sources. A case takes a name "
        "from CoolProp when CoolProp has it, else from the handbook; [components] from_handbook = [...] chooses "
        "the handbook; others can be defined under [components.data.NAME]."))
    return 0


def _show_coolprop_fluid(console, fluid) -> None:
    from ..components import coolprop_source

    source = (coolprop_source(fluid.coolprop_name))
    table = Table(title=f"{(fluid.name)}: CoolProp fluid (used unless from_handbook lists it)", header_style="bold")
    for column in ("property", "value", "source"):
        table.add_column(column)
    Tb = fluid.normal_boiling_point
    for prop, value in (("molar mass", f"{fluid.molar_mass * 1000:.3f} g/mol"),
                        ("normal boiling point", f"{Tb:.2f} K" if Tb else "-"),
                        ("critical temperature", f"{fluid.critical_temperature:.2f} K"),
                        ("critical pressure", f"{fluid.critical_pressure / 1e6:.4g} MPa"),
                        ("saturation, latent heat, liquid volume, cp0", "fits to the equation of state")):
        table.add_row(prop, value, source)
    console.print(table)


def _show_handbook_compound(console, name: str, *, used: bool) -> None:
    from ..handbook import lookup, property_rows

    component = lookup(name, key="PATTERN")
    when = "used for this name" if used else "used when from_handbook lists it"
    table = Table(title=f"{(component.name)} ({component.cas}, {(component.formula)}): handbook library, "
                        f"{when}", header_style="bold")
    for column in ("property", "value or form", "range", "source"):
        table.add_column(column)
    for row in property_rows(component):
        table.add_row((row["property"]), (row["value"] or row["form"]), (row["range"]),
                      (row["source"]))
    console.print(table)
    console.print(("Handbook correlations are fits to measured data within their ranges and estimates beyond "
                         "them (extrapolated toward the critical point, with a note in the result)."))


def add_components_command(sub) -> None:
    components = sub.add_parser(
        "components", help="search CoolProp's fluids and the handbook library; NAME shows a component's sources")
    components.add_argument("pattern", nargs="?", help="part of a name, synonym, CAS number or formula, a glob "
                            "such as 'n-*', or one component's exact name")
    components.set_defaults(handler=command_components)
