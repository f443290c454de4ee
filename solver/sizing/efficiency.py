"""Real trays from theoretical stages: O'Connell's overall tray efficiency.

O'Connell (1946, Trans. AIChE 42, 741) correlated the overall efficiency of 31 plant columns
(bubble-cap trays; slightly conservative for sieve and valve trays) with the product of the key
components' relative volatility and the liquid viscosity (mPa s), both at the arithmetic mean of
the column's top and bottom temperatures, the viscosity that of the feed's liquid (Kister,
*Distillation Design*, 1992, sec. 7.3). Lockett (*Distillation Tray Fundamentals*, Cambridge
University Press, 1986) put the chart in equation form, ``E_o = 0.492 (alpha mu_L)^-0.245``
(from memory), used here. The chart spans ``alpha mu_L`` from about 0.1 to 7.5; outside it the
efficiency is an extrapolation and the record says so.

Real trays of a section = its theoretical trays / E_o, rounded up (a partial reboiler and the
condenser are stages of their own, not trays).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

__all__ = ["CORRELATED_RANGE", "OverallEfficiency", "oconnell_efficiency", "real_trays"]

#: The range of alpha * mu (mPa s) O'Connell's data cover.
CORRELATED_RANGE = (0.1, 7.5)


@dataclass(frozen=True)
class OverallEfficiency:
    """O'Connell's overall efficiency ``value`` from the key ``relative_volatility`` and the
    feed liquid's ``viscosity`` (Pa s) at the mean ``temperature`` (K); ``in_range`` False when
    alpha mu lies outside the correlated range."""

    value: float
    relative_volatility: float
    viscosity: float
    temperature: float
    light_key: str
    heavy_key: str

    @property
    def alpha_mu(self) -> float:
        return self.relative_volatility * self.viscosity * 1000.0

    @property
    def in_range(self) -> bool:
        return CORRELATED_RANGE[0] <= self.alpha_mu <= CORRELATED_RANGE[1]


def oconnell_efficiency(relative_volatility: float | np.ndarray, viscosity: float | np.ndarray) -> float | np.ndarray:
    """``E_o = 0.492 (alpha mu)^-0.245`` with ``mu`` in Pa s (converted to mPa s), capped at 1."""
    value = 0.492 * (np.asarray(relative_volatility) * 1000.0 * np.asarray(viscosity)) ** -0.245
    value = np.minimum(value, 1.0)
    return float(value) if np.ndim(value) == 0 else value


def real_trays(theoretical_trays: float, efficiency: float) -> int:
    """Real trays for ``theoretical_trays`` at an overall ``efficiency``, rounded up."""
    if theoretical_trays <= 0:
        return 0
    return int(math.ceil(theoretical_trays / efficiency - 1e-9))
