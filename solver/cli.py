"""The ``traystack`` command: ``run``, ``shortcut``, ``audit``, ``size``, ``check``, ``sweep``, ``components``.

Exit codes: 0 success; 1 ``check`` found drift or a case that failed, or ``audit`` or ``size``
raised a flag at or above ``--fail-on``; 2 bad input or
an infeasible specification (one message naming the file, key and value; ``--debug`` shows the
traceback); 3 the solver did not converge (``run`` still writes the result, marked
``converged: false``; ``sweep`` when no point converged). An unexpected internal error exits 4
with a one-line message.

Each command is one ``add_*_command`` function that declares its options and one
``command_*`` function that runs it; :data:`COMMANDS` lists them in the order of ``--help``.
"""

from __future__ import annotations

import sys

try:
    import argparse
    import math
    import os
    import time
    import traceback
    from pathlib import Path

    from rich.console import Console
    from rich.markup import escape
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeElapsedColumn
    from rich.table import Table

    from . import __version__
    from .errors import CaseError, ConvergenceError, TraystackError
    from .caution import CAUTION
except KeyboardInterrupt:  # Ctrl-C while the command is still starting: nothing was written yet
    print("traystack: interrupted while starting; nothing was written", file=sys.stderr)
    raise SystemExit(130) from None

__all__ = ["CACHED_COMMANDS", "COMMANDS", "PLOT_FILES", "build_parser", "main"]

#: Files of a run that show a converged solution; removed from the output folder when a later
#: run does not converge, so that an old figure is never read as the new result.
PLOT_FILES = ("temperature.png", "flows.png", "compositions.png", "yx.png", "cmo_flows.png", "flood.png")


def _console(quiet: bool = False, stderr: bool = False) -> Console:
    return Console(stderr=stderr, quiet=quiet, highlight=False, soft_wrap=False, width=120)


def _default_out(case_path: Path, suffix: str) -> Path:
    """The default output folder: named after the case, in the current folder."""
    return Path.cwd() / f"{case_path.stem}{suffix}"


def _progress(console: Console) -> Progress:
    # auto_refresh=False: no refresh thread, so worker processes are never forked while one runs
    return Progress(
        TextColumn("{task.description}"), BarColumn(), MofNCompleteColumn(), TimeElapsedColumn(),
        console=console, auto_refresh=False, transient=True, disable=not console.is_terminal,
    )


def _known_components(case, command: str) -> None:
    """Refuse an unknown component, and a network of columns (read and checked, not yet
    solved by ``command``), before the engine's modules are imported (they take seconds); the
    lookup reads the shipped index of CoolProp's fluids, not CoolProp."""
    from .components import component_info

    for name in case.component_names:
        component_info(name, case.component_data)
    if case.network is not None:
        from .network_graph import refuse_network

        refuse_network(case, command)


def _at_least_three(text: str) -> int:
    value = _positive_int(text)
    if value < 3:
        raise argparse.ArgumentTypeError(f"{value} is less than 3 (the audit needs at least 3 rigorous solves)")
    return value


def _positive_int(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number") from None
    if value < 1:
        raise argparse.ArgumentTypeError(f"{value} is not at least 1")
    return value


# =======================================================================================
# run
# =======================================================================================


def command_run(args: argparse.Namespace) -> int:
    from .case import load_case

    case_path = Path(args.case)
    case = load_case(case_path)
    _known_components(case, "run")  # a bad case is refused before the engine is imported
    from .newton import NewtonOptions
    from .plots import write_all
    from .reports import cautions, display_units, summary_tables, write_summary
    from .results import Result, write_result_json, write_stages_csv
    from .audit.solution import RunFlags, run_flags
    from .engine import simulate
    from .sizing import sizing_inputs
    from .thermo.package import ThermoPackage

    console = _console(args.quiet or args.json)
    units = display_units(case.display, args.units)
    sizing_data = sizing_inputs(case) if case.sizing is not None else None  # a missing property is bad input
    options = NewtonOptions(max_iterations=args.max_iterations) if args.max_iterations else None
    try:
        result = simulate(case, options=options)
    except ConvergenceError as exc:  # NaN or inf: write the last iterate if the error carries one
        if not isinstance(exc.result, Result):
            raise
        result = exc.result
    result = result.with_extra(flags=RunFlags(run_flags(result)))
    out = Path(args.out) if args.out else _default_out(case_path, "_out")
    if args.sensitivity:
        from .cli_sensitivity import run_sensitivities
        result = run_sensitivities(case, result, out, console)
    if sizing_data is not None and result.converged:
        result = _with_sizing(case, result, sizing_data, console)
    written = [write_result_json(result, out / "result.json"), write_stages_csv(result, out / "stages.csv")]
    plots = []
    if result.converged:
        plots = write_all(result, out, thermo=ThermoPackage.from_case(case)) + _sizing_figure(result, out)
    else:
        for name in PLOT_FILES:
            (out / name).unlink(missing_ok=True)
    written.append(write_summary(result, out / "summary.md", units, [path.name for path in plots]))
    written += plots
    if args.json:
        print(result.to_json())
    for table in summary_tables(result, units):
        console.print(table)
    _print_sizing(result, console)
    for text in cautions(result)[:-1]:
        console.print(f"[yellow]caution:[/] {escape(text)}")
    console.print(f"files written to {out}{os.sep}: {', '.join(path.name for path in written)}")
    console.print(f"[dim]Caution: {CAUTION}[/]")
    if not result.converged:
        print(f"traystack: not converged: {result.message}; the result is written to {out / 'result.json'} "
              "marked converged: false", file=sys.stderr)
        return 3
    return 0


def add_run_command(sub) -> None:
    run = sub.add_parser("run", help="rigorous solve of a case; summary on screen; result.json, stages.csv, summary.md, plots")
    run.add_argument("case", help="case file (TOML)")
    run.add_argument("--out", metavar="DIR", help="output folder (default: CASE_out in the current folder)")
    run.add_argument("--units", help="screen and summary units: 'si', or e.g. temperature=degF,pressure=psi,duty=Btu/h "
                     "(default: the case's [display] table, else degC, bar, kmol/h, kW)")
    run.add_argument("--quiet", action="store_true", help="print nothing but errors (files are still written)")
    run.add_argument("--json", action="store_true", help="print the result JSON on stdout (and nothing else there)")
    run.add_argument("--max-iterations", type=_positive_int, metavar="N",
                     help="diagnostic: limit Newton to N iterations (default 60), e.g. to see a partial solve")
    run.add_argument("--sensitivity", action="store_true",
                     help="also the derivatives of every output with respect to specs, feed, pressure, efficiency and "
                     "model parameters (largest elasticities on screen; all in result.json and sensitivity.csv)")
    run.set_defaults(handler=command_run)


# =======================================================================================
# shortcut
# =======================================================================================

SHORTCUT_SCHEMA = "traystack-shortcut/1"


def command_shortcut(args: argparse.Namespace) -> int:
    import json

    from .case import load_case

    case_path = Path(args.case)
    case = load_case(case_path)
    _known_components(case, "shortcut")  # a bad case is refused before the engine is imported
    from .audit import shortcut_case
    from .audit.flags import two_liquids
    from .engine import case_summary
    from .plots import shortcut_layer, shortcut_yx_diagram
    from .reports import display_units, shortcut_tables
    from .results import UNITS, json_safe, write_atomic

    console = _console(args.quiet)
    units = display_units(case.display, args.units)
    report = shortcut_case(case)
    out = Path(args.out) if args.out else _default_out(case_path, "_shortcut")
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
        console.print(f"[yellow]Ponchon-Savarit design not possible:[/] {report.enthalpy_message}")
    for flag in filter(None, [two_liquids(report.liquid_split, "equilibrium-curve point")]):
        console.print(f"[red]\\[{flag.severity}] {flag.code}:[/] {flag.message}")
    console.print(f"files written to {out}{os.sep}: {', '.join(path.name for path in written)}")
    console.print(f"[dim]Caution: {CAUTION}[/]")
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
    from .case import load_case

    case_path = Path(args.case)
    case = load_case(case_path)
    _known_components(case, "audit")  # a bad case is refused before the engine is imported
    from .audit import MAX_SOLVES, audit_case
    from .plots import cmo_flow_profiles, composition_profiles, shortcut_layer, temperature_profile, yx_diagram
    from .reports import SIDE_BY_SIDE_NOTE, audit_tables, cautions, display_units, write_summary
    from .results import write_result_json, write_stages_csv
    from .sizing import sizing_inputs

    console = _console(args.quiet)
    units = display_units(case.display, args.units)
    with console.status("auditing: shortcut design and rigorous solves", spinner="dots"):
        report = audit_case(case, max_solves=args.max_solves or MAX_SOLVES)
    result = report.result
    if result.converged:  # the shortcut's column in hardware, beside what its CMO traffic would have sized
        try:
            sizing_data = sizing_inputs(case)
        except CaseError as exc:
            console.print(f"[yellow]no sizing:[/] {exc}")
        else:
            result = _with_sizing(case, result, sizing_data, console)
    out = Path(args.out) if args.out else _default_out(case_path, "_audit")
    written = [write_result_json(result, out / "result.json"), write_stages_csv(result, out / "stages.csv")]
    plots = []
    if result.converged:
        plots.append(temperature_profile(result, out / "temperature.png"))
        plots.append(composition_profiles(result, out / "compositions.png"))
        if report.cmo is not None:
            plots.append(cmo_flow_profiles(result, report.cmo.liquid_cmo, report.cmo.vapor_cmo, out / "cmo_flows.png"))
        if report.shortcut.is_binary:
            layers = [shortcut_layer(report.shortcut.design)]
            plots.append(yx_diagram(result, out / "yx.png", layers=layers, rigorous_steps=False))
        plots += _sizing_figure(result, out)
    else:
        for name in PLOT_FILES:
            (out / name).unlink(missing_ok=True)
    written.append(write_summary(result, out / "summary.md", units, [path.name for path in plots]))
    written += plots
    for table in audit_tables(result, units):
        console.print(table)
    console.print(SIDE_BY_SIDE_NOTE, style="dim")
    _print_sizing(result, console)
    console.print(f"{report.solves} rigorous solves in {report.seconds:.1f} s")
    for text in cautions(result)[:-1]:
        if not text.startswith("["):  # the flags are in their table
            console.print(f"[yellow]caution:[/] {escape(text)}")
    console.print(f"files written to {out}{os.sep}: {', '.join(path.name for path in written)}")
    console.print(f"[dim]Caution: {CAUTION}[/]")
    if not result.converged:
        print(f"traystack: the shortcut's column did not converge rigorously: {result.message}; the result is written "
              f"to {out / 'result.json'} marked converged: false", file=sys.stderr)
        return 3
    return _fail_on(args.fail_on, report.flags + _sizing_flags(result), "audit")


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
    audit.add_argument("--max-solves", type=_at_least_three, metavar="N",
                       help="most rigorous solves the audit may use (default 30, at least 3)")
    audit.set_defaults(handler=command_audit)


# =======================================================================================
# size
# =======================================================================================


def _with_sizing(case, result, sizing_data, console):
    """``result`` with ``extra["sizing"]``; a column that cannot be sized keeps its result, with
    the reason on screen."""
    from .sizing import attach_sizing

    sized, reason = attach_sizing(case, result, sizing_data)
    if reason:
        console.print(f"[yellow]no sizing:[/] {reason}")
    return sized


def _fail_on(severity: str | None, flags, what: str) -> int:
    """1 (with a line on stderr) when a flag reaches ``severity`` (``--fail-on``), else 0."""
    from .audit import SEVERITIES

    if not severity:
        return 0
    failing = [flag for flag in flags if SEVERITIES.index(flag.severity) >= SEVERITIES.index(severity)]
    if not failing:
        return 0
    print(f"traystack: {len(failing)} {what} flag(s) at or above {severity}: "
          + ", ".join(sorted({flag.code for flag in failing})), file=sys.stderr)
    return 1


def _sizing_flags(result) -> tuple:
    sizing = result.extra.get("sizing")
    return tuple(sizing.flags) if sizing is not None else ()


def _sizing_figure(result, out: Path) -> list[Path]:
    from .sizing.figure import write_flood_figure

    return write_flood_figure(result, out)


def _print_sizing(result, console: Console) -> None:
    from .reports.sizing_tables import print_sizing

    print_sizing(result, console)


def command_size(args: argparse.Namespace) -> int:
    from .case import load_case

    case_path = Path(args.case)
    case = load_case(case_path)
    _known_components(case, "size")  # a bad case is refused before the engine is imported
    from .engine import simulate
    from .reports import display_units, write_summary
    from .results import write_result_json, write_stages_csv
    from .sizing import size_column, sizing_inputs

    console = _console(args.quiet)
    units = display_units(case.display, args.units)
    thermo, liquids = sizing_inputs(case)
    result = simulate(case)
    out = Path(args.out) if args.out else _default_out(case_path, "_size")
    if not result.converged:
        write_result_json(result, out / "result.json")
        (out / "flood.png").unlink(missing_ok=True)
        print(f"traystack: not converged: {result.message}; nothing to size. The result is written to "
              f"{out / 'result.json'} marked converged: false", file=sys.stderr)
        return 3
    result = result.with_extra(sizing=size_column(case, result, thermo, liquids))
    plots = _sizing_figure(result, out)
    written = [write_result_json(result, out / "result.json"), write_stages_csv(result, out / "stages.csv"),
               write_summary(result, out / "summary.md", units, [path.name for path in plots]), *plots]
    _print_sizing(result, console)
    console.print(f"files written to {out}{os.sep}: {', '.join(path.name for path in written)}")
    console.print(f"[dim]Caution: {CAUTION}[/]")
    return _fail_on(args.fail_on, _sizing_flags(result), "sizing")


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


# =======================================================================================
# check
# =======================================================================================


def _add_scheduler_option(command) -> None:
    command.add_argument("--scheduler", metavar="ADDRESS", help="run on the Dask cluster whose scheduler is at ADDRESS "
                         "(tcp://HOST:PORT) in place of local worker processes; needs traystack[distributed]")


def _moved(check) -> str:
    from .regress import FAILED, headlines

    if check.status == FAILED:
        return check.message
    lines = headlines(check.deviations)
    if check.baseline_version and check.baseline_version != __version__:
        lines.append(f"(baseline from traystack {check.baseline_version})")
    return "\n".join(lines)


def command_check(args: argparse.Namespace) -> int:
    from .regress import DRIFT, FAILED, NO_BASELINE, PASS, check_cases, find_cases, junit_xml
    from .results import write_atomic
    from .workers import stop_workers, study_executor

    console = _console()
    cases = find_cases(args.cases)
    started = time.perf_counter()
    styles = {PASS: "green", DRIFT: "bold red", FAILED: "bold red", NO_BASELINE: "yellow"}
    executor = study_executor(args.jobs, args.scheduler)
    done: list = []
    try:
        with _progress(console) as progress:
            task = progress.add_task("checking cases", total=len(cases))

            def advance(check) -> None:
                done.append(check)
                progress.advance(task)
                progress.refresh()

            checks = check_cases(cases, executor, update=args.update, progress=advance)
    except KeyboardInterrupt:
        stop_workers(executor)
        finished = ", ".join(f"{check.name} {check.status}" for check in done) or "none"
        print(f"traystack: interrupted; {len(done)} of {len(cases)} case(s) checked ({finished}); "
              "no report written", file=sys.stderr)
        return 130
    except BaseException:
        executor.shutdown(wait=False, cancel_futures=True)
        raise
    executor.shutdown()
    seconds = time.perf_counter() - started
    table = Table(title=f"traystack check {args.cases}", header_style="bold")
    for column in ("case", "status", "iterations", "time / s", "what moved (baseline -> now)"):
        table.add_column(column, justify="right" if column in ("iterations", "time / s") else "left")
    for check in checks:
        style = styles.get(check.status, "cyan")
        table.add_row(check.name, f"[{style}]{check.status}[/]", "" if check.iterations is None else str(check.iterations),
                      f"{check.seconds:.2f}", _moved(check))
    console.print(table)
    counts = {status: sum(check.status == status for check in checks) for status in (PASS, DRIFT, FAILED, NO_BASELINE)}
    written = len(checks) - sum(counts.values())
    summary = (f"{len(checks)} case(s) in {seconds:.1f} s: {counts[PASS]} pass, {counts[DRIFT]} drift, "
               f"{counts[FAILED]} failed, {counts[NO_BASELINE]} without baseline")
    if written:
        summary += f", {written} baseline(s) written"
    console.print(summary)
    if counts[NO_BASELINE]:
        console.print("Cases without a baseline are not failures; `traystack check --update` records one.")
    if counts[DRIFT] and not args.update:
        console.print("Baselines are unchanged; if the change is intended, rerun with --update and commit the baselines.")
    if args.junit:
        write_atomic(args.junit, junit_xml(checks, seconds=seconds))
        console.print(f"JUnit report written to {args.junit}")
    return 0 if all(check.ok for check in checks) else 1


def add_check_command(sub) -> None:
    check = sub.add_parser("check", help="re-run every case that has a baseline and compare (for CI); exit 1 on drift")
    check.add_argument("cases", metavar="CASES_DIR", help="folder of NAME.toml cases with NAME.expected.json baselines (or one case)")
    check.add_argument("--update", action="store_true",
                       help="write a baseline for every case that drifted or had none (atomically); passing baselines "
                       "are left untouched, a case that fails gets none")
    check.add_argument("--junit", metavar="FILE", help="also write a JUnit XML report to FILE")
    check.add_argument("--jobs", type=_positive_int, default=1, metavar="N", help="run N cases at a time in worker processes (default 1)")
    _add_scheduler_option(check)
    check.set_defaults(handler=command_check)


# =======================================================================================
# sweep
# =======================================================================================


def command_sweep(args: argparse.Namespace) -> int:
    from .case import load_case
    from .sweep import SweepInterrupted, SweepResult, load_document, parse_variation, run_sweep, write_sweep_csv, write_sweep_plot
    from .workers import stop_workers, study_executor

    console = _console()
    case_path = Path(args.case)
    base = load_case(case_path)  # a bad case is reported before any point runs
    _known_components(base, "sweep")
    document = load_document(case_path)
    variations = [parse_variation(text) for text in args.vary]
    if len(variations) > 2:
        raise CaseError("at most two keys can be varied", key="--vary", value=[v.key for v in variations])
    out = Path(args.out) if args.out else _default_out(case_path, "_sweep")
    total = 1
    for variation in variations:
        total *= len(variation.values)
    executor = study_executor(args.jobs or 1, args.scheduler)
    chains = args.jobs or getattr(executor, "worker_threads", 1)  # warm-started runs in flight
    try:
        with _progress(console) as progress:
            task = progress.add_task(f"sweep of {base.title or case_path.name}", total=total)

            solved: list = []
            last_write = [-math.inf]

            def advance(outcome) -> None:
                progress.advance(task)
                progress.refresh()
                solved.append(outcome)  # sweep.csv shows the study so far, marked partial (at most once a second)
                if time.monotonic() - last_write[0] >= 1.0:
                    done = tuple(sorted(solved, key=lambda o: o.index))
                    write_sweep_csv(SweepResult(tuple(variations), base.component_names, done, total), out / "sweep.csv")
                    last_write[0] = time.monotonic()

            result = run_sweep(document, variations, executor, source_file=str(case_path), progress=advance,
                               warm=not args.cold, chains=chains)
    except SweepInterrupted as stop:
        stop_workers(executor)
        written = write_sweep_csv(stop.result, out / "sweep.csv")
        print(f"traystack: interrupted; the points already solved are written to {written} ({stop.result.study})",
              file=sys.stderr)
        return 130
    except BaseException:
        executor.shutdown(wait=False, cancel_futures=True)
        raise
    executor.shutdown()
    files = [write_sweep_csv(result, out / "sweep.csv")]
    figure = write_sweep_plot(result, out / "sweep.png", base.title)
    if figure is not None:
        files.append(figure)

    table = Table(title=f"sweep: {base.title or case_path.name}", header_style="bold")
    keys = result.key_components()
    purities = [] if keys is None else [("distillate", keys[0]), ("bottoms", keys[1])]
    for variation in variations:
        table.add_column(variation.label, justify="right", no_wrap=True)
    table.add_column("status", no_wrap=True)
    for column in ("iterations", "reboiler duty / kW", "condenser duty / kW",
                   *[f"x {result.components[i]} {product}" for product, i in purities]):
        table.add_column(column, justify="right")
    for outcome in result.outcomes:
        cells = [str(value) for value in outcome.values]
        cells.append(outcome.status if outcome.converged else f"[bold red]{outcome.status}[/]")
        cells.append("" if outcome.iterations is None else str(outcome.iterations))
        if outcome.converged:
            cells += [f"{outcome.reboiler_duty / 1e3:.5g}" if outcome.reboiler_duty is not None else "",
                      f"{outcome.condenser_duty / 1e3:.5g}" if outcome.condenser_duty is not None else "",
                      *[f"{outcome.products[product][1][i]:.6f}" for product, i in purities]]
        else:
            cells += [""] * (2 + len(purities))
        table.add_row(*cells)
    console.print(table)
    for outcome in result.failed:
        console.print(f"[bold red]point {outcome.index + 1} failed[/] ({outcome.status}): {outcome.message}")
    converged = len(result.outcomes) - len(result.failed)
    console.print(f"{converged} of {len(result.outcomes)} points converged; files written to {out}{os.sep}: "
                  + ", ".join(path.name for path in files))
    console.print(f"[dim]Caution: {CAUTION}[/]")
    return 0 if converged else 3


def add_sweep_command(sub) -> None:
    sweep = sub.add_parser("sweep", help="parametric study over one or two case keys, with a progress bar; CSV and plot")
    sweep.add_argument("case", help="case file (TOML)")
    sweep.add_argument("--vary", action="append", required=True, metavar="KEY=START:STOP:COUNT",
                       help="a key of the case file (dotted path, e.g. specs.reflux_ratio, feeds[0].stage, column.pressure.top) "
                       "and COUNT evenly spaced values; START and STOP may carry a unit ('feeds[0].temperature=40 degC:70 degC:4'); "
                       "give it twice for a grid")
    sweep.add_argument("--jobs", type=_positive_int, metavar="N", help="solve N points at a time in worker processes "
                       "(default 1); with --scheduler, N runs of warm-started points at a time (default: the cluster's threads)")
    _add_scheduler_option(sweep)
    sweep.add_argument("--cold", action="store_true",
                       help="solve every point from the default start (by default each starts from its nearest solved neighbour)")
    sweep.add_argument("--out", metavar="DIR", help="output folder (default: CASE_sweep in the current folder)")
    sweep.set_defaults(handler=command_sweep)


# =======================================================================================
# components
# =======================================================================================


def command_components(args: argparse.Namespace) -> int:
    """List the CoolProp fluids and handbook compounds a pattern finds, or show one component's
    properties with their sources. Reads shipped indexes; CoolProp or ``chemicals`` is imported
    only to show one component's properties."""
    from rich.markup import escape

    from .catalog import close_names, coolprop_fluid, exact_handbook, matches

    console = _console()
    pattern = args.pattern
    if pattern and not any(ch in pattern for ch in "*?["):
        fluid, entry = coolprop_fluid(pattern), exact_handbook(pattern)
        if fluid is not None or entry is not None:
            if fluid is not None:
                _show_coolprop_fluid(console, fluid, escape)
            if entry is not None:
                _show_handbook_compound(console, entry.name, escape, used=fluid is None)
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
            table.add_row(escape(fluid.name), f"{fluid.molar_mass * 1000:.3f}", f"{Tb - 273.15:.2f}" if Tb else "-",
                          f"{fluid.critical_temperature - 273.15:.2f}", f"{fluid.critical_pressure / 1e5:.3f}",
                          f"CoolProp {escape(fluid.coolprop_name)} reference EOS")
        console.print(table)
    if found.handbook:
        table = Table(title="handbook library (correlations from published tables; estimates)", header_style="bold")
        for column in ("name", "CAS", "formula", "also called", "source"):
            table.add_column(column)
        for entry in found.handbook:
            table.add_row(escape(entry.name), entry.cas, escape(entry.formula), escape(", ".join(entry.synonyms[:3])),
                          "handbook tables per property")
        console.print(table)
    console.print(escape(
        f"{len(found.coolprop)} CoolProp fluid(s), {len(found.handbook)} handbook compound(s). "
        "`traystack components NAME` shows one component's properties with their sources. A case takes a name "
        "from CoolProp when CoolProp has it, else from the handbook; [components] from_handbook = [...] chooses "
        "the handbook; others can be defined under [components.data.NAME]."))
    return 0


def _show_coolprop_fluid(console, fluid, escape) -> None:
    from .components import coolprop_source

    source = escape(coolprop_source(fluid.coolprop_name))
    table = Table(title=f"{escape(fluid.name)}: CoolProp fluid (used unless from_handbook lists it)", header_style="bold")
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


def _show_handbook_compound(console, name: str, escape, *, used: bool) -> None:
    from .handbook import lookup, property_rows

    component = lookup(name, key="PATTERN")
    when = "used for this name" if used else "used when from_handbook lists it"
    table = Table(title=f"{escape(component.name)} ({component.cas}, {escape(component.formula)}): handbook library, "
                        f"{when}", header_style="bold")
    for column in ("property", "value or form", "range", "source"):
        table.add_column(column)
    for row in property_rows(component):
        table.add_row(escape(row["property"]), escape(row["value"] or row["form"]), escape(row["range"]),
                      escape(row["source"]))
    console.print(table)
    console.print(escape("Handbook correlations are fits to measured data within their ranges and estimates beyond "
                         "them (extrapolated toward the critical point, with a note in the result)."))


def add_components_command(sub) -> None:
    components = sub.add_parser(
        "components", help="search CoolProp's fluids and the handbook library; NAME shows a component's sources")
    components.add_argument("pattern", nargs="?", help="part of a name, synonym, CAS number or formula, a glob "
                            "such as 'n-*', or one component's exact name")
    components.set_defaults(handler=command_components)


#: The commands that fit property curves, and so take ``--no-cache``.
CACHED_COMMANDS = ("run", "shortcut", "audit", "size", "check", "sweep", "uncertainty")

from .cli_uncertainty import add_uncertainty_command  # noqa: E402 (the command's code is in its own module)

#: The commands in the order ``--help`` lists them.
COMMANDS = (
    add_run_command, add_shortcut_command, add_audit_command, add_size_command, add_check_command, add_sweep_command,
    add_components_command, add_uncertainty_command,
)


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="traystack",
        description="Rigorous tray-by-tray distillation column simulation (MESH equations, Newton's method).",
        epilog="Exit codes: 0 success, 1 check found drift or audit or size raised a flag asked to fail on, 2 bad input or "
        "infeasible specification, "
        "3 not converged, 4 internal error. Caution: " + CAUTION,
    )
    parser.add_argument("--version", action="version", version=f"traystack {__version__}")
    parser.add_argument("--debug", action="store_true", help="show the traceback of an error")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND")
    for add_command in COMMANDS:
        add_command(sub)
    for command in sub.choices.values():  # --debug also after the command name
        command.add_argument("--debug", action="store_true", default=argparse.SUPPRESS, help="show the traceback of an error")
    for name in CACHED_COMMANDS:
        sub.choices[name].add_argument(
            "--no-cache", action="store_true",
            help="neither read nor write the cache of fitted property curves (fit them from CoolProp again)")
    return parser


def main(argv: list[str] | None = None) -> int:
    try:
        parser = build_parser()
        args = parser.parse_args(argv)
    except KeyboardInterrupt:
        print("traystack: interrupted while starting; nothing was written", file=sys.stderr)
        return 130
    if not getattr(args, "command", None):
        parser.print_help()
        return 2
    if getattr(args, "no_cache", False):  # through the environment, so that worker processes see it too
        from .thermo.fit_cache import NO_CACHE_VARIABLE

        saved = os.environ.get(NO_CACHE_VARIABLE)
        os.environ[NO_CACHE_VARIABLE] = "1"
        try:
            return _handle(args)
        finally:  # main() may run inside a longer process (tests, scripts)
            if saved is None:
                os.environ.pop(NO_CACHE_VARIABLE, None)
            else:
                os.environ[NO_CACHE_VARIABLE] = saved
    return _handle(args)


def _handle(args: argparse.Namespace) -> int:
    """Run the command, turning every error into its message and exit code."""
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
