"""Packings (solver.sizing.packing): Robbins' pressure drop against an independent
implementation, the flood point, HETP rules of thumb."""

from __future__ import annotations

import numpy as np
import pytest
from fluids.packed_tower import Robbins

from solver.sizing.packing import (INCH_WATER_PER_FOOT, flood_area, flood_pressure_drop, hetp_rule_of_thumb,
                                   robbins_liquid_load, robbins_pressure_drop)

FOOT = 0.3048


@pytest.mark.parametrize("G, L, rho_G, rho_L, mu, Fpd", [
    (2.03, 12.2, 1.1853, 1000.0, 1e-3, 24.0),  # the example in the docstring of fluids' Robbins (after Perry's)
    (1.0, 3.0, 2.5, 780.0, 0.4e-3, 40.0),
    (3.0, 1.0, 0.9, 650.0, 0.25e-3, 18.0),
])
def test_robbins_pressure_drop_matches_the_fluids_package(G, L, rho_G, rho_L, mu, Fpd):
    # the registry package fluids (Caleb Bell) implements Robbins (1991) independently, for Fpd >= 15 1/ft
    ours = float(robbins_pressure_drop(G, L, rho_G, rho_L, mu, Fpd / FOOT))
    assert ours == pytest.approx(Robbins(L=L, G=G, rhol=rho_L, rhog=rho_G, mul=mu, H=1.0, Fpd=Fpd), rel=1e-6)


def test_low_packing_factors_take_the_other_liquid_term():
    # below 15 1/ft the liquid load factor uses (20/Fpd)^0.5 (Kister 1992, Eq. 8.15b)
    low = robbins_liquid_load(np.array([5.0]), np.array([800.0]), np.array([1e-3]), 10 / FOOT)
    high = robbins_liquid_load(np.array([5.0]), np.array([800.0]), np.array([1e-3]), 20 / FOOT)
    assert float(low[0] / high[0]) == pytest.approx(np.sqrt(20 / 10), rel=1e-9)


def test_flood_pressure_drop_of_kister_and_gill():
    assert flood_pressure_drop(40 / FOOT) == pytest.approx(0.115 * 40**0.7 * INCH_WATER_PER_FOOT)
    assert flood_pressure_drop(40 / FOOT) / INCH_WATER_PER_FOOT == pytest.approx(1.52, abs=0.01)  # by hand


def test_flood_area_meets_the_flood_pressure_drop():
    V, L = np.array([1.0, 2.0]), np.array([1.5, 4.0])
    rho_G, rho_L, mu = np.array([1.2, 2.0]), np.array([800.0, 700.0]), np.array([4e-4, 3e-4])
    area = flood_area(V, L, rho_G, rho_L, mu, 30 / FOOT)
    drop = robbins_pressure_drop(V / area, L / area, rho_G, rho_L, mu, 30 / FOOT)
    assert drop == pytest.approx(np.full(2, flood_pressure_drop(30 / FOOT)), rel=1e-8)
    assert np.all(robbins_pressure_drop(V / (1.2 * area), L / (1.2 * area), rho_G, rho_L, mu, 30 / FOOT) < drop)


def test_hetp_rules_of_thumb():
    assert hetp_rule_of_thumb("random", nominal_size=0.0508) == pytest.approx(1.5 * FOOT * 2)  # 1.5 ft per inch
    assert hetp_rule_of_thumb("structured", specific_area=250.0) == pytest.approx(0.4 + 0.1016)
    with pytest.raises(ValueError):
        hetp_rule_of_thumb("structured", nominal_size=0.05)
