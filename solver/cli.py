"""The ``traystack`` command.

Exit codes (DESIGN.md): 0 success; 1 a check found drift; 2 bad input or infeasible
specification; 3 the solver did not converge (the result file is still written, marked
``converged: false``). An unexpected internal error exits 4 with a one-line message; ``--debug``
shows its traceback.
"""

from __future__ import annotations

import argparse
import json
import sys
import traceback
from pathlib import Path

from rich.console import Console
from rich.table import Table

from . import __version__
from .errors import TraystackError

CAUTION = (
    "Engineering estimate from models and data of limited accuracy. It does not replace review by a "
    "qualified engineer, vendor data, or the codes and standards that apply where the column is built "
    "(pressure equipment, relief, hazardous areas, flammable/toxic service, thermal stability of bottoms)."
)


def _console(quiet: bool = False) -> Console:
    return Console(stderr=False, quiet=quiet, highlight=False, soft_wrap=False, width=110)


def _default_out(case_path: Path) -> Path:
    return case_path.with_suffix("").parent / (case_path.stem + "_out")


def _summary_tables(result, display) -> list[Table]:
    from .units import convert

    t_unit = display.get("temperature", "degC")
    p_unit = display.get("pressure", "bar")
    f_unit = display.get("flow", "kmol/h")
    q_unit = display.get("duty", "kW")
    t_label = {"degC": "°C", "degF": "°F"}.get(t_unit, t_unit)

    overview = Table(title=f"{result.title}", show_header=True, header_style="bold")
    overview.add_column("quantity")
    overview.add_column("value", justify="right")
    overview.add_row("converged", "yes" if result.converged else "NO")
    overview.add_row("Newton iterations", str(result.iterations))
    overview.add_row("largest scaled residual", f"{result.residual_norm:.2e}")
    if result.reflux_ratio is not None:
        overview.add_row("reflux ratio L/D", f"{result.reflux_ratio:.4f}")
    if result.boilup_ratio is not None:
        overview.add_row("boilup ratio V/B", f"{result.boilup_ratio:.4f}")
    if result.condenser_duty is not None:
        overview.add_row(f"condenser duty / {q_unit}", f"{convert(result.condenser_duty, 'power', q_unit):.4g}")
    if result.reboiler_duty is not None:
        overview.add_row(f"reboiler duty / {q_unit}", f"{convert(result.reboiler_duty, 'power', q_unit):.4g}")
    balances = result.balances()
    overview.add_row("component closure", f"{balances['component_closure_max']:.1e}")
    overview.add_row("energy closure", f"{balances['energy_closure_rel']:.1e}")

    products = Table(title="products", header_style="bold")
    products.add_column("product")
    products.add_column(f"flow / {f_unit}", justify="right")
    products.add_column(f"T / {t_label}", justify="right")
    for name in result.components:
        products.add_column(f"x {name}", justify="right")
    for name, product in result.products().items():
        products.add_row(
            name,
            f"{convert(product['flow'], 'molar_flow', f_unit):.5g}",
            f"{convert(product['T'], 'temperature', t_unit):.2f}",
            *[f"{value:.6f}" for value in product["composition"]],
        )

    stages = Table(title="stages", header_style="bold")
    for column in ("stage", f"T / {t_label}", f"P / {p_unit}", f"L / {f_unit}", f"V / {f_unit}"):
        stages.add_column(column, justify="right")
    for name in result.components:
        stages.add_column(f"x {name}", justify="right")
    for record in result.stage_records():
        stages.add_row(
            f"{record['number']}{' ' + record['role'].split('_')[0] if record['role'] != 'tray' else ''}",
            f"{convert(record['T'], 'temperature', t_unit):.2f}",
            f"{convert(record['P'], 'pressure', p_unit):.4f}",
            f"{convert(record['L'], 'molar_flow', f_unit):.4g}",
            f"{convert(record['V'], 'molar_flow', f_unit):.4g}",
            *[f"{value:.5f}" for value in record["x"]],
        )
    return [overview, products, stages]


def command_run(args: argparse.Namespace) -> int:
    from .case import load_case
    from .plots import write_all
    from .results import write_result_json, write_stages_csv
    from .simulate import simulate

    console = _console(args.quiet or args.json)
    case_path = Path(args.case)
    case = load_case(case_path)
    result = simulate(case)
    out = Path(args.out) if args.out else _default_out(case_path)
    write_result_json(result, out / "result.json")
    write_stages_csv(result, out / "stages.csv")
    if result.converged:
        write_all(result, out)
    display = dict(case.display)
    if args.units:
        for item in args.units.split(","):
            key, _, unit = item.partition("=")
            display[key.strip()] = unit.strip()
    if args.json:
        print(result.to_json())
    else:
        for table in _summary_tables(result, display):
            console.print(table)
        console.print(f"files written to {out}/ (result.json, stages.csv{', plots' if result.converged else ''})")
        if not result.converged:
            console.print(f"[bold red]NOT CONVERGED[/]: {result.message}")
        console.print(f"[dim]Caution: {CAUTION}[/]")
    return 0 if result.converged else 3


def command_components(args: argparse.Namespace) -> int:
    from .components import list_components

    console = _console()
    table = Table(title="components (CoolProp reference equations of state)", header_style="bold")
    for column in ("name", "M / g/mol", "Tb / °C", "Tc / °C", "Pc / bar"):
        table.add_column(column, justify="right" if column != "name" else "left")
    infos = list_components(args.pattern)
    for info in infos:
        table.add_row(
            info.name,
            f"{info.molar_mass * 1000:.3f}",
            f"{info.normal_boiling_point - 273.15:.2f}" if info.normal_boiling_point else "-",
            f"{info.critical_temperature - 273.15:.2f}",
            f"{info.critical_pressure / 1e5:.3f}",
        )
    console.print(table)
    console.print(f"{len(infos)} component(s). Others can be defined in a case under [components.data.NAME].")
    return 0


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="traystack",
        description="Rigorous tray-by-tray distillation column simulation (MESH equations, Newton's method).",
        epilog="Caution: " + CAUTION,
    )
    parser.add_argument("--version", action="version", version=f"traystack {__version__}")
    parser.add_argument("--debug", action="store_true", help="show the traceback of an error")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")

    run = sub.add_parser("run", help="rigorous solve of a case; summary on screen; result.json, stages.csv and plots")
    run.add_argument("case", help="case file (TOML)")
    run.add_argument("--out", help="output folder (default: CASE_out next to the case file)")
    run.add_argument("--units", help="screen units, e.g. temperature=degC,pressure=bar,flow=kmol/h,duty=kW")
    run.add_argument("--quiet", action="store_true", help="print nothing but errors")
    run.add_argument("--json", action="store_true", help="print the result JSON on stdout")
    run.set_defaults(handler=command_run)

    components = sub.add_parser("components", help="list the components that can be used")
    components.add_argument("pattern", nargs="?", help="part of a name, or a glob such as 'n-*'")
    components.set_defaults(handler=command_components)
    return parser


def main(argv: list[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if not getattr(args, "command", None):
        parser.print_help()
        return 2
    try:
        return args.handler(args)
    except TraystackError as exc:
        if args.debug:
            traceback.print_exc()
        print(f"traystack: error: {exc}", file=sys.stderr)
        return exc.exit_code
    except KeyboardInterrupt:
        print("traystack: interrupted; files already written are complete, nothing was half-written", file=sys.stderr)
        return 130
    except Exception as exc:  # a bug: say so plainly
        if args.debug:
            traceback.print_exc()
        print(
            f"traystack: internal error ({type(exc).__name__}: {exc}). This is a bug; rerun with --debug for details.",
            file=sys.stderr,
        )
        return 4


if __name__ == "__main__":
    sys.exit(main())
