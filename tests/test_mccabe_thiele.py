"""McCabe-Thiele design (solver/shortcut/mccabe_thiele.py and the equilibrium_curve, binary_case,
operating_lines, pinches and stepping modules it is built from).

Checks: the stepping against Smoker's analytical solution for constant relative volatility
(Smoker, Trans. AIChE 34 (1938) 165; the closed form is written out below and checked against
plain stepping), the minimum reflux against the closed forms for constant alpha, the minimum
stages against Fenske's equation, a tangent pinch and an azeotrope on ethanol-water (NRTL of
Gmehling, Kolbe, Kleiber & Rarey 2012, Problem P05.01, tau constant), the equilibrium curve
against exact bubble points, the spec handling, and properties by hypothesis.
"""

from __future__ import annotations

import math
import textwrap

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from solver.case import loads_case
from solver.errors import SpecError
from solver.shortcut.mccabe_thiele import (
    EquilibriumCurve,
    design_binary,
    mccabe_thiele,
    minimum_reflux,
    total_reflux_stages,
)
from solver.thermo import flash
from solver.thermo.package import ThermoPackage


def case_from_text(text: str, name: str = "<test case>"):
    """A case from inline TOML (own helper: tests/hard has a conftest of its own that can shadow ours)."""
    return loads_case(textwrap.dedent(text), source_file=name)


ALPHA = 2.5


def smoker_stages(alpha: float, x0: float, xn: float, slope: float, intercept: float) -> float:
    """Smoker (1938): stages from liquid x0 down to liquid xn on the line y = slope x +
    intercept with equilibrium y = alpha x / (1 + (alpha - 1) x). k is the root in (0, 1) of
    slope (alpha - 1) k^2 + (slope + intercept (alpha - 1) - alpha) k + intercept = 0,
    c = 1 + (alpha - 1) k, beta = slope c (alpha - 1) / (alpha - slope c^2), x' = x - k."""
    roots = np.roots([slope * (alpha - 1.0), slope + intercept * (alpha - 1.0) - alpha, intercept])
    k = float(next(r.real for r in roots if abs(r.imag) < 1e-12 and -1e-9 < r.real < 1 + 1e-9))
    c = 1.0 + (alpha - 1.0) * k
    beta = slope * c * (alpha - 1.0) / (alpha - slope * c**2)
    p0, pn = x0 - k, xn - k
    return math.log((p0 * (1 - beta * pn)) / (pn * (1 - beta * p0))) / math.log(alpha / (slope * c**2))


def test_smoker_formula_against_plain_stepping():
    slope, intercept, x0 = 0.7, 0.28, 0.93
    xs = [x0]
    for _ in range(6):
        y = slope * xs[-1] + intercept
        xs.append(y / (ALPHA - (ALPHA - 1.0) * y))
    for n, xn in enumerate(xs[1:], start=1):
        assert abs(smoker_stages(ALPHA, x0, xn, slope, intercept) - n) < 1e-9


SCENARIOS = [
    dict(x_distillate=0.95, x_bottoms=0.05, x_feed=0.45, q=1.0, reflux_ratio=2.0),
    dict(x_distillate=0.98, x_bottoms=0.02, x_feed=0.40, q=0.6, reflux_ratio=3.0),
    dict(x_distillate=0.99, x_bottoms=0.01, x_feed=0.50, q=1.25, reflux_ratio=2.2),
    dict(x_distillate=0.90, x_bottoms=0.10, x_feed=0.30, q=0.0, reflux_ratio=4.5),
    dict(x_distillate=0.995, x_bottoms=0.001, x_feed=0.6, q=1.0, reflux_ratio=1.6),
]


@pytest.mark.parametrize("scenario", SCENARIOS)
def test_stepping_agrees_with_smoker_section_by_section(scenario):
    curve = EquilibriumCurve.constant_alpha(ALPHA)
    design = mccabe_thiele(curve, feed_flow=100.0, **scenario)
    f = design.feed_stage
    x = design.stage_x
    top, bottom = design.rectifying_line, design.stripping_line
    # total condenser: x_1 = x_D; stages 2 .. f-1 pair with the rectifying line, f .. N-1 with the stripping line
    for n in range(2, f + 1):
        assert abs(smoker_stages(ALPHA, x[0], x[n - 1], top.slope, top.intercept) - (n - 1)) < 1e-7
    for n in range(f + 1, design.stages + 1):
        assert abs(smoker_stages(ALPHA, x[f - 1], x[n - 1], bottom.slope, bottom.intercept) - (n - f)) < 1e-7
    # the integer count: Smoker down to x_B on the stripping line falls in the last step
    to_bottoms = smoker_stages(ALPHA, x[f - 1], scenario["x_bottoms"], bottom.slope, bottom.intercept)
    assert math.ceil(to_bottoms - 1e-9) == design.stages - f
    # the optimal feed stage is the step that crosses the intersection of the lines
    x_int = design.intersection[0]
    assert x[f - 1] <= x_int < x[f - 2]


@pytest.mark.parametrize("scenario", SCENARIOS)
def test_operating_lines_and_flows(scenario):
    curve = EquilibriumCurve.constant_alpha(ALPHA)
    design = mccabe_thiele(curve, feed_flow=100.0, **scenario)
    D, B, F, q, R = design.distillate_flow, design.bottoms_flow, design.feed_flow, design.q, design.reflux_ratio
    assert D + B == pytest.approx(F)
    assert D * design.x_distillate + B * design.x_bottoms == pytest.approx(F * design.x_feed)
    L, V = R * D, (R + 1) * D
    assert design.rectifying_line.slope == pytest.approx(L / V)
    assert design.stripping_line.slope == pytest.approx((L + q * F) / (V - (1 - q) * F))
    assert design.stripping_line(design.x_bottoms) == pytest.approx(design.x_bottoms, abs=1e-14)
    assert design.rectifying_line(design.x_distillate) == pytest.approx(design.x_distillate, abs=1e-14)
    # the intersection lies on the q-line q x + (1 - q) y = x_F
    xi, yi = design.intersection
    assert q * xi + (1 - q) * yi == pytest.approx(design.x_feed, abs=1e-12)
    # stage flows (traystack conventions) and the component balance of every section
    f, N = design.feed_stage, design.stages
    Lx, Vy = design.liquid_flow, design.vapor_flow
    assert Lx[0] == pytest.approx(L) and Vy[0] == 0.0 and Lx[-1] == pytest.approx(B)
    for n in range(1, N):  # liquid of stage n meets vapor of stage n+1
        if n < f:
            assert Vy[n] * design.stage_y[n] - Lx[n - 1] * design.stage_x[n - 1] == pytest.approx(D * design.x_distillate)
        else:
            assert Lx[n - 1] * design.stage_x[n - 1] - Vy[n] * design.stage_y[n] == pytest.approx(B * design.x_bottoms)
    # equilibrium on every stage below the total condenser
    np.testing.assert_allclose(design.stage_y[1:], curve.y_of_x(design.stage_x[1:]), rtol=1e-12)
    assert design.stages >= math.ceil(design.minimum_stages - 1e-9)
    assert design.stages - 1 < design.fractional_stages <= design.stages
    assert design.equilibrium_stages == pytest.approx(design.fractional_stages - 1)


def underwood_binary_minimum_reflux(alpha, x_D, z):
    """Saturated-liquid feed, constant alpha: R_min = [x_D/z - alpha (1 - x_D)/(1 - z)] / (alpha - 1)
    (the binary form of Underwood's equations, e.g. King, Separation Processes, 2nd ed., 1980;
    from memory, and equal to the feed-pinch line through (x_D, x_D) and (z, y*(z)))."""
    return (x_D / z - alpha * (1 - x_D) / (1 - z)) / (alpha - 1)


@given(
    alpha=st.floats(1.2, 6.0),
    z=st.floats(0.1, 0.9),
    x_D=st.floats(0.9, 0.999),
    q=st.floats(-0.3, 1.5),
)
@settings(max_examples=60, deadline=None)
def test_minimum_reflux_feed_pinch_closed_form(alpha, z, x_D, q):
    x_D = max(x_D, z + 0.05)
    if x_D >= 0.9995:
        return
    x_B = z / 10
    curve = EquilibriumCurve.constant_alpha(alpha)
    pinch = minimum_reflux(curve, x_D, x_B, z, q)
    # the q-line meets y = alpha x / (1 + (alpha - 1) x): q x + (1 - q) y = z, a quadratic in x
    if abs(q - 1) < 1e-12:
        x_p = z
    else:
        a = q * (alpha - 1)
        b = q + (1 - q) * alpha - z * (alpha - 1)
        roots = np.roots([a, b, -z]) if abs(a) > 1e-14 else np.array([z / b])
        x_p = float(next(r.real for r in np.atleast_1d(roots) if abs(r.imag) < 1e-12 and -1e-12 <= r.real <= 1 + 1e-12))
    y_p = alpha * x_p / (1 + (alpha - 1) * x_p)
    expected = max((x_D - y_p) / (y_p - x_p), 0.0)
    # a convex curve: no tangent pinch, the feed pinch is the minimum
    assert pinch.pinch == "feed"
    assert pinch.ratio == pytest.approx(expected, rel=1e-9, abs=1e-12)
    if abs(q - 1) < 1e-12:
        assert pinch.ratio == pytest.approx(underwood_binary_minimum_reflux(alpha, x_D, z), rel=1e-9)


def test_minimum_stages_is_fenske_for_constant_alpha():
    for alpha, x_D, x_B in ((2.5, 0.95, 0.05), (1.5, 0.99, 0.01), (4.0, 0.999, 0.002)):
        curve = EquilibriumCurve.constant_alpha(alpha)
        fenske = math.log((x_D / (1 - x_D)) * ((1 - x_B) / x_B)) / math.log(alpha)
        stepped = total_reflux_stages(curve, x_D, x_B, "total") - 1.0  # leave out the total condenser
        assert math.ceil(stepped - 1e-9) == math.ceil(fenske - 1e-9)
        assert abs(stepped - fenske) < 1.0
        # partial condenser: one equilibrium stage more at the top, same equilibrium count
        assert total_reflux_stages(curve, x_D, x_B, "partial") == pytest.approx(stepped)


@given(
    alpha=st.floats(1.3, 5.0),
    z=st.floats(0.2, 0.8),
    q=st.floats(0.0, 1.3),
    factor=st.floats(1.05, 3.0),
    extra=st.floats(0.05, 2.0),
)

@settings(max_examples=40, deadline=None)
def test_more_reflux_never_needs_more_stages(alpha, z, q, factor, extra):
    curve = EquilibriumCurve.constant_alpha(alpha)
    x_D, x_B = 0.97, 0.03
    R_min = minimum_reflux(curve, x_D, x_B, z, q).ratio
    low = mccabe_thiele(curve, x_distillate=x_D, x_bottoms=x_B, x_feed=z, q=q, reflux_ratio=max(factor * R_min, 0.05))
    high = mccabe_thiele(curve, x_distillate=x_D, x_bottoms=x_B, x_feed=z, q=q, reflux_ratio=max(factor * R_min, 0.05) + extra)
    assert high.fractional_stages <= low.fractional_stages + 1e-9
    assert high.stages <= low.stages
    assert low.fractional_stages >= low.minimum_stages - 1e-9


def test_reflux_at_or_below_minimum_is_a_spec_error():
    curve = EquilibriumCurve.constant_alpha(ALPHA)
    R_min = minimum_reflux(curve, 0.95, 0.05, 0.5, 1.0).ratio
    with pytest.raises(SpecError, match="minimum reflux ratio"):
        mccabe_thiele(curve, x_distillate=0.95, x_bottoms=0.05, x_feed=0.5, q=1.0, reflux_ratio=0.999 * R_min)
    close = mccabe_thiele(curve, x_distillate=0.95, x_bottoms=0.05, x_feed=0.5, q=1.0, reflux_ratio=1.01 * R_min)
    assert close.stages > 25  # near the pinch the count grows


def test_given_feed_stage():
    curve = EquilibriumCurve.constant_alpha(ALPHA)
    kwargs = dict(x_distillate=0.98, x_bottoms=0.02, x_feed=0.5, q=1.0, reflux_ratio=3.0)
    best = mccabe_thiele(curve, **kwargs)
    same = mccabe_thiele(curve, feed_stage=best.optimal_feed_stage, **kwargs)
    assert same.stages == best.stages and same.fractional_stages == pytest.approx(best.fractional_stages)
    for offset in (-1, 1, 2):
        other = mccabe_thiele(curve, feed_stage=best.optimal_feed_stage + offset, **kwargs)
        assert other.feed_stage == best.optimal_feed_stage + offset
        assert other.optimal_feed_stage == best.optimal_feed_stage
        assert other.fractional_stages >= best.fractional_stages - 1e-12
    with pytest.raises(SpecError, match="feed on stage 300"):  # the rectifying line pinches below the feed
        mccabe_thiele(curve, feed_stage=300, **kwargs)
    # a feed stage further down than the rectifying line needs to reach x_B
    easy = dict(kwargs, x_bottoms=0.3, x_feed=0.6)
    with pytest.raises(SpecError, match="below the bottom of the column"):
        mccabe_thiele(curve, feed_stage=40, **easy)
    with pytest.raises(SpecError, match="feed on stage 3"):  # the stripping line crosses the curve above the feed
        mccabe_thiele(curve, feed_stage=3, **dict(kwargs, reflux_ratio=1.6))


def test_partial_condenser_is_an_equilibrium_stage():
    curve = EquilibriumCurve.constant_alpha(ALPHA)
    kwargs = dict(x_distillate=0.97, x_bottoms=0.03, x_feed=0.5, q=1.0, reflux_ratio=2.5)
    total = mccabe_thiele(curve, condenser="total", **kwargs)
    partial = mccabe_thiele(curve, condenser="partial", **kwargs)
    assert partial.stage_y[0] == pytest.approx(0.97)
    assert partial.stage_y[0] == pytest.approx(float(curve.y_of_x(partial.stage_x[0])), rel=1e-12)
    assert partial.vapor_flow[0] == pytest.approx(partial.distillate_flow)
    # same equilibrium stepping: the partial condenser takes the total condenser's first tray
    assert partial.equilibrium_stages == pytest.approx(total.equilibrium_stages)
    assert partial.stages == total.stages - 1


def test_staircase_vertices():
    curve = EquilibriumCurve.constant_alpha(ALPHA)
    design = mccabe_thiele(curve, x_distillate=0.95, x_bottoms=0.05, x_feed=0.5, q=1.0, reflux_ratio=2.0)
    stairs = design.staircase
    assert tuple(stairs[0]) == (0.95, 0.95)
    corners = stairs[1::2]  # on the equilibrium curve
    np.testing.assert_allclose(corners[:, 1], curve.y_of_x(corners[:, 0]), rtol=1e-12)
    assert corners.shape[0] == design.stages - 1  # the equilibrium stages (no total condenser)


# ------------------------------------------------------------------ on the case's thermo

BINARY = """
title = "{title}"
[components]
names = ["{first}", "{second}"]
[thermo]
liquid = "{liquid}"
enthalpy = "{enthalpy}"
{pairs}
[column]
stages = 20
condenser = "{condenser}"
reboiler = "partial"
pressure.top = "101.325 kPa"
[[feeds]]
stage = 8
flow = "100 kmol/h"
composition = {{ {first} = {z}, {second} = {one_minus_z} }}
{feed_condition}
[specs]
{specs}
"""

ETHANOL_WATER_NRTL = """[thermo.nrtl.ethanol.water]
constant_term = [-0.178, 1.963]
alpha = 0.2974
source = "Gmehling, Kolbe, Kleiber & Rarey 2012, Problem P05.01 (70 degC, tau constant)"
"""


def binary_case(*, first="benzene", second="toluene", liquid="ideal", pairs="", z=0.4, specs="", enthalpy="rigorous",
                condenser="total", feed_condition="vapor_fraction = 0.0"):
    return case_from_text(
        BINARY.format(title=f"{first}-{second}", first=first, second=second, liquid=liquid, pairs=pairs, z=z,
                      one_minus_z=round(1 - z, 12), specs=specs, enthalpy=enthalpy, condenser=condenser,
                      feed_condition=feed_condition)
    )


@pytest.fixture(scope="module")
def benzene_toluene():
    case = binary_case(specs="reflux_ratio = 3.0\ndistillate = { benzene = 0.97 }\nbottoms = { toluene = 0.98 }")
    return case, ThermoPackage.from_case(case)


@pytest.fixture(scope="module")
def ethanol_water():
    case = binary_case(first="ethanol", second="water", liquid="nrtl", pairs=ETHANOL_WATER_NRTL, z=0.1,
                       specs="distillate = { ethanol = 0.85 }\nbottoms = { water = 0.999 }")
    return case, ThermoPackage.from_case(case)


def test_curve_matches_exact_bubble_points(benzene_toluene, ethanol_water):
    for case, thermo in (benzene_toluene, ethanol_water):
        design_curve = EquilibriumCurve.from_thermo(thermo, 101325.0, 0)
        x = np.array([1e-5, 0.003, 0.07, 0.31, 0.5, 0.77, 0.86, 0.93, 0.999])
        T, y = flash.bubble_temperature(thermo, np.full(x.size, 101325.0), np.c_[x, 1 - x])
        np.testing.assert_allclose(design_curve.y_of_x(x), y[:, 0], atol=2e-9)
        np.testing.assert_allclose(design_curve.temperature_of_x(x), T, atol=1e-6)
        np.testing.assert_allclose(design_curve.x_of_y(y[:, 0]), x, atol=2e-9)


def test_benzene_toluene_design(benzene_toluene):
    case, thermo = benzene_toluene
    design = design_binary(case, thermo)
    assert design.light == "benzene" and design.q == pytest.approx(1.0, abs=1e-9)
    assert design.x_distillate == pytest.approx(0.97) and design.x_bottoms == pytest.approx(0.02)
    assert design.curve.azeotropes == ()
    assert design.minimum_reflux.pinch == "feed"
    assert design.pressure == pytest.approx(np.mean(case.column.pressures))
    # temperatures: distillate near benzene's boiling point, bottoms near toluene's
    assert 353.0 < design.stage_temperature[0] < 355.0 < 380.0 < design.stage_temperature[-1] < 384.0
    # CMO duties with the products' latent heats (about 31 and 33 kJ/mol at the boiling points)
    V, V_strip = design.vapor_flow[1], design.vapor_flow[-1]
    assert -design.condenser_duty / V == pytest.approx(31e3, rel=0.05)
    assert design.reboiler_duty / V_strip == pytest.approx(33e3, rel=0.05)


def test_cmo_duties_close_the_energy_balance():
    case = binary_case(enthalpy="cmo", feed_condition='temperature = "300 K"',
                       specs="reflux_ratio = 2.5\ndistillate = { benzene = 0.95 }\nbottoms = { benzene = 0.04 }")
    design = design_binary(case)
    latent = ThermoPackage.from_case(case).cmo_latent_heat
    assert design.q > 1.0  # subcooled feed
    feed_enthalpy = (1 - design.q) * latent  # the cmo model's feed enthalpy; products are liquids at h = 0
    assert design.feed_flow * feed_enthalpy + design.condenser_duty + design.reboiler_duty == pytest.approx(0.0, abs=1e-6 * latent)


def test_tangent_pinch_on_ethanol_water(ethanol_water):
    case, thermo = ethanol_water
    design = design_binary(case, thermo, reflux_factor=1.3)
    pinch = design.minimum_reflux
    assert design.light == "ethanol"
    assert pinch.pinch == "tangent" and pinch.section == "rectifying"
    assert pinch.x > 0.5  # the tangent touches near the azeotrope, far above the feed (x_F = 0.1)
    assert pinch.ratio > 1.2 * pinch.feed_pinch_ratio
    assert design.reflux_ratio == pytest.approx(1.3 * pinch.ratio)
    curve, x_D = design.curve, design.x_distillate
    x = np.linspace(pinch.feed_pinch_x, x_D, 20001)[:-1]

    def gap(R):
        line = (R * x + x_D) / (R + 1)
        return curve.y_of_x(x) - line

    # at R_min the rectifying line touches the curve at the pinch and stays below it elsewhere
    assert gap(pinch.ratio).min() > -1e-9
    assert abs(float(curve.y_of_x(pinch.x)) - (pinch.ratio * pinch.x + x_D) / (pinch.ratio + 1)) < 1e-10
    # a reflux between the feed-pinch value and R_min crosses the curve: the feed pinch alone misleads
    between = 0.5 * (pinch.feed_pinch_ratio + pinch.ratio)
    assert gap(between).min() < -1e-4
    with pytest.raises(SpecError, match="minimum reflux"):
        design_binary(case, thermo, reflux_ratio=between)


def test_purity_beyond_the_azeotrope_is_a_spec_error(ethanol_water):
    _, thermo = ethanol_water
    case = binary_case(first="ethanol", second="water", liquid="nrtl", pairs=ETHANOL_WATER_NRTL, z=0.1,
                       specs="reflux_ratio = 5\ndistillate = { ethanol = 0.92 }\nbottoms = { water = 0.999 }")
    with pytest.raises(SpecError) as error:
        design_binary(case, thermo)
    message = str(error.value)
    assert "azeotrope" in message and "0.92" in message
    curve = EquilibriumCurve.from_thermo(thermo, 101325.0, 0)
    (azeotrope,) = curve.azeotropes
    assert f"{azeotrope.x:.4f}" in message and f"{azeotrope.temperature:.2f} K" in message
    assert azeotrope.boiling == "minimum"
    assert 0.88 < azeotrope.x < 0.92 and 351.0 < azeotrope.temperature < 351.9


def test_feed_beyond_the_azeotrope_makes_water_the_light_component(ethanol_water):
    _, thermo = ethanol_water
    case = binary_case(first="ethanol", second="water", liquid="nrtl", pairs=ETHANOL_WATER_NRTL, z=0.96,
                       specs="reflux_ratio = 25\ndistillate = { ethanol = 0.92 }\nbottoms = { ethanol = 0.995 }")
    design = design_binary(case, thermo)
    assert design.light == "water" and design.heavy == "ethanol"
    assert design.x_feed == pytest.approx(0.04)
    assert design.x_distillate == pytest.approx(0.08) and design.x_bottoms == pytest.approx(0.005)


def test_specs_that_do_not_fix_the_design(benzene_toluene):
    _, thermo = benzene_toluene
    two = binary_case(specs="reflux_ratio = 1.4\nbottoms = { toluene = 0.995 }")
    with pytest.raises(SpecError, match="product purity, recovery or product rate"):
        design_binary(two, thermo)
    no_reflux = binary_case(specs="distillate = { benzene = 0.97 }\nbottoms = { toluene = 0.98 }")
    with pytest.raises(SpecError, match="a reflux"):
        design_binary(no_reflux, thermo)
    too_many = binary_case(specs='reflux_ratio = 2\ndistillate = { benzene = 0.97 }\nbottoms = { toluene = 0.98 }\ndistillate_rate = "40 kmol/h"')
    with pytest.raises(SpecError, match="remove one"):
        design_binary(too_many, thermo)
    same_twice = binary_case(specs='reflux_ratio = 2\ndistillate_rate = "40 kmol/h"\nbottoms_rate = "60 kmol/h"')
    with pytest.raises(SpecError, match="say the same thing"):
        design_binary(same_twice, thermo)
    # the reflux given here completes it
    design = design_binary(no_reflux, thermo, reflux_ratio=2.0)
    assert design.reflux_ratio == 2.0


def test_recoveries_rates_and_boilup(benzene_toluene):
    _, thermo = benzene_toluene
    F = 100e3 / 3600
    case = binary_case(specs='boilup_ratio = 2.5\nrecovery = { benzene = { distillate = 0.98 } }\ndistillate_rate = "40 kmol/h"')
    design = design_binary(case, thermo)
    assert design.distillate_flow == pytest.approx(40e3 / 3600)
    assert design.distillate_flow * design.x_distillate == pytest.approx(0.98 * 0.4 * F)
    assert design.boilup_ratio == pytest.approx(2.5)
    # one product spec with reflux and boilup: the CMO balances fix the overhead rate
    both = binary_case(specs="reflux_ratio = 3.0\nboilup_ratio = 2.7\nbottoms = { benzene = 0.02 }")
    design = design_binary(both, thermo)
    assert design.reflux_ratio == pytest.approx(3.0) and design.boilup_ratio == pytest.approx(2.7)
    assert design.x_bottoms == pytest.approx(0.02)
    assert design.distillate_flow == pytest.approx(2.7 * F / 6.7)  # 4 D = 2.7 (F - D) for a saturated-liquid feed
    # the same with a boilup of 2.0 asks for more benzene overhead than the feed has
    with pytest.raises(SpecError, match="x_D = 1.16"):
        design_binary(binary_case(specs="reflux_ratio = 3.0\nboilup_ratio = 2.0\nbottoms = { benzene = 0.02 }"), thermo)
    # a condenser duty gives the top vapor through the distillate's latent heat
    duty = binary_case(specs='condenser_duty = "-1.2 MW"\ndistillate = { benzene = 0.97 }\nbottoms = { toluene = 0.98 }')
    design = design_binary(duty, thermo)
    assert design.condenser_duty == pytest.approx(-1.2e6, rel=1e-6)


def test_not_a_simple_binary_column(benzene_toluene):
    case = case_from_text("""
title = "ternary"
[components]
names = ["benzene", "toluene", "o-xylene"]
[column]
stages = 10
condenser = "total"
reboiler = "partial"
pressure.top = "1 atm"
[[feeds]]
stage = 5
flow = "10 mol/s"
composition = { benzene = 0.3, toluene = 0.3, o-xylene = 0.4 }
vapor_fraction = 0
[specs]
reflux_ratio = 2
distillate_rate = "3 mol/s"
""")
    with pytest.raises(SpecError, match="binaries"):
        design_binary(case)


def test_stripping_side_tangent_pinch():
    """A curve that bends toward the diagonal below the feed (an invented table with alpha dipping
    to 1.5 at x = 0.35): the stripping line from (x_B, x_B), not the feed, sets the minimum reflux."""
    x = np.linspace(0.0, 1.0, 801)
    alpha = 2.5 - 1.0 * np.exp(-(((x - 0.35) / 0.15) ** 2))
    curve = EquilibriumCurve.from_points(x, alpha * x / (1 + (alpha - 1) * x))
    x_D, x_B, z, q = 0.95, 0.02, 0.5, 1.0
    pinch = minimum_reflux(curve, x_D, x_B, z, q)
    assert pinch.pinch == "tangent" and pinch.section == "stripping"
    assert 0.2 < pinch.x < 0.45 and pinch.ratio > pinch.feed_pinch_ratio
    F, D = 1.0, (z - x_B) / (x_D - x_B)
    B = F - D

    def stripping_gap(R):
        L_strip, V_strip = R * D + q * F, (R + 1) * D - (1 - q) * F
        grid = np.linspace(x_B, pinch.feed_pinch_x, 4001)[1:]
        return curve.y_of_x(grid) - (L_strip / V_strip * grid - B * x_B / V_strip)

    assert stripping_gap(pinch.ratio).min() > -1e-9
    assert stripping_gap(0.5 * (pinch.ratio + pinch.feed_pinch_ratio)).min() < -1e-5
    design = mccabe_thiele(curve, x_distillate=x_D, x_bottoms=x_B, x_feed=z, q=q, reflux_ratio=1.05 * pinch.ratio)
    assert design.stages > design.minimum_stages
    with pytest.raises(SpecError, match="minimum reflux"):
        mccabe_thiele(curve, x_distillate=x_D, x_bottoms=x_B, x_feed=z, q=q, reflux_ratio=0.99 * pinch.ratio)
