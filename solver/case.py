"""The case: a TOML case file read, checked and converted into a frozen :class:`Case` in SI units.

Every error is a :class:`~solver.errors.CaseError` that names the file, the key path
(``feeds[0].composition``), the value and what was expected. Unknown keys are errors with a
"did you mean" suggestion. The file format is described in DESIGN.md and README.md.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Mapping

#: Spec kinds that use up one of the column's degrees of freedom.
SPEC_KINDS = (
    "reflux_ratio",
    "boilup_ratio",
    "distillate_rate",
    "bottoms_rate",
    "condenser_duty",
    "reboiler_duty",
    "mole_fraction",  # written in the file as distillate = {A = 0.99} or bottoms = {B = 0.995}
    "recovery",
    "stage_temperature",
)


def _frozen_mapping(mapping: Mapping | None = None) -> Mapping:
    return MappingProxyType(dict(mapping or {}))


@dataclass(frozen=True)
class Correlation:
    """A pure-component correlation as written by the user, with what is needed to evaluate
    it in SI: ``value_SI = value_factor * f(T_u)`` where ``T_u = temperature_slope * T_K +
    temperature_intercept`` is the temperature in the unit the coefficients were fitted in.

    ``form`` is one of: "antoine" (log_base P = A - B/(T + C)), "dippr101" (ln Y = A + B/T +
    C ln T + D T^E), "polynomial" (sum c_k T^k; coefficients named c0, c1, ...), "dippr107",
    "watson" (coefficients value, at [K]; exponent 0.38 unless given), "dippr106", "dippr105",
    "constant" (coefficient value).
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
    """A user-defined component from ``[components.data.NAME]`` (all SI)."""

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


@dataclass(frozen=True)
class BinaryParameters:
    """Interaction parameters of one pair (i, j) for an activity model, converted on reading to
    the temperature form ``p_ij = a_ij + b_ij/T + e_ij ln T + f_ij T`` (tau for NRTL, ln Lambda
    for Wilson, ln tau for UNIQUAC). Tuples hold (ij, ji). For NRTL the non-randomness is
    ``alpha = alpha_c + alpha_d (T - 273.15 K)``.

    Energy-form input (``dg``, ``dlambda``, ``du`` in energy per mole) is converted to ``b`` on
    reading: for NRTL ``b_ij = dg_ij / R``; for UNIQUAC ``b_ij = -du_ij / R``; for Wilson
    ``b_ij = -dlambda_ij / R`` and ``a_ij = ln(V_j / V_i)`` (liquid molar volumes needed).
    """

    model: str  # "nrtl" | "wilson" | "uniquac"
    first: str
    second: str
    a: tuple[float, float] = (0.0, 0.0)
    b: tuple[float, float] = (0.0, 0.0)  # K
    e: tuple[float, float] = (0.0, 0.0)
    f: tuple[float, float] = (0.0, 0.0)  # 1/K
    alpha_c: float = 0.0
    alpha_d: float = 0.0  # 1/K
    source: str = ""
    energy_form: Mapping[str, object] = field(default_factory=_frozen_mapping)  # as written, for the record


@dataclass(frozen=True)
class ThermoOptions:
    liquid: str = "ideal"  # ideal | wilson | nrtl | uniquac
    vapor: str = "ideal"
    enthalpy: str = "rigorous"  # rigorous | cmo
    pairs: tuple[BinaryParameters, ...] = ()
    uniquac_structure: Mapping[str, tuple[float, float]] = field(default_factory=_frozen_mapping)  # name -> (r, q)
    wilson_volumes: Mapping[str, float] = field(default_factory=_frozen_mapping)  # name -> m3/mol, for energy-form Wilson


@dataclass(frozen=True)
class Feed:
    stage: int
    flow: float  # mol/s
    composition: tuple[float, ...]  # mole fractions, in the order of Case.component_names
    temperature: float | None = None  # K
    vapor_fraction: float | None = None  # molar, 0 = saturated liquid, 1 = saturated vapor
    pressure: float | None = None  # Pa; None = the stage pressure
    name: str = ""


@dataclass(frozen=True)
class SideDraw:
    stage: int
    phase: str  # "liquid" | "vapor"
    flow: float  # mol/s
    name: str = ""


@dataclass(frozen=True)
class StageDuty:
    """A side heater (duty > 0) or cooler (duty < 0) on a stage."""

    stage: int
    duty: float  # W


@dataclass(frozen=True)
class Column:
    stages: int  # equilibrium stages, condenser and reboiler included
    condenser: str  # total | partial | none
    reboiler: str  # partial | none
    pressures: tuple[float, ...]  # Pa, one per stage, top first
    efficiencies: tuple[float, ...]  # Murphree vapor efficiency, one per stage
    side_draws: tuple[SideDraw, ...] = ()
    stage_duties: tuple[StageDuty, ...] = ()
    reflux_temperature: float | None = None  # K; subcooled reflux from a total condenser
    reflux_subcooling: float | None = None  # K below the bubble point


@dataclass(frozen=True)
class Spec:
    """One specification. ``kind`` is one of :data:`SPEC_KINDS`; ``value`` is SI (mol/s, W,
    K, or a ratio/fraction). ``component`` and ``product`` ("distillate" | "bottoms") for
    mole_fraction and recovery; ``stage`` for stage_temperature."""

    kind: str
    value: float
    component: str | None = None
    product: str | None = None
    stage: int | None = None
    key: str = ""  # where it came from in the file, for messages: "specs.bottoms.water"


@dataclass(frozen=True)
class Case:
    title: str
    component_names: tuple[str, ...]
    component_data: Mapping[str, ComponentData]  # only the user-defined ones
    thermo: ThermoOptions
    column: Column
    feeds: tuple[Feed, ...]
    specs: tuple[Spec, ...]
    check: Mapping[str, float] = field(default_factory=_frozen_mapping)  # tolerances
    display: Mapping[str, str] = field(default_factory=_frozen_mapping)  # screen units
    source_file: str = ""
    raw: Mapping[str, object] = field(default_factory=_frozen_mapping)  # the TOML as read

    @property
    def component_count(self) -> int:
        return len(self.component_names)
