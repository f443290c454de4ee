"""Fenske-Underwood-Gilliland-Kirkbride design (solver/shortcut/fug.py, fenske.py, underwood.py,
gilliland_kirkbride.py).

Checks: Fenske's equation and distribution (exact statements for constant relative
volatility), Underwood's roots bracketed and both Underwood equations satisfied at every root,
the binary limit against the closed form, the minimum reflux with a distributing non-key
against an independent stage-by-stage calculation of a long column (constant alpha, constant
molar overflow, Thiele-Geddes stage equations with Holland's theta correction), the
Gilliland-Molokanov limits, Kirkbride's equation, and a case-level design of a five-component
hydrocarbon column.
"""

from __future__ import annotations

import math
import textwrap

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.linalg import solve_banded
from scipy.optimize import brentq, fsolve

from solver.case import loads_case
from solver.errors import SpecError
from solver.shortcut.fug import (
    design_multicomponent,
    fenske_distribution,
    fenske_minimum_stages,
    gilliland_molokanov,
    gilliland_stages,
    kirkbride_ratio,
    underwood_minimum_reflux,
    underwood_roots,
)
from solver.shortcut.mccabe_thiele import EquilibriumCurve, design_binary, minimum_reflux, total_reflux_stages
from solver.thermo.package import ThermoPackage


def case_from_text(text: str, name: str = "<test case>"):
    """A case from inline TOML (own helper: tests/hard has a conftest of its own that can shadow ours)."""
    return loads_case(textwrap.dedent(text), source_file=name)


def test_fenske_against_total_reflux_stepping():
    """For constant alpha the liquid ratio falls by alpha per stage at total reflux, so Fenske's
    count is the exact continuous count of the stepping."""
    for alpha, x_D, x_B in ((2.5, 0.95, 0.05), (1.4, 0.99, 0.02)):
        n = fenske_minimum_stages(alpha, x_D / (1 - x_D), x_B / (1 - x_B))
        assert n == pytest.approx(math.log((x_D * (1 - x_B)) / ((1 - x_D) * x_B)) / math.log(alpha))
        stepped = total_reflux_stages(EquilibriumCurve.constant_alpha(alpha), x_D, x_B, "partial")
        assert math.ceil(stepped - 1e-9) == math.ceil(n - 1e-9)
    with pytest.raises(SpecError):
        fenske_minimum_stages(0.9, 10.0, 0.1)


def test_fenske_distribution():
    alpha = np.array([4.0, 2.0, 1.0, 0.5])
    feed = np.array([10.0, 30.0, 40.0, 20.0])
    n_min = fenske_minimum_stages(2.0, 19.0, 1 / 19)
    d, b = fenske_distribution(alpha, feed, n_min, 1 / 19)
    np.testing.assert_allclose(d + b, feed, rtol=1e-14)
    assert d[1] / b[1] == pytest.approx(19.0) and d[2] / b[2] == pytest.approx(1 / 19)
    np.testing.assert_allclose(np.log(d / b), np.log(1 / 19) + n_min * np.log(alpha), rtol=1e-12)
    assert np.all(np.diff(d / feed) < 0)  # recoveries overhead fall with volatility


@given(
    alpha=st.lists(st.floats(0.05, 20.0), min_size=2, max_size=7, unique=True),
    weights=st.lists(st.floats(0.01, 1.0), min_size=7, max_size=7),
    q=st.floats(-0.5, 1.5),
)

@settings(max_examples=80, deadline=None)
def test_underwood_roots_are_bracketed_and_solve_the_feed_equation(alpha, weights, q):
    alpha = np.array(sorted(alpha, reverse=True))
    if np.min(np.abs(np.diff(alpha))) < 1e-3:
        return
    z = np.array(weights[: alpha.size])
    z = z / z.sum()
    roots = underwood_roots(alpha, z, q)
    assert roots.size == alpha.size - 1
    for k, theta in enumerate(roots):
        assert alpha[k + 1] < theta < alpha[k]
        terms = alpha * z / (alpha - theta)
        assert abs(terms.sum() - (1 - q)) < 1e-8 * max(1.0, np.abs(terms).max())
    assert np.all(np.diff(roots) < 0)


def test_binary_underwood_is_the_closed_form():
    for alpha, z, x_D, x_B in ((2.5, 0.45, 0.95, 0.05), (1.6, 0.3, 0.99, 0.01)):
        F = 100.0
        D = F * (z - x_B) / (x_D - x_B)
        result = underwood_minimum_reflux(np.array([alpha, 1.0]), F * np.array([z, 1 - z]), 1.0, 0, 1, D * x_D, D * (1 - x_D))
        closed = (x_D / z - alpha * (1 - x_D) / (1 - z)) / (alpha - 1)
        assert result.minimum_reflux == pytest.approx(closed, rel=1e-10)
        # and the McCabe-Thiele feed pinch on the same constant-alpha curve, for other feed conditions too
        for q in (1.0, 0.4, 1.3):
            result = underwood_minimum_reflux(np.array([alpha, 1.0]), F * np.array([z, 1 - z]), q, 0, 1, D * x_D, D * (1 - x_D))
            pinch = minimum_reflux(EquilibriumCurve.constant_alpha(alpha), x_D, x_B, z, q)
            assert result.minimum_reflux == pytest.approx(pinch.ratio, rel=1e-8)


CLASS_TWO = [
    # alpha, feed flows, q, keys, key recoveries (LK overhead, HK in bottoms)
    (np.array([4.0, 2.0, 1.5, 1.0, 0.5]), np.array([10.0, 25.0, 20.0, 25.0, 20.0]), 1.0, (1, 3), 0.95),
    (np.array([4.0, 2.0, 1.5, 1.0, 0.5]), np.array([10.0, 25.0, 20.0, 25.0, 20.0]), 0.6, (1, 3), 0.90),
    (np.array([2.05, 2.0, 1.0, 0.5]), np.array([20.0, 30.0, 30.0, 20.0]), 1.0, (1, 2), 0.90),
]


@pytest.mark.parametrize("alpha, feed, q, keys, recovery", CLASS_TWO)
def test_underwood_equations_hold_at_every_root(alpha, feed, q, keys, recovery):
    light, heavy = keys
    result = underwood_minimum_reflux(alpha, feed, q, light, heavy, recovery * feed[light], (1 - recovery) * feed[heavy])
    d = result.distillate_flows
    b = feed - d
    V = result.minimum_vapor_flow
    V_strip = V - (1 - q) * feed.sum()
    assert len(result.roots) == len(result.distributing) - 1 >= 2  # a non-key distributes
    assert np.all(d >= 0) and np.all(d <= feed)
    for theta in result.roots:
        assert np.sum(alpha * d / (alpha - theta)) == pytest.approx(V, rel=1e-10)
        assert np.sum(alpha * b / (alpha - theta)) == pytest.approx(-V_strip, rel=1e-9)
        assert np.sum(alpha * feed / (alpha - theta)) == pytest.approx((1 - q) * feed.sum(), abs=1e-8 * feed.sum())
    assert result.minimum_reflux == pytest.approx(V / d.sum() - 1)
    assert d[light] == pytest.approx(recovery * feed[light]) and b[heavy] == pytest.approx(recovery * feed[heavy])


def cmo_column(alpha, feed, q, distillate, reflux, stages, feed_stage, iterations=5000):
    """Independent stage-by-stage model: equilibrium stages 1..N (N the partial reboiler) under a
    total condenser, constant alpha (K_i = alpha_i / sum alpha x), constant molar overflow with
    the feed's q. Component balances per stage form a tridiagonal system in the liquid flows
    (Thiele-Geddes form); the compositions are corrected by Holland's theta method so that the
    distillate adds up to the given rate. Returns distillate and bottoms component flows."""
    F = feed.sum()
    B = F - distillate
    L, V = reflux * distillate, (reflux + 1) * distillate
    n = np.arange(1, stages + 1)
    liquid = np.where(n < feed_stage, L, L + q * F)
    liquid[-1] = B
    vapor = np.where(n <= feed_stage, V, V - (1 - q) * F)
    sources = np.zeros((stages, alpha.size))
    sources[feed_stage - 1] = feed
    x = np.tile(feed / F, (stages, 1))
    for _ in range(iterations):
        S = alpha / (x @ alpha)[:, None] * (vapor / liquid)[:, None]
        l = np.empty_like(x)
        for i in range(alpha.size):
            bands = np.zeros((3, stages))
            bands[1] = 1.0 + S[:, i]
            bands[1, 0] -= reflux / (reflux + 1) * S[0, i]  # the reflux returns the top vapor's share
            bands[0, 1:] = -S[1:, i]
            bands[2, :-1] = -1.0
            l[:, i] = solve_banded((1, 1), bands, sources[:, i])
        d = S[0] * l[0] / (reflux + 1)
        ratio = l[-1] / d
        theta = brentq(lambda t: np.sum(feed / (1 + t * ratio)) - distillate, 1e-12, 1e12)
        l *= (feed / (1 + theta * ratio)) / d
        new = l / l.sum(axis=1, keepdims=True)
        change = np.max(np.abs(new - x))
        x = new
        if change < 1e-13:
            break
    else:
        raise AssertionError("the stage-by-stage model did not converge")
    S = alpha / (x @ alpha)[:, None] * (vapor / liquid)[:, None]
    d = S[0] * l[0] * (1 / (reflux + 1))
    return d, feed - d


@pytest.mark.parametrize("alpha, feed, q, keys, recovery", CLASS_TWO[:2])
def test_underwood_minimum_reflux_against_a_long_column(alpha, feed, q, keys, recovery):
    """With constant alpha and CMO, Underwood's equations are exact for an infinite column: the
    reflux and distillate rate a 60-stage column needs to meet both key recoveries lie just above
    Underwood's, with the distributing middle component split as Underwood says."""
    light, heavy = keys
    result = underwood_minimum_reflux(alpha, feed, q, light, heavy, recovery * feed[light], (1 - recovery) * feed[heavy])
    target = math.log(recovery / (1 - recovery))

    def gaps(p):
        D, R = np.exp(p)
        d, b = cmo_column(alpha, feed, q, D, R, 60, 30)
        return [math.log(d[light] / b[light]) - target, math.log(b[heavy] / d[heavy]) - target]

    solution = fsolve(gaps, np.log([result.distillate_flow, 1.1 * result.minimum_reflux]), xtol=1e-10)
    assert np.max(np.abs(gaps(solution))) < 1e-7
    D, R = np.exp(solution)
    assert 1.0 - 1e-4 < R / result.minimum_reflux < 1.01
    assert D == pytest.approx(result.distillate_flow, rel=5e-3)
    d, _ = cmo_column(alpha, feed, q, D, R, 60, 30)
    middle = 2
    assert d[middle] / feed[middle] == pytest.approx(result.distillate_flows[middle] / feed[middle], abs=0.01)


def test_gilliland_molokanov_limits_and_shape():
    X = np.linspace(1e-4, 1.0, 400)
    Y = gilliland_molokanov(X)
    assert Y[-1] == pytest.approx(0.0, abs=1e-12)  # total reflux: N = N_min
    assert gilliland_molokanov(1e-9) > 0.99  # minimum reflux: N -> infinity
    assert np.all(np.diff(Y) < 0)
    assert gilliland_molokanov(0.0) == 1.0
    # N from Y: more reflux, fewer stages; never fewer than N_min
    stages = [gilliland_stages(8.0, 1.2, R) for R in (1.3, 1.5, 2.0, 4.0, 50.0)]
    assert np.all(np.diff(stages) < 0) and stages[-1] > 8.0
    with pytest.raises(SpecError, match="minimum reflux"):
        gilliland_stages(8.0, 1.2, 1.1)


@given(n_min=st.floats(1.0, 40.0), r_min=st.floats(0.05, 10.0), f1=st.floats(1.01, 3.0), f2=st.floats(0.01, 3.0))
@settings(max_examples=60, deadline=None)
def test_more_reflux_fewer_stages(n_min, r_min, f1, f2):
    low = gilliland_stages(n_min, r_min, f1 * r_min)
    high = gilliland_stages(n_min, r_min, f1 * r_min + f2)
    assert n_min <= high <= low


def test_kirkbride():
    assert kirkbride_ratio(1.0, 0.5, 0.5, 0.01, 0.01) == pytest.approx(1.0)
    assert kirkbride_ratio(2.0, 0.4, 0.4, 0.01, 0.01) == pytest.approx(2.0**0.206)
    # more light key lost in the bottoms relative to heavy key in the distillate: feed moves down
    assert kirkbride_ratio(1.0, 0.5, 0.5, 0.02, 0.01) > kirkbride_ratio(1.0, 0.5, 0.5, 0.01, 0.01)


# ------------------------------------------------------------------ from a case

HYDROCARBONS = """
title = "light hydrocarbon column (invented scenario)"
[components]
names = ["propane", "n-butane", "isopentane", "n-pentane", "n-hexane"]
[thermo]
liquid = "ideal"
[column]
stages = 25
condenser = "total"
reboiler = "partial"
pressure.top = "5 bar"
pressure.drop_per_stage = "0.5 kPa"
[[feeds]]
stage = 12
flow = "100 kmol/h"
composition = {{ propane = 0.05, n-butane = 0.30, isopentane = 0.15, n-pentane = 0.30, n-hexane = 0.20 }}
vapor_fraction = 0.0
[specs]
{specs}
"""


@pytest.fixture(scope="module")
def hydrocarbon_thermo():
    return ThermoPackage.from_case(case_from_text(HYDROCARBONS.format(specs="reflux_ratio = 2")))


def hydrocarbons(specs):
    return case_from_text(HYDROCARBONS.format(specs=specs))


def test_hydrocarbon_design(hydrocarbon_thermo):
    case = hydrocarbons("reflux_ratio = 2.5\nrecovery = { n-butane = { distillate = 0.98 }, n-pentane = { bottoms = 0.95 } }")
    design = design_multicomponent(case, hydrocarbon_thermo)
    F = 100e3 / 3600
    assert (design.light_key, design.heavy_key) == ("n-butane", "n-pentane")
    d, b = design.distillate_flows, design.bottoms_flows
    np.testing.assert_allclose(d + b, F * design.feed_composition, rtol=1e-12)
    assert d[1] / (F * 0.30) == pytest.approx(0.98, rel=1e-9)
    assert b[3] / (F * 0.30) == pytest.approx(0.95, rel=1e-9)
    # Fenske: the keys' split at the mean alphas, and every other component on the same line
    alpha = design.relative_volatility
    assert alpha[3] == 1.0 and np.all(np.diff(alpha) < 0)
    assert design.minimum_equilibrium_stages == pytest.approx(
        math.log((0.98 / 0.02) * (0.95 / 0.05)) / math.log(alpha[1]), rel=1e-9
    )
    np.testing.assert_allclose(np.log(d / b), np.log(d[3] / b[3]) + design.minimum_equilibrium_stages * np.log(alpha), rtol=1e-9, atol=1e-9)
    np.testing.assert_allclose(alpha, np.sqrt(design.relative_volatility_top * design.relative_volatility_bottom), rtol=1e-9)
    # the top is colder than the bottom, both between the pure components' saturation temperatures
    assert 300.0 < design.top_temperature < design.bottom_temperature < 420.0
    # Underwood: isopentane lies between the keys and distributes; two roots
    assert "isopentane" in design.distributing_components and len(design.underwood_roots) == 2
    assert 0.0 < design.minimum_reflux < design.reflux_ratio
    # Gilliland and Kirkbride
    assert design.equilibrium_stages > design.minimum_equilibrium_stages
    assert design.rectifying_stages + design.stripping_stages == pytest.approx(design.equilibrium_stages)
    assert design.stages == math.ceil(design.equilibrium_stages) + 1  # a total condenser is stage 1
    assert 2 <= design.feed_stage <= design.stages
    assert design.condenser_duty < 0 < design.reboiler_duty


def test_keys_and_specs(hydrocarbon_thermo):
    purities = hydrocarbons('boilup_ratio = 2.0\ndistillate = { n-pentane = 0.02 }\nbottoms = { n-butane = 0.01 }')
    design = design_multicomponent(purities, hydrocarbon_thermo)
    assert (design.light_key, design.heavy_key) == ("n-butane", "n-pentane")
    assert design.x_distillate[3] == pytest.approx(0.02, rel=1e-8)
    assert design.x_bottoms[1] == pytest.approx(0.01, rel=1e-8)
    V_strip = (design.reflux_ratio + 1) * design.distillate_flow - (1 - design.q) * design.feed_flow
    assert V_strip / design.bottoms_flow == pytest.approx(2.0)
    rate = hydrocarbons('reflux_ratio = 3\ndistillate_rate = "36 kmol/h"\nrecovery = { n-butane = { distillate = 0.99 } }')
    with pytest.raises(SpecError, match="light_key= and heavy_key="):
        design_multicomponent(rate, hydrocarbon_thermo)
    design = design_multicomponent(rate, hydrocarbon_thermo, light_key="n-butane", heavy_key="isopentane")
    assert design.distillate_flow == pytest.approx(36e3 / 3600, rel=1e-8)
    assert design.heavy_key == "isopentane"
    one = hydrocarbons("reflux_ratio = 3\nrecovery = { n-butane = { distillate = 0.99 } }")
    with pytest.raises(SpecError, match="two product specifications"):
        design_multicomponent(one, hydrocarbon_thermo)
    no_reflux = hydrocarbons("recovery = { n-butane = { distillate = 0.98 }, n-pentane = { bottoms = 0.95 } }")
    with pytest.raises(SpecError, match="reflux"):
        design_multicomponent(no_reflux, hydrocarbon_thermo)
    factor = design_multicomponent(no_reflux, hydrocarbon_thermo, reflux_factor=1.3)
    assert factor.reflux_ratio == pytest.approx(1.3 * factor.minimum_reflux)
    with pytest.raises(SpecError, match="not more volatile"):
        design_multicomponent(no_reflux, hydrocarbon_thermo, light_key="n-pentane", heavy_key="n-butane", reflux_ratio=3)


def test_binary_fug_beside_mccabe_thiele():
    case = case_from_text("""
title = "benzene-toluene"
[components]
names = ["benzene", "toluene"]
[column]
stages = 20
condenser = "total"
reboiler = "partial"
pressure.top = "101.325 kPa"
[[feeds]]
stage = 8
flow = "100 kmol/h"
composition = { benzene = 0.44, toluene = 0.56 }
vapor_fraction = 0.0
[specs]
reflux_ratio = 3.5
distillate = { benzene = 0.974 }
bottoms = { benzene = 0.0235 }
""")
    thermo = ThermoPackage.from_case(case)
    fug = design_multicomponent(case, thermo)
    mt = design_binary(case, thermo)
    assert fug.x_distillate[0] == pytest.approx(0.974) and fug.x_bottoms[0] == pytest.approx(0.0235)
    # near-ideal and nearly constant alpha: the two shortcuts agree closely on the limits
    assert fug.minimum_equilibrium_stages == pytest.approx(mt.minimum_equilibrium_stages, abs=0.6)
    assert fug.minimum_reflux == pytest.approx(mt.minimum_reflux.ratio, rel=0.05)
    assert abs(fug.stages - mt.stages) <= 2
