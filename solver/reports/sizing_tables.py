"""The sizing section of what a person reads (``traystack size``, and ``run`` and ``audit``
when the case has a ``[sizing]`` table): first the headline -- each section's diameter from the
rigorous traffic beside the one the CMO traffic of the shortcut design would have given, which
is larger and by how much -- then the sizing table (diameter, controlling stage, % flood,
pressure drop, real trays or packed height) and the flags. Read from ``result.extra["sizing"]``
(a :class:`~solver.sizing.ColumnSizing`)."""

from __future__ import annotations

from typing import TYPE_CHECKING

from rich.console import Console
from rich.table import Table

from ..results import Result
from .display import cell, markdown_table, screen_table

if TYPE_CHECKING:  # read by attribute only
    from ..sizing import ColumnSizing

__all__ = ["SIZING_CAUTION", "diameter_rows", "print_sizing", "sizing_markdown", "sizing_rows", "sizing_tables"]

#: Shown under every sizing.
SIZING_CAUTION = ("Hydraulics are preliminary (Fair's flooding correlation, Robbins' pressure drop, rules of thumb for "
                  "downcomers and HETP); the tray or packing maker's data and rating decide the hardware.")


def _larger(difference: float) -> str:
    if difference != difference:  # NaN
        return "-"
    if abs(difference) < 5e-4:
        return "equal"
    return f"CMO by {100 * difference:.1f} %" if difference > 0 else f"rigorous by {100 * -difference:.1f} %"


def diameter_rows(sizing: ColumnSizing) -> tuple[list[str], list[list[str]]]:
    """The headline: per section the rigorous and the CMO diameters, their controlling stages
    and which is larger."""
    header = ["section", "stages", "D rigorous / m", "set by stage", "D CMO / m", "set by stage", "larger"]
    rows = []
    for k, section in enumerate(sizing.sections):
        s = section.section
        cmo = sizing.cmo
        rows.append([s.name, f"{s.first}-{s.last}", cell(sizing.rigorous.section_diameters[k], ".3f"),
                     str(sizing.rigorous.controlling_stages[k]),
                     "-" if cmo is None else cell(cmo.section_diameters[k], ".3f"),
                     "-" if cmo is None else str(cmo.controlling_stages[k]), _larger(sizing.cmo_differences[k])])
    return header, rows


def sizing_rows(sizing: ColumnSizing) -> tuple[list[str], list[list[str]]]:
    """The column as built: section, diameter, controlling stage, largest % flood (and its
    stage), pressure drop, real trays or packed height."""
    packed = sizing.options.packed
    header = ["section", "diameter / m", "controlling stage", "largest % flood", "pressure drop / kPa",
              "theoretical stages", "packed height / m" if packed else "real trays"]
    rows = []
    for s in sizing.sections:
        rows.append([s.section.name, cell(s.diameter, ".3f"), str(s.controlling_stage),
                     f"{100 * s.largest_fraction_of_flood:.0f} (stage {s.largest_flood_stage})",
                     cell(s.pressure_drop / 1e3, ".3g"), str(s.theoretical_stages),
                     cell(s.packed_height, ".3g") if packed else str(s.real_trays)])
    return header, rows


def _basis_lines(sizing: ColumnSizing, result: Result) -> list[str]:
    options = sizing.options
    if options.packed:
        packing = options.packing
        what = (f"{options.internals} packing, packing factor {packing.packing_factor * 0.3048:.3g} 1/ft "
                f"({packing.source}), {100 * options.flood_fraction:.0f} % of flood")
    else:
        what = (f"{options.internals} trays, spacing {options.tray_spacing:.3g} m, {100 * options.flood_fraction:.0f} % "
                f"of flood, downcomer by {options.downcomer.rule.replace('_', ' ')}")
    if options.diameter is not None:
        what += f"; rated at the given diameter {options.diameter:.3g} m"
    lines = [f"Internals: {what}."]
    if sizing.cmo is None:
        lines.append(f"No CMO comparison: {sizing.cmo_reason}.")
    else:
        from ..sizing import CMO_BASIS

        lines.append(CMO_BASIS + ".")
    efficiency = sizing.efficiency
    if efficiency is not None and not options.packed:
        lines.append(f"Overall efficiency (O'Connell): {efficiency.value:.3f} at alpha {efficiency.light_key}/"
                     f"{efficiency.heavy_key} = {efficiency.relative_volatility:.3g}, feed liquid viscosity "
                     f"{1000 * efficiency.viscosity:.3g} mPa s, {efficiency.temperature - 273.15:.1f} degC"
                     + (f" ({sizing.efficiency_note})" if sizing.efficiency_note else "") + ".")
    elif sizing.efficiency_note and not options.packed:
        lines.append(f"No overall efficiency: {sizing.efficiency_note}; real trays = theoretical stages.")
    murphree = result.stated_efficiencies[sizing.stages - 1]
    if not options.packed and murphree.min() < 1.0:
        lines.append(f"The case gives Murphree vapor efficiencies {murphree.min():.3g} to {murphree.max():.3g}: its "
                     "stages are real trays already, so real trays = stages (O'Connell's efficiency above is for "
                     "comparison).")
    return lines + list(sizing.notes)


def sizing_tables(result: Result) -> list[Table]:
    """Screen tables: the headline, the sizing table, the flags (with the basis as captions)."""
    sizing: ColumnSizing = result.extra["sizing"]
    header, rows = diameter_rows(sizing)
    headline = screen_table("diameters: rigorous traffic against the CMO traffic of the shortcut design", header, rows,
                            left=2)
    header, rows = sizing_rows(sizing)
    built = screen_table(f"column hardware: {result.title}", header, rows)
    built.caption = "\n".join(_basis_lines(sizing, result))
    built.caption_justify = "left"
    tables = [headline, built]
    flags = Table(title="sizing flags", header_style="bold")
    for column in ("severity", "code", "message"):
        flags.add_column(column, overflow="fold")
    for flag in sizing.flags:
        flags.add_row(flag.severity, flag.code, flag.message)
    if not sizing.flags:
        flags.add_row("-", "-", "no flags: the CMO sizes are within the threshold and no stage is near flood")
    tables.append(flags)
    return tables


def print_sizing(result: Result, console: Console) -> None:
    """The sizing's tables and caution on ``console`` (nothing without a sizing)."""
    if "sizing" not in result.extra:
        return
    for table in sizing_tables(result):
        console.print(table)
    console.print(SIZING_CAUTION, style="dim")


def sizing_markdown(result: Result, units: object = None) -> list[str]:
    """The sizing's sections of summary.md (empty without a sizing)."""
    sizing: ColumnSizing | None = result.extra.get("sizing")
    if sizing is None:
        return []
    lines = ["## Diameters: rigorous against CMO traffic", ""]
    header, rows = diameter_rows(sizing)
    lines += markdown_table(header, rows, [False, False] + [True] * 5)
    lines += ["", "## Column hardware", ""]
    header, rows = sizing_rows(sizing)
    lines += markdown_table(header, rows, [False] + [True] * 6)
    lines += [""] + [f"- {line}" for line in _basis_lines(sizing, result)] + [""]
    lines += ["Sizing flags:", ""]
    lines += [f"- [{f.severity}] {f.code}: {f.message}" for f in sizing.flags] or ["- none"]
    lines += ["", f"_{SIZING_CAUTION}_", ""]
    return lines
