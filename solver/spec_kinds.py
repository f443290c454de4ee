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
    "SI_UNITS",
    "SPEC_REGISTRY",
    "TEMPERATURE_SCALE",
    "ColumnSpecKind",
    "FeasibilityBasis",
    "ProductRef",
    "SpecKind",
    "SpecRow",
    "StartBasis",
    "StartHandling",
    "column_spec_rows",
    "spec_kind",
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
class StartBasis:
    """What one column's default start knows when it reads the specs (scaled flows): the feed
    less side draws, the flow scale (mol/s), a mean molar latent heat (J/mol) and the vapor
    the feeds bring."""

    net_feed: float
    flow_scale: float
    latent_heat: float
    vapor_in_feeds: float


@dataclass(frozen=True)
class StartHandling:
    """What a kind of spec tells the default starts.

    One column (:mod:`solver.initial`): ``overhead(row, basis)`` the overhead rate D (scaled)
    it fixes; ``top_vapor(row, basis)`` (a, b) with the top vapor rate ``V_top = a + b D``;
    ``split_error(row, top, bottom, feed)`` how far a product split (component flows, scaled)
    is from it: a composition spec, met by the Fenske split's D; ``profile_error(row, T, top,
    bottom, feed)`` how far a CMO profile is from it, met by moving D (and the reflux).

    A network (:mod:`solver.network_start`): ``relation(start, r, row)`` writes its row ``r``
    of the CMO linear system through the start's seam (``system``, ``A``, ``b``, ``fixed``,
    ``rate``, ``differences``, ``column_of(stage)``, ``ratio_of_two(r, column)``,
    ``half_the_feed(r, column)``, ``guessed_product_rate(row)``) and returns the product rate
    it guessed, if any; ``fixes(row, column_of)`` the (column, ``"rate"`` or ``"ratio"``) a
    linear spec fixes, or None; ``guessed_rate(row, side, feed_i)`` a composition spec's
    product rate (scaled) from the feed of the components on the product's side of the spec's
    component and of the component itself; ``stream_error(row, composition, amount, feed)``
    how far a swept profile's product stream (its composition and total, scaled) is from it.
    """

    relation: Callable
    overhead: Callable | None = None
    top_vapor: Callable | None = None
    split_error: Callable | None = None
    profile_error: Callable | None = None
    fixes: Callable | None = None
    guessed_rate: Callable | None = None
    stream_error: Callable | None = None


@dataclass(frozen=True)
class FeasibilityBasis:
    """What one column's checks before solving know: all feeds and the net feed (less side
    draws) in mol/s, the side draws' total (mol/s), each feed's q and flow (mol/s) and a mean
    molar latent heat (J/mol)."""

    feed: float
    net_feed: float
    side_draws: float
    feed_q: tuple[float, ...]
    feed_flows: tuple[float, ...]
    latent_heat: float


@dataclass(frozen=True)
class SpecKind:
    """A kind of spec: its residual (see the module docstring), its words in reports, the
    quantity its value is (``ratio``, ``flow`` mol/s, ``fraction``, ``temperature`` K,
    ``duty`` W), how reports read the value reached from a solved network
    (``achieved(result, row)``, :class:`~solver.network_results.NetworkResult`; None where
    the result alone does not give it) and what it tells the default starts.

    ``role`` says what it fixes for the shortcut designs: the product ``split``, the
    ``energy`` (the reflux), or ``other``. ``phrase`` shows a column's spec in a run's tables
    (``{value}`` in display units, ``{component}``, ``{product}``, ``{stage}``). ``check(row,
    basis)`` (:class:`FeasibilityBasis`) returns why the spec alone cannot be met, or None
    (one column's checks before solving, :mod:`solver.feasibility`)."""

    residual: Callable
    words: str
    quantity: str
    achieved: Callable | None
    start: StartHandling
    role: str = "other"
    phrase: str = "{value}"
    check: Callable | None = None


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
    """The product's record in the result, or for a distillate (bottoms) that goes on through
    connections its stream's flow and composition."""
    p = row.product
    if p.name in result.products:
        return result.products[p.name]
    liquid = p.phase == "liquid"
    return {"flow": p.share * float((result.liquid_flow if liquid else result.vapor_flow)[p.stage]),
            "composition": (result.x if liquid else result.y)[p.stage].tolist()}


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


# ---------------------------------------------------------------- what each kind tells the starts
def _product_flow_overhead(row: SpecRow, basis: StartBasis) -> float:
    """A distillate rate (the top's vapor slot) is D; a bottoms rate leaves D = F - B."""
    rate = row.value / basis.flow_scale
    return rate if row.product.phase == "vapor" else basis.net_feed - rate


def _reflux_top_vapor(row: SpecRow, basis: StartBasis) -> tuple[float, float]:
    return 0.0, row.value + 1.0


def _boilup_top_vapor(row: SpecRow, basis: StartBasis) -> tuple[float, float]:
    return row.value * basis.net_feed + basis.vapor_in_feeds, -row.value


def _duty_top_vapor(row: SpecRow, basis: StartBasis) -> tuple[float, float]:
    """By CMO a condenser's duty condenses the top vapor, a reboiler's boils the vapor that,
    with the feeds' vapor, reaches the top."""
    if row.extra.endswith("condenser"):
        return abs(row.value) / (basis.latent_heat * basis.flow_scale), 0.0
    return row.value / (basis.latent_heat * basis.flow_scale) + basis.vapor_in_feeds, 0.0


def _product_of_split(row: SpecRow, top: np.ndarray, bottom: np.ndarray) -> np.ndarray:
    return top if row.product.phase == "vapor" else bottom


def _mole_fraction_split_error(row: SpecRow, top, bottom, feed) -> float:
    product = _product_of_split(row, top, bottom)
    return float(product[row.component] / max(product.sum(), 1e-300) - row.value)


def _recovery_split_error(row: SpecRow, top, bottom, feed) -> float:
    product = _product_of_split(row, top, bottom)
    return float(product[row.component] / max(feed[row.component], 1e-300) - row.value)


def _mole_fraction_guess(row: SpecRow, side: float, feed_i: float) -> float:
    """All of its side and most of the component for a purity; for a small fraction, its side
    diluted by that fraction of the component."""
    return side + 0.97 * feed_i if row.value >= 0.5 else side / (1.0 - row.value)


def _recovery_guess(row: SpecRow, side: float, feed_i: float) -> float:
    return side + row.value * feed_i


def _mole_fraction_stream_error(row: SpecRow, composition, amount: float, feed) -> float:
    return float(composition[row.component] - row.value)


def _recovery_stream_error(row: SpecRow, composition, amount: float, feed) -> float:
    return float(amount * composition[row.component] / feed[row.component] - row.value)


def _temperature_profile_error(row: SpecRow, T, top, bottom, feed) -> float:
    return float(T[row.stage] - row.value) / TEMPERATURE_SCALE


def _split_profile_error(split_error: Callable) -> Callable:
    return lambda row, T, top, bottom, feed: split_error(row, top, bottom, feed)


def _profile_spec_column(start, r: int, stage: int) -> str | None:
    """A composition or temperature spec says nothing linear about the flows: on a column whose
    product rate a spec fixes it becomes a reflux ratio of 2 (None returned), else the column
    (returned) gets a guessed product rate."""
    column = start.column_of(stage)
    if "rate" in start.fixed[column]:
        start.fixed[column].add("ratio")
        start.ratio_of_two(r, column)
        return None
    start.fixed[column].add("rate")
    return column


def _product_rate_relation(start, r: int, p: ProductRef, rate: float) -> None:
    start.A[r, (p.stage if p.phase == "liquid" else start.system.N + p.stage)] = p.share
    start.b[r] = rate


def _composition_relation(start, r: int, row: SpecRow) -> float | None:
    column = _profile_spec_column(start, r, row.product.stage)
    if column is None:
        return None
    if row.product.rate is not None:
        start.half_the_feed(r, column)
        return None
    guess = start.rate if start.rate is not None else start.guessed_product_rate(row)
    _product_rate_relation(start, r, row.product, guess)
    return guess


def _stage_temperature_relation(start, r: int, row: SpecRow) -> None:
    column = _profile_spec_column(start, r, row.stage)
    if column is not None:
        start.half_the_feed(r, column)


def _product_flow_relation(start, r: int, row: SpecRow) -> None:
    _product_rate_relation(start, r, row.product, row.value / start.system.flow_scale)


def _ratio_relation(start, r: int, row: SpecRow) -> None:
    N, g, share = start.system.N, row.stage, row.product.share
    own, other = (g, N + g) if row.kind == "reflux_ratio" else (N + g, g)
    start.A[r, own] = 1.0
    start.A[r, other] = -row.value * share


def _extra_relation(start, r: int, row: SpecRow, scale: float) -> None:
    start.A[r, 2 * start.system.N + start.system.extra_index(row.extra)] = 1.0
    start.b[r] = row.value / scale


def _duty_relation(start, r: int, row: SpecRow) -> None:
    _extra_relation(start, r, row, start.system.flow_scale * start.system.energy_scale)


def _connection_flow_relation(start, r: int, row: SpecRow) -> None:
    _extra_relation(start, r, row, start.system.flow_scale)


def _connection_fraction_relation(start, r: int, row: SpecRow) -> None:
    system, A, b, N = start.system, start.A, start.b, start.system.N
    g, liquid = row.source_stage, row.phase == "liquid"
    A[r, 2 * N + system.extra_index(row.extra)] = 1.0
    A[r, g if liquid else N + g] -= row.value
    for m in np.flatnonzero((system.transfer_source == g) & (system.transfer_liquid == liquid)):
        k = system.transfer_extra[m]
        if k >= 0:
            A[r, 2 * N + k] -= row.value
        else:
            b[r] += row.value * system.transfer_fixed[m]
    b[r] += row.value * (system.side_liquid_draws[g] if liquid else system.side_vapor_draws[g])


def _return_temperature_relation(start, r: int, row: SpecRow) -> None:
    """The duty is the stream's flow times its enthalpy change (none known yet: no duty)."""
    system, A, b, N = start.system, start.A, start.b, start.system.N
    A[r, 2 * N + system.extra_index(row.extra)] = 1.0
    difference = start.differences.get(row.extra, 0.0)
    stream = system.connections[row.extra.rsplit(".", 1)[0]]
    if stream.transfer is not None:
        k = system.transfer_extra[stream.transfer]
        if k >= 0:
            A[r, 2 * N + k] = -difference
        else:
            b[r] = difference * system.transfer_fixed[stream.transfer]
    else:
        A[r, stream.source if stream.phase == "liquid" else N + stream.source] = -difference * stream.weight


def _fixes_rate(row: SpecRow, column_of: Callable[[int], str]):
    return (column_of(row.product.stage), "rate") if row.product.rate is None else None


def _fixes_ratio(row: SpecRow, column_of: Callable[[int], str]):
    return column_of(row.stage), "ratio"


def _duty_fixes(row: SpecRow, column_of: Callable[[int], str]):
    return (row.extra.rsplit(".", 1)[0], "ratio") if row.extra.endswith((".condenser", ".reboiler")) else None


# ---------------------------------------------------------------- what each kind alone rules out
def _product_flow_check(row: SpecRow, basis: FeasibilityBasis) -> str | None:
    if row.product.rate is not None or 0.0 < row.value < basis.net_feed:
        return None
    return (f"{row.label} = {row.value * 3.6:.6g} kmol/h is impossible: a product rate must lie between 0 and "
            f"the net feed, {basis.net_feed * 3.6:.6g} kmol/h (feeds {basis.feed * 3.6:.6g} kmol/h less side draws "
            f"{basis.side_draws * 3.6:.6g} kmol/h)")


def _recovery_check(row: SpecRow, basis: FeasibilityBasis) -> str | None:
    return None if 0.0 < row.value <= 1.0 else f"{row.label} = {row.value:g}: a recovery must lie in (0, 1]"


def _duty_check(row: SpecRow, basis: FeasibilityBasis) -> str | None:
    """A reboiler duty that does not bring the subcooled feeds to their boiling point (CMO
    with a mean latent heat: ``Q_R <= (q - 1) F lambda`` summed over the feeds)."""
    if not row.extra.endswith("reboiler"):
        return None
    needed = sum(max(q - 1.0, 0.0) * flow for q, flow in zip(basis.feed_q, basis.feed_flows)) * basis.latent_heat
    if row.value > needed:
        return None
    return (f"{row.label} = {row.value / 1e3:.6g} kW is too small to boil anything: the subcooled feed alone "
            f"needs about {needed / 1e3:.6g} kW to reach its boiling point (q - 1 times its flow and a mean latent "
            f"heat of {basis.latent_heat / 1e3:.4g} kJ/mol)")


#: Every kind of spec row: its residual, its words, its quantity, its reached value, its start,
#: its role for the shortcuts, its phrase in a run's tables and its own feasibility check.
SPEC_REGISTRY: dict[str, SpecKind] = {
    "reflux_ratio": SpecKind(_ratio_residual, "reflux ratio", "ratio", _achieved_ratio,
                             StartHandling(_ratio_relation, top_vapor=_reflux_top_vapor, fixes=_fixes_ratio), role="energy"),
    "boilup_ratio": SpecKind(_ratio_residual, "boilup ratio", "ratio", _achieved_ratio,
                             StartHandling(_ratio_relation, top_vapor=_boilup_top_vapor, fixes=_fixes_ratio), role="energy"),
    "product_flow": SpecKind(_product_flow_residual, "product flow", "flow", lambda r, row: _achieved_product(r, row)["flow"],
                             StartHandling(_product_flow_relation, overhead=_product_flow_overhead, fixes=_fixes_rate),
                             role="split", check=_product_flow_check),
    "mole_fraction": SpecKind(_mole_fraction_residual, "mole fraction in a product", "fraction",
                              lambda r, row: _achieved_product(r, row)["composition"][row.component],
                              StartHandling(_composition_relation, split_error=_mole_fraction_split_error,
                                            profile_error=_split_profile_error(_mole_fraction_split_error),
                                            guessed_rate=_mole_fraction_guess, stream_error=_mole_fraction_stream_error),
                              role="split", phrase="x {component} = {value} in the {product}"),
    "recovery": SpecKind(_recovery_residual, "recovery in a product", "fraction", _achieved_recovery,
                         StartHandling(_composition_relation, split_error=_recovery_split_error,
                                       profile_error=_split_profile_error(_recovery_split_error), guessed_rate=_recovery_guess,
                                       stream_error=_recovery_stream_error),
                         role="split", phrase="{value} of the feed's {component} to the {product}", check=_recovery_check),
    "stage_temperature": SpecKind(_stage_temperature_residual, "stage temperature", "temperature",
                                  lambda r, row: float(r.temperature[row.stage]),
                                  StartHandling(_stage_temperature_relation, profile_error=_temperature_profile_error),
                                  phrase="{value} on stage {stage}"),
    "duty": SpecKind(_duty_residual, "exchanger duty", "duty", _achieved_duty,
                     StartHandling(_duty_relation, top_vapor=_duty_top_vapor, fixes=_duty_fixes), role="energy",
                     check=_duty_check),
    "connection_flow": SpecKind(_connection_flow_residual, "connection rate", "flow",
                                lambda r, row: r.connections[row.extra.rsplit(".", 1)[0]]["flow"],
                                StartHandling(_connection_flow_relation)),
    "connection_fraction": SpecKind(_connection_fraction_residual, "connection fraction", "fraction", _achieved_fraction,
                                    StartHandling(_connection_fraction_relation)),
    "return_temperature": SpecKind(_return_temperature_residual, "return temperature", "temperature", None,
                                   StartHandling(_return_temperature_relation)),
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

#: The SI unit of each quantity a spec's value is.
SI_UNITS = {"ratio": "1", "fraction": "1", "flow": "mol/s", "duty": "W", "temperature": "K"}


def spec_kind(kind: str) -> SpecKind:
    """The registry entry of a kind of a case file's specs: a column's own
    (:data:`COLUMN_SPEC_KINDS`) or a network's top-level one (:data:`NETWORK_ROW_KINDS`)."""
    entry = COLUMN_SPEC_KINDS.get(kind)
    return SPEC_REGISTRY[entry.row_kind if entry is not None else NETWORK_ROW_KINDS[kind]]


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
