"""Fenske's equation (Ind. Eng. Chem. 24 (1932) 482): minimum equilibrium stages at total reflux
and the product split it gives.

* ``N_min = ln[(d/b)_LK / (d/b)_HK] / ln alpha_LK,HK`` from the keys' distillate-to-bottoms
  ratios and their relative volatility;
* every component distributed at total reflux, ``(d/b)_i = (d/b)_HK alpha_i^N_min`` (alpha
  relative to the heavy key);
* the split that meets two product specs (mole fractions, recoveries or product rates of any
  components): the keys' ``ln(d/b)`` solved so that the Fenske distribution of the whole feed
  meets both (Powell's hybrid method, scipy's ``root``). Working in ``ln(d/b)`` and log-sums
  keeps trace components and sharp splits exact.

Flows mol/s.
"""

from __future__ import annotations

from typing import NamedTuple, Sequence

import numpy as np
from scipy.optimize import root
from scipy.special import expit, log_expit, logit, logsumexp

from ..case import Spec
from ..errors import SpecError
from ..spec_kinds import COLUMN_SPEC_KINDS
from .simple_column import describe_spec

__all__ = ["FenskeSplit", "fenske_distribution", "fenske_minimum_stages", "fenske_split"]


def fenske_minimum_stages(relative_volatility: float, light_key_ratio: float, heavy_key_ratio: float) -> float:
    """Fenske (1932): minimum equilibrium stages ``ln[(d/b)_LK / (d/b)_HK] / ln alpha_LK,HK``
    from the keys' distillate-to-bottoms ratios and their relative volatility."""
    if not relative_volatility > 1.0:
        raise SpecError(f"the light key must be more volatile than the heavy key (alpha_LK,HK = {relative_volatility:.6g})")
    return float(np.log(light_key_ratio / heavy_key_ratio) / np.log(relative_volatility))


def fenske_distribution(
    relative_volatility, feed_flows, minimum_stages: float, heavy_key_ratio: float
) -> tuple[np.ndarray, np.ndarray]:
    """Distillate and bottoms component flows at total reflux, ``(d/b)_i = (d/b)_HK
    alpha_i^N_min`` with ``relative_volatility`` relative to the heavy key (Fenske 1932)."""
    alpha = np.asarray(relative_volatility, dtype=float)
    feed_flows = np.asarray(feed_flows, dtype=float)
    ln_ratio = np.log(heavy_key_ratio) + minimum_stages * np.log(alpha)
    return feed_flows * expit(ln_ratio), feed_flows * expit(-ln_ratio)


def _spec_residuals(key_ln_ratios, specs, names, feed_flows, ln_alpha, light, heavy):
    """Residuals of the two product specs for the keys' ``ln(d/b)`` (LK, HK), every component
    distributed by Fenske; also N_min and every component's ``ln(d/b)``."""
    light_ln_ratio, heavy_ln_ratio = key_ln_ratios
    minimum_stages = (light_ln_ratio - heavy_ln_ratio) / (ln_alpha[light] - ln_alpha[heavy])
    ln_ratio = heavy_ln_ratio + minimum_stages * (ln_alpha - ln_alpha[heavy])
    with np.errstate(divide="ignore"):
        ln_feed = np.log(feed_flows)
    ln_d = ln_feed + log_expit(ln_ratio)
    ln_b = ln_feed + log_expit(-ln_ratio)
    ln_D, ln_B = logsumexp(ln_d), logsumexp(ln_b)
    residuals = []
    for spec in specs:
        entry = COLUMN_SPEC_KINDS[spec.kind]
        product = entry.product or spec.product
        if entry.row_kind == "product_flow":
            residuals.append((ln_D if product == "distillate" else ln_B) - np.log(spec.value))
            continue
        i = names.index(spec.component)
        target = logit(spec.value)
        mine, theirs = (ln_d, ln_b) if product == "distillate" else (ln_b, ln_d)
        if entry.row_kind == "mole_fraction":
            residuals.append(mine[i] - logsumexp(np.delete(mine, i)) - target)
        else:  # recovery
            residuals.append(mine[i] - theirs[i] - target)
    return np.array(residuals), minimum_stages, ln_ratio


class FenskeSplit(NamedTuple):
    """A Fenske split meeting two product specs: the keys' ``ln(d/b)`` (LK, HK), Fenske's N_min
    and the component flows (mol/s) of both products."""

    key_ln_ratios: np.ndarray
    minimum_stages: float
    distillate_flows: np.ndarray
    bottoms_flows: np.ndarray


def fenske_split(
    specs: Sequence[Spec], names: Sequence[str], feed_flows: np.ndarray, relative_volatility: np.ndarray, light: int,
    heavy: int, start: np.ndarray,
) -> FenskeSplit:
    """The Fenske distribution of ``feed_flows`` (mol/s) that meets the two product ``specs``,
    ``relative_volatility`` relative to the heavy key, solved from ``start`` (the keys'
    ``ln(d/b)``). Raises :class:`SpecError` when the specs cannot be met or ask for no
    separation of the keys."""
    ln_alpha = np.log(relative_volatility)

    def residuals(key_ln_ratios):
        return _spec_residuals(key_ln_ratios, specs, names, feed_flows, ln_alpha, light, heavy)[0]

    solution = root(residuals, start, method="hybr")
    final, minimum_stages, ln_ratio = _spec_residuals(solution.x, specs, names, feed_flows, ln_alpha, light, heavy)
    if not np.all(np.isfinite(final)) or np.max(np.abs(final)) > 1e-9:
        raise SpecError(
            "the product specifications cannot be met by a Fenske split of this feed: "
            + "; ".join(describe_spec(spec) for spec in specs)
        )
    if not minimum_stages > 0.0:
        raise SpecError(
            "the product specifications ask for no separation of the keys (Fenske minimum stages "
            f"{minimum_stages:.4g}): " + "; ".join(describe_spec(spec) for spec in specs)
        )
    return FenskeSplit(solution.x, minimum_stages, feed_flows * expit(ln_ratio), feed_flows * expit(-ln_ratio))
