"""``summary.md``: the summary of a run as Markdown -- status, specifications, column, feeds,
products, duties, stage table, convergence and balances, the audit's sections when one is
attached, plots and cautions -- in display units."""

from __future__ import annotations

import os
from pathlib import Path
from typing import Sequence

from .. import __version__
from ..results import Result, write_atomic
from .audit_tables import audit_markdown
from .cautions import cautions
from .display import DisplayUnits, markdown_table
from .run_tables import PAIR_HEADER, pair_rows, product_cells, spec_rows, stage_label
from .sizing_tables import sizing_markdown

__all__ = ["summary_markdown", "write_summary"]


def summary_markdown(result: Result, units: DisplayUnits, plots: Sequence[str] = ()) -> str:
    """The summary of a run as Markdown: status, specifications, column, feeds, products,
    duties, stage table, convergence and balances, the audit, plots (file names relative to
    the summary), cautions."""
    lines = [f"# {result.title or 'traystack result'}", "", _status(result), ""]
    for section in (_specifications, _feeds, _products, _duties, _stages, _convergence, audit_markdown, sizing_markdown):
        lines += section(result, units)
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


def _status(result: Result) -> str:
    if result.converged:
        return (f"**Converged** in {result.iterations} Newton iterations (largest scaled residual "
                f"{result.residual_norm:.2e}); the independent post-check of every MESH equation passed.")
    return f"**NOT CONVERGED** after {result.iterations} iterations: {result.message}. Do not use these numbers."


def _specifications(result: Result, units: DisplayUnits) -> list[str]:
    """The specifications, then a paragraph on the column and its thermo models."""
    lines = ["## Specifications", ""]
    lines += markdown_table(["key", "value"], spec_rows(result, units), [False, False])
    efficiencies = result.stated_efficiencies
    efficiency = f"Murphree vapor efficiency {efficiencies.min():.3g}"
    if efficiencies.max() > efficiencies.min():
        efficiency += f" to {efficiencies.max():.3g}"
    lines += [
        "",
        f"Column: {result.stage_count} stages (condenser {result.condenser}, reboiler {result.reboiler}), "
        f"pressure {units.P(result.pressure[0]):.5g} to {units.P(result.pressure[-1]):.5g} {units.pressure}, "
        f"{efficiency}. Thermo: liquid {result.thermo.get('liquid', '?')}, vapor {result.thermo.get('vapor', '?')}, "
        f"enthalpy {result.enthalpy_model}.",
    ]
    rows = pair_rows(result)
    if rows:
        lines += ["", "Binary parameters, each with its origin:", "",
                  *markdown_table(list(PAIR_HEADER), rows, [False] * 3)]
    return lines + [""]


def _feeds(result: Result, units: DisplayUnits) -> list[str]:
    rows = []
    for j, feeds in enumerate(result.stage_feeds):
        for feed in feeds:
            rows.append(
                [feed.name or "feed", str(j + 1), f"{units.stream(feed.flow, feed.z, result.molar_masses):.5g}",
                 "" if feed.temperature is None else f"{units.T(feed.temperature):.2f}",
                 "" if feed.q is None else f"{feed.q:.4f}", *[f"{z:.6f}" for z in feed.z]]
            )
    header = ["feed", "stage", f"flow / {units.flow}", f"T / {units.temperature_label}", "q",
              *[f"z {name}" for name in result.components]]
    return ["## Feeds", "", *markdown_table(header, rows, [False] + [True] * (4 + len(result.components))), ""]


def _products(result: Result, units: DisplayUnits) -> list[str]:
    header = ["product", "stage", "phase", f"flow / {units.flow}", f"T / {units.temperature_label}",
              *[f"{units.composition_label} {name}" for name in result.components]]
    products = result.products()
    rows = [[name.replace("_", " "), text[2], products[name]["phase"], *text[:2], *text[3:]]
            for name, text in product_cells(result, units, ".6g").items()]
    right = [False, True, False] + [True] * (2 + len(result.components))
    return ["## Products", "", *markdown_table(header, rows, right), ""]


def _duties(result: Result, units: DisplayUnits) -> list[str]:
    rows = []
    if result.reflux_ratio is not None:
        rows.append(["reflux ratio L/D", f"{result.reflux_ratio:.5f}"])
    if result.boilup_ratio is not None:
        rows.append(["boilup ratio V/B", f"{result.boilup_ratio:.5f}"])
    if result.condenser_duty is not None:
        rows.append([f"condenser duty / {units.duty}", f"{units.Q(result.condenser_duty):.6g}"])
    if result.reboiler_duty is not None:
        rows.append([f"reboiler duty / {units.duty}", f"{units.Q(result.reboiler_duty):.6g}"])
    for heater in result.stage_duties:
        kind = "heater" if heater.duty > 0 else "cooler"
        rows.append([f"stage {heater.stage} {kind} / {units.duty}", f"{units.Q(heater.duty):.6g}"])
    return ["## Duties", "", *markdown_table(["quantity", "value"], rows, [False, True]), ""]


def _stages(result: Result, units: DisplayUnits) -> list[str]:
    c = result.components
    header = ["stage", f"T / {units.temperature_label}", f"P / {units.pressure}", f"L / {units.flow}",
              f"V / {units.flow}", f"draw / {units.flow}", *[f"x {name}" for name in c], *[f"y {name}" for name in c]]
    masses = result.molar_masses
    stream = units.stream
    rows = [
        [stage_label(result, j), f"{units.T(r['T']):.3f}", f"{units.P(r['P']):.5g}", f"{stream(r['L'], r['x'], masses):.5g}",
         f"{stream(r['V'], r['y'], masses):.5g}",
         f"{stream(r['liquid_draw'], r['x'], masses) + stream(r['vapor_draw'], r['y'], masses):.4g}",
         *[f"{value:.5f}" for value in r["x"] + r["y"]]]
        for j, r in enumerate(result.stage_records())
    ]
    return ["## Stages", "", *markdown_table(header, rows), ""]


def _convergence(result: Result, units: DisplayUnits) -> list[str]:
    """The iteration log, then the closures recomputed from the reported streams."""
    rows = [[str(e.get("iteration")), f"{e.get('residual_norm', float('nan')):.3e}",
             f"{e.get('step_norm', float('nan')):.3e}", f"{e.get('damping', float('nan')):.3g}"]
            for e in result.iteration_log]
    checks = {**result.balances(), **dict(result.post_check)}
    return [
        "## Convergence", "",
        *markdown_table(["iteration", "largest scaled residual", "largest step", "damping"], rows), "",
        "Independent checks (recomputed from the reported streams): "
        + ", ".join(f"{key} = {value:.1e}" for key, value in checks.items()) + ".",
        "",
    ]
