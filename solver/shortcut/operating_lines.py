"""Operating lines of a binary column under constant molar overflow (McCabe & Thiele, Ind. Eng.
Chem. 17 (1925) 605).

* **Product flows** from the overall and light-component balances,
  ``D = F (x_F - x_B) / (x_D - x_B)``, ``B = F - D``.
* **Section flows**: ``L = R D`` and ``V = L + D`` above the feed, ``L' = L + q F`` and
  ``V' = V - (1 - q) F`` below it (``q`` the feed's thermal condition).
* **Operating lines**: rectifying ``y = (L/V) x + D x_D / V`` through ``(x_D, x_D)``; stripping
  ``y = (L'/V') x - B x_B / V'`` through ``(x_B, x_B)``. They meet on the q-line
  ``q x + (1 - q) y = x_F`` (McCabe, Smith & Harriott, *Unit Operations of Chemical
  Engineering*, 7th ed., 2005, ch. 21).

Flows mol/s; compositions mole fractions of the light component.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import SpecError

__all__ = ["OperatingLine", "SectionFlows", "product_flows", "section_flows"]


@dataclass(frozen=True)
class OperatingLine:
    """``y = slope x + intercept``."""

    slope: float
    intercept: float

    def __call__(self, x):
        return self.slope * np.asarray(x, dtype=float) + self.intercept


def product_flows(feed_flow: float, x_feed: float, x_distillate: float, x_bottoms: float) -> tuple[float, float]:
    """Distillate and bottoms flows (mol/s) from the overall and light-component balances."""
    F = float(feed_flow)
    D = F * (x_feed - x_bottoms) / (x_distillate - x_bottoms)
    return D, F - D


@dataclass(frozen=True)
class SectionFlows:
    """Constant-molar-overflow flows of both sections (mol/s) and their operating lines."""

    distillate_flow: float
    bottoms_flow: float
    liquid: float
    vapor: float
    stripping_liquid: float
    stripping_vapor: float
    rectifying_line: OperatingLine
    stripping_line: OperatingLine

    @property
    def intersection(self) -> tuple[float, float]:
        """Where the two operating lines meet (on the q-line), (x, y)."""
        top, bottom = self.rectifying_line, self.stripping_line
        x = (bottom.intercept - top.intercept) / (top.slope - bottom.slope)
        return float(x), float(top(x))

    def stage_flows(self, stages: int, feed_stage: int, condenser: str) -> tuple[np.ndarray, np.ndarray]:
        """Liquid and vapor leaving each stage (traystack numbering, as in the result file): the
        feed stage's liquid is the stripping section's, its vapor the rectifying section's; a
        total condenser's vapor is zero (a partial one's is the distillate), the reboiler's
        liquid the bottoms."""
        numbers = np.arange(1, stages + 1)
        liquid = np.where(numbers < feed_stage, self.liquid, self.stripping_liquid)
        vapor = np.where(numbers <= feed_stage, self.vapor, self.stripping_vapor)
        liquid[-1] = self.bottoms_flow
        vapor[0] = 0.0 if condenser == "total" else self.distillate_flow
        return liquid, vapor


def section_flows(
    reflux_ratio: float, q: float, feed_flow: float, distillate_flow: float, x_distillate: float, x_bottoms: float
) -> SectionFlows:
    """The section flows and operating lines at reflux ratio L/D ``reflux_ratio`` for a feed of
    thermal condition ``q``. Raises :class:`SpecError` when no vapor is left below the feed."""
    F, D = float(feed_flow), distillate_flow
    B = F - D
    L = reflux_ratio * D
    V = L + D
    L_strip = L + q * F
    V_strip = V - (1.0 - q) * F
    if V_strip <= 0.0:
        raise SpecError(
            f"reflux ratio {reflux_ratio:.6g} leaves no vapor in the stripping section with a feed of q = {q:.4g} "
            f"(V' = V - (1 - q) F = {V_strip:.6g} mol/s)"
        )
    return SectionFlows(
        distillate_flow=D,
        bottoms_flow=B,
        liquid=L,
        vapor=V,
        stripping_liquid=L_strip,
        stripping_vapor=V_strip,
        rectifying_line=OperatingLine(L / V, D * x_distillate / V),
        stripping_line=OperatingLine(L_strip / V_strip, -B * x_bottoms / V_strip),
    )
