"""The audit of a thermally coupled network (a Petlyuk arrangement or the divided-wall column it
models): the rigorous solution's vapor beside the minimum vapor of Underwood's method.

The minimum vapor comes from the Vmin diagram of Halvorsen & Skogestad (Ind. Eng. Chem. Res.
42 (2003) 596 and 605; :mod:`solver.shortcut.vmin_diagram`) for the network's single feed:
the Petlyuk minimum (the highest peak), and the minimum total vapor of the direct and the
indirect sequence of simple columns. The rigorous figures are the vapor the network's reboilers
raise (the vapor leaving each reboiler stage) and the vapor entering its condensers (the vapor
leaving the stage below each condenser), both in mol/s like the diagram. The saving the short
method claims is ``1 - V_min,Petlyuk / min(V_min,direct, V_min,indirect)``; the ratio of the
rigorous boilup to the Petlyuk minimum says how far the rigorous column runs above it (never
below 1 for a column with finitely many stages, up to the diagram's assumptions: constant
relative volatilities and constant molar overflow).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..case import Case
from ..errors import SpecError
from ..network_results import NetworkResult
from ..shortcut.vmin_diagram import case_minimum_vapor_diagram
from ..thermo.package import ThermoPackage

__all__ = ["NetworkVminAudit", "network_vmin_audit"]


@dataclass(frozen=True)
class NetworkVminAudit:
    """The rigorous vapor of a network beside Underwood's minimum vapor (mol/s)."""

    components: tuple[str, ...]  # in order of falling volatility
    relative_volatility: tuple[float, ...]
    q: float
    petlyuk_minimum_vapor: float  # rectifying vapor V_top at minimum
    petlyuk_minimum_boilup: float  # stripping vapor V_top - (1 - q) F
    direct_sequence_minimum_vapor: float
    indirect_sequence_minimum_vapor: float
    rigorous_boilup: float  # vapor raised by all reboilers
    rigorous_vapor_to_condensers: float

    @property
    def claimed_saving(self) -> float:
        """The saving in vapor of the Petlyuk arrangement over the better simple sequence, by
        Underwood's method."""
        return 1.0 - self.petlyuk_minimum_vapor / min(self.direct_sequence_minimum_vapor, self.indirect_sequence_minimum_vapor)

    @property
    def boilup_over_minimum(self) -> float:
        return self.rigorous_boilup / self.petlyuk_minimum_boilup

    def as_json(self) -> dict:
        return {
            "method": "Underwood minimum vapor, Vmin diagram of Halvorsen & Skogestad (Ind. Eng. Chem. Res. 42 (2003) 596, 605)",
            "units": "mol/s",
            "components": list(self.components),
            "relative_volatility": list(self.relative_volatility),
            "q": self.q,
            "petlyuk_minimum_vapor": self.petlyuk_minimum_vapor,
            "petlyuk_minimum_boilup": self.petlyuk_minimum_boilup,
            "direct_sequence_minimum_vapor": self.direct_sequence_minimum_vapor,
            "indirect_sequence_minimum_vapor": self.indirect_sequence_minimum_vapor,
            "claimed_saving": self.claimed_saving,
            "rigorous_boilup": self.rigorous_boilup,
            "rigorous_vapor_to_condensers": self.rigorous_vapor_to_condensers,
            "boilup_over_minimum": self.boilup_over_minimum,
        }


def network_vmin_audit(case: Case, result: NetworkResult, thermo: ThermoPackage | None = None) -> NetworkVminAudit:
    """The audit of ``result``, the solution of the network ``case`` (one feed, at least three
    components); raises :class:`SpecError` when the diagram does not apply."""
    if len(case.component_names) < 3:
        raise SpecError(f"{case.source_file or '<case>'}: the minimum-vapor diagram is for three or more components")
    names, diagram = case_minimum_vapor_diagram(case, thermo)
    boilup = vapor_to_condensers = 0.0
    for column in result.columns:
        stages = result.column_stages(column["name"])
        if column["reboiler"] != "none":
            boilup += float(result.vapor_flow[stages[-1]])
        if column["condenser"] != "none":
            vapor_to_condensers += float(result.vapor_flow[stages[1]])
    feed = float(np.sum(diagram.feed_flows))
    return NetworkVminAudit(
        components=names, relative_volatility=tuple(diagram.relative_volatility), q=diagram.q,
        petlyuk_minimum_vapor=diagram.petlyuk_minimum_vapor,
        petlyuk_minimum_boilup=diagram.petlyuk_minimum_vapor - (1.0 - diagram.q) * feed,
        direct_sequence_minimum_vapor=diagram.direct_sequence_minimum_vapor,
        indirect_sequence_minimum_vapor=diagram.indirect_sequence_minimum_vapor,
        rigorous_boilup=boilup, rigorous_vapor_to_condensers=vapor_to_condensers,
    )
