"""The case: a TOML case file read, checked and converted into a frozen :class:`Case` in SI units.

Every error is a :class:`~solver.errors.CaseError` that names the file, the key path
(``feeds[0].composition``), the value and what was expected. Unknown keys are errors with a
"did you mean" suggestion. The file format is described in README.md ("Case files").

Modules: :mod:`~solver.case.model` (the frozen dataclasses), :mod:`~solver.case.fields` (where
a value sits, and the readers of single values and flat tables), one module per table of the
file (``components_table``, ``thermo_table``, ``column_table``, ``feeds_table``,
``specs_table``, ``options_table`` for [check], [display] and [audit], ``network_tables`` for
a network of columns) and
:mod:`~solver.case.reader` (``load_case``, ``loads_case``, ``parse_case``); :mod:`~solver.case.edits`
(``with_spec``, ``with_feed``, ``with_stages``, ``with_column``: a new case with changed values,
read again by the same reader).

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
  (rigorous|cmo); pairs ``[thermo.MODEL.I.J]`` with ``constant_term``, ``term_over_temperature``,
  ``term_in_ln_temperature``, ``term_times_temperature`` ([ij, ji]), NRTL ``alpha`` (a number or
  {value, slope, reference_temperature}), energy forms ``dg`` (NRTL), ``dlambda`` (Wilson),
  ``du`` (UNIQUAC), ``source``;
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
- ``[uncertainty]`` (optional, single column): standard uncertainties of inputs: ``efficiency``,
  ``vapor_pressure`` = {NAME = relative}, ``[uncertainty.MODEL.I.J]`` with the pair's own term
  keys or energy form and ``alpha``, ``[[uncertainty.feeds]]`` {``feed`` (number or name),
  ``composition`` = {NAME = x}, ``temperature``} (``uncertainty_table.py``).
- a network in place of ``[column]``: ``[[columns]]`` (``name`` and the [column] keys, with
  ``[columns.specs]`` in the [specs] vocabulary), ``[[connections]]`` {name, from = {column,
  stage, phase}, to = {column, stage}, flow (a rate or "free") or fraction, cooling or heating =
  {duty (or "free") or return_temperature}}, ``[[heat_links]]`` {name, from = "A.condenser", to =
  "B.reboiler"}, feeds with ``column`` (a make-ups ``flow`` may be "free": a spec sets it), and a top-level ``[[specs]]`` list {on, stage, one of
  flow, fraction, duty, return_temperature, temperature, mole_fraction, recovery, reflux_ratio,
  boilup_ratio}; read into :class:`Network` on ``Case.network`` (``Case.column`` is then None).
- ``[check]`` ``tolerances`` = {duty_rel, composition_abs, temperature_abs, flow_rel};
  ``[display]`` {temperature, pressure, flow, duty} units.
- ``[audit]`` (optional, read by ``traystack audit`` and ``traystack shortcut``): what the shortcut
  designs for where the specs do not say -- ``distillate``/``bottoms`` = {NAME = x} (product mole
  fractions), ``reflux_ratio`` or ``reflux_factor`` (times the minimum reflux, > 1) -- and
  ``thresholds`` = {KEY = value} over the audit's defaults (keys :data:`AUDIT_THRESHOLD_KEYS`).
- ``[sizing]`` (optional, read by ``traystack size``, and by ``run`` and ``audit`` when present):
  the column internals and their design inputs (:mod:`~solver.case.sizing_table`).
"""

from __future__ import annotations

from solver.case.column_table import MAX_STAGES
from solver.case.feeds_table import COMPOSITION_TOLERANCE, molar_mass_of
from solver.case.model import (
    AUDIT_THRESHOLD_KEYS,
    DEFAULT_DISPLAY,
    SPEC_KINDS,
    TOLERANCE_KEYS,
    AuditOptions,
    BinaryParameters,
    Case,
    Column,
    ColumnSection,
    Connection,
    ConnectionExchanger,
    Feed,
    HeatLink,
    NETWORK_SPEC_KINDS,
    Network,
    NetworkSpec,
    SideDraw,
    Spec,
    StageDuty,
    StandardUncertainty,
    ThermoOptions,
)
from solver.case.reader import MAX_FILE_BYTES, load_case, loads_case, parse_case
from solver.case.edits import with_column, with_feed, with_spec, with_stages
from solver.case.sizing_table import ComponentHydraulicData, DowncomerRule, PackingData, SizingOptions
from solver.thermo.data import WATSON_EXPONENT, ComponentData, Correlation

__all__ = [
    "AUDIT_THRESHOLD_KEYS",
    "COMPOSITION_TOLERANCE",
    "DEFAULT_DISPLAY",
    "GAS_CONSTANT",
    "MAX_FILE_BYTES",
    "MAX_STAGES",
    "SPEC_KINDS",
    "TOLERANCE_KEYS",
    "WATSON_EXPONENT",
    "AuditOptions",
    "BinaryParameters",
    "Case",
    "Column",
    "ColumnSection",
    "ComponentHydraulicData",
    "DowncomerRule",
    "PackingData",
    "SizingOptions",
    "ComponentData",
    "Connection",
    "ConnectionExchanger",
    "Correlation",
    "Feed",
    "HeatLink",
    "NETWORK_SPEC_KINDS",
    "Network",
    "NetworkSpec",
    "SideDraw",
    "Spec",
    "StageDuty",
    "StandardUncertainty",
    "ThermoOptions",
    "load_case",
    "loads_case",
    "molar_mass_of",
    "parse_case",
    "with_column",
    "with_feed",
    "with_spec",
    "with_stages",
]


def __getattr__(name: str):
    if name == "GAS_CONSTANT":  # scipy.constants on first use: a case that is refused never waits for it
        from scipy.constants import R

        return R
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
