"""The rigorous columns of an audit: variants of the case (another stage count, feed stage and
specs), solved with one thermo package, each started from the nearest solution already found
(its profiles stretched section by section onto the new stage count), within a budget of
solves; and the summary of each solve (:class:`RigorousRun`).

Units are SI: K, Pa, mol/s, W; compositions are mole fractions.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from typing import Sequence

import numpy as np

from ..case import Case, Spec
from ..engine import simulate, stage_profile
from ..errors import ConvergenceError, SpecError, ThermoError
from ..results import Result
from ..shortening import stretch_profile
from ..streams import StageProfile
from ..thermo.package import ThermoPackage
from .targets import describe_spec, impurity_ratio

__all__ = [
    "MAX_SOLVES",
    "MIN_SOLVES",
    "RigorousColumns",
    "RigorousRun",
    "column_variant",
    "run_summary",
    "try_solve",
    "warm_start",
]

#: Most rigorous solves one audit may use (by default), and the fewest it can work with: the
#: case as specified (when the basis needs it), the shortcut's column, the reflux needed.
MAX_SOLVES = 30
MIN_SOLVES = 3


@dataclass(frozen=True)
class RigorousRun:
    """One rigorous solve of the audit, summarized (SI): the column (``stages``, ``feed_stage``,
    its ``specs`` as text), whether it converged, its products and duties, and for each product
    target the delivered impurity over the specified one (``impurity_ratios``)."""

    label: str
    stages: int
    feed_stage: int
    specs: tuple[str, ...]
    converged: bool
    message: str = ""
    reflux_ratio: float | None = None
    distillate_flow: float | None = None
    bottoms_flow: float | None = None
    distillate_composition: tuple[float, ...] = ()
    bottoms_composition: tuple[float, ...] = ()
    condenser_duty: float | None = None
    reboiler_duty: float | None = None
    impurity_ratios: tuple[float, ...] = ()  # one per target: delivered impurity / specified impurity


def column_variant(case: Case, stages: int, feed_stage: int, specs: Sequence[Spec]) -> tuple[Case, list[str]]:
    """``case`` with ``stages`` stages, the feed on ``feed_stage`` and ``specs``: the top
    pressure and the mean pressure drop per stage kept, equilibrium stages (the shortcut counts
    them), side heaters kept where their stage still is a tray."""
    column = case.column
    notes = []
    P = np.asarray(column.pressures, dtype=float)
    drop = (P[-1] - P[0]) / (P.size - 1) if P.size > 1 else 0.0
    if P.size > 2 and np.max(np.abs(np.diff(P) - drop)) > 1e-6 * max(abs(drop), 1.0):
        notes.append("the case's pressure profile is replaced by its top pressure and mean drop per stage")
    pressures = tuple(float(P[0] + drop * k) for k in range(stages))
    if any(e < 1.0 for e in column.efficiencies):
        notes.append("the audit's columns have equilibrium stages (Murphree efficiency 1), as the shortcut counts "
                     "them; the case's efficiencies are not applied")
    efficiencies = (1.0,) * stages
    heaters = tuple(h for h in column.stage_duties if 1 < h.stage < stages)
    if len(heaters) != len(column.stage_duties):
        notes.append("side heaters below the new last tray are left out")
    new_column = dataclasses.replace(column, stages=stages, pressures=pressures, efficiencies=efficiencies,
                                     stage_duties=heaters)
    feeds = (dataclasses.replace(case.feeds[0], stage=int(feed_stage)),)
    return dataclasses.replace(case, column=new_column, feeds=feeds, specs=tuple(specs)), notes


def _section_positions(stages: int, feed_stage: int, old_stages: int, old_feed: int) -> np.ndarray:
    """Where each new stage sits on the old column (fractional stage number, 1-based):
    rectifying stages onto rectifying stages, stripping onto stripping, linearly."""
    j = np.arange(1, stages + 1, dtype=float)
    position = np.empty(stages)
    top = j < feed_stage
    if feed_stage > 2:
        position[top] = 1.0 + (j[top] - 1.0) * (old_feed - 2.0) / (feed_stage - 2.0)
    else:
        position[top] = 1.0
    bottom = ~top
    span = stages - feed_stage
    position[bottom] = old_feed + ((j[bottom] - feed_stage) * (old_stages - old_feed) / span if span > 0 else 0.0)
    return position


def warm_start(previous: Result, stages: int, feed_stage: int, old_feed_stage: int) -> StageProfile:
    """The start profile of a column of ``stages`` stages with the feed on ``feed_stage``, from
    the profiles of ``previous`` stretched section by section."""
    where = _section_positions(stages, feed_stage, previous.stage_count, old_feed_stage)
    return stretch_profile(stage_profile(previous), where)


class RigorousColumns:
    """The rigorous solves of one audit: one thermo package, warm starts from the nearest
    solution found so far (a cold retry after a failed one counts as one more solve), and the
    count against ``budget``, which the stage search respects (the case as specified, the
    shortcut's column and the reflux needed are always solved)."""

    def __init__(self, case: Case, thermo: ThermoPackage, budget: int = MAX_SOLVES) -> None:
        self.case = case
        self.thermo = thermo
        self.budget = budget
        self.count = 0
        self.notes: list[str] = []
        self._solutions: list[tuple[int, int, Result]] = []

    @property
    def spent(self) -> bool:
        return self.count >= self.budget

    @property
    def solutions(self) -> tuple[tuple[int, int, Result], ...]:
        """(stages, feed stage, result) of every converged solve so far."""
        return tuple(self._solutions)

    def seed(self, stages: int, feed_stage: int, result: Result) -> None:
        """Take ``result`` (a converged column of ``stages`` stages, feed on ``feed_stage``,
        perhaps of another thermo model) as a warm start for later solves; no solve is counted."""
        if result.converged:
            self._solutions.append((stages, feed_stage, result))

    def _simulate(self, case: Case, start: StageProfile | None) -> Result:
        self.count += 1
        return simulate(case, thermo=self.thermo, start=start)

    def solve_case(self, case: Case) -> Result:
        """The case as it is (cold start)."""
        result = self._simulate(case, None)
        if result.converged:
            self._solutions.append((case.column.stages, case.feeds[0].stage, result))
        return result

    def solve(self, stages: int, feed_stage: int, specs: Sequence[Spec]) -> Result:
        """Raises SpecError (infeasible specs) or ConvergenceError (NaN)."""
        variant, notes = column_variant(self.case, stages, feed_stage, specs)
        for note in notes:
            if note not in self.notes:
                self.notes.append(note)
        result = None
        if self._solutions:
            N0, f0, previous = min(self._solutions, key=lambda s: (abs(s[0] - stages), abs(s[1] - feed_stage)))
            try:
                result = self._simulate(variant, warm_start(previous, stages, feed_stage, f0))
            except ConvergenceError:
                result = None
        if result is None or not result.converged:
            result = self._simulate(variant, None)
        if result.converged:
            self._solutions.append((stages, feed_stage, result))
        return result


def try_solve(columns: RigorousColumns, stages: int, feed_stage: int, specs: Sequence[Spec]) -> tuple[Result | None, str]:
    """:meth:`RigorousColumns.solve`, or (None, the message) for infeasible specs, a property
    model out of range or a solve that broke down."""
    try:
        return columns.solve(stages, feed_stage, specs), ""
    except (SpecError, ThermoError, ConvergenceError) as exc:
        return None, str(exc)


def run_summary(label: str, result: Result | None, stages: int, feed_stage: int, specs: Sequence[Spec],
                targets: Sequence[Spec], z: Sequence[float], message: str = "") -> RigorousRun:
    """The :class:`RigorousRun` of one solve (``result`` None: it could not be solved, for
    ``message``); the impurity ratios of ``targets`` at feed composition ``z``."""
    described = tuple(describe_spec(s) for s in specs)
    if result is None:
        return RigorousRun(label, stages, feed_stage, described, False, message)
    ratios = tuple(impurity_ratio(result, t, z) for t in targets) if result.converged else ()
    return RigorousRun(
        label=label, stages=stages, feed_stage=feed_stage, specs=described, converged=bool(result.converged),
        message=result.message if not result.converged else message,
        reflux_ratio=result.reflux_ratio, distillate_flow=result.distillate_flow, bottoms_flow=result.bottoms_flow,
        distillate_composition=tuple(float(v) for v in result.distillate_composition),
        bottoms_composition=tuple(float(v) for v in result.bottoms_composition),
        condenser_duty=result.condenser_duty, reboiler_duty=result.reboiler_duty, impurity_ratios=ratios,
    )
