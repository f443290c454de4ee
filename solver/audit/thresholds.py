"""The audit's thresholds: the size of each difference between the shortcut and the rigorous
column beyond which a flag is raised, why each default is where it is, and how a difference
is graded (info | warning | serious)."""

from __future__ import annotations

from typing import Mapping

from ..case import Case

__all__ = [
    "DEFAULT_THRESHOLDS",
    "SEVERITIES",
    "THRESHOLD_REASONS",
    "severity_of",
    "resolve_thresholds",
]

#: Flag severities, mildest first.
SEVERITIES = ("info", "warning", "serious")

#: Default thresholds of the flags (keys: :data:`solver.case.AUDIT_THRESHOLD_KEYS`). Each is the
#: size of a difference beyond which the flag is raised (a warning); beyond ``serious_factor``
#: times it the flag is serious.
DEFAULT_THRESHOLDS: Mapping[str, float] = {
    "cmo_deviation": 0.05,
    "purity_shortfall": 0.10,
    "stage_difference": 1.0,
    "reflux_difference": 0.10,
    "duty_difference": 0.10,
    "feed_condition": 0.05,
    "feed_q_offset": 0.10,
    "tangent_pinch": 0.02,
    "pinch_shift": 2.0,
    "serious_factor": 3.0,
}

#: Why each default is where it is (shown by ``traystack audit`` and written in README.md).
THRESHOLD_REASONS: Mapping[str, str] = {
    "cmo_deviation": "largest relative departure of an internal liquid or vapor flow from its CMO value; "
    "common practice judges constant molar overflow adequate when the flows stay within a few percent",
    "purity_shortfall": "relative excess of a product's impurity (1 - purity, or the impurity's own mole "
    "fraction) over the specified one at the shortcut's column; product specs are usually written on the "
    "impurity and 10 % of it is within the margin designs commonly carry (common practice)",
    "stage_difference": "stages (absolute) between the shortcut's count and the rigorous one at the same "
    "reflux ratio; one stage is the resolution of a stepped count (the last step is a fraction)",
    "reflux_difference": "relative difference between the reflux ratio the rigorous column needs at the "
    "shortcut's stage count and the shortcut's own reflux ratio for that count; vapor loads and exchangers are "
    "commonly designed with 10 to 20 % margin (common practice), so an error within 10 % is absorbed by them",
    "duty_difference": "relative difference of condenser or reboiler duty between the shortcut's estimate and "
    "the rigorous column at the same reflux ratio and distillate rate; condensers and reboilers are commonly "
    "sized with 10 to 20 % margin (common practice), so an error within 10 % does not change the equipment",
    "feed_condition": "absolute difference between q from the feed enthalpy and the effective q of the "
    "rigorous column (the jump of the liquid flow at the feed stage over the feed, less the drift of the "
    "neighbouring stages); 0.05 moves the stripping section's flows by 5 % of the feed",
    "feed_q_offset": "a feed whose q is more than 0.1 from 1 (sensible heat or vapor worth a tenth of its latent "
    "heat) moves the section flows noticeably; it is noted (info) with how well the q-line carries it",
    "tangent_pinch": "relative amount by which a tangent pinch raises the minimum reflux above the feed "
    "pinch's; below 2 % the two pinches ask for practically the same reflux",
    "pinch_shift": "stages between the rigorous column's pinch (its smallest composition step) and the "
    "shortcut's, counted only when the rigorous step at the shortcut's pinch is half again as large as at "
    "its own (a distinct zone, not a near tie); two stages allow for the rounding of both counts",
    "serious_factor": "a flag is serious when its number exceeds this many times its threshold",
}


def resolve_thresholds(case: Case | None = None, given: Mapping[str, float] | None = None) -> dict[str, float]:
    """:data:`DEFAULT_THRESHOLDS`, then the case's ``[audit] thresholds``, then ``given``."""
    chosen = dict(DEFAULT_THRESHOLDS)
    if case is not None and case.audit is not None:
        chosen.update(case.audit.thresholds)
    for key, value in (given or {}).items():
        if key not in DEFAULT_THRESHOLDS:
            raise ValueError(f"unknown audit threshold {key!r}; known: {', '.join(DEFAULT_THRESHOLDS)}")
        chosen[key] = float(value)
    return chosen


def severity_of(measure: float, threshold: float, serious_factor: float) -> str | None:
    """None when ``|measure|`` is within ``threshold``, "warning" beyond it, "serious" beyond
    ``serious_factor`` times it."""
    measure = abs(measure)
    if not measure > threshold:
        return None
    return "serious" if measure > serious_factor * threshold else "warning"
