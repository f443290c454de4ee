"""The gamma-phi package's vapor against an independent implementation.

Source of the check values: the package ``thermo`` (Caleb Bell, version 0.6.1 as installed),
class ``thermo.eos_mix.PR78MIX`` (Peng-Robinson with the 1978 m(omega) above omega = 0.491, as
ours: methanol's omega is about 0.56) and ``thermo.eos.PR78`` for the pure saturated vapors;
only their equations are used, both sides get the same critical constants, acentric factors
(CoolProp's, read by our package) and k_ij.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from conftest import methanol_water_case
from solver.case.model import InteractionParameter
from solver.thermo.cubic import cubic_phase
from solver.thermo.gamma_phi_package import saturated_pure
from solver.thermo.package import ThermoPackage

thermo_eos_mix = pytest.importorskip("thermo.eos_mix")
thermo_eos = pytest.importorskip("thermo.eos")


@pytest.fixture(scope="module")
def package():
    case = methanol_water_case()
    interaction = (InteractionParameter("methanol", "water", -0.07, "invented for this check"),)
    thermo = dataclasses.replace(case.thermo, vapor="peng-robinson", interaction=interaction)
    return ThermoPackage.from_case(dataclasses.replace(case, thermo=thermo))


def test_vapor_fugacity_coefficients_match_thermo_at_ten_states(package):
    """ln phi_i^V of methanol-water vapor at 10 states (330-480 K, 0.5-15 bar, below each
    state's dew pressure) to 1e-8 against PR78MIX with the same k_ij."""
    par = package.parameters
    rng = np.random.default_rng(12)
    checked = 0
    while checked < 10:
        T = float(rng.uniform(330.0, 480.0))
        y = rng.dirichlet(np.ones(2))
        psat = np.exp(package.pure.ln_vapor_pressure(np.array([T]))[0][0])
        dew = 1.0 / float(np.sum(y / psat))  # Raoult's dew pressure: the vapor is the stable phase below it
        if 0.9 * dew < 0.5e5:
            continue
        P = float(rng.uniform(0.5e5, min(15e5, 0.9 * dew)))
        ours = package.k_values(np.array([T]), np.array([P]), np.array([[0.5, 0.5]]), y=y[None, :])
        eos = thermo_eos_mix.PR78MIX(Tcs=list(par.critical_temperature), Pcs=list(par.critical_pressure),
                                     omegas=list(par.acentric_factor), zs=list(y), kijs=par.interaction.tolist(),
                                     T=T, P=P)
        vapor = cubic_phase(par, T, P, y, "vapor")
        assert vapor.ln_phi[0] == pytest.approx(eos.lnphis_g, rel=1e-8, abs=1e-10)
        # and d ln K/d y is minus the thermo's mole-number derivative of ln phi (at sum(n) = 1)
        assert -ours.d_ln_K_dy[0] == pytest.approx(np.array(eos.dlnphis_dns(eos.Z_g)), rel=1e-7, abs=1e-9)
        checked += 1


def test_saturated_pure_vapors_match_thermo(package):
    """ln phi_i^sat and the saturated vapor's departure enthalpy of each pure component at its
    vapor pressure against thermo's PR78 (1e-8 relative)."""
    par = package.parameters
    T = np.array([340.0, 400.0, 460.0])
    saturated = saturated_pure(par, package.pure, T)
    scale = 8.314462618 / 8.31446261815324  # our gas constant over thermo's
    for s, temperature in enumerate(T):
        for i in range(2):
            eos = thermo_eos.PR78(Tc=float(par.critical_temperature[i]), Pc=float(par.critical_pressure[i]),
                                  omega=float(par.acentric_factor[i]), T=float(temperature),
                                  P=float(saturated.psat[s, i]))
            assert saturated.ln_phi[s, i] == pytest.approx(eos.lnphi_g, rel=1e-8)
            assert saturated.departure[s, i] == pytest.approx(eos.H_dep_g * scale, rel=1e-8)
