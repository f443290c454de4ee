"""A network of columns as one graph: every stage of every column a node, every stream an edge;
the weighted sparse inflow matrices derived from it; and the degrees of freedom counted over
the whole network against its specs.

Nodes: ``(COLUMN, stage)`` (stage numbered from 1 at that column's top), ``("feed", NAME)`` and
``("product", NAME)`` with NAME ``COLUMN.distillate``, ``COLUMN.bottoms`` or a side draw's name.
The graph is a :class:`networkx.MultiDiGraph` (two streams may join the same two stages, e.g.
the vapor rising from stage 12 to 11 and a liquid pumped back from 12 to 11); edge keys are
``"liquid"``/``"vapor"`` for the chain streams and the connection's name for a connection.

Edge attributes: ``stream`` ("liquid", "vapor", "feed", "product", "draw", "transfer") and
``phase``; a stream that is a share of the liquid or vapor leaving a stage for its neighbours has
``weight`` (the fraction going that way: 1 on a plain chain; a connection's ``fraction``, or 1
for one taking all of the phase, and the chain stream keeps the rest); a connection with a rate
(``flow = "40 kmol/h"`` or ``"free"``) is a ``transfer`` with ``flow`` (mol/s, None when free),
drawn like a side draw from its stage and entering its destination.

Global stage index: columns in file order, each column's stages top first. For a single column
this is the index of :mod:`solver.network`, whose matrices the ones here equal exactly.

Degrees of freedom (feeds, pressures, stage counts, efficiencies, side-draw rates and fixed
connection rates and fractions given): one per condenser, one per reboiler, one per connection
whose flow is "free", one per feed whose flow is "free" (a make-up), one per cooler or heater
on a connection whose duty is "free"; one less
per heat link (the linked condenser's duty fixes the reboiler's: the ``to`` column loses its
reboiler's freedom). Each spec belongs to one piece of equipment (a column, for its own specs,
products, condenser, reboiler and stages; a connection, for its rate, fraction and exchanger).
The specs must number the degrees of freedom; when they do not, the :class:`SpecError` names
each piece of equipment that lacks a spec or has one too many.
"""

from __future__ import annotations

from dataclasses import dataclass
from types import MappingProxyType
from typing import Mapping

import networkx as nx
import numpy as np
import scipy.sparse as sp

from .case import Case
from .case.model import ColumnSection, Network
from .errors import SpecError

__all__ = [
    "DegreeOfFreedom",
    "NetworkGraph",
    "build_network_graph",
    "check_network",
    "count_degrees_of_freedom",
    "network_of_case",
]

#: The column name of the one-column network view of a single-column case.
SINGLE_COLUMN_NAME = "column"


@dataclass(frozen=True)
class DegreeOfFreedom:
    """One degree of freedom: the ``equipment`` it belongs to (a column or a connection) and
    ``what`` it is in words ("condenser", "reboiler", "free rate", "cooling duty")."""

    equipment: str
    what: str


@dataclass(frozen=True)
class NetworkGraph:
    """The network graph and the arrays an equation assembly needs (SI, 0-based global stage
    index; ``index[(COLUMN, stage)]`` gives it). ``liquid_inflow[j, k]`` is the fraction of the
    liquid leaving stage k for its neighbours that enters stage j (``vapor_inflow`` likewise);
    ``liquid_product_share[k]`` the fraction of it leaving the network as a product (bottoms),
    ``vapor_product_share`` likewise (distillate). Rate connections (fixed or free) are columns
    of ``transfer_source`` (N, M) and ``transfer_destination`` (N, M), with ``transfer_phases``,
    ``transfer_rates`` (mol/s, NaN where free) and ``transfer_names``."""

    graph: nx.MultiDiGraph
    network: Network
    stage_nodes: tuple[tuple[str, int], ...]
    index: Mapping[tuple[str, int], int]
    roles: tuple[str, ...]
    pressures: np.ndarray
    efficiencies: np.ndarray
    liquid_draws: np.ndarray
    vapor_draws: np.ndarray
    fixed_duties: np.ndarray
    liquid_inflow: sp.csr_matrix
    vapor_inflow: sp.csr_matrix
    liquid_product_share: np.ndarray
    vapor_product_share: np.ndarray
    transfer_names: tuple[str, ...]
    transfer_phases: tuple[str, ...]
    transfer_rates: np.ndarray
    transfer_source: sp.csr_matrix
    transfer_destination: sp.csr_matrix
    feed_stages: np.ndarray
    degrees_of_freedom: tuple[DegreeOfFreedom, ...]

    @property
    def stage_count(self) -> int:
        return len(self.stage_nodes)


def network_of_case(case: Case) -> Network:
    """The case's network; a single-column case as a network of one column named
    ``"column"`` with the case's specs (its Case is not changed)."""
    if case.network is not None:
        return case.network
    section = ColumnSection(SINGLE_COLUMN_NAME, case.column, case.specs)
    return Network((section,), feed_columns=(SINGLE_COLUMN_NAME,) * len(case.feeds))


def _roles(section: ColumnSection) -> list[str]:
    column = section.column
    roles = ["tray"] * column.stages
    if column.condenser != "none":
        roles[0] = f"{column.condenser}_condenser"
    if column.reboiler == "partial":
        roles[-1] = "reboiler"
    return roles


def _shares_taken(network: Network) -> dict[tuple[str, int, str], float]:
    """(column, stage, phase) -> the fraction of that phase taken by connections."""
    taken: dict[tuple[str, int, str], float] = {}
    for c in network.connections:
        if c.flow is None and not c.free:
            where = (c.from_column, c.from_stage, c.phase)
            taken[where] = taken.get(where, 0.0) + (1.0 if c.takes_all else c.fraction)
    return taken


def _add_column(graph: nx.MultiDiGraph, section: ColumnSection, taken: Mapping) -> None:
    name, column = section.name, section.column
    count = column.stages
    for j, role in enumerate(_roles(section)):
        graph.add_node((name, j + 1), role=role, pressure=column.pressures[j], efficiency=column.efficiencies[j], duty=0.0)

    def rest(stage: int, phase: str) -> float:
        return 1.0 - taken.get((name, stage, phase), 0.0)

    for stage in range(1, count):
        graph.add_edge((name, stage), (name, stage + 1), key="liquid", stream="liquid", phase="liquid", weight=rest(stage, "liquid"))
        graph.add_edge((name, stage + 1), (name, stage), key="vapor", stream="vapor", phase="vapor", weight=rest(stage + 1, "vapor"))
    for stage, phase, product in ((1, "vapor", "distillate"), (count, "liquid", "bottoms")):
        share = rest(stage, phase)
        if share > 0.0:
            graph.add_edge((name, stage), ("product", f"{name}.{product}"), key=phase, stream="product", phase=phase, weight=share)
    for heater in column.stage_duties:
        graph.nodes[name, heater.stage]["duty"] += heater.duty
    for draw in column.side_draws:
        graph.add_edge((name, draw.stage), ("product", draw.name), key=draw.name, stream="draw", phase=draw.phase, flow=draw.flow)


def _matrix(rows, columns, values, shape) -> sp.csr_matrix:
    return sp.csr_matrix((np.asarray(values, dtype=float), (np.asarray(rows, dtype=int), np.asarray(columns, dtype=int))), shape=shape)


def build_network_graph(network: Network, feeds) -> NetworkGraph:
    """The graph of ``network`` with ``feeds`` (Case.feeds, stages counted in the column
    ``network.feed_columns`` names) and its arrays; the degrees of freedom counted (not yet
    checked against the specs: :func:`count_degrees_of_freedom`)."""
    graph = nx.MultiDiGraph()
    taken = _shares_taken(network)
    for section in network.columns:
        _add_column(graph, section, taken)
    for feed, column in zip(feeds, network.feed_columns):
        graph.add_edge(("feed", feed.name), (column, feed.stage), key="feed", stream="feed", flow=feed.flow)
    for c in network.connections:
        source, destination = (c.from_column, c.from_stage), (c.to_column, c.to_stage)
        common = {"phase": c.phase, "connection": c.name, "exchanger": c.exchanger}
        if c.flow is None and not c.free:
            graph.add_edge(source, destination, key=c.name, stream=c.phase, weight=1.0 if c.takes_all else c.fraction, **common)
        else:
            graph.add_edge(source, destination, key=c.name, stream="transfer", flow=c.flow, **common)
    return _arrays(graph, network, feeds)


def _arrays(graph: nx.MultiDiGraph, network: Network, feeds) -> NetworkGraph:
    stage_nodes = tuple((s.name, j + 1) for s in network.columns for j in range(s.column.stages))
    index = {node: k for k, node in enumerate(stage_nodes)}
    count = len(stage_nodes)
    flows = {"liquid": ([], [], []), "vapor": ([], [], [])}
    product_share = {"liquid": np.zeros(count), "vapor": np.zeros(count)}
    draws = {"liquid": np.zeros(count), "vapor": np.zeros(count)}
    transfers = []
    for source, destination, data in graph.edges(data=True):
        stream = data["stream"]
        if stream in ("liquid", "vapor") and data["weight"] > 0.0:
            rows, columns, values = flows[stream]
            rows.append(index[destination])
            columns.append(index[source])
            values.append(data["weight"])
        elif stream == "product":
            product_share[data["phase"]][index[source]] += data["weight"]
        elif stream == "draw":
            draws[data["phase"]][index[source]] += data["flow"]
        elif stream == "transfer":
            transfers.append((index[source], index[destination], data))
    m = len(transfers)
    return NetworkGraph(
        graph=graph,
        network=network,
        stage_nodes=stage_nodes,
        index=MappingProxyType(index),
        roles=tuple(graph.nodes[node]["role"] for node in stage_nodes),
        pressures=np.array([graph.nodes[node]["pressure"] for node in stage_nodes], dtype=float),
        efficiencies=np.array([graph.nodes[node]["efficiency"] for node in stage_nodes], dtype=float),
        liquid_draws=draws["liquid"],
        vapor_draws=draws["vapor"],
        fixed_duties=np.array([graph.nodes[node]["duty"] for node in stage_nodes], dtype=float),
        liquid_inflow=_matrix(*flows["liquid"], (count, count)),
        vapor_inflow=_matrix(*flows["vapor"], (count, count)),
        liquid_product_share=product_share["liquid"],
        vapor_product_share=product_share["vapor"],
        transfer_names=tuple(t[2]["connection"] for t in transfers),
        transfer_phases=tuple(t[2]["phase"] for t in transfers),
        transfer_rates=np.array([np.nan if t[2]["flow"] is None else t[2]["flow"] for t in transfers], dtype=float),
        transfer_source=_matrix([t[0] for t in transfers], range(m), np.ones(m), (count, m)),
        transfer_destination=_matrix([t[1] for t in transfers], range(m), np.ones(m), (count, m)),
        feed_stages=np.array([index[(column, feed.stage)] for feed, column in zip(feeds, network.feed_columns)], dtype=int),
        degrees_of_freedom=_degrees_of_freedom(network),
    )


def _degrees_of_freedom(network: Network, free_feeds: tuple[str, ...] = ()) -> tuple[DegreeOfFreedom, ...]:
    linked = {link.to_column for link in network.heat_links}
    found = [DegreeOfFreedom(name, "free rate") for name in free_feeds]
    for section in network.columns:
        if section.column.condenser != "none":
            found.append(DegreeOfFreedom(section.name, "condenser"))
        if section.column.reboiler != "none" and section.name not in linked:
            found.append(DegreeOfFreedom(section.name, "reboiler"))
    for c in network.connections:
        if c.free:
            found.append(DegreeOfFreedom(c.name, "free rate"))
        if c.exchanger is not None and c.exchanger.is_free:
            found.append(DegreeOfFreedom(c.name, f"{c.exchanger.kind} duty"))
    return tuple(found)


def _spec_owners(network: Network) -> list[tuple[str, str, str]]:
    """(equipment, spec in words, key in the file) for every spec of the network."""
    owners = [(s.name, spec.kind, spec.key or spec.kind) for s in network.columns for spec in s.specs]
    for spec in network.specs:
        owner = spec.equipment if spec.column is None else spec.column
        owners.append((owner, f"{spec.kind} of {spec.equipment}", spec.key))
    return owners


def _equipment_words(network: Network, name: str, free_feeds: tuple[str, ...] = ()) -> str:
    if name in free_feeds:
        return f"feed {name!r} (its flow is free)"
    return f"column {name!r}" if any(s.name == name for s in network.columns) else f"connection {name!r}"


def _check_fixed_connections(network: Network, where: str) -> None:
    """A spec on a connection's rate or fraction needs ``flow = "free"``, one on its cooler or
    heater a ``duty = "free"``: otherwise the connection has two values for one quantity."""
    connections = {c.name: c for c in network.connections}
    for spec in network.specs:
        connection = connections.get(spec.equipment) if spec.column is None else None
        if connection is None:
            continue
        if spec.kind in ("connection_flow", "connection_fraction") and not connection.free:
            given = "all of the phase" if connection.takes_all else (
                f"fraction = {connection.fraction:g}" if connection.fraction is not None else f"flow = {connection.flow:g} mol/s")
            raise SpecError(f"{where}{spec.key}: connection {connection.name!r} already has {given} "
                            f"({connection.key}); it has two specs (write flow = \"free\" there to let this spec set it)")
        if spec.kind in ("exchanger_duty", "return_temperature") and not connection.exchanger.is_free:
            raise SpecError(f"{where}{spec.key}: the {connection.exchanger.kind} of connection {connection.name!r} is already "
                            f"fixed ({connection.key}.{connection.exchanger.kind}); it has two specs (write duty = \"free\" there)")


def count_degrees_of_freedom(network: Network, source_file: str = "", free_feeds: tuple[str, ...] = ()) -> tuple[DegreeOfFreedom, ...]:
    """The degrees of freedom of ``network`` (see the module docstring; ``free_feeds`` the names
    of the feeds whose flow is free), checked against its specs; raises :class:`SpecError` naming each piece of equipment that lacks a spec or has
    one too many when the two counts differ, or a spec on a duty a heat link fixes."""
    where = f"{source_file or '<case>'}: "
    heat_linked = {link.to_column: link.name for link in network.heat_links}
    for section in network.columns:
        for spec in section.specs:
            if spec.kind in ("reboiler_duty", "boilup_ratio") and section.name in heat_linked:
                raise SpecError(f"{where}{spec.key}: the reboiler of {section.name!r} is heated by heat link "
                                f"{heat_linked[section.name]!r}, which sets its duty; it has two specs")
    for spec in network.specs:
        if spec.column in heat_linked and (spec.equipment.endswith(".reboiler") or spec.kind == "boilup_ratio"):
            raise SpecError(f"{where}{spec.key}: the reboiler of {spec.column!r} is heated by heat link "
                            f"{heat_linked[spec.column]!r}, which sets its duty; it has two specs")
    _check_fixed_connections(network, where)
    freedoms = _degrees_of_freedom(network, free_feeds)
    owners = _spec_owners(network)
    if len(owners) == len(freedoms):
        return freedoms
    names = [s.name for s in network.columns] + [c.name for c in network.connections] + list(free_feeds)
    problems = []
    for name in names:
        own = [f.what for f in freedoms if f.equipment == name]
        specs = [key for owner, _, key in owners if owner == name]
        if len(specs) < len(own) and len(owners) < len(freedoms):
            problems.append(f"{_equipment_words(network, name, free_feeds)} lacks {len(own) - len(specs)} spec(s) "
                            f"(its {', '.join(own)}; specs on it: {', '.join(specs) or 'none'})")
        elif len(specs) > len(own) and len(owners) > len(freedoms):
            problems.append(f"{_equipment_words(network, name, free_feeds)} has {len(specs) - len(own)} spec(s) too many "
                            f"({len(own)} degree(s) of freedom{': ' + ', '.join(own) if own else ''}; specs: {', '.join(specs)})")
    few = len(owners) < len(freedoms)
    raise SpecError(
        f"{where}the network has {len(freedoms)} degree(s) of freedom and {len(owners)} spec(s): too {'few' if few else 'many'}; "
        + "; ".join(problems)
    )


def check_network(case: Case) -> NetworkGraph:
    """The network graph of ``case`` (a single column as a network of one), with its degrees of
    freedom checked against its specs."""
    network = network_of_case(case)
    count_degrees_of_freedom(network, case.source_file, tuple(feed.name for feed in case.feeds if feed.free))
    return build_network_graph(network, case.feeds)
