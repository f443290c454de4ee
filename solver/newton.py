"""Damped Newton's method with step bounds and a backtracking line search.

Each iteration solves ``J dX = -F`` with a sparse LU factorization (SuperLU through
``scipy.sparse.linalg.splu``), limits the step so that no temperature moves by more than
``max_temperature_step`` and no flow turns negative, then halves the step until the sum of
squared scaled residuals falls by the Armijo condition (Dennis & Schnabel, *Numerical Methods
for Unconstrained Optimization and Nonlinear Equations*, 1983, sec. 6.3).

Convergence criterion: the largest scaled residual is at most ``tolerance`` (default 1e-9:
component balances in fractions of the total feed, equilibrium relations in mole fraction,
enthalpy balances in fractions of total feed times a mean latent heat).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable

import numpy as np
import scipy.sparse.linalg as spla

from .errors import ConvergenceError


@dataclass(frozen=True)
class NewtonOptions:
    tolerance: float = 1e-9
    max_iterations: int = 60
    max_temperature_step: float = 20.0  # K
    min_flow_fraction: float = 0.02  # a flow may shrink to this fraction of its value in one step
    armijo: float = 1e-4
    max_halvings: int = 12


@dataclass(frozen=True)
class IterationRecord:
    iteration: int
    residual_norm: float  # largest scaled residual
    step_norm: float  # largest change of a scaled variable
    damping: float  # fraction of the Newton step taken

    def as_dict(self) -> dict:
        return {
            "iteration": self.iteration,
            "residual_norm": self.residual_norm,
            "step_norm": self.step_norm,
            "damping": self.damping,
        }


@dataclass(frozen=True)
class NewtonResult:
    X: np.ndarray
    residuals: np.ndarray
    converged: bool
    iterations: int
    residual_norm: float
    log: tuple[IterationRecord, ...] = field(default_factory=tuple)
    message: str = ""


def solve(
    evaluate: Callable,
    X0: np.ndarray,
    temperature_index: np.ndarray,
    flow_mask: np.ndarray,
    options: NewtonOptions = NewtonOptions(),
    describe_variable: Callable[[int], str] | None = None,
    describe_equation: Callable[[int], str] | None = None,
) -> NewtonResult:
    """Solve ``F(X) = 0``. ``evaluate(X, jacobian)`` returns an object with ``residuals`` and
    ``jacobian`` (CSC). Returns a :class:`NewtonResult`; does not raise on non-convergence
    (``converged`` is False and ``message`` says why) except for NaN/inf, which raises
    :class:`ConvergenceError` naming the equation or variable."""
    X = np.array(X0, dtype=float)
    log: list[IterationRecord] = []
    describe_variable = describe_variable or (lambda i: f"variable {i}")
    describe_equation = describe_equation or (lambda i: f"equation {i}")

    def check_finite(values: np.ndarray, what: str, namer) -> None:
        bad = np.flatnonzero(~np.isfinite(values))
        if len(bad):
            raise ConvergenceError(
                f"{what} is not a finite number at {namer(bad[0])} ({len(bad)} entries in all)",
                iteration_log=[r.as_dict() for r in log],
            )

    check_finite(X, "the starting estimate", describe_variable)
    current = evaluate(X, True)
    check_finite(current.residuals, "a residual of the starting estimate", describe_equation)
    norm = float(np.max(np.abs(current.residuals)))
    log.append(IterationRecord(0, norm, 0.0, 0.0))
    for iteration in range(1, options.max_iterations + 1):
        if norm <= options.tolerance:
            return NewtonResult(X, current.residuals, True, iteration - 1, norm, tuple(log), "converged")
        try:
            step = spla.splu(current.jacobian).solve(-current.residuals)
        except RuntimeError as exc:  # exactly singular
            return NewtonResult(
                X, current.residuals, False, iteration - 1, norm, tuple(log),
                f"the Jacobian is singular ({exc}); the specifications may not fix the column",
            )
        if not np.all(np.isfinite(step)):
            return NewtonResult(
                X, current.residuals, False, iteration - 1, norm, tuple(log),
                "the Newton step is not finite (ill-conditioned Jacobian)",
            )
        damping = 1.0
        largest_dT = float(np.max(np.abs(step[temperature_index]))) if len(temperature_index) else 0.0
        if largest_dT > options.max_temperature_step:
            damping = options.max_temperature_step / largest_dT
        flows = X[flow_mask]
        flow_steps = step[flow_mask]
        shrinking = flow_steps < 0
        if np.any(shrinking):
            # keep every flow above min_flow_fraction of its value (fraction to the boundary)
            limits = (1.0 - options.min_flow_fraction) * flows[shrinking] / -flow_steps[shrinking]
            positive = flows[shrinking] > 0
            if np.any(positive):
                damping = min(damping, float(np.min(limits[positive])))
        merit = 0.5 * float(current.residuals @ current.residuals)
        accepted = None
        trial_damping = damping
        for _ in range(options.max_halvings + 1):
            trial = X + trial_damping * step
            trial[flow_mask] = np.maximum(trial[flow_mask], 0.0)
            candidate = evaluate(trial, True)
            if np.all(np.isfinite(candidate.residuals)):
                trial_merit = 0.5 * float(candidate.residuals @ candidate.residuals)
                if trial_merit <= (1.0 - 2.0 * options.armijo * trial_damping) * merit:
                    accepted = (trial, candidate, trial_damping)
                    break
            trial_damping *= 0.5
        if accepted is None:
            # no decrease along the Newton direction: take the shortest trial step if finite,
            # so that the iteration can leave a saddle; the log shows it
            if np.all(np.isfinite(candidate.residuals)):
                accepted = (trial, candidate, trial_damping)
            else:
                return NewtonResult(
                    X, current.residuals, False, iteration - 1, norm, tuple(log),
                    "the line search found no finite point along the Newton step",
                )
        X_new, current, used = accepted
        step_norm = float(np.max(np.abs(X_new - X)))
        X = X_new
        norm = float(np.max(np.abs(current.residuals)))
        log.append(IterationRecord(iteration, norm, step_norm, used))
    if norm <= options.tolerance:
        return NewtonResult(X, current.residuals, True, options.max_iterations, norm, tuple(log), "converged")
    worst = int(np.argmax(np.abs(current.residuals)))
    return NewtonResult(
        X, current.residuals, False, options.max_iterations, norm, tuple(log),
        f"no convergence in {options.max_iterations} iterations; largest residual {norm:.3g} in the "
        f"{describe_equation(worst)}",
    )
