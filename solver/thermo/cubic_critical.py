"""Checks a column engine can run on equation-of-state stages: the trivial solution (both
phases the same), and the distance of a stage from its mixture's critical point.

* :func:`trivial_solution`: the liquid and vapor of a stage have collapsed onto one phase when
  their compressibility factors coincide and every K-value is 1. A Newton iteration with an
  equation of state for both phases can converge there (e.g. M. L. Michelsen and J. M. Mollerup,
  *Thermodynamic Models: Fundamentals and Computational Aspects*, 2nd ed., 2007, ch. 10).
* :func:`pseudo_critical`: Kay's rule, T_pc = sum x_i Tc_i, P_pc = sum x_i Pc_i (W. B. Kay,
  Ind. Eng. Chem. 28 (1936) 1014-1019). A ROUGH first cut only: the true critical pressure of a
  mixture lies above its pseudo-critical pressure, often far above (propane-n-butane: ~10 %).
* :func:`critical_points`: the mixture critical point of the cubic equation itself, by the
  criterion of R. A. Heidemann and A. M. Khalil (AIChE J. 26 (1980) 769-779) as formulated for
  two-parameter cubics by M. L. Michelsen and R. A. Heidemann (AIChE J. 27 (1981) 521-523):
  at fixed total volume V and mole numbers n, the matrix Q_ij = d ln f_i / d n_j is singular
  (smallest eigenvalue of sqrt(n_i n_j) Q_ij zero, eigenvector u, dn_i = sqrt(n_i) u_i) and the
  cubic form C = sum_ijk d3A/dn_i dn_j dn_k dn_i dn_j dn_k vanishes; C is taken as the second
  derivative of sum_i dn_i ln f_i(n + s dn) in s (M. L. Michelsen, Fluid Phase Equilib. 16 (1984)
  57-76). Inner loop: Newton in T for the singular Q at fixed V; outer loop: secant in V for
  C = 0; all compositions at once.
* :func:`near_critical`: a stage's temperature and pressure against its mixture's critical point.
* :func:`phase_identification`: whether a root is liquid-like or vapor-like, by the phase
  identification parameter of G. Venkatarathnam and L. R. Oellrich (Fluid Phase Equilib. 301
  (2011) 225-233), Pi = v [(d2P/dv dT)/(dP/dT) - (d2P/dv2)/(dP/dv)]: Pi > 1 liquid-like, Pi < 1
  vapor-like (an ideal gas has Pi = 1). It decides what the cubic's only real root is where the root choice cannot.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from solver.thermo.cubic import GAS_CONSTANT, CubicParameters, cubic_phase

__all__ = [
    "TrivialCheck",
    "CriticalPoints",
    "NearCriticalCheck",
    "trivial_solution",
    "pseudo_critical",
    "critical_points",
    "near_critical",
    "critical_pressure_note",
    "phase_identification",
]

_EQUATION_NAMES = {"peng-robinson": "Peng-Robinson", "soave-redlich-kwong": "Soave-Redlich-Kwong"}

#: Defaults of the trivial-solution test: |Z_L - Z_V| below this and ...
TRIVIAL_Z_GAP = 1e-6
#: ... every |ln K_i| below this.
TRIVIAL_LN_K = 1e-6


@dataclass(frozen=True)
class TrivialCheck:
    """``trivial (n,)``: the two phases coincide; ``z_gap (n,)`` = |Z_L - Z_V|;
    ``largest_ln_k (n,)`` = max_i |ln K_i|."""

    trivial: np.ndarray
    z_gap: np.ndarray
    largest_ln_k: np.ndarray


def trivial_solution(z_liquid, z_vapor, K, z_tolerance: float = TRIVIAL_Z_GAP, ln_k_tolerance: float = TRIVIAL_LN_K) -> TrivialCheck:
    """Flags the stages whose liquid and vapor are one phase: |Z_L - Z_V| < ``z_tolerance``
    and every |ln K_i| < ``ln_k_tolerance``. ``z_liquid, z_vapor (n,)``, ``K (n,c)``."""
    z_gap = np.abs(np.asarray(z_liquid, dtype=float) - np.asarray(z_vapor, dtype=float))
    largest = np.abs(np.log(np.asarray(K, dtype=float))).max(axis=1)
    return TrivialCheck((z_gap < z_tolerance) & (largest < ln_k_tolerance), z_gap, largest)


def pseudo_critical(parameters: CubicParameters, x) -> tuple[np.ndarray, np.ndarray]:
    """Kay's pseudo-critical temperature [K] and pressure [Pa] of compositions ``x (n,c)``
    (rough: see the module docstring)."""
    x = np.atleast_2d(np.asarray(x, dtype=float))
    x = x / x.sum(axis=1, keepdims=True)
    return x @ parameters.critical_temperature, x @ parameters.critical_pressure


@dataclass(frozen=True)
class CriticalPoints:
    """Mixture critical points of the equation of state: ``temperature (n,)`` [K],
    ``pressure (n,)`` [Pa], ``molar_volume (n,)`` [m3/mol], ``converged (n,)``."""

    temperature: np.ndarray
    pressure: np.ndarray
    molar_volume: np.ndarray
    converged: np.ndarray


class _Helmholtz:
    """ln f_i(T, V, n) and Q_ij = d ln f_i/d n_j of the cubic for n states, total volume V
    and mole numbers n, from the reduced residual Helmholtz energy
    F = -n ln(1 - B/V) - D(T) f(V, B)/T, f = ln((V + d1 B)/(V + d2 B)) / (R B (d1 - d2))
    (Michelsen and Mollerup 2007, ch. 3)."""

    def __init__(self, parameters: CubicParameters) -> None:
        self.p = parameters
        form = parameters.form
        self.d1, self.d2 = form.delta1, form.delta2
        self.b = parameters.covolume

    def _pieces(self, T, V, n):
        a = self.p.attraction(T)  # (m, c)
        root = np.sqrt(a)
        a_ij = root[:, :, None] * root[:, None, :] * (1.0 - self.p.interaction)
        D_i = 2.0 * np.einsum("mij,mj->mi", a_ij, n)
        D = 0.5 * np.einsum("mi,mi->m", D_i, n)
        B = n @ self.b
        total = n.sum(axis=1)
        p1, p2 = V + self.d1 * B, V + self.d2 * B
        span = self.d1 - self.d2
        f = np.log(p1 / p2) / (GAS_CONSTANT * B * span)
        f_V = -1.0 / (GAS_CONSTANT * p1 * p2)
        f_B = -(f + V * f_V) / B
        g_B = -1.0 / (V - B)
        F_B = -total * g_B - D * f_B / T
        F_D = -f / T
        return a_ij, D_i, D, B, total, p1, p2, f, f_V, f_B, g_B, F_B, F_D

    def ln_fugacity(self, T, V, n) -> np.ndarray:
        a_ij, D_i, D, B, total, p1, p2, f, f_V, f_B, g_B, F_B, F_D = self._pieces(T, V, n)
        g = np.log(1.0 - B / V)
        F_i = -g[:, None] + F_B[:, None] * self.b + F_D[:, None] * D_i
        return np.log(n * (GAS_CONSTANT * T / V)[:, None]) + F_i

    def q_matrix(self, T, V, n) -> np.ndarray:
        a_ij, D_i, D, B, total, p1, p2, f, f_V, f_B, g_B, F_B, F_D = self._pieces(T, V, n)
        f_VB = (self.d1 * p2 + self.d2 * p1) / (GAS_CONSTANT * (p1 * p2) ** 2)
        f_BB = -(2.0 * f_B + V * f_VB) / B
        g_BB = -1.0 / (V - B) ** 2
        F_nB = -g_B
        F_BD = -f_B / T
        F_BB = -total * g_BB - D * f_BB / T
        b = self.b
        Q = (
            F_nB[:, None, None] * (b[None, :, None] + b[None, None, :])
            + F_BD[:, None, None] * (b[None, :, None] * D_i[:, None, :] + b[None, None, :] * D_i[:, :, None])
            + F_BB[:, None, None] * (b[:, None] * b[None, :])[None]
            + (2.0 * F_D)[:, None, None] * a_ij
        )
        Q[:, np.arange(n.shape[1]), np.arange(n.shape[1])] += 1.0 / n
        return Q

    def pressure(self, T, V, n) -> np.ndarray:
        a_ij, D_i, D, B, total, p1, p2, *_ = self._pieces(T, V, n)
        return total * GAS_CONSTANT * T / (V - B) - D / (p1 * p2)


def _smallest_eigen(helmholtz: _Helmholtz, T, V, n) -> tuple[np.ndarray, np.ndarray]:
    root = np.sqrt(n)
    scaled = root[:, :, None] * helmholtz.q_matrix(T, V, n) * root[:, None, :]
    values, vectors = np.linalg.eigh(scaled)
    return values[:, 0], vectors[:, :, 0]


def _singular_temperature(helmholtz: _Helmholtz, T, V, n, active) -> tuple[np.ndarray, np.ndarray]:
    """Newton in T (derivative by central difference) for the smallest eigenvalue = 0."""
    ok = np.zeros(T.shape, dtype=bool)
    for _ in range(60):
        value, _vector = _smallest_eigen(helmholtz, T, V, n)
        h = 1e-5 * T
        slope = (_smallest_eigen(helmholtz, T + h, V, n)[0] - _smallest_eigen(helmholtz, T - h, V, n)[0]) / (2 * h)
        step = np.where(slope != 0.0, -value / np.where(slope != 0.0, slope, 1.0), -0.1 * T)
        step = np.clip(step, -0.2 * T, 0.2 * T)
        T = np.where(active & ~ok, T + step, T)
        ok = ok | (np.abs(step) < 1e-10 * T)
        if np.all(ok | ~active):
            break
    return T, ok


def _cubic_form(helmholtz: _Helmholtz, T, V, n) -> tuple[np.ndarray, np.ndarray]:
    _value, u = _smallest_eigen(helmholtz, T, V, n)
    dn = np.sqrt(n) * u
    dn /= np.linalg.norm(dn, axis=1, keepdims=True)
    s = 1e-4
    plus = np.einsum("mi,mi->m", dn, helmholtz.ln_fugacity(T, V, n + s * dn))
    minus = np.einsum("mi,mi->m", dn, helmholtz.ln_fugacity(T, V, n - s * dn))
    middle = np.einsum("mi,mi->m", dn, helmholtz.ln_fugacity(T, V, n))
    return (plus + minus - 2.0 * middle) / (s * s), dn


def critical_points(parameters: CubicParameters, x, max_iterations: int = 60) -> CriticalPoints:
    """Critical temperature, pressure and molar volume of the equation of state for each
    composition ``x (n,c)`` by the Heidemann-Khalil criterion (module docstring). Starts:
    V = 4 b (Heidemann and Khalil 1980), T = 1.5 sum x_i Tc_i."""
    x = np.atleast_2d(np.asarray(x, dtype=float))
    n = x / x.sum(axis=1, keepdims=True)
    n = np.maximum(n, 1e-300)
    helmholtz = _Helmholtz(parameters)
    b = n @ helmholtz.b
    active = np.ones(n.shape[0], dtype=bool)
    T = 1.5 * (n @ parameters.critical_temperature)

    def evaluate(kappa, T_start):
        T_found, ok = _singular_temperature(helmholtz, T_start, kappa * b, n, active)
        form, _ = _cubic_form(helmholtz, T_found, kappa * b, n)
        return T_found, ok, form

    k0, k1 = np.full_like(b, 4.0), np.full_like(b, 4.2)
    T0, ok0, c0 = evaluate(k0, T)
    T1, ok1, c1 = evaluate(k1, T0)
    converged = np.zeros_like(active)
    for _ in range(max_iterations):
        denominator = c1 - c0
        k2 = np.where(denominator != 0.0, k1 - c1 * (k1 - k0) / np.where(denominator != 0.0, denominator, 1.0), k1)
        k2 = np.clip(k2, np.maximum(1.05, 0.7 * k1), 1.4 * k1)
        converged = np.abs(k2 - k1) < 1e-10 * k1
        if np.all(converged):
            break
        k0, T0, c0 = k1, T1, c1
        k1 = np.where(converged, k1, k2)
        T1, ok1, c1 = evaluate(k1, T1)
    V = k1 * b
    return CriticalPoints(T1, helmholtz.pressure(T1, V, n), V, converged & ok1)


@dataclass(frozen=True)
class NearCriticalCheck:
    """A stage against its mixture's critical point: ``critical`` (:class:`CriticalPoints` of the
    stage's liquid), ``reduced_temperature (n,)`` = T/Tc_mix, ``reduced_pressure (n,)`` =
    P/Pc_mix, ``above_critical_pressure (n,)``, ``near (n,)`` within the margins."""

    critical: CriticalPoints
    reduced_temperature: np.ndarray
    reduced_pressure: np.ndarray
    above_critical_pressure: np.ndarray
    near: np.ndarray


def near_critical(parameters: CubicParameters, temperature, pressure, x, *, temperature_margin: float = 0.02,
                  pressure_margin: float = 0.05) -> NearCriticalCheck:
    """Flags stages at or near the critical point of the mixture ``x (n,c)`` (for a stage, its
    liquid or feed composition): above its critical pressure, or within ``temperature_margin``
    and ``pressure_margin`` (relative) of the critical temperature and pressure."""
    critical = critical_points(parameters, x)
    Tr = np.asarray(temperature, dtype=float) / critical.temperature
    Pr = np.asarray(pressure, dtype=float) / critical.pressure
    above = Pr >= 1.0
    near = above | ((np.abs(Tr - 1.0) < temperature_margin) & (Pr > 1.0 - pressure_margin))
    return NearCriticalCheck(critical, Tr, Pr, above, near)


def critical_pressure_note(parameters: CubicParameters, pressure: float, x, what: str) -> str:
    """One sentence on ``what`` (e.g. "stage 3") at ``pressure`` [Pa] against the critical
    point of its mixture ``x (c,)`` by :func:`critical_points`: above the critical pressure
    (liquid and vapor of that composition cannot coexist at the critical temperature or above
    it, and above the cricondenbar not at all), or how far below it; "" if the critical point
    is not found."""
    point = critical_points(parameters, np.atleast_2d(x))
    Pc, Tc = float(point.pressure[0]), float(point.temperature[0])
    if not (point.converged[0] and np.isfinite(Pc) and Pc > 0.0):
        return ""
    where = "above" if pressure >= Pc else "below"
    text = (f"{what} at {pressure / 1e5:.4g} bar is {where} the critical pressure of its mixture, {Pc / 1e5:.4g} bar "
            f"(critical temperature {Tc:.2f} K; Heidemann-Khalil critical point of the {_EQUATION_NAMES.get(parameters.variant, parameters.variant)} equation)")
    if pressure >= Pc:
        text += ": a liquid and a vapor of that composition need a lower pressure; lower the column pressure"
    return text


def phase_identification(parameters: CubicParameters, temperature, pressure, x, phase: str = "liquid") -> np.ndarray:
    """The phase identification parameter Pi (n,) of the ``phase`` root at ``temperature (n,)``
    [K], ``pressure (n,)`` [Pa] and ``x (n,c)``: above 1 the root is liquid-like, below 1
    vapor-like (Venkatarathnam and Oellrich 2011). Evaluated on the untranslated volume (a
    Peneloux shift moves volumes, not phases)."""
    temperature = np.atleast_1d(np.asarray(temperature, dtype=float))
    pressure = np.broadcast_to(np.asarray(pressure, dtype=float), temperature.shape)
    Z = cubic_phase(parameters, temperature, pressure, x, phase, derivatives=False).Z
    a, da, b = parameters.mixture_attraction(temperature, x)
    form = parameters.form
    R = GAS_CONSTANT
    v = Z * R * temperature / pressure
    free = v - b
    denominator = (v + form.delta1 * b) * (v + form.delta2 * b)
    spread = 2.0 * v + (form.delta1 + form.delta2) * b
    dP_dv = -R * temperature / free**2 + a * spread / denominator**2
    d2P_dv2 = 2.0 * R * temperature / free**3 + 2.0 * a * (denominator - spread**2) / denominator**3
    dP_dT = R / free - da / denominator
    d2P_dvdT = -R / free**2 + da * spread / denominator**2
    return v * (d2P_dvdT / dP_dT - d2P_dv2 / dP_dv)
