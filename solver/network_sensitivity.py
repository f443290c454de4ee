"""Sensitivities of a converged column network: the derivative of every reported output with
respect to every spec value, every feed's flow, composition and temperature, each column's top
pressure and tray efficiency, each fixed connection rate, and the property-model inputs of
:mod:`solver.sensitivity_inputs` (binary parameters or k_ij, vapor-pressure shifts).

The method is that of one column (:mod:`solver.sensitivity`): at the solution ``F(X, p) = 0``
of the network's scaled MESH and spec equations (:mod:`solver.network_mesh`) the
implicit-function theorem gives the tangent ``dX/dp = -J^-1 dF/dp`` (Fiacco, *Introduction to
Sensitivity and Stability Analysis in Nonlinear Programming*, 1983, ch. 3). ``J`` is the
network's analytic sparse Jacobian, factored once (sparse LU); all inputs are one batched
back-solve. ``dF/dp`` is a central difference of the residuals alone at the converged point,
the network rebuilt with the input moved by a relative step of
:data:`~solver.sensitivity.RELATIVE_STEP` and the nominal scales (so that ``X`` means the same
profile); the network is never solved again. An output's total derivative is the central
difference of the output along the tangent.

Outputs (SI): every product's flow, mole fractions and recoveries (fraction of each
component's feed), every condenser, reboiler and connection exchanger duty that the solve
finds, every free connection rate, every stage's temperature. One view: the case's own specs
held (``as_specified``), in result.json's ``sensitivity`` section and ``sensitivity.csv`` as for
one column.
"""

from __future__ import annotations

import dataclasses
import time
from dataclasses import dataclass
from typing import Any, Callable, Sequence

import numpy as np

from .case import Case
from .errors import ConvergenceError
from .feed_flash import flash_feed_list
from .network_graph import check_network
from .network_mesh import NetworkSystem
from .network_results import NetworkResult
from .network_specs import network_products, resolve_specs
from .network_unknowns import network_start, scaled_start
from .sensitivity import RELATIVE_STEP, OutputQuantity, Sensitivities
from .sensitivity_inputs import InputParameter, choose_inputs
from .spec_kinds import SI_UNITS, spec_kind
from .thermo.package import ThermoPackage

__all__ = ["NetworkSensitivityStudy", "network_inputs", "network_output_values", "network_sensitivities",
           "network_system_of", "network_unknowns"]



# ---------------------------------------------------------------------- inputs
def _network_item(field: str, index: int, change: Callable) -> Callable:
    """An input's ``apply``: item ``index`` of the network's tuple ``field`` (columns, specs,
    connections) replaced by ``change(item, value)``."""
    def apply(case: Case, thermo: ThermoPackage, value: float):
        items = list(getattr(case.network, field))
        items[index] = change(items[index], value)
        return dataclasses.replace(case, network=dataclasses.replace(case.network, **{field: tuple(items)})), thermo
    return apply


def _section_spec(position: int) -> Callable:
    def change(section, value: float):
        specs = list(section.specs)
        specs[position] = _spec_value(specs[position], value)
        return dataclasses.replace(section, specs=tuple(specs))
    return change


def _spec_value(spec, value: float):
    return dataclasses.replace(spec, value=value)


def _exchanger_value(field: str) -> Callable:
    def change(connection, value: float):
        return dataclasses.replace(connection, exchanger=dataclasses.replace(connection.exchanger, **{field: value}))
    return change


def _top_pressure(section, value: float):
    pressures = np.asarray(section.column.pressures, dtype=float)
    moved = tuple((pressures + (value - pressures[0])).tolist())
    return dataclasses.replace(section, column=dataclasses.replace(section.column, pressures=moved))


def _trays(column) -> np.ndarray:
    """0-based indices of a column's trays (not the condenser, not a partial reboiler)."""
    first = 1 if column.condenser != "none" else 0
    last = column.stages - 1 if column.reboiler == "partial" else column.stages
    return np.arange(first, last)


def _tray_efficiency(section, value: float):
    trays = _trays(section.column)
    efficiencies = np.asarray(section.column.efficiencies, dtype=float)
    efficiencies[trays] += value - float(np.mean(efficiencies[trays]))
    return dataclasses.replace(section, column=dataclasses.replace(section.column, efficiencies=tuple(efficiencies.tolist())))


def _spec_input(key: str, kind: str, value: float, apply: Callable) -> InputParameter:
    return InputParameter(key, f"spec {key}", "spec", float(value), SI_UNITS[spec_kind(kind).quantity], float(value) or 1.0, apply)


def _spec_inputs(case: Case) -> list[InputParameter]:
    """Every spec value: the columns' own, the top-level ones, and the values fixed on the
    connections (rate, fraction, exchanger duty or return temperature)."""
    network, inputs = case.network, []
    for i, section in enumerate(network.columns):
        for j, spec in enumerate(section.specs):
            inputs.append(_spec_input(spec.key or f"{section.name}.specs.{spec.kind}", spec.kind, spec.value,
                                      _network_item("columns", i, _section_spec(j))))
    for k, spec in enumerate(network.specs):
        inputs.append(_spec_input(spec.key or f"specs.{spec.kind}", spec.kind, spec.value, _network_item("specs", k, _spec_value)))
    for k, connection in enumerate(network.connections):
        where = connection.key or connection.name
        for name, unit in (("flow", "mol/s"), ("fraction", "1")):
            value = getattr(connection, name)
            if value is not None and not connection.free:
                inputs.append(InputParameter(f"{where}.{name}", f"connection {connection.name} {name}", "spec", value, unit,
                                             value, _network_item("connections", k, lambda c, v, n=name: dataclasses.replace(c, **{n: v})),
                                             changes_column=True))
        exchanger = connection.exchanger
        if exchanger is not None:
            for name, unit in (("duty", "W"), ("return_temperature", "K")):
                value = getattr(exchanger, name)
                if value is not None:
                    inputs.append(InputParameter(f"{where}.{exchanger.kind}.{name}", f"connection {connection.name} "
                                                 f"{exchanger.kind} {name.replace('_', ' ')}", "spec", value, unit,
                                                 value or 1.0, _network_item("connections", k, _exchanger_value(name)), changes_column=True))
    return inputs


def _column_inputs(case: Case) -> list[InputParameter]:
    """Each column's top pressure (its drop kept) and the Murphree efficiency of its trays."""
    inputs = []
    for i, section in enumerate(case.network.columns):
        top = float(section.column.pressures[0])
        inputs.append(InputParameter(f"{section.name}.pressure.top", f"pressure of {section.name} (top, drop kept)",
                                     "column", top, "Pa", top, _network_item("columns", i, _top_pressure),
                                     changes_column=True, changes_feeds=True))
        trays = _trays(section.column)
        if len(trays):
            mean = float(np.mean(np.asarray(section.column.efficiencies)[trays]))
            inputs.append(InputParameter(f"{section.name}.efficiency", f"Murphree efficiency of the trays of {section.name}",
                                         "column", mean, "1", mean, _network_item("columns", i, _tray_efficiency), changes_column=True))
    return inputs


def network_inputs(case: Case) -> tuple[InputParameter, ...]:
    """The inputs of a network case: spec values, feeds, each column's pressure and
    efficiency, then the property-model inputs (binary parameters or k_ij, vapor-pressure
    shifts)."""
    return (*_spec_inputs(case), *choose_inputs(case, ("feed",)), *_column_inputs(case),
            *choose_inputs(case, ("binary", "vapor_pressure")))


# ---------------------------------------------------------------------- the system of a case
def network_system_of(case: Case, thermo: ThermoPackage, nominal: NetworkSystem | None = None, *,
                      feeds: Sequence | None = None) -> NetworkSystem:
    """The network system of ``case`` with ``thermo`` (feeds flashed again unless ``feeds`` is
    given), with the scales of ``nominal`` when given."""
    graph = check_network(case)
    if feeds is None:
        feeds = flash_feed_list(case.feeds, thermo, [float(p) for p in graph.pressures[graph.feed_stages]],
                                source_file=case.source_file)
    return NetworkSystem(graph, thermo, feeds, resolve_specs(case, graph), case.component_names,
                         flow_scale=nominal.flow_scale if nominal else None,
                         energy_scale=nominal.energy_scale if nominal else None)


def network_unknowns(system: NetworkSystem, result: NetworkResult) -> np.ndarray:
    """The scaled unknowns ``X`` of a solved ``result`` of ``system``."""
    return scaled_start(system, network_start(result))


def _moved_system(case: Case, thermo: ThermoPackage, nominal: NetworkSystem, item: InputParameter, value: float) -> NetworkSystem:
    moved_case, moved_thermo = item.apply(case, thermo, value)
    keep_feeds = not (item.changes_feeds or item.changes_thermo)
    return network_system_of(moved_case, moved_thermo, nominal, feeds=nominal.feeds if keep_feeds else None)


# ---------------------------------------------------------------------- outputs
def _output_specs(system: NetworkSystem) -> list[tuple[str, str, str]]:
    names, specs = system.component_names, []
    for p in network_products(system.graph):
        specs.append((f"{p.name}.flow", f"{p.name} flow", "mol/s"))
        specs += [(f"{p.name}.mole_fraction.{n}", f"{p.name} mole fraction of {n}", "1") for n in names]
        specs += [(f"{p.name}.recovery.{n}", f"recovery of {n} in {p.name}", "1") for n in names]
    for k, name in enumerate(system.extra_names):
        if system.extra_duty_stage[k] >= 0:
            short = name[: -len(".duty")] if name.endswith(".duty") else name
            specs.append((f"duty.{short}", f"{short} duty", "W"))
        else:
            short = name[: -len(".rate")]
            specs.append((f"connection.{short}.flow", f"connection {short} rate", "mol/s"))
    specs += [(f"stage.{column}.{number}.temperature", f"temperature of stage {number} of {column}", "K")
              for column, number in system.graph.stage_nodes]
    return specs


def network_output_values(system: NetworkSystem, X: np.ndarray) -> np.ndarray:
    """The outputs of the unknowns ``X`` of ``system`` (SI), in the order of their keys:
    products (flow, mole fractions, recoveries), the extra unknowns (duties W, rates mol/s),
    stage temperatures."""
    T, l, v, extras = system.unpack(X)
    feed = system.total_feed_by_component
    parts = []
    for p in network_products(system.graph):
        slot = (l if p.phase == "liquid" else v)[p.stage]
        total = max(float(slot.sum()), 1e-300)
        flow = p.rate / system.flow_scale if p.rate is not None else p.share * total
        composition = slot / total
        with np.errstate(divide="ignore", invalid="ignore"):
            recovery = np.where(feed > 0, flow * composition / feed, 0.0)
        parts += [[flow * system.flow_scale], composition, recovery]
    scales = np.where(system.extra_duty_stage >= 0, system.flow_scale * system.energy_scale, system.flow_scale)
    parts += [extras * scales, T]
    return np.concatenate(parts)


# ---------------------------------------------------------------------- the derivatives
def network_sensitivities(case: Case, result: NetworkResult, *, thermo: ThermoPackage | None = None,
                          inputs: Sequence[InputParameter] | None = None,
                          relative_step: float = RELATIVE_STEP) -> Sensitivities:
    """The derivatives of every output of the converged ``result`` of the network ``case``
    with respect to ``inputs`` (default :func:`network_inputs`). Raises
    :class:`ConvergenceError` for a result that did not converge."""
    import scipy.sparse.linalg as spla

    started = time.perf_counter()
    if not result.converged:
        raise ConvergenceError(f"sensitivities need a converged solution; this one is not: {result.message}")
    thermo = thermo or ThermoPackage.from_case(case)
    inputs = tuple(network_inputs(case) if inputs is None else inputs)
    nominal = network_system_of(case, thermo)
    X = network_unknowns(nominal, result)
    factors = spla.splu(nominal.evaluate(X, True).jacobian)
    steps = np.array([item.step(relative_step) for item in inputs])
    moved = [(_moved_system(case, thermo, nominal, item, item.value + h),
              _moved_system(case, thermo, nominal, item, item.value - h)) for item, h in zip(inputs, steps)]
    residual_derivatives = np.empty((nominal.size, len(inputs)))
    for m, (plus, minus) in enumerate(moved):
        residual_derivatives[:, m] = (plus.evaluate(X, False).residuals - minus.evaluate(X, False).residuals) / (2 * steps[m])
    tangents = -factors.solve(residual_derivatives) if len(inputs) else residual_derivatives
    values = network_output_values(nominal, X)
    derivatives = np.empty((len(values), len(inputs)))
    for m, (plus, minus) in enumerate(moved):
        shift = steps[m] * tangents[:, m]
        derivatives[:, m] = (network_output_values(plus, X + shift) - network_output_values(minus, X - shift)) / (2 * steps[m])
    outputs = tuple(OutputQuantity(key, label, float(value), unit)
                    for (key, label, unit), value in zip(_output_specs(nominal), values))
    return Sensitivities(inputs, outputs, derivatives, time.perf_counter() - started)


@dataclass(frozen=True)
class NetworkSensitivityStudy:
    """The sensitivities of a network's solution, its specs held: result.json's
    ``sensitivity`` section (the schema of one column's, with the one view) and
    ``sensitivity.csv``."""

    as_specified: Sensitivities

    def views(self) -> tuple[tuple[str, Sensitivities], ...]:
        return (("as_specified", self.as_specified),)

    def as_json(self) -> dict[str, Any]:
        return {"schema": "traystack-sensitivity/1", "views": {"as_specified": "the case's own specs held"},
                "as_specified": self.as_specified.as_json()}

    def csv(self) -> str:
        lines = self.as_specified.csv().splitlines()
        return "\n".join(["view," + lines[0]] + [f"as_specified,{line}" for line in lines[1:]]) + "\n"
