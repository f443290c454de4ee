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


def test_layouts_map_section_by_section_or_not_at_all():
    import dataclasses

    from solver.warm_starts import mapped_start, stage_layout

    case = load_case(CASES / "naphtha_side_draw.toml")  # 36 stages, liquid draw on 10, feed on 20
    layout = stage_layout(case)
    assert layout.stages == 36 and layout.special == ((10, "liquid draw"), (20, "feed"))
    profile = stage_profile(simulate(case))
    assert mapped_start(profile, layout, layout) is profile

    def moved(draw_stage, stages=36):
        column = dataclasses.replace(case.column, stages=stages, pressures=case.column.pressures[:1] * stages,
                                     efficiencies=(1.0,) * stages,
                                     side_draws=(dataclasses.replace(case.column.side_draws[0], stage=draw_stage),))
        return stage_layout(dataclasses.replace(case, column=column))

    # the draw moved up but still above the feed: each section stretched, special stages kept aligned
    start = mapped_start(profile, layout, moved(6))
    assert start.stage_count == 36
    assert start.temperature[5] == pytest.approx(profile.temperature[9])  # new draw stage 6 = old draw stage 10
    assert start.temperature[19] == pytest.approx(profile.temperature[19])  # the feed stage stays
    assert start.temperature[0] == profile.temperature[0] and start.temperature[-1] == profile.temperature[-1]
    longer = mapped_start(profile, layout, moved(10, 40))
    assert longer.stage_count == 40 and longer.temperature[9] == pytest.approx(profile.temperature[9])
    # the draw moved past the feed: no start
    assert mapped_start(profile, layout, moved(25)) is None


def test_secant_predictor_along_the_sweep_line():
    from solver.warm_starts import StageLayout, extrapolated_profile, warm_start

    case = load_case(CASES / "methanol_water.toml")
    a = stage_profile(simulate(case))
    b = dataclasses_replace_temperature(a, 350.0)
    ahead = extrapolated_profile(a, b, 0.5)
    np.testing.assert_allclose(ahead.temperature, a.temperature + 0.5 * (a.temperature - 350.0))
    assert np.all(ahead.liquid_flow > 0) and np.all(ahead.vapor_flow >= 0)
    layout, other = StageLayout(20, ((10, "feed"),)), StageLayout(20, ((12, "feed"),))
    solved = [SolvedPoint((0.0,), b, layout), SolvedPoint((0.5,), a, layout)]
    # on the line beyond the nearest point: the secant predictor from the two
    start = warm_start((1.0,), layout, solved)
    np.testing.assert_allclose(start.temperature, a.temperature + (a.temperature - 350.0))
    # off the line (a second coordinate moved): the nearest profile as it is
    solved_2d = [SolvedPoint((0.0, 0.0), b, layout), SolvedPoint((0.5, 0.0), a, layout)]
    assert warm_start((0.5, 1.0), layout, solved_2d) is a
    # a layout that maps (same order of special stages) only when none of the same layout is solved
    assert warm_start((1.0,), other, [SolvedPoint((0.5,), a, layout)]).stage_count == 20
    assert warm_start((1.0,), StageLayout(20, ((5, "liquid draw"), (10, "feed"))), solved) is None


def test_warm_points_take_fewer_newton_iterations():
    document = load_document(CASES / "methanol_water.toml")
    variations = [parse_variation("specs.reflux_ratio=1.5:2.5:6")]
    with ThreadPoolExecutor(max_workers=1) as executor:
        warm = run_sweep(document, variations, executor, warm=True, chains=1)
        cold = run_sweep(document, variations, executor)
    assert all(o.converged for o in warm.outcomes + cold.outcomes)
    # from the third point on, the secant predictor leaves Newton less to do than the default start
    assert all(w.iterations < c.iterations for w, c in zip(warm.outcomes[3:], cold.outcomes[3:]))
