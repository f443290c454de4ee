"""Parametric studies: ``traystack sweep CASE.toml --vary KEY=START:STOP:COUNT``.

A *key* is a dotted path into the case's TOML document, with ``[n]`` for an item of an array
of tables: ``specs.reflux_ratio``, ``feeds[0].stage``, ``column.stages``,
``column.pressure.top``, ``feeds[0].temperature``, ``specs.bottoms.water``, and for a case with
a ``[sizing]`` table ``sizing.tray_spacing`` or ``sizing.flood_fraction`` (the CSV then holds
each section's diameter). Each point writes
its values into a copy of the parsed TOML document and validates it again with
:func:`solver.case.parse_case`, so every value goes through the same checks and unit
conversion as a case file: ``--vary 'feeds[0].temperature=40 degC:70 degC:4'`` writes
``"40 degC"``, ``"50 degC"``, ... One key gives a line of points, two keys their grid.

Points are solved through the :class:`concurrent.futures.Executor` interface: the caller hands
in an executor (the command line makes a :class:`~concurrent.futures.ProcessPoolExecutor`; a
distributed one, such as the executor of a Dask ``Client``, plugs in the same way). What goes
to a worker is plain data (the TOML document as a dict and the key/value assignments), so it
pickles. A point that fails (bad value at that point, infeasible specification, no
convergence) is reported with its message; the other points go on. An interrupt (Ctrl-C)
cancels the points not yet started and raises :class:`SweepInterrupted` with the points
already solved, a partial study that ``sweep.csv`` marks as such (:mod:`solver.sweep_output`
writes the study's files).
"""

from __future__ import annotations

import copy
import dataclasses
import itertools
import math
import os
import re
import time
import tomllib
from concurrent.futures import FIRST_COMPLETED, Executor, wait
from dataclasses import dataclass
from typing import Any, Callable, Mapping, Sequence

import numpy as np

from .case import parse_case
from .errors import CaseError, ConvergenceError, SpecError, ThermoError, TraystackError
from .network_results import NetworkResult
from .warm_starts import (
    SolvedPoint,
    solve_warm,
    stage_layout,
    starting_point,
    warm_start,
)

__all__ = [
    "Variation",
    "PointOutcome",
    "SweepResult",
    "SweepInterrupted",
    "MAX_POINTS",
    "parse_key",
    "parse_variation",
    "set_value",
    "load_document",
    "sweep_points",
    "solve_point",
    "point_outcome",
    "failed_point",
    "run_sweep",
]

#: More points than this is taken as a typing error, not a study.
MAX_POINTS = 10_000
#: Significant digits of an interpolated value (so that 0.1 steps print as 0.1, not 0.30000000000000004).
VALUE_DIGITS = 12
_DECIMALS = re.compile(r"\d\.(\d+)")

#: Keys of one table that exclude each other: writing one removes the other, so that varying a
#: feed's temperature works on a case that gives its vapor fraction, and the reverse.
EXCLUSIVE_KEYS = {
    "temperature": ("vapor_fraction",),
    "vapor_fraction": ("temperature",),
    "reflux_temperature": ("reflux_subcooling",),
    "reflux_subcooling": ("reflux_temperature",),
}

_SEGMENT = re.compile(r"([A-Za-z0-9_\-]+)((?:\[[0-9]+\])*)")
_INDEX = re.compile(r"\[([0-9]+)\]")
_NUMBER = re.compile(r"\s*([+-]?(?:[0-9]+\.?[0-9]*|\.[0-9]+)(?:[eE][+-]?[0-9]+)?)\s*(.*?)\s*")
_INTEGER = re.compile(r"[+-]?[0-9]+")

PathPart = str | int


@dataclass(frozen=True)
class Variation:
    """One varied key: its path into the TOML document and the values written there."""

    key: str  # as written on the command line
    path: tuple[PathPart, ...]
    values: tuple[Any, ...]  # numbers, or strings with units ("40 degC")
    magnitudes: tuple[float, ...]  # the numbers, in ``unit``
    unit: str = ""
    decimals: int = 0  # decimal places of START and STOP as written

    def shown(self) -> list[str]:
        """Each value as the key was written: the decimals of START and STOP (more only where
        that would show two values alike), with the unit."""
        digits = self.decimals
        while digits < VALUE_DIGITS and len({f"{m:.{digits}f}" for m in self.magnitudes}) < len(set(self.magnitudes)):
            digits += 1
        return [f"{m:.{digits}f}" + (f" {self.unit}" if self.unit else "") for m in self.magnitudes]

    @property
    def label(self) -> str:
        return f"{self.key} [{self.unit}]" if self.unit else self.key


@dataclass(frozen=True)
class PointOutcome:
    """The solution of one point, as plain numbers in SI (mol/s, W), or why there is none."""

    index: int
    values: tuple[Any, ...]  # one per variation
    status: str  # converged | not converged | bad input | infeasible | thermo error | internal error
    message: str = ""
    iterations: int | None = None
    residual_norm: float | None = None
    condenser_duty: float | None = None
    reboiler_duty: float | None = None
    reflux_ratio: float | None = None
    boilup_ratio: float | None = None
    products: Mapping[str, tuple[float, tuple[float, ...]]] | None = None  # name -> (flow, composition)
    seconds: float = 0.0
    diameters: Mapping[str, float] | None = None  # section -> diameter (m), when the case has [sizing]
    warm_start: bool = False  # solved from a neighbour's profile (a warm sweep)
    duties: Mapping[str, float] | None = None  # a network's exchangers by name (W); None for one column
    profile: Any = None  # the converged StageProfile, on its way from a worker to the next point's start

    @property
    def converged(self) -> bool:
        return self.status == "converged"


@dataclass(frozen=True)
class SweepResult:
    variations: tuple[Variation, ...]
    components: tuple[str, ...]
    outcomes: tuple[PointOutcome, ...]  # in point order
    planned: int | None = None  # points of the whole study when only some are here; None: complete

    @property
    def partial(self) -> bool:
        return self.planned is not None

    @property
    def study(self) -> str:
        """The word "complete", or how much of a partial study (in progress or interrupted) there is."""
        if self.planned is None:
            return "complete"
        return f"partial: {len(self.outcomes)} of {self.planned} points done"

    @property
    def failed(self) -> tuple[PointOutcome, ...]:
        return tuple(outcome for outcome in self.outcomes if not outcome.converged)

    @property
    def network(self) -> bool:
        """Whether the points are column networks (their duties by name)."""
        return any(outcome.duties is not None for outcome in self.outcomes)

    def end_products(self) -> tuple[str, str]:
        """The products whose purities the study shows: the distillate and the bottoms, of a
        network the first distillate and the first bottoms among its products (two different
        products where there are two: where no distillate is a product, the first two bottoms)."""
        if not self.network:
            return "distillate", "bottoms"
        names = list(dict.fromkeys(name for outcome in self.outcomes for name in (outcome.products or {})))
        top = next((name for name in names if name.endswith(".distillate")), names[0] if names else "")
        others = [name for name in names if name != top] or [top]
        bottom = next((name for name in others if name.endswith(".bottoms")), others[-1])
        return top, bottom

    def key_components(self) -> tuple[int, int] | None:
        """Indices of the component the distillate is richest in (against the bottoms) and of
        the one the bottoms is richest in (:meth:`end_products`), from the first converged
        point; None if none did."""
        top, bottom = self.end_products()
        for outcome in self.outcomes:
            if outcome.converged:
                distillate = np.asarray(outcome.products[top][1])
                bottoms = np.asarray(outcome.products[bottom][1])
                return int(np.argmax(distillate - bottoms)), int(np.argmax(bottoms - distillate))
        return None


class SweepInterrupted(KeyboardInterrupt):
    """Ctrl-C during a sweep: ``result`` holds the points already done (``result.partial``)."""

    def __init__(self, result: SweepResult) -> None:
        super().__init__(result.study)
        self.result = result


# =======================================================================================
# Keys and values
# =======================================================================================


def _bad(problem: str, key: str, value: Any = None, expected: str | None = None) -> CaseError:
    return CaseError(problem, key=f"--vary {key}", value=value, expected=expected)


def parse_key(key: str) -> tuple[PathPart, ...]:
    """``"feeds[0].temperature"`` -> ``("feeds", 0, "temperature")``."""
    parts: list[PathPart] = []
    for segment in key.split("."):
        match = _SEGMENT.fullmatch(segment)
        if not match:
            raise _bad("cannot read the key", key, key,
                       "a dotted path into the case file such as specs.reflux_ratio or feeds[0].temperature")
        parts.append(match.group(1))
        parts.extend(int(index) for index in _INDEX.findall(match.group(2)))
    return tuple(parts)


def _spell(path: Sequence[PathPart]) -> str:
    text = ""
    for part in path:
        text += f"[{part}]" if isinstance(part, int) else (f".{part}" if text else part)
    return text


def _container(document: Any, path: Sequence[PathPart], key: str) -> Any:
    """The table or array that holds the last part of ``path``."""
    here = document
    for depth, part in enumerate(path[:-1]):
        where = _spell(path[: depth + 1])
        if isinstance(part, int):
            if not isinstance(here, list) or part >= len(here):
                size = len(here) if isinstance(here, list) else 0
                raise _bad(f"the case has no {where} ({_spell(path[:depth]) or 'it'} has {size} item(s))", key)
            here = here[part]
        else:
            if not isinstance(here, dict) or part not in here:
                raise _bad(f"the case has no {where}", key, expected="a key the case file holds")
            here = here[part]
        if not isinstance(here, (dict, list)):
            raise _bad(f"{where} is a value ({here!r}), not a table or array", key)
    return here


def set_value(document: dict, path: Sequence[PathPart], value: Any, key: str = "") -> None:
    """Write ``value`` at ``path`` into ``document`` (in place). The tables and arrays on the
    way must exist; the last key of a table may be new, and replaces the key it excludes
    (:data:`EXCLUSIVE_KEYS`). Raises :class:`CaseError`."""
    key = key or _spell(path)
    holder, last = _container(document, path, key), path[-1]
    if isinstance(last, int):
        if not isinstance(holder, list) or last >= len(holder):
            raise _bad(f"the case has no {_spell(path)}", key)
    elif not isinstance(holder, dict):
        raise _bad(f"{_spell(path[:-1])} is an array; give an item number like {_spell(path[:-1])}[0]", key)
    else:
        for other in EXCLUSIVE_KEYS.get(last, ()):
            holder.pop(other, None)
    holder[last] = value


def _split_quantity(text: str, key: str) -> tuple[float, str, bool]:
    match = _NUMBER.fullmatch(text)
    if not match:
        raise _bad("START and STOP must be numbers, optionally with a unit", key, text, "like 1.2 or '40 degC'")
    number = float(match.group(1))
    if not math.isfinite(number):
        raise _bad("not a finite number", key, text)
    return number, match.group(2), bool(_INTEGER.fullmatch(match.group(1)))


def parse_variation(text: str) -> Variation:
    """``"KEY=START:STOP:COUNT"`` -> :class:`Variation` with COUNT evenly spaced values from START
    to STOP. START and STOP may carry the same unit (``40 degC:70 degC:4``); whole numbers at
    both ends with a whole step give whole numbers (stage counts, feed stages)."""
    key, sign, spec = text.partition("=")
    key = key.strip()
    parts = spec.split(":")
    if not sign or not key or len(parts) != 3:
        raise _bad("cannot read the variation", key or text, text, "KEY=START:STOP:COUNT, e.g. specs.reflux_ratio=1.2:2.0:5")
    path = parse_key(key)
    start, start_unit, start_whole = _split_quantity(parts[0], key)
    stop, stop_unit, stop_whole = _split_quantity(parts[1], key)
    if start_unit != stop_unit:
        raise _bad("START and STOP must have the same unit", key, f"{start_unit or 'none'} and {stop_unit or 'none'}")
    count_text = parts[2].strip()
    if not _INTEGER.fullmatch(count_text) or not 1 <= int(count_text) <= MAX_POINTS:
        raise _bad("COUNT must be a whole number of points", key, count_text, f"1 to {MAX_POINTS}")
    count = int(count_text)
    if count == 1 and stop != start:
        raise _bad("one point needs START = STOP", key, spec)
    whole = start_whole and stop_whole and (count == 1 or (int(stop) - int(start)) % (count - 1) == 0)
    if whole:
        step = 0 if count == 1 else (int(stop) - int(start)) // (count - 1)
        values: tuple[Any, ...] = tuple(int(start) + i * step for i in range(count))
        magnitudes = tuple(float(value) for value in values)
    else:
        magnitudes = tuple(float(f"{value:.{VALUE_DIGITS}g}") for value in np.linspace(start, stop, count))
        values = magnitudes
    if start_unit:
        values = tuple(f"{value:.{VALUE_DIGITS}g} {start_unit}" for value in values)
    decimals = max(len(found) for found in (_DECIMALS.findall(parts[0]) + _DECIMALS.findall(parts[1]) + [""]))
    return Variation(key, path, values, magnitudes, start_unit, decimals)


def load_document(path: str | os.PathLike) -> dict:
    """The TOML document of a case file, as :func:`tomllib.load` reads it. Raises
    :class:`CaseError` naming the file."""
    try:
        with open(path, "rb") as handle:
            return tomllib.load(handle)
    except FileNotFoundError:
        raise CaseError("file not found", file=str(path)) from None
    except (OSError, UnicodeDecodeError) as exc:
        raise CaseError(f"cannot read the file ({exc})", file=str(path)) from None
    except tomllib.TOMLDecodeError as exc:
        raise CaseError(f"not valid TOML: {exc}", file=str(path)) from None


def sweep_points(variations: Sequence[Variation]) -> list[tuple[Any, ...]]:
    """The values of every point: the grid of the variations, the first varying slowest."""
    return list(itertools.product(*(variation.values for variation in variations)))


def _assignments(variations: Sequence[Variation], values: Sequence[Any]) -> tuple[tuple[tuple[PathPart, ...], str, Any], ...]:
    return tuple((variation.path, variation.key, value) for variation, value in zip(variations, values))


def _apply(document: Mapping, assignments) -> dict:
    point = copy.deepcopy(dict(document))
    for path, key, value in assignments:
        set_value(point, path, value, key)
    return point


# =======================================================================================
# Solving points
# =======================================================================================


_STATUS = ((CaseError, "bad input"), (SpecError, "infeasible"), (ThermoError, "thermo error"), (ConvergenceError, "not converged"))


def failed_point(index: int, values: tuple, exc: BaseException, seconds: float) -> PointOutcome:
    """The outcome of a point that raised ``exc`` (its status from the error's kind)."""
    if not isinstance(exc, TraystackError):
        return PointOutcome(index, values, "internal error",
                            f"{type(exc).__name__}: {exc} (a bug in traystack; please report it)", seconds=seconds)
    status = next((name for kind, name in _STATUS if isinstance(exc, kind)), "failed")
    return PointOutcome(index, values, status, str(exc), seconds=seconds)


def solve_point(index: int, document: Mapping, assignments, source_file: str = "<sweep>", start=None) -> PointOutcome:
    """Solve one point: write ``assignments`` ((path, key, value), ...) into a copy of the TOML
    ``document``, validate it and simulate, from ``start`` (a neighbour's StageProfile, see
    :func:`solver.warm_starts.solve_warm`) if given. Runs in a worker; never raises for a
    failed point."""
    started = time.perf_counter()
    values = tuple(value for _, _, value in assignments)
    try:
        case = parse_case(_apply(document, assignments), source_file=source_file)
        found = solve_warm(case, start)
    except Exception as exc:  # a failed point is reported, not fatal
        return failed_point(index, values, exc, time.perf_counter() - started)
    outcome = point_outcome(index, values, case, found.result, time.perf_counter() - started)
    if not found.result.converged:
        return outcome
    return dataclasses.replace(outcome, warm_start=found.warm, profile=starting_point(found.result))


def point_outcome(index: int, values: tuple, case, result, seconds: float) -> PointOutcome:
    """The outcome of one solved point (its numbers only if it converged). For a network: the
    condenser and reboiler duties summed over its columns, every exchanger's duty by name, no
    reflux or boilup ratio (each column has its own; a spec of the case or its duties give them)."""
    if not result.converged:  # the numbers of an unconverged iterate are not results
        return PointOutcome(index, values, "not converged", result.message, result.iterations, result.residual_norm,
                            seconds=seconds)
    if isinstance(result, NetworkResult):
        def total(kind: str) -> float | None:
            found = [duty for name, duty in result.duties.items() if name.endswith(kind)]
            return float(sum(found)) if found else None
        return PointOutcome(index=index, values=values, status="converged", iterations=result.iterations,
                            residual_norm=result.residual_norm, condenser_duty=total(".condenser"),
                            reboiler_duty=total(".reboiler"), seconds=seconds, duties=dict(result.duties),
                            products={name: (p["flow"], tuple(p["composition"])) for name, p in result.products.items()})
    return PointOutcome(
        index=index,
        values=values,
        status="converged",
        iterations=result.iterations,
        residual_norm=result.residual_norm,
        condenser_duty=result.condenser_duty,
        reboiler_duty=result.reboiler_duty,
        reflux_ratio=result.reflux_ratio,
        boilup_ratio=result.boilup_ratio,
        products={name: (p["flow"], tuple(p["composition"])) for name, p in result.products().items()},
        seconds=seconds,
        diameters=_diameters(case, result),
    )


def _diameters(case, result) -> dict[str, float] | None:
    """Each section's diameter (m) when the case has a [sizing] table (sweep keys such as
    ``sizing.tray_spacing`` and ``sizing.flood_fraction`` move them); None otherwise."""
    if case.sizing is None:
        return None
    from .sizing import size_column
    from .thermo.package import ThermoPackage

    sizing = size_column(case, result, ThermoPackage.from_case(case))
    return {section.section.name: section.diameter for section in sizing.sections}


def run_sweep(
    document: Mapping,
    variations: Sequence[Variation],
    executor: Executor,
    *,
    source_file: str = "<sweep>",
    progress: Callable[[PointOutcome], None] | None = None,
    warm: bool = False,
    chains: int = 1,
    done: Mapping[int, PointOutcome] | None = None,
) -> SweepResult:
    """Solve every point of the grid of ``variations`` through ``executor``.

    Each point is first validated here (writing its values and parsing the case); a point that
    does not validate is a failed point and is not sent to the executor. When no point
    validates, the sweep itself is bad input: :class:`CaseError` with the first point's
    message. ``progress`` is called with each outcome as it arrives.

    With ``warm``, the points go to the executor as ``chains`` runs of neighbouring points, and
    in each run a point starts from its nearest converged neighbour (:mod:`solver.warm_starts`),
    the default start where there is none or Newton fails from it.

    ``done`` holds points already solved (a resumed study, :mod:`solver.sweep_log`), by index:
    they are not solved again, and their profiles (if they carry them) are neighbours of a warm
    sweep. ``progress`` gets each outcome with its converged profile (``profile``), the result
    holds them without."""
    if not variations:
        raise CaseError("nothing to vary", key="--vary", expected="at least one --vary KEY=START:STOP:COUNT")
    if len({variation.path for variation in variations}) != len(variations):
        raise CaseError("the same key is varied twice", key="--vary", value=[v.key for v in variations])
    points = sweep_points(variations)
    if len(points) > MAX_POINTS:
        raise CaseError(f"the sweep has {len(points)} points", key="--vary", expected=f"at most {MAX_POINTS}")
    outcomes: list[PointOutcome | None] = [None] * len(points)
    futures: dict = {}
    components: list[str] = []  # filled by the first point that validates
    try:
        _solve_points(points, variations, document, executor, source_file, progress, outcomes, futures, components,
                      chains if warm else 0, done or {})
    except KeyboardInterrupt:
        for future in futures:  # the points not started are dropped; the caller stops the workers
            future.cancel()
        done = tuple(o for o in outcomes if o is not None)
        raise SweepInterrupted(SweepResult(tuple(variations), tuple(components), done, len(points))) from None
    return SweepResult(tuple(variations), tuple(components), tuple(o for o in outcomes if o is not None))


def _solve_points(points, variations, document, executor, source_file, progress, outcomes: list, futures: dict,
                  components: list, chains: int = 0, done: Mapping[int, PointOutcome] = {}) -> None:
    """The body of :func:`run_sweep`: fills ``outcomes``, ``futures`` and ``components`` as it
    goes, so that an interrupt leaves what is done. ``chains`` > 0: warm-started runs."""
    valid = []
    for index, values in enumerate(points):
        assignments = _assignments(variations, values)
        try:
            case = parse_case(_apply(document, assignments), source_file=source_file)
        except TraystackError as exc:
            outcomes[index] = failed_point(index, tuple(values), exc, 0.0)
            continue
        if not components:
            components.extend(case.component_names)
        valid.append((index, assignments, _coordinates(variations, values), stage_layout(case)))
    if not valid:
        first = outcomes[0]
        raise CaseError(f"no point of the sweep is a valid case; the first: {first.message}", key="--vary")
    for outcome in outcomes:
        if outcome is not None and progress is not None:
            progress(outcome)
    solved: list = []  # converged points of a warm sweep: where they lie and their profiles
    todo = []
    for k, (index, _, coordinates, layout) in enumerate(valid):
        if index not in done:
            todo.append(k)
            continue
        outcomes[index] = dataclasses.replace(done[index], profile=None)
        if done[index].profile is not None:
            solved.append(SolvedPoint(coordinates, done[index].profile, layout))
    runs = [[int(k) for k in run] for run in np.array_split(np.array(todo, dtype=int), min(chains, len(todo)))] \
        if chains and todo else []
    following = {run[i]: run[i + 1] for run in runs for i in range(len(run) - 1)}

    def submit(k: int) -> None:
        index, assignments, coordinates, layout = valid[k]
        start = warm_start(coordinates, layout, solved) if chains else None
        futures[executor.submit(solve_point, index, document, assignments, source_file, start)] = k

    for k in ([run[0] for run in runs] if chains else todo):
        submit(k)
    while futures:
        done, _ = wait(futures, return_when=FIRST_COMPLETED)
        for future in done:
            k = futures.pop(future)
            index = valid[k][0]
            try:
                outcome = future.result()
            except Exception as exc:  # a worker that died (e.g. killed for memory) is one failed point
                outcome = failed_point(index, tuple(points[index]), exc, 0.0)
            if outcome.profile is not None:
                solved.append(SolvedPoint(valid[k][2], outcome.profile, valid[k][3]))
            outcomes[index] = dataclasses.replace(outcome, profile=None)
            if progress is not None:
                progress(outcome)
            if k in following:
                submit(following[k])


def _coordinates(variations: Sequence[Variation], values: Sequence[Any]) -> tuple[float, ...]:
    """Where a point lies in the study, each varied value scaled to its range (0..1)."""
    scaled = []
    for variation, value in zip(variations, values):
        numbers = np.asarray(variation.magnitudes, dtype=float)
        span = float(numbers.max() - numbers.min()) or 1.0
        scaled.append(float((numbers[variation.values.index(value)] - numbers.min()) / span))
    return tuple(scaled)
