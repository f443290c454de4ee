"""A shorter column first: the start of a long column from the solution of a shortened one.

A long column (a hundred stages or more, sharp splits near minimum reflux) has long pinch zones
in which compositions hardly change from stage to stage. Newton's method from the default start
can wander off on such a column while the same separation with fewer stages in every section
solves readily, and its profile -- the same pinch zones, only shorter -- stretched over the
full stage count is a start from which Newton converges in a few iterations. This is
continuation in the stage count, a standard device for long columns (e.g. Seader & Henley,
*Separation Process Principles*, 2nd ed., 2006, sec. 10.4 on initial estimates; Kister,
*Distillation Design*, 1992, ch. 4).

What is kept: every stage that carries something -- the condenser and reboiler, each feed,
side draw, side heater or cooler, each stage named by a stage-temperature spec -- and its two
neighbours ("anchor" stages) map one to one; the runs of plain stages between anchors are
shortened by ``ratio`` (runs of two or fewer stay as they are). The shortened column keeps the
top and bottom pressures (the profile is interpolated at the kept stages' positions) and the
Murphree efficiencies of the stages it keeps.

Positions: every stage of the shortened column has a position on the full column's stage
numbering (anchors at their own numbers, the shortened runs evenly spread between them); the
start of the full column (a :class:`~solver.streams.StageProfile`) interpolates the shortened
solution's temperatures and the logarithms of its component flows at the full column's stage
numbers.
"""

from __future__ import annotations

import dataclasses
from typing import Mapping

import numpy as np

from .case import Case, Column
from .streams import StageProfile

__all__ = ["MIN_STAGES", "anchor_stages", "column_at_positions", "shortened_case", "stretch_profile", "stretched_start"]

#: Columns with fewer stages are not shortened.
MIN_STAGES = 30


def anchor_stages(case: Case) -> list[int]:
    """The stage numbers (1-based, sorted) that map one to one between the full and the
    shortened column: ends, stages with a feed, draw, side duty or stage spec, and their
    neighbours."""
    N = case.column.stages
    special = {1, N}
    special.update(feed.stage for feed in case.feeds)
    special.update(draw.stage for draw in case.column.side_draws)
    special.update(duty.stage for duty in case.column.stage_duties)
    special.update(spec.stage for spec in case.specs if spec.stage is not None)
    anchors = set()
    for stage in special:
        anchors.update(s for s in (stage - 1, stage, stage + 1) if 1 <= s <= N)
    return sorted(anchors)


def shortened_case(case: Case, ratio: float = 0.5) -> tuple[Case, np.ndarray]:
    """The case with every run of plain stages between anchors shortened by ``ratio`` (0 < ratio
    < 1), and the position of each of its stages on the full column's numbering (float array,
    increasing, anchors exact)."""
    if not 0.0 < ratio < 1.0:
        raise ValueError(f"a shortening ratio lies between 0 and 1, not {ratio}")
    anchors = anchor_stages(case)
    positions: list[float] = [float(anchors[0])]
    for a, b in zip(anchors[:-1], anchors[1:]):
        interior = b - a - 1
        kept = interior if interior <= 2 else max(2, int(round(interior * ratio)))
        positions.extend(a + (b - a) * (i + 1) / (kept + 1) for i in range(kept))
        positions.append(float(b))
    positions_array = np.array(positions)
    new_number = {old: int(np.flatnonzero(positions_array == old)[0]) + 1 for old in anchors}

    short_column = column_at_positions(case.column, positions_array, new_number)
    short = dataclasses.replace(
        case,
        title=f"{case.title} (shortened to {len(positions)} stages)",
        column=short_column,
        feeds=tuple(dataclasses.replace(f, stage=new_number[f.stage]) for f in case.feeds),
        specs=tuple(
            dataclasses.replace(s, stage=new_number[s.stage]) if s.stage is not None else s for s in case.specs
        ),
    )
    return short, positions_array


def column_at_positions(column: Column, positions: np.ndarray, new_number: Mapping[int, int]) -> Column:
    """``column`` with its stages at ``positions`` (increasing, on its own 1-based numbering):
    pressures interpolated, each stage's Murphree efficiency that of the nearest full stage,
    side draws and side duties moved to their stages' new numbers (``new_number[old]``)."""
    full = np.arange(1, column.stages + 1, dtype=float)
    nearest = np.rint(positions).astype(int) - 1
    return dataclasses.replace(
        column,
        stages=len(positions),
        pressures=tuple(float(p) for p in np.interp(positions, full, np.asarray(column.pressures))),
        efficiencies=tuple(float(column.efficiencies[k]) for k in nearest),
        side_draws=tuple(dataclasses.replace(d, stage=new_number[d.stage]) for d in column.side_draws),
        stage_duties=tuple(dataclasses.replace(d, stage=new_number[d.stage]) for d in column.stage_duties),
    )


def stretch_profile(profile: StageProfile, at: np.ndarray) -> StageProfile:
    """The profile of a column whose stages sit at the fractional stage numbers ``at``
    (1-based) of ``profile``'s column: temperatures and pressures interpolated linearly,
    component flows in their logarithms (a flow that is zero at both neighbours stays zero)."""
    numbers = np.arange(1, profile.stage_count + 1, dtype=float)

    def stretch(flows: np.ndarray) -> np.ndarray:
        columns = []
        for k in range(flows.shape[1]):
            logs = np.interp(at, numbers, np.log(np.maximum(flows[:, k], 1e-300)))
            zero = np.interp(at, numbers, (flows[:, k] <= 0.0).astype(float)) >= 1.0
            columns.append(np.where(zero, 0.0, np.exp(logs)))
        return np.column_stack(columns)

    return StageProfile.from_component_flows(
        np.interp(at, numbers, profile.temperature),
        np.interp(at, numbers, profile.pressure),
        stretch(profile.liquid_component_flows),
        stretch(profile.vapor_component_flows),
    )


def stretched_start(short: StageProfile, positions: np.ndarray, stages: int) -> StageProfile:
    """The start of the full column (``stages`` stages) from the profile ``short`` of the
    shortened column whose stages sit at ``positions`` on the full numbering (see
    :func:`stretch_profile`)."""
    at = np.interp(np.arange(1, stages + 1, dtype=float), positions, np.arange(1, len(positions) + 1, dtype=float))
    return stretch_profile(short, at)
