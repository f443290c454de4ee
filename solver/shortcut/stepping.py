"""Stage stepping on the y-x diagram (McCabe & Thiele, Ind. Eng. Chem. 17 (1925) 605), shared by
the McCabe-Thiele and Ponchon-Savarit designs.

Stages are counted from the top as traystack counts them: the condenser is stage 1 and the
reboiler stage N. A total condenser is not an equilibrium stage (its liquid is ``x_D`` and the
vapor from stage 2 is ``y_2 = x_D``); a partial condenser and the partial reboiler are. Each
stage's liquid is in equilibrium with its vapor, ``x_n = x(y_n)``, and the vapor from the stage
below lies on an operating line, ``y_{n+1} = line(x_n)``: the rectifying line above the feed
stage, the stripping line from it on. The feed stage is by default the optimal one (the first
step past the operating lines' intersection), or the one given. The last step is also reported
as a fraction, the usual ratio of horizontal distances ``(x_{N-1} - x_B) / (x_{N-1} - x_N)``.
At total reflux both operating lines are the diagonal: the minimum stages.

The stepping is a recurrence (each stage needs the one above it), so it runs stage by stage.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import numpy as np

from ..errors import SpecError
from .equilibrium_curve import EquilibriumCurve

__all__ = [
    "MAX_EQUILIBRIUM_STAGES",
    "StageSteps",
    "step_stages",
    "step_with_optimal_feed",
    "stepping_fields",
    "total_reflux_stages",
]

#: Most equilibrium stages the stepping takes before it reports a pinch.
MAX_EQUILIBRIUM_STAGES = 1000


@dataclass(frozen=True)
class StageSteps:
    """One stepping: ``x`` the liquid leaving each stage, traystack numbering (a total
    condenser's is ``x_D``); ``y`` the vapor leaving each stage (a total condenser's set to
    ``x_D``); the feed stage; the stage count with the last step as the fraction needed."""

    x: np.ndarray
    y: np.ndarray
    feed_stage: int
    fractional_stages: float


def step_stages(
    curve: EquilibriumCurve,
    x_distillate: float,
    x_bottoms: float,
    rectifying_line: Callable[[float], float],
    stripping_line: Callable[[float], float],
    *,
    condenser: str,
    feed_stage: int | None,
    x_switch: float,
    what: str,
    max_equilibrium_stages: int = MAX_EQUILIBRIUM_STAGES,
) -> StageSteps:
    """Step from the top: ``x_n = x(y_n)`` on the curve, then ``y_{n+1}`` on the rectifying
    line while n is above the feed stage, on the stripping line from the feed stage on; stop
    at the first liquid at or below ``x_B`` (that stage is the reboiler)."""
    xs: list[float] = []
    ys: list[float] = []
    n = 0
    if condenser == "total":
        xs.append(x_distillate)
        ys.append(x_distillate)
        n = 1
    previous = x_distillate
    y = x_distillate
    switched = False
    chosen = feed_stage
    while True:
        n += 1
        x = float(curve.x_of_y(y))
        xs.append(x)
        ys.append(y)
        if x <= x_bottoms:
            break
        if x >= previous - 1e-13 or len(xs) > max_equilibrium_stages:
            hint = f"; with the feed on stage {feed_stage}, that stage may be too far from the optimum" if feed_stage else ""
            raise SpecError(
                f"{what}: the stepping pinches at x = {x:.6g}, y = {y:.6g} {curve.light} after {n} stages "
                f"(an operating line meets the equilibrium curve before x_B = {x_bottoms:.6g}){hint}"
            )
        if feed_stage is None:
            if not switched and x <= x_switch:
                switched, chosen = True, n
        else:
            switched = n >= feed_stage
        y = float(stripping_line(x) if switched else rectifying_line(x))
        previous = x
    if chosen is None:
        chosen = n
    if feed_stage is not None and feed_stage > n:
        raise SpecError(
            f"{what}: the feed stage {feed_stage} is below the bottom of the column the stepping gives "
            f"({n} stages reach x_B = {x_bottoms:.6g} on the rectifying line alone)"
        )
    x_before = xs[-2] if len(xs) >= 2 else x_distillate
    fraction = (x_before - x_bottoms) / (x_before - xs[-1]) if x_before > xs[-1] else 1.0
    return StageSteps(np.array(xs), np.array(ys), int(chosen), float(n - 1 + fraction))



def step_with_optimal_feed(
    curve: EquilibriumCurve,
    x_distillate: float,
    x_bottoms: float,
    rectifying_line: Callable[[float], float],
    stripping_line: Callable[[float], float],
    *,
    condenser: str,
    feed_stage: int | None,
    x_switch: float,
    what: str,
) -> tuple[StageSteps, StageSteps]:
    """The stepping with the feed on ``feed_stage`` and the one with the optimal feed stage (the
    same stepping when ``feed_stage`` is None)."""
    steps = step_stages(
        curve, x_distillate, x_bottoms, rectifying_line, stripping_line, condenser=condenser,
        feed_stage=feed_stage, x_switch=x_switch, what=what,
    )
    if feed_stage is None:
        return steps, steps
    optimal = step_stages(
        curve, x_distillate, x_bottoms, rectifying_line, stripping_line, condenser=condenser,
        feed_stage=None, x_switch=x_switch, what=what,
    )
    return steps, optimal

def total_reflux_stages(curve: EquilibriumCurve, x_distillate: float, x_bottoms: float, condenser: str = "total") -> float:
    """Minimum stages at total reflux (operating lines on the diagonal), fractional, counted as
    traystack counts (a total condenser is stage 1; subtract 1 for the equilibrium stages)."""
    identity = lambda x: x  # noqa: E731
    steps = step_stages(
        curve, x_distillate, x_bottoms, identity, identity, condenser=condenser, feed_stage=None,
        x_switch=-1.0, what="total reflux",
    )
    return steps.fractional_stages


def _staircase(steps: StageSteps, x_distillate: float, condenser: str) -> np.ndarray:
    """The vertices of the steps for plotting, from ``(x_D, x_D)``: across to each stage's
    ``(x_n, y_n)`` on the equilibrium curve, then down to ``(x_n, y_{n+1})`` on the operating
    line."""
    first = 1 if condenser == "total" else 0
    points = [(x_distillate, x_distillate)]
    xs, ys = steps.x, steps.y
    for n in range(first, xs.size):
        points.append((xs[n], ys[n]))
        if n + 1 < xs.size:
            points.append((xs[n], ys[n + 1]))
    return np.array(points)


def stepping_fields(curve: EquilibriumCurve, steps: StageSteps, optimal: StageSteps, x_distillate: float, x_bottoms: float,
                    condenser: str) -> dict:
    """The BinaryDesign fields that follow from a stage stepping, the same for every binary
    construction: stage counts (traystack numbering and equilibrium stages), the minimum at
    total reflux, feed stages, the stage compositions and temperatures, the staircase."""
    minimum = total_reflux_stages(curve, x_distillate, x_bottoms, condenser)
    offset = 1.0 if condenser == "total" else 0.0
    return dict(
        minimum_stages=minimum,
        minimum_equilibrium_stages=minimum - offset,
        stages=steps.x.size,
        fractional_stages=steps.fractional_stages,
        equilibrium_stages=steps.fractional_stages - offset,
        feed_stage=steps.feed_stage,
        optimal_feed_stage=optimal.feed_stage,
        stage_x=steps.x,
        stage_y=steps.y,
        stage_temperature=curve.temperature_of_x(steps.x),
        staircase=_staircase(steps, x_distillate, condenser),
    )
