"""``traystack run``: the rigorous solve, its tables, result files and plots."""

from __future__ import annotations

import argparse

from ..errors import ConvergenceError
from .common import (
    PLOT_FILES, console_for, finish_run, output_folder, positive_int, print_sizing, read_case, sizing_figure, styled,
    with_sizing,
)

__all__ = ["add_run_command", "command_run"]


def command_run(args: argparse.Namespace) -> int:
    case_path, case = read_case(args.case, "run")  # a bad case is refused before the engine is imported
    if case.network is not None:
        from .network import run_network

        console = console_for(args.quiet or args.json)
        out = output_folder(args.out, case_path, "_out")
        return finish_run(console, out, *run_network(args, case, out, console))
    from ..newton import NewtonOptions
    from ..plots import write_all
    from ..reports import cautions, display_units, summary_tables, write_summary
    from ..results import Result, write_result_json, write_stages_csv
    from ..audit.solution import RunFlags, run_flags
    from ..engine import simulate
    from ..sizing import sizing_inputs
    from ..thermo.package import ThermoPackage

    console = console_for(args.quiet or args.json)
    units = display_units(case.display, args.units)
    sizing_data = sizing_inputs(case) if case.sizing is not None else None  # a missing property is bad input
    out = output_folder(args.out, case_path, "_out")
    options = NewtonOptions(max_iterations=args.max_iterations) if args.max_iterations else None
    try:
        result = simulate(case, options=options)
    except ConvergenceError as exc:  # NaN or inf: write the last iterate if the error carries one
        if not isinstance(exc.result, Result):
            raise
        result = exc.result
    result = result.with_extra(flags=RunFlags(run_flags(result)))
    if args.sensitivity:
        from .sensitivity import run_sensitivities

        result = run_sensitivities(case, result, out, console)
    if sizing_data is not None and result.converged:
        result = with_sizing(case, result, sizing_data, console)
    written = [write_result_json(result, out / "result.json"), write_stages_csv(result, out / "stages.csv")]
    plots = []
    if result.converged:
        plots = write_all(result, out, thermo=ThermoPackage.from_case(case)) + sizing_figure(result, out)
    else:
        for name in PLOT_FILES:
            (out / name).unlink(missing_ok=True)
    written.append(write_summary(result, out / "summary.md", units, [path.name for path in plots]))
    written += plots
    if args.json:
        print(result.to_json())
    for table in summary_tables(result, units):
        console.print(table)
    print_sizing(result, console)
    for text in cautions(result)[:-1]:
        console.print(styled(("caution:", "yellow"), f" {text}"))
    return finish_run(console, out, written, result)


def add_run_command(sub) -> None:
    run = sub.add_parser("run", help="rigorous solve of a case; summary on screen; result.json, stages.csv, summary.md, plots")
    run.add_argument("case", help="case file (TOML)")
    run.add_argument("--out", metavar="DIR", help="output folder (default: CASE_out in the current folder)")
    run.add_argument("--units", help="screen and summary units: 'si', or e.g. temperature=degF,pressure=psi,duty=Btu/h "
                     "(default: the case's [display] table, else degC, bar, kmol/h, kW)")
    run.add_argument("--quiet", action="store_true", help="print nothing but errors (files are still written)")
    run.add_argument("--json", action="store_true", help="print the result JSON on stdout (and nothing else there)")
    run.add_argument("--max-iterations", type=positive_int, metavar="N",
                     help="diagnostic: limit Newton to N iterations (default 60), e.g. to see a partial solve")
    run.add_argument("--sensitivity", action="store_true",
                     help="also the derivatives of every output with respect to specs, feed, pressure, efficiency and "
                     "model parameters (largest elasticities on screen; all in result.json and sensitivity.csv)")
    run.set_defaults(handler=command_run)
