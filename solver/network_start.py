"""The default start of a column network, from its feeds and specs alone.

1. Flows by constant molar overflow over the whole network at once: the total material balance
   and the CMO enthalpy balance of every stage (liquid enthalpy 0, vapor enthalpy one mean
   latent heat, feeds entering with their vapor fraction ``1 - q``) together with the specs as
   linear relations among the totals, the condenser and reboiler duties and the connections'
   free rates form one sparse linear system. A composition or temperature spec, which says
   nothing linear about the flows, is replaced there by a product rate guessed from the
   components' volatility order (the product takes the components on its side of the spec's
   component, and the share of that component the spec implies).
2. Compositions and temperatures by bubble-point sweeps (Wang & Henke 1966, Hydrocarbon
   Processing 45(8):155) at those flows over the whole graph: the component balances of all
   stages of all columns at ``v = S l`` are one sparse linear system per component; the
   temperatures move to the bubble points of the new liquids.
3. Passes: the flows from the same balances with the stages' own enthalpies at the sweeps'
   profile (the energy-balance step of the bubble-point method; a return temperature's duty
   from its stream's enthalpy change), then the sweeps again.
4. Each product rate guessed for a composition spec is moved (secant method, each on its own
   spec) until the sweeps' profile meets the spec, as the single-column start moves its
   overhead rate.
5. The duties of condensers and reboilers that no spec fixes are set so that their enthalpy
   balances hold at the start.
6. Starts are taken after 2, 5 and 10 passes of step 3 and without step 3 (from the CMO flows
   alone); the default start is the one whose full Newton correction is the smallest
   (Deuflhard's natural level), the engine's second start the best of the other kind.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from .initial import bubble_point_step
from .network_mesh import NetworkSystem
from .newton import NewtonOptions
from .sparse_solve import lu_solve, sparse_solve
from .spec_kinds import SPEC_REGISTRY
from .thermo.flash import bubble_temperature

__all__ = ["NetworkStart", "cmo_network_flows", "natural_level", "network_initial_estimate", "network_starts", "network_sweeps"]

_SWEEPS = 40  # at most; the sweeps stop when no temperature moves by 1e-3 K
_CANDIDATE_PASSES = (2, 5, 10)  # energy passes (flows from the stages' own enthalpies, then the sweeps) after which a start is a candidate
_SETTLED_FLOWS = 1e-4  # of the total feed: a pass that moves no flow by more has settled (no more passes)
_GOOD_ENOUGH_LEVEL = 1e-3  # a natural level below which no more passes are made (Newton's first step moves 0.01 K)
_SPEC_ROUNDS = 8  # at most, of moving guessed product rates to meet composition specs


def _volatility_order(system: NetworkSystem) -> np.ndarray:
    """ln K of each component at the bubble point of all feeds together (mean pressure)."""
    z = system.total_feed_by_component / system.total_feed_by_component.sum()
    P = np.array([float(np.mean(system.pressures))])
    T, _ = bubble_temperature(system.thermo, P, z[None, :])
    return np.log(system.thermo.k_values(T, P, z[None, :], derivatives=False).K[0])


def _guessed_product_rate(system: NetworkSystem, row, ln_K: np.ndarray) -> float:
    """A product's rate (scaled) from a composition spec: the components on its side of the
    spec's component (lighter for a vapor slot, heavier for a liquid one) plus the share of the
    component itself the spec implies."""
    feed = system.total_feed_by_component
    i = row.component
    lighter_side = row.product.phase == "vapor"
    side = feed[(ln_K > ln_K[i]) if lighter_side else (ln_K < ln_K[i])].sum()
    return float(SPEC_REGISTRY[row.kind].start.guessed_rate(row, side, feed[i]))


def cmo_network_flows(system: NetworkSystem, ln_K: np.ndarray, enthalpies=None, rates: dict | None = None):
    """(L, V, extras, guessed): total flows leaving every stage (scaled), the extra unknowns
    (duties scaled like the system's, rates scaled) and the product rates guessed for
    composition specs (spec index -> scaled rate; ``rates`` gives them instead) from the
    material and enthalpy balances of every stage with the specs. Without ``enthalpies`` by CMO (liquid 0, vapor one mean latent heat);
    with ``(h_L, h_V, return_differences)`` (stage enthalpies over the energy scale, and for each
    return-temperature row the enthalpy change of its stream, by the duty's name) by those
    enthalpies, a step of the bubble-point method (Wang & Henke 1966)."""
    N, n = system.N, len(system.extra_names)
    size = 2 * N + n
    A = sp.lil_matrix((size, size))
    b = np.zeros(size)
    stages = np.arange(N)
    if enthalpies is None:
        h_L, h_V = np.zeros(N), np.ones(N)
        h_V[system.total_condensers] = 0.0  # the total condenser's vapor slot holds liquid
        q = np.array([feed.q for feed in system.feeds])
        flows = np.array([feed.flow for feed in system.feeds]) / system.flow_scale
        feed_h = np.bincount(system.feed_stage_index, (1.0 - np.clip(q, -1.0, 2.0)) * flows, minlength=N)
        differences = {}
    else:
        h_L, h_V, differences = enthalpies
        feed_h = system.feed_enthalpy
    A[stages, stages] = 1.0
    A[stages, N + stages] = 1.0
    A[N + stages, stages] = h_L
    A[N + stages, N + stages] = h_V
    for (src, dst), weight in zip(system.liquid_edges, system.liquid_weights):
        A[dst, src] -= weight
        A[N + dst, src] -= weight * h_L[src]
    for (src, dst), weight in zip(system.vapor_edges, system.vapor_weights):
        A[dst, N + src] -= weight
        A[N + dst, N + src] -= weight * h_V[src]
    b[:N] = system.feed_flows.sum(axis=1) - system.side_liquid_draws - system.side_vapor_draws
    b[N : 2 * N] = feed_h + system.fixed_duties - system.side_liquid_draws * h_L - system.side_vapor_draws * h_V
    for k, stage in enumerate(system.extra_duty_stage):
        if stage >= 0:
            A[N + stage, 2 * N + k] = -1.0
    # a free feed (make-up) brings its rate and, by CMO its vapor fraction, else its enthalpy
    feed_h = np.clip(1.0 - system.free_feed_q, -1.0, 2.0) if enthalpies is None else system.free_feed_h
    for k, stage, h in zip(system.free_feed_extra, system.free_feed_stage, feed_h):
        A[stage, 2 * N + k] -= 1.0
        A[N + stage, 2 * N + k] -= h
    for m, (src, dst) in enumerate(zip(system.transfer_source, system.transfer_destination)):
        k = system.transfer_extra[m]
        h = h_L[src] if system.transfer_liquid[m] else h_V[src]
        for row, factor in ((src, 1.0), (dst, -1.0), (N + src, h), (N + dst, -h)):
            if k >= 0:
                A[row, 2 * N + k] += factor
            else:
                b[row] -= factor * system.transfer_fixed[m]
    start = _CmoRows(system, A, b, ln_K, _fixed_by_specs(system), differences)
    guessed: dict[int, float] = {}
    for r, row in enumerate(system.specs + system.internal_rows):
        start.rate = (rates or {}).get(r)
        rate = SPEC_REGISTRY[row.kind].start.relation(start, 2 * N + r, row)
        if rate is not None:
            guessed[r] = rate
    for r, (condenser, reboiler, _) in enumerate(system.heat_links, start=2 * N + len(system.specs) + len(system.internal_rows)):
        A[r, 2 * N + system.extra_index(condenser)] = 1.0
        A[r, 2 * N + system.extra_index(reboiler)] = 1.0
    solution = sparse_solve(A.tocsc(), b)
    if solution is None:
        solution = np.linalg.lstsq(A.toarray(), b, rcond=None)[0]
    floor = 1e-3
    L = np.maximum(solution[:N], floor)
    V = np.maximum(solution[N : 2 * N], floor)
    extras = solution[2 * N :].copy()
    free_rates = system.extra_duty_stage < 0
    extras[free_rates] = np.maximum(extras[free_rates], floor)
    return L, V, extras, guessed


def _column_of(system: NetworkSystem, stage: int) -> str:
    return system.graph.stage_nodes[stage][0]


def _fixed_by_specs(system: NetworkSystem) -> dict[str, set[str]]:
    """Column -> what its linear specs fix: "rate" (a product rate of a distillate or bottoms),
    "ratio" (a reflux or boilup ratio, a condenser or reboiler duty), as their registry entries
    say (:attr:`~solver.spec_kinds.StartHandling.fixes`)."""
    fixed: dict[str, set[str]] = {section.name: set() for section in system.graph.network.columns}
    for row in system.specs:
        fixes = SPEC_REGISTRY[row.kind].start.fixes
        found = fixes(row, lambda stage: _column_of(system, stage)) if fixes is not None else None
        if found is not None:
            fixed[found[0]].add(found[1])
    return fixed


@dataclass
class _CmoRows:
    """The seam through which a spec kind's registry entry writes its row of the CMO linear
    system (:attr:`~solver.spec_kinds.StartHandling.relation`)."""

    system: NetworkSystem
    A: sp.lil_matrix
    b: np.ndarray
    ln_K: np.ndarray
    fixed: dict[str, set[str]]
    differences: dict
    rate: float | None = None

    def column_of(self, stage: int) -> str:
        return _column_of(self.system, stage)

    def ratio_of_two(self, r: int, column: str) -> None:
        _ratio_of_two(self.system, self.A, r, column)

    def half_the_feed(self, r: int, column: str) -> None:
        _half_the_feed(self.system, self.A, self.b, r, column)

    def guessed_product_rate(self, row) -> float:
        return _guessed_product_rate(self.system, row, self.ln_K)


def _half_the_feed(system: NetworkSystem, A, b, r: int, column: str) -> None:
    """Row ``r``: the column's overhead product (else its bottoms) takes half the network's feed."""
    N, graph = system.N, system.graph
    top = graph.index[(column, 1)]
    bottom = top + graph.network.section(column).column.stages - 1
    if graph.vapor_product_share[top] > 0:
        A[r, N + top] = graph.vapor_product_share[top]
    else:
        A[r, bottom] = graph.liquid_product_share[bottom]
    b[r] = 0.5


def _ratio_of_two(system: NetworkSystem, A, r: int, column: str) -> None:
    """Row ``r``: a reflux ratio of 2 on ``column`` (a boilup ratio of 2 without a condenser)."""
    N, graph = system.N, system.graph
    top = graph.index[(column, 1)]
    bottom = top + graph.network.section(column).column.stages - 1
    if graph.roles[top] != "tray":
        A[r, top], A[r, N + top] = 1.0, -2.0 * graph.vapor_product_share[top]
    else:
        A[r, N + bottom], A[r, bottom] = 1.0, -2.0 * graph.liquid_product_share[bottom]


def _balance_matrix(system: NetworkSystem, L, V, U, W, rates, S) -> sp.csc_matrix:
    """The component balances of every component at fixed totals with ``v = S l``, one
    block-diagonal sparse matrix in the liquid component flows (component-major)."""
    N, c = system.N, system.c
    offsets = (np.arange(c) * N)[:, None]
    diagonal = (1.0 + U / L)[:, None] + S * (1.0 + W / V)[:, None]
    rows = [np.broadcast_to(offsets + np.arange(N)[None, :], (c, N)).ravel()]
    cols = [rows[0]]
    vals = [diagonal.T.ravel()]
    le, lw = system.liquid_edges, system.liquid_weights
    ve, vw = system.vapor_edges, system.vapor_weights
    src, dst, liquid = system.transfer_source, system.transfer_destination, system.transfer_liquid
    transfer_factor = np.where(liquid[:, None], (rates / L[src])[:, None], (rates / V[src])[:, None] * S[src])
    for sources, destinations, factor in (
        (le[:, 0], le[:, 1], np.broadcast_to(lw[:, None], (len(le), c))),
        (ve[:, 0], ve[:, 1], vw[:, None] * S[ve[:, 0]]),
        (src, dst, transfer_factor),
    ):
        rows.append((offsets + destinations[None, :]).ravel())
        cols.append((offsets + sources[None, :]).ravel())
        vals.append(-np.asarray(factor).T.ravel())
    return sp.csc_matrix((np.concatenate(vals), (np.concatenate(rows), np.concatenate(cols))), shape=(N * c, N * c))


def network_sweeps(system: NetworkSystem, L, V, extras, T, x, max_sweeps: int = _SWEEPS):
    """Bubble-point sweeps at fixed flows: (T, x, y)."""
    thermo, N, c = system.thermo, system.N, system.c
    rates = system.transfer_rates(extras)
    U, W = system.draws(rates)
    rhs = system.feed_flows_at(extras).T.ravel()
    y = None
    tops = system.total_condensers
    for _ in range(max_sweeps):
        K = thermo.k_values(T, system.pressures, x, derivatives=False, y=y).K
        S = K * (V / L)[:, None]
        S[tops] = (V[tops] / L[tops])[:, None]
        solution = sparse_solve(_balance_matrix(system, L, V, U, W, rates, S), rhs)
        if solution is None:  # singular or overflowing: keep the last sweep's profile
            break
        l = np.maximum(solution.reshape(c, N).T, 1e-30)
        x = l / l.sum(axis=1, keepdims=True)
        step = bubble_point_step(thermo, system.pressures, x, T, y)
        if step is None:
            break
        T, y, moved = step
        if moved < 1e-3:
            break
    if y is None:
        y = thermo.k_values(T, system.pressures, x, derivatives=False).K * x
        y = y / y.sum(axis=1, keepdims=True)
    return T, x, y


def _stage_enthalpies(system: NetworkSystem, T: np.ndarray, x: np.ndarray, y: np.ndarray):
    """(h_L, h_V, return differences) over the energy scale at a sweep's profile, for
    :func:`cmo_network_flows`."""
    thermo, P, scale = system.thermo, system.pressures, system.energy_scale
    h_L = thermo.liquid_enthalpy(T, x, pressure=P).molar
    h_V = thermo.vapor_enthalpy(T, y, pressure=P).molar.copy()
    tops = system.total_condensers
    if len(tops):
        h_V[tops] = thermo.liquid_enthalpy(T[tops], x[tops], pressure=P[tops]).molar
    differences = {}
    for row in system.specs + system.internal_rows:
        if row.kind == "return_temperature":
            stream = system.connections[row.extra.rsplit(".", 1)[0]]
            g, liquid = stream.source, stream.phase == "liquid"
            enthalpy = thermo.liquid_enthalpy if stream.carries_liquid else thermo.vapor_enthalpy
            at_return = enthalpy(np.array([row.value]), (x if liquid else y)[g][None, :], pressure=P[g : g + 1]).molar[0]
            differences[row.extra] = (at_return - (h_L if liquid else h_V)[g]) / scale
    return h_L / scale, h_V / scale, differences


def _profile_spec_error(system: NetworkSystem, row, L, V, x, y) -> float:
    """How far a composition spec is from being met by a sweep's profile."""
    p = row.product
    liquid = p.phase == "liquid" or p.stage in system.total_condensers
    amount = p.rate / system.flow_scale if p.rate is not None else p.share * (L if p.phase == "liquid" else V)[p.stage]
    return SPEC_REGISTRY[row.kind].start.stream_error(row, (x if liquid else y)[p.stage], amount, system.total_feed_by_component)


def _meet_composition_specs(system: NetworkSystem, ln_K, guessed: dict[int, float], state, rounds: int = _SPEC_ROUNDS):
    """Move each product rate guessed for a composition spec by the secant method (each on its
    own spec) until the sweeps' profile meets the specs to 1e-4, or ``rounds`` are spent."""
    L, V, extras, T, x, y = state
    rows = {r: (system.specs + system.internal_rows)[r] for r in guessed}
    errors = {r: _profile_spec_error(system, rows[r], L, V, x, y) for r in guessed}
    previous: dict[int, tuple[float, float]] = {}
    rates = dict(guessed)
    for _ in range(rounds):
        if max(abs(e) for e in errors.values()) < 1e-4:
            break
        for r, error in errors.items():
            rate = rates[r]
            if r in previous and previous[r][1] != error:
                old_rate, old_error = previous[r]
                new = rate - error * (rate - old_rate) / (error - old_error)
            else:
                new = rate * (0.98 if (error < 0) == (rows[r].product.phase == "vapor") else 1.02)
            previous[r] = (rate, error)
            rates[r] = float(np.clip(new, 0.5 * rate, 1.5 * rate))
        L, V, extras, _ = cmo_network_flows(system, ln_K, _stage_enthalpies(system, T, x, y), rates)
        T, x, y = network_sweeps(system, L, V, extras, T, x)
        errors = {r: _profile_spec_error(system, rows[r], L, V, x, y) for r in guessed}
    return L, V, extras, T, x, y


@dataclass(frozen=True)
class NetworkStart:
    """One default start: its ``name``, the scaled unknowns ``X`` and its natural level."""

    name: str
    X: np.ndarray
    level: float


def natural_level(system: NetworkSystem, X: np.ndarray) -> float:
    """Deuflhard's natural level of ``X``: the size of the full Newton correction
    ``||D J(X)^-1 F(X)||_inf`` (Deuflhard, *Newton Methods for Nonlinear Problems*, Springer 2004,
    sec. 3.3), with the temperatures over Newton's own temperature scale (10 K)
    (infinite when the Jacobian is singular). Small where Newton's model of the equations holds:
    of two starts the one with the smaller level is the one Newton converges from with fewer
    damped steps."""
    evaluation = system.evaluate(X, jacobian=True)
    step, _ = lu_solve(evaluation.jacobian, -evaluation.residuals)
    if step is None:
        return float("inf")
    step[system.temperature_index()] /= NewtonOptions.temperature_scale
    return float(np.max(np.abs(step)))


def network_starts(system: NetworkSystem) -> tuple[NetworkStart, NetworkStart]:
    """The network's default start and its second start. The candidates: the start from the
    CMO flows alone (the module docstring's steps 1, 2, 4 and 5) and the starts after
    :data:`_CANDIDATE_PASSES` energy passes of the bubble-point method (steps 1 to 5), each with
    its natural level; the passes stop early once they settle (no flow moves by
    :data:`_SETTLED_FLOWS` of the feed: the last candidate stands for the rest) or a start's
    level is below :data:`_GOOD_ENOUGH_LEVEL`. The default start is the candidate of least level; the second
    start the best of the other kind (CMO flows against energy passes), as unlike the first as
    the candidates allow.

    Why several: a profile swept at CMO flows and one swept at energy-balanced flows can differ
    widely where the answer is sensitive to the flows (a distillate rate close to the light
    components' feed puts the front between the light and the heavier components anywhere in a
    long section), and the bubble-point passes need not settle (their profiles may swing from
    one pass to the next); Newton's own model of the equations says which is nearest."""
    ln_K = _volatility_order(system)
    L, V, extras, guessed = cmo_network_flows(system, ln_K)
    z = system.total_feed_by_component / system.total_feed_by_component.sum()
    x = np.tile(z, (system.N, 1))
    T, _ = bubble_temperature(system.thermo, system.pressures, x)
    state = (L, V, extras, *network_sweeps(system, L, V, extras, T, x))
    cmo = _finished_start(system, ln_K, guessed, state, "start from CMO flows")
    passed: list[NetworkStart] = []
    for done in range(1, max(_CANDIDATE_PASSES) + 1):
        L, V, extras, _ = cmo_network_flows(system, ln_K, _stage_enthalpies(system, *state[3:]), guessed)
        settled = max(np.max(np.abs(L - state[0])), np.max(np.abs(V - state[1]))) < _SETTLED_FLOWS
        state = (L, V, extras, *network_sweeps(system, L, V, extras, *state[3:5]))
        if done in _CANDIDATE_PASSES:
            passed.append(_finished_start(system, ln_K, guessed, state, f"start with {done} energy passes"))
        if passed and (settled or passed[-1].level < _GOOD_ENOUGH_LEVEL):
            break
    energy = min(passed, key=lambda start: start.level)
    return (cmo, energy) if cmo.level < energy.level else (energy, cmo)


def network_initial_estimate(system: NetworkSystem) -> np.ndarray:
    """The default start of the network: the better of :func:`network_starts`."""
    return network_starts(system)[0].X


def _finished_start(system: NetworkSystem, ln_K, guessed: dict[int, float], state, name: str) -> NetworkStart:
    """The start from a swept profile: composition specs met by moving their guessed product
    rates, the total condensers' slots filled, free condenser and reboiler duties set to meet
    their enthalpy balances."""
    L, V, extras, T, x, y = state
    if guessed:
        L, V, extras, T, x, y = _meet_composition_specs(system, ln_K, guessed, state)
    y = y.copy()
    tops = system.total_condensers
    y[tops] = x[tops]
    T = T.copy()
    fixed = ~np.isnan(system.reflux_temperature)
    T[tops] = np.where(fixed, system.reflux_temperature, T[tops] - system.reflux_shift)
    X = system.pack(T, L[:, None] * x, V[:, None] * y, extras)
    set_by_spec = {row.extra for row in system.specs if SPEC_REGISTRY[row.kind].quantity == "duty"}
    energy_rows = np.arange(system.N) * system.width + 2 * system.c
    residuals = system.evaluate(X, jacobian=False).residuals[energy_rows]
    for k, name_ in enumerate(system.extra_names):
        if name_.endswith((".condenser", ".reboiler")) and name_ not in set_by_spec:
            X[system.stage_size + k] += residuals[system.extra_duty_stage[k]]
    return NetworkStart(name, X, natural_level(system, X))
