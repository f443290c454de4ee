"""The stage count and feed location of a shortcut design.

* **Gilliland**'s correlation (Ind. Eng. Chem. 32 (1940) 1220) of the stages at a reflux
  ratio, in the form fitted by Molokanov, Korablina, Mazurina & Nikiforov (Int. Chem. Eng. 12
  (1972) 209): ``Y = 1 - exp[(1 + 54.4 X)/(11 + 117.2 X) (X - 1)/sqrt(X)]`` with
  ``X = (R - R_min)/(R + 1)`` and ``Y = (N - N_min)/(N + 1)``.
* **Kirkbride**'s feed location (Petroleum Refiner 23(9) (1944) 321):
  ``N_R / N_S = [(B/D) (z_HK / z_LK) (x_LK,B / x_HK,D)^2]^0.206``, N_R equilibrium stages above
  the feed stage and N_S from the feed stage down (reboiler included).

Stage counts are equilibrium stages, a partial reboiler (and a partial condenser) included.
"""

from __future__ import annotations

import numpy as np

from ..errors import SpecError

__all__ = ["KIRKBRIDE_EXPONENT", "gilliland_molokanov", "gilliland_stages", "kirkbride_ratio"]

#: Exponent of Kirkbride's (1944) feed-location equation.
KIRKBRIDE_EXPONENT = 0.206


def gilliland_molokanov(X):
    """Gilliland's (1940) correlation as fitted by Molokanov et al. (1972):
    ``Y = 1 - exp[(1 + 54.4 X)/(11 + 117.2 X) (X - 1)/sqrt(X)]``, X = (R - R_min)/(R + 1) in
    (0, 1], Y = (N - N_min)/(N + 1)."""
    X = np.asarray(X, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        Y = 1.0 - np.exp((1.0 + 54.4 * X) / (11.0 + 117.2 * X) * (X - 1.0) / np.sqrt(X))
    return np.where(X <= 0.0, 1.0, Y)


def gilliland_stages(minimum_stages: float, minimum_reflux: float, reflux_ratio: float) -> float:
    """Equilibrium stages at ``reflux_ratio`` from the Gilliland-Molokanov correlation,
    ``N = (N_min + Y) / (1 - Y)``."""
    if not reflux_ratio > minimum_reflux:
        raise SpecError(
            f"reflux ratio {reflux_ratio:.6g} is not above the minimum reflux ratio {minimum_reflux:.6g}: "
            "no number of stages meets the specifications"
        )
    X = (reflux_ratio - minimum_reflux) / (reflux_ratio + 1.0)
    Y = float(gilliland_molokanov(X))
    return (minimum_stages + Y) / (1.0 - Y)


def kirkbride_ratio(
    bottoms_to_distillate: float,
    z_heavy_key: float,
    z_light_key: float,
    x_light_key_bottoms: float,
    x_heavy_key_distillate: float,
) -> float:
    """Kirkbride (1944): ``N_R / N_S = [(B/D)(z_HK/z_LK)(x_LK,B/x_HK,D)^2]^0.206``."""
    return float(
        (bottoms_to_distillate * (z_heavy_key / z_light_key) * (x_light_key_bottoms / x_heavy_key_distillate) ** 2)
        ** KIRKBRIDE_EXPONENT
    )
