"""Sensitivities of a converged column: the derivative of every reported output with respect to
every input of :mod:`solver.sensitivity_inputs`, from the Jacobian of the converged MESH system.

At a solution ``F(X, p) = 0`` of the scaled MESH equations, the implicit-function theorem gives
the tangent ``dX/dp = -J^-1 dF/dp`` with ``J = dF/dX`` the Jacobian Newton's method uses
(e.g. Fiacco, *Introduction to Sensitivity and Stability Analysis in Nonlinear Programming*,
1983, ch. 3; for staged columns Naphtali & Sandholm, AIChE J. 17 (1971) 148, whose Jacobian
this is). ``J`` is factored once (sparse LU) and every input costs one back-solve, done for all
inputs at once. ``dF/dp`` is a forward difference of the residuals alone at the converged
point, with the model moved by a relative step of 1e-6 (the equations are never solved again).
An input that leaves the stages' thermodynamic state at ``X`` as it is (a spec, a feed's flow,
composition or condition, an efficiency) moves only the feed, spec and efficiency terms: the
moved residuals are formed from the nominal stage state, with no property evaluated again. An
output's total derivative is ``dy/dp = dy/dX dX/dp + dy/dp|X``, with ``dy/dX`` analytic
(:func:`output_jacobian`: the product flows and fractions are the top vapor's and the bottom
liquid's, the duties the condenser's and reboiler's enthalpy balances) and ``dy/dp|X`` the
forward difference of the outputs at fixed ``X`` (a recovery's in closed form from the feed's).

The scales of the moved systems are the nominal ones, so that the unknowns ``X`` mean the same
stage profile in every one of them. A feed given by its temperature that is all liquid or all
vapor keeps its phase under a small step: its enthalpy is then that of the phase at its
temperature and pressure (no flash); a saturated feed's is that of the phase at its bubble (dew)
point; a two-phase feed is flashed again.

Outputs (SI): distillate and bottoms flows, their mole fractions, each component's recovery in
each product (fraction of its feed), the condenser and reboiler duties, every stage's
temperature.

Two views of one solution (:func:`sensitivity_study`): *as specified*, the case's own specs held
(what the design needs when an input moves: the duties, the flows); *as operated*, the column
run at the solution's reflux ratio and boilup ratio (what an input does to the products of a
column whose operator holds those two: the purities move). The solution is the same; only the
spec rows of the Jacobian differ.

The elasticity of output y to input p is ``(scale_p / y) dy/dp`` (``scale_p`` the
input's value, or 1 for a shift that is already relative).
"""

from __future__ import annotations

import csv
import dataclasses
import io
import time
from dataclasses import dataclass
from typing import Any, Sequence

import numpy as np
import scipy.sparse as sp
import scipy.sparse.linalg as spla

from .case import Case, Spec
from .engine import flash_feeds, stage_profile
from .errors import ConvergenceError, SpecError
from .mesh import CondenserSetting, MeshSystem
from .mesh_blocks import StageState
from .network import StageGraph, build_stage_graph
from .results import Result, json_safe
from .sensitivity_inputs import InputParameter, choose_inputs
from .streams import FlashedFeed
from .thermo.flash import bubble_temperature, dew_temperature
from .thermo.package import ThermoPackage

__all__ = [
    "RELATIVE_STEP",
    "OutputQuantity",
    "Sensitivities",
    "SensitivityStudy",
    "column_sensitivities",
    "operated_case",
    "output_jacobian",
    "output_values",
    "sensitivity_study",
]

#: Relative size of the forward-difference step of an input on the residuals.
RELATIVE_STEP = 1e-6


@dataclass(frozen=True)
class OutputQuantity:
    """One reported output: ``key`` (dotted), ``label`` (words), nominal ``value`` and ``unit``."""

    key: str
    label: str
    value: float
    unit: str


@dataclass(frozen=True)
class Sensitivities:
    """``derivatives[k, m]`` = d output k / d input m, SI; ``seconds`` the time taken."""

    inputs: tuple[InputParameter, ...]
    outputs: tuple[OutputQuantity, ...]
    derivatives: np.ndarray
    seconds: float = 0.0

    def elasticities(self) -> np.ndarray:
        """``(scale_m / y_k) dy_k/dp_m``; NaN where the output is zero."""
        values = np.array([o.value for o in self.outputs])
        scales = np.array([i.scale for i in self.inputs])
        with np.errstate(divide="ignore", invalid="ignore"):
            return np.where(values[:, None] != 0.0, self.derivatives * scales[None, :] / values[:, None], np.nan)

    def output_index(self, key: str) -> int:
        for k, output in enumerate(self.outputs):
            if output.key == key:
                return k
        raise KeyError(key)

    def largest_drivers(self, key: str, count: int = 3) -> list[tuple[InputParameter, float, float]]:
        """The ``count`` inputs of largest elasticity on the output ``key``: (input, elasticity,
        derivative), largest first."""
        k = self.output_index(key)
        row = self.elasticities()[k]
        order = np.argsort(-np.nan_to_num(np.abs(row), nan=-1.0))[:count]
        return [(self.inputs[m], float(row[m]), float(self.derivatives[k, m])) for m in order]

    def as_json(self) -> dict[str, Any]:
        elasticities = self.elasticities()
        return json_safe({
            "method": "implicit-function theorem on the converged MESH Jacobian (one sparse LU, one back-solve per "
                      f"input); residual derivatives by forward differences of relative step {RELATIVE_STEP:g}",
            "seconds": self.seconds,
            "inputs": [{"key": i.key, "label": i.label, "kind": i.kind, "value": i.value, "unit": i.unit,
                        "scale": i.scale} for i in self.inputs],
            "outputs": [{"key": o.key, "label": o.label, "value": o.value, "unit": o.unit} for o in self.outputs],
            "derivatives": [[_number(v) for v in row] for row in self.derivatives],
            "elasticities": [[_number(v) for v in row] for row in elasticities],
        })

    def csv(self) -> str:
        """One row per (output, input): keys, units, values, derivative and elasticity."""
        buffer = io.StringIO()
        writer = csv.writer(buffer, lineterminator="\n")
        writer.writerow(["output", "output_unit", "output_value", "input", "input_unit", "input_value",
                         "derivative", "elasticity"])
        elasticities = self.elasticities()
        for k, output in enumerate(self.outputs):
            for m, item in enumerate(self.inputs):
                elasticity = elasticities[k, m]
                writer.writerow([output.key, output.unit, f"{output.value:.10g}", item.key, item.unit,
                                 f"{item.value:.10g}", f"{self.derivatives[k, m]:.10g}",
                                 "" if not np.isfinite(elasticity) else f"{elasticity:.10g}"])
        return buffer.getvalue()


def _number(value: float) -> float | None:
    return float(value) if np.isfinite(value) else None


def _output_quantities(system: MeshSystem, values: np.ndarray) -> tuple[OutputQuantity, ...]:
    names = system.component_names
    specs: list[tuple[str, str, str]] = [("distillate.flow", "distillate flow", "mol/s"),
                                         ("bottoms.flow", "bottoms flow", "mol/s")]
    for product in ("distillate", "bottoms"):
        specs += [(f"{product}.mole_fraction.{n}", f"{product} mole fraction of {n}", "1") for n in names]
    for product in ("distillate", "bottoms"):
        specs += [(f"{product}.recovery.{n}", f"recovery of {n} in the {product}", "1") for n in names]
    if system.graph.condenser != "none":
        specs.append(("duty.condenser", "condenser duty", "W"))
    if system.graph.has_reboiler:
        specs.append(("duty.reboiler", "reboiler duty", "W"))
    specs += [(f"stage.{j + 1}.temperature", f"temperature of stage {j + 1}", "K") for j in range(system.N)]
    return tuple(OutputQuantity(key, label, float(value), unit) for (key, label, unit), value in zip(specs, values))


def output_values(system: MeshSystem, X: np.ndarray, state: StageState | None = None) -> np.ndarray:
    """The outputs (in the order of the module docstring, SI) of the unknowns ``X`` of
    ``system`` (``state``: their :meth:`~solver.mesh.MeshSystem.stage_state`, if known)."""
    T, l, v = system.unpack(X)
    top, bottom = v[system.top], l[system.bottom]
    distillate, bottoms = float(top.sum()), float(bottoms_total := bottom.sum())
    feed = system.total_feed_by_component
    with np.errstate(divide="ignore", invalid="ignore"):
        recovery_top = np.where(feed > 0, top / feed, 0.0)
        recovery_bottom = np.where(feed > 0, bottom / feed, 0.0)
    parts = [np.array([distillate, bottoms_total]) * system.flow_scale,
             top / max(distillate, 1e-300), bottom / max(bottoms, 1e-300), recovery_top, recovery_bottom]
    duties = None
    if system.graph.condenser != "none" or system.graph.has_reboiler:
        duties = system.stage_duties(X, state)
    if system.graph.condenser != "none":
        parts.append(duties[[system.top]])
    if system.graph.has_reboiler:
        parts.append(duties[[system.bottom]])
    parts.append(T)
    return np.concatenate(parts)


def output_jacobian(system: MeshSystem, X: np.ndarray, state: StageState) -> sp.csr_matrix:
    """d(outputs)/dX of :func:`output_values` at ``X`` (its stage ``state``), analytic: the
    flows, fractions and recoveries are those of the top vapor and the bottom liquid, the duties
    the enthalpy balances of the condenser and the reboiler."""
    c, w, t, b = system.c, system.width, system.top, system.bottom
    components = np.arange(c)
    top_cols, bottom_cols = t * w + 1 + c + components, b * w + 1 + components
    _, l, v = system.unpack(X)
    D, B = max(float(v[t].sum()), 1e-300), max(float(l[b].sum()), 1e-300)
    feed = system.total_feed_by_component
    recovery = np.where(feed > 0, 1.0 / np.where(feed > 0, feed, 1.0), 0.0)
    eye = np.eye(c)
    blocks: list[tuple[np.ndarray, np.ndarray, np.ndarray]] = []  # (rows, cols, values), rows from 0

    def dense(rows: np.ndarray, cols: np.ndarray, values: np.ndarray) -> None:
        blocks.append((np.repeat(rows, len(cols)), np.tile(cols, len(rows)), np.asarray(values).ravel()))

    dense(np.array([0]), top_cols, np.full(c, system.flow_scale))
    dense(np.array([1]), bottom_cols, np.full(c, system.flow_scale))
    dense(2 + components, top_cols, (eye - (v[t] / D)[:, None]) / D)
    dense(2 + c + components, bottom_cols, (eye - (l[b] / B)[:, None]) / B)
    blocks.append((2 + 2 * c + components, top_cols, recovery))
    blocks.append((2 + 3 * c + components, bottom_cols, recovery))
    row = 2 + 4 * c
    duty_stages = ([t] if system.graph.condenser != "none" else []) + ([b] if system.graph.has_reboiler else [])
    if duty_stages:
        energy = system.enthalpy_balance_jacobian(state)[duty_stages].tocoo()
        blocks.append((row + energy.row, energy.col, energy.data * (system.flow_scale * system.energy_scale)))
        row += len(duty_stages)
    blocks.append((row + np.arange(system.N), system.temperature_index(), np.ones(system.N)))
    rows, cols, values = (np.concatenate(part) for part in zip(*blocks))
    return sp.csr_matrix((values, (rows, cols)), shape=(row + system.N, system.size))


def _system(case: Case, thermo: ThermoPackage, graph: StageGraph, feeds: Sequence[FlashedFeed],
            nominal: MeshSystem | None) -> MeshSystem:
    return MeshSystem(
        graph, thermo, feeds, case.specs, case.component_names,
        condenser_setting=CondenserSetting(case.column.reflux_temperature, case.column.reflux_subcooling),
        flow_scale=nominal.flow_scale if nominal else None, energy_scale=nominal.energy_scale if nominal else None,
    )


def _single_phase(feed, flashed: FlashedFeed) -> bool:
    """A feed all liquid or all vapor: given by its temperature (and found so by the flash), or
    saturated (vapor fraction 0 or 1)."""
    if feed.temperature is None:
        return feed.vapor_fraction in (0.0, 1.0)
    return flashed.vapor_fraction in (0.0, 1.0)


def _feed_temperature(feed, thermo: ThermoPackage, z: np.ndarray, pressure: np.ndarray, flashed: FlashedFeed) -> np.ndarray:
    """The feed's temperature as given, or its bubble (dew) point when saturated liquid (vapor),
    started from the nominal flash's temperature."""
    if feed.temperature is not None:
        return np.array([feed.temperature])
    point = bubble_temperature if feed.vapor_fraction == 0.0 else dew_temperature
    return point(thermo, pressure, z, guess=np.array([flashed.temperature]))[0]


def _moved_feeds(case: Case, thermo: ThermoPackage, graph: StageGraph, nominal: Sequence[FlashedFeed]) -> tuple[FlashedFeed, ...]:
    """The feeds of the moved ``case``: a feed that the nominal flash found all liquid or all
    vapor at its temperature keeps that phase (its enthalpy that of the phase); otherwise all
    are flashed again."""
    if thermo.enthalpy_model != "rigorous" or not all(_single_phase(f, n) for f, n in zip(case.feeds, nominal)):
        return flash_feeds(case, thermo, graph)
    moved = []
    for feed, before in zip(case.feeds, nominal):
        pressure = feed.pressure if feed.pressure is not None else float(graph.pressures[feed.stage - 1])
        z, P = np.asarray(feed.composition, dtype=float)[None, :], np.array([pressure])
        T = _feed_temperature(feed, thermo, z, P, before)
        phase = thermo.liquid_enthalpy if before.vapor_fraction == 0.0 else thermo.vapor_enthalpy
        h = float(phase(T, z, model="rigorous", pressure=P).molar[0])
        moved.append(dataclasses.replace(before, flow=feed.flow, z=tuple(z[0].tolist()), h=h,
                                         temperature=float(T[0]), pressure=pressure))
    return tuple(moved)


def _result_feeds(case: Case, result: Result) -> tuple[FlashedFeed, ...] | None:
    """The flashed feeds the solve of ``case`` used, in the case's order, from ``result``
    (which lists them stage by stage); None if they are not the case's feeds."""
    listed = [feed for feeds in result.stage_feeds for feed in feeds]
    order = sorted(range(len(case.feeds)), key=lambda i: case.feeds[i].stage)
    if len(listed) != len(order):
        return None
    feeds: list = [None] * len(order)
    for i, flashed in zip(order, listed):
        feed = case.feeds[i]
        stated = [(a, b) for a, b in ((flashed.temperature, feed.temperature), (flashed.pressure, feed.pressure),
                                      (flashed.vapor_fraction, feed.vapor_fraction)) if b is not None]
        if ((flashed.stage, flashed.flow, flashed.z) != (feed.stage, feed.flow, tuple(float(z) for z in feed.composition))
                or any(a != b for a, b in stated)):
            return None
        feeds[i] = flashed
    return tuple(feeds)


def _moved_system(case: Case, thermo: ThermoPackage, nominal: MeshSystem, item: InputParameter, value: float) -> MeshSystem:
    moved_case, moved_thermo = item.apply(case, thermo, value)
    graph = build_stage_graph(moved_case) if item.changes_column else nominal.graph
    feeds = _moved_feeds(moved_case, moved_thermo, graph, nominal.feeds) if item.changes_feeds else nominal.feeds
    return _system(moved_case, moved_thermo, graph, feeds, nominal)


def _same_stage_state(moved: MeshSystem, nominal: MeshSystem) -> bool:
    """Whether the stages of ``moved`` at given unknowns are in the state of ``nominal``'s (the
    same thermo, pressures, draws and vapor paths): a spec, a feed or an efficiency moved."""
    return (moved.thermo is nominal.thermo
            and all(np.array_equal(a, b) for a, b in (
                (moved.pressures, nominal.pressures), (moved.liquid_draws, nominal.liquid_draws),
                (moved.vapor_draws, nominal.vapor_draws), (moved.graph.liquid_edges, nominal.graph.liquid_edges),
                (moved.graph.vapor_edges, nominal.graph.vapor_edges))))


def _recovery_derivatives(nominal: MeshSystem, moved: MeshSystem, recoveries: np.ndarray, h: float) -> np.ndarray:
    """d(recovery)/d(input) at fixed unknowns, top then bottom: ``-recovery d(feed)/feed``
    with the feed's derivative a difference of feed flows (linear in every input), so that
    no step error of ``1/feed`` enters."""
    feed = nominal.total_feed_by_component
    change = (moved.total_feed_by_component - feed) / h
    with np.errstate(divide="ignore", invalid="ignore"):
        relative = np.where(feed > 0, change / np.where(feed > 0, feed, 1.0), 0.0)
    return -recoveries * np.tile(relative, 2)


def column_sensitivities(
    case: Case,
    result: Result,
    *,
    thermo: ThermoPackage | None = None,
    inputs: Sequence[InputParameter] | None = None,
    relative_step: float = RELATIVE_STEP,
) -> Sensitivities:
    """The derivatives of every output of the converged ``result`` of ``case`` with respect to
    ``inputs`` (default: :func:`~solver.sensitivity_inputs.choose_inputs`). Raises
    :class:`SpecError` for a network case and :class:`ConvergenceError` for a result that did
    not converge (there is no solution to differentiate)."""
    started = time.perf_counter()
    if case.column is None:
        raise SpecError("sensitivities are taken of a single column; this case is a network of columns")
    if not result.converged:
        raise ConvergenceError(f"sensitivities need a converged solution; this one is not: {result.message}")
    thermo = thermo or ThermoPackage.from_case(case)
    inputs = tuple(choose_inputs(case) if inputs is None else inputs)
    graph = build_stage_graph(case)
    flashed = _result_feeds(case, result) or flash_feeds(case, thermo, graph)
    # the nominal feeds by the same path as the moved ones, so that a difference is the input's alone
    nominal = _system(case, thermo, graph, _moved_feeds(case, thermo, graph, flashed), None)
    X = nominal.unknowns(stage_profile(result))
    state = nominal.stage_state(X)
    evaluation = nominal.evaluate(X, True, state)
    values = output_values(nominal, X, state)
    steps = np.array([item.step(relative_step) for item in inputs])
    residual_derivatives = np.empty((nominal.size, len(inputs)))
    direct = np.empty((len(values), len(inputs)))  # d output / d input at fixed X
    recoveries = 2 + 2 * nominal.c + np.arange(2 * nominal.c)
    for m, (item, h) in enumerate(zip(inputs, steps)):
        moved = _moved_system(case, thermo, nominal, item, item.value + h)
        moved_state = state if _same_stage_state(moved, nominal) else moved.stage_state(X)
        residual_derivatives[:, m] = (moved.evaluate(X, False, moved_state).residuals - evaluation.residuals) / h
        direct[:, m] = (output_values(moved, X, moved_state) - values) / h
        direct[recoveries, m] = _recovery_derivatives(nominal, moved, values[recoveries], h)
    derivatives = direct
    if len(inputs):
        tangents = -spla.splu(evaluation.jacobian).solve(residual_derivatives)
        derivatives = output_jacobian(nominal, X, state) @ tangents + direct
    return Sensitivities(inputs, _output_quantities(nominal, values), derivatives, time.perf_counter() - started)


def operated_case(case: Case, result: Result) -> Case:
    """``case`` with its specs replaced by the reflux ratio and the boilup ratio that the
    solution ``result`` has (for a column with a condenser and a reboiler; one of them else)."""
    specs = []
    if result.reflux_ratio is not None:
        specs.append(Spec("reflux_ratio", result.reflux_ratio, key="operation.reflux_ratio"))
    if result.boilup_ratio is not None:
        specs.append(Spec("boilup_ratio", result.boilup_ratio, key="operation.boilup_ratio"))
    return dataclasses.replace(case, specs=tuple(specs))


@dataclass(frozen=True)
class SensitivityStudy:
    """The sensitivities of one solution as specified and as operated (see the module
    docstring); result.json's ``sensitivity`` section."""

    as_specified: Sensitivities
    as_operated: Sensitivities

    def views(self) -> tuple[tuple[str, Sensitivities], ...]:
        return (("as_specified", self.as_specified), ("as_operated", self.as_operated))

    def as_json(self) -> dict[str, Any]:
        return {
            "schema": "traystack-sensitivity/1",
            "views": {
                "as_specified": "the case's own specs held",
                "as_operated": "the solution's reflux ratio and boilup ratio held in place of the specs",
            },
            **{name: view.as_json() for name, view in self.views()},
        }

    def csv(self) -> str:
        """Both views in one table, the view named in the first column."""
        rows = []
        for name, view in self.views():
            lines = view.csv().splitlines()
            if not rows:
                rows.append("view," + lines[0])
            rows += [f"{name},{line}" for line in lines[1:]]
        return "\n".join(rows) + "\n"


def sensitivity_study(case: Case, result: Result, *, thermo: ThermoPackage | None = None) -> SensitivityStudy:
    """Both views of the converged ``result`` of ``case`` with respect to every input of
    :func:`~solver.sensitivity_inputs.choose_inputs`."""
    thermo = thermo or ThermoPackage.from_case(case)
    operated = operated_case(case, result)
    return SensitivityStudy(column_sensitivities(case, result, thermo=thermo),
                            column_sensitivities(operated, result, thermo=thermo))
