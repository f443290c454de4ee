"""The MESH equations stage by stage, vectorized over stages: the state of every stage at one
point, the residuals of the component balances, Murphree relations and enthalpy balances, and
the dense Jacobian blocks of each stage (in its own unknowns) and of each liquid or vapor edge
(in the unknowns of the stage it comes from). Shared by one column (:mod:`solver.mesh`) and a
network of columns (:mod:`solver.network_mesh`); the formulation is that of Naphtali &
Sandholm, AIChE J. 17 (1971) 148 (see :mod:`solver.mesh` for the equations).

Flows are scaled (fractions of the total feed), enthalpy rows are divided by ``energy_scale``
(J/mol); ``U`` and ``W`` are the liquid and vapor drawn from each stage besides the flows to
its neighbours (side draws, and in a network the rate connections), with the stage's own
composition.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import numpy as np

__all__ = ["TINY", "StageLayout", "StageState", "edge_blocks", "mesh_residuals", "stage_blocks", "stage_state"]

TINY = 1e-300  # floor of a total flow that divides component flows


class StageLayout:
    """Where a stage's unknowns sit (stage-major, ``width = 2c + 1`` per stage: temperature,
    liquid component flows, vapor component flows), as the spec residuals of
    :mod:`solver.spec_kinds` read them; a system sets ``width`` and ``c``."""

    width: int
    c: int

    def T_col(self, g: int) -> int:
        return g * self.width

    def l_col(self, g: int) -> int:
        return g * self.width + 1

    def v_col(self, g: int) -> int:
        return g * self.width + 1 + self.c


@dataclass(frozen=True)
class StageState:
    """Flows, compositions and properties of every stage at one point, shared by the residuals
    and the Jacobian (flows scaled)."""

    T: np.ndarray
    l: np.ndarray
    v: np.ndarray
    L: np.ndarray
    V: np.ndarray
    L_safe: np.ndarray
    V_safe: np.ndarray
    x: np.ndarray
    y: np.ndarray
    K: np.ndarray
    dlnK_dT: np.ndarray
    dlnK_dx: np.ndarray
    dlnK_dy: np.ndarray | None  # only where K depends on the vapor (an equation of state)
    h_L: np.ndarray
    dh_L_dT: np.ndarray
    dh_L_dx: np.ndarray
    h_V: np.ndarray
    dh_V_dT: np.ndarray
    dh_V_dx: np.ndarray
    liquid_draw_ratio: np.ndarray  # U / L
    vapor_draw_ratio: np.ndarray  # W / V
    vapor_in: np.ndarray  # (N, c) component flows of the vapor entering each stage
    V_in_safe: np.ndarray  # total vapor entering each stage
    y_in: np.ndarray  # composition of the mixed vapor entering each stage


def stage_state(thermo, T: np.ndarray, l: np.ndarray, v: np.ndarray, pressures: np.ndarray, vapor_inflow,
                U: np.ndarray, W: np.ndarray, vapor_slot: Callable | None, liquid_slots: np.ndarray | None = None,
                mixing_inflow=None) -> StageState:
    """The state of every stage: ``vapor_slot(T, y, vapor)`` gives (h, dh/dT, dh/dy) of the
    stream in each stage's vapor slot from the vapor's properties (a total condenser's slot
    holds liquid). Or, without ``vapor_slot``, the stages ``liquid_slots`` hold liquid of the
    vapor's composition in their vapor slots, evaluated in the same call of the thermo package
    as every stage (one call instead of two). ``mixing_inflow`` (default ``vapor_inflow``) is
    the part of the vapor-slot inflow that is vapor, which a Murphree relation mixes: without
    the liquid distillate of a total condenser sent on by a connection."""
    L = l.sum(axis=1)
    V = v.sum(axis=1)
    L_safe = np.maximum(L, TINY)
    V_safe = np.maximum(V, TINY)
    x = l / L_safe[:, None]
    y = v / V_safe[:, None]
    if vapor_slot is not None:
        props = thermo.stage_properties(T, pressures, x, y)
        h_V, dh_V_dT, dh_V_dx = vapor_slot(T, y, props.vapor)
    else:
        props, (h_V, dh_V_dT, dh_V_dx) = _with_liquid_slots(thermo, T, pressures, x, y, liquid_slots)
    vapor_in = vapor_inflow @ v
    mixed_in = vapor_in if mixing_inflow is None else mixing_inflow @ v
    V_in_safe = np.maximum(mixed_in.sum(axis=1), TINY)
    n, kv, liquid = len(T), props.k_values, props.liquid  # rows n: are liquid slots' (none with vapor_slot)
    return StageState(
        T=T, l=l, v=v, L=L, V=V, L_safe=L_safe, V_safe=V_safe, x=x, y=y,
        K=kv.K[:n], dlnK_dT=kv.d_ln_K_dT[:n], dlnK_dx=kv.d_ln_K_dx[:n],
        dlnK_dy=None if kv.d_ln_K_dy is None else kv.d_ln_K_dy[:n],
        h_L=liquid.molar[:n], dh_L_dT=liquid.d_dT[:n], dh_L_dx=liquid.d_dx[:n],
        h_V=h_V, dh_V_dT=dh_V_dT, dh_V_dx=dh_V_dx,
        liquid_draw_ratio=U / L_safe, vapor_draw_ratio=W / V_safe,
        vapor_in=vapor_in, V_in_safe=V_in_safe, y_in=mixed_in / V_in_safe[:, None],
    )


def _with_liquid_slots(thermo, T, pressures, x, y, slots):
    """The stage properties of every stage, with the stages ``slots`` appended as liquid of
    composition ``y`` (rows ``len(T):``), and the (h, dh/dT, dh/dy) of each vapor slot."""
    n = len(T)
    slots = np.asarray(slots if slots is not None else [], dtype=int)
    if not len(slots):
        props = thermo.stage_properties(T, pressures, x, y)
        return props, (props.vapor.molar, props.vapor.d_dT, props.vapor.d_dx)
    y_slots = y[slots]
    props = thermo.stage_properties(np.concatenate([T, T[slots]]), np.concatenate([pressures, pressures[slots]]),
                                    np.concatenate([x, y_slots]), np.concatenate([y, y_slots]))
    liquid, vapor = props.liquid, props.vapor
    h, dh_dT, g = vapor.molar[:n].copy(), vapor.d_dT[:n].copy(), vapor.d_dx[:n].copy()
    h[slots], dh_dT[slots], g[slots] = liquid.molar[n:], liquid.d_dT[n:], liquid.d_dx[n:]
    return props, (h, dh_dT, g)


def mesh_residuals(s: StageState, liquid_inflow, vapor_inflow, U: np.ndarray, W: np.ndarray, E: np.ndarray,
                   feed_flows: np.ndarray, feed_enthalpy: np.ndarray, duties: np.ndarray,
                   energy_scale: float) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Component balances (N, c), Murphree relations (N, c), enthalpy balances (N,); ``duties``
    the heat added to each stage, scaled like ``feed_enthalpy``."""
    balance = (
        s.l * (1 + s.liquid_draw_ratio)[:, None] + s.v * (1 + s.vapor_draw_ratio)[:, None]
        - liquid_inflow @ s.l - s.vapor_in - feed_flows
    )
    equilibrium = s.y - E[:, None] * s.K * s.x - (1 - E)[:, None] * s.y_in
    enthalpy_out = (s.L + U) * s.h_L + (s.V + W) * s.h_V
    energy = (
        (enthalpy_out - liquid_inflow @ (s.L * s.h_L) - vapor_inflow @ (s.V * s.h_V)) * (1.0 / energy_scale)
        - feed_enthalpy - duties
    )
    return balance, equilibrium, energy


def stage_blocks(s: StageState, gLx: np.ndarray, gVy: np.ndarray, U: np.ndarray, W: np.ndarray, E: np.ndarray,
                 energy_scale: float) -> np.ndarray:
    """(N, w, w): derivatives of each stage's rows with respect to its own unknowns; ``gLx``
    and ``gVy`` are ``x . dh_L/dx`` and ``y . dh_V/dx`` of every stage."""
    N, c = s.x.shape
    w = 2 * c + 1
    x, y, K, L_safe, V_safe = s.x, s.y, s.K, s.L_safe, s.V_safe
    r_L, r_W = s.liquid_draw_ratio, s.vapor_draw_ratio
    inv_es = 1.0 / energy_scale
    eye = np.eye(c)
    blocks = np.zeros((N, w, w))
    blocks[:, :c, 1 : 1 + c] = (1 + r_L)[:, None, None] * eye - (r_L[:, None] * x)[:, :, None]
    blocks[:, :c, 1 + c :] = (1 + r_W)[:, None, None] * eye - (r_W[:, None] * y)[:, :, None]
    EK = E[:, None] * K
    blocks[:, c : 2 * c, 0] = -EK * x * s.dlnK_dT
    G_x = np.einsum("nim,nm->ni", s.dlnK_dx, x)
    blocks[:, c : 2 * c, 1 : 1 + c] = -(EK / L_safe[:, None])[:, :, None] * (
        eye[None] - x[:, :, None] + x[:, :, None] * (s.dlnK_dx - G_x[:, :, None])
    )
    blocks[:, c : 2 * c, 1 + c :] = (eye[None] - y[:, :, None]) / V_safe[:, None, None]
    if s.dlnK_dy is not None:
        # K depends on the stage's own vapor: d y_m / d v_k = (delta_mk - y_m) / V
        G_y = np.einsum("nim,nm->ni", s.dlnK_dy, y)
        with np.errstate(over="ignore", invalid="ignore"):  # a wild trial point; Newton rejects it
            blocks[:, c : 2 * c, 1 + c :] -= (EK * x / V_safe[:, None])[:, :, None] * (s.dlnK_dy - G_y[:, :, None])
    blocks[:, 2 * c, 0] = ((s.L + U) * s.dh_L_dT + (s.V + W) * s.dh_V_dT) * inv_es
    blocks[:, 2 * c, 1 : 1 + c] = (s.h_L[:, None] + (1 + r_L)[:, None] * (s.dh_L_dx - gLx[:, None])) * inv_es
    blocks[:, 2 * c, 1 + c :] = (s.h_V[:, None] + (1 + r_W)[:, None] * (s.dh_V_dx - gVy[:, None])) * inv_es
    return blocks


def edge_blocks(s: StageState, gLx: np.ndarray, gVy: np.ndarray, liquid_edges: np.ndarray, vapor_edges: np.ndarray,
                E: np.ndarray, energy_scale: float, vapor_mixes: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
    """(E_L, w, w) and (E_V, w, w): derivatives of the receiving stage's rows with respect to
    the unknowns of the stage whose liquid (vapor) enters it, one block per edge (edges as
    ``[source, destination]`` rows, the whole stream entering). ``vapor_mixes`` (default all
    True) says which vapor-slot edges a Murphree relation mixes (see :func:`stage_state`)."""
    c = s.x.shape[1]
    w = 2 * c + 1
    inv_es = 1.0 / energy_scale
    eye = np.eye(c)
    le = liquid_edges
    liquid_blocks = np.zeros((len(le), w, w))
    if len(le):
        src = le[:, 0]
        liquid_blocks[:, :c, 1 : 1 + c] = -eye
        liquid_blocks[:, 2 * c, 0] = -(s.L[src] * s.dh_L_dT[src]) * inv_es
        liquid_blocks[:, 2 * c, 1 : 1 + c] = -(s.h_L[src, None] + s.dh_L_dx[src] - gLx[src, None]) * inv_es
    ve = vapor_edges
    vapor_blocks = np.zeros((len(ve), w, w))
    if len(ve):
        src, dst = ve[:, 0], ve[:, 1]
        vapor_blocks[:, :c, 1 + c :] = -eye
        mixing = (1 - E[dst]) / s.V_in_safe[dst]
        if vapor_mixes is not None:
            mixing = np.where(vapor_mixes, mixing, 0.0)
        vapor_blocks[:, c : 2 * c, 1 + c :] = -mixing[:, None, None] * (eye[None] - s.y_in[dst][:, :, None])
        vapor_blocks[:, 2 * c, 0] = -(s.V[src] * s.dh_V_dT[src]) * inv_es
        vapor_blocks[:, 2 * c, 1 + c :] = -(s.h_V[src, None] + s.dh_V_dx[src] - gVy[src, None]) * inv_es
    return liquid_blocks, vapor_blocks
