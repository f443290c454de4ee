"""Warm starts along a study: each case of a series solved from the converged profile of its
nearest already solved neighbour, the default start (the whole fallback chain) only where there
is no neighbour or Newton fails from it.

Neighbours are near in the study's own coordinates (each varied value scaled to its range, so
that every key counts alike). A neighbour's profile of another stage count is stretched over the
new column's stages (temperatures linearly, component flows in their logarithms,
:func:`solver.shortening.stretch_profile`). Newton from a converged neighbour is continuation in
the varied value with a zeroth-order predictor (e.g. Allgower & Georg, *Introduction to
Numerical Continuation Methods*, 1990/2003, ch. 1), which near a solution needs few iterations
and none of the default start's bubble-point sweeps.

A network's start is its converged unknowns in SI (:class:`NetworkStart`: stage temperatures,
component flows, the duties and free connection rates by name), scaled again by the next case's
own flow and energy scales; a network of other stage counts starts from its default start.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Mapping, Sequence

import numpy as np

from .case import Case
from .engine import simulate, stage_profile
from .errors import ConvergenceError, ThermoError
from .network_engine import build_network_system, simulate_network
from .network_mesh import NetworkSystem
from .network_results import NetworkResult
from .newton import NewtonOptions
from .results import Result
from .shortening import stretch_profile
from .streams import StageProfile
from .thermo.package import ThermoPackage

__all__ = ["NetworkStart", "SolvedPoint", "WarmSolve", "fitted_start", "nearest_profile", "network_start", "scaled_start",
           "solve_warm", "solved_point", "starting_point"]


@dataclass(frozen=True)
class NetworkStart:
    """A converged network's unknowns in SI: temperatures (K), liquid and vapor component flows
    (mol/s) of every stage's slots, and the duties (W) and connection rates (mol/s) by name."""

    temperature: np.ndarray
    liquid: np.ndarray
    vapor: np.ndarray
    duties: Mapping[str, float]
    rates: Mapping[str, float]


@dataclass(frozen=True)
class SolvedPoint:
    """A converged point of a study: its scaled coordinates and its stage profile (a
    :class:`NetworkStart` for a network)."""

    coordinates: tuple[float, ...]
    profile: StageProfile | NetworkStart


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


def network_start(result: NetworkResult) -> NetworkStart:
    """The unknowns of a solved network, in SI (see :class:`NetworkStart`)."""
    return NetworkStart(result.temperature.copy(), result.liquid_flow[:, None] * result.x, result.vapor_flow[:, None] * result.y,
                        dict(result.duties), {name: c["flow"] for name, c in result.connections.items()})


def scaled_start(system: NetworkSystem, start: NetworkStart) -> np.ndarray | None:
    """``start`` as the scaled unknowns of ``system``; None when the networks differ (stage
    count, or an extra unknown ``start`` does not hold)."""
    if len(start.temperature) != system.N:
        return None
    fs, fe = system.flow_scale, system.flow_scale * system.energy_scale
    extras = []
    for name in system.extra_names:
        owner, _, what = name.rpartition(".")
        if what == "rate" and owner in start.rates:
            extras.append(start.rates[owner] / fs)
        elif what == "duty" and owner in start.duties:
            extras.append(start.duties[owner] / fe)
        elif name in start.duties:
            extras.append(start.duties[name] / fe)
        else:
            return None
    return system.pack(start.temperature, start.liquid / fs, start.vapor / fs, extras)


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


def solved_point(coordinates: Sequence[float], result: Result | NetworkResult) -> SolvedPoint:
    """The point to remember of a converged ``result``."""
    return SolvedPoint(tuple(float(c) for c in coordinates), starting_point(result))
