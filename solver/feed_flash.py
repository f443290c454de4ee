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


def flash_feed_list(feeds: Sequence[Feed], thermo, stage_pressures: Sequence[float]) -> tuple[FlashedFeed, ...]:
    """Flash each feed at its own temperature (or vapor fraction) and pressure, q judged at its
    stage's pressure; the energy balance takes its rigorous enthalpy, or ``(1 - q) lambda``
    under the ``cmo`` model. In the case's order."""
    flashed = []
    for feed, stage_pressure in zip(feeds, stage_pressures):
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
        except ThermoError:
            if thermo.enthalpy_model != "cmo":
                raise
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
