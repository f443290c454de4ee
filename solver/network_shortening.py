"""A shorter network first: the start of a column network from the solution of the same network
with every column shortened.

The network form of :mod:`solver.shortening` (continuation in the stage count, e.g. Seader &
Henley, *Separation Process Principles*, 2nd ed., 2006, sec. 10.4 on initial estimates): in each
column the special stages -- the condenser and reboiler (its ends), each feed, side draw, side
heater or cooler, each end of a connection and each stage a stage-temperature spec names -- map
one to one, and every section of plain stages between two of them is scaled down by ``ratio``,
keeping at least one stage. The shortened columns keep their top and bottom pressures (the
profile interpolated at the kept stages' positions) and the Murphree efficiencies of the stages
they keep.

Back on the full network, each column's temperatures are interpolated linearly and its
component flows in their logarithms at the full column's stage numbers
(:func:`solver.shortening.stretch_profile`); duties, connection rates and free feed rates are
taken as they are.
"""

from __future__ import annotations

import dataclasses
from typing import Mapping

import numpy as np

from .case import Case, Column
from .network_mesh import NetworkSystem
from .network_results import NetworkResult
from .network_unknowns import NetworkStart, network_start, scaled_start
from .shortening import column_at_positions, stretch_profile
from .streams import StageProfile

__all__ = ["network_special_stages", "shortened_network", "stretched_network_start"]


def network_special_stages(case: Case, name: str) -> list[int]:
    """The special stages (1-based, sorted) of column ``name`` of the network ``case``."""
    network = case.network
    section = network.section(name)
    column = section.column
    special = {1, column.stages}
    special.update(feed.stage for feed, owner in zip(case.feeds, network.feed_columns) if owner == name)
    special.update(draw.stage for draw in column.side_draws)
    special.update(duty.stage for duty in column.stage_duties)
    special.update(spec.stage for spec in section.specs if spec.stage is not None)
    special.update(spec.stage for spec in network.specs if spec.column == name and spec.stage is not None)
    for c in network.connections:
        if c.from_column == name:
            special.add(c.from_stage)
        if c.to_column == name:
            special.add(c.to_stage)
    return sorted(special)


def _shortened_column(column: Column, special: list[int], ratio: float) -> tuple[Column, np.ndarray, dict[int, int]]:
    """The column with its sections of plain stages scaled by ``ratio`` (at least one stage
    each), the positions of its stages on the full numbering, and each special stage's new number."""
    positions: list[float] = [float(special[0])]
    for a, b in zip(special[:-1], special[1:]):
        interior = b - a - 1
        kept = max(1, int(round(interior * ratio))) if interior > 0 else 0
        positions.extend(a + (b - a) * (i + 1) / (kept + 1) for i in range(kept))
        positions.append(float(b))
    at = np.array(positions)
    number = {old: int(np.flatnonzero(at == old)[0]) + 1 for old in special}
    short = column_at_positions(column, at, number)
    return short, at, number


def shortened_network(case: Case, ratio: float = 0.5) -> tuple[Case, dict[str, np.ndarray]]:
    """The network ``case`` with every column's sections of plain stages scaled by ``ratio``
    (0 < ratio < 1), and by column name the positions of its stages on the full column's
    numbering (increasing, special stages exact)."""
    if not 0.0 < ratio < 1.0:
        raise ValueError(f"a shortening ratio lies between 0 and 1, not {ratio}")
    network = case.network
    sections, positions, numbers = [], {}, {}
    for section in network.columns:
        column, positions[section.name], numbers[section.name] = _shortened_column(
            section.column, network_special_stages(case, section.name), ratio)
        new = numbers[section.name]
        specs = tuple(dataclasses.replace(s, stage=new[s.stage]) if s.stage is not None else s for s in section.specs)
        sections.append(dataclasses.replace(section, column=column, specs=specs))
    short_network = dataclasses.replace(
        network, columns=tuple(sections),
        connections=tuple(dataclasses.replace(c, from_stage=numbers[c.from_column][c.from_stage],
                                              to_stage=numbers[c.to_column][c.to_stage]) for c in network.connections),
        specs=tuple(dataclasses.replace(s, stage=numbers[s.column][s.stage]) if s.stage is not None else s
                    for s in network.specs),
    )
    feeds = tuple(dataclasses.replace(f, stage=numbers[owner][f.stage]) for f, owner in zip(case.feeds, network.feed_columns))
    total = sum(len(p) for p in positions.values())
    short = dataclasses.replace(case, title=f"{case.title} (shortened to {total} stages)", network=short_network, feeds=feeds)
    return short, positions


def stretched_network_start(short: NetworkResult, positions: Mapping[str, np.ndarray], system: NetworkSystem) -> np.ndarray | None:
    """The scaled unknowns of the full network ``system`` from the solution ``short`` of its
    shortened form (whose column ``name``'s stages sit at ``positions[name]`` of the full
    numbering): each column stretched section by section, duties and rates as they are."""
    solved = network_start(short)
    temperature, liquid, vapor = [], [], []
    for name, at in positions.items():
        stages = short.column_stages(name)
        profile = StageProfile.from_component_flows(solved.temperature[stages], short.pressure[stages],
                                                    solved.liquid[stages], solved.vapor[stages])
        full = np.arange(1, int(round(at[-1])) + 1, dtype=float)
        stretched = stretch_profile(profile, np.interp(full, at, np.arange(1, len(at) + 1, dtype=float)))
        temperature.append(stretched.temperature)
        liquid.append(stretched.liquid_component_flows)
        vapor.append(stretched.vapor_component_flows)
    start = NetworkStart(np.concatenate(temperature), np.vstack(liquid), np.vstack(vapor), solved.duties, solved.rates,
                         solved.feed_rates)
    return scaled_start(system, start)
