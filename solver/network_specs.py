"""The specifications of a column network, one registry: every spec of a network case (a
column's own ``[columns.specs]`` in the single-column vocabulary, and the top-level ``[[specs]]``
on connections, products, exchangers and stages) resolved against the network graph into a
:class:`SpecRow`, and for each kind of row its scaled residual with its Jacobian entries, its
label in reports, and what it tells the default start about the flows (:data:`SPEC_REGISTRY`).

A residual function takes the system (for its layout: ``T_col(g)``, ``l_col(g)``, ``v_col(g)``,
``extra_col(name)``, ``flow_scale``, ``energy_scale``, ``total_feed_by_component``), the stage
state (:class:`~solver.mesh_blocks.StageState`), the values of the extra unknowns and the row;
it returns (value, Jacobian columns, Jacobian values). Flows are scaled by ``flow_scale``,
duties by ``flow_scale * energy_scale``, temperatures by :data:`TEMPERATURE_SCALE`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Mapping

import numpy as np

from .case import Case
from .errors import SpecError
from .network_graph import NetworkGraph, network_of_case

__all__ = ["SPEC_REGISTRY", "TEMPERATURE_SCALE", "ProductRef", "SpecKind", "SpecRow", "network_products", "resolve_specs"]

TEMPERATURE_SCALE = 10.0  # K, divides temperature residuals (as for one column)


@dataclass(frozen=True)
class ProductRef:
    """A product: the stage it leaves (global index), its phase slot, and either the share of
    that slot's flow it takes (distillate, bottoms) or its fixed rate in mol/s (a side draw)."""

    name: str
    stage: int
    phase: str  # "liquid" | "vapor"
    share: float | None = None
    rate: float | None = None


@dataclass(frozen=True)
class SpecRow:
    """One specification resolved on the network. ``kind`` is a key of
    :data:`SPEC_REGISTRY`; ``value`` SI; ``label`` the key in the case file."""

    kind: str
    value: float
    label: str
    stage: int = -1  # global stage index (stage temperature, reflux/boilup ratio's stage)
    component: int = -1
    product: ProductRef | None = None
    extra: str = ""  # the extra unknown it sets (a duty, a connection's rate)
    source_stage: int = -1  # for a connection fraction: the stage whose phase is split
    phase: str = ""  # for a connection fraction or a return temperature: the phase of the stream


@dataclass(frozen=True)
class SpecKind:
    """A kind of spec: its residual (see the module docstring), its words in reports, the
    quantity its value is (``ratio``, ``flow`` mol/s, ``fraction``, ``temperature`` K,
    ``duty`` W) and how reports read the value reached from a solved network
    (``achieved(result, row)``, :class:`~solver.network_results.NetworkResult`; None where
    the result alone does not give it)."""

    residual: Callable
    words: str
    quantity: str = "ratio"
    achieved: Callable | None = None


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


def _product_flow(system, s, p: ProductRef):
    """(scaled flow, columns, values) of a product's total flow."""
    c = system.c
    if p.rate is not None:
        return p.rate / system.flow_scale, np.array([], dtype=int), np.array([])
    total = s.L[p.stage] if p.phase == "liquid" else s.V[p.stage]
    cols = (system.l_col(p.stage) if p.phase == "liquid" else system.v_col(p.stage)) + np.arange(c)
    return p.share * total, cols, np.full(c, p.share)


def _composition(s, p: ProductRef):
    """(composition, total of the slot) of a product's stage slot."""
    return (s.x[p.stage], s.L_safe[p.stage]) if p.phase == "liquid" else (s.y[p.stage], s.V_safe[p.stage])


def _slot_col(system, p: ProductRef) -> int:
    return system.l_col(p.stage) if p.phase == "liquid" else system.v_col(p.stage)


def _product_flow_residual(system, s, extras, row: SpecRow):
    flow, cols, vals = _product_flow(system, s, row.product)
    return flow - row.value / system.flow_scale, cols, vals


def _mole_fraction_residual(system, s, extras, row: SpecRow):
    i, c = row.component, system.c
    composition, total = _composition(s, row.product)
    return composition[i] - row.value, _slot_col(system, row.product) + np.arange(c), (np.eye(c)[i] - composition[i]) / total


def _recovery_residual(system, s, extras, row: SpecRow):
    i, c, p = row.component, system.c, row.product
    feed = system.total_feed_by_component[i]
    if feed <= 0:
        raise SpecError(f"{row.label}: there is no {system.component_names[i]} in the feeds to recover")
    if p.rate is not None:
        composition, total = _composition(s, p)
        rate = p.rate / system.flow_scale
        cols = _slot_col(system, p) + np.arange(c)
        return (rate * composition[i] - row.value * feed) / feed, cols, rate * (np.eye(c)[i] - composition[i]) / (total * feed)
    flows = s.l if p.phase == "liquid" else s.v
    return (p.share * flows[p.stage, i] - row.value * feed) / feed, np.array([_slot_col(system, p) + i]), np.array([p.share / feed])


def _ratio_residual(system, s, extras, row: SpecRow):
    """Reflux ratio (reflux L over distillate) or boilup ratio (vapor V over bottoms) at the
    row's stage; the product's share of the other slot divides."""
    c, g, p = system.c, row.stage, row.product
    share = p.share if p is not None else 1.0
    if row.kind == "reflux_ratio":
        value = s.L[g] - row.value * share * s.V[g]
        cols = np.concatenate([system.l_col(g) + np.arange(c), system.v_col(g) + np.arange(c)])
    else:
        value = s.V[g] - row.value * share * s.L[g]
        cols = np.concatenate([system.v_col(g) + np.arange(c), system.l_col(g) + np.arange(c)])
    return value, cols, np.concatenate([np.ones(c), np.full(c, -row.value * share)])


def _stage_temperature_residual(system, s, extras, row: SpecRow):
    return (s.T[row.stage] - row.value) / TEMPERATURE_SCALE, np.array([system.T_col(row.stage)]), np.array([1.0 / TEMPERATURE_SCALE])


def _duty_residual(system, s, extras, row: SpecRow):
    k = system.extra_index(row.extra)
    return extras[k] - row.value / (system.flow_scale * system.energy_scale), np.array([system.extra_col(row.extra)]), np.array([1.0])


def _connection_flow_residual(system, s, extras, row: SpecRow):
    k = system.extra_index(row.extra)
    return extras[k] - row.value / system.flow_scale, np.array([system.extra_col(row.extra)]), np.array([1.0])


def _connection_fraction_residual(system, s, extras, row: SpecRow):
    """The connection's rate is ``value`` times all of the phase leaving its stage (to the
    neighbours, side draws and every rate connection)."""
    g, c = row.source_stage, system.c
    leaving, free_cols = system.phase_leaving(s, extras, g, row.phase)
    k = system.extra_index(row.extra)
    own = system.extra_col(row.extra)
    slot = system.l_col(g) if row.phase == "liquid" else system.v_col(g)
    cols = np.concatenate([[own], free_cols, slot + np.arange(c)])
    vals = np.concatenate([[1.0], np.full(len(free_cols), -row.value), np.full(c, -row.value)])
    return extras[k] - row.value * leaving, cols, vals


def _return_temperature_residual(system, s, extras, row: SpecRow):
    return system.return_temperature_row(s, extras, row)


def _achieved_product(result, row: SpecRow) -> Mapping:
    """The product's record in the result, or for a distillate (bottoms) that goes on through
    connections its stream's flow and composition."""
    p = row.product
    if p.name in result.products:
        return result.products[p.name]
    liquid = p.phase == "liquid"
    return {"flow": p.share * float((result.liquid_flow if liquid else result.vapor_flow)[p.stage]),
            "composition": (result.x if liquid else result.y)[p.stage].tolist()}


def _achieved_ratio(result, row: SpecRow) -> float:
    own = result.liquid_flow if row.kind == "reflux_ratio" else result.vapor_flow
    return float(own[row.stage]) / _achieved_product(result, row)["flow"]


def _achieved_recovery(result, row: SpecRow) -> float:
    product = _achieved_product(result, row)
    fed = sum(feed.flow * feed.z[row.component] for feeds in result.stage_feeds for feed in feeds)
    return product["flow"] * product["composition"][row.component] / fed


def _achieved_duty(result, row: SpecRow) -> float:
    return result.duties[row.extra] if row.extra in result.duties else result.duties[row.extra.rsplit(".", 1)[0]]


def _achieved_fraction(result, row: SpecRow) -> float:
    g = row.source_stage
    if row.phase == "liquid":
        leaving = result.liquid_flow[g] + result.liquid_draw[g] + result.transfer_liquid[g]
    else:
        leaving = result.vapor_flow[g] + result.vapor_draw[g] + result.transfer_vapor[g]
    return result.connections[row.extra.rsplit(".", 1)[0]]["flow"] / float(leaving)


#: Every kind of network spec row: its residual, its words, its quantity and its reached value.
SPEC_REGISTRY: dict[str, SpecKind] = {
    "reflux_ratio": SpecKind(_ratio_residual, "reflux ratio", "ratio", _achieved_ratio),
    "boilup_ratio": SpecKind(_ratio_residual, "boilup ratio", "ratio", _achieved_ratio),
    "product_flow": SpecKind(_product_flow_residual, "product flow", "flow", lambda r, row: _achieved_product(r, row)["flow"]),
    "mole_fraction": SpecKind(_mole_fraction_residual, "mole fraction in a product", "fraction",
                              lambda r, row: _achieved_product(r, row)["composition"][row.component]),
    "recovery": SpecKind(_recovery_residual, "recovery in a product", "fraction", _achieved_recovery),
    "stage_temperature": SpecKind(_stage_temperature_residual, "stage temperature", "temperature",
                                  lambda r, row: float(r.temperature[row.stage])),
    "duty": SpecKind(_duty_residual, "exchanger duty", "duty", _achieved_duty),
    "connection_flow": SpecKind(_connection_flow_residual, "connection rate", "flow",
                                lambda r, row: r.connections[row.extra.rsplit(".", 1)[0]]["flow"]),
    "connection_fraction": SpecKind(_connection_fraction_residual, "connection fraction", "fraction", _achieved_fraction),
    "return_temperature": SpecKind(_return_temperature_residual, "return temperature", "temperature"),
}


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
        n = section.column.stages
        top, bottom = _column_stage(graph, section.name, 1), _column_stage(graph, section.name, n)
        for spec in section.specs:
            label = spec.key or spec.kind
            kind = spec.kind
            if kind == "reflux_ratio":
                rows.append(SpecRow(kind, spec.value, label, stage=top, product=product(section.name, "distillate")))
            elif kind == "boilup_ratio":
                rows.append(SpecRow(kind, spec.value, label, stage=bottom, product=product(section.name, "bottoms")))
            elif kind in ("distillate_rate", "bottoms_rate"):
                which = kind.split("_")[0]
                rows.append(SpecRow("product_flow", spec.value, label, product=product(section.name, which)))
            elif kind in ("condenser_duty", "reboiler_duty"):
                rows.append(SpecRow("duty", spec.value, label, extra=f"{section.name}.{kind.split('_')[0]}"))
            elif kind in ("mole_fraction", "recovery"):
                rows.append(SpecRow(kind, spec.value, label, component=names.index(spec.component),
                                    product=product(section.name, spec.product)))
            elif kind == "stage_temperature":
                rows.append(SpecRow(kind, spec.value, label, stage=_column_stage(graph, section.name, spec.stage)))
            else:
                raise SpecError(f"{label}: unknown specification kind {kind!r}")
    for spec in network.specs:
        label, kind = spec.key, spec.kind
        connection = connections.get(spec.equipment) if spec.column is None else None
        if kind in ("connection_flow", "connection_fraction"):
            rows.append(SpecRow(kind, spec.value, label, extra=f"{connection.name}.rate",
                                source_stage=_column_stage(graph, connection.from_column, connection.from_stage),
                                phase=connection.phase))
        elif kind == "exchanger_duty":
            rows.append(SpecRow("duty", spec.value, label, extra=f"{spec.equipment}" if connection is None else f"{connection.name}.duty"))
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
