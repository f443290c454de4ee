"""Binary interaction parameters of the activity models: the four terms of their temperature
dependence,

    p_ij(T) = constant_term_ij + term_over_temperature_ij / T
              + term_in_ln_temperature_ij ln T + term_times_temperature_ij T      [T in K],

as (c, c) matrices with a zero diagonal (checked here), evaluated for many temperatures at once
(:class:`TemperatureDependence`); the NRTL non-randomness matrices; and the conversion of the
published energy forms (dg of NRTL, dlambda of Wilson, du of UNIQUAC) to these terms.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.constants import R as GAS_CONSTANT

from solver.errors import CaseError

__all__ = [
    "NRTL_DEFAULT_ALPHA",
    "TEMPERATURE_DEPENDENCE",
    "TERMS",
    "TemperatureDependence",
    "alpha_matrix",
    "nrtl_energy_form",
    "parameter_matrices",
    "positive_vector",
    "uniquac_energy_form",
    "wilson_energy_form",
]

#: 0.3 is common practice.
NRTL_DEFAULT_ALPHA = 0.3

#: The four terms of a binary parameter, in the order the models take them.
TERMS = ("constant_term", "term_over_temperature", "term_in_ln_temperature", "term_times_temperature")

TEMPERATURE_DEPENDENCE = (
    "constant_term_ij + term_over_temperature_ij/T + term_in_ln_temperature_ij*ln(T)"
    " + term_times_temperature_ij*T, T in K"
)



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


def parameter_matrices(model: str, *terms) -> tuple[int, list[np.ndarray]]:
    """The four terms (in the order of :data:`TERMS`) as (c, c) matrices; c is the size of
    the constant term."""
    shape = np.shape(terms[0])
    if len(shape) != 2 or shape[0] != shape[1] or shape[0] < 1:
        raise CaseError(f"{model} parameter {TERMS[0]} must be a square matrix (c, c)", value=f"shape {shape}")
    c = shape[0]
    return c, [_matrix(name, value, c, model=model) for name, value in zip(TERMS, terms)]


def positive_vector(name: str, value, component_count: int, *, model: str) -> np.ndarray:
    vector = np.array(value, dtype=float)
    if vector.shape != (component_count,) or not np.all(np.isfinite(vector)) or np.any(vector <= 0.0):
        raise CaseError(
            f"{model} parameter {name} must hold one positive number per component",
            value=vector.tolist(),
            expected=f"{component_count} positive numbers",
        )
    return vector


def alpha_matrix(name: str, value, component_count: int) -> np.ndarray:
    """A symmetric NRTL alpha matrix (value, slope or reference temperature); a single number
    fills it, None gives zeros. The diagonal is set to 0: G_ii = 1 whatever alpha_ii is."""
    if value is not None and np.ndim(value) == 0:
        value = np.full((component_count, component_count), float(value))
    matrix = _matrix(name, value, component_count, model="NRTL", zero_diagonal=False)
    np.fill_diagonal(matrix, 0.0)
    if not np.allclose(matrix, matrix.T, rtol=1e-12, atol=0.0):
        raise CaseError(f"NRTL parameter {name} must be symmetric ({name}_ij = {name}_ji)", value=matrix.tolist())
    return matrix



@dataclass(frozen=True)
class TemperatureDependence:
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

    def transposed(self) -> TemperatureDependence:
        """The same dependence for the transposed matrices (p_ji in place of p_ij)."""
        return TemperatureDependence(*(np.ascontiguousarray(m.T) for m in self.terms))

    def describe(self) -> dict:
        return {name: matrix.tolist() for name, matrix in zip(TERMS, self.terms)}



# --- energy-form parameters -----------------------------------------------------------------


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
    volumes = positive_vector("molar_volumes", molar_volumes, dlambda.shape[0], model="Wilson")
    log_volumes = np.log(volumes)
    return log_volumes[None, :] - log_volumes[:, None], -dlambda / GAS_CONSTANT
