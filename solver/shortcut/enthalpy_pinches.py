"""Minimum reflux of the enthalpy-composition construction (Ponchon, Tech. Moderne 13 (1921) 20;
Savarit, Arts et Métiers 75 (1922) 65): where a tie line passes through a difference point.

* the **feed pinch**: the tie line through the feed point ``(x_F, h_F)``, extended to ``x_D``,
  fixes the lowest top difference point ``Delta_D``;
* a **tangent pinch**, higher: a tie line of the rectifying section (liquid between the feed tie
  line and ``x_D``) extended to ``x_D`` above it, or one of the stripping section extended to
  ``x_B`` below ``Delta_B`` (which lies on the line from ``Delta_D`` through the feed point) --
  the enthalpy-composition form of the McCabe-Thiele tangent pinch (:mod:`.pinches`).

The reflux ratio follows from the top difference point's enthalpy. Textbook treatment: McCabe,
Smith & Harriott, *Unit Operations of Chemical Engineering*, 7th ed., 2005, ch. 21. Enthalpies
J/mol; compositions mole fractions of the light component.
"""

from __future__ import annotations

from typing import Callable

import numpy as np
from scipy.optimize import brentq

from ..errors import SpecError
from .enthalpy_diagram import SaturatedEnthalpies, top_difference_enthalpy, top_of_column
from .equilibrium_curve import EquilibriumCurve
from .pinches import PINCH_GRID, TANGENT_MARGIN, MinimumReflux, tangent_extremum

__all__ = ["enthalpy_minimum_reflux"]


def _feed_tie_line(
    curve: EquilibriumCurve, enthalpies: SaturatedEnthalpies, x_feed: float, feed_enthalpy: float, low: float, high: float
) -> float:
    """Liquid end ``x`` of the tie line through the feed point (the one nearest the feed when
    several do), searched between ``low`` and ``high``."""

    def through_feed(x):
        return enthalpies.liquid_of_x(x) + enthalpies.tie_line_slope(x) * (x_feed - x) - feed_enthalpy

    grid = np.linspace(max(low, 0.0) + 1e-12, high - 1e-12, 2001)
    values = through_feed(grid)
    crossings = np.nonzero(np.sign(values[:-1]) * np.sign(values[1:]) <= 0)[0]
    if crossings.size == 0:
        raise SpecError(
            f"no tie line passes through the feed point (x = {x_feed:.6g}, h = {feed_enthalpy:.6g} J/mol): the feed is "
            "too far outside the two-phase region for the enthalpy-composition construction"
        )
    k = crossings[np.argmin(np.abs(grid[crossings] - x_feed))]
    if values[k] == 0:
        return float(grid[k])
    return float(brentq(lambda v: float(through_feed(v)), grid[k], grid[k + 1], xtol=1e-14))


def _reflux_for_top_enthalpy(
    h_delta: float, enthalpies: SaturatedEnthalpies, x_distillate: float, condenser: str, h_1: float,
    y_2: Callable[[float], float],
) -> float:
    """The reflux ratio that puts the top difference point at enthalpy ``h_delta``: explicit for
    a total condenser; for a partial one (where y_2 moves with R) the root of
    ``h_Delta_D(R) = h_delta``, bracketed by growing R fourfold (Brent's method)."""
    if condenser == "total":
        H_2 = float(enthalpies.vapor_of_y(x_distillate))
        return (h_delta - H_2) / (H_2 - h_1)

    def gap(R: float) -> float:
        return top_difference_enthalpy(enthalpies, R, h_1, y_2) - h_delta

    if gap(0.0) >= 0.0:
        return 0.0
    high_R = 1.0
    while gap(high_R) < 0.0 and high_R < 1e7:
        high_R *= 4.0
    return float(brentq(gap, 0.0, high_R, xtol=1e-13))


def enthalpy_minimum_reflux(
    curve: EquilibriumCurve,
    enthalpies: SaturatedEnthalpies,
    *,
    x_distillate: float,
    x_bottoms: float,
    x_feed: float,
    feed_enthalpy: float,
    condenser: str = "total",
    reflux_enthalpy: float | None = None,
) -> tuple[MinimumReflux, float]:
    """Minimum reflux of the enthalpy-composition construction and the top difference point's
    enthalpy there (J/mol). Requirements: the tie line through the feed point; every tie line
    with ``x`` between the feed tie line's and ``x_D`` extended to ``x_D`` must not pass above
    ``Delta_D``; every tie line between ``x_B`` and the feed tie line extended to ``x_B`` must not
    pass below ``Delta_B``."""
    low, high = curve.feasible_region(x_feed)
    F_over_D = (x_distillate - x_bottoms) / (x_feed - x_bottoms)
    B_over_D = F_over_D - 1.0
    x_p = _feed_tie_line(curve, enthalpies, x_feed, feed_enthalpy, low, min(high, x_distillate))
    y_p = float(curve.y_of_x(x_p))

    def extended_to_top(x):
        return enthalpies.liquid_of_x(x) + enthalpies.tie_line_slope(x) * (x_distillate - x)

    def extended_to_bottom(x):
        return enthalpies.liquid_of_x(x) + enthalpies.tie_line_slope(x) * (x_bottoms - x)

    def exceeds(value: float, best: float) -> bool:
        return value > best + TANGENT_MARGIN * abs(best) + 1e-9

    feed_value = float(extended_to_top(x_p))
    best_value, section, x_pinch = feed_value, "feed", x_p
    lower = min(max(x_p, x_bottoms), x_distillate)
    if lower < x_distillate:
        grid = np.linspace(lower, x_distillate, PINCH_GRID)[:-1]
        tangent = tangent_extremum(extended_to_top, grid, maximize=True, feed_end=0)
        if tangent is not None and exceeds(tangent[1], best_value):
            x_pinch, best_value = tangent
            section = "rectifying"
    upper = max(min(x_p, x_distillate), x_bottoms)
    if upper > x_bottoms:
        grid = np.linspace(x_bottoms, upper, PINCH_GRID)[1:]
        tangent = tangent_extremum(extended_to_bottom, grid, maximize=False, feed_end=-1)
        if tangent is not None:
            x_tangent, bottom_value = tangent
            value = F_over_D * feed_enthalpy - B_over_D * bottom_value
            if exceeds(value, best_value):
                best_value, section, x_pinch = value, "stripping", x_tangent
    _, h_1, y_2 = top_of_column(curve, enthalpies, x_distillate, condenser, reflux_enthalpy)
    feed_ratio = _reflux_for_top_enthalpy(feed_value, enthalpies, x_distillate, condenser, h_1, y_2)
    ratio = max(_reflux_for_top_enthalpy(best_value, enthalpies, x_distillate, condenser, h_1, y_2), 0.0)
    pinch = MinimumReflux(
        ratio, "feed" if section == "feed" else "tangent", section, x_pinch, float(curve.y_of_x(x_pinch)),
        feed_ratio, x_p, y_p,
    )
    return pinch, best_value
