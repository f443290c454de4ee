"""The screen tables of a column network's solution (``traystack run`` on a network case): an
overview, the products, duties and connections by name, and one stage table per column, in
display units."""

from __future__ import annotations

from rich.table import Table

from ..network_results import NetworkResult
from .display import DisplayUnits, screen_table

__all__ = ["network_tables"]


def network_tables(result: NetworkResult, units: DisplayUnits) -> list[Table]:
    """Overview, products, duties, connections, then a stage table for each column."""
    balances = result.balances()
    overview = screen_table(result.title, ("quantity", "value"), [
        ("converged", "yes" if result.converged else "NO"),
        ("Newton iterations", str(result.iterations)),
        ("largest scaled residual", f"{result.residual_norm:.2e}"),
        ("columns", ", ".join(c["name"] for c in result.columns)),
        ("component closure", f"{balances['component_closure_max']:.1e}"),
        ("energy closure", f"{balances['energy_closure_rel']:.1e}"),
    ])
    products = screen_table("products", ("product", f"flow / {units.flow}", f"T / {units.temperature_label}",
                                         *[f"x {name}" for name in result.components]), [
        (name, f"{units.F(p['flow']):.5g}", f"{units.T(p['T']):.2f}", *[f"{value:.6f}" for value in p["composition"]])
        for name, p in result.products.items()
    ])
    duties = screen_table("duties", ("exchanger", f"duty / {units.duty}"),
                          [(name, f"{units.Q(duty):.5g}") for name, duty in result.duties.items()])
    connections = screen_table("connections", ("connection", "from", "to", f"flow / {units.flow}"), [
        (name, f"{c['from']['column']} {c['from']['stage']} {c['from']['phase']}", f"{c['to']['column']} {c['to']['stage']}",
         f"{units.F(c['flow']):.5g}")
        for name, c in result.connections.items()
    ])
    tables = [overview, products, duties]
    if result.connections:
        tables.append(connections)
    records = result.stage_records()
    for column in result.columns:
        rows = []
        for j in result.column_stages(column["name"]):
            record, role = records[j], result.roles[j]
            label = str(record["number"]) if role == "tray" else f"{record['number']} {role.split('_')[0]}"
            rows.append((label, f"{units.T(record['T']):.2f}", f"{units.P(record['P']):.5g}", f"{units.F(record['L']):.4g}",
                         f"{units.F(record['V']):.4g}", *[f"{value:.5f}" for value in record["x"]]))
        header = ("stage", f"T / {units.temperature_label}", f"P / {units.pressure}", f"L / {units.flow}", f"V / {units.flow}",
                  *[f"x {name}" for name in result.components])
        tables.append(screen_table(f"stages of {column['name']}", header, rows))
    return tables
