"""traystack's Newton solver against a general-purpose one on the same equations.

The same residual function (MESH + specs of an ideal four-component column) is solved from the
same default start by ``scipy.optimize.root(method="hybr")`` (MINPACK's Powell hybrid method
with a finite-difference Jacobian) and by traystack (sparse analytic Jacobian, damped Newton),
at N = 30 and 60 stages, in the same run, each the best of several runs. ``ratio_nNN`` =
general-purpose time / traystack time (target at N = 60: at least 100). Writes benchmarks/results/vs_general_solver.json.
"""

from __future__ import annotations

import time

import numpy as np
from scipy.optimize import root

from _common import ideal_four_case, save
from solver.errors import TraystackError
from solver.initial import initial_estimate
from solver.newton import NewtonOptions, solve
from solver.engine import build_system


# best of several runs: a solve of a few milliseconds timed once is mostly the machine's noise
REPEATS_OURS = 7
REPEATS_GENERAL = 3


def main() -> None:
    figures = {}
    for stages in (30, 60):
        case = ideal_four_case(stages)
        system = build_system(case)
        X0 = initial_estimate(system)

        ours_seconds = float("inf")
        for _ in range(REPEATS_OURS):
            start = time.perf_counter()
            ours = solve(system.evaluate, X0, system.temperature_index(), system.flow_mask(), NewtonOptions())
            ours_seconds = min(ours_seconds, time.perf_counter() - start)
        assert ours.converged

        calls = {"n": 0}

        def residuals(X):
            calls["n"] += 1
            try:
                return system.evaluate(X, False).residuals
            except TraystackError:
                # a trial point outside the property models (e.g. a negative temperature):
                # a large residual makes the general-purpose method back off
                return np.full(len(X), 1e6)

        general_seconds = float("inf")
        for _ in range(REPEATS_GENERAL):
            calls["n"] = 0
            start = time.perf_counter()
            general = root(residuals, X0, method="hybr", options={"xtol": 1e-12, "maxfev": 200 * (len(X0) + 1)})
            general_seconds = min(general_seconds, time.perf_counter() - start)
        general_norm = float(np.max(np.abs(residuals(general.x))))
        figures[f"ratio_n{stages}"] = general_seconds / ours_seconds
        figures[f"traystack_seconds_n{stages}"] = ours_seconds
        figures[f"traystack_iterations_n{stages}"] = ours.iterations
        figures[f"general_seconds_n{stages}"] = general_seconds
        figures[f"general_iterations_n{stages}"] = int(getattr(general, "nfev", calls["n"]))
        figures[f"general_converged_n{stages}"] = bool(general.success and general_norm < 1e-7)
        figures[f"general_residual_n{stages}"] = general_norm
        print(
            f"N = {stages}: traystack {ours_seconds:.3f} s ({ours.iterations} Newton iterations); "
            f"scipy hybr {general_seconds:.2f} s ({general.nfev} residual evaluations, success={general.success}, "
            f"largest residual {general_norm:.1e}); ratio {general_seconds / ours_seconds:.0f}"
        )
    figures["note"] = "general_iterations counts residual evaluations (MINPACK hybrd reports nfev, not iterations)"
    save("vs_general_solver", figures)


if __name__ == "__main__":
    main()
