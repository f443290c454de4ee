"""Homotopy continuation: reach a hard column solution from an easy one.

The path runs from ``t = 0`` (ideal-solution K-values, CMO enthalpies: the textbook column,
which the default start solves easily) to ``t = 1`` (the real model), see
:mod:`solver.thermo.homotopy`. Each point is solved by Newton's method from the solution of the
previous one; the step in ``t`` grows by half after a success and is halved after a failure
(natural-parameter continuation with step control, e.g. Allgower & Georg, *Numerical
Continuation Methods*, 1990, ch. 1). The path, with the Newton iterations of every point, is
returned for the record. :func:`trace_path` is the same continuation for any Newton system
(a column network's too).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from typing import Any, Callable

import numpy as np

from .initial import initial_estimate
from .mesh import MeshSystem
from .newton import NewtonOptions, NewtonResult, solve_system
from .streams import FlashedFeed
from .thermo.homotopy import HomotopyThermo

__all__ = ["MIN_STEP", "ContinuationResult", "PathPoint", "blended_feeds", "continue_to_real_model", "trace_path"]

MIN_STEP = 1.0 / 256.0


@dataclass(frozen=True)
class PathPoint:
    t: float
    converged: bool
    iterations: int
    residual_norm: float

    def as_dict(self) -> dict:
        return {"t": self.t, "converged": self.converged, "iterations": self.iterations, "residual_norm": self.residual_norm}


@dataclass(frozen=True)
class ContinuationResult:
    newton: NewtonResult | None  # the solve at t = 1, if reached
    path: tuple[PathPoint, ...] = field(default_factory=tuple)
    reached: float = 0.0  # the largest t solved

    @property
    def converged(self) -> bool:
        return self.newton is not None and self.newton.converged


def blended_feeds(feeds: tuple[FlashedFeed, ...], latent_heat: float, t: float) -> tuple[FlashedFeed, ...]:
    """The feeds with each enthalpy ``t h + (1 - t) (1 - q) lambda``: the real enthalpy at
    t = 1, the CMO model's (a feed's vapor fraction times one latent heat) at t = 0."""
    return tuple(
        dataclasses.replace(feed, h=t * feed.h + (1.0 - t) * ((1.0 - feed.q) * latent_heat)) for feed in feeds
    )


def continue_to_real_model(
    real_system: MeshSystem,
    options: NewtonOptions,
    first_step: float = 0.25,
    max_points: int = 60,
) -> ContinuationResult:
    """Trace the homotopy from the easy model to ``real_system``'s model."""
    base = real_system.thermo
    graph = real_system.graph

    def system_at(t: float) -> MeshSystem:
        if t >= 1.0:
            return real_system
        return MeshSystem(
            graph,
            HomotopyThermo(base, t),
            blended_feeds(real_system.feeds, base.cmo_latent_heat, t),
            real_system.specs,
            real_system.component_names,
            condenser_setting=real_system.condenser_setting,
            flow_scale=real_system.flow_scale,
            energy_scale=real_system.energy_scale,
        )

    return trace_path(system_at, initial_estimate, options, first_step, max_points)


def trace_path(
    system_at: Callable[[float], Any],
    first_start: Callable[[Any], np.ndarray],
    options: NewtonOptions,
    first_step: float = 0.25,
    max_points: int = 60,
) -> ContinuationResult:
    """Natural-parameter continuation of any Newton system along ``t`` from 0 to 1:
    ``system_at(t)`` builds the system at ``t`` (the real one at 1), ``first_start(system)``
    its start at ``t = 0``; each later point starts from the last solution."""
    path: list[PathPoint] = []
    start_system = system_at(0.0)
    result = solve_system(start_system, first_start(start_system), options)
    path.append(PathPoint(0.0, result.converged, result.iterations, result.residual_norm))
    if not result.converged:
        return ContinuationResult(None, tuple(path), 0.0)
    X, t, step = result.X, 0.0, first_step
    last = None
    while len(path) < max_points:
        target = min(1.0, t + step)
        result = solve_system(system_at(target), X, options)
        path.append(PathPoint(target, result.converged, result.iterations, result.residual_norm))
        if result.converged:
            X, t = result.X, target
            last = result
            if t >= 1.0:
                return ContinuationResult(result, tuple(path), 1.0)
            step = min(1.0, step * 1.5)
        else:
            step *= 0.5
            if step < MIN_STEP:
                break
    return ContinuationResult(last if t >= 1.0 else None, tuple(path), t)
