"""The sizing's physical properties against handbook values (solver.sizing.liquids, .mixtures).

Pure liquids at 25 degC: density and surface tension of 14 components, viscosity of 8, from the
CRC Handbook of Chemistry and Physics (Haynes, Bruno and Lide, eds., 95th ed., 2014: "Density
of ..." via the physical constants of organic compounds, "Surface Tension of Common Liquids"
after Jasper 1972, "Viscosity of Liquids"); values from memory, the surface tensions checked
against the Jasper (1972, J. Phys. Chem. Ref. Data 1, 841) table that the registry package
``chemicals`` carries. Tolerances: density 0.5 % (reference equations of state against handbook
densities, which agree to 0.1 %); surface tension 4 % (the correlations of Mulero et al. 2012
that CoolProp uses deviate from Jasper's values by up to about 3 %, acetone being the largest);
viscosity 5 % (handbook viscosities are quoted to a few percent).
Vapor densities: the virial estimate against CoolProp's saturated vapor (reference equations
of state) within 5 % up to a reduced pressure of about 0.3: it comes out 3 to 3.5 % low for
saturated propane at 10 bar, butane at 9 bar and methanol at 1 atm (Pitzer's correlation has no
term for methanol's association); 5 % on the vapor density is about 1 % on a diameter.
"""

from __future__ import annotations

import numpy as np
import pytest
from CoolProp.CoolProp import PropsSI

from solver.case import loads_case
from solver.sizing.liquids import PureLiquids
from solver.sizing.mixtures import acentric_factors, vapor_density
from solver.thermo.package import ThermoPackage

T25 = 298.15

#: name: (density kg/m3, surface tension mN/m), CRC Handbook at 25 degC (from memory; see above)
HANDBOOK_25C = {
    "water": (997.05, 71.99),
    "methanol": (786.6, 22.07),
    "ethanol": (785.1, 21.97),
    "acetone": (784.5, 23.46),
    "benzene": (873.6, 28.22),
    "toluene": (862.3, 27.93),
    "n-pentane": (621.4, 15.49),
    "n-hexane": (655.2, 17.89),
    "n-heptane": (679.5, 19.66),
    "n-octane": (698.6, 21.14),
    "cyclohexane": (773.9, 24.65),
    "ethylbenzene": (862.6, 28.75),
    "p-xylene": (856.6, 28.01),
    "diethylether": (708.0, 16.65),
}
#: name: viscosity mPa s, CRC Handbook "Viscosity of Liquids" at 25 degC (from memory)
VISCOSITY_25C = {"water": 0.890, "methanol": 0.544, "ethanol": 1.074, "acetone": 0.306, "benzene": 0.604,
                 "toluene": 0.560, "n-hexane": 0.300, "n-heptane": 0.387}


def liquids_of(names):
    listed = ", ".join(f'"{name}"' for name in names)
    composition = ", ".join(f'"{name}" = {1 / len(names)}' for name in names)
    case = loads_case(f"""
[components]
names = [{listed}]
[column]
stages = 5
condenser = "total"
reboiler = "partial"
pressure = "1 atm"
[[feeds]]
stage = 3
flow = "1 mol/s"
composition = {{ {composition} }}
vapor_fraction = 0.0
[specs]
reflux_ratio = 2.0
distillate_rate = "0.5 mol/s"
""")
    thermo = ThermoPackage.from_case(case)
    return PureLiquids.from_case(case, thermo), thermo


@pytest.fixture(scope="module")
def pure():
    liquids, _ = liquids_of(list(HANDBOOK_25C))
    T = np.array([T25])
    density = liquids.molar_mass / liquids.molar_volume(T)[0]
    tension = 1e3 * liquids.surface_tension(T)[0]
    viscosity = 1e3 * liquids.viscosity(T)[0]
    return dict(zip(liquids.names, zip(density, tension, viscosity)))


@pytest.mark.parametrize("name", sorted(HANDBOOK_25C))
def test_liquid_density_and_surface_tension_at_25_degC(pure, name):
    density, tension = HANDBOOK_25C[name]
    assert pure[name][0] == pytest.approx(density, rel=0.005)
    assert pure[name][1] == pytest.approx(tension, rel=0.04)


@pytest.mark.parametrize("name", sorted(VISCOSITY_25C))
def test_liquid_viscosity_at_25_degC(pure, name):
    assert pure[name][2] == pytest.approx(VISCOSITY_25C[name], rel=0.05)


def test_acetone_viscosity_comes_from_perrys_table_where_coolprop_has_none():
    liquids, _ = liquids_of(["acetone", "water"])
    sources = {(s.component, s.prop): s.source for s in liquids.sources}
    assert "Table 2-313" in sources[("acetone", "liquid_viscosity")]
    assert "CoolProp" in sources[("water", "liquid_viscosity")]


@pytest.mark.parametrize("fluid, name, T", [("n-Propane", "n-propane", 300.0), ("n-Butane", "n-butane", 350.0),
                                            ("Water", "water", 373.15), ("Methanol", "methanol", 338.0)])
def test_vapor_density_by_the_virial_equation_against_coolprop(fluid, name, T):
    _, thermo = liquids_of([name, "n-octane" if name != "n-octane" else "water"])
    omega = acentric_factors(thermo)
    P = PropsSI("P", "T", T, "Q", 1, fluid)
    y = np.array([[1.0, 0.0]])
    ours = vapor_density(np.array([T]), np.array([P]), y, np.array(thermo.pure.molar_mass),
                         np.asarray(thermo.pure.critical_temperature), np.asarray(thermo.pure.critical_pressure), omega)
    assert float(ours[0]) == pytest.approx(PropsSI("D", "T", T, "Q", 1, fluid), rel=0.05)
    assert float(ours[0]) < PropsSI("D", "T", T, "Q", 1, fluid)  # the truncated virial errs low here
