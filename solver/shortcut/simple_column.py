"""What every shortcut design takes from a case before its own method: the simple column it
treats (one feed, a condenser and a partial reboiler, no side draws), the feed's thermal
condition q from its rigorous enthalpy, and the specs in words for messages and notes.
"""

from __future__ import annotations

import numpy as np

from ..case import Case, Spec
from ..errors import SpecError
from ..thermo.flash import FeedState, feed_state
from ..thermo.package import ThermoPackage

__all__ = ["check_simple_column", "describe_spec", "feed_condition"]


def describe_spec(spec: Spec) -> str:
    """A spec in words, with its key path in the case file."""
    key = f" ({spec.key})" if spec.key else ""
    if spec.kind == "mole_fraction":
        return f"{spec.product} mole fraction of {spec.component} = {spec.value:.6g}{key}"
    if spec.kind == "recovery":
        return f"recovery of {spec.component} in the {spec.product} = {spec.value:.6g}{key}"
    return f"{spec.kind} = {spec.value:.6g}{key}"


def check_simple_column(case: Case, method: str) -> list[str]:
    """The shortcuts treat one feed, a condenser and a partial reboiler, no side draws; side
    heaters are left out with a note (returned)."""
    column = case.column
    where = case.source_file or "<case>"
    rigorous = "; `traystack run` solves such a column rigorously, the shortcut comparison needs a simple one"
    if len(case.feeds) != 1:
        raise SpecError(f"{where}: feeds: the {method} shortcut handles one feed; this case has {len(case.feeds)}{rigorous}")
    if column.condenser not in ("total", "partial") or column.reboiler != "partial":
        raise SpecError(
            f"{where}: column: the {method} shortcut needs a condenser (total or partial) and a partial reboiler; "
            f"this column has condenser = {column.condenser!r}, reboiler = {column.reboiler!r}{rigorous}"
        )
    if column.side_draws:
        raise SpecError(
            f"{where}: column.side_draws: the {method} shortcut handles no side draws; this column has "
            f"{len(column.side_draws)}{rigorous}"
        )
    notes = []
    if column.stage_duties:
        notes.append(f"{len(column.stage_duties)} side heater(s)/cooler(s) of the case are not in the shortcut")
    if any(efficiency < 1.0 for efficiency in column.efficiencies):
        notes.append("the shortcut counts equilibrium stages; the case's Murphree efficiencies are not applied")
    return notes


def feed_condition(case: Case, thermo: ThermoPackage) -> FeedState:
    """The case's single feed flashed at its own pressure, q judged at its stage's pressure (as
    :func:`solver.engine.flash_feeds` does)."""
    feed = case.feeds[0]
    stage_pressure = case.feed_stage_pressure(0)
    pressure = feed.pressure if feed.pressure is not None else stage_pressure
    return feed_state(
        thermo, np.asarray(feed.composition, dtype=float), pressure,
        temperature=feed.temperature, vapor_fraction=feed.vapor_fraction, reference_pressure=stage_pressure,
    )
