"""Shortcut column designs, set beside the rigorous solution by the audit.

Binary, on the case's own equilibrium curve and enthalpies:

* :mod:`.mccabe_thiele` -- the operating-line design (McCabe & Thiele 1925) and
  :func:`design_binary`, built from :mod:`.equilibrium_curve` (curve, azeotropes, the purities
  they allow), :mod:`.binary_case` (feed, q, products and reflux from the specs),
  :mod:`.operating_lines` (CMO section flows and lines), :mod:`.pinches` (minimum reflux from
  the feed pinch or a tangent pinch) and :mod:`.stepping` (stage stepping, total reflux);
* :mod:`.ponchon_savarit` -- the enthalpy-composition construction (Ponchon 1921, Savarit
  1922) and :func:`design_ponchon_savarit`, with :mod:`.enthalpy_diagram` (saturated lines,
  difference points) and :mod:`.enthalpy_pinches` (its minimum reflux).

Multicomponent:

* :mod:`.fug` -- :func:`design_multicomponent`, the Fenske-Underwood-Gilliland-Kirkbride design
  of a case, from :mod:`.fenske` (Fenske 1932), :mod:`.underwood` (Underwood 1948, with
  distributing non-keys) and :mod:`.gilliland_kirkbride` (Gilliland 1940 in the form of
  Molokanov et al. 1972; Kirkbride 1944).

Networks: :mod:`.vmin_diagram` -- the minimum-vapor diagram of Halvorsen & Skogestad (2003) for
a multicomponent feed; :mod:`.network_shortcut` -- what applies to a column network (that
diagram for a thermally coupled arrangement, or why nothing does).

:mod:`.simple_column` holds what every design takes from a case first (one feed, a simple
column, q). Each method works on given data (curves, relative volatilities, q) for textbook
checks; the ``design_*`` functions take them from a case.
"""

from .fug import MulticomponentDesign, UnderwoodResult, design_multicomponent
from .mccabe_thiele import Azeotrope, BinaryDesign, EquilibriumCurve, MinimumReflux, OperatingLine, design_binary
from .ponchon_savarit import EnthalpyConstruction, SaturatedEnthalpies, design_ponchon_savarit

__all__ = [
    "Azeotrope",
    "BinaryDesign",
    "EnthalpyConstruction",
    "EquilibriumCurve",
    "MinimumReflux",
    "MulticomponentDesign",
    "OperatingLine",
    "SaturatedEnthalpies",
    "UnderwoodResult",
    "design_binary",
    "design_multicomponent",
    "design_ponchon_savarit",
]
