"""The column as a graph: stages are nodes, streams are edges.

Node kinds: ``("stage", j)`` (0-based, top first), ``("feed", k)``, ``("product", name)`` and
``("draw", k)``. Edge attribute ``stream`` is one of "liquid", "vapor", "feed", "product",
"draw". The equation assembly reads only the sparse inflow matrices derived here, never the
stage order, so side strippers, pumparounds and coupled columns are more edges, not new code.

Stage roles: "total_condenser", "partial_condenser", "tray", "reboiler". Every stage has a
liquid slot and a vapor slot. The top stage's vapor slot is the overhead product (the liquid
distillate, for a total condenser) and the bottom stage's liquid slot is the bottoms product.
"""

from __future__ import annotations

from dataclasses import dataclass

import networkx as nx
import numpy as np
import scipy.sparse as sp

from .case import Case

__all__ = ["StageGraph", "add_stage_duties", "build_stage_graph", "stage_graph_from"]


@dataclass(frozen=True)
class StageGraph:
    """The stage graph and the arrays the MESH equations need (SI units, 0-based stages)."""

    graph: nx.DiGraph
    stage_count: int
    roles: tuple[str, ...]
    pressures: np.ndarray  # (N,) Pa
    efficiencies: np.ndarray  # (N,) Murphree vapor efficiency (1 where there is no vapor inflow)
    liquid_draws: np.ndarray  # (N,) mol/s side draws of liquid
    vapor_draws: np.ndarray  # (N,) mol/s side draws of vapor
    fixed_duties: np.ndarray  # (N,) W, side heaters (+) and coolers (-)
    liquid_edges: np.ndarray  # (E_L, 2) [source, destination] stage indices
    vapor_edges: np.ndarray  # (E_V, 2)
    liquid_inflow: sp.csr_matrix  # (N, N): [j, k] = 1 if the liquid leaving k enters j
    vapor_inflow: sp.csr_matrix  # (N, N)
    top_stage: int  # the stage whose vapor slot is the overhead product
    bottom_stage: int  # the stage whose liquid slot is the bottoms product
    feed_stages: np.ndarray  # (F,) stage index of each feed, in case order

    @property
    def condenser(self) -> str:
        role = self.roles[self.top_stage]
        return {"total_condenser": "total", "partial_condenser": "partial"}.get(role, "none")

    @property
    def has_reboiler(self) -> bool:
        return self.roles[self.bottom_stage] == "reboiler"


def _inflow_matrix(edges: np.ndarray, count: int) -> sp.csr_matrix:
    if len(edges) == 0:
        return sp.csr_matrix((count, count))
    data = np.ones(len(edges))
    return sp.csr_matrix((data, (edges[:, 1], edges[:, 0])), shape=(count, count))


def build_stage_graph(case: Case) -> StageGraph:
    """The graph of a conventional column (one vertical chain of stages) from a Case."""
    column = case.column
    count = column.stages
    roles = ["tray"] * count
    if column.condenser == "total":
        roles[0] = "total_condenser"
    elif column.condenser == "partial":
        roles[0] = "partial_condenser"
    if column.reboiler == "partial":
        roles[-1] = "reboiler"

    graph = nx.DiGraph(title=case.title)
    for j in range(count):
        graph.add_node(
            ("stage", j),
            number=j + 1,
            role=roles[j],
            pressure=column.pressures[j],
            efficiency=column.efficiencies[j],
        )
    for j in range(count - 1):
        graph.add_edge(("stage", j), ("stage", j + 1), stream="liquid")
        graph.add_edge(("stage", j + 1), ("stage", j), stream="vapor")
    graph.add_edge(("stage", 0), ("product", "distillate"), stream="product", phase="vapor-slot")
    graph.add_edge(("stage", count - 1), ("product", "bottoms"), stream="product", phase="liquid-slot")
    for k, feed in enumerate(case.feeds):
        graph.add_edge(("feed", k), ("stage", feed.stage - 1), stream="feed", flow=feed.flow)
    for heater in column.stage_duties:
        add_stage_duties(graph, {heater.stage - 1: heater.duty})
    for k, draw in enumerate(column.side_draws):
        graph.add_edge(("stage", draw.stage - 1), ("draw", k), stream="draw", phase=draw.phase, flow=draw.flow)
    return stage_graph_from(graph)


def stage_graph_from(graph: nx.DiGraph) -> StageGraph:
    """Derive the arrays of :class:`StageGraph` from a graph built as described above."""
    stages = sorted(node[1] for node in graph.nodes if node[0] == "stage")
    count = len(stages)
    if stages != list(range(count)):
        raise ValueError("stage nodes must be numbered 0..N-1")
    roles = tuple(graph.nodes["stage", j]["role"] for j in range(count))
    pressures = np.array([graph.nodes["stage", j]["pressure"] for j in range(count)], dtype=float)
    efficiencies = np.array([graph.nodes["stage", j]["efficiency"] for j in range(count)], dtype=float)
    liquid_edges, vapor_edges = [], []
    liquid_draws = np.zeros(count)
    vapor_draws = np.zeros(count)
    fixed_duties = np.zeros(count)
    top_stage = bottom_stage = -1
    feed_stage_of: dict[int, int] = {}
    for source, destination, data in graph.edges(data=True):
        stream = data["stream"]
        if stream in ("liquid", "vapor"):
            (liquid_edges if stream == "liquid" else vapor_edges).append((source[1], destination[1]))
        elif stream == "product":
            if destination == ("product", "distillate"):
                top_stage = source[1]
            elif destination == ("product", "bottoms"):
                bottom_stage = source[1]
        elif stream == "draw":
            target = liquid_draws if data["phase"] == "liquid" else vapor_draws
            target[source[1]] += data["flow"]
        elif stream == "feed":
            feed_stage_of[source[1]] = destination[1]
    for j in range(count):
        fixed_duties[j] = graph.nodes["stage", j].get("duty", 0.0)
    liquid_edges_array = np.array(liquid_edges, dtype=int).reshape(-1, 2)
    vapor_edges_array = np.array(vapor_edges, dtype=int).reshape(-1, 2)
    vapor_inflow = _inflow_matrix(vapor_edges_array, count)
    has_vapor_inflow = np.asarray(vapor_inflow.sum(axis=1)).ravel() > 0
    efficiencies = np.where(has_vapor_inflow, efficiencies, 1.0)
    for j, role in enumerate(roles):
        if role in ("total_condenser", "partial_condenser", "reboiler"):
            efficiencies[j] = 1.0
    return StageGraph(
        graph=graph,
        stage_count=count,
        roles=roles,
        pressures=pressures,
        efficiencies=efficiencies,
        liquid_draws=liquid_draws,
        vapor_draws=vapor_draws,
        fixed_duties=fixed_duties,
        liquid_edges=liquid_edges_array,
        vapor_edges=vapor_edges_array,
        liquid_inflow=_inflow_matrix(liquid_edges_array, count),
        vapor_inflow=vapor_inflow,
        top_stage=top_stage,
        bottom_stage=bottom_stage,
        feed_stages=np.array([feed_stage_of[k] for k in sorted(feed_stage_of)], dtype=int),
    )


def add_stage_duties(graph: nx.DiGraph, duties: dict[int, float]) -> None:
    """Attach side heater (+) or cooler (-) duties in W to stage nodes (0-based)."""
    for stage, duty in duties.items():
        graph.nodes["stage", stage]["duty"] = graph.nodes["stage", stage].get("duty", 0.0) + duty
