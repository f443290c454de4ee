"""The feeds as they enter their stages: each flashed at its own temperature (or vapor
fraction) and pressure, q judged at its stage's pressure (used by one column and by a network)."""

from __future__ import annotations

from typing import Sequence

import numpy as np

from .case import Feed
from .errors import ThermoError
from .streams import FlashedFeed
from .thermo.flash import feed_state, feed_state_by_phase

__all__ = ["flash_feed_list"]


def flash_feed_list(feeds: Sequence[Feed], thermo, stage_pressures: Sequence[float],
                    source_file: str = "") -> tuple[FlashedFeed, ...]:
    """Flash each feed at its own temperature (or vapor fraction) and pressure, q judged at its
    stage's pressure; the energy balance takes its rigorous enthalpy, or ``(1 - q) lambda``
    under the ``cmo`` model. In the case's order. A feed that cannot be flashed is a
    :class:`ThermoError` naming ``source_file`` and the feed."""
    flashed = []
    for index, (feed, stage_pressure) in enumerate(zip(feeds, stage_pressures)):
        pressure = feed.pressure if feed.pressure is not None else stage_pressure
        try:
            state = feed_state(
                thermo,
                np.asarray(feed.composition),
                pressure,
                temperature=feed.temperature,
                vapor_fraction=feed.vapor_fraction,
                reference_pressure=stage_pressure,
            )
        except ThermoError as exc:
            if thermo.enthalpy_model != "cmo":
                raise _at_feed(exc, index, feed, source_file) from exc
            state = feed_state_by_phase(
                thermo, np.asarray(feed.composition), pressure,
                temperature=feed.temperature, vapor_fraction=feed.vapor_fraction,
            )
        if thermo.enthalpy_model == "cmo":
            enthalpy = (1.0 - state.q) * thermo.cmo_latent_heat
        else:
            enthalpy = state.enthalpy
        flashed.append(
            FlashedFeed(
                stage=feed.stage, flow=feed.flow, z=tuple(np.asarray(feed.composition, dtype=float).tolist()), h=enthalpy,
                q=state.q, name=feed.name, temperature=state.temperature, pressure=pressure,
                vapor_fraction=state.vapor_fraction,
            )
        )
    return tuple(flashed)


def _at_feed(error: ThermoError, index: int, feed: Feed, source_file: str) -> ThermoError:
    """``error`` with the file and the feed it concerns named in front."""
    where = f"{source_file}: " if source_file else ""
    name = f" ({feed.name})" if feed.name else ""
    return ThermoError(f"{where}feeds[{index}]{name}, stage {feed.stage}: {error}")
