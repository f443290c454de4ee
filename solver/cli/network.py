"""What ``traystack run`` and ``traystack audit`` do with a network case (the command line,
:mod:`solver.cli.run`, :mod:`solver.cli.shortcut_audit`, read the case and prints the closing lines): solve it, write result.json
(schema traystack-result/2) and the picture, print the tables per column, and for ``audit`` the
rigorous vapor beside Underwood's minimum vapor."""

from __future__ import annotations

import argparse
import dataclasses
import os
from pathlib import Path
from typing import Sequence

from rich.console import Console

from ..audit.flags import two_liquids
from ..audit.network_vmin import network_vmin_audit
from ..case import Case
from ..errors import SpecError
from ..network_engine import simulate_network
from ..network_graph import check_network
from ..network_results import (
    NetworkResult,
    write_network_result_json,
    write_network_stages_csv,
)
from ..network_specs import resolve_specs
from ..newton import NewtonOptions
from ..reports import display_units
from ..reports.display import screen_table
from ..reports.network_tables import network_tables
from ..thermo.package import ThermoPackage
from .common import styled

__all__ = ["audit_network", "run_network"]


def network_outputs(result: NetworkResult, case: Case, out: Path, units, *, pictures: Sequence[Path] = (),
                    sections: Sequence[str] = (), stale: Sequence[str] = ()) -> list[Path]:
    """The files of a network run in ``out``: result.json, stages.csv (one file, each row led
    by its column), and when converged the picture of the network (network.png) and each
    column's temperature and composition profiles (and ``pictures`` already written); summary.md
    last, naming the pictures, with ``sections`` (Markdown lines) added. The pictures of an
    earlier run (and the files ``stale``) are removed when this one did not converge."""
    from ..network_plot import (  # matplotlib
        column_profile_files,
        column_profiles,
        network_figure,
    )
    from ..reports.network_summary import write_network_summary

    written = [write_network_result_json(result, out / "result.json"), write_network_stages_csv(result, out / "stages.csv")]
    plots: list[Path] = []
    if result.converged:
        plots = [network_figure(result, out / "network.png"), *column_profiles(result, out), *pictures]
    else:
        for name in ("network.png", *[f for files in column_profile_files(result).values() for f in files], *stale):
            (out / name).unlink(missing_ok=True)
    written.append(write_network_summary(result, out / "summary.md", units, resolve_specs(case, check_network(case)),
                                         [path.name for path in plots], sections))
    return written + plots


def run_network(args: argparse.Namespace, case: Case, out: Path, console: Console) -> tuple[list[Path], NetworkResult]:
    """``run``: result.json, stages.csv, summary.md, the picture of the network (network.png)
    and each column's profiles (when converged) and the tables per column on screen; with
    ``--sensitivity`` also the sensitivities (:mod:`solver.cli.network_sensitivity`).
    Returns (files written, result)."""
    units = display_units(case.display, args.units)
    options = NewtonOptions(max_iterations=args.max_iterations) if args.max_iterations else None
    result = simulate_network(case, options=options)
    if getattr(args, "sensitivity", False):
        from .network_sensitivity import run_network_sensitivities

        result = run_network_sensitivities(case, result, out, console)
    written = network_outputs(result, case, out, units)
    if args.json:
        print(result.to_json())
    for table in network_tables(result, units, resolve_specs(case, check_network(case))):
        console.print(table)
    print_network_cautions(result, console)
    return written, result


def print_network_cautions(result: NetworkResult, console: Console) -> None:
    """The case reader's warnings, and the TWO_LIQUIDS flag of a converged network whose stage
    liquids the activity model says would split (the test the network engine ran,
    ``extra["liquid_stability"]``)."""
    for warning in result.case.get("warnings", ()):
        console.print(styled(("caution:", "yellow"), f" {warning}"))
    flag = two_liquids(result.extra.get("liquid_stability"), "stage")
    if flag is not None:
        console.print(styled((f"[{flag.severity}] {flag.code}:", "red"), f" {flag.message}"))


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
    result.json with its ``audit`` section. Where the diagram does not apply (two components,
    several feeds) it says why and writes the rigorous solution as ``run`` does. Returns (files
    written, result)."""
    units = display_units(case.display, args.units)
    thermo = ThermoPackage.from_case(case)
    result = simulate_network(case, thermo=thermo)
    audit = None
    if result.converged:
        try:
            audit = network_vmin_audit(case, result, thermo)
        except SpecError as exc:  # the diagram does not apply (two components, several feeds): not bad input
            console.print(f"no minimum-vapor audit for this network ({exc}); the rigorous solution is written as by run")
    if audit is not None:
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
    print_network_cautions(result, console)
    return network_outputs(result, case, out, units), result


def shortcut_network(args: argparse.Namespace, case: Case, out: Path, console: Console) -> int:
    """``shortcut``: for a thermally coupled arrangement, Underwood's minimum vapor from the Vmin
    diagram (every adjacent split's peak, the Petlyuk minimum, the direct and indirect
    sequences) on screen and in shortcut.json; for any other arrangement exit 2 naming why no
    shortcut applies (:func:`solver.shortcut.network_shortcut.network_shortcut`)."""
    import json

    from ..caution import CAUTION
    from ..results import UNITS, case_summary, json_safe, write_atomic
    from ..shortcut.network_shortcut import network_shortcut
    from .shortcut_audit import SHORTCUT_SCHEMA

    found = network_shortcut(case)
    units = display_units(case.display, args.units)
    flow = lambda value: f"{units.F(value):.5g} {units.flow}"  # noqa: E731
    d = found.diagram
    rows = [(f"peak of the split {found.split_name(p.light, p.heavy)}", flow(p.vapor_top)) for p in d.peaks]
    rows += [
        ("Petlyuk / divided-wall minimum vapor", flow(d.petlyuk_minimum_vapor)),
        ("Petlyuk / divided-wall minimum boilup", flow(found.petlyuk_minimum_boilup)),
        ("direct sequence minimum vapor (sum of its columns)", flow(d.direct_sequence_minimum_vapor)),
        ("indirect sequence minimum vapor (sum of its columns)", flow(d.indirect_sequence_minimum_vapor)),
        ("saving claimed over the better sequence", f"{100 * found.claimed_saving:.1f} %"),
    ]
    console.print(screen_table(f"{case.title}: Underwood minimum vapor (coupled: {', '.join(found.coupled)}; feed q = {d.q:.3f})",
                               ("quantity", "value"), rows))
    console.print("relative volatilities (to the heaviest): "
                  + ", ".join(f"{name} {alpha:.4g}" for name, alpha in zip(found.components, d.relative_volatility)))
    document = {"schema": SHORTCUT_SCHEMA, "title": case.title, "case": case_summary(case),
                "components": list(case.component_names), "units": dict(UNITS), "minimum_vapor": found.as_json()}
    written = write_atomic(out / "shortcut.json", json.dumps(json_safe(document), indent=2, allow_nan=False) + "\n")
    console.print(f"files written to {out}{os.sep}: {written.name}")
    console.print(f"Caution: {CAUTION}", style="dim")
    return 0


class ColumnSizings:
    """The sizing of each column of a network (``result.json``'s ``sizing``: column name ->
    its sizing, or the reason it has none)."""

    def __init__(self, sizings: dict, reasons: dict) -> None:
        self.sizings, self.reasons = sizings, reasons

    def as_json(self) -> dict:
        return {**{name: sizing.as_json() for name, sizing in self.sizings.items()},
                **{name: {"not_sized": reason} for name, reason in self.reasons.items()}}


def size_network(args: argparse.Namespace, case: Case, out: Path, console: Console) -> int:
    """``size``: the network solved, then each column seen alone
    (:meth:`~solver.network_results.NetworkResult.column_result`: connections in are feeds,
    connections out side draws) sized from its own rigorous traffic; its tables on screen,
    flood_COLUMN.png, and in result.json and summary.md the sizing of every column (a column
    without trays, or one the sizing cannot treat, says why)."""
    import sys

    from ..caution import CAUTION
    from ..network_plot import file_stem
    from ..reports.sizing_tables import print_sizing, sizing_markdown
    from ..sizing import size_column, sizing_inputs
    from ..sizing.figure import flood_profile
    from .common import fail_on

    units = display_units(case.display, args.units)
    thermo, liquids = sizing_inputs(case)  # a property nobody gives is bad input, before the solve
    result = simulate_network(case, thermo=thermo)
    flood_files = {c["name"]: f"flood_{file_stem(c['name'])}.png" for c in result.columns}
    if not result.converged:
        network_outputs(result, case, out, units, stale=list(flood_files.values()))
        print(f"traystack: not converged: {result.message}; nothing to size. The result is written to "
              f"{out / 'result.json'} marked converged: false", file=sys.stderr)
        return 3
    sizings, reasons, pictures, sections, flags = {}, {}, [], [], []
    for column in result.columns:
        name = column["name"]
        alone = result.column_result(name)
        try:
            sizing = size_column(case, alone, thermo, liquids)
        except SpecError as exc:
            reasons[name] = str(exc)
            console.print(styled((f"column {name}: no sizing:", "yellow"), f" {exc}"))
            (out / flood_files[name]).unlink(missing_ok=True)
            continue
        sizings[name] = sizing
        flags += list(sizing.flags)
        sized = alone.with_extra(sizing=sizing)
        console.print(styled((f"column {name}", "bold")))
        print_sizing(sized, console)
        pictures.append(flood_profile(sizing, alone.stage_count, out / flood_files[name], f"% of flood: {alone.title}"))
        sections += [f"## Sizing of column {name}", ""] + [line.replace("## ", "### ", 1) if line.startswith("## ") else line
                                                            for line in sizing_markdown(sized)]
    result = dataclasses.replace(result, extra={**result.extra, "sizing": ColumnSizings(sizings, reasons)})
    written = network_outputs(result, case, out, units, pictures=pictures, sections=sections)
    console.print(f"files written to {out}{os.sep}: {', '.join(path.name for path in written)}")
    console.print(f"Caution: {CAUTION}", style="dim")
    return fail_on(args.fail_on, flags, "sizing")

