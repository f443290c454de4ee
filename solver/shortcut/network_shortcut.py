"""What a shortcut says about a column network (``traystack shortcut`` on a network case).

The shortcut designs of one column (McCabe-Thiele, Ponchon-Savarit, Fenske-Underwood-Gilliland-
Kirkbride) assume one feed section between one condenser and one reboiler; a network's side
strippers, pumparounds, side rectifiers or a recycle between two columns break that, and no
shortcut is offered for them. A *thermally coupled* arrangement is different: a column with
neither condenser nor reboiler whose top and bottom both exchange streams with another column
(the prefractionator of a Petlyuk arrangement, or the feed side of the wall of a divided-wall
column it models). For one feed of three or more components its minimum vapor is Underwood's,
read off the Vmin diagram of Halvorsen & Skogestad (Ind. Eng. Chem. Res. 42 (2003) 596 and 605;
:mod:`.vmin_diagram`): the Petlyuk minimum (the highest peak), the minimum vapor of every sharp
split between adjacent components, and of the direct and indirect sequences of simple columns,
with the saving the short method claims over the better sequence.
"""

from __future__ import annotations

from dataclasses import dataclass

from ..case import Case
from ..case.model import Network
from ..errors import CaseError
from ..thermo.package import ThermoPackage
from .vmin_diagram import VminDiagram, case_minimum_vapor_diagram

__all__ = ["NetworkShortcut", "coupled_sections", "network_shortcut"]


def coupled_sections(network: Network) -> tuple[str, ...]:
    """The columns of ``network`` with neither condenser nor reboiler whose first and last
    stages both send a stream to, or take one from, another column."""
    found = []
    for section in network.columns:
        column = section.column
        if column.condenser != "none" or column.reboiler != "none":
            continue
        ends = set()
        for c in network.connections:
            if c.from_column == c.to_column:
                continue
            if c.from_column == section.name:
                ends.add(c.from_stage)
            if c.to_column == section.name:
                ends.add(c.to_stage)
        if {1, column.stages} <= ends:
            found.append(section.name)
    return tuple(found)


@dataclass(frozen=True)
class NetworkShortcut:
    """Underwood's minimum vapor for a thermally coupled network's feed (flows mol/s)."""

    coupled: tuple[str, ...]  # the coupled sections (prefractionators)
    components: tuple[str, ...]  # in order of falling volatility
    diagram: VminDiagram

    @property
    def feed_flow(self) -> float:
        return float(sum(self.diagram.feed_flows))

    @property
    def petlyuk_minimum_boilup(self) -> float:
        return self.diagram.petlyuk_minimum_vapor - (1.0 - self.diagram.q) * self.feed_flow

    @property
    def claimed_saving(self) -> float:
        d = self.diagram
        return 1.0 - d.petlyuk_minimum_vapor / min(d.direct_sequence_minimum_vapor, d.indirect_sequence_minimum_vapor)

    def split_name(self, light: int, heavy: int) -> str:
        return f"{'+'.join(self.components[: light + 1])} / {'+'.join(self.components[heavy:])}"

    def as_json(self) -> dict:
        d = self.diagram
        return {
            "method": "Underwood minimum vapor, Vmin diagram of Halvorsen & Skogestad (Ind. Eng. Chem. Res. 42 (2003) 596, 605)",
            "assumptions": "constant relative volatilities (at the feed's bubble point), constant molar overflow, "
                           "infinitely many stages",
            "units": "mol/s",
            "coupled_sections": list(self.coupled),
            "components": list(self.components),
            "relative_volatility": list(d.relative_volatility),
            "q": d.q,
            "underwood_roots": list(d.roots),
            "peaks": [{"split": self.split_name(p.light, p.heavy), "vapor_top": p.vapor_top, "vapor_bottom": p.vapor_bottom,
                       "distillate_flow": p.distillate_flow} for p in d.peaks],
            "petlyuk_minimum_vapor": d.petlyuk_minimum_vapor,
            "petlyuk_minimum_boilup": self.petlyuk_minimum_boilup,
            "direct_sequence_minimum_vapor": d.direct_sequence_minimum_vapor,
            "indirect_sequence_minimum_vapor": d.indirect_sequence_minimum_vapor,
            "claimed_saving": self.claimed_saving,
        }


def network_shortcut(case: Case, thermo: ThermoPackage | None = None) -> NetworkShortcut:
    """The minimum-vapor shortcut of the network ``case``; :class:`CaseError` (exit 2) naming
    why when no shortcut applies to its arrangement (module docstring)."""
    network = case.network
    file = case.source_file or None
    names = ", ".join(repr(s.name) for s in network.columns)
    coupled = coupled_sections(network)
    if not coupled:
        raise CaseError(
            f"no shortcut design applies to this network of {len(network.columns)} column(s) ({names}) with "
            f"{len(network.connections)} connection(s): the one-column shortcuts need one condenser and one reboiler "
            "around the feed, and the minimum-vapor diagram needs a thermally coupled column (neither condenser nor "
            "reboiler, its top and bottom joined to another column, as in a Petlyuk or divided-wall arrangement); "
            "`traystack run` solves this network rigorously",
            file=file, key="columns", expected="a thermally coupled arrangement, or a single-column case ([column])")
    if len(case.feeds) != 1:
        raise CaseError(f"the minimum-vapor diagram of the coupled arrangement ({', '.join(coupled)}) takes one feed",
                        file=file, key="feeds", value=len(case.feeds), expected="one feed")
    if len(case.component_names) < 3:
        raise CaseError("the minimum-vapor diagram of a coupled arrangement separates three or more components",
                        file=file, key="components.names", value=list(case.component_names),
                        expected="three or more components")
    components, diagram = case_minimum_vapor_diagram(case, thermo)
    return NetworkShortcut(coupled, components, diagram)
