"""Minimum reflux of a binary under constant molar overflow, from its pinches (McCabe & Thiele,
Ind. Eng. Chem. 17 (1925) 605).

* the **feed pinch**, where the q-line ``q x + (1 - q) y = x_F`` meets the equilibrium curve;
* a **tangent pinch** of a non-ideal curve away from the feed: the rectifying line from
  ``(x_D, x_D)`` touching the curve between the feed pinch and ``x_D`` (ethanol-water near its
  azeotrope is the classic case), or the stripping line from ``(x_B, x_B)`` touching it between
  ``x_B`` and the feed pinch.

The minimum reflux is the largest of the three requirements (McCabe, Smith & Harriott, *Unit
Operations of Chemical Engineering*, 7th ed., 2005, ch. 21, on minimum reflux and tangent
pinches). The tangents are searched on a grid of compositions at once and refined by Brent's
bounded scalar search (Brent, *Algorithms for Minimization without Derivatives*, 1973).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import numpy as np
from scipy.optimize import brentq, minimize_scalar

from ..errors import SpecError
from .equilibrium_curve import EquilibriumCurve

__all__ = [
    "PINCH_GRID",
    "TANGENT_MARGIN",
    "MinimumReflux",
    "check_reflux_above_minimum",
    "feed_pinch",
    "minimum_reflux",
    "refine_extremum",
    "tangent_extremum",
]

#: Points of the vectorized tangent-pinch searches.
PINCH_GRID = 4001
#: Relative margin by which a tangent requirement must exceed the feed pinch to be reported.
TANGENT_MARGIN = 1e-7


@dataclass(frozen=True)
class MinimumReflux:
    """The minimum reflux ratio and where the column pinches.

    ``pinch`` is "feed" (the q-line meets the equilibrium curve) or "tangent" (an operating
    line touches the curve away from the feed); ``section`` is "feed", "rectifying" or
    "stripping"; ``x, y`` is the pinch point on the curve. ``feed_pinch_ratio`` is what the feed
    pinch alone asks for, so a tangent pinch shows by how much it raises the minimum."""

    ratio: float
    pinch: str
    section: str
    x: float
    y: float
    feed_pinch_ratio: float
    feed_pinch_x: float
    feed_pinch_y: float


def feed_pinch(
    curve: EquilibriumCurve, x_feed: float, q: float, region: tuple[float, float] | None = None
) -> tuple[float, float]:
    """Where the q-line ``q x + (1 - q) y = x_F`` meets the equilibrium curve, (x, y)."""
    low, high = region if region is not None else curve.feasible_region(x_feed)
    if abs(q - 1.0) < 1e-12:
        return float(x_feed), float(curve.y_of_x(x_feed))

    def gap(x: float) -> float:
        return float(q * x + (1.0 - q) * curve.y_of_x(x) - x_feed)

    if q > 1.0:
        start, end = x_feed, high
    else:
        start, end = low, x_feed
    if gap(start) * gap(end) > 0.0:
        # no crossing inside the region (a q far from 0..1 with a feed near an end)
        x = start if abs(gap(start)) < abs(gap(end)) else end
    else:
        x = brentq(gap, start, end, xtol=1e-14)
    return float(x), float(curve.y_of_x(x))


def refine_extremum(function, grid: np.ndarray, k: int, *, maximize: bool) -> tuple[float, float]:
    """Refine a grid extremum at index k by a bounded scalar search (Brent) between its
    neighbours."""
    left = float(grid[max(k - 1, 0)])
    right = float(grid[min(k + 1, grid.size - 1)])
    sign = -1.0 if maximize else 1.0
    found = minimize_scalar(lambda v: sign * float(function(v)), bounds=(left, right), method="bounded", options={"xatol": 1e-13})
    x_best, value = float(found.x), float(function(found.x))
    grid_value = float(function(grid[k]))
    if (maximize and grid_value > value) or (not maximize and grid_value < value):
        return float(grid[k]), grid_value
    return x_best, value


def tangent_extremum(
    function: Callable[[np.ndarray], np.ndarray], grid: np.ndarray, *, maximize: bool, feed_end: int
) -> tuple[float, float] | None:
    """The extremum of a section's requirement ``function`` over ``grid`` (x, value), refined
    by :func:`refine_extremum`; None when it lies at the grid's feed-pinch end (index
    ``feed_end``, 0 or -1): then the section has no tangent pinch."""
    values = function(grid)
    k = int(np.argmax(values)) if maximize else int(np.argmin(values))
    if k == feed_end % grid.size:
        return None
    return refine_extremum(function, grid, k, maximize=maximize)


def _rectifying_tangent(
    curve: EquilibriumCurve, x_distillate: float, x_bottoms: float, x_pinch: float
) -> tuple[float, float] | None:
    """The rectifying line from ``(x_D, x_D)`` stays below the curve for ``x_p <= x < x_D``:
    ``R >= max (x_D - y) / (y - x)`` there. (x, R) of the maximum, None at the feed pinch."""

    def requirement(x):
        y = curve.y_of_x(x)
        return (x_distillate - y) / (y - x)

    low = min(max(x_pinch, x_bottoms), x_distillate)
    if not low < x_distillate:
        return None
    grid = np.linspace(low, x_distillate, PINCH_GRID)[:-1]
    return tangent_extremum(requirement, grid, maximize=True, feed_end=0)


def _stripping_tangent(
    curve: EquilibriumCurve, x_distillate: float, x_bottoms: float, x_feed: float, q: float, x_pinch: float
) -> tuple[float, float] | None:
    """The stripping line from ``(x_B, x_B)`` stays below the curve for ``x_B < x <= x_p``:
    ``L'/V' <= min (y - x_B) / (x - x_B)``, turned into a reflux ratio through ``L' = R D + q F``,
    ``V' = (R + 1) D - (1 - q) F``. (x, R) of the minimum, None at the feed pinch."""

    def slope_to(x):
        return (curve.y_of_x(x) - x_bottoms) / (x - x_bottoms)

    high = max(min(x_pinch, x_distillate), x_bottoms)
    if not high > x_bottoms:
        return None
    grid = np.linspace(x_bottoms, high, PINCH_GRID)[1:]
    tangent = tangent_extremum(slope_to, grid, maximize=False, feed_end=-1)
    if tangent is None or not tangent[1] > 1.0:
        return None
    x_tangent, slope = tangent
    feed_per_distillate = (x_distillate - x_bottoms) / (x_feed - x_bottoms)
    ratio = (slope - slope * (1.0 - q) * feed_per_distillate - q * feed_per_distillate) / (1.0 - slope)
    return x_tangent, ratio


def minimum_reflux(curve: EquilibriumCurve, x_distillate: float, x_bottoms: float, x_feed: float, q: float) -> MinimumReflux:
    """Minimum reflux ratio of the binary under constant molar overflow.

    Three requirements, the largest wins: the feed pinch ``R = (x_D - y_p) / (y_p - x_p)``; the
    rectifying line from ``(x_D, x_D)`` must stay below the curve for ``x_p <= x < x_D``, i.e.
    ``R >= max (x_D - y) / (y - x)`` there (a tangent pinch when the maximum is not at x_p); the
    stripping line from ``(x_B, x_B)`` must stay below the curve for ``x_B < x <= x_p``, i.e.
    ``L'/V' <= min (y - x_B) / (x - x_B)``, turned into a reflux ratio through
    ``L' = R D + q F``, ``V' = (R + 1) D - (1 - q) F`` (McCabe, Smith & Harriott, 7th ed.,
    ch. 21, on minimum reflux and tangent pinches)."""
    region = curve.feasible_region(x_feed)
    x_p, y_p = feed_pinch(curve, x_feed, q, region)
    feed_ratio = (x_distillate - y_p) / (y_p - x_p)
    best = MinimumReflux(feed_ratio, "feed", "feed", x_p, y_p, feed_ratio, x_p, y_p)
    tangents = (
        ("rectifying", _rectifying_tangent(curve, x_distillate, x_bottoms, x_p)),
        ("stripping", _stripping_tangent(curve, x_distillate, x_bottoms, x_feed, q, x_p)),
    )
    for section, tangent in tangents:
        if tangent is None:
            continue
        x_tangent, ratio = tangent
        if ratio > feed_ratio * (1.0 + TANGENT_MARGIN) + 1e-12 and ratio > best.ratio:
            best = MinimumReflux(ratio, "tangent", section, x_tangent, float(curve.y_of_x(x_tangent)), feed_ratio, x_p, y_p)
    if best.ratio < 0.0:
        best = MinimumReflux(0.0, best.pinch, best.section, best.x, best.y, feed_ratio, x_p, y_p)
    return best


def check_reflux_above_minimum(
    reflux_ratio: float, pinch: MinimumReflux, curve: EquilibriumCurve, x_distillate: float, x_bottoms: float,
    construction: str = "",
) -> None:
    """Raise :class:`SpecError` unless ``reflux_ratio`` is above the minimum ``pinch.ratio`` (of
    the ``construction`` named in the message, if any): below it no number of stages meets the
    products."""
    if not reflux_ratio > pinch.ratio * (1.0 + 1e-9):
        raise SpecError(
            f"reflux ratio {reflux_ratio:.6g} is not above the minimum reflux ratio {pinch.ratio:.6g}{construction} "
            f"({pinch.pinch} pinch at x = {pinch.x:.4f}, y = {pinch.y:.4f} {curve.light}): no number of stages meets "
            f"x_D = {x_distillate:.6g}, x_B = {x_bottoms:.6g}"
        )
