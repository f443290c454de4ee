"""Warm-started sweeps against cold ones: the same study solved with every point from the
default start (``--cold``) and with each point from its nearest solved neighbour of the same
stage layout (extrapolated along the sweep line from a second one where there is one; see
:mod:`solver.warm_starts`). Figures:
Newton iterations and seconds of the points after the first (cold in both), and the ratios
cold / warm; and per point: the cold sweep's points after the first against the warm sweep's
warm-started points (a point with no neighbour of its stage layout starts cold in both). Writes benchmarks/results/warm_sweep.json."""

from __future__ import annotations

from concurrent.futures import ThreadPoolExecutor

from _common import HERE, save

from solver.sweep import load_document, parse_variation, run_sweep

STUDIES = {
    "methanol_water reflux ratio (12 points)": ("methanol_water.toml", ["specs.reflux_ratio=1.3:3.0:12"]),
    "naphtha_side_draw reflux ratio x draw stage (3 x 3)": (
        "naphtha_side_draw.toml", ["specs.reflux_ratio=3:5:3", "column.side_draws[0].stage=10:40:3"]),
    # two columns whose default start needs more Newton iterations (an activity-model column near
    # its pinch, a pressure column with an equation of state)
    "acetone_subcooled_reflux reflux ratio (9 points)": ("acetone_subcooled_reflux.toml", ["specs.reflux_ratio=1.8:2.6:9"]),
    "depropanizer propane recovery (9 points)": ("depropanizer.toml", ["specs.recovery.propane.distillate=0.985:0.995:9"]),
}


def measure(document, variations, warm: bool) -> dict:
    with ThreadPoolExecutor(max_workers=1) as executor:
        result = run_sweep(document, variations, executor, warm=warm, chains=1)
    later = result.outcomes[1:]
    solved = [o for o in later if o.converged and (o.warm_start or not warm)]  # warm: the warm-started ones
    return {
        "points_per_point_figures": len(solved),
        "iterations_per_point": sum(o.iterations for o in solved) / max(len(solved), 1),
        "seconds_per_point": sum(o.seconds for o in solved) / max(len(solved), 1),
        "converged": sum(o.converged for o in result.outcomes),
        "points": len(result.outcomes),
        "iterations_after_first": sum(o.iterations or 0 for o in later),
        "seconds_after_first": sum(o.seconds for o in later),
        "seconds_total": sum(o.seconds for o in result.outcomes),
        "warm_started": sum(o.warm_start for o in result.outcomes),
    }


def main() -> None:
    figures = {}
    for name, (case, keys) in STUDIES.items():
        document = load_document(HERE.parent / "cases" / case)
        variations = [parse_variation(key) for key in keys]
        cold, warm = measure(document, variations, False), measure(document, variations, True)
        figures[name] = {
            "cold": cold, "warm": warm,
            "iteration_ratio_cold_over_warm": cold["iterations_after_first"] / max(warm["iterations_after_first"], 1),
            "seconds_ratio_cold_over_warm": cold["seconds_after_first"] / warm["seconds_after_first"],
            "per_point_iteration_ratio_cold_over_warm_started": cold["iterations_per_point"] / warm["iterations_per_point"],
            "per_point_seconds_ratio_cold_over_warm_started": cold["seconds_per_point"] / warm["seconds_per_point"],
        }
        print(f"{name}: iterations {cold['iterations_after_first']} cold / {warm['iterations_after_first']} warm, "
              f"seconds {cold['seconds_after_first']:.2f} / {warm['seconds_after_first']:.2f} "
              f"({figures[name]['seconds_ratio_cold_over_warm']:.1f}x); per warm-started point against per cold point: "
              f"iterations {figures[name]['per_point_iteration_ratio_cold_over_warm_started']:.2f}x, "
              f"seconds {figures[name]['per_point_seconds_ratio_cold_over_warm_started']:.1f}x")
    figures["goal"] = "warm points at least 3x cheaper than cold ones"
    figures["iteration_floor"] = ("Newton from a predicted start with a first residual of about 1e-3 needs 2 iterations to "
                                  "reach the 1e-9 tolerance (quadratic convergence), so the iteration ratio is at most "
                                  "half the cold start's iterations per point")
    save("warm_sweep", figures)


if __name__ == "__main__":
    main()
