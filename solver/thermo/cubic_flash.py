"""Bubble points with a cubic equation of state for both phases, vectorized over states.

For n liquid compositions x at given temperature (bubble pressure) or given pressure (bubble
temperature), the incipient vapor y and the K-values K_i = phi_i^L / phi_i^V are found by
Newton's method on f = ln sum_i K_i x_i with y held between steps (its derivative in ln P or T
from the analytic d ln K/dP, dT of :mod:`solver.thermo.cubic`), y then updated to
K_i x_i / sum_j K_j x_j; the usual scheme (e.g. M. L. Michelsen and J. M. Mollerup,
*Thermodynamic Models: Fundamentals and Computational Aspects*, 2nd ed., 2007, ch. 12). The
start is Wilson's K-value estimate K_i = (Pc_i/P) exp(5.373 (1 + w_i)(1 - Tc_i/T)) (G. M.
Wilson, 1968, AIChE meeting paper; as given by Michelsen and Mollerup, ch. 10).

Every state reports whether it converged and whether it collapsed onto the trivial solution
(y = x, one phase), checked by :func:`solver.thermo.cubic_critical.trivial_solution`; nothing is
returned silently unconverged.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from solver.thermo.cubic import CubicParameters, cubic_k_values
from solver.thermo.cubic_critical import trivial_solution

__all__ = ["BubblePoint", "bubble_pressure", "bubble_temperature", "wilson_k_values"]

_TOLERANCE = 1e-11
_MAX_ITERATIONS = 100
_LARGEST_LOG_STEP = 0.5  # in ln P
_LARGEST_TEMPERATURE_STEP = 20.0  # K


@dataclass(frozen=True)
class BubblePoint:
    """Bubble points of n liquids: ``temperature (n,)`` [K], ``pressure (n,)`` [Pa], the
    incipient vapor ``y (n,c)``, ``K (n,c)``; ``converged (n,)``, ``trivial (n,)`` (the
    iteration ended at y = x, no second phase), ``iterations`` taken."""

    temperature: np.ndarray
    pressure: np.ndarray
    y: np.ndarray
    K: np.ndarray
    converged: np.ndarray
    trivial: np.ndarray
    iterations: int


def wilson_k_values(parameters: CubicParameters, temperature, pressure) -> np.ndarray:
    """Wilson's estimate K_i = (Pc_i/P) exp(5.373 (1 + w_i)(1 - Tc_i/T)), shape (n, c)."""
    T = np.atleast_1d(np.asarray(temperature, dtype=float))[:, None]
    P = np.atleast_1d(np.asarray(pressure, dtype=float))[:, None]
    tc, pc, omega = parameters.critical_temperature, parameters.critical_pressure, parameters.acentric_factor
    return pc / P * np.exp(5.373 * (1.0 + omega) * (1.0 - tc / T))


def _normalized(x) -> np.ndarray:
    x = np.atleast_2d(np.asarray(x, dtype=float))
    return x / x.sum(axis=1, keepdims=True)


def bubble_pressure(parameters: CubicParameters, temperature, x) -> BubblePoint:
    """Bubble pressure [Pa] of liquids ``x (n,c)`` at ``temperature (n,)`` [K]."""
    x = _normalized(x)
    T = np.broadcast_to(np.asarray(temperature, dtype=float), (x.shape[0],)).copy()
    wilson = wilson_k_values(parameters, T, np.ones_like(T))  # K_i P
    P = np.einsum("nc,nc->n", wilson, x)
    y = wilson * x / P[:, None]
    return _iterate(parameters, T, P, x, y, solve_for_pressure=True)


def bubble_temperature(parameters: CubicParameters, pressure, x) -> BubblePoint:
    """Bubble temperature [K] of liquids ``x (n,c)`` at ``pressure (n,)`` [Pa]."""
    x = _normalized(x)
    P = np.broadcast_to(np.asarray(pressure, dtype=float), (x.shape[0],)).copy()
    # start: Wilson's K-values solved for sum K x = 1 by Newton in 1/T (ln K linear in 1/T)
    tc, omega = parameters.critical_temperature, parameters.acentric_factor
    inverse = 1.0 / np.full_like(P, np.dot(np.mean(x, axis=0), tc) * 0.7)
    for _ in range(50):
        K = wilson_k_values(parameters, 1.0 / inverse, P)
        total = np.einsum("nc,nc->n", K, x)
        slope = (K * x) @ (-5.373 * (1.0 + omega) * tc) / total  # d ln(sum K x) / d(1/T)
        step = np.clip(np.log(total) / slope, -0.2 * inverse, 0.2 * inverse)
        inverse = inverse - step
        if np.all(np.abs(np.log(total)) < 1e-10):
            break
    T = 1.0 / inverse
    K = wilson_k_values(parameters, T, P)
    y = K * x / np.einsum("nc,nc->n", K, x)[:, None]
    return _iterate(parameters, T, P, x, y, solve_for_pressure=False)


def _iterate(parameters, T, P, x, y, *, solve_for_pressure: bool) -> BubblePoint:
    converged = np.zeros(T.shape[0], dtype=bool)
    for iteration in range(1, _MAX_ITERATIONS + 1):
        k = cubic_k_values(parameters, T, P, x, y)
        Kx = k.K * x
        total = Kx.sum(axis=1)
        gap = np.log(total)
        new_y = Kx / total[:, None]
        y_change = np.abs(new_y - y).max(axis=1)
        converged = (np.abs(gap) < _TOLERANCE) & (y_change < _TOLERANCE)
        if np.all(converged):
            break
        weights = Kx / total[:, None]
        if solve_for_pressure:
            slope = np.einsum("nc,nc->n", weights, k.d_ln_K_dP) * P  # d f / d ln P
            step = np.clip(-gap / slope, -_LARGEST_LOG_STEP, _LARGEST_LOG_STEP)
            P = P * np.exp(np.where(converged, 0.0, step))
        else:
            slope = np.einsum("nc,nc->n", weights, k.d_ln_K_dT)
            step = np.clip(-gap / slope, -_LARGEST_TEMPERATURE_STEP, _LARGEST_TEMPERATURE_STEP)
            T = T + np.where(converged, 0.0, step)
        y = np.where(converged[:, None], y, new_y)
    k = cubic_k_values(parameters, T, P, x, y, derivatives=False)
    trivial = trivial_solution(k.liquid.Z, k.vapor.Z, k.K).trivial
    return BubblePoint(T, P, y, k.K, converged & ~trivial, trivial, iteration)
