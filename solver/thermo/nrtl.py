"""The non-random two-liquid model (NRTL) of H. Renon and J. M. Prausnitz (1968), AIChE J. 14,
135-144, with a temperature-dependent non-randomness. Conventions as in
:mod:`solver.thermo.activity`."""

from __future__ import annotations

import numpy as np

from solver.errors import CaseError
from solver.thermo.activity_base import (
    ActivityModel,
    ActivityResult,
    ScratchArrays,
    check_states,
    excess_enthalpy,
    stage_first_into,
)
from solver.thermo.binary_parameters import (
    NRTL_DEFAULT_ALPHA,
    TEMPERATURE_DEPENDENCE,
    TemperatureDependence,
    alpha_matrix,
    parameter_matrices,
)

__all__ = ["NRTL"]


class NRTL(ActivityModel):
    """Non-random two-liquid model, Renon and Prausnitz (1968), AIChE J. 14, 135-144:

        ln gamma_i = sum_j x_j tau_ji G_ji / sum_k x_k G_ki
                     + sum_j x_j G_ij / (sum_k x_k G_kj) (tau_ij - sum_m x_m tau_mj G_mj / sum_k x_k G_kj)

    with tau_ij the sum of the four terms of :mod:`~solver.thermo.binary_parameters`,
    G_ij = exp(-alpha_ij tau_ij) and the non-randomness

        alpha_ij(T) = alpha_ij + alpha_slope_ij (T - alpha_reference_temperature_ij),

    symmetric, a straight line through ``alpha`` at the reference temperature [K] that the
    user states. Each of the three may be a single number; ``alpha`` None gives 0.3 (common
    practice), ``alpha_slope`` None gives 0 (and then no reference temperature is needed). For
    the energy form tau_ij = dg_ij / RT use :func:`~solver.thermo.binary_parameters.nrtl_energy_form`.
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
        c, matrices = parameter_matrices(
            "NRTL", constant_term, term_over_temperature, term_in_ln_temperature, term_times_temperature
        )
        self.component_count = c
        self._tau = TemperatureDependence(*matrices)
        self._alpha = alpha_matrix("alpha", NRTL_DEFAULT_ALPHA if alpha is None else alpha, c)
        self._alpha_slope = alpha_matrix("alpha_slope", alpha_slope, c)
        self._alpha_depends_on_temperature = bool(np.any(self._alpha_slope))
        if self._alpha_depends_on_temperature and alpha_reference_temperature is None:
            raise CaseError(
                "NRTL alpha_slope needs the temperature it is about (alpha_reference_temperature)",
                expected="a reference temperature in K",
            )
        self._alpha_reference_temperature = alpha_matrix(
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
        self._scratch = ScratchArrays(12, c)

    def evaluate(self, temperature: np.ndarray, x: np.ndarray, derivatives: bool = True) -> ActivityResult:
        """ln gamma and derivatives for temperature (n,) [K] and x (n, c).

        Written with S_j = sum_k x_k G_kj, eps_j = sum_k x_k tau_kj G_kj / S_j,
        D_ij = tau_ij - eps_j, H_ij = G_ij / S_j: ln gamma_i = eps_i + sum_j x_j H_ij D_ij.
        With u = -d ln G/dT, the weights w_kj = x_k H_kj (sum_k w_kj = 1) give
        d eps_j/dT = sum_k w_kj (dtau_kj/dT - D_kj u_kj) and d ln S_j/dT = -sum_k w_kj u_kj.
        """
        temperature, x = check_states(self.name, self.component_count, temperature, x)
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
            enthalpy = excess_enthalpy(temperature, x, d_ln_gamma_dT, None)
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
        h_first = stage_first_into(h, spare)
        vd_first = stage_first_into(vd, work, transpose=True)
        product = np.matmul(h_first, vd_first, out=u.reshape(h_first.shape))
        h *= deviation
        half = stage_first_into(h, e1)
        half -= product
        d_ln_gamma_dx = half + half.transpose(0, 2, 1)
        enthalpy = excess_enthalpy(temperature, x, d_ln_gamma_dT, weighted_second)
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
