"""The opt-in volume translation of the equation of state, ``[thermo] volume_shift = "peneloux"``
(solver.thermo.cubic_volume_shift): read from the case, matched to each component's liquid
volume at 0.7 Tc, recorded in the result's description, and without effect on equilibria.
The check of the densities against CoolProp's reference equations is in
tests/reference/test_cubic_reference.py."""

from __future__ import annotations

import CoolProp.CoolProp as CP
import numpy as np
import pytest

from test_eos_package import binary
from solver.errors import CaseError
from solver.thermo.cubic_volume_shift import MATCHING_REDUCED_TEMPERATURE, saturated_liquid_volume
from solver.thermo.package import ThermoPackage


def _package(liquid="peng-robinson", extra=""):
    return ThermoPackage.from_case(binary(liquid, extra))


def test_shift_matches_coolprop_liquid_volume_at_the_matching_point_and_leaves_k_values():
    plain = _package()
    shifted = _package(extra='volume_shift = "peneloux"')
    par = shifted.parameters
    tc = par.critical_temperature
    _, volume = saturated_liquid_volume(par, MATCHING_REDUCED_TEMPERATURE * tc)
    reference = [1.0 / CP.PropsSI("Dmolar", "T", 0.7 * t, "Q", 0, f) for t, f in zip(tc, ("Propane", "n-Butane"))]
    np.testing.assert_allclose(volume, reference, rtol=1e-7)
    # Peng-Robinson's liquid is too dense for these alkanes, so the shift makes it larger
    assert np.all(par.volume_shift < 0.0)
    T, P = np.array([300.0, 330.0]), np.array([1.0e6, 1.5e6])
    x, y = np.array([[0.3, 0.7], [0.6, 0.4]]), np.array([[0.6, 0.4], [0.8, 0.2]])
    np.testing.assert_allclose(shifted.k_values(T, P, x, y=y).K, plain.k_values(T, P, x, y=y).K, rtol=1e-12)
    record = shifted.describe()["equation_of_state"]["volume_shift"]
    assert set(record["c_m3_per_mol"]) == {"propane", "n-butane"}
    assert "0.7 Tc" in record["source"]
    assert plain.describe()["equation_of_state"]["volume_shift"] is None
    assert _package(extra='volume_shift = "none"').parameters.volume_shift is None


def test_volume_shift_only_with_an_equation_of_state_for_both_phases():
    with pytest.raises(CaseError) as caught:
        binary("ideal", 'volume_shift = "peneloux"')
    assert "thermo.volume_shift" in str(caught.value) and "not used" in str(caught.value)
    with pytest.raises(CaseError) as caught:
        binary("peng-robinson", 'volume_shift = "peneloox"')
    assert "did you mean 'peneloux'" in str(caught.value)
