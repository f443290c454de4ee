"""From stages to hardware: tray and packing hydraulics, diameters from the rigorous traffic,
and what the CMO traffic of the shortcut design would have sized (``traystack size``).

* :mod:`.liquids` -- pure-component surface tension, viscosity and liquid volume, each from a
  named source (CoolProp, handbook tables through ``chemicals``, or values the case gives);
* :mod:`.mixtures` -- stage by stage: liquid and vapor densities, surface tension, viscosity;
* :mod:`.trays` -- sieve and valve trays: Fair's flooding correlation, downcomer, weir,
  pressure drop;
* :mod:`.packing` -- random and structured packings: Robbins' pressure drop, Kister and Gill's
  flood pressure drop, HETP rules of thumb;
* :mod:`.efficiency` and :mod:`.keys` -- O'Connell's overall efficiency: real trays;
* :mod:`.traffic` -- tray stages, sections, the rigorous and the CMO traffic;
* :mod:`.column` -- :func:`size_column`: diameters per section and controlling stages for both
  traffics, the column rated;
* :mod:`.flags` -- CMO_UNDERSIZED and NEAR_FLOOD; :mod:`.record` -- result.json "sizing";
* :mod:`.figure` -- the fraction of flood per stage.

The hydraulics are preliminary: correlations of limited accuracy (Fair's flooding chart about
+-10 to 15 %, Robbins' pressure drop about +-20 %), rules of thumb for downcomers and HETP.
Vendor data and the tray or packing maker's rating decide the hardware.
"""

from .column import BasisSizing, ColumnSizing, Rating, SectionSizing, attach_sizing, size_column, sizing_inputs
from .liquids import PureLiquids
from .record import CMO_BASIS, sizing_flags

__all__ = [
    "CMO_BASIS",
    "BasisSizing",
    "ColumnSizing",
    "PureLiquids",
    "Rating",
    "SectionSizing",
    "attach_sizing",
    "size_column",
    "sizing_inputs",
    "sizing_flags",
]
