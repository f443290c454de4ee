"""Sensitivities from the converged Jacobian against central finite differences of full
re-solves (computed here): every input of the methanol-water case (specs, feed, column,
NRTL parameters, vapor-pressure shifts), both views, every output, agree to 1e-4 relative.

The re-solves go through the engine (``simulate`` from the nominal profile, Newton tolerance
1e-12), and their outputs are read from the Result, not from the sensitivity module."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from solver.case import load_case
from solver.engine import simulate, stage_profile
from solver.newton import NewtonOptions
from solver.sensitivity import operated_case, sensitivity_study
from solver.thermo.package import ThermoPackage

CASE = Path(__file__).resolve().parents[2] / "cases" / "methanol_water.toml"
STEP = 1e-5  # relative step of the re-solves (1 for a shift: 1e-5 in ln Psat)
TIGHT = NewtonOptions(tolerance=1e-12)


def result_outputs(result) -> np.ndarray:
    """The outputs in the sensitivity module's order, read from a Result."""
    feed = sum(np.asarray(f.z) * f.flow for feeds in result.stage_feeds for f in feeds)
    D, B = result.distillate_flow, result.bottoms_flow
    xD, xB = result.distillate_composition, result.bottoms_composition
    return np.concatenate([[D, B], xD, xB, D * xD / feed, B * xB / feed,
                           [result.condenser_duty, result.reboiler_duty], result.temperature])


@pytest.fixture(scope="module")
def solved():
    case = load_case(CASE)
    thermo = ThermoPackage.from_case(case)
    result = simulate(case, thermo=thermo)
    assert result.converged
    return case, thermo, result, sensitivity_study(case, result, thermo=thermo)


def finite_differences(case, thermo, result, view):
    start = stage_profile(result)
    columns = []
    for item in view.inputs:
        h = item.step(STEP)
        ends = []
        for value in (item.value + h, item.value - h):
            moved_case, moved_thermo = item.apply(case, thermo, value)
            moved = simulate(moved_case, thermo=moved_thermo, start=start, options=TIGHT)
            assert moved.converged, (item.key, moved.message)
            ends.append(result_outputs(moved))
        columns.append((ends[0] - ends[1]) / (2 * h))
    return np.column_stack(columns)


@pytest.mark.parametrize("view_name", ["as_specified", "as_operated"])
def test_every_sensitivity_matches_resolves(solved, view_name):
    case, thermo, result, study = solved
    view = getattr(study, view_name)
    solved_case = case if view_name == "as_specified" else operated_case(case, result)
    assert {i.kind for i in view.inputs} == {"spec", "feed", "column", "binary", "vapor_pressure"}
    values = np.array([o.value for o in view.outputs])
    np.testing.assert_allclose(values, result_outputs(result), rtol=1e-12)
    expected = finite_differences(solved_case, thermo, result, view)
    scales = np.array([i.scale for i in view.inputs])
    computed_elasticity = view.derivatives * scales / values[:, None]
    expected_elasticity = expected * scales / values[:, None]
    error = np.abs(computed_elasticity - expected_elasticity)
    allowed = 1e-4 * np.maximum(np.abs(expected_elasticity), 1e-3)
    worst = np.unravel_index(np.argmax(error / allowed), error.shape)
    assert np.all(error <= allowed), (
        f"{view.outputs[worst[0]].key} / {view.inputs[worst[1]].key}: {computed_elasticity[worst]:.8g} "
        f"vs re-solves {expected_elasticity[worst]:.8g}"
    )


def test_bottoms_purity_drivers(solved):
    case, thermo, result, study = solved
    # as specified, the bottoms purity is the spec itself: elasticity 1 to it, none to anything else
    drivers = study.as_specified.largest_drivers("bottoms.mole_fraction.water")
    assert drivers[0][0].key == "specs.bottoms.water"
    assert drivers[0][1] == pytest.approx(1.0, rel=1e-9)
    assert abs(drivers[1][1]) < 1e-8
    # as operated (reflux and boilup ratios held), the three largest drivers, named and checked
    names = [d[0].key for d in study.as_operated.largest_drivers("bottoms.mole_fraction.water")]
    assert names == ["feeds[1].composition.methanol", "operation.boilup_ratio", "feeds[1].temperature"]
