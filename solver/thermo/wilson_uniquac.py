"""Wilson (G. M. Wilson, 1964, J. Am. Chem. Soc. 86, 127-130) and UNIQUAC (D. S. Abrams and
J. M. Prausnitz, 1975, AIChE J. 21, 116-128; coordination number z = 10), which share the core
``1 - ln(S_i / sum(w)) - sum_k A_ki w_k / S_k`` with ``S_i = sum_j A_ij w_j`` (Wilson: A = Lambda,
w = x; the UNIQUAC residual part: A_ij = tau_ji, w_j = q_j x_j). Conventions as in
:mod:`solver.thermo.activity`."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from solver.thermo.activity_base import (
    ActivityModel,
    ActivityResult,
    ScratchArrays,
    check_states,
    excess_enthalpy,
    stage_first_into,
)
from solver.thermo.binary_parameters import (
    TEMPERATURE_DEPENDENCE,
    TemperatureDependence,
    parameter_matrices,
    positive_vector,
)

__all__ = ["UNIQUAC_COORDINATION_NUMBER", "UNIQUAC", "Wilson"]

#: Lattice coordination number z of UNIQUAC (Abrams and Prausnitz 1975).
UNIQUAC_COORDINATION_NUMBER = 10.0


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
    dependence: TemperatureDependence,
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
    scaled = stage_first_into(matrix, scaled_memory)  # B[s, i, j] = A_ij / S_i
    scaled_transposed = scaled.transpose(0, 2, 1)
    weighted = np.multiply(scaled_transposed, weights.T[:, None, :], out=product_memory.reshape(scaled.shape))
    d_dw = np.matmul(weighted, scaled)  # sum_k B_ki w_k B_km
    d_dw -= scaled
    d_dw -= scaled_transposed
    d_dw += (1.0 / total)[:, None, None]
    return _LogSumTerms(value, d_dT, d_dw, weighted_second)



class Wilson(ActivityModel):
    """Wilson (1964) local-composition model, J. Am. Chem. Soc. 86, 127-130:

        ln gamma_i = 1 - ln(sum_j x_j Lambda_ij) - sum_k x_k Lambda_ki / sum_j x_j Lambda_kj

    (with x / sum(x) in the logarithm when x is off the simplex), ln Lambda_ij the sum of the
    four terms of :mod:`~solver.thermo.binary_parameters` and Lambda_ii = 1. Parameters are
    (c, c) matrices with zero diagonal; None means zeros. For the energy form
    Lambda_ij = (V_j / V_i) exp(-dlambda_ij / RT) use :func:`wilson_energy_form` (in
    :mod:`~solver.thermo.binary_parameters`).
    """

    name = "wilson"

    def __init__(
        self, constant_term, term_over_temperature, term_in_ln_temperature=None, term_times_temperature=None
    ) -> None:
        self.component_count, matrices = parameter_matrices(
            "Wilson", constant_term, term_over_temperature, term_in_ln_temperature, term_times_temperature
        )
        self._log_lambda = TemperatureDependence(*matrices)
        self._scratch = ScratchArrays(_LOG_SUM_SCRATCH, self.component_count)

    def evaluate(self, temperature: np.ndarray, x: np.ndarray, derivatives: bool = True) -> ActivityResult:
        """ln gamma and derivatives for temperature (n,) [K] and x (n, c)."""
        temperature, x = check_states(self.name, self.component_count, temperature, x)
        scratch = self._scratch.get(x.shape[0])
        terms = _log_sum_terms(self._log_lambda, temperature, np.ascontiguousarray(x.T), derivatives, scratch)
        enthalpy = excess_enthalpy(temperature, x, terms.d_dT, terms.weighted_second_temperature_derivative)
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



class UNIQUAC(ActivityModel):
    """UNIQUAC, Abrams and Prausnitz (1975), AIChE J. 21, 116-128, with z = 10:

        ln gamma_i = ln(Phi_i/x_i) + (z/2) q_i ln(theta_i/Phi_i) + l_i - (Phi_i/x_i) sum_j x_j l_j
                     + q_i (1 - ln(sum_j theta_j tau_ji) - sum_j theta_j tau_ij / sum_k theta_k tau_kj)

    with Phi_i = r_i x_i / sum_j r_j x_j, theta_i = q_i x_i / sum_j q_j x_j,
    l_i = (z/2)(r_i - q_i) - (r_i - 1) and ln tau_ij the sum of the four terms of
    :mod:`~solver.thermo.binary_parameters`. r and q are the pure-component volume and area parameters. For the energy form
    tau_ij = exp(-du_ij / RT) use :func:`uniquac_energy_form` (in
    :mod:`~solver.thermo.binary_parameters`).
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
        c, matrices = parameter_matrices(
            "UNIQUAC", constant_term, term_over_temperature, term_in_ln_temperature, term_times_temperature
        )
        self.component_count = c
        self._log_tau = TemperatureDependence(*matrices)
        # the residual part needs A_ij = tau_ji, so its parameters are kept transposed
        self._log_tau_transposed = self._log_tau.transposed()
        self.r = positive_vector("r", r, c, model="UNIQUAC")
        self.q = positive_vector("q", q, c, model="UNIQUAC")
        half_z = 0.5 * UNIQUAC_COORDINATION_NUMBER
        self._l = half_z * (self.r - self.q) - (self.r - 1.0)
        self._combinatorial_constant = np.log(self.r) + half_z * self.q * np.log(self.q / self.r) + self._l
        self._q_outer = np.outer(self.q, self.q)
        self._scratch = ScratchArrays(_LOG_SUM_SCRATCH, c)

    def evaluate(self, temperature: np.ndarray, x: np.ndarray, derivatives: bool = True) -> ActivityResult:
        """ln gamma and derivatives for temperature (n,) [K] and x (n, c).

        Phi_i / x_i is evaluated as r_i sum(x) / sum_j r_j x_j, so a component at infinite
        dilution (x_i = 0) is no special case.
        """
        temperature, x = check_states(self.name, self.component_count, temperature, x)
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
            enthalpy = excess_enthalpy(temperature, x, d_ln_gamma_dT, None)
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
        enthalpy = excess_enthalpy(temperature, x, d_ln_gamma_dT, terms.weighted_second_temperature_derivative)
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
