"""Peng-Robinson K-values and both phase enthalpies with all derivatives, 200 stages x 8
components, against the NRTL evaluation of the thermo package on the same stages.

The two are called alternately, so a busy machine slows both alike; prints the median and the
best seconds per call of each and the ratio of the medians, and writes
benchmarks/results/cubic_speed.json. Target: at most 1 ms per equation-of-state call.
"""

from __future__ import annotations

import os
import statistics
import time

import numpy as np

from _common import save
from solver.components import component_info
from solver.thermo.activity import NRTL
from solver.thermo.cubic import CubicParameters, cubic_stage_properties
from solver.thermo.cubic_kij import interaction_matrix
from solver.thermo.package import ThermoPackage
from solver.thermo.pure import PureComponents

NAMES = ["methane", "ethane", "propane", "propylene", "isobutane", "n-butane", "n-pentane", "n-hexane"]
#: Acentric factors for the benchmark (rounded, from memory; speed does not depend on them).
ACENTRIC = [0.011, 0.099, 0.152, 0.146, 0.184, 0.200, 0.251, 0.299]
STAGES = 200
CALLS = 1000


def alternate(functions, calls: int) -> list[list[float]]:
    """Seconds of each call of each function, the functions called in turn."""
    times: list[list[float]] = [[] for _ in functions]
    for _ in range(calls):
        for function, record in zip(functions, times):
            start = time.perf_counter()
            function()
            record.append(time.perf_counter() - start)
    return times


def peng_robinson_call(stages: int = STAGES, seed: int = 7):
    """A call of the Peng-Robinson stage properties (K-values, both enthalpies, all
    derivatives) for ``stages`` stages of the 8 light hydrocarbons at 20 bar, 250-400 K, random
    compositions; returns (the call, pure components, T, P, x, y, rng)."""
    rng = np.random.default_rng(seed)
    c = len(NAMES)
    infos = [component_info(name) for name in NAMES]
    pure = PureComponents(infos)
    kij, sources = interaction_matrix(NAMES)
    eos = CubicParameters(
        tuple(NAMES), pure.critical_temperature, pure.critical_pressure, ACENTRIC, "peng-robinson", kij,
        interaction_sources=sources,
    )
    T = np.linspace(250.0, 400.0, stages)
    P = np.full(stages, 2.0e6)
    x = rng.dirichlet(np.ones(c), stages)
    y = rng.dirichlet(np.ones(c), stages)

    def equation_of_state():
        return cubic_stage_properties(eos, T, P, x, y, pure.ideal_gas_enthalpy)

    return equation_of_state, pure, T, P, x, y, rng


def main() -> None:
    c = len(NAMES)
    equation_of_state, pure, T, P, x, y, rng = peng_robinson_call()

    b = rng.uniform(-300.0, 900.0, (c, c))
    np.fill_diagonal(b, 0.0)
    alpha = np.full((c, c), 0.3)
    np.fill_diagonal(alpha, 0.0)
    activity = ThermoPackage(pure, NRTL(np.zeros((c, c)), b, alpha_c=alpha))

    def nrtl():
        return activity.stage_properties(T, P, x, y)

    equation_of_state()
    nrtl()
    ours_times, reference_times = alternate((equation_of_state, nrtl), CALLS)
    ours, reference = statistics.median(ours_times), statistics.median(reference_times)
    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else None
    figures = {
        "stages": STAGES,
        "components": c,
        "model": "Peng-Robinson, both phases: K-values, liquid and vapor enthalpies, all derivatives",
        "calls": CALLS,
        "median_seconds_per_call": ours,
        "best_seconds_per_call": min(ours_times),
        "nrtl_stage_properties_median_seconds": reference,
        "nrtl_stage_properties_best_seconds": min(reference_times),
        "load_average_1min": load,
        "ratio_to_nrtl": ours / reference,
        "target_seconds_per_call": 1e-3,
    }
    print(f"Peng-Robinson stage properties, {STAGES} stages x {c} components, all derivatives: "
          f"{ours * 1e3:.3f} ms per call (median of {CALLS}; best {min(ours_times) * 1e3:.3f} ms)")
    print(f"NRTL stage properties (modified Raoult), same stages: {reference * 1e3:.3f} ms "
          f"(best {min(reference_times) * 1e3:.3f} ms); ratio of medians {ours / reference:.2f}; load average {load}")
    save("cubic_speed", figures)


if __name__ == "__main__":
    main()
