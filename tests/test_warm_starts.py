"""Warm starts along a sweep: every point but the first starts from its nearest solved
neighbour and agrees with the cold solve within the regression tolerances of [check]; a
profile of another stage count is stretched over the new stages."""

from __future__ import annotations

from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import numpy as np
import pytest

from solver.case import load_case
from solver.engine import simulate, stage_profile
from solver.sweep import load_document, parse_variation, run_sweep
from solver.warm_starts import SolvedPoint, fitted_start, nearest_profile, solve_warm

CASES = Path(__file__).resolve().parent.parent / "cases"


def test_warm_sweep_agrees_with_cold_solves():
    document = load_document(CASES / "methanol_water.toml")
    variations = [parse_variation("specs.reflux_ratio=1.3:2.5:4"), parse_variation("column.stages=18:22:2")]
    with ThreadPoolExecutor(max_workers=1) as executor:
        warm = run_sweep(document, variations, executor, warm=True, chains=1)
        cold = run_sweep(document, variations, executor)
    assert all(o.converged for o in warm.outcomes + cold.outcomes)
    assert [o.warm_start for o in warm.outcomes] == [False] + [True] * 7
    assert not any(o.warm_start for o in cold.outcomes)
    for w, c in zip(warm.outcomes, cold.outcomes):
        assert w.reboiler_duty == pytest.approx(c.reboiler_duty, rel=1e-4)  # duty_rel of [check]
        for name in ("distillate", "bottoms"):
            assert np.abs(np.subtract(w.products[name][1], c.products[name][1])).max() <= 1e-6  # composition_abs
    assert sum(o.seconds for o in warm.outcomes[1:]) < sum(o.seconds for o in cold.outcomes[1:])


def test_stretched_neighbour_and_fallback():
    case = load_case(CASES / "methanol_water.toml")
    result = simulate(case)
    profile = stage_profile(result)
    longer = fitted_start(profile, 30)
    assert longer.stage_count == 30 and longer.temperature[0] == profile.temperature[0]
    assert longer.temperature[-1] == profile.temperature[-1]
    assert fitted_start(profile, 20) is profile
    far = SolvedPoint((1.0,), longer)
    assert nearest_profile((0.1,), [far, SolvedPoint((0.0,), profile)]) is profile
    assert nearest_profile((0.1,), []) is None
    # a start that Newton cannot use (all temperatures far too high): the default start takes over
    hot = dataclasses_replace_temperature(profile, 2000.0)
    found = solve_warm(case, hot)
    assert found.result.converged and not found.warm


def dataclasses_replace_temperature(profile, value):
    import dataclasses

    return dataclasses.replace(profile, temperature=np.full_like(profile.temperature, value))
