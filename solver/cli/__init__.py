"""The ``traystack`` command: ``run``, ``shortcut``, ``audit``, ``size``, ``check``, ``sweep``, ``components``,
``uncertainty``.

Exit codes: 0 success; 1 ``check`` found drift or a case that failed, or ``audit`` or ``size``
raised a flag at or above ``--fail-on``; 2 bad input or
an infeasible specification (one message naming the file, key and value; ``--debug`` shows the
traceback); 3 the solver did not converge (``run`` still writes the result, marked
``converged: false``; ``sweep`` when no point converged). An unexpected internal error exits 4
with a one-line message.

Each command is one ``add_*_command`` function that declares its options and one
``command_*`` function that runs it, in a module of this package per command or family of
commands; :data:`COMMANDS` lists them in the order of ``--help``. Every heavy module (the
engine, CoolProp, matplotlib) is imported inside the command, after its case is read and checked.
"""

from __future__ import annotations

import sys

try:
    import argparse
    import os
    import traceback

    from .. import __version__
    from ..caution import CAUTION
    from ..errors import TraystackError
    from .check_sweep import add_check_command, add_sweep_command
    from .common import PLOT_FILES
    from .components import add_components_command
    from .run import add_run_command
    from .shortcut_audit import add_audit_command, add_shortcut_command
    from .size import add_size_command
    from .uncertainty import add_uncertainty_command
except KeyboardInterrupt:  # Ctrl-C while the command is still starting: nothing was written yet
    print("traystack: interrupted while starting; nothing was written", file=sys.stderr)
    raise SystemExit(130) from None

__all__ = ["CACHED_COMMANDS", "COMMANDS", "PLOT_FILES", "build_parser", "main"]


#: The commands that fit property curves, and so take ``--no-cache``.
CACHED_COMMANDS = ("run", "shortcut", "audit", "size", "check", "sweep", "uncertainty")

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
        from ..thermo.fit_cache import NO_CACHE_VARIABLE

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


def _naming_the_file(message: str, args: argparse.Namespace) -> str:
    """``message``, led by the case file the command read when it does not name it yet."""
    case = getattr(args, "case", None)
    if case and os.path.basename(case) not in message:
        return f"{case}: {message}"
    return message


def _quiet_stdout() -> None:
    """Point stdout at the null device, so that flushing it at exit raises no second error."""
    try:
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
    except (OSError, ValueError):  # stdout is no file (tests capture it)
        pass


def _handle(args: argparse.Namespace) -> int:
    """Run the command, turning every error into its message and exit code."""
    try:
        return args.handler(args)
    except TraystackError as exc:
        if args.debug:
            traceback.print_exc()
        print(f"traystack: error: {_naming_the_file(str(exc), args)}", file=sys.stderr)
        return exc.exit_code
    except BrokenPipeError:  # the reader went away (`traystack run CASE | head`): stop quietly, as Unix tools do
        _quiet_stdout()
        return 0
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

