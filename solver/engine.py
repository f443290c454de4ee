"""The engine: ``simulate(case) -> Result``, the rigorous column solution, start to finish.

case -> thermo package -> stage graph -> feeds (flashed) -> MESH system -> default start ->
Newton -> independent post-check -> Result. A result is marked converged only when Newton
met its tolerance *and* the post-check, which recomputes every stage's component balance,
equilibrium relation, summation and enthalpy balance from the reported streams with freshly
evaluated properties, passes.
"""

from __future__ import annotations

import dataclasses
from typing import Any

import numpy as np

from .case import Case
from .errors import CaseError, ConvergenceError, SpecError, ThermoError
from .continuation import continue_to_real_model
from .feasibility import check_binary_limits, check_specifications
from .initial import initial_estimate, theta_correction_applies
from .mesh import CondenserSetting, FeedData, MeshSystem
from .network import StageGraph, build_stage_graph
from .newton import NewtonOptions, solve
from .results import Result, StageFeed
from .shortening import MIN_STAGES, shortened_case, stretched_start
from .thermo.flash import feed_state, feed_state_by_phase
from .thermo.package import ThermoPackage

POST_CHECK_TOLERANCE = 1e-7


def case_summary(case: Case) -> dict[str, Any]:
    """The normalized case (SI) as plain data, for the result file."""

    def plain(value: Any) -> Any:
        if dataclasses.is_dataclass(value):
            return {f.name: plain(getattr(value, f.name)) for f in dataclasses.fields(value) if f.name != "raw"}
        if isinstance(value, dict) or hasattr(value, "items"):
            return {str(k): plain(v) for k, v in value.items()}
        if isinstance(value, (list, tuple)):
            return [plain(v) for v in value]
        return value

    return plain(case)


def feed_data(case: Case, thermo: ThermoPackage, graph: StageGraph) -> tuple[FeedData, list[dict], tuple]:
    """Flash each feed at its own temperature (or vapor fraction) and pressure; the energy
    balance takes its rigorous enthalpy, or ``(1 - q) lambda`` under the ``cmo`` model."""
    N, c = graph.stage_count, len(case.component_names)
    component_flows = np.zeros((N, c))
    enthalpy_flows = np.zeros(N)
    details: list[dict] = []
    per_stage: list[list[StageFeed]] = [[] for _ in range(N)]
    for feed in case.feeds:
        stage = feed.stage - 1
        stage_pressure = float(graph.pressures[stage])
        pressure = feed.pressure if feed.pressure is not None else stage_pressure
        try:
            state = feed_state(
                thermo,
                np.asarray(feed.composition),
                pressure,
                temperature=feed.temperature,
                vapor_fraction=feed.vapor_fraction,
                reference_pressure=stage_pressure,
            )
        except ThermoError:
            if thermo.enthalpy_model != "cmo":
                raise
            state = feed_state_by_phase(
                thermo, np.asarray(feed.composition), pressure,
                temperature=feed.temperature, vapor_fraction=feed.vapor_fraction,
            )
        if thermo.enthalpy_model == "cmo":
            enthalpy = (1.0 - state.q) * thermo.cmo_latent_heat
        else:
            enthalpy = state.enthalpy
        z = np.asarray(feed.composition, dtype=float)
        component_flows[stage] += feed.flow * z
        enthalpy_flows[stage] += feed.flow * enthalpy
        details.append({"flow": feed.flow, "q": state.q})
        per_stage[stage].append(
            StageFeed(
                flow=feed.flow, z=tuple(z.tolist()), h=enthalpy, name=feed.name,
                temperature=state.temperature, pressure=pressure, vapor_fraction=state.vapor_fraction, q=state.q,
            )
        )
    return FeedData(component_flows, enthalpy_flows), details, tuple(tuple(s) for s in per_stage)


def post_check(result: Result, thermo: ThermoPackage, graph: StageGraph) -> dict[str, float]:
    """Largest violation of each MESH equation group, recomputed from the reported streams."""
    T, P = result.temperature, result.pressure
    x, y = result.x, result.y
    L, V = result.liquid_flow, result.vapor_flow
    U, W = result.liquid_draw, result.vapor_draw
    feeds = np.zeros_like(x)
    feed_h = np.zeros(len(T))
    for j, stage_feeds in enumerate(result.stage_feeds):
        for feed in stage_feeds:
            feeds[j] += feed.flow * np.asarray(feed.z)
            feed_h[j] += feed.flow * feed.h
    scale = max(float(feeds.sum()), 1e-300)
    l, v = L[:, None] * x, V[:, None] * y
    A_L, A_V = graph.liquid_inflow, graph.vapor_inflow
    balance = l + U[:, None] * x + v + W[:, None] * y - A_L @ l - A_V @ v - feeds
    K = thermo.k_values(T, P, x, derivatives=False).K
    vapor_in = A_V @ v
    V_in = vapor_in.sum(axis=1)
    y_in = vapor_in / np.maximum(V_in, 1e-300)[:, None]
    E = result.efficiency[:, None]
    equilibrium = y - E * K * x - (1 - E) * y_in
    if result.condenser == "total":
        equilibrium[0] = y[0] - x[0]
    h_L = thermo.liquid_enthalpy(T, x).molar
    h_V = thermo.vapor_enthalpy(T, y).molar
    if result.condenser == "total":
        h_V = h_V.copy()
        h_V[0] = thermo.liquid_enthalpy(T[:1], y[:1]).molar[0]
    energy = (L + U) * h_L + (V + W) * h_V - A_L @ (L * h_L) - A_V @ (V * h_V) - feed_h - result.duty
    energy_scale = scale * thermo.cmo_latent_heat
    balances = result.balances()
    return {
        "component_balance_max": float(np.max(np.abs(balance)) / scale),
        "equilibrium_max": float(np.max(np.abs(equilibrium[1:] if result.condenser == "total" else equilibrium))),
        "summation_max": float(max(np.max(np.abs(x.sum(axis=1) - 1)), np.max(np.abs(y.sum(axis=1) - 1)))),
        "enthalpy_balance_max": float(np.max(np.abs(energy)) / energy_scale),
        "enthalpy_recomputed_max": float(
            max(np.max(np.abs(h_L - result.h_liquid)), np.max(np.abs(h_V - result.h_vapor))) / thermo.cmo_latent_heat
        ),
        **balances,
    }


VANISHING_FLOW = 1e-6  # of the total feed


def _vanishing_streams(result: Result) -> list[str]:
    """Names of the products and internal flows that are all but zero: such a "solution" meets
    the MESH equations trivially (a dry tray, an empty product) and is no column at all."""
    total = sum(feed.flow for feeds in result.stage_feeds for feed in feeds)
    limit = VANISHING_FLOW * max(total, 1e-300)
    found = []
    if result.distillate_flow < limit:
        found.append("distillate")
    if result.bottoms_flow < limit:
        found.append("bottoms")
    # liquid leaving stages 1..N-1 for the stage below, vapor leaving stages 2..N for the one above
    if np.any(result.liquid_flow[:-1] < limit):
        found.append("liquid on some stages")
    if np.any(result.vapor_flow[1:] < limit):
        found.append("vapor on some stages")
    return found


def build_system(case: Case, thermo: ThermoPackage | None = None):
    """Everything up to the equations: (thermo, graph, system, per-feed details, stage feeds)."""
    thermo = thermo or ThermoPackage.from_case(case)
    graph = build_stage_graph(case)
    feeds, details, stage_feeds = feed_data(case, thermo, graph)
    check_specifications(
        case.specs,
        case.component_names,
        feeds.component_flows.sum(axis=0),
        float(graph.liquid_draws.sum() + graph.vapor_draws.sum()),
        [d["q"] for d in details],
        [d["flow"] for d in details],
        thermo.cmo_latent_heat,
    )
    if len(case.component_names) == 2 and len(case.feeds) == 1 and not case.column.side_draws:
        all_equilibrium = bool(np.all(graph.efficiencies == 1.0))
        check_binary_limits(
            case.specs,
            case.component_names,
            thermo,
            float(np.mean(graph.pressures)),
            np.asarray(case.feeds[0].composition),
            details[0]["q"],
            float(graph.stage_count) if all_equilibrium else None,
            graph.condenser,
        )
    system = MeshSystem(
        graph,
        thermo,
        feeds,
        case.specs,
        case.component_names,
        condenser_setting=CondenserSetting(case.column.reflux_temperature, case.column.reflux_subcooling),
    )
    return thermo, graph, system, details, stage_feeds


def result_from_solution(case, thermo, graph, system, stage_feeds, X, newton) -> Result:
    T, l, v = system.unpack(X)
    fs = system.flow_scale
    L, V = l.sum(axis=1), v.sum(axis=1)
    x = l / np.maximum(L, 1e-300)[:, None]
    y = v / np.maximum(V, 1e-300)[:, None]
    K = thermo.k_values(T, graph.pressures, x, derivatives=False).K
    h_L, h_V = system.stage_enthalpies(X)
    duties = system.stage_duties(X)
    return Result(
        title=case.title,
        case=case_summary(case),
        converged=bool(newton.converged),
        iterations=newton.iterations,
        residual_norm=newton.residual_norm,
        message=newton.message,
        components=tuple(case.component_names),
        roles=graph.roles,
        temperature=T.copy(),
        pressure=graph.pressures.copy(),
        liquid_flow=L * fs,
        vapor_flow=V * fs,
        x=x,
        y=y,
        K=K,
        h_liquid=h_L,
        h_vapor=h_V,
        efficiency=graph.efficiencies.copy(),
        liquid_draw=graph.liquid_draws.copy(),
        vapor_draw=graph.vapor_draws.copy(),
        duty=duties,
        stage_feeds=stage_feeds,
        condenser=graph.condenser,
        reboiler="partial" if graph.has_reboiler else "none",
        thermo=thermo.describe(),
        iteration_log=tuple(r.as_dict() for r in newton.log),
        enthalpy_model=thermo.enthalpy_model,
    )


def simulate(
    case: Case,
    *,
    options: NewtonOptions | None = None,
    thermo: ThermoPackage | None = None,
    start: np.ndarray | None = None,
    continuation: bool = True,
    shortening: int = 2,
) -> Result:
    """Solve the column of ``case`` rigorously. Always returns a Result; ``converged`` tells
    whether it may be used.

    The fallback chain: (1) damped Newton from the default start (backtracking line search,
    then the dogleg path when no step length lowers the residuals), then from the start of the
    sweeps without the theta correction ("second start"); (2) if that fails, homotopy
    continuation from ideal K-values and CMO enthalpies to the real model
    (:mod:`solver.continuation`); (3) for a column of at least
    :data:`~solver.shortening.MIN_STAGES` stages, the same separation with the runs of plain
    stages halved is solved first (by this same chain, nested at most ``shortening`` deep) and
    Newton starts the full column from its profile stretched over the stages
    (:mod:`solver.shortening`). ``Result.strategy`` records the rung that solved it. Raises
    :class:`ConvergenceError` only for NaN/inf (naming the stage and variable), and
    :class:`SpecError`/:class:`CaseError`/:class:`ThermoError` for bad input."""
    thermo, graph, system, details, stage_feeds = build_system(case, thermo)
    options = options or NewtonOptions()
    X0 = start if start is not None else initial_estimate(system, case.specs, details, graph.feed_stages)
    newton = _newton(system, X0, options)
    full_steps = all(entry.damping == 1.0 for entry in newton.log[1:])
    strategy: dict[str, Any] = {
        "rung": ("newton" if full_steps else "damped newton") if newton.converged else None,
        "newton_iterations": newton.iterations,
    }
    if not newton.converged and start is None and theta_correction_applies(system):
        # the sweeps without the theta correction: their own product split, which near an
        # azeotrope can be the better guess (the correction holds the overhead rate of a
        # split that ignores the azeotrope)
        plain = _newton(system, initial_estimate(system, case.specs, details, graph.feed_stages, theta=False), options)
        strategy["second_start"] = {"converged": bool(plain.converged), "newton_iterations": plain.iterations}
        if plain.converged:
            newton = plain
            strategy["rung"] = "second start"
    if not newton.converged and start is None and continuation:
        cmo_flows = np.zeros(graph.stage_count)
        np.add.at(
            cmo_flows,
            graph.feed_stages,
            [d["flow"] * (1.0 - d["q"]) * thermo.cmo_latent_heat for d in details],
        )
        path = continue_to_real_model(system, case.specs, details, cmo_flows, options)
        strategy["homotopy_path"] = [point.as_dict() for point in path.path]
        strategy["homotopy_reached"] = path.reached
        if path.converged:
            newton = path.newton
            strategy["rung"] = "homotopy"
        else:
            strategy["rung"] = None
    if not newton.converged and start is None and shortening > 0 and case.column.stages >= MIN_STAGES:
        stretched, record = _solve_from_shorter_column(case, thermo, system, options, continuation, shortening)
        if record is not None:
            strategy["shortened_column"] = record
        if stretched is not None and stretched.converged:
            newton = stretched
            strategy["rung"] = "shorter column"
    strategy["chain"] = (
        "damped Newton (line search, dogleg) from the default start; then from the sweeps' start without the theta "
        "correction; then homotopy from ideal K-values and CMO enthalpies; then, for a long column, the start "
        "stretched from a shortened column's solution"
    )
    result = result_from_solution(case, thermo, graph, system, stage_feeds, newton.X, newton)
    check = post_check(result, thermo, graph)
    message = result.message
    converged = result.converged
    if converged:
        failed = {k: v for k, v in check.items() if k != "enthalpy_recomputed_max" and not (v <= POST_CHECK_TOLERANCE)}
        if failed:
            converged = False
            message = "Newton met its tolerance but the independent post-check failed: " + ", ".join(
                f"{k} = {v:.3g}" for k, v in failed.items()
            )
    if converged:
        degenerate = _vanishing_streams(result)
        if degenerate:
            converged = False
            message = (
                "the equations are met only by a column that carries (almost) no "
                + " and no ".join(degenerate)
                + "; the specifications cannot be met by this column (too few stages, or a feed too cold "
                "or too hot for them)"
            )
    if converged:
        try:
            thermo.pure.check_temperature(result.temperature)
        except ThermoError as exc:
            converged = False
            message = f"solution outside the property models' range: {exc}"
    return dataclasses.replace(result, converged=converged, message=message, post_check=check, strategy=strategy)


def _solve_from_shorter_column(
    case: Case, thermo: ThermoPackage, system: MeshSystem, options: NewtonOptions, continuation: bool, depth: int
):
    """Rung 3 of the fallback chain: solve the case with its runs of plain stages halved, then
    Newton on the full column from that profile stretched. Returns (Newton result or None, the
    record for ``Result.strategy``, or None when the shortened column is no shorter)."""
    short_case, positions = shortened_case(case, 0.5)
    if short_case.column.stages >= case.column.stages - 2:
        return None, None
    record: dict[str, Any] = {"stages": short_case.column.stages}
    try:
        short = simulate(short_case, options=options, thermo=thermo, continuation=continuation, shortening=depth - 1)
    except (CaseError, SpecError, ThermoError, ConvergenceError) as exc:
        record.update(converged=False, message=str(exc))
        return None, record
    record.update(
        converged=bool(short.converged),
        rung=short.strategy.get("rung"),
        strategy={k: v for k, v in short.strategy.items() if k != "chain"},
    )
    if not short.converged:
        record["message"] = short.message
        return None, record
    X0 = stretched_start(short, positions, system.N, system.flow_scale)
    try:
        newton = _newton(system, X0, options)
    except ConvergenceError as exc:
        record["message"] = str(exc)
        return None, record
    record["newton_iterations"] = newton.iterations
    return newton, record


def _newton(system: MeshSystem, X0: np.ndarray, options: NewtonOptions):
    return solve(
        system.evaluate, X0, system.temperature_index(), system.flow_mask(), options,
        describe_variable=system.variable_name, describe_equation=system.equation_name,
    )
