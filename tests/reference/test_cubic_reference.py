"""solver.thermo.cubic against independent implementations, reference equations of state and
measured data.

Sources of the check values:
- The package ``thermo`` (Caleb Bell, version 0.6.1 as installed), classes
  ``thermo.eos_mix.PRMIX`` (Peng-Robinson, 1976 m), ``PR78MIX`` (1978 m above w = 0.491) and
  ``SRKMIX``: only their equations are used, both sides get the same random constants and k_ij.
- CoolProp's cubic backends ``AbstractState("PR" | "SRK", ...)`` (I. H. Bell and A. Jaeger,
  J. Res. NIST 121 (2016) 238-263): constants read from the backend and given to ours.
- CoolProp's multiparameter mixture models (backend "HEOS"): GERG-2008 reducing functions and
  departure functions for propane/n-butane, propane/isobutane and ethane/propane (O. Kunz and
  W. Wagner, J. Chem. Eng. Data 57 (2012) 3032-3091), fitted reducing parameters for
  propylene/propane (I. H. Bell and E. W. Lemmon, J. Chem. Eng. Data 61 (2016) 3752-3760), over
  the pure-fluid reference equations. Their bubble pressures are within about 1 % of good data,
  so they stand in for data over the whole range 0.5-3 MPa.
- CoolProp's pure-fluid reference equations of state for saturated liquid densities (the
  volume shift).
- Published measurements as stated in the abstracts of two papers (see ``LIM_2008_TEMPERATURES``
  and ``ETHYLENE_PROPYLENE_TEMPERATURES``).
"""

from __future__ import annotations

import numpy as np
import pytest

from solver.thermo.cubic import CubicParameters, cubic_k_values, cubic_phase, peneloux_volume_shift
from solver.thermo.cubic_critical import critical_points, pseudo_critical
from solver.thermo.cubic_flash import bubble_pressure, bubble_temperature
from solver.thermo.cubic_kij import interaction_matrix
from solver.thermo.cubic_volume_shift import matched_volume_shift, saturated_liquid_volume, with_matched_volume_shift

CoolProp = pytest.importorskip("CoolProp")
CP = pytest.importorskip("CoolProp.CoolProp")
thermo_eos_mix = pytest.importorskip("thermo.eos_mix")

R_THERMO = 8.31446261815324  # thermo's gas constant (CODATA 2018, full digits)


def _random_mixture(rng, c, heavy=False):
    tc = rng.uniform(190.0, 470.0, c)
    pc = rng.uniform(2.5e6, 5.0e6, c)
    omega = rng.uniform(0.5, 0.9, c) if heavy else rng.uniform(0.0, 0.45, c)
    k = np.triu(rng.uniform(-0.02, 0.05, (c, c)), 1)
    return tc, pc, omega, k + k.T


THERMO_CLASSES = [("peng-robinson", "PRMIX", False, 1), ("peng-robinson", "PR78MIX", True, 2), ("soave-redlich-kwong", "SRKMIX", False, 3)]


@pytest.mark.parametrize("variant, class_name, heavy, seed", THERMO_CLASSES)
def test_matches_thermo_mixture_classes_at_random_states(variant, class_name, heavy, seed):
    """Z, ln phi, departure enthalpy and their T, P and composition derivatives at 60 random
    states against thermo: 1e-8 relative (ln phi: 1e-8 absolute where near zero)."""
    rng = np.random.default_rng(seed)
    cls = getattr(thermo_eos_mix, class_name)
    checked = 0
    for _ in range(12):
        c = int(rng.integers(2, 5))
        tc, pc, omega, k = _random_mixture(rng, c, heavy)
        par = CubicParameters(tuple(f"c{i}" for i in range(c)), tc, pc, omega, variant, k)
        for _ in range(5):
            T = float(rng.uniform(0.6, 1.05) * tc.mean())
            P = float(rng.uniform(1e5, 4e6))
            z = rng.dirichlet(np.ones(c))
            eos = cls(Tcs=list(tc), Pcs=list(pc), omegas=list(omega), zs=list(z), kijs=k.tolist(), T=T, P=P)
            for phase, suffix in (("liquid", "l"), ("vapor", "g")):
                if not hasattr(eos, "Z_" + suffix):
                    continue  # thermo found one root and called it the other phase
                ours = cubic_phase(par, T, P, z, phase)
                assert ours.Z[0] == pytest.approx(getattr(eos, "Z_" + suffix), rel=1e-8)
                assert ours.ln_phi[0] == pytest.approx(getattr(eos, "lnphis_" + suffix), rel=1e-8, abs=1e-8)
                scale = 8.314462618 / R_THERMO
                assert ours.departure_enthalpy[0] == pytest.approx(getattr(eos, "H_dep_" + suffix) * scale, rel=1e-8, abs=1e-6)
                assert ours.d_departure_dT[0] == pytest.approx(getattr(eos, "dH_dep_dT_" + suffix) * scale, rel=1e-8, abs=1e-9)
                assert ours.d_ln_phi_dT[0] == pytest.approx(eos.dlnphis_dT(suffix), rel=1e-7, abs=1e-11)
                assert ours.d_ln_phi_dP[0] == pytest.approx(eos.dlnphis_dP(suffix), rel=1e-7, abs=1e-16)
                # thermo's dlnphis_dns are mole-number derivatives at sum(n) = 1: our x convention
                assert ours.d_ln_phi_dx[0] == pytest.approx(np.array(eos.dlnphis_dns(getattr(eos, "Z_" + suffix))), rel=1e-7, abs=1e-9)
                checked += 1
    assert checked >= 50


def _coolprop_constants(state, c):
    return [[state.get_fluid_constant(i, key) for i in range(c)] for key in (CP.iT_critical, CP.iP_critical, CP.iacentric_factor)]


@pytest.mark.parametrize("backend, variant", [("PR", "peng-robinson"), ("SRK", "soave-redlich-kwong")])
@pytest.mark.parametrize("fluids, k", [("Propane&n-Butane", 0.0033), ("Ethane&Propane&IsoButane", 0.01)])
def test_matches_coolprop_cubic_backends(backend, variant, fluids, k):
    """Z, ln phi and H - H_ig (CoolProp's hmolar_residual, in units of its own R) to 1e-8
    relative at random states, with CoolProp's own constants and the same k_ij."""
    state = CoolProp.AbstractState(backend, fluids)
    c = fluids.count("&") + 1
    tc, pc, omega = _coolprop_constants(state, c)
    kij = np.full((c, c), k)
    np.fill_diagonal(kij, 0.0)
    for i in range(c):
        for j in range(i + 1, c):
            state.set_binary_interaction_double(i, j, "kij", k)
    par = CubicParameters(tuple(fluids.split("&")), tc, pc, omega, variant, kij)
    R = state.gas_constant()
    rng = np.random.default_rng(c)
    checked = 0
    for _ in range(30):
        T, P = float(rng.uniform(250.0, 420.0)), float(rng.uniform(2e5, 3e6))
        z = rng.dirichlet(np.ones(c))
        state.set_mole_fractions(list(z))
        for phase, imposed in (("liquid", CP.iphase_liquid), ("vapor", CP.iphase_gas)):
            ours = cubic_phase(par, T, P, z, phase)
            state.specify_phase(imposed)
            try:
                state.update(CP.PT_INPUTS, P, T)
            except ValueError:
                continue  # CoolProp finds no root of that phase there
            finally:
                state.unspecify_phase()
            if abs(state.compressibility_factor() / ours.Z[0] - 1.0) > 1e-6:
                assert ours.single_root[0]  # only where the phase identity is ambiguous may the roots differ
                continue
            assert ours.Z[0] == pytest.approx(state.compressibility_factor(), rel=1e-8)
            phi = [state.fugacity_coefficient(i) for i in range(c)]
            assert ours.ln_phi[0] == pytest.approx(np.log(phi), rel=1e-8, abs=1e-8)
            assert ours.departure_enthalpy[0] / (8.314462618 * T) == pytest.approx(state.hmolar_residual() / (R * T), rel=1e-8, abs=1e-9)
            checked += 1
    assert checked >= 50


def test_bubble_points_and_critical_points_match_coolprop_peng_robinson():
    """Our bubble-pressure and bubble-temperature routines and the Heidemann-Khalil critical
    points against CoolProp's PR backend (its bubble points and critical-point tracing)."""
    state = CoolProp.AbstractState("PR", "Propane&n-Butane")
    tc, pc, omega = _coolprop_constants(state, 2)
    par = CubicParameters(("propane", "n-butane"), tc, pc, omega)
    x1 = np.array([0.1, 0.3, 0.5, 0.7, 0.9])
    x = np.c_[x1, 1 - x1]
    bubble = bubble_pressure(par, np.full(5, 330.0), x)
    assert bubble.converged.all() and not bubble.trivial.any()
    again = bubble_temperature(par, bubble.pressure, x)
    assert again.converged.all()
    assert np.allclose(again.temperature, 330.0, rtol=1e-9)
    critical = critical_points(par, x)
    assert critical.converged.all()
    for row, composition in enumerate(x):
        state.set_mole_fractions(list(composition))
        state.update(CP.QT_INPUTS, 0.0, 330.0)
        assert bubble.pressure[row] == pytest.approx(state.p(), rel=1e-9)
        assert bubble.y[row, 0] == pytest.approx(state.mole_fractions_vapor()[0], rel=1e-8)
        point = state.all_critical_points()[0]
        assert critical.temperature[row] == pytest.approx(point.T, rel=1e-7)
        assert critical.pressure[row] == pytest.approx(point.p, rel=1e-7)
    # Kay's rule is a rough first cut: below the true critical pressure of these mixtures
    _, pseudo_pressure = pseudo_critical(par, x)
    assert np.all(pseudo_pressure < critical.pressure)


# ----------------------------------------------------------------------------- against the reference equations

PAIRS = [
    ("propane", "n-butane", "Propane", "n-Butane"),
    ("propane", "isobutane", "Propane", "IsoButane"),
    ("ethane", "propane", "Ethane", "Propane"),
    ("propylene", "propane", "Propylene", "Propane"),
]


def reference_parameters(names, fluids, k=None) -> CubicParameters:
    """PR constants taken from the pure-fluid reference equations in CoolProp (critical point
    and acentric factor), the usual way to set up a cubic for a fluid with such an equation."""
    constants = [[CP.PropsSI(key, fluid) for fluid in fluids] for key in ("Tcrit", "pcrit", "acentric")]
    return CubicParameters(tuple(names), *constants, "peng-robinson", k)


def reference_bubble_points(fluids):
    """Bubble temperature and incipient vapor from the reference mixture model at liquid
    mole fractions 0.1-0.9 and pressures 0.5-3 MPa (points above the mixture's critical
    pressure or where CoolProp fails are skipped)."""
    state = CoolProp.AbstractState("HEOS", "&".join(fluids))
    rows = []
    for x1 in (0.1, 0.3, 0.5, 0.7, 0.9):
        for pressure in (0.5e6, 1.0e6, 2.0e6, 3.0e6):
            state.set_mole_fractions([x1, 1.0 - x1])
            try:
                state.update(CP.PQ_INPUTS, pressure, 0.0)
            except ValueError:
                continue
            rows.append((state.T(), x1, pressure, state.mole_fractions_vapor()[0]))
    return np.array(rows)


#: Largest relative bubble-pressure and relative-volatility deviations from the reference
#: models we accept, per pair: PR with k_ij near zero is typically within 2-5 % in bubble
#: pressure for light hydrocarbon pairs (common practice); the numbers found when this test was
#: written (largest |dP/P| with k = 0 / table k_ij: 0.7/1.1 %, 1.1/1.9 %, 2.3/2.6 %, 2.6/0.8 %)
#: have a margin of about 1 % of pressure.
PRESSURE_TOLERANCE = 0.035
VOLATILITY_TOLERANCE = 0.08


@pytest.mark.parametrize("names, fluids", [(p[:2], p[2:]) for p in PAIRS], ids=[f"{p[0]}-{p[1]}" for p in PAIRS])
@pytest.mark.parametrize("with_table", [False, True], ids=["k=0", "k from table"])
def test_bubble_pressures_near_the_reference_mixture_models(names, fluids, with_table):
    rows = reference_bubble_points(fluids)
    assert len(rows) >= 18
    k = interaction_matrix(names)[0] if with_table else None
    par = reference_parameters(names, fluids, k)
    T, x1, pressure, y1 = rows.T
    ours = bubble_pressure(par, T, np.c_[x1, 1 - x1])
    assert ours.converged.all()
    deviation = ours.pressure / pressure - 1.0
    assert np.abs(deviation).max() < PRESSURE_TOLERANCE
    alpha_reference = (y1 / x1) / ((1 - y1) / (1 - x1))
    alpha = ours.K[:, 0] / ours.K[:, 1]
    assert np.abs(alpha / alpha_reference - 1.0).max() < VOLATILITY_TOLERANCE
    assert np.all(alpha > 1.0)  # the lighter component stays the lighter one


#: Published measurements read for these checks (in the stored abstracts; the papers' tables
#: could not be read, so no table values are used):
#: - Propane (1) + n-butane (2) at 273.15, 283.15, 293.15, 303.15, 313.15 and 323.15 K: "slightly
#:   negative deviation from Raoult's law and no azeotropes for all the temperature ranges"
#:   (Lim et al., J. Chem. Eng. Data 53 (2008) 2783-2786, "Vapor-Liquid Equilibria for Propane
#:   (R290) + n-Butane (R600) at Various Temperatures", abstract).
#: - Ethylene (1) + propylene (2) isotherms at 283.15, 298.15, 323.15 and 348.15 K, measured
#:   from the vapor pressure of propylene, 0.78-3.38 MPa, up to the critical pressure of the
#:   mixture, 5.00-5.57 MPa (J. Chem. Eng. Japan 16 (1983) 99, abstract on J-STAGE; the authors'
#:   names are not in what was read). The abstract gives the ranges over the four isotherms, so
#:   the checks compare the smallest and largest of our four values with them.
LIM_2008_TEMPERATURES = (273.15, 283.15, 293.15, 303.15, 313.15, 323.15)
ETHYLENE_PROPYLENE_TEMPERATURES = (283.15, 298.15, 323.15, 348.15)
PROPYLENE_VAPOR_PRESSURE_RANGE = (0.78e6, 3.38e6)  # Pa, at 283.15 and 348.15 K
ETHYLENE_PROPYLENE_CRITICAL_PRESSURE_RANGE = (5.00e6, 5.57e6)  # Pa, over the four isotherms


@pytest.mark.parametrize("with_table", [False, True], ids=["k=0", "k from table"])
def test_propane_n_butane_deviates_slightly_below_raoult_without_azeotrope(with_table):
    """Lim et al. (2008): slightly below Raoult's law, no azeotrope, 273-323 K. Our bubble
    pressures must lie below the Raoult line through the equation's own pure-component vapor
    pressures at every composition, by less than 10 % ("slightly": the reference mixture model
    of the pair, GERG-2008 in CoolProp, is 0.3-4.7 % below it here), and rise monotonically with
    the propane fraction with propane richer in the vapor everywhere (no azeotrope)."""
    names, fluids = ("propane", "n-butane"), ("Propane", "n-Butane")
    par = reference_parameters(names, fluids, interaction_matrix(names)[0] if with_table else None)
    x1 = np.linspace(0.05, 0.95, 19)
    for temperature in LIM_2008_TEMPERATURES:
        ends = bubble_pressure(par, np.full(2, temperature), np.array([[1.0 - 1e-12, 1e-12], [1e-12, 1.0 - 1e-12]]))
        ours = bubble_pressure(par, np.full(x1.shape, temperature), np.c_[x1, 1 - x1])
        assert ours.converged.all() and ends.converged.all()
        raoult = x1 * ends.pressure[0] + (1 - x1) * ends.pressure[1]
        deviation = ours.pressure / raoult - 1.0
        assert np.all(deviation < 0.0) and np.all(deviation > -0.10), (temperature, deviation)
        assert np.all(np.diff(ours.pressure) > 0.0)
        assert np.all(ours.y[:, 0] > x1)


def _critical_pressure_at(par: CubicParameters, temperature: float) -> float:
    """The critical pressure of a binary's critical line at ``temperature``, interpolated on
    the Heidemann-Khalil critical points of 200 compositions."""
    x1 = np.linspace(0.002, 0.998, 200)
    line = critical_points(par, np.c_[x1, 1 - x1])
    assert line.converged.all()
    order = np.argsort(line.temperature)
    assert line.temperature[order][0] < temperature < line.temperature[order][-1]
    return float(np.interp(temperature, line.temperature[order], line.pressure[order]))


def test_ethylene_propylene_against_measured_vapor_and_critical_pressures():
    """J. Chem. Eng. Japan 16 (1983) 99: propylene vapor pressures 0.78 and 3.38 MPa at 283.15 and
    348.15 K, within 1.5 % (printed to 0.01 MPa, 0.6 % of 0.78 MPa; Peng-Robinson with the
    reference equation's Tc, Pc and acentric factor is within 1 % of it here); the critical
    pressures of the mixture along the four isotherms between 5.00 and 5.57 MPa, the smallest and
    the largest of ours within 3 % of these ends (a cubic with k_ij = 0 puts critical lines of
    similar hydrocarbons within a few per cent, common practice; we find +1.3 % and +0.4 %). Kay's
    pseudo-critical pressure, a mole-fraction average of the pure critical pressures, stays below
    5.05 MPa and would miss the upper end by more than 9 %: the check separates a mixture
    critical point from an average."""
    names, fluids = ("ethylene", "propylene"), ("Ethylene", "Propylene")
    par = reference_parameters(names, fluids)
    pure = bubble_pressure(par, [283.15, 348.15], np.array([[1e-12, 1.0 - 1e-12]] * 2))
    assert pure.converged.all()
    assert pure.pressure == pytest.approx(np.array(PROPYLENE_VAPOR_PRESSURE_RANGE), rel=0.015)
    critical = np.array([_critical_pressure_at(par, T) for T in ETHYLENE_PROPYLENE_TEMPERATURES])
    low, high = ETHYLENE_PROPYLENE_CRITICAL_PRESSURE_RANGE
    assert critical.min() == pytest.approx(low, rel=0.03)
    assert critical.max() == pytest.approx(high, rel=0.03)
    tc = par.critical_temperature
    kay = []
    for T in ETHYLENE_PROPYLENE_TEMPERATURES:
        x_ethylene = (tc[1] - T) / (tc[1] - tc[0])  # Kay's T_pc = T
        kay.append(pseudo_critical(par, [[x_ethylene, 1 - x_ethylene]])[1][0])
    assert max(kay) < high * (1 - 0.09)


def test_propylene_propane_relative_volatility_at_splitter_conditions():
    """At 45 C the bubble pressure of propylene/propane liquids is 15.5-18.5 bar and the relative
    volatility is near 1.1 (common practice for C3 splitters: 1.08-1.2); PR with the table k_ij
    within 2 % of the reference mixture model's volatility."""
    names, fluids = ("propylene", "propane"), ("Propylene", "Propane")
    par = reference_parameters(names, fluids, interaction_matrix(names)[0])
    x1 = np.linspace(0.05, 0.99, 8)
    ours = bubble_pressure(par, np.full(8, 318.15), np.c_[x1, 1 - x1])
    alpha = ours.K[:, 0] / ours.K[:, 1]
    assert np.all((alpha > 1.06) & (alpha < 1.2))
    assert np.all((ours.pressure > 15.0e5) & (ours.pressure < 19.0e5))
    state = CoolProp.AbstractState("HEOS", "Propylene&Propane")
    for row, fraction in enumerate(x1):
        state.set_mole_fractions([fraction, 1 - fraction])
        state.update(CP.QT_INPUTS, 0.0, 318.15)
        y = state.mole_fractions_vapor()[0]
        assert alpha[row] == pytest.approx((y / fraction) / ((1 - y) / (1 - fraction)), rel=0.02)


def test_peneloux_shift_leaves_bubble_points_unchanged():
    names, fluids = ("propane", "n-butane"), ("Propane", "n-Butane")
    par = reference_parameters(names, fluids)
    shifted = par.with_volume_shift([4.9e-6, 6.8e-6], "invented for the test")
    x = np.array([[0.2, 0.8], [0.6, 0.4]])
    plain, moved = bubble_pressure(par, [300.0, 340.0], x), bubble_pressure(shifted, [300.0, 340.0], x)
    assert np.allclose(moved.pressure, plain.pressure, rtol=1e-10)
    k_plain = cubic_k_values(par, [300.0, 340.0], plain.pressure, x, plain.y)
    k_moved = cubic_k_values(shifted, [300.0, 340.0], plain.pressure, x, plain.y)
    assert np.allclose(k_moved.K, k_plain.K, rtol=1e-13)
    assert np.all(k_moved.liquid.molar_volume < k_plain.liquid.molar_volume)


def _coolprop_liquid_volume(fluids):
    return lambda T: np.array([[1.0 / CP.PropsSI("Dmolar", "T", t, "Q", 0, f) for f in fluids] for t in T])


def test_matched_volume_shift_against_coolprop_saturated_liquid_densities():
    """Peng-Robinson's saturated liquid volumes of propane and n-butane at 230-285 K (T/Tc
    0.54-0.77) against the reference equations of state in CoolProp: 4.8-6.6 % too small
    without a shift (beyond the 4 % asserted); with the shift matched at 0.7 Tc within 1.5 %
    (exact at the matching point; away from it the cubic's thermal expansion, not its level, is
    wrong, so the error grows with the distance from 0.7 Tc: found 0.8 % at T/Tc = 0.77)."""
    names, fluids = ("propane", "n-butane"), ("Propane", "n-Butane")
    par = reference_parameters(names, fluids)
    shifted = with_matched_volume_shift(par, _coolprop_liquid_volume(fluids), "CoolProp's reference equations")
    for T in (230.0, 245.0, 260.0, 275.0, 285.0):
        reference = _coolprop_liquid_volume(fluids)([T])[0]
        _, plain = saturated_liquid_volume(par, [T, T])
        _, moved = saturated_liquid_volume(shifted, [T, T])
        assert np.all(np.abs(plain / reference - 1.0) > 0.04)
        assert np.all(np.abs(moved / reference - 1.0) < 0.015), (T, moved / reference - 1.0)


def test_matched_volume_shift_agrees_with_peneloux_correlation_for_srk():
    """For Soave-Redlich-Kwong, Peneloux et al. correlate c with the Rackett compressibility
    factor Z_RA (``peneloux_volume_shift``). With Z_RA from the reference equation's liquid
    volume at 0.7 Tc through Rackett's equation, v = (R Tc/Pc) Z_RA^(1 + 0.3^(2/7)), their c of
    propane and n-butane and ours matched at 0.7 Tc agree within 5 % (found: 2 % and 3 %)."""
    names, fluids = ("propane", "n-butane"), ("Propane", "n-Butane")
    base = reference_parameters(names, fluids)
    srk = CubicParameters(base.names, base.critical_temperature, base.critical_pressure, base.acentric_factor, "soave-redlich-kwong")
    ours = matched_volume_shift(srk, _coolprop_liquid_volume(fluids))
    tc, pc = srk.critical_temperature, srk.critical_pressure
    volume = np.diagonal(_coolprop_liquid_volume(fluids)(0.7 * tc))
    z_ra = (volume * pc / (8.314462618 * tc)) ** (1.0 / (1.0 + 0.3 ** (2.0 / 7.0)))
    assert ours == pytest.approx(peneloux_volume_shift(tc, pc, z_ra), rel=0.05)
    assert np.all(ours > 0.0)  # SRK's liquids are too light: the shift makes them smaller
