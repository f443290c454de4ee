"""Sensitivities of a converged column: the derivative of every reported output with respect to
every input of :mod:`solver.sensitivity_inputs`, from the Jacobian of the converged MESH system.

At a solution ``F(X, p) = 0`` of the scaled MESH equations, the implicit-function theorem gives
the tangent ``dX/dp = -J^-1 dF/dp`` with ``J = dF/dX`` the Jacobian Newton's method uses
(e.g. Fiacco, *Introduction to Sensitivity and Stability Analysis in Nonlinear Programming*,
1983, ch. 3; for staged columns Naphtali & Sandholm, AIChE J. 17 (1971) 148, whose Jacobian
this is). ``J`` is factored once (sparse LU) and every input costs one back-solve, done for all
inputs at once. ``dF/dp`` is a central difference of the residuals alone at the converged
point, with the model moved by a relative step of 1e-6 (the equations are never solved again);
an output's total derivative ``dy/dp = dy/dX dX/dp + dy/dp|X`` is the central difference of the
output along the tangent, ``(y(X + h t, p + h) - y(X - h t, p - h)) / 2h``.

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

from .case import Case, Spec
from .engine import flash_feeds, stage_profile
from .errors import ConvergenceError, SpecError
from .mesh import CondenserSetting, MeshSystem
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
    "output_values",
    "sensitivity_study",
]

#: Relative size of the central-difference step of an input on the residuals.
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
                      f"input); residual derivatives by central differences of relative step {RELATIVE_STEP:g}",
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


def output_values(system: MeshSystem, X: np.ndarray) -> np.ndarray:
    """The outputs (in the order of the module docstring, SI) of the unknowns ``X`` of
    ``system``."""
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
        duties = system.stage_duties(X)
    if system.graph.condenser != "none":
        parts.append(duties[[system.top]])
    if system.graph.has_reboiler:
        parts.append(duties[[system.bottom]])
    parts.append(T)
    return np.concatenate(parts)


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


def _moved_system(case: Case, thermo: ThermoPackage, nominal: MeshSystem, item: InputParameter, value: float) -> MeshSystem:
    moved_case, moved_thermo = item.apply(case, thermo, value)
    graph = build_stage_graph(moved_case) if item.changes_column else nominal.graph
    feeds = _moved_feeds(moved_case, moved_thermo, graph, nominal.feeds) if item.changes_feeds else nominal.feeds
    return _system(moved_case, moved_thermo, graph, feeds, nominal)


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
    nominal = _system(case, thermo, graph, flash_feeds(case, thermo, graph), None)
    X = nominal.unknowns(stage_profile(result))
    evaluation = nominal.evaluate(X, True)
    import scipy.sparse.linalg as spla

    factors = spla.splu(evaluation.jacobian)
    steps = np.array([item.step(relative_step) for item in inputs])
    moved = [(_moved_system(case, thermo, nominal, item, item.value + h),
              _moved_system(case, thermo, nominal, item, item.value - h)) for item, h in zip(inputs, steps)]
    residual_derivatives = np.empty((nominal.size, len(inputs)))
    for m, (plus, minus) in enumerate(moved):
        residual_derivatives[:, m] = (plus.evaluate(X, False).residuals - minus.evaluate(X, False).residuals) / (2 * steps[m])
    tangents = -factors.solve(residual_derivatives) if len(inputs) else residual_derivatives
    values = output_values(nominal, X)
    derivatives = np.empty((len(values), len(inputs)))
    for m, (plus, minus) in enumerate(moved):
        h = steps[m]
        shift = h * tangents[:, m]
        derivatives[:, m] = (output_values(plus, X + shift) - output_values(minus, X - shift)) / (2 * h)
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
