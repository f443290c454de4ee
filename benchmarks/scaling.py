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
from solver.simulate import simulate

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
        rows.append(
            {
                "stages": stages,
                "seconds": best,
                "iterations": result.iterations,
                "seconds_per_iteration": best / max(result.iterations, 1),
            }
        )
        print(f"N = {stages:4d}: {best:.3f} s, {result.iterations} Newton iterations, {best / max(result.iterations, 1) * 1e3:.1f} ms per iteration")
    selected = [row for row in rows if row["stages"] >= 50]
    exponent = float(np.polyfit(np.log([r["stages"] for r in selected]), np.log([r["seconds"] for r in selected]), 1)[0])
    print(f"fitted exponent of time against N (50..500): {exponent:.3f} (target at most 1.15)")
    save("scaling", {"rows": rows, "exponent": exponent, "target_exponent": 1.15})


if __name__ == "__main__":
    main()
