"""K-values, enthalpies and all their derivatives for 200 stages x 8 components with NRTL.

Prints seconds per call and the ratio to the same evaluation done by looping CoolProp's
PropsSI per stage and component (vapor pressure, saturated liquid and vapor enthalpy, and a
finite-difference temperature derivative of the vapor pressure), measured in the same run.
Writes benchmarks/results/thermo_speed.json.
"""

from __future__ import annotations

import numpy as np
import CoolProp.CoolProp as CP

from _common import best_of, save
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
    save("thermo_speed", figures)


if __name__ == "__main__":
    main()
