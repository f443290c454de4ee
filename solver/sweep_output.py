"""What a sweep writes: ``sweep.csv`` (one row per point) and ``sweep.png`` (duties and end
purities against the first varied key), from a :class:`~solver.sweep.SweepResult`."""

from __future__ import annotations

import csv
import io
import math
import os
from pathlib import Path
from typing import Any

import numpy as np

from .plots import sweep_plot
from .results import write_atomic
from .sweep import SweepResult

__all__ = ["sweep_csv", "write_sweep_csv", "write_sweep_plot"]


def _product_names(result: SweepResult) -> list[str]:
    names = [] if result.network else ["distillate", "bottoms"]
    for outcome in result.outcomes:
        names += [name for name in (outcome.products or {}) if name not in names]
    return names


def _cell(value: Any) -> str:
    if value is None:
        return ""
    if isinstance(value, float):
        return f"{value:.9g}" if math.isfinite(value) else ""
    return str(value)


def sweep_csv(result: SweepResult) -> str:
    """One row per point: the varied values (in their units), status, iterations, duties [W],
    reflux and boilup ratios, product flows [mol/s] and compositions, (for a network: the
    condenser and reboiler duties summed over its columns, then every exchanger's duty by name)
    time, message, and whether the study is complete or partial (interrupted)."""
    products = _product_names(result)
    sections = list(dict.fromkeys(name for o in result.outcomes for name in (o.diameters or {})))
    exchangers = list(dict.fromkeys(name for o in result.outcomes for name in (o.duties or {})))
    header = ["point", *[variation.label for variation in result.variations], "status", "converged", "iterations",
              "residual_norm", "condenser_duty_W", "reboiler_duty_W", "reflux_ratio", "boilup_ratio"]
    for product in products:
        header += [f"{product}_flow_mol_s", *[f"x_{product}_{name}" for name in result.components]]
    header += [f"duty_{name}_W" for name in exchangers]
    header += [f"diameter_{name.replace(' ', '_')}_m" for name in sections] + ["seconds", "message", "study"]
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(header)
    for outcome in result.outcomes:
        magnitudes = [variation.magnitudes[variation.values.index(value)]
                      for variation, value in zip(result.variations, outcome.values)]
        row = [outcome.index + 1, *[_cell(m) for m in magnitudes], outcome.status, "true" if outcome.converged else "false",
               _cell(outcome.iterations), _cell(outcome.residual_norm), _cell(outcome.condenser_duty),
               _cell(outcome.reboiler_duty), _cell(outcome.reflux_ratio), _cell(outcome.boilup_ratio)]
        for product in products:
            flow, composition = (outcome.products or {}).get(product, (None, (None,) * len(result.components)))
            row += [_cell(flow), *[_cell(x) for x in composition]]
        row += [_cell((outcome.duties or {}).get(name)) for name in exchangers]
        row += [_cell((outcome.diameters or {}).get(name)) for name in sections]
        row += [f"{outcome.seconds:.3f}", outcome.message, result.study]
        writer.writerow(row)
    return buffer.getvalue()


def write_sweep_plot(result: SweepResult, path: str | os.PathLike, title: str = "") -> Path | None:
    """Duties and product purities against the first varied key (one line per value of the
    second); failed points leave gaps. None when no point converged."""
    keys = result.key_components()
    if keys is None:
        return None
    light, heavy = keys
    top, bottom = result.end_products()
    primary = result.variations[0]
    groups: dict[str, dict[str, np.ndarray]] = {}
    second = result.variations[1] if len(result.variations) > 1 else None
    failed_x: dict[str, list[float]] = {}
    for group_value, shown in (zip(second.values, second.shown()) if second else [(None, "")]):
        label = f"{second.key} = {shown}" if second else ""
        failed_x[label] = [primary.magnitudes[primary.values.index(o.values[0])] for o in result.failed
                           if second is None or o.values[1] == group_value]
        members = {o.values[0]: o for o in result.outcomes if second is None or o.values[1] == group_value}
        columns = {name: np.full(len(primary.values), np.nan) for name in ("reboiler", "condenser", "light", "heavy")}
        for i, value in enumerate(primary.values):
            outcome = members.get(value)
            if outcome is None or not outcome.converged:
                continue
            columns["reboiler"][i] = (outcome.reboiler_duty or np.nan) / 1e3
            columns["condenser"][i] = abs(outcome.condenser_duty or np.nan) / 1e3
            columns["light"][i] = outcome.products[top][1][light]
            columns["heavy"][i] = outcome.products[bottom][1][heavy]
        groups[label] = columns
    failed = len(result.failed)
    note = f"{failed} of {len(result.outcomes)} points failed (see sweep.csv)" if failed else f"{len(result.outcomes)} points"
    panels = [
        ("duty / kW", [("reboiler", "reboiler duty"), ("condenser", "condenser duty (magnitude)")]),
        ("mole fraction", [("light", f"{top} {result.components[light]}"),
                           ("heavy", f"{bottom} {result.components[heavy]}")]),
    ]
    return sweep_plot(np.asarray(primary.magnitudes), primary.label, groups, panels, Path(path),
                      f"{title} — {note}" if title else note, failed_x)


def write_sweep_csv(result: SweepResult, path: str | os.PathLike) -> Path:
    return write_atomic(path, sweep_csv(result))
