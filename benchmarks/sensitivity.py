"""Cost of the sensitivities of a 60-stage column against one cold solve of it: every output
(products, duties, 60 stage temperatures) with respect to 30 inputs, as a fraction of the
time of ``simulate`` from the default start. The column is the solvent-recovery ternary case
(NRTL) stretched to 60 stages; its own 18 inputs and 12 of them once more make the 30 (a
repeated input costs what any input of its kind costs). Best of 3. Writes
benchmarks/results/sensitivity.json."""

from __future__ import annotations

import dataclasses

import numpy as np
from _common import HERE, best_of, save

from solver.case import load_case
from solver.engine import simulate
from solver.sensitivity import column_sensitivities
from solver.sensitivity_inputs import choose_inputs
from solver.thermo.package import ThermoPackage

STAGES = 60
INPUTS = 30


def sixty_stages(case):
    column = case.column
    pressures = np.linspace(column.pressures[0], column.pressures[-1], STAGES)
    efficiencies = (1.0,) * STAGES
    scale = STAGES / column.stages
    column = dataclasses.replace(column, stages=STAGES, pressures=tuple(pressures), efficiencies=efficiencies)
    feeds = tuple(dataclasses.replace(f, stage=int(round(f.stage * scale))) for f in case.feeds)
    return dataclasses.replace(case, column=column, feeds=feeds)


def main() -> None:
    case = sixty_stages(load_case(HERE.parent / "cases" / "solvent_recovery_ternary.toml"))
    thermo = ThermoPackage.from_case(case)
    result = simulate(case, thermo=thermo)
    assert result.converged, result.message
    own = choose_inputs(case)
    inputs = (own + own)[:INPUTS]
    cold = best_of(lambda: simulate(case), 3)
    sensitivities = best_of(lambda: column_sensitivities(case, result, thermo=thermo, inputs=inputs), 3)
    view = column_sensitivities(case, result, thermo=thermo, inputs=inputs)
    figures = {
        "stages": STAGES, "components": len(case.component_names), "inputs": len(inputs),
        "distinct_inputs": len(own), "outputs": len(view.outputs),
        "cold_solve_seconds": cold, "sensitivity_seconds": sensitivities,
        "fraction_of_cold_solve": sensitivities / cold, "goal": "at most 0.20",
    }
    print(f"{len(view.outputs)} outputs x {len(inputs)} inputs, {STAGES} stages: {sensitivities:.3f} s, "
          f"{100 * sensitivities / cold:.1f} % of one cold solve ({cold:.3f} s)")
    save("sensitivity", figures)


if __name__ == "__main__":
    main()
