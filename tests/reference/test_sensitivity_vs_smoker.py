"""The sensitivity of the distillate purity to the relative volatility against the derivative of
the exact stepping solution, for a binary of constant relative volatility under constant molar
overflow (``enthalpy = "cmo"``), where the rigorous MESH solution is the McCabe-Thiele
construction (tests/reference/test_operating_lines.py).

The stepping solution in closed form is Smoker's (E. H. Smoker, Trans. AIChE 34 (1938) 165; in
textbooks e.g. Doherty & Malone, *Conceptual Design of Distillation Systems*, 2001, and Seader &
Henley, *Separation Process Principles*; the form is written from memory in
test_operating_lines.py and checked there against plain stepping, so a slip in it would fail). With
the reflux ratio R and the distillate rate D held, the column of N stages (total condenser
stage 1, feed on stage f, partial reboiler stage N) fixes x_D and the feed stage's liquid x_f
by two of Smoker's counts: from x_D down the rectifying line to x_f in f - 1 steps, and from x_f
down the stripping line to x_B = (F z - D x_D) / B in N - f steps. Those two equations are
solved here for (x_D, x_f) at alpha (1 +- 1e-6) and differenced centrally: d x_D / d alpha of
the exact solution, with no MESH equation in it.

The simulator's sensitivity comes from the implicit-function theorem on its converged Jacobian:
alpha = Psat_light / Psat_heavy enters through the shift of ln Psat of the light component
(``thermo.vapor_pressure_shift.light``), so d x_D / d alpha = (d x_D / d shift) / alpha.
Tolerance 1e-5 relative: the sensitivity's residual derivatives are forward differences of
step 1e-6 in the shift (an error of about half that, 5e-7, is what is seen), the closed form is
solved to 1e-10 in the stage counts.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import fsolve

from solver.engine import simulate
from solver.sensitivity import column_sensitivities
from solver.sensitivity_inputs import choose_inputs
from test_operating_lines import ALPHA, constant_alpha_case, smoker_stages

SCENARIOS = [dict(), dict(z=0.3, stages=20, feed_stage=12, reflux=3.0, distillate=29.0)]


def smoker_distillate(alpha, *, stages, feed_stage, feed, z, reflux, distillate, guess):
    """(x_D, x_f) of the column for relative volatility ``alpha`` by Smoker's counts
    (saturated-liquid feed, q = 1)."""
    bottoms = feed - distillate
    slope_top = reflux / (reflux + 1.0)
    vapor_strip = (reflux + 1.0) * distillate
    slope_bottom = (reflux * distillate + feed) / vapor_strip

    def counts(unknowns):
        x_d, x_f = unknowns
        x_b = (feed * z - distillate * x_d) / bottoms
        top = smoker_stages(x_d, x_f, slope_top, x_d / (reflux + 1.0), alpha) - (feed_stage - 1)
        bottom = smoker_stages(x_f, x_b, slope_bottom, -bottoms * x_b / vapor_strip, alpha) - (stages - feed_stage)
        return [top, bottom]

    solution = fsolve(counts, guess, xtol=1e-12)
    assert np.max(np.abs(counts(solution))) < 1e-10  # stage counts met (fsolve may stop at machine precision)
    return solution


@pytest.mark.parametrize("scenario", SCENARIOS, ids=["12 stages", "20 stages, lean feed"])
def test_purity_sensitivity_to_alpha_matches_smoker(scenario):
    case = constant_alpha_case(**scenario)
    result = simulate(case)
    assert result.converged, result.message
    feed = case.feeds[0]
    column = dict(stages=case.column.stages, feed_stage=feed.stage, feed=feed.flow, z=feed.composition[0],
                  reflux=case.specs[0].value, distillate=case.specs[1].value)
    assert [s.kind for s in case.specs] == ["reflux_ratio", "distillate_rate"]
    f = feed.stage
    guess = [result.x[0, 0], result.x[f - 1, 0]]
    # the closed form reproduces the rigorous solution itself
    np.testing.assert_allclose(smoker_distillate(ALPHA, guess=guess, **column), guess, atol=1e-8)

    h = 1e-6 * ALPHA
    up = smoker_distillate(ALPHA + h, guess=guess, **column)[0]
    down = smoker_distillate(ALPHA - h, guess=guess, **column)[0]
    exact = (up - down) / (2 * h)

    shift = next(i for i in choose_inputs(case) if i.key == "thermo.vapor_pressure_shift.light")
    view = column_sensitivities(case, result, inputs=[shift])
    ours = view.derivatives[view.output_index("distillate.mole_fraction.light"), 0] / ALPHA
    assert exact > 0.01  # a purity that moves with alpha
    assert ours == pytest.approx(exact, rel=1e-5)
