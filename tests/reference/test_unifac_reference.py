"""solver.thermo.unifac against outside sources.

1. An independent implementation: the registry package ``thermo`` (Caleb Bell), version as
   installed, class ``thermo.unifac.UNIFAC`` (``version=0`` original with its tables UFSG/UFIP,
   ``version=1`` Dortmund with DOUFSG/DOUFIP2016, the tables ours were copied from), and
   its copy of the DDBST published group assignments (``UNIFAC_group_assignment_DDBST``).
2. Published worked examples with their printed answers.
3. Infinite-dilution activity coefficients from the literature.
4. Azeotropes at 101.325 kPa from handbook azeotrope tables (modified Raoult's law, vapor
   pressures from CoolProp, or the Wagner equation of McGarry (Ind. Eng. Chem. Process Des.
   Dev. 22 (1983) 313) as tabulated in ``chemicals`` for the components CoolProp lacks).
Every figure is printed (run with ``-s``).
"""

from __future__ import annotations

import json
import math
from pathlib import Path

import CoolProp.CoolProp as CP
import numpy as np
import pytest
from scipy.optimize import brentq

from solver.thermo.unifac import UNIFAC, DortmundUNIFAC
from solver.thermo.unifac_tables import builtin_components, builtin_groups, load_tables

thermo_unifac = pytest.importorskip("thermo.unifac")
vapor_pressure = pytest.importorskip("chemicals.vapor_pressure")

DATA = Path(__file__).resolve().parents[2] / "solver" / "thermo" / "data"
CELSIUS = 273.15
ATMOSPHERE = 101325.0
VARIANTS = {UNIFAC: ("original", 0, "UNIFAC"), DortmundUNIFAC: ("dortmund", 1, "MODIFIED_UNIFAC")}
CAS = {
    "water": "7732-18-5", "methanol": "67-56-1", "ethanol": "64-17-5", "1-propanol": "71-23-8",
    "2-propanol": "67-63-0", "1-butanol": "71-36-3", "acetone": "67-64-1", "2-butanone": "78-93-3",
    "ethyl acetate": "141-78-6", "acetic acid": "64-19-7", "benzene": "71-43-2", "toluene": "108-88-3",
    "n-hexane": "110-54-3", "n-heptane": "142-82-5", "cyclohexane": "110-82-7", "chloroform": "67-66-3",
    "tetrahydrofuran": "109-99-9", "acetonitrile": "75-05-8", "dichloromethane": "75-09-2",
}


def _thermo_model(cls, names):
    """thermo's UNIFAC for the same components, with the DDBST published group assignments."""
    _, version, key = VARIANTS[cls]
    groups = [thermo_unifac.UNIFAC_group_assignment_DDBST(CAS[name], key) for name in names]
    assert all(groups)
    if version == 0:
        tables = dict(subgroups=thermo_unifac.UFSG, interaction_data=thermo_unifac.UFIP)
    else:
        tables = dict(subgroups=thermo_unifac.DOUFSG, interaction_data=thermo_unifac.DOUFIP2016)
    return lambda T, x: thermo_unifac.UNIFAC.from_subgroups(T=T, xs=list(x), chemgroups=groups, version=version, **tables)


# ------------------------------------------------------------------ independent implementation

MIXTURES = [
    ["ethanol", "water"],
    ["acetone", "chloroform", "methanol"],
    ["benzene", "cyclohexane", "acetone", "ethanol"],
    ["2-propanol", "water", "ethyl acetate", "toluene", "n-hexane"],
    ["acetic acid", "water", "2-butanone", "1-butanol"],
    ["methanol", "ethanol", "water", "acetone", "benzene", "toluene", "n-heptane", "n-hexane"],
]


@pytest.mark.parametrize("cls", [UNIFAC, DortmundUNIFAC])
@pytest.mark.parametrize("names", MIXTURES, ids=lambda names: "-".join(names[:2]))
def test_gamma_and_excess_enthalpy_match_thermo(cls, names):
    ours = cls.from_components(names)
    theirs = _thermo_model(cls, names)
    rng = np.random.default_rng(len(names))
    states = 10
    T = rng.uniform(280.0, 420.0, states)
    x = rng.dirichlet(np.ones(len(names)), states)
    result = ours.evaluate(T, x)
    for s in range(states):
        reference = theirs(T[s], x[s])
        np.testing.assert_allclose(np.exp(result.ln_gamma[s]), reference.gammas(), rtol=1e-10)
        # thermo's R is 8.31446261815324 against our 8.314462618 (2e-11 relative)
        np.testing.assert_allclose(result.excess_enthalpy[s], reference.HE(), rtol=1e-8)


def test_builtin_assignments_are_the_published_ddbst_ones():
    entries = json.loads((DATA / "unifac_assignments.json").read_text())["components"]
    assert len(entries) == len(builtin_components()) >= 30
    for entry in entries:
        for variant, key in (("original", "UNIFAC"), ("dortmund", "MODIFIED_UNIFAC")):
            tables = load_tables(variant)
            ours = {tables.subgroup(k).number: v for k, v in builtin_groups(entry["cas"], variant).items()}
            assert ours == thermo_unifac.UNIFAC_group_assignment_DDBST(entry["cas"], key), (entry["name"], variant)


# ------------------------------------------------------------------ published worked examples

# (components, T / K, x1, printed gamma1, printed gamma2, tolerance on gamma, source)
WORKED_EXAMPLES = [
    (
        ["acetone", "n-pentane"], 307.0, 0.047, 4.99, 1.005, (0.005, 0.0005),
        "Poling, Prausnitz & O'Connell, The Properties of Gases and Liquids, 5th ed. (2001), Example 8-12; "
        "printed answer as quoted in the test suite of thermo (tests/test_unifac.py, stored copy read), book not re-read",
    ),
    (
        ["n-hexane", "2-butanone"], 333.15, 0.5, 1.428, 1.365, (0.0005, 0.0005),
        "Gmehling, Kolbe, Kleiber & Rarey, Chemical Thermodynamics for Process Simulation (2012), Problem 05.22, "
        "step-by-step solution; as quoted in thermo's tests/test_unifac.py (stored copy read), book not re-read",
    ),
    (
        ["ethanol", "benzene"], 345.0, 0.2, 2.9119, 1.10832, (0.005, 0.005),
        "Walas, Phase Equilibria in Chemical Engineering (1985), Example 4.14; as quoted in thermo's "
        "tests/test_unifac.py (stored copy read). Walas used the parameter table before the 1991 revision, "
        "hence the looser tolerance (thermo's test allows the same 0.005)",
    ),
]


@pytest.mark.parametrize("names, T, x1, gamma1, gamma2, tolerance, source", WORKED_EXAMPLES, ids=lambda v: None)
def test_published_worked_examples(names, T, x1, gamma1, gamma2, tolerance, source):
    gamma = np.exp(UNIFAC.from_components(names).ln_gamma(T, np.array([x1, 1.0 - x1]))[0])
    print(f"\n{names} {T} K x1={x1}: gamma = {gamma[0]:.4f}, {gamma[1]:.5f}; printed {gamma1}, {gamma2} ({source})")
    assert abs(gamma[0] - gamma1) <= tolerance[0]
    assert abs(gamma[1] - gamma2) <= tolerance[1]


# ------------------------------------------------------------------ infinite dilution

# gamma-infinity of solute in solvent at 25 degC, experimental, FROM MEMORY (typical
# recommended values of the compilation of Tiegs, Gmehling, Medina, Soares, Bastos, Alessi &
# Kikic, DECHEMA Chemistry Data Series Vol. IX, "Activity Coefficients at Infinite Dilution",
# 1986); their scatter between sources is about 10 %.
INFINITE_DILUTION = [
    ("methanol", "water", 1.6),
    ("ethanol", "water", 3.8),
    ("1-propanol", "water", 14.0),
    ("1-butanol", "water", 50.0),
    ("acetone", "water", 7.5),
    ("benzene", "n-heptane", 1.6),
]


@pytest.mark.parametrize("solute, solvent, measured", INFINITE_DILUTION)
def test_infinite_dilution(solute, solvent, measured):
    x = np.array([0.0, 1.0])
    original = math.exp(UNIFAC.from_components([solute, solvent]).ln_gamma(298.15, x)[0, 0])
    dortmund = math.exp(DortmundUNIFAC.from_components([solute, solvent]).ln_gamma(298.15, x)[0, 0])
    print(f"\ngamma-inf {solute} in {solvent} 25 degC: measured {measured}, original {original:.3f}, Dortmund {dortmund:.3f}")
    # modified UNIFAC (Dortmund) fitted gamma-infinity data among others (Gmehling, Li & Schiller
    # 1993): typical accuracy 20-30 %; with the ~10 % scatter of the data, 35 %
    assert abs(dortmund / measured - 1.0) <= 0.35
    # original UNIFAC was fitted to VLE at finite concentrations and is known to be poor at
    # infinite dilution, overpredicting alcohols in water up to twofold (Voutsas & Tassios, Ind.
    # Eng. Chem. Res. 35 (1996) 1438, abstract read in a stored copy): a factor of 2.5
    assert 1.0 / 2.5 <= original / measured <= 2.5


# ------------------------------------------------------------------ azeotropes at 101.325 kPa

COOLPROP_NAMES = {
    "water": "Water", "methanol": "Methanol", "ethanol": "Ethanol", "acetone": "Acetone",
    "benzene": "Benzene", "toluene": "Toluene", "n-hexane": "n-Hexane",
}


def _vapor_pressure(name: str, T: float) -> float:
    """CoolProp's saturation pressure, or McGarry's Wagner equation as tabulated in chemicals."""
    if name in COOLPROP_NAMES:
        return CP.PropsSI("P", "T", T, "Q", 0, COOLPROP_NAMES[name])
    row = vapor_pressure.Psat_data_WagnerMcGarry.loc[CAS[name]]
    return vapor_pressure.Wagner_original(T, row.Tc, row.Pc, row.A, row.B, row.C, row.D)


def _bubble(model, names, x1: float) -> tuple[float, float]:
    """(bubble temperature / K, y1) at 101.325 kPa by modified Raoult's law."""
    x = np.array([x1, 1.0 - x1])

    def pressures(T):
        return x * np.exp(model.ln_gamma(T, x)[0]) * np.array([_vapor_pressure(n, T) for n in names])

    T = brentq(lambda T: pressures(T).sum() - ATMOSPHERE, 250.0, 420.0, xtol=1e-10)
    return T, pressures(T)[0] / ATMOSPHERE


def _azeotrope(model, names) -> tuple[float, float]:
    """The one (x1, T) where y1 = x1 between x1 = 0.005 and 0.995."""
    grid = np.linspace(0.005, 0.995, 34)
    excess = np.array([_bubble(model, names, x1)[1] - x1 for x1 in grid])
    changes = np.flatnonzero(np.sign(excess[:-1]) != np.sign(excess[1:]))
    assert changes.size == 1, f"{changes.size} azeotropes found"
    i = changes[0]
    x1 = brentq(lambda v: _bubble(model, names, v)[1] - v, grid[i], grid[i + 1], xtol=1e-12)
    return x1, _bubble(model, names, x1)[0]


def _mole_fraction(mass_percent: float, first: str, second: str) -> float:
    molar_mass = {"water": 18.015, "methanol": 32.042, "ethanol": 46.069, "1-propanol": 60.096,
                  "2-propanol": 60.096, "acetone": 58.080, "chloroform": 119.378, "benzene": 78.114,
                  "ethyl acetate": 88.106, "n-hexane": 86.178, "toluene": 92.141}
    n1, n2 = mass_percent / molar_mass[first], (100.0 - mass_percent) / molar_mass[second]
    return n1 / (n1 + n2)


# (component 1, component 2, T_az / degC, mass % of component 1, kind, source, composition
# tolerance). Default tolerances 2 K and 0.05 mole fraction: UNIFAC predicts bubble points
# of such systems to 1-2 K and vapor compositions to about 0.02-0.03 (Fredenslund, Jones &
# Prausnitz 1975; Gmehling, Li & Schiller 1993), and an azeotrope's composition sits where
# y - x changes sign slowly, so it moves several times more than y does.
VERIFIED = "CRC Handbook 44th ed. / Lange's Handbook 10th ed. azeotrope table (as reproduced in Wikipedia 'Azeotrope (data)', stored copy read: verified)"
MEMORY = "Horsley, Azeotropic Data (Adv. Chem. Ser. 6, 1952) / CRC Handbook azeotrope table: FROM MEMORY"
AZEOTROPES = [
    ("ethanol", "water", 78.1, 95.5, "minimum", VERIFIED, 0.05),
    ("1-propanol", "water", 87.7, 71.7, "minimum", VERIFIED, 0.05),
    ("2-propanol", "water", 80.4, 87.9, "minimum", VERIFIED, 0.05),
    ("acetone", "chloroform", 64.5, 20.0, "maximum", MEMORY, 0.05),
    ("ethanol", "benzene", 67.9, 32.4, "minimum", MEMORY, 0.05),
    ("methanol", "benzene", 57.5, 39.1, "minimum", MEMORY, 0.05),
    ("ethanol", "ethyl acetate", 71.8, 30.8, "minimum", MEMORY, 0.05),
    ("methanol", "acetone", 55.5, 12.0, "minimum", MEMORY, 0.05),
    ("methanol", "chloroform", 53.5, 12.5, "minimum", MEMORY, 0.05),
    ("ethanol", "n-hexane", 58.7, 21.0, "minimum", MEMORY, 0.05),
    ("ethanol", "toluene", 76.7, 68.0, "minimum", MEMORY, 0.05),
    # the bubble-point curve of acetone/n-hexane is flat about the azeotrope (UNIFAC's varies by
    # under 0.1 K over x1 = 0.60-0.70, computed here), so its composition is loosely fixed: 0.07
    ("acetone", "n-hexane", 49.8, 59.0, "minimum", MEMORY, 0.07),
]


@pytest.mark.slow
@pytest.mark.parametrize("cls", [UNIFAC, DortmundUNIFAC])
@pytest.mark.parametrize("first, second, T_az, mass_percent, kind, source, x_tolerance", AZEOTROPES,
                         ids=lambda v: v if isinstance(v, str) and len(v) < 20 else None)
def test_azeotropes_at_one_atmosphere(cls, first, second, T_az, mass_percent, kind, source, x_tolerance):
    names = [first, second]
    model = cls.from_components(names)
    x_handbook = _mole_fraction(mass_percent, first, second)
    x_az, T = _azeotrope(model, names)
    print(f"\n{cls.name}: {first}/{second} azeotrope x1 = {x_az:.4f} (handbook {x_handbook:.4f}), "
          f"T = {T - CELSIUS:.2f} degC (handbook {T_az}) [{source}]")
    assert abs(x_az - x_handbook) <= x_tolerance
    assert abs(T - CELSIUS - T_az) <= 2.0
    # a minimum-boiling azeotrope boils below the liquids beside it, a maximum-boiling one above
    for neighbour in (x_az - 0.03, x_az + 0.03):
        T_neighbour = _bubble(model, names, neighbour)[0]
        assert (T_neighbour > T) if kind == "minimum" else (T_neighbour < T)
