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
"""

from __future__ import annotations

from typing import Sequence

import numpy as np

from .case import Spec
from .errors import SpecError

__all__ = ["check_binary_limits", "check_specifications", "check_total_reflux_bound"]


def check_specifications(
    specs: Sequence[Spec],
    component_names: Sequence[str],
    feed_flows: np.ndarray,
    side_draw_total: float,
    feed_q: Sequence[float],
    feed_totals: Sequence[float],
    latent_heat: float,
) -> None:
    """Raise :class:`SpecError` for a spec set that the overall balances already rule out.
    ``feed_flows (c,)`` mol/s of each component in all feeds together; ``feed_q`` and
    ``feed_totals`` (mol/s) per feed; ``latent_heat`` a mean molar latent heat (J/mol)."""
    F = float(np.sum(feed_flows))
    F_net = F - side_draw_total
    rates = {s.kind: s for s in specs if s.kind in ("distillate_rate", "bottoms_rate")}
    _check_product_rates(rates, F, F_net, side_draw_total)
    _check_fractions_and_recoveries(specs, len(component_names))
    _check_purity_bounds(specs, list(component_names), rates, feed_flows, F_net)
    _check_reboiler_duty(specs, feed_q, feed_totals, latent_heat)


def _label(spec: Spec) -> str:
    return spec.key or spec.kind


def _check_product_rates(rates: dict[str, Spec], F: float, F_net: float, side_draw_total: float) -> None:
    """Both product rates given (D + B = F), or a rate outside (0, net feed)."""
    if len(rates) == 2:
        D, B = rates["distillate_rate"], rates["bottoms_rate"]
        raise SpecError(
            f"{_label(D)} and {_label(B)} fix one degree of freedom twice: D + B must equal the net feed "
            f"({F_net * 3.6:.6g} kmol/h); give one of them and a second, independent spec"
        )
    for spec in rates.values():
        if not 0.0 < spec.value < F_net:
            raise SpecError(
                f"{_label(spec)} = {spec.value * 3.6:.6g} kmol/h is impossible: a product rate must lie between 0 and "
                f"the net feed, {F_net * 3.6:.6g} kmol/h (feeds {F * 3.6:.6g} kmol/h less side draws "
                f"{side_draw_total * 3.6:.6g} kmol/h)"
            )


def _check_fractions_and_recoveries(specs: Sequence[Spec], component_count: int) -> None:
    """A mole fraction given twice, both mole fractions of a binary product, a recovery outside
    (0, 1], or one component's recovery to both products."""
    for product in ("distillate", "bottoms"):
        fractions = [s for s in specs if s.kind == "mole_fraction" and s.product == product]
        if len({s.component for s in fractions}) < len(fractions):
            raise SpecError(f"{', '.join(_label(s) for s in fractions)}: the same mole fraction is given twice")
        if component_count == 2 and len(fractions) == 2:
            raise SpecError(
                f"{_label(fractions[0])} and {_label(fractions[1])} fix the same thing twice: the two mole fractions of "
                f"a binary {product} sum to one"
            )
    recoveries: dict[str, list[Spec]] = {}
    for spec in specs:
        if spec.kind == "recovery":
            if not 0.0 < spec.value <= 1.0:
                raise SpecError(f"{_label(spec)} = {spec.value:g}: a recovery must lie in (0, 1]")
            recoveries.setdefault(spec.component, []).append(spec)
    for component, given in recoveries.items():
        if len(given) > 1:
            raise SpecError(
                f"{', '.join(_label(s) for s in given)}: the recoveries of {component} to the two products sum to one, "
                "so they fix the same thing twice"
            )


def _check_purity_bounds(
    specs: Sequence[Spec], names: list[str], rates: dict[str, Spec], feed_flows: np.ndarray, F_net: float
) -> None:
    """A product mole fraction above what the component balance allows with a given product
    rate: ``x_D,i <= F_i / D`` (and the same with the other product's rate given)."""
    for spec in specs:
        if spec.kind != "mole_fraction":
            continue
        i = names.index(spec.component)
        rate = rates.get("distillate_rate" if spec.product == "distillate" else "bottoms_rate")
        if rate is not None:
            bound = float(feed_flows[i]) / rate.value
            if spec.value > bound:
                raise SpecError(
                    f"{_label(spec)} = {spec.value:g} cannot be met with {_label(rate)} = {rate.value * 3.6:.6g} kmol/h: "
                    f"even all of the {component_label(spec)} fed ({feed_flows[i] * 3.6:.6g} kmol/h) would give at most "
                    f"{bound:.6g}"
                )
        other = rates.get("bottoms_rate" if spec.product == "distillate" else "distillate_rate")
        if other is not None:
            product_rate = F_net - other.value
            bound = float(feed_flows[i]) / product_rate
            if spec.value > bound:
                raise SpecError(
                    f"{_label(spec)} = {spec.value:g} cannot be met with {_label(other)} = {other.value * 3.6:.6g} kmol/h "
                    f"(so {spec.product} {product_rate * 3.6:.6g} kmol/h): at most {bound:.6g}"
                )


def _check_reboiler_duty(specs: Sequence[Spec], feed_q: Sequence[float], feed_totals: Sequence[float], latent_heat: float) -> None:
    """A reboiler duty that does not bring the subcooled feeds to their boiling point."""
    spec = next((s for s in specs if s.kind == "reboiler_duty"), None)
    if spec is None:
        return
    needed = sum(max(q - 1.0, 0.0) * flow for q, flow in zip(feed_q, feed_totals)) * latent_heat
    if spec.value <= needed:
        raise SpecError(
            f"{_label(spec)} = {spec.value / 1e3:.6g} kW is too small to boil anything: the subcooled feed alone "
            f"needs about {needed / 1e3:.6g} kW to reach its boiling point (q - 1 times its flow and a mean latent "
            f"heat of {latent_heat / 1e3:.4g} kJ/mol)"
        )


def component_label(spec: Spec) -> str:
    return spec.component or "component"


def check_binary_limits(
    specs: Sequence[Spec],
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

    def light_fraction(spec: Spec) -> float:
        return spec.value if names.index(spec.component) == light else 1.0 - spec.value

    top = next((s for s in specs if s.kind == "mole_fraction" and s.product == "distillate"), None)
    bottom = next((s for s in specs if s.kind == "mole_fraction" and s.product == "bottoms"), None)
    x_top = light_fraction(top) if top else None
    x_bottom = light_fraction(bottom) if bottom else None
    low, high = curve.feasible_region(x_feed)
    for spec, x, beyond in ((top, x_top, lambda x: x >= high and high < 1.0), (bottom, x_bottom, lambda x: x <= low and low > 0.0)):
        if spec is not None and beyond(x):
            azeotrope = curve.azeotrope_above(x_feed) if spec is top else curve.azeotrope_below(x_feed)
            raise SpecError(
                f"{spec.key or spec.kind} = {spec.value:g} is beyond the {azeotrope.boiling}-boiling azeotrope at "
                f"x = {azeotrope.x:.4f} {names[light]}, {azeotrope.temperature - 273.15:.2f} degC, "
                f"{azeotrope.pressure / 1e3:.4g} kPa: no number of stages reaches it"
            )
    reflux = next((s for s in specs if s.kind == "reflux_ratio"), None)
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
                    f"{reflux.key or 'reflux_ratio'} = {reflux.value:g} is below the minimum reflux ratio {ratio:.4g} for "
                    f"{top.key} = {top.value:g} ({minimum.pinch} pinch at x = {minimum.x:.4f} {names[light]}, "
                    f"constant-molar-overflow estimate): no number of stages meets it"
                )
    if equilibrium_stages_available is not None and x_top is not None and x_bottom is not None and x_bottom < x_feed < x_top:
        try:
            needed = total_reflux_stages(curve, x_top, x_bottom, condenser)
        except Exception:
            return
        if needed > equilibrium_stages_available + 1e-9:
            raise SpecError(
                f"{top.key} = {top.value:g} with {bottom.key} = {bottom.value:g} needs at least {needed:.2f} stages even at "
                f"total reflux; the column has {equilibrium_stages_available:g}"
            )



def check_total_reflux_bound(
    specs: Sequence[Spec],
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
        if spec.kind != "mole_fraction" or spec.product not in ("distillate", "bottoms") or not 0.0 < spec.value < 1.0:
            continue
        s = names.index(spec.component)
        worst = None
        for other in range(len(names)):
            if other == s or z[other] <= 0.0 or z[s] <= 0.0:
                continue
            # a: the component the distillate is richer in than the bottoms, b: the other one
            a, b = (s, other) if spec.product == "distillate" else (other, s)
            purity_ratio = spec.value / (1.0 - spec.value) if spec.product == "distillate" else (1.0 - spec.value) / spec.value
            distillate_ratio, bottoms_ratio = (
                (purity_ratio, z[a] / z[b]) if spec.product == "distillate" else (z[a] / z[b], purity_ratio)
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
            section = (section_stages or {}).get(spec.product)
            side = "" if section is None else f" ({section} of them on the {spec.product} side of the feed)"
            raise SpecError(
                f"{_label(spec)} = {spec.value:.12g} needs {stages} equilibrium stages even at total reflux; the column "
                f"has {equilibrium_stages}{side}: add stages or relax the {spec.product} purity (Fenske with the relative "
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
