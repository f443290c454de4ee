"""The bridge to the operating-line method.

With equal molar latent heats and no sensible heat (``enthalpy = "cmo"``) and a binary of
constant relative volatility, the rigorous MESH solution must be exactly the McCabe-Thiele
construction (McCabe & Thiele, Ind. Eng. Chem. 17 (1925) 605):

* constant molar overflow in each section, the stripping section's flows changed by the feed's
  thermal condition: ``L' = L + qF``, ``V' = V - (1 - q)F``;
* the points ``(x_n, y_n+1)`` on the straight operating lines
  ``y = (L/V) x + (D/V) x_D`` (rectifying) and ``y = (L'/V') x - (B/V') x_B`` (stripping, a
  line through ``(x_B, x_B)``);
* the stage count: stepping from ``x_D`` between the equilibrium curve
  ``y = alpha x / (1 + (alpha - 1) x)`` and the operating lines reaches the rigorous ``x_B``
  after exactly the column's stages, and the analytical solution of Smoker (Trans. AIChE 34
  (1938) 165) gives the same integer counts per section.

Smoker's equation as used here (written from memory, and checked below against exact stepping
so that a mistake in it would fail the test): for an operating line ``y = m x + b`` and
equilibrium ``y = alpha x / (1 + (alpha - 1) x)``, let ``k`` be the root in (0, 1) of
``m (alpha - 1) k^2 + (m + b (alpha - 1) - alpha) k + b = 0``, ``c = 1 + (alpha - 1) k`` and
``beta = m c (alpha - 1) / (alpha - m c^2)``; then the number of stages from liquid ``x_0``
down to liquid ``x_n`` is
``n = ln[(x_0' (1 - beta x_n')) / (x_n' (1 - beta x_0'))] / ln(alpha / (m c^2))`` with
``x' = x - k``.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from conftest import case_from_text
from solver.engine import simulate

ALPHA = 2.5  # 10 ** (A_light - A_heavy) with equal B and C

CASE = """
title = "constant relative volatility binary (test)"
[components]
names = ["light", "heavy"]
[components.data.light]
molar_mass = "0.08 kg/mol"
critical_temperature = "600 K"
critical_pressure = "4 MPa"
vapor_pressure = {{ form = "antoine", A = {a_light}, B = 1400.0, C = -50.0, base = 10, pressure_unit = "Pa", temperature_unit = "K" }}
ideal_gas_cp = {{ form = "constant", value = "120 J/mol/K" }}
heat_of_vaporization = {{ form = "watson", value = "32 kJ/mol", at = "350 K" }}
source = "invented test component"
[components.data.heavy]
molar_mass = "0.09 kg/mol"
critical_temperature = "620 K"
critical_pressure = "3.8 MPa"
vapor_pressure = {{ form = "antoine", A = 9.2, B = 1400.0, C = -50.0, base = 10, pressure_unit = "Pa", temperature_unit = "K" }}
ideal_gas_cp = {{ form = "constant", value = "140 J/mol/K" }}
heat_of_vaporization = {{ form = "watson", value = "36 kJ/mol", at = "370 K" }}
source = "invented test component"
[thermo]
liquid = "ideal"
enthalpy = "cmo"
[column]
stages = {stages}
condenser = "total"
reboiler = "partial"
pressure.top = "101.325 kPa"
[[feeds]]
stage = {feed_stage}
flow = "100 mol/s"
composition = {{ light = {z}, heavy = {one_minus_z} }}
{feed_condition}
[specs]
reflux_ratio = {reflux}
distillate_rate = "{distillate} mol/s"
"""


def constant_alpha_case(*, stages=12, feed_stage=6, z=0.45, reflux=2.0, distillate=44.0, feed_condition="vapor_fraction = 0.0"):
    return case_from_text(
        CASE.format(
            a_light=9.2 + math.log10(ALPHA),
            stages=stages,
            feed_stage=feed_stage,
            z=z,
            one_minus_z=round(1 - z, 12),
            reflux=reflux,
            distillate=distillate,
            feed_condition=feed_condition,
        )
    )


def equilibrium_x(y: float) -> float:
    return y / (ALPHA - (ALPHA - 1.0) * y)


def smoker_stages(x0: float, xn: float, slope: float, intercept: float, alpha: float = ALPHA) -> float:
    a2 = slope * (alpha - 1.0)
    a1 = slope + intercept * (alpha - 1.0) - alpha
    roots = np.roots([a2, a1, intercept])
    k = float(next(r.real for r in roots if abs(r.imag) < 1e-12 and -1e-9 < r.real < 1 + 1e-9))
    c = 1.0 + (alpha - 1.0) * k
    beta = slope * c * (alpha - 1.0) / (alpha - slope * c**2)
    p0, pn = x0 - k, xn - k
    return math.log((p0 * (1 - beta * pn)) / (pn * (1 - beta * p0))) / math.log(alpha / (slope * c**2))


SCENARIOS = [
    dict(),
    dict(feed_condition="vapor_fraction = 0.4", reflux=2.5, distillate=40.0),
    dict(feed_condition='temperature = "300 K"', stages=16, feed_stage=9, reflux=1.6, distillate=45.0),
    dict(z=0.3, stages=20, feed_stage=12, reflux=3.0, distillate=29.0),
]


@pytest.mark.parametrize("scenario", SCENARIOS, ids=["saturated liquid", "partly vapor", "subcooled", "lean feed"])
def test_rigorous_cmo_solution_is_the_mccabe_thiele_construction(scenario):
    case = constant_alpha_case(**scenario)
    result = simulate(case)
    assert result.converged, result.message
    N = result.stage_count
    f = case.feeds[0].stage  # 1-based feed stage
    F = case.feeds[0].flow
    q = result.stage_feeds[f - 1][0].q
    D, B = result.distillate_flow, result.bottoms_flow
    x_D, x_B = result.x[0, 0], result.x[-1, 0]
    x, y = result.x[:, 0], result.y[:, 0]
    L, V = result.liquid_flow, result.vapor_flow

    # constant relative volatility on every stage
    np.testing.assert_allclose(result.K[:, 0] / result.K[:, 1], ALPHA, rtol=1e-12)

    # constant molar overflow, with the feed's q (rows are 0-based stage indices)
    reflux = L[0]
    rectifying_vapor = reflux + D
    np.testing.assert_allclose(L[: f - 1], reflux, rtol=1e-8)  # stages 1 .. f-1
    np.testing.assert_allclose(V[1:f], rectifying_vapor, rtol=1e-8)  # vapor leaving stages 2 .. f
    np.testing.assert_allclose(L[f - 1 : N - 1], reflux + q * F, rtol=1e-8)  # stages f .. N-1
    np.testing.assert_allclose(V[f:], rectifying_vapor - (1 - q) * F, rtol=1e-8)  # stages f+1 .. N
    np.testing.assert_allclose(L[-1], B, rtol=1e-12)

    # (x_n, y_n+1) on the straight operating lines to 1e-8
    slope_top, intercept_top = reflux / rectifying_vapor, D * x_D / rectifying_vapor
    L_strip, V_strip = reflux + q * F, rectifying_vapor - (1 - q) * F
    slope_bottom, intercept_bottom = L_strip / V_strip, -B * x_B / V_strip
    n_top = np.arange(0, f - 1)  # liquid of stages 1..f-1 with the vapor from the stage below
    assert np.max(np.abs(y[n_top + 1] - (slope_top * x[n_top] + intercept_top))) < 1e-8
    n_bottom = np.arange(f - 1, N - 1)
    assert np.max(np.abs(y[n_bottom + 1] - (slope_bottom * x[n_bottom] + intercept_bottom))) < 1e-8
    # the stripping line passes through (x_B, x_B)
    assert abs(slope_bottom * x_B + intercept_bottom - x_B) < 1e-10  # x_B (L' - V' - B) / V': the flows' closure, ~1e-12

    # exact stepping from x_D: the total condenser is stage 1, so y_2 = x_D
    liquid = [x_D]
    vapor = x_D
    for stage in range(2, N + 1):
        x_n = equilibrium_x(vapor)
        liquid.append(x_n)
        if stage < N:
            vapor = slope_top * x_n + intercept_top if stage <= f - 1 else slope_bottom * x_n + intercept_bottom
    assert abs(liquid[-1] - x_B) < 1e-8
    np.testing.assert_allclose(liquid, x, atol=1e-8)

    # Smoker's analytical count: liquid x_1 = x_D (the condenser's) steps down the rectifying
    # line to x_f (f-1 steps), then the stripping line to x_N = x_B (N-f steps, the last one
    # the reboiler)
    assert abs(smoker_stages(x[0], x[f - 1], slope_top, intercept_top) - (f - 1)) < 1e-6
    assert abs(smoker_stages(x[f - 1], x[-1], slope_bottom, intercept_bottom) - (N - f)) < 1e-6


def test_smoker_equation_against_stepping():
    """The closed form above agrees with stepping on an arbitrary rectifying line."""
    slope, intercept = 0.7, 0.28
    x0 = 0.93
    xs = [x0]
    for _ in range(6):
        xs.append(equilibrium_x(slope * xs[-1] + intercept))
    for n, xn in enumerate(xs):
        if n:
            assert abs(smoker_stages(x0, xn, slope, intercept) - n) < 1e-9
