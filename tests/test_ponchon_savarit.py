"""Ponchon-Savarit design (solver/shortcut/ponchon_savarit.py, enthalpy_diagram.py,
enthalpy_pinches.py).

Checks: with equal molar latent heats and no sensible heat the construction is McCabe-Thiele's
(stage by stage); the lever-rule flows close every stage's component and energy balance and the
overall energy balance closes with the duties; real enthalpies (methanol-water) move the internal
flows off constant molar overflow; subcooled reflux raises the condenser duty and the internal
reflux; the minimum reflux is a true bound; more reflux never needs more stages (hypothesis).
"""

from __future__ import annotations

import textwrap
import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from solver.case import loads_case
from solver.errors import SpecError
from solver.shortcut.mccabe_thiele import EquilibriumCurve, design_binary, mccabe_thiele
from solver.shortcut.ponchon_savarit import (
    SaturatedEnthalpies,
    design_ponchon_savarit,
    enthalpy_minimum_reflux,
    ponchon_savarit,
)
from solver.thermo.package import ThermoPackage


def case_from_text(text: str, name: str = "<test case>"):
    """A case from inline TOML (own helper: tests/hard has a conftest of its own that can shadow ours)."""
    return loads_case(textwrap.dedent(text), source_file=name)


LATENT = 30e3  # J/mol, an invented constant latent heat


@pytest.mark.parametrize(
    "x_D, x_B, z, q, R, condenser",
    [
        (0.95, 0.05, 0.45, 1.0, 2.0, "total"),
        (0.98, 0.02, 0.40, 0.5, 3.0, "total"),
        (0.99, 0.01, 0.50, 1.3, 2.0, "total"),
        (0.97, 0.03, 0.50, 1.0, 2.5, "partial"),
    ],
)

def test_constant_latent_heat_is_mccabe_thiele(x_D, x_B, z, q, R, condenser):
    curve = EquilibriumCurve.constant_alpha(2.5)
    enthalpies = SaturatedEnthalpies.constant_latent_heat(curve, LATENT)
    common = dict(x_distillate=x_D, x_bottoms=x_B, x_feed=z, reflux_ratio=R, feed_flow=10.0, condenser=condenser)
    ps = ponchon_savarit(curve, enthalpies, feed_enthalpy=(1 - q) * LATENT, **common)
    mt = mccabe_thiele(curve, q=q, latent_heat=lambda x: LATENT, **common)
    assert ps.stages == mt.stages and ps.feed_stage == mt.feed_stage
    assert ps.fractional_stages == pytest.approx(mt.fractional_stages, abs=1e-9)
    np.testing.assert_allclose(ps.stage_x, mt.stage_x, atol=1e-10)
    np.testing.assert_allclose(ps.liquid_flow, mt.liquid_flow, rtol=1e-9)
    np.testing.assert_allclose(ps.vapor_flow, mt.vapor_flow, rtol=1e-9)
    assert ps.minimum_reflux.ratio == pytest.approx(mt.minimum_reflux.ratio, rel=1e-7)
    assert ps.condenser_duty == pytest.approx(mt.condenser_duty, rel=1e-9)
    assert ps.reboiler_duty == pytest.approx(mt.reboiler_duty, rel=1e-9)
    assert ps.q == pytest.approx(q, abs=1e-12)
    assert ps.intersection[0] == pytest.approx(mt.intersection[0], abs=1e-10)


# ------------------------------------------------------------------ methanol-water, real enthalpies

CASE = """
title = "methanol-water shortcut test"
[components]
names = ["methanol", "water"]
[thermo]
liquid = "nrtl"
enthalpy = "{enthalpy}"
[thermo.nrtl.methanol.water]
dg = ["-253.88 cal/mol", "845.21 cal/mol"]
alpha = 0.2994
source = "Smith, Van Ness & Abbott, 7th ed., Table 12.5 (DECHEMA recommended values)"
[column]
stages = 20
condenser = "{condenser}"
reboiler = "partial"
pressure.top = "101.325 kPa"
[[feeds]]
stage = 8
flow = "100 kmol/h"
composition = {{ methanol = 0.35, water = 0.65 }}
temperature = "{feed_temperature}"
[specs]
reflux_ratio = {reflux_ratio}
distillate = {{ methanol = 0.98 }}
bottoms = {{ water = 0.995 }}
{extra}
"""


def methanol_water(*, enthalpy="rigorous", condenser="total", reflux_ratio=1.5, feed_temperature="65 degC", extra=""):
    return case_from_text(CASE.format(enthalpy=enthalpy, condenser=condenser, reflux_ratio=reflux_ratio,
                                      feed_temperature=feed_temperature, extra=extra))


@pytest.fixture(scope="module")
def thermo():
    return ThermoPackage.from_case(methanol_water())


@pytest.fixture(scope="module")
def design(thermo):
    return design_ponchon_savarit(methanol_water(), thermo)


def test_every_stage_balances(design):
    e = design.enthalpy
    D, B, F = design.distillate_flow, design.bottoms_flow, design.feed_flow
    x_D, x_B = design.x_distillate, design.x_bottoms
    (_, h_top), (_, h_bottom) = e.top_difference_point, e.bottom_difference_point
    L, V, x, y = design.liquid_flow, design.vapor_flow, design.stage_x, design.stage_y
    h, H = e.stage_liquid_enthalpy, e.stage_vapor_enthalpy
    f, N = design.feed_stage, design.stages
    scale = F * 40e3
    for n in range(1, N):  # liquid of stage n (index n-1) meets vapor of stage n+1 (index n)
        if n < f:
            assert V[n] - L[n - 1] == pytest.approx(D, rel=1e-9)
            assert V[n] * y[n] - L[n - 1] * x[n - 1] == pytest.approx(D * x_D, rel=1e-8)
            assert V[n] * H[n] - L[n - 1] * h[n - 1] == pytest.approx(D * h_top, abs=1e-8 * scale)
        else:
            assert L[n - 1] - V[n] == pytest.approx(B, rel=1e-9)
            assert L[n - 1] * x[n - 1] - V[n] * y[n] == pytest.approx(B * x_B, rel=1e-8)
            assert L[n - 1] * h[n - 1] - V[n] * H[n] == pytest.approx(B * h_bottom, abs=1e-8 * scale)
    # the overall energy balance with the duties (heat added)
    closure = F * e.feed_enthalpy + design.condenser_duty + design.reboiler_duty - D * e.distillate_enthalpy - B * e.bottoms_enthalpy
    assert abs(closure) < 1e-9 * scale
    # the condenser: the vapor from stage 2 leaves as reflux and distillate
    assert V[1] * H[1] + design.condenser_duty == pytest.approx((L[0] + D) * e.reflux_enthalpy, abs=1e-8 * scale)
    # the feed point lies on the line between the difference points
    t = (design.x_feed - x_D) / (x_B - x_D)
    assert h_top + t * (h_bottom - h_top) == pytest.approx(e.feed_enthalpy, abs=1e-6 * 40e3)


def test_real_enthalpies_move_the_flows_off_cmo(design, thermo):
    assert design.method == "Ponchon-Savarit" and design.rectifying_line is None
    f = design.feed_stage
    rectifying_liquid = design.liquid_flow[: f - 1]
    stripping_vapor = design.vapor_flow[f:]
    # methanol's molar latent heat is smaller than water's: the flows fall toward the top
    assert np.ptp(rectifying_liquid) / rectifying_liquid.mean() > 0.02
    assert np.ptp(stripping_vapor) / stripping_vapor.mean() > 0.02
    # more moles boil per joule where the liquid is richer in methanol: the vapor grows upwards in each section
    assert np.all(np.diff(design.vapor_flow[1:f]) < 0) and np.all(np.diff(design.vapor_flow[f:]) < 0)
    mt = design_binary(methanol_water(), thermo)
    assert mt.stages != design.stages or abs(mt.fractional_stages - design.fractional_stages) > 0.2
    assert abs(mt.minimum_reflux.ratio - design.minimum_reflux.ratio) > 0.01


def test_cmo_enthalpies_reproduce_mccabe_thiele_on_a_case(thermo):
    case = methanol_water()
    ps = design_ponchon_savarit(case, thermo, enthalpy_model="cmo")
    mt = design_binary(case, thermo)
    assert ps.stages == mt.stages and ps.feed_stage == mt.feed_stage
    assert ps.fractional_stages == pytest.approx(mt.fractional_stages, abs=1e-8)
    assert ps.minimum_reflux.ratio == pytest.approx(mt.minimum_reflux.ratio, rel=1e-6)
    assert ps.q == pytest.approx(mt.q, abs=1e-9)


def test_minimum_reflux_is_a_bound(design, thermo):
    case = methanol_water()
    R_min = design.minimum_reflux.ratio
    near = design_ponchon_savarit(case, thermo, reflux_ratio=1.01 * R_min)
    assert near.stages > design.stages
    with pytest.raises(SpecError, match="minimum reflux"):
        design_ponchon_savarit(case, thermo, reflux_ratio=0.99 * R_min)
    # at the minimum the top difference point is the highest tie-line extension
    e = design.enthalpy
    assert e.top_difference_point[1] > e.minimum_top_difference_enthalpy
    factor = design_ponchon_savarit(case, thermo, reflux_factor=1.5)
    assert factor.reflux_ratio == pytest.approx(1.5 * R_min, rel=1e-9)


def test_subcooled_reflux(thermo):
    saturated = design_ponchon_savarit(methanol_water(), thermo)
    cold = design_ponchon_savarit(methanol_water(extra="reflux_subcooling = \"20 K\""), thermo)
    assert cold.enthalpy.reflux_enthalpy < saturated.enthalpy.reflux_enthalpy
    assert cold.condenser_duty < saturated.condenser_duty  # more heat taken out
    # the cold reflux condenses vapor on the top tray: more liquid inside than the reflux itself
    assert cold.liquid_flow[1] > 1.05 * cold.liquid_flow[0]
    assert cold.fractional_stages < saturated.fractional_stages
    mt = design_binary(methanol_water(extra="reflux_subcooling = \"20 K\""), thermo)
    assert any("subcooled reflux" in note for note in mt.notes)


def test_partial_condenser(thermo):
    design = design_ponchon_savarit(methanol_water(condenser="partial"), thermo)
    assert design.stage_y[0] == pytest.approx(0.98)
    assert design.vapor_flow[0] == pytest.approx(design.distillate_flow)
    assert design.enthalpy.distillate_enthalpy == pytest.approx(float(design.enthalpy.saturated.vapor_of_y(0.98)))


@given(a=st.floats(-0.3, 0.3), factor=st.floats(1.05, 2.5), extra=st.floats(0.1, 2.0), q=st.floats(0.2, 1.2))
@settings(max_examples=30, deadline=None)
def test_more_reflux_never_needs_more_stages(a, factor, extra, q):
    curve = EquilibriumCurve.constant_alpha(2.2)
    enthalpies = SaturatedEnthalpies.from_arrays(curve, 2e3 * curve.x, LATENT * (1.0 + a * curve.y))
    h_F = float(enthalpies.liquid_of_x(0.5)) + (1 - q) * (float(enthalpies.vapor_of_y(0.5)) - float(enthalpies.liquid_of_x(0.5)))
    common = dict(x_distillate=0.96, x_bottoms=0.04, x_feed=0.5, feed_enthalpy=h_F)
    pinch, _ = enthalpy_minimum_reflux(curve, enthalpies, **common)
    low = ponchon_savarit(curve, enthalpies, reflux_ratio=factor * pinch.ratio, **common)
    high = ponchon_savarit(curve, enthalpies, reflux_ratio=factor * pinch.ratio + extra, **common)
    assert high.fractional_stages <= low.fractional_stages + 1e-9
    assert low.fractional_stages >= low.minimum_stages - 1e-9
    assert low.reboiler_duty > 0 > low.condenser_duty


def test_tangent_pinch_with_real_enthalpies_on_ethanol_water():
    case = case_from_text("""
title = "ethanol-water near the azeotrope"
[components]
names = ["ethanol", "water"]
[thermo]
liquid = "nrtl"
[thermo.nrtl.ethanol.water]
constant_term = [-0.178, 1.963]
alpha = 0.2974
source = "Gmehling, Kolbe, Kleiber & Rarey 2012, Problem P05.01 (70 degC, tau constant)"
[column]
stages = 30
condenser = "total"
reboiler = "partial"
pressure.top = "101.325 kPa"
[[feeds]]
stage = 20
flow = "100 kmol/h"
composition = { ethanol = 0.1, water = 0.9 }
vapor_fraction = 0.0
[specs]
distillate = { ethanol = 0.85 }
bottoms = { water = 0.999 }
""")
    design = design_ponchon_savarit(case, reflux_factor=1.2)
    pinch = design.minimum_reflux
    assert pinch.pinch == "tangent" and pinch.section == "rectifying" and pinch.x > 0.5
    assert pinch.ratio > 1.2 * pinch.feed_pinch_ratio
    # the tie line at the pinch, extended to x_D, reaches the top difference point at minimum reflux
    e = design.enthalpy
    s = float(e.saturated.tie_line_slope(pinch.x))
    extended = float(e.saturated.liquid_of_x(pinch.x)) + s * (design.x_distillate - pinch.x)
    assert extended == pytest.approx(e.minimum_top_difference_enthalpy, rel=1e-9)
