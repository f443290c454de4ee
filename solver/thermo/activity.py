"""Liquid activity-coefficient models, vectorized over stages, with analytic derivatives.

Models: ideal solution, Wilson (G. M. Wilson, 1964, J. Am. Chem. Soc. 86, 127-130), NRTL
(H. Renon and J. M. Prausnitz, 1968, AIChE J. 14, 135-144) and UNIQUAC (D. S. Abrams and
J. M. Prausnitz, 1975, AIChE J. 21, 116-128; coordination number z = 10).

Every binary parameter p_ij is the sum of four terms, each a (c, c) matrix with a zero diagonal:

    p_ij(T) = constant_term_ij + term_over_temperature_ij / T
              + term_in_ln_temperature_ij ln T + term_times_temperature_ij T      [T in K]

read as tau_ij = p_ij (NRTL), ln Lambda_ij = p_ij (Wilson) and ln tau_ij = p_ij (UNIQUAC).

``evaluate(temperature (n,), x (n, c))`` returns an :class:`ActivityResult` for n states at
once (one per stage). Each model is written in its mole-number form, i.e. as a function of
x / sum(x): ln gamma is homogeneous of degree zero in x, so x slightly off the simplex gives the
values of the normalized x, and the partial derivatives with respect to each x_k (all others
held fixed) are exact for any x > 0. Consequences used below and checked in the tests:
Gibbs-Duhem holds for any x, sum_i x_i d ln gamma_i / d x_k = 0; d ln gamma_i / d x_k is
symmetric in (i, k) (it is the Hessian of n g^E/RT); and the excess enthalpy
h^E = -R T^2 sum_i x_i d ln gamma_i / dT (Gibbs-Helmholtz, with the x passed in, so h^E is
homogeneous of degree one) has d h^E / d x_k = -R T^2 d ln gamma_k / dT.

Inside, (c, c, n) arrays carry the stage index last, which numpy broadcasts and reduces fastest
for a few components and many stages; results are returned stage first.
"""

from __future__ import annotations

import threading
from dataclasses import dataclass

import numpy as np
from scipy.constants import R as GAS_CONSTANT

from solver.errors import CaseError, ThermoError

__all__ = [
    "GAS_CONSTANT",
    "NRTL_DEFAULT_ALPHA",
    "TEMPERATURE_DEPENDENCE",
    "TERMS",
    "UNIQUAC_COORDINATION_NUMBER",
    "ActivityResult",
    "IdealSolution",
    "Wilson",
    "NRTL",
    "UNIQUAC",
    "nrtl_energy_form",
    "uniquac_energy_form",
    "wilson_energy_form",
]

#: Lattice coordination number z of UNIQUAC (Abrams and Prausnitz 1975).
UNIQUAC_COORDINATION_NUMBER = 10.0

#: NRTL non-randomness used when none is given; Renon and Prausnitz (1968) give 0.2-0.47,
#: 0.3 is common practice.
NRTL_DEFAULT_ALPHA = 0.3

#: The four terms of a binary parameter, in the order the models take them.
TERMS = ("constant_term", "term_over_temperature", "term_in_ln_temperature", "term_times_temperature")

TEMPERATURE_DEPENDENCE = (
    "constant_term_ij + term_over_temperature_ij/T + term_in_ln_temperature_ij*ln(T)"
    " + term_times_temperature_ij*T, T in K"
)


@dataclass(frozen=True)
class ActivityResult:
    """Activity coefficients of n liquid states of c components and their derivatives.

    ``d_ln_gamma_dx[s, i, k]`` is d ln gamma_i / d x_k with every other x held fixed. The
    derivative arrays are None when ``evaluate(..., derivatives=False)`` was asked for.
    """

    ln_gamma: np.ndarray  # (n, c)
    d_ln_gamma_dT: np.ndarray | None  # (n, c) [1/K]
    d_ln_gamma_dx: np.ndarray | None  # (n, c, c)
    excess_enthalpy: np.ndarray  # (n,) [J/mol of mixture]
    d_excess_enthalpy_dT: np.ndarray | None  # (n,) [J/mol/K]
    d_excess_enthalpy_dx: np.ndarray | None  # (n, c) [J/mol]


# --------------------------------------------------------------------------------------------
# input checks


def _matrix(name: str, value, component_count: int, *, model: str, zero_diagonal: bool = True) -> np.ndarray:
    """A (c, c) parameter matrix as float array; None gives zeros."""
    if value is None:
        return np.zeros((component_count, component_count))
    matrix = np.array(value, dtype=float)
    if matrix.shape != (component_count, component_count):
        raise CaseError(
            f"{model} parameter {name} must be a square matrix, one row and column per component",
            value=matrix.tolist() if matrix.size <= 64 else f"shape {matrix.shape}",
            expected=f"shape ({component_count}, {component_count})",
        )
    if not np.all(np.isfinite(matrix)):
        raise CaseError(f"{model} parameter {name} has a value that is not a finite number", value=matrix.tolist())
    if zero_diagonal and np.any(np.diag(matrix) != 0.0):
        raise CaseError(
            f"{model} parameter {name} must have a zero diagonal (a component does not interact with itself)",
            value=np.diag(matrix).tolist(),
        )
    return matrix


def _parameter_matrices(model: str, *terms) -> tuple[int, list[np.ndarray]]:
    """The four terms (in the order of :data:`TERMS`) as (c, c) matrices; c is the size of
    the constant term."""
    shape = np.shape(terms[0])
    if len(shape) != 2 or shape[0] != shape[1] or shape[0] < 1:
        raise CaseError(f"{model} parameter {TERMS[0]} must be a square matrix (c, c)", value=f"shape {shape}")
    c = shape[0]
    return c, [_matrix(name, value, c, model=model) for name, value in zip(TERMS, terms)]


def _positive_vector(name: str, value, component_count: int, *, model: str) -> np.ndarray:
    vector = np.array(value, dtype=float)
    if vector.shape != (component_count,) or not np.all(np.isfinite(vector)) or np.any(vector <= 0.0):
        raise CaseError(
            f"{model} parameter {name} must hold one positive number per component",
            value=vector.tolist(),
            expected=f"{component_count} positive numbers",
        )
    return vector


def _alpha_matrix(name: str, value, component_count: int) -> np.ndarray:
    """A symmetric NRTL alpha matrix (value, slope or reference temperature); a single number
    fills it, None gives zeros. The diagonal is set to 0: G_ii = 1 whatever alpha_ii is."""
    if value is not None and np.ndim(value) == 0:
        value = np.full((component_count, component_count), float(value))
    matrix = _matrix(name, value, component_count, model="NRTL", zero_diagonal=False)
    np.fill_diagonal(matrix, 0.0)
    if not np.allclose(matrix, matrix.T, rtol=1e-12, atol=0.0):
        raise CaseError(f"NRTL parameter {name} must be symmetric ({name}_ij = {name}_ji)", value=matrix.tolist())
    return matrix


def _states(model: str, component_count: int, temperature, x) -> tuple[np.ndarray, np.ndarray]:
    """temperature (n,) [K] and x (n, c) as float arrays; a single state may be given as a
    scalar temperature and x of shape (c,)."""
    temperature = np.asarray(temperature, dtype=float)
    x = np.asarray(x, dtype=float)
    if x.ndim == 1:
        x = x[None, :]
    if temperature.ndim == 0:
        temperature = np.full(x.shape[0], float(temperature))
    if x.ndim != 2 or x.shape[1] != component_count or temperature.shape != (x.shape[0],):
        raise ThermoError(
            f"{model} activity model: temperature must have shape (n,) and x shape (n, {component_count}); "
            f"got temperature {temperature.shape} and x {x.shape}"
        )
    if not np.all(temperature > 0.0):
        raise ThermoError(f"{model} activity model: temperature must be positive, got {temperature.min()!r} K")
    return temperature, x


# --------------------------------------------------------------------------------------------
# pieces shared by the models


class _ScratchArrays(threading.local):
    """Per-thread scratch arrays (count, c, c, n), kept between calls with the same n.

    Allocating and freeing ten or so 100 kB temporaries per call can cost more than the
    arithmetic (the C allocator may hand the memory back to the system after each call and
    page-fault it in again), so the hot paths write into these instead. Results never alias them.
    """

    def __init__(self, count: int, component_count: int) -> None:
        self.count = count
        self.component_count = component_count
        self.arrays = np.empty((count, component_count, component_count, 0))

    def __reduce__(self):
        # a model pickles (for worker processes) with fresh, empty scratch arrays
        return (_ScratchArrays, (self.count, self.component_count))

    def get(self, stage_count: int) -> np.ndarray:
        if self.arrays.shape[-1] != stage_count:
            c = self.component_count
            self.arrays = np.empty((self.count, c, c, stage_count))
        return self.arrays


@dataclass(frozen=True)
class _TemperatureDependence:
    """p(T) = constant + over_temperature/T + in_ln_temperature ln T + times_temperature T for
    (c, c) matrices, evaluated for n temperatures at once into (c, c, n) arrays. Terms whose
    matrix is zero are skipped."""

    constant: np.ndarray
    over_temperature: np.ndarray  # K
    in_ln_temperature: np.ndarray
    times_temperature: np.ndarray  # 1/K

    @property
    def terms(self) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """The four matrices in the order of :data:`TERMS`."""
        return self.constant, self.over_temperature, self.in_ln_temperature, self.times_temperature

    def __post_init__(self) -> None:
        has = tuple(bool(np.any(m)) for m in (self.constant, self.in_ln_temperature, self.times_temperature))
        object.__setattr__(self, "_has", has)
        object.__setattr__(self, "_stacked", tuple(m[:, :, None].copy() for m in self.terms))

    def evaluate_into(self, temperature: np.ndarray, out: np.ndarray) -> None:
        """Writes p, dp/dT, d2p/dT2 into out[0], out[1], out[2] (as many as out holds)."""
        has_constant, has_ln, has_times = self._has
        constant, over, in_ln, times = self._stacked
        inverse = 1.0 / temperature
        p = np.multiply(over, inverse, out=out[0])
        if has_constant:
            p += constant
        if has_ln:
            p += in_ln * np.log(temperature)
        if has_times:
            p += times * temperature
        if len(out) > 1:
            inverse_squared = inverse * inverse
            dp = np.multiply(over, -inverse_squared, out=out[1])
            if has_ln:
                dp += in_ln * inverse
            if has_times:
                dp += times
        if len(out) > 2:
            d2p = np.multiply(over, 2.0 * inverse_squared * inverse, out=out[2])
            if has_ln:
                d2p -= in_ln * inverse_squared

    def transposed(self) -> _TemperatureDependence:
        """The same dependence for the transposed matrices (p_ji in place of p_ij)."""
        return _TemperatureDependence(*(np.ascontiguousarray(m.T) for m in self.terms))

    def describe(self) -> dict:
        return {name: matrix.tolist() for name, matrix in zip(TERMS, self.terms)}


def _stage_first_into(matrix: np.ndarray, out: np.ndarray, *, transpose: bool = False) -> np.ndarray:
    """Copies (c, c, n) ``matrix`` [i, j, s] into the memory of ``out`` as (n, c, c) [s, i, j]
    ([s, j, i] with ``transpose``) and returns that view."""
    c, _, n = matrix.shape
    view = out.reshape(n, c, c)
    np.copyto(view, matrix.transpose(2, 1, 0) if transpose else matrix.transpose(2, 0, 1))
    return view


def _excess_enthalpy(
    temperature: np.ndarray,
    x: np.ndarray,
    d_ln_gamma_dT: np.ndarray,
    weighted_second_temperature_derivative: np.ndarray | None,
) -> tuple[np.ndarray, np.ndarray | None, np.ndarray | None]:
    """h^E = -R T^2 sum_i x_i d ln gamma_i/dT (Gibbs-Helmholtz) [J/mol] and its derivatives;
    x and d_ln_gamma_dT are (n, c).

    ``weighted_second_temperature_derivative`` is sum_i x_i d2 ln gamma_i / dT2 (None: no
    derivatives wanted). Because every model here is homogeneous of degree zero in x and
    ln gamma_i = d(n g^E/RT)/d n_i, sum_i x_i d2 ln gamma_i/(dT dx_k) = 0 and so
    dh^E/dx_k = -R T^2 d ln gamma_k / dT.
    """
    r_t = GAS_CONSTANT * temperature
    first = np.einsum("si,si->s", x, d_ln_gamma_dT)
    enthalpy = -r_t * temperature * first
    if weighted_second_temperature_derivative is None:
        return enthalpy, None, None
    d_dT = -2.0 * r_t * first - r_t * temperature * weighted_second_temperature_derivative
    d_dx = (-r_t * temperature)[:, None] * d_ln_gamma_dT
    return enthalpy, d_dT, d_dx


@dataclass(frozen=True)
class _LogSumTerms:
    """v_i = 1 - ln(S_i / sum(w)) - sum_k A_ki w_k / S_k with S_i = sum_j A_ij w_j, and its
    derivatives; the common core of Wilson (A = Lambda, w = x) and of the UNIQUAC residual
    part (A_ij = tau_ji, w_j = q_j x_j). sum_i w_i v_i = -sum_i w_i ln(S_i / sum(w))."""

    value: np.ndarray  # (n, c)
    d_dT: np.ndarray  # (n, c)
    d_dw: np.ndarray | None  # (n, c, c) [s, i, m] = d v_i / d w_m
    weighted_second_temperature_derivative: np.ndarray | None  # (n,) sum_i w_i d2 v_i/dT2


#: scratch arrays _log_sum_terms needs: p, dp/dT, d2p/dT2 and three more
_LOG_SUM_SCRATCH = 6


def _log_sum_terms(
    dependence: _TemperatureDependence,
    temperature: np.ndarray,
    weights: np.ndarray,
    derivatives: bool,
    scratch: np.ndarray,
) -> _LogSumTerms:
    """The terms for A = exp(p(T)), weights w (c, n) and ``scratch`` (6, c, c, n)."""
    matrix, dp, d2p, work, scaled_memory, product_memory = scratch
    dependence.evaluate_into(temperature, scratch[: 3 if derivatives else 2])
    np.exp(matrix, out=matrix)
    d_matrix = np.multiply(matrix, dp, out=work)
    sums = np.einsum("ijs,js->is", matrix, weights)  # S
    relative_d_sums = np.einsum("ijs,js->is", d_matrix, weights) / sums  # d ln S / dT
    ratio = weights / sums  # w_k / S_k
    total = weights.sum(axis=0)
    value = 1.0 - np.log(sums / total) - np.einsum("kis,ks->is", matrix, ratio)
    d_dT = (
        np.einsum("kis,ks->is", matrix, ratio * relative_d_sums)
        - np.einsum("kis,ks->is", d_matrix, ratio)
        - relative_d_sums
    )
    value, d_dT = value.T.copy(), d_dT.T.copy()
    if not derivatives:
        return _LogSumTerms(value, d_dT, None, None)
    second = np.multiply(dp, dp, out=work)
    second += d2p
    second *= matrix  # d2A/dT2
    relative_d2_sums = np.einsum("ijs,js->is", second, weights) / sums
    weighted_second = np.einsum("is,is->s", weights, relative_d_sums * relative_d_sums - relative_d2_sums)
    matrix /= sums[:, None, :]
    scaled = _stage_first_into(matrix, scaled_memory)  # B[s, i, j] = A_ij / S_i
    scaled_transposed = scaled.transpose(0, 2, 1)
    weighted = np.multiply(scaled_transposed, weights.T[:, None, :], out=product_memory.reshape(scaled.shape))
    d_dw = np.matmul(weighted, scaled)  # sum_k B_ki w_k B_km
    d_dw -= scaled
    d_dw -= scaled_transposed
    d_dw += (1.0 / total)[:, None, None]
    return _LogSumTerms(value, d_dT, d_dw, weighted_second)


class _ActivityModel:
    """What every model shares: the convenience method ``ln_gamma``."""

    component_count: int

    def evaluate(self, temperature: np.ndarray, x: np.ndarray, derivatives: bool = True) -> ActivityResult:
        raise NotImplementedError

    def ln_gamma(self, temperature: np.ndarray, x: np.ndarray) -> np.ndarray:
        """ln gamma (n, c) for temperature (n,) [K] and x (n, c)."""
        return self.evaluate(temperature, x, derivatives=False).ln_gamma


# --------------------------------------------------------------------------------------------
# models


class IdealSolution(_ActivityModel):
    """Ideal liquid solution: gamma_i = 1, no heat of mixing."""

    name = "ideal"

    def __init__(self, component_count: int) -> None:
        if int(component_count) != component_count or component_count < 1:
            raise CaseError("component count must be a positive whole number", value=component_count)
        self.component_count = int(component_count)

    def evaluate(self, temperature: np.ndarray, x: np.ndarray, derivatives: bool = True) -> ActivityResult:
        """ln gamma = 0 and h^E = 0 for temperature (n,) [K] and x (n, c)."""
        temperature, x = _states(self.name, self.component_count, temperature, x)
        n, c = x.shape
        return ActivityResult(
            ln_gamma=np.zeros((n, c)),
            d_ln_gamma_dT=np.zeros((n, c)) if derivatives else None,
            d_ln_gamma_dx=np.zeros((n, c, c)) if derivatives else None,
            excess_enthalpy=np.zeros(n),
            d_excess_enthalpy_dT=np.zeros(n) if derivatives else None,
            d_excess_enthalpy_dx=np.zeros((n, c)) if derivatives else None,
        )

    def describe(self) -> dict:
        return {"model": self.name, "component_count": self.component_count}


class Wilson(_ActivityModel):
    """Wilson (1964) local-composition model, J. Am. Chem. Soc. 86, 127-130:

        ln gamma_i = 1 - ln(sum_j x_j Lambda_ij) - sum_k x_k Lambda_ki / sum_j x_j Lambda_kj

    (with x / sum(x) in the logarithm when x is off the simplex), ln Lambda_ij the sum of the
    four terms (module docstring) and Lambda_ii = 1. Parameters are (c, c) matrices with zero
    diagonal; None means zeros. For the energy form Lambda_ij = (V_j / V_i) exp(-dlambda_ij / RT)
    use :func:`wilson_energy_form`.
    """

    name = "wilson"

    def __init__(
        self, constant_term, term_over_temperature, term_in_ln_temperature=None, term_times_temperature=None
    ) -> None:
        self.component_count, matrices = _parameter_matrices(
            "Wilson", constant_term, term_over_temperature, term_in_ln_temperature, term_times_temperature
        )
        self._log_lambda = _TemperatureDependence(*matrices)
        self._scratch = _ScratchArrays(_LOG_SUM_SCRATCH, self.component_count)

    def evaluate(self, temperature: np.ndarray, x: np.ndarray, derivatives: bool = True) -> ActivityResult:
        """ln gamma and derivatives for temperature (n,) [K] and x (n, c)."""
        temperature, x = _states(self.name, self.component_count, temperature, x)
        scratch = self._scratch.get(x.shape[0])
        terms = _log_sum_terms(self._log_lambda, temperature, np.ascontiguousarray(x.T), derivatives, scratch)
        enthalpy = _excess_enthalpy(temperature, x, terms.d_dT, terms.weighted_second_temperature_derivative)
        return ActivityResult(
            ln_gamma=terms.value,
            d_ln_gamma_dT=terms.d_dT if derivatives else None,
            d_ln_gamma_dx=terms.d_dw,
            excess_enthalpy=enthalpy[0],
            d_excess_enthalpy_dT=enthalpy[1],
            d_excess_enthalpy_dx=enthalpy[2],
        )

    def describe(self) -> dict:
        return {
            "model": self.name,
            "component_count": self.component_count,
            "temperature_dependence": "ln Lambda_ij = " + TEMPERATURE_DEPENDENCE,
            **self._log_lambda.describe(),
            "source": "G. M. Wilson, J. Am. Chem. Soc. 86 (1964) 127-130",
        }


class NRTL(_ActivityModel):
    """Non-random two-liquid model, Renon and Prausnitz (1968), AIChE J. 14, 135-144:

        ln gamma_i = sum_j x_j tau_ji G_ji / sum_k x_k G_ki
                     + sum_j x_j G_ij / (sum_k x_k G_kj) (tau_ij - sum_m x_m tau_mj G_mj / sum_k x_k G_kj)

    with tau_ij the sum of the four terms (module docstring), G_ij = exp(-alpha_ij tau_ij) and
    the non-randomness

        alpha_ij(T) = alpha_ij + alpha_slope_ij (T - alpha_reference_temperature_ij),

    symmetric, a straight line through ``alpha`` at the reference temperature [K] that the
    user states. Each of the three may be a single number; ``alpha`` None gives 0.3 (common
    practice), ``alpha_slope`` None gives 0 (and then no reference temperature is needed). For
    the energy form tau_ij = dg_ij / RT use :func:`nrtl_energy_form`.
    """

    name = "nrtl"

    def __init__(
        self,
        constant_term,
        term_over_temperature,
        term_in_ln_temperature=None,
        term_times_temperature=None,
        *,
        alpha=None,
        alpha_slope=None,
        alpha_reference_temperature=None,
    ) -> None:
        c, matrices = _parameter_matrices(
            "NRTL", constant_term, term_over_temperature, term_in_ln_temperature, term_times_temperature
        )
        self.component_count = c
        self._tau = _TemperatureDependence(*matrices)
        self._alpha = _alpha_matrix("alpha", NRTL_DEFAULT_ALPHA if alpha is None else alpha, c)
        self._alpha_slope = _alpha_matrix("alpha_slope", alpha_slope, c)
        self._alpha_depends_on_temperature = bool(np.any(self._alpha_slope))
        if self._alpha_depends_on_temperature and alpha_reference_temperature is None:
            raise CaseError(
                "NRTL alpha_slope needs the temperature it is about (alpha_reference_temperature)",
                expected="a reference temperature in K",
            )
        self._alpha_reference_temperature = _alpha_matrix(
            "alpha_reference_temperature", alpha_reference_temperature, c
        )
        sloped = self._alpha_slope != 0.0
        if np.any(self._alpha_reference_temperature[sloped] <= 0.0):
            raise CaseError(
                "NRTL alpha_reference_temperature must be a positive temperature [K] wherever alpha_slope is not 0",
                value=self._alpha_reference_temperature.tolist(),
            )
        self._alpha_stacked = self._alpha[:, :, None].copy()
        self._alpha_slope_stacked = self._alpha_slope[:, :, None].copy()
        self._alpha_reference_stacked = self._alpha_reference_temperature[:, :, None].copy()
        self._scratch = _ScratchArrays(12, c)

    def evaluate(self, temperature: np.ndarray, x: np.ndarray, derivatives: bool = True) -> ActivityResult:
        """ln gamma and derivatives for temperature (n,) [K] and x (n, c).

        Written with S_j = sum_k x_k G_kj, eps_j = sum_k x_k tau_kj G_kj / S_j,
        D_ij = tau_ij - eps_j, H_ij = G_ij / S_j: ln gamma_i = eps_i + sum_j x_j H_ij D_ij.
        With u = -d ln G/dT, the weights w_kj = x_k H_kj (sum_k w_kj = 1) give
        d eps_j/dT = sum_k w_kj (dtau_kj/dT - D_kj u_kj) and d ln S_j/dT = -sum_k w_kj u_kj.
        """
        temperature, x = _states(self.name, self.component_count, temperature, x)
        xt = np.ascontiguousarray(x.T)
        scratch = self._scratch.get(x.shape[0])
        tau, d_tau, bracket, alpha, u, h, w, v, vd, e1, work, spare = scratch
        self._tau.evaluate_into(temperature, scratch[: 3 if derivatives else 2])
        if self._alpha_depends_on_temperature:
            np.subtract(temperature, self._alpha_reference_stacked, out=alpha)
            alpha *= self._alpha_slope_stacked
            alpha += self._alpha_stacked
            np.multiply(alpha, d_tau, out=u)
            u += np.multiply(self._alpha_slope_stacked, tau, out=work)
        else:
            alpha = self._alpha_stacked
            np.multiply(alpha, d_tau, out=u)
        np.multiply(alpha, tau, out=h)
        np.negative(h, out=h)
        np.exp(h, out=h)  # G_ij
        h /= np.einsum("ks,kjs->js", xt, h)  # H_ij = G_ij / S_j
        np.multiply(h, xt[:, None, :], out=w)  # w_kj = x_k G_kj / S_j
        eps = np.einsum("kjs,kjs->js", w, tau)
        deviation = tau
        deviation -= eps  # D_ij = tau_ij - eps_j
        np.multiply(h, xt, out=v)  # V_ij = x_j G_ij / S_j
        np.multiply(v, deviation, out=vd)
        ln_gamma = (eps + vd.sum(axis=1)).T.copy()

        np.multiply(deviation, u, out=e1)
        np.subtract(d_tau, e1, out=e1)  # dtau_ij/dT - D_ij u_ij
        d_eps = np.einsum("kjs,kjs->js", w, e1)
        relative_d_sums = -np.einsum("kjs,kjs->js", w, u)  # sigma_j = d ln S_j / dT
        np.subtract(e1, d_eps, out=work)
        d_ln_gamma_dT = (
            d_eps + np.einsum("ijs,ijs->is", v, work) - np.einsum("ijs,js->is", vd, relative_d_sums)
        ).T.copy()
        if not derivatives:
            enthalpy = _excess_enthalpy(temperature, x, d_ln_gamma_dT, None)
            return ActivityResult(ln_gamma, None, None, enthalpy[0], None, None)

        # sum_j x_j d2 eps_j/dT2 (for dh^E/dT) = sum_kj x_j w_kj bracket_kj with
        # bracket = d2tau/dT2 - (u + sigma) e1 - (dtau/dT - deps/dT) u - D du/dT
        d_u = np.multiply(alpha, bracket, out=spare)
        if self._alpha_depends_on_temperature:
            d_u += np.multiply(2.0 * self._alpha_slope_stacked, d_tau, out=work)
        d_u *= deviation
        bracket -= d_u
        np.add(u, relative_d_sums, out=work)
        work *= e1
        bracket -= work
        np.subtract(d_tau, d_eps, out=work)
        work *= u
        bracket -= work
        weighted_second = np.einsum("js,kjs,kjs->s", xt, w, bracket)

        # d ln gamma_i/dx_k = N_ik + N_ki with N_ik = M_ik - sum_j H_ij x_j H_kj D_kj and
        # M_ij = H_ij D_ij = d eps_j / dx_i: a symmetric matrix, the Hessian of n g^E/RT
        h_first = _stage_first_into(h, spare)
        vd_first = _stage_first_into(vd, work, transpose=True)
        product = np.matmul(h_first, vd_first, out=u.reshape(h_first.shape))
        h *= deviation
        half = _stage_first_into(h, e1)
        half -= product
        d_ln_gamma_dx = half + half.transpose(0, 2, 1)
        enthalpy = _excess_enthalpy(temperature, x, d_ln_gamma_dT, weighted_second)
        return ActivityResult(ln_gamma, d_ln_gamma_dT, d_ln_gamma_dx, *enthalpy)

    def describe(self) -> dict:
        return {
            "model": self.name,
            "component_count": self.component_count,
            "temperature_dependence": "tau_ij = " + TEMPERATURE_DEPENDENCE,
            **self._tau.describe(),
            "alpha_dependence": "alpha_ij(T) = alpha_ij + alpha_slope_ij*(T - alpha_reference_temperature_ij), T in K",
            "alpha": self._alpha.tolist(),
            "alpha_slope": self._alpha_slope.tolist(),
            "alpha_reference_temperature": self._alpha_reference_temperature.tolist(),
            "source": "H. Renon and J. M. Prausnitz, AIChE J. 14 (1968) 135-144",
        }


class UNIQUAC(_ActivityModel):
    """UNIQUAC, Abrams and Prausnitz (1975), AIChE J. 21, 116-128, with z = 10:

        ln gamma_i = ln(Phi_i/x_i) + (z/2) q_i ln(theta_i/Phi_i) + l_i - (Phi_i/x_i) sum_j x_j l_j
                     + q_i (1 - ln(sum_j theta_j tau_ji) - sum_j theta_j tau_ij / sum_k theta_k tau_kj)

    with Phi_i = r_i x_i / sum_j r_j x_j, theta_i = q_i x_i / sum_j q_j x_j,
    l_i = (z/2)(r_i - q_i) - (r_i - 1) and ln tau_ij the sum of the four terms (module docstring).
    r and q are the pure-component volume and area parameters. For the energy form
    tau_ij = exp(-du_ij / RT) use :func:`uniquac_energy_form`.
    """

    name = "uniquac"

    def __init__(
        self,
        constant_term,
        term_over_temperature,
        term_in_ln_temperature=None,
        term_times_temperature=None,
        *,
        r,
        q,
    ) -> None:
        c, matrices = _parameter_matrices(
            "UNIQUAC", constant_term, term_over_temperature, term_in_ln_temperature, term_times_temperature
        )
        self.component_count = c
        self._log_tau = _TemperatureDependence(*matrices)
        # the residual part needs A_ij = tau_ji, so its parameters are kept transposed
        self._log_tau_transposed = self._log_tau.transposed()
        self.r = _positive_vector("r", r, c, model="UNIQUAC")
        self.q = _positive_vector("q", q, c, model="UNIQUAC")
        half_z = 0.5 * UNIQUAC_COORDINATION_NUMBER
        self._l = half_z * (self.r - self.q) - (self.r - 1.0)
        self._combinatorial_constant = np.log(self.r) + half_z * self.q * np.log(self.q / self.r) + self._l
        self._q_outer = np.outer(self.q, self.q)
        self._scratch = _ScratchArrays(_LOG_SUM_SCRATCH, c)

    def evaluate(self, temperature: np.ndarray, x: np.ndarray, derivatives: bool = True) -> ActivityResult:
        """ln gamma and derivatives for temperature (n,) [K] and x (n, c).

        Phi_i / x_i is evaluated as r_i sum(x) / sum_j r_j x_j, so a component at infinite
        dilution (x_i = 0) is no special case.
        """
        temperature, x = _states(self.name, self.component_count, temperature, x)
        r, q, l = self.r, self.q, self._l
        half_z = 0.5 * UNIQUAC_COORDINATION_NUMBER
        total = x.sum(axis=1, keepdims=True)
        r_sum = x @ r[:, None]  # (n, 1)
        q_sum = x @ q[:, None]
        l_sum = x @ l[:, None]
        combinatorial = (
            self._combinatorial_constant
            + np.log(total / r_sum)
            + (half_z * q) * np.log(r_sum / q_sum)
            - r * (l_sum / r_sum)
        )
        scratch = self._scratch.get(x.shape[0])
        area = np.ascontiguousarray((x * q).T)
        terms = _log_sum_terms(self._log_tau_transposed, temperature, area, derivatives, scratch)
        ln_gamma = combinatorial + q * terms.value
        d_ln_gamma_dT = q * terms.d_dT
        if not derivatives:
            enthalpy = _excess_enthalpy(temperature, x, d_ln_gamma_dT, None)
            return ActivityResult(ln_gamma, None, None, enthalpy[0], None, None)

        # combinatorial part: d/dx_k = 1/sum(x) - r_k/R + (z/2) q_i (r_k/R - q_k/Q) + r_i (r_k L/R^2 - l_k/R)
        # with R, Q, L the sums of r x, q x, l x
        inverse_r_sum = 1.0 / r_sum
        per_k = 1.0 / total - r * inverse_r_sum
        per_k_times_q = half_z * (r * inverse_r_sum - q / q_sum)
        per_k_times_r = r * (l_sum * inverse_r_sum * inverse_r_sum) - l * inverse_r_sum
        d_ln_gamma_dx = terms.d_dw
        d_ln_gamma_dx *= self._q_outer
        d_ln_gamma_dx += per_k[:, None, :]
        d_ln_gamma_dx += q[None, :, None] * per_k_times_q[:, None, :]
        d_ln_gamma_dx += r[None, :, None] * per_k_times_r[:, None, :]
        enthalpy = _excess_enthalpy(temperature, x, d_ln_gamma_dT, terms.weighted_second_temperature_derivative)
        return ActivityResult(ln_gamma, d_ln_gamma_dT, d_ln_gamma_dx, *enthalpy)

    def describe(self) -> dict:
        return {
            "model": self.name,
            "component_count": self.component_count,
            "temperature_dependence": "ln tau_ij = " + TEMPERATURE_DEPENDENCE,
            **self._log_tau.describe(),
            "r": self.r.tolist(),
            "q": self.q.tolist(),
            "coordination_number": UNIQUAC_COORDINATION_NUMBER,
            "source": "D. S. Abrams and J. M. Prausnitz, AIChE J. 21 (1975) 116-128",
        }


# --------------------------------------------------------------------------------------------
# energy-form parameters


def _energy_matrix(name: str, value) -> np.ndarray:
    matrix = np.array(value, dtype=float)
    if matrix.ndim != 2 or matrix.shape[0] != matrix.shape[1]:
        raise CaseError(f"{name} must be a square matrix, one row and column per component", value=matrix.tolist())
    return _matrix(name, matrix, matrix.shape[0], model="energy-form")


def nrtl_energy_form(dg) -> tuple[np.ndarray, np.ndarray]:
    """NRTL (constant_term, term_over_temperature) from interaction energies dg_ij [J/mol]:
    tau_ij = dg_ij / (R T), so the constant term is 0 and the term over temperature is
    dg_ij / R [K] (Renon and Prausnitz 1968)."""
    dg = _energy_matrix("NRTL dg", dg)
    return np.zeros_like(dg), dg / GAS_CONSTANT


def uniquac_energy_form(du) -> tuple[np.ndarray, np.ndarray]:
    """UNIQUAC (constant_term, term_over_temperature) from interaction energies du_ij [J/mol]:
    tau_ij = exp(-du_ij / (R T)), so the constant term is 0 and the term over temperature is
    -du_ij / R [K] (Abrams and Prausnitz 1975)."""
    du = _energy_matrix("UNIQUAC du", du)
    return np.zeros_like(du), -du / GAS_CONSTANT


def wilson_energy_form(dlambda, molar_volumes) -> tuple[np.ndarray, np.ndarray]:
    """Wilson (constant_term, term_over_temperature) from interaction energies
    dlambda_ij = lambda_ij - lambda_ii [J/mol] and liquid molar volumes V [m3/mol]:
    Lambda_ij = (V_j / V_i) exp(-dlambda_ij / (R T)), so the constant term is ln(V_j / V_i) and
    the term over temperature is -dlambda_ij / R [K] (Wilson 1964)."""
    dlambda = _energy_matrix("Wilson dlambda", dlambda)
    volumes = _positive_vector("molar_volumes", molar_volumes, dlambda.shape[0], model="Wilson")
    log_volumes = np.log(volumes)
    return log_volumes[None, :] - log_volumes[:, None], -dlambda / GAS_CONSTANT
