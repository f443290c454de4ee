"""The tables of a column network's solution, in display units: the rows of each (products,
duties, connections with their rates, specifications with the value each reached, the stages of
a column), which the screen tables of ``traystack run`` on a network case and ``summary.md``
(:mod:`.network_summary`) both lay out."""

from __future__ import annotations

from typing import Sequence

from rich.table import Table

from ..network_results import NetworkResult
from ..spec_kinds import SPEC_REGISTRY, SpecRow
from .display import DisplayUnits, screen_table

__all__ = [
    "connection_header", "connection_rows", "duty_rows", "network_tables", "product_header", "product_rows",
    "spec_column", "spec_header", "spec_rows", "stage_header", "stage_rows",
]


def product_header(result: NetworkResult, units: DisplayUnits) -> tuple[str, ...]:
    return ("product", "stage", "phase", f"flow / {units.flow}", f"T / {units.temperature_label}",
            *[f"x {name}" for name in result.components])


def product_rows(result: NetworkResult, units: DisplayUnits, column: str | None = None) -> list[tuple[str, ...]]:
    """One row per product (of ``column`` only, when given)."""
    return [(name, str(p["stage"]), p["phase"], f"{units.F(p['flow']):.6g}", f"{units.T(p['T']):.2f}",
             *[f"{value:.6f}" for value in p["composition"]])
            for name, p in result.products.items() if column is None or p["column"] == column]


def duty_rows(result: NetworkResult, units: DisplayUnits, column: str | None = None) -> list[tuple[str, str]]:
    """(exchanger, duty) of the condensers and reboilers (of ``column`` only, when given) and,
    without ``column``, of the connections' coolers and heaters."""
    rows = []
    for name, duty in result.duties.items():
        owner = name.rsplit(".", 1)[0] if name.endswith((".condenser", ".reboiler")) else None
        if column is None or owner == column:
            rows.append((name, f"{units.Q(duty):.6g}"))
    return rows


def connection_header(units: DisplayUnits) -> tuple[str, ...]:
    return ("connection", "from", "to", f"flow / {units.flow}", f"duty / {units.duty}")


def connection_rows(result: NetworkResult, units: DisplayUnits, column: str | None = None) -> list[tuple[str, ...]]:
    """One row per connection (that leaves or enters ``column``, when given), with its rate and
    the duty of its exchanger."""
    rows = []
    for name, c in result.connections.items():
        if column is not None and column not in (c["from"]["column"], c["to"]["column"]):
            continue
        duty = "" if c.get("duty") is None else f"{units.Q(c['duty']):.6g}"
        rows.append((name, f"{c['from']['column']} {c['from']['stage']} {c['from']['phase']}",
                     f"{c['to']['column']} {c['to']['stage']}", f"{units.F(c['flow']):.6g}", duty))
    return rows


def spec_column(result: NetworkResult, row: SpecRow) -> str:
    """The column a spec belongs to: its product's, its stage's, its split stage's, or the
    column whose exchanger or connection it sets (a connection's: the column it leaves)."""
    if row.product is not None:
        return result.stage_column[row.product.stage]
    stage = row.stage if row.stage >= 0 else row.source_stage
    if stage >= 0:
        return result.stage_column[stage]
    owner = row.extra.rsplit(".", 1)[0]
    if owner in result.connections:
        return result.connections[owner]["from"]["column"]
    return owner


def _shown(quantity: str, value: float | None, units: DisplayUnits) -> str:
    if value is None:
        return "-"
    if quantity == "flow":
        return f"{units.F(value):.6g} {units.flow}"
    if quantity == "temperature":
        return f"{units.T(value):.3f} {units.temperature_label}"
    if quantity == "duty":
        return f"{units.Q(value):.6g} {units.duty}"
    return f"{value:.6g}"


def spec_header() -> tuple[str, ...]:
    return ("specification", "kind", "target", "reached")


def spec_rows(result: NetworkResult, specs: Sequence[SpecRow], units: DisplayUnits,
              column: str | None = None) -> list[tuple[str, ...]]:
    """(key in the case file, kind, target, value reached in the solution) of each spec (of
    ``column`` only, when given); the value reached is read from the reported streams by the
    spec kind's registry entry, "-" where the streams alone do not give it (a return
    temperature, met through its exchanger's duty) or the result did not converge."""
    rows = []
    for row in specs:
        if column is not None and spec_column(result, row) != column:
            continue
        kind = SPEC_REGISTRY[row.kind]
        reached = kind.achieved(result, row) if kind.achieved is not None and result.converged else None
        rows.append((row.label, kind.words, _shown(kind.quantity, row.value, units), _shown(kind.quantity, reached, units)))
    return rows


def stage_header(result: NetworkResult, units: DisplayUnits, vapor: bool = False) -> tuple[str, ...]:
    return ("stage", f"T / {units.temperature_label}", f"P / {units.pressure}", f"L / {units.flow}", f"V / {units.flow}",
            f"draw / {units.flow}", f"to connections / {units.flow}", *[f"x {name}" for name in result.components],
            *([f"y {name}" for name in result.components] if vapor else []))


def stage_rows(result: NetworkResult, units: DisplayUnits, column: str, vapor: bool = False) -> list[tuple[str, ...]]:
    """One row per stage of ``column``, top first: T, P, L and V, side draws, the flow sent to
    connections (all of them: rates, fractions, a whole phase), x (and y when ``vapor``)."""
    records = result.stage_records()
    sent: dict[int, float] = {}
    for c in result.connections.values():
        if c["from"]["column"] == column:
            sent[c["from"]["stage"]] = sent.get(c["from"]["stage"], 0.0) + c["flow"]
    rows = []
    for j in result.column_stages(column):
        record, role = records[j], result.roles[j]
        label = str(record["number"]) if role == "tray" else f"{record['number']} {role.split('_')[-1]}"
        rows.append((label, f"{units.T(record['T']):.3f}", f"{units.P(record['P']):.5g}", f"{units.F(record['L']):.5g}",
                     f"{units.F(record['V']):.5g}", f"{units.F(record['liquid_draw'] + record['vapor_draw']):.4g}",
                     f"{units.F(sent.get(record['number'], 0.0)):.4g}",
                     *[f"{value:.5f}" for value in record["x"] + (record["y"] if vapor else [])]))
    return rows


def network_tables(result: NetworkResult, units: DisplayUnits, specs: Sequence[SpecRow] = ()) -> list[Table]:
    """Overview, specifications (target and value reached), products, duties, connections,
    then a stage table for each column."""
    balances = result.balances()
    overview = screen_table(result.title, ("quantity", "value"), [
        ("converged", "yes" if result.converged else "NO"),
        ("Newton iterations", str(result.iterations)),
        ("largest scaled residual", f"{result.residual_norm:.2e}"),
        ("columns", ", ".join(c["name"] for c in result.columns)),
        ("component closure", f"{balances['component_closure_max']:.1e}"),
        ("energy closure", f"{balances['energy_closure_rel']:.1e}"),
    ])
    tables = [overview]
    if specs:
        tables.append(screen_table("specifications", spec_header(), spec_rows(result, specs, units), left=2))
    tables.append(screen_table("products", product_header(result, units), product_rows(result, units), left=3))
    tables.append(screen_table("duties", ("exchanger", f"duty / {units.duty}"), duty_rows(result, units)))
    if result.connections:
        tables.append(screen_table("connections", connection_header(units), connection_rows(result, units), left=3))
    for column in result.columns:
        tables.append(screen_table(f"stages of {column['name']}", stage_header(result, units),
                                   stage_rows(result, units, column["name"])))
    return tables
