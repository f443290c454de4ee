"""UNIFAC and modified UNIFAC (Dortmund) with every derivative, 200 states x 8 components.

Prints milliseconds per ``evaluate`` call (best of 200) for both variants, and the ratio to
NRTL for the same 8 components measured in the same run (NRTL has c x c interactions, UNIFAC
works on the g x g group matrix and the pure-component group terms). Target: 2 ms per call.
Also times the liquid stability test of 200 states of 1-butanol/water.
Writes benchmarks/results/unifac_speed.json.
"""

from __future__ import annotations

import numpy as np

from _common import best_of, save
from solver.thermo.activity import NRTL
from solver.thermo.stability import liquid_stability
from solver.thermo.unifac import UNIFAC, DortmundUNIFAC

NAMES = ["methanol", "ethanol", "water", "acetone", "benzene", "toluene", "n-heptane", "n-hexane"]
STATES = 200


def main() -> None:
    rng = np.random.default_rng(7)
    c = len(NAMES)
    T = np.linspace(330.0, 400.0, STATES)
    x = rng.dirichlet(np.ones(c), STATES)
    b = rng.uniform(-300.0, 900.0, (c, c))
    np.fill_diagonal(b, 0.0)
    nrtl = NRTL(np.zeros((c, c)), b)
    nrtl.evaluate(T, x)
    nrtl_seconds = best_of(lambda: nrtl.evaluate(T, x), 200)
    figures = {"states": STATES, "components": c, "nrtl_seconds_per_call": nrtl_seconds, "target_seconds_per_call": 2e-3}
    for cls in (UNIFAC, DortmundUNIFAC):
        model = cls.from_components(NAMES)
        model.evaluate(T, x)
        seconds = best_of(lambda: model.evaluate(T, x), 200)
        figures[cls.name] = {
            "groups": len(model.describe()["subgroups"]),
            "seconds_per_call": seconds,
            "ratio_to_nrtl": seconds / nrtl_seconds,
        }
        print(f"{cls.name}, {STATES} states x {c} components, all derivatives: {seconds * 1e3:.3f} ms per call "
              f"({seconds / nrtl_seconds:.1f} x NRTL's {nrtl_seconds * 1e3:.3f} ms)")
    pair = UNIFAC.from_components(["1-butanol", "water"])
    z1 = np.linspace(0.001, 0.999, STATES)
    stability = best_of(lambda: liquid_stability(pair, np.full(STATES, 333.15), np.c_[z1, 1.0 - z1]), 5)
    figures["stability_seconds_200_states"] = stability
    print(f"liquid stability, 200 states of 1-butanol/water (original UNIFAC): {stability * 1e3:.1f} ms")
    save("unifac_speed", figures)


if __name__ == "__main__":
    main()
