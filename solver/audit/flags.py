"""The audit's flags: one finding each, with a code, a severity, a message a process engineer
can act on and the numbers behind it. One constructor per flag code; each returns None when
the difference it measures stays within its threshold (:mod:`.thresholds`).

Codes: PURITY_SHORTFALL, CMO_DEVIATION, FEED_CONDITION, DUTY_DIFFERENCE, TANGENT_PINCH,
PINCH_MOVED, REFLUX_UNDER / REFLUX_OVER, STAGES_UNDER / STAGES_OVER, SEARCH_INCOMPLETE,
SOLVE_FAILED, TWO_LIQUIDS, PREDICTED_PAIRS (IDEAL_VAPOR_SHIFT: :mod:`.ideal_vapor`). Numbers are SI.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any, Mapping, Sequence

import numpy as np

from ..results import json_safe
from ..shortcut import MinimumReflux
from ..thermo.liquid_split import LiquidSplitCheck
from .cmo import PINCH_CONTRAST, CMOAudit, composition_steps
from .search import StageSearch
from .thresholds import SEVERITIES, severity_of
from .variants import RigorousRun

__all__ = [
    "Flag",
    "by_severity",
    "cmo_deviation",
    "duty_difference",
    "feed_condition",
    "pinch_moved_by_enthalpies",
    "pinch_moved_in_column",
    "purity_shortfall",
    "reflux_difference",
    "search_incomplete",
    "solve_failed",
    "stage_difference",
    "tangent_pinch",
    "predicted_pairs",
    "two_liquids",
]


@dataclass(frozen=True)
class Flag:
    """One finding of the audit: ``code`` (upper-case word), ``severity`` (info | warning |
    serious), a plain-language ``message`` and the ``numbers`` behind it (SI)."""

    code: str
    severity: str
    message: str
    numbers: Mapping[str, Any] = field(default_factory=dict)


def by_severity(flags: Sequence[Flag | None]) -> tuple[Flag, ...]:
    """The flags raised (None left out), most severe first, then by code; flags of the same
    severity and code keep their order."""
    raised = [flag for flag in flags if flag is not None]
    return tuple(sorted(raised, key=lambda f: (-SEVERITIES.index(f.severity), f.code)))


def _section_of(stage: int, feed_stage: int) -> str:
    """The section a stage lies in, within one stage of the feed counting as "at the feed"."""
    if stage < feed_stage - 1:
        return "rectifying section"
    if stage > feed_stage + 1:
        return "stripping section"
    return "at the feed"


def purity_shortfall(target: str, ratio: float, stages: int, feed_stage: int, reflux_ratio: float,
                     thresholds: Mapping[str, float]) -> Flag | None:
    """PURITY_SHORTFALL: the shortcut's column delivers more than the specified impurity of the
    ``target`` (``ratio`` = delivered / specified impurity)."""
    if not ratio > 1.0:
        return None
    severity = severity_of(ratio - 1.0, thresholds["purity_shortfall"], thresholds["serious_factor"])
    if severity is None:
        return None
    return Flag(
        "PURITY_SHORTFALL", severity,
        f"the shortcut's column ({stages} stages, feed on stage {feed_stage}, R = {reflux_ratio:.4g}) misses {target}: "
        f"its impurity is {ratio:.3g} times the specified one (threshold {1 + thresholds['purity_shortfall']:.3g} times)",
        {"target": target, "impurity_ratio": ratio, "stages": stages, "feed_stage": feed_stage,
         "reflux_ratio": reflux_ratio, "threshold": thresholds["purity_shortfall"]},
    )


def cmo_deviation(cmo: CMOAudit, thresholds: Mapping[str, float]) -> Flag | None:
    """CMO_DEVIATION: an internal liquid or vapor flow away from its CMO value."""
    liquid, liquid_stage = cmo.largest_liquid_deviation
    vapor, vapor_stage = cmo.largest_vapor_deviation
    distance, distance_stage = cmo.largest_line_distance
    worst = max(abs(liquid) if math.isfinite(liquid) else 0.0, abs(vapor) if math.isfinite(vapor) else 0.0)
    severity = severity_of(worst, thresholds["cmo_deviation"], thresholds["serious_factor"])
    if severity is None:
        return None
    which = "liquid" if abs(liquid) >= abs(vapor) else "vapor"
    stage = liquid_stage if which == "liquid" else vapor_stage
    value = liquid if which == "liquid" else vapor
    line = (f"; the rigorous operating curve lies up to {abs(distance):.3g} (mole fraction) "
            f"{'above' if distance > 0 else 'below'} the straight operating line, at stage {distance_stage}"
            if math.isfinite(distance) else "")
    return Flag(
        "CMO_DEVIATION", severity,
        f"constant molar overflow does not hold: the {which} leaving stage {stage} is {100 * value:+.1f} % off its "
        f"CMO value (threshold {100 * thresholds['cmo_deviation']:.3g} %); largest liquid deviation "
        f"{100 * liquid:+.1f} % (stage {liquid_stage}), vapor {100 * vapor:+.1f} % (stage {vapor_stage}){line}",
        {"largest_liquid_deviation": json_safe(liquid), "liquid_stage": liquid_stage,
         "largest_vapor_deviation": json_safe(vapor), "vapor_stage": vapor_stage,
         "largest_line_distance": json_safe(distance), "line_distance_stage": distance_stage,
         "threshold": thresholds["cmo_deviation"]},
    )


def feed_condition(cmo: CMOAudit, thresholds: Mapping[str, float]) -> Flag | None:
    """FEED_CONDITION: the feed moves the section flows differently from its q (a warning or
    worse), or its q is far enough from 1 to be worth noting (info)."""
    difference = cmo.q_effective - cmo.q
    severity = None
    if math.isfinite(difference):
        severity = severity_of(difference, thresholds["feed_condition"], thresholds["serious_factor"])
    numbers = {"q": cmo.q, "q_effective": cmo.q_effective, "difference": difference, "feed_stage": cmo.feed_stage,
               "threshold": thresholds["feed_condition"], "q_offset_threshold": thresholds["feed_q_offset"]}
    if severity:
        return Flag(
            "FEED_CONDITION", severity,
            f"the feed condition moves the answer: q from the feed enthalpy is {cmo.q:.4f}, but the liquid flow "
            f"jumps by {cmo.q_effective:.4f} F at the feed stage {cmo.feed_stage} of the rigorous column "
            f"(difference {difference:+.4f}, threshold {thresholds['feed_condition']:.3g}): the shortcut's q-line "
            "misplaces the stripping section's flows",
            numbers,
        )
    if not abs(cmo.q - 1.0) > thresholds["feed_q_offset"]:
        return None
    state = "subcooled" if cmo.q > 1.0 else ("partly vaporized" if cmo.q > 0.0 else "superheated")
    return Flag(
        "FEED_CONDITION", "info",
        f"the feed is {state} (q = {cmo.q:.4f}), which moves the section flows by {abs(cmo.q - 1.0):.3g} F; the "
        f"rigorous column's liquid jumps by {cmo.q_effective:.4f} F at the feed stage {cmo.feed_stage}, so the "
        "shortcut's q-line carries it",
        numbers,
    )


def duty_difference(duty: str, estimate: float, rigorous: float | None, what: str,
                    thresholds: Mapping[str, float]) -> Flag | None:
    """DUTY_DIFFERENCE: the shortcut's estimate (``what``) of the ``duty`` ("condenser" or
    "reboiler") against the rigorous column's at the same reflux ratio and distillate rate."""
    if rigorous is None or not math.isfinite(estimate) or rigorous == 0:
        return None
    difference = (estimate - rigorous) / abs(rigorous)
    severity = severity_of(difference, thresholds["duty_difference"], thresholds["serious_factor"])
    if severity is None:
        return None
    more = abs(estimate) > abs(rigorous)
    task = "to remove" if rigorous < 0 else "to supply"
    return Flag(
        "DUTY_DIFFERENCE", severity,
        f"the shortcut's {duty} duty ({estimate / 1e3:.4g} kW, {what}) has {100 * abs(difference):.1f} % "
        f"{'more' if more else 'less'} heat {task} than the "
        f"rigorous {rigorous / 1e3:.4g} kW at the same reflux ratio and distillate rate "
        f"(threshold {100 * thresholds['duty_difference']:.3g} %)",
        {"duty": duty, "shortcut": estimate, "rigorous": rigorous, "difference": difference,
         "threshold": thresholds["duty_difference"]},
    )


def tangent_pinch(method: str, pinch: MinimumReflux, thresholds: Mapping[str, float]) -> Flag | None:
    """TANGENT_PINCH: a tangent pinch of the ``method``'s construction sets its minimum reflux
    above the feed pinch's (info when only by a little)."""
    if pinch.pinch != "tangent" or not pinch.feed_pinch_ratio > 0:
        return None
    excess = pinch.ratio / pinch.feed_pinch_ratio - 1.0
    severity = severity_of(excess, thresholds["tangent_pinch"], thresholds["serious_factor"]) or "info"
    return Flag(
        "TANGENT_PINCH", severity,
        f"{method}: a tangent pinch in the {pinch.section} section at x = {pinch.x:.4f} sets the minimum reflux "
        f"ratio {pinch.ratio:.4g}, {100 * excess:.1f} % above the feed pinch's {pinch.feed_pinch_ratio:.4g} "
        "(a minimum reflux from the feed pinch alone would be too low)",
        {"method": method, "minimum_reflux": pinch.ratio, "feed_pinch_minimum_reflux": pinch.feed_pinch_ratio,
         "excess": excess, "section": pinch.section, "x": pinch.x, "y": pinch.y,
         "threshold": thresholds["tangent_pinch"]},
    )


def pinch_moved_by_enthalpies(pinch: MinimumReflux, enthalpy_pinch: MinimumReflux) -> Flag | None:
    """PINCH_MOVED: at minimum reflux the Ponchon-Savarit construction (real enthalpies)
    pinches in another section than McCabe-Thiele."""
    if pinch.section == enthalpy_pinch.section:
        return None
    a, b = pinch, enthalpy_pinch
    return Flag(
        "PINCH_MOVED", "warning",
        f"with real enthalpies the column pinches elsewhere at minimum reflux: McCabe-Thiele at the {a.section} "
        f"pinch (x = {a.x:.4f}, R_min = {a.ratio:.4g}), Ponchon-Savarit at the {b.section} pinch "
        f"(x = {b.x:.4f}, R_min = {b.ratio:.4g})",
        {"basis": "minimum reflux", "shortcut_section": a.section, "shortcut_x": a.x,
         "enthalpy_section": b.section, "enthalpy_x": b.x, "shortcut_minimum_reflux": a.ratio,
         "enthalpy_minimum_reflux": b.ratio},
    )


def pinch_moved_in_column(rigorous_x: np.ndarray, shortcut_x: np.ndarray, feed_stage: int,
                          thresholds: Mapping[str, float]) -> Flag | None:
    """PINCH_MOVED: the rigorous column's smallest composition step (light-component liquid
    fractions ``rigorous_x``, top first) lies more than ``pinch_shift`` stages from the
    McCabe-Thiele steps' smallest one (``shortcut_x``; its last step, which passes x_B, left
    out) and is a distinct zone (:data:`~.cmo.PINCH_CONTRAST`)."""
    rigorous = composition_steps(rigorous_x)
    shortcut = composition_steps(shortcut_x[:-1])
    j_rigorous = int(np.argmin(rigorous))
    j_shortcut = int(np.argmin(shortcut))
    shift = j_rigorous - j_shortcut
    if j_shortcut >= rigorous.size or abs(shift) <= thresholds["pinch_shift"]:
        return None
    contrast = float(rigorous[j_shortcut] / max(rigorous[j_rigorous], 1e-300))
    if contrast < PINCH_CONTRAST:
        return None
    top, bottom = j_rigorous + 1, j_shortcut + 1
    return Flag(
        "PINCH_MOVED", "warning",
        f"the rigorous column pinches at stages {top}-{top + 1} ({_section_of(top, feed_stage)}), the "
        f"McCabe-Thiele steps at stages {bottom}-{bottom + 1} ({_section_of(bottom, feed_stage)}), {abs(shift)} "
        f"stages {'lower' if shift > 0 else 'higher'}; there the rigorous step is {contrast:.2g} times its smallest "
        f"(threshold {thresholds['pinch_shift']:.3g} stages)",
        {"basis": "smallest composition step", "rigorous_stage": top, "shortcut_stage": bottom, "shift": shift,
         "rigorous_smallest_step": float(rigorous[j_rigorous]), "rigorous_step_at_shortcut_pinch": float(rigorous[j_shortcut]),
         "shortcut_smallest_step": float(shortcut[j_shortcut]), "contrast": contrast,
         "threshold": thresholds["pinch_shift"]},
    )


def reflux_difference(needed: RigorousRun, shortcut_reflux: float, design_reflux: float, targets: Sequence[str],
                      thresholds: Mapping[str, float]) -> Flag | None:
    """REFLUX_UNDER / REFLUX_OVER: the reflux ratio the rigorous column ``needed`` at the
    shortcut's stage count against the shortcut's own reflux for that count
    (``shortcut_reflux``); REFLUX_UNDER (serious) when no rigorous column met the ``targets``."""
    N, f = needed.stages, needed.feed_stage
    if not needed.converged:
        return Flag(
            "REFLUX_UNDER", "serious",
            f"at {N} stages (feed on stage {f}) no rigorous solution meets the targets "
            f"({'; '.join(targets)}): {needed.message}. The shortcut's reflux for that stage count is "
            f"{shortcut_reflux:.4g}",
            {"stages": N, "feed_stage": f, "rigorous_reflux": None, "shortcut_reflux": shortcut_reflux,
             "design_reflux": design_reflux},
        )
    R_needed = float(needed.reflux_ratio)
    difference = R_needed / shortcut_reflux - 1.0
    severity = severity_of(difference, thresholds["reflux_difference"], thresholds["serious_factor"])
    if severity is None:
        return None
    return Flag(
        "REFLUX_UNDER" if difference > 0 else "REFLUX_OVER", severity,
        f"at {N} stages (feed on stage {f}) the rigorous column needs a reflux ratio of {R_needed:.4g}; the "
        f"shortcut says {shortcut_reflux:.4g} for that stage count, {abs(100 * difference):.1f} % "
        f"{'too low' if difference > 0 else 'too high'} (threshold {100 * thresholds['reflux_difference']:.3g} %)",
        {"stages": N, "feed_stage": f, "rigorous_reflux": R_needed, "shortcut_reflux": shortcut_reflux,
         "design_reflux": design_reflux, "difference": difference, "threshold": thresholds["reflux_difference"]},
    )


def stage_difference(search: StageSearch, stages: int, feed_stage: int,
                     thresholds: Mapping[str, float]) -> Flag | None:
    """STAGES_UNDER / STAGES_OVER: the stage count the rigorous column needs at the shortcut's
    reflux ratio (``search``) against the shortcut's ``stages``; STAGES_UNDER also when no
    count tried met the targets, or when the search stopped above the shortcut's count."""
    R, N, limit = search.reflux_ratio, stages, thresholds["stage_difference"]
    if search.stages is not None:
        difference = search.stages - N
        if abs(difference) <= limit:
            return None
        relative = abs(difference) / N
        severity = "serious" if abs(difference) > thresholds["serious_factor"] * limit and relative > 0.1 else "warning"
        return Flag(
            "STAGES_UNDER" if difference > 0 else "STAGES_OVER", severity,
            f"at the reflux ratio {R:.4g} the rigorous column needs {search.stages} stages (feed on stage "
            f"{search.feed_stage}); the shortcut says {N}, {abs(difference)} {'too few' if difference > 0 else 'too many'} "
            f"(threshold {limit:.3g})",
            {"reflux_ratio": R, "rigorous_stages": search.stages, "rigorous_feed_stage": search.feed_stage,
             "shortcut_stages": N, "shortcut_feed_stage": feed_stage, "difference": difference,
             "complete": search.complete, "threshold": limit},
        )
    if search.complete:
        return Flag(
            "STAGES_UNDER", "serious",
            f"at the reflux ratio {R:.4g} no rigorous column of up to "
            f"{max((n for n, _, _ in search.tried), default=N)} stages tried meets the targets; the shortcut says {N}",
            {"reflux_ratio": R, "rigorous_stages": None, "shortcut_stages": N,
             "largest_infeasible_stages": search.largest_infeasible, "complete": search.complete},
        )
    if search.largest_infeasible is None or not search.largest_infeasible + 1 - N > limit:
        return None
    at_least = search.largest_infeasible + 1
    return Flag(
        "STAGES_UNDER", "warning",
        f"at the reflux ratio {R:.4g} the rigorous column needs at least {at_least} stages (the search stopped "
        f"before it found the count); the shortcut says {N}",
        {"reflux_ratio": R, "rigorous_stages": None, "rigorous_stages_at_least": at_least, "shortcut_stages": N,
         "difference": at_least - N, "complete": False, "threshold": limit},
    )


def search_incomplete(search: StageSearch, solves: int, budget: int) -> Flag | None:
    """SEARCH_INCOMPLETE (info): the solve budget ran out before the stage count was pinned."""
    if search.complete:
        return None
    return Flag(
        "SEARCH_INCOMPLETE", "info",
        f"the stage search stopped after {solves} rigorous solves (budget {budget}); the stage count "
        "the rigorous column needs is not pinned to one stage"
        + ("" if search.stages is None else f" (at most {search.stages})"),
        {"solves": solves, "budget": budget, "largest_infeasible_stages": search.largest_infeasible,
         "smallest_feasible_stages": search.stages},
    )


def solve_failed(stages: int, feed_stage: int, reflux_ratio: float, message: str) -> Flag:
    """SOLVE_FAILED (serious): the shortcut's column did not converge rigorously."""
    return Flag(
        "SOLVE_FAILED", "serious",
        f"the shortcut's column ({stages} stages, feed on stage {feed_stage}, R = {reflux_ratio:.4g}) did not "
        f"converge rigorously: {message}",
        {"stages": stages, "feed_stage": feed_stage, "reflux_ratio": reflux_ratio},
    )


def _composition(names: Sequence[str], x: np.ndarray) -> str:
    return ", ".join(f"{name} {value:.4f}" for name, value in zip(names, x))


def two_liquids(check: LiquidSplitCheck | None, where: str = "stage") -> Flag | None:
    """TWO_LIQUIDS: liquids (stages of a solution, or points of the shortcut's equilibrium
    curve) that the activity model says would split into two liquid phases (tangent-plane test,
    Michelsen 1982); the one-liquid answer is not physical there. Always serious."""
    if check is None or not check.split:
        return None
    names = check.components
    worst = min(check.split, key=lambda k: check.minimum_tpd[k])
    labels = ", ".join(str(label) for label in check.split_labels)
    return Flag(
        "TWO_LIQUIDS", "serious",
        f"the {check.model} liquid would split into two liquid phases on {where}(s) {labels}: e.g. on {where} "
        f"{check.labels[worst]} the liquid ({_composition(names, check.compositions[worst])}) is unstable against a "
        f"second liquid ({_composition(names, check.trial_compositions[worst])}); a one-liquid solution is not "
        "physical there (a decanter, or a model and parameters fitted to liquid-liquid data, is needed)"
        + ("; a binary boiling in two liquid phases has, at a given pressure, one boiling temperature and one "
           "vapor for every overall composition between the two liquids (a heterogeneous azeotrope when that vapor "
           "lies between them)" if len(names) == 2 else ""),
        {
            where + "s": list(check.split_labels),
            "liquids": [check.compositions[k].tolist() for k in check.split],
            "second_liquids": [check.trial_compositions[k].tolist() for k in check.split],
            "minimum_tpd": [float(check.minimum_tpd[k]) for k in check.split],
        },
    )


def predicted_pairs(thermo_record: Mapping[str, Any]) -> Flag | None:
    """PREDICTED_PAIRS: binary parameters the case did not give, predicted from UNIFAC
    (``missing_pairs``); named so that a reviewer checks them against data. Info."""
    predicted = [o for o in thermo_record.get("pair_origins", ()) if o.get("origin") == "predicted"]
    if not predicted:
        return None
    pairs = ", ".join(f"{o['pair'][0]}-{o['pair'][1]} (from {o['unifac_model']})" for o in predicted)
    return Flag(
        "PREDICTED_PAIRS", "info",
        f"{thermo_record.get('liquid', '').upper()} parameters predicted, not measured, for {pairs}: fitted to UNIFAC "
        "ln gamma over the column's temperature range; check them against equilibrium data where it matters",
        {"pairs": [list(o["pair"]) for o in predicted], "rms_ln_gamma": [o["rms_ln_gamma"] for o in predicted]},
    )
