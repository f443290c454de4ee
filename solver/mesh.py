"""Residuals and sparse analytic Jacobian of the MESH and specification equations.

Unknowns per stage j (2c+1, stage-major): temperature ``T_j`` (K) and the component flows of
liquid ``l_ij`` and vapor ``v_ij`` leaving the stage for its neighbours, divided by
``flow_scale`` (the total feed). This module alone knows that layout: everything else hands
it a :class:`~solver.streams.StageProfile` (SI) and gets one back
(:meth:`MeshSystem.unknowns`, :meth:`MeshSystem.profile`). Side draws take the stage's own
composition: ``u_ij = U_j x_ij``, ``w_ij = W_j y_ij``.

Equations per stage (the formulation of Naphtali & Sandholm, AIChE J. 17 (1971) 148):

* component balances  ``l_ij (1 + U_j/L_j) + v_ij (1 + W_j/V_j) - sum_in l - sum_in v - f_ij = 0``
* Murphree vapor-efficiency relations
  ``y_ij - E_j K_ij x_ij - (1 - E_j) y_in,ij = 0`` with ``y_in`` the mixed vapor entering the
  stage (their sum over i is the bubble-point condition, so no separate summation equation);
* enthalpy balance  ``(L+U) h_L + (V+W) h_V - sum_in L h_L - sum_in V h_V - H_F - Q = 0``,
  divided by ``flow_scale * energy_scale``.

Notation in the code follows these formulas: ``L``, ``V`` total flows, ``U``, ``W`` side draws
of liquid and vapor, ``E`` Murphree efficiencies, ``K`` K-values, ``h_L``, ``h_V`` molar
enthalpies of the streams in each stage's liquid and vapor slots.

A total condenser's equilibrium rows become ``y_i - x_i = 0`` (i < c) and the bubble-point
condition of the reflux at ``T + subcooling`` (or ``T - T_reflux = 0``). The enthalpy balances
of the condenser and the reboiler are replaced by the specifications, each resolved into a
:class:`~solver.spec_kinds.SpecRow` and evaluated by its entry of
:data:`~solver.spec_kinds.SPEC_REGISTRY` (the registry networks use); a duty spec keeps its
exchanger's balance and subtracts the duty. The duties follow from those balances afterwards.

The Jacobian is built from dense per-stage and per-edge blocks scattered into one
``scipy.sparse`` CSC matrix; the sparsity comes from the stage graph only.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Sequence

import numpy as np
import scipy.sparse as sp

from .case import Spec
from .errors import SpecError
from .mesh_blocks import TINY, StageLayout, StageState, edge_blocks, mesh_residuals, stage_blocks, stage_state
from .network import StageGraph
from .spec_kinds import SPEC_REGISTRY, TEMPERATURE_SCALE, ProductRef, SpecRow, column_spec_rows
from .streams import FlashedFeed, StageProfile

__all__ = [
    "TEMPERATURE_SCALE",
    "CondenserSetting",
    "Evaluation",
    "MeshSystem",
    "PlacedSpec",
    "assign_specs",
    "column_rows",
    "feed_sums_by_stage",
]

_TINY = TINY  # floor of a total flow that divides component flows
_EXCHANGERS = ("condenser", "reboiler")


@dataclass(frozen=True)
class CondenserSetting:
    """How the total condenser's temperature is fixed: saturated (both None), a reflux
    temperature in K, or a subcooling below the bubble point in K."""

    reflux_temperature: float | None = None
    reflux_subcooling: float | None = None


@dataclass(frozen=True)
class PlacedSpec:
    """A spec's row (:class:`~solver.spec_kinds.SpecRow`, evaluated by its registry entry) and
    the stage whose enthalpy-balance row it takes. A spec that sets the condenser's or the
    reboiler's duty (``row.extra`` names it) takes that exchanger's own row and keeps its
    Jacobian: the duty is the balance's value (:meth:`MeshSystem.duty_term`)."""

    row: SpecRow
    stage: int

    @property
    def keeps_balance(self) -> bool:
        return self.row.extra in _EXCHANGERS


@dataclass(frozen=True)
class Evaluation:
    residuals: np.ndarray
    jacobian: sp.csc_matrix | None


@dataclass(frozen=True)
class _RefluxBubblePoint:
    """The total condenser's bubble-point row ``ln sum_i K_i x_i = 0`` at ``T + subcooling``:
    the K-values there, their log-derivatives and ``sum_i K_i x_i``."""

    K: np.ndarray
    dlnK_dT: np.ndarray
    dlnK_dx: np.ndarray
    sum_Kx: float


def feed_sums_by_stage(feeds: Sequence[FlashedFeed], stage_count: int, component_count: int) -> tuple[np.ndarray, np.ndarray]:
    """The feeds summed stage by stage: component flows ``(N, c)`` mol/s and enthalpy flows
    ``(N,)`` W (flow times the molar enthalpy the balance takes)."""
    component_flows = np.zeros((stage_count, component_count))
    enthalpy_flows = np.zeros(stage_count)
    for feed in feeds:
        component_flows[feed.stage - 1] += feed.flow * np.asarray(feed.z, dtype=float)
        enthalpy_flows[feed.stage - 1] += feed.flow * feed.h
    return component_flows, enthalpy_flows


def column_rows(graph: StageGraph, specs: Sequence[Spec], component_names: Sequence[str]) -> tuple[SpecRow, ...]:
    """The column's specs as rows (:func:`~solver.spec_kinds.column_spec_rows`), in their
    order: the distillate is the top stage's vapor slot, the bottoms the bottom stage's liquid
    slot, each a share of 1. Raises :class:`SpecError` for a spec that does not fit the column."""
    exchangers = [name for name, present in zip(_EXCHANGERS, (graph.condenser != "none", graph.has_reboiler)) if present]
    stage_of = {"condenser": graph.top_stage, "reboiler": graph.bottom_stage}
    products = {"distillate": ProductRef("distillate", graph.top_stage, "vapor", share=1.0),
                "bottoms": ProductRef("bottoms", graph.bottom_stage, "liquid", share=1.0)}
    return column_spec_rows(specs, component_names, stage_count=graph.stage_count, exchangers=exchangers,
                            exchanger_stage=stage_of.__getitem__, product=products.__getitem__, stage_index=lambda n: n - 1)


def assign_specs(graph: StageGraph, specs: Sequence[Spec], component_names: Sequence[str]) -> tuple[PlacedSpec, ...]:
    """Check the degrees of freedom, resolve each spec into its row (:func:`column_rows`) and
    give it the enthalpy-balance row it takes (in the order of ``specs``).

    A column has one degree of freedom for a condenser and one for a reboiler (feeds, stage
    count, pressures, draws and side duties being fixed). Raises :class:`SpecError` naming the
    specs when there are too many or too few, or a spec does not fit the column."""
    free_rows = []
    if graph.condenser != "none":
        free_rows.append(graph.top_stage)
    if graph.has_reboiler:
        free_rows.append(graph.bottom_stage)
    given = ", ".join(s.key or s.kind for s in specs) or "none"
    if len(specs) != len(free_rows):
        needs = []
        if graph.condenser != "none":
            needs.append("one for the condenser")
        if graph.has_reboiler:
            needs.append("one for the reboiler")
        need_text = " and ".join(needs) if needs else "none (no condenser, no reboiler)"
        raise SpecError(
            f"the column has {len(free_rows)} degree(s) of freedom ({need_text}) but {len(specs)} "
            f"spec(s) were given: {given}. Give exactly {len(free_rows)} of: reflux_ratio, boilup_ratio, "
            "distillate_rate, bottoms_rate, condenser_duty, reboiler_duty, distillate/bottoms mole fraction, "
            "recovery, stage_temperature"
        )
    spec_rows = column_rows(graph, specs, component_names)
    stage_of = {"condenser": graph.top_stage, "reboiler": graph.bottom_stage}
    remaining = list(free_rows)
    stages: dict[int, int] = {}
    for k, row in enumerate(spec_rows):
        if row.extra in stage_of:
            wanted = stage_of[row.extra]
            if wanted not in remaining:
                raise SpecError(f"{row.label}: given twice")
            remaining.remove(wanted)
            stages[k] = wanted
    pending = [k for k in range(len(spec_rows)) if k not in stages]
    stages.update(zip(pending, remaining))
    rows = [PlacedSpec(row, stages[k]) for k, row in enumerate(spec_rows)]
    return tuple(rows)


class MeshSystem(StageLayout):
    """The MESH + specification equations of one column, ready for Newton's method.

    ``feeds`` are the flashed feeds (any order, several per stage allowed); ``specs`` as many
    as the column has degrees of freedom, kept in the given order (:attr:`specs`)."""

    def __init__(
        self,
        graph: StageGraph,
        thermo,
        feeds: Sequence[FlashedFeed],
        specs: Sequence[Spec],
        component_names: Sequence[str],
        *,
        condenser_setting: CondenserSetting = CondenserSetting(),
        flow_scale: float | None = None,
        energy_scale: float | None = None,
    ) -> None:
        self.graph = graph
        self.thermo = thermo
        self.feeds = tuple(feeds)
        self.specs = tuple(specs)
        self.component_names = tuple(component_names)
        self.c = len(self.component_names)
        self.N = graph.stage_count
        self.width = 2 * self.c + 1
        self.size = self.N * self.width
        self.spec_rows = assign_specs(graph, self.specs, self.component_names)
        #: the specs' rows (:class:`~solver.spec_kinds.SpecRow`), in the order of :attr:`specs`
        self.rows = tuple(placed.row for placed in self.spec_rows)
        self.condenser_setting = condenser_setting
        #: (N, c) mol/s and (N,) W: the feeds summed stage by stage
        self.feed_component_flows, self.feed_enthalpy_flows = feed_sums_by_stage(self.feeds, self.N, self.c)
        total_feed = float(self.feed_component_flows.sum())
        self.flow_scale = float(flow_scale or total_feed or 1.0)
        self.energy_scale = float(energy_scale or thermo.cmo_latent_heat)
        self.pressures = graph.pressures
        self.efficiencies = graph.efficiencies
        self.feed_flows = self.feed_component_flows / self.flow_scale
        self.feed_enthalpy = self.feed_enthalpy_flows / (self.flow_scale * self.energy_scale)
        self.liquid_draws = graph.liquid_draws / self.flow_scale
        self.vapor_draws = graph.vapor_draws / self.flow_scale
        self.fixed_duties = graph.fixed_duties / (self.flow_scale * self.energy_scale)
        self.total_feed_by_component = self.feed_flows.sum(axis=0)
        # feeds less side draws: what leaves as distillate and bottoms (scaled)
        self.net_feed = float(self.total_feed_by_component.sum() - self.liquid_draws.sum() - self.vapor_draws.sum())
        self.top = graph.top_stage
        self.bottom = graph.bottom_stage
        self.total_condenser = graph.condenser == "total"
        self._build_patterns()

    # ------------------------------------------------------------------ layout
    def temperature_index(self) -> np.ndarray:
        return np.arange(self.N) * self.width

    def flow_mask(self) -> np.ndarray:
        mask = np.ones(self.size, dtype=bool)
        mask[self.temperature_index()] = False
        return mask

    def unpack(self, X: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(T (N,) K, l (N,c), v (N,c)) in scaled flow units."""
        block = X.reshape(self.N, self.width)
        return block[:, 0], block[:, 1 : 1 + self.c], block[:, 1 + self.c :]

    def pack(self, T: np.ndarray, l: np.ndarray, v: np.ndarray) -> np.ndarray:
        return np.concatenate([np.asarray(T)[:, None], l, v], axis=1).ravel()

    def unknowns(self, profile: StageProfile) -> np.ndarray:
        """The scaled unknowns of a stage profile (its pressures are the column's, not read)."""
        if profile.stage_count != self.N or profile.x.shape[1] != self.c:
            raise ValueError(
                f"a start profile of {profile.stage_count} stages and {profile.x.shape[1]} components does not fit "
                f"a column of {self.N} stages and {self.c} components"
            )
        liquid = profile.liquid_flow[:, None] * profile.x / self.flow_scale
        vapor = profile.vapor_flow[:, None] * profile.y / self.flow_scale
        return self.pack(np.asarray(profile.temperature, dtype=float), liquid, vapor)

    def profile(self, X: np.ndarray) -> StageProfile:
        """The stage profile (SI) of the scaled unknowns ``X``."""
        T, l, v = self.unpack(X)
        L, V = l.sum(axis=1), v.sum(axis=1)
        x = l / np.maximum(L, _TINY)[:, None]
        y = v / np.maximum(V, _TINY)[:, None]
        return StageProfile(T.copy(), self.pressures.copy(), L * self.flow_scale, V * self.flow_scale, x, y)

    def variable_name(self, index: int) -> str:
        stage, offset = divmod(int(index), self.width)
        if offset == 0:
            return f"temperature of stage {stage + 1}"
        if offset <= self.c:
            return f"liquid flow of {self.component_names[offset - 1]} leaving stage {stage + 1}"
        return f"vapor flow of {self.component_names[offset - 1 - self.c]} leaving stage {stage + 1}"

    def equation_name(self, index: int) -> str:
        stage, offset = divmod(int(index), self.width)
        if offset < self.c:
            return f"balance of {self.component_names[offset]} on stage {stage + 1}"
        if offset < 2 * self.c:
            return f"equilibrium of {self.component_names[offset - self.c]} on stage {stage + 1}"
        for row in self.spec_rows:
            if row.stage == stage:
                return f"specification {row.row.label}"
        return f"enthalpy balance of stage {stage + 1}"

    def _build_patterns(self) -> None:
        """Row and column indices of the dense blocks, computed once."""
        w = self.width
        local_rows, local_cols = np.meshgrid(np.arange(w), np.arange(w), indexing="ij")
        stages = np.arange(self.N)
        self._diag_rows = (stages[:, None, None] * w + local_rows[None]).ravel()
        self._diag_cols = (stages[:, None, None] * w + local_cols[None]).ravel()
        le = self.graph.liquid_edges
        ve = self.graph.vapor_edges
        self._liq_rows = (le[:, 1][:, None, None] * w + local_rows[None]).ravel()
        self._liq_cols = (le[:, 0][:, None, None] * w + local_cols[None]).ravel()
        self._vap_rows = (ve[:, 1][:, None, None] * w + local_rows[None]).ravel()
        self._vap_cols = (ve[:, 0][:, None, None] * w + local_cols[None]).ravel()
        replaced = [row.stage * w + 2 * self.c for row in self.spec_rows if not row.keeps_balance]
        self._replaced_rows = np.array(replaced, dtype=int)

    # ------------------------------------------------------------------ evaluation
    def evaluate(self, X: np.ndarray, jacobian: bool = True, state: StageState | None = None) -> Evaluation:
        """Scaled residuals at the unknowns ``X`` (stage-major: c component balances, c
        equilibrium relations, then the enthalpy balance or the spec that replaces it), and
        with ``jacobian`` their sparse analytic Jacobian. ``state``: the :meth:`stage_state` of
        ``X`` if already known (also from a system of the same thermo, pressures and draws)."""
        state = state if state is not None else self._stage_state(X)
        balance, equilibrium, energy = self._mesh_residuals(state)
        reflux_bubble_point = self._total_condenser_rows(state, equilibrium) if self.total_condenser else None
        residual_blocks = np.concatenate([balance, equilibrium, energy[:, None]], axis=1)
        spec_values, spec_entries = self._spec_residuals(state, energy, jacobian)
        for row, value in zip(self.spec_rows, spec_values):
            residual_blocks[row.stage, 2 * self.c] = value
        residuals = residual_blocks.ravel()
        if not jacobian:
            return Evaluation(residuals, None)
        return Evaluation(residuals, self._jacobian(state, reflux_bubble_point, spec_entries))

    def stage_state(self, X: np.ndarray) -> StageState:
        """Flows, compositions and properties of every stage at the unknowns ``X``."""
        return self._stage_state(X)

    def _stage_state(self, X: np.ndarray) -> StageState:
        T, l, v = self.unpack(X)
        return stage_state(self.thermo, T, l, v, self.pressures, self.graph.vapor_inflow,
                           self.liquid_draws, self.vapor_draws, self._vapor_slot)

    def _mesh_residuals(self, s: StageState) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Component balances (N, c), Murphree relations (N, c), enthalpy balances (N,)."""
        return mesh_residuals(s, self.graph.liquid_inflow, self.graph.vapor_inflow, self.liquid_draws, self.vapor_draws,
                              self.efficiencies, self.feed_flows, self.feed_enthalpy, self.fixed_duties, self.energy_scale)

    def _total_condenser_rows(self, s: StageState, equilibrium: np.ndarray) -> _RefluxBubblePoint | None:
        """Overwrite the total condenser's equilibrium rows in place: ``y_i = x_i`` (i < c) and
        the reflux temperature, or the reflux's bubble point (whose K-values it returns)."""
        c, t = self.c, self.top
        T, x, y = s.T, s.x, s.y
        equilibrium[t, : c - 1] = y[t, : c - 1] - x[t, : c - 1]
        setting = self.condenser_setting
        if setting.reflux_temperature is not None:
            equilibrium[t, c - 1] = (T[t] - setting.reflux_temperature) / TEMPERATURE_SCALE
            return None
        shift = setting.reflux_subcooling or 0.0
        if shift or self.thermo.vapor_dependent:
            # with an equation of state the K-values of the bubble point are those of the
            # reflux's incipient vapor, not of the liquid distillate in the vapor slot
            kv = self.thermo.k_values(T[t : t + 1] + shift, self.pressures[t : t + 1], x[t : t + 1])
            K, dlnK_dT, dlnK_dx = kv.K[0], kv.d_ln_K_dT[0], kv.d_ln_K_dx[0]
        else:
            K, dlnK_dT, dlnK_dx = s.K[t], s.dlnK_dT[t], s.dlnK_dx[t]
        sum_Kx = float(K @ x[t])
        equilibrium[t, c - 1] = np.log(sum_Kx)
        return _RefluxBubblePoint(K, dlnK_dT, dlnK_dx, sum_Kx)

    def _jacobian(self, s: StageState, reflux_bubble_point: _RefluxBubblePoint | None, spec_entries) -> sp.csc_matrix:
        """Scatter the stage blocks, the edge blocks and the spec entries into one CSC matrix;
        the rows a spec replaces keep only the spec's entries."""
        # x . dh_L/dx and y . dh_V/dx of every stage, shared by its own block and its edges'
        gLx = np.einsum("nk,nk->n", s.x, s.dh_L_dx)
        gVy = np.einsum("nk,nk->n", s.y, s.dh_V_dx)
        stage_blocks = self._stage_blocks(s, gLx, gVy)
        if self.total_condenser:
            self._total_condenser_blocks(s, reflux_bubble_point, stage_blocks)
        liquid_edge_blocks, vapor_edge_blocks = self._edge_blocks(s, gLx, gVy)
        rows = np.concatenate([self._diag_rows, self._liq_rows, self._vap_rows])
        cols = np.concatenate([self._diag_cols, self._liq_cols, self._vap_cols])
        vals = np.concatenate([stage_blocks.ravel(), liquid_edge_blocks.ravel(), vapor_edge_blocks.ravel()])
        if len(self._replaced_rows):
            vals[np.isin(rows, self._replaced_rows)] = 0.0
        if spec_entries:
            spec_rows, spec_cols, spec_vals = (np.concatenate(part) for part in zip(*spec_entries))
            rows = np.concatenate([rows, spec_rows])
            cols = np.concatenate([cols, spec_cols])
            vals = np.concatenate([vals, spec_vals])
        keep = vals != 0.0
        return sp.csc_matrix((vals[keep], (rows[keep], cols[keep])), shape=(self.size, self.size))

    def enthalpy_balance_jacobian(self, s: StageState) -> sp.csr_matrix:
        """(N, size): the derivatives of every stage's scaled enthalpy balance (as
        :meth:`stage_duties` has it, before a spec replaces the row) in the unknowns, at the
        state ``s``."""
        gLx = np.einsum("nk,nk->n", s.x, s.dh_L_dx)
        gVy = np.einsum("nk,nk->n", s.y, s.dh_V_dx)
        row = 2 * self.c
        liquid_edge_blocks, vapor_edge_blocks = self._edge_blocks(s, gLx, gVy)
        w, stages, local = self.width, np.arange(self.N), np.arange(self.width)
        le, ve = self.graph.liquid_edges, self.graph.vapor_edges
        rows = np.concatenate([np.repeat(stages, w), np.repeat(le[:, 1], w), np.repeat(ve[:, 1], w)])
        cols = np.concatenate([(stages[:, None] * w + local).ravel(), (le[:, 0][:, None] * w + local).ravel(),
                               (ve[:, 0][:, None] * w + local).ravel()])
        vals = np.concatenate([self._stage_blocks(s, gLx, gVy)[:, row, :].ravel(),
                               liquid_edge_blocks[:, row, :].ravel(), vapor_edge_blocks[:, row, :].ravel()])
        return sp.csr_matrix((vals, (rows, cols)), shape=(self.N, self.size))

    def _stage_blocks(self, s: StageState, gLx: np.ndarray, gVy: np.ndarray) -> np.ndarray:
        """(N, w, w): derivatives of each stage's rows with respect to its own unknowns."""
        return stage_blocks(s, gLx, gVy, self.liquid_draws, self.vapor_draws, self.efficiencies, self.energy_scale)

    def _total_condenser_blocks(self, s: StageState, bubble: _RefluxBubblePoint | None, blocks: np.ndarray) -> None:
        """The derivatives of the total condenser's equilibrium rows, in place."""
        c, t = self.c, self.top
        x, y = s.x, s.y
        eye = np.eye(c)
        blocks[t, c : 2 * c, :] = 0.0
        blocks[t, c : 2 * c - 1, 1 : 1 + c] = -(eye[: c - 1] - x[t, : c - 1, None]) / s.L_safe[t]
        blocks[t, c : 2 * c - 1, 1 + c :] = (eye[: c - 1] - y[t, : c - 1, None]) / s.V_safe[t]
        if bubble is None:
            blocks[t, 2 * c - 1, 0] = 1.0 / TEMPERATURE_SCALE
            return
        K, S = bubble.K, bubble.sum_Kx
        blocks[t, 2 * c - 1, 0] = float(K @ (x[t] * bubble.dlnK_dT)) / S
        G = bubble.dlnK_dx @ x[t]
        blocks[t, 2 * c - 1, 1 : 1 + c] = (K - S + (x[t] * K) @ (bubble.dlnK_dx - G[:, None])) / (S * s.L_safe[t])

    def _edge_blocks(self, s: StageState, gLx: np.ndarray, gVy: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(E_L, w, w) and (E_V, w, w): derivatives of the receiving stage's rows with respect
        to the unknowns of the stage whose liquid (vapor) enters it, one block per edge."""
        return edge_blocks(s, gLx, gVy, self.graph.liquid_edges, self.graph.vapor_edges, self.efficiencies, self.energy_scale)

    # ------------------------------------------------------------------ specifications
    def duty_term(self, s: StageState, energy: np.ndarray, row: SpecRow):
        """(scaled duty, no columns, no values) of the exchanger a duty spec sets: its stage's
        enthalpy balance without a duty (``energy``), whose row and Jacobian the spec keeps."""
        stage = self.top if row.extra == "condenser" else self.bottom
        return energy[stage], np.array([], dtype=int), np.array([])

    def _spec_residuals(self, s: StageState, energy: np.ndarray, jacobian: bool):
        """Residual of each spec row by its registry entry
        (:data:`~solver.spec_kinds.SPEC_REGISTRY`) and its Jacobian entries (row, col, value
        arrays); ``energy`` the enthalpy balances, read by a duty spec."""
        values, entries = [], []
        for placed in self.spec_rows:
            row = placed.row
            value, cols, vals = SPEC_REGISTRY[row.kind].residual(self, s, energy, row)
            values.append(value)
            if jacobian and len(cols):
                entries.append((np.full(len(cols), placed.stage * self.width + 2 * self.c), cols, vals))
        return values, entries

    # ------------------------------------------------------------------ after convergence
    def stage_enthalpies(self, X: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """(h_L, h_V) in J/mol of the streams in each stage's slots (the vapor slot of a total
        condenser holds liquid distillate)."""
        T, l, v = self.unpack(X)
        x = l / np.maximum(l.sum(axis=1), _TINY)[:, None]
        y = v / np.maximum(v.sum(axis=1), _TINY)[:, None]
        hL = self.thermo.liquid_enthalpy(T, x, pressure=self.pressures).molar
        return hL, self._vapor_slot(T, y, self.thermo.vapor_enthalpy(T, y, pressure=self.pressures))[0]

    def _vapor_slot(self, T: np.ndarray, y: np.ndarray, vapor) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """(h, dh/dT, dh/dy) of the stream in each stage's vapor slot: the vapor's, except on a
        total condenser, whose vapor slot holds the liquid distillate."""
        if not self.total_condenser:
            return vapor.molar, vapor.d_dT, vapor.d_dx
        h, dh_dT, g = vapor.molar.copy(), vapor.d_dT.copy(), vapor.d_dx.copy()
        t = self.top
        distillate = self.thermo.liquid_enthalpy(T[t : t + 1], y[t : t + 1], pressure=self.pressures[t : t + 1])
        h[t], dh_dT[t], g[t] = distillate.molar[0], distillate.d_dT[0], distillate.d_dx[0]
        return h, dh_dT, g

    def stage_duties(self, X: np.ndarray, state: StageState | None = None) -> np.ndarray:
        """Heat added to each stage (W) from its enthalpy balance; on stages other than the
        condenser and reboiler it equals the fixed side duty. ``state`` as in :meth:`evaluate`."""
        T, l, v = self.unpack(X)
        L, V = l.sum(axis=1), v.sum(axis=1)
        hL, hV = self.stage_enthalpies(X) if state is None else (state.h_L, state.h_V)
        A_L, A_V = self.graph.liquid_inflow, self.graph.vapor_inflow
        out = (L + self.liquid_draws) * hL + (V + self.vapor_draws) * hV
        net = out - A_L @ (L * hL) - A_V @ (V * hV) - self.feed_enthalpy * self.energy_scale
        return net * self.flow_scale
