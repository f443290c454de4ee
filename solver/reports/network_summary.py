"""``summary.md`` of a column network's solution: status, the columns and thermo models, the
feeds, then for each column its specifications (target and value reached), products, duties,
connections with their rates and its stage table; the connections of the whole network, the
convergence record with the balances, plots and cautions -- in display units."""

from __future__ import annotations

import os
from pathlib import Path
from typing import Sequence

from .. import __version__
from ..caution import CAUTION
from ..network_results import NETWORK_SCHEMA, NetworkResult
from ..spec_kinds import SpecRow
from ..results import write_atomic
from .display import DisplayUnits, markdown_table
from .network_tables import (
    connection_header, connection_rows, duty_rows, product_header, product_rows, spec_header, spec_rows, stage_header,
    stage_rows,
)

__all__ = ["network_summary_markdown", "write_network_summary"]


def network_summary_markdown(result: NetworkResult, units: DisplayUnits, specs: Sequence[SpecRow] = (),
                             plots: Sequence[str] = (), sections: Sequence[str] = ()) -> str:
    """The summary of a network run as Markdown (module docstring); ``specs`` the resolved
    specifications (:func:`solver.network_specs.resolve_specs`), ``plots`` file names relative
    to the summary, ``sections`` further Markdown lines set before the plots (e.g. each
    column's sizing)."""
    lines = [f"# {result.title or 'traystack result'}", "", _status(result), "", _arrangement(result, units), ""]
    lines += _feeds(result, units)
    for column in result.columns:
        lines += _column(result, units, specs, column)
    if result.connections:
        lines += ["## Connections", "", *markdown_table(connection_header(units), connection_rows(result, units),
                                                        [False] * 3 + [True] * 2), ""]
    lines += _convergence(result)
    lines += list(sections)
    if plots:
        lines += ["## Plots", "", *[f"![{os.path.splitext(name)[0]}]({name})" for name in plots], ""]
    lines += ["## Cautions", ""]
    if not result.converged:
        lines.append(f"- NOT CONVERGED: {result.message}. Do not use these numbers.")
    lines += [f"- {warning}" for warning in result.case.get("warnings", ())]
    lines += [f"- {CAUTION}", "", f"_Written by traystack {__version__}; result file schema {NETWORK_SCHEMA} (SI units)._", ""]
    return "\n".join(lines)


def write_network_summary(result: NetworkResult, path: str | os.PathLike, units: DisplayUnits,
                          specs: Sequence[SpecRow] = (), plots: Sequence[str] = (), sections: Sequence[str] = ()) -> Path:
    """Write :func:`network_summary_markdown` to ``path`` atomically."""
    return write_atomic(path, network_summary_markdown(result, units, specs, plots, sections))


def _status(result: NetworkResult) -> str:
    if result.converged:
        return (f"**Converged** in {result.iterations} Newton iterations (largest scaled residual "
                f"{result.residual_norm:.2e}); the independent post-check of every MESH equation passed.")
    return f"**NOT CONVERGED** after {result.iterations} iterations: {result.message}. Do not use these numbers."


def _arrangement(result: NetworkResult, units: DisplayUnits) -> str:
    columns = "; ".join(f"{c['name']} ({c['stages']} stages, condenser {c['condenser']}, reboiler {c['reboiler']})"
                        for c in result.columns)
    return (f"Columns: {columns}; {len(result.connections)} connection(s). Thermo: liquid {result.thermo.get('liquid', '?')}, "
            f"vapor {result.thermo.get('vapor', '?')}, enthalpy {result.enthalpy_model}.")


def _feeds(result: NetworkResult, units: DisplayUnits) -> list[str]:
    rows = []
    for j, feeds in enumerate(result.stage_feeds):
        for feed in feeds:
            rows.append((feed.name or "feed", result.stage_column[j], str(result.stage_number[j]), f"{units.F(feed.flow):.6g}",
                         "" if feed.temperature is None else f"{units.T(feed.temperature):.2f}", f"{feed.q:.4f}",
                         *[f"{z:.6f}" for z in feed.z]))
    header = ("feed", "column", "stage", f"flow / {units.flow}", f"T / {units.temperature_label}", "q",
              *[f"z {name}" for name in result.components])
    return ["## Feeds", "", *markdown_table(header, rows, [False, False] + [True] * (len(header) - 2)), ""]


def _column(result: NetworkResult, units: DisplayUnits, specs: Sequence[SpecRow], column) -> list[str]:
    name = column["name"]
    stages = result.column_stages(name)
    lines = [f"## Column {name}", "",
             f"{column['stages']} stages (condenser {column['condenser']}, reboiler {column['reboiler']}), pressure "
             f"{units.P(result.pressure[stages[0]]):.5g} to {units.P(result.pressure[stages[-1]]):.5g} {units.pressure}.", ""]
    tables = (
        ("Specifications", spec_header(), spec_rows(result, specs, units, name), [False, False, True, True]),
        ("Products", product_header(result, units), product_rows(result, units, name),
         [False] * 3 + [True] * (2 + len(result.components))),
        ("Duties", ("exchanger", f"duty / {units.duty}"), duty_rows(result, units, name), [False, True]),
        ("Connections", connection_header(units), connection_rows(result, units, name), [False] * 3 + [True] * 2),
        ("Stages", stage_header(result, units, vapor=True), stage_rows(result, units, name, vapor=True), None),
    )
    for title, header, rows, right in tables:
        if rows:
            lines += [f"### {title} of {name}", "", *markdown_table(header, rows, right), ""]
    return lines


def _convergence(result: NetworkResult) -> list[str]:
    rows = [(str(e.get("iteration")), f"{e.get('residual_norm', float('nan')):.3e}", f"{e.get('step_norm', float('nan')):.3e}",
             f"{e.get('damping', float('nan')):.3g}") for e in result.iteration_log]
    checks = {**result.balances(), **dict(result.post_check)}
    return ["## Convergence", "", *markdown_table(("iteration", "largest scaled residual", "largest step", "damping"), rows), "",
            "Independent checks (recomputed from the reported streams): "
            + ", ".join(f"{key} = {value:.1e}" for key, value in checks.items()) + ".", ""]
