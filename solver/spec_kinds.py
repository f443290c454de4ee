"""The registry of specification kinds, shared by the single-column and the network engines.

Every spec of a case file becomes a :class:`SpecRow` (one row of the Newton system), and each
kind of row has one :class:`SpecKind` entry in :data:`SPEC_REGISTRY`: its scaled residual with
its analytic Jacobian entries, its words and quantity in reports, how reports read the value
reached, and what it tells the default starts and the checks before solving. A column's own
specs (the single-column vocabulary of :data:`~solver.case.SPEC_KINDS`) are translated into
rows by :func:`column_spec_rows`, for one column and for each column of a network alike.

A residual function takes the system, the stage state
(:class:`~solver.mesh_blocks.StageState`), the engine's extra values and the row; it returns
(value, Jacobian columns, Jacobian values). The system offers the layout: ``T_col(g)``,
``l_col(g)``, ``v_col(g)``, ``flow_scale``, ``energy_scale``, ``total_feed_by_component``,
``c``, ``component_names``, and ``duty_term(state, extras, row)``: the scaled duty an
exchanger spec sets with its Jacobian entries (an extra unknown of a network; for one column
the condenser's or reboiler's enthalpy balance, whose row the spec keeps, so no entries).
Flows are scaled by ``flow_scale``, duties by ``flow_scale * energy_scale``, temperatures by
:data:`TEMPERATURE_SCALE`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable, Collection, Mapping, Sequence

import numpy as np

from .case import Spec
from .errors import SpecError

__all__ = [
    "COLUMN_SPEC_KINDS",
    "NETWORK_ROW_KINDS",
    "SPEC_REGISTRY",
    "TEMPERATURE_SCALE",
    "ColumnSpecKind",
    "ProductRef",
    "SpecKind",
    "SpecRow",
    "column_spec_rows",
]

TEMPERATURE_SCALE = 10.0  # K, divides temperature residuals


@dataclass(frozen=True)
class ProductRef:
    """A product: the stage it leaves (global index), its phase slot, and either the share of
    that slot's flow it takes (distillate, bottoms) or its fixed rate in mol/s (a side draw)."""

    name: str
    stage: int
    phase: str  # "liquid" | "vapor"
    share: float | None = None
    rate: float | None = None


@dataclass(frozen=True)
class SpecRow:
    """One specification resolved on the stages. ``kind`` is a key of :data:`SPEC_REGISTRY`;
    ``value`` SI; ``label`` the key in the case file."""

    kind: str
    value: float
    label: str
    stage: int = -1  # global stage index (stage temperature, reflux/boilup ratio's stage)
    component: int = -1
    product: ProductRef | None = None
    extra: str = ""  # the extra unknown it sets (a duty, a connection's rate)
    source_stage: int = -1  # for a connection fraction: the stage whose phase is split
    phase: str = ""  # for a connection fraction or a return temperature: the phase of the stream


@dataclass(frozen=True)
class SpecKind:
    """A kind of spec: its residual (see the module docstring), its words in reports, the
    quantity its value is (``ratio``, ``flow`` mol/s, ``fraction``, ``temperature`` K,
    ``duty`` W) and how reports read the value reached from a solved network
    (``achieved(result, row)``, :class:`~solver.network_results.NetworkResult`; None where
    the result alone does not give it)."""

    residual: Callable
    words: str
    quantity: str = "ratio"
    achieved: Callable | None = None


@dataclass(frozen=True)
class ColumnSpecKind:
    """How a kind of a column's own spec (:data:`~solver.case.SPEC_KINDS`) becomes a
    :class:`SpecRow`: the registry kind, the product it is on (None: the spec's own product,
    if any), the exchanger the column needs for it (whose duty a ``duty`` row sets), and
    whether the row sits on that exchanger's stage (a reflux or boilup ratio)."""

    row_kind: str
    product: str | None = None
    exchanger: str | None = None
    on_exchanger_stage: bool = False


def _product_flow(system, s, p: ProductRef):
    """(scaled flow, columns, values) of a product's total flow."""
    c = system.c
    if p.rate is not None:
        return p.rate / system.flow_scale, np.array([], dtype=int), np.array([])
    total = s.L[p.stage] if p.phase == "liquid" else s.V[p.stage]
    cols = (system.l_col(p.stage) if p.phase == "liquid" else system.v_col(p.stage)) + np.arange(c)
    return p.share * total, cols, np.full(c, p.share)


def _composition(s, p: ProductRef):
    """(composition, total of the slot) of a product's stage slot."""
    return (s.x[p.stage], s.L_safe[p.stage]) if p.phase == "liquid" else (s.y[p.stage], s.V_safe[p.stage])


def _slot_col(system, p: ProductRef) -> int:
    return system.l_col(p.stage) if p.phase == "liquid" else system.v_col(p.stage)


def _product_flow_residual(system, s, extras, row: SpecRow):
    flow, cols, vals = _product_flow(system, s, row.product)
    return flow - row.value / system.flow_scale, cols, vals


def _mole_fraction_residual(system, s, extras, row: SpecRow):
    i, c = row.component, system.c
    composition, total = _composition(s, row.product)
    return composition[i] - row.value, _slot_col(system, row.product) + np.arange(c), (np.eye(c)[i] - composition[i]) / total


def _recovery_residual(system, s, extras, row: SpecRow):
    i, c, p = row.component, system.c, row.product
    feed = system.total_feed_by_component[i]
    if feed <= 0:
        raise SpecError(f"{row.label}: there is no {system.component_names[i]} in the feeds to recover")
    if p.rate is not None:
        composition, total = _composition(s, p)
        rate = p.rate / system.flow_scale
        cols = _slot_col(system, p) + np.arange(c)
        return (rate * composition[i] - row.value * feed) / feed, cols, rate * (np.eye(c)[i] - composition[i]) / (total * feed)
    flows = s.l if p.phase == "liquid" else s.v
    return (p.share * flows[p.stage, i] - row.value * feed) / feed, np.array([_slot_col(system, p) + i]), np.array([p.share / feed])


def _ratio_residual(system, s, extras, row: SpecRow):
    """Reflux ratio (reflux L over distillate) or boilup ratio (vapor V over bottoms) at the
    row's stage; the product's share of the other slot divides."""
    c, g, p = system.c, row.stage, row.product
    share = p.share if p is not None else 1.0
    if row.kind == "reflux_ratio":
        value = s.L[g] - row.value * share * s.V[g]
        cols = np.concatenate([system.l_col(g) + np.arange(c), system.v_col(g) + np.arange(c)])
    else:
        value = s.V[g] - row.value * share * s.L[g]
        cols = np.concatenate([system.v_col(g) + np.arange(c), system.l_col(g) + np.arange(c)])
    return value, cols, np.concatenate([np.ones(c), np.full(c, -row.value * share)])


def _stage_temperature_residual(system, s, extras, row: SpecRow):
    return (s.T[row.stage] - row.value) / TEMPERATURE_SCALE, np.array([system.T_col(row.stage)]), np.array([1.0 / TEMPERATURE_SCALE])


def _duty_residual(system, s, extras, row: SpecRow):
    duty, cols, vals = system.duty_term(s, extras, row)
    return duty - row.value / (system.flow_scale * system.energy_scale), cols, vals


def _connection_flow_residual(system, s, extras, row: SpecRow):
    k = system.extra_index(row.extra)
    return extras[k] - row.value / system.flow_scale, np.array([system.extra_col(row.extra)]), np.array([1.0])


def _connection_fraction_residual(system, s, extras, row: SpecRow):
    """The connection's rate is ``value`` times all of the phase leaving its stage (to the
    neighbours, side draws and every rate connection)."""
    g, c = row.source_stage, system.c
    leaving, free_cols = system.phase_leaving(s, extras, g, row.phase)
    k = system.extra_index(row.extra)
    own = system.extra_col(row.extra)
    slot = system.l_col(g) if row.phase == "liquid" else system.v_col(g)
    cols = np.concatenate([[own], free_cols, slot + np.arange(c)])
    vals = np.concatenate([[1.0], np.full(len(free_cols), -row.value), np.full(c, -row.value)])
    return extras[k] - row.value * leaving, cols, vals


def _return_temperature_residual(system, s, extras, row: SpecRow):
    return system.return_temperature_row(s, extras, row)


def _achieved_product(result, row: SpecRow) -> Mapping:
    return result.products[row.product.name]


def _achieved_ratio(result, row: SpecRow) -> float:
    own = result.liquid_flow if row.kind == "reflux_ratio" else result.vapor_flow
    return float(own[row.stage]) / _achieved_product(result, row)["flow"]


def _achieved_recovery(result, row: SpecRow) -> float:
    product = _achieved_product(result, row)
    fed = sum(feed.flow * feed.z[row.component] for feeds in result.stage_feeds for feed in feeds)
    return product["flow"] * product["composition"][row.component] / fed


def _achieved_duty(result, row: SpecRow) -> float:
    return result.duties[row.extra] if row.extra in result.duties else result.duties[row.extra.rsplit(".", 1)[0]]


def _achieved_fraction(result, row: SpecRow) -> float:
    g = row.source_stage
    if row.phase == "liquid":
        leaving = result.liquid_flow[g] + result.liquid_draw[g] + result.transfer_liquid[g]
    else:
        leaving = result.vapor_flow[g] + result.vapor_draw[g] + result.transfer_vapor[g]
    return result.connections[row.extra.rsplit(".", 1)[0]]["flow"] / float(leaving)


#: Every kind of spec row: its residual, its words, its quantity and its reached value.
SPEC_REGISTRY: dict[str, SpecKind] = {
    "reflux_ratio": SpecKind(_ratio_residual, "reflux ratio", "ratio", _achieved_ratio),
    "boilup_ratio": SpecKind(_ratio_residual, "boilup ratio", "ratio", _achieved_ratio),
    "product_flow": SpecKind(_product_flow_residual, "product flow", "flow", lambda r, row: _achieved_product(r, row)["flow"]),
    "mole_fraction": SpecKind(_mole_fraction_residual, "mole fraction in a product", "fraction",
                              lambda r, row: _achieved_product(r, row)["composition"][row.component]),
    "recovery": SpecKind(_recovery_residual, "recovery in a product", "fraction", _achieved_recovery),
    "stage_temperature": SpecKind(_stage_temperature_residual, "stage temperature", "temperature",
                                  lambda r, row: float(r.temperature[row.stage])),
    "duty": SpecKind(_duty_residual, "exchanger duty", "duty", _achieved_duty),
    "connection_flow": SpecKind(_connection_flow_residual, "connection rate", "flow",
                                lambda r, row: r.connections[row.extra.rsplit(".", 1)[0]]["flow"]),
    "connection_fraction": SpecKind(_connection_fraction_residual, "connection fraction", "fraction", _achieved_fraction),
    "return_temperature": SpecKind(_return_temperature_residual, "return temperature", "temperature"),
}

#: The row each kind of a column's own spec (the single-column vocabulary) becomes.
COLUMN_SPEC_KINDS: dict[str, ColumnSpecKind] = {
    "reflux_ratio": ColumnSpecKind("reflux_ratio", "distillate", "condenser", on_exchanger_stage=True),
    "boilup_ratio": ColumnSpecKind("boilup_ratio", "bottoms", "reboiler", on_exchanger_stage=True),
    "distillate_rate": ColumnSpecKind("product_flow", "distillate"),
    "bottoms_rate": ColumnSpecKind("product_flow", "bottoms"),
    "condenser_duty": ColumnSpecKind("duty", exchanger="condenser"),
    "reboiler_duty": ColumnSpecKind("duty", exchanger="reboiler"),
    "mole_fraction": ColumnSpecKind("mole_fraction"),
    "recovery": ColumnSpecKind("recovery"),
    "stage_temperature": ColumnSpecKind("stage_temperature"),
}

#: The row kind of each kind of a network's top-level ``[[specs]]``
#: (:data:`~solver.case.NETWORK_SPEC_KINDS`), resolved on the graph by
#: :func:`solver.network_specs.resolve_specs`.
NETWORK_ROW_KINDS: dict[str, str] = {
    "connection_flow": "connection_flow", "connection_fraction": "connection_fraction", "product_flow": "product_flow",
    "mole_fraction": "mole_fraction", "recovery": "recovery", "exchanger_duty": "duty",
    "return_temperature": "return_temperature", "stage_temperature": "stage_temperature",
    "reflux_ratio": "reflux_ratio", "boilup_ratio": "boilup_ratio",
}


def column_spec_rows(specs: Sequence[Spec], component_names: Sequence[str], *, stage_count: int,
                     exchangers: Collection[str], exchanger_stage: Callable[[str], int],
                     product: Callable[[str], ProductRef], stage_index: Callable[[int], int],
                     exchanger_prefix: str = "") -> tuple[SpecRow, ...]:
    """A column's own specs as :class:`SpecRow`\\ s, in the given order. ``exchangers``: those
    the column has (``condenser``, ``reboiler``); ``exchanger_stage(name)`` the global stage of
    one; ``product(name)`` the :class:`ProductRef` of its distillate or bottoms;
    ``stage_index(n)`` the global index of its stage n (1 = top); a duty row's ``extra`` is
    ``exchanger_prefix + exchanger``. Raises :class:`SpecError` for a spec that does not fit
    the column (an exchanger it lacks, an unknown component, a stage outside it)."""
    names = list(component_names)
    rows = []
    for spec in specs:
        label = spec.key or spec.kind
        entry = COLUMN_SPEC_KINDS.get(spec.kind)
        if entry is None:
            raise SpecError(f"{label}: unknown specification kind {spec.kind!r}")
        if entry.exchanger is not None and entry.exchanger not in exchangers:
            raise SpecError(f"{label}: the column has no {entry.exchanger}")
        if spec.component is not None and spec.component not in names:
            raise SpecError(f"{spec.key}: {spec.component!r} is not a component of the case ({', '.join(names)})")
        if entry.row_kind == "stage_temperature" and not 1 <= (spec.stage or 0) <= stage_count:
            raise SpecError(f"{spec.key}: stage {spec.stage} is not in 1..{stage_count}")
        which = entry.product or spec.product
        stage = exchanger_stage(entry.exchanger) if entry.on_exchanger_stage else (
            stage_index(spec.stage) if spec.stage is not None else -1)
        extra = exchanger_prefix + entry.exchanger if entry.row_kind == "duty" else ""
        rows.append(SpecRow(entry.row_kind, spec.value, label, stage=stage,
                            component=names.index(spec.component) if spec.component is not None else -1,
                            product=product(which) if which is not None else None, extra=extra))
    return tuple(rows)
