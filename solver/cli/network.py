"""What ``traystack run`` and ``traystack audit`` do with a network case (the command line,
:mod:`solver.cli.run`, :mod:`solver.cli.shortcut_audit`, read the case and prints the closing lines): solve it, write result.json
(schema traystack-result/2) and the picture, print the tables per column, and for ``audit`` the
rigorous vapor beside Underwood's minimum vapor."""

from __future__ import annotations

import argparse
import dataclasses
from pathlib import Path

from rich.console import Console

from ..audit.network_vmin import network_vmin_audit
from ..case import Case
from ..network_engine import simulate_network
from ..network_graph import check_network
from ..network_results import NetworkResult, write_network_result_json, write_network_stages_csv
from ..network_specs import resolve_specs
from ..newton import NewtonOptions
from ..reports import display_units
from ..reports.display import screen_table
from ..reports.network_tables import network_tables
from ..thermo.package import ThermoPackage

__all__ = ["audit_network", "run_network"]


def network_outputs(result: NetworkResult, case: Case, out: Path, units) -> list[Path]:
    """The files of a network run in ``out``: result.json, stages.csv (one file, each row led
    by its column), and when converged the picture of the network (network.png) and each
    column's temperature and composition profiles; summary.md last, naming the pictures. The
    pictures of an earlier run are removed when this one did not converge."""
    from ..network_plot import column_profile_files, column_profiles, network_figure  # matplotlib
    from ..reports.network_summary import write_network_summary

    written = [write_network_result_json(result, out / "result.json"), write_network_stages_csv(result, out / "stages.csv")]
    plots: list[Path] = []
    if result.converged:
        plots = [network_figure(result, out / "network.png"), *column_profiles(result, out)]
    else:
        for name in ("network.png", *[f for files in column_profile_files(result).values() for f in files]):
            (out / name).unlink(missing_ok=True)
    written.append(write_network_summary(result, out / "summary.md", units, resolve_specs(case, check_network(case)), [path.name for path in plots]))
    return written + plots


def run_network(args: argparse.Namespace, case: Case, out: Path, console: Console) -> tuple[list[Path], NetworkResult]:
    """``run``: result.json, stages.csv, summary.md, the picture of the network (network.png)
    and each column's profiles (when converged) and the tables per column on screen. Returns
    (files written, result)."""
    units = display_units(case.display, args.units)
    options = NewtonOptions(max_iterations=args.max_iterations) if args.max_iterations else None
    result = simulate_network(case, options=options)
    written = network_outputs(result, case, out, units)
    if args.json:
        print(result.to_json())
    for table in network_tables(result, units, resolve_specs(case, check_network(case))):
        console.print(table)
    return written, result


def audit_network(args: argparse.Namespace, case: Case, out: Path, console: Console) -> tuple[list[Path], NetworkResult]:
    """``audit``: the rigorous solution's vapor beside Underwood's minimum vapor of the Petlyuk
    arrangement and of the direct and indirect sequences (one feed, three or more components);
    result.json with its ``audit`` section. Returns (files written, result)."""
    units = display_units(case.display, args.units)
    thermo = ThermoPackage.from_case(case)
    result = simulate_network(case, thermo=thermo)
    if result.converged:
        audit = network_vmin_audit(case, result, thermo)
        result = dataclasses.replace(result, extra={"audit": audit})
        flow = lambda value: f"{units.F(value):.5g} {units.flow}"  # noqa: E731
        rows = [
            ("Petlyuk minimum vapor (Underwood)", flow(audit.petlyuk_minimum_vapor)),
            ("Petlyuk minimum boilup (Underwood)", flow(audit.petlyuk_minimum_boilup)),
            ("direct sequence minimum vapor", flow(audit.direct_sequence_minimum_vapor)),
            ("indirect sequence minimum vapor", flow(audit.indirect_sequence_minimum_vapor)),
            ("saving claimed by the short method", f"{100 * audit.claimed_saving:.1f} %"),
            ("rigorous boilup (all reboilers)", flow(audit.rigorous_boilup)),
            ("rigorous boilup / Petlyuk minimum", f"{audit.boilup_over_minimum:.3f}"),
        ]
        console.print(screen_table(f"{result.title}: rigorous vapor beside the minimum vapor", ("quantity", "value"), rows))
    return [write_network_result_json(result, out / "result.json")], result
