"""Cost of one Newton iteration relative to one sparse LU factorization of its Jacobian.

N = 200 stages, 5 components (benzene, toluene, ethylbenzene, o-xylene, n-nonane; ideal liquid). ``ratio`` = seconds per Newton iteration
(residuals, Jacobian assembly, factorization, solve, line search) / seconds for one
``scipy.sparse.linalg.splu`` of the same Jacobian (target: at most 4).
Writes benchmarks/results/lu_ratio.json.
"""

from __future__ import annotations

import time

import scipy.sparse.linalg as spla

from _common import best_of, five_component_case, save
from solver.initial import initial_estimate
from solver.newton import NewtonOptions, solve
from solver.engine import build_system


def main() -> None:
    case = five_component_case(200)
    system = build_system(case)
    X0 = initial_estimate(system)
    solve(system.evaluate, X0, system.temperature_index(), system.flow_mask(), NewtonOptions())  # warm up
    best = float("inf")
    for _ in range(3):
        start = time.perf_counter()
        result = solve(system.evaluate, X0, system.temperature_index(), system.flow_mask(), NewtonOptions())
        best = min(best, (time.perf_counter() - start) / max(result.iterations, 1))
    jacobian = system.evaluate(X0, True).jacobian
    lu_seconds = best_of(lambda: spla.splu(jacobian), 20)
    evaluate_seconds = best_of(lambda: system.evaluate(X0, True), 20)
    ratio = best / lu_seconds
    print(f"N = 200, c = 5: {best * 1e3:.2f} ms per Newton iteration ({result.iterations} iterations), "
          f"{lu_seconds * 1e3:.2f} ms per sparse LU, {evaluate_seconds * 1e3:.2f} ms per residual+Jacobian; ratio {ratio:.2f}")
    save("lu_ratio", {"ratio": ratio, "seconds_per_iteration": best, "seconds_per_lu": lu_seconds,
                      "seconds_per_evaluation": evaluate_seconds, "iterations": result.iterations,
                      "unknowns": system.size, "target_ratio": 4.0})


if __name__ == "__main__":
    main()
