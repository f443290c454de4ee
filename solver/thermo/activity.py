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
held fixed) are exact for any x > 0. Consequences used by the models and checked in the tests:
Gibbs-Duhem holds for any x, sum_i x_i d ln gamma_i / d x_k = 0; d ln gamma_i / d x_k is
symmetric in (i, k) (it is the Hessian of n g^E/RT); and the excess enthalpy
h^E = -R T^2 sum_i x_i d ln gamma_i / dT (Gibbs-Helmholtz, with the x passed in, so h^E is
homogeneous of degree one) has d h^E / d x_k = -R T^2 d ln gamma_k / dT.

Inside, (c, c, n) arrays carry the stage index last, which numpy broadcasts and reduces fastest
for a few components and many stages; results are returned stage first.

This module gathers the models; they live in :mod:`~solver.thermo.activity_base` (the result,
the shared pieces and the ideal solution), :mod:`~solver.thermo.binary_parameters` (the four
terms, the alpha matrices and the energy forms), :mod:`~solver.thermo.wilson_uniquac` and
:mod:`~solver.thermo.nrtl`.
"""

from __future__ import annotations

from scipy.constants import R as GAS_CONSTANT

from solver.thermo.activity_base import ActivityModel, ActivityResult, IdealSolution
from solver.thermo.binary_parameters import (
    NRTL_DEFAULT_ALPHA,
    TEMPERATURE_DEPENDENCE,
    TERMS,
    nrtl_energy_form,
    uniquac_energy_form,
    wilson_energy_form,
)
from solver.thermo.nrtl import NRTL
from solver.thermo.wilson_uniquac import UNIQUAC, UNIQUAC_COORDINATION_NUMBER, Wilson

__all__ = [
    "GAS_CONSTANT",
    "NRTL_DEFAULT_ALPHA",
    "TEMPERATURE_DEPENDENCE",
    "TERMS",
    "UNIQUAC_COORDINATION_NUMBER",
    "ActivityModel",
    "ActivityResult",
    "IdealSolution",
    "Wilson",
    "NRTL",
    "UNIQUAC",
    "nrtl_energy_form",
    "uniquac_energy_form",
    "wilson_energy_form",
]
