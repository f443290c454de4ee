"""How the rigorous solve scales with the stage count.

An ideal four-component column (benzene, toluene, ethylbenzene, o-xylene) at N = 20, 50, 100,
200 and 500 stages: seconds for the default start plus Newton, Newton iterations, seconds per
iteration. ``exponent`` is the fitted slope of log(time) against log(N) from 50 to 500 stages
(target: at most 1.15). Writes benchmarks/results/scaling.json.
"""

from __future__ import annotations

import time

import numpy as np

from _common import ideal_four_case, save
from solver.initial import initial_estimate
from solver.newton import NewtonOptions, solve
from solver.engine import build_system, simulate

STAGE_COUNTS = (20, 50, 100, 200, 500)


def main() -> None:
    simulate(ideal_four_case(20))  # warm the property fits
    rows = []
    for stages in STAGE_COUNTS:
        case = ideal_four_case(stages)
        best = float("inf")
        for _ in range(3):
            start = time.perf_counter()
            result = simulate(case)
            best = min(best, time.perf_counter() - start)
        assert result.converged, result.message
        system = build_system(case)
        X0 = initial_estimate(system)
        newton_best = float("inf")
        for _ in range(3):
            start = time.perf_counter()
            newton = solve(system.evaluate, X0, system.temperature_index(), system.flow_mask(), NewtonOptions())
            newton_best = min(newton_best, time.perf_counter() - start)
        rows.append(
            {
                "stages": stages,
                "seconds": best,
                "iterations": result.iterations,
                "seconds_per_iteration": best / max(result.iterations, 1),
                "newton_seconds": newton_best,
                "newton_seconds_per_iteration": newton_best / max(newton.iterations, 1),
            }
        )
        print(f"N = {stages:4d}: {best:.3f} s in all, {result.iterations} Newton iterations, Newton alone {newton_best * 1e3:.1f} ms "
              f"({newton_best / max(newton.iterations, 1) * 1e3:.2f} ms per iteration)")
    selected = [row for row in rows if row["stages"] >= 50]
    logs = np.log([r["stages"] for r in selected])
    exponent = float(np.polyfit(logs, np.log([r["seconds"] for r in selected]), 1)[0])
    newton_exponent = float(np.polyfit(logs, np.log([r["newton_seconds"] for r in selected]), 1)[0])
    print(f"fitted exponent of time against N (50..500): {exponent:.3f} for the whole solve (case to result), "
          f"{newton_exponent:.3f} for Newton alone (target at most 1.15)")
    save("scaling", {"rows": rows, "exponent": exponent, "exponent_newton_only": newton_exponent, "target_exponent": 1.15,
                     "note": "seconds = simulate(case) from the default start (property fits, start, Newton, post-check); "
                             "newton_seconds = Newton's method alone from the same start"})


if __name__ == "__main__":
    main()
