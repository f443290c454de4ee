"""What a person reads about a column solution: screen tables (rich) and ``summary.md``.

Everything here is built from a :class:`~solver.results.Result` alone (its ``case`` holds the
normalized case), shown in the display units of the case's ``[display]`` table or of the
``--units`` option. Values inside stay SI; only the text is converted.

Cautions are collected by :func:`cautions`: the general one of DESIGN.md, plus those that
follow from the result (not converged, elevated pressure with ideal-vapor K-values, stages
near a component's critical temperature, the ``cmo`` enthalpy model, case warnings, and the
flags an audit adds under ``result.extra["audit"]["flags"]``).
"""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import Mapping, Sequence

import numpy as np
from rich.table import Table

from . import __version__
from .case import DEFAULT_DISPLAY
from .errors import CaseError
from .results import Result, write_atomic
from .units import UnitParseError, temperature_scale, unit_factor

__all__ = [
    "CAUTION",
    "audit_markdown",
    "audit_tables",
    "basis_rows",
    "cmo_rows",
    "flag_rows",
    "shortcut_rows",
    "shortcut_tables",
    "side_by_side_rows",
    "DisplayUnits",
    "display_units",
    "cautions",
    "spec_rows",
    "summary_tables",
    "summary_markdown",
    "write_summary",
]

#: The general caution (DESIGN.md), shown under every result.
CAUTION = (
    "Engineering estimate from models and data of limited accuracy. It does not replace review by a "
    "qualified engineer, vendor data, or the codes and standards that apply where the column is built "
    "(pressure equipment, relief, hazardous areas, flammable/toxic service, thermal stability of bottoms)."
)

#: Above this pressure ideal-vapor K-values deserve a check against data (a rule of thumb,
#: common practice: vapor fugacity coefficients of light hydrocarbons fall below about 0.9).
ELEVATED_PRESSURE = 5e5  # Pa
#: Reduced temperature above which a component's vapor pressure and latent heat change fast and
#: the ideal-vapor, ideal-gas-enthalpy picture loses accuracy (common practice).
NEAR_CRITICAL_REDUCED_TEMPERATURE = 0.85
#: A component counts on a stage when its liquid mole fraction is at least this.
PRESENT_FRACTION = 0.01

SI_DISPLAY = {"temperature": "K", "pressure": "Pa", "flow": "mol/s", "duty": "W"}
_TEMPERATURE_LABELS = {"degC": "°C", "degF": "°F", "degR": "°R", "K": "K", "kelvin": "K"}
_KINDS = {"pressure": "pressure", "flow": "molar_flow", "duty": "power"}


# =======================================================================================
# Display units
# =======================================================================================


@dataclass(frozen=True)
class DisplayUnits:
    """Screen units and their conversion from SI. Build with :func:`display_units`."""

    temperature: str = "degC"
    pressure: str = "bar"
    flow: str = "kmol/h"
    duty: str = "kW"
    _temperature_scale: tuple[float, float] = field(default=(1.0, -273.15), repr=False)
    _factors: tuple[float, float, float] = field(default=(1e5, 1.0 / 3.6, 1e3), repr=False)  # SI per unit

    @property
    def temperature_label(self) -> str:
        return _TEMPERATURE_LABELS.get(self.temperature, self.temperature)

    def T(self, kelvin: float | np.ndarray) -> float | np.ndarray:
        """Temperature [K] in the display unit."""
        slope, intercept = self._temperature_scale
        value = slope * np.asarray(kelvin, dtype=float) + intercept
        return value if value.ndim else float(value)

    def P(self, pascal: float | np.ndarray) -> float | np.ndarray:
        """Pressure [Pa] in the display unit."""
        return pascal / self._factors[0]

    def F(self, mol_per_s: float | np.ndarray) -> float | np.ndarray:
        """Molar flow [mol/s] in the display unit."""
        return mol_per_s / self._factors[1]

    def Q(self, watt: float | np.ndarray) -> float | np.ndarray:
        """Duty [W] in the display unit."""
        return watt / self._factors[2]


def display_units(display: Mapping[str, str] | None = None, override: str | None = None) -> DisplayUnits:
    """Screen units from a case's ``[display]`` table, then ``override``: the ``--units`` text,
    either ``"si"`` (K, Pa, mol/s, W) or ``"temperature=degF,pressure=psi,flow=lbmol/h,duty=kW"``
    (any subset). Raises :class:`CaseError` naming the option, key and unit for a bad one."""
    chosen = dict(DEFAULT_DISPLAY)
    chosen.update({key: value for key, value in (display or {}).items() if key in DEFAULT_DISPLAY})
    origin = dict.fromkeys(chosen, "display")
    if override is not None:
        text = override.strip()
        if text.lower() == "si":
            chosen.update(SI_DISPLAY)
            origin = dict.fromkeys(chosen, "--units")
        else:
            for item in filter(None, (part.strip() for part in text.split(","))):
                key, sign, unit = item.partition("=")
                key, unit = key.strip(), unit.strip()
                if not sign or key not in DEFAULT_DISPLAY or not unit:
                    raise CaseError(
                        "cannot read the screen units",
                        key="--units",
                        value=item,
                        expected="'si' or KEY=UNIT pairs separated by commas, KEY one of "
                        + ", ".join(DEFAULT_DISPLAY)
                        + " (e.g. temperature=degF,pressure=psi,duty=Btu/h)",
                    )
                chosen[key] = unit
                origin[key] = "--units"
    try:
        scale = temperature_scale(chosen["temperature"])
    except UnitParseError as exc:
        raise CaseError(str(exc), key=_where(origin, "temperature"), value=chosen["temperature"]) from None
    factors = []
    for key in ("pressure", "flow", "duty"):
        try:
            factors.append(unit_factor(chosen[key], _KINDS[key]))
        except UnitParseError as exc:
            raise CaseError(str(exc), key=_where(origin, key), value=chosen[key]) from None
    return DisplayUnits(
        temperature=chosen["temperature"], pressure=chosen["pressure"], flow=chosen["flow"], duty=chosen["duty"],
        _temperature_scale=scale, _factors=tuple(factors),
    )


def _where(origin: Mapping[str, str], key: str) -> str:
    return f"--units {key}" if origin[key] == "--units" else f"display.{key}"


# =======================================================================================
# Specifications and cautions, as text
# =======================================================================================


def spec_rows(result: Result, units: DisplayUnits) -> list[tuple[str, str]]:
    """(key as written in the case file, value in display units) for every specification and
    for the condenser settings that are not degrees of freedom."""
    rows = []
    for spec in result.case.get("specs", []):
        kind, value = spec["kind"], spec["value"]
        if kind in ("distillate_rate", "bottoms_rate"):
            text = f"{units.F(value):.6g} {units.flow}"
        elif kind in ("condenser_duty", "reboiler_duty"):
            text = f"{units.Q(value):.6g} {units.duty}"
        elif kind == "stage_temperature":
            text = f"{units.T(value):.2f} {units.temperature_label} on stage {spec['stage']}"
        elif kind == "mole_fraction":
            text = f"x {spec['component']} = {value:.6g} in the {spec['product']}"
        elif kind == "recovery":
            text = f"{value:.6g} of the feed's {spec['component']} to the {spec['product']}"
        else:
            text = f"{value:.6g}"
        rows.append((spec.get("key") or kind, text))
    column = result.case.get("column", {})
    if column.get("reflux_temperature") is not None:
        rows.append(("specs.reflux_temperature", f"{units.T(column['reflux_temperature']):.2f} {units.temperature_label}"))
    if column.get("reflux_subcooling") is not None:
        rows.append(("specs.reflux_subcooling", f"{column['reflux_subcooling']:.4g} K below the bubble point"))
    return rows


def cautions(result: Result) -> list[str]:
    """The cautions that apply to this result, most specific first, the general one last."""
    found: list[str] = []
    if not result.converged:
        found.append(f"NOT CONVERGED: {result.message}. Do not use these numbers.")
    bottom = float(np.max(result.pressure))
    if bottom > ELEVATED_PRESSURE:
        found.append(
            f"Column pressure up to {bottom / 1e5:.3g} bar: K-values assume an ideal vapor (no fugacity "
            "coefficients, no Poynting factor) and the vapor enthalpy is the ideal-gas one; above about "
            f"{ELEVATED_PRESSURE / 1e5:.0f} bar check them against data."
        )
    found.extend(_near_critical(result))
    if result.enthalpy_model == "cmo":
        found.append(
            "Enthalpy model 'cmo': equal molar latent heats and no sensible heat, so the internal flows are "
            "constant molar overflow by construction; the duties are estimates on that basis."
        )
    found.extend(str(warning) for warning in result.case.get("warnings", []))
    for flag in (result.extra.get("audit") or {}).get("flags", []):
        found.append(f"[{flag.get('severity', 'note')}] {flag.get('code', '')}: {flag.get('message', '')}".strip())
    found.append(CAUTION)
    return found


def _near_critical(result: Result) -> list[str]:
    critical = np.array(
        [component.get("critical_temperature", np.inf) for component in result.thermo.get("components", [])], dtype=float
    )
    if critical.shape != (len(result.components),):
        return []
    reduced = result.temperature[:, None] / critical[None, :]
    reduced = np.where(result.x >= PRESENT_FRACTION, reduced, 0.0)
    notes = []
    for i in np.flatnonzero(reduced.max(axis=0) > NEAR_CRITICAL_REDUCED_TEMPERATURE):
        stage = int(np.argmax(reduced[:, i]))
        notes.append(
            f"{result.components[i]} reaches T/Tc = {reduced[stage, i]:.3f} on stage {stage + 1}: near its critical "
            "point ideal-vapor K-values and the latent-heat-based liquid enthalpy lose accuracy."
        )
    return notes


# =======================================================================================
# Screen tables
# =======================================================================================


def _stage_label(result: Result, j: int) -> str:
    role = result.roles[j]
    return f"{j + 1}" if role == "tray" else f"{j + 1} {role.split('_')[0]}"


def summary_tables(result: Result, units: DisplayUnits) -> list[Table]:
    """Overview (status, ratios, duties, closures), specifications, products and the stage
    table, in display units."""
    overview = Table(title=result.title, header_style="bold")
    overview.add_column("quantity")
    overview.add_column("value", justify="right")
    overview.add_row("converged", "yes" if result.converged else "NO")
    overview.add_row("Newton iterations", str(result.iterations))
    overview.add_row("largest scaled residual", f"{result.residual_norm:.2e}")
    if result.reflux_ratio is not None:
        overview.add_row("reflux ratio L/D", f"{result.reflux_ratio:.4f}")
    if result.boilup_ratio is not None:
        overview.add_row("boilup ratio V/B", f"{result.boilup_ratio:.4f}")
    if result.condenser_duty is not None:
        overview.add_row(f"condenser duty / {units.duty}", f"{units.Q(result.condenser_duty):.4g}")
    if result.reboiler_duty is not None:
        overview.add_row(f"reboiler duty / {units.duty}", f"{units.Q(result.reboiler_duty):.4g}")
    balances = result.balances()
    overview.add_row("component closure", f"{balances['component_closure_max']:.1e}")
    overview.add_row("energy closure", f"{balances['energy_closure_rel']:.1e}")

    specs = Table(title="specifications", header_style="bold")
    specs.add_column("key")
    specs.add_column("value")
    for key, text in spec_rows(result, units):
        specs.add_row(key, text)

    products = Table(title="products", header_style="bold")
    products.add_column("product")
    products.add_column(f"flow / {units.flow}", justify="right")
    products.add_column(f"T / {units.temperature_label}", justify="right")
    for name in result.components:
        products.add_column(f"x {name}", justify="right")
    for name, product in result.products().items():
        products.add_row(
            name.replace("_", " "),
            f"{units.F(product['flow']):.5g}",
            f"{units.T(product['T']):.2f}",
            *[f"{value:.6f}" for value in product["composition"]],
        )

    stages = Table(title="stages", header_style="bold")
    for column in ("stage", f"T / {units.temperature_label}", f"P / {units.pressure}", f"L / {units.flow}", f"V / {units.flow}"):
        stages.add_column(column, justify="right")
    for name in result.components:
        stages.add_column(f"x {name}", justify="right")
    for j, record in enumerate(result.stage_records()):
        stages.add_row(
            _stage_label(result, j),
            f"{units.T(record['T']):.2f}",
            f"{units.P(record['P']):.5g}",
            f"{units.F(record['L']):.4g}",
            f"{units.F(record['V']):.4g}",
            *[f"{value:.5f}" for value in record["x"]],
        )
    return [overview, specs, products, stages]


# =======================================================================================
# summary.md
# =======================================================================================


def _markdown_table(header: Sequence[str], rows: Sequence[Sequence[str]], right: Sequence[bool] | None = None) -> list[str]:
    right = right or [True] * len(header)
    cells = lambda row: "| " + " | ".join(str(cell).replace("|", "\\|") for cell in row) + " |"  # noqa: E731
    return [cells(header), "| " + " | ".join("---:" if r else "---" for r in right) + " |", *[cells(row) for row in rows]]


# =======================================================================================
# Shortcut and audit tables (from the plain records of result.extra)
# =======================================================================================


def _fmt(value, digits: str = ".4g") -> str:
    if value is None:
        return "-"
    if isinstance(value, float) and not np.isfinite(value):
        return "-"
    return format(value, digits) if isinstance(value, (int, float)) else str(value)


def _pinch_text(pinch: Mapping | None) -> str:
    if not pinch:
        return "-"
    text = f"{pinch['ratio']:.4g} ({pinch['pinch']}"
    if pinch["pinch"] == "tangent":
        text += f", {pinch['section']} at x = {pinch['x']:.3f}; feed pinch {pinch['feed_pinch_ratio']:.4g}"
    return text + ")"


def _method_label(design: Mapping) -> str:
    return "FUGK" if design["method"] == "Fenske-Underwood-Gilliland-Kirkbride" else design["method"]


def _is_binary(shortcut: Mapping) -> bool:
    return "x_feed" in shortcut


def _light_fraction(record: Mapping, product: str, components: Sequence[str], light: str) -> str:
    composition = record.get(f"{product}_composition") or {}
    return _fmt(composition.get(light), ".6f") if composition else "-"


def shortcut_rows(shortcut: Mapping, units: DisplayUnits) -> tuple[list[str], list[list[str]]]:
    """(header, rows) of the shortcut designs alone: McCabe-Thiele beside Ponchon-Savarit for
    a binary, Fenske-Underwood-Gilliland-Kirkbride otherwise."""
    F, Q = units.F, units.Q
    designs = [shortcut]
    if _is_binary(shortcut) and shortcut.get("ponchon_savarit"):
        designs.append(shortcut["ponchon_savarit"])
    header = ["quantity"] + [_method_label(d) for d in designs]
    rows = [
        ["stages (condenser and reboiler included)"] + [str(d["stages"]) for d in designs],
        ["feed stage"] + [str(d["feed_stage"]) for d in designs],
        ["equilibrium stages (fractional)"] + [_fmt(d.get("equilibrium_stages"), ".3f") for d in designs],
        ["minimum stages (total reflux)"] + [_fmt(d["minimum_stages"], ".3f") for d in designs],
        ["reflux ratio L/D"] + [_fmt(d["reflux_ratio"]) for d in designs],
    ]
    if _is_binary(shortcut):
        rows.append(["minimum reflux ratio (pinch)"] + [_pinch_text(d["minimum_reflux"]) for d in designs])
        rows.append(["feed q"] + [_fmt(d["q"]) for d in designs])
        rows.append([f"x {shortcut['light']} distillate / bottoms"]
                    + [f"{d['x_distillate']:.6f} / {d['x_bottoms']:.6f}" for d in designs])
    else:
        rows.append(["minimum reflux ratio (Underwood)"] + [_fmt(shortcut["minimum_reflux"])])
        rows.append(["keys (light / heavy)"] + [f"{shortcut['light_key']} / {shortcut['heavy_key']}"])
        rows.append(["distributing components"] + [", ".join(shortcut["distributing_components"])])
        rows.append(["feed q"] + [_fmt(shortcut["q"])])
    rows += [
        [f"distillate / {units.flow}"] + [_fmt(F(d["distillate_flow"]), ".5g") for d in designs],
        [f"bottoms / {units.flow}"] + [_fmt(F(d["bottoms_flow"]), ".5g") for d in designs],
        [f"condenser duty / {units.duty}"] + [_fmt(Q(d["condenser_duty"]), ".5g") for d in designs],
        [f"reboiler duty / {units.duty}"] + [_fmt(Q(d["reboiler_duty"]), ".5g") for d in designs],
    ]
    return header, rows


def basis_rows(shortcut: Mapping) -> list[list[str]]:
    """[what, value, where it came from] for the shortcut's targets and reflux."""
    basis = shortcut.get("basis") or {}
    sources = basis.get("sources", {})
    rows = [[f"target {k + 1}", text, sources.get(f"target {k + 1}", "")] for k, text in enumerate(basis.get("targets", []))]
    if basis.get("reflux_factor"):
        reflux = f"{basis['reflux_factor']:.4g} x minimum reflux ratio"
    else:
        reflux = f"reflux ratio {basis['reflux_ratio']:.6g}" if basis.get("reflux_ratio") else "-"
    rows.append(["reflux", reflux, sources.get("reflux", "")])
    return rows


#: What the columns of the side-by-side table are.
SIDE_BY_SIDE_NOTE = (
    "Rigorous columns: 'at design' has the shortcut's stage count, feed stage, reflux ratio and distillate rate; "
    "'R needed' its stage count and feed stage with the product targets as specs; 'N needed' its reflux ratio and "
    "distillate rate with the stage count searched and the feed stage moved; 'the case' is the case as specified. "
    "Impurity ratio k is the delivered impurity of target k over the specified one (above 1: the target is missed). "
    "'R for exactly its stages' is the shortcut's own reflux ratio for its integer stage count."
)


def side_by_side_rows(result: Result, units: DisplayUnits) -> tuple[list[str], list[list[str]]]:
    """(header, rows): the shortcut designs beside the rigorous columns of the audit -- at the
    shortcut's design, the reflux needed at its stage count, the stages needed at its reflux,
    and the case as specified when it was solved."""
    shortcut, audit = result.extra["shortcut"], result.extra["audit"]
    F, Q = units.F, units.Q
    components = list(result.components)
    binary = _is_binary(shortcut)
    designs = [shortcut] + ([shortcut["ponchon_savarit"]] if binary and shortcut.get("ponchon_savarit") else [])
    runs = [("rigorous: at design", audit.get("rigorous_at_shortcut_design")),
            ("rigorous: R needed", audit.get("reflux_at_shortcut_stages")),
            ("rigorous: N needed", (audit.get("stages_at_shortcut_reflux") or {}).get("run"))]
    if audit.get("case_as_specified"):
        runs.append(("rigorous: the case", audit["case_as_specified"]))
    header = ["quantity"] + [_method_label(d) for d in designs] + [label for label, _ in runs]

    def run_value(run, key, convert=None, digits=".4g"):
        if not run or not run.get("converged"):
            return "failed" if run else "-"
        value = run.get(key)
        return _fmt(convert(value) if (convert and value is not None) else value, digits)

    rows = [
        ["stages"] + [str(d["stages"]) for d in designs] + [str(run["stages"]) if run else "-" for _, run in runs],
        ["feed stage"] + [str(d["feed_stage"]) for d in designs] + [str(run["feed_stage"]) if run else "-" for _, run in runs],
        ["reflux ratio L/D"] + [_fmt(d["reflux_ratio"]) for d in designs] + [run_value(run, "reflux_ratio") for _, run in runs],
    ]
    if audit.get("shortcut_reflux_at_shortcut_stages") is not None:
        rows.append(["R for exactly its stages", _fmt(audit["shortcut_reflux_at_shortcut_stages"])]
                    + [""] * (len(header) - 2))
    rows.append(["minimum reflux ratio"] + [_pinch_text(d["minimum_reflux"]) if binary else _fmt(d["minimum_reflux"])
                                            for d in designs] + [""] * len(runs))
    rows.append([f"distillate / {units.flow}"] + [_fmt(F(d["distillate_flow"]), ".5g") for d in designs]
                + [run_value(run, "distillate_flow", F, ".5g") for _, run in runs])
    targets = audit.get("basis", {}).get("targets", [])
    for k, target in enumerate(targets):
        rows.append([f"impurity ratio {k + 1}"] + ["1" for _ in designs]
                    + [_fmt(run["impurity_ratios"][k], ".3f") if run and run.get("converged") and run.get("impurity_ratios")
                       else ("failed" if run else "-") for _, run in runs])
    if binary:
        light = shortcut["light"]
        rows.append([f"x {light} distillate"] + [f"{d['x_distillate']:.6f}" for d in designs]
                    + [run_value(run, "distillate_composition") if not run or not run.get("converged")
                       else _light_fraction(run, "distillate", components, light) for _, run in runs])
        rows.append([f"x {light} bottoms"] + [f"{d['x_bottoms']:.6f}" for d in designs]
                    + [run_value(run, "bottoms_composition") if not run or not run.get("converged")
                       else _light_fraction(run, "bottoms", components, light) for _, run in runs])
    rows.append([f"condenser duty / {units.duty}"] + [_fmt(Q(d["condenser_duty"]), ".5g") for d in designs]
                + [run_value(run, "condenser_duty", Q, ".5g") for _, run in runs])
    rows.append([f"reboiler duty / {units.duty}"] + [_fmt(Q(d["reboiler_duty"]), ".5g") for d in designs]
                + [run_value(run, "reboiler_duty", Q, ".5g") for _, run in runs])
    return header, rows


def cmo_rows(audit: Mapping, units: DisplayUnits) -> tuple[list[str], list[list[str]]]:
    """(header, rows) of the stage-by-stage CMO audit."""
    cmo = audit.get("cmo") or {}
    header = ["stage", f"L / {units.flow}", f"L CMO / {units.flow}", "L dev / %", f"V / {units.flow}",
              f"V CMO / {units.flow}", "V dev / %", "operating curve - line"]
    rows = []
    for stage in cmo.get("stages", []):
        rows.append([
            str(stage["stage"]),
            _fmt(units.F(stage["L"]), ".5g"), _fmt(units.F(stage["L_cmo"]), ".5g"),
            _fmt(None if stage["liquid_deviation"] is None else 100 * stage["liquid_deviation"], "+.2f"),
            _fmt(units.F(stage["V"]), ".5g"), _fmt(units.F(stage["V_cmo"]), ".5g"),
            _fmt(None if stage["vapor_deviation"] is None else 100 * stage["vapor_deviation"], "+.2f"),
            _fmt(stage.get("line_distance"), "+.5f"),
        ])
    return header, rows


def flag_rows(audit: Mapping) -> list[list[str]]:
    return [[flag["severity"], flag["code"], flag["message"]] for flag in audit.get("flags", [])]


def _rich(title: str, header: Sequence[str], rows: Sequence[Sequence[str]], left: int = 1) -> Table:
    table = Table(title=title, header_style="bold")
    for k, column in enumerate(header):
        table.add_column(column, justify="left" if k < left else "right", no_wrap=k == 0)
    for row in rows:
        table.add_row(*row)
    return table


def shortcut_tables(shortcut: Mapping, units: DisplayUnits, title: str = "") -> list[Table]:
    """Screen tables of ``traystack shortcut``: the designs and their basis."""
    header, rows = shortcut_rows(shortcut, units)
    tables = [_rich(f"shortcut design: {title}" if title else "shortcut design", header, rows)]
    tables.append(_rich("what the shortcut designs for", ["", "value", "from"], basis_rows(shortcut), left=3))
    return tables


def audit_tables(result: Result, units: DisplayUnits) -> list[Table]:
    """Screen tables of ``traystack audit``: side by side, the CMO audit, the flags."""
    audit = result.extra["audit"]
    header, rows = side_by_side_rows(result, units)
    tables = [_rich(f"shortcut and rigorous side by side: {result.title}", header, rows)]
    tables.append(_rich("what the shortcut designs for", ["", "value", "from"], basis_rows(result.extra["shortcut"]), left=3))
    if audit.get("cmo"):
        header, rows = cmo_rows(audit, units)
        tables.append(_rich("CMO audit of the rigorous column at the shortcut's design", header, rows))
    flags = flag_rows(audit)
    flag_table = Table(title="audit flags", header_style="bold")
    for column in ("severity", "code", "message"):
        flag_table.add_column(column, overflow="fold")
    styles = {"serious": "bold red", "warning": "yellow", "info": "cyan"}
    for severity, code, message in flags:
        flag_table.add_row(f"[{styles.get(severity, '')}]{severity}[/]", code, message)
    if not flags:
        flag_table.add_row("-", "-", "no flags: the shortcut and the rigorous column agree within the thresholds")
    tables.append(flag_table)
    return tables


def audit_markdown(result: Result, units: DisplayUnits) -> list[str]:
    """The audit's sections of summary.md (empty without an audit)."""
    audit = result.extra.get("audit")
    if not audit:
        return []
    lines: list[str] = []
    if audit.get("scope") == "full" and "shortcut" in result.extra:
        lines += ["## Shortcut and rigorous, side by side", ""]
        lines.append(SIDE_BY_SIDE_NOTE + " This file's stage table is the column at the shortcut's design.")
        lines.append("")
        header, rows = side_by_side_rows(result, units)
        lines += _markdown_table(header, rows, [False] + [True] * (len(header) - 1))
        lines += ["", "What the shortcut designs for:", ""]
        lines += _markdown_table(["", "value", "from"], basis_rows(result.extra["shortcut"]), [False, False, False])
        lines.append("")
        notes = audit.get("notes") or []
        if notes:
            lines += [f"- {note}" for note in notes] + [""]
    if audit.get("cmo"):
        lines += ["## CMO audit", ""]
        lines.append(
            "Liquid and vapor leaving each stage against their constant-molar-overflow values at the same reflux "
            "ratio, distillate rate and feed q; the last column is the vertical distance of the rigorous operating "
            "curve (x_j, y_j+1) from the straight operating line of its section."
        )
        lines.append("")
        header, rows = cmo_rows(audit, units)
        lines += _markdown_table(header, rows)
        lines.append("")
    if not audit.get("applicable", True):
        lines += ["## Audit", "", f"Not applicable: {audit.get('reason', '')}", ""]
        return lines
    lines += ["## Audit flags", ""]
    flags = flag_rows(audit)
    if flags:
        lines += _markdown_table(["severity", "code", "message"], flags, [False, False, False])
    else:
        lines.append("No flags: the shortcut and the rigorous column agree within the thresholds.")
    thresholds = audit.get("thresholds") or {}
    if thresholds:
        lines += ["", "Thresholds: " + ", ".join(f"{key} = {value:g}" for key, value in thresholds.items()) + "."]
    lines.append("")
    return lines


def summary_markdown(result: Result, units: DisplayUnits, plots: Sequence[str] = ()) -> str:
    """The summary of a run as Markdown: status, specifications, column, feeds, products,
    duties, stage table, convergence and balances, plots (file names relative to the
    summary), cautions."""
    T_label, c = units.temperature_label, result.components
    lines = [f"# {result.title or 'traystack result'}", ""]
    if result.converged:
        lines.append(
            f"**Converged** in {result.iterations} Newton iterations (largest scaled residual "
            f"{result.residual_norm:.2e}); the independent post-check of every MESH equation passed."
        )
    else:
        lines.append(f"**NOT CONVERGED** after {result.iterations} iterations: {result.message}. Do not use these numbers.")
    lines.append("")

    lines += ["## Specifications", ""]
    lines += _markdown_table(["key", "value"], spec_rows(result, units), [False, False])
    column = result.case.get("column", {})
    efficiencies = np.asarray(column.get("efficiencies") or result.efficiency, dtype=float)
    lines += [
        "",
        f"Column: {result.stage_count} stages (condenser {result.condenser}, reboiler {result.reboiler}), "
        f"pressure {units.P(result.pressure[0]):.5g} to {units.P(result.pressure[-1]):.5g} {units.pressure}, "
        + (
            f"Murphree vapor efficiency {efficiencies.min():.3g}"
            + (f" to {efficiencies.max():.3g}" if efficiencies.max() > efficiencies.min() else "")
        )
        + f". Thermo: liquid {result.thermo.get('liquid', '?')}, vapor {result.thermo.get('vapor', '?')}, "
        f"enthalpy {result.enthalpy_model}.",
    ]
    sources = sorted({pair.get("source", "") for pair in result.thermo.get("pairs", []) if pair.get("source")})
    lines += [f"Binary parameters: {source}" for source in sources]
    lines.append("")

    lines += ["## Feeds", ""]
    feed_rows = []
    for j, feeds in enumerate(result.stage_feeds):
        for feed in feeds:
            feed_rows.append(
                [feed.name or "feed", str(j + 1), f"{units.F(feed.flow):.5g}",
                 "" if feed.temperature is None else f"{units.T(feed.temperature):.2f}",
                 "" if feed.q is None else f"{feed.q:.4f}", *[f"{z:.6f}" for z in feed.z]]
            )
    lines += _markdown_table(
        ["feed", "stage", f"flow / {units.flow}", f"T / {T_label}", "q", *[f"z {name}" for name in c]],
        feed_rows, [False] + [True] * (4 + len(c)),
    )
    lines.append("")

    lines += ["## Products", ""]
    lines += _markdown_table(
        ["product", "stage", "phase", f"flow / {units.flow}", f"T / {T_label}", *[f"x {name}" for name in c]],
        [
            [name.replace("_", " "), str(p["stage"]), p["phase"], f"{units.F(p['flow']):.6g}", f"{units.T(p['T']):.2f}",
             *[f"{value:.6f}" for value in p["composition"]]]
            for name, p in result.products().items()
        ],
        [False, True, False] + [True] * (2 + len(c)),
    )
    lines.append("")

    lines += ["## Duties", ""]
    duty_rows = []
    if result.reflux_ratio is not None:
        duty_rows.append(["reflux ratio L/D", f"{result.reflux_ratio:.5f}"])
    if result.boilup_ratio is not None:
        duty_rows.append(["boilup ratio V/B", f"{result.boilup_ratio:.5f}"])
    if result.condenser_duty is not None:
        duty_rows.append([f"condenser duty / {units.duty}", f"{units.Q(result.condenser_duty):.6g}"])
    if result.reboiler_duty is not None:
        duty_rows.append([f"reboiler duty / {units.duty}", f"{units.Q(result.reboiler_duty):.6g}"])
    for heater in column.get("stage_duties", []):
        kind = "heater" if heater["duty"] > 0 else "cooler"
        duty_rows.append([f"stage {heater['stage']} {kind} / {units.duty}", f"{units.Q(heater['duty']):.6g}"])
    lines += _markdown_table(["quantity", "value"], duty_rows, [False, True])
    lines.append("")

    lines += ["## Stages", ""]
    lines += _markdown_table(
        ["stage", f"T / {T_label}", f"P / {units.pressure}", f"L / {units.flow}", f"V / {units.flow}",
         f"draw / {units.flow}", *[f"x {name}" for name in c], *[f"y {name}" for name in c]],
        [
            [_stage_label(result, j), f"{units.T(r['T']):.3f}", f"{units.P(r['P']):.5g}", f"{units.F(r['L']):.5g}",
             f"{units.F(r['V']):.5g}", f"{units.F(r['liquid_draw'] + r['vapor_draw']):.4g}",
             *[f"{value:.5f}" for value in r["x"] + r["y"]]]
            for j, r in enumerate(result.stage_records())
        ],
    )
    lines.append("")

    lines += ["## Convergence", ""]
    lines += _markdown_table(
        ["iteration", "largest scaled residual", "largest step", "damping"],
        [[str(e.get("iteration")), f"{e.get('residual_norm', float('nan')):.3e}", f"{e.get('step_norm', float('nan')):.3e}",
          f"{e.get('damping', float('nan')):.3g}"] for e in result.iteration_log],
    )
    lines.append("")
    checks = {**result.balances(), **dict(result.post_check)}
    lines.append("Independent checks (recomputed from the reported streams): "
                 + ", ".join(f"{key} = {value:.1e}" for key, value in checks.items()) + ".")
    lines.append("")

    lines += audit_markdown(result, units)

    if plots:
        lines += ["## Plots", ""]
        lines += [f"![{os.path.splitext(name)[0]}]({name})" for name in plots]
        lines.append("")

    lines += ["## Cautions", ""]
    lines += [f"- {text}" for text in cautions(result)]
    lines += ["", f"_Written by traystack {__version__}; result file schema traystack-result/1 (SI units)._", ""]
    return "\n".join(lines)


def write_summary(result: Result, path: str | os.PathLike, units: DisplayUnits, plots: Sequence[str] = ()) -> Path:
    """Write :func:`summary_markdown` to ``path`` atomically."""
    return write_atomic(path, summary_markdown(result, units, plots))
