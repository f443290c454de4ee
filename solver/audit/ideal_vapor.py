"""How far ideal-vapor K-values would move the design of a column whose vapor comes from an
equation of state (``[thermo] liquid = "peng-robinson"`` or ``"soave-redlich-kwong"``).

The audit's two design questions are asked once more with the vapor taken as an ideal gas and
the liquid as an ideal solution -- the modified Raoult's law ``K_i = Psat_i(T) / P`` with
vapor pressures from CoolProp's reference equations or the handbook library, the liquid
enthalpy from the heat of vaporization (e.g. J. M. Smith, H. C. Van Ness and M. M. Abbott,
*Introduction to Chemical Engineering Thermodynamics*, 7th ed., 2005, sec. 10.5) -- at the same
products:

* the reflux ratio the column needs at the shortcut's stage count and feed stage, the product
  targets as specs (beside the equation of state's answer to the same question);
* the stage count the column needs at the shortcut's reflux ratio (beside the equation of
  state's), by the audit's integer search.

The difference is flagged ``IDEAL_VAPOR_SHIFT`` beyond the audit's ``reflux_difference`` or
``stage_difference`` thresholds. Where the ideal-vapor model cannot describe the column at all
(a stage at or above a component's critical temperature has no vapor pressure), the comparison
says so, and an info flag names the reason. Units are SI.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from typing import Any, Mapping, Sequence

from ..case import Case, Spec
from ..errors import CaseError, ThermoError
from ..results import Result
from ..thermo.package import ThermoPackage
from .flags import Flag
from .record import flag_record, run_record, stage_search_record
from .search import StageSearch, stage_search
from .thresholds import severity_of
from .variants import RigorousColumns, RigorousRun, run_summary, try_solve

__all__ = ["IDEAL_VAPOR_MODEL", "IdealVaporComparison", "ideal_vapor_case", "ideal_vapor_comparison",
           "ideal_vapor_record", "ideal_vapor_shift"]

#: The liquid models that are an equation of state for both phases, and their names in text.
EQUATIONS_OF_STATE = ("peng-robinson", "soave-redlich-kwong")
MODEL_NAMES = {"peng-robinson": "Peng-Robinson", "soave-redlich-kwong": "Soave-Redlich-Kwong"}

#: What the comparison's K-values are, as the reports name them.
IDEAL_VAPOR_MODEL = ("modified Raoult's law with an ideal vapor and an ideal liquid solution: K_i = Psat_i(T) / P, "
                     "vapor pressures from CoolProp's reference equations or the handbook library")


@dataclass(frozen=True)
class IdealVaporComparison:
    """The audit's design questions answered with ideal-vapor K-values beside the equation of
    state's answers: ``reflux_needed`` (a :class:`RigorousRun` at the shortcut's stage count)
    and ``stages_needed`` (a :class:`StageSearch` at the shortcut's reflux); ``applicable``
    False (with ``reason``) when the ideal-vapor model cannot describe the column;
    ``equation_reflux`` and ``equation_stages`` are the equation of state's answers; ``solves``
    the rigorous solves used."""

    model: str
    applicable: bool
    reason: str
    stages: int
    feed_stage: int
    reflux_ratio: float
    equation_reflux: float | None
    equation_stages: int | None
    reflux_needed: RigorousRun | None = None
    stages_needed: StageSearch | None = None
    solves: int = 0

    @property
    def ideal_reflux(self) -> float | None:
        run = self.reflux_needed
        return float(run.reflux_ratio) if run is not None and run.converged else None

    @property
    def ideal_stages(self) -> int | None:
        return None if self.stages_needed is None else self.stages_needed.stages

    @property
    def reflux_shift(self) -> float | None:
        """Relative change of the reflux needed: ideal vapor over equation of state, less 1."""
        if self.ideal_reflux is None or not self.equation_reflux:
            return None
        return self.ideal_reflux / self.equation_reflux - 1.0

    @property
    def stage_shift(self) -> int | None:
        """Stages needed with ideal vapor less those with the equation of state."""
        if self.ideal_stages is None or self.equation_stages is None:
            return None
        return self.ideal_stages - self.equation_stages


def ideal_vapor_case(case: Case) -> Case:
    """``case`` with ideal-vapor K-values: an ideal liquid solution instead of an equation of
    state for both phases (its k_ij dropped); an activity model for the liquid is kept and only
    the vapor made ideal."""
    if case.thermo.liquid in EQUATIONS_OF_STATE:
        thermo = dataclasses.replace(case.thermo, liquid="ideal", vapor="ideal", interaction=())
    else:
        thermo = dataclasses.replace(case.thermo, vapor="ideal", interaction=())
    return dataclasses.replace(case, thermo=thermo)


def ideal_vapor_comparison(case: Case, stages: int, feed_stage: int, reflux_ratio: float, distillate_flow: float,
                           targets: Sequence[Spec], feed_composition: Sequence[float],
                           equation_reflux: RigorousRun | None, equation_search: StageSearch | None,
                           budget: int, seeds: Sequence[tuple[int, int, Result]] = ()) -> IdealVaporComparison:
    """The comparison of the module docstring for the shortcut's column (``stages``,
    ``feed_stage``, ``reflux_ratio``, ``distillate_flow`` in mol/s) and its product
    ``targets``; ``equation_reflux`` and ``equation_search`` are the equation of state's
    answers; at most ``budget`` rigorous solves, warm-started from ``seeds`` ((stages, feed
    stage, converged result) of the equation of state)."""
    model = MODEL_NAMES.get(case.thermo.liquid) or f"{MODEL_NAMES.get(case.thermo.vapor, case.thermo.vapor)} vapor"
    eq_reflux = float(equation_reflux.reflux_ratio) if equation_reflux is not None and equation_reflux.converged else None
    eq_stages = None if equation_search is None else equation_search.stages
    common = dict(model=model, stages=stages, feed_stage=feed_stage, reflux_ratio=reflux_ratio,
                  equation_reflux=eq_reflux, equation_stages=eq_stages)
    ideal = ideal_vapor_case(case)
    try:
        thermo = ThermoPackage.from_case(ideal)
    except (CaseError, ThermoError) as exc:
        return IdealVaporComparison(applicable=False, reason=f"no ideal-vapor model of these components: {exc}", **common)
    columns = RigorousColumns(ideal, thermo, budget)
    for seed in seeds:
        columns.seed(*seed)
    result, message = try_solve(columns, stages, feed_stage, targets)
    reflux_run = run_summary("ideal vapor: reflux needed at the shortcut's stages", result, stages, feed_stage, targets,
                             targets, feed_composition, message)
    if not reflux_run.converged:
        return IdealVaporComparison(applicable=False, reason=reflux_run.message or message, reflux_needed=reflux_run,
                                    solves=columns.count, **common)
    search = stage_search(columns, reflux_ratio, float(reflux_run.distillate_flow), targets,
                          eq_stages or stages, feed_stage, feed_composition)
    return IdealVaporComparison(applicable=True, reason="", reflux_needed=reflux_run, stages_needed=search,
                                solves=columns.count, **common)


def ideal_vapor_shift(comparison: IdealVaporComparison | None, thresholds: Mapping[str, float]) -> Flag | None:
    """IDEAL_VAPOR_SHIFT: ideal-vapor K-values move the reflux needed beyond the
    ``reflux_difference`` threshold or the stages needed beyond ``stage_difference`` (warning;
    serious beyond ``serious_factor`` times either); info when the ideal-vapor model cannot
    describe the column; None within the thresholds."""
    if comparison is None:
        return None
    c = comparison
    if not c.applicable:
        return Flag("IDEAL_VAPOR_SHIFT", "info",
                    f"ideal-vapor K-values cannot describe this column, so {c.model} is needed here: {c.reason}",
                    {"applicable": False, "model": c.model})
    factor = thresholds["serious_factor"]
    severities = []
    parts = []
    if c.reflux_shift is not None:
        severities.append(severity_of(c.reflux_shift, thresholds["reflux_difference"], factor))
        parts.append(f"at {c.stages} stages (feed on stage {c.feed_stage}) the reflux needed would be "
                     f"{c.ideal_reflux:.4g} instead of {c.equation_reflux:.4g} ({100 * c.reflux_shift:+.1f} %, "
                     f"threshold {100 * thresholds['reflux_difference']:.3g} %)")
    if c.stage_shift is not None:
        limit = thresholds["stage_difference"]
        severity = None
        if abs(c.stage_shift) > limit:
            severity = "serious" if abs(c.stage_shift) > factor * limit and abs(c.stage_shift) > 0.1 * c.equation_stages else "warning"
        severities.append(severity)
        bound = "" if c.stages_needed.complete else "at most "
        parts.append(f"at the reflux ratio {c.reflux_ratio:.4g} the stages needed would be {bound}{c.ideal_stages} "
                     f"instead of {c.equation_stages} ({c.stage_shift:+d}, threshold {limit:.3g})")
    raised = [s for s in severities if s is not None]
    if not raised:
        return None
    severity = "serious" if "serious" in raised else "warning"
    return Flag("IDEAL_VAPOR_SHIFT", severity,
                f"ideal-vapor K-values instead of {c.model} would move the design at the same products: "
                + "; ".join(parts),
                {"applicable": True, "model": c.model, "equation_reflux": c.equation_reflux,
                 "ideal_reflux": c.ideal_reflux, "reflux_shift": c.reflux_shift, "equation_stages": c.equation_stages,
                 "ideal_stages": c.ideal_stages, "stage_shift": c.stage_shift,
                 "stage_search_complete": None if c.stages_needed is None else c.stages_needed.complete,
                 "reflux_threshold": thresholds["reflux_difference"], "stage_threshold": thresholds["stage_difference"]})


def ideal_vapor_record(comparison: IdealVaporComparison, components: Sequence[str],
                       thresholds: Mapping[str, float]) -> dict[str, Any]:
    """result.json "audit" -> "ideal_vapor" (SI)."""
    c = comparison
    flag = ideal_vapor_shift(c, thresholds)
    return {
        "model": c.model,
        "ideal_vapor_model": IDEAL_VAPOR_MODEL,
        "applicable": c.applicable,
        "reason": c.reason,
        "stages": c.stages,
        "feed_stage": c.feed_stage,
        "reflux_ratio": c.reflux_ratio,
        "reflux_needed": {"equation_of_state": c.equation_reflux, "ideal_vapor": c.ideal_reflux,
                          "relative_shift": c.reflux_shift},
        "stages_needed": {"equation_of_state": c.equation_stages, "ideal_vapor": c.ideal_stages,
                          "shift": c.stage_shift},
        "ideal_vapor_reflux_run": None if c.reflux_needed is None else run_record(c.reflux_needed, components),
        "ideal_vapor_stage_search": None if c.stages_needed is None else stage_search_record(c.stages_needed, components),
        "rigorous_solves": c.solves,
        "flag": None if flag is None else flag_record(flag),
    }
