"""The thermo package: K-values and phase enthalpies of a mixture, with their derivatives.

Models:

* K-values by the modified Raoult's law with an ideal vapor,
  ``K_i = gamma_i(T, x) Psat_i(T) / P`` (e.g. Smith, Van Ness & Abbott, *Introduction to
  Chemical Engineering Thermodynamics*, 7th ed., 2005, sec. 10.5).
* Enthalpy reference: ideal gas at 298.15 K is zero for every component. Vapor (ideal gas
  mixture): ``h_V = sum_i y_i h_ig,i(T)``. Liquid: ``h_L = sum_i x_i (h_ig,i(T) - dH_vap,i(T)) +
  h_E(T, x)`` with the excess enthalpy from the activity model by Gibbs-Helmholtz.
* ``enthalpy = "cmo"``: every component has the same constant molar latent heat ``lambda`` and
  there is no sensible heat and no heat of mixing: ``h_V = lambda``, ``h_L = 0``. The energy
  balances then give constant molar overflow exactly, which reproduces the operating-line
  method. Feeds keep their thermal condition: a feed of thermal condition ``q`` (computed with
  the rigorous model) enters with ``h_F = (1 - q) lambda``.

All arrays are stage-major: temperatures ``(n,)``, compositions ``(n, c)``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, Sequence

import numpy as np
from scipy.constants import R as GAS_CONSTANT
from scipy.constants import atm as ATMOSPHERIC_PRESSURE  # Pa, the pressure of the normal boiling point

from ..components import ComponentInfo, component_info
from ..errors import CaseError, ThermoError
from . import activity as activity_models
from .predicted_pairs import PredictedPair, missing_pairs, predict_pair
from .pure import PureComponents
from .unifac import DortmundUNIFAC, UNIFAC

if TYPE_CHECKING:  # the case reader is upstream; only its data model is read here
    from ..case import Case

__all__ = ["ActivityParts", "KValues", "PhaseEnthalpy", "StageProperties", "ThermoPackage", "activity_model",
           "activity_parts"]

_EQUATIONS_OF_STATE = ("peng-robinson", "soave-redlich-kwong")


@dataclass(frozen=True)
class KValues:
    """K-values and derivatives: ``K (n,c)``, ``d_ln_K_dT (n,c)`` in 1/K and
    ``d_ln_K_dx (n,c,c)`` with ``[s, i, k] = d ln K_i / d x_k`` (other x held fixed). Both
    derivatives are None when they were not asked for. ``d_ln_K_dy (n,c,c)``, the same in the
    vapor fractions, only where K depends on the vapor (an equation of state), else None."""

    K: np.ndarray
    d_ln_K_dT: np.ndarray | None
    d_ln_K_dx: np.ndarray | None
    d_ln_K_dy: np.ndarray | None = None


@dataclass(frozen=True)
class PhaseEnthalpy:
    """Molar enthalpy of a phase and its derivatives.

    ``molar (n,)`` J/mol of mixture; ``d_dT (n,)`` J/mol/K; ``d_dx (n,c)`` J/mol, partials with
    the other mole fractions held fixed; ``pure (n,c)`` the pure-component molar enthalpies in
    that phase (without mixing terms) and ``excess (n,)`` the excess enthalpy."""

    molar: np.ndarray
    d_dT: np.ndarray
    d_dx: np.ndarray
    pure: np.ndarray
    excess: np.ndarray


def activity_model(case: Case, names: Sequence[str], pairs: Sequence = ()):
    """Build the case's activity model, with parameter matrices in the component order;
    ``pairs`` are predicted pairs added to the case's own."""
    options = case.thermo
    count = len(names)
    if options.liquid == "ideal":
        return activity_models.IdealSolution(count)
    if options.liquid in ("unifac", "unifac-dortmund"):
        model = UNIFAC if options.liquid == "unifac" else DortmundUNIFAC
        return model.from_components(list(names), dict(options.groups), where="thermo.groups")
    index = {name: position for position, name in enumerate(names)}
    terms = {name: np.zeros((count, count)) for name in activity_models.TERMS}
    alpha = {name: np.zeros((count, count)) for name in ("alpha", "alpha_slope", "alpha_reference_temperature")}
    for pair in (*options.pairs, *pairs):
        if pair.model != options.liquid:
            continue
        i, j = index[pair.first], index[pair.second]
        for name, matrix in terms.items():
            matrix[i, j], matrix[j, i] = getattr(pair, name)
        for name, matrix in alpha.items():
            matrix[i, j] = matrix[j, i] = getattr(pair, name) or 0.0
    if options.liquid == "nrtl":
        # a pair taken as ideal (missing_pairs = "ideal") has tau = 0; alpha must still be finite
        alpha["alpha"] = np.where(alpha["alpha"] == 0.0, activity_models.NRTL_DEFAULT_ALPHA, alpha["alpha"])
        np.fill_diagonal(alpha["alpha"], 0.0)
        return activity_models.NRTL(*terms.values(), **alpha)
    if options.liquid == "wilson":
        return activity_models.Wilson(*terms.values())
    if options.liquid == "uniquac":
        missing = [name for name in names if name not in options.uniquac_structure]
        if missing:
            raise CaseError(
                "UNIQUAC needs the structure parameters r and q of every component",
                file=case.source_file,
                key="thermo.uniquac_structure",
                value=", ".join(missing),
                expected="NAME = { r = ..., q = ... } for each component",
            )
        r = np.array([options.uniquac_structure[name][0] for name in names])
        q = np.array([options.uniquac_structure[name][1] for name in names])
        return activity_models.UNIQUAC(*terms.values(), r=r, q=q)
    raise CaseError("unknown liquid model", file=case.source_file, key="thermo.liquid", value=options.liquid)


def _predicted_pairs(case: Case, pure: PureComponents) -> list[PredictedPair]:
    """The pairs the case does not give, fitted to UNIFAC over the column's temperature range
    when ``missing_pairs`` asks for it (:mod:`.predicted_pairs`)."""
    options = case.thermo
    if options.liquid not in ("nrtl", "wilson", "uniquac") or options.missing_pairs not in ("unifac", "unifac-dortmund"):
        return []
    wanted = missing_pairs(case.component_names, options.pairs)
    if not wanted:
        return []
    pressures = np.array([min(case.stage_pressures), max(case.stage_pressures)])
    boiling = ThermoPackage(pure, activity_models.IdealSolution(len(case.component_names))).saturation_temperatures(pressures)
    index = {name: k for k, name in enumerate(case.component_names)}
    predicted = []
    for first, second in wanted:
        i, j = index[first], index[second]
        temperatures = (float(min(boiling[0, i], boiling[0, j])), float(max(boiling[1, i], boiling[1, j])))
        structure = None
        if options.liquid == "uniquac":
            structure = tuple(zip(options.uniquac_structure[first], options.uniquac_structure[second]))
        predicted.append(predict_pair(options.liquid, (first, second), options.missing_pairs, temperatures,
                                      groups=dict(options.groups), structure=structure))
    return predicted


@dataclass(frozen=True)
class ActivityParts:
    """What a package with an activity model for the liquid is built from: the pure-component
    properties, the activity model, the pairs fitted to UNIFAC and the description of both."""

    pure: PureComponents
    activity: object
    predicted_pairs: tuple
    description: dict


def activity_parts(case: Case) -> ActivityParts:
    """The pure components, the activity model (with the pairs predicted where the case asks
    for it) and their description for the result file."""
    infos: list[ComponentInfo] = [component_info(name, case.component_data) for name in case.component_names]
    pure = PureComponents(infos, case.component_data)
    predicted = _predicted_pairs(case, pure)
    activity = activity_model(case, case.component_names, [p.parameters for p in predicted])
    description = {
        "liquid": case.thermo.liquid,
        "vapor": case.thermo.vapor,
        "enthalpy": case.thermo.enthalpy,
        "k_value_model": "modified Raoult's law, ideal vapor: K_i = gamma_i Psat_i / P",
        "enthalpy_reference": "ideal gas at 298.15 K = 0 for every component",
        "pairs": [
            {
                "model": pair.model,
                "i": pair.first,
                "j": pair.second,
                "constant_term": list(pair.constant_term),
                "term_over_temperature_K": list(pair.term_over_temperature),
                "term_in_ln_temperature": list(pair.term_in_ln_temperature),
                "term_times_temperature_per_K": list(pair.term_times_temperature),
                "alpha": pair.alpha,
                "alpha_slope_per_K": pair.alpha_slope,
                "alpha_reference_temperature_K": pair.alpha_reference_temperature,
                "as_written": dict(pair.energy_form),
                "source": pair.source,
            }
            for pair in case.thermo.pairs
        ],
        "pair_origins": [
            {"pair": [pair.first, pair.second], "origin": "case file", "source": pair.source}
            for pair in case.thermo.pairs
        ]
        + [p.describe() for p in predicted],
        "missing_pairs": case.thermo.missing_pairs or None,
        "uniquac_structure": {name: list(rq) for name, rq in case.thermo.uniquac_structure.items()},
    }
    return ActivityParts(pure, activity, tuple(p.parameters for p in predicted), description)


class ThermoPackage:
    """K-values and phase enthalpies of one mixture, vectorized over stages.

    Holds the pure-component fits and the activity model built once per run.
    """

    def __init__(
        self,
        pure: PureComponents,
        activity,
        *,
        enthalpy: str = "rigorous",
        cmo_latent_heat: float | None = None,
        description: dict | None = None,
    ) -> None:
        if enthalpy not in ("rigorous", "cmo"):
            raise ValueError(f"enthalpy must be 'rigorous' or 'cmo', not {enthalpy!r}")
        self.pure = pure
        self.activity = activity
        self.enthalpy_model = enthalpy
        self.names = tuple(pure.names)
        self.component_count = len(self.names)
        self.cmo_latent_heat_basis = "given"
        if cmo_latent_heat is None:
            cmo_latent_heat, self.cmo_latent_heat_basis = self._reference_latent_heat()
        self.cmo_latent_heat = float(cmo_latent_heat)
        self._description = description or {}

    # ------------------------------------------------------------------ construction
    @classmethod
    def from_case(cls, case: Case) -> "ThermoPackage":
        """The case's package; an equation of state for both phases
        (:class:`~solver.thermo.eos_package.CubicThermoPackage`) or for the vapor beside an
        activity model (:class:`~solver.thermo.gamma_phi_package.GammaPhiThermoPackage`) is a
        package of its own (imported here: each builds on this one)."""
        if cls is ThermoPackage and case.thermo.liquid in _EQUATIONS_OF_STATE:
            from .eos_package import CubicThermoPackage

            return CubicThermoPackage.from_case(case)
        if cls is ThermoPackage and case.thermo.vapor in _EQUATIONS_OF_STATE:
            from .gamma_phi_package import GammaPhiThermoPackage

            return GammaPhiThermoPackage.from_case(case)
        parts = activity_parts(case)
        package = cls(parts.pure, parts.activity, enthalpy=case.thermo.enthalpy, description=parts.description)
        package.predicted_pairs = parts.predicted_pairs  # the fitted pairs, to build the model again
        return package

    def replaced(self, *, pure=None, activity=None) -> "ThermoPackage":
        """This package with other pure-component properties or another activity model (an
        input moved for a sensitivity), the same constant latent heat."""
        return ThermoPackage(self.pure if pure is None else pure, self.activity if activity is None else activity,
                             enthalpy=self.enthalpy_model, cmo_latent_heat=self.cmo_latent_heat)

    def describe(self) -> dict:
        """Every model and parameter used, with sources, for the result file."""
        out = dict(self._description)
        out["enthalpy"] = self.enthalpy_model
        out["components"] = self.pure.describe()
        out["activity_parameters"] = self.activity.describe()
        if self.enthalpy_model == "cmo":
            out["cmo_latent_heat_J_per_mol"] = self.cmo_latent_heat
            out["cmo_latent_heat_basis"] = self.cmo_latent_heat_basis
        return out

    def reference_latent_heat(self) -> float:
        """Mean of the pure-component heats of vaporization at their normal boiling points
        (J/mol); the constant molar latent heat of the ``cmo`` enthalpy model.

        Where a component has no normal boiling point within its vapor-pressure correlation,
        its saturation temperature at 101325 Pa from the extrapolated vapor pressure is used.
        If a component has no heat-of-vaporization correlation, every latent heat is taken from
        the vapor-pressure slope by the Clausius-Clapeyron equation, ``dHvap = R T^2 d ln Psat/dT``
        (ideal vapor, liquid volume neglected; e.g. Smith, Van Ness & Abbott, 7th ed., sec. 6.4)."""
        return self._reference_latent_heat()[0]

    def _reference_latent_heat(self) -> tuple[float, str]:
        boiling = np.asarray(self.pure.normal_boiling_point, dtype=float)
        if not np.all(np.isfinite(boiling)):
            saturation = self.saturation_temperatures(np.array([ATMOSPHERIC_PRESSURE]))[0]
            boiling = np.where(np.isfinite(boiling), boiling, saturation)
        own = np.arange(self.component_count)
        try:
            values = self.pure.heat_of_vaporization(boiling)[0][own, own]
            basis = "mean heat of vaporization at the normal boiling points"
        except ThermoError:
            slope = self.pure.ln_vapor_pressure(boiling)[1][own, own]
            values = GAS_CONSTANT * boiling**2 * slope
            basis = "mean Clausius-Clapeyron latent heat R T^2 dln(Psat)/dT at the normal boiling points"
        return float(np.mean(values)), basis

    def saturation_temperatures(self, pressure: np.ndarray, max_iterations: int = 50) -> np.ndarray:
        """Temperature (K) at which each pure component's vapor pressure equals ``pressure (n,)``
        Pa, shape (n, c). Newton's method in 1/T, in which ln Psat is nearly linear
        (Clausius-Clapeyron), from the normal boiling point (0.7 Tc where there is none); the
        result is kept within [0.1 Tc, Tc] (above the critical pressure: Tc)."""
        pressure = np.atleast_1d(np.asarray(pressure, dtype=float))
        n, c = pressure.shape[0], self.component_count
        critical = np.asarray(self.pure.critical_temperature, dtype=float)
        boiling = np.asarray(self.pure.normal_boiling_point, dtype=float)
        start = np.where(np.isfinite(boiling), boiling, 0.7 * critical)
        inverse = np.tile(1.0 / start, (n, 1))
        lowest_inverse, highest_inverse = 1.0 / critical, 1.0 / (0.1 * critical)
        target = np.log(pressure)[:, None]
        own = np.arange(c)
        for _ in range(max_iterations):
            T = 1.0 / inverse
            ln_p, slope = self.pure.ln_vapor_pressure(T.reshape(-1))
            ln_p = ln_p.reshape(n, c, c)[:, own, own]
            slope = slope.reshape(n, c, c)[:, own, own]
            gap = ln_p - target
            # d ln Psat / d(1/T) = -T^2 d ln Psat / dT
            moved = inverse + gap / np.maximum(T**2 * slope, 1e-300)
            stuck = ((moved <= lowest_inverse) & (inverse == lowest_inverse)) | (
                (moved >= highest_inverse) & (inverse == highest_inverse)
            )
            inverse = np.clip(moved, lowest_inverse, highest_inverse)
            if np.all((np.abs(gap) < 1e-11) | stuck):
                break
        return 1.0 / inverse

    #: K depends on the vapor composition (an equation of state for the vapor)
    vapor_dependent = False
    #: the pairs fitted to UNIFAC (``[thermo] missing_pairs``), kept to build the model again
    predicted_pairs: tuple = ()
    #: a bubble point may land on the trivial solution K = 1 (an equation of state for both phases)
    trivial_solution_possible = False

    def range_problem(self, temperature, pressure, x, y, skip_first: bool = False) -> str | None:
        """Why a solution lies outside the property models' range, or None: a temperature at or
        above a component's critical temperature (no vapor pressure there) or outside a user
        correlation's range."""
        try:
            self.pure.check_temperature(temperature)
        except ThermoError as exc:
            return str(exc)
        return None

    # ------------------------------------------------------------------ equilibrium
    def k_values(self, temperature: np.ndarray, pressure: np.ndarray, x: np.ndarray, derivatives: bool = True,
                 y: np.ndarray | None = None) -> KValues:
        """Modified Raoult's law K-values at ``temperature (n,)`` K, ``pressure (n,)`` Pa and
        liquid composition ``x (n,c)`` (the vapor ``y`` does not enter)."""
        temperature = np.asarray(temperature, dtype=float)
        act = self.activity.evaluate(temperature, x, derivatives=derivatives)
        return self._k_values(temperature, np.asarray(pressure, dtype=float), act, derivatives)

    def _k_values(self, temperature: np.ndarray, pressure: np.ndarray, act, derivatives: bool) -> KValues:
        ln_psat, d_ln_psat_dT = self.pure.ln_vapor_pressure(temperature)
        K = np.exp(act.ln_gamma + ln_psat - np.log(pressure)[:, None])
        if not derivatives:
            return KValues(K, None, None)
        return KValues(K, act.d_ln_gamma_dT + d_ln_psat_dT, act.d_ln_gamma_dx)

    def ln_gamma(self, temperature: np.ndarray, x: np.ndarray) -> np.ndarray:
        return self.activity.evaluate(np.asarray(temperature, dtype=float), x, derivatives=False).ln_gamma

    # ------------------------------------------------------------------ enthalpies
    def vapor_enthalpy(self, temperature: np.ndarray, y: np.ndarray, model: str | None = None, pressure=None) -> PhaseEnthalpy:
        """Ideal-gas mixture enthalpy (J/mol) of vapor of composition ``y (n,c)``; ``model``
        overrides the package's enthalpy model ("rigorous" | "cmo"); ``pressure`` does not
        enter (it does with an equation of state)."""
        return self._vapor_phase(np.asarray(temperature, dtype=float), np.asarray(y, dtype=float), model or self.enthalpy_model)

    def _vapor_phase(self, temperature: np.ndarray, y: np.ndarray, model: str, ideal_gas=None) -> PhaseEnthalpy:
        """``ideal_gas``: the pure ideal-gas ``(h_ig, cp0)`` at ``temperature`` when the caller
        has them (a stage's two phases share one evaluation)."""
        zero = np.zeros(temperature.shape[0])
        if model == "cmo":
            pure = np.full((temperature.shape[0], self.component_count), self.cmo_latent_heat)
            return PhaseEnthalpy(np.einsum("nc,nc->n", y, pure), zero, pure, pure, zero)
        h_ig, cp = ideal_gas if ideal_gas is not None else self.pure.ideal_gas_enthalpy(temperature)
        return PhaseEnthalpy(np.einsum("nc,nc->n", y, h_ig), np.einsum("nc,nc->n", y, cp), h_ig, h_ig, zero)

    def liquid_enthalpy(self, temperature: np.ndarray, x: np.ndarray, model: str | None = None, pressure=None) -> PhaseEnthalpy:
        """Liquid mixture enthalpy (J/mol): ideal gas minus heat of vaporization, plus the
        excess enthalpy of the activity model; ``model`` overrides the enthalpy model."""
        temperature = np.asarray(temperature, dtype=float)
        x = np.asarray(x, dtype=float)
        model = model or self.enthalpy_model
        act = self.activity.evaluate(temperature, x, derivatives=True) if model != "cmo" else None
        return self._liquid_phase(temperature, x, act, model)

    def _liquid_phase(self, temperature: np.ndarray, x: np.ndarray, act, model: str, ideal_gas=None) -> PhaseEnthalpy:
        """``ideal_gas`` as for :meth:`_vapor_phase`."""
        n = temperature.shape[0]
        if model == "cmo":
            zero = np.zeros(n)
            pure = np.zeros((n, self.component_count))
            return PhaseEnthalpy(zero, zero, pure, pure, zero)
        h_ig, cp = ideal_gas if ideal_gas is not None else self.pure.ideal_gas_enthalpy(temperature)
        dh_vap, d_dh_vap_dT = self.pure.heat_of_vaporization(temperature)
        pure = h_ig - dh_vap
        return PhaseEnthalpy(
            np.einsum("nc,nc->n", x, pure) + act.excess_enthalpy,
            np.einsum("nc,nc->n", x, cp - d_dh_vap_dT) + act.d_excess_enthalpy_dT,
            pure + act.d_excess_enthalpy_dx,
            pure,
            act.excess_enthalpy,
        )

    def rigorous_enthalpies(self, temperature: np.ndarray, x: np.ndarray, y: np.ndarray, pressure=None) -> tuple[np.ndarray, np.ndarray]:
        """(h_L, h_V) with the rigorous model whatever ``enthalpy`` is set to: the thermal
        condition of a feed is always judged with real enthalpies."""
        return (
            self.liquid_enthalpy(temperature, x, model="rigorous").molar,
            self.vapor_enthalpy(temperature, y, model="rigorous").molar,
        )

    # ------------------------------------------------------------------ everything a stage needs
    def stage_properties(
        self, temperature: np.ndarray, pressure: np.ndarray, x: np.ndarray, y: np.ndarray
    ) -> "StageProperties":
        """K-values, liquid and vapor enthalpies and all their derivatives at once (the activity
        model is evaluated a single time). Shapes: ``temperature, pressure (n,)``, ``x, y (n,c)``."""
        temperature = np.asarray(temperature, dtype=float)
        x = np.asarray(x, dtype=float)
        act = self.activity.evaluate(temperature, x, derivatives=True)
        ideal_gas = self.pure.ideal_gas_enthalpy(temperature) if self.enthalpy_model != "cmo" else None
        return StageProperties(
            self._k_values(temperature, np.asarray(pressure, dtype=float), act, True),
            self._liquid_phase(temperature, x, act, self.enthalpy_model, ideal_gas),
            self._vapor_phase(temperature, np.asarray(y, dtype=float), self.enthalpy_model, ideal_gas),
        )


@dataclass(frozen=True)
class StageProperties:
    """What the MESH equations need of the thermo package on every stage."""

    k_values: KValues
    liquid: PhaseEnthalpy
    vapor: PhaseEnthalpy
