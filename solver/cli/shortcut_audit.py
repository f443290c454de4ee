"""``traystack shortcut`` (the shortcut design alone) and ``traystack audit`` (shortcut and
rigorous side by side)."""

from __future__ import annotations

import argparse
import os
import sys

from ..caution import CAUTION
from ..errors import CaseError
from .common import (
    PLOT_FILES, at_least_three, console_for, fail_on, finish_run, output_folder, print_sizing, read_case, sizing_figure,
    sizing_flags, styled, with_sizing,
)

__all__ = ["SHORTCUT_SCHEMA", "add_audit_command", "add_shortcut_command", "command_audit", "command_shortcut"]


SHORTCUT_SCHEMA = "traystack-shortcut/1"


def command_shortcut(args: argparse.Namespace) -> int:
    import json

    case_path, case = read_case(args.case, "shortcut")  # a bad case is refused before the engine is imported
    if case.network is not None:
        from .network import shortcut_network

        return shortcut_network(args, case, output_folder(args.out, case_path, "_shortcut"), console_for(args.quiet))
    from ..audit import shortcut_case
    from ..audit.flags import two_liquids
    from ..engine import case_summary
    from ..plots import shortcut_layer, shortcut_yx_diagram
    from ..reports import display_units, shortcut_tables
    from ..results import UNITS, json_safe, write_atomic

    console = console_for(args.quiet)
    units = display_units(case.display, args.units)
    report = shortcut_case(case)
    out = output_folder(args.out, case_path, "_shortcut")
    document = {
        "schema": SHORTCUT_SCHEMA, "title": case.title, "case": case_summary(case),
        "components": list(case.component_names), "units": dict(UNITS), "shortcut": report.as_json(),
    }
    written = [write_atomic(out / "shortcut.json", json.dumps(json_safe(document), indent=2, allow_nan=False) + "\n")]
    if report.is_binary:
        layers = [shortcut_layer(report.enthalpy_design, curve=False, steps=False, q_line=False, pinch=False,
                                 linestyle="--")] if report.enthalpy_design else []
        written.append(shortcut_yx_diagram(report.design, out / "yx_shortcut.png", title=case.title, layers=layers))
    for table in shortcut_tables(report, units, case.title):
        console.print(table)
    for note in report.design.notes:
        console.print(f"note: {note}")
    if report.enthalpy_message:
        console.print(styled(("Ponchon-Savarit design not possible:", "yellow"), f" {report.enthalpy_message}"))
    for flag in filter(None, [two_liquids(report.liquid_split, "equilibrium-curve point")]):
        console.print(styled((f"[{flag.severity}] {flag.code}:", "red"), f" {flag.message}"))
    console.print(f"files written to {out}{os.sep}: {', '.join(path.name for path in written)}")
    console.print(f"Caution: {CAUTION}", style="dim")
    return 0


def add_shortcut_command(sub) -> None:
    shortcut = sub.add_parser(
        "shortcut", help="shortcut design only (McCabe-Thiele and Ponchon-Savarit, or Fenske-Underwood-Gilliland-Kirkbride)"
    )
    shortcut.add_argument("case", help="case file (TOML)")
    shortcut.add_argument("--out", metavar="DIR", help="output folder for shortcut.json and, for a binary, yx_shortcut.png "
                          "(default: CASE_shortcut in the current folder)")
    shortcut.add_argument("--units", help="screen units, as for run")
    shortcut.add_argument("--quiet", action="store_true", help="print nothing but errors (files are still written)")
    shortcut.set_defaults(handler=command_shortcut)


# =======================================================================================
# audit
# =======================================================================================


def command_audit(args: argparse.Namespace) -> int:
    case_path, case = read_case(args.case, "audit")  # a bad case is refused before the engine is imported
    if case.network is not None:
        from .network import audit_network

        console = console_for(args.quiet)
        out = output_folder(args.out, case_path, "_audit")
        return finish_run(console, out, *audit_network(args, case, out, console))
    from ..audit import MAX_SOLVES, audit_case
    from ..plots import cmo_flow_profiles, composition_profiles, shortcut_layer, temperature_profile, yx_diagram
    from ..reports import SIDE_BY_SIDE_NOTE, audit_tables, cautions, display_units, write_summary
    from ..results import write_result_json, write_stages_csv
    from ..sizing import sizing_inputs

    console = console_for(args.quiet)
    units = display_units(case.display, args.units)
    with console.status("auditing: shortcut design and rigorous solves", spinner="dots"):
        report = audit_case(case, max_solves=args.max_solves or MAX_SOLVES)
    result = report.result
    if result.converged:  # the shortcut's column in hardware, beside what its CMO traffic would have sized
        try:
            sizing_data = sizing_inputs(case)
        except CaseError as exc:
            console.print(styled(("no sizing:", "yellow"), f" {exc}"))
        else:
            result = with_sizing(case, result, sizing_data, console)
    out = output_folder(args.out, case_path, "_audit")
    written = [write_result_json(result, out / "result.json"), write_stages_csv(result, out / "stages.csv")]
    plots = []
    if result.converged:
        plots.append(temperature_profile(result, out / "temperature.png"))
        plots.append(composition_profiles(result, out / "compositions.png"))
        if report.cmo is not None:
            plots.append(cmo_flow_profiles(result, report.cmo.liquid_cmo, report.cmo.vapor_cmo, out / "cmo_flows.png"))
        if report.shortcut is not None and report.shortcut.is_binary:
            layers = [shortcut_layer(report.shortcut.design)]
            plots.append(yx_diagram(result, out / "yx.png", layers=layers, rigorous_steps=False))
        plots += sizing_figure(result, out)
    else:
        for name in PLOT_FILES:
            (out / name).unlink(missing_ok=True)
    written.append(write_summary(result, out / "summary.md", units, [path.name for path in plots]))
    written += plots
    for table in audit_tables(result, units):
        console.print(table)
    if report.shortcut is not None:
        console.print(SIDE_BY_SIDE_NOTE, style="dim")
    print_sizing(result, console)
    for note in report.notes:  # e.g. the shortcut's theoretical stages against a case of real (Murphree) stages
        console.print(f"note: {note}")
    console.print(f"{report.solves} rigorous solves in {report.seconds:.1f} s")
    for text in cautions(result)[:-1]:
        if not text.startswith("["):  # the flags are in their table
            console.print(styled(("caution:", "yellow"), f" {text}"))
    console.print(f"files written to {out}{os.sep}: {', '.join(path.name for path in written)}")
    console.print(f"Caution: {CAUTION}", style="dim")
    if not result.converged:
        print(f"traystack: the shortcut's column did not converge rigorously: {result.message}; the result is written "
              f"to {out / 'result.json'} marked converged: false", file=sys.stderr)
        return 3
    return fail_on(args.fail_on, report.flags + sizing_flags(result), "audit")


def add_audit_command(sub) -> None:
    audit = sub.add_parser(
        "audit", help="shortcut and rigorous side by side, CMO audit, flags where the shortcut misleads"
    )
    audit.add_argument("case", help="case file (TOML); an optional [audit] table sets the shortcut's targets, "
                       "reflux and the flag thresholds")
    audit.add_argument("--out", metavar="DIR", help="output folder (default: CASE_audit in the current folder)")
    audit.add_argument("--fail-on", choices=("warning", "serious"),
                       help="exit 1 when a flag of this severity or worse is raised (for CI)")
    audit.add_argument("--units", help="screen and summary units, as for run")
    audit.add_argument("--quiet", action="store_true", help="print nothing but errors (files are still written)")
    audit.add_argument("--max-solves", type=at_least_three, metavar="N",
                       help="most rigorous solves the audit may use (default 30, at least 3)")
    audit.set_defaults(handler=command_audit)
