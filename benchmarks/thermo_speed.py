"""K-values, enthalpies and all their derivatives for 200 stages x 8 components with NRTL and
with the Peng-Robinson equation for both phases; the C3 splitter solved with Peng-Robinson
beside the same column with ideal K-values.

Prints seconds per call and the ratio to the same evaluation done by looping CoolProp's
PropsSI per stage and component (vapor pressure, saturated liquid and vapor enthalpy, and a
finite-difference temperature derivative of the vapor pressure), measured in the same run; the
Peng-Robinson call (8 light hydrocarbons, 20 bar; goal at most 1 ms); and the Newton
iterations and wall time of ``cases/c3_splitter.toml`` (160 stages, 18 bar) from the default
start with Peng-Robinson and with ``liquid = "ideal"`` (modified Raoult's law).
Writes benchmarks/results/thermo_speed.json.
"""

from __future__ import annotations

import statistics
import time

import numpy as np
import CoolProp.CoolProp as CP

from _common import HERE, best_of, save
from cubic_speed import alternate, peng_robinson_call
from solver.case import load_case
from solver.audit.ideal_vapor import ideal_vapor_case
from solver.engine import simulate
from solver.components import component_info
from solver.thermo.activity import NRTL
from solver.thermo.package import ThermoPackage
from solver.thermo.pure import PureComponents

NAMES = ["methanol", "ethanol", "water", "acetone", "benzene", "toluene", "n-heptane", "n-hexane"]
STAGES = 200


def main() -> None:
    rng = np.random.default_rng(7)
    c = len(NAMES)
    infos = [component_info(name) for name in NAMES]
    pure = PureComponents(infos)
    b = rng.uniform(-300.0, 900.0, (c, c))
    np.fill_diagonal(b, 0.0)
    alpha = np.full((c, c), 0.3)
    np.fill_diagonal(alpha, 0.0)
    thermo = ThermoPackage(pure, NRTL(np.zeros((c, c)), b, alpha=alpha))
    T = np.linspace(330.0, 400.0, STAGES)
    P = np.full(STAGES, 101325.0)
    x = rng.dirichlet(np.ones(c), STAGES)
    y = rng.dirichlet(np.ones(c), STAGES)
    thermo.stage_properties(T, P, x, y)
    ours = best_of(lambda: thermo.stage_properties(T, P, x, y), 200)

    fluids = [info.coolprop_name for info in infos]

    def propssi_loop() -> None:
        for t in T:
            for fluid in fluids:
                CP.PropsSI("P", "T", t, "Q", 0, fluid)
                CP.PropsSI("P", "T", t + 0.01, "Q", 0, fluid)
                CP.PropsSI("Hmolar", "T", t, "Q", 0, fluid)
                CP.PropsSI("Hmolar", "T", t, "Q", 1, fluid)

    # T up to 400 K is above some components' normal boiling points but below every Tc
    reference = best_of(propssi_loop, 2)
    figures = {
        "stages": STAGES,
        "components": c,
        "model": "NRTL",
        "seconds_per_call": ours,
        "propssi_loop_seconds": reference,
        "ratio_vs_propssi_loop": reference / ours,
        "target_seconds_per_call": 1e-3,
    }
    print(f"stage_properties, {STAGES} stages x {c} components, NRTL, all derivatives: {ours * 1e3:.3f} ms per call")
    print(f"PropsSI loop doing less (no activity model, no derivatives): {reference * 1e3:.1f} ms; ratio {reference / ours:.0f}")
    figures["peng_robinson"] = peng_robinson_figures()
    figures["c3_splitter"] = c3_splitter_figures()
    save("thermo_speed", figures)


def peng_robinson_figures(calls: int = 300) -> dict:
    """Median and best seconds of the Peng-Robinson stage properties, 200 stages x 8 components."""
    equation_of_state = peng_robinson_call(STAGES)[0]
    equation_of_state()
    times = alternate((equation_of_state,), calls)[0]
    median = statistics.median(times)
    print(f"Peng-Robinson K-values and both enthalpies, all derivatives, {STAGES} stages x 8 components: "
          f"{median * 1e3:.3f} ms per call (median of {calls}; best {min(times) * 1e3:.3f} ms; goal 1 ms)")
    return {"stages": STAGES, "components": 8, "calls": calls, "median_seconds_per_call": median,
            "best_seconds_per_call": min(times), "target_seconds_per_call": 1e-3}


def c3_splitter_figures() -> dict:
    """The C3 splitter from the default start, Peng-Robinson and ideal K-values (the fits are
    built by a first solve of each, not timed)."""
    case = load_case(HERE.parent / "cases" / "c3_splitter.toml")
    rows = {}
    for label, variant in (("peng-robinson", case), ("ideal K-values", ideal_vapor_case(case))):
        simulate(variant)
        start = time.perf_counter()
        result = simulate(variant)
        seconds = time.perf_counter() - start
        rows[label] = {"converged": bool(result.converged), "rung": result.strategy.get("rung"),
                       "newton_iterations": int(result.iterations), "seconds": seconds,
                       "reflux_ratio": float(result.reflux_ratio)}
        print(f"C3 splitter, 160 stages, {label}: {result.iterations} Newton iterations ({result.strategy.get('rung')}), "
              f"{seconds:.2f} s, reflux ratio {result.reflux_ratio:.3f}")
    return rows


if __name__ == "__main__":
    main()
