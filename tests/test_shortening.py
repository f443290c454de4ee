"""The shortened column: which stages are kept, how the case is rewritten, and the stretched
start, which must put Newton within a few iterations of the full column's solution."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from conftest import methanol_water_case
from solver.case import SideDraw, Spec, StageDuty
from solver.engine import simulate, stage_profile
from solver.shortening import MIN_STAGES, anchor_stages, shortened_case, stretched_start
from solver.thermo.package import ThermoPackage


def long_case(stages: int = 40, feed_stage: int = 25):
    return methanol_water_case(stages=stages, feed_stage=feed_stage, specs='reflux_ratio = 1.2\nbottoms = { water = 0.999 }')


def test_anchors_are_the_stages_that_carry_something_and_their_neighbours():
    case = long_case()
    column = dataclasses.replace(
        case.column,
        side_draws=(SideDraw(stage=10, phase="liquid", flow=0.001),),
        stage_duties=(StageDuty(stage=33, duty=-1000.0),),
    )
    case = dataclasses.replace(
        case, column=column, specs=case.specs + (Spec("stage_temperature", 350.0, stage=18),)
    )
    assert anchor_stages(case) == [1, 2, 9, 10, 11, 17, 18, 19, 24, 25, 26, 32, 33, 34, 39, 40]


def test_the_shortened_case_keeps_anchors_pressures_and_feeds():
    case = dataclasses.replace(
        long_case(), column=dataclasses.replace(long_case().column, pressures=tuple(np.linspace(1.0e5, 1.4e5, 40)))
    )
    short, positions = shortened_case(case, 0.5)
    assert short.column.stages < case.column.stages
    assert np.all(np.diff(positions) > 0) and positions[0] == 1 and positions[-1] == 40
    assert positions[short.feeds[0].stage - 1] == case.feeds[0].stage  # the feed stays on its stage
    assert short.column.pressures[0] == pytest.approx(1.0e5) and short.column.pressures[-1] == pytest.approx(1.4e5)
    assert len(short.column.pressures) == len(short.column.efficiencies) == short.column.stages
    assert short.specs == case.specs  # no stage-numbered spec here
    with pytest.raises(ValueError):
        shortened_case(case, 1.0)


@given(
    stages=st.integers(min_value=MIN_STAGES, max_value=150),
    feed=st.floats(min_value=0.1, max_value=0.9),
    draw=st.floats(min_value=0.05, max_value=0.95),
    ratio=st.floats(min_value=0.2, max_value=0.8),
)
@settings(max_examples=60, deadline=None)
def test_every_anchor_maps_onto_itself(stages, feed, draw, ratio):
    base = long_case()
    feed_stage = int(np.clip(round(feed * stages), 2, stages - 1))
    draw_stage = int(np.clip(round(draw * stages), 2, stages - 1))
    column = dataclasses.replace(
        base.column, stages=stages, pressures=(101325.0,) * stages, efficiencies=(1.0,) * stages,
        side_draws=(SideDraw(stage=draw_stage, phase="vapor", flow=0.001),),
    )
    case = dataclasses.replace(base, column=column, feeds=(dataclasses.replace(base.feeds[0], stage=feed_stage),))
    short, positions = shortened_case(case, ratio)
    assert short.column.stages <= stages
    assert np.all(np.diff(positions) > 0)
    assert positions[short.feeds[0].stage - 1] == feed_stage
    assert positions[short.column.side_draws[0].stage - 1] == draw_stage
    for anchor in anchor_stages(case):
        assert anchor in positions


ALKANES = """
title = "five n-alkanes, sharp split with n-heptane distributing (test scenario)"
[components]
names = ["n-pentane", "n-hexane", "n-heptane", "n-octane", "n-nonane"]
[thermo]
liquid = "ideal"
[column]
stages = 60
condenser = "total"
reboiler = "partial"
pressure.top = "101.325 kPa"
[[feeds]]
stage = 30
flow = "100 kmol/h"
composition = { n-pentane = 0.2, n-hexane = 0.2, n-heptane = 0.2, n-octane = 0.2, n-nonane = 0.2 }
vapor_fraction = 0.0
[specs]
recovery = { n-hexane = { distillate = 0.999 }, n-octane = { bottoms = 0.999 } }
"""


def test_the_stretched_start_puts_newton_next_to_the_solution(make_case):
    """A column long enough to pinch: halving its sections moves the answer by a few per cent,
    and Newton from the stretched profile of the short one finds the full one's solution (the
    same one as from the default start) in as many iterations as a cold start may take."""
    case = make_case(ALKANES)
    thermo = ThermoPackage.from_case(case)
    full = simulate(case, thermo=thermo)
    short_case, positions = shortened_case(case, 0.5)
    short = simulate(short_case, thermo=thermo)
    assert full.converged and short.converged
    assert short.reflux_ratio == pytest.approx(full.reflux_ratio, rel=0.06)  # pinched: half the stages, 5 % more reflux
    start = stretched_start(stage_profile(short), positions, case.column.stages)
    assert start.temperature[0] == pytest.approx(short.temperature[0]) and start.temperature[-1] == pytest.approx(short.temperature[-1])
    again = simulate(case, thermo=thermo, start=start)
    assert again.converged and again.iterations <= 15
    np.testing.assert_allclose(again.temperature, full.temperature, atol=1e-6)
    assert again.reflux_ratio == pytest.approx(full.reflux_ratio, rel=1e-8)


def test_a_short_column_is_not_shortened():
    case = methanol_water_case(stages=12, feed_stage=7)
    short, positions = shortened_case(case, 0.5)
    assert short.column.stages == len(positions) <= 12


def test_the_engine_falls_back_to_the_shorter_column(make_case, monkeypatch):
    """Rung 3: with the default start spoiled for the full column only (and no homotopy), the
    engine solves the shortened column, stretches its profile and converges on the full one."""
    import solver.engine as engine

    case = make_case(ALKANES)
    thermo = ThermoPackage.from_case(case)
    reference = simulate(case, thermo=thermo)
    real_start = engine.initial_estimate

    def spoiled(system, *, correct_split=True):
        X = real_start(system, correct_split=correct_split)
        if system.N == case.column.stages:
            T, l, v = system.unpack(X)
            X = system.pack(T[::-1].copy(), l[::-1].copy(), v[::-1].copy())  # the column upside down
        return X

    real_second_start = engine._from_second_start

    def no_second_start(system, options):
        # from the upside-down column the second start (the sweeps' own split) may recover
        return (None, {}) if system.N == case.column.stages else real_second_start(system, options)

    monkeypatch.setattr(engine, "initial_estimate", spoiled)
    monkeypatch.setattr(engine, "_from_second_start", no_second_start)
    result = simulate(case, thermo=thermo, continuation=False)
    assert result.converged, result.message
    assert result.strategy["rung"] == "shorter column"
    record = result.strategy["shortened_column"]
    assert record["converged"] and record["stages"] < case.column.stages
    assert result.reflux_ratio == pytest.approx(reference.reflux_ratio, rel=1e-8)
    # without the rung the spoiled start does not converge: the test above is not vacuous
    assert not simulate(case, thermo=thermo, continuation=False, shortening=0).converged
