"""The engine of a column network: ``simulate_network(case) -> NetworkResult``.

case -> thermo package -> network graph (degrees of freedom checked) -> feeds flashed -> specs
resolved -> one Newton system over every stage of every column (:mod:`solver.network_mesh`)
-> the network's default start (:mod:`solver.network_start`) -> damped Newton -> independent
post-check -> NetworkResult. As for one column, a result is converged only when Newton met its
tolerance, the post-check (every stage's balances and equilibrium relations recomputed from the
reported streams with freshly evaluated properties) passed, no product or internal flow
vanished and every temperature lies within the property models' range. A converged network's
liquids are tested for a split into two liquid phases (``extra["liquid_stability"]``).
"""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np

from .case import Case
from .continuation import blended_feeds, trace_path
from .errors import ConvergenceError, ThermoError
from .feed_flash import flash_feed_list
from .network_graph import check_network
from .network_mesh import NetworkSystem
from .network_results import NetworkResult, leaves_liquid_slot
from .network_shortening import shortened_network, stretched_network_start
from .network_specs import network_products, resolve_specs
from .network_start import network_initial_estimate, network_starts
from .newton import NewtonOptions, NewtonResult, solve_system
from .results import case_summary
from .thermo.homotopy import HomotopyThermo
from .thermo.liquid_split import check_liquids
from .thermo.package import ThermoPackage

__all__ = ["FIRST_START_ITERATIONS", "SHORTENING_RATIO", "NETWORK_FALLBACK_CHAIN", "NETWORK_POST_CHECK_TOLERANCE", "build_network_system", "network_post_check", "simulate_network"]

NETWORK_POST_CHECK_TOLERANCE = 1e-7
_VANISHING_FLOW = 1e-6  # of the total feed


def build_network_system(case: Case, thermo: ThermoPackage | None = None) -> NetworkSystem:
    """The thermo package, the network graph (its degrees of freedom checked against the
    specs), the flashed feeds and the resolved specs, as one :class:`NetworkSystem`."""
    thermo = thermo or ThermoPackage.from_case(case)
    graph = check_network(case)
    feeds = flash_feed_list(case.feeds, thermo, [float(p) for p in graph.pressures[graph.feed_stages]],
                            source_file=case.source_file)
    return NetworkSystem(graph, thermo, feeds, resolve_specs(case, graph), case.component_names,
                         free_feeds=tuple(feed.name for feed in case.feeds if feed.free))


#: Newton iterations the first start gets before the second is tried (the first is continued
#: afterwards with the full budget if the second fails too).
FIRST_START_ITERATIONS = 20

#: The rungs in order, as recorded in ``NetworkResult.strategy["chain"]``.
NETWORK_FALLBACK_CHAIN = (
    "damped Newton (line search, dogleg) from the better of the network's two starts (smaller natural level) "
    f"for {FIRST_START_ITERATIONS} iterations; then from the other; then the first continued; then homotopy from "
    "ideal K-values and CMO enthalpies; then the start stretched from the solution of the network with every column "
    "shortened"
)

#: The shorter-column rung scales every column's sections of plain stages by this.
SHORTENING_RATIO = 0.5


def simulate_network(case: Case, *, options: NewtonOptions | None = None, thermo: ThermoPackage | None = None,
                     start: np.ndarray | None = None, continuation: bool = True, shortening: int = 1) -> NetworkResult:
    """Solve the network of ``case`` (or a single-column case as a network of one) from the
    default start (or the scaled unknowns ``start``). Always returns a NetworkResult;
    ``converged`` says whether it may be used.

    The chain without ``start`` (:data:`NETWORK_FALLBACK_CHAIN`): Newton from the better of the
    network's two starts (:func:`solver.network_start.network_starts`: CMO flows alone, or after
    energy passes; the one with the smaller natural level first) for at most
    :data:`FIRST_START_ITERATIONS`; then from the other ("second start"); then the first again,
    continued with the full budget; then (unless not ``continuation``) homotopy continuation
    from ideal K-values and CMO enthalpies to the real model over the whole network
    (:func:`solver.continuation.trace_path`); then (unless ``shortening`` is 0) the "shorter
    column": the network with every column's sections of plain stages halved
    (:mod:`solver.network_shortening`) solved by this chain without this rung, and Newton from
    its solution stretched over the full network. ``strategy["rung"]`` names the rung that
    solved it; when none did, the message says what each tried."""
    system = build_network_system(case, thermo)
    options = options or NewtonOptions()
    if start is not None:
        newton = solve_system(system, start, options)
        return _judged(network_result(case, system, newton, _record(newton, "newton")), system)
    first_budget = dataclasses.replace(options, max_iterations=min(options.max_iterations, FIRST_START_ITERATIONS))
    first_start, second_start = network_starts(system)
    newton = solve_system(system, first_start.X, first_budget)
    strategy = {**_record(newton, "newton"), "start": first_start.name}
    if not newton.converged:
        second = solve_system(system, second_start.X, options)
        strategy["second_start"] = {"start": second_start.name, "converged": bool(second.converged), "newton_iterations": second.iterations}
        if second.converged:
            newton, strategy["rung"] = second, "second start"
        elif options.max_iterations > first_budget.max_iterations:
            continued = solve_system(system, newton.X, dataclasses.replace(options, max_iterations=options.max_iterations - newton.iterations))
            strategy["continued"] = {"converged": bool(continued.converged), "newton_iterations": continued.iterations}
            newton = continued
            if continued.converged:
                strategy["rung"] = "continued"
    if not newton.converged and continuation:
        found, record = _network_homotopy(system, options)
        strategy.update(record)
        if found is not None and found.converged:
            newton, strategy["rung"] = found, "homotopy"
    if not newton.converged and shortening > 0:
        found, record = _from_shorter_network(case, system, options, continuation, shortening)
        strategy.update(record)
        if found is not None and found.converged:
            newton, strategy["rung"] = found, "shorter column"
    strategy["chain"] = NETWORK_FALLBACK_CHAIN
    result = network_result(case, system, newton, strategy)
    if not newton.converged:
        result = dataclasses.replace(result, message=f"{result.message}; {_what_was_tried(strategy)}")
    return _judged(result, system)


def _what_was_tried(strategy: dict[str, Any]) -> str:
    """One sentence on every rung of the chain that failed, for the message of an unsolved network."""
    tried = [f"the {strategy.get('start', 'network start')} ({strategy['newton_iterations']} Newton iterations)"]
    if "second_start" in strategy:
        tried.append(f"the {strategy['second_start']['start']} ({strategy['second_start']['newton_iterations']})")
    if "continued" in strategy:
        tried.append(f"the first continued ({strategy['continued']['newton_iterations']})")
    if "homotopy_path" in strategy:
        tried.append(f"homotopy from ideal K-values, which reached t = {strategy['homotopy_reached']:.3g} of 1")
    elif "homotopy_failed" in strategy:
        tried.append(f"homotopy, stopped by: {strategy['homotopy_failed']}")
    elif "homotopy" in strategy:
        tried.append(f"homotopy ({strategy['homotopy']})")
    shorter = strategy.get("shorter_column")
    if shorter is not None:
        if "newton_iterations" in shorter:
            tried.append(f"the shorter column ({shorter['stages']} stages solved, then {shorter['newton_iterations']} on the full network)")
        elif shorter.get("converged"):
            tried.append(f"the shorter column ({shorter['stages']} stages solved; the full network from its solution: {shorter.get('message', '')})")
        else:
            tried.append(f"the shorter column ({shorter['stages']} stages), unsolved: {shorter.get('message', '')}")
    return "the fallback chain failed on every rung: " + ", ".join(tried)


def _from_shorter_network(case: Case, system: NetworkSystem, options: NewtonOptions, continuation: bool,
                          depth: int) -> tuple[NewtonResult | None, dict[str, Any]]:
    """The last rung: the network with every column shortened (:func:`shortened_network`) solved
    by the chain ``depth - 1`` deep, then Newton on the full network from its solution stretched
    (:func:`stretched_network_start`). Returns (Newton result or None, the strategy record)."""
    short_case, positions = shortened_network(case, SHORTENING_RATIO)
    stages = sum(len(at) for at in positions.values())
    if stages >= system.N:
        return None, {}
    record: dict[str, Any] = {"stages": stages}
    try:
        short = simulate_network(short_case, options=options, thermo=system.thermo, continuation=continuation, shortening=depth - 1)
    except (ThermoError, ConvergenceError) as exc:
        record.update(converged=False, message=str(exc))
        return None, {"shorter_column": record}
    record.update(converged=bool(short.converged), rung=short.strategy.get("rung"),
                  strategy={k: v for k, v in short.strategy.items() if k != "chain"})
    if not short.converged:
        record["message"] = short.message
        return None, {"shorter_column": record}
    X = stretched_network_start(short, positions, system)
    if X is None:
        record["message"] = "the shortened network's unknowns do not map onto the full network's"
        return None, {"shorter_column": record}
    try:
        newton = solve_system(system, X, options)
    except ConvergenceError as exc:
        record["message"] = str(exc)
        return None, {"shorter_column": record}
    record["newton_iterations"] = newton.iterations
    return newton, {"shorter_column": record}


def _network_homotopy(system: NetworkSystem, options: NewtonOptions) -> tuple[NewtonResult | None, dict[str, Any]]:
    """Continuation from ideal K-values and CMO enthalpies (:mod:`solver.thermo.homotopy`) to
    the network's real model, each point by Newton from the last; at ``t = 0`` from the
    network start. Not applied with an equation of state (its easy end has no activity
    coefficients to scale)."""
    if system.thermo.vapor_dependent:
        return None, {"homotopy": "not applied: the path from ideal K-values does not lead to an equation of state"}
    base = system.thermo

    def system_at(t: float) -> NetworkSystem:
        if t >= 1.0:
            return system
        return NetworkSystem(system.graph, HomotopyThermo(base, t), blended_feeds(system.feeds, base.cmo_latent_heat, t),
                             system.specs, system.component_names, flow_scale=system.flow_scale, energy_scale=system.energy_scale,
                             free_feeds=system.free_feeds)

    try:
        path = trace_path(system_at, network_initial_estimate, options)
    except (ThermoError, ConvergenceError) as exc:  # e.g. a bubble point above the critical point on the way
        return None, {"homotopy_failed": str(exc)}
    return path.newton, {"homotopy_path": [point.as_dict() for point in path.path], "homotopy_reached": path.reached}


def _record(newton: NewtonResult, name: str) -> dict[str, Any]:
    full_steps = all(entry.damping == 1.0 for entry in newton.log[1:])
    return {"rung": ((name if full_steps else f"damped {name}") if newton.converged else None), "newton_iterations": newton.iterations}


def network_result(case: Case, system: NetworkSystem, newton: NewtonResult, strategy: dict[str, Any]) -> NetworkResult:
    """The NetworkResult of Newton's last point (not yet judged by the post-check)."""
    graph, thermo = system.graph, system.thermo
    fs, fe = system.flow_scale, system.flow_scale * system.energy_scale
    profile = system.profile(newton.X)
    s, extras, rates, _, _ = system.state(newton.X)
    K = thermo.k_values(profile.temperature, system.pressures, profile.x, derivatives=False, y=profile.y).K
    products = {}
    for p in network_products(graph):
        liquid = p.phase == "liquid"
        flow = p.rate if p.rate is not None else p.share * (profile.liquid_flow if liquid else profile.vapor_flow)[p.stage]
        column, number = graph.stage_nodes[p.stage]
        # a total condenser's liquid distillate travels in the stage's vapor slot (the engine's convention)
        phase = "liquid" if graph.roles[p.stage] == "total_condenser" else p.phase
        products[p.name] = {"column": column, "stage": number, "phase": phase, "flow": float(flow),
                            "composition": (profile.x if liquid else profile.y)[p.stage].tolist(),
                            "T": float(profile.temperature[p.stage]), "h": float((s.h_L if liquid else s.h_V)[p.stage])}
    duties = {name: float(extras[k] * fe) for k, name in enumerate(system.extra_names) if name.endswith((".condenser", ".reboiler"))}
    connections = {}
    for c in graph.network.connections:
        stream = system.connections[c.name]
        flow, _, _ = system.connection_flow(s, extras, c.name)
        duty = None
        if c.exchanger is not None:
            duty = c.exchanger.duty if c.exchanger.duty is not None else float(extras[system.extra_index(f"{c.name}.duty")] * fe)
            duties[c.name] = duty
        source = {"column": c.from_column, "stage": c.from_stage, "phase": "liquid" if stream.carries_liquid else "vapor"}
        if c.from_product is not None:
            source["product"] = c.from_product
        connections[c.name] = {"from": source,
                               "to": {"column": c.to_column, "stage": c.to_stage},
                               "flow": float(flow * fs), "fraction": stream.weight, "duty": duty}
    liquid = system.transfer_liquid
    transfer_liquid = np.bincount(system.transfer_source[liquid], rates[liquid], minlength=system.N) * fs
    transfer_vapor = np.bincount(system.transfer_source[~liquid], rates[~liquid], minlength=system.N) * fs
    columns, first = [], 0
    for section in graph.network.columns:
        col = section.column
        columns.append({"name": section.name, "stages": col.stages, "condenser": col.condenser, "reboiler": col.reboiler, "first": first})
        first += col.stages
    solved = {name: float(extras[k] * fs) for name, k in zip(system.free_feeds, system.free_feed_extra)}
    feeds = [dataclasses.replace(f, flow=solved[f.name]) if f.name in solved else f for f in system.feeds]
    feeds_at = [tuple(f for f, g in zip(feeds, system.feed_stage_index) if g == j) for j in range(system.N)]
    return NetworkResult(
        title=case.title, case=case_summary(case), converged=bool(newton.converged), iterations=newton.iterations,
        residual_norm=newton.residual_norm, message=newton.message, components=tuple(case.component_names),
        columns=tuple(columns), stage_column=tuple(n[0] for n in graph.stage_nodes), stage_number=tuple(n[1] for n in graph.stage_nodes),
        roles=graph.roles, temperature=profile.temperature, pressure=profile.pressure, liquid_flow=profile.liquid_flow,
        vapor_flow=profile.vapor_flow, x=profile.x, y=profile.y, K=K, h_liquid=s.h_L.copy(), h_vapor=s.h_V.copy(),
        efficiency=system.efficiencies.copy(), liquid_draw=graph.liquid_draws.copy(), vapor_draw=graph.vapor_draws.copy(),
        transfer_liquid=transfer_liquid, transfer_vapor=transfer_vapor, duty=system.stage_duties(newton.X),
        stage_feeds=tuple(feeds_at), products=products, duties=duties, connections=connections, thermo=thermo.describe(),
        iteration_log=tuple(r.as_dict() for r in newton.log), enthalpy_model=thermo.enthalpy_model, strategy=strategy,
        iterations_by_step=_newton_steps(strategy),
    )


def _newton_steps(strategy: dict[str, Any]) -> tuple[tuple[str, int], ...]:
    """(step, Newton iterations) of every run the strategy records, in the order run: the first
    run at its top level ("newton"), each later step as an entry with its own count, and each
    point of a homotopy path ("homotopy t=..."); then the shortened network's own steps (each
    prefixed "shortened network: ") and Newton on the full network from its solution ("shorter column")."""
    steps = [("newton", int(strategy["newton_iterations"]))] if "newton_iterations" in strategy else []
    steps += [(name, int(entry["newton_iterations"])) for name, entry in strategy.items()
              if isinstance(entry, dict) and "newton_iterations" in entry and name != "shorter_column"]
    steps += [(f"homotopy t={point['t']:.4g}", int(point["iterations"])) for point in strategy.get("homotopy_path", ())]
    shorter = strategy.get("shorter_column", {})
    if shorter.get("strategy"):
        steps += [(f"shortened network: {name}", n) for name, n in _newton_steps(shorter["strategy"])]
    if "newton_iterations" in shorter:
        steps.append(("shorter column", int(shorter["newton_iterations"])))
    return tuple(steps)


def network_post_check(result: NetworkResult, system: NetworkSystem) -> dict[str, float]:
    """Largest violation of each MESH equation group over the network, recomputed from the
    reported streams (flows, compositions, connections' rates, duties) with fresh properties."""
    thermo, graph = system.thermo, system.graph
    T, P, x, y = result.temperature, result.pressure, result.x, result.y
    L, V = result.liquid_flow, result.vapor_flow
    U = result.liquid_draw + result.transfer_liquid
    W = result.vapor_draw + result.transfer_vapor
    feeds, feed_h = np.zeros_like(x), np.zeros(len(T))
    for j, stage_feeds in enumerate(result.stage_feeds):
        for feed in stage_feeds:
            feeds[j] += feed.flow * np.asarray(feed.z)
            feed_h[j] += feed.flow * feed.h
    h_L = thermo.liquid_enthalpy(T, x, pressure=P).molar
    h_V = thermo.vapor_enthalpy(T, y, pressure=P).molar.copy()
    tops = system.total_condensers
    if len(tops):
        h_V[tops] = thermo.liquid_enthalpy(T[tops], y[tops], pressure=P[tops]).molar
    in_comp, in_h = np.zeros_like(x), np.zeros(len(T))
    for record in result.connections.values():
        if record["fraction"] is not None:
            continue
        src = graph.index[(record["from"]["column"], record["from"]["stage"])]
        dst = graph.index[(record["to"]["column"], record["to"]["stage"])]
        liquid = leaves_liquid_slot(record)
        in_comp[dst] += record["flow"] * (x if liquid else y)[src]
        in_h[dst] += record["flow"] * (h_L if liquid else h_V)[src]
    l, v = L[:, None] * x, V[:, None] * y
    A_L, A_V = graph.liquid_inflow, graph.vapor_inflow
    balance = l + U[:, None] * x + v + W[:, None] * y - A_L @ l - A_V @ v - feeds - in_comp
    K = thermo.k_values(T, P, x, derivatives=False, y=y).K
    vapor_in = (A_V if system.mixing_inflow is None else system.mixing_inflow) @ v  # the vapors a Murphree relation mixes
    y_in = vapor_in / np.maximum(vapor_in.sum(axis=1), 1e-300)[:, None]
    E = result.efficiency[:, None]
    equilibrium = y - E * K * x - (1 - E) * y_in
    keep = np.ones(len(T), dtype=bool)
    keep[tops] = False
    energy = (L + U) * h_L + (V + W) * h_V - A_L @ (L * h_L) - A_V @ (V * h_V) - feed_h - in_h - result.duty
    scale = max(float(feeds.sum()), 1e-300)
    return {
        "component_balance_max": float(np.max(np.abs(balance)) / scale),
        "equilibrium_max": float(np.max(np.abs(equilibrium[keep]))) if keep.any() else 0.0,
        "reflux_max": float(np.max(np.abs(y[tops] - x[tops]))) if len(tops) else 0.0,
        "summation_max": float(max(np.max(np.abs(x.sum(axis=1) - 1)), np.max(np.abs(y.sum(axis=1) - 1)))),
        "enthalpy_balance_max": float(np.max(np.abs(energy)) / (scale * thermo.cmo_latent_heat)),
        **result.balances(),
    }


def _vanishing(result: NetworkResult) -> list[str]:
    total = sum(feed.flow for feeds in result.stage_feeds for feed in feeds)
    limit = _VANISHING_FLOW * max(total, 1e-300)
    found = [name for name, p in result.products.items() if p["flow"] < limit]
    for column in result.columns:
        stages = result.column_stages(column["name"])
        if np.any(result.liquid_flow[stages[:-1]] < limit) or np.any(result.vapor_flow[stages[1:]] < limit):
            found.append(f"internal flows of {column['name']!r}")
    return found


def _heat_links_against_temperature(result: NetworkResult, system: NetworkSystem) -> list[str]:
    """Every heat link whose condenser is not warmer than the reboiler it heats (the second law:
    a linked pair needs the high-pressure column's condensing vapor above the other's boiling
    liquid)."""
    found = []
    graph = system.graph
    for link in graph.network.heat_links:
        hot = result.temperature[graph.index[(link.from_column, 1)]]
        cold_stage = graph.network.section(link.to_column).column.stages
        cold = result.temperature[graph.index[(link.to_column, cold_stage)]]
        if not hot > cold:
            found.append(f"heat link {link.name!r}: {link.from_column}.condenser at {hot - 273.15:.1f} degC would heat "
                         f"{link.to_column}.reboiler at {cold - 273.15:.1f} degC")
    return found


def _judged(result: NetworkResult, system: NetworkSystem) -> NetworkResult:
    check = network_post_check(result, system)
    converged, message = result.converged, result.message
    if converged:
        failed = {k: v for k, v in check.items() if not (v <= NETWORK_POST_CHECK_TOLERANCE)}
        if failed:
            converged = False
            message = "Newton met its tolerance but the independent post-check failed: " + ", ".join(f"{k} = {v:.3g}" for k, v in failed.items())
    if converged:
        vanished = _vanishing(result)
        if vanished:
            converged = False
            message = ("the equations are met only by a network that carries (almost) no " + " and no ".join(vanished)
                       + "; the specifications cannot be met by these columns")
    if converged:
        backwards = _heat_links_against_temperature(result, system)
        if backwards:
            converged = False
            message = "the equations are met, but heat would flow from cold to hot: " + "; ".join(backwards)
    if converged:
        problem = system.thermo.range_problem(result.temperature, result.pressure, result.x, result.y)
        if problem is not None:
            converged = False
            message = f"solution outside the property models' range: {problem}"
    extra = dict(result.extra)
    if converged:
        # every stage's liquid tested for a split into two liquids, as for one column
        labels = [f"{column} {number}" for column, number in zip(result.stage_column, result.stage_number)]
        extra["liquid_stability"] = check_liquids(system.thermo.activity, result.temperature, result.x, labels, result.components)
    return dataclasses.replace(result, converged=converged, message=message, post_check=check, extra=extra)
