"""The traffic a column's internals carry: which stages are trays (or packed stages), how they
fall into sections, and the vapor and liquid each carries -- the rigorous solution's, and the
constant-molar-overflow traffic of the shortcut design.

The CMO traffic is the operating-line design's section flows at the rigorous column's own
reflux ratio, distillate rate and feed q (q from the feed enthalpy): ``L = R D``,
``V = (R + 1) D`` above the feed, ``L + q F`` and ``V - (1 - q) F`` below it -- the flows the
McCabe-Thiele and Fenske-Underwood-Gilliland designs assume (McCabe and Thiele 1925, Ind. Eng.
Chem. 17, 605), as :func:`solver.audit.cmo_audit` computes them. Both traffics are sized with
the same physical properties, those of the rigorous stage temperatures and compositions; mass
flows use the rigorous stage compositions too. In ``traystack audit`` the rigorous column is
the shortcut's own design (its stages, reflux ratio and distillate rate), so the CMO traffic
is exactly the shortcut design's.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..audit.cmo import cmo_audit
from ..errors import SpecError
from ..results import Result

__all__ = ["Section", "Traffic", "cmo_traffic", "rigorous_traffic", "sections_of", "tray_stages"]


@dataclass(frozen=True)
class Section:
    """A run of trays (or packed stages) between feeds, draws and side heaters: ``name`` and
    its first and last stage numbers (1-based, inclusive)."""

    name: str
    first: int
    last: int

    @property
    def stage_count(self) -> int:
        return self.last - self.first + 1

    def mask(self, stages: np.ndarray) -> np.ndarray:
        return (stages >= self.first) & (stages <= self.last)


@dataclass(frozen=True)
class Traffic:
    """Vapor and liquid molar flows (mol/s) carried by each of ``stages`` (1-based), and where
    they come from (``basis``: "rigorous" | "cmo")."""

    basis: str
    stages: np.ndarray
    vapor_flow: np.ndarray
    liquid_flow: np.ndarray


def tray_stages(result: Result) -> np.ndarray:
    """The stage numbers that hold trays or packing: all but a condenser and a reboiler."""
    first = 2 if result.condenser != "none" else 1
    last = result.stage_count - 1 if result.reboiler != "none" else result.stage_count
    return np.arange(first, last + 1)


def sections_of(result: Result) -> tuple[Section, ...]:
    """The column's sections: a new one begins at every feed stage, side-draw stage and side
    heater or cooler. With one feed and nothing else: "rectifying" above the feed stage and
    "stripping" from it down (the feed stage's liquid is the stripping section's)."""
    stages = tray_stages(result)
    if stages.size == 0:
        raise SpecError("the column has no trays between its condenser and reboiler to size")
    feeds = [j + 1 for j, feeds in enumerate(result.stage_feeds) if feeds]
    draws = [int(j) + 1 for j in np.flatnonzero((result.liquid_draw > 0) | (result.vapor_draw > 0))]
    heaters = [duty.stage for duty in result.stage_duties]
    starts = sorted({int(stages[0])} | {s for s in feeds + draws + heaters if stages[0] < s <= stages[-1]})
    ends = [s - 1 for s in starts[1:]] + [int(stages[-1])]
    if len(feeds) == 1 and not draws and not heaters:
        names = ["rectifying", "stripping"] if starts[0] < feeds[0] else ["stripping"]
    else:
        names = [f"section {k + 1}" for k in range(len(starts))]
    return tuple(Section(name, first, last) for name, first, last in zip(names, starts, ends))


def rigorous_traffic(result: Result) -> Traffic:
    """The solution's own traffic on each tray: the vapor leaving it and the liquid crossing its
    weir (the liquid leaving it for the tray below plus any liquid drawn from it)."""
    stages = tray_stages(result)
    j = stages - 1
    return Traffic("rigorous", stages, result.vapor_flow[j] + result.vapor_draw[j],
                   result.liquid_flow[j] + result.liquid_draw[j])


def cmo_traffic(result: Result) -> Traffic:
    """The CMO section flows at the solution's reflux ratio, distillate rate and feed q
    (module docstring). :class:`SpecError` for a column the shortcut does not treat (several
    feeds, side draws, no condenser or reboiler)."""
    if result.condenser == "none" or result.reboiler == "none" or result.reflux_ratio is None:
        raise SpecError("the CMO traffic needs a column with a condenser and a partial reboiler")
    if np.any(result.liquid_draw > 0) or np.any(result.vapor_draw > 0):
        raise SpecError("the CMO traffic of the shortcut design is defined for a column without side draws")
    cmo = cmo_audit(result)
    stages = tray_stages(result)
    return Traffic("cmo", stages, cmo.vapor_cmo[stages - 1], cmo.liquid_cmo[stages - 1])
