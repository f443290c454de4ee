"""Homotopy continuation: reach a hard column solution from an easy one.

The path runs from ``t = 0`` (ideal-solution K-values, CMO enthalpies: the textbook column,
which the default start solves easily) to ``t = 1`` (the real model), see
:mod:`solver.thermo.homotopy`. Each point is solved by Newton's method from the solution of the
previous one; the step in ``t`` grows by half after a success and is halved after a failure
(natural-parameter continuation with step control, e.g. Allgower & Georg, *Numerical
Continuation Methods*, 1990, ch. 1). The path, with the Newton iterations of every point, is
returned for the record.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from .initial import initial_estimate
from .mesh import FeedData, MeshSystem
from .newton import NewtonOptions, NewtonResult, solve
from .thermo.homotopy import HomotopyThermo

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


def blended_feeds(real: FeedData, cmo_enthalpy_flows: np.ndarray, t: float) -> FeedData:
    return FeedData(real.component_flows, t * real.enthalpy_flows + (1.0 - t) * cmo_enthalpy_flows, real.states)


def continue_to_real_model(
    real_system: MeshSystem,
    specs,
    feed_details: list[dict],
    cmo_enthalpy_flows: np.ndarray,
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
            blended_feeds(real_system.feeds, cmo_enthalpy_flows, t),
            [row.spec for row in real_system.spec_rows],
            real_system.component_names,
            condenser_setting=real_system.condenser_setting,
            flow_scale=real_system.flow_scale,
            energy_scale=real_system.energy_scale,
        )

    def newton(system: MeshSystem, X: np.ndarray) -> NewtonResult:
        return solve(
            system.evaluate, X, system.temperature_index(), system.flow_mask(), options,
            describe_variable=system.variable_name, describe_equation=system.equation_name,
        )

    path: list[PathPoint] = []
    start_system = system_at(0.0)
    X = initial_estimate(start_system, tuple(specs), feed_details, graph.feed_stages)
    result = newton(start_system, X)
    path.append(PathPoint(0.0, result.converged, result.iterations, result.residual_norm))
    if not result.converged:
        return ContinuationResult(None, tuple(path), 0.0)
    X, t, step = result.X, 0.0, first_step
    last = None
    while len(path) < max_points:
        target = min(1.0, t + step)
        result = newton(system_at(target), X)
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
