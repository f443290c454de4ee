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
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np

from .case import Case
from .engine import simulate, stage_profile
from .errors import ConvergenceError, ThermoError
from .newton import NewtonOptions
from .results import Result
from .shortening import stretch_profile
from .streams import StageProfile
from .thermo.package import ThermoPackage

__all__ = ["SolvedPoint", "WarmSolve", "fitted_start", "nearest_profile", "solve_warm", "solved_point"]


@dataclass(frozen=True)
class SolvedPoint:
    """A converged point of a study: its scaled coordinates and its stage profile."""

    coordinates: tuple[float, ...]
    profile: StageProfile


@dataclass(frozen=True)
class WarmSolve:
    """A result and how it was reached: ``warm`` True if Newton converged from a neighbour."""

    result: Result
    warm: bool


def nearest_profile(coordinates: Sequence[float], solved: Sequence[SolvedPoint]) -> StageProfile | None:
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


def solve_warm(case: Case, start: StageProfile | None, options: NewtonOptions | None = None, *,
               thermo: ThermoPackage | None = None) -> WarmSolve:
    """Solve ``case`` (with ``thermo`` if given, else the case's own) from ``start`` (a
    neighbour's profile), and if Newton does not converge from it (or there is none), by
    :func:`~solver.engine.simulate`'s whole fallback chain."""
    if start is not None and case.column is not None:
        try:
            result = simulate(case, options=options, thermo=thermo, start=fitted_start(start, case.column.stages))
        except (ConvergenceError, ThermoError):
            result = None
        if result is not None and result.converged:
            return WarmSolve(result, True)
    return WarmSolve(simulate(case, options=options, thermo=thermo), False)


def solved_point(coordinates: Sequence[float], result: Result) -> SolvedPoint:
    """The point to remember of a converged ``result``."""
    return SolvedPoint(tuple(float(c) for c in coordinates), stage_profile(result))
