"""The Result of a column network and its result file (schema "traystack-result/2").

Stage arrays run over every stage of every column (columns in file order, each top first);
``stage_column`` and ``stage_number`` tag each stage with its column and its number there.
Stream conventions are those of one column (``L`` and ``V`` leave a stage for its neighbours,
side draws excluded; on a total condenser ``L`` is the reflux and the distillate is the liquid
draw), except that a stage's ``L`` or ``V`` may be split by connections (see ``connections``:
each with its rate); rate connections are drawn like side draws and reported as
``transfer_liquid`` / ``transfer_vapor`` of their stage. Products, duties and connections are
keyed by name (``COLUMN.distillate``, ``COLUMN.bottoms``, side draws; ``COLUMN.condenser``,
``COLUMN.reboiler``, a connection's exchanger by the connection's name).
"""

from __future__ import annotations

import json
import os
from dataclasses import dataclass, field
from typing import Any, Mapping

import numpy as np

from .results import UNITS, Result, json_safe, stages_csv_text, write_atomic
from .streams import FlashedFeed

__all__ = ["NETWORK_SCHEMA", "NetworkResult", "leaves_liquid_slot", "write_network_result_json", "write_network_stages_csv"]

NETWORK_SCHEMA = "traystack-result/2"


@dataclass(frozen=True)
class NetworkResult:
    """A rigorous solution of a column network (SI units)."""

    title: str
    case: Mapping[str, Any]
    converged: bool
    iterations: int  # Newton iterations of the run whose point is reported (the last step of the fallback chain)
    residual_norm: float
    message: str
    components: tuple[str, ...]
    columns: tuple[Mapping[str, Any], ...]  # name, stages, condenser, reboiler, first (global index)
    stage_column: tuple[str, ...]
    stage_number: tuple[int, ...]
    roles: tuple[str, ...]
    temperature: np.ndarray
    pressure: np.ndarray
    liquid_flow: np.ndarray
    vapor_flow: np.ndarray
    x: np.ndarray
    y: np.ndarray
    K: np.ndarray
    h_liquid: np.ndarray
    h_vapor: np.ndarray
    efficiency: np.ndarray
    liquid_draw: np.ndarray  # side draws (products)
    vapor_draw: np.ndarray
    transfer_liquid: np.ndarray  # liquid drawn by rate connections
    transfer_vapor: np.ndarray
    duty: np.ndarray  # heat added to each stage, W
    stage_feeds: tuple[tuple[FlashedFeed, ...], ...]
    products: Mapping[str, Mapping[str, Any]]  # name -> column, stage, phase, flow, composition, T, h
    duties: Mapping[str, float]  # W by name
    connections: Mapping[str, Mapping[str, Any]]  # name -> from, to, phase, flow, duty
    thermo: Mapping[str, Any]
    iteration_log: tuple[Mapping[str, float], ...]
    enthalpy_model: str = "rigorous"
    post_check: Mapping[str, float] = field(default_factory=dict)
    strategy: Mapping[str, Any] = field(default_factory=dict)
    extra: Mapping[str, Any] = field(default_factory=dict)  # "audit": findings attached downstream (each with as_json)
    iterations_by_step: tuple[tuple[str, int], ...] = ()  # every Newton run of the fallback chain, in order

    @property
    def total_iterations(self) -> int:
        """Newton iterations of every step of the fallback chain together (``iterations`` counts
        only the last)."""
        return sum(n for _, n in self.iterations_by_step) if self.iterations_by_step else self.iterations

    @property
    def stage_count(self) -> int:
        return len(self.temperature)

    def column_stages(self, name: str) -> np.ndarray:
        """Global indices of the stages of column ``name``, top first."""
        return np.flatnonzero(np.array(self.stage_column) == name)

    def balances(self) -> dict[str, float]:
        """Closure of every component and of energy over the whole network, from the reported
        feeds, products and duties alone."""
        feed_in = np.zeros(len(self.components))
        energy_in = 0.0
        for feeds in self.stage_feeds:
            for feed in feeds:
                feed_in += feed.flow * np.asarray(feed.z)
                energy_in += feed.flow * feed.h
        out = np.zeros(len(self.components))
        energy_out = 0.0
        for product in self.products.values():
            out += product["flow"] * np.asarray(product["composition"])
            energy_out += product["flow"] * product["h"]
        duty_total = float(self.duty.sum())
        scale = max(float(feed_in.sum()), 1e-300)
        terms = abs(energy_in) + abs(energy_out) + float(np.abs(self.duty).sum())
        return {
            "component_closure_max": float(np.max(np.abs(feed_in - out)) / scale),
            "energy_closure_rel": float(abs(energy_in + duty_total - energy_out) / max(terms, 1e-300)),
        }

    def stage_records(self) -> list[dict[str, Any]]:
        records = []
        for j in range(self.stage_count):
            L, V = float(self.liquid_flow[j]), float(self.vapor_flow[j])
            liquid_draw = float(self.liquid_draw[j])
            if self.roles[j] == "total_condenser":
                name = f"{self.stage_column[j]}.distillate"
                liquid_draw += self.products[name]["flow"] if name in self.products else 0.0
                V = 0.0
            records.append({
                "column": self.stage_column[j], "number": self.stage_number[j], "role": self.roles[j],
                "T": float(self.temperature[j]), "P": float(self.pressure[j]), "L": L, "V": V,
                "x": self.x[j].tolist(), "y": self.y[j].tolist(), "K": self.K[j].tolist(),
                "h_L": float(self.h_liquid[j]), "h_V": float(self.h_vapor[j]), "efficiency": float(self.efficiency[j]),
                "feeds": [{"name": f.name, "flow": f.flow, "z": list(f.z), "h": f.h, "q": f.q} for f in self.stage_feeds[j]],
                "liquid_draw": liquid_draw, "vapor_draw": float(self.vapor_draw[j]),
                "transfer_liquid": float(self.transfer_liquid[j]), "transfer_vapor": float(self.transfer_vapor[j]),
                "duty": float(self.duty[j]),
            })
        return records

    def to_dict(self) -> dict[str, Any]:
        return json_safe({
            "schema": NETWORK_SCHEMA,
            "title": self.title,
            "case": self.case,
            "converged": self.converged,
            "iterations": self.iterations,
            "total_iterations": self.total_iterations,
            "iterations_by_step": [{"step": name, "iterations": n} for name, n in self.iterations_by_step],
            "residual_norm": self.residual_norm,
            "message": self.message,
            "solution_strategy": dict(self.strategy),
            "conventions": __doc__.split("\n\n", 1)[1].strip(),
            "enthalpy_model": self.enthalpy_model,
            "components": list(self.components),
            "units": UNITS,
            "columns": [dict(c) for c in self.columns],
            "stages": self.stage_records(),
            "products": {k: dict(v) for k, v in self.products.items()},
            "duties": dict(self.duties),
            "connections": {k: dict(v) for k, v in self.connections.items()},
            "balances": self.balances(),
            "post_check": dict(self.post_check),
            "thermo": self.thermo,
            "iteration_log": list(self.iteration_log),
            **{key: value.as_json() for key, value in self.extra.items()},
        })

    def to_json(self) -> str:
        return json.dumps(self.to_dict(), indent=2, allow_nan=False)

    def column_result(self, name: str) -> Result:
        """Column ``name`` seen alone, as a one-column :class:`~solver.results.Result` with its
        own stages: a connection that brings a stream in is a feed of its stage (flow,
        composition and enthalpy of its source), one that takes a stream from a stage is a side
        draw there, except the vapor leaving the top stage and the liquid leaving the bottom
        stage, which stay the column's top and bottom products. Its stages meet the same
        balances, so what is built for one column (sizing, profiles) reads it unchanged."""
        stages = self.column_stages(name)
        first = int(stages[0])
        column = next(c for c in self.columns if c["name"] == name)
        L, V = self.liquid_flow[stages].copy(), self.vapor_flow[stages].copy()
        liquid_draw = self.liquid_draw[stages] + self.transfer_liquid[stages]
        vapor_draw = self.vapor_draw[stages] + self.transfer_vapor[stages]
        feeds = [list(self.stage_feeds[g]) for g in stages]
        for connection_name, c in self.connections.items():
            source, liquid = self._stage_index(c["from"]), leaves_liquid_slot(c)
            if c["from"]["column"] == name and c["fraction"] is not None:
                end = c["from"]["stage"] == (column["stages"] if liquid else 1)
                if not end:
                    (L if liquid else V)[source - first] -= c["flow"]
                    (liquid_draw if liquid else vapor_draw)[source - first] += c["flow"]
            if c["to"]["column"] == name:
                composition = (self.x if liquid else self.y)[source]
                h = (self.h_liquid if liquid else self.h_vapor)[source]
                feeds[c["to"]["stage"] - 1].append(FlashedFeed(c["to"]["stage"], c["flow"], tuple(composition.tolist()), float(h),
                                                               1.0 if c["from"]["phase"] == "liquid" else 0.0, connection_name,
                                                               float(self.temperature[source]), float(self.pressure[source])))
        return Result(
            title=f"{self.title}: column {name}", case={**self.case, "column": {}}, converged=self.converged,
            iterations=self.iterations, residual_norm=self.residual_norm, message=self.message, components=self.components,
            roles=tuple(self.roles[g] for g in stages), temperature=self.temperature[stages], pressure=self.pressure[stages],
            liquid_flow=L, vapor_flow=V, x=self.x[stages], y=self.y[stages], K=self.K[stages], h_liquid=self.h_liquid[stages],
            h_vapor=self.h_vapor[stages], efficiency=self.efficiency[stages], liquid_draw=liquid_draw, vapor_draw=vapor_draw,
            duty=self.duty[stages], stage_feeds=tuple(tuple(f) for f in feeds), condenser=column["condenser"],
            reboiler=column["reboiler"], thermo=self.thermo, iteration_log=self.iteration_log, enthalpy_model=self.enthalpy_model,
        )

    def _stage_index(self, end: Mapping[str, Any]) -> int:
        """The global index of a connection's end (``{"column": ..., "stage": ...}``)."""
        return int(self.column_stages(end["column"])[end["stage"] - 1])

    def stages_csv(self) -> str:
        """The stage table of every column as one CSV: each row led by its column's name and
        its stage number there (columns in file order, each top first), the liquid and vapor
        sent on by rate connections beside the side draws; SI units in the headers."""
        return stages_csv_text(self.stage_records(), self.components, leading=("column",),
                               trailing=("transfer_liquid", "transfer_vapor"))


def leaves_liquid_slot(record: Mapping[str, Any]) -> bool:
    """Whether a connection's record (``NetworkResult.connections``) leaves its stage's liquid
    slot: a total condenser's distillate is liquid but leaves the vapor slot (the engine's
    convention), and its record names the product."""
    return record["from"]["phase"] == "liquid" and record["from"].get("product") != "distillate"


def write_network_stages_csv(result: NetworkResult, path: str | os.PathLike):
    """Write :meth:`NetworkResult.stages_csv` to ``path`` atomically."""
    return write_atomic(path, result.stages_csv())


def write_network_result_json(result: NetworkResult, path: str | os.PathLike):
    """Write ``result`` as result.json (schema :data:`NETWORK_SCHEMA`) atomically."""
    return write_atomic(path, result.to_json() + "\n")
