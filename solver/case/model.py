"""The case as the engine takes it: frozen dataclasses in SI units, built by the case reader
(:mod:`solver.case.reader`) from a TOML case file. Nothing here reads or checks a file."""

from __future__ import annotations

from dataclasses import dataclass, field
from types import MappingProxyType
from typing import Mapping

from solver.case.sizing_table import SizingOptions
from solver.thermo.data import ComponentData

__all__ = [
    "AUDIT_THRESHOLD_KEYS",
    "DEFAULT_DISPLAY",
    "SPEC_KINDS",
    "TOLERANCE_KEYS",
    "AuditOptions",
    "BinaryParameters",
    "Case",
    "Column",
    "ColumnSection",
    "Connection",
    "ConnectionExchanger",
    "Feed",
    "HeatLink",
    "NETWORK_SPEC_KINDS",
    "Network",
    "NetworkSpec",
    "SideDraw",
    "Spec",
    "StageDuty",
    "StandardUncertainty",
    "InteractionParameter",
    "ThermoOptions",
]

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


#: Kinds of the specs of a column network's top-level [[specs]] list (each names its equipment).
NETWORK_SPEC_KINDS = (
    "connection_flow",  # the rate of a connection whose flow is "free"
    "connection_fraction",  # the fraction of a stage's liquid or vapor a connection takes
    "product_flow",  # COLUMN.distillate, COLUMN.bottoms or a side draw
    "mole_fraction",  # of a component in a product
    "recovery",  # of a component of all feeds, in a product
    "exchanger_duty",  # COLUMN.condenser, COLUMN.reboiler, or the cooler/heater of a connection
    "return_temperature",  # of the cooler/heater of a connection
    "stage_temperature",
    "reflux_ratio",
    "boilup_ratio",
)

#: Screen units when [display] does not say otherwise.
DEFAULT_DISPLAY = {"temperature": "degC", "pressure": "bar", "flow": "kmol/h", "duty": "kW"}
#: Keys of [check] tolerances.
TOLERANCE_KEYS = ("duty_rel", "composition_abs", "temperature_abs", "flow_rel")
#: Keys of [audit] thresholds (their defaults and reasons are in solver.audit). The two stage
#: thresholds are numbers of stages, the others fractions (or a factor).
AUDIT_THRESHOLD_KEYS = (
    "cmo_deviation",
    "purity_shortfall",
    "stage_difference",
    "reflux_difference",
    "duty_difference",
    "feed_condition",
    "feed_q_offset",
    "tangent_pinch",
    "pinch_shift",
    "serious_factor",
)


def _frozen_mapping(mapping: Mapping | None = None) -> Mapping:
    return MappingProxyType(dict(mapping or {}))


@dataclass(frozen=True)
class BinaryParameters:
    """Interaction parameters of one pair (i, j) for an activity model, converted on reading to
    four terms, ``p_ij = constant_term_ij + term_over_temperature_ij / T +
    term_in_ln_temperature_ij ln T + term_times_temperature_ij T`` (T in K; p is tau for NRTL,
    ln Lambda for Wilson, ln tau for UNIQUAC). Tuples hold (ij, ji). For NRTL the
    non-randomness is ``alpha + alpha_slope (T - alpha_reference_temperature)``.

    Energy-form input (``dg``, ``dlambda``, ``du`` in energy per mole) is converted to the term
    over temperature on reading: ``dg_ij / R`` for NRTL, ``-du_ij / R`` for UNIQUAC,
    ``-dlambda_ij / R`` for Wilson, whose constant term is then ``ln(V_j / V_i)`` (liquid molar
    volumes needed).
    """

    model: str  # "nrtl" | "wilson" | "uniquac"
    first: str
    second: str
    constant_term: tuple[float, float] = (0.0, 0.0)
    term_over_temperature: tuple[float, float] = (0.0, 0.0)  # K
    term_in_ln_temperature: tuple[float, float] = (0.0, 0.0)
    term_times_temperature: tuple[float, float] = (0.0, 0.0)  # 1/K
    alpha: float = 0.0
    alpha_slope: float = 0.0  # 1/K
    alpha_reference_temperature: float | None = None  # K, stated with a slope
    source: str = ""
    energy_form: Mapping[str, object] = field(default_factory=_frozen_mapping)  # as written, for the record


@dataclass(frozen=True)
class InteractionParameter:
    """One binary interaction parameter k_ij of a cubic equation of state (symmetric), from
    ``[thermo.interaction.I.J]``, with its source as written."""

    first: str
    second: str
    value: float
    source: str


@dataclass(frozen=True)
class ThermoOptions:
    liquid: str = "ideal"  # ideal | wilson | nrtl | uniquac | unifac | unifac-dortmund | peng-robinson | soave-redlich-kwong
    vapor: str = "ideal"  # ideal | the equation of state of the liquid | peng-robinson or soave-redlich-kwong beside an activity model
    enthalpy: str = "rigorous"  # rigorous | cmo
    pairs: tuple[BinaryParameters, ...] = ()
    uniquac_structure: Mapping[str, tuple[float, float]] = field(default_factory=_frozen_mapping)  # name -> (r, q)
    wilson_volumes: Mapping[str, float] = field(default_factory=_frozen_mapping)  # name -> m3/mol, for energy-form Wilson
    groups: Mapping[str, Mapping[str, int]] = field(default_factory=_frozen_mapping)  # name -> {UNIFAC subgroup: count}
    missing_pairs: str = ""  # "" (a missing pair is an error) | unifac | unifac-dortmund | ideal
    interaction: tuple[InteractionParameter, ...] = ()  # k_ij of the equation of state (of both phases or the vapor)
    volume_shift: str = "none"  # none | peneloux (an equation of state for both phases only)


@dataclass(frozen=True)
class Feed:
    stage: int
    flow: float  # mol/s
    composition: tuple[float, ...]  # mole fractions, in the order of Case.component_names
    temperature: float | None = None  # K
    vapor_fraction: float | None = None  # molar, 0 = saturated liquid, 1 = saturated vapor
    pressure: float | None = None  # Pa; None = the stage pressure
    name: str = ""
    free: bool = False  # network cases: the rate is an unknown that a spec sets (flow 0 until solved)


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
class AuditOptions:
    """The optional ``[audit]`` table: product targets for the shortcut (``products``, specs of
    kind mole_fraction, keyed ``audit.distillate.NAME``), its reflux (``reflux_ratio`` L/D, or
    ``reflux_factor`` times the minimum reflux ratio; at most one) and flag ``thresholds``
    (keys :data:`AUDIT_THRESHOLD_KEYS`)."""

    products: tuple[Spec, ...] = ()
    reflux_ratio: float | None = None
    reflux_factor: float | None = None
    thresholds: Mapping[str, float] = field(default_factory=_frozen_mapping)


@dataclass(frozen=True)
class ColumnSection:
    """One column of a network: its ``name``, the column itself (stages numbered from its own
    top, pressures, efficiencies, side draws, heaters, reflux temperature) and its own specs
    (``[columns.specs]``, the single-column vocabulary)."""

    name: str
    column: Column
    specs: tuple[Spec, ...] = ()


@dataclass(frozen=True)
class ConnectionExchanger:
    """A cooler (``duty`` < 0) or heater (> 0) on a connection: a fixed ``duty`` [W], a fixed
    ``return_temperature`` [K], or neither (a spec sets it)."""

    kind: str  # "cooling" | "heating"
    duty: float | None = None
    return_temperature: float | None = None

    @property
    def is_free(self) -> bool:
        return self.duty is None and self.return_temperature is None


@dataclass(frozen=True)
class Connection:
    """A stream from a stage's liquid or vapor to a stage of the same or another column. Its
    size is one of: ``flow`` (a fixed rate, mol/s), ``fraction`` (of the phase leaving the
    stage for its neighbours), ``free`` (a rate a spec sets), or neither (all of that phase).
    ``from_product`` is set when the file names a column's product (``"distillate"``,
    ``"bottoms"``) instead of a stage and phase: the distillate leaves stage 1 in its vapor
    slot (``phase`` "vapor"), which on a total condenser holds the liquid distillate."""

    name: str
    from_column: str
    from_stage: int  # 1-based, of from_column
    phase: str  # "liquid" | "vapor"
    to_column: str
    to_stage: int
    flow: float | None = None
    fraction: float | None = None
    free: bool = False
    exchanger: ConnectionExchanger | None = None
    key: str = ""  # where it came from in the file: "connections[1]"
    from_product: str | None = None  # "distillate" | "bottoms" when the file names the product

    @property
    def takes_all(self) -> bool:
        return self.flow is None and self.fraction is None and not self.free


@dataclass(frozen=True)
class HeatLink:
    """``from_column``'s condenser heats ``to_column``'s reboiler: the two duties are equal and
    opposite (one equation, one degree of freedom less)."""

    name: str
    from_column: str
    to_column: str
    key: str = ""


@dataclass(frozen=True)
class NetworkSpec:
    """A spec of the top-level ``[[specs]]`` list of a network. ``kind`` is one of
    :data:`NETWORK_SPEC_KINDS`, ``value`` SI; ``equipment`` the name it is on as written after
    ``on`` (a connection, ``COLUMN.distillate``, ``COLUMN.condenser``, a side draw, a column);
    ``column`` the column it belongs to (None for a connection), ``stage`` for a stage
    temperature, ``component`` for a mole fraction or recovery."""

    kind: str
    value: float
    equipment: str
    column: str | None = None
    stage: int | None = None
    component: str | None = None
    key: str = ""


@dataclass(frozen=True)
class Network:
    """Several columns and what joins them: ``columns`` in file order, ``connections``,
    ``heat_links``, ``feed_columns`` (the column of each of Case.feeds, in order) and the
    network ``specs`` (the top-level [[specs]] list; each column's own are in its section)."""

    columns: tuple[ColumnSection, ...]
    connections: tuple[Connection, ...] = ()
    heat_links: tuple[HeatLink, ...] = ()
    feed_columns: tuple[str, ...] = ()
    specs: tuple[NetworkSpec, ...] = ()

    def section(self, name: str) -> ColumnSection:
        for section in self.columns:
            if section.name == name:
                return section
        raise KeyError(name)


@dataclass(frozen=True)
class StandardUncertainty:
    """The standard uncertainty (one standard deviation, SI) of one input of the case, from the
    optional ``[uncertainty]`` table. ``key`` names the input as the sensitivities do
    (``column.efficiency``, ``thermo.nrtl.A.B.term_over_temperature.ij``,
    ``feeds[1].temperature``, ``thermo.vapor_pressure_shift.A``); ``written`` is where the file
    states it, for messages."""

    key: str
    value: float
    written: str = ""


@dataclass(frozen=True)
class Case:
    title: str
    component_names: tuple[str, ...]
    component_data: Mapping[str, ComponentData]  # only the user-defined ones
    thermo: ThermoOptions
    column: Column | None  # None for a network case (see ``network``)
    feeds: tuple[Feed, ...]
    specs: tuple[Spec, ...]
    check: Mapping[str, float] = field(default_factory=_frozen_mapping)  # tolerances
    display: Mapping[str, str] = field(default_factory=_frozen_mapping)  # screen units
    audit: AuditOptions | None = None  # the optional [audit] table
    sizing: SizingOptions | None = None  # the optional [sizing] table (sizing_table.py)
    source_file: str = ""
    raw: Mapping[str, object] = field(default_factory=_frozen_mapping)  # the TOML as read
    # Added by the parser: notes that are not errors, e.g. a [components.data] entry that
    # components.names does not list (it is checked, then left out of component_data).
    warnings: tuple[str, ...] = ()
    # A case of several columns ([[columns]], [[connections]], [[heat_links]]); None for the
    # single-column form, whose [column] is ``column``. Feed stages then count in their column.
    network: Network | None = None
    # The optional [uncertainty] table: standard uncertainties of inputs (uncertainty_table.py).
    uncertainties: tuple[StandardUncertainty, ...] = ()

    @property
    def component_count(self) -> int:
        return len(self.component_names)

    def feed_stage_pressure(self, index: int = 0) -> float:
        """The pressure (Pa) of the stage feed ``index`` enters (in its own column)."""
        feed = self.feeds[index]
        column = self.column if self.network is None else self.network.section(self.network.feed_columns[index]).column
        return float(column.pressures[feed.stage - 1])

    @property
    def stage_pressures(self) -> tuple[float, ...]:
        """Every stage's pressure (Pa): the column's, or every column's of a network in order."""
        if self.network is None:
            return self.column.pressures
        return tuple(p for section in self.network.columns for p in section.column.pressures)
