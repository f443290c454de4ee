"""Pure-component data as the thermo package takes it: the correlation forms it evaluates, a
correlation with its coefficients and units, and a user-defined component (all SI).

This module is the one definition of the correlation forms: the case reader checks a
``[components.data.NAME]`` table against :data:`FORMS` and :data:`PROPERTY_FORMS` and builds
the :class:`Correlation` and :class:`ComponentData` objects; :mod:`solver.thermo.correlations`
evaluates them. It imports nothing of ours.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Mapping

__all__ = [
    "FORMS",
    "PROPERTY_FORMS",
    "WATSON_EXPONENT",
    "ComponentData",
    "Correlation",
]

#: Correlation form -> (coefficients it needs, coefficients it may have). The polynomial's
#: coefficients are named c0, c1, ... (as many as given). Equations and sources are in
#: :mod:`solver.thermo.correlations`.
FORMS: Mapping[str, tuple[tuple[str, ...], tuple[str, ...]]] = {
    "antoine": (("A", "B", "C"), ()),
    "dippr101": (("A", "B"), ("C", "D", "E")),
    "polynomial": ((), ()),
    "dippr107": (("A", "B", "C"), ("D", "E")),
    "watson": (("value", "at"), ("exponent",)),
    "dippr106": (("A", "B"), ("C", "D", "E", "Tc")),
    "dippr105": (("A", "B", "C", "D"), ()),
    "constant": (("value",), ()),
    "wagner": (("A", "B", "C", "D", "Tc", "Pc"), ("exponent_C", "exponent_D")),
    "trc_gas": (("a0", "a1", "a2", "a3", "a4", "a5", "a6", "a7"), ()),
}

#: Property of a user component -> the forms that may give it (dippr105 gives the liquid molar
#: density, whose reciprocal is the molar volume).
PROPERTY_FORMS: Mapping[str, tuple[str, ...]] = {
    "vapor_pressure": ("antoine", "dippr101", "wagner"),
    "ideal_gas_cp": ("polynomial", "dippr107", "constant", "trc_gas"),
    "heat_of_vaporization": ("watson", "dippr106", "polynomial", "constant"),
    "liquid_molar_volume": ("dippr105", "polynomial", "constant"),
}

#: Exponent of the Watson latent-heat relation when none is given (K. M. Watson, Ind. Eng.
#: Chem. 35 (1943) 398-406).
WATSON_EXPONENT = 0.38


@dataclass(frozen=True)
class Correlation:
    """A pure-component correlation as written by the user, with what is needed to evaluate
    it in SI: ``value_SI = value_factor * f(T_u)`` where ``T_u = temperature_slope * T_K +
    temperature_intercept`` is the temperature in the unit the coefficients were fitted in.

    ``form`` is a key of :data:`FORMS`: "antoine" (log_base P = A - B/(T + C)), "dippr101"
    (ln Y = A + B/T + C ln T + D T^E), "polynomial" (sum c_k T^k; coefficients named c0, c1,
    ...), "dippr107", "watson" (coefficients value, at [K]; exponent 0.38 unless given),
    "dippr106", "dippr105", "constant" (coefficient value), "wagner" (ln(P/Pc) = (A tau +
    B tau^1.5 + C tau^m + D tau^n)/Tr; coefficients A, B, C, D, Tc [K], Pc [Pa], optional
    exponent_C = m and exponent_D = n), "trc_gas" (TRC ideal-gas cp/R, coefficients a0 to a7).
    """

    form: str
    coefficients: Mapping[str, float]
    temperature_slope: float = 1.0
    temperature_intercept: float = 0.0
    value_factor: float = 1.0
    log_base: float | None = None
    T_min: float | None = None  # K
    T_max: float | None = None  # K


@dataclass(frozen=True)
class ComponentData:
    """A component defined by correlations (all SI): from ``[components.data.NAME]``
    (``origin`` "user") or from the handbook library (``origin`` "handbook")."""

    name: str
    molar_mass: float  # kg/mol
    critical_temperature: float  # K
    critical_pressure: float  # Pa
    vapor_pressure: Correlation
    ideal_gas_cp: Correlation | None = None  # J/mol/K
    heat_of_vaporization: Correlation | None = None  # J/mol
    liquid_molar_volume: Correlation | None = None  # m3/mol
    normal_boiling_point: float | None = None  # K
    source: str = ""
    origin: str = "user"  # "user" ([components.data]) or "handbook" (solver.handbook library)
    #: for handbook components, the record of every property's table, form and range
    provenance: dict | None = field(default=None, compare=False, repr=False)
    acentric_factor: float | None = None  # for a cubic equation of state
