"""The key components of a solved column and its overall tray efficiency by O'Connell's
correlation (:mod:`.efficiency`).

The light key is the heaviest component that goes mostly to the distillate, the heavy key the
lightest that goes mostly to the bottoms (by K-value at the mean column temperature; e.g.
Seader and Henley, *Separation Process Principles*, 2nd ed., 2006, sec. 9.1). Their relative
volatility is taken at the arithmetic mean of the top and bottom temperatures and the mean
pressure, with the feed's composition as the liquid (activity coefficients included); the
viscosity is the feed liquid's at that temperature (Kister, *Distillation Design*, 1992,
sec. 7.3).
"""

from __future__ import annotations

import numpy as np

from ..case import Case
from ..results import Result
from ..thermo.package import ThermoPackage
from .efficiency import OverallEfficiency, oconnell_efficiency
from .liquids import PureLiquids
from .mixtures import liquid_viscosity

__all__ = ["column_efficiency", "key_components"]


def key_components(result: Result, K: np.ndarray) -> tuple[int, int] | None:
    """(light key, heavy key) indices of ``result`` from the component K-values ``K`` (c,);
    None when no component goes mostly to each product."""
    top = result.distillate_flow * result.distillate_composition
    bottom = result.bottoms_flow * result.bottoms_composition
    to_top = top > bottom
    order = np.argsort(-K)  # lightest first
    lights = [int(i) for i in order if to_top[i]]
    heavies = [int(i) for i in order if not to_top[i]]
    if not lights or not heavies:
        return None
    return lights[-1], heavies[0]


def column_efficiency(case: Case, result: Result, thermo: ThermoPackage,
                      liquids: PureLiquids) -> tuple[OverallEfficiency | None, str]:
    """O'Connell's overall efficiency of the column of ``result`` and a note (why none, or
    that it is extrapolated)."""
    feeds = [feed for stage in result.stage_feeds for feed in stage]
    if not feeds:
        return None, "no feed"
    flows = np.array([feed.flow for feed in feeds])
    z = (flows[:, None] * np.array([feed.z for feed in feeds])).sum(axis=0) / flows.sum()
    T = np.array([0.5 * (result.temperature[0] + result.temperature[-1])])
    P = np.array([float(np.mean(result.pressure))])
    K = thermo.k_values(T, P, z[None, :], derivatives=False).K[0]
    keys = key_components(result, K)
    if keys is None:
        return None, "no pair of key components splits between the products"
    light, heavy = keys
    viscosity = float(liquid_viscosity(z[None, :], liquids.viscosity(T))[0])
    if not np.isfinite(viscosity):
        return None, "the feed liquid's viscosity is not known"
    alpha = float(K[light] / K[heavy])
    efficiency = OverallEfficiency(float(oconnell_efficiency(alpha, viscosity)), alpha, viscosity, float(T[0]),
                                   result.components[light], result.components[heavy])
    note = "" if efficiency.in_range else (f"alpha mu = {efficiency.alpha_mu:.3g} mPa s lies outside O'Connell's data "
                                           "(0.1 to 7.5): the efficiency is extrapolated")
    return efficiency, note
