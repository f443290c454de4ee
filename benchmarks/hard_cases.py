"""The hard-case suite: which rung of the fallback chain each case needed, and its Newton
iterations (tests/hard/ asserts that every case converges; this script records how).
Writes benchmarks/results/hard_cases.json."""

from __future__ import annotations

import statistics
import sys
import time

from _common import HERE, save

sys.path.insert(0, str(HERE.parent / "tests" / "hard"))

from hard_cases import HARD_CASES  # noqa: E402
from solver.case import loads_case  # noqa: E402
from solver.engine import simulate  # noqa: E402


def iterations_in_all(strategy: dict, final: int) -> int:
    """Newton iterations of every rung tried: the first solve, the homotopy points, and the
    shortened column's own chain with the full column's solve from its stretched profile."""
    count = strategy.get("newton_iterations", final) + sum(p["iterations"] for p in strategy.get("homotopy_path", []))
    count += strategy.get("second_start", {}).get("newton_iterations", 0)
    short = strategy.get("shortened_column")
    if short:
        if "strategy" in short:
            count += iterations_in_all(short["strategy"], 0)
        count += short.get("newton_iterations", 0)
    return count


def main() -> None:
    rows = []
    for name in sorted(HARD_CASES):
        start = time.perf_counter()
        result = simulate(loads_case(HARD_CASES[name], source_file=name))
        seconds = time.perf_counter() - start
        path = result.strategy.get("homotopy_path", [])
        iterations = iterations_in_all(result.strategy, result.iterations)
        rows.append({
            "case": name, "converged": result.converged, "rung": result.strategy.get("rung"),
            "newton_iterations": iterations, "final_solve_iterations": result.iterations,
            "homotopy_points": len(path), "seconds": seconds,
        })
        print(f"{name:30s} {'yes' if result.converged else 'NO ':3s} {str(result.strategy.get('rung')):14s} "
              f"{iterations:4d} Newton iterations in all  {seconds:6.2f} s")
    converged = [r for r in rows if r["converged"]]
    counts = [r["newton_iterations"] for r in converged]
    rungs = {rung: sum(1 for r in converged if r["rung"] == rung) for rung in ("newton", "damped newton", "second start", "homotopy", "shorter column")}
    summary = {
        "cases": len(rows), "converged": len(converged), "rungs": rungs,
        "newton_iterations_median": statistics.median(counts) if counts else None,
        "newton_iterations_max": max(counts) if counts else None,
    }
    print(summary)
    save("hard_cases", {"rows": rows, **summary})


if __name__ == "__main__":
    main()
