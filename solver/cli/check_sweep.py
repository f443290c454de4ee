"""``traystack check`` (cases against their baselines) and ``traystack sweep`` (parametric
studies): the commands that run many solves through local workers."""

from __future__ import annotations

import argparse
import dataclasses
import math
import os
import sys
import time

from rich.table import Table
from rich.text import Text

from .. import __version__
from ..caution import CAUTION
from ..errors import CaseError
from .common import add_scheduler_option, console_for, output_folder, positive_int, progress_bar, read_case, styled

__all__ = ["add_check_command", "add_sweep_command", "command_check", "command_sweep"]


def _moved(check) -> str:
    from ..regress import FAILED, headlines
    from ..reports import display_units

    if check.status == FAILED:
        return check.message
    lines = headlines(check.deviations, display_units())
    if check.baseline_version and check.baseline_version != __version__:
        lines.append(f"(baseline from traystack {check.baseline_version})")
    return "\n".join(lines)


def command_check(args: argparse.Namespace) -> int:
    from ..regress import DRIFT, FAILED, NO_BASELINE, PASS, check_cases, find_cases, junit_xml
    from ..results import write_atomic
    from ..workers import stop_workers, study_executor

    console = console_for()
    cases = find_cases(args.cases)
    started = time.perf_counter()
    styles = {PASS: "green", DRIFT: "bold red", FAILED: "bold red", NO_BASELINE: "yellow"}
    executor = study_executor(args.jobs, args.scheduler)
    done: list = []
    try:
        with progress_bar(console) as progress:
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
        table.add_row(check.name, Text(check.status, style=style), "" if check.iterations is None else str(check.iterations),
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
    check.add_argument("--jobs", type=positive_int, default=1, metavar="N", help="run N cases at a time in worker processes (default 1)")
    add_scheduler_option(check)
    check.set_defaults(handler=command_check)


# =======================================================================================
# sweep
# =======================================================================================


def command_sweep(args: argparse.Namespace) -> int:
    from ..sweep import SweepInterrupted, SweepResult, load_document, parse_variation, run_sweep
    from ..sweep_output import write_sweep_csv, write_sweep_plot
    from ..sweep_log import LOG_NAME, PointLog
    from ..workers import stop_workers, study_executor

    console = console_for()
    case_path, base = read_case(args.case, "sweep")  # a bad case is reported before any point runs
    document = load_document(case_path)
    variations = [parse_variation(text) for text in args.vary]
    if len(variations) > 2:
        raise CaseError("at most two keys can be varied", key="--vary", value=[v.key for v in variations])
    out = output_folder(args.out, case_path, "_sweep")
    total = 1
    for variation in variations:
        total *= len(variation.values)
    log = PointLog(out / LOG_NAME, document, variations, warm=not args.cold)
    if log.done:
        console.print(f"resuming: {len(log.done)} of {total} points already solved in {log.path}")
    executor = study_executor(args.jobs or 1, args.scheduler)
    chains = args.jobs or getattr(executor, "worker_threads", 1)  # warm-started runs in flight
    try:
        with progress_bar(console) as progress:
            task = progress.add_task(f"sweep of {base.title or case_path.name}", total=total, completed=len(log.done))

            solved: list = [dataclasses.replace(outcome, profile=None) for outcome in log.done.values()]
            last_write = [-math.inf]

            def advance(outcome) -> None:
                log.append(outcome)
                progress.advance(task)
                progress.refresh()
                # sweep.csv shows the study so far, marked partial (at most once a second)
                solved.append(dataclasses.replace(outcome, profile=None))
                if time.monotonic() - last_write[0] >= 1.0:
                    done = tuple(sorted(solved, key=lambda o: o.index))
                    write_sweep_csv(SweepResult(tuple(variations), base.component_names, done, total), out / "sweep.csv")
                    last_write[0] = time.monotonic()

            result = run_sweep(document, variations, executor, source_file=str(case_path), progress=advance,
                               warm=not args.cold, chains=chains, done=log.done)
    except SweepInterrupted as stop:
        stop_workers(executor)
        log.close()
        written = write_sweep_csv(stop.result, out / "sweep.csv")
        print(f"traystack: interrupted; the points already solved are written to {written} ({stop.result.study}) "
              f"and kept in {log.path}: run the same command again to solve only the others", file=sys.stderr)
        return 130
    except BaseException:
        executor.shutdown(wait=False, cancel_futures=True)
        log.close()
        raise
    executor.shutdown()
    log.close()
    files = [write_sweep_csv(result, out / "sweep.csv")]
    figure = write_sweep_plot(result, out / "sweep.png", base.title)
    if figure is not None:
        files.append(figure)

    table = Table(title=f"sweep: {base.title or case_path.name}", header_style="bold")
    keys = result.key_components()
    purities = [] if keys is None else list(zip(result.end_products(), keys))
    for variation in variations:
        table.add_column(variation.label, justify="right", no_wrap=True)
    table.add_column("status", no_wrap=True)
    every = " (all columns)" if result.network else ""
    for column in ("iterations", f"reboiler duty{every} / kW", f"condenser duty{every} / kW",
                   *[f"x {result.components[i]} {product}" for product, i in purities]):
        table.add_column(column, justify="right")
    for outcome in result.outcomes:
        cells = [str(value) for value in outcome.values]
        cells.append(outcome.status if outcome.converged else Text(outcome.status, style="bold red"))
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
        console.print(styled((f"point {outcome.index + 1} failed", "bold red"), f" ({outcome.status}): {outcome.message}"))
    converged = len(result.outcomes) - len(result.failed)
    console.print(f"{converged} of {len(result.outcomes)} points converged; files written to {out}{os.sep}: "
                  + ", ".join(path.name for path in files))
    console.print(f"Caution: {CAUTION}", style="dim")
    return 0 if converged else 3


def add_sweep_command(sub) -> None:
    sweep = sub.add_parser("sweep", help="parametric study over one or two case keys, with a progress bar; CSV and plot")
    sweep.add_argument("case", help="case file (TOML)")
    sweep.add_argument("--vary", action="append", required=True, metavar="KEY=START:STOP:COUNT",
                       help="a key of the case file (dotted path, e.g. specs.reflux_ratio, feeds[0].stage, column.pressure.top) "
                       "and COUNT evenly spaced values; START and STOP may carry a unit ('feeds[0].temperature=40 degC:70 degC:4'); "
                       "give it twice for a grid")
    sweep.add_argument("--jobs", type=positive_int, metavar="N", help="solve N points at a time in worker processes "
                       "(default 1); with --scheduler, N runs of warm-started points at a time (default: the cluster's threads)")
    add_scheduler_option(sweep)
    sweep.add_argument("--cold", action="store_true",
                       help="solve every point from the default start (by default each starts from its nearest solved neighbour)")
    sweep.add_argument("--out", metavar="DIR", help="output folder (default: CASE_sweep in the current folder)")
    sweep.set_defaults(handler=command_sweep)
