"""How the rigorous solve scales with the stage count.

An ideal four-component column (benzene, toluene, ethylbenzene, o-xylene) at N = 20, 50, 100,
200 and 500 stages: seconds for the default start plus Newton, Newton iterations, seconds per
iteration. ``exponent`` is the fitted slope of log(time) against log(N) from 50 to 500 stages
(target: at most 1.15).

Networks: the four-section divided-wall column of the network hard cases
(tests/hard/network_hard_cases.py) with 6, 12, 24 and 48 stages a section (60 to 480 stages;
12 is its 120-stage column). For each: CPU seconds per Newton iteration from the start of the
engine's rung that solved it (the starts not timed), and the CPU seconds of one unit of work at
the solution (residuals with Jacobian, sparse LU, solve), which no line search or rung choice
disturbs. ``network_exponent`` is the fitted slope of log(seconds per iteration) against
log(stages) (target: at most 1.15); ``network_unit_exponent`` that of the unit of work.
Writes benchmarks/results/scaling.json.
"""

from __future__ import annotations

import time

import numpy as np

import scipy.sparse.linalg as spla

from _common import best_of, divided_wall_case, ideal_four_case, save
from solver.initial import initial_estimate
from solver.network_engine import build_network_system, simulate_network
from solver.network_start import network_initial_estimate
from solver.newton import NewtonOptions, solve, solve_system
from solver.engine import build_system, simulate

STAGE_COUNTS = (20, 50, 100, 200, 500)
SECTION_STAGES = (6, 12, 24, 48)


def network_rows() -> list[dict]:
    """Seconds per Newton iteration and per unit of work of the divided-wall column at each
    section length (CPU time of this process: the machine may be shared)."""
    rows = []
    for section in SECTION_STAGES:
        case = divided_wall_case(section)
        result = simulate_network(case)
        assert result.converged, result.message
        rung = result.strategy["rung"]
        system = build_network_system(case)
        start = network_initial_estimate(system, **({"energy_passes": 0} if rung == "second start" else {}))
        options = NewtonOptions(max_iterations=200)
        newton = solve_system(system, start, options)
        assert newton.converged, newton.message
        seconds = best_of(lambda: solve_system(system, start, options), 3, time.process_time)

        def unit(X=newton.X):
            evaluation = system.evaluate(X, True)
            spla.splu(evaluation.jacobian).solve(evaluation.residuals)

        unit_seconds = best_of(unit, 10, time.process_time)
        rows.append({"section_stages": section, "stages": int(system.N), "unknowns": int(system.size), "rung": rung,
                     "iterations": newton.iterations, "newton_seconds": seconds,
                     "seconds_per_iteration": seconds / max(newton.iterations, 1), "unit_seconds": unit_seconds})
        print(f"divided wall, {section:2d} stages a section ({system.N:3d} stages, {system.size} unknowns): "
              f"{newton.iterations} iterations from the start of rung {rung!r}, "
              f"{seconds / max(newton.iterations, 1) * 1e3:.2f} ms per iteration, {unit_seconds * 1e3:.2f} ms per unit of work")
    return rows


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
    networks = network_rows()
    logs = np.log([r["stages"] for r in networks])
    network_exponent = float(np.polyfit(logs, np.log([r["seconds_per_iteration"] for r in networks]), 1)[0])
    unit_exponent = float(np.polyfit(logs, np.log([r["unit_seconds"] for r in networks]), 1)[0])
    print(f"divided wall: fitted exponent of seconds per Newton iteration against stages (60..480): {network_exponent:.3f}, "
          f"of the unit of work {unit_exponent:.3f} (target at most 1.15)")
    save("scaling", {"rows": rows, "exponent": exponent, "exponent_newton_only": newton_exponent, "target_exponent": 1.15,
                     "network_rows": networks, "network_exponent": network_exponent, "network_unit_exponent": unit_exponent,
                     "note": "seconds = simulate(case) from the default start (property fits, start, Newton, post-check); "
                             "newton_seconds = Newton's method alone from the same start; network figures are CPU seconds "
                             "of Newton from the start of the engine's rung that solved the case"})


if __name__ == "__main__":
    main()
