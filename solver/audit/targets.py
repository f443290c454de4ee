"""Product targets of the audit (specs of kind mole_fraction, recovery or product rate): how
one reads in a message, and how far a rigorous solution is from meeting it."""

from __future__ import annotations

import math
from typing import Sequence

from ..case import Spec
from ..results import Result

__all__ = ["describe_spec", "impurity_ratio"]


def describe_spec(spec: Spec) -> str:
    """A specification as a line of text (SI): ``distillate x methanol = 0.99``."""
    if spec.kind == "mole_fraction":
        return f"{spec.product} x {spec.component} = {spec.value:.6g}"
    if spec.kind == "recovery":
        return f"recovery of {spec.component} to the {spec.product} = {spec.value:.6g}"
    if spec.kind in ("distillate_rate", "bottoms_rate"):
        return f"{spec.kind} = {spec.value:.6g} mol/s"
    return f"{spec.kind} = {spec.value:.6g}"


def impurity_ratio(result: Result, spec: Spec, feed_composition: Sequence[float]) -> float:
    """How far ``result`` is from meeting the product target ``spec``: the delivered impurity
    over the specified one (1 = exactly met, above 1 = short of the target).

    A mole fraction above the feed's is a purity to reach (impurity ``1 - x``); one below it is
    an impurity not to exceed (``x`` itself); a recovery's impurity is the part not recovered,
    ``1 - r``. Product rates are met by construction in the audit's columns (ratio 1)."""
    names = list(result.components)
    if spec.kind not in ("mole_fraction", "recovery"):
        return 1.0
    i = names.index(spec.component)
    product = result.distillate_composition if spec.product == "distillate" else result.bottoms_composition
    if spec.kind == "mole_fraction":
        x = float(product[i])
        if spec.value > float(feed_composition[i]):
            return (1.0 - x) / (1.0 - spec.value)
        return x / spec.value
    flow = result.distillate_flow if spec.product == "distillate" else result.bottoms_flow
    feed_total = sum(f.flow * f.z[i] for feeds in result.stage_feeds for f in feeds)
    recovered = flow * float(product[i]) / feed_total
    if spec.value >= 1.0:
        return math.inf if recovered < 1.0 else 1.0
    return (1.0 - recovered) / (1.0 - spec.value)
