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

Beside the minima, the best conventional sequence solved rigorously
(:mod:`solver.audit.network_sequences`): the direct and the indirect sequence of two simple
columns making the network's three products, each column solved by the network engine; the
rigorous saving is ``1 - boilup of the network / boilup of the better converged sequence``
(and the same in reboiler duty), the check of the saving the short method claims.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..case import Case
from ..errors import SpecError
from ..network_results import NetworkResult
from ..shortcut.vmin_diagram import case_minimum_vapor_diagram
from ..thermo.package import ThermoPackage
from .network_sequences import SequenceRun, conventional_sequences, reboiler_boilup, reboiler_duty

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
    rigorous_reboiler_duty: float = 0.0  # W, all reboilers
    sequences: tuple[SequenceRun, ...] = ()  # the direct and the indirect sequence, solved rigorously
    sequence_note: str = ""  # why there are no sequences, when there are none

    @property
    def best_sequence(self) -> SequenceRun | None:
        """The converged conventional sequence of least boilup (None when none converged)."""
        converged = [run for run in self.sequences if run.converged]
        return min(converged, key=lambda run: run.boilup) if converged else None

    @property
    def rigorous_saving(self) -> float | None:
        """The saving in boilup of the network over the best conventional sequence, both solved
        rigorously."""
        best = self.best_sequence
        return None if best is None else 1.0 - self.rigorous_boilup / best.boilup

    @property
    def rigorous_duty_saving(self) -> float | None:
        """The same saving in reboiler duty."""
        best = self.best_sequence
        return None if best is None else 1.0 - self.rigorous_reboiler_duty / best.reboiler_duty

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
            "rigorous_reboiler_duty": self.rigorous_reboiler_duty,
            "conventional_sequences": {
                "method": "direct and indirect sequences of two simple columns making the network's three products "
                          "(key recoveries of the network's products), each column solved rigorously",
                **{run.name: run.as_json() for run in self.sequences},
                "best": None if self.best_sequence is None else self.best_sequence.name,
                "best_boilup": None if self.best_sequence is None else self.best_sequence.boilup,
                "best_reboiler_duty": None if self.best_sequence is None else self.best_sequence.reboiler_duty,
                "rigorous_saving": self.rigorous_saving,
                "rigorous_duty_saving": self.rigorous_duty_saving,
                "claimed_saving": self.claimed_saving,
                "note": self.sequence_note,
            },
        }


def network_vmin_audit(case: Case, result: NetworkResult, thermo: ThermoPackage | None = None,
                       sequences: bool = True) -> NetworkVminAudit:
    """The audit of ``result``, the solution of the network ``case`` (one feed, at least three
    components), with the conventional sequences solved rigorously unless ``sequences`` is
    False (or the network's products are not three cuts of the components: then
    ``sequence_note`` says why); raises :class:`SpecError` when the diagram does not apply."""
    if len(case.component_names) < 3:
        raise SpecError(f"{case.source_file or '<case>'}: the minimum-vapor diagram is for three or more components")
    thermo = thermo or ThermoPackage.from_case(case)
    names, diagram = case_minimum_vapor_diagram(case, thermo)
    vapor_to_condensers = sum(float(result.vapor_flow[result.column_stages(c["name"])[1]]) for c in result.columns if c["condenser"] != "none")
    runs: tuple[SequenceRun, ...] = ()
    note = "not asked for"
    if sequences:
        try:
            runs, note = conventional_sequences(case, result, names, diagram, thermo), ""
        except SpecError as exc:
            note = str(exc)
    feed = float(np.sum(diagram.feed_flows))
    return NetworkVminAudit(
        components=names, relative_volatility=tuple(diagram.relative_volatility), q=diagram.q,
        petlyuk_minimum_vapor=diagram.petlyuk_minimum_vapor,
        petlyuk_minimum_boilup=diagram.petlyuk_minimum_vapor - (1.0 - diagram.q) * feed,
        direct_sequence_minimum_vapor=diagram.direct_sequence_minimum_vapor,
        indirect_sequence_minimum_vapor=diagram.indirect_sequence_minimum_vapor,
        rigorous_boilup=reboiler_boilup(result), rigorous_vapor_to_condensers=vapor_to_condensers,
        rigorous_reboiler_duty=reboiler_duty(result), sequences=runs, sequence_note=note,
    )
