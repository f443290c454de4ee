"""Shortcut column designs, set beside the rigorous solution by the audit.

* :mod:`.mccabe_thiele` -- binary operating-line design (McCabe & Thiele 1925) on the case's own
  equilibrium curve: q from the feed enthalpy, stage stepping, minimum stages, minimum reflux
  from the feed pinch or a tangent pinch, azeotrope checks.
* :mod:`.ponchon_savarit` -- the enthalpy-composition construction (Ponchon 1921, Savarit 1922)
  with the case's enthalpies: difference points, stage flows by the lever rule, duties.
* :mod:`.fug` -- multicomponent Fenske-Underwood-Gilliland (Molokanov form)-Kirkbride design.

Each module has the published method on given data (curves, relative volatilities, q) and a
``design_*`` function that takes them from a case.
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
