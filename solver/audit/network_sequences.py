"""The conventional sequences beside a thermally coupled column: the direct and the indirect
sequence of two simple columns (total condenser, partial reboiler) that make the same three
products from the same feed, each column solved rigorously by the network engine.

The products are those of the solved network (a divided-wall column or a Petlyuk arrangement
with one feed and three products), in order of rising temperature: top, middle and bottom. Each
component belongs to the product that takes most of it. The split top | middle + bottom has as
light key the last component of the top product (in order of falling volatility) and as heavy
key the next; likewise the split top + middle | bottom. Each column of a sequence is specified by
the recoveries of its two keys (light key to the distillate, heavy key to the bottoms) that the
network's products have, counted on that column's own feed: the sequence's products then carry
the network's key-component flows (the usual specification of a sequence for a comparison of
energy; e.g. Seader, Henley & Roper, *Separation Process Principles*, 3rd ed., Wiley 2011,
sec. 9.4). The direct sequence takes the top product off first, its second column fed with the
first one's bottoms; the indirect sequence takes the bottom product off first, its second
column fed with the first one's distillate. The second column's feed is the first column's
product as solved (flow, composition, temperature and pressure), so the two columns are solved
one after the other, each a network of one column.

Stage count: each column gets half the network's stages (the same total), its feed on its middle
stage; pressures from the network's column with a condenser (its top pressure and mean drop per
stage). The boilup of a sequence is the sum of the vapor leaving its reboilers, its duty the sum
of its reboiler duties.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from ..case import Case
from ..case.fields import plain
from ..case.reader import parse_case
from ..errors import SpecError
from ..network_engine import build_network_system, simulate_network
from ..network_results import NetworkResult
from ..shortcut.vmin_diagram import VminDiagram, sharp_split_point
from ..thermo.package import ThermoPackage

__all__ = ["SequenceColumn", "SequenceRun", "conventional_sequences", "reboiler_boilup", "reboiler_duty"]

_SEQUENCES = ("direct", "indirect")
_REFLUX_FACTOR = 1.3  # times the minimum reflux ratio, for a column's first solve (1.2 to 1.5: common practice)
_REFLUX_ROUNDS = 10  # at most, of moving the reflux ratio towards the light key's recovery
_RECOVERY_GAP = 2e-4  # of the light key's recovery, close enough to solve to the recoveries


def reboiler_boilup(result: NetworkResult) -> float:
    """The vapor raised by all reboilers of ``result`` (mol/s): the vapor leaving each
    reboiler stage."""
    return float(sum(result.vapor_flow[result.column_stages(c["name"])[-1]] for c in result.columns if c["reboiler"] != "none"))


def reboiler_duty(result: NetworkResult) -> float:
    """The heat of all reboilers of ``result`` (W)."""
    return float(sum(duty for name, duty in result.duties.items() if name.endswith(".reboiler")))


@dataclass(frozen=True)
class SequenceColumn:
    """One simple column of a sequence as solved: its name, stages, feed stage, key recoveries
    (component -> (product, fraction of the column's feed)), whether it converged, its Newton
    iterations, its boilup (mol/s) and its reboiler and condenser duties (W)."""

    name: str
    stages: int
    feed_stage: int
    recoveries: dict[str, tuple[str, float]]
    converged: bool
    iterations: int
    message: str
    boilup: float
    reboiler_duty: float
    condenser_duty: float


@dataclass(frozen=True)
class SequenceRun:
    """A two-column sequence (``name`` "direct" or "indirect") solved rigorously: its columns
    and the three products it makes, named like the network's (flow mol/s, composition in the
    case's component order)."""

    name: str
    columns: tuple[SequenceColumn, ...]
    products: dict[str, dict[str, Any]]

    @property
    def converged(self) -> bool:
        return all(column.converged for column in self.columns)

    @property
    def boilup(self) -> float:
        return sum(column.boilup for column in self.columns)

    @property
    def reboiler_duty(self) -> float:
        return sum(column.reboiler_duty for column in self.columns)

    def as_json(self) -> dict[str, Any]:
        return {
            "converged": self.converged, "boilup": self.boilup, "reboiler_duty": self.reboiler_duty,
            "columns": [{"name": c.name, "stages": c.stages, "feed_stage": c.feed_stage, "converged": c.converged,
                         "iterations": c.iterations, "message": c.message,
                         "recoveries": {name: {"product": product, "fraction": value} for name, (product, value) in c.recoveries.items()},
                         "boilup": c.boilup, "reboiler_duty": c.reboiler_duty, "condenser_duty": c.condenser_duty}
                        for c in self.columns],
            "products": self.products,
        }


def _three_products(case: Case, result: NetworkResult) -> tuple[list[str], np.ndarray]:
    """The network's product names in order of rising temperature and their component flows
    (mol/s, one row per product); raises SpecError unless there are exactly three."""
    names = sorted((name for name, p in result.products.items() if p["flow"] > 0.0), key=lambda name: result.products[name]["T"])
    if len(names) != 3:
        raise SpecError(f"{case.source_file or '<case>'}: the conventional sequences are built for a network of three products; "
                        f"this one has {len(names)} ({', '.join(names)})")
    flows = np.array([result.products[name]["flow"] * np.asarray(result.products[name]["composition"]) for name in names])
    return names, flows


def _keys(case: Case, order: tuple[str, ...], flows: np.ndarray) -> tuple[tuple[int, int], tuple[int, int]]:
    """(light key, heavy key) of the split top | rest and of the split top + middle | bottom, as
    component indices of the case, from the product that takes most of each component."""
    ranked = [case.component_names.index(name) for name in order]
    home = np.argmax(flows[:, ranked], axis=0)  # product of each component, volatility order
    if np.any(np.diff(home) < 0) or home[0] != 0 or home[-1] != 2 or not np.any(home == 1):
        raise SpecError(f"{case.source_file or '<case>'}: the three products do not split the components in order of volatility "
                        f"({dict(zip(order, home.tolist()))}); no simple sequence makes them")
    first = int(np.flatnonzero(home == 0)[-1])
    second = int(np.flatnonzero(home <= 1)[-1])
    return (ranked[first], ranked[first + 1]), (ranked[second], ranked[second + 1])


def _pressure_table(case: Case) -> dict[str, str]:
    """Top pressure and mean drop per stage of the network's column with a condenser."""
    column = next(section.column for section in case.network.columns if section.column.condenser != "none")
    pressures = column.pressures
    drop = (pressures[-1] - pressures[0]) / max(len(pressures) - 1, 1)
    return {"top": f"{pressures[0]!r} Pa", "drop_per_stage": f"{drop!r} Pa"}


def _column_case(case: Case, name: str, stages: int, feed: dict[str, Any], specs: dict[str, Any]) -> Case:
    """A network case of one simple column ``name`` (total condenser, partial reboiler) with the
    case's components and thermo, the feed ``feed`` (a [[feeds]] table) on its middle stage and
    the column specs ``specs`` (the file's vocabulary)."""
    raw = plain(case.raw)
    document = {key: raw[key] for key in ("components", "thermo") if key in raw}
    document["title"] = f"{case.title}: {name}"
    document["columns"] = [{"name": name, "stages": stages, "condenser": "total", "reboiler": "partial",
                            "pressure": _pressure_table(case), "specs": specs}]
    document["feeds"] = [{**feed, "column": name, "stage": stages // 2}]
    return parse_case(document, source_file=f"{case.source_file or '<case>'} ({name})")


def _recovery(part: float, whole: float) -> float:
    """A key's recovery, kept inside (0, 1) for a spec."""
    return float(np.clip(part / whole, 1e-9, 1.0 - 1e-9))


def _solved_column(case: Case, name: str, stages: int, feed: dict[str, Any], column_feed: np.ndarray,
                   recoveries: dict[str, tuple[str, float]], guess: tuple[float, float], thermo) -> tuple[SequenceColumn, NetworkResult]:
    """The column solved to its key recoveries. The reflux ratio is first moved by the secant
    method at the distillate rate of ``guess`` (specs linear in the flows, each solve from the
    last) until the light key's recovery is met to :data:`_RECOVERY_GAP`; the column is then
    solved to both recoveries from there. Near a sharp split the recoveries are flat in the
    reflux ratio (a pinch) and a solve to them from a profile of another shape seldom converges;
    one of nearly the right shape converges in a few iterations."""
    light = next(c for c, (product, _) in recoveries.items() if product == "distillate")
    i, target = case.component_names.index(light), recoveries[light][1]
    reflux_ratio, distillate = guess
    trials: list[tuple[float, float, NetworkResult]] = []  # (reflux ratio, recovery error, result)
    result = None
    for _ in range(_REFLUX_ROUNDS):
        trial_case = _column_case(case, name, stages, feed, {"reflux_ratio": reflux_ratio, "distillate_rate": f"{distillate!r} mol/s"})
        start = _scaled_unknowns(trial_case, result, thermo) if result is not None else None
        result = simulate_network(trial_case, thermo=thermo, start=start)
        if not result.converged and start is not None:
            result = simulate_network(trial_case, thermo=thermo)
        if not result.converged:
            break
        product = result.products[f"{name}.distillate"]
        error = product["flow"] * product["composition"][i] / column_feed[i] - target
        trials.append((reflux_ratio, error, result))
        if abs(error) < _RECOVERY_GAP:
            break
        if len(trials) == 1:
            reflux_ratio *= 0.8 if error > 0 else 1.25
        else:
            (r0, e0, _), (r1, e1, _) = trials[-2], trials[-1]
            secant = r1 - e1 * (r1 - r0) / (e1 - e0) if e1 != e0 else r1 * (0.8 if e1 > 0 else 1.25)
            reflux_ratio = float(np.clip(secant, 0.5 * r1, 2.0 * r1))
    column_case = _column_case(case, name, stages, feed, {"recovery": {c: {product: value} for c, (product, value) in recoveries.items()}})
    nearest = min(trials, key=lambda trial: abs(trial[1]))[2] if trials else None
    start = _scaled_unknowns(column_case, nearest, thermo) if nearest is not None else None
    result = simulate_network(column_case, thermo=thermo, start=start)
    if not result.converged and start is not None:
        result = simulate_network(column_case, thermo=thermo)
    column = SequenceColumn(name, stages, stages // 2, recoveries, bool(result.converged), result.iterations, result.message,
                            reboiler_boilup(result), reboiler_duty(result), float(result.duties.get(f"{name}.condenser", 0.0)))
    return column, result


def _scaled_unknowns(column_case: Case, result: NetworkResult, thermo) -> np.ndarray:
    """The solved column ``result`` as the scaled unknowns of ``column_case``'s system (one
    column, same stages; its only extra unknowns the condenser and reboiler duties)."""
    system = build_network_system(column_case, thermo)
    flow_scale = system.flow_scale
    l = result.liquid_flow[:, None] * result.x / flow_scale
    v = result.vapor_flow[:, None] * result.y / flow_scale
    extras = np.array([result.duties[name] / (flow_scale * system.energy_scale) for name in system.extra_names])
    return system.pack(result.temperature, l, v, extras)


def _product_feed(case: Case, result: NetworkResult, product: str) -> dict[str, Any]:
    """The [[feeds]] table of a solved column's product: its flow, composition, temperature and
    pressure (the stage it leaves)."""
    p = result.products[product]
    stage = result.column_stages(p["column"])[p["stage"] - 1]
    return {"name": product, "flow": f"{p['flow']!r} mol/s",
            "composition": dict(zip(case.component_names, (float(x) for x in p["composition"]))),
            "temperature": f"{p['T']!r} K", "pressure": f"{float(result.pressure[stage])!r} Pa"}


def _reflux_guess(diagram: VminDiagram, ranked: list[int], column_feed: np.ndarray, keys: tuple[int, int], q: float,
                  distillate: float) -> tuple[float, float]:
    """(reflux ratio, distillate rate) to solve a column at first: the distillate rate the
    network's products give it and :data:`_REFLUX_FACTOR` times Underwood's minimum reflux of
    its sharp key split (``keys`` as case indices, ``ranked`` the case indices in order of
    falling volatility)."""
    flows = np.maximum(column_feed[ranked], 1e-9 * column_feed.sum())
    point = sharp_split_point(diagram.relative_volatility, flows, q, ranked.index(keys[0]), ranked.index(keys[1]))
    return max(_REFLUX_FACTOR * (point.vapor_top / distillate - 1.0), 0.5), distillate


def _sequence(case: Case, result: NetworkResult, kind: str, order: tuple[str, ...], diagram: VminDiagram, thermo) -> SequenceRun:
    names, flows = _three_products(case, result)
    (lk1, hk1), (lk2, hk2) = _keys(case, order, flows)
    ranked = [case.component_names.index(name) for name in order]
    component = case.component_names
    feed = np.sum(flows, axis=0)
    stages = max(sum(section.column.stages for section in case.network.columns) // 2, 6)
    first_feed = dict(plain(case.raw)["feeds"][0])
    if kind == "direct":  # top | middle + bottom, then middle | bottom
        first_keys = {component[lk1]: ("distillate", _recovery(flows[0, lk1], feed[lk1])),
                      component[hk1]: ("bottoms", _recovery(feed[hk1] - flows[0, hk1], feed[hk1]))}
        guess = _reflux_guess(diagram, ranked, feed, (lk1, hk1), diagram.q, float(flows[0].sum()))
        handed_on, keys = "bottoms", (lk2, hk2, 1, 2)
    else:  # top + middle | bottom, then top | middle
        first_keys = {component[lk2]: ("distillate", _recovery(feed[lk2] - flows[2, lk2], feed[lk2])),
                      component[hk2]: ("bottoms", _recovery(flows[2, hk2], feed[hk2]))}
        guess = _reflux_guess(diagram, ranked, feed, (lk2, hk2), diagram.q, float(flows[:2].sum()))
        handed_on, keys = "distillate", (lk1, hk1, 0, 1)
    first, first_result = _solved_column(case, f"{kind}-first", stages, first_feed, feed, first_keys, guess, thermo)
    columns = [first]
    products: dict[str, dict[str, Any]] = {}
    if first.converged:
        second_feed = _product_feed(case, first_result, f"{kind}-first.{handed_on}")
        inflow = first_result.products[f"{kind}-first.{handed_on}"]
        inflow = inflow["flow"] * np.asarray(inflow["composition"])
        lk, hk, light_product, heavy_product = keys
        second_keys = {component[lk]: ("distillate", _recovery(flows[light_product, lk], inflow[lk])),
                       component[hk]: ("bottoms", _recovery(flows[heavy_product, hk], inflow[hk]))}
        guess = _reflux_guess(diagram, ranked, inflow, (lk, hk), 1.0, float(flows[light_product].sum()))
        second, second_result = _solved_column(case, f"{kind}-second", stages, second_feed, inflow, second_keys, guess, thermo)
        columns.append(second)
        made = ([first_result.products[f"{kind}-first.distillate"], second_result.products[f"{kind}-second.distillate"],
                 second_result.products[f"{kind}-second.bottoms"]] if kind == "direct" else
                [second_result.products[f"{kind}-second.distillate"], second_result.products[f"{kind}-second.bottoms"],
                 first_result.products[f"{kind}-first.bottoms"]])
        products = {name: {"flow": p["flow"], "composition": list(p["composition"])} for name, p in zip(names, made)}
    return SequenceRun(kind, tuple(columns), products)


def conventional_sequences(case: Case, result: NetworkResult, order: tuple[str, ...], diagram: VminDiagram,
                           thermo: ThermoPackage | None = None) -> tuple[SequenceRun, SequenceRun]:
    """The direct and the indirect sequence making the three products of the solved network
    ``result`` of ``case`` (one feed), each column solved rigorously; ``order`` the component
    names in order of falling volatility and ``diagram`` the feed's Vmin diagram in that order
    (:func:`solver.shortcut.vmin_diagram.case_minimum_vapor_diagram`), whose volatilities give
    each column's first reflux ratio. Raises SpecError when the network's products are not three
    cuts of the components in order of volatility."""
    if case.network is None or len(case.feeds) != 1:
        raise SpecError(f"{case.source_file or '<case>'}: the conventional sequences are built for a network with one feed")
    thermo = thermo or ThermoPackage.from_case(case)
    direct, indirect = (_sequence(case, result, kind, order, diagram, thermo) for kind in _SEQUENCES)
    return direct, indirect
