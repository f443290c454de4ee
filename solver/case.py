"""The case: a TOML case file read, checked and converted into a frozen :class:`Case` in SI units.

Every error is a :class:`~solver.errors.CaseError` that names the file, the key path
(``feeds[0].composition``), the value and what was expected. Unknown keys are errors with a
"did you mean" suggestion. The file format is described in DESIGN.md and README.md.

Keys accepted (a plain number takes the default unit: K, Pa, mol/s, W, J/mol, kg/mol, m**3/mol):

- ``title``; ``[components]`` ``names`` (unique, stored lower-case), ``data.NAME`` with
  ``molar_mass``, ``critical_temperature``, ``critical_pressure``, ``vapor_pressure``, ``source``
  (required), ``normal_boiling_point``, ``ideal_gas_cp``, ``heat_of_vaporization``,
  ``liquid_molar_volume``. A correlation is ``{form, coefficients..., T_min, T_max}``: antoine
  (A, B, C, base 10|"e", pressure_unit, temperature_unit), dippr101 (A, B, C, D, E, units),
  polynomial (coefficients, units), dippr107 (A-E, units), watson (value, at, exponent),
  dippr106 (A-E, units = value unit only), dippr105 (A-D, units; a molar density), constant
  (value); ``units = "VALUE_UNIT, TEMPERATURE_UNIT"``.
- ``[thermo]`` ``liquid`` (ideal|wilson|nrtl|uniquac), ``vapor`` (ideal), ``enthalpy``
  (rigorous|cmo); pairs ``[thermo.MODEL.I.J]`` with ``a, b, e, f`` ([ij, ji]), NRTL ``alpha``,
  ``alpha_T``, energy forms ``dg`` (NRTL), ``dlambda`` (Wilson), ``du`` (UNIQUAC), ``source``;
  ``[thermo.wilson_volumes]`` NAME = volume; ``[thermo.uniquac_structure]`` NAME = {r, q}.
- ``[column]`` ``stages``, ``condenser`` (total|partial|none), ``reboiler`` (partial|none),
  ``pressure`` (a value, or {top, drop_per_stage}, or {profile}), ``efficiency`` (a number, a
  list, or {default, "STAGE" = value}), ``[[column.side_draws]]`` {stage, phase, flow, name},
  ``[[column.heaters]]`` {stage, duty}.
- ``[[feeds]]`` ``stage``, ``flow``, ``composition``, ``basis`` (mole|mass), ``normalize``,
  ``temperature`` or ``vapor_fraction``, ``pressure``, ``name``.
- ``[specs]`` ``reflux_ratio``, ``boilup_ratio``, ``distillate_rate``, ``bottoms_rate``,
  ``condenser_duty`` (< 0), ``reboiler_duty``, ``distillate``/``bottoms`` = {NAME = x},
  ``recovery`` = {NAME = {distillate|bottoms = r}}, ``stage_temperature`` = {stage, value} (or a
  list of them), ``reflux_temperature`` / ``reflux_subcooling`` (column settings, not specs).
- ``[check]`` ``tolerances`` = {duty_rel, composition_abs, temperature_abs, flow_rel};
  ``[display]`` {temperature, pressure, flow, duty} units.
- ``[audit]`` (optional, read by ``traystack audit`` and ``traystack shortcut``): what the shortcut
  designs for where the specs do not say -- ``distillate``/``bottoms`` = {NAME = x} (product mole
  fractions), ``reflux_ratio`` or ``reflux_factor`` (times the minimum reflux, > 1) -- and
  ``thresholds`` = {KEY = value} over the audit's defaults (keys :data:`AUDIT_THRESHOLD_KEYS`).
- ``[sizing]`` (optional, read by ``traystack size``, and by ``run`` and ``audit`` when present):
  the column internals and their design inputs, read by :mod:`solver.case_sizing`.
"""

from __future__ import annotations

import difflib
import math
import os
import re
import tomllib
from dataclasses import dataclass, field, replace
from types import MappingProxyType
from typing import Any, Callable, Mapping, NoReturn

from solver.case_sizing import SizingOptions, read_sizing_table
from solver.errors import CaseError
from solver.units import SI_UNITS, UnitParseError, temperature_scale, to_si, unit_factor

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
    audit: AuditOptions | None = None  # the optional [audit] table
    sizing: SizingOptions | None = None  # the optional [sizing] table (solver.case_sizing)
    source_file: str = ""
    raw: Mapping[str, object] = field(default_factory=_frozen_mapping)  # the TOML as read
    # Added by the parser: notes that are not errors, e.g. a [components.data] entry that
    # components.names does not list (it is checked, then left out of component_data).
    warnings: tuple[str, ...] = ()

    @property
    def component_count(self) -> int:
        return len(self.component_names)


# =======================================================================================
# Reading a case file
# =======================================================================================

#: Molar gas constant, J/(mol K): exact in the SI since 2019 (CODATA 2018).
GAS_CONSTANT = 8.314462618
#: More stages than this is taken as a typing error, not a column.
MAX_STAGES = 2000
#: A case file is a few kilobytes; anything above this is not one.
MAX_FILE_BYTES = 2_000_000
#: How far the fractions of a composition may add up away from 1 (without normalize = true).
COMPOSITION_TOLERANCE = 1e-6
#: Exponent of the Watson (1943) latent-heat relation when none is given
#: (K. M. Watson, Ind. Eng. Chem. 35 (1943) 398).
WATSON_EXPONENT = 0.38
#: Screen units when [display] does not say otherwise (DESIGN.md).
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
_AUDIT_KEYS = ("distillate", "bottoms", "reflux_ratio", "reflux_factor", "thresholds")

_TOP_KEYS = ("title", "components", "thermo", "column", "feeds", "specs", "check", "display", "audit", "sizing")
_COMPONENT_DATA_KEYS = (
    "molar_mass",
    "critical_temperature",
    "critical_pressure",
    "normal_boiling_point",
    "vapor_pressure",
    "ideal_gas_cp",
    "heat_of_vaporization",
    "liquid_molar_volume",
    "source",
)
#: property -> (kind of its value, forms allowed for it)
_PROPERTIES = {
    "vapor_pressure": ("pressure", ("antoine", "dippr101")),
    "ideal_gas_cp": ("molar_heat_capacity", ("polynomial", "dippr107", "constant")),
    "heat_of_vaporization": ("molar_energy", ("watson", "dippr106", "polynomial", "constant")),
    "liquid_molar_volume": ("molar_volume", ("dippr105", "polynomial", "constant")),
}
#: form -> (required keys, optional keys) besides form, T_min and T_max
_FORM_KEYS = {
    "antoine": (("A", "B", "C"), ("base", "pressure_unit", "temperature_unit")),
    "dippr101": (("A", "B"), ("C", "D", "E", "units")),
    "polynomial": (("coefficients",), ("units",)),
    "dippr107": (("A", "B", "C"), ("D", "E", "units")),
    "watson": (("value", "at"), ("exponent",)),
    "dippr106": (("A", "B"), ("C", "D", "E", "units")),
    "dippr105": (("A", "B", "C", "D"), ("units",)),
    "constant": (("value",), ()),
}
_LIQUID_MODELS = ("ideal", "wilson", "nrtl", "uniquac")
_ACTIVITY_MODELS = ("wilson", "nrtl", "uniquac")
#: model -> the key of its energy form
_ENERGY_FORM_KEY = {"nrtl": "dg", "wilson": "dlambda", "uniquac": "du"}
_PAIR_KEYS = {
    "nrtl": ("a", "b", "e", "f", "alpha", "alpha_T", "dg", "source"),
    "wilson": ("a", "b", "e", "f", "dlambda", "source"),
    "uniquac": ("a", "b", "e", "f", "du", "source"),
}
_THERMO_KEYS = ("liquid", "vapor", "enthalpy", "nrtl", "wilson", "uniquac", "wilson_volumes", "uniquac_structure")
_COLUMN_KEYS = ("stages", "condenser", "reboiler", "pressure", "efficiency", "side_draws", "heaters")
_FEED_KEYS = ("stage", "flow", "composition", "basis", "normalize", "temperature", "vapor_fraction", "pressure", "name")
_SPEC_KEYS = (
    "reflux_ratio",
    "boilup_ratio",
    "distillate_rate",
    "bottoms_rate",
    "condenser_duty",
    "reboiler_duty",
    "distillate",
    "bottoms",
    "recovery",
    "stage_temperature",
    "reflux_temperature",
    "reflux_subcooling",
)
_PRODUCTS = ("distillate", "bottoms")

_QUANTITY_EXAMPLES = {
    "temperature": "a temperature such as '65 degC' or 338.15 (a plain number is K)",
    "temperature_difference": "a temperature difference such as '5 K' (a plain number is K)",
    "pressure": "a pressure such as '101.325 kPa' or '1.5 bar' (a plain number is Pa)",
    "molar_flow": "a molar flow such as '100 kmol/h' (a plain number is mol/s)",
    "power": "a power such as '-2.5 MW' or '800 kW' (a plain number is W)",
    "molar_energy": "a molar energy such as '-250 cal/mol' or '35 kJ/mol' (a plain number is J/mol)",
    "molar_mass": "a molar mass such as '0.1 kg/mol' or '100 g/mol' (a plain number is kg/mol)",
    "molar_volume": "a molar volume such as '40.7 cm**3/mol' (a plain number is m**3/mol)",
    "molar_density": "a molar density such as '12 kmol/m**3' (a plain number is mol/m**3)",
    "molar_heat_capacity": "a molar heat capacity such as '75 J/mol/K' (a plain number is J/mol/K)",
    "inverse_temperature": "a number in 1/K such as 0.001 or '0.001 1/K'",
    "dimensionless": "a number such as 0.7 or '70 %'",
}
_BARE_KEY = re.compile(r"[A-Za-z0-9_-]+")
_STAGE_KEY = re.compile(r"[0-9]{1,6}")


# ---------------------------------------------------------------------------------------
# Public entry points
# ---------------------------------------------------------------------------------------


def load_case(path: str | os.PathLike) -> Case:
    """Read the TOML case file at ``path`` into a validated, frozen :class:`Case` (SI units).

    Raises :class:`CaseError` naming the file for a missing file, a directory, a file that is
    not UTF-8 text, broken TOML (with line and column) and every invalid value."""
    if not isinstance(path, (str, os.PathLike)):
        raise CaseError("a case file path is needed", value=path, expected="a path to a .toml file")
    file = os.fspath(path)
    if isinstance(file, bytes):
        file = os.fsdecode(file)
    where = _At(file)
    try:
        if os.path.isdir(file):
            where.fail("is a directory, not a case file", expected="a path to a .toml file")
        with open(file, "rb") as handle:
            content = handle.read(MAX_FILE_BYTES + 1)
    except FileNotFoundError:
        where.fail("file not found")
    except IsADirectoryError:
        where.fail("is a directory, not a case file", expected="a path to a .toml file")
    except PermissionError:
        where.fail("no permission to read the file")
    except (OSError, ValueError) as exc:
        where.fail(f"cannot read the file ({getattr(exc, 'strerror', None) or exc})")
    if len(content) > MAX_FILE_BYTES:
        where.fail(f"the file is larger than {MAX_FILE_BYTES} bytes; a case file is a few kilobytes")
    try:
        text = content.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        line = content[: exc.start].count(b"\n") + 1
        column = exc.start - (content.rfind(b"\n", 0, exc.start) + 1) + 1
        where.fail(
            f"the file is not UTF-8 text (byte 0x{content[exc.start]:02x} at line {line}, column {column})",
            expected="a TOML file saved as UTF-8",
        )
    return loads_case(text, source_file=file)


def loads_case(text: str, source_file: str = "<string>") -> Case:
    """Read TOML ``text`` into a :class:`Case`; ``source_file`` is the name used in messages."""
    where = _At(str(source_file))
    if not isinstance(text, str):
        where.fail("case text must be a string", value=type(text).__name__)
    try:
        data = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        where.fail(f"not valid TOML: {exc}", expected="a TOML file (see DESIGN.md for the case-file format)")
    except RecursionError:
        where.fail("not a case file: values are nested too deeply")
    return parse_case(data, source_file=source_file)


def parse_case(data: Mapping[str, Any], source_file: str = "<string>") -> Case:
    """Check the parsed TOML ``data`` (a dict as :func:`tomllib.loads` returns it) and convert
    it to a frozen :class:`Case` in SI units. Every error is a :class:`CaseError` that names
    ``source_file``, the key path, the value and what was expected."""
    where = _At(str(source_file))
    try:
        return _parse(data, where)
    except RecursionError:
        where.fail("not a case file: values are nested too deeply")


def molar_mass_of(name: str) -> float:
    """Molar mass in kg/mol of the CoolProp fluid ``name``, matched case-insensitively against
    CoolProp's fluid names and their aliases (``AbstractState("HEOS", name).molar_mass()``).
    Raises :class:`CaseError` (without a file) when CoolProp has no such fluid."""
    if not isinstance(name, str):
        raise CaseError("a component name is needed", value=name)
    from solver.fluids import name_index, coolprop_name

    try:
        fluid = coolprop_name(name)
        names = name_index()[0]
    except Exception as exc:  # CoolProp not importable or not answering
        raise CaseError(f"CoolProp is not usable here ({exc})") from None
    if fluid is None:
        close = difflib.get_close_matches(name.strip().lower(), list(names), n=3, cutoff=0.7)
        hint = f" (did you mean {', '.join(repr(names[c]) for c in close)}?)" if close else ""
        raise CaseError(f"{name!r} is not a CoolProp fluid{hint}", value=name, expected="a CoolProp fluid name")
    try:
        from CoolProp.CoolProp import AbstractState

        molar_mass = float(AbstractState("HEOS", fluid).molar_mass())
    except Exception as exc:  # CoolProp reports its failures as ValueError or RuntimeError
        raise CaseError(f"CoolProp cannot give the molar mass of {fluid!r} ({exc})", value=name) from None
    return molar_mass


# ---------------------------------------------------------------------------------------
# Where a value sits in the file, and reading single values
# ---------------------------------------------------------------------------------------


@dataclass(frozen=True)
class _At:
    """A place in the case file (file name and key path), for error messages."""

    file: str
    key: str = ""

    def child(self, name: object) -> _At:
        text = str(name)
        if not _BARE_KEY.fullmatch(text):
            text = '"' + text.replace("\\", "\\\\").replace('"', '\\"') + '"'
        return _At(self.file, f"{self.key}.{text}" if self.key else text)

    def item(self, index: int) -> _At:
        return _At(self.file, f"{self.key}[{index}]")

    def fail(self, problem: str, value: Any = None, expected: str | None = None) -> NoReturn:
        raise CaseError(problem, file=self.file, key=self.key or None, value=_shown(value), expected=expected)


def _shown(value: Any) -> Any:
    """The value for a message; very long values are cut short."""
    try:
        text = repr(value)
    except Exception:
        return "<unprintable value>"
    return value if len(text) <= 120 else text[:100] + "..."


def _kind_name(value: Any) -> str:
    if isinstance(value, bool):
        return "true/false"
    if isinstance(value, Mapping):
        return "a table"
    if isinstance(value, (list, tuple)):
        return "a list"
    if isinstance(value, str):
        return "a string"
    if isinstance(value, (int, float)):
        return "a number"
    return type(value).__name__


def _table(value: Any, at: _At, expected: str = "a table") -> Mapping:
    if not isinstance(value, Mapping):
        at.fail(f"must be a table, not {_kind_name(value)}", value, expected)
    return value


def _keys(table: Mapping, at: _At, allowed: tuple[str, ...], required: tuple[str, ...] = ()) -> None:
    """Unknown keys are errors with a suggestion; required keys must be present."""
    for name in table:
        if name not in allowed:
            text = str(name)
            close = difflib.get_close_matches(text, allowed, n=1, cutoff=0.6)
            if not close:
                close = [a for a in allowed if a.lower() == text.lower()]
            hint = f"; did you mean {close[0]!r}?" if close else ""
            at.child(text).fail(f"unknown key{hint}", name, "one of: " + ", ".join(allowed))
    for name in required:
        if name not in table:
            at.child(name).fail("missing", expected=f"a value for {name!r}")


def _range_text(minimum, maximum, above, below, unit: str) -> str:
    parts = []
    suffix = f" {unit}" if unit else ""
    if above is not None:
        parts.append(f"> {above:g}{suffix}")
    if minimum is not None:
        parts.append(f">= {minimum:g}{suffix}")
    if below is not None:
        parts.append(f"< {below:g}{suffix}")
    if maximum is not None:
        parts.append(f"<= {maximum:g}{suffix}")
    return "a value " + " and ".join(parts)


def _check_range(number: float, value: Any, at: _At, minimum, maximum, above, below, unit: str = "") -> float:
    if (
        (minimum is not None and number < minimum)
        or (maximum is not None and number > maximum)
        or (above is not None and number <= above)
        or (below is not None and number >= below)
    ):
        shown = f"{number:g} {unit}".strip()
        problem = "out of range" if value is None or isinstance(value, (int, float)) else f"out of range ({shown})"
        at.fail(problem, value, _range_text(minimum, maximum, above, below, unit))
    return number


def _real(value: Any, at: _At, *, minimum=None, maximum=None, above=None, below=None) -> float:
    """A plain number (int or float, not a boolean), finite."""
    if isinstance(value, bool) or not isinstance(value, (int, float)):
        at.fail(f"must be a number, not {_kind_name(value)}", value, "a number")
    try:
        number = float(value)
    except OverflowError:
        at.fail("the number is too large", value, "a number")
    if not math.isfinite(number):
        at.fail("not a finite number", value, "a finite number")
    return _check_range(number, value, at, minimum, maximum, above, below)


def _quantity(value: Any, kind: str, at: _At, *, minimum=None, maximum=None, above=None, below=None) -> float:
    """A number in the SI unit of ``kind`` or a string with units, converted to SI."""
    try:
        number = to_si(value, kind)
    except UnitParseError as exc:
        at.fail(str(exc), value, _QUANTITY_EXAMPLES[kind])
    unit = "" if kind == "dimensionless" else SI_UNITS[kind].replace("delta_degC", "K")
    return _check_range(number, value, at, minimum, maximum, above, below, unit)


def _integer(value: Any, at: _At, *, minimum: int, maximum: int, what: str = "a whole number") -> int:
    if isinstance(value, bool) or not isinstance(value, int):
        hint = " written without a decimal point" if isinstance(value, float) else ""
        at.fail(f"must be a whole number{hint}, not {_kind_name(value)}", value, f"{what} from {minimum} to {maximum}")
    if not minimum <= value <= maximum:
        at.fail("out of range", value, f"{what} from {minimum} to {maximum}")
    return value


def _text(value: Any, at: _At, *, allow_empty: bool = True, max_length: int = 10_000) -> str:
    if not isinstance(value, str):
        at.fail(f"must be a string, not {_kind_name(value)}", value, "a string in quotes")
    if not allow_empty and not value.strip():
        at.fail("must not be empty", value, "a non-empty string")
    if len(value) > max_length:
        at.fail(f"too long ({len(value)} characters)", value, f"at most {max_length} characters")
    return value


def _choice(value: Any, at: _At, choices: tuple[str, ...]) -> str:
    expected = "one of: " + ", ".join(repr(c) for c in choices)
    if not isinstance(value, str):
        at.fail(f"must be a string, not {_kind_name(value)}", value, expected)
    word = value.strip().lower()
    if word not in choices:
        close = difflib.get_close_matches(word, choices, n=1, cutoff=0.6)
        hint = f"; did you mean {close[0]!r}?" if close else ""
        at.fail(f"not a known choice{hint}", value, expected)
    return word


def _boolean(value: Any, at: _At) -> bool:
    if not isinstance(value, bool):
        at.fail(f"must be true or false, not {_kind_name(value)}", value, "true or false")
    return value


def _list(value: Any, at: _At, *, length: int | None = None, min_length: int = 0, max_length: int = 10_000) -> list:
    if not isinstance(value, (list, tuple)):
        at.fail(f"must be a list, not {_kind_name(value)}", value, "a list in brackets [...]")
    if length is not None and len(value) != length:
        at.fail(f"must have {length} entries, not {len(value)}", value, f"a list of {length} values")
    if len(value) < min_length:
        at.fail(f"must have at least {min_length} entries", value, f"a list of at least {min_length} values")
    if len(value) > max_length:
        at.fail(f"too many entries ({len(value)})", value, f"at most {max_length} entries")
    return list(value)


def _pair(value: Any, at: _At, read: Callable[[Any, _At], float]) -> tuple[float, float]:
    """A 2-list [ij, ji] read entry by entry."""
    items = _list(value, at, length=2)
    return read(items[0], at.item(0)), read(items[1], at.item(1))


def _component_name(value: Any, at: _At) -> str:
    """A component name as written in components.names, as its lower-case canonical form."""
    name = _text(value, at, allow_empty=False, max_length=100)
    if name != name.strip() or any(ord(c) < 32 or c == "\x7f" for c in name) or "&" in name:
        at.fail("not a usable component name", value, "a single fluid name without spaces around it or '&'")
    return name.lower()


def _component(written: Any, names: tuple[str, ...], at: _At) -> str:
    """A key naming one of the case's components (case-insensitive) -> canonical name."""
    if isinstance(written, str) and written.strip().lower() in names:
        return written.strip().lower()
    close = difflib.get_close_matches(str(written).lower(), names, n=1, cutoff=0.6)
    hint = f"; did you mean {close[0]!r}?" if close else ""
    at.fail(f"not a component of this case{hint}", written, "one of components.names: " + ", ".join(names))


# ---------------------------------------------------------------------------------------
# The case, section by section
# ---------------------------------------------------------------------------------------


def _parse(data: Any, at: _At) -> Case:
    data = _table(data, at, "a case: a TOML document with [components], [column] and [[feeds]]")
    _keys(data, at, _TOP_KEYS, required=("components", "column", "feeds"))
    title = _text(data.get("title", ""), at.child("title"), max_length=500)
    names, component_data, warnings = _read_components(data["components"], at.child("components"))
    thermo = _read_thermo(data.get("thermo", {}), names, at.child("thermo"))
    column = _read_column(data["column"], at.child("column"))
    feeds = _read_feeds(data["feeds"], names, component_data, column, at.child("feeds"))
    specs, reflux_temperature, reflux_subcooling = _read_specs(data.get("specs", {}), names, column, at.child("specs"))
    column = replace(column, reflux_temperature=reflux_temperature, reflux_subcooling=reflux_subcooling)
    check = _read_check(data.get("check", {}), at.child("check"))
    display = _read_display(data.get("display", {}), at.child("display"))
    audit = _read_audit(data["audit"], names, at.child("audit")) if "audit" in data else None
    return Case(
        title=title,
        component_names=names,
        component_data=MappingProxyType(component_data),
        thermo=thermo,
        column=column,
        feeds=feeds,
        specs=specs,
        check=MappingProxyType(check),
        display=MappingProxyType(display),
        audit=audit,
        sizing=read_sizing_table(data["sizing"], names, at.child("sizing")) if "sizing" in data else None,
        source_file=at.file,
        raw=MappingProxyType(_plain(data)),
        warnings=tuple(warnings),
    )


def _plain(value: Any) -> Any:
    """A plain copy (dicts and lists) of parsed TOML data."""
    if isinstance(value, Mapping):
        return {str(k): _plain(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_plain(v) for v in value]
    return value


# --- [components] ----------------------------------------------------------------------


def _read_components(value: Any, at: _At) -> tuple[tuple[str, ...], dict[str, ComponentData], list[str]]:
    table = _table(value, at)
    _keys(table, at, ("names", "data"), required=("names",))
    names_at = at.child("names")
    written = _list(table["names"], names_at, min_length=1, max_length=200)
    names: list[str] = []
    for index, item in enumerate(written):
        name = _component_name(item, names_at.item(index))
        if name in names:
            names_at.item(index).fail("listed twice (names are compared without regard to case)", item)
        names.append(name)
    data_at = at.child("data")
    data_table = _table(table.get("data", {}), data_at)
    component_data: dict[str, ComponentData] = {}
    warnings: list[str] = []
    seen: set[str] = set()
    for written_name, entry in data_table.items():
        entry_at = data_at.child(written_name)
        name = _component_name(written_name, entry_at)
        if name in seen:
            entry_at.fail("defined twice (names are compared without regard to case)", written_name)
        seen.add(name)
        data = _read_component_data(name, entry, entry_at)
        if name in names:
            component_data[name] = data
        else:
            warnings.append(
                f"{entry_at.file}: {entry_at.key}: {written_name!r} is defined but not listed in components.names;"
                " it was checked and is not used"
            )
    return tuple(names), component_data, warnings


def _read_component_data(name: str, value: Any, at: _At) -> ComponentData:
    table = _table(value, at)
    required = ("molar_mass", "critical_temperature", "critical_pressure", "vapor_pressure", "source")
    _keys(table, at, _COMPONENT_DATA_KEYS, required=required)
    molar_mass = _quantity(table["molar_mass"], "molar_mass", at.child("molar_mass"), above=0.0)
    if molar_mass > 10.0:
        at.child("molar_mass").fail(
            f"{molar_mass:g} kg/mol is not a molar mass of a distillable component (a plain number is kg/mol)",
            table["molar_mass"],
            "a molar mass such as '100 g/mol' or 0.1",
        )
    critical_temperature = _quantity(
        table["critical_temperature"], "temperature", at.child("critical_temperature"), above=0.0
    )
    critical_pressure = _quantity(table["critical_pressure"], "pressure", at.child("critical_pressure"), above=0.0)
    normal_boiling_point = None
    if "normal_boiling_point" in table:
        normal_boiling_point = _quantity(
            table["normal_boiling_point"],
            "temperature",
            at.child("normal_boiling_point"),
            above=0.0,
            below=critical_temperature,
        )
    correlations = {
        prop: _read_correlation(table[prop], prop, critical_temperature, at.child(prop))
        for prop in _PROPERTIES
        if prop in table
    }
    source = _text(table["source"], at.child("source"), allow_empty=False)
    return ComponentData(
        name=name,
        molar_mass=molar_mass,
        critical_temperature=critical_temperature,
        critical_pressure=critical_pressure,
        vapor_pressure=correlations["vapor_pressure"],
        ideal_gas_cp=correlations.get("ideal_gas_cp"),
        heat_of_vaporization=correlations.get("heat_of_vaporization"),
        liquid_molar_volume=correlations.get("liquid_molar_volume"),
        normal_boiling_point=normal_boiling_point,
        source=source,
    )


def _read_units(value: Any, kind: str, at: _At, *, with_temperature: bool = True) -> tuple[float, float, float]:
    """``units = "VALUEUNIT, TUNIT"`` -> (value_factor, temperature_slope, temperature_intercept)."""
    if value is None:
        return 1.0, 1.0, 0.0
    text = _text(value, at, allow_empty=False, max_length=200)
    parts = [part.strip() for part in text.split(",")]
    expected = "'VALUE_UNIT, TEMPERATURE_UNIT' such as 'J/kmol/K, K'" if with_temperature else "a unit such as 'J/kmol'"
    if len(parts) > (2 if with_temperature else 1) or not all(parts):
        if len(parts) == 2 and all(parts) and not with_temperature:
            problem = "this form uses the reduced temperature T/Tc, so it takes no temperature unit"
        else:
            problem = "cannot split into a value unit and a temperature unit"
        at.fail(problem, value, expected)
    try:
        factor = unit_factor(parts[0], kind)
        slope, intercept = temperature_scale(parts[1]) if len(parts) == 2 else (1.0, 0.0)
    except UnitParseError as exc:
        at.fail(str(exc), value, expected)
    return factor, slope, intercept


def _read_correlation(value: Any, prop: str, critical_temperature: float, at: _At) -> Correlation:
    """One pure-component correlation table; see :class:`Correlation` for what is stored.

    For ``liquid_molar_volume`` the DIPPR 105 form gives a molar *density*
    (rho = A / B^(1 + (1 - T/C)^D)); its value_factor is SI (mol/m**3) per density unit, and
    the molar volume is 1/rho. Watson and DIPPR 106 use the reduced temperature T/Tc with the
    component's critical_temperature."""
    kind, forms = _PROPERTIES[prop]
    table = _table(value, at, "a table such as { form = \"" + forms[0] + "\", ... }")
    if "form" not in table:
        at.child("form").fail("missing", expected="one of: " + ", ".join(repr(f) for f in forms))
    form = _choice(table["form"], at.child("form"), forms)
    required, optional = _FORM_KEYS[form]
    _keys(table, at, ("form",) + required + optional + ("T_min", "T_max"), required=required)

    def coefficient(name: str, default: float | None = None) -> float:
        if name not in table:
            return float(default)
        return _real(table[name], at.child(name))

    slope, intercept, factor, log_base = 1.0, 0.0, 1.0, None
    if form == "antoine":
        coefficients = {name: coefficient(name) for name in ("A", "B", "C")}
        base = table.get("base", 10)
        if isinstance(base, bool) or base not in (10, "10", "e"):
            at.child("base").fail("not a logarithm base this form knows", base, "10 or \"e\"")
        log_base = math.e if base == "e" else 10.0
        try:
            factor = unit_factor(table.get("pressure_unit", "Pa"), "pressure")
        except UnitParseError as exc:
            at.child("pressure_unit").fail(
                str(exc), table.get("pressure_unit"), "a pressure unit such as 'mmHg' or 'kPa'"
            )
        try:
            slope, intercept = temperature_scale(table.get("temperature_unit", "K"))
        except UnitParseError as exc:
            at.child("temperature_unit").fail(str(exc), table.get("temperature_unit"), "'K' or 'degC'")
    elif form in ("dippr101", "dippr106", "dippr107"):
        names = ("A", "B", "C", "D", "E")
        coefficients = {name: coefficient(name, 0.0) for name in names}
        factor, slope, intercept = _read_units(
            table.get("units"), kind, at.child("units"), with_temperature=form != "dippr106"
        )
        if form == "dippr107":
            if coefficients["C"] == 0.0:
                at.child("C").fail("must not be 0 (it divides in (C/T)/sinh(C/T))", table["C"], "a nonzero number")
            if coefficients["D"] != 0.0 and coefficients["E"] == 0.0:
                at.child("E").fail("must be given and nonzero when D is", table.get("E"), "a nonzero number")
    elif form == "dippr105":
        coefficients = {name: coefficient(name) for name in ("A", "B", "C", "D")}
        factor, slope, intercept = _read_units(table.get("units"), "molar_density", at.child("units"))
        if coefficients["B"] <= 0.0:
            at.child("B").fail("must be positive (it is raised to a power)", table["B"], "a number > 0")
        if coefficients["C"] == 0.0:
            at.child("C").fail("must not be 0 (it divides T)", table["C"], "a nonzero number")
    elif form == "polynomial":
        items = _list(table["coefficients"], at.child("coefficients"), min_length=1, max_length=20)
        coefficients = {f"c{k}": _real(item, at.child("coefficients").item(k)) for k, item in enumerate(items)}
        factor, slope, intercept = _read_units(table.get("units"), kind, at.child("units"))
    elif form == "watson":
        at_temperature = _quantity(
            table["at"], "temperature", at.child("at"), above=0.0, below=critical_temperature
        )
        coefficients = {
            "value": _quantity(table["value"], "molar_energy", at.child("value"), above=0.0),
            "at": at_temperature,
            "exponent": _real(table["exponent"], at.child("exponent")) if "exponent" in table else WATSON_EXPONENT,
        }
    else:  # constant
        coefficients = {"value": _quantity(table["value"], kind, at.child("value"), above=0.0)}

    T_min = _quantity(table["T_min"], "temperature", at.child("T_min"), above=0.0) if "T_min" in table else None
    T_max = _quantity(table["T_max"], "temperature", at.child("T_max"), above=0.0) if "T_max" in table else None
    if T_min is not None and T_max is not None and T_min >= T_max:
        at.child("T_max").fail(f"must be above T_min ({T_min:g} K)", table["T_max"], "T_max > T_min")
    return Correlation(
        form=form,
        coefficients=MappingProxyType(coefficients),
        temperature_slope=slope,
        temperature_intercept=intercept,
        value_factor=factor,
        log_base=log_base,
        T_min=T_min,
        T_max=T_max,
    )


# --- [thermo] --------------------------------------------------------------------------


def _read_thermo(value: Any, names: tuple[str, ...], at: _At) -> ThermoOptions:
    table = _table(value, at)
    _keys(table, at, _THERMO_KEYS)
    liquid = _choice(table.get("liquid", "ideal"), at.child("liquid"), _LIQUID_MODELS)
    vapor = _choice(table.get("vapor", "ideal"), at.child("vapor"), ("ideal",))
    enthalpy = _choice(table.get("enthalpy", "rigorous"), at.child("enthalpy"), ("rigorous", "cmo"))
    for model in _ACTIVITY_MODELS:
        if model in table and model != liquid:
            at.child(model).fail(f"not used: thermo.liquid is {liquid!r}", model, f"parameters for {liquid!r} only")
    for key, model in (("wilson_volumes", "wilson"), ("uniquac_structure", "uniquac")):
        if key in table and liquid != model:
            at.child(key).fail(f"not used: thermo.liquid is {liquid!r}", key, f"{key} only with liquid = {model!r}")

    wilson_volumes: dict[str, float] = {}
    if "wilson_volumes" in table:
        volumes_at = at.child("wilson_volumes")
        for written, volume in _table(table["wilson_volumes"], volumes_at).items():
            name = _component(written, names, volumes_at.child(written))
            if name in wilson_volumes:
                volumes_at.child(written).fail("given twice", written)
            wilson_volumes[name] = _read_liquid_volume(volume, volumes_at.child(written))

    uniquac_structure: dict[str, tuple[float, float]] = {}
    if liquid == "uniquac":
        structure_at = at.child("uniquac_structure")
        if "uniquac_structure" not in table:
            structure_at.fail(
                "missing: UNIQUAC needs r and q of every component", expected="NAME = { r = ..., q = ... }"
            )
        for written, entry in _table(table["uniquac_structure"], structure_at).items():
            entry_at = structure_at.child(written)
            name = _component(written, names, entry_at)
            if name in uniquac_structure:
                entry_at.fail("given twice", written)
            entry = _table(entry, entry_at, "{ r = ..., q = ... }")
            _keys(entry, entry_at, ("r", "q"), required=("r", "q"))
            uniquac_structure[name] = (
                _real(entry["r"], entry_at.child("r"), above=0.0),
                _real(entry["q"], entry_at.child("q"), above=0.0),
            )
        missing = [n for n in names if n not in uniquac_structure]
        if missing:
            structure_at.fail("r and q missing for " + ", ".join(missing), expected="NAME = { r = ..., q = ... }")

    pairs: list[BinaryParameters] = []
    if liquid in _ACTIVITY_MODELS and liquid in table:
        model_at = at.child(liquid)
        seen: dict[frozenset, str] = {}
        for first_written, inner in _table(table[liquid], model_at, "tables [thermo.MODEL.NAME1.NAME2]").items():
            first_at = model_at.child(first_written)
            first = _component(first_written, names, first_at)
            for second_written, parameters in _table(inner, first_at, "tables [thermo.MODEL.NAME1.NAME2]").items():
                pair_at = first_at.child(second_written)
                second = _component(second_written, names, pair_at)
                if first == second:
                    pair_at.fail("a pair needs two different components", second_written)
                pair_key = frozenset((first, second))
                if pair_key in seen:
                    pair_at.fail(f"pair given twice (also as {seen[pair_key]})", second_written, "each pair once")
                seen[pair_key] = pair_at.key
                pairs.append(_read_pair(liquid, first, second, parameters, wilson_volumes, pair_at, at))
    return ThermoOptions(
        liquid=liquid,
        vapor=vapor,
        enthalpy=enthalpy,
        pairs=tuple(pairs),
        uniquac_structure=MappingProxyType(uniquac_structure),
        wilson_volumes=MappingProxyType(wilson_volumes),
    )


def _read_liquid_volume(value: Any, at: _At) -> float:
    volume = _quantity(value, "molar_volume", at, above=0.0)
    if volume > 0.01:
        at.fail(
            f"{volume:g} m**3/mol is not a liquid molar volume (a plain number is m**3/mol)",
            value,
            "a molar volume such as '40.7 cm**3/mol'",
        )
    return volume


def _read_pair(
    model: str,
    first: str,
    second: str,
    value: Any,
    wilson_volumes: Mapping[str, float],
    at: _At,
    thermo_at: _At,
) -> BinaryParameters:
    """One [thermo.MODEL.I.J] table; conversions as documented in :class:`BinaryParameters`."""
    table = _table(value, at)
    allowed = _PAIR_KEYS[model]
    for key in table:
        other = [m for m, k in _ENERGY_FORM_KEY.items() if k == key and m != model]
        if other:
            at.child(key).fail(
                f"{key!r} is the energy form of {other[0].upper()}; {model} uses {_ENERGY_FORM_KEY[model]!r}",
                key,
                "one of: " + ", ".join(allowed),
            )
    _keys(table, at, allowed)
    dimensionless = lambda item, where: _quantity(item, "dimensionless", where)  # noqa: E731
    readers = {
        "a": dimensionless,
        "b": lambda item, where: _quantity(item, "temperature_difference", where),
        "e": dimensionless,
        "f": lambda item, where: _quantity(item, "inverse_temperature", where),
    }
    values = {
        name: _pair(table[name], at.child(name), read) if name in table else (0.0, 0.0)
        for name, read in readers.items()
    }
    energy_key = _ENERGY_FORM_KEY[model]
    energy_form: dict[str, object] = {}
    if energy_key in table:
        given = [name for name in readers if name in table]
        if given:
            at.child(given[0]).fail(
                f"cannot be combined with the energy form {energy_key!r}",
                table[given[0]],
                f"either {energy_key} or a/b/e/f",
            )
        energy_at = at.child(energy_key)
        energy = _pair(table[energy_key], energy_at, lambda item, where: _quantity(item, "molar_energy", where))
        energy_form[energy_key] = tuple(_plain(table[energy_key]))
        energy_form[energy_key + "_J_per_mol"] = energy
        if model == "nrtl":
            values["b"] = (energy[0] / GAS_CONSTANT, energy[1] / GAS_CONSTANT)
        elif model == "uniquac":
            values["b"] = (-energy[0] / GAS_CONSTANT, -energy[1] / GAS_CONSTANT)
        else:
            missing = [name for name in (first, second) if name not in wilson_volumes]
            if missing:
                thermo_at.child("wilson_volumes").fail(
                    f"the energy form (dlambda) of pair {first}.{second} needs the liquid molar volume of "
                    + " and ".join(repr(m) for m in missing),
                    expected="[thermo.wilson_volumes] NAME = \"40.7 cm**3/mol\"",
                )
            volume_i, volume_j = wilson_volumes[first], wilson_volumes[second]
            values["a"] = (math.log(volume_j / volume_i), math.log(volume_i / volume_j))
            values["b"] = (-energy[0] / GAS_CONSTANT, -energy[1] / GAS_CONSTANT)
            energy_form["liquid_molar_volumes_m3_per_mol"] = (volume_i, volume_j)

    alpha_c = alpha_d = 0.0
    if model == "nrtl":
        if "alpha" not in table:
            at.child("alpha").fail(
                "missing: NRTL needs the non-randomness alpha of every pair", expected="a number such as 0.3"
            )
        alpha_value = table["alpha"]
        alpha_at = at.child("alpha")
        if isinstance(alpha_value, (list, tuple)):
            alpha_ij, alpha_ji = _pair(alpha_value, alpha_at, dimensionless)
            if not math.isclose(alpha_ij, alpha_ji, rel_tol=1e-12, abs_tol=0.0):
                alpha_at.fail("alpha_ij and alpha_ji must be equal", alpha_value, "one number, or two equal numbers")
            alpha_c = alpha_ij
        else:
            alpha_c = dimensionless(alpha_value, alpha_at)
        if "alpha_T" in table:
            alpha_d = _quantity(table["alpha_T"], "inverse_temperature", at.child("alpha_T"))
    source = _text(table.get("source", ""), at.child("source"))
    return BinaryParameters(
        model=model,
        first=first,
        second=second,
        a=values["a"],
        b=values["b"],
        e=values["e"],
        f=values["f"],
        alpha_c=alpha_c,
        alpha_d=alpha_d,
        source=source,
        energy_form=MappingProxyType(energy_form),
    )


# --- [column] --------------------------------------------------------------------------


def _read_column(value: Any, at: _At) -> Column:
    """Stages are numbered from the top; condenser (if any) is stage 1, reboiler (if any)
    stage N. The efficiency of the condenser and reboiler is always 1 (they are equilibrium
    stages), whatever an efficiency list says for them."""
    table = _table(value, at)
    _keys(table, at, _COLUMN_KEYS, required=("stages", "condenser", "reboiler", "pressure"))
    condenser = _choice(table["condenser"], at.child("condenser"), ("total", "partial", "none"))
    reboiler = _choice(table["reboiler"], at.child("reboiler"), ("partial", "none"))
    fewest = 1 + (condenser != "none") + (reboiler != "none")
    stages_value = table["stages"]
    if isinstance(stages_value, int) and not isinstance(stages_value, bool) and stages_value > MAX_STAGES:
        at.child("stages").fail(
            f"more than {MAX_STAGES} stages is not a column this program is meant for", stages_value,
            f"a whole number from {fewest} to {MAX_STAGES}",
        )
    stages = _integer(stages_value, at.child("stages"), minimum=fewest, maximum=MAX_STAGES, what="a number of stages")
    pressures = _read_pressures(table["pressure"], stages, at.child("pressure"))
    efficiencies = _read_efficiencies(table.get("efficiency", 1.0), stages, condenser, reboiler, at.child("efficiency"))

    side_draws: list[SideDraw] = []
    draws_at = at.child("side_draws")
    for index, entry in enumerate(_list(table.get("side_draws", []), draws_at, max_length=MAX_STAGES)):
        entry_at = draws_at.item(index)
        entry = _table(entry, entry_at, "{ stage = ..., phase = \"liquid\", flow = ... }")
        _keys(entry, entry_at, ("stage", "phase", "flow", "name"), required=("stage", "phase", "flow"))
        name = _text(
            entry.get("name", f"side_draw_{index + 1}"), entry_at.child("name"), allow_empty=False, max_length=100
        )
        if any(d.name == name for d in side_draws):
            entry_at.child("name").fail("another side draw has this name", name, "a unique name")
        side_draws.append(
            SideDraw(
                stage=_integer(
                    entry["stage"], entry_at.child("stage"), minimum=1, maximum=stages, what="a stage number"
                ),
                phase=_choice(entry["phase"], entry_at.child("phase"), ("liquid", "vapor")),
                flow=_quantity(entry["flow"], "molar_flow", entry_at.child("flow"), above=0.0),
                name=name,
            )
        )

    stage_duties: list[StageDuty] = []
    heaters_at = at.child("heaters")
    for index, entry in enumerate(_list(table.get("heaters", []), heaters_at, max_length=MAX_STAGES)):
        entry_at = heaters_at.item(index)
        entry = _table(entry, entry_at, "{ stage = ..., duty = ... }")
        _keys(entry, entry_at, ("stage", "duty"), required=("stage", "duty"))
        stage = _integer(entry["stage"], entry_at.child("stage"), minimum=1, maximum=stages, what="a stage number")
        if (stage == 1 and condenser != "none") or (stage == stages and reboiler != "none"):
            where = "the condenser" if stage == 1 and condenser != "none" else "the reboiler"
            entry_at.child("stage").fail(
                f"stage {stage} is {where}; its duty is set in [specs] or solved for", entry["stage"],
                "a stage between the condenser and the reboiler",
            )
        if any(d.stage == stage for d in stage_duties):
            entry_at.child("stage").fail("another heater is on this stage", entry["stage"], "one heater per stage")
        stage_duties.append(StageDuty(stage=stage, duty=_quantity(entry["duty"], "power", entry_at.child("duty"))))

    return Column(
        stages=stages,
        condenser=condenser,
        reboiler=reboiler,
        pressures=pressures,
        efficiencies=efficiencies,
        side_draws=tuple(side_draws),
        stage_duties=tuple(stage_duties),
    )


def _read_pressures(value: Any, stages: int, at: _At) -> tuple[float, ...]:
    """pressure = {top, drop_per_stage} or {profile = [N values]} or a single pressure (= top,
    no drop). P_k = top + drop * (k - 1), stage 1 at the top."""
    if not isinstance(value, Mapping):
        top = _quantity(value, "pressure", at, above=0.0)
        return (top,) * stages
    _keys(value, at, ("top", "drop_per_stage", "profile"))
    if "profile" in value:
        for other in ("top", "drop_per_stage"):
            if other in value:
                at.child(other).fail("cannot be combined with pressure.profile", value[other], "either profile or top")
        profile_at = at.child("profile")
        items = _list(value["profile"], profile_at, length=stages)
        profile = tuple(_quantity(item, "pressure", profile_at.item(k), above=0.0) for k, item in enumerate(items))
        for k in range(1, stages):
            if profile[k] < profile[k - 1]:
                profile_at.item(k).fail(
                    "the pressure falls from one stage to the next going down (stage 1 is the top)",
                    items[k],
                    f"a value >= {profile[k - 1]:g} Pa",
                )
        return profile
    if "top" not in value:
        at.child("top").fail("missing", expected="pressure.top, or pressure.profile")
    top = _quantity(value["top"], "pressure", at.child("top"), above=0.0)
    drop = _quantity(value.get("drop_per_stage", 0.0), "pressure", at.child("drop_per_stage"), minimum=0.0)
    return tuple(top + drop * k for k in range(stages))


def _read_efficiencies(value: Any, stages: int, condenser: str, reboiler: str, at: _At) -> tuple[float, ...]:
    """Murphree vapor efficiency per stage: one number, a list of N numbers, or a table
    {default = 0.7, "5" = 0.5}; always 1 on the condenser and reboiler."""
    fixed = set()
    if condenser != "none":
        fixed.add(1)
    if reboiler != "none":
        fixed.add(stages)

    def efficiency(item: Any, where: _At) -> float:
        return _quantity(item, "dimensionless", where, above=0.0, maximum=1.0)

    if isinstance(value, Mapping):
        default = efficiency(value["default"], at.child("default")) if "default" in value else 1.0
        result = [default] * stages
        seen: set[int] = set()
        for key, item in value.items():
            if key == "default":
                continue
            key_at = at.child(key)
            if not isinstance(key, str) or not _STAGE_KEY.fullmatch(key):
                close = difflib.get_close_matches(str(key), ["default"], n=1, cutoff=0.6)
                hint = f"; did you mean {close[0]!r}?" if close else ""
                key_at.fail(f"unknown key{hint}", key, "'default' or a stage number in quotes, such as \"5\"")
            stage = int(key)
            if not 1 <= stage <= stages:
                key_at.fail("no such stage", key, f"a stage number from 1 to {stages}")
            if stage in seen:
                key_at.fail("stage given twice", key)
            if stage in fixed:
                key_at.fail(
                    f"stage {stage} is the {'condenser' if stage == 1 and condenser != 'none' else 'reboiler'},"
                    " an equilibrium stage (efficiency 1)",
                    key,
                    "a stage between the condenser and the reboiler",
                )
            seen.add(stage)
            result[stage - 1] = efficiency(item, key_at)
    elif isinstance(value, (list, tuple)):
        items = _list(value, at, length=stages)
        result = [efficiency(item, at.item(k)) for k, item in enumerate(items)]
    else:
        result = [efficiency(value, at)] * stages
    for stage in fixed:
        result[stage - 1] = 1.0
    return tuple(result)


# --- [[feeds]] -------------------------------------------------------------------------


def _read_feeds(
    value: Any, names: tuple[str, ...], component_data: Mapping[str, ComponentData], column: Column, at: _At
) -> tuple[Feed, ...]:
    if isinstance(value, Mapping):
        at.fail("must be a list of tables: write [[feeds]], not [feeds]", "a table", "[[feeds]] tables")
    items = _list(value, at, min_length=1, max_length=MAX_STAGES)
    feeds: list[Feed] = []
    for index, entry in enumerate(items):
        feed = _read_feed(entry, index, names, component_data, column, at.item(index))
        if any(f.name == feed.name for f in feeds):
            at.item(index).child("name").fail("another feed has this name", feed.name, "a unique name")
        feeds.append(feed)
    return tuple(feeds)


def _read_feed(
    value: Any,
    index: int,
    names: tuple[str, ...],
    component_data: Mapping[str, ComponentData],
    column: Column,
    at: _At,
) -> Feed:
    table = _table(value, at, "a [[feeds]] table")
    _keys(table, at, _FEED_KEYS, required=("stage", "flow", "composition"))
    stage = _integer(table["stage"], at.child("stage"), minimum=1, maximum=column.stages, what="a stage number")
    flow = _quantity(table["flow"], "molar_flow", at.child("flow"), above=0.0)
    basis = _choice(table.get("basis", "mole"), at.child("basis"), ("mole", "mass"))
    normalize = _boolean(table.get("normalize", False), at.child("normalize"))
    composition = _read_composition(table["composition"], names, normalize, at.child("composition"))
    if basis == "mass":
        composition = _mass_to_mole_fractions(composition, names, component_data, at.child("basis"))
    has_temperature, has_vapor_fraction = "temperature" in table, "vapor_fraction" in table
    if has_temperature == has_vapor_fraction:
        both = None
        if has_temperature:
            both = {"temperature": table["temperature"], "vapor_fraction": table["vapor_fraction"]}
        at.fail(
            "give exactly one of temperature and vapor_fraction" + (" (both given)" if has_temperature else ""),
            both,
            "temperature = \"65 degC\" or vapor_fraction = 0.0",
        )
    temperature = vapor_fraction = None
    if has_temperature:
        temperature = _quantity(table["temperature"], "temperature", at.child("temperature"), above=0.0)
    else:
        vapor_fraction = _quantity(
            table["vapor_fraction"], "dimensionless", at.child("vapor_fraction"), minimum=0.0, maximum=1.0
        )
    pressure = None
    if "pressure" in table:
        pressure = _quantity(table["pressure"], "pressure", at.child("pressure"), above=0.0)
    name = _text(table.get("name", f"feed_{index + 1}"), at.child("name"), allow_empty=False, max_length=100)
    return Feed(
        stage=stage,
        flow=flow,
        composition=composition,
        temperature=temperature,
        vapor_fraction=vapor_fraction,
        pressure=pressure,
        name=name,
    )


def _read_composition(value: Any, names: tuple[str, ...], normalize: bool, at: _At) -> tuple[float, ...]:
    """{name = fraction}; components not named are 0. The fractions must add up to 1 within
    :data:`COMPOSITION_TOLERANCE` unless ``normalize``; they are then scaled to add up to 1."""
    table = _table(value, at, "a table such as { methanol = 0.35, water = 0.65 }")
    fractions = dict.fromkeys(names, 0.0)
    seen: set[str] = set()
    for written, item in table.items():
        item_at = at.child(written)
        name = _component(written, names, item_at)
        if name in seen:
            item_at.fail("component given twice (names are compared without regard to case)", written)
        seen.add(name)
        if normalize:
            fractions[name] = _quantity(item, "dimensionless", item_at, minimum=0.0)
        else:
            fractions[name] = _quantity(item, "dimensionless", item_at, minimum=0.0, maximum=1.0)
    total = sum(fractions.values())
    if not math.isfinite(total) or total <= 0.0:
        at.fail("the fractions add up to zero", _plain(table), "fractions that add up to 1")
    if not normalize and abs(total - 1.0) > COMPOSITION_TOLERANCE:
        at.fail(
            f"the fractions add up to {total:.9g}, not 1 (write normalize = true in this feed to scale them)",
            _plain(table),
            f"fractions that add up to 1 within {COMPOSITION_TOLERANCE:g}",
        )
    return tuple(fractions[name] / total for name in names)


def _mass_to_mole_fractions(
    mass_fractions: tuple[float, ...], names: tuple[str, ...], component_data: Mapping[str, ComponentData], at: _At
) -> tuple[float, ...]:
    """x_i = (w_i / M_i) / sum_j (w_j / M_j); M from [components.data] or CoolProp."""
    moles = []
    for name, fraction in zip(names, mass_fractions):
        if fraction == 0.0:
            moles.append(0.0)
            continue
        if name in component_data:
            molar_mass = component_data[name].molar_mass
        else:
            try:
                molar_mass = molar_mass_of(name)
            except CaseError as exc:
                at.fail(
                    f"a mass basis needs the molar mass of {name!r}: {exc.problem}; define it under [components.data]",
                    "mass",
                    "basis = \"mole\", or components with known molar masses",
                )
        moles.append(fraction / molar_mass)
    total = sum(moles)
    return tuple(m / total for m in moles)


# --- [specs] ---------------------------------------------------------------------------


def _read_specs(
    value: Any, names: tuple[str, ...], column: Column, at: _At
) -> tuple[tuple[Spec, ...], float | None, float | None]:
    """The specifications in file order, and the reflux temperature / subcooling (which are
    column settings, not specs). Degrees of freedom are counted by the engine, not here."""
    table = _table(value, at)
    _keys(table, at, _SPEC_KEYS)
    specs: list[Spec] = []
    reflux_temperature = reflux_subcooling = None

    def needs(part: str, key: str) -> None:
        present = column.condenser != "none" if part == "condenser" else column.reboiler != "none"
        if not present:
            at.child(key).fail(
                f"this column has no {part} (column.{part} = 'none')", table[key], f"a column with a {part}"
            )

    for key, item in table.items():
        key_at = at.child(key)
        if key in ("reflux_ratio", "boilup_ratio"):
            needs("condenser" if key == "reflux_ratio" else "reboiler", key)
            specs.append(Spec(key, _quantity(item, "dimensionless", key_at, above=0.0), key=key_at.key))
        elif key in ("distillate_rate", "bottoms_rate"):
            specs.append(Spec(key, _quantity(item, "molar_flow", key_at, above=0.0), key=key_at.key))
        elif key == "condenser_duty":
            needs("condenser", key)
            duty = _quantity(item, "power", key_at)
            if duty >= 0.0:
                key_at.fail(
                    "the condenser duty is the heat added to the condenser, so it is negative", item,
                    "a negative power such as '-2.5 MW'",
                )
            specs.append(Spec(key, duty, key=key_at.key))
        elif key == "reboiler_duty":
            needs("reboiler", key)
            specs.append(Spec(key, _quantity(item, "power", key_at, above=0.0), key=key_at.key))
        elif key in _PRODUCTS:
            for written, fraction in _table(item, key_at, "a table such as { water = 0.995 }").items():
                fraction_at = key_at.child(written)
                name = _component(written, names, fraction_at)
                x = _quantity(fraction, "dimensionless", fraction_at, above=0.0, below=1.0)
                specs.append(Spec("mole_fraction", x, component=name, product=key, key=fraction_at.key))
        elif key == "recovery":
            for written, products in _table(item, key_at, "{ NAME = { distillate = 0.99 } }").items():
                component_at = key_at.child(written)
                name = _component(written, names, component_at)
                products = _table(products, component_at, "a table such as { distillate = 0.99 }")
                _keys(products, component_at, _PRODUCTS)
                for product, fraction in products.items():
                    product_at = component_at.child(product)
                    recovery = _quantity(fraction, "dimensionless", product_at, above=0.0, maximum=1.0)
                    specs.append(Spec("recovery", recovery, component=name, product=product, key=product_at.key))
        elif key == "stage_temperature":
            entries = [(item, key_at)] if isinstance(item, Mapping) else [
                (entry, key_at.item(k)) for k, entry in enumerate(_list(item, key_at, min_length=1))
            ]
            for entry, entry_at in entries:
                entry = _table(entry, entry_at, "{ stage = 5, value = \"80 degC\" }")
                _keys(entry, entry_at, ("stage", "value"), required=("stage", "value"))
                stage = _integer(
                    entry["stage"], entry_at.child("stage"), minimum=1, maximum=column.stages, what="a stage number"
                )
                temperature = _quantity(entry["value"], "temperature", entry_at.child("value"), above=0.0)
                specs.append(Spec("stage_temperature", temperature, stage=stage, key=entry_at.key))
        else:  # reflux_temperature, reflux_subcooling
            if column.condenser != "total":
                key_at.fail(
                    f"needs a total condenser (column.condenser is {column.condenser!r})", item, "condenser = 'total'"
                )
            if key == "reflux_temperature":
                reflux_temperature = _quantity(item, "temperature", key_at, above=0.0)
            else:
                reflux_subcooling = _quantity(item, "temperature_difference", key_at, minimum=0.0)
            if "reflux_temperature" in table and "reflux_subcooling" in table:
                at.child("reflux_subcooling").fail(
                    "cannot be combined with reflux_temperature", table["reflux_subcooling"], "one of the two"
                )
    return tuple(specs), reflux_temperature, reflux_subcooling


# --- [check] and [display] -------------------------------------------------------------


def _read_check(value: Any, at: _At) -> dict[str, float]:
    table = _table(value, at)
    _keys(table, at, ("tolerances",))
    tolerances_at = at.child("tolerances")
    tolerances = _table(table.get("tolerances", {}), tolerances_at)
    _keys(tolerances, tolerances_at, TOLERANCE_KEYS)
    return {
        key: _quantity(item, "temperature_difference" if key == "temperature_abs" else "dimensionless",
                       tolerances_at.child(key), above=0.0)
        for key, item in tolerances.items()
    }


def _read_display(value: Any, at: _At) -> dict[str, str]:
    """Screen units, each checked to be a unit of its kind; missing ones take the defaults."""
    table = _table(value, at)
    _keys(table, at, tuple(DEFAULT_DISPLAY))
    kinds = {"pressure": "pressure", "flow": "molar_flow", "duty": "power"}
    display = dict(DEFAULT_DISPLAY)
    for key, item in table.items():
        key_at = at.child(key)
        unit = _text(item, key_at, allow_empty=False, max_length=100).strip()
        try:
            if key == "temperature":
                temperature_scale(unit)
            else:
                unit_factor(unit, kinds[key])
        except UnitParseError as exc:
            key_at.fail(str(exc), item, f"a unit such as {DEFAULT_DISPLAY[key]!r}")
        display[key] = unit
    return display


# --- [audit] ---------------------------------------------------------------------------


def _read_audit(value: Any, names: tuple[str, ...], at: _At) -> AuditOptions:
    """Product targets, reflux and thresholds for the audit's shortcut (see
    :class:`AuditOptions`)."""
    table = _table(value, at, "a table such as { distillate = { methanol = 0.99 }, reflux_factor = 1.3 }")
    _keys(table, at, _AUDIT_KEYS)
    products: list[Spec] = []
    for product in _PRODUCTS:
        if product not in table:
            continue
        product_at = at.child(product)
        for written, fraction in _table(table[product], product_at, "a table such as { water = 0.995 }").items():
            fraction_at = product_at.child(written)
            name = _component(written, names, fraction_at)
            x = _quantity(fraction, "dimensionless", fraction_at, above=0.0, below=1.0)
            products.append(Spec("mole_fraction", x, component=name, product=product, key=fraction_at.key))
    if len(names) == 2:
        for product in _PRODUCTS:
            given = [spec for spec in products if spec.product == product]
            if len(given) > 1:
                at.child(product).fail(
                    "a binary product has one composition: give one of its mole fractions",
                    table[product], "one entry such as { water = 0.995 }",
                )
    reflux_ratio = reflux_factor = None
    if "reflux_ratio" in table and "reflux_factor" in table:
        at.child("reflux_factor").fail("cannot be combined with reflux_ratio", table["reflux_factor"], "one of the two")
    if "reflux_ratio" in table:
        reflux_ratio = _quantity(table["reflux_ratio"], "dimensionless", at.child("reflux_ratio"), above=0.0)
    if "reflux_factor" in table:
        reflux_factor = _quantity(table["reflux_factor"], "dimensionless", at.child("reflux_factor"), above=1.0)
    thresholds_at = at.child("thresholds")
    written = _table(table.get("thresholds", {}), thresholds_at, "a table such as { cmo_deviation = 0.05 }")
    _keys(written, thresholds_at, AUDIT_THRESHOLD_KEYS)
    thresholds = {}
    for key, item in written.items():
        if key == "serious_factor":
            thresholds[key] = _quantity(item, "dimensionless", thresholds_at.child(key), above=1.0)
        elif key in ("stage_difference", "pinch_shift"):
            thresholds[key] = _real(item, thresholds_at.child(key), minimum=0.0, maximum=MAX_STAGES)
        else:
            thresholds[key] = _quantity(item, "dimensionless", thresholds_at.child(key), above=0.0)
    return AuditOptions(tuple(products), reflux_ratio, reflux_factor, MappingProxyType(thresholds))
