"""Sieve and valve trays (solver.sizing.trays): Fair's flooding by the Lygeros-Magoulas fit,
column area at a fraction of flood, downcomer rules, weir geometry and tray pressure drop."""

from __future__ import annotations

import numpy as np
import pytest

from solver.case.sizing_table import DowncomerRule
from solver.sizing.trays import (TrayLoads, capacity_factor, column_area, downcomer_area, flood_velocity,
                                 hole_area_factor, rate_trays, segment_chord, tray_pressure_drop)

# a methanol-water tray near 1 atm: 0.75 kg/s of vapor, 0.5 kg/s of liquid (our own numbers)
LOADS = TrayLoads(np.array([0.75, 0.75, 0.9]), np.array([0.5, 1.2, 2.0]), np.array([1.1, 1.1, 0.8]),
                  np.array([780.0, 800.0, 940.0]), np.array([0.020, 0.030, 0.055]))


def test_capacity_factor_is_the_printed_fit():
    # Perry's 8th ed. Eq. 14-90 by hand at TS = 600 mm, F_LV = 0.1: 600^0.755 = 125.17,
    # 0.1^0.842 = 0.14388, so 0.0105 + 8.127e-4 * 125.17 * exp(-1.463 * 0.14388) = 0.0929 m/s
    assert float(capacity_factor(0.6, 0.1)) == pytest.approx(0.0929, abs=2e-4)
    # wider spacing carries more, more liquid carries less
    assert capacity_factor(0.9, 0.05) > capacity_factor(0.6, 0.05) > capacity_factor(0.45, 0.05)
    assert capacity_factor(0.6, 0.02) > capacity_factor(0.6, 0.2) > capacity_factor(0.6, 1.0)


def test_flood_velocity_surface_tension_and_system_factor():
    base = flood_velocity(LOADS, 0.6)
    stronger = TrayLoads(LOADS.vapor_mass_flow, LOADS.liquid_mass_flow, LOADS.vapor_density, LOADS.liquid_density,
                         LOADS.surface_tension * 2.0)
    assert flood_velocity(stronger, 0.6) == pytest.approx(base * 2.0**0.2)
    assert flood_velocity(LOADS, 0.6, system_factor=0.85) == pytest.approx(0.85 * base)
    assert hole_area_factor(0.12) == 1.0 and hole_area_factor(0.08) == pytest.approx(0.9)


def test_rating_the_needed_area_gives_the_design_fraction_for_every_downcomer_rule():
    for rule in (DowncomerRule(), DowncomerRule("residence_time", residence_time=4.0, minimum_fraction=0.05),
                 DowncomerRule("velocity", velocity=0.05, minimum_fraction=0.1)):
        area = column_area(LOADS, rule, 0.6, 0.8)
        rating = rate_trays(LOADS, area, rule, 0.6)
        assert rating.fraction_of_flood == pytest.approx(0.8, rel=1e-9), rule
        assert np.all(rating.downcomer_area >= 0.05 * area - 1e-12)


def test_downcomer_rules():
    area = np.full(3, 1.0)
    flow = downcomer_area(DowncomerRule(), area, LOADS, 0.6)
    assert flow[0] == pytest.approx(0.1)  # F_LV below 0.1: a tenth of the column
    residence = downcomer_area(DowncomerRule("residence_time", residence_time=5.0, minimum_fraction=0.02), area, LOADS,
                               0.6)
    assert residence == pytest.approx(np.maximum(5.0 * LOADS.liquid_volume_flow / 0.6, 0.02))
    velocity = downcomer_area(DowncomerRule("velocity", velocity=0.01, minimum_fraction=0.02), area, LOADS, 0.6)
    assert velocity == pytest.approx(np.maximum(LOADS.liquid_volume_flow / 0.01, 0.02))


def test_segment_chord_geometry():
    # half the circle is cut off by the diameter; a tenth by a chord of 0.7267 D (the segment's
    # area (theta - sin theta) D^2/8 checked with the chord's central angle)
    assert float(segment_chord(np.array([0.5]), np.array([2.0]))[0]) == pytest.approx(2.0, rel=1e-9)
    chord = float(segment_chord(np.array([0.1]), np.array([1.0]))[0])
    theta = 2 * np.arcsin(chord)
    assert (theta - np.sin(theta)) / (2 * np.pi) == pytest.approx(0.1, rel=1e-9)
    assert chord == pytest.approx(0.7267, abs=1e-3)


def test_tray_pressure_drop_grows_with_vapor_and_liquid():
    area, downcomer, weir = np.full(3, 1.0), np.full(3, 0.1), np.full(3, 0.73)
    base = tray_pressure_drop(LOADS, area, downcomer, weir, 0.1, 0.05)
    assert np.all((base > 400.0) & (base < 2000.0))  # sieve trays near 1 atm: 0.4 to 2 kPa (common practice)
    more_vapor = TrayLoads(LOADS.vapor_mass_flow * 1.5, LOADS.liquid_mass_flow, LOADS.vapor_density,
                           LOADS.liquid_density, LOADS.surface_tension)
    assert np.all(tray_pressure_drop(more_vapor, area, downcomer, weir, 0.1, 0.05) > base)
    assert np.all(tray_pressure_drop(LOADS, area, downcomer, weir, 0.1, 0.08) > base)  # taller weir
