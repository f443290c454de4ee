"""Liquid-liquid phase stability by the tangent-plane distance, for any activity model.

M. L. Michelsen, "The isothermal flash problem. Part I. Stability", Fluid Phase Equilib. 9
(1982) 1-19. A liquid of composition z at temperature T is stable when no trial liquid w has a
negative tangent-plane distance (divided by RT)

    tpd(w) = sum_i w_i (ln w_i + ln gamma_i(w) - d_i),   d_i = ln z_i + ln gamma_i(z).

The search works in mole numbers W (w = W / sum W) on the modified distance
tm(W) = 1 + sum_i W_i (ln W_i + ln gamma_i(W) - d_i - 1), whose stationary points are those of
tpd, with tm < 0 exactly where tpd < 0. From several trial starts per state (one almost pure
liquid of each component, and the liquids proportional to z gamma(z) and to z / gamma(z)) it
iterates by successive substitution, ln W_i = d_i - ln gamma_i(W), then polishes the trials
that have not converged by Newton's method in alpha_i = 2 sqrt(W_i) (Michelsen 1982), whose
Hessian is delta_ij (1 + g_i / 2) + sqrt(W_i W_j) d ln gamma_i / d W_j with
g_i = ln W_i + ln gamma_i - d_i, with its eigenvalues kept positive and a backtracking line
search on tm. Every trial of every state is iterated together, one model call per step.

An activity model here is anything with ``component_count`` and
``evaluate(temperature (n,), x (n, c), derivatives) -> ActivityResult`` whose d ln gamma / d x
holds off the simplex (every model of :mod:`solver.thermo.activity` and
:mod:`solver.thermo.unifac`). Wilson's equation cannot predict two liquids; it is simply found
stable.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from solver.errors import ThermoError

__all__ = ["LiquidStability", "liquid_stability"]

#: a tangent-plane distance below minus this counts as a split (dimensionless, tpd / RT)
SPLIT_TOLERANCE = 1e-7

#: mole fraction of the other components in the almost pure trial liquids, shared equally
PURE_TRIAL_IMPURITY = 1e-3

SUCCESSIVE_SUBSTITUTIONS = 40
NEWTON_ITERATIONS = 40
CONVERGENCE = 1e-10  # on the largest change of ln W, or of the scaled gradient
TRIVIAL = 1e-6  # a trial this close to the state's own composition has fallen onto it
SMALLEST_AMOUNT = 1e-300  # floor of W and of z, so that logarithms stay finite


@dataclass(frozen=True)
class LiquidStability:
    """The stability test of one liquid state.

    ``minimum_tpd`` is the lowest tangent-plane distance (divided by RT, dimensionless) found
    at a stationary point of the trial search, ``trial_composition`` (c,) the trial liquid
    where it was found (the incipient second liquid when ``stable`` is False; the state's own
    composition when every trial fell back onto it). ``converged`` is False when some trial
    did not reach a stationary point in the iterations allowed (then ``stable`` rests on the
    trials that did)."""

    stable: bool
    minimum_tpd: float
    trial_composition: np.ndarray
    converged: bool


def _trial_starts(z: np.ndarray, ln_gamma_z: np.ndarray) -> np.ndarray:
    """(n, t, c) trial mole numbers: almost pure liquids of each component, then z gamma(z)
    and z / gamma(z)."""
    n, c = z.shape
    impurity = PURE_TRIAL_IMPURITY / max(c - 1, 1)
    pure = np.full((c, c), impurity)
    np.fill_diagonal(pure, 1.0 - PURE_TRIAL_IMPURITY if c > 1 else 1.0)
    starts = [np.broadcast_to(pure, (n, c, c))]
    for sign in (1.0, -1.0):
        w = z * np.exp(sign * ln_gamma_z)
        starts.append((w / w.sum(axis=1, keepdims=True))[:, None, :])
    return np.concatenate(starts, axis=1)


def _distance(model, temperature: np.ndarray, w: np.ndarray, d: np.ndarray) -> np.ndarray:
    """tpd (N,) of normalized compositions w (N, c)."""
    ln_gamma = model.evaluate(temperature, w, derivatives=False).ln_gamma
    return np.einsum("si,si->s", w, np.log(w) + ln_gamma - d)


def _modified_distance(W: np.ndarray, ln_gamma: np.ndarray, d: np.ndarray) -> np.ndarray:
    return 1.0 + np.einsum("si,si->s", W, np.log(W) + ln_gamma - d - 1.0)


def _trivial(W: np.ndarray, z: np.ndarray) -> np.ndarray:
    """Rows of W whose composition is the state's own, z."""
    return np.max(np.abs(W / W.sum(axis=1, keepdims=True) - z), axis=1) < TRIVIAL


def _newton(model, temperature, W, d, z, active):
    """Newton iterations in alpha = 2 sqrt(W) for the rows of W (N, c) marked ``active``;
    returns W and the rows that converged (or fell onto the trivial solution z)."""
    converged = ~active
    for _ in range(NEWTON_ITERATIONS):
        rows = np.flatnonzero(~converged)
        if rows.size == 0:
            break
        Wr, Tr, dr = W[rows], temperature[rows], d[rows]
        result = model.evaluate(Tr, Wr, derivatives=True)
        g = np.log(Wr) + result.ln_gamma - dr
        root = np.sqrt(Wr)
        gradient = root * g
        done = (np.max(np.abs(gradient), axis=1) < CONVERGENCE) | _trivial(Wr, z[rows])
        converged[rows[done]] = True
        hessian = root[:, :, None] * result.d_ln_gamma_dx * root[:, None, :]
        index = np.arange(Wr.shape[1])
        hessian[:, index, index] += 1.0 + 0.5 * g
        values, vectors = np.linalg.eigh(0.5 * (hessian + hessian.transpose(0, 2, 1)))
        values = np.maximum(np.abs(values), 1e-8 * np.maximum(np.abs(values).max(axis=1, keepdims=True), 1.0))
        step = -np.einsum("sij,sj->si", vectors, np.einsum("sji,sj->si", vectors, gradient) / values)
        alpha = 2.0 * root
        current = _modified_distance(Wr, result.ln_gamma, dr)
        factor = np.ones(rows.size)
        close = np.max(np.abs(gradient), axis=1) < 1e-6
        accepted = np.zeros(rows.size, dtype=bool)
        for _ in range(30):
            trial_alpha = alpha + factor[:, None] * step
            positive = np.all(trial_alpha > 0.0, axis=1)
            trial_W = np.maximum(0.25 * trial_alpha * trial_alpha, SMALLEST_AMOUNT)
            ln_gamma = model.evaluate(Tr, trial_W, derivatives=False).ln_gamma
            # near the solution the full step is taken: tm then changes by round-off only
            lower = positive & ((_modified_distance(trial_W, ln_gamma, dr) <= current + 1e-12) | close)
            newly = lower & ~accepted & ~done
            Wr[newly] = trial_W[newly]
            accepted |= newly
            if np.all(accepted | done):
                break
            factor = np.where(accepted | done, factor, 0.5 * factor)
        stalled = ~accepted & ~done
        converged[rows[stalled]] = True  # no descent left: a stationary point to round-off
        W[rows] = Wr
    return W, converged


def liquid_stability(model, temperature, x) -> tuple[LiquidStability, ...]:
    """Tangent-plane stability of the liquids x (n, c) at temperature (n,) [K] under the
    activity ``model``; one :class:`LiquidStability` per state (Michelsen 1982)."""
    temperature = np.asarray(temperature, dtype=float)
    z = np.atleast_2d(np.asarray(x, dtype=float))
    if temperature.ndim == 0:
        temperature = np.full(z.shape[0], float(temperature))
    n, c = z.shape
    if c != model.component_count or temperature.shape != (n,) or not np.all(np.isfinite(z)) or np.any(z < 0.0):
        raise ThermoError(
            f"liquid stability: temperature must have shape (n,) and x shape (n, {model.component_count}) with "
            f"non-negative mole fractions; got temperature {temperature.shape} and x {z.shape}"
        )
    z = np.maximum(z / z.sum(axis=1, keepdims=True), SMALLEST_AMOUNT)
    ln_gamma_z = model.evaluate(temperature, z, derivatives=False).ln_gamma
    d = np.log(z) + ln_gamma_z
    starts = _trial_starts(z, ln_gamma_z)
    t = starts.shape[1]
    T_all = np.repeat(temperature, t)
    d_all = np.repeat(d, t, axis=0)
    z_all = np.repeat(z, t, axis=0)
    W = starts.reshape(n * t, c).copy()

    active = np.ones(n * t, dtype=bool)
    for _ in range(SUCCESSIVE_SUBSTITUTIONS):
        rows = np.flatnonzero(active)
        if rows.size == 0:
            break
        ln_gamma = model.evaluate(T_all[rows], W[rows], derivatives=False).ln_gamma
        ln_W = np.minimum(d_all[rows] - ln_gamma, 700.0)
        change = np.max(np.abs(ln_W - np.log(W[rows])), axis=1)
        W[rows] = np.maximum(np.exp(ln_W), SMALLEST_AMOUNT)
        active[rows[(change < CONVERGENCE) | _trivial(W[rows], z_all[rows])]] = False
    W, converged = _newton(model, T_all, W, d_all, z_all, active)

    w = W / W.sum(axis=1, keepdims=True)
    tpd = _distance(model, T_all, w, d_all).reshape(n, t)
    w = w.reshape(n, t, c)
    converged = converged.reshape(n, t)
    results = []
    for s in range(n):
        best = int(np.argmin(tpd[s]))
        minimum = float(tpd[s, best])
        split = minimum < -SPLIT_TOLERANCE
        composition = w[s, best].copy() if split or minimum < 0.0 else z[s].copy()
        results.append(LiquidStability(not split, minimum, composition, bool(converged[s].all())))
    return tuple(results)
