"""What the commands share: the console, output folders, the progress bar, refusing a case
before the engine is imported, argument types and the sizing steps of ``run``, ``audit`` and ``size``."""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

from rich.console import Console
from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeElapsedColumn
from rich.text import Text

from ..errors import CaseError

__all__ = ["NETWORK_COMMANDS", "PLOT_FILES", "add_scheduler_option", "finish_run", "at_least_three", "console_for", "default_out", "fail_on", "output_folder", "positive_int", "print_sizing", "progress_bar", "read_case", "sizing_figure", "sizing_flags", "styled", "with_sizing"]


#: Files of a run that show a converged solution; removed from the output folder when a later
#: run does not converge, so that an old figure is never read as the new result.
PLOT_FILES = ("temperature.png", "flows.png", "compositions.png", "yx.png", "cmo_flows.png", "flood.png")
#: The commands that solve a network case (the others refuse one with exit 2).
NETWORK_COMMANDS = ("run", "audit", "shortcut", "sweep", "size", "uncertainty")


class _Screen(Console):
    def on_broken_pipe(self) -> None:
        """The reader went away (``traystack run CASE | head``): stop printing; ``main`` exits 0."""
        self.quiet = True
        raise BrokenPipeError


def console_for(quiet: bool = False, stderr: bool = False) -> Console:
    """The screen: markup off, so square brackets in titles, names and messages are shown as
    written (styles are given as ``style=`` or :class:`rich.text.Text`, never as markup)."""
    return _Screen(stderr=stderr, quiet=quiet, highlight=False, soft_wrap=False, width=120, markup=False)


def styled(*parts: str | tuple[str, str]) -> Text:
    """Plain text and ``(text, style)`` pieces as one line for the console."""
    return Text.assemble(*parts)


def default_out(case_path: Path, suffix: str) -> Path:
    """The default output folder: named after the case, in the current folder."""
    return Path.cwd() / f"{case_path.stem}{suffix}"


def output_folder(out: str | None, case_path: Path, suffix: str) -> Path:
    """``--out`` (else the default folder); refuses a path that exists and is not a folder."""
    folder = Path(out) if out else default_out(case_path, suffix)
    if folder.exists() and not folder.is_dir():
        raise CaseError("exists and is not a folder", key="--out", value=str(folder),
                        expected="a folder (created if missing) for the files the command writes")
    return folder


def progress_bar(console: Console) -> Progress:
    # auto_refresh=False: no refresh thread, so worker processes are never forked while one runs
    return Progress(
        TextColumn("{task.description}", markup=False), BarColumn(), MofNCompleteColumn(), TimeElapsedColumn(),
        console=console, auto_refresh=False, transient=True, disable=not console.is_terminal,
    )


def read_case(case_file: str, command: str):
    """The case at ``case_file`` (its path and the :class:`~solver.case.Case`), read and checked
    before the engine's modules are imported (they take seconds): an unknown component is
    refused (the lookup reads the shipped index of CoolProp's fluids, not CoolProp), and a
    network of columns is checked for its degrees of freedom. Every command in
    :data:`NETWORK_COMMANDS` solves networks."""
    from ..case import load_case
    from ..components import component_info

    case_path = Path(case_file)
    case = load_case(case_path)
    for name in case.component_names:
        component_info(name, case.component_data)
    if case.network is not None:
        from ..network_graph import check_network

        assert command in NETWORK_COMMANDS, command
        check_network(case)
    return case_path, case


def at_least_three(text: str) -> int:
    value = positive_int(text)
    if value < 3:
        raise argparse.ArgumentTypeError(f"{value} is less than 3 (the audit needs at least 3 rigorous solves)")
    return value


def positive_int(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number") from None
    if value < 1:
        raise argparse.ArgumentTypeError(f"{value} is not at least 1")
    return value


def with_sizing(case, result, sizing_data, console):
    """``result`` with ``extra["sizing"]``; a column that cannot be sized keeps its result, with
    the reason on screen."""
    from ..sizing import attach_sizing

    sized, reason = attach_sizing(case, result, sizing_data)
    if reason:
        console.print(styled(("no sizing:", "yellow"), f" {reason}"))
    return sized


def fail_on(severity: str | None, flags, what: str) -> int:
    """1 (with a line on stderr) when a flag reaches ``severity`` (``--fail-on``), else 0."""
    from ..audit import SEVERITIES

    if not severity:
        return 0
    failing = [flag for flag in flags if SEVERITIES.index(flag.severity) >= SEVERITIES.index(severity)]
    if not failing:
        return 0
    print(f"traystack: {len(failing)} {what} flag(s) at or above {severity}: "
          + ", ".join(sorted({flag.code for flag in failing})), file=sys.stderr)
    return 1


def sizing_flags(result) -> tuple:
    sizing = result.extra.get("sizing")
    return tuple(sizing.flags) if sizing is not None else ()


def sizing_figure(result, out: Path) -> list[Path]:
    from ..sizing.figure import write_flood_figure

    return write_flood_figure(result, out)


def print_sizing(result, console: Console) -> None:
    from ..reports.sizing_tables import print_sizing as print_tables

    print_tables(result, console)



def finish_run(console: Console, out: Path, written: list[Path], result) -> int:
    """The last lines of a run: the files written, the caution, and exit 3 (with the message on
    stderr) when the result did not converge."""
    from ..caution import CAUTION

    console.print(f"files written to {out}{os.sep}: {', '.join(path.name for path in written)}")
    console.print(f"Caution: {CAUTION}", style="dim")
    if not result.converged:
        print(f"traystack: not converged: {result.message}; the result is written to {out / 'result.json'} "
              "marked converged: false", file=sys.stderr)
        return 3
    return 0


def add_scheduler_option(command) -> None:
    command.add_argument("--scheduler", metavar="ADDRESS", help="run on the Dask cluster whose scheduler is at ADDRESS "
                         "(tcp://HOST:PORT) in place of local worker processes; needs traystack[distributed]")
