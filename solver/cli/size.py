"""``traystack size``: tray or packing hydraulics from the rigorous traffic."""

from __future__ import annotations

import argparse
import os
import sys

from ..caution import CAUTION
from .common import console_for, fail_on, output_folder, print_sizing, read_case, sizing_figure, sizing_flags

__all__ = ["add_size_command", "command_size"]


def command_size(args: argparse.Namespace) -> int:
    case_path, case = read_case(args.case, "size")  # a bad case is refused before the engine is imported
    if case.network is not None:
        from .network import size_network

        return size_network(args, case, output_folder(args.out, case_path, "_size"), console_for(args.quiet))
    from ..engine import simulate
    from ..reports import display_units, write_summary
    from ..results import write_result_json, write_stages_csv
    from ..sizing import size_column, sizing_inputs

    console = console_for(args.quiet)
    units = display_units(case.display, args.units)
    thermo, liquids = sizing_inputs(case)
    result = simulate(case)
    out = output_folder(args.out, case_path, "_size")
    if not result.converged:
        write_result_json(result, out / "result.json")
        (out / "flood.png").unlink(missing_ok=True)
        print(f"traystack: not converged: {result.message}; nothing to size. The result is written to "
              f"{out / 'result.json'} marked converged: false", file=sys.stderr)
        return 3
    result = result.with_extra(sizing=size_column(case, result, thermo, liquids))
    plots = sizing_figure(result, out)
    written = [write_result_json(result, out / "result.json"), write_stages_csv(result, out / "stages.csv"),
               write_summary(result, out / "summary.md", units, [path.name for path in plots]), *plots]
    print_sizing(result, console)
    console.print(f"files written to {out}{os.sep}: {', '.join(path.name for path in written)}")
    console.print(f"Caution: {CAUTION}", style="dim")
    return fail_on(args.fail_on, sizing_flags(result), "sizing")


def add_size_command(sub) -> None:
    size = sub.add_parser("size", help="tray or packing hydraulics and diameters from the rigorous traffic, beside the "
                          "CMO traffic's")
    size.add_argument("case", help="case file (TOML); an optional [sizing] table sets the internals (default: sieve "
                      "trays, 0.6 m spacing, 80 %% of flood)")
    size.add_argument("--out", metavar="DIR", help="output folder (default: CASE_size in the current folder)")
    size.add_argument("--fail-on", choices=("warning", "serious"),
                      help="exit 1 when a sizing flag of this severity or worse is raised (for CI)")
    size.add_argument("--units", help="summary units, as for run")
    size.add_argument("--quiet", action="store_true", help="print nothing but errors (files are still written)")
    size.set_defaults(handler=command_size)
