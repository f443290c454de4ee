"""Stage properties for the hydraulics (solver.sizing.mixtures, .liquids): mixing rules, their
pure limits, and what happens when a component lacks a property."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from solver.case import load_case, loads_case
from solver.errors import CaseError
from solver.sizing.liquids import PureLiquids
from solver.sizing.mixtures import liquid_density, liquid_viscosity, stage_properties, surface_tension
from solver.thermo.package import ThermoPackage

ROOT = Path(__file__).resolve().parent.parent
USER = (ROOT / "tests" / "data" / "user_components_cmo.toml").read_text()


def test_mixing_rules_reduce_to_the_pure_liquids():
    x = np.array([[1.0, 0.0], [0.0, 1.0], [0.5, 0.5]])
    M = np.array([0.032, 0.018])
    V = np.tile([4.1e-5, 1.8e-5], (3, 1))
    rho = liquid_density(x, M, V)
    assert rho[:2] == pytest.approx(M / V[0])
    assert rho[2] == pytest.approx(0.025 / 2.95e-5)  # additive volumes
    sigma = surface_tension(x, np.tile([0.022, 0.072], (3, 1)), V)
    assert sigma[:2] == pytest.approx([0.022, 0.072])
    assert 0.022 < sigma[2] < 0.5 * (0.022 + 0.072)  # Macleod-Sugden weights by volume: below the mole average
    mu = liquid_viscosity(x, np.tile([5e-4, 9e-4], (3, 1)))
    assert mu == pytest.approx([5e-4, 9e-4, np.sqrt(5e-4 * 9e-4)])


def test_stage_properties_of_methanol_water_near_1_atm():
    case = load_case(ROOT / "cases" / "methanol_water.toml")
    thermo = ThermoPackage.from_case(case)
    liquids = PureLiquids.from_case(case, thermo)
    T = np.array([337.8, 373.0])
    x = np.array([[1.0, 0.0], [0.0, 1.0]])
    props = stage_properties(T, np.full(2, 101325.0), x, x, liquids, thermo)
    # saturated methanol at 64.7 degC and water at 99.85 degC (CoolProp reference equations; handbook values
    # 748 and 958 kg/m3, 18.9 and 58.9 mN/m, from memory)
    assert props.liquid_density == pytest.approx([748.0, 958.4], rel=0.005)
    assert props.surface_tension * 1e3 == pytest.approx([18.9, 58.9], rel=0.03)
    # vapor: ideal gas P M / (R T) less a few percent of non-ideality
    ideal = 101325.0 * np.array([0.03204, 0.01802]) / (8.314462618 * T)
    assert np.all((props.vapor_density > ideal) & (props.vapor_density < 1.04 * ideal))


def test_a_user_component_without_surface_tension_is_bad_input_naming_the_key():
    case = loads_case(USER, source_file="user.toml")
    with pytest.raises(CaseError) as caught:
        PureLiquids.from_case(case, ThermoPackage.from_case(case))
    message = str(caught.value)
    assert "sizing.components.light.surface_tension" in message and "user.toml" in message
    assert caught.value.exit_code == 2


def test_values_given_in_the_case_are_used_with_their_source():
    text = USER + """
[sizing.components.light]
liquid_density = "780 kg/m**3"
surface_tension = "21 mN/m"
liquid_viscosity = "0.4 cP"
source = "our own test values"
[sizing.components.heavy]
liquid_density = "800 kg/m**3"
surface_tension = "25 mN/m"
liquid_viscosity = "0.5 cP"
source = "our own test values"
"""
    case = loads_case(text)
    liquids = PureLiquids.from_case(case, ThermoPackage.from_case(case))
    T = np.array([350.0])
    assert liquids.surface_tension(T)[0] == pytest.approx([0.021, 0.025])
    assert liquids.viscosity(T)[0] == pytest.approx([4e-4, 5e-4])
    assert liquids.molar_mass / liquids.molar_volume(T)[0] == pytest.approx([780.0, 800.0])
    assert all("our own test values" in s.source for s in liquids.sources)
