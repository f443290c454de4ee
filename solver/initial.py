"""Default starting profiles: nothing is asked of the user.

1. Product split: the non-key distribution of Fenske's equation (Fenske 1932, Ind. Eng. Chem.
   24:482), ``d_k / b_k = theta * alpha_k^m``, with relative volatilities at the feed's bubble
   point; the overhead rate ``D`` is chosen to meet the composition specifications, or taken
   from the flow specifications.
2. Flows by constant molar overflow from the specs (reflux, boilup, duties through a mean
   latent heat) and each feed's thermal condition ``q``. What each spec tells steps 1 and 2 is
   its registry entry's :class:`~solver.spec_kinds.StartHandling`.
3. Compositions and temperatures by sweeps of the bubble-point method (Wang & Henke 1966,
   Hydrocarbon Processing 45(8):155): for fixed flows, each component's balances over all
   stages form one sparse linear system in its liquid flows; for a column with two products
   the split is corrected by Holland's theta method so that the overhead total is the rate
   the flows were built for; temperatures then move to the bubble points of the new liquid
   compositions. Sweeps that have not settled after their number (they can cycle where the
   K-values hang on the compositions through strongly nonideal activity coefficients) go on
   under-relaxed, each taking the compositions halfway (in their logarithms) to the new ones
   (successive under-relaxation of a fixed-point iteration, common practice). In a pinched
   binary column even these may never settle: the composition front runs to and fro along
   the pinch, and the start is then the last sweep or the mean of the relaxed sweeps'
   compositions (a front smeared over the stages it visited), whichever leaves the smaller
   MESH residuals.
   A subcooled reflux raises the internal reflux below the top stage (see
   :func:`subcooled_reflux_factor`).

The sweeps use the stage graph's inflow matrices; the CMO flow estimate walks the stages top
to bottom and so assumes one vertical chain (a plain column).

Everything here works in the system's scaled flows (fractions of the total feed), and the start
is handed over as the system's scaled unknowns: a detour through a profile in SI units would
move the start by rounding (a few units in the last place), and some long, pinched columns
follow a different Newton path from a start that differs by so little.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import numpy as np
import scipy.sparse as sp
from scipy.optimize import brentq
from scipy.special import expit

from .errors import ThermoError
from .mesh import MeshSystem
from .spec_kinds import SPEC_REGISTRY, SpecRow, StartBasis
from .sparse_solve import sparse_solve
from .thermo.flash import bubble_temperature

__all__ = [
    "bubble_point_step",
    "cmo_flows",
    "component_balance_matrix",
    "estimate_split",
    "fenske_split",
    "initial_estimate",
    "subcooled_reflux_factor",
    "Sweeps",
    "theta_correction",
    "theta_correction_applies",
    "wang_henke_sweeps",
]

_FIRST_WALK_STEP = 0.05  # of the start, in the root walking
_WANG_HENKE_SWEEPS = 60  # plain sweeps at most (then as many relaxed); they stop when no temperature moves by 1e-3 K


def fenske_split(feed_flows: np.ndarray, ln_alpha: np.ndarray, distillate, exponent: float) -> np.ndarray:
    """Component flows in the overhead for an overhead rate ``distillate`` (a number, or an
    array of rates giving one row each): ``d_k = F_k expit(m ln alpha_k - ln theta)`` with
    ``theta`` found so that sum d = D (by Brent's method for one rate, by bisection for all the
    rates of an array at once)."""
    if np.ndim(distillate) == 0:
        # one rate: Brent's method on ln theta, a few evaluations instead of 60 halvings
        weights = exponent * ln_alpha

        def excess(u: float) -> float:
            return float(expit(weights - u) @ feed_flows) - float(distillate)

        u = brentq(excess, -800.0, 800.0, xtol=1e-13) if excess(-800.0) > 0.0 > excess(800.0) else 0.0
        return feed_flows * expit(weights - u)
    rates = np.atleast_1d(np.asarray(distillate, dtype=float))
    low, high = np.full(rates.shape, -800.0), np.full(rates.shape, 800.0)
    # 60 halvings take the 1600-wide bracket below 1e-15
    for _ in range(60):
        middle = 0.5 * (low + high)
        above = (expit(exponent * ln_alpha[None, :] - middle[:, None]) @ feed_flows) > rates
        low = np.where(above, middle, low)
        high = np.where(above, high, middle)
    return feed_flows[None, :] * expit(exponent * ln_alpha[None, :] - 0.5 * (low + high)[:, None])


def estimate_split(system: MeshSystem, specs: tuple[SpecRow, ...], q_values: np.ndarray, feed_totals: np.ndarray, ln_alpha: np.ndarray):
    """Overhead rate D (scaled), the function giving the top vapor rate V_top for a D (both
    scaled), the estimated overhead component flows, and whether D may still be moved to meet
    a composition spec. What each spec tells is its registry entry's
    (:class:`~solver.spec_kinds.StartHandling`)."""
    feed = system.total_feed_by_component
    F_net = system.net_feed
    vapor_in_feeds = float(np.sum((1.0 - np.clip(q_values, -1.0, 2.0)) * feed_totals))
    latent = system.energy_scale  # the energy scale is a mean molar latent heat
    exponent = float(np.clip(0.45 * system.N, 2.0, 60.0))

    basis = StartBasis(F_net, system.flow_scale, latent, vapor_in_feeds)
    D = None
    energy_relations = []  # (a, b) meaning V_top = a + b * D
    for row in specs:
        start = SPEC_REGISTRY[row.kind].start
        if start.overhead is not None:
            D = start.overhead(row, basis)
        elif start.top_vapor is not None:
            energy_relations.append(start.top_vapor(row, basis))
    D_fixed = D
    composition_specs = [row for row in specs if SPEC_REGISTRY[row.kind].start.split_error is not None]
    if D is None and composition_specs:
        grid = np.linspace(0.002, 0.998, 499) * F_net
        tops = fenske_split(feed, ln_alpha, grid, exponent)
        errors = [
            sum(SPEC_REGISTRY[row.kind].start.split_error(row, top, feed - top, feed) ** 2 for row in composition_specs)
            for top in tops
        ]
        D = float(grid[int(np.argmin(errors))])
    if D is None and len(energy_relations) >= 2:
        (a1, b1), (a2, b2) = energy_relations[:2]
        if abs(b1 - b2) > 1e-9 * max(abs(b1), abs(b2), 1.0):
            D = (a2 - a1) / (b1 - b2)
    duties = [row.value for row in specs if SPEC_REGISTRY[row.kind].quantity == "duty"]
    if D is None and len(duties) == 2:
        # both duties given: under CMO they fix the vapor rates but not the split, which follows
        # from the overall enthalpy balance H_F + Q_C + Q_R = D h_D + B h_B
        D = _overhead_from_energy_balance(system, duties, feed, ln_alpha, exponent, F_net)
    if D is None:
        # one energy spec and nothing that fixes D, or an absorber: split the feed by volatility
        D = max(vapor_in_feeds, 0.5 * F_net) if system.graph.condenser != "none" else max(vapor_in_feeds, 0.3 * F_net)
    D = float(np.clip(D, 0.01 * F_net, 0.99 * F_net))

    def top_vapor(D: float) -> float:
        if system.graph.condenser == "none":
            return D
        if energy_relations:
            a, b = energy_relations[0]
            value = a + b * D
        else:
            value = 3.0 * D  # common practice: a reflux ratio of about 2 as a first guess
        return float(max(value, 1.05 * D))

    top = fenske_split(feed, ln_alpha, D, exponent)
    adjustable = D_fixed is None and len(energy_relations) < 2
    return D, top_vapor, top, adjustable


def _overhead_from_energy_balance(system: MeshSystem, duties: list[float], feed: np.ndarray, ln_alpha, exponent, F_net) -> float:
    """Overhead rate (scaled) that closes the overall enthalpy balance with products at their
    bubble points and Fenske-distributed compositions, searched on a grid of rates."""
    thermo = system.thermo
    grid = np.linspace(0.02, 0.98, 97) * F_net
    tops = fenske_split(feed, ln_alpha, grid, exponent)
    bottoms = feed[None, :] - tops
    x_top = tops / tops.sum(axis=1, keepdims=True)
    x_bottom = bottoms / bottoms.sum(axis=1, keepdims=True)
    try:
        t_top, _ = bubble_temperature(thermo, np.full(len(grid), system.pressures[0]), x_top)
        t_bottom, _ = bubble_temperature(thermo, np.full(len(grid), system.pressures[-1]), x_bottom)
    except ThermoError:
        return 0.5 * F_net
    h_top = thermo.liquid_enthalpy(t_top, x_top).molar
    if system.graph.condenser != "total":
        h_top = thermo.vapor_enthalpy(t_top, x_top).molar
    h_bottom = thermo.liquid_enthalpy(t_bottom, x_bottom).molar
    heat_in = float(system.feed_enthalpy.sum()) * system.energy_scale + sum(duties) / system.flow_scale
    mismatch = heat_in - grid * h_top - (F_net - grid) * h_bottom
    return float(grid[int(np.argmin(np.abs(mismatch)))])


def cmo_flows(
    system: MeshSystem, D: float, V_top: float, stage_feed_totals: np.ndarray, stage_q: np.ndarray,
    internal_reflux_factor: float = 1.0,
):
    """Total liquid and vapor flows (scaled) leaving each stage under constant molar overflow,
    walking a single chain of stages from the top. ``internal_reflux_factor`` is the internal
    reflux below the top stage per unit of the external reflux (above 1 for a subcooled
    reflux, :func:`subcooled_reflux_factor`); the vapor below grows by the same flow."""
    N = system.N
    U, W = system.liquid_draws, system.vapor_draws
    F_net = system.net_feed
    reflux = V_top - D if system.graph.condenser != "none" else 0.0
    # liquid gains q F and loses the liquid draw going down; vapor follows from the balance
    # around the stages above
    L = reflux + np.cumsum(stage_q * stage_feed_totals - U)
    L[1:] += (internal_reflux_factor - 1.0) * reflux
    V = np.empty(N)
    V[0] = D
    V[1:] = L[:-1] + D - np.cumsum(stage_feed_totals - U - W)[:-1]
    L[N - 1] = F_net - D
    floor = 1e-3 * F_net
    return np.maximum(L, floor), np.maximum(V, floor)


def subcooled_reflux_factor(system: MeshSystem, T_top: float, x_top: np.ndarray) -> float:
    """Internal reflux per unit of a total condenser's external reflux: a reflux subcooled by
    dT condenses ``cp_L dT / lambda`` moles of vapor per mole on the stage below, so the liquid
    leaving that stage is ``L0 (1 + cp_L dT / lambda)`` (the internal reflux of a subcooled
    reflux, Wankat, *Separation Process Engineering*, 3rd ed., 2012, ch. 4; from memory), with
    ``cp_L dT`` and ``lambda`` from the case's own enthalpies at the top stage's bubble point
    ``T_top`` and liquid ``x_top``. 1 when the reflux is not subcooled."""
    if not system.total_condenser:
        return 1.0
    setting = system.condenser_setting
    if setting.reflux_temperature is not None:
        subcooling = T_top - setting.reflux_temperature
    else:
        subcooling = setting.reflux_subcooling or 0.0
    if subcooling <= 0.0:
        return 1.0
    thermo, P = system.thermo, system.pressures[:1]
    T = np.array([T_top, T_top - subcooling])
    x = np.array([x_top, x_top])
    h_L = thermo.liquid_enthalpy(T, x, pressure=np.repeat(P, 2)).molar
    latent = float(thermo.vapor_enthalpy(T[:1], x[:1], pressure=P).molar[0] - h_L[0])
    sensible = float(h_L[0] - h_L[1])
    if not (latent > 0.0 and sensible > 0.0):
        return 1.0
    return 1.0 + sensible / latent


def initial_estimate(system: MeshSystem, *, correct_split: bool = True) -> np.ndarray:
    """The default start of ``system`` from its feeds and specs alone (steps 1-3 of the module
    docstring), as the system's scaled unknowns (:meth:`~solver.mesh.MeshSystem.pack`; see
    the module docstring for why not a profile in SI). ``correct_split=False`` leaves out
    Holland's theta correction of the product split in the sweeps (the engine's second
    start)."""
    feed_totals = np.array([feed.flow for feed in system.feeds]) / system.flow_scale
    q_values = np.array([feed.q for feed in system.feeds])
    D, top_vapor, top, adjustable = estimate_split(system, system.rows, q_values, feed_totals, _feed_volatilities(system))
    T, x = _profile_between_products(system, top)
    profiles = _CmoProfiles(system, top_vapor, feed_totals, q_values, T, x, correct_split)
    if adjustable:
        D = _meet_profile_specs(system, profiles, D)
    # the mean of cycling sweeps is tried on binaries only: on a five-component column of
    # 200 stages (tests/hard) the mean of several fronts cycling out of step was the worse start
    L, V, sweeps = profiles.at(D, cycle_mean=system.c == 2)
    start = _packed_start(system, L, V, sweeps)
    if sweeps.cycle_mean is None:
        return start
    smeared = _packed_start(system, L, V, sweeps.cycle_mean)
    return smeared if _residual_norm(system, smeared) < _residual_norm(system, start) else start


def _packed_start(system: MeshSystem, L: np.ndarray, V: np.ndarray, sweeps: "Sweeps") -> np.ndarray:
    """The scaled unknowns of the start on the CMO flows ``L``, ``V`` and the profile of
    ``sweeps``, with a total condenser's reflux at its set temperature."""
    liquid, vapor = _start_component_flows(L, V, sweeps.x, sweeps.liquid, sweeps.stripping)
    T = sweeps.temperature.copy()
    if system.total_condenser:
        t = system.top
        setting = system.condenser_setting
        if setting.reflux_temperature is not None:
            T[t] = setting.reflux_temperature
        elif setting.reflux_subcooling:
            T[t] = T[t] - setting.reflux_subcooling
    return system.pack(T, liquid, vapor)


def _residual_norm(system: MeshSystem, X: np.ndarray) -> float:
    norm = float(np.linalg.norm(system.evaluate(X, jacobian=False).residuals))
    return norm if np.isfinite(norm) else float("inf")


def _feed_volatilities(system: MeshSystem) -> np.ndarray:
    """ln of each component's K-value relative to the feed's mean, at the bubble point of all
    the feeds together at the column's mean pressure."""
    thermo = system.thermo
    z_total = system.total_feed_by_component / system.total_feed_by_component.sum()
    mean_pressure = float(np.mean(system.pressures))
    t_feed, _ = bubble_temperature(thermo, np.array([mean_pressure]), z_total[None, :])
    K_feed = thermo.k_values(t_feed, np.array([mean_pressure]), z_total[None, :], derivatives=False).K[0]
    return np.log(K_feed) - np.log(np.exp(np.sum(z_total * np.log(K_feed))))


def _profile_between_products(system: MeshSystem, top: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Liquid compositions linear between the estimated products (overhead component flows
    ``top``, scaled) and temperatures at their bubble points, stage by stage."""
    thermo = system.thermo
    bottom = system.total_feed_by_component - top
    x_top = top / top.sum()
    x_bottom = bottom / bottom.sum()
    t_ends, _ = bubble_temperature(thermo, system.pressures[[0, -1]], np.array([x_top, x_bottom]))
    weights = np.linspace(0.0, 1.0, system.N)[:, None]
    x = (1 - weights) * x_top + weights * x_bottom
    T = (1 - weights[:, 0]) * t_ends[0] + weights[:, 0] * t_ends[1]
    try:
        T, _ = bubble_temperature(thermo, system.pressures, x, guess=T)
    except ThermoError:
        pass
    return T, x


class _CmoProfiles:
    """CMO flows and the bubble-point sweeps on them for a trial overhead rate D (scaled), each
    trial's sweeps started from the temperatures and compositions the last one left."""

    def __init__(self, system: MeshSystem, top_vapor, feed_totals, q_values, T, x, correct_split: bool) -> None:
        self.system = system
        self.top_vapor = top_vapor
        self.correct_split = correct_split
        self.T, self.x = T, x
        self.internal_reflux_factor = subcooled_reflux_factor(system, float(T[system.top]), x[system.top])
        self.reflux_factor: float | None = None  # V_top / D = R + 1, once moved to meet a second spec
        self.settled: list[bool] = []  # whether each trial's sweeps settled
        self.stage_feed_totals = np.zeros(system.N)
        stage_vapor = np.zeros(system.N)
        feed_stages = system.graph.feed_stages
        np.add.at(self.stage_feed_totals, feed_stages, feed_totals)
        np.add.at(stage_vapor, feed_stages, feed_totals * (1.0 - np.clip(q_values, -1.0, 2.0)))
        self.stage_q = np.where(
            self.stage_feed_totals > 0, 1.0 - stage_vapor / np.maximum(self.stage_feed_totals, 1e-300), 1.0
        )

    def vapor_for(self, D: float) -> float:
        if self.reflux_factor is not None:
            return self.reflux_factor * D
        return self.top_vapor(D)

    def at(self, D: float, V_top: float | None = None, *, cycle_mean: bool = False):
        """(L, V, :class:`Sweeps`) of the sweeps on the CMO flows for D (and V_top, if given)."""
        L, V = cmo_flows(self.system, D, self.vapor_for(D) if V_top is None else V_top, self.stage_feed_totals, self.stage_q,
                         self.internal_reflux_factor)
        sweeps = wang_henke_sweeps(self.system, L, V, self.T, self.x, correct_split=self.correct_split,
                                   cycle_mean=cycle_mean)
        self.T, self.x = sweeps.temperature, sweeps.x
        self.settled.append(sweeps.settled)
        return L, V, sweeps

    def last_two_settled(self) -> bool:
        return len(self.settled) >= 2 and all(self.settled[-2:])


def _meet_profile_specs(system: MeshSystem, profiles: _CmoProfiles, D: float) -> float:
    """Move D until the CMO profile meets the first composition, recovery or temperature spec;
    with a condenser and a second such spec, move the reflux for it in turn (twice)."""
    profile_specs = [row for row in system.rows if SPEC_REGISTRY[row.kind].start.profile_error is not None]
    if not profile_specs:
        return D
    F_net = system.net_feed
    first = profile_specs[0]
    second = profile_specs[1] if len(profile_specs) > 1 and system.graph.condenser != "none" else None
    for _ in range(2 if second is not None else 1):
        D = _root_by_walking(
            lambda trial: _profile_spec_error(system, first, profiles.at(trial)), D, 0.01 * F_net, 0.99 * F_net, 1e-5 * F_net,
            smooth=profiles.last_two_settled,
        )
        if second is None:
            break
        factor = profiles.vapor_for(D) / D  # V_top / D = R + 1
        factor = _root_by_walking(
            lambda trial: _profile_spec_error(system, second, profiles.at(D, trial * D)), factor, 1.05, 200.0, 1e-4,
            smooth=profiles.last_two_settled,
        )
        profiles.reflux_factor = factor
    return D


def _start_component_flows(L, V, x, l, stripping) -> tuple[np.ndarray, np.ndarray]:
    """Liquid and vapor component flows (scaled) of the start from the last sweep."""
    if np.all(l.sum(axis=1) <= 2.0 * L):
        # the component flows of the last sweep satisfy the component balances with v = S l
        return l, stripping * l
    # where an intermediate component accumulates between the sections the raw flows of a
    # sweep run far off scale: keep the compositions, with the CMO totals
    y = stripping * x
    y = y / y.sum(axis=1, keepdims=True)
    return L[:, None] * x, V[:, None] * y


def component_balance_matrix(system: MeshSystem, L: np.ndarray, V: np.ndarray, stripping: np.ndarray) -> sp.csc_matrix:
    """The component balances of every component at fixed total flows, with ``v = S l``, as one
    block-diagonal sparse matrix in the liquid component flows (component-major order)."""
    N, c = system.N, system.c
    U, W = system.liquid_draws, system.vapor_draws
    offsets = (np.arange(c) * N)[:, None]
    stages = np.arange(N)[None, :]
    le, ve = system.graph.liquid_edges, system.graph.vapor_edges
    rows = [np.broadcast_to(offsets + stages, (c, N)).ravel()]
    cols = [rows[0]]
    values = [((1.0 + U / L)[:, None] + stripping * (1.0 + W / V)[:, None]).T.ravel()]
    if len(le):
        rows.append((offsets + le[:, 1][None, :]).ravel())
        cols.append((offsets + le[:, 0][None, :]).ravel())
        values.append(np.full(c * len(le), -1.0))
    if len(ve):
        rows.append((offsets + ve[:, 1][None, :]).ravel())
        cols.append((offsets + ve[:, 0][None, :]).ravel())
        values.append(-stripping[ve[:, 0], :].T.ravel())
    return sp.csc_matrix(
        (np.concatenate(values), (np.concatenate(rows), np.concatenate(cols))), shape=(N * c, N * c)
    )


def wang_henke_sweeps(
    system: MeshSystem,
    L: np.ndarray,
    V: np.ndarray,
    T: np.ndarray,
    x: np.ndarray,
    *,
    tolerance: float = 1e-3,
    max_sweeps: int = _WANG_HENKE_SWEEPS,
    correct_split: bool = True,
    cycle_mean: bool = False,
) -> "Sweeps":
    """Bubble-point sweeps at fixed total flows until no temperature moves by ``tolerance`` K
    (at most ``max_sweeps`` plain sweeps, then at most as many under-relaxed ones); with ``correct_split`` (and two products) Holland's theta correction holds the overhead
    total at ``V[top]``. With ``cycle_mean``, sweeps that never settle also give the profile
    at the mean composition of their relaxed sweeps (:attr:`Sweeps.cycle_mean`)."""
    thermo = system.thermo
    N, c = system.N, system.c
    t = system.top
    T = T.copy()
    rhs = system.feed_flows.T.ravel()

    def stripping_factors(T, x, y=None):
        # y: the vapor of the last bubble points (K of an equation of state depends on it)
        K = thermo.k_values(T, system.pressures, x, derivatives=False, y=y).K
        factors = K * (V / L)[:, None]
        if system.total_condenser:
            factors[t] = V[t] / L[t]
        return factors

    two_products = correct_split and theta_correction_applies(system)
    y = None
    raw = None
    settled = False
    relaxed_x, relaxed_flows, relaxed = np.zeros_like(x), np.zeros_like(x), 0
    for sweep in range(2 * max_sweeps):
        stripping = stripping_factors(T, x, y)
        # natural ordering keeps the elimination in stage order, where the column-wise
        # diagonal dominance of these matrices makes it stable
        solution = sparse_solve(component_balance_matrix(system, L, V, stripping), rhs, permc_spec="NATURAL")
        if solution is None:
            # singular or overflowing (stripping factors multiplied over a very long column):
            # keep the last sweep's profile rather than carry NaN into the start
            break
        raw = np.maximum(solution.reshape(c, N).T, 1e-30)
        l = raw
        if two_products:
            l = theta_correction(raw, stripping[t] * raw[t], raw[system.bottom], system.total_feed_by_component, V[t])
        x_new = l / l.sum(axis=1, keepdims=True)
        if sweep < max_sweeps:
            x = x_new
        else:
            # sweeps that have not settled (they cycle where K hangs on x through the activity
            # coefficients) go on relaxed: halfway to the new compositions, in their logarithms
            x = np.sqrt(np.maximum(x, 1e-300) * x_new)
            x = x / x.sum(axis=1, keepdims=True)
            raw = x * raw.sum(axis=1, keepdims=True)  # the start's flows keep the relaxed compositions
            relaxed_x += x
            relaxed_flows += raw
            relaxed += 1
        step = bubble_point_step(thermo, system.pressures, x, T, y)
        if step is None:
            break
        T, y, moved = step
        if moved < tolerance:
            settled = True
            break
    if raw is None:  # not one sweep solved: the flows of the given compositions
        raw = L[:, None] * x
    mean = None
    if cycle_mean and not settled and relaxed:
        x_mean = relaxed_x / relaxed
        step = bubble_point_step(thermo, system.pressures, x_mean, T, y)
        if step is not None:
            mean = Sweeps(step[0], x_mean, relaxed_flows / relaxed, stripping_factors(step[0], x_mean, step[1]), False)
    return Sweeps(T, x, raw, stripping_factors(T, x, y), settled, mean)


@dataclass(frozen=True)
class Sweeps:
    """The profile the bubble-point sweeps leave: temperatures (K), liquid compositions,
    component liquid flows (scaled) and stripping factors S with v = S l, per stage; whether
    the sweeps settled; and, when they did not and it was asked for, the profile at the mean
    composition of the relaxed sweeps."""

    temperature: np.ndarray
    x: np.ndarray
    liquid: np.ndarray
    stripping: np.ndarray
    settled: bool
    cycle_mean: "Sweeps | None" = None


def bubble_point_step(thermo, pressures: np.ndarray, x: np.ndarray, T: np.ndarray, y: np.ndarray | None):
    """One sweep's temperature step: (bubble temperatures of the liquids ``x``, their incipient
    vapors, the largest temperature move in K) from the last temperatures ``T`` and vapors
    ``y``, or None when a bubble point cannot be found."""
    try:
        T_new, y_new = bubble_temperature(thermo, pressures, x, guess=T, max_iterations=60, vapor_guess=y)
    except ThermoError:
        return None
    return T_new, y_new, float(np.max(np.abs(T_new - T)))


def theta_correction_applies(system: MeshSystem) -> bool:
    """The sweeps correct the product split of a column with exactly two products: a condenser
    and a reboiler, no side draws."""
    return (
        system.graph.condenser != "none" and system.graph.has_reboiler
        and not np.any(system.liquid_draws) and not np.any(system.vapor_draws)
    )


def theta_correction(l: np.ndarray, top: np.ndarray, bottom: np.ndarray, feed: np.ndarray, distillate: float) -> np.ndarray:
    """Holland's theta method of convergence (Holland, *Fundamentals of Multicomponent
    Distillation*, 1981, ch. 2): the product split of a sweep, ``top`` and ``bottom`` component
    flows, is corrected to ``d_i = f_i / (1 + theta b_i / d_i)`` with the one theta that makes
    the overhead total ``distillate``, and every stage's liquid flow of component i is scaled
    by ``d_i,corrected / d_i``. The sweeps alone leave the overhead total free, and it can
    drift far from the overhead rate the flows were built for. ``d_i = f_i expit(ln(d_i/b_i) -
    ln theta)`` is the form of :func:`fenske_split` with exponent 1."""
    if not 0.0 < distillate < float(np.sum(feed)):
        return l
    top, bottom = np.maximum(top, 1e-300), np.maximum(bottom, 1e-300)
    corrected = fenske_split(feed, np.log(top) - np.log(bottom), distillate, 1.0)
    return l * (corrected / top)[None, :]


def _profile_spec_error(system: MeshSystem, row: SpecRow, profile_result) -> float:
    """How far a CMO profile is from meeting a composition, recovery or temperature spec."""
    _, _, sweeps = profile_result
    top = sweeps.stripping[system.top] * sweeps.liquid[system.top]
    bottom = sweeps.liquid[system.bottom]
    return SPEC_REGISTRY[row.kind].start.profile_error(row, sweeps.temperature, top, bottom, system.total_feed_by_component)


def _root_by_walking(
    error, start: float, low: float, high: float, tolerance: float, smooth: Callable[[], bool] = lambda: False,
) -> float:
    """A root of ``error`` near ``start`` in [low, high]: when ``smooth()`` says the errors at
    the start and a probe beside it may be extrapolated, first the secant step through them if
    it lands within the first step of the walk; then step out (widening the step) first in
    the direction in which |error| shrinks, then in the other one (the error need not be
    monotone), and finish with Brent's method (Brent 1973) on the bracket. Returns ``start``
    when no sign change is found."""
    value = error(start)
    if not np.isfinite(value) or value == 0.0:
        return start
    probe = float(np.clip(start * 1.02, low, high))
    probe_value = error(probe)
    if np.isfinite(probe_value) and np.sign(probe_value) != np.sign(value):
        return _bracketed(error, start, probe, tolerance, start)
    if np.isfinite(probe_value) and probe_value != value and smooth():
        # a root just past the probe can lie closer than the walk's first step, and the walk
        # can overshoot it into a range where the error turns back (near an azeotrope)
        secant = start - value * (probe - start) / (probe_value - value)
        if abs(secant - start) <= _FIRST_WALK_STEP * start and low <= secant <= high:
            secant_value = error(secant)
            if np.isfinite(secant_value) and np.sign(secant_value) != np.sign(value):
                return _bracketed(error, start, secant, tolerance, start)
    first = 1.0 if np.isfinite(probe_value) and abs(probe_value) < abs(value) else -1.0
    for direction in (first, -first):
        a, fa = start, value
        step = _FIRST_WALK_STEP * start
        for _ in range(14):
            b = float(np.clip(a + direction * step, low, high))
            fb = error(b)
            if not np.isfinite(fb):
                break
            if np.sign(fb) != np.sign(fa):
                return _bracketed(error, a, b, tolerance, start)
            if b in (low, high):
                break
            a, fa = b, fb
            step *= 1.6
    return start


def _bracketed(error, a: float, b: float, tolerance: float, fallback: float) -> float:
    try:
        return float(brentq(error, min(a, b), max(a, b), xtol=tolerance, maxiter=40))
    except (ValueError, RuntimeError):
        return fallback
