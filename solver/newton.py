"""Damped Newton's method with step bounds and a backtracking line search.

Each iteration solves ``J dX = -F`` with a sparse LU factorization (SuperLU through
``scipy.sparse.linalg.splu``), limits the step so that no temperature moves by more than
``max_temperature_step``, moves shrinking flows multiplicatively so that none turns negative
(:func:`take_step`), then halves the step until the sum of squared scaled residuals falls by
the Armijo condition (Dennis & Schnabel, *Numerical Methods for Unconstrained Optimization and
Nonlinear Equations*, 1983, sec. 6.3), measured against the largest of the last few merits
(the non-monotone rule of Grippo, Lampariello & Lucidi, SIAM J. Numer. Anal. 23 (1986) 707).

Convergence criterion: the largest scaled residual is at most ``tolerance`` (default 1e-9:
component balances in fractions of the total feed, equilibrium relations in mole fraction,
enthalpy balances in fractions of total feed times a mean latent heat).
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable

import numpy as np

from .errors import ConvergenceError
from .mesh import MeshSystem
from .sparse_solve import lu_solve

__all__ = [
    "IterationRecord",
    "NewtonOptions",
    "NewtonResult",
    "dogleg_search",
    "solve",
    "solve_system",
    "take_step",
]


@dataclass(frozen=True)
class NewtonOptions:
    tolerance: float = 1e-9
    max_iterations: int = 60
    max_temperature_step: float = 20.0  # K
    armijo: float = 1e-4
    max_halvings: int = 8
    nonmonotone_memory: int = 4  # compare with the largest merit of this many past iterations
    temperature_scale: float = 10.0  # K that count as much as a flow equal to the total feed
    max_path_halvings: int = 30


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


def take_step(X: np.ndarray, step: np.ndarray, damping: float, flow_mask: np.ndarray) -> np.ndarray:
    """``X + damping * step``, except that a flow being reduced moves along ``l exp(dl / l)``:
    to first order the same step, but a flow can never reach zero or turn negative, and a
    trace component may fall by orders of magnitude in one step (Newton's method in the
    logarithm of the shrinking flows)."""
    trial = X + damping * step
    flows = X[flow_mask]
    change = damping * step[flow_mask]
    shrinking = (change < 0) & (flows > 0)
    updated = trial[flow_mask]
    with np.errstate(over="ignore", under="ignore"):
        updated[shrinking] = flows[shrinking] * np.exp(change[shrinking] / flows[shrinking])
    updated = np.maximum(updated, 0.0)
    trial[flow_mask] = updated
    return trial


def dogleg_search(evaluate, X, current, newton_step, scale, flow_mask, merit, options: NewtonOptions):
    """Fallback when no fraction of the Newton step lowers the residuals: backtrack along
    Powell's dogleg path (Powell 1970, in *Numerical Methods for Nonlinear Algebraic
    Equations*, ed. Rabinowitz) from the Newton point towards the Cauchy point of steepest
    descent and below it, in variables scaled by ``scale``, halving the radius until the
    residuals fall (Armijo on the predicted decrease). Returns (X, evaluation, fraction of the
    Newton step length) or None."""
    J = current.jacobian
    F = current.residuals
    gradient = J.T @ F  # gradient of 0.5 |F|^2 in X
    scaled_gradient = gradient / scale
    direction = -scaled_gradient / scale  # steepest descent of the scaled problem, in X
    with np.errstate(over="ignore", invalid="ignore"):
        curvature = J @ direction
        denominator = float(curvature @ curvature)
    if denominator <= 0 or not np.isfinite(denominator):
        return None
    cauchy = direction * (float(scaled_gradient @ scaled_gradient) / denominator)
    newton_length = float(np.linalg.norm(newton_step * scale))
    cauchy_length = float(np.linalg.norm(cauchy * scale))
    radius = min(newton_length, cauchy_length) if newton_length > 0 else cauchy_length
    for _ in range(options.max_path_halvings):
        if radius >= cauchy_length:
            # on the segment from the Cauchy point to the Newton point
            a = (newton_step - cauchy) * scale
            b = cauchy * scale
            aa, ab, bb = float(a @ a), float(a @ b), float(b @ b)
            t = 0.0 if aa == 0 else (-ab + np.sqrt(max(ab * ab - aa * (bb - radius * radius), 0.0))) / aa
            step = cauchy + min(max(t, 0.0), 1.0) * (newton_step - cauchy)
        else:
            step = cauchy * (radius / cauchy_length)
        predicted = merit - 0.5 * float(np.sum((F + J @ step) ** 2))
        trial = take_step(X, step, 1.0, flow_mask)
        candidate = evaluate(trial, False)
        if np.all(np.isfinite(candidate.residuals)) and predicted > 0:
            trial_merit = 0.5 * float(candidate.residuals @ candidate.residuals)
            if merit - trial_merit >= options.armijo * predicted:
                fraction = radius / newton_length if newton_length > 0 else 0.0
                return trial, candidate, fraction
        radius *= 0.5
    return None


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
    merits: list[float] = []
    scale = np.ones_like(X)
    scale[temperature_index] = 1.0 / options.temperature_scale
    _check_finite(X, "the starting estimate", describe_variable, log)
    current = evaluate(X, True)
    _check_finite(current.residuals, "a residual of the starting estimate", describe_equation, log)
    norm = float(np.max(np.abs(current.residuals)))
    log.append(IterationRecord(0, norm, 0.0, 0.0))

    def stopped(iterations: int, message: str) -> NewtonResult:
        return NewtonResult(X, current.residuals, False, iterations, norm, tuple(log), message)

    for iteration in range(1, options.max_iterations + 1):
        if norm <= options.tolerance:
            return NewtonResult(X, current.residuals, True, iteration - 1, norm, tuple(log), "converged")
        # the Jacobian of the point accepted last, only now that it is needed (an evaluation that
        # builds it on first reading never builds it at the converged point)
        if current.jacobian is None:  # a shortened step's residuals-only trial
            current = evaluate(X, True)
        step, trouble = _newton_step(current)
        if step is None:
            return stopped(iteration - 1, trouble)
        merit = 0.5 * float(current.residuals @ current.residuals)
        merits.append(merit)
        reference = max(merits[-options.nonmonotone_memory :])
        damping = _bounded_damping(step, temperature_index, options)
        accepted = _backtrack(evaluate, X, step, damping, flow_mask, merit, reference, options)
        if accepted is None:
            accepted = dogleg_search(evaluate, X, current, step, scale, flow_mask, merit, options)
            if accepted is None:
                return stopped(
                    iteration - 1,
                    "neither the Newton step nor the steepest-descent path lowers the residuals "
                    f"(largest residual {norm:.3g} in the {describe_equation(int(np.argmax(np.abs(current.residuals))))})",
                )
        X_new, current, used = accepted
        step_norm = float(np.max(np.abs(X_new - X)))
        X = X_new
        norm = float(np.max(np.abs(current.residuals)))
        log.append(IterationRecord(iteration, norm, step_norm, used))
    if norm <= options.tolerance:
        return NewtonResult(X, current.residuals, True, options.max_iterations, norm, tuple(log), "converged")
    worst = int(np.argmax(np.abs(current.residuals)))
    return stopped(
        options.max_iterations,
        f"no convergence in {options.max_iterations} iterations; largest residual {norm:.3g} in the "
        f"{describe_equation(worst)}",
    )


def _check_finite(values: np.ndarray, what: str, namer: Callable[[int], str], log: list[IterationRecord]) -> None:
    bad = np.flatnonzero(~np.isfinite(values))
    if len(bad):
        raise ConvergenceError(
            f"{what} is not a finite number at {namer(bad[0])} ({len(bad)} entries in all)",
            iteration_log=[r.as_dict() for r in log],
        )


def _newton_step(current) -> tuple[np.ndarray | None, str]:
    """The full Newton step ``-J^-1 F`` by sparse LU, or None and the reason there is none."""
    step, reason = lu_solve(current.jacobian, -current.residuals)
    if step is None:
        if reason.startswith("singular"):
            return None, f"the Jacobian is {reason}; the specifications may not fix the column"
        return None, "the Newton step is not finite (ill-conditioned Jacobian)"
    return step, ""


def _bounded_damping(step: np.ndarray, temperature_index: np.ndarray, options: NewtonOptions) -> float:
    """The fraction of the step that moves no temperature by more than the step bound."""
    largest_dT = float(np.max(np.abs(step[temperature_index]))) if len(temperature_index) else 0.0
    if largest_dT > options.max_temperature_step:
        return options.max_temperature_step / largest_dT
    return 1.0


def _backtrack(evaluate, X, step, damping, flow_mask, merit, reference, options: NewtonOptions):
    """Halve the step from ``damping`` until the merit meets the non-monotone Armijo condition
    against ``reference``: (X, evaluation, damping used), or None. Only the first trial's
    Jacobian is evaluated with it (a full step is the common case)."""
    for halving in range(options.max_halvings + 1):
        trial = take_step(X, step, damping, flow_mask)
        with np.errstate(divide="ignore", over="ignore", invalid="ignore"):  # a wild trial is rejected below
            candidate = evaluate(trial, halving == 0)
        if np.all(np.isfinite(candidate.residuals)):
            trial_merit = 0.5 * float(candidate.residuals @ candidate.residuals)
            if trial_merit <= reference - 2.0 * options.armijo * damping * merit:
                return trial, candidate, damping
        damping *= 0.5
    return None


def solve_system(system: MeshSystem, X0: np.ndarray, options: NewtonOptions = NewtonOptions()) -> NewtonResult:
    """:func:`solve` on a MESH system from its unknowns ``X0``, with its own names for the
    variables and equations in messages."""
    return solve(
        system.evaluate, X0, system.temperature_index(), system.flow_mask(), options,
        describe_variable=system.variable_name, describe_equation=system.equation_name,
    )
