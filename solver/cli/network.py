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
from ..network_results import NetworkResult, write_network_result_json
from ..newton import NewtonOptions
from ..reports import display_units
from ..reports.display import screen_table
from ..reports.network_tables import network_tables
from ..thermo.package import ThermoPackage

__all__ = ["audit_network", "run_network"]


def run_network(args: argparse.Namespace, case: Case, out: Path, console: Console) -> tuple[list[Path], NetworkResult]:
    """``run``: result.json, the picture of the network (network.png, when converged) and the
    tables per column on screen. Returns (files written, result)."""
    units = display_units(case.display, args.units)
    options = NewtonOptions(max_iterations=args.max_iterations) if args.max_iterations else None
    result = simulate_network(case, options=options)
    written = [write_network_result_json(result, out / "result.json")]
    if result.converged:
        from ..network_plot import network_figure  # matplotlib only when there is a picture to draw

        written.append(network_figure(result, out / "network.png"))
    else:
        (out / "network.png").unlink(missing_ok=True)
    if args.json:
        print(result.to_json())
    for table in network_tables(result, units):
        console.print(table)
    return written, result


def _sequence_rows(audit, units, flow) -> list[tuple[str, str]]:
    """The rows of the conventional sequences solved rigorously and the rigorous saving."""
    duty = lambda value: f"{units.Q(value):.5g} {units.duty}"  # noqa: E731
    rows = []
    for run in audit.sequences:
        columns = " + ".join(f"{column.stages}" for column in run.columns)
        state = "" if run.converged else " (did not converge)"
        rows.append((f"{run.name} sequence ({columns} stages), rigorous boilup", flow(run.boilup) + state))
        rows.append((f"{run.name} sequence, rigorous reboiler duty", duty(run.reboiler_duty) + state))
    best = audit.best_sequence
    if best is not None:
        rows.append(("rigorous reboiler duty of this network", duty(audit.rigorous_reboiler_duty)))
        rows.append((f"rigorous saving against the {best.name} sequence (boilup)", f"{100 * audit.rigorous_saving:.1f} %"))
        rows.append((f"rigorous saving against the {best.name} sequence (reboiler duty)", f"{100 * audit.rigorous_duty_saving:.1f} %"))
    return rows


def audit_network(args: argparse.Namespace, case: Case, out: Path, console: Console) -> tuple[list[Path], NetworkResult]:
    """``audit``: the rigorous solution's vapor beside Underwood's minimum vapor of the Petlyuk
    arrangement and of the direct and indirect sequences (one feed, three or more components),
    and beside the direct and indirect sequences solved rigorously, with the rigorous saving;
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
            *_sequence_rows(audit, units, flow),
        ]
        console.print(screen_table(f"{result.title}: rigorous vapor beside the minimum vapor", ("quantity", "value"), rows))
        if audit.sequence_note:
            console.print(f"no conventional sequences: {audit.sequence_note}")
    return [write_network_result_json(result, out / "result.json")], result
