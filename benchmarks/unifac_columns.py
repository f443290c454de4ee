"""The shipped activity-model columns solved with their NRTL parameters and again with UNIFAC and
modified UNIFAC (Dortmund) from the built-in group assignments.

Prints and saves, for every column and liquid model: Newton iterations, seconds for the whole
solve, seconds of the two-liquid check of the stage liquids (timed again apart from the solve), and the
products. Target: UNIFAC needs at most 2 Newton iterations more than NRTL on the same column.
Writes benchmarks/results/unifac_columns.json.
"""

from __future__ import annotations

import dataclasses
import time

from _common import HERE, save
from solver.case import load_case
from solver.case.model import ThermoOptions
from solver.engine import simulate
from solver.thermo.liquid_split import check_liquids
from solver.thermo.package import ThermoPackage

CASES = ["methanol_water", "ethanol_water_azeotrope", "ethanol_water_wankat", "alcohol_preconcentrator",
         "acetone_subcooled_reflux", "solvent_recovery_ternary"]
MODELS = ["nrtl", "unifac", "unifac-dortmund"]
REPEATS = 3


def _with_liquid(case, liquid: str):
    if liquid == "nrtl":
        return case
    options = ThermoOptions(liquid=liquid, vapor=case.thermo.vapor, enthalpy=case.thermo.enthalpy)
    return dataclasses.replace(case, thermo=options)


def main() -> None:
    figures: dict = {"repeats": REPEATS, "columns": {}}
    for name in CASES:
        case = load_case(HERE.parent / "cases" / f"{name}.toml")
        row = {}
        for liquid in MODELS:
            variant = _with_liquid(case, liquid)
            best, result = float("inf"), None
            for _ in range(REPEATS):
                started = time.perf_counter()
                result = simulate(variant)
                best = min(best, time.perf_counter() - started)
            split = result.liquid_split
            activity = ThermoPackage.from_case(variant).activity
            started = time.perf_counter()
            check_liquids(activity, result.temperature, result.x, range(1, result.stage_count + 1), result.components)
            check_seconds = time.perf_counter() - started
            row[liquid] = {
                "converged": result.converged,
                "iterations": result.iterations,
                "seconds": best,
                "stability_check_seconds": check_seconds,
                "stages_that_split": [] if split is None else list(split.split_labels),
                "condenser_duty_W": result.condenser_duty,
                "reboiler_duty_W": result.reboiler_duty,
                "distillate": dict(zip(result.components, result.distillate_composition.tolist())),
                "bottoms": dict(zip(result.components, result.bottoms_composition.tolist())),
            }
        row["extra_iterations_unifac"] = row["unifac"]["iterations"] - row["nrtl"]["iterations"]
        row["extra_iterations_dortmund"] = row["unifac-dortmund"]["iterations"] - row["nrtl"]["iterations"]
        figures["columns"][name] = row
        print(f"{name}:")
        for liquid in MODELS:
            r = row[liquid]
            check = r["stability_check_seconds"]
            print(f"  {liquid:16s} converged={r['converged']!s:5s} iterations={r['iterations']:3d} "
                  f"solve {r['seconds']:.2f} s, two-liquid check {0.0 if check is None else check * 1e3:.1f} ms, "
                  f"Qc {r['condenser_duty_W'] / 1e3:.1f} kW, Qr {r['reboiler_duty_W'] / 1e3:.1f} kW")
    figures["largest_extra_iterations"] = max(
        max(r["extra_iterations_unifac"], r["extra_iterations_dortmund"]) for r in figures["columns"].values()
    )
    print(f"largest number of extra Newton iterations with UNIFAC: {figures['largest_extra_iterations']}")
    save("unifac_columns", figures)


if __name__ == "__main__":
    main()
