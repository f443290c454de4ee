"""Underwood's minimum reflux (Chem. Eng. Prog. 44 (1948) 603) with distributing non-keys.

* The roots ``theta`` of the first equation ``sum_i alpha_i z_i / (alpha_i - theta) = 1 - q``,
  one between each pair of adjacent relative volatilities (the left side rises from -inf to
  +inf between poles), by Brent's method.
* For each root between the volatilities of adjacent *distributing* components, the second
  equation ``sum_i alpha_i d_i / (alpha_i - theta) = V_min`` (the rectifying vapor at minimum
  reflux). With m distributing components (the keys, every component between them, and
  non-keys outside them that distribute) there are m - 1 roots and m - 1 unknowns -- ``V_min``
  and the distillate flows of the m - 2 distributing non-keys -- solved together as one linear
  system.
* Which non-keys distribute is first estimated by the criterion of Shiras, Hanson & Gibson (Ind.
  Eng. Chem. 42 (1950) 871; from memory: a non-key distributes when its distillate recovery,
  interpolated linearly in alpha between the keys' recoveries, lies between 0 and 1), then
  corrected if the solution puts a non-key's distillate flow outside [0, F_i].

``R_min = V_min / D - 1`` with D the distillate at minimum reflux. Flows mol/s.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy.optimize import brentq

from ..errors import SpecError

__all__ = ["UnderwoodResult", "shiras_recoveries", "underwood_minimum_reflux", "underwood_roots"]

_ROOT_GAP = 1e-12  # relative distance kept from the poles alpha_i when bracketing a root


def _feed_function(alpha: np.ndarray, z: np.ndarray, theta):
    return np.sum(alpha * z / (alpha - theta))


def underwood_roots(
    relative_volatility, feed_composition, q: float, *, low: float | None = None, high: float | None = None
) -> np.ndarray:
    """Roots of Underwood's first equation ``sum_i alpha_i z_i / (alpha_i - theta) = 1 - q``
    lying between adjacent relative volatilities of components present in the feed (one in
    each interval: the left side rises from -inf to +inf between poles), restricted to
    ``(low, high)`` if given; in descending order."""
    alpha = np.asarray(relative_volatility, dtype=float)
    z = np.asarray(feed_composition, dtype=float)
    present = z > 0.0
    poles = np.unique(alpha[present])[::-1]
    roots = []
    target = 1.0 - q
    for upper, lower in zip(poles[:-1], poles[1:]):
        if high is not None and lower >= high:
            continue
        if low is not None and upper <= low:
            continue

        def residual(theta: float) -> float:
            return float(_feed_function(alpha[present], z[present], theta) - target)

        below, above = _bracket(residual, lower, upper)
        roots.append(brentq(residual, below, above, xtol=1e-15 * max(1.0, upper), rtol=1e-15, maxiter=500))
    return np.array(roots)


def _bracket(residual, lower: float, upper: float) -> tuple[float, float]:
    """Points strictly inside the poles ``lower`` < ``upper`` where the feed function minus its
    target is negative and positive (it rises from -inf to +inf between them): first at a
    fraction ``_ROOT_GAP`` of the interval from each pole, then closer, down to the next
    floating-point number, for a root that lies nearer a pole than that."""
    width = upper - lower
    nearest_below, nearest_above = np.nextafter(lower, upper), np.nextafter(upper, lower)
    below = max(lower + _ROOT_GAP * width, nearest_below)
    above = min(upper - _ROOT_GAP * width, nearest_above)
    while residual(below) > 0.0 and below > nearest_below:
        below = max(lower + (below - lower) / 64.0, nearest_below)
    while residual(above) < 0.0 and above < nearest_above:
        above = min(upper - (upper - above) / 64.0, nearest_above)
    return float(below), float(above)


def shiras_recoveries(
    relative_volatility, light_key: int, heavy_key: int, light_key_recovery: float, heavy_key_recovery: float
) -> np.ndarray:
    """Distillate recoveries at minimum reflux interpolated linearly in alpha between the keys'
    (Shiras, Hanson & Gibson 1950): a component whose value lies outside (0, 1) does not
    distribute."""
    alpha = np.asarray(relative_volatility, dtype=float)
    alpha_light, alpha_heavy = alpha[light_key], alpha[heavy_key]
    return (
        (alpha - alpha_heavy) / (alpha_light - alpha_heavy) * light_key_recovery
        + (alpha_light - alpha) / (alpha_light - alpha_heavy) * heavy_key_recovery
    )


@dataclass(frozen=True)
class UnderwoodResult:
    """Underwood's minimum reflux: ``minimum_reflux`` (L/D), ``minimum_vapor_flow`` (rectifying
    vapor at minimum reflux, mol/s), ``distillate_flows`` (c,) at minimum reflux (keys as
    specified, distributing non-keys solved, others all in one product), ``distillate_flow``,
    the roots used (descending) and the indices of the distributing components."""

    minimum_reflux: float
    minimum_vapor_flow: float
    distillate_flows: np.ndarray
    distillate_flow: float
    roots: tuple[float, ...]
    distributing: tuple[int, ...]


def _second_equation(
    alpha: np.ndarray, present: np.ndarray, roots: np.ndarray, unknown: list[int], distillate_flows: np.ndarray
) -> tuple[float, np.ndarray]:
    """Underwood's second equation at each root as one linear system in ``V_min`` and the
    distillate flows of the ``unknown`` components, the others' flows known:
    ``sum_unknown alpha_i/(alpha_i - theta) d_i - V = -sum_known alpha_i d_i/(alpha_i - theta)``.
    Returns ``V_min`` and the solved distillate flows (into ``distillate_flows``)."""
    matrix = np.empty((roots.size, len(unknown) + 1))
    for j, theta in enumerate(roots):
        matrix[j, :-1] = alpha[unknown] / (alpha[unknown] - theta)
        matrix[j, -1] = -1.0
    known = distillate_flows.copy()
    known[unknown] = 0.0
    right_side = -np.array([np.sum(alpha[present] * known[present] / (alpha[present] - theta)) for theta in roots])
    solution = np.linalg.solve(matrix, right_side)
    distillate_flows[unknown] = solution[:-1]
    return float(solution[-1]), distillate_flows


def _outermost_offender(unknown: list[int], distillate_flows: np.ndarray, feed_flows: np.ndarray,
                        alpha: np.ndarray) -> tuple[int, bool] | None:
    """The non-key whose solved distillate flow lies outside [0, F_i] and whose volatility is
    furthest out (the lightest above its feed, else the heaviest below zero), and whether it
    goes all to the distillate; None when every flow is inside."""
    over = [i for i in unknown if distillate_flows[i] > feed_flows[i]]
    under = [i for i in unknown if distillate_flows[i] < 0.0]
    if over:
        return max(over, key=lambda i: alpha[i]), True
    if under:
        return min(under, key=lambda i: alpha[i]), False
    return None


def underwood_minimum_reflux(
    relative_volatility,
    feed_flows,
    q: float,
    light_key: int,
    heavy_key: int,
    light_key_distillate: float,
    heavy_key_distillate: float,
) -> UnderwoodResult:
    """Underwood (1948) minimum reflux with every root between the relative volatilities of
    adjacent distributing components and the distillate flows of distributing non-keys solved
    with ``V_min`` (see the module docstring). ``feed_flows`` mol/s; the keys' distillate flows
    are the specified ones."""
    alpha = np.asarray(relative_volatility, dtype=float)
    feed_flows = np.asarray(feed_flows, dtype=float)
    F = float(feed_flows.sum())
    z = feed_flows / F
    if not alpha[light_key] > alpha[heavy_key]:
        raise SpecError("the light key must be more volatile than the heavy key")
    present = feed_flows > 0.0
    recovery = shiras_recoveries(
        alpha, light_key, heavy_key, light_key_distillate / feed_flows[light_key], heavy_key_distillate / feed_flows[heavy_key]
    )
    is_key = np.isin(np.arange(alpha.size), (light_key, heavy_key))
    distributing = present & (((recovery > 0.0) & (recovery < 1.0)) | is_key)
    fixed = np.where(alpha > alpha[light_key], feed_flows, 0.0)  # non-distributing: lighter all up, heavier all down
    fixed[light_key], fixed[heavy_key] = light_key_distillate, heavy_key_distillate
    all_roots = underwood_roots(alpha, z, q)
    for _ in range(alpha.size + 1):
        members = np.nonzero(distributing)[0]
        members = members[np.argsort(-alpha[members])]
        unknown = [i for i in members if i not in (light_key, heavy_key)]
        highest, lowest = alpha[members[0]], alpha[members[-1]]
        roots = all_roots[(all_roots < highest) & (all_roots > lowest)]
        if roots.size != members.size - 1:
            raise SpecError(
                f"Underwood: expected {members.size - 1} roots between the distributing volatilities, found {roots.size}"
            )
        d = np.where(distributing, 0.0, fixed)
        d[light_key], d[heavy_key] = light_key_distillate, heavy_key_distillate
        V, d = _second_equation(alpha, present, roots, unknown, d)
        offender = _outermost_offender(unknown, d, feed_flows, alpha)
        if offender is None:
            break
        # the outermost offender leaves the distributing set, all in one product
        worst, all_up = offender
        fixed[worst] = feed_flows[worst] if all_up else 0.0
        distributing[worst] = False
    D = float(d.sum())
    return UnderwoodResult(V / D - 1.0, V, d, D, tuple(float(r) for r in roots), tuple(int(i) for i in members))
