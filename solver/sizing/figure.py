"""The sizing's figure: the fraction of flood of every tray or packed stage -- the rigorous
traffic in the column as sized (or rated), and in the column the CMO traffic of the shortcut
design would have sized -- with the design fraction and the flag threshold marked."""

from __future__ import annotations

from pathlib import Path

import numpy as np

from matplotlib.figure import Figure

from ..plots import stage_axis, new_figure, save_figure
from ..results import Result
from .column import ColumnSizing

__all__ = ["FLOOD_FIGURE", "flood_figure", "flood_profile", "write_flood_figure"]

#: File name of the figure in an output folder.
FLOOD_FIGURE = "flood.png"


def flood_profile(sizing: ColumnSizing, stage_count: int, path: Path, title: str = "") -> Path:
    """:func:`flood_figure` written to ``path``."""
    return save_figure(flood_figure(sizing, stage_count, title), path)


def flood_figure(sizing: ColumnSizing, stage_count: int, title: str = "") -> Figure:
    """Percent of flood per stage (horizontal) against stage number (vertical, top first)."""
    stages = sizing.stages
    figure, ax = new_figure((5.5, 6))
    ax.plot(100 * sizing.rating.fraction_of_flood, stages, "o-", color="tab:blue", markersize=3,
            label="rigorous traffic, column as " + ("rated" if sizing.options.diameter else "sized"))
    if sizing.cmo_column_rating is not None:
        ax.plot(100 * sizing.cmo_column_rating.fraction_of_flood, stages, "s--", color="tab:red", markersize=3,
                label="rigorous traffic, column sized by the CMO traffic")
    ax.axvline(100 * sizing.options.flood_fraction, color="0.4", linewidth=0.8, linestyle=":", label="design")
    ax.axvline(100 * sizing.options.thresholds["flood"], color="tab:orange", linewidth=0.8, label="flag threshold")
    for section in sizing.sections[1:]:
        ax.axhline(section.section.first - 0.5, color="0.7", linewidth=0.6)
    ax.set_xlabel("% of flood")
    ax.set_xlim(0, max(110.0, float(np.nanmax(100 * sizing.rating.fraction_of_flood)) + 5))
    stage_axis(ax, stage_count)
    ax.legend(loc="best", fontsize=8)
    ax.set_title(title or "fraction of flood per stage", fontsize=9)
    return figure


def write_flood_figure(result: Result, folder: Path) -> list[Path]:
    """[the figure written in ``folder``] for a result with a sizing attached, else []."""
    sizing = result.extra.get("sizing")
    if sizing is None:
        return []
    return [flood_profile(sizing, result.stage_count, folder / FLOOD_FIGURE, f"% of flood: {result.title}")]
