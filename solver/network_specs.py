"""The specifications of a column network: every spec of a network case (a column's own
``[columns.specs]`` in the single-column vocabulary, through
:func:`solver.spec_kinds.column_spec_rows`, and the top-level ``[[specs]]`` on connections,
products, exchangers and stages) resolved against the network graph into a
:class:`~solver.spec_kinds.SpecRow`; what each kind of row means (residual, words, start,
checks) is its entry in :data:`solver.spec_kinds.SPEC_REGISTRY`.
"""

from __future__ import annotations

from .case import Case
from .errors import SpecError
from .network_graph import NetworkGraph, network_of_case
from .spec_kinds import NETWORK_ROW_KINDS, ProductRef, SpecRow, column_spec_rows

__all__ = ["network_products", "resolve_specs"]

def network_products(graph: NetworkGraph) -> tuple[ProductRef, ...]:
    """Every product of the network: distillates and bottoms by share, side draws by rate."""
    found = []
    for source, destination, data in graph.graph.edges(data=True):
        if destination[0] != "product":
            continue
        if data["stream"] == "product":
            found.append(ProductRef(destination[1], graph.index[source], data["phase"], share=data["weight"]))
        elif data["stream"] == "draw":
            found.append(ProductRef(destination[1], graph.index[source], data["phase"], rate=data["flow"]))
    return tuple(found)


def _column_stage(graph: NetworkGraph, column: str, stage: int) -> int:
    return graph.index[(column, stage)]


def resolve_specs(case: Case, graph: NetworkGraph) -> tuple[SpecRow, ...]:
    """Every spec of the network case as a :class:`SpecRow` (the column specs first, in file
    order, then the top-level list)."""
    network = network_of_case(case)
    names = list(case.component_names)
    products = {p.name: p for p in network_products(graph)}
    connections = {c.name: c for c in network.connections}
    rows: list[SpecRow] = []

    def product(column: str, which: str) -> ProductRef:
        """A column's distillate (bottoms), whether it is a product or goes on through
        connections (then all of the top's vapor slot, or of the bottom's liquid: a reflux ratio
        divides by it, a spec on it sets the stream that goes on)."""
        name = f"{column}.{which}"
        if name in products:
            return products[name]
        stages = network.section(column).column.stages
        stage, phase = (1, "vapor") if which == "distillate" else (stages, "liquid")
        return ProductRef(name, _column_stage(graph, column, stage), phase, share=1.0)

    for section in network.columns:
        column = section.column
        exchangers = {"condenser"} if column.condenser != "none" else set()
        exchangers |= {"reboiler"} if column.reboiler != "none" else set()
        rows.extend(column_spec_rows(
            section.specs, names, stage_count=column.stages, exchangers=exchangers,
            exchanger_stage=lambda which, name=section.name, n=column.stages: _column_stage(graph, name, 1 if which == "condenser" else n),
            product=lambda which, name=section.name: product(name, which),
            stage_index=lambda stage, name=section.name: _column_stage(graph, name, stage),
            exchanger_prefix=f"{section.name}."))
    for spec in network.specs:
        label, kind = spec.key, spec.kind
        connection = connections.get(spec.equipment) if spec.column is None else None
        if kind in ("connection_flow", "connection_fraction"):
            rows.append(SpecRow(kind, spec.value, label, extra=f"{connection.name}.rate",
                                source_stage=_column_stage(graph, connection.from_column, connection.from_stage),
                                phase=connection.phase))
        elif kind == "exchanger_duty":
            rows.append(SpecRow(NETWORK_ROW_KINDS[kind], spec.value, label, extra=f"{spec.equipment}" if connection is None else f"{connection.name}.duty"))
        elif kind == "return_temperature":
            rows.append(SpecRow(kind, spec.value, label, extra=f"{connection.name}.duty", phase=connection.phase))
        elif kind in ("product_flow", "mole_fraction", "recovery"):
            ref = products.get(spec.equipment)
            if ref is None and spec.column is not None and spec.equipment.endswith((".distillate", ".bottoms")):
                ref = product(spec.column, spec.equipment.rsplit(".", 1)[1])
            if ref is None:
                raise SpecError(f"{label}: {spec.equipment} goes on through a connection: it is no product")
            if kind == "product_flow" and ref.rate is not None:
                raise SpecError(f"{label}: the side draw {spec.equipment!r} already has a fixed flow; it has two specs")
            component = names.index(spec.component) if spec.component is not None else -1
            rows.append(SpecRow(kind, spec.value, label, component=component, product=ref))
        elif kind == "stage_temperature":
            rows.append(SpecRow(kind, spec.value, label, stage=_column_stage(graph, spec.column, spec.stage)))
        elif kind in ("reflux_ratio", "boilup_ratio"):
            section = network.section(spec.column)
            which, stage = ("distillate", 1) if kind == "reflux_ratio" else ("bottoms", section.column.stages)
            rows.append(SpecRow(kind, spec.value, label, stage=_column_stage(graph, spec.column, stage),
                                product=product(spec.column, which)))
        else:
            raise SpecError(f"{label}: unknown specification kind {kind!r}")
    return tuple(rows)
