"""The sizing's flags, one constructor per code, each None when its measure stays within its
threshold (``[sizing] thresholds``, :data:`~solver.case.sizing_table.DEFAULT_SIZING_THRESHOLDS`).

* ``CMO_UNDERSIZED``: the CMO traffic of the shortcut design sizes a section smaller than the
  rigorous traffic needs, by more than ``cmo_diameter`` (5 %: about the margin between a design
  at 80 % of flood and the 85 % a designer accepts, common practice); serious beyond three
  times it.
* ``NEAR_FLOOD``: a stage runs above ``flood`` of its flooding capacity (85 %: columns are
  designed for 80 to 85 % of flood, Perry's 8th ed. sec. 14, common practice) -- in the column
  as sized or rated, or in the column the CMO traffic would have sized; serious at flood.

Numbers are SI.
"""

from __future__ import annotations

from typing import Mapping

import numpy as np

from ..audit.flags import Flag
from ..audit.thresholds import DEFAULT_THRESHOLDS, severity_of
from .traffic import Section

__all__ = ["cmo_undersized", "near_flood"]

_SERIOUS = DEFAULT_THRESHOLDS["serious_factor"]


def cmo_undersized(section: Section, rigorous: float, cmo: float, rigorous_stage: int, cmo_stage: int,
                   flood_in_cmo_column: float, flood_stage: int, thresholds: Mapping[str, float]) -> Flag | None:
    """CMO_UNDERSIZED: the ``section``'s CMO-sized diameter ``cmo`` (m) is smaller than the
    rigorous ``rigorous`` (m) by more than the threshold; ``flood_in_cmo_column`` is the
    largest fraction of flood of the rigorous traffic in the CMO-sized section (at
    ``flood_stage``)."""
    shortfall = 1.0 - cmo / rigorous
    if not shortfall > 0.0:
        return None
    severity = severity_of(shortfall, thresholds["cmo_diameter"], _SERIOUS)
    if severity is None:
        return None
    return Flag(
        "CMO_UNDERSIZED", severity,
        f"{section.name} section (stages {section.first}-{section.last}): the rigorous traffic needs {rigorous:.3g} m "
        f"(set by stage {rigorous_stage}), the CMO traffic of the shortcut design sizes it at {cmo:.3g} m (stage "
        f"{cmo_stage}), {100 * shortfall:.1f} % smaller (threshold {100 * thresholds['cmo_diameter']:.3g} %); built "
        f"to the CMO size, stage {flood_stage} would run at {100 * flood_in_cmo_column:.0f} % of flood",
        {"section": section.name, "first_stage": section.first, "last_stage": section.last,
         "rigorous_diameter": rigorous, "cmo_diameter": cmo, "shortfall": shortfall, "rigorous_stage": rigorous_stage,
         "cmo_stage": cmo_stage, "fraction_of_flood_in_cmo_column": flood_in_cmo_column,
         "flood_stage": flood_stage, "threshold": thresholds["cmo_diameter"]},
    )


def near_flood(where: str, stages: np.ndarray, fractions: np.ndarray, thresholds: Mapping[str, float]) -> Flag | None:
    """NEAR_FLOOD: stages of the column ``where`` describes ("the column as sized", "the
    CMO-sized column") above the flood threshold; serious when one is at or beyond flood."""
    limit = thresholds["flood"]
    over = np.flatnonzero(np.asarray(fractions) > limit)
    if over.size == 0:
        return None
    worst = int(over[np.argmax(np.asarray(fractions)[over])])
    value = float(fractions[worst])
    listed = ", ".join(str(int(stages[k])) for k in over)
    return Flag(
        "NEAR_FLOOD", "serious" if value >= 1.0 else "warning",
        f"in {where} the rigorous traffic runs stage(s) {listed} above {100 * limit:.0f} % of flood; the worst, stage "
        f"{int(stages[worst])}, at {100 * value:.0f} %",
        {"where": where, "stages": [int(stages[k]) for k in over], "largest_fraction_of_flood": value,
         "stage": int(stages[worst]), "threshold": limit},
    )
