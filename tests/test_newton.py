"""Damped Newton's method on small systems with known solutions."""

from __future__ import annotations

from types import SimpleNamespace

import numpy as np
import pytest
import scipy.sparse as sp

from solver.errors import ConvergenceError
from solver.newton import NewtonOptions, solve, take_step


def system(function, jacobian):
    def evaluate(X, with_jacobian=True):
        return SimpleNamespace(residuals=function(X), jacobian=sp.csc_matrix(jacobian(X)) if with_jacobian else None)

    return evaluate


def test_quadratic_convergence_on_a_smooth_system():
    # x0 is a "temperature", x1 and x2 "flows"; solution (300, 2, 3)
    f = lambda X: np.array([X[0] - 300.0 + 0.1 * (X[1] - 2.0), X[1] ** 2 - 4.0, X[1] * X[2] - 6.0])
    J = lambda X: np.array([[1.0, 0.1, 0.0], [0.0, 2 * X[1], 0.0], [0.0, X[2], X[1]]])
    result = solve(system(f, J), np.array([290.0, 3.0, 1.0]), np.array([0]), np.array([False, True, True]))
    assert result.converged
    np.testing.assert_allclose(result.X, [300.0, 2.0, 3.0], rtol=1e-12)
    norms = [entry.residual_norm for entry in result.log]
    # quadratic: the last steps square the residual (or reach round-off)
    assert norms[-1] < 1e-12 and norms[-2] < 1e-5
    assert result.iterations == len(result.log) - 1


def test_temperature_steps_are_bounded():
    f = lambda X: np.array([X[0] - 500.0])
    J = lambda X: np.array([[1.0]])
    result = solve(system(f, J), np.array([300.0]), np.array([0]), np.array([False]), NewtonOptions(max_temperature_step=20.0))
    assert result.converged
    steps = [entry.step_norm for entry in result.log[1:]]
    assert max(steps) <= 20.0 + 1e-9
    assert result.iterations >= 10


def test_flows_never_turn_negative():
    X = np.array([350.0, 1.0, 1e-12])
    step = np.array([5.0, -3.0, -1.0])
    trial = take_step(X, step, 1.0, np.array([False, True, True]))
    assert trial[0] == 355.0
    assert 0.0 < trial[1] < 1.0 and 0.0 <= trial[2] < 1e-12
    # to first order the multiplicative update is the Newton step
    small = take_step(X, np.array([0.0, -1e-6, 0.0]), 1.0, np.array([False, True, True]))
    assert small[1] == pytest.approx(1.0 - 1e-6, rel=1e-11)


def test_unconverged_is_reported_not_raised():
    f = lambda X: np.array([X[0] ** 2 + 1.0])  # no real root
    J = lambda X: np.array([[2.0 * X[0] if X[0] != 0 else 1e-3]])
    result = solve(system(f, J), np.array([1.0]), np.array([], dtype=int), np.array([False]), NewtonOptions(max_iterations=15))
    assert not result.converged
    assert result.message


def test_singular_jacobian_message():
    f = lambda X: np.array([X[0] + X[1] - 1.0, 2 * X[0] + 2 * X[1] - 3.0])
    J = lambda X: np.array([[1.0, 1.0], [2.0, 2.0]])
    result = solve(system(f, J), np.array([0.0, 0.0]), np.array([0]), np.array([False, True]))
    assert not result.converged
    assert "singular" in result.message or "not finite" in result.message


def test_nan_residual_names_the_equation():
    f = lambda X: np.array([np.nan, 0.0])
    J = lambda X: np.eye(2)
    with pytest.raises(ConvergenceError, match="balance 0"):
        solve(system(f, J), np.zeros(2), np.array([0]), np.array([False, True]), describe_equation=lambda i: f"balance {i}")
