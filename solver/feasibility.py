"""Before solving: can the specifications be met at all? Each refusal is a SpecError that
names the spec and the bound it breaks, so that the engineer need not read a failed Newton
log to learn that the column was asked for the impossible.

Checks (bounds from the overall balances alone):

* a product rate at or above the net feed (feeds less side draws), or at or below zero;
* specs that fix the same thing twice: distillate and bottoms rates together (D + B = F),
  every mole fraction of one product (they sum to one), a component's recovery to both
  products (they sum to one);
* a product mole fraction that the overall component balance cannot deliver with a given
  product rate (``x_D,i <= F_i / D``), or a recovery above one;
* a reboiler duty too small to bring a subcooled feed to its boiling point, let alone boil
  anything: ``Q_R <= (q - 1) F lambda`` summed over the feeds (constant-molar-overflow
  estimate with a mean latent heat).

What one spec alone rules out (a product rate, a recovery, a reboiler duty) is the ``check`` of
its entry in :data:`solver.spec_kinds.SPEC_REGISTRY`; the checks across specs are here. The
specs come resolved into rows (:func:`solver.mesh.column_rows`).
"""

from __future__ import annotations

from typing import Sequence

import numpy as np

from .errors import SpecError
from .spec_kinds import SPEC_REGISTRY, FeasibilityBasis, SpecRow

__all__ = ["check_binary_limits", "check_specifications", "check_total_reflux_bound"]


def check_specifications(
    specs: Sequence[SpecRow],
    component_names: Sequence[str],
    feed_flows: np.ndarray,
    side_draw_total: float,
    feed_q: Sequence[float],
    feed_totals: Sequence[float],
    latent_heat: float,
) -> None:
    """Raise :class:`SpecError` for a spec set that the overall balances already rule out.
    ``specs`` the column's rows (:func:`solver.mesh.column_rows`); ``feed_flows (c,)`` mol/s
    of each component in all feeds together; ``feed_q`` and ``feed_totals`` (mol/s) per feed;
    ``latent_heat`` a mean molar latent heat (J/mol). What a spec alone rules out is its
    registry entry's ``check``; the checks across specs are here."""
    F = float(np.sum(feed_flows))
    F_net = F - side_draw_total
    rates = {row.product.name: row for row in specs if _is_product_rate(row)}
    if len(rates) == 2:
        D, B = rates["distillate"], rates["bottoms"]
        raise SpecError(
            f"{D.label} and {B.label} fix one degree of freedom twice: D + B must equal the net feed "
            f"({F_net * 3.6:.6g} kmol/h); give one of them and a second, independent spec"
        )
    basis = FeasibilityBasis(F, F_net, side_draw_total, tuple(feed_q), tuple(feed_totals), latent_heat)
    for row in specs:
        check = SPEC_REGISTRY[row.kind].check
        message = check(row, basis) if check is not None else None
        if message is not None:
            raise SpecError(message)
    _check_fractions_and_recoveries(specs, list(component_names))
    _check_purity_bounds(specs, list(component_names), rates, feed_flows, F_net)


def _is_product_rate(row: SpecRow) -> bool:
    """A spec that sets a product's total flow (a distillate or bottoms rate)."""
    return row.product is not None and SPEC_REGISTRY[row.kind].quantity == "flow"


def _check_fractions_and_recoveries(specs: Sequence[SpecRow], names: list[str]) -> None:
    """A mole fraction given twice, both mole fractions of a binary product, or one
    component's recovery to both products."""
    for product in ("distillate", "bottoms"):
        fractions = [row for row in specs if row.kind == "mole_fraction" and row.product.name == product]
        if len({row.component for row in fractions}) < len(fractions):
            raise SpecError(f"{', '.join(row.label for row in fractions)}: the same mole fraction is given twice")
        if len(names) == 2 and len(fractions) == 2:
            raise SpecError(
                f"{fractions[0].label} and {fractions[1].label} fix the same thing twice: the two mole fractions of "
                f"a binary {product} sum to one"
            )
    recoveries: dict[int, list[SpecRow]] = {}
    for row in specs:
        if row.kind == "recovery":
            recoveries.setdefault(row.component, []).append(row)
    for component, given in recoveries.items():
        if len(given) > 1:
            raise SpecError(
                f"{', '.join(row.label for row in given)}: the recoveries of {names[component]} to the two products sum "
                "to one, so they fix the same thing twice"
            )


def _check_purity_bounds(
    specs: Sequence[SpecRow], names: list[str], rates: dict[str, SpecRow], feed_flows: np.ndarray, F_net: float
) -> None:
    """A product mole fraction above what the component balance allows with a given product
    rate: ``x_D,i <= F_i / D`` (and the same with the other product's rate given)."""
    for spec in specs:
        if spec.kind != "mole_fraction":
            continue
        i, product = spec.component, spec.product.name
        rate = rates.get(product)
        if rate is not None:
            bound = float(feed_flows[i]) / rate.value
            if spec.value > bound:
                raise SpecError(
                    f"{spec.label} = {spec.value:g} cannot be met with {rate.label} = {rate.value * 3.6:.6g} kmol/h: "
                    f"even all of the {names[i]} fed ({feed_flows[i] * 3.6:.6g} kmol/h) would give at most "
                    f"{bound:.6g}"
                )
        other = rates.get("bottoms" if product == "distillate" else "distillate")
        if other is not None:
            product_rate = F_net - other.value
            bound = float(feed_flows[i]) / product_rate
            if spec.value > bound:
                raise SpecError(
                    f"{spec.label} = {spec.value:g} cannot be met with {other.label} = {other.value * 3.6:.6g} kmol/h "
                    f"(so {product} {product_rate * 3.6:.6g} kmol/h): at most {bound:.6g}"
                )


def check_binary_limits(
    specs: Sequence[SpecRow],
    component_names: Sequence[str],
    thermo,
    pressure: float,
    feed_composition: np.ndarray,
    q: float,
    equilibrium_stages_available: float | None,
    condenser: str,
) -> None:
    """For a binary with one feed: purities beyond an azeotrope, a reflux ratio below the
    minimum reflux (feed or tangent pinch, McCabe-Thiele under CMO) and purities beyond what
    the column's stages give even at total reflux. ``equilibrium_stages_available`` is the
    column's stage count when every stage is an equilibrium stage (None skips that check)."""
    from .shortcut.mccabe_thiele import EquilibriumCurve, minimum_reflux, total_reflux_stages

    names = list(component_names)
    z = np.asarray(feed_composition, dtype=float)
    z = z / z.sum()
    try:
        from .thermo.flash import bubble_temperature

        T, _ = bubble_temperature(thermo, np.array([pressure]), z[None, :])
        K = thermo.k_values(T, np.array([pressure]), z[None, :], derivatives=False).K[0]
        light = 0 if K[0] >= K[1] else 1
        curve = EquilibriumCurve.from_thermo(thermo, pressure, light)
    except Exception:  # the shortcut's curve is a guard here, never a reason to refuse a case
        return
    x_feed = float(z[light])

    def light_fraction(spec: SpecRow) -> float:
        return spec.value if spec.component == light else 1.0 - spec.value

    fractions = [row for row in specs if row.kind == "mole_fraction"]
    top = next((row for row in fractions if row.product.name == "distillate"), None)
    bottom = next((row for row in fractions if row.product.name == "bottoms"), None)
    x_top = light_fraction(top) if top else None
    x_bottom = light_fraction(bottom) if bottom else None
    low, high = curve.feasible_region(x_feed)
    for spec, x, beyond in ((top, x_top, lambda x: x >= high and high < 1.0), (bottom, x_bottom, lambda x: x <= low and low > 0.0)):
        if spec is not None and beyond(x):
            azeotrope = curve.azeotrope_above(x_feed) if spec is top else curve.azeotrope_below(x_feed)
            raise SpecError(
                f"{spec.label} = {spec.value:g} is beyond the {azeotrope.boiling}-boiling azeotrope at "
                f"x = {azeotrope.x:.4f} {names[light]}, {azeotrope.temperature - 273.15:.2f} degC, "
                f"{azeotrope.pressure / 1e3:.4g} kPa: no number of stages reaches it"
            )
    reflux = next((row for row in specs if row.kind == "reflux_ratio"), None)
    if reflux is not None and x_top is not None and x_feed < x_top < 1.0 and -0.5 < q < 1.5:
        bottoms_guess = x_bottom if x_bottom is not None else min(0.01 * x_feed, 1e-3)
        try:
            minimum = minimum_reflux(curve, x_top, bottoms_guess, x_feed, q)
        except Exception:
            minimum = None
        if minimum is not None:
            ratio = minimum.ratio if (minimum.section != "stripping" or x_bottom is not None) else minimum.feed_pinch_ratio
            if reflux.value < ratio * (1.0 - 1e-3):
                raise SpecError(
                    f"{reflux.label} = {reflux.value:g} is below the minimum reflux ratio {ratio:.4g} for "
                    f"{top.label} = {top.value:g} ({minimum.pinch} pinch at x = {minimum.x:.4f} {names[light]}, "
                    f"constant-molar-overflow estimate): no number of stages meets it"
                )
    if equilibrium_stages_available is not None and x_top is not None and x_bottom is not None and x_bottom < x_feed < x_top:
        try:
            needed = total_reflux_stages(curve, x_top, x_bottom, condenser)
        except Exception:
            return
        if needed > equilibrium_stages_available + 1e-9:
            raise SpecError(
                f"{top.label} = {top.value:g} with {bottom.label} = {bottom.value:g} needs at least {needed:.2f} stages even at "
                f"total reflux; the column has {equilibrium_stages_available:g}"
            )



def check_total_reflux_bound(
    specs: Sequence[SpecRow],
    component_names: Sequence[str],
    thermo,
    pressures: Sequence[float],
    feed_composition: np.ndarray,
    equilibrium_stages: int,
    section_stages: dict[str, int] | None = None,
) -> None:
    """Refuse a product mole fraction that no column of ``equilibrium_stages`` equilibrium
    stages reaches, even at total reflux: Fenske's bound (Fenske 1932, Ind. Eng. Chem. 24, 482)
    with the case's own K-values, made certain.

    For a column that is one chain of equilibrium stages with one feed and no side draws, the
    component balances of the sections above and below the feed make a stage's liquid ratio
    ``x_a / x_b`` at most ``alpha`` times the one of the stage below, where ``alpha >= 1``
    bounds ``K_a / K_b`` everywhere in the column: the ratio in the distillate is at most
    ``alpha**N`` times the one in the bottoms. A purity ``x_s`` of a product bounds its ratio of
    each other component to ``s`` by ``(1 - x_s) / x_s``; the overall balance bounds the other
    product's ratio by the feed's (the limit of every product split). ``alpha`` is the largest
    relative volatility of the pair over the liquids between the two components (and the feed)
    at their bubble points at the top and bottom pressures and at the column's extreme
    temperatures: the most favourable volatility. If a property evaluation fails the check is
    skipped: it refuses only what is certain and leaves the rest to the engine.
    ``section_stages`` (equilibrium stages between the feed and each product, by product) only
    adds to the message."""
    names = list(component_names)
    z = np.asarray(feed_composition, dtype=float)
    z = z / z.sum()
    for spec in specs:
        if spec.kind != "mole_fraction" or spec.product.name not in ("distillate", "bottoms") or not 0.0 < spec.value < 1.0:
            continue
        s, product = spec.component, spec.product.name
        worst = None
        for other in range(len(names)):
            if other == s or z[other] <= 0.0 or z[s] <= 0.0:
                continue
            # a: the component the distillate is richer in than the bottoms, b: the other one
            a, b = (s, other) if product == "distillate" else (other, s)
            purity_ratio = spec.value / (1.0 - spec.value) if product == "distillate" else (1.0 - spec.value) / spec.value
            distillate_ratio, bottoms_ratio = (
                (purity_ratio, z[a] / z[b]) if product == "distillate" else (z[a] / z[b], purity_ratio)
            )
            if distillate_ratio <= bottoms_ratio:
                continue  # the feed is already that pure in this pair
            volatility = _largest_volatility(thermo, pressures, z, a, b)
            if volatility is None:
                return
            alpha, low, high = volatility
            needed = np.inf if alpha <= 1.0 else float(np.log(distillate_ratio / bottoms_ratio) / np.log(alpha))
            if worst is None or needed > worst[0]:
                worst = (needed, alpha, low, high, a, b)
        if worst is not None and worst[0] > equilibrium_stages + 1e-9:
            needed, alpha, low, high, a, b = worst
            stages = "no number of" if not np.isfinite(needed) else f"at least {needed:.1f}"
            section = (section_stages or {}).get(product)
            side = "" if section is None else f" ({section} of them on the {product} side of the feed)"
            raise SpecError(
                f"{spec.label} = {spec.value:.12g} needs {stages} equilibrium stages even at total reflux; the column "
                f"has {equilibrium_stages}{side}: add stages or relax the {product} purity (Fenske with the relative "
                f"volatility {names[a]}/{names[b]} at its largest in the column, {alpha:.4g}, between "
                f"{low - 273.15:.1f} and {high - 273.15:.1f} degC, from a feed with {names[a]}/{names[b]} = "
                f"{z[a] / z[b]:.4g})"
            )


def _largest_volatility(thermo, pressures: Sequence[float], z: np.ndarray, a: int, b: int) -> tuple[float, float, float] | None:
    """The largest ``K_a / K_b`` (at least 1) over the liquids between pure ``a`` and pure
    ``b`` and the feed, at their bubble points at the lowest and highest pressure and, where K
    does not depend on the vapor, also at the lowest and highest of those temperatures; with
    that temperature range. None if a property evaluation fails."""
    from .thermo.flash import bubble_temperature

    c = z.size
    shares = np.concatenate([[1e-6], np.linspace(0.05, 0.95, 19), [1.0 - 1e-6]])
    liquids = np.full((shares.size, c), 1e-9)
    liquids[:, a] = shares
    liquids[:, b] = 1.0 - shares
    liquids = np.vstack([liquids, z])
    liquids = liquids / liquids.sum(axis=1, keepdims=True)
    P = np.array([min(pressures), max(pressures)], dtype=float)
    x = np.repeat(liquids, 2, axis=0)
    P_rows = np.tile(P, liquids.shape[0])
    try:
        with np.errstate(all="ignore"):
            T, _ = bubble_temperature(thermo, P_rows, x)
            rows_T, rows_P, rows_x = [T], [P_rows], [x]
            if not thermo.vapor_dependent:
                for extreme in (float(np.min(T)), float(np.max(T))):
                    rows_T.append(np.full(T.size, extreme))
                    rows_P.append(P_rows)
                    rows_x.append(x)
            K = thermo.k_values(np.concatenate(rows_T), np.concatenate(rows_P), np.concatenate(rows_x), derivatives=False).K
            ratio = K[:, a] / K[:, b]
    except Exception:  # a guard, never a reason to refuse a case
        return None
    if not (np.all(np.isfinite(ratio)) and np.all(np.isfinite(T))):
        return None
    return max(float(np.max(ratio)), 1.0), float(np.min(T)), float(np.max(T))
