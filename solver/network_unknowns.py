"""A solved network's unknowns in SI, and the same unknowns scaled for another network system:
what a network restarts from (a neighbour in a study, a shortened network's solution)."""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Mapping

import numpy as np

from .network_mesh import NetworkSystem
from .network_results import NetworkResult

__all__ = ["NetworkStart", "network_start", "scaled_start"]


@dataclass(frozen=True)
class NetworkStart:
    """A converged network's unknowns in SI: temperatures (K), liquid and vapor component flows
    (mol/s) of every stage's slots, the duties (W) and connection rates (mol/s) by name, and
    the feeds' rates (mol/s) by name (a free feed's as solved)."""

    temperature: np.ndarray
    liquid: np.ndarray
    vapor: np.ndarray
    duties: Mapping[str, float]
    rates: Mapping[str, float]
    feed_rates: Mapping[str, float] = field(default_factory=dict)


def network_start(result: NetworkResult) -> NetworkStart:
    """The unknowns of a solved network, in SI (see :class:`NetworkStart`)."""
    return NetworkStart(result.temperature.copy(), result.liquid_flow[:, None] * result.x, result.vapor_flow[:, None] * result.y,
                        dict(result.duties), {name: c["flow"] for name, c in result.connections.items()},
                        {feed.name: feed.flow for feeds in result.stage_feeds for feed in feeds if feed.name})


def scaled_start(system: NetworkSystem, start: NetworkStart) -> np.ndarray | None:
    """``start`` as the scaled unknowns of ``system``; None when the networks differ (stage
    count, or an extra unknown ``start`` does not hold)."""
    if len(start.temperature) != system.N:
        return None
    fs, fe = system.flow_scale, system.flow_scale * system.energy_scale
    extras = []
    for name in system.extra_names:
        owner, _, what = name.rpartition(".")
        if what == "rate" and owner in start.rates:
            extras.append(start.rates[owner] / fs)
        elif what == "duty" and owner in start.duties:
            extras.append(start.duties[owner] / fe)
        elif what == "feed_rate" and owner in start.feed_rates:
            extras.append(start.feed_rates[owner] / fs)
        elif name in start.duties:
            extras.append(start.duties[name] / fe)
        else:
            return None
    return system.pack(start.temperature, start.liquid / fs, start.vapor / fs, extras)
