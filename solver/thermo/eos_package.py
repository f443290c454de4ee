"""The thermo package of a cubic equation of state for both phases (``[thermo] liquid =
"peng-robinson"`` or ``"soave-redlich-kwong"``).

* K-values ``K_i = phi_i^L(T, P, x) / phi_i^V(T, P, y)`` (e.g. M. L. Michelsen and J. M.
  Mollerup, *Thermodynamic Models: Fundamentals and Computational Aspects*, 2nd ed., 2007,
  ch. 3): they depend on the vapor too, so :meth:`CubicThermoPackage.k_values` takes an optional
  ``y`` and returns ``d_ln_K_dy``. Without ``y`` the vapor is the incipient vapor of ``x``,
  ``y = K x / sum(K x)``, found by successive substitution from Wilson's K-values (G. M.
  Wilson, 1968, as in Michelsen and Mollerup ch. 6). With that vapor the partial derivatives in
  T and x are exact for the bubble-point function ``sum_i K_i x_i``: since ``x_i K_i = S y_i``,
  ``sum_i x_i K_i d ln K_i/d y_k = -S sum_i y_i d ln phi_i^V/d y_k = 0`` (Gibbs-Duhem).
* Enthalpies: ideal gas (the pure-component fits, ideal gas at 298.15 K = 0) plus the departure
  of each phase from the equation of state, at the stage pressure. Components above their
  critical temperature are ordinary members: no vapor pressure or heat of vaporization is used
  (the vapor-pressure fits serve only the starting temperatures of bubble-point iterations).
* Critical constants: CoolProp's (``AbstractState.T_critical``, ``p_critical``,
  ``acentric_factor``); k_ij from ``[thermo.interaction.I.J]`` with their source, zero otherwise.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Callable

import numpy as np

from ..components import component_info
from ..errors import CaseError
from . import activity as activity_models
from .cubic import CubicParameters, cubic_k_values, cubic_phase, cubic_phase_enthalpy, cubic_stage_properties
from .cubic_critical import critical_pressure_note, trivial_solution
from .cubic_flash import wilson_k_values
from .cubic_volume_shift import with_matched_volume_shift
from .package import KValues, PhaseEnthalpy, StageProperties, ThermoPackage
from .pure import PureComponents

if TYPE_CHECKING:
    from ..case import Case

__all__ = ["CUBIC_MODELS", "CubicThermoPackage", "as_phase_enthalpy", "cubic_parameters", "incipient_vapor",
           "phase_composition"]

CUBIC_MODELS = ("peng-robinson", "soave-redlich-kwong")

_SUBSTITUTIONS = 300  # at most, for the incipient vapor
_VAPOR_TOLERANCE = 1e-12
#: a stage whose phases are one: every |ln K_i| below this, or |Z_L - Z_V| below _SAME_ROOT
_TRIVIAL_LN_K = 1e-4
_SAME_ROOT = 1e-4


def cubic_parameters(case: Case) -> CubicParameters:
    """Critical constants and acentric factors of the case's components (CoolProp's for its
    fluids, ``acentric_factor`` of ``[components.data]`` for user components) and the k_ij of
    ``[thermo.interaction]``, for the case's equation of state (its liquid model, or the vapor
    model beside an activity model)."""
    variant = case.thermo.liquid if case.thermo.liquid in CUBIC_MODELS else case.thermo.vapor
    names = tuple(case.component_names)
    tc, pc, omega, sources = [], [], [], []
    for name in names:
        info = component_info(name, case.component_data)
        tc.append(info.critical_temperature)
        pc.append(info.critical_pressure)
        omega.append(_acentric_factor(case, info, variant))
        sources.append(info.source)
    index = {name: i for i, name in enumerate(names)}
    k = np.zeros((len(names), len(names)))
    interaction_sources = {}
    for pair in getattr(case.thermo, "interaction", ()):
        i, j = index[pair.first], index[pair.second]
        k[i, j] = k[j, i] = pair.value
        interaction_sources[f"{pair.first}/{pair.second}"] = pair.source
    return CubicParameters(names, tc, pc, omega, variant, k, None, tuple(sources), interaction_sources)


def incipient_vapor(k_values: Callable[[np.ndarray], np.ndarray], x: np.ndarray, y: np.ndarray) -> np.ndarray:
    """The vapor in equilibrium with liquid ``x (n,c)`` where K depends on the vapor:
    ``y = K(y) x / sum(K(y) x)`` by successive substitution from ``y (n,c)``, vectorized over
    states; ``k_values(y) -> K (n,c)`` at the states' fixed temperature and pressure."""
    for _ in range(_SUBSTITUTIONS):
        new = k_values(y) * x
        new = new / new.sum(axis=1, keepdims=True)
        change = np.max(np.abs(new - y))
        y = new
        if change < _VAPOR_TOLERANCE:
            break
    return y


def _acentric_factor(case: Case, info, variant: str) -> float:
    if info.backend == "coolprop":
        import CoolProp.CoolProp as CP

        return float(CP.AbstractState("HEOS", info.coolprop_name).acentric_factor())
    data = {key.lower(): value for key, value in (case.component_data or {}).items()}.get(info.name)
    value = getattr(data, "acentric_factor", None)
    if value is None:
        raise CaseError(
            f"the {variant} equation of state needs the acentric factor of {info.name}",
            file=case.source_file,
            key=f"components.data.{info.name}.acentric_factor",
            expected="a number such as 0.152, with its source",
        )
    return float(value)


class CubicThermoPackage(ThermoPackage):
    """K-values and enthalpies of both phases from one cubic equation of state."""

    #: K depends on the vapor composition: the MESH equations take d ln K / d y
    vapor_dependent = True
    #: a bubble point may land on the trivial solution K = 1 (both roots one phase)
    trivial_solution_possible = True

    def __init__(self, pure: PureComponents, parameters: CubicParameters, *, enthalpy: str = "rigorous",
                 reference_pressure: float, description: dict | None = None) -> None:
        self.parameters = parameters
        self.reference_pressure = float(reference_pressure)
        super().__init__(pure, activity_models.IdealSolution(len(parameters.names)), enthalpy=enthalpy,
                         description=description)

    @classmethod
    def from_case(cls, case: Case) -> "CubicThermoPackage":
        infos = [component_info(name, case.component_data) for name in case.component_names]
        pure = PureComponents(infos, case.component_data)
        parameters = cubic_parameters(case)
        if case.thermo.volume_shift == "peneloux":
            parameters = with_matched_volume_shift(
                parameters, pure.liquid_molar_volume,
                "each component's data (CoolProp's reference equation, the user's correlation or Rackett)")
        description = {
            "liquid": case.thermo.liquid,
            "vapor": case.thermo.liquid,
            "enthalpy": case.thermo.enthalpy,
            "k_value_model": "both phases from the equation of state: K_i = phi_i^L(T, P, x) / phi_i^V(T, P, y)",
            "enthalpy_model": "ideal gas + departure of each phase from the equation of state",
            "enthalpy_reference": "ideal gas at 298.15 K = 0 for every component",
            "equation_of_state": parameters.describe(),
        }
        return cls(pure, parameters, enthalpy=case.thermo.enthalpy, reference_pressure=_column_pressure(case),
                   description=description)

    def describe(self) -> dict:
        out = super().describe()
        out.pop("activity_parameters", None)
        return out

    # ------------------------------------------------------------------ equilibrium
    def k_values(self, temperature, pressure, x, derivatives: bool = True, y=None) -> KValues:
        """K-values at ``temperature (n,)`` K, ``pressure (n,)`` Pa, liquid ``x (n,c)`` and
        vapor ``y (n,c)``; without ``y`` the incipient vapor of ``x`` (module docstring)."""
        T = np.atleast_1d(np.asarray(temperature, dtype=float))
        x = np.atleast_2d(np.asarray(x, dtype=float))
        P = np.broadcast_to(np.asarray(pressure, dtype=float), T.shape)
        if y is None:
            y = self.incipient_vapor(T, P, x)
        kv = cubic_k_values(self.parameters, T, P, x, y, derivatives=derivatives)
        return KValues(kv.K, kv.d_ln_K_dT, kv.d_ln_K_dx, kv.d_ln_K_dy)

    def incipient_vapor(self, temperature, pressure, x) -> np.ndarray:
        """``y = K(x, y) x / sum(K x)`` by successive substitution, vectorized over states,
        from Wilson's K-values."""
        x = x / x.sum(axis=1, keepdims=True)
        y = wilson_k_values(self.parameters, temperature, pressure) * x
        y = y / y.sum(axis=1, keepdims=True)
        return incipient_vapor(
            lambda vapor: cubic_k_values(self.parameters, temperature, pressure, x, vapor, derivatives=False).K, x, y)

    def wilson_bubble_point(self, pressure, x) -> tuple[np.ndarray, np.ndarray]:
        """Bubble temperature (K) and vapor of ``x (n,c)`` at ``pressure (n,)`` Pa by Wilson's
        K-values, ``K_i = (Pc_i/P) exp(5.373 (1 + w_i)(1 - Tc_i/T))`` (Wilson 1968, as in
        Michelsen and Mollerup ch. 6): K depends on T alone, so the bubble point has no
        trivial solution; a start for the equation of state. Newton's method in 1/T."""
        x = np.atleast_2d(np.asarray(x, dtype=float))
        x = x / x.sum(axis=1, keepdims=True)
        P = np.broadcast_to(np.asarray(pressure, dtype=float), (x.shape[0],))
        par = self.parameters
        slope = 5.373 * (1.0 + par.acentric_factor) * par.critical_temperature  # d ln K / d(1/T) = -slope
        inverse = np.full(x.shape[0], 1.0 / np.mean(par.critical_temperature))
        for _ in range(100):
            K = wilson_k_values(par, 1.0 / inverse, P)
            total = np.einsum("nc,nc->n", K, x)
            step = np.log(total) / (np.einsum("nc,nc,c->n", K, x, slope) / total)
            inverse = np.clip(inverse + step, 1.0 / (2.0 * np.max(par.critical_temperature)), 10.0 / np.min(par.critical_temperature))
            if np.all(np.abs(step) < 1e-12 * inverse):
                break
        K = wilson_k_values(par, 1.0 / inverse, P)
        y = K * x
        return 1.0 / inverse, y / y.sum(axis=1, keepdims=True)

    # ------------------------------------------------------------------ enthalpies
    def _pressure(self, temperature: np.ndarray, pressure) -> np.ndarray:
        if pressure is None:
            pressure = self.reference_pressure
        return np.broadcast_to(np.asarray(pressure, dtype=float), temperature.shape).astype(float)

    def _phase_enthalpy(self, temperature, composition, pressure, phase: str, model: str | None) -> PhaseEnthalpy:
        model = model or self.enthalpy_model
        T = np.atleast_1d(np.asarray(temperature, dtype=float))
        composition = np.atleast_2d(np.asarray(composition, dtype=float))
        if model == "cmo":
            parent = super().liquid_enthalpy if phase == "liquid" else super().vapor_enthalpy
            return parent(T, composition, model="cmo")
        state = cubic_phase(self.parameters, T, self._pressure(T, pressure), composition, phase)
        h = cubic_phase_enthalpy(state, composition, self.pure.ideal_gas_enthalpy(T))
        return as_phase_enthalpy(h)

    def liquid_enthalpy(self, temperature, x, model: str | None = None, pressure=None) -> PhaseEnthalpy:
        """Liquid enthalpy (J/mol): ideal gas plus the liquid root's departure at ``pressure``
        (Pa; default the column's top pressure)."""
        return self._phase_enthalpy(temperature, x, pressure, "liquid", model)

    def vapor_enthalpy(self, temperature, y, model: str | None = None, pressure=None) -> PhaseEnthalpy:
        """Vapor enthalpy (J/mol): ideal gas plus the vapor root's departure."""
        return self._phase_enthalpy(temperature, y, pressure, "vapor", model)

    def rigorous_enthalpies(self, temperature, x, y, pressure=None):
        return (
            self.liquid_enthalpy(temperature, x, model="rigorous", pressure=pressure).molar,
            self.vapor_enthalpy(temperature, y, model="rigorous", pressure=pressure).molar,
        )

    def stage_properties(self, temperature, pressure, x, y) -> StageProperties:
        """K-values, enthalpies and all derivatives in one pass of the equation of state."""
        T = np.asarray(temperature, dtype=float)
        x, y = phase_composition(x), phase_composition(y)
        props = cubic_stage_properties(self.parameters, T, pressure, x, y, self.pure.ideal_gas_enthalpy)
        kv = props.k_values
        k_values = KValues(kv.K, kv.d_ln_K_dT, kv.d_ln_K_dx, kv.d_ln_K_dy)
        if self.enthalpy_model == "cmo":
            return StageProperties(k_values, super().liquid_enthalpy(T, x, model="cmo"), super().vapor_enthalpy(T, y, model="cmo"))
        return StageProperties(k_values, as_phase_enthalpy(props.liquid), as_phase_enthalpy(props.vapor))

    # ------------------------------------------------------------------ honesty
    def range_problem(self, temperature, pressure, x, y, skip_first: bool = False) -> str | None:
        """Why a solution is not a two-phase column, or None: a stage whose liquid and vapor
        are one phase (the roots coincide, or every K tends to 1: the trivial solution), with
        the numbers. No vapor-pressure range applies to the equation of state."""
        T = np.asarray(temperature, dtype=float)
        bad = ~(np.isfinite(T) & (T > 0.0))
        if bad.any():
            return f"temperature {T[bad][0]!r} K is not a finite positive temperature"
        kv = cubic_k_values(self.parameters, T, pressure, phase_composition(x), phase_composition(y), derivatives=False)
        check = trivial_solution(kv.liquid.Z, kv.vapor.Z, kv.K, _SAME_ROOT, _TRIVIAL_LN_K)
        one_phase = (check.z_gap < _SAME_ROOT) | (check.largest_ln_k < _TRIVIAL_LN_K)
        if skip_first:
            one_phase[0] = False
        if not one_phase.any():
            return None
        j = int(np.flatnonzero(one_phase)[0])
        P = np.broadcast_to(np.asarray(pressure, dtype=float), T.shape)
        text = (
            f"stage {j + 1} has one phase, not two (the trivial solution of the equation of state): "
            f"Z_liquid = {kv.liquid.Z[j]:.5g}, Z_vapor = {kv.vapor.Z[j]:.5g}, largest |ln K| = "
            f"{check.largest_ln_k[j]:.3g} at {T[j]:.2f} K and {P[j] / 1e5:.4g} bar; the stage is at or above "
            f"the critical point of its mixture ({int(one_phase.sum())} such stage(s))"
        )
        note = self.critical_pressure_note(P[j], phase_composition(x)[j], f"stage {j + 1}")
        return f"{text}; {note}" if note else text

    def critical_pressure_note(self, pressure: float, x, what: str) -> str:
        """``what`` (a stage, a feed) at ``pressure`` [Pa] against the critical pressure of its
        mixture ``x (c,)`` by the equation of state, with the numbers (""
        if the critical point is not found)."""
        return critical_pressure_note(self.parameters, float(pressure), np.asarray(x, dtype=float), what)


def phase_composition(x) -> np.ndarray:
    """``x (n,c)`` with the rows of a phase that is not there (all flows zero, a trial point of
    Newton's line search) replaced by equal fractions, so the equation of state stays finite."""
    x = np.asarray(x, dtype=float)
    empty = ~(x.sum(axis=1) > 0.0)
    if not empty.any():
        return x
    x = x.copy()
    x[empty] = 1.0 / x.shape[1]
    return x


def as_phase_enthalpy(h) -> PhaseEnthalpy:
    """A phase enthalpy of the equation of state as the thermo package gives one."""
    return PhaseEnthalpy(h.molar, h.d_dT, h.d_dx, h.ideal_gas, h.departure)


def _column_pressure(case: Case) -> float:
    """The top pressure (Pa; of the first column of a network): the pressure of an enthalpy
    asked for without one."""
    return float(case.stage_pressures[0])
