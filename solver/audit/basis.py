"""What the shortcut designs for, and its designs.

The shortcut needs two product targets (purities, recoveries or product rates) and a reflux
(a ratio, or a factor times the minimum). Each comes, in this order, from the case's
``[audit]`` table, from the case's specs, or from the rigorous solution of the case as
specified (solved at most once); :class:`AuditBasis` records which. The designs are
McCabe-Thiele with the Ponchon-Savarit construction beside it for a binary,
Fenske-Underwood-Gilliland-Kirkbride for more components (:mod:`solver.shortcut`).
"""

from __future__ import annotations

import dataclasses
from typing import Callable

import numpy as np

from ..case import Case, Spec
from ..engine import simulate
from ..errors import SpecError, ThermoError
from ..results import Result
from ..shortcut import BinaryDesign, design_binary, design_multicomponent, design_ponchon_savarit
from ..shortcut.mccabe_thiele import binary_problem, check_simple_column
from ..thermo.flash import bubble_temperature
from ..thermo.liquid_split import LiquidSplitCheck, check_liquids
from ..thermo.package import ThermoPackage
from .findings import AuditBasis, ShortcutReport
from .targets import describe_spec

__all__ = ["AuditBasis", "ShortcutReport", "audit_basis", "light_index", "shortcut_case", "shortcut_designs"]

#: Spec kinds that fix the split between the products (the shortcut's targets).
SPLIT_KINDS = ("mole_fraction", "recovery", "distillate_rate", "bottoms_rate")
_FROM_SOLUTION = "rigorous solution of the case as specified"


class _SolvedOnce:
    """The rigorous solution of the case as specified, solved on first use only."""

    def __init__(self, case: Case, solve: Callable[[Case], Result]) -> None:
        self.case = case
        self.solve = solve
        self.result: Result | None = None

    def __call__(self) -> Result:
        if self.result is None:
            result = self.solve(self.case)
            if not result.converged:
                raise SpecError(
                    "the audit needs the rigorous solution of the case as specified for the quantities its specs and "
                    f"[audit] table do not give, and that solve did not converge: {result.message}"
                )
            self.result = result
        return self.result


def light_index(case: Case, thermo: ThermoPackage) -> int:
    """The more volatile component of a binary at the feed's bubble point, mean pressure."""
    pressure = np.array([float(np.mean(case.column.pressures))])
    z = np.asarray(case.feeds[0].composition, dtype=float)[None, :]
    T, _ = bubble_temperature(thermo, pressure, z)
    K = thermo.k_values(T, pressure, z, derivatives=False).K[0]
    return 0 if K[0] >= K[1] else 1


def audit_basis(case: Case, thermo: ThermoPackage, solve: Callable[[Case], Result]) -> AuditBasis:
    """The product targets and reflux the shortcut designs for: from ``[audit]``, else the
    case's specs, else the rigorous solution of the case as specified (``solve(case)``, called
    at most once)."""
    check_simple_column(case, "audit's")
    options = case.audit
    solution = _SolvedOnce(case, solve)
    sources: dict[str, str] = {}
    notes: list[str] = []
    reflux_ratio = options.reflux_ratio if options else None
    reflux_factor = options.reflux_factor if options else None
    case_reflux = next((float(s.value) for s in case.specs if s.kind == "reflux_ratio"), None)
    if reflux_ratio is not None:
        sources["reflux"] = "audit table (reflux_ratio)"
    elif reflux_factor is not None:
        sources["reflux"] = "audit table (reflux_factor)"
    elif case_reflux is not None:
        reflux_ratio = case_reflux
        sources["reflux"] = "case specs (reflux_ratio)"
    light = None
    if case.component_count == 2:
        light, targets = _binary_targets(case, thermo, solution, sources)
    else:
        targets = _multicomponent_targets(case, solution, sources, notes)
    if reflux_ratio is None and reflux_factor is None:
        reflux_ratio = float(solution().reflux_ratio)
        sources["reflux"] = _FROM_SOLUTION
    return AuditBasis(
        method="binary" if case.component_count == 2 else "multicomponent",
        targets=targets,
        reflux_ratio=None if reflux_factor is not None else float(reflux_ratio),
        reflux_factor=reflux_factor,
        sources=dict(sources),
        light=light,
        case_result=solution.result,
        notes=tuple(notes),
    )


def _split_specs(case: Case) -> tuple[Spec, ...]:
    return tuple(s for s in case.specs if s.kind in SPLIT_KINDS)


def _binary_targets(case: Case, thermo: ThermoPackage, solution: _SolvedOnce,
                    sources: dict[str, str]) -> tuple[str, tuple[Spec, Spec]]:
    """The light component and its distillate and bottoms mole fractions (targets 1 and 2)."""
    names = list(case.component_names)
    light_at = light_index(case, thermo)
    light = names[light_at]
    case_split = _split_specs(case)
    x: dict[str, float] = {}
    source: dict[str, str] = {}
    for spec in case.audit.products if case.audit else ():
        x[spec.product] = spec.value if spec.component == light else 1.0 - spec.value
        source[spec.product] = f"audit table ({spec.key})"
    missing = [p for p in ("distillate", "bottoms") if p not in x]
    if missing and len(case_split) == 2:
        problem = binary_problem(dataclasses.replace(case, specs=case_split), thermo, reflux_ratio=1.0)
        split = {"distillate": problem.x_distillate, "bottoms": problem.x_bottoms}
        for product in missing:
            x[product] = split[product]
            source[product] = "case specs (" + "; ".join(describe_spec(s) for s in case_split) + ")"
    elif missing:
        for spec in case_split:
            if spec.kind == "mole_fraction" and spec.product in missing:
                x[spec.product] = spec.value if spec.component == light else 1.0 - spec.value
                source[spec.product] = f"case specs ({spec.key})"
    for product in ("distillate", "bottoms"):
        if product not in x:
            result = solution()
            composition = result.distillate_composition if product == "distillate" else result.bottoms_composition
            x[product] = float(composition[light_at])
            source[product] = _FROM_SOLUTION
    sources["target 1"], sources["target 2"] = source["distillate"], source["bottoms"]
    return light, (
        Spec("mole_fraction", x["distillate"], component=light, product="distillate", key="distillate"),
        Spec("mole_fraction", x["bottoms"], component=light, product="bottoms", key="bottoms"),
    )


def _multicomponent_targets(case: Case, solution: _SolvedOnce, sources: dict[str, str],
                            notes: list[str]) -> tuple[Spec, ...]:
    """Two product targets: the ``[audit]`` table's, then the case's split specs (one per
    product and component), else the keys' recoveries in the rigorous solution."""
    chosen = [(spec, f"audit table ({spec.key})") for spec in (case.audit.products if case.audit else ())]
    for spec in _split_specs(case):
        if len(chosen) >= 2:
            break
        if any(t.product == spec.product and t.component == spec.component for t, _ in chosen):
            continue
        chosen.append((spec, f"case specs ({spec.key or spec.kind})"))
    if len(chosen) < 2:
        chosen = [(spec, _FROM_SOLUTION) for spec in _key_recoveries(case, solution())]
        notes.append(
            "the specs and [audit] table name fewer than two product targets: the keys and their recoveries "
            "come from the rigorous solution of the case as specified"
        )
    chosen = chosen[:2]
    for k, (_, source) in enumerate(chosen):
        sources[f"target {k + 1}"] = source
    return tuple(spec for spec, _ in chosen)


def _key_recoveries(case: Case, result: Result) -> tuple[Spec, Spec]:
    """Light and heavy key of a rigorous solution and their recoveries: the least volatile
    component (K at the feed stage) that goes mostly to the distillate and the next heavier one."""
    feed = case.feeds[0]
    order = np.argsort(-result.K[feed.stage - 1])
    feed_flows = np.asarray(feed.composition, dtype=float) * feed.flow
    recovery = result.distillate_flow * result.distillate_composition / np.maximum(feed_flows, 1e-300)
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


def shortcut_designs(case: Case, basis: AuditBasis, thermo: ThermoPackage) -> ShortcutReport:
    """The shortcut designs for ``basis``; a SpecError says where the numbers came from."""
    design_case = basis.design_case(case)
    try:
        if basis.method != "binary":
            return ShortcutReport(case, basis, design_multicomponent(design_case, thermo, reflux_factor=basis.reflux_factor))
        design = design_binary(design_case, thermo, reflux_factor=basis.reflux_factor)
        split = _curve_split(design, thermo)
    except SpecError as exc:
        origin = "; ".join(f"{what}: {source}" for what, source in basis.sources.items())
        raise SpecError(
            f"{exc} [the shortcut's targets and reflux came from {origin}; an [audit] table with distillate, "
            "bottoms and reflux_factor sets them]"
        ) from None
    try:
        enthalpy_design = design_ponchon_savarit(
            design_case, thermo, reflux_ratio=design.reflux_ratio if basis.reflux_factor is not None else None
        )
    except (SpecError, ThermoError) as exc:
        return ShortcutReport(case, basis, design, None, str(exc), split)
    return ShortcutReport(case, basis, design, enthalpy_design, liquid_split=split)


def _curve_split(design: BinaryDesign, thermo: ThermoPackage) -> LiquidSplitCheck:
    """The liquids of the McCabe-Thiele equilibrium curve at their bubble temperatures,
    tested for a split into two liquid phases, one vectorized call (labels: light x)."""
    curve = design.curve
    light = thermo.names.index(curve.light)
    x = np.zeros((curve.x.size, 2))
    x[:, light], x[:, 1 - light] = curve.x, 1.0 - curve.x
    return check_liquids(thermo.activity, curve.temperature, x, [round(float(v), 6) for v in curve.x], thermo.names)


def shortcut_case(case: Case, *, thermo: ThermoPackage | None = None) -> ShortcutReport:
    """The shortcut designs of ``case`` (the ``traystack shortcut`` command): the basis as in
    :func:`audit_basis` (a rigorous solve only when the specs and ``[audit]`` leave something
    open). Raises :class:`SpecError` for infeasible specs."""
    thermo = thermo or ThermoPackage.from_case(case)
    basis = audit_basis(case, thermo, lambda c: simulate(c, thermo=thermo))
    return shortcut_designs(case, basis, thermo)
