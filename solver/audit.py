"""The audit: the shortcut design set beside the rigorous solution, with flags where the simple
method misleads.

For a case with one feed, a condenser and a partial reboiler (no side draws) the audit

(a) designs the column by the shortcut: McCabe-Thiele (with the Ponchon-Savarit construction
    beside it) for a binary, Fenske-Underwood-Gilliland-Kirkbride for more components. The
    shortcut needs the product purities and a reflux; each comes, in this order, from the
    case's ``[audit]`` table, from the case's specs, or from the rigorous solution of the case
    as specified (:class:`AuditBasis` records which);
(b) solves the shortcut's column rigorously -- its stage count and feed stage, its reflux ratio
    and its distillate rate -- and reads what purities that column really delivers;
(c) finds what the rigorous column really needs: the reflux ratio at the shortcut's stage count
    and feed stage (purity specs), and the stage count at the shortcut's reflux ratio (integer
    search on N, the distillate rate held, the feed stage moved until the purities are met);
(d) audits constant molar overflow stage by stage on the solution of (b): the liquid and vapor
    leaving each stage against their CMO values (the shortcut's section flows: ``L = R D``
    above the feed, ``L + q F`` below it, ``V = (R + 1) D``, ``V - (1 - q) F``), and the
    rigorous operating curve ``(x_j, y_j+1)`` against the straight operating lines;
(e) raises flags (:class:`Flag`): a code, a severity (info | warning | serious), a message a
    process engineer can act on, and its numbers. The thresholds are
    :data:`DEFAULT_THRESHOLDS`, each with its reason in :data:`THRESHOLD_REASONS`; a case's
    ``[audit] thresholds`` table or the ``thresholds=`` argument overrides them.

The rigorous solves share one thermo package and start from the nearest solution already found
(its profiles stretched section by section onto the new stage count), so a solve after the
first usually takes a few Newton iterations; the number of solves is bounded (``max_solves``).

:func:`audit_solution` is the part that needs no extra rigorous solve (the CMO audit of a given
solution, the feed condition, the duty estimates, the pinch of the shortcut's minimum reflux);
:mod:`solver.regress` records its flags in the baselines.

Units are SI: K, Pa, mol/s, W, J/mol; compositions are mole fractions.
"""

from __future__ import annotations

import dataclasses
import math
import time
from dataclasses import dataclass, field
from typing import Any, Callable, Mapping, Sequence

import numpy as np

from .case import Case, Spec
from .engine import simulate, stage_profile
from .errors import ConvergenceError, SpecError, ThermoError
from .results import Result
from .shortening import stretch_profile
from .shortcut import BinaryDesign, MulticomponentDesign, design_binary, design_multicomponent, design_ponchon_savarit
from .shortcut.fug import gilliland_stages
from .shortcut.mccabe_thiele import binary_problem, check_simple_column, mccabe_thiele, minimum_reflux
from .shortcut.ponchon_savarit import SaturatedEnthalpies, enthalpy_minimum_reflux
from .streams import StageProfile
from .thermo.flash import bubble_temperature, dew_temperature
from .thermo.package import ThermoPackage

__all__ = [
    "DEFAULT_THRESHOLDS",
    "MAX_SOLVES",
    "MIN_SOLVES",
    "SEVERITIES",
    "THRESHOLD_REASONS",
    "AuditBasis",
    "AuditReport",
    "CMOAudit",
    "Flag",
    "CountSearch",
    "RigorousRun",
    "ShortcutReport",
    "StageSearch",
    "audit_basis",
    "audit_case",
    "audit_solution",
    "cmo_audit",
    "impurity_ratio",
    "resolve_thresholds",
    "search_stage_count",
    "shortcut_case",
    "shortcut_record",
]

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

#: Relative tolerance for "the specs are met" in the stage search (numerical noise only).
MET_TOLERANCE = 1e-7
#: Most rigorous solves one audit may use (by default), and the fewest it can work with: the
#: case as specified (when the basis needs it), the shortcut's column, the reflux needed.
MAX_SOLVES = 30
MIN_SOLVES = 3
_SPLIT_KINDS = ("mole_fraction", "recovery", "distillate_rate", "bottoms_rate")


# =======================================================================================
# Data
# =======================================================================================


@dataclass(frozen=True)
class Flag:
    """One finding of the audit: ``code`` (upper-case word), ``severity`` (info | warning |
    serious), a plain-language ``message`` and the ``numbers`` behind it (SI)."""

    code: str
    severity: str
    message: str
    numbers: Mapping[str, Any] = field(default_factory=dict)

    def as_dict(self) -> dict[str, Any]:
        return {"code": self.code, "severity": self.severity, "message": self.message, "numbers": dict(self.numbers)}


@dataclass(frozen=True)
class AuditBasis:
    """What the shortcut designs for: the product ``targets`` (specs of kind mole_fraction,
    recovery or product rate), the reflux (``reflux_ratio`` or ``reflux_factor`` times the
    minimum), where each came from (``sources``: quantity -> "audit table" | "case specs" |
    "rigorous solution of the case as specified"), and the rigorous solution of the case as
    specified when one was needed (``case_result``)."""

    method: str  # "binary" | "multicomponent"
    targets: tuple[Spec, ...]
    reflux_ratio: float | None
    reflux_factor: float | None
    sources: Mapping[str, str]
    light: str | None = None  # binary: the light component
    case_result: Result | None = None
    notes: tuple[str, ...] = ()

    def design_case(self, case: Case) -> Case:
        """The case with its specs replaced by the targets (and the reflux ratio, if fixed)."""
        specs = self.targets + ((Spec("reflux_ratio", self.reflux_ratio, key="reflux_ratio"),) if self.reflux_ratio else ())
        return dataclasses.replace(case, specs=specs)


@dataclass(frozen=True)
class RigorousRun:
    """One rigorous solve of the audit, summarized (SI)."""

    label: str
    stages: int
    feed_stage: int
    specs: tuple[str, ...]
    converged: bool
    message: str = ""
    reflux_ratio: float | None = None
    distillate_flow: float | None = None
    bottoms_flow: float | None = None
    distillate_composition: tuple[float, ...] = ()
    bottoms_composition: tuple[float, ...] = ()
    condenser_duty: float | None = None
    reboiler_duty: float | None = None
    impurity_ratios: tuple[float, ...] = ()  # one per target: delivered impurity / specified impurity

    def as_dict(self, components: Sequence[str]) -> dict[str, Any]:
        return {
            "label": self.label,
            "stages": self.stages,
            "feed_stage": self.feed_stage,
            "specs": list(self.specs),
            "converged": self.converged,
            "message": self.message,
            "reflux_ratio": self.reflux_ratio,
            "distillate_flow": self.distillate_flow,
            "bottoms_flow": self.bottoms_flow,
            "distillate_composition": dict(zip(components, self.distillate_composition)),
            "bottoms_composition": dict(zip(components, self.bottoms_composition)),
            "condenser_duty": self.condenser_duty,
            "reboiler_duty": self.reboiler_duty,
            "impurity_ratios": list(self.impurity_ratios),
        }


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

    def as_dict(self, components: Sequence[str]) -> dict[str, Any]:
        return {
            "reflux_ratio": self.reflux_ratio,
            "distillate_flow": self.distillate_flow,
            "stages": self.stages,
            "feed_stage": self.feed_stage,
            "complete": self.complete,
            "largest_infeasible_stages": self.largest_infeasible,
            "tried": [{"stages": n, "feed_stage": f, "worst_impurity_ratio": s} for n, f, s in self.tried],
            "run": None if self.run is None else self.run.as_dict(components),
        }


@dataclass(frozen=True, eq=False)
class CMOAudit:
    """Constant molar overflow checked on a rigorous solution, stage by stage (top first).

    ``liquid_cmo`` / ``vapor_cmo`` are the section flows of the same reflux ratio, distillate
    rate and feed q; ``liquid_deviation`` = L / L_cmo - 1 on the stages whose liquid is an
    internal flow (1..N-1), ``vapor_deviation`` likewise (2..N), NaN elsewhere. For a binary,
    ``line_distance[j]`` is ``y_j+1 - y_line(x_j)``, the vertical distance of the rigorous
    operating curve from the straight operating line of the same section (lines through the
    products the column delivers, slopes from the CMO flows), NaN for the last stage."""

    feed_stage: int
    q: float
    q_effective: float
    reflux_ratio: float
    distillate_flow: float
    feed_flow: float
    liquid: np.ndarray
    vapor: np.ndarray
    liquid_cmo: np.ndarray
    vapor_cmo: np.ndarray
    liquid_deviation: np.ndarray
    vapor_deviation: np.ndarray
    line_distance: np.ndarray | None
    light: int | None

    @property
    def largest_liquid_deviation(self) -> tuple[float, int]:
        return _largest(self.liquid_deviation)

    @property
    def largest_vapor_deviation(self) -> tuple[float, int]:
        return _largest(self.vapor_deviation)

    @property
    def largest_line_distance(self) -> tuple[float, int]:
        if self.line_distance is None:
            return float("nan"), 0
        return _largest(self.line_distance)

    def as_dict(self) -> dict[str, Any]:
        stages = []
        for j in range(self.liquid.size):
            stages.append({
                "stage": j + 1,
                "L": float(self.liquid[j]),
                "L_cmo": float(self.liquid_cmo[j]),
                "liquid_deviation": _number(self.liquid_deviation[j]),
                "V": float(self.vapor[j]),
                "V_cmo": float(self.vapor_cmo[j]),
                "vapor_deviation": _number(self.vapor_deviation[j]),
                "line_distance": None if self.line_distance is None else _number(self.line_distance[j]),
            })
        liquid, liquid_stage = self.largest_liquid_deviation
        vapor, vapor_stage = self.largest_vapor_deviation
        distance, distance_stage = self.largest_line_distance
        return {
            "feed_stage": self.feed_stage,
            "q": self.q,
            "q_effective": self.q_effective,
            "reflux_ratio": self.reflux_ratio,
            "distillate_flow": self.distillate_flow,
            "feed_flow": self.feed_flow,
            "largest_liquid_deviation": {"value": _number(liquid), "stage": liquid_stage},
            "largest_vapor_deviation": {"value": _number(vapor), "stage": vapor_stage},
            "largest_line_distance": {"value": _number(distance), "stage": distance_stage},
            "stages": stages,
        }


@dataclass(frozen=True, eq=False)
class ShortcutReport:
    """The shortcut designs of a case: ``design`` (McCabe-Thiele or FUGK), for a binary also
    ``enthalpy_design`` (Ponchon-Savarit, None if it failed, with ``enthalpy_message``), and the
    basis they were designed for."""

    case: Case
    basis: AuditBasis
    design: BinaryDesign | MulticomponentDesign
    enthalpy_design: BinaryDesign | None = None
    enthalpy_message: str = ""

    @property
    def is_binary(self) -> bool:
        return isinstance(self.design, BinaryDesign)


@dataclass(frozen=True, eq=False)
class AuditReport:
    """Everything :func:`audit_case` found. ``result`` is the rigorous solution of the
    shortcut's column (b) with ``extra["shortcut"]`` and ``extra["audit"]`` added."""

    shortcut: ShortcutReport
    thresholds: Mapping[str, float]
    shortcut_reflux_at_stages: float | None
    at_design: RigorousRun
    reflux_needed: RigorousRun | None
    stages_needed: StageSearch | None
    cmo: CMOAudit | None
    flags: tuple[Flag, ...]
    solves: int
    seconds: float
    result: Result
    case_run: RigorousRun | None = None
    notes: tuple[str, ...] = ()



# =======================================================================================
# Small helpers
# =======================================================================================


def _number(value: float) -> float | None:
    value = float(value)
    return value if math.isfinite(value) else None


def _largest(values: np.ndarray) -> tuple[float, int]:
    """(signed value of largest magnitude, its stage number) ignoring NaN."""
    values = np.asarray(values, dtype=float)
    if not np.any(np.isfinite(values)):
        return float("nan"), 0
    j = int(np.nanargmax(np.abs(values)))
    return float(values[j]), j + 1


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


def _severity(measure: float, threshold: float, factor: float) -> str | None:
    """None within the threshold, "warning" beyond it, "serious" beyond factor times it."""
    measure = abs(measure)
    if not measure > threshold:
        return None
    return "serious" if measure > factor * threshold else "warning"


def describe_spec(spec: Spec) -> str:
    if spec.kind == "mole_fraction":
        return f"{spec.product} x {spec.component} = {spec.value:.6g}"
    if spec.kind == "recovery":
        return f"recovery of {spec.component} to the {spec.product} = {spec.value:.6g}"
    if spec.kind in ("distillate_rate", "bottoms_rate"):
        return f"{spec.kind} = {spec.value:.6g} mol/s"
    return f"{spec.kind} = {spec.value:.6g}"


def _feed(case: Case):
    return case.feeds[0]


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


# =======================================================================================
# (a) the basis and the shortcut designs
# =======================================================================================


def _light_index(case: Case, thermo: ThermoPackage) -> int:
    """The more volatile component of a binary at the feed's bubble point, mean pressure."""
    pressure = np.array([float(np.mean(case.column.pressures))])
    z = np.asarray(_feed(case).composition, dtype=float)[None, :]
    T, _ = bubble_temperature(thermo, pressure, z)
    K = thermo.k_values(T, pressure, z, derivatives=False).K[0]
    return 0 if K[0] >= K[1] else 1


def _case_reflux(case: Case) -> float | None:
    for spec in case.specs:
        if spec.kind == "reflux_ratio":
            return float(spec.value)
    return None


def audit_basis(case: Case, thermo: ThermoPackage, solve: Callable[[Case], Result]) -> AuditBasis:
    """The product targets and reflux the shortcut designs for: from ``[audit]``, else the
    case's specs, else the rigorous solution of the case as specified (``solve(case)``, called
    at most once)."""
    check_simple_column(case, "audit's")
    options = case.audit
    names = list(case.component_names)
    sources: dict[str, str] = {}
    notes: list[str] = []
    solved: list[Result] = []

    def rigorous() -> Result:
        if not solved:
            result = solve(case)
            if not result.converged:
                raise SpecError(
                    "the audit needs the rigorous solution of the case as specified for the quantities its specs and "
                    f"[audit] table do not give, and that solve did not converge: {result.message}"
                )
            solved.append(result)
        return solved[0]

    reflux_ratio = options.reflux_ratio if options else None
    reflux_factor = options.reflux_factor if options else None
    if reflux_ratio is not None:
        sources["reflux"] = "audit table (reflux_ratio)"
    elif reflux_factor is not None:
        sources["reflux"] = "audit table (reflux_factor)"
    elif _case_reflux(case) is not None:
        reflux_ratio = _case_reflux(case)
        sources["reflux"] = "case specs (reflux_ratio)"

    audit_products = tuple(options.products) if options else ()
    case_split = tuple(s for s in case.specs if s.kind in _SPLIT_KINDS)

    if case.component_count == 2:
        light_index = _light_index(case, thermo)
        light = names[light_index]
        x: dict[str, float] = {}
        for spec in audit_products:
            x[spec.product] = spec.value if spec.component == light else 1.0 - spec.value
            sources[spec.product] = f"audit table ({spec.key})"
        missing = [p for p in ("distillate", "bottoms") if p not in x]
        if missing and len(case_split) == 2:
            problem = binary_problem(dataclasses.replace(case, specs=case_split), thermo, reflux_ratio=1.0)
            split = {"distillate": problem.x_distillate, "bottoms": problem.x_bottoms}
            for product in missing:
                x[product] = split[product]
                sources[product] = "case specs (" + "; ".join(describe_spec(s) for s in case_split) + ")"
        elif missing:
            for spec in case_split:
                if spec.kind == "mole_fraction" and spec.product in missing:
                    x[spec.product] = spec.value if spec.component == light else 1.0 - spec.value
                    sources[spec.product] = f"case specs ({spec.key})"
        for product in ("distillate", "bottoms"):
            if product not in x:
                result = rigorous()
                composition = result.distillate_composition if product == "distillate" else result.bottoms_composition
                x[product] = float(composition[light_index])
                sources[product] = "rigorous solution of the case as specified"
        targets = (
            Spec("mole_fraction", x["distillate"], component=light, product="distillate", key="distillate"),
            Spec("mole_fraction", x["bottoms"], component=light, product="bottoms", key="bottoms"),
        )
        sources["target 1"] = sources.pop("distillate")
        sources["target 2"] = sources.pop("bottoms")
    else:
        light = None
        chosen = [(spec, f"audit table ({spec.key})") for spec in audit_products]
        for spec in case_split:
            if len(chosen) >= 2:
                break
            if any(t.product == spec.product and t.component == spec.component for t, _ in chosen):
                continue
            chosen.append((spec, f"case specs ({spec.key or spec.kind})"))
        if len(chosen) < 2:
            result = rigorous()
            chosen = [(spec, "rigorous solution of the case as specified") for spec in _key_recoveries(case, result)]
            notes.append(
                "the specs and [audit] table name fewer than two product targets: the keys and their recoveries "
                "come from the rigorous solution of the case as specified"
            )
        chosen = chosen[:2]
        targets = tuple(spec for spec, _ in chosen)
        for k, (_, source) in enumerate(chosen):
            sources[f"target {k + 1}"] = source
    if reflux_ratio is None and reflux_factor is None:
        result = rigorous()
        reflux_ratio = float(result.reflux_ratio)
        sources["reflux"] = "rigorous solution of the case as specified"
    return AuditBasis(
        method="binary" if case.component_count == 2 else "multicomponent",
        targets=tuple(targets),
        reflux_ratio=None if reflux_factor is not None else float(reflux_ratio),
        reflux_factor=reflux_factor,
        sources=dict(sources),
        light=light,
        case_result=solved[0] if solved else None,
        notes=tuple(notes),
    )


def _key_recoveries(case: Case, result: Result) -> tuple[Spec, Spec]:
    """Light and heavy key of a rigorous solution and their recoveries: the least volatile
    component (K at the feed stage) that goes mostly to the distillate and the next heavier one."""
    feed_stage = _feed(case).stage - 1
    order = np.argsort(-result.K[feed_stage])
    feed = np.asarray(_feed(case).composition, dtype=float) * _feed(case).flow
    recovery = result.distillate_flow * result.distillate_composition / np.maximum(feed, 1e-300)
    light_position = max((p for p, i in enumerate(order) if recovery[i] > 0.5), default=0)
    light_position = min(light_position, len(order) - 2)
    light, heavy = int(order[light_position]), int(order[light_position + 1])
    names = case.component_names
    return (
        Spec("recovery", float(min(recovery[light], 1.0 - 1e-12)), component=names[light], product="distillate",
             key=f"recovery.{names[light]}.distillate"),
        Spec("recovery", float(min(1.0 - recovery[heavy], 1.0 - 1e-12)), component=names[heavy], product="bottoms",
             key=f"recovery.{names[heavy]}.bottoms"),
    )


def _designs(case: Case, basis: AuditBasis, thermo: ThermoPackage) -> ShortcutReport:
    """The shortcut designs for ``basis``; a SpecError says where the numbers came from."""
    try:
        return _designs_of(case, basis, thermo)
    except SpecError as exc:
        origin = "; ".join(f"{what}: {source}" for what, source in basis.sources.items())
        raise SpecError(
            f"{exc} [the shortcut's targets and reflux came from {origin}; an [audit] table with distillate, "
            "bottoms and reflux_factor sets them]"
        ) from None


def _designs_of(case: Case, basis: AuditBasis, thermo: ThermoPackage) -> ShortcutReport:
    design_case = basis.design_case(case)
    if basis.method == "binary":
        design = design_binary(design_case, thermo, reflux_factor=basis.reflux_factor)
        enthalpy_design, message = None, ""
        try:
            enthalpy_design = design_ponchon_savarit(
                design_case, thermo, reflux_ratio=design.reflux_ratio if basis.reflux_factor is not None else None
            )
        except (SpecError, ThermoError) as exc:
            message = str(exc)
        return ShortcutReport(case, basis, design, enthalpy_design, message)
    design = design_multicomponent(design_case, thermo, reflux_factor=basis.reflux_factor)
    return ShortcutReport(case, basis, design)


def shortcut_case(case: Case, *, thermo: ThermoPackage | None = None) -> ShortcutReport:
    """The shortcut designs of ``case`` (the ``traystack shortcut`` command): the basis as in
    :func:`audit_basis` (a rigorous solve only when the specs and ``[audit]`` leave something
    open). Raises :class:`SpecError` for infeasible specs."""
    thermo = thermo or ThermoPackage.from_case(case)
    basis = audit_basis(case, thermo, lambda c: simulate(c, thermo=thermo))
    return _designs(case, basis, thermo)


# =======================================================================================
# Rigorous variants of the case and their solves
# =======================================================================================


def column_variant(case: Case, stages: int, feed_stage: int, specs: Sequence[Spec]) -> tuple[Case, list[str]]:
    """``case`` with ``stages`` stages, the feed on ``feed_stage`` and ``specs``: the top
    pressure and the mean pressure drop per stage kept, equilibrium stages (the shortcut counts
    them), side heaters kept where their stage still is a tray."""
    column = case.column
    notes = []
    P = np.asarray(column.pressures, dtype=float)
    drop = (P[-1] - P[0]) / (P.size - 1) if P.size > 1 else 0.0
    if P.size > 2 and np.max(np.abs(np.diff(P) - drop)) > 1e-6 * max(abs(drop), 1.0):
        notes.append("the case's pressure profile is replaced by its top pressure and mean drop per stage")
    pressures = tuple(float(P[0] + drop * k) for k in range(stages))
    if any(e < 1.0 for e in column.efficiencies):
        notes.append("the audit's columns have equilibrium stages (Murphree efficiency 1), as the shortcut counts "
                     "them; the case's efficiencies are not applied")
    efficiencies = (1.0,) * stages
    heaters = tuple(h for h in column.stage_duties if 1 < h.stage < stages)
    if len(heaters) != len(column.stage_duties):
        notes.append("side heaters below the new last tray are left out")
    new_column = dataclasses.replace(column, stages=stages, pressures=pressures, efficiencies=efficiencies,
                                     stage_duties=heaters)
    feeds = (dataclasses.replace(case.feeds[0], stage=int(feed_stage)),)
    return dataclasses.replace(case, column=new_column, feeds=feeds, specs=tuple(specs)), notes


def _section_positions(stages: int, feed_stage: int, old_stages: int, old_feed: int) -> np.ndarray:
    """Where each new stage sits on the old column (fractional stage number, 1-based):
    rectifying stages onto rectifying stages, stripping onto stripping, linearly."""
    j = np.arange(1, stages + 1, dtype=float)
    position = np.empty(stages)
    top = j < feed_stage
    if feed_stage > 2:
        position[top] = 1.0 + (j[top] - 1.0) * (old_feed - 2.0) / (feed_stage - 2.0)
    else:
        position[top] = 1.0
    bottom = ~top
    span = stages - feed_stage
    position[bottom] = old_feed + ((j[bottom] - feed_stage) * (old_stages - old_feed) / span if span > 0 else 0.0)
    return position


def warm_start(previous: Result, stages: int, feed_stage: int, old_feed_stage: int) -> StageProfile:
    """The start profile of a column of ``stages`` stages with the feed on ``feed_stage``, from
    the profiles of ``previous`` stretched section by section."""
    where = _section_positions(stages, feed_stage, previous.stage_count, old_feed_stage)
    return stretch_profile(stage_profile(previous), where)


class _BudgetSpent(Exception):
    pass


class RigorousColumns:
    """The rigorous solves of one audit: one thermo package, warm starts from the nearest
    solution found so far (a cold retry after a failed one counts as one more solve), and the
    count against ``budget``, which the stage search respects (the case as specified, the
    shortcut's column and the reflux needed are always solved)."""

    def __init__(self, case: Case, thermo: ThermoPackage, budget: int = MAX_SOLVES) -> None:
        self.case = case
        self.thermo = thermo
        self.budget = budget
        self.count = 0
        self.notes: list[str] = []
        self._solutions: list[tuple[int, int, Result]] = []

    @property
    def spent(self) -> bool:
        return self.count >= self.budget

    def _simulate(self, case: Case, start: StageProfile | None) -> Result:
        self.count += 1
        return simulate(case, thermo=self.thermo, start=start)

    def solve_case(self, case: Case) -> Result:
        """The case as it is (cold start)."""
        result = self._simulate(case, None)
        if result.converged:
            self._solutions.append((case.column.stages, case.feeds[0].stage, result))
        return result

    def solve(self, stages: int, feed_stage: int, specs: Sequence[Spec]) -> Result:
        """Raises SpecError (infeasible specs) or ConvergenceError (NaN)."""
        variant, notes = column_variant(self.case, stages, feed_stage, specs)
        for note in notes:
            if note not in self.notes:
                self.notes.append(note)
        result = None
        if self._solutions:
            N0, f0, previous = min(self._solutions, key=lambda s: (abs(s[0] - stages), abs(s[1] - feed_stage)))
            try:
                result = self._simulate(variant, warm_start(previous, stages, feed_stage, f0))
            except ConvergenceError:
                result = None
        if result is None or not result.converged:
            result = self._simulate(variant, None)
        if result.converged:
            self._solutions.append((stages, feed_stage, result))
        return result


def _summarize(label: str, result: Result | None, stages: int, feed_stage: int, specs: Sequence[Spec],
               targets: Sequence[Spec], z: Sequence[float], message: str = "") -> RigorousRun:
    described = tuple(describe_spec(s) for s in specs)
    if result is None:
        return RigorousRun(label, stages, feed_stage, described, False, message)
    ratios = tuple(impurity_ratio(result, t, z) for t in targets) if result.converged else ()
    return RigorousRun(
        label=label, stages=stages, feed_stage=feed_stage, specs=described, converged=bool(result.converged),
        message=result.message if not result.converged else message,
        reflux_ratio=result.reflux_ratio, distillate_flow=result.distillate_flow, bottoms_flow=result.bottoms_flow,
        distillate_composition=tuple(float(v) for v in result.distillate_composition),
        bottoms_composition=tuple(float(v) for v in result.bottoms_composition),
        condenser_duty=result.condenser_duty, reboiler_duty=result.reboiler_duty, impurity_ratios=ratios,
    )


def _try_solve(columns: RigorousColumns, stages: int, feed_stage: int, specs: Sequence[Spec]) -> tuple[Result | None, str]:
    try:
        return columns.solve(stages, feed_stage, specs), ""
    except (SpecError, ThermoError, ConvergenceError) as exc:
        return None, str(exc)


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

    For each count the feed stage starts from the best one of the nearest count tried,
    stretched, and moves while that lowers the ratio (the side it last moved to tried first;
    the stride doubling along a run of improvements, back to one stage after an overshoot),
    stopping as soon as the targets are met. The count starts at ``start_stages`` and moves down (if its column
    meets the targets) or up (if not) by secant steps on the log of the ratio until the answer
    is bracketed, then by regula falsi and bisection to one stage (:func:`_next_count`).
    ``evaluate`` may raise :class:`_BudgetSpent` to stop the search (``complete`` False)."""
    largest = largest or max(2 * start_stages, start_stages + 20)
    tried: list[tuple[int, int, float | None]] = []
    verdicts: dict[int, tuple[float, int]] = {}
    best_feed: dict[int, int] = {start_stages: start_feed_stage}
    preferred = [-1]  # the side the feed stage last moved to, tried first

    def guess_feed(stages: int) -> int:
        known = min(best_feed, key=lambda n: abs(n - stages))
        f = best_feed[known]
        guess = 1 + round((f - 1) * (stages - 1) / max(known - 1, 1))
        return int(min(max(guess, 2), stages - 1))

    def evaluate_count(stages: int) -> float:
        seen: dict[int, float] = {}

        def at(f: int) -> float:
            if f not in seen:
                seen[f] = float(evaluate(stages, f))
                tried.append((stages, f, seen[f] if math.isfinite(seen[f]) else None))
            return seen[f]

        f = guess_feed(stages)
        value = at(f)
        direction, stride = 0, 1
        while value > 1.0 + MET_TOLERANCE:
            sides = (direction,) if direction else (preferred[0], -preferred[0])
            for side in sides:
                g = min(max(f + side * stride, 2), stages - 1)
                if g != f and at(g) < value:
                    direction, f, value = side, g, at(g)
                    preferred[0] = side
                    stride *= 2  # a run of improvements in one direction: longer strides
                    break
            else:
                if stride > 1:
                    stride = 1  # overshot: back to single stages around the best so far
                    continue
                break
        best_feed[stages] = f
        verdicts[stages] = (value, f)
        return value

    complete = True
    low = high = None  # largest count known to fail the targets, smallest known to meet them
    points: list[tuple[int, float]] = []
    inside = 0  # counts tried inside the bracket: after two regula falsi steps, bisection
    try:
        n: int | None = start_stages
        while n is not None:
            if low is not None and high is not None:
                inside += 1
            value = evaluate_count(n)
            points.append((n, value))
            if value <= 1.0 + MET_TOLERANCE:
                high = n if high is None else min(high, n)
            else:
                low = n if low is None else max(low, n)
            if high is not None and high <= smallest:
                break
            n = _next_count(points, low, high, start_stages, smallest, largest, bisect=inside >= 2)
            if n is not None and n in verdicts:
                n = None
    except _BudgetSpent:
        complete = False
    if high is None:
        return CountSearch(None, None, low, complete, tuple(tried))
    settled = high <= smallest or (low is not None and high - low <= 1)
    return CountSearch(high, verdicts[high][1], low, complete and settled, tuple(tried))


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
        result, _ = _try_solve(columns, stages, feed_stage, specs)
        results[(stages, feed_stage)] = result
        if result is None or not result.converged:
            return math.inf
        return max(impurity_ratio(result, t, z) for t in targets)

    found = search_stage_count(evaluate, start_stages, start_feed_stage, largest=largest)
    run = None
    if found.stages is not None:
        run = _summarize("stages needed at the shortcut's reflux", results[(found.stages, found.feed_stage)],
                         found.stages, found.feed_stage, specs, targets, z)
    return StageSearch(reflux_ratio, distillate_flow, found.stages, found.feed_stage, found.complete,
                       found.largest_infeasible, found.tried, run)


# =======================================================================================
# (d) the CMO audit of a solution
# =======================================================================================


def _feed_stage_of(result: Result) -> int:
    stages = [j + 1 for j, feeds in enumerate(result.stage_feeds) if feeds]
    if len(stages) != 1:
        raise SpecError(f"the CMO audit handles one feed; this solution has feeds on stages {stages}")
    return stages[0]


def cmo_audit(result: Result, light: int | None = None) -> CMOAudit:
    """Constant molar overflow checked on ``result`` (one feed, condenser and partial
    reboiler): the section flows of its own reflux ratio, distillate rate and feed q against
    the rigorous flows; for a binary (``light`` the index of the light component) the
    operating curve against the straight lines."""
    f = _feed_stage_of(result)
    feed = result.stage_feeds[f - 1][0]
    F, q = float(feed.flow), float(feed.q)
    N = result.stage_count
    D, B = result.distillate_flow, result.bottoms_flow
    R = float(result.reflux_ratio)
    numbers = np.arange(1, N + 1)
    L_top, V_top = R * D, (R + 1.0) * D
    L_bottom, V_bottom = L_top + q * F, V_top - (1.0 - q) * F
    liquid_cmo = np.where(numbers < f, L_top, L_bottom)
    vapor_cmo = np.where(numbers <= f, V_top, V_bottom)
    liquid_cmo[-1] = B
    vapor_cmo[0] = D
    L, V = result.liquid_flow.copy(), result.vapor_flow.copy()
    liquid_deviation = np.full(N, np.nan)
    vapor_deviation = np.full(N, np.nan)
    liquid_deviation[:-1] = L[:-1] / liquid_cmo[:-1] - 1.0
    vapor_deviation[1:] = V[1:] / vapor_cmo[1:] - 1.0
    q_effective = effective_q(L, f, F)
    line_distance = None
    if light is not None and len(result.components) == 2:
        x = result.x[:, light]
        y = result.y[:, light]
        x_D, x_B = float(result.distillate_composition[light]), float(result.bottoms_composition[light])
        rectifying = (L_top / V_top) * x[:-1] + D * x_D / V_top
        stripping = (L_bottom / V_bottom) * x[:-1] - B * x_B / V_bottom if V_bottom > 0 else np.full(N - 1, np.nan)
        line = np.where(numbers[:-1] < f, rectifying, stripping)
        line_distance = np.full(N, np.nan)
        line_distance[:-1] = y[1:] - line
    return CMOAudit(
        feed_stage=f, q=q, q_effective=q_effective, reflux_ratio=R, distillate_flow=D, feed_flow=F,
        liquid=L, vapor=V, liquid_cmo=liquid_cmo, vapor_cmo=vapor_cmo, liquid_deviation=liquid_deviation,
        vapor_deviation=vapor_deviation, line_distance=line_distance, light=light,
    )


def effective_q(liquid: np.ndarray, feed_stage: int, feed_flow: float) -> float:
    """The feed's thermal condition as the rigorous column shows it: the jump of the liquid
    flow at the feed stage, ``L_f - L_f-1``, less the mean stage-to-stage change of the liquid
    just above and just below it (the drift of the flows that unequal latent heats cause on
    every stage), over the feed flow. Under CMO it is q exactly."""
    L = np.asarray(liquid, dtype=float)
    N, f = L.size, int(feed_stage)
    if f < 2:
        return float("nan")
    jump = L[f - 1] - L[f - 2]
    trend = []
    if f - 2 >= 2:  # the two stages above the feed are trays (a condenser's liquid is the reflux)
        trend.append(L[f - 2] - L[f - 3])
    if f + 1 <= N - 1:  # the stage below the feed is a tray (the reboiler's liquid is the bottoms)
        trend.append(L[f] - L[f - 1])
    return float((jump - (np.mean(trend) if trend else 0.0)) / feed_flow)


def composition_steps(x: np.ndarray) -> np.ndarray:
    """The composition step of each stage pair (j, j+1), top first, measured as the change of
    ln(x / (1 - x)) of the light component: small where the operating curve comes close to the
    equilibrium curve (a pinch); the log-ratio keeps the high-purity ends, where mole fractions
    change little from stage to stage, from looking like one."""
    x = np.clip(np.asarray(x, dtype=float), 1e-15, 1.0 - 1e-15)
    return np.abs(np.diff(np.log(x / (1.0 - x))))


def pinch_stage(x: np.ndarray) -> int:
    """The upper stage (1-based) of the pair with the smallest :func:`composition_steps`."""
    return int(np.argmin(composition_steps(x))) + 1


#: The rigorous step at the shortcut's pinch must be this many times the rigorous column's
#: smallest step for the pinch to count as moved (a distinct zone, not a near tie).
PINCH_CONTRAST = 1.5


def _pinch_shift_flags(rigorous_x: np.ndarray, shortcut_x: np.ndarray, feed_stage: int,
                       thresholds: Mapping[str, float]) -> list[Flag]:
    """PINCH_MOVED when the rigorous column's smallest composition step lies more than
    ``pinch_shift`` stages from the McCabe-Thiele steps' smallest one (the shortcut's last
    step, which passes x_B, left out) and is a distinct zone (:data:`PINCH_CONTRAST`)."""
    rigorous = composition_steps(rigorous_x)
    shortcut = composition_steps(shortcut_x[:-1])
    j_rigorous = int(np.argmin(rigorous))
    j_shortcut = int(np.argmin(shortcut))
    shift = j_rigorous - j_shortcut
    if j_shortcut >= rigorous.size or abs(shift) <= thresholds["pinch_shift"]:
        return []
    contrast = float(rigorous[j_shortcut] / max(rigorous[j_rigorous], 1e-300))
    if contrast < PINCH_CONTRAST:
        return []
    top, bottom = j_rigorous + 1, j_shortcut + 1
    return [Flag(
        "PINCH_MOVED", "warning",
        f"the rigorous column pinches at stages {top}-{top + 1} ({_section_of(top, feed_stage, 1)}), the "
        f"McCabe-Thiele steps at stages {bottom}-{bottom + 1} ({_section_of(bottom, feed_stage, 1)}), {abs(shift)} "
        f"stages {'lower' if shift > 0 else 'higher'}; there the rigorous step is {contrast:.2g} times its smallest "
        f"(threshold {thresholds['pinch_shift']:.3g} stages)",
        {"basis": "smallest composition step", "rigorous_stage": top, "shortcut_stage": bottom, "shift": shift,
         "rigorous_smallest_step": float(rigorous[j_rigorous]), "rigorous_step_at_shortcut_pinch": float(rigorous[j_shortcut]),
         "shortcut_smallest_step": float(shortcut[j_shortcut]), "contrast": contrast,
         "threshold": thresholds["pinch_shift"]},
    )]


def _section_of(stage: int, feed_stage: int, tolerance: int) -> str:
    if stage < feed_stage - tolerance:
        return "rectifying section"
    if stage > feed_stage + tolerance:
        return "stripping section"
    return "at the feed"


# =======================================================================================
# (e) flags
# =======================================================================================


def cmo_flags(cmo: CMOAudit, thresholds: Mapping[str, float]) -> list[Flag]:
    """CMO_DEVIATION (internal flows away from CMO) and FEED_CONDITION (the feed moves the
    section flows differently from its q)."""
    flags = []
    factor = thresholds["serious_factor"]
    liquid, liquid_stage = cmo.largest_liquid_deviation
    vapor, vapor_stage = cmo.largest_vapor_deviation
    distance, distance_stage = cmo.largest_line_distance
    worst = max(abs(liquid) if math.isfinite(liquid) else 0.0, abs(vapor) if math.isfinite(vapor) else 0.0)
    severity = _severity(worst, thresholds["cmo_deviation"], factor)
    if severity:
        which = "liquid" if abs(liquid) >= abs(vapor) else "vapor"
        stage = liquid_stage if which == "liquid" else vapor_stage
        value = liquid if which == "liquid" else vapor
        line = (f"; the rigorous operating curve lies up to {abs(distance):.3g} (mole fraction) "
                f"{'above' if distance > 0 else 'below'} the straight operating line, at stage {distance_stage}"
                if math.isfinite(distance) else "")
        flags.append(Flag(
            "CMO_DEVIATION", severity,
            f"constant molar overflow does not hold: the {which} leaving stage {stage} is {100 * value:+.1f} % off its "
            f"CMO value (threshold {100 * thresholds['cmo_deviation']:.3g} %); largest liquid deviation "
            f"{100 * liquid:+.1f} % (stage {liquid_stage}), vapor {100 * vapor:+.1f} % (stage {vapor_stage}){line}",
            {"largest_liquid_deviation": _number(liquid), "liquid_stage": liquid_stage,
             "largest_vapor_deviation": _number(vapor), "vapor_stage": vapor_stage,
             "largest_line_distance": _number(distance), "line_distance_stage": distance_stage,
             "threshold": thresholds["cmo_deviation"]},
        ))
    difference = cmo.q_effective - cmo.q
    severity = _severity(difference, thresholds["feed_condition"], factor) if math.isfinite(difference) else None
    numbers = {"q": cmo.q, "q_effective": cmo.q_effective, "difference": difference, "feed_stage": cmo.feed_stage,
               "threshold": thresholds["feed_condition"], "q_offset_threshold": thresholds["feed_q_offset"]}
    state = "subcooled" if cmo.q > 1.0 else ("partly vaporized" if cmo.q > 0.0 else "superheated")
    if severity:
        flags.append(Flag(
            "FEED_CONDITION", severity,
            f"the feed condition moves the answer: q from the feed enthalpy is {cmo.q:.4f}, but the liquid flow "
            f"jumps by {cmo.q_effective:.4f} F at the feed stage {cmo.feed_stage} of the rigorous column "
            f"(difference {difference:+.4f}, threshold {thresholds['feed_condition']:.3g}): the shortcut's q-line "
            "misplaces the stripping section's flows",
            numbers,
        ))
    elif abs(cmo.q - 1.0) > thresholds["feed_q_offset"]:
        flags.append(Flag(
            "FEED_CONDITION", "info",
            f"the feed is {state} (q = {cmo.q:.4f}), which moves the section flows by {abs(cmo.q - 1.0):.3g} F; the "
            f"rigorous column's liquid jumps by {cmo.q_effective:.4f} F at the feed stage {cmo.feed_stage}, so the "
            "shortcut's q-line carries it",
            numbers,
        ))
    return flags


def _duty_flags(shortcut_duties: tuple[float, float], rigorous_duties: tuple[float | None, float | None],
                thresholds: Mapping[str, float], what: str) -> list[Flag]:
    flags = []
    factor = thresholds["serious_factor"]
    for name, estimate, rigorous in zip(("condenser", "reboiler"), shortcut_duties, rigorous_duties):
        if rigorous is None or not math.isfinite(estimate) or rigorous == 0:
            continue
        difference = (estimate - rigorous) / abs(rigorous)
        severity = _severity(difference, thresholds["duty_difference"], factor)
        if severity:
            flags.append(Flag(
                "DUTY_DIFFERENCE", severity,
                f"the shortcut's {name} duty ({estimate / 1e3:.4g} kW, {what}) is {100 * difference:+.1f} % off the "
                f"rigorous {rigorous / 1e3:.4g} kW at the same reflux ratio and distillate rate "
                f"(threshold {100 * thresholds['duty_difference']:.3g} %)",
                {"duty": name, "shortcut": estimate, "rigorous": rigorous, "difference": difference,
                 "threshold": thresholds["duty_difference"]},
            ))
    return flags


def _tangent_flags(design: BinaryDesign, enthalpy_design: BinaryDesign | None, thresholds: Mapping[str, float]) -> list[Flag]:
    """TANGENT_PINCH: a tangent pinch of the CMO or the enthalpy construction that raises the
    minimum reflux above the feed pinch's; PINCH_MOVED: the enthalpy construction pinches in
    another section than the CMO one."""
    flags = []
    factor = thresholds["serious_factor"]
    for label, d in (("McCabe-Thiele", design), ("Ponchon-Savarit", enthalpy_design)):
        if d is None:
            continue
        pinch = d.minimum_reflux
        if pinch.pinch != "tangent" or not pinch.feed_pinch_ratio > 0:
            continue
        excess = pinch.ratio / pinch.feed_pinch_ratio - 1.0
        severity = _severity(excess, thresholds["tangent_pinch"], factor)
        if severity is None:
            severity = "info"
        flags.append(Flag(
            "TANGENT_PINCH", severity,
            f"{label}: a tangent pinch in the {pinch.section} section at x = {pinch.x:.4f} sets the minimum reflux "
            f"ratio {pinch.ratio:.4g}, {100 * excess:.1f} % above the feed pinch's {pinch.feed_pinch_ratio:.4g} "
            "(a minimum reflux from the feed pinch alone would be too low)",
            {"method": label, "minimum_reflux": pinch.ratio, "feed_pinch_minimum_reflux": pinch.feed_pinch_ratio,
             "excess": excess, "section": pinch.section, "x": pinch.x, "y": pinch.y,
             "threshold": thresholds["tangent_pinch"]},
        ))
    if enthalpy_design is not None and design.minimum_reflux.section != enthalpy_design.minimum_reflux.section:
        a, b = design.minimum_reflux, enthalpy_design.minimum_reflux
        flags.append(Flag(
            "PINCH_MOVED", "warning",
            f"with real enthalpies the column pinches elsewhere at minimum reflux: McCabe-Thiele at the {a.section} "
            f"pinch (x = {a.x:.4f}, R_min = {a.ratio:.4g}), Ponchon-Savarit at the {b.section} pinch "
            f"(x = {b.x:.4f}, R_min = {b.ratio:.4g})",
            {"basis": "minimum reflux", "shortcut_section": a.section, "shortcut_x": a.x,
             "enthalpy_section": b.section, "enthalpy_x": b.x, "shortcut_minimum_reflux": a.ratio,
             "enthalpy_minimum_reflux": b.ratio},
        ))
    return flags


def _cmo_duties(result: Result, thermo: ThermoPackage) -> tuple[float, float]:
    """The CMO duty estimates at the solution's reflux ratio, distillate rate and feed q:
    ``-V lambda(x_D)`` (a partial condenser condenses only the reflux) and
    ``V' lambda(x_B)``, lambda the dew-point vapor less the bubble-point liquid of each product
    at its stage's pressure -- the estimates the shortcut designs make."""
    f = _feed_stage_of(result)
    feed = result.stage_feeds[f - 1][0]
    R, D = float(result.reflux_ratio), result.distillate_flow
    V = (R + 1.0) * D
    V_bottom = V - (1.0 - float(feed.q)) * feed.flow

    def latent(x: np.ndarray, pressure: float) -> float:
        P = np.array([pressure])
        T_b, _ = bubble_temperature(thermo, P, x[None, :])
        T_d, _ = dew_temperature(thermo, P, x[None, :])
        return float(thermo.vapor_enthalpy(T_d, x[None, :]).molar[0] - thermo.liquid_enthalpy(T_b, x[None, :]).molar[0])

    top_pressure = float(result.pressure[1] if result.condenser == "total" else result.pressure[0])
    condensed = V if result.condenser == "total" else R * D
    condenser = -condensed * latent(result.distillate_composition, top_pressure)
    reboiler = V_bottom * latent(result.bottoms_composition, float(result.pressure[-1]))
    return condenser, reboiler


def audit_solution(
    case: Case,
    result: Result,
    *,
    thermo: ThermoPackage | None = None,
    thresholds: Mapping[str, float] | None = None,
) -> Result:
    """The audit of one rigorous solution that needs no further rigorous solve: the CMO audit
    of its flows, the feed condition, the CMO duty estimates at its own reflux ratio and
    distillate rate against its duties, and (binary) the pinch of the McCabe-Thiele and
    Ponchon-Savarit minimum reflux at its products. Returns ``result`` with
    ``extra["audit"]`` (``scope`` "solution"); a case the shortcut does not treat (side draws,
    several feeds, no condenser or reboiler) gets ``applicable: false`` and no flags."""
    chosen = resolve_thresholds(case, thresholds)
    try:
        check_simple_column(case, "audit's")
    except SpecError as exc:
        return result.with_extra(audit={"scope": "solution", "applicable": False, "reason": str(exc), "flags": []})
    if not result.converged:
        return result.with_extra(audit={"scope": "solution", "applicable": False,
                                        "reason": "the solution did not converge", "flags": []})
    thermo = thermo or ThermoPackage.from_case(case)
    try:
        record = _solution_record(case, result, thermo, chosen)
    except (SpecError, ThermoError) as exc:
        record = {"scope": "solution", "applicable": False, "reason": str(exc), "flags": []}
    return result.with_extra(audit=record)


def _solution_record(case: Case, result: Result, thermo: ThermoPackage, chosen: Mapping[str, float]) -> dict[str, Any]:
    light = None
    flags: list[Flag] = []
    pinch_record = None
    if case.component_count == 2:
        light = _light_index(case, thermo)
        name = case.component_names[light]
        x_D = float(result.distillate_composition[light])
        x_B = float(result.bottoms_composition[light])
        specs = (Spec("mole_fraction", x_D, component=name, product="distillate"),
                 Spec("mole_fraction", x_B, component=name, product="bottoms"),
                 Spec("reflux_ratio", float(result.reflux_ratio)))
        try:
            problem = binary_problem(dataclasses.replace(case, specs=specs), thermo)
            pinch = minimum_reflux(problem.curve, x_D, x_B, problem.x_feed, problem.q)
            enthalpies = SaturatedEnthalpies.from_thermo(problem.curve, thermo, problem.light_index)
            reflux_enthalpy = None
            if problem.reflux_temperature is not None:
                composition = np.zeros((1, 2))
                composition[0, light], composition[0, 1 - light] = x_D, 1.0 - x_D
                reflux_enthalpy = float(thermo.liquid_enthalpy(np.array([problem.reflux_temperature]), composition).molar[0])
            enthalpy_pinch, _ = enthalpy_minimum_reflux(
                problem.curve, enthalpies, x_distillate=x_D, x_bottoms=x_B, x_feed=problem.x_feed,
                feed_enthalpy=problem.feed_enthalpy, condenser=problem.condenser, reflux_enthalpy=reflux_enthalpy,
            )
            flags += _tangent_flags(_PinchHolder(pinch), _PinchHolder(enthalpy_pinch), chosen)
            pinch_record = {"mccabe_thiele": dataclasses.asdict(pinch), "ponchon_savarit": dataclasses.asdict(enthalpy_pinch)}
        except (SpecError, ThermoError) as exc:
            pinch_record = {"error": str(exc)}
    cmo = cmo_audit(result, light)
    flags += cmo_flags(cmo, chosen)
    estimates = _cmo_duties(result, thermo)
    flags += _duty_flags(estimates, (result.condenser_duty, result.reboiler_duty), chosen, "CMO estimate")
    record = {
        "scope": "solution",
        "applicable": True,
        "thresholds": chosen,
        "cmo": cmo.as_dict(),
        "cmo_deviation": _per_stage(cmo),
        "cmo_duty_estimates": {"condenser": estimates[0], "reboiler": estimates[1]},
        "minimum_reflux": pinch_record,
        "flags": [flag.as_dict() for flag in _sorted(flags)],
    }
    return record


@dataclass(frozen=True)
class _PinchHolder:
    """Just the minimum reflux of a design, for :func:`_tangent_flags`."""

    minimum_reflux: Any


def _per_stage(cmo: CMOAudit) -> list[dict[str, Any]]:
    return [
        {"stage": j + 1, "liquid": _number(cmo.liquid_deviation[j]), "vapor": _number(cmo.vapor_deviation[j])}
        for j in range(cmo.liquid.size)
    ]


def _sorted(flags: Sequence[Flag]) -> list[Flag]:
    return sorted(flags, key=lambda f: (-SEVERITIES.index(f.severity), f.code))


# =======================================================================================
# The full audit
# =======================================================================================


def _shortcut_reflux_at(report: ShortcutReport, stages: int) -> float | None:
    """The shortcut's own reflux ratio for exactly ``stages`` stages (its integer count, so
    that the rigorous reflux at that count is compared like with like): McCabe-Thiele stepping
    with the optimal feed, or the Gilliland-Molokanov correlation, solved for R by bisection."""
    design = report.design
    if isinstance(design, MulticomponentDesign):
        offset = 1 if design.condenser == "total" else 0
        target = stages - offset

        def gap(R: float) -> float:
            return gilliland_stages(design.minimum_equilibrium_stages, design.minimum_reflux, R) - target
    else:
        def gap(R: float) -> float:
            try:
                steps = mccabe_thiele(
                    design.curve, x_distillate=design.x_distillate, x_bottoms=design.x_bottoms, x_feed=design.x_feed,
                    q=design.q, reflux_ratio=R, feed_flow=design.feed_flow, condenser=design.condenser,
                )
            except SpecError:
                return math.inf
            return steps.fractional_stages - stages
    low = design.minimum_reflux_ratio * (1.0 + 1e-9)
    high = design.reflux_ratio
    if gap(high) >= 0.0:
        return float(high)
    for _ in range(60):
        middle = 0.5 * (low + high)
        if gap(middle) > 0.0:
            low = middle
        else:
            high = middle
        if high - low < 1e-7 * high:
            break
    return float(high)


def audit_case(
    case: Case,
    *,
    thresholds: Mapping[str, float] | None = None,
    thermo: ThermoPackage | None = None,
    max_solves: int = MAX_SOLVES,
) -> AuditReport:
    """The full audit of ``case`` (a)-(e), see the module docstring. Raises
    :class:`SpecError` for a case the shortcut does not treat or whose specs the shortcut
    cannot meet (a purity beyond an azeotrope, a reflux below the minimum)."""
    if max_solves < MIN_SOLVES:
        raise ValueError(f"the audit needs at least {MIN_SOLVES} rigorous solves, not {max_solves}")
    started = time.perf_counter()
    chosen = resolve_thresholds(case, thresholds)
    factor = chosen["serious_factor"]
    thermo = thermo or ThermoPackage.from_case(case)
    columns = RigorousColumns(case, thermo, max_solves)
    basis = audit_basis(case, thermo, columns.solve_case)
    report = _designs(case, basis, thermo)
    design = report.design
    names = list(case.component_names)
    z = np.asarray(case.feeds[0].composition, dtype=float)
    targets = basis.targets
    flags: list[Flag] = []
    notes: list[str] = list(basis.notes) + list(design.notes)

    # (b) the shortcut's column, solved rigorously
    N, f = int(design.stages), int(design.feed_stage)
    R, D = float(design.reflux_ratio), float(design.distillate_flow)
    design_specs = (Spec("reflux_ratio", R, key="reflux_ratio"), Spec("distillate_rate", D, key="distillate_rate"))
    result, message = _try_solve(columns, N, f, design_specs)
    if result is None:
        raise SpecError(f"the shortcut's column ({N} stages, feed on stage {f}, R = {R:.4g}, D = {D:.6g} mol/s) "
                        f"cannot be solved rigorously: {message}")
    at_design = _summarize("rigorous at the shortcut's design", result, N, f, design_specs, targets, z)
    light = names.index(basis.light) if basis.light else None
    cmo = None
    reflux_needed = None
    search = None
    shortcut_R_at_N = None
    if result.converged:
        # purity shortfall at the shortcut's design
        for target, ratio in zip(targets, at_design.impurity_ratios):
            severity = _severity(ratio - 1.0, chosen["purity_shortfall"], factor) if ratio > 1.0 else None
            if severity:
                flags.append(Flag(
                    "PURITY_SHORTFALL", severity,
                    f"the shortcut's column ({N} stages, feed on stage {f}, R = {R:.4g}) misses {describe_spec(target)}: "
                    f"its impurity is {ratio:.3g} times the specified one "
                    f"(threshold {1 + chosen['purity_shortfall']:.3g} times)",
                    {"target": describe_spec(target), "impurity_ratio": ratio, "stages": N, "feed_stage": f,
                     "reflux_ratio": R, "threshold": chosen["purity_shortfall"]},
                ))
        # (d) CMO audit of that solution, duties, pinches
        cmo = cmo_audit(result, light)
        flags += cmo_flags(cmo, chosen)
        flags += _duty_flags((design.condenser_duty, design.reboiler_duty), (result.condenser_duty, result.reboiler_duty),
                             chosen, "CMO estimate" if basis.method == "binary" else "FUGK CMO estimate")
        if isinstance(design, BinaryDesign):
            flags += _tangent_flags(design, report.enthalpy_design, chosen)
            flags += _pinch_shift_flags(result.x[:, light], design.stage_x, f, chosen)

        # (c1) the reflux the rigorous column needs at the shortcut's stage count and feed stage
        shortcut_R_at_N = _shortcut_reflux_at(report, N)
        purity_result, message = _try_solve(columns, N, f, targets)
        reflux_needed = _summarize("reflux needed at the shortcut's stages", purity_result, N, f, targets, targets, z,
                                   message)
        if reflux_needed.converged:
            R_needed = float(reflux_needed.reflux_ratio)
            difference = R_needed / shortcut_R_at_N - 1.0
            severity = _severity(difference, chosen["reflux_difference"], factor)
            if severity:
                code = "REFLUX_UNDER" if difference > 0 else "REFLUX_OVER"
                flags.append(Flag(
                    code, severity,
                    f"at {N} stages (feed on stage {f}) the rigorous column needs a reflux ratio of {R_needed:.4g}; the "
                    f"shortcut says {shortcut_R_at_N:.4g} for that stage count, {abs(100 * difference):.1f} % "
                    f"{'too low' if difference > 0 else 'too high'} (threshold {100 * chosen['reflux_difference']:.3g} %)",
                    {"stages": N, "feed_stage": f, "rigorous_reflux": R_needed, "shortcut_reflux": shortcut_R_at_N,
                     "design_reflux": R, "difference": difference, "threshold": chosen["reflux_difference"]},
                ))
        else:
            flags.append(Flag(
                "REFLUX_UNDER", "serious",
                f"at {N} stages (feed on stage {f}) no rigorous solution meets the targets "
                f"({'; '.join(describe_spec(t) for t in targets)}): {reflux_needed.message}. The shortcut's "
                f"reflux for that stage count is {shortcut_R_at_N:.4g}",
                {"stages": N, "feed_stage": f, "rigorous_reflux": None, "shortcut_reflux": shortcut_R_at_N,
                 "design_reflux": R},
            ))

        # (c2) the stage count the rigorous column needs at the shortcut's reflux ratio
        D_search = float(reflux_needed.distillate_flow) if reflux_needed.converged else D
        search = stage_search(columns, R, D_search, targets, N, f, z)
        if search.stages is not None:
            difference = search.stages - N
            if abs(difference) > chosen["stage_difference"]:
                relative = abs(difference) / N
                severity = "serious" if abs(difference) > factor * chosen["stage_difference"] and relative > 0.1 else "warning"
                code = "STAGES_UNDER" if difference > 0 else "STAGES_OVER"
                flags.append(Flag(
                    code, severity,
                    f"at the reflux ratio {R:.4g} the rigorous column needs {search.stages} stages (feed on stage "
                    f"{search.feed_stage}); the shortcut says {N}, {abs(difference)} {'too few' if difference > 0 else 'too many'} "
                    f"(threshold {chosen['stage_difference']:.3g})",
                    {"reflux_ratio": R, "rigorous_stages": search.stages, "rigorous_feed_stage": search.feed_stage,
                     "shortcut_stages": N, "shortcut_feed_stage": f, "difference": difference,
                     "complete": search.complete, "threshold": chosen["stage_difference"]},
                ))
        elif search.complete:
            flags.append(Flag(
                "STAGES_UNDER", "serious",
                f"at the reflux ratio {R:.4g} no rigorous column of up to "
                f"{max((n for n, _, _ in search.tried), default=N)} stages tried meets the targets; the shortcut says {N}",
                {"reflux_ratio": R, "rigorous_stages": None, "shortcut_stages": N,
                 "largest_infeasible_stages": search.largest_infeasible, "complete": search.complete},
            ))
        elif search.largest_infeasible is not None and search.largest_infeasible + 1 - N > chosen["stage_difference"]:
            at_least = search.largest_infeasible + 1
            flags.append(Flag(
                "STAGES_UNDER", "warning",
                f"at the reflux ratio {R:.4g} the rigorous column needs at least {at_least} stages (the search stopped "
                f"before it found the count); the shortcut says {N}",
                {"reflux_ratio": R, "rigorous_stages": None, "rigorous_stages_at_least": at_least, "shortcut_stages": N,
                 "difference": at_least - N, "complete": False, "threshold": chosen["stage_difference"]},
            ))
        if not search.complete:
            flags.append(Flag(
                "SEARCH_INCOMPLETE", "info",
                f"the stage search stopped after {columns.count} rigorous solves (budget {max_solves}); the stage count "
                "the rigorous column needs is not pinned to one stage"
                + ("" if search.stages is None else f" (at most {search.stages})"),
                {"solves": columns.count, "budget": max_solves, "largest_infeasible_stages": search.largest_infeasible,
                 "smallest_feasible_stages": search.stages},
            ))
    else:
        flags.append(Flag(
            "SOLVE_FAILED", "serious",
            f"the shortcut's column ({N} stages, feed on stage {f}, R = {R:.4g}) did not converge rigorously: "
            f"{result.message}",
            {"stages": N, "feed_stage": f, "reflux_ratio": R},
        ))
    notes += columns.notes
    case_run = None
    if basis.case_result is not None:
        cr = basis.case_result
        case_run = _summarize("rigorous, the case as specified", cr, case.column.stages, case.feeds[0].stage,
                              case.specs, targets, z)
    flags = _sorted(flags)
    seconds = time.perf_counter() - started
    audit_record = {
        "scope": "full",
        "applicable": True,
        "basis": {
            "method": basis.method,
            "targets": [describe_spec(t) for t in targets],
            "reflux_ratio": design.reflux_ratio,
            "reflux_factor": basis.reflux_factor,
            "sources": dict(basis.sources),
        },
        "thresholds": chosen,
        "threshold_reasons": dict(THRESHOLD_REASONS),
        "shortcut_reflux_at_shortcut_stages": shortcut_R_at_N,
        "rigorous_at_shortcut_design": at_design.as_dict(names),
        "reflux_at_shortcut_stages": None if reflux_needed is None else reflux_needed.as_dict(names),
        "stages_at_shortcut_reflux": None if search is None else search.as_dict(names),
        "case_as_specified": None if case_run is None else case_run.as_dict(names),
        "cmo": None if cmo is None else cmo.as_dict(),
        "cmo_deviation": None if cmo is None else _per_stage(cmo),
        "flags": [flag.as_dict() for flag in flags],
        "rigorous_solves": columns.count,
        "seconds": seconds,
        "notes": notes,
    }
    audited = result.with_extra(shortcut=shortcut_record(report), audit=audit_record)
    return AuditReport(
        shortcut=report, thresholds=chosen, shortcut_reflux_at_stages=shortcut_R_at_N, at_design=at_design,
        reflux_needed=reflux_needed, stages_needed=search, cmo=cmo, flags=tuple(flags), solves=columns.count,
        seconds=seconds, result=audited, case_run=case_run, notes=tuple(notes),
    )


# =======================================================================================
# The shortcut as plain data (result.json "shortcut")
# =======================================================================================


def _binary_record(design: BinaryDesign) -> dict[str, Any]:
    pinch = design.minimum_reflux
    record = {
        "method": design.method,
        "light": design.light,
        "heavy": design.heavy,
        "pressure": design.pressure,
        "condenser": design.condenser,
        "feed_flow": design.feed_flow,
        "x_feed": design.x_feed,
        "q": design.q,
        "distillate_flow": design.distillate_flow,
        "bottoms_flow": design.bottoms_flow,
        "x_distillate": design.x_distillate,
        "x_bottoms": design.x_bottoms,
        "reflux_ratio": design.reflux_ratio,
        "boilup_ratio": design.boilup_ratio,
        "reflux_factor": design.reflux_factor,
        "minimum_reflux": dataclasses.asdict(pinch),
        "minimum_stages": design.minimum_stages,
        "minimum_equilibrium_stages": design.minimum_equilibrium_stages,
        "stages": design.stages,
        "fractional_stages": design.fractional_stages,
        "equilibrium_stages": design.equilibrium_stages,
        "feed_stage": design.feed_stage,
        "optimal_feed_stage": design.optimal_feed_stage,
        "stage_x": design.stage_x,
        "stage_y": design.stage_y,
        "stage_temperature": design.stage_temperature,
        "liquid_flow": design.liquid_flow,
        "vapor_flow": design.vapor_flow,
        "staircase": design.staircase,
        "rectifying_line": None if design.rectifying_line is None else dataclasses.asdict(design.rectifying_line),
        "stripping_line": None if design.stripping_line is None else dataclasses.asdict(design.stripping_line),
        "intersection": list(design.intersection),
        "condenser_duty": design.condenser_duty,
        "reboiler_duty": design.reboiler_duty,
        "notes": list(design.notes),
    }
    if design.enthalpy is not None:
        e = design.enthalpy
        record["enthalpy"] = {
            "feed_enthalpy": e.feed_enthalpy,
            "top_difference_point": list(e.top_difference_point),
            "bottom_difference_point": list(e.bottom_difference_point),
            "minimum_top_difference_enthalpy": e.minimum_top_difference_enthalpy,
            "reflux_enthalpy": e.reflux_enthalpy,
            "stage_liquid_enthalpy": e.stage_liquid_enthalpy,
            "stage_vapor_enthalpy": e.stage_vapor_enthalpy,
        }
    return record


def _multicomponent_record(design: MulticomponentDesign) -> dict[str, Any]:
    names = design.components
    per = lambda values: dict(zip(names, np.asarray(values, dtype=float).tolist()))  # noqa: E731
    return {
        "method": "Fenske-Underwood-Gilliland-Kirkbride",
        "light_key": design.light_key,
        "heavy_key": design.heavy_key,
        "condenser": design.condenser,
        "top_pressure": design.top_pressure,
        "bottom_pressure": design.bottom_pressure,
        "feed_flow": design.feed_flow,
        "feed_composition": per(design.feed_composition),
        "q": design.q,
        "distillate_flow": design.distillate_flow,
        "bottoms_flow": design.bottoms_flow,
        "x_distillate": per(design.x_distillate),
        "x_bottoms": per(design.x_bottoms),
        "top_temperature": design.top_temperature,
        "bottom_temperature": design.bottom_temperature,
        "relative_volatility": per(design.relative_volatility),
        "relative_volatility_top": per(design.relative_volatility_top),
        "relative_volatility_bottom": per(design.relative_volatility_bottom),
        "minimum_equilibrium_stages": design.minimum_equilibrium_stages,
        "minimum_stages": design.minimum_stages,
        "underwood_roots": list(design.underwood_roots),
        "distributing_components": list(design.distributing_components),
        "minimum_reflux": design.minimum_reflux,
        "minimum_vapor_flow": design.minimum_vapor_flow,
        "minimum_reflux_distillate_flows": per(design.minimum_reflux_distillate_flows),
        "reflux_ratio": design.reflux_ratio,
        "gilliland_x": design.gilliland_x,
        "gilliland_y": design.gilliland_y,
        "equilibrium_stages": design.equilibrium_stages,
        "stages": design.stages,
        "rectifying_stages": design.rectifying_stages,
        "stripping_stages": design.stripping_stages,
        "feed_stage": design.feed_stage,
        "condenser_duty": design.condenser_duty,
        "reboiler_duty": design.reboiler_duty,
        "notes": list(design.notes),
    }


def shortcut_record(report: ShortcutReport) -> dict[str, Any]:
    """The shortcut designs and their basis as plain data (SI)."""
    design = report.design
    record = _binary_record(design) if isinstance(design, BinaryDesign) else _multicomponent_record(design)
    record["basis"] = {
        "targets": [describe_spec(t) for t in report.basis.targets],
        "reflux_ratio": report.basis.reflux_ratio,
        "reflux_factor": report.basis.reflux_factor,
        "sources": dict(report.basis.sources),
        "notes": list(report.basis.notes),
    }
    if report.is_binary:
        record["ponchon_savarit"] = None if report.enthalpy_design is None else _binary_record(report.enthalpy_design)
        if report.enthalpy_message:
            record["ponchon_savarit_error"] = report.enthalpy_message
    return record
