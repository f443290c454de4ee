"""The MESH equations of a network of columns as one Newton system, with a sparse analytic
Jacobian.

Unknowns: per stage of every column (global order of :mod:`solver.network_graph`) the
temperature and the liquid and vapor component flows leaving it for its neighbours (2c+1,
scaled as in :mod:`solver.mesh`); then the *extra* unknowns: the duty of every condenser and
reboiler, the rate of every connection whose flow is "free", the duty of every cooler or
heater on a connection that a spec or a return temperature sets, and the rate of every feed
whose flow is "free" (a make-up: its composition and molar enthalpy are fixed, its rate enters
its stage's balances linearly) (duties scaled by ``flow_scale * energy_scale``, rates by
``flow_scale``).

Rows: per stage the c component balances, c Murphree relations and the enthalpy balance (with
the stage's duties, fixed or unknown); a total condenser's equilibrium rows as for one column
(``y_i = x_i`` and the reflux's bubble point or temperature). Then one row per spec
(:mod:`solver.network_specs`, :mod:`solver.spec_kinds`), one per heat link (the linked condenser's and reboiler's duties
add to zero) and one per fixed return temperature. The count agrees because the specs number
the degrees of freedom (:func:`solver.network_graph.count_degrees_of_freedom`).

Streams: a liquid or vapor that leaves a stage for its neighbours is split by the weighted
inflow matrices (a share each way); a rate connection is drawn from its stage like a side draw
(the stage's own composition) and enters its destination with the enthalpy it left with, plus
its exchanger's duty. A Murphree relation mixes the vapors that enter by the inflow matrix; a
vapor rate connection enters the balances only (with efficiency 1, the default, no difference).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np
import scipy.sparse as sp

from .mesh import feed_sums_by_stage
from .mesh_blocks import TINY, StageLayout, StageState, edge_blocks, mesh_residuals, stage_blocks, stage_state
from .network_graph import NetworkGraph
from .spec_kinds import SPEC_REGISTRY, TEMPERATURE_SCALE, SpecRow
from .streams import FlashedFeed, StageProfile

__all__ = ["ConnectionStream", "DeferredEvaluation", "NetworkSystem", "SparseAssembly"]


@dataclass(frozen=True)
class ConnectionStream:
    """Where a connection runs (global stage indices), the slot it leaves, and its size:
    ``weight`` (a share of the phase, by the inflow matrices) or ``transfer`` (its column
    among the rate connections)."""

    name: str
    source: int
    destination: int
    phase: str  # the slot it leaves: "liquid" | "vapor"
    weight: float | None
    transfer: int | None
    carries_liquid: bool = False  # a liquid stream (the liquid slot, or a total condenser's distillate)


class NetworkSystem(StageLayout):
    """The MESH + spec equations of a column network, ready for Newton's method
    (:func:`solver.newton.solve_system`)."""

    def __init__(self, graph: NetworkGraph, thermo, feeds: Sequence[FlashedFeed], specs: Sequence[SpecRow],
                 component_names: Sequence[str], *, flow_scale: float | None = None, energy_scale: float | None = None,
                 free_feeds: Sequence[str] = ()) -> None:
        network = graph.network
        self.graph, self.thermo = graph, thermo
        self.feeds, self.specs = tuple(feeds), tuple(specs)
        self.component_names = tuple(component_names)
        self.c = c = len(self.component_names)
        self.N = N = graph.stage_count
        self.width = 2 * c + 1
        self.stage_size = N * self.width
        self.feed_stage_index = graph.feed_stages
        shifted = [FlashedFeed(int(g) + 1, f.flow, f.z, f.h, f.q) for f, g in zip(self.feeds, graph.feed_stages)]
        self.feed_component_flows, self.feed_enthalpy_flows = feed_sums_by_stage(shifted, N, c)
        self.flow_scale = float(flow_scale or self.feed_component_flows.sum() or 1.0)
        self.energy_scale = float(energy_scale or thermo.cmo_latent_heat)
        fe = self.flow_scale * self.energy_scale
        self.pressures = graph.pressures
        self.feed_flows = self.feed_component_flows / self.flow_scale
        self.feed_enthalpy = self.feed_enthalpy_flows / fe
        self.total_feed_by_component = self.feed_flows.sum(axis=0)
        self.free_feeds = tuple(free_feeds)
        free = [k for k, feed in enumerate(self.feeds) if feed.name in self.free_feeds]
        self.free_feed_stage = np.asarray(graph.feed_stages, dtype=int)[free]
        self.free_feed_z = np.array([self.feeds[k].z for k in free], dtype=float).reshape(-1, c)
        self.free_feed_h = np.array([self.feeds[k].h for k in free], dtype=float) / self.energy_scale  # per scaled rate
        self.free_feed_q = np.array([self.feeds[k].q for k in free], dtype=float)
        self.side_liquid_draws = graph.liquid_draws / self.flow_scale
        self.side_vapor_draws = graph.vapor_draws / self.flow_scale
        ends = np.isin(np.array(graph.roles), ("total_condenser", "partial_condenser", "reboiler"))
        # a total condenser's vapor slot holds its liquid distillate: sent on by a connection it
        # enters the balances as any stream, but no Murphree relation mixes it with the vapors
        liquid_slots = np.flatnonzero(np.array(graph.roles) == "total_condenser")
        self.mixing_inflow = None
        if graph.vapor_inflow[:, liquid_slots].nnz:
            keep = np.ones(len(graph.roles))
            keep[liquid_slots] = 0.0
            self.mixing_inflow = (graph.vapor_inflow @ sp.diags(keep)).tocsr()
            self.mixing_inflow.eliminate_zeros()
        mixing = graph.vapor_inflow if self.mixing_inflow is None else self.mixing_inflow
        has_vapor_in = np.asarray(mixing.sum(axis=1)).ravel() > 0
        self.efficiencies = np.where(has_vapor_in & ~ends, graph.efficiencies, 1.0)
        # the total condensers: stage, reflux temperature (NaN: none), subcooling
        tops, reflux_T, shift = [], [], []
        for section in network.columns:
            if section.column.condenser == "total":
                tops.append(graph.index[(section.name, 1)])
                reflux_T.append(np.nan if section.column.reflux_temperature is None else section.column.reflux_temperature)
                shift.append(section.column.reflux_subcooling or 0.0)
        self.total_condensers = np.array(tops, dtype=int)
        self.reflux_temperature, self.reflux_shift = np.array(reflux_T, dtype=float), np.array(shift, dtype=float)
        self._build_streams(network)
        self._build_extras(network)
        self.fixed_duties = self.fixed_duties / fe
        self.size = self.stage_size + len(self.extra_names)
        self._build_patterns()
        self._assembly: SparseAssembly | None = None  # the Jacobian's layout, found at its first assembly
        self._assembly_pieces: list[np.ndarray] = []  # the row and column pieces it was found from

    # ------------------------------------------------------------------ structure
    def _build_streams(self, network) -> None:
        g = self.graph
        self.liquid_edges, self.liquid_weights = _edges(g.liquid_inflow)
        self.vapor_edges, self.vapor_weights = _edges(g.vapor_inflow)
        liquid_slot = np.array(g.roles) == "total_condenser"
        self.vapor_mixes = None if self.mixing_inflow is None else ~liquid_slot[self.vapor_edges[:, 0]]
        M = len(g.transfer_names)
        self.transfer_source = np.array([g.transfer_source[:, m].nonzero()[0][0] for m in range(M)], dtype=int)
        self.transfer_destination = np.array([g.transfer_destination[:, m].nonzero()[0][0] for m in range(M)], dtype=int)
        self.transfer_liquid = np.array([p == "liquid" for p in g.transfer_phases], dtype=bool)
        self.transfer_fixed = g.transfer_rates / self.flow_scale  # NaN where free
        streams = {}
        for c in network.connections:
            source, destination = g.index[(c.from_column, c.from_stage)], g.index[(c.to_column, c.to_stage)]
            transfer = g.transfer_names.index(c.name) if c.name in g.transfer_names else None
            weight = None if transfer is not None else (1.0 if c.takes_all else c.fraction)
            carries_liquid = c.phase == "liquid" or g.roles[source] == "total_condenser"
            streams[c.name] = ConnectionStream(c.name, source, destination, c.phase, weight, transfer, carries_liquid)
        self.connections = streams

    def _build_extras(self, network) -> None:
        """The extra unknowns (name, stage whose enthalpy balance takes it as a duty, or -1 for
        a rate), the fixed duties of exchangers, and the internal rows (heat links, fixed
        return temperatures)."""
        g = self.graph
        names, duty_stage = [], []
        for section in network.columns:
            n = section.column.stages
            if section.column.condenser != "none":
                names.append(f"{section.name}.condenser")
                duty_stage.append(g.index[(section.name, 1)])
            if section.column.reboiler != "none":
                names.append(f"{section.name}.reboiler")
                duty_stage.append(g.index[(section.name, n)])
        self.fixed_duties = g.fixed_duties.copy()
        internal: list[SpecRow] = []
        for c in network.connections:
            stream = self.connections[c.name]
            if c.free:
                names.append(f"{c.name}.rate")
                duty_stage.append(-1)
            exchanger = c.exchanger
            if exchanger is None:
                continue
            if exchanger.duty is not None:
                self.fixed_duties[stream.destination] += exchanger.duty
                continue
            names.append(f"{c.name}.duty")
            duty_stage.append(stream.destination)
            if exchanger.return_temperature is not None:
                internal.append(SpecRow("return_temperature", exchanger.return_temperature, f"{c.key}.{exchanger.kind}.return_temperature",
                                        extra=f"{c.name}.duty", phase=c.phase))
        for name in self.free_feeds:
            names.append(f"{name}.feed_rate")
            duty_stage.append(-1)
        self.extra_names = tuple(names)
        self._extra_position = {name: k for k, name in enumerate(names)}
        self.extra_duty_stage = np.array(duty_stage, dtype=int)
        self.heat_links = tuple((f"{h.from_column}.condenser", f"{h.to_column}.reboiler", h.key or h.name) for h in network.heat_links)
        self.internal_rows = tuple(internal)
        free = [f"{name}.rate" for name in g.transfer_names]
        self.transfer_extra = np.array([self._extra_position.get(name, -1) for name in free], dtype=int)
        self.free_feed_extra = np.array([self._extra_position[f"{name}.feed_rate"] for name in self.free_feeds], dtype=int)
        rows = len(self.specs) + len(self.heat_links) + len(self.internal_rows)
        if rows != len(names):
            raise ValueError(f"{rows} spec and link rows for {len(names)} extra unknowns: the degrees of freedom were not checked")

    def _build_patterns(self) -> None:
        w = self.width
        local_rows, local_cols = np.meshgrid(np.arange(w), np.arange(w), indexing="ij")

        def scatter(destinations, sources):
            return ((destinations[:, None, None] * w + local_rows[None]).ravel(), (sources[:, None, None] * w + local_cols[None]).ravel())

        stages = np.arange(self.N)
        self._diag = scatter(stages, stages)
        self._liquid = scatter(self.liquid_edges[:, 1], self.liquid_edges[:, 0])
        self._vapor = scatter(self.vapor_edges[:, 1], self.vapor_edges[:, 0])
        self._transfer = scatter(self.transfer_destination, self.transfer_source)

    # ------------------------------------------------------------------ layout
    def extra_index(self, name: str) -> int:
        return self._extra_position[name]

    def extra_col(self, name: str) -> int:
        return self.stage_size + self._extra_position[name]

    def duty_term(self, s: StageState, extras: np.ndarray, row: SpecRow):
        """(scaled duty, columns, values) of the exchanger a duty spec sets: an extra unknown."""
        return extras[self.extra_index(row.extra)], np.array([self.extra_col(row.extra)]), np.array([1.0])

    def temperature_index(self) -> np.ndarray:
        return np.arange(self.N) * self.width

    def flow_mask(self) -> np.ndarray:
        mask = np.ones(self.size, dtype=bool)
        mask[self.temperature_index()] = False
        mask[self.stage_size:] = self.extra_duty_stage < 0  # rates are flows, duties are not
        return mask

    def unpack(self, X: np.ndarray):
        """(T (N,), l (N, c), v (N, c), extras) in scaled units."""
        block = X[: self.stage_size].reshape(self.N, self.width)
        return block[:, 0], block[:, 1 : 1 + self.c], block[:, 1 + self.c :], X[self.stage_size :]

    def pack(self, T, l, v, extras) -> np.ndarray:
        return np.concatenate([np.concatenate([np.asarray(T)[:, None], l, v], axis=1).ravel(), np.asarray(extras, dtype=float)])

    def profile(self, X: np.ndarray) -> StageProfile:
        T, l, v, _ = self.unpack(X)
        L, V = l.sum(axis=1), v.sum(axis=1)
        x, y = l / np.maximum(L, TINY)[:, None], v / np.maximum(V, TINY)[:, None]
        return StageProfile(T.copy(), self.pressures.copy(), L * self.flow_scale, V * self.flow_scale, x, y)

    def stage_name(self, g: int) -> str:
        column, stage = self.graph.stage_nodes[g]
        return f"stage {stage} of {column!r}"

    def variable_name(self, index: int) -> str:
        if index >= self.stage_size:
            name = self.extra_names[index - self.stage_size]
            if name.endswith(".feed_rate"):
                return f"rate of feed {name.rsplit('.', 1)[0]!r}"
            return f"{'rate' if name.endswith('.rate') else 'duty'} of {name.rsplit('.', 1)[0] if name.endswith(('.rate', '.duty')) else name}"
        g, offset = divmod(int(index), self.width)
        if offset == 0:
            return f"temperature of {self.stage_name(g)}"
        phase, i = ("liquid", offset - 1) if offset <= self.c else ("vapor", offset - 1 - self.c)
        return f"{phase} flow of {self.component_names[i]} leaving {self.stage_name(g)}"

    def equation_name(self, index: int) -> str:
        if index >= self.stage_size:
            k = index - self.stage_size
            rows = [f"specification {r.label}" for r in self.specs] + [f"heat link {h[2]}" for h in self.heat_links]
            rows += [f"return temperature {r.label}" for r in self.internal_rows]
            return rows[k]
        g, offset = divmod(int(index), self.width)
        if offset < self.c:
            return f"balance of {self.component_names[offset]} on {self.stage_name(g)}"
        if offset < 2 * self.c:
            return f"equilibrium of {self.component_names[offset - self.c]} on {self.stage_name(g)}"
        return f"enthalpy balance of {self.stage_name(g)}"

    # ------------------------------------------------------------------ flows of the connections
    def feed_flows_at(self, extras: np.ndarray) -> np.ndarray:
        """(N, c) scaled component flows of every feed, the free ones at their rates in ``extras``."""
        flows = self.feed_flows.copy()
        np.add.at(flows, self.free_feed_stage, extras[self.free_feed_extra][:, None] * self.free_feed_z)
        return flows

    def transfer_rates(self, extras: np.ndarray) -> np.ndarray:
        rates = self.transfer_fixed.copy()
        free = self.transfer_extra >= 0
        rates[free] = extras[self.transfer_extra[free]]
        return rates

    def draws(self, rates: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(U, W): liquid and vapor drawn from each stage besides the neighbours' flows."""
        liquid = self.transfer_liquid
        U = self.side_liquid_draws + np.bincount(self.transfer_source[liquid], rates[liquid], minlength=self.N)
        W = self.side_vapor_draws + np.bincount(self.transfer_source[~liquid], rates[~liquid], minlength=self.N)
        return U, W

    def phase_leaving(self, s: StageState, extras: np.ndarray, g: int, phase: str):
        """All of ``phase`` leaving stage ``g`` (scaled), and the columns of the free rates
        drawn from it."""
        rates = self.transfer_rates(extras)
        liquid = phase == "liquid"
        U, W = self.draws(rates)
        total = (s.L[g] + U[g]) if liquid else (s.V[g] + W[g])
        mine = (self.transfer_source == g) & (self.transfer_liquid == liquid) & (self.transfer_extra >= 0)
        return total, self.stage_size + self.transfer_extra[mine]

    def connection_flow(self, s: StageState, extras: np.ndarray, name: str):
        """(scaled flow, columns, values) of a connection's stream."""
        stream = self.connections[name]
        if stream.transfer is not None:
            k = self.transfer_extra[stream.transfer]
            if k < 0:
                return self.transfer_fixed[stream.transfer], np.array([], dtype=int), np.array([])
            return extras[k], np.array([self.stage_size + k]), np.array([1.0])
        g, c = stream.source, self.c
        total = s.L[g] if stream.phase == "liquid" else s.V[g]
        slot = self.l_col(g) if stream.phase == "liquid" else self.v_col(g)
        return stream.weight * total, slot + np.arange(c), np.full(c, stream.weight)

    def return_temperature_row(self, s: StageState, extras: np.ndarray, row: SpecRow):
        """``flow (h(T_return, z) - h(T_source, z)) - Q = 0``: the exchanger brings the stream
        (composition z of its source) to the return temperature, in the same phase."""
        name = row.extra.rsplit(".", 1)[0]
        stream = self.connections[name]
        g, c = stream.source, self.c
        liquid = stream.phase == "liquid"  # the slot (a total condenser's vapor slot holds liquid)
        z = s.x[g] if liquid else s.y[g]
        total = s.L_safe[g] if liquid else s.V_safe[g]
        T_ret, P = np.array([row.value]), self.pressures[g : g + 1]
        at_return = (self.thermo.liquid_enthalpy if stream.carries_liquid else self.thermo.vapor_enthalpy)(T_ret, z[None, :], pressure=P)
        h, dh_dT, dh_dz = (s.h_L[g], s.dh_L_dT[g], s.dh_L_dx[g]) if liquid else (s.h_V[g], s.dh_V_dT[g], s.dh_V_dx[g])
        difference = (at_return.molar[0] - h) / self.energy_scale
        flow, flow_cols, flow_vals = self.connection_flow(s, extras, name)
        k = self.extra_index(row.extra)
        value = flow * difference - extras[k]
        slope = (at_return.d_dx[0] - dh_dz) / self.energy_scale
        slot = self.l_col(g) if liquid else self.v_col(g)
        cols = np.concatenate([flow_cols, [self.T_col(g)], slot + np.arange(c), [self.stage_size + k]])
        vals = np.concatenate([flow_vals * difference, [-flow * dh_dT / self.energy_scale], flow * (slope - z @ slope) / total, [-1.0]])
        return value, cols, vals

    # ------------------------------------------------------------------ evaluation
    def state(self, X: np.ndarray) -> tuple[StageState, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
        """(stage state, extras, transfer rates, U, W) at ``X``."""
        T, l, v, extras = self.unpack(X)
        rates = self.transfer_rates(extras)
        U, W = self.draws(rates)
        s = stage_state(self.thermo, T, l, v, self.pressures, self.graph.vapor_inflow, U, W, None, self.total_condensers,
                        self.mixing_inflow)
        return s, extras, rates, U, W

    def _transfer_inflows(self, s: StageState, rates: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Component flows (N, c) and enthalpy flows (N,) entering each stage by rate connections."""
        src, liquid = self.transfer_source, self.transfer_liquid[:, None]
        composition = np.where(liquid, s.x[src], s.y[src])
        enthalpy = np.where(self.transfer_liquid, s.h_L[src], s.h_V[src])
        component_in = np.zeros((self.N, self.c))
        np.add.at(component_in, self.transfer_destination, rates[:, None] * composition)
        energy_in = np.bincount(self.transfer_destination, rates * enthalpy, minlength=self.N)
        return component_in, energy_in

    def stage_duties_scaled(self, extras: np.ndarray) -> np.ndarray:
        duties = self.fixed_duties.copy()
        on_stage = self.extra_duty_stage >= 0
        np.add.at(duties, self.extra_duty_stage[on_stage], extras[on_stage])
        return duties

    def evaluate(self, X: np.ndarray, jacobian: bool = True) -> DeferredEvaluation:
        """Scaled residuals at ``X`` (stage rows, then the spec, heat-link and return
        temperature rows) and their sparse analytic Jacobian, built when it is first read
        whatever ``jacobian`` says: a rejected line-search trial never builds it, an accepted
        one builds it from the state its residuals were computed from."""
        s, extras, rates, U, W = self.state(X)
        duties = self.stage_duties_scaled(extras)
        balance, equilibrium, energy = mesh_residuals(
            s, self.graph.liquid_inflow, self.graph.vapor_inflow, U, W, self.efficiencies,
            self.feed_flows, self.feed_enthalpy, duties, self.energy_scale)
        component_in, energy_in = self._transfer_inflows(s, rates)
        balance -= component_in
        energy -= energy_in / self.energy_scale
        free_rates = extras[self.free_feed_extra]
        np.add.at(balance, self.free_feed_stage, -free_rates[:, None] * self.free_feed_z)
        np.add.at(energy, self.free_feed_stage, -free_rates * self.free_feed_h)
        bubble = self._total_condenser_rows(s, equilibrium)
        extra_values, extra_entries = [], []
        for k, row in enumerate(self.specs + self.internal_rows):
            value, cols, vals = SPEC_REGISTRY[row.kind].residual(self, s, extras, row)
            extra_values.append(value)
            extra_entries.append((cols, vals))
        for condenser, reboiler, _ in self.heat_links:
            a, b = self.extra_index(condenser), self.extra_index(reboiler)
            extra_values.append(extras[a] + extras[b])
            extra_entries.append((np.array([self.stage_size + a, self.stage_size + b]), np.ones(2)))
        # rows in the order: specs, heat links, internal return temperatures
        order = list(range(len(self.specs))) + list(range(len(self.specs) + len(self.internal_rows), len(extra_values)))
        order += list(range(len(self.specs), len(self.specs) + len(self.internal_rows)))
        stage_residuals = np.concatenate([balance, equilibrium, energy[:, None]], axis=1).ravel()
        residuals = np.concatenate([stage_residuals, np.array([extra_values[k] for k in order], dtype=float)])
        return DeferredEvaluation(residuals, lambda: self._jacobian(s, extras, rates, U, W, bubble, [extra_entries[k] for k in order]))

    def _total_condenser_rows(self, s: StageState, equilibrium: np.ndarray):
        """Overwrite the total condensers' equilibrium rows: ``y_i = x_i`` (i < c) and the
        reflux temperature or the bubble point of the reflux (at ``T + subcooling``)."""
        t = self.total_condensers
        if not len(t):
            return None
        c = self.c
        x = s.x[t]
        equilibrium[t, : c - 1] = s.y[t, : c - 1] - x[:, : c - 1]
        if np.any(self.reflux_shift) or self.thermo.vapor_dependent:
            kv = self.thermo.k_values(s.T[t] + self.reflux_shift, self.pressures[t], x)
            K, dlnK_dT, dlnK_dx = kv.K, kv.d_ln_K_dT, kv.d_ln_K_dx
        else:
            K, dlnK_dT, dlnK_dx = s.K[t], s.dlnK_dT[t], s.dlnK_dx[t]
        S = np.einsum("ni,ni->n", K, x)
        fixed = ~np.isnan(self.reflux_temperature)
        equilibrium[t, c - 1] = np.where(fixed, (s.T[t] - self.reflux_temperature) / TEMPERATURE_SCALE, np.log(S))
        return K, dlnK_dT, dlnK_dx, S, fixed

    def _jacobian(self, s, extras, rates, U, W, bubble, extra_entries) -> sp.csc_matrix:
        c, w = self.c, self.width
        gLx = np.einsum("nk,nk->n", s.x, s.dh_L_dx)
        gVy = np.einsum("nk,nk->n", s.y, s.dh_V_dx)
        blocks = stage_blocks(s, gLx, gVy, U, W, self.efficiencies, self.energy_scale)
        if bubble is not None:
            self._total_condenser_blocks(s, bubble, blocks)
        liquid_blocks, vapor_blocks = edge_blocks(s, gLx, gVy, self.liquid_edges, self.vapor_edges, self.efficiencies, self.energy_scale,
                                                  self.vapor_mixes)
        liquid_blocks *= self.liquid_weights[:, None, None]
        vapor_blocks *= self.vapor_weights[:, None, None]
        transfer_blocks = self._transfer_blocks(s, rates, gLx, gVy)
        rows = [self._diag[0], self._liquid[0], self._vapor[0], self._transfer[0]]
        cols = [self._diag[1], self._liquid[1], self._vapor[1], self._transfer[1]]
        vals = [blocks.ravel(), liquid_blocks.ravel(), vapor_blocks.ravel(), transfer_blocks.ravel()]
        # the extra unknowns in the stage rows: duties in their enthalpy balances, free rates
        on_stage = np.flatnonzero(self.extra_duty_stage >= 0)
        rows.append(self.extra_duty_stage[on_stage] * w + 2 * c)
        cols.append(self.stage_size + on_stage)
        vals.append(-np.ones(len(on_stage)))
        free = np.flatnonzero(self.transfer_extra >= 0)
        if len(free):
            src, dst, liquid = self.transfer_source[free], self.transfer_destination[free], self.transfer_liquid[free]
            composition = np.where(liquid[:, None], s.x[src], s.y[src])
            enthalpy = np.where(liquid, s.h_L[src], s.h_V[src]) / self.energy_scale
            per_row = np.concatenate([composition, enthalpy[:, None]], axis=1)  # (F, c+1)
            local = np.r_[np.arange(c), 2 * c]
            column = np.repeat(self.stage_size + self.transfer_extra[free], c + 1)
            for stage, sign in ((src, 1.0), (dst, -1.0)):
                rows.append((stage[:, None] * w + local[None, :]).ravel())
                cols.append(column)
                vals.append(sign * per_row.ravel())
        if len(self.free_feeds):  # a free feed's rate in its stage's component and enthalpy balances
            local = np.r_[np.arange(c), 2 * c]
            rows.append((self.free_feed_stage[:, None] * w + local[None, :]).ravel())
            cols.append(np.repeat(self.stage_size + self.free_feed_extra, c + 1))
            vals.append(-np.concatenate([self.free_feed_z, self.free_feed_h[:, None]], axis=1).ravel())
        for k, (entry_cols, entry_vals) in enumerate(extra_entries):
            rows.append(np.full(len(entry_cols), self.stage_size + k))
            cols.append(np.asarray(entry_cols, dtype=int))
            vals.append(np.asarray(entry_vals, dtype=float))
        if self._assembly is None or not _same_pieces(rows + cols, self._assembly_pieces):
            self._assembly = SparseAssembly(np.concatenate(rows), np.concatenate(cols), self.size)
            self._assembly_pieces = rows + cols
        return self._assembly.matrix(np.concatenate(vals))

    def _transfer_blocks(self, s: StageState, rates, gLx, gVy) -> np.ndarray:
        """(M, w, w): derivatives of a rate connection's destination rows with respect to the
        unknowns of its source (the stream carries the source's composition and enthalpy)."""
        c, w = self.c, self.width
        M = len(rates)
        blocks = np.zeros((M, w, w))
        if not M:
            return blocks
        src, liquid = self.transfer_source, self.transfer_liquid
        eye = np.eye(c)
        inv_es = 1.0 / self.energy_scale
        for is_liquid, slot, comp, total, dh_dT, dh_dx, g in (
            (True, slice(1, 1 + c), s.x, s.L_safe, s.dh_L_dT, s.dh_L_dx, gLx),
            (False, slice(1 + c, w), s.y, s.V_safe, s.dh_V_dT, s.dh_V_dx, gVy),
        ):
            m = np.flatnonzero(liquid == is_liquid)
            if not len(m):
                continue
            k = src[m]
            ratio = rates[m] / total[k]
            blocks[m, :c, slot] = -ratio[:, None, None] * (eye[None] - comp[k][:, :, None])
            blocks[m, 2 * c, 0] = -rates[m] * dh_dT[k] * inv_es
            blocks[m, 2 * c, slot] = -ratio[:, None] * (dh_dx[k] - g[k][:, None]) * inv_es
        return blocks

    def _total_condenser_blocks(self, s: StageState, bubble, blocks: np.ndarray) -> None:
        c, t = self.c, self.total_condensers
        K, dlnK_dT, dlnK_dx, S, fixed = bubble
        x, y = s.x[t], s.y[t]
        eye = np.eye(c)
        blocks[t, c : 2 * c, :] = 0.0
        blocks[t, c : 2 * c - 1, 1 : 1 + c] = -(eye[None, : c - 1] - x[:, : c - 1, None]) / s.L_safe[t][:, None, None]
        blocks[t, c : 2 * c - 1, 1 + c :] = (eye[None, : c - 1] - y[:, : c - 1, None]) / s.V_safe[t][:, None, None]
        G = np.einsum("nim,nm->ni", dlnK_dx, x)
        dT = np.einsum("ni,ni->n", K, x * dlnK_dT) / S
        dl = (K - S[:, None] + np.einsum("ni,nik->nk", x * K, dlnK_dx - G[:, :, None])) / (S * s.L_safe[t])[:, None]
        blocks[t, 2 * c - 1, 0] = np.where(fixed, 1.0 / TEMPERATURE_SCALE, dT)
        blocks[t, 2 * c - 1, 1 : 1 + c] = np.where(fixed[:, None], 0.0, dl)

    # ------------------------------------------------------------------ after convergence
    def stage_duties(self, X: np.ndarray) -> np.ndarray:
        """Heat added to each stage (W): fixed heaters and coolers, exchangers on connections
        entering it, condenser and reboiler duties."""
        return self.stage_duties_scaled(self.unpack(X)[3]) * self.flow_scale * self.energy_scale


class SparseAssembly:
    """The CSC layout of a fixed list of (row, column) entries, duplicates summed, found once;
    each later matrix with the same entries only sums its values into place (``np.bincount``)
    instead of sorting the triplets again. Entries that sum to exactly zero are dropped, as a
    triplet build without zero values drops them; the layout of the last set of nonzeros is
    kept, since it seldom changes from one Newton point to the next."""

    def __init__(self, rows: np.ndarray, cols: np.ndarray, size: int) -> None:
        self.rows, self.cols, self.size = rows, cols, size
        unique, position = np.unique(cols.astype(np.int64) * size + rows, return_inverse=True)
        self.position = position.ravel()
        self.entry_rows = (unique % size).astype(np.int32)
        self.entry_columns = unique // size
        self._nonzero_layout: tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray] | None = None

    def matches(self, rows: np.ndarray, cols: np.ndarray) -> bool:
        return rows.shape == self.rows.shape and np.array_equal(rows, self.rows) and np.array_equal(cols, self.cols)

    def matrix(self, vals: np.ndarray) -> sp.csc_matrix:
        data = np.bincount(self.position, weights=vals, minlength=len(self.entry_rows))
        nonzero = data != 0
        layout = self._nonzero_layout
        if layout is None or not np.array_equal(nonzero, layout[0]):
            kept = np.flatnonzero(nonzero)
            indptr = np.zeros(self.size + 1, dtype=np.int32)
            np.cumsum(np.bincount(self.entry_columns[kept], minlength=self.size), out=indptr[1:])
            layout = self._nonzero_layout = (nonzero, kept, self.entry_rows[kept], indptr)
        _, kept, indices, indptr = layout
        # the index arrays copied: a caller may sort or prune the matrix in place
        return sp.csc_matrix((data[kept], indices.copy(), indptr.copy()), shape=(self.size, self.size), copy=False)


class DeferredEvaluation:
    """Residuals at once, the Jacobian built on its first reading (then kept): Newton reads the
    Jacobian only at the points it accepts. ``has_jacobian`` says whether it was built."""

    __slots__ = ("residuals", "_build", "_jacobian")

    def __init__(self, residuals: np.ndarray, build) -> None:
        self.residuals, self._build, self._jacobian = residuals, build, None

    @property
    def jacobian(self) -> sp.csc_matrix:
        if self._jacobian is None:
            self._jacobian, self._build = self._build(), None
        return self._jacobian

    @property
    def has_jacobian(self) -> bool:
        return self._jacobian is not None


def _same_pieces(pieces: list[np.ndarray], known: list[np.ndarray]) -> bool:
    """Whether two lists of index arrays hold the same entries (the fixed patterns are the same
    objects each time, the rest short)."""
    return len(pieces) == len(known) and all(a is b or np.array_equal(a, b) for a, b in zip(pieces, known))


def _edges(matrix: sp.csr_matrix) -> tuple[np.ndarray, np.ndarray]:
    """([source, destination] rows, weights) of an inflow matrix (rows receive)."""
    coo = matrix.tocoo()
    return np.stack([coo.col, coo.row], axis=1).astype(int).reshape(-1, 2), coo.data.astype(float)
