"""Warm starts along a study: each case of a series solved from the converged profile of its
nearest already solved neighbour, the default start (the whole fallback chain) only where there
is no neighbour or Newton fails from it.

Neighbours are near in the study's own coordinates (each varied value scaled to its range, so
that every key counts alike). A neighbour counts only if its stage layout (the stage count and
the stages that carry a feed, a side draw, a side heater or cooler, or a stage-temperature
spec) is this point's, or maps onto it: the same special stages in the same order, when each
section between them is stretched over the new section's stages (temperatures linearly,
component flows in their logarithms, :func:`solver.shortening.stretch_profile`). A neighbour
whose special stages come in another order (a side draw moved past the feed) is no start: its
profile has the draw's kink on the wrong side of the feed.

Newton from a converged neighbour is continuation in the varied value (e.g. Allgower & Georg,
*Introduction to Numerical Continuation Methods*, 1990/2003, ch. 1): with one neighbour a
zeroth-order predictor (its profile as it is), with a second solved point of the same layout on
the line through the neighbour and the new point, the secant predictor (the profile
extrapolated linearly along that line, component flows that would turn negative extrapolated
geometrically), which leaves Newton a residual of the order of the square of the step.

A network's start is its converged unknowns in SI (:class:`~solver.network_unknowns.NetworkStart`: stage temperatures,
component flows, the duties and free connection rates by name), scaled again by the next case's
own flow and energy scales, with the zeroth-order predictor; a network of other stage counts
starts from its default start.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np

from .case import Case
from .engine import simulate, stage_profile
from .errors import ConvergenceError, ThermoError
from .network_engine import build_network_system, simulate_network
from .network_results import NetworkResult
from .network_unknowns import NetworkStart, network_start, scaled_start
from .newton import NewtonOptions
from .results import Result
from .shortening import stretch_profile
from .streams import StageProfile
from .thermo.package import ThermoPackage

__all__ = ["SolvedPoint", "StageLayout", "WarmSolve", "extrapolated_profile", "fitted_start", "mapped_start",
           "nearest_profile", "solve_warm", "solved_point", "stage_layout", "starting_point", "warm_start"]


@dataclass(frozen=True)
class StageLayout:
    """The stage count and the special stages of a column: (stage, what) of every feed, side
    draw, side heater or cooler and stage-temperature spec, in stage order."""

    stages: int
    special: tuple[tuple[int, str], ...]

    def kinds(self) -> tuple[str, ...]:
        return tuple(what for _, what in self.special)


def stage_layout(case: Case) -> StageLayout | None:
    """The layout of a single-column case (None for a network)."""
    column = case.column
    if column is None:
        return None
    special = [(feed.stage, "feed") for feed in case.feeds]
    special += [(draw.stage, f"{draw.phase} draw") for draw in column.side_draws]
    special += [(duty.stage, "side duty") for duty in column.stage_duties]
    special += [(spec.stage, "stage spec") for spec in case.specs if spec.stage is not None]
    return StageLayout(column.stages, tuple(sorted(special)))


@dataclass(frozen=True)
class SolvedPoint:
    """A converged point of a study: its scaled coordinates, its stage profile (a
    :class:`NetworkStart` for a network) and layout."""

    coordinates: tuple[float, ...]
    profile: StageProfile | NetworkStart
    layout: StageLayout | None = None


@dataclass(frozen=True)
class WarmSolve:
    """A result and how it was reached: ``warm`` True if Newton converged from a neighbour."""

    result: Result | NetworkResult
    warm: bool


def nearest_profile(coordinates: Sequence[float], solved: Sequence[SolvedPoint]) -> StageProfile | NetworkStart | None:
    """The profile of the solved point nearest to ``coordinates`` (Euclidean), or None."""
    if not solved:
        return None
    here = np.asarray(coordinates, dtype=float)
    distances = [float(np.sum((np.asarray(point.coordinates) - here) ** 2)) for point in solved]
    return solved[int(np.argmin(distances))].profile


def mapped_start(profile: StageProfile, old: StageLayout | None, new: StageLayout | None) -> StageProfile | None:
    """``profile`` (of a column of layout ``old``) as a start for a column of layout ``new``:
    as it is for the same layout; each section between special stages stretched over the new
    section when the special stages come in the same order; None otherwise."""
    if old == new:
        return profile
    if old is None or new is None or old.kinds() != new.kinds():
        return None
    new_anchors = [1.0, *(float(stage) for stage, _ in new.special), float(new.stages)]
    old_anchors = [1.0, *(float(stage) for stage, _ in old.special), float(old.stages)]
    return stretch_profile(profile, np.interp(np.arange(1.0, new.stages + 1.0), new_anchors, old_anchors))


def extrapolated_profile(near: StageProfile, far: StageProfile, ratio: float) -> StageProfile:
    """``near + ratio (near - far)`` of two profiles of one column: temperatures and component
    flows linearly, a flow that would not stay positive geometrically (``near (near/far)^ratio``)."""
    def extend(a: np.ndarray, b: np.ndarray) -> np.ndarray:
        linear = a + ratio * (a - b)
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            geometric = np.where((a > 0) & (b > 0), a * (a / np.where(b > 0, b, 1.0)) ** ratio, 0.0)
        return np.where(linear > 0, linear, geometric)

    return StageProfile.from_component_flows(
        near.temperature + ratio * (near.temperature - far.temperature), near.pressure,
        extend(near.liquid_component_flows, far.liquid_component_flows),
        extend(near.vapor_component_flows, far.vapor_component_flows),
    )


def warm_start(coordinates: Sequence[float], layout: StageLayout | None,
               solved: Sequence[SolvedPoint]) -> StageProfile | NetworkStart | None:
    """The start of a point at ``coordinates`` of ``layout`` from the ``solved`` points: the
    nearest one of the same layout, extrapolated along the line through it from the nearest
    other one of that layout on that line (beyond it, at most 1.5 spacings away); else the
    nearest one whose layout maps onto this one, mapped (:func:`mapped_start`); None if there
    is none. A network's points (layout None) start from the nearest one as it is."""
    here = np.asarray(coordinates, dtype=float)
    same = [point for point in solved if point.layout == layout]
    if same:
        near = same[int(np.argmin([np.sum((np.asarray(p.coordinates) - here) ** 2) for p in same]))]
        ahead = here - np.asarray(near.coordinates)
        best: tuple[float, float] | None = None  # (spacing, ratio)
        for point in same:
            back = np.asarray(near.coordinates) - np.asarray(point.coordinates)
            spacing = float(back @ back)
            if spacing == 0.0:
                continue
            ratio = float(ahead @ back) / spacing
            on_line = np.allclose(ahead, ratio * back, atol=1e-9)
            if on_line and 0.0 < ratio <= 1.5 and (best is None or spacing < best[0]):
                best, far = (spacing, ratio), point
        if best is None or not isinstance(near.profile, StageProfile):
            return near.profile
        return extrapolated_profile(near.profile, far.profile, best[1])
    order = np.argsort([np.sum((np.asarray(p.coordinates) - here) ** 2) for p in solved]) if solved else []
    for k in order:
        start = mapped_start(solved[k].profile, solved[k].layout, layout)
        if start is not None:
            return start
    return None


def fitted_start(profile: StageProfile, stages: int) -> StageProfile:
    """``profile`` as it is, or stretched evenly over ``stages`` stages."""
    if profile.stage_count == stages:
        return profile
    return stretch_profile(profile, np.linspace(1.0, float(profile.stage_count), stages))


def solve_warm(case: Case, start: StageProfile | NetworkStart | None, options: NewtonOptions | None = None, *,
               thermo: ThermoPackage | None = None) -> WarmSolve:
    """Solve ``case`` (with ``thermo`` if given, else the case's own) from ``start`` (a
    neighbour's profile, or a network's :class:`NetworkStart`), and if Newton does not converge
    from it (or there is none), by the default chain (:func:`~solver.engine.simulate`, or
    :func:`~solver.network_engine.simulate_network` for a network)."""
    if case.network is not None:
        return _solve_network_warm(case, start, options, thermo)
    if start is not None and case.column is not None:
        try:
            result = simulate(case, options=options, thermo=thermo, start=fitted_start(start, case.column.stages))
        except (ConvergenceError, ThermoError):
            result = None
        if result is not None and result.converged:
            return WarmSolve(result, True)
    return WarmSolve(simulate(case, options=options, thermo=thermo), False)


def _solve_network_warm(case: Case, start: NetworkStart | None, options: NewtonOptions | None,
                        thermo: ThermoPackage | None) -> WarmSolve:
    thermo = thermo or ThermoPackage.from_case(case)
    X = scaled_start(build_network_system(case, thermo), start) if isinstance(start, NetworkStart) else None
    if X is not None:
        try:
            result = simulate_network(case, options=options, thermo=thermo, start=X)
        except (ConvergenceError, ThermoError):
            result = None
        if result is not None and result.converged:
            return WarmSolve(result, True)
    return WarmSolve(simulate_network(case, options=options, thermo=thermo), False)


def starting_point(result: Result | NetworkResult) -> StageProfile | NetworkStart:
    """What a neighbour starts from: a column's stage profile, a network's unknowns."""
    return network_start(result) if isinstance(result, NetworkResult) else stage_profile(result)


def solved_point(coordinates: Sequence[float], result: Result | NetworkResult,
                 layout: StageLayout | None = None) -> SolvedPoint:
    """The point to remember of a converged ``result`` (of a case of ``layout``)."""
    return SolvedPoint(tuple(float(c) for c in coordinates), starting_point(result), layout)
