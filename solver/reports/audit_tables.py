"""The shortcut and audit sections of what a person reads (``traystack shortcut`` and
``traystack audit``): the designs side by side with the rigorous columns, what the shortcut
designs for, the CMO audit stage by stage and the flags -- as screen tables and as the audit's
sections of summary.md. Everything is read from the typed findings attached to a result
(``result.extra["shortcut"]``, ``result.extra["audit"]``)."""

from __future__ import annotations

from typing import TYPE_CHECKING, Any, Callable, Sequence

from rich.table import Table
from rich.text import Text

from ..results import Result
from .display import DisplayUnits, cell, markdown_table, screen_table
from .run_tables import summary_tables

if TYPE_CHECKING:  # read by attribute only, so that showing a result does not load the audit's solvers
    from ..audit import AuditReport, CMOAudit, Flag, RigorousRun, ShortcutReport, SolutionAudit
    from ..shortcut import MinimumReflux

__all__ = [
    "SIDE_BY_SIDE_NOTE",
    "audit_markdown",
    "audit_tables",
    "basis_rows",
    "cmo_rows",
    "flag_rows",
    "ideal_vapor_rows",
    "shortcut_rows",
    "shortcut_tables",
    "side_by_side_rows",
]

#: What the columns of the side-by-side table are.
SIDE_BY_SIDE_NOTE = (
    "Rigorous columns: 'at design' has the shortcut's stage count, feed stage, reflux ratio and distillate rate; "
    "'R needed' its stage count and feed stage with the product targets as specs; 'N needed' its reflux ratio and "
    "distillate rate with the stage count searched and the feed stage moved; 'the case' is the case as specified. "
    "Impurity ratio k is the delivered impurity of target k over the specified one (above 1: the target is missed). "
    "'R for exactly its stages' is the shortcut's own reflux ratio for its integer stage count."
)

#: What the ideal-vapor comparison is.
IDEAL_VAPOR_NOTE = (
    "The reflux ratio needed at the shortcut's stage count and the stage count needed at its reflux ratio, both for "
    "the same product targets, from the equation of state and from ideal-vapor K-values (modified Raoult's law, "
    "K_i = Psat_i / P, vapor pressures from CoolProp or the handbook library): how far ideal-vapor K-values would "
    "move the design (flag IDEAL_VAPOR_SHIFT beyond the reflux_difference or stage_difference threshold)."
)

_NO_FLAGS = "the shortcut and the rigorous column agree within the thresholds"


def _pinch_text(pinch: MinimumReflux | None) -> str:
    if pinch is None:
        return "-"
    text = f"{pinch.ratio:.4g} ({pinch.pinch}"
    if pinch.pinch == "tangent":
        text += f", {pinch.section} at x = {pinch.x:.3f}; feed pinch {pinch.feed_pinch_ratio:.4g}"
    return text + ")"


def _designs(shortcut: ShortcutReport) -> list[Any]:
    """The designs shown side by side: McCabe-Thiele and Ponchon-Savarit, or FUGK."""
    if shortcut.is_binary and shortcut.enthalpy_design is not None:
        return [shortcut.design, shortcut.enthalpy_design]
    return [shortcut.design]


def _method_label(shortcut: ShortcutReport, design: Any) -> str:
    return design.method if shortcut.is_binary else "FUGK"


def shortcut_rows(shortcut: ShortcutReport, units: DisplayUnits) -> tuple[list[str], list[list[str]]]:
    """(header, rows) of the shortcut designs alone: McCabe-Thiele beside Ponchon-Savarit for
    a binary, Fenske-Underwood-Gilliland-Kirkbride otherwise."""
    F, Q = units.F, units.Q
    designs = _designs(shortcut)
    design = shortcut.design
    header = ["quantity"] + [_method_label(shortcut, d) for d in designs]
    rows = [
        ["stages (condenser and reboiler included)"] + [str(d.stages) for d in designs],
        ["feed stage"] + [str(d.feed_stage) for d in designs],
        ["equilibrium stages (fractional)"] + [cell(d.equilibrium_stages, ".3f") for d in designs],
        ["minimum stages (total reflux)"] + [cell(d.minimum_stages, ".3f") for d in designs],
        ["reflux ratio L/D"] + [cell(d.reflux_ratio) for d in designs],
    ]
    if shortcut.is_binary:
        rows.append(["minimum reflux ratio (pinch)"] + [_pinch_text(d.minimum_reflux) for d in designs])
        rows.append(["feed q"] + [cell(d.q) for d in designs])
        rows.append([f"x {design.light} distillate / bottoms"]
                    + [f"{d.x_distillate:.6f} / {d.x_bottoms:.6f}" for d in designs])
    else:
        rows.append(["minimum reflux ratio (Underwood)", cell(design.minimum_reflux)])
        rows.append(["keys (light / heavy)", f"{design.light_key} / {design.heavy_key}"])
        rows.append(["distributing components", ", ".join(design.distributing_components)])
        rows.append(["feed q", cell(design.q)])
    rows += [
        [f"distillate / {units.molar_flow}"] + [cell(F(d.distillate_flow), ".5g") for d in designs],
        [f"bottoms / {units.molar_flow}"] + [cell(F(d.bottoms_flow), ".5g") for d in designs],
        [f"condenser duty / {units.duty}"] + [cell(Q(d.condenser_duty), ".5g") for d in designs],
        [f"reboiler duty / {units.duty}"] + [cell(Q(d.reboiler_duty), ".5g") for d in designs],
    ]
    return header, rows


def basis_rows(shortcut: ShortcutReport) -> list[list[str]]:
    """[what, value, where it came from] for the shortcut's targets and reflux."""
    basis = shortcut.basis
    sources = basis.sources
    rows = [[f"target {k + 1}", text, sources.get(f"target {k + 1}", "")]
            for k, text in enumerate(basis.described_targets)]
    if basis.reflux_factor:
        reflux = f"{basis.reflux_factor:.4g} x minimum reflux ratio"
    else:
        reflux = f"reflux ratio {basis.reflux_ratio:.6g}" if basis.reflux_ratio else "-"
    rows.append(["reflux", reflux, sources.get("reflux", "")])
    return rows


def _run_cell(run: RigorousRun | None, value_of: Callable[[RigorousRun], Any],
              convert: Callable[[float], float] | None = None, digits: str = ".4g") -> str:
    """A rigorous run's value in a table cell: "-" without the run, "failed" for a failed solve."""
    if run is None:
        return "-"
    if not run.converged:
        return "failed"
    value = value_of(run)
    return cell(convert(value) if convert is not None and value is not None else value, digits)


def side_by_side_rows(result: Result, units: DisplayUnits) -> tuple[list[str], list[list[str]]]:
    """(header, rows): the shortcut designs beside the rigorous columns of the audit -- at the
    shortcut's design, the reflux needed at its stage count, the stages needed at its reflux,
    and the case as specified when it was solved."""
    shortcut: ShortcutReport = result.extra["shortcut"]
    audit: AuditReport = result.extra["audit"]
    F, Q = units.F, units.Q
    designs = _designs(shortcut)
    search = audit.stages_needed
    runs = [("rigorous: at design", audit.at_design), ("rigorous: R needed", audit.reflux_needed),
            ("rigorous: N needed", None if search is None else search.run)]
    if audit.case_run is not None:
        efficiencies = shortcut.case.column.efficiencies
        real = f" (real stages, Murphree E {min(efficiencies):.3g})" if min(efficiencies) < 1.0 else ""
        runs.append((f"rigorous: the case{real}", audit.case_run))
    header = ["quantity"] + [_method_label(shortcut, d) for d in designs] + [label for label, _ in runs]
    blank = [""] * len(runs)
    rows = [
        ["stages"] + [str(d.stages) for d in designs] + [str(run.stages) if run else "-" for _, run in runs],
        ["feed stage"] + [str(d.feed_stage) for d in designs] + [str(run.feed_stage) if run else "-" for _, run in runs],
        ["reflux ratio L/D"] + [cell(d.reflux_ratio) for d in designs]
        + [_run_cell(run, lambda r: r.reflux_ratio) for _, run in runs],
    ]
    if audit.shortcut_reflux_at_stages is not None:
        rows.append(["R for exactly its stages", cell(audit.shortcut_reflux_at_stages)] + [""] * (len(header) - 2))
    rows.append(["minimum reflux ratio"] + [_pinch_text(d.minimum_reflux) if shortcut.is_binary else cell(d.minimum_reflux)
                                            for d in designs] + blank)
    rows.append([f"distillate / {units.molar_flow}"] + [cell(F(d.distillate_flow), ".5g") for d in designs]
                + [_run_cell(run, lambda r: r.distillate_flow, F, ".5g") for _, run in runs])
    for k in range(len(shortcut.basis.targets)):
        rows.append([f"impurity ratio {k + 1}"] + ["1" for _ in designs]
                    + [cell(run.impurity_ratios[k], ".3f") if run and run.converged and run.impurity_ratios
                       else ("failed" if run else "-") for _, run in runs])
    if shortcut.is_binary:
        light = shortcut.design.light
        i = list(result.components).index(light)
        rows.append([f"x {light} distillate"] + [f"{d.x_distillate:.6f}" for d in designs]
                    + [_run_cell(run, lambda r: r.distillate_composition[i], digits=".6f") for _, run in runs])
        rows.append([f"x {light} bottoms"] + [f"{d.x_bottoms:.6f}" for d in designs]
                    + [_run_cell(run, lambda r: r.bottoms_composition[i], digits=".6f") for _, run in runs])
    rows.append([f"condenser duty / {units.duty}"] + [cell(Q(d.condenser_duty), ".5g") for d in designs]
                + [_run_cell(run, lambda r: r.condenser_duty, Q, ".5g") for _, run in runs])
    rows.append([f"reboiler duty / {units.duty}"] + [cell(Q(d.reboiler_duty), ".5g") for d in designs]
                + [_run_cell(run, lambda r: r.reboiler_duty, Q, ".5g") for _, run in runs])
    return header, rows


def cmo_rows(cmo: CMOAudit, units: DisplayUnits) -> tuple[list[str], list[list[str]]]:
    """(header, rows) of the stage-by-stage CMO audit."""
    header = ["stage", f"L / {units.molar_flow}", f"L CMO / {units.molar_flow}", "L dev / %", f"V / {units.molar_flow}",
              f"V CMO / {units.molar_flow}", "V dev / %", "operating curve - line"]
    rows = []
    for j in range(cmo.liquid.size):
        rows.append([
            str(j + 1),
            cell(units.F(cmo.liquid[j]), ".5g"), cell(units.F(cmo.liquid_cmo[j]), ".5g"),
            cell(100 * cmo.liquid_deviation[j], "+.2f"),
            cell(units.F(cmo.vapor[j]), ".5g"), cell(units.F(cmo.vapor_cmo[j]), ".5g"),
            cell(100 * cmo.vapor_deviation[j], "+.2f"),
            cell(None if cmo.line_distance is None else cmo.line_distance[j], "+.5f"),
        ])
    return header, rows


def flag_rows(flags: Sequence[Flag]) -> list[list[str]]:
    """[severity, code, message] of each flag."""
    return [[flag.severity, flag.code, flag.message] for flag in flags]


def ideal_vapor_rows(audit: AuditReport) -> tuple[str, list[str], list[list[str]], str] | None:
    """(title, header, rows, note) of the design questions answered by the equation of state
    and by ideal-vapor K-values at the same products (the note says why the ideal-vapor model
    does not apply, if it does not); None when the audit has no such comparison."""
    c = audit.ideal_vapor
    if c is None:
        return None
    title = f"ideal-vapor K-values beside {c.model}, same products"
    header = ["", c.model, "ideal vapor", "change"]
    reflux_change = "-" if c.reflux_shift is None else f"{100 * c.reflux_shift:+.1f} %"
    stage_change = "-" if c.stage_shift is None else f"{c.stage_shift:+d}"
    ideal_reflux, ideal_stages = (cell(c.ideal_reflux), cell(c.ideal_stages)) if c.applicable else ("n/a", "n/a")
    if c.stages_needed is not None and c.stages_needed.stages is not None and not c.stages_needed.complete:
        ideal_stages = f"at most {ideal_stages} (search incomplete)"
    rows = [
        [f"R needed at {c.stages} stages (feed {c.feed_stage})", cell(c.equation_reflux), ideal_reflux, reflux_change],
        [f"N needed at R = {c.reflux_ratio:.4g}", cell(c.equation_stages), ideal_stages, stage_change],
    ]
    note = "" if c.applicable else f"Ideal-vapor K-values do not apply: {c.reason}"
    return title, header, rows, note


def shortcut_tables(shortcut: ShortcutReport, units: DisplayUnits, title: str = "") -> list[Table]:
    """Screen tables of ``traystack shortcut``: the designs and their basis."""
    header, rows = shortcut_rows(shortcut, units)
    tables = [screen_table(f"shortcut design: {title}" if title else "shortcut design", header, rows)]
    tables.append(screen_table("what the shortcut designs for", ["", "value", "from"], basis_rows(shortcut), left=3))
    return tables


def audit_tables(result: Result, units: DisplayUnits) -> list[Table]:
    """Screen tables of ``traystack audit``: side by side, the CMO audit, the flags."""
    audit: AuditReport = result.extra["audit"]
    if "shortcut" in result.extra:
        header, rows = side_by_side_rows(result, units)
        tables = [screen_table(f"shortcut and rigorous side by side: {result.title}", header, rows)]
        tables.append(screen_table("what the shortcut designs for", ["", "value", "from"],
                                   basis_rows(result.extra["shortcut"]), left=3))
    else:
        tables = summary_tables(result, units)
        why = Table(title="no shortcut design", header_style="bold")
        why.add_column("why", overflow="fold")
        why.add_row(_no_shortcut(audit))
        tables.append(why)
    if audit.cmo is not None:
        header, rows = cmo_rows(audit.cmo, units)
        tables.append(screen_table("CMO audit of the rigorous column at the shortcut's design", header, rows))
    ideal_vapor = ideal_vapor_rows(audit)
    if ideal_vapor is not None:
        title, header, rows, note = ideal_vapor
        table = screen_table(title, header, rows)
        table.caption = note or None
        tables.append(table)
    flag_table = Table(title="audit flags", header_style="bold")
    for column in ("severity", "code", "message"):
        flag_table.add_column(column, overflow="fold")
    styles = {"serious": "bold red", "warning": "yellow", "info": "cyan"}
    for severity, code, message in flag_rows(audit.flags):
        flag_table.add_row(Text(severity, style=styles.get(severity, "")), code, message)
    if not audit.flags:
        flag_table.add_row("-", "-", f"no flags: {_NO_FLAGS}")
    tables.append(flag_table)
    return tables


def _no_shortcut(audit: AuditReport) -> str:
    return (f"{audit.shortcut_error}. The column below is the case as specified, solved rigorously with one liquid "
            "per stage; see the TWO_LIQUIDS flag.")


def audit_markdown(result: Result, units: DisplayUnits) -> list[str]:
    """The audit's sections of summary.md (empty without an audit)."""
    audit: AuditReport | SolutionAudit | None = result.extra.get("audit")
    if audit is None:
        return []
    lines: list[str] = []
    if audit.scope == "full" and "shortcut" in result.extra:
        lines += _side_by_side_markdown(result, units)
    elif audit.scope == "full":
        lines += ["## No shortcut design", "", _no_shortcut(audit), ""]
    if audit.cmo is not None:
        lines += ["## CMO audit", ""]
        lines.append(
            "Liquid and vapor leaving each stage against their constant-molar-overflow values at the same reflux "
            "ratio, distillate rate and feed q; the last column is the vertical distance of the rigorous operating "
            "curve (x_j, y_j+1) from the straight operating line of its section."
        )
        lines.append("")
        header, rows = cmo_rows(audit.cmo, units)
        lines += markdown_table(header, rows)
        lines.append("")
    if not audit.applicable:
        return lines + ["## Audit", "", f"Not applicable: {audit.reason}", ""]
    ideal_vapor = ideal_vapor_rows(audit) if audit.scope == "full" else None
    if ideal_vapor is not None:
        title, header, rows, note = ideal_vapor
        lines += [f"## {title[0].upper()}{title[1:]}", "", IDEAL_VAPOR_NOTE, ""]
        lines += markdown_table(header, rows, [False, True, True, True]) + [""]
        if note:
            lines += [note, ""]
    lines += ["## Audit flags", ""]
    if audit.flags:
        lines += markdown_table(["severity", "code", "message"], flag_rows(audit.flags), [False, False, False])
    else:
        lines.append(f"No flags: {_NO_FLAGS}.")
    if audit.thresholds:
        lines += ["", "Thresholds: " + ", ".join(f"{key} = {value:g}" for key, value in audit.thresholds.items()) + "."]
    lines.append("")
    return lines


def _side_by_side_markdown(result: Result, units: DisplayUnits) -> list[str]:
    lines = ["## Shortcut and rigorous, side by side", ""]
    lines.append(SIDE_BY_SIDE_NOTE + " This file's stage table is the column at the shortcut's design.")
    lines.append("")
    header, rows = side_by_side_rows(result, units)
    lines += markdown_table(header, rows, [False] + [True] * (len(header) - 1))
    lines += ["", "What the shortcut designs for:", ""]
    lines += markdown_table(["", "value", "from"], basis_rows(result.extra["shortcut"]), [False, False, False])
    lines.append("")
    notes = result.extra["audit"].notes
    if notes:
        lines += [f"- {note}" for note in notes] + [""]
    return lines
