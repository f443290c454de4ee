"""The integer search for the stage count a rigorous column needs: the smallest count N whose
column meets the product targets at a given reflux ratio and distillate rate, the feed stage
moved for each count, within the audit's budget of rigorous solves.

The count moves by secant steps on the logarithm of the worst impurity ratio (delivered over
specified impurity), which falls about linearly with N away from a pinch, until the answer is
bracketed; then by regula falsi and bisection to one stage.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable, Sequence

import numpy as np

from ..case import Spec
from ..results import Result
from .targets import impurity_ratio
from .variants import RigorousColumns, RigorousRun, run_summary, try_solve

__all__ = ["MET_TOLERANCE", "CountSearch", "StageSearch", "search_stage_count", "stage_search"]

#: Relative tolerance for "the specs are met" in the stage search (numerical noise only).
MET_TOLERANCE = 1e-7


@dataclass(frozen=True)
class StageSearch:
    """The integer search for the stage count the rigorous column needs at a reflux ratio:
    ``stages`` and ``feed_stage`` of the smallest column found to meet the targets (None if
    none was within reach), ``complete`` False when the solve budget ran out before the
    answer was bracketed to one stage; ``tried`` every (stages, feed stage, worst impurity
    ratio or None for a failed solve)."""

    reflux_ratio: float
    distillate_flow: float
    stages: int | None
    feed_stage: int | None
    complete: bool
    largest_infeasible: int | None
    tried: tuple[tuple[int, int, float | None], ...]
    run: RigorousRun | None = None


class _BudgetSpent(Exception):
    """Raised by an evaluation to stop :func:`search_stage_count` (the solve budget is spent)."""


def _next_count(points: Sequence[tuple[int, float]], low: int | None, high: int | None, start: int,
                smallest: int, largest: int, *, bisect: bool = False) -> int | None:
    """The next stage count to try: inside the bracket (low fails the targets, high meets
    them) by regula falsi on ln(worst impurity ratio), which falls about linearly with the
    stage count away from a pinch (or by bisection when ``bisect``); outside it by the straight
    line fitted to the (up to four) points nearest the current end, the step limited to twice
    the distance already covered (at least 3 stages), or, without a falling line, a step that
    doubles that distance; None when nothing is left to try."""
    usable = {n: math.log(s) for n, s in points if math.isfinite(s) and s > 0}
    if low is not None and high is not None:
        if high - low <= 1:
            return None
        middle = (low + high) // 2
        if bisect or low not in usable or high not in usable or not usable[low] > 0.0 >= usable[high]:
            return middle
        g1, g2 = usable[low], usable[high]
        root = low + g1 * (high - low) / (g1 - g2)
        candidate = int(math.ceil(root - 1e-9))
        if candidate >= high:
            candidate = high - 1  # the count just below the predicted boundary settles it
        return max(candidate, low + 1)
    going_up = high is None
    current = low if going_up else high
    covered = abs(current - start)
    limit = max(3, 2 * covered)
    nearest = sorted(usable.items(), key=lambda p: abs(p[0] - current))[:4]
    step = None
    if len(nearest) >= 2 and len({n for n, _ in nearest}) >= 2:
        counts = np.array([n for n, _ in nearest], dtype=float)
        logs = np.array([g for _, g in nearest])
        slope = float(np.polyfit(counts, logs, 1)[0])
        if slope < 0.0:
            root = current - usable.get(current, logs[0]) / slope
            target = int(math.ceil(root - 1e-9))
            step = target - current if going_up else target - 1 - current
    if step is None or (going_up and step < 1) or (not going_up and step > -1):
        step = max(1, covered) if going_up else -max(1, covered)  # no usable slope: double the distance
    if going_up:
        n = min(current + min(step, limit), largest)
        return n if n > current else None
    n = max(current + max(step, -limit), smallest)
    return n if n < current else None


@dataclass(frozen=True)
class CountSearch:
    """Outcome of :func:`search_stage_count`: the smallest ``stages`` found to meet the targets
    with its ``feed_stage`` (None if no count up to the limit did), the largest count known not
    to, whether the search ran to its end (``complete`` False: the budget ran out first), and
    every (stages, feed stage, worst impurity ratio or None for a failed solve) tried."""

    stages: int | None
    feed_stage: int | None
    largest_infeasible: int | None
    complete: bool
    tried: tuple[tuple[int, int, float | None], ...]


class _FeedStageWalk:
    """The best feed stage for each stage count tried, and the verdict of each count.

    For a count the feed stage starts from the best one of the nearest count tried, stretched,
    and moves while that lowers the ratio (the side it last moved to tried first; the stride
    doubling along a run of improvements, back to one stage after an overshoot), stopping as
    soon as the targets are met."""

    def __init__(self, evaluate: Callable[[int, int], float], start_stages: int, start_feed_stage: int) -> None:
        self.evaluate = evaluate
        self.tried: list[tuple[int, int, float | None]] = []
        self.verdicts: dict[int, tuple[float, int]] = {}  # stages -> (worst impurity ratio, feed stage)
        self.best_feed: dict[int, int] = {start_stages: start_feed_stage}
        self.preferred = -1  # the side the feed stage last moved to, tried first

    def guess_feed(self, stages: int) -> int:
        known = min(self.best_feed, key=lambda n: abs(n - stages))
        f = self.best_feed[known]
        guess = 1 + round((f - 1) * (stages - 1) / max(known - 1, 1))
        return int(min(max(guess, 2), stages - 1))

    def __call__(self, stages: int) -> float:
        """The lowest worst impurity ratio found for ``stages`` (at most 1 once the targets are met)."""
        seen: dict[int, float] = {}

        def at(f: int) -> float:
            if f not in seen:
                seen[f] = float(self.evaluate(stages, f))
                self.tried.append((stages, f, seen[f] if math.isfinite(seen[f]) else None))
            return seen[f]

        f = self.guess_feed(stages)
        value = at(f)
        direction, stride = 0, 1
        while value > 1.0 + MET_TOLERANCE:
            sides = (direction,) if direction else (self.preferred, -self.preferred)
            for side in sides:
                g = min(max(f + side * stride, 2), stages - 1)
                if g != f and at(g) < value:
                    direction, f, value = side, g, at(g)
                    self.preferred = side
                    stride *= 2  # a run of improvements in one direction: longer strides
                    break
            else:
                if stride > 1:
                    stride = 1  # overshot: back to single stages around the best so far
                    continue
                break
        self.best_feed[stages] = f
        self.verdicts[stages] = (value, f)
        return value


def search_stage_count(
    evaluate: Callable[[int, int], float],
    start_stages: int,
    start_feed_stage: int,
    *,
    smallest: int = 3,
    largest: int | None = None,
) -> CountSearch:
    """The smallest stage count N (``smallest`` <= N <= ``largest``) for which some feed stage
    f (2 <= f <= N - 1) gives ``evaluate(N, f) <= 1`` (the worst impurity ratio of a solved
    column; infinity for a failed solve).

    For each count the feed stage is moved as :class:`_FeedStageWalk` says. The count starts at
    ``start_stages`` and moves down (if its column meets the targets) or up (if not) by secant
    steps on the log of the ratio until the answer is bracketed, then by regula falsi and
    bisection to one stage (:func:`_next_count`). ``evaluate`` may raise :class:`_BudgetSpent`
    to stop the search (``complete`` False)."""
    largest = largest or max(2 * start_stages, start_stages + 20)
    walk = _FeedStageWalk(evaluate, start_stages, start_feed_stage)
    complete = True
    low = high = None  # largest count known to fail the targets, smallest known to meet them
    points: list[tuple[int, float]] = []
    inside = 0  # counts tried inside the bracket: after two regula falsi steps, bisection
    try:
        n: int | None = start_stages
        while n is not None:
            if low is not None and high is not None:
                inside += 1
            value = walk(n)
            points.append((n, value))
            if value <= 1.0 + MET_TOLERANCE:
                high = n if high is None else min(high, n)
            else:
                low = n if low is None else max(low, n)
            if high is not None and high <= smallest:
                break
            n = _next_count(points, low, high, start_stages, smallest, largest, bisect=inside >= 2)
            if n is not None and n in walk.verdicts:
                n = None
    except _BudgetSpent:
        complete = False
    if high is None:
        return CountSearch(None, None, low, complete, tuple(walk.tried))
    settled = high <= smallest or (low is not None and high - low <= 1)
    return CountSearch(high, walk.verdicts[high][1], low, complete and settled, tuple(walk.tried))


def stage_search(
    columns: RigorousColumns,
    reflux_ratio: float,
    distillate_flow: float,
    targets: Sequence[Spec],
    start_stages: int,
    start_feed_stage: int,
    z: Sequence[float],
    *,
    largest: int | None = None,
) -> StageSearch:
    """The smallest stage count whose column meets ``targets`` at ``reflux_ratio`` and
    ``distillate_flow``, the feed stage moved for each count (:func:`search_stage_count` on
    rigorous solves; a failed solve counts as not meeting the targets)."""
    specs = (Spec("reflux_ratio", reflux_ratio, key="reflux_ratio"), Spec("distillate_rate", distillate_flow, key="distillate_rate"))
    results: dict[tuple[int, int], Result | None] = {}

    def evaluate(stages: int, feed_stage: int) -> float:
        if columns.spent:
            raise _BudgetSpent()
        result, _ = try_solve(columns, stages, feed_stage, specs)
        results[(stages, feed_stage)] = result
        if result is None or not result.converged:
            return math.inf
        return max(impurity_ratio(result, t, z) for t in targets)

    found = search_stage_count(evaluate, start_stages, start_feed_stage, largest=largest)
    run = None
    if found.stages is not None:
        run = run_summary("stages needed at the shortcut's reflux", results[(found.stages, found.feed_stage)],
                         found.stages, found.feed_stage, specs, targets, z)
    return StageSearch(reflux_ratio, distillate_flow, found.stages, found.feed_stage, found.complete,
                       found.largest_infeasible, found.tried, run)
