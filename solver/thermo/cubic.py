"""Two-parameter cubic equations of state for both phases, vectorized over stages, with
analytic derivatives: Peng-Robinson and Soave-Redlich-Kwong.

Equation (generic form, e.g. M. L. Michelsen and J. M. Mollerup, *Thermodynamic Models:
Fundamentals and Computational Aspects*, 2nd ed., 2007, ch. 3):

    P = R T / (v - b) - a(T) / ((v + delta1 b) (v + delta2 b))

* Peng-Robinson: delta1,2 = 1 +- sqrt(2) (D.-Y. Peng and D. B. Robinson, Ind. Eng. Chem.
  Fundam. 15 (1976) 59-64), alpha = (1 + m (1 - sqrt(T/Tc)))^2 with
  m = 0.37464 + 1.54226 w - 0.26992 w^2 for acentric factors w <= 0.491 and, above, the 1978
  form m = 0.379642 + 1.48503 w - 0.164423 w^2 + 0.016666 w^3 (D. B. Robinson and D.-Y. Peng,
  GPA Research Report RR-28, 1978).
* Soave-Redlich-Kwong: delta1 = 1, delta2 = 0, m = 0.480 + 1.574 w - 0.176 w^2 (G. Soave,
  Chem. Eng. Sci. 27 (1972) 1197-1203).

a_i = Omega_a (R Tc_i)^2 / Pc_i alpha_i(T), b_i = Omega_b R Tc_i / Pc_i, with Omega_a and
Omega_b the exact solutions of the critical conditions (the papers round them to 0.45724,
0.07780 and 0.42748, 0.08664). Mixtures: van der Waals one-fluid rules,
a = sum_ij x_i x_j (1 - k_ij) sqrt(a_i a_j), b = sum_i x_i b_i, k_ij symmetric, zero default.
Optional volume translation (A. Peneloux, E. Rauzy and R. Freze, Fluid Phase Equilib. 8 (1982)
7-23): v = v_eos - sum_i x_i c_i with constant c_i, which changes ln phi_i by -c_i P/(RT) in
every phase (so K-values and equilibria not at all) and the enthalpy by -P sum_i x_i c_i.

Fugacity coefficients and departure enthalpy (same references), with A = aP/(RT)^2,
B = bP/(RT), L = ln((Z + delta1 B)/(Z + delta2 B)):

    ln phi_i = (b_i/b)(Z - 1) - ln(Z - B) - (2 sum_j a_ij x_j - a b_i/b) L / (b (delta1 - delta2) R T)
    H - H_ig = R T (Z - 1) + (T da/dT - a) L / (b (delta1 - delta2))

Conventions (as in :mod:`solver.thermo.activity`): every quantity is a function of x / sum(x)
(ln phi and Z homogeneous of degree zero, the departure enthalpy of degree one), and
``d_..._dx[s, i, k]`` is the partial derivative with respect to x_k with the other mole fractions
held fixed. So d(departure)/dx_k is the partial molar departure enthalpy,
-R T^2 d ln phi_k/dT. Arrays are stage-major: temperature, pressure (n,), x (n, c).
Enthalpy reference: ideal gas at 298.15 K = 0 for every component; the ideal-gas part is an
input (the pure-component fits of :mod:`solver.thermo.pure`), only the departure is computed here.
"""

from __future__ import annotations

from scipy.constants import R as GAS_CONSTANT
import threading
from dataclasses import dataclass, field
from typing import Callable, Mapping

import numpy as np

from solver.errors import CaseError, ThermoError
from solver.thermo.cubic_forms import CUBIC_FORMS, CubicForm
from solver.thermo.cubic_roots import chosen_root

__all__ = [
    "GAS_CONSTANT",
    "CUBIC_FORMS",
    "CubicForm",
    "CubicParameters",
    "CubicPhase",
    "CubicKValues",
    "CubicPhaseEnthalpy",
    "CubicStageProperties",
    "cubic_phase",
    "cubic_k_values",
    "cubic_phase_enthalpy",
    "cubic_stage_properties",
    "peneloux_volume_shift",
]


IdealGas = Callable[[np.ndarray], tuple[np.ndarray, np.ndarray]]


MIXING_RULE = "van der Waals one-fluid: a = sum_ij x_i x_j (1 - k_ij) sqrt(a_i a_j), b = sum_i x_i b_i"
PENELOUX_SOURCE = "A. Peneloux, E. Rauzy and R. Freze, Fluid Phase Equilib. 8 (1982) 7-23"


class _Scratch(threading.local):
    """One (c, c, n) work array per thread, kept between calls with the same n: allocating and
    freeing arrays of a few hundred kB per call can cost more than the arithmetic (the memory
    may go back to the system and fault in again)."""

    def __init__(self, component_count: int) -> None:
        self.component_count = component_count
        self.array = np.empty((component_count, component_count, 0))

    def __reduce__(self):
        return (_Scratch, (self.component_count,))

    def get(self, stage_count: int) -> np.ndarray:
        if self.array.shape[-1] != stage_count:
            self.array = np.empty((self.component_count, self.component_count, stage_count))
        return self.array


def _vector(name: str, value, count: int, *, positive: bool) -> np.ndarray:
    vector = np.array(value, dtype=float).reshape(-1)
    if vector.shape != (count,) or not np.all(np.isfinite(vector)) or (positive and np.any(vector <= 0.0)):
        raise CaseError(
            f"cubic equation of state: {name} must hold one {'positive ' if positive else ''}number per component",
            key=name,
            value=vector.tolist(),
            expected=f"{count} numbers",
        )
    vector.setflags(write=False)
    return vector


@dataclass(frozen=True, eq=False)
class CubicParameters:
    """The parameters of a cubic equation of state for one mixture (SI units).

    ``critical_temperature`` [K], ``critical_pressure`` [Pa], ``acentric_factor`` [-]: one per
    component, in the order of ``names``; ``variant``: a key of :data:`CUBIC_FORMS`;
    ``interaction``: symmetric (c, c) matrix of k_ij with zero diagonal, None for zeros;
    ``volume_shift``: Peneloux c_i [m3/mol] or None. ``constant_sources`` (one per component),
    ``interaction_sources`` (key "first/second") and ``volume_shift_source`` name where each
    value comes from, for :meth:`describe`."""

    names: tuple[str, ...]
    critical_temperature: np.ndarray
    critical_pressure: np.ndarray
    acentric_factor: np.ndarray
    variant: str = "peng-robinson"
    interaction: np.ndarray | None = None
    volume_shift: np.ndarray | None = None
    constant_sources: tuple[str, ...] = ()
    interaction_sources: Mapping[str, str] = field(default_factory=dict)
    volume_shift_source: str = ""

    def __post_init__(self) -> None:
        names = tuple(self.names)
        c = len(names)
        if c == 0:
            raise CaseError("cubic equation of state: no components given", key="names")
        if self.variant not in CUBIC_FORMS:
            raise CaseError(
                "unknown cubic equation of state", key="variant", value=self.variant, expected=" or ".join(CUBIC_FORMS)
            )
        setattr_ = object.__setattr__
        setattr_(self, "names", names)
        setattr_(self, "critical_temperature", _vector("critical_temperature", self.critical_temperature, c, positive=True))
        setattr_(self, "critical_pressure", _vector("critical_pressure", self.critical_pressure, c, positive=True))
        setattr_(self, "acentric_factor", _vector("acentric_factor", self.acentric_factor, c, positive=False))
        k = np.zeros((c, c)) if self.interaction is None else np.array(self.interaction, dtype=float)
        if k.shape != (c, c) or not np.all(np.isfinite(k)):
            raise CaseError("cubic equation of state: k_ij must be a (c, c) matrix of numbers", key="interaction",
                            value=k.tolist(), expected=f"shape ({c}, {c})")
        if np.any(np.diag(k) != 0.0) or not np.allclose(k, k.T, rtol=0.0, atol=1e-15):
            raise CaseError("cubic equation of state: k_ij must be symmetric with a zero diagonal",
                            key="interaction", value=k.tolist())
        k.setflags(write=False)
        setattr_(self, "interaction", k)
        if self.volume_shift is not None:
            setattr_(self, "volume_shift", _vector("volume_shift", self.volume_shift, c, positive=False))
        sources = tuple(self.constant_sources) or ("",) * c
        if len(sources) != c:
            raise CaseError("cubic equation of state: give one constant source per component",
                            key="constant_sources", value=list(sources))
        setattr_(self, "constant_sources", sources)
        setattr_(self, "interaction_sources", dict(self.interaction_sources))

        form = CUBIC_FORMS[self.variant]
        tc, pc = self.critical_temperature, self.critical_pressure
        sqrt_ac = np.sqrt(form.omega_a / pc) * GAS_CONSTANT * tc
        m = form.m_function(self.acentric_factor)
        setattr_(self, "_form", form)
        b = form.omega_b * GAS_CONSTANT * tc / pc
        # the evaluation works stage-last, (c, n): these are the per-component columns
        setattr_(self, "_tc", tc)
        setattr_(self, "_b", b)
        setattr_(self, "_sqrt_ac", sqrt_ac)
        setattr_(self, "_m", m)
        setattr_(self, "_ones", np.ones(c))
        setattr_(self, "_b_column", b[:, None].copy())
        setattr_(self, "_root_at_zero_column", (sqrt_ac * (1.0 + m))[:, None].copy())  # sqrt(a_i) = this - next * sqrt(T/Tc)
        setattr_(self, "_root_slope_column", (sqrt_ac * m)[:, None].copy())
        setattr_(self, "_inverse_sqrt_tc_column", (1.0 / np.sqrt(tc))[:, None].copy())
        setattr_(self, "_complement", 1.0 - k)
        setattr_(self, "_complement_stacked", (1.0 - k)[:, :, None].copy())
        setattr_(self, "_scratch", _Scratch(c))
        setattr_(self, "_shift", None if self.volume_shift is None else self.volume_shift.copy())
        setattr_(self, "_shift_column", None if self.volume_shift is None else self.volume_shift[:, None].copy())

    @property
    def form(self) -> CubicForm:
        return self._form

    @property
    def component_count(self) -> int:
        return len(self.names)

    @property
    def covolume(self) -> np.ndarray:
        """b_i [m3/mol]."""
        return self._b.copy()

    def attraction(self, temperature: np.ndarray) -> np.ndarray:
        """a_i(T) [Pa m6/mol2], shape (n, c)."""
        temperature = np.atleast_1d(np.asarray(temperature, dtype=float))
        root = self._sqrt_ac * (1.0 + self._m * (1.0 - np.sqrt(temperature[:, None] / self._tc)))
        return root * root

    def mixture_attraction(self, temperature, x) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """``(a, da/dT, b)`` of the mixing rule for ``temperature (n,)`` [K] and ``x (n, c)``
        (normalized): Pa m6/mol2, Pa m6/mol2/K, m3/mol, each (n,)."""
        temperature = np.atleast_1d(np.asarray(temperature, dtype=float))
        w = np.atleast_2d(np.asarray(x, dtype=float))
        w = w / w.sum(axis=1, keepdims=True)
        sqrt_tr = np.sqrt(temperature[:, None] / self._tc)
        root = self._sqrt_ac * (1.0 + self._m * (1.0 - sqrt_tr))
        slope = -0.5 * self._sqrt_ac * self._m * sqrt_tr / temperature[:, None]
        weighted = root * w
        mixed = weighted @ self._complement
        return np.sum(weighted * mixed, axis=1), 2.0 * np.sum(slope * w * mixed, axis=1), w @ self._b

    def with_volume_shift(self, volume_shift, source: str) -> "CubicParameters":
        """The same parameters with Peneloux shifts c_i [m3/mol]."""
        return CubicParameters(
            self.names, self.critical_temperature, self.critical_pressure, self.acentric_factor, self.variant,
            self.interaction, volume_shift, self.constant_sources, self.interaction_sources, source,
        )

    def describe(self) -> dict:
        """Every parameter with its source, for the result file."""
        form = self._form
        pairs = []
        for i in range(self.component_count):
            for j in range(i + 1, self.component_count):
                key = f"{self.names[i]}/{self.names[j]}"
                source = self.interaction_sources.get(key) or self.interaction_sources.get(f"{self.names[j]}/{self.names[i]}")
                value = float(self.interaction[i, j])
                pairs.append({"i": self.names[i], "j": self.names[j], "k_ij": value,
                              "source": source or ("default zero" if value == 0.0 else "given")})
        return {
            "model": form.name,
            "equation": "P = R T/(v - b) - a/((v + delta1 b)(v + delta2 b))",
            "delta1": form.delta1,
            "delta2": form.delta2,
            "omega_a": form.omega_a,
            "omega_b": form.omega_b,
            "alpha_function": "alpha = (1 + m (1 - sqrt(T/Tc)))^2, " + form.m_text,
            "source": form.source,
            "mixing_rule": MIXING_RULE,
            "gas_constant_J_per_mol_K": GAS_CONSTANT,
            "components": [
                {
                    "name": name,
                    "critical_temperature_K": float(self.critical_temperature[i]),
                    "critical_pressure_Pa": float(self.critical_pressure[i]),
                    "acentric_factor": float(self.acentric_factor[i]),
                    "m": float(self._m[i]),
                    "source": self.constant_sources[i] or "given",
                }
                for i, name in enumerate(self.names)
            ],
            "interaction": pairs,
            "volume_shift": None
            if self.volume_shift is None
            else {
                "rule": "v = v_eos - sum_i x_i c_i (" + PENELOUX_SOURCE + ")",
                "c_m3_per_mol": dict(zip(self.names, self.volume_shift.tolist())),
                "source": self.volume_shift_source or "given",
            },
        }


def peneloux_volume_shift(critical_temperature, critical_pressure, rackett_compressibility) -> np.ndarray:
    """Peneloux's correlation of the volume shift for the Soave-Redlich-Kwong equation,
    c_i = 0.40768 (R Tc_i / Pc_i)(0.29441 - Z_RA,i) [m3/mol], with Z_RA the Rackett
    compressibility factor (Peneloux, Rauzy and Freze 1982, eq. 8)."""
    tc, pc, z = (np.asarray(v, dtype=float) for v in (critical_temperature, critical_pressure, rackett_compressibility))
    return 0.40768 * GAS_CONSTANT * tc / pc * (0.29441 - z)


# --------------------------------------------------------------------------------------------
# one phase


@dataclass(frozen=True)
class CubicPhase:
    """One phase at n states. ``Z (n,)``, ``molar_volume (n,)`` [m3/mol, translated],
    ``single_root (n,)`` True where the cubic had one real root (phase identity ambiguous),
    ``ln_phi (n,c)``, ``d_ln_phi_dT (n,c)`` [1/K], ``d_ln_phi_dP (n,c)`` [1/Pa],
    ``d_ln_phi_dx (n,c,c)`` with ``[s, i, k] = d ln phi_i / d x_k``, ``departure_enthalpy (n,)``
    H - H_ig [J/mol], ``d_departure_dT (n,)`` [J/mol/K], ``d_departure_dx (n,c)`` [J/mol],
    ``d_departure_dP (n,)`` [J/mol/Pa] = V - T (dV/dT)_P = -R T^2 (dZ/dT)_P / P (less the shift).
    The derivative arrays are None when they were not asked for."""

    Z: np.ndarray
    molar_volume: np.ndarray
    single_root: np.ndarray
    ln_phi: np.ndarray
    d_ln_phi_dT: np.ndarray | None
    d_ln_phi_dP: np.ndarray | None
    d_ln_phi_dx: np.ndarray | None
    departure_enthalpy: np.ndarray
    d_departure_dT: np.ndarray | None
    d_departure_dx: np.ndarray | None
    d_departure_dP: np.ndarray | None = None

    def rows(self, part: slice) -> "CubicPhase":
        return CubicPhase(*(None if value is None else value[part] for value in self.__dict__.values()))


def _states(parameters: CubicParameters, temperature, pressure, x) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    x = np.asarray(x, dtype=float)
    if x.ndim == 1:
        x = x[None, :]
    n = x.shape[0]
    temperature = np.broadcast_to(np.asarray(temperature, dtype=float), (n,))
    pressure = np.broadcast_to(np.asarray(pressure, dtype=float), (n,))
    if x.ndim != 2 or x.shape[1] != parameters.component_count:
        raise ThermoError(f"cubic equation of state: compositions must have shape (n, {parameters.component_count}), got {x.shape}")
    if not (np.all(temperature > 0.0) and np.all(pressure > 0.0)):
        raise ThermoError("cubic equation of state: temperatures and pressures must be positive")
    return temperature, pressure, x


def _evaluate(par: CubicParameters, T: np.ndarray, P: np.ndarray, x: np.ndarray, liquid: np.ndarray,
              derivatives: bool) -> CubicPhase:
    """The phase chosen per state by ``liquid (n,)`` (True: liquid root, False: vapor root).

    Component arrays are held stage-last, (c, n), where numpy broadcasts the per-state
    quantities (n,) fastest; results are returned stage-first."""
    form = par._form
    n, c = x.shape
    d1, d2 = form.delta1, form.delta2
    u1, w1 = d1 + d2, d1 * d2
    ones = par._ones
    xt = np.ascontiguousarray(x.T)
    total = ones @ xt
    inverse_total = 1.0 / total
    w = xt * inverse_total
    RT = GAS_CONSTANT * T
    inverse_T = 1.0 / T

    sqrt_tr = np.sqrt(T) * par._inverse_sqrt_tc_column
    S = par._root_at_zero_column - par._root_slope_column * sqrt_tr  # sqrt(a_i)
    u = S * w
    r = par._complement @ u
    q = S * r  # sum_j a_ij w_j
    a = ones @ (u * r)
    b = par._b @ w
    beta = par._b_column / b
    scale_a = P / (RT * RT)
    A = a * scale_a
    B = b * P / RT
    c2 = (u1 - 1.0) * B - 1.0
    c1 = A + (w1 - u1) * B * B - u1 * B
    c0 = -(A * B + w1 * B * B * (1.0 + B))
    Z, single_root = chosen_root(c2, c1, c0, B, liquid)

    zb = Z - B
    p1 = Z + d1 * B
    p2 = Z + d2 * B
    L = np.log(p1 / p2)
    inverse_span = 1.0 / (b * (d1 - d2))
    inv = inverse_span / RT
    E = (2.0 * q - a * beta) * inv
    ln_phi = beta * (Z - 1.0) - np.log(zb) - E * L

    dS = par._root_slope_column * sqrt_tr * (-0.5 * inverse_T)
    du = dS * w
    dr = par._complement @ du
    da = 2.0 * (ones @ (du * r))
    departure = RT * (Z - 1.0) + (T * da - a) * L * inverse_span
    shift = par._shift_column
    volume = Z * RT / P
    if shift is not None:
        shift_mix = par._shift @ w
        ln_phi -= shift * (P / RT)
        departure -= P * shift_mix
        volume = volume - shift_mix
    departure = departure * total
    if not derivatives:
        return CubicPhase(Z, volume, single_root, np.ascontiguousarray(ln_phi.T), None, None, None, departure, None, None)

    F_Z = (3.0 * Z + 2.0 * c2) * Z + c1
    F_B = (u1 - 1.0) * Z * Z + (2.0 * (w1 - u1) * B - u1) * Z - (A + w1 * B * (2.0 + 3.0 * B))
    Z_A = -zb / F_Z
    Z_B = -F_B / F_Z
    L_Z = 1.0 / p1 - 1.0 / p2
    L_B = d1 / p1 - d2 / p2

    # temperature (d2 sqrt(a_i)/dT2 = -dS/(2T))
    dq = dS * r + S * dr
    d2a = 2.0 * (ones @ (du * (dr - (0.5 * inverse_T) * r)))
    A_T = (da - 2.0 * a * inverse_T) * scale_a
    B_T = -B * inverse_T
    Z_T = Z_A * A_T + Z_B * B_T
    L_T = L_Z * Z_T + L_B * B_T
    E_T = (2.0 * dq - da * beta) * inv - E * inverse_T
    d_ln_phi_dT = beta * Z_T - (Z_T - B_T) / zb - E_T * L - E * L_T
    d_departure_dT = (
        GAS_CONSTANT * (Z - 1.0) + RT * Z_T + (T * d2a * L + (T * da - a) * L_T) * inverse_span
    ) * total

    # pressure
    inverse_P = 1.0 / P
    Z_P = (Z_A * A + Z_B * B) * inverse_P
    B_P = B * inverse_P
    d_ln_phi_dP = beta * Z_P - (Z_P - B_P) / zb - E * (L_Z * Z_P + L_B * B_P)
    d_departure_dP = -(RT * T) * inverse_P * Z_T

    # composition: G_ik = beta_i rho_k + E_i sigma_k + tau_k - kappa a_ik for independent w,
    # then d/dx_k = (G_ik - sum_j w_j G_ij) / sum(x); sum_j w_j a_ij = q_i, so with the
    # projected rho, sigma, tau: d/dx_k = ([beta, E, 1, kappa q]_i . [rho, sigma, tau, 1]_k
    # - kappa S_i S_k (1 - k_ik)) / sum(x), the first part one batched matrix product
    B_k = B * beta
    Z_k = (Z_A * 2.0 * scale_a) * q + Z_B * B_k
    kappa = 2.0 * L * inv * inverse_total
    left = np.empty((n, c, 4))
    left[:, :, 0] = beta.T
    left[:, :, 1] = E.T
    left[:, :, 2] = 1.0
    left[:, :, 3] = (kappa * q).T
    right = np.empty((n, 4, c))
    for row, value in enumerate((
        -beta * (Z - 1.0) + Z_k + E * L,
        beta * L - L_Z * Z_k - L_B * B_k,
        (B_k - Z_k) / zb,
    )):
        value -= ones @ (w * value)
        value *= inverse_total
        right[:, row] = value.T
    right[:, 3] = 1.0
    d_ln_phi_dx = np.matmul(left, right)
    # minus kappa S_i S_k (1 - k_ik), built stage-last (c, c, n) in a kept scratch array
    attraction = np.multiply((kappa * S)[:, None, :], S[None, :, :], out=par._scratch.get(n))
    attraction *= par._complement_stacked
    d_ln_phi_dx -= attraction.transpose(2, 0, 1)

    if shift is not None:
        d_ln_phi_dT += shift * (P / (RT * T))
        d_ln_phi_dP -= shift / RT
        d_departure_dP -= shift_mix
    d_departure_dx = -(RT * T) * d_ln_phi_dT  # partial molar departure enthalpies
    return CubicPhase(
        Z, volume, single_root, np.ascontiguousarray(ln_phi.T), np.ascontiguousarray(d_ln_phi_dT.T),
        np.ascontiguousarray(d_ln_phi_dP.T), d_ln_phi_dx, departure, d_departure_dT,
        np.ascontiguousarray(d_departure_dx.T), d_departure_dP * total,
    )


def cubic_phase(parameters: CubicParameters, temperature, pressure, x, phase: str, derivatives: bool = True) -> CubicPhase:
    """Fugacity coefficients, departure enthalpy, volume and derivatives of one phase
    (``phase`` "liquid" or "vapor") at ``temperature (n,)`` [K], ``pressure (n,)`` [Pa] and
    composition ``x (n, c)``."""
    if phase not in ("liquid", "vapor"):
        raise ThermoError(f"phase must be 'liquid' or 'vapor', not {phase!r}")
    T, P, x = _states(parameters, temperature, pressure, x)
    return _evaluate(parameters, T, P, x, np.full(T.shape, phase == "liquid"), derivatives)


# --------------------------------------------------------------------------------------------
# both phases


@dataclass(frozen=True)
class CubicKValues:
    """K_i = phi_i^L(T, P, x) / phi_i^V(T, P, y) and derivatives: ``K (n,c)``,
    ``d_ln_K_dT (n,c)`` [1/K], ``d_ln_K_dP (n,c)`` [1/Pa], ``d_ln_K_dx (n,c,c)`` and
    ``d_ln_K_dy (n,c,c)`` with ``[s, i, k] = d ln K_i / d x_k`` (resp. y_k), other fractions
    fixed; and the two phases they came from."""

    K: np.ndarray
    d_ln_K_dT: np.ndarray | None
    d_ln_K_dP: np.ndarray | None
    d_ln_K_dx: np.ndarray | None
    d_ln_K_dy: np.ndarray | None
    liquid: CubicPhase
    vapor: CubicPhase


    @property
    def single_root_stages(self) -> np.ndarray:
        """Indices of the states where the liquid or the vapor got the cubic's only real root
        (their phase identity is ambiguous; see
        :func:`solver.thermo.cubic_critical.phase_identification`)."""
        return np.flatnonzero(self.liquid.single_root | self.vapor.single_root)


def _both_phases(parameters, temperature, pressure, x, y, derivatives) -> tuple[CubicPhase, CubicPhase]:
    T, P, x = _states(parameters, temperature, pressure, x)
    _, _, y = _states(parameters, T, P, y)
    n = T.shape[0]
    liquid = np.zeros(2 * n, dtype=bool)
    liquid[:n] = True
    both = _evaluate(parameters, np.concatenate((T, T)), np.concatenate((P, P)), np.concatenate((x, y)),
                     liquid, derivatives)
    return both.rows(slice(0, n)), both.rows(slice(n, 2 * n))


def cubic_k_values(parameters: CubicParameters, temperature, pressure, x, y, derivatives: bool = True) -> CubicKValues:
    """K-values of the equation of state for liquid ``x (n,c)`` and vapor ``y (n,c)`` at
    ``temperature (n,)`` [K] and ``pressure (n,)`` [Pa] (both phases evaluated in one pass)."""
    liquid, vapor = _both_phases(parameters, temperature, pressure, x, y, derivatives)
    return _k_values(liquid, vapor, derivatives)


def _k_values(liquid: CubicPhase, vapor: CubicPhase, derivatives: bool) -> CubicKValues:
    K = np.exp(liquid.ln_phi - vapor.ln_phi)
    if not derivatives:
        return CubicKValues(K, None, None, None, None, liquid, vapor)
    return CubicKValues(
        K,
        liquid.d_ln_phi_dT - vapor.d_ln_phi_dT,
        liquid.d_ln_phi_dP - vapor.d_ln_phi_dP,
        liquid.d_ln_phi_dx,
        -vapor.d_ln_phi_dx,
        liquid,
        vapor,
    )


@dataclass(frozen=True)
class CubicPhaseEnthalpy:
    """Molar enthalpy of a phase, ideal gas at 298.15 K = 0: ``molar (n,)`` [J/mol],
    ``d_dT (n,)`` [J/mol/K], ``d_dx (n,c)`` [J/mol] (partial molar enthalpies, other fractions
    fixed), ``ideal_gas (n,c)`` the pure ideal-gas enthalpies and ``departure (n,)`` H - H_ig."""

    molar: np.ndarray
    d_dT: np.ndarray
    d_dx: np.ndarray
    ideal_gas: np.ndarray
    departure: np.ndarray


def cubic_phase_enthalpy(phase: CubicPhase, x, ideal_gas: tuple[np.ndarray, np.ndarray]) -> CubicPhaseEnthalpy:
    """h = sum_i x_i h_ig,i(T) + (H - H_ig) for a phase evaluated with derivatives;
    ``ideal_gas = (h_ig (n,c) [J/mol], cp0 (n,c) [J/mol/K])`` as returned by
    :meth:`solver.thermo.pure.PureComponents.ideal_gas_enthalpy`."""
    if phase.d_departure_dT is None:
        raise ThermoError("cubic_phase_enthalpy needs a phase evaluated with derivatives")
    x = np.asarray(x, dtype=float)
    h_ig, cp = ideal_gas
    return CubicPhaseEnthalpy(
        np.einsum("nc,nc->n", x, h_ig) + phase.departure_enthalpy,
        np.einsum("nc,nc->n", x, cp) + phase.d_departure_dT,
        h_ig + phase.d_departure_dx,
        h_ig,
        phase.departure_enthalpy,
    )


@dataclass(frozen=True)
class CubicStageProperties:
    """What the MESH equations need on every stage, from the equation of state."""

    k_values: CubicKValues
    liquid: CubicPhaseEnthalpy
    vapor: CubicPhaseEnthalpy


def cubic_stage_properties(parameters: CubicParameters, temperature, pressure, x, y, ideal_gas: IdealGas) -> CubicStageProperties:
    """K-values, liquid and vapor enthalpies and all their derivatives in one pass of the
    equation of state. ``ideal_gas(T) -> (h_ig (n,c), cp0 (n,c))`` is called once, e.g.
    :meth:`solver.thermo.pure.PureComponents.ideal_gas_enthalpy`."""
    liquid, vapor = _both_phases(parameters, temperature, pressure, x, y, True)
    pure = ideal_gas(np.broadcast_to(np.asarray(temperature, dtype=float), liquid.Z.shape))
    return CubicStageProperties(
        _k_values(liquid, vapor, True),
        cubic_phase_enthalpy(liquid, x, pure),
        cubic_phase_enthalpy(vapor, y, pure),
    )

