"""The stage graph of a column and its inflow matrices."""

from __future__ import annotations

import numpy as np

from conftest import methanol_water_case
from solver.network import build_stage_graph


def test_plain_column_graph():
    case = methanol_water_case(stages=8, feed_stage=4, efficiency=0.7)
    graph = build_stage_graph(case)
    assert graph.stage_count == 8
    assert graph.roles[0] == "total_condenser" and graph.roles[-1] == "reboiler"
    assert graph.condenser == "total" and graph.has_reboiler
    # liquid flows down, vapor up, one edge per neighbour pair
    assert graph.liquid_edges.tolist() == [[j, j + 1] for j in range(7)]
    assert sorted(graph.vapor_edges.tolist()) == sorted([[j + 1, j] for j in range(7)])
    A_L = graph.liquid_inflow.toarray()
    A_V = graph.vapor_inflow.toarray()
    assert A_L[3, 2] == 1 and A_L[2, 3] == 0 and A_V[2, 3] == 1
    assert A_L.sum() == 7 and A_V.sum() == 7
    # condenser and reboiler are equilibrium stages; trays keep their Murphree efficiency
    assert graph.efficiencies[0] == 1.0 and graph.efficiencies[-1] == 1.0
    np.testing.assert_allclose(graph.efficiencies[1:-1], 0.7)
    assert graph.feed_stages.tolist() == [3]
    assert graph.top_stage == 0 and graph.bottom_stage == 7
    np.testing.assert_allclose(np.diff(graph.pressures), 500.0)


def test_graph_nodes_and_edges_carry_the_streams():
    graph = build_stage_graph(methanol_water_case(stages=6, feed_stage=3)).graph
    kinds = {data["stream"] for _, _, data in graph.edges(data=True)}
    assert kinds == {"liquid", "vapor", "feed", "product"}
    assert graph.has_edge(("feed", 0), ("stage", 2))
    assert graph.has_edge(("stage", 0), ("product", "distillate"))
    assert graph.has_edge(("stage", 5), ("product", "bottoms"))
    assert graph.nodes["stage", 2]["number"] == 3
