"""Cost of one Newton iteration relative to one sparse LU factorization of its Jacobian.

Single column: N = 200 stages, 5 components (benzene, toluene, ethylbenzene, o-xylene,
n-nonane; ideal liquid), from the default start. Networks: the Petlyuk arrangement of the
network hard cases at two purities (50 stages) and their four-section divided-wall column of
120 stages (tests/hard/network_hard_cases.py), and the same column with 480 stages, each from
the start of the engine's rung that solved it (the network start, or the second start of CMO
flows alone); the starts themselves are not timed.

``ratio`` = seconds per Newton iteration (residuals, Jacobian assembly, factorization, solve,
line search; best of five runs) / seconds for one ``scipy.sparse.linalg.splu`` of the
Jacobians of the same run (the mean over its iterates, each the best of five). Targets: at most
4 for the single column, at most 3 for the networks. ``ratio_lu_at_start`` divides by the LU
of the starting point's Jacobian alone (what this script reported before networks were added).
``ratio_unit_of_work`` is (one residual+Jacobian + one LU) / one LU, the least an iteration
can cost. ``evaluations_per_iteration`` counts residual evaluations, line-search trials
included (a full Newton step needs one); ``jacobians_per_iteration`` the Jacobians built (a
network builds one only at the points Newton accepts, and at the start). Times are CPU seconds of this process (``time.process_time``).
Writes benchmarks/results/lu_ratio.json.
"""

from __future__ import annotations

import time

import numpy as np
import scipy.sparse.linalg as spla

from _common import best_of, divided_wall_case, five_component_case, network_hard_case, save
from solver.engine import build_system
from solver.initial import initial_estimate
from solver.network_engine import build_network_system, simulate_network
from solver.network_start import network_initial_estimate
from solver.newton import NewtonOptions, solve

NETWORK_CASES = {
    "petlyuk_purities": lambda: network_hard_case("petlyuk_purities"),
    "divided_wall_120": lambda: network_hard_case("divided_wall_120"),
    "divided_wall_480": lambda: divided_wall_case(48),
}
#: CPU time of this process: the machine is shared, and wall time counts the other processes' turns
CLOCK = time.process_time


def iteration_ratio(system, X0) -> dict:
    """Seconds per Newton iteration from ``X0`` (best of three runs), seconds per sparse LU of
    the Jacobians met on the way, per residual-plus-Jacobian evaluation, and their ratios."""

    def run(evaluate=system.evaluate):
        return solve(evaluate, X0, system.temperature_index(), system.flow_mask(), NewtonOptions())

    evaluations = []

    def recording(X, jacobian=True):
        evaluations.append(system.evaluate(X, jacobian))
        return evaluations[-1]

    result = run(recording)  # also the warm-up
    # a network's evaluation builds its Jacobian only when Newton reads it
    jacobians = [e.jacobian for e in evaluations if (e.has_jacobian if hasattr(e, "has_jacobian") else e.jacobian is not None)]
    best = best_of(run, 5, CLOCK) / max(result.iterations, 1)
    lu_seconds = float(np.mean([best_of(lambda: spla.splu(matrix), 5, CLOCK) for matrix in jacobians]))
    lu_at_start = best_of(lambda: spla.splu(jacobians[0]), 20, CLOCK)
    evaluate_seconds = best_of(lambda: system.evaluate(X0, True).jacobian, 20, CLOCK)
    return {"ratio": best / lu_seconds, "ratio_lu_at_start": best / lu_at_start,
            "ratio_unit_of_work": (evaluate_seconds + lu_seconds) / lu_seconds, "seconds_per_iteration": best,
            "seconds_per_lu": lu_seconds, "seconds_per_lu_at_start": lu_at_start, "seconds_per_evaluation": evaluate_seconds,
            "iterations": result.iterations, "evaluations_per_iteration": len(evaluations) / max(result.iterations, 1),
            "jacobians_per_iteration": len(jacobians) / max(result.iterations, 1),
            "converged": bool(result.converged), "unknowns": int(system.size),
            "jacobian_nonzeros": int(jacobians[-1].nnz)}


def show(label: str, row: dict) -> None:
    print(f"{label}: {row['seconds_per_iteration'] * 1e3:.2f} ms per Newton iteration ({row['iterations']} iterations, "
          f"{row['unknowns']} unknowns, {row['evaluations_per_iteration']:.1f} evaluations and {row['jacobians_per_iteration']:.1f} Jacobians each), {row['seconds_per_lu'] * 1e3:.2f} ms per sparse LU "
          f"({row['seconds_per_lu_at_start'] * 1e3:.2f} at the start), {row['seconds_per_evaluation'] * 1e3:.2f} ms per "
          f"residual+Jacobian; ratio {row['ratio']:.2f} ({row['ratio_lu_at_start']:.2f} to the start's LU; "
          f"one residual+Jacobian and one LU alone {row['ratio_unit_of_work']:.2f})")


def main() -> None:
    system = build_system(five_component_case(200))
    column = iteration_ratio(system, initial_estimate(system))
    show("N = 200, c = 5", column)
    networks = {}
    for name, make_case in NETWORK_CASES.items():
        case = make_case()
        rung = simulate_network(case).strategy["rung"]
        network = build_network_system(case)
        start = network_initial_estimate(network, **({"energy_passes": 0} if rung == "second start" else {}))
        row = iteration_ratio(network, start)
        row.update(stages=int(network.N), rung=rung)
        networks[name] = row
        show(f"network {name} ({network.N} stages, rung {rung!r})", row)
    save("lu_ratio", {**column, "target_ratio": 4.0, "networks": networks, "network_target_ratio": 3.0})


if __name__ == "__main__":
    main()
