"""Linear propagation of the stated uncertainties (through the sensitivities of the converged
Jacobian) against a Monte Carlo study that solves every sample (JCGM 101:2008, section 5.11,
uses Monte Carlo to validate the law of propagation of uncertainty of JCGM 100:2008). For
small uncertainties (methanol_water_uncertain.toml: NRTL dg about 2 %, efficiency 0.7 +- 0.03)
the two must agree: standard deviations within 10 %.

The comparison uses common random numbers: the linear model is evaluated on the very samples
the Monte Carlo study solved, ``y0 + D (p - p0)``, so that what is compared is the model, not
the sampling noise of 40 draws (about 11 % on a standard deviation). Against the analytic
linear standard uncertainty the tolerance is that sampling noise, three times."""

from __future__ import annotations

from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import numpy as np
import pytest

from solver.case import load_case
from solver.engine import simulate, stage_profile
from solver.monte_carlo import MonteCarloStudy, run_samples
from solver.sensitivity import sensitivity_study
from solver.sweep import load_document
from solver.uncertainty import draw_samples, linear_uncertainty

CASE = Path(__file__).resolve().parents[2] / "cases" / "methanol_water_uncertain.toml"
SAMPLES = 40
OUTPUTS = ("distillate.flow", "distillate.mole_fraction.methanol", "bottoms.mole_fraction.water", "duty.reboiler",
           "duty.condenser", "stage.10.temperature")


@pytest.fixture(scope="module")
def study():
    case = load_case(CASE)
    nominal = simulate(case)
    linear = linear_uncertainty(case, sensitivity_study(case, nominal))
    samples, clipped = draw_samples(linear.inputs, SAMPLES, seed=2026)
    assert clipped == 0
    outcomes = run_samples(load_document(CASE), str(CASE), linear.inputs, samples, stage_profile(nominal),
                           (nominal.reflux_ratio, nominal.boilup_ratio), ThreadPoolExecutor(1))
    outputs = linear.views[0][1].outputs
    return linear, MonteCarloStudy(case.title, 2026, linear.inputs, samples, clipped, outputs, tuple(outcomes), ())


@pytest.mark.parametrize("view", ["as_specified", "as_operated"])
def test_linear_propagation_matches_monte_carlo(study, view):
    linear, monte_carlo = study
    assert not monte_carlo.unconverged(view)
    sensitivities, deviations = next((s, d) for name, s, d in linear.views if name == view)
    keys = [i.key for i in sensitivities.inputs]
    columns = [keys.index(item.parameter.key) for item in linear.inputs]
    nominal_inputs = np.array([item.parameter.value for item in linear.inputs])
    table = monte_carlo.matrix(view)
    for key in OUTPUTS:
        k = sensitivities.output_index(key)
        if view == "as_specified" and key == "bottoms.mole_fraction.water":  # a spec: held exactly
            assert np.ptp(table[:, k]) < 1e-9
            continue
        solved = table[:, k]
        predicted = sensitivities.outputs[k].value + (monte_carlo.samples - nominal_inputs) @ sensitivities.derivatives[k, columns]
        assert np.std(solved, ddof=1) == pytest.approx(np.std(predicted, ddof=1), rel=0.10), key
        assert np.corrcoef(solved, predicted)[0, 1] > 0.98, key
        assert np.std(solved, ddof=1) == pytest.approx(deviations[k], rel=0.35), key
