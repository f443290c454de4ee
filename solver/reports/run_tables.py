"""The screen tables of a column solution (``traystack run``): overview, specifications,
products and stages, in display units."""

from __future__ import annotations

import numpy as np
from rich.table import Table

from ..results import Result
from ..spec_kinds import spec_kind
from .display import DisplayUnits, screen_table

__all__ = ["PAIR_HEADER", "pair_rows", "product_cells", "spec_rows", "stage_label", "summary_tables"]

PAIR_HEADER = ("pair", "origin", "source, or how it was predicted")


def pair_rows(result: Result) -> list[list[str]]:
    """The binary pairs of the activity model and where each comes from: the case file (with
    its source) or predicted (method, UNIFAC variant, fitted terms and the fit's rms)."""
    rows = []
    for origin in result.thermo.get("pair_origins", ()):
        pair = "-".join(origin["pair"])
        if origin["origin"] == "predicted":
            const, over = origin["constant_term"], origin["term_over_temperature_K"]
            how = (f"fitted to {origin['unifac_model']} ln gamma, {origin['temperature_range_K'][0]:.1f}-"
                   f"{origin['temperature_range_K'][1]:.1f} K: constant terms {const[0]:.4g}, {const[1]:.4g}; terms over T "
                   f"{over[0]:.5g} K, {over[1]:.5g} K; rms ln gamma {origin['rms_ln_gamma']:.2g}")
            rows.append([pair, "predicted", how])
        else:
            rows.append([pair, "case file", origin.get("source") or "(no source given)"])
    return rows


def stage_label(result: Result, j: int) -> str:
    """Stage ``j`` (0-based) as a table shows it: its number, and its role unless a tray."""
    role = result.roles[j]
    return f"{j + 1}" if role == "tray" else f"{j + 1} {role.split('_')[0]}"


def spec_rows(result: Result, units: DisplayUnits) -> list[tuple[str, str]]:
    """(key as written in the case file, value in display units) for every specification (in
    its registry entry's quantity and phrase) and for the condenser settings that are not
    degrees of freedom."""
    rows = []
    for spec in result.specs:
        entry = spec_kind(spec.kind)
        value = spec.value
        shown = {"flow": f"{units.F(value):.6g} {units.molar_flow}", "duty": f"{units.Q(value):.6g} {units.duty}",
                 "temperature": f"{units.T(value):.2f} {units.temperature_label}"}.get(entry.quantity, f"{value:.6g}")
        text = entry.phrase.format(value=shown, component=spec.component, product=spec.product, stage=spec.stage)
        rows.append((spec.key or spec.kind, text))
    if result.reflux_temperature is not None:
        rows.append(("specs.reflux_temperature", f"{units.T(result.reflux_temperature):.2f} {units.temperature_label}"))
    if result.reflux_subcooling is not None:
        rows.append(("specs.reflux_subcooling", f"{result.reflux_subcooling:.4g} K below the bubble point"))
    return rows


def summary_tables(result: Result, units: DisplayUnits) -> list[Table]:
    """Overview (status, ratios, duties, closures), specifications, products and the stage
    table, in display units."""
    tables = [_overview(result, units), _specifications(result, units), _products(result, units), _stages(result, units)]
    rows = pair_rows(result)
    if rows:
        tables.append(screen_table("binary parameters", PAIR_HEADER, rows, left=3))
    return tables


def _overview(result: Result, units: DisplayUnits) -> Table:
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
    return overview


def _specifications(result: Result, units: DisplayUnits) -> Table:
    specs = Table(title="specifications", header_style="bold")
    specs.add_column("key")
    specs.add_column("value")
    for key, text in spec_rows(result, units):
        specs.add_row(key, text)
    return specs


def _products(result: Result, units: DisplayUnits) -> Table:
    products = Table(title="products", header_style="bold")
    products.add_column("product")
    products.add_column(f"flow / {units.flow}", justify="right")
    products.add_column(f"T / {units.temperature_label}", justify="right")
    for name in result.components:
        products.add_column(f"{units.composition_label} {name}", justify="right")
    for name, text in product_cells(result, units).items():
        products.add_row(name.replace("_", " "), *text[:2], *text[3:])
    return products


def product_cells(result: Result, units: DisplayUnits, flow_digits: str = ".5g") -> dict[str, list[str]]:
    """Each product's cells in display units: flow (molar or mass), temperature, stage, and its
    composition in the display's basis (mole or mass fractions, or ppm)."""
    masses = result.molar_masses
    cells = {}
    for name, product in result.products().items():
        composition = np.asarray(product["composition"])
        digits = ".6f" if units.composition_label in ("x", "w") else ".5g"
        cells[name] = [
            format(units.stream(product["flow"], composition, masses), flow_digits), f"{units.T(product['T']):.2f}",
            str(product["stage"]), *[format(value, digits) for value in units.fractions(composition, masses)],
        ]
    return cells


def _stages(result: Result, units: DisplayUnits) -> Table:
    stages = Table(title="stages", header_style="bold")
    for column in ("stage", f"T / {units.temperature_label}", f"P / {units.pressure}", f"L / {units.flow}", f"V / {units.flow}"):
        stages.add_column(column, justify="right")
    for name in result.components:
        stages.add_column(f"x {name}", justify="right")
    masses = result.molar_masses
    for j, record in enumerate(result.stage_records()):
        stages.add_row(
            stage_label(result, j),
            f"{units.T(record['T']):.2f}",
            f"{units.P(record['P']):.5g}",
            f"{units.stream(record['L'], record['x'], masses):.4g}",
            f"{units.stream(record['V'], record['y'], masses):.4g}",
            *[f"{value:.5f}" for value in record["x"]],
        )
    return stages
