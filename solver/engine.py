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
from .feasibility import check_binary_limits, check_specifications, check_total_reflux_bound
from .initial import initial_estimate, theta_correction_applies
from .mesh import CondenserSetting, MeshSystem, column_rows, feed_sums_by_stage
from .network import StageGraph, build_stage_graph
from .network_engine import simulate_network
from .network_results import NetworkResult
from .newton import NewtonOptions, NewtonResult, solve_system
from .feed_flash import flash_feed_list
from .results import Result, case_summary
from .shortening import MIN_STAGES, shortened_case, stretched_start
from .streams import FlashedFeed, StageProfile
from .thermo.liquid_split import check_liquids
from .thermo.package import ThermoPackage

__all__ = [
    "FALLBACK_CHAIN",
    "POST_CHECK_TOLERANCE",
    "LONG_COLUMN",
    "VANISHING_FLOW",
    "build_system",
    "case_summary",
    "flash_feeds",
    "post_check",
    "result_from_solution",
    "simulate",
    "stage_profile",
]

POST_CHECK_TOLERANCE = 1e-7


def flash_feeds(case: Case, thermo: ThermoPackage, graph: StageGraph) -> tuple[FlashedFeed, ...]:
    """Each feed of ``case`` flashed (:func:`solver.feed_flash.flash_feed_list`) at the
    pressure of its stage of ``graph``."""
    return flash_feed_list(case.feeds, thermo, [float(graph.pressures[feed.stage - 1]) for feed in case.feeds],
                           source_file=case.source_file)


def stage_profile(result: Result) -> StageProfile:
    """The stage profile of a result (a start for another solve, see :func:`simulate`)."""
    return StageProfile(
        result.temperature, result.pressure, result.liquid_flow, result.vapor_flow, result.x, result.y
    )


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
    K = thermo.k_values(T, P, x, derivatives=False, y=y).K
    vapor_in = A_V @ v
    V_in = vapor_in.sum(axis=1)
    y_in = vapor_in / np.maximum(V_in, 1e-300)[:, None]
    E = result.efficiency[:, None]
    equilibrium = y - E * K * x - (1 - E) * y_in
    if result.condenser == "total":
        equilibrium[0] = y[0] - x[0]
    h_L = thermo.liquid_enthalpy(T, x, pressure=P).molar
    h_V = thermo.vapor_enthalpy(T, y, pressure=P).molar
    if result.condenser == "total":
        h_V = h_V.copy()
        h_V[0] = thermo.liquid_enthalpy(T[:1], y[:1], pressure=P[:1]).molar[0]
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


def build_system(case: Case, thermo: ThermoPackage | None = None) -> MeshSystem:
    """Everything up to the equations: the thermo package (``thermo``, or one built from the
    case), the stage graph, the flashed feeds and the feasibility checks, and the MESH system
    (which holds all of them)."""
    thermo = thermo or ThermoPackage.from_case(case)
    graph = build_stage_graph(case)
    feeds = flash_feeds(case, thermo, graph)
    feed_component_flows, _ = feed_sums_by_stage(feeds, graph.stage_count, len(case.component_names))
    rows = column_rows(graph, case.specs, case.component_names)
    check_specifications(
        rows,
        case.component_names,
        feed_component_flows.sum(axis=0),
        float(graph.liquid_draws.sum() + graph.vapor_draws.sum()),
        [feed.q for feed in feeds],
        [feed.flow for feed in feeds],
        thermo.cmo_latent_heat,
    )
    if len(case.component_names) == 2 and len(case.feeds) == 1 and not case.column.side_draws:
        all_equilibrium = bool(np.all(graph.efficiencies == 1.0))
        check_binary_limits(
            rows,
            case.component_names,
            thermo,
            float(np.mean(graph.pressures)),
            np.asarray(case.feeds[0].composition),
            feeds[0].q,
            float(graph.stage_count) if all_equilibrium else None,
            graph.condenser,
        )
    if _one_chain_of_equilibrium_stages(case, graph):
        check_total_reflux_bound(
            rows,
            case.component_names,
            thermo,
            graph.pressures,
            np.asarray(case.feeds[0].composition),
            graph.stage_count - (1 if graph.condenser == "total" else 0),
            {"distillate": case.feeds[0].stage - (2 if graph.condenser == "total" else 1),
             "bottoms": graph.stage_count - case.feeds[0].stage},
        )
    return MeshSystem(
        graph,
        thermo,
        feeds,
        case.specs,
        case.component_names,
        condenser_setting=CondenserSetting(case.column.reflux_temperature, case.column.reflux_subcooling),
    )


def _one_chain_of_equilibrium_stages(case: Case, graph: StageGraph) -> bool:
    """Whether Fenske's bound applies as :func:`~solver.feasibility.check_total_reflux_bound`
    proves it: one feed, no side draws, every stage an equilibrium stage, the liquid going
    from each stage to the next and the vapor back (no pumparound or other loop)."""
    N = graph.stage_count
    chain = np.column_stack([np.arange(N - 1), np.arange(1, N)])
    return (
        len(case.feeds) == 1
        and not np.any(graph.liquid_draws) and not np.any(graph.vapor_draws)
        and bool(np.all(graph.efficiencies == 1.0))
        and np.array_equal(np.asarray(graph.liquid_edges).reshape(-1, 2), chain)
        and np.array_equal(np.asarray(graph.vapor_edges).reshape(-1, 2), chain[:, ::-1])
    )


def result_from_solution(case: Case, system: MeshSystem, newton: NewtonResult) -> Result:
    """The Result of Newton's last point on ``system`` (converged or not, as Newton says; the
    post-check comes after)."""
    thermo, graph = system.thermo, system.graph
    profile = system.profile(newton.X)
    K = thermo.k_values(profile.temperature, graph.pressures, profile.x, derivatives=False, y=profile.y).K
    h_L, h_V = system.stage_enthalpies(newton.X)
    duties = system.stage_duties(newton.X)
    return Result(
        title=case.title,
        case=case_summary(case),
        converged=bool(newton.converged),
        iterations=newton.iterations,
        residual_norm=newton.residual_norm,
        message=newton.message,
        components=tuple(case.component_names),
        roles=graph.roles,
        temperature=profile.temperature,
        pressure=profile.pressure,
        liquid_flow=profile.liquid_flow,
        vapor_flow=profile.vapor_flow,
        x=profile.x,
        y=profile.y,
        K=K,
        h_liquid=h_L,
        h_vapor=h_V,
        efficiency=graph.efficiencies.copy(),
        liquid_draw=graph.liquid_draws.copy(),
        vapor_draw=graph.vapor_draws.copy(),
        duty=duties,
        stage_feeds=tuple(tuple(feed for feed in system.feeds if feed.stage == j + 1) for j in range(system.N)),
        condenser=graph.condenser,
        reboiler="partial" if graph.has_reboiler else "none",
        thermo=thermo.describe(),
        iteration_log=tuple(r.as_dict() for r in newton.log),
        enthalpy_model=thermo.enthalpy_model,
    )


#: The rungs in order, as recorded in ``Result.strategy["chain"]``.
FALLBACK_CHAIN = (
    "damped Newton (line search, dogleg) from the default start; then from the sweeps' start without the theta "
    "correction; then homotopy from ideal K-values and CMO enthalpies; then, for a long column, the start "
    "stretched from a shortened column's solution"
)


def simulate(
    case: Case,
    *,
    options: NewtonOptions | None = None,
    thermo: ThermoPackage | None = None,
    start: StageProfile | None = None,
    continuation: bool = True,
    shortening: int = 2,
) -> Result | NetworkResult:
    """Solve the column of ``case`` rigorously. Always returns a Result; ``converged`` tells
    whether it may be used. A network case ([[columns]]) is solved by
    :func:`solver.network_engine.simulate_network` and gives a NetworkResult.

    With ``start`` (a profile of this column's stages, e.g. :func:`stage_profile` of a
    result) Newton starts from it, and nothing else is tried. Without it, the fallback chain:
    (1) damped Newton from the default start (backtracking line search, then the dogleg path
    when no step length lowers the residuals), then from the start of the sweeps without the
    theta correction ("second start"); (2) if that fails, homotopy continuation from ideal
    K-values and CMO enthalpies to the real model (:mod:`solver.continuation`); (3) for a
    column of at least :data:`~solver.shortening.MIN_STAGES` stages, the same separation with
    the runs of plain stages halved is solved first (by this same chain, nested at most
    ``shortening`` deep) and Newton starts the full column from its profile stretched over the
    stages (:mod:`solver.shortening`). ``Result.strategy`` records the rung that solved it.
    Raises :class:`ConvergenceError` only for NaN/inf (naming the stage and variable), and
    :class:`SpecError`/:class:`CaseError`/:class:`ThermoError` for bad input."""
    if case.network is not None:
        return simulate_network(case, options=options, thermo=thermo, continuation=continuation, shortening=min(shortening, 1))
    system = build_system(case, thermo)
    options = options or NewtonOptions()
    if start is not None:
        newton = solve_system(system, system.unknowns(start), options)
        strategy = _first_rung_record(newton)
    else:
        newton, strategy = _fallback_chain(case, system, options, continuation, shortening)
    strategy["chain"] = FALLBACK_CHAIN
    return _judged(result_from_solution(case, system, newton), system, strategy)


def _first_rung_record(newton: NewtonResult) -> dict[str, Any]:
    full_steps = all(entry.damping == 1.0 for entry in newton.log[1:])
    return {
        "rung": ("newton" if full_steps else "damped newton") if newton.converged else None,
        "newton_iterations": newton.iterations,
    }


def _fallback_chain(
    case: Case, system: MeshSystem, options: NewtonOptions, continuation: bool, shortening: int
) -> tuple[NewtonResult, dict[str, Any]]:
    """Newton from the default start, then each later rung in turn until one converges: the
    last Newton result and the record for ``Result.strategy``."""
    newton = solve_system(system, initial_estimate(system), options)
    strategy = _first_rung_record(newton)
    later_rungs = (
        ("second start", lambda: _from_second_start(system, options)),
        ("homotopy", lambda: _by_homotopy(system, options, continuation)),
        ("shorter column", lambda: _from_shorter_column(case, system, options, continuation, shortening)),
    )
    for name, rung in later_rungs:
        if newton.converged:
            break
        try:
            found, record = rung()
        except (ThermoError, ConvergenceError) as exc:  # e.g. a bubble point above the critical point, a NaN start
            found, record = None, {name.replace(" ", "_") + "_failed": str(exc)}
        strategy.update(record)
        if found is not None and found.converged:
            newton, strategy["rung"] = found, name
    return newton, strategy


def _from_second_start(system: MeshSystem, options: NewtonOptions) -> tuple[NewtonResult | None, dict[str, Any]]:
    """Rung 1b, on a column with two products: Newton from the sweeps without the theta
    correction, whose own product split near an azeotrope can be the better guess (the
    correction holds the overhead rate of a split that ignores the azeotrope)."""
    if not theta_correction_applies(system):
        return None, {}
    newton = solve_system(system, initial_estimate(system, correct_split=False), options)
    return newton, {"second_start": {"converged": bool(newton.converged), "newton_iterations": newton.iterations}}


def _by_homotopy(system: MeshSystem, options: NewtonOptions, enabled: bool) -> tuple[NewtonResult | None, dict[str, Any]]:
    """Rung 2 (unless not ``enabled``): continuation from ideal K-values and CMO enthalpies to
    the real model."""
    if not enabled:
        return None, {}
    if system.thermo.vapor_dependent:
        # the easy end blends activity coefficients into ideal ones: an equation of state has none
        return None, {"homotopy": "not applied: the path from ideal K-values does not lead to an equation of state"}
    path = continue_to_real_model(system, options)
    record = {"homotopy_path": [point.as_dict() for point in path.path], "homotopy_reached": path.reached}
    return path.newton, record


def _from_shorter_column(
    case: Case, system: MeshSystem, options: NewtonOptions, continuation: bool, depth: int
) -> tuple[NewtonResult | None, dict[str, Any]]:
    """Rung 3, for a long column: solve the case with its runs of plain stages halved (by the
    whole chain, ``depth - 1`` deep), then Newton on the full column from that profile
    stretched. Returns (Newton result or None, the record for ``Result.strategy``)."""
    if depth <= 0 or case.column.stages < MIN_STAGES:
        return None, {}
    short_case, positions = shortened_case(case, 0.5)
    if short_case.column.stages >= case.column.stages - 2:
        return None, {}
    record: dict[str, Any] = {"stages": short_case.column.stages}
    outcome = {"shortened_column": record}
    try:
        short = simulate(short_case, options=options, thermo=system.thermo, continuation=continuation, shortening=depth - 1)
    except (CaseError, SpecError, ThermoError, ConvergenceError) as exc:
        record.update(converged=False, message=str(exc))
        return None, outcome
    record.update(
        converged=bool(short.converged),
        rung=short.strategy.get("rung"),
        strategy={k: v for k, v in short.strategy.items() if k != "chain"},
    )
    if not short.converged:
        record["message"] = short.message
        return None, outcome
    start = stretched_start(stage_profile(short), positions, system.N)
    try:
        newton = solve_system(system, system.unknowns(start), options)
    except ConvergenceError as exc:
        record["message"] = str(exc)
        return None, outcome
    record["newton_iterations"] = newton.iterations
    return newton, outcome


def _judged(result: Result, system: MeshSystem, strategy: dict[str, Any]) -> Result:
    """The result with the post-check, the strategy record and the final verdict: converged
    only if Newton met its tolerance, the post-check passed, no product or internal flow
    vanished and every temperature lies within the property models' range."""
    thermo = system.thermo
    check = post_check(result, thermo, system.graph)
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
        problem = thermo.range_problem(
            result.temperature, result.pressure, result.x, result.y, skip_first=result.condenser == "total"
        )
        if problem is not None:
            converged = False
            message = f"solution outside the property models' range: {problem}"
    elif thermo.vapor_dependent:
        # say whether the last point is beyond the two-phase region (near or above the critical point)
        problem = thermo.range_problem(
            result.temperature, result.pressure, result.x, result.y, skip_first=result.condenser == "total"
        )
        if problem is not None:
            message = f"{message}; at the last point {problem}"
    if not converged and system.N >= LONG_COLUMN:
        message = f"{message}; {_long_column_advice(system.N)}"
    split = None
    if converged:
        split = check_liquids(thermo.activity, result.temperature, result.x,
                              range(1, result.temperature.size + 1), result.components)
    return dataclasses.replace(result, converged=converged, message=message, post_check=check, strategy=strategy,
                               thermo=_with_range_notes(result.thermo, thermo.pure, result.temperature),
                               liquid_split=split)


#: Stage count from which an unconverged column's message says what to change about its length.
LONG_COLUMN = 300


def _long_column_advice(stages: int) -> str:
    return (
        f"the column has {stages} stages, over which the default start (CMO flows, bubble-point sweeps) is poor "
        "and every rung of the fallback chain is slow: give fewer stages (a few times the Fenske minimum at total "
        "reflux is usually plenty), or solve a shorter column first and start this one from its profile "
        "(solver.simulate(case, start=...))"
    )


def _with_range_notes(record: dict, pure: Any, temperature: np.ndarray) -> dict:
    """The thermo record with, per handbook component, the notes on properties evaluated
    beyond their correlation's range at the solution's stage temperatures."""
    notes = pure.range_notes(temperature)
    if not notes:
        return record
    components = [dict(entry, range_notes=notes.get(entry.get("name"), [])) for entry in record.get("components", [])]
    return {**record, "components": components, "range_notes": [n for found in notes.values() for n in found]}
