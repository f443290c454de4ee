"""The thermo package of an activity model for the liquid beside a cubic equation of state for
the vapor (``[thermo] liquid = "nrtl"`` (or any activity model) with ``vapor = "peng-robinson"``
or ``"soave-redlich-kwong"``): the gamma-phi formulation, for polar mixtures at pressure.

* K-values (e.g. J. M. Smith, H. C. Van Ness and M. M. Abbott, *Introduction to Chemical
  Engineering Thermodynamics*, 7th ed., 2005, sec. 14.1; B. E. Poling, J. M. Prausnitz and
  J. P. O'Connell, *The Properties of Gases and Liquids*, 5th ed., 2001, ch. 8)::

      K_i = gamma_i(T, x) Psat_i(T) phi_i^sat(T) exp(V_i^L(T) (P - Psat_i(T)) / (R T))
            / (phi_i^V(T, P, y) P)

  ``phi_i^sat`` is the fugacity coefficient of pure i as a vapor at ``T`` and ``Psat_i(T)``
  from the same equation of state as ``phi_i^V``, so that a pure component at its vapor
  pressure has K = 1 exactly; the exponential is the Poynting correction with the saturated
  liquid molar volume of the pure-component data (CoolProp's, the user's correlation or
  Rackett's) taken as independent of pressure. K depends on the vapor: ``vapor_dependent``
  is True and :meth:`GammaPhiThermoPackage.k_values` returns ``d_ln_K_dy = -d ln phi^V/d y``.
  Without ``y`` the vapor is the incipient vapor of ``x`` by successive substitution from the
  K-values with ``phi^V = 1``.
* Enthalpies (ideal gas at 298.15 K = 0 for every component). Vapor: the ideal-gas mixture
  plus the equation of state's departure of the vapor at the stage pressure. Liquid: the
  convention of this package is that a pure liquid lies one heat of vaporization (the
  pure-component data) below its saturated vapor, and that saturated vapor is the ideal gas
  plus the equation of state's departure of pure i at ``T`` and ``Psat_i(T)``::

      h_L = sum_i x_i (h_ig,i(T) + (H - H_ig)_i^sat(T) - dHvap_i(T)) + h_E(T, x)

  so the latent heat of a pure component stays that of its data; the effect of pressure on
  the liquid's enthalpy, ``(V - T dV/dT)(P - Psat)``, is neglected (a few J/mol at 10 bar).
* Critical constants, acentric factors and k_ij as for the equation of state of both phases
  (:func:`solver.thermo.eos_package.cubic_parameters`); the temperature range is that of
  the vapor pressures (:meth:`ThermoPackage.range_problem`).

Arrays are stage-major: temperature, pressure (n,), compositions (n, c).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
from scipy.constants import R as GAS_CONSTANT

from .cubic import CubicParameters, CubicPhase, cubic_phase, cubic_phase_enthalpy
from .eos_package import as_phase_enthalpy, cubic_parameters, incipient_vapor, phase_composition
from .package import KValues, PhaseEnthalpy, StageProperties, ThermoPackage, activity_parts
from .pure import PureComponents

if TYPE_CHECKING:
    from ..case import Case

__all__ = ["GammaPhiThermoPackage", "SaturatedPure", "saturated_pure"]

K_VALUE_MODEL = ("gamma-phi: K_i = gamma_i Psat_i phi_i^sat exp(V_i^L (P - Psat_i)/(R T)) / (phi_i^V(T, P, y) P), "
                 "phi^sat and phi^V from the equation of state, V^L the saturated liquid volume")
ENTHALPY_MODEL = ("vapor: ideal gas + departure of the vapor from the equation of state at the stage pressure; "
                  "liquid: ideal gas + departure of the pure saturated vapor at Psat_i(T) - heat of vaporization "
                  "+ excess enthalpy (the pure-component latent heats kept; pressure effect on the liquid neglected)")


@dataclass(frozen=True)
class SaturatedPure:
    """The pure components at their vapor pressures, each (n, c): ``ln_psat`` (Psat in Pa),
    ``psat`` [Pa], ``ln_phi`` (of the saturated vapor), ``departure`` (H - H_ig of the
    saturated vapor) [J/mol], ``volume`` (saturated liquid) [m3/mol], and their total
    temperature derivatives along the saturation curve (``d_...``, per K; None when not asked)."""

    ln_psat: np.ndarray
    psat: np.ndarray
    ln_phi: np.ndarray
    departure: np.ndarray
    volume: np.ndarray
    d_ln_psat: np.ndarray | None
    d_ln_phi: np.ndarray | None
    d_departure: np.ndarray | None
    d_volume: np.ndarray | None


def saturated_pure(parameters: CubicParameters, pure: PureComponents, temperature: np.ndarray,
                   derivatives: bool = True) -> SaturatedPure:
    """Every pure component as a vapor at ``temperature (n,)`` K and its vapor pressure, by the
    equation of state (all n c states in one evaluation): d/dT along Psat(T) is
    ``d/dT + dPsat/dT d/dP``."""
    T = np.atleast_1d(np.asarray(temperature, dtype=float))
    n, c = T.size, parameters.component_count
    ln_psat, d_ln_psat = pure.ln_vapor_pressure(T)
    psat = np.exp(ln_psat)
    states = cubic_phase(parameters, np.repeat(T, c), psat.reshape(-1), np.tile(np.eye(c), (n, 1)), "vapor",
                         derivatives)
    own = np.arange(c)
    ln_phi = states.ln_phi.reshape(n, c, c)[:, own, own]
    departure = states.departure_enthalpy.reshape(n, c)
    volume, d_volume = pure.liquid_molar_volume_and_slope(T)
    if not derivatives:
        return SaturatedPure(ln_psat, psat, ln_phi, departure, volume, None, None, None, None)
    d_psat = psat * d_ln_psat
    d_ln_phi = (states.d_ln_phi_dT.reshape(n, c, c)[:, own, own]
                + states.d_ln_phi_dP.reshape(n, c, c)[:, own, own] * d_psat)
    d_departure = states.d_departure_dT.reshape(n, c) + states.d_departure_dP.reshape(n, c) * d_psat
    return SaturatedPure(ln_psat, psat, ln_phi, departure, volume, d_ln_psat, d_ln_phi, d_departure, d_volume)


class GammaPhiThermoPackage(ThermoPackage):
    """K-values and enthalpies with an activity model for the liquid and a cubic equation of
    state for the vapor (module docstring)."""

    #: K depends on the vapor composition through phi^V: the MESH equations take d ln K / d y
    vapor_dependent = True

    def __init__(self, pure: PureComponents, activity, parameters: CubicParameters, *, reference_pressure: float,
                 enthalpy: str = "rigorous", cmo_latent_heat: float | None = None,
                 description: dict | None = None) -> None:
        self.parameters = parameters
        self.reference_pressure = float(reference_pressure)
        super().__init__(pure, activity, enthalpy=enthalpy, cmo_latent_heat=cmo_latent_heat, description=description)

    @classmethod
    def from_case(cls, case: Case) -> "GammaPhiThermoPackage":
        parts = activity_parts(case)
        parameters = cubic_parameters(case)
        description = dict(parts.description)
        description.update(k_value_model=K_VALUE_MODEL, enthalpy_model=ENTHALPY_MODEL,
                           equation_of_state=parameters.describe())
        package = cls(parts.pure, parts.activity, parameters, enthalpy=case.thermo.enthalpy,
                      reference_pressure=float(case.column.pressures[0]), description=description)
        package.predicted_pairs = parts.predicted_pairs
        return package

    def replaced(self, *, pure=None, activity=None) -> "GammaPhiThermoPackage":
        return GammaPhiThermoPackage(
            self.pure if pure is None else pure, self.activity if activity is None else activity, self.parameters,
            reference_pressure=self.reference_pressure, enthalpy=self.enthalpy_model,
            cmo_latent_heat=self.cmo_latent_heat, description=self._description,
        )

    # ------------------------------------------------------------------ equilibrium
    def k_values(self, temperature, pressure, x, derivatives: bool = True, y=None) -> KValues:
        """K-values at ``temperature (n,)`` K, ``pressure (n,)`` Pa, liquid ``x (n,c)`` and
        vapor ``y (n,c)``; without ``y`` the incipient vapor of ``x``."""
        T = np.atleast_1d(np.asarray(temperature, dtype=float))
        x = np.atleast_2d(np.asarray(x, dtype=float))
        P = np.broadcast_to(np.asarray(pressure, dtype=float), T.shape).astype(float)
        act = self.activity.evaluate(T, x, derivatives=derivatives)
        saturated = saturated_pure(self.parameters, self.pure, T, derivatives)
        if y is None:
            y = self.incipient_vapor(T, P, x, act.ln_gamma, saturated)
        vapor = cubic_phase(self.parameters, T, P, phase_composition(y), "vapor", derivatives)
        return _gamma_phi_k(T, P, act, saturated, vapor, derivatives)

    def incipient_vapor(self, temperature, pressure, x, ln_gamma, saturated: SaturatedPure) -> np.ndarray:
        """``y = K(y) x / sum(K x)`` by successive substitution, from the K-values with an
        ideal vapor (phi^V = 1)."""
        ln_k_ideal = ln_gamma + _ln_k_pure(temperature, pressure, saturated)
        k_ideal = np.exp(ln_k_ideal)
        y = k_ideal * x
        y = y / y.sum(axis=1, keepdims=True)
        return incipient_vapor(
            lambda vapor: k_ideal * np.exp(-cubic_phase(self.parameters, temperature, pressure, vapor, "vapor",
                                                        derivatives=False).ln_phi), x, y)

    # ------------------------------------------------------------------ enthalpies
    def _pressure(self, temperature: np.ndarray, pressure) -> np.ndarray:
        if pressure is None:
            pressure = self.reference_pressure
        return np.broadcast_to(np.asarray(pressure, dtype=float), temperature.shape).astype(float)

    def vapor_enthalpy(self, temperature, y, model: str | None = None, pressure=None) -> PhaseEnthalpy:
        """Vapor enthalpy (J/mol): ideal gas plus the vapor's departure at ``pressure`` (Pa;
        default the column's top pressure)."""
        model = model or self.enthalpy_model
        T = np.atleast_1d(np.asarray(temperature, dtype=float))
        y = phase_composition(np.atleast_2d(np.asarray(y, dtype=float)))
        if model == "cmo":
            return super().vapor_enthalpy(T, y, model="cmo")
        state = cubic_phase(self.parameters, T, self._pressure(T, pressure), y, "vapor")
        return _vapor_phase(state, y, self.pure.ideal_gas_enthalpy(T))

    def liquid_enthalpy(self, temperature, x, model: str | None = None, pressure=None) -> PhaseEnthalpy:
        """Liquid enthalpy (J/mol) by the convention of the module docstring (``pressure`` does
        not enter)."""
        model = model or self.enthalpy_model
        T = np.atleast_1d(np.asarray(temperature, dtype=float))
        x = np.atleast_2d(np.asarray(x, dtype=float))
        base = super().liquid_enthalpy(T, x, model=model)
        if model == "cmo":
            return base
        return _with_saturated_vapor(base, x, saturated_pure(self.parameters, self.pure, T))

    def rigorous_enthalpies(self, temperature, x, y, pressure=None):
        return (
            self.liquid_enthalpy(temperature, x, model="rigorous").molar,
            self.vapor_enthalpy(temperature, y, model="rigorous", pressure=pressure).molar,
        )

    def stage_properties(self, temperature, pressure, x, y) -> StageProperties:
        """K-values, enthalpies and all derivatives, the activity model, the saturated pure
        vapors and the stage vapor each evaluated once."""
        T = np.atleast_1d(np.asarray(temperature, dtype=float))
        P = np.broadcast_to(np.asarray(pressure, dtype=float), T.shape).astype(float)
        x = np.asarray(x, dtype=float)
        y = phase_composition(y)
        act = self.activity.evaluate(T, x, derivatives=True)
        saturated = saturated_pure(self.parameters, self.pure, T)
        vapor = cubic_phase(self.parameters, T, P, y, "vapor")
        k_values = _gamma_phi_k(T, P, act, saturated, vapor, True)
        if self.enthalpy_model == "cmo":
            return StageProperties(k_values, self._liquid_phase(T, x, act, "cmo"), self._vapor_phase(T, y, "cmo"))
        ideal_gas = self.pure.ideal_gas_enthalpy(T)
        liquid = _with_saturated_vapor(self._liquid_phase(T, x, act, "rigorous", ideal_gas), x, saturated)
        return StageProperties(k_values, liquid, _vapor_phase(vapor, y, ideal_gas))


def _ln_k_pure(T: np.ndarray, P: np.ndarray, saturated: SaturatedPure) -> np.ndarray:
    """ln(Psat phi^sat Poynting / P), (n, c): the K-value of each pure liquid with an ideal vapor."""
    poynting = saturated.volume * (P[:, None] - saturated.psat) / (GAS_CONSTANT * T[:, None])
    return saturated.ln_psat + saturated.ln_phi + poynting - np.log(P)[:, None]


def _gamma_phi_k(T: np.ndarray, P: np.ndarray, act, saturated: SaturatedPure, vapor: CubicPhase,
                 derivatives: bool) -> KValues:
    K = np.exp(act.ln_gamma + _ln_k_pure(T, P, saturated) - vapor.ln_phi)
    if not derivatives:
        return KValues(K, None, None, None)
    RT = (GAS_CONSTANT * T)[:, None]
    gap = P[:, None] - saturated.psat
    # d/dT of V (P - Psat) / (R T)
    d_poynting = ((saturated.d_volume * gap - saturated.volume * saturated.psat * saturated.d_ln_psat) / RT
                  - saturated.volume * gap / (RT * T[:, None]))
    d_ln_K_dT = act.d_ln_gamma_dT + saturated.d_ln_psat + saturated.d_ln_phi + d_poynting - vapor.d_ln_phi_dT
    return KValues(K, d_ln_K_dT, act.d_ln_gamma_dx, -vapor.d_ln_phi_dx)


def _vapor_phase(state: CubicPhase, y: np.ndarray, ideal_gas) -> PhaseEnthalpy:
    return as_phase_enthalpy(cubic_phase_enthalpy(state, y, ideal_gas))


def _with_saturated_vapor(base: PhaseEnthalpy, x: np.ndarray, saturated: SaturatedPure) -> PhaseEnthalpy:
    """The liquid enthalpy of the activity model moved by each pure saturated vapor's departure."""
    return PhaseEnthalpy(
        base.molar + np.einsum("nc,nc->n", x, saturated.departure),
        base.d_dT + np.einsum("nc,nc->n", x, saturated.d_departure),
        base.d_dx + saturated.departure,
        base.pure + saturated.departure,
        base.excess,
    )
