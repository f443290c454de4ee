"""The [uncertainty] table, the samples drawn from it and the Monte Carlo study's bookkeeping
(percentiles, spec chances, unconverged samples listed, not dropped)."""

from __future__ import annotations

import csv
import dataclasses
import io
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import numpy as np
import pytest

from solver.case import load_case, loads_case
from solver.errors import CaseError
from solver.uncertainty import draw_samples, uncertain_inputs

CASES = Path(__file__).resolve().parent.parent / "cases"
BASE = (CASES / "methanol_water.toml").read_text()
CAL = 4.184  # J/cal, thermochemical calorie (definition)
R = 8.314462618  # J/(mol K), CODATA 2018


def with_table(text: str, base: str = BASE):
    return loads_case(base + "\n" + text, source_file="mw.toml")


def test_table_gives_the_inputs_in_si():
    case = with_table('[uncertainty]\nefficiency = 0.02\nvapor_pressure = { water = "1 %" }\n'
                      '[uncertainty.nrtl.water.methanol]\ndg = ["10 cal/mol", "20 cal/mol"]\nalpha = 0.01\n'
                      '[[uncertainty.feeds]]\nfeed = "aqueous methanol"\ncomposition = { water = 0.004 }\n'
                      'temperature = "1.5 K"\n')
    stated = {item.key: item.value for item in case.uncertainties}
    # the pair is written water.methanol, the case's is methanol.water: ij and ji swap
    assert stated["thermo.nrtl.methanol.water.term_over_temperature.ij"] == pytest.approx(20 * CAL / R, rel=1e-9)
    assert stated["thermo.nrtl.methanol.water.term_over_temperature.ji"] == pytest.approx(10 * CAL / R, rel=1e-9)
    assert stated["thermo.nrtl.methanol.water.alpha"] == 0.01
    assert stated["column.efficiency"] == 0.02
    assert stated["thermo.vapor_pressure_shift.water"] == pytest.approx(0.01)
    assert stated["feeds[1].composition.methanol"] == 0.004  # a binary's one composition input
    assert stated["feeds[1].temperature"] == 1.5
    inputs = uncertain_inputs(case)  # every stated key is an input of the sensitivities
    assert len(inputs) == len(stated) == 7


@pytest.mark.parametrize("text, key, value", [
    ("[uncertainty]\nefficiency = -0.1\n", "uncertainty.efficiency", "-0.1"),
    ("[uncertainty]\nefficency = 0.1\n", "uncertainty.efficency", "efficency"),
    ("[uncertainty.wilson.methanol.water]\ndlambda = [1, 1]\n", "uncertainty.wilson", ""),
    ("[uncertainty.nrtl.methanol.water]\nconstant_term = [0.1, 0.1]\n", "uncertainty.nrtl.methanol.water.constant_term", ""),
    ("[uncertainty]\nvapor_pressure = { ethanol = 0.01 }\n", "uncertainty.vapor_pressure.ethanol", "ethanol"),
    ("[[uncertainty.feeds]]\nfeed = 3\ntemperature = 1\n", "uncertainty.feeds[0].feed", "3"),
    ('[uncertainty.nrtl.methanol.water]\ndg = ["ten cal/mol", 1]\n', "uncertainty.nrtl.methanol.water.dg[0]", "ten"),
])
def test_bad_table_names_file_key_and_value(text, key, value):
    with pytest.raises(CaseError) as caught:
        with_table(text)
    message = str(caught.value)
    assert "mw.toml" in message and key in message and value in message


def test_samples_are_reproducible_and_clipped_into_range():
    case = with_table("[uncertainty]\nefficiency = 0.5\n")  # efficiency 1.0 +- 0.5: half the draws above 1
    inputs = uncertain_inputs(case)
    first, clipped = draw_samples(inputs, 400, seed=11)
    again, _ = draw_samples(inputs, 400, seed=11)
    other, _ = draw_samples(inputs, 400, seed=12)
    assert np.array_equal(first, again) and not np.array_equal(first, other)
    assert first.max() == 1.0 and 150 < clipped < 250  # about half of 400 (binomial sd 10)


def uncertain_study(count: int, seed: int):
    """The demo case with stated uncertainties, its nominal solution, the linear propagation
    and ``count`` samples drawn with ``seed``."""
    from solver.engine import simulate
    from solver.sensitivity import sensitivity_study
    from solver.uncertainty import linear_uncertainty

    path = CASES / "methanol_water_uncertain.toml"
    case = load_case(path)
    nominal = simulate(case)
    linear = linear_uncertainty(case, sensitivity_study(case, nominal))
    samples, clipped = draw_samples(linear.inputs, count, seed=seed)
    return path, case, nominal, linear, samples, clipped


def test_unconverged_samples_are_counted_listed_and_left_out(monkeypatch):
    from solver import monte_carlo
    from solver.engine import stage_profile
    from solver.sweep import load_document

    path, case, nominal, linear, samples, clipped = uncertain_study(4, seed=5)
    real = monte_carlo.solve_warm

    def failing_second(case, start, options=None, *, thermo=None):  # sample 1 as operated does not converge
        found = real(case, start, options, thermo=thermo)
        if case.specs[0].key == "operation.reflux_ratio" and failing_second.calls == 3:
            found = dataclasses.replace(found, result=dataclasses.replace(found.result, converged=False,
                                                                           message="made to fail"))
        failing_second.calls += 1
        return found

    failing_second.calls = 0
    monkeypatch.setattr(monte_carlo, "solve_warm", failing_second)
    outcomes = monte_carlo.run_samples(load_document(path), str(path), linear.inputs, samples, stage_profile(nominal),
                                       (nominal.reflux_ratio, nominal.boilup_ratio), ThreadPoolExecutor(1))
    outputs = linear.views[0][1].outputs
    study = monte_carlo.MonteCarloStudy(case.title, 5, linear.inputs, samples, clipped, outputs, tuple(outcomes), ())
    assert [o.index for o in study.unconverged("as_operated")] == [1]
    assert study.unconverged("as_specified") == []
    data = study.as_json()
    assert data["as_operated"]["converged"] == 3
    assert data["as_operated"]["not_converged"] == [{"sample": 1, "status": "not converged", "message": "made to fail"}]
    operated = study.matrix("as_operated")
    assert np.isnan(operated[1]).all() and not np.isnan(operated[[0, 2, 3]]).any()
    chances = monte_carlo.spec_chances(case, outputs, operated)
    assert [(c.output, c.sense, c.converged) for c in chances] == [("bottoms.mole_fraction.water", "at least", 3)]
    rows = list(csv.DictReader(io.StringIO(study.csv())))
    assert [row["as_operated.status"] for row in rows] == ["converged", "not converged", "converged", "converged"]
    assert rows[1]["as_operated.bottoms.mole_fraction.water"] == "" and rows[1]["as_specified.bottoms.flow"] != ""


def test_reflux_needed_to_meet_the_product_spec():
    """Each sample's reflux needed to meet the bottoms spec, checked by solving the sample again
    at that reflux ratio and the design's distillate rate: the bottoms purity is the spec's."""
    from solver import monte_carlo
    from solver.case import Spec
    from solver.engine import simulate, stage_profile
    from solver.sweep import load_document
    from solver.thermo.package import ThermoPackage

    path, case, nominal, linear, samples, clipped = uncertain_study(3, seed=11)
    D = nominal.distillate_flow
    outcomes = monte_carlo.run_samples(load_document(path), str(path), linear.inputs, samples, stage_profile(nominal),
                                       (nominal.reflux_ratio, nominal.boilup_ratio), ThreadPoolExecutor(1),
                                       distillate_rate=D)
    needed_specs = tuple(specs[0] for specs in monte_carlo.needed_reflux_specs(case, D))
    assert [s.key for s in needed_specs] == ["specs.bottoms.water"]
    study = monte_carlo.MonteCarloStudy(case.title, 11, linear.inputs, samples, clipped, linear.views[0][1].outputs,
                                        tuple(outcomes), (), 0.0, needed_specs)
    (needed,) = study.reflux_needed()
    assert len(needed.values) == 3 and not needed.unconverged
    assert len(set(needed.values)) == 3  # the samples need different refluxes
    for m, reflux in enumerate(needed.values):
        moved, thermo = case, ThermoPackage.from_case(case)
        for item in linear.inputs:
            moved, thermo = item.parameter.apply(moved, thermo, float(samples[m, linear.inputs.index(item)]))
        moved = dataclasses.replace(moved, specs=(Spec("reflux_ratio", reflux), Spec("distillate_rate", D)))
        again = simulate(moved, thermo=thermo, start=stage_profile(nominal))
        assert again.converged
        assert again.bottoms_composition[1] == pytest.approx(0.995, abs=1e-8)
    stats = needed.statistics()
    assert stats["p2.5"] <= stats["p50"] <= stats["p97.5"] and stats["p50"] == pytest.approx(np.median(needed.values))
    data = study.as_json()["reflux_needed"]
    assert data["specs"][0]["spec"] == "specs.bottoms.water" and data["specs"][0]["converged"] == 3
    rows = list(csv.DictReader(io.StringIO(study.csv())))
    assert [float(row["reflux_needed.specs.bottoms.water"]) for row in rows] == pytest.approx(list(needed.values))
    # a case whose own specs are the spec and a distillate rate: the reflux needed is the as-specified one
    by_rate = dataclasses.replace(case, specs=(case.specs[1], Spec("distillate_rate", D, key="design.distillate_rate")))
    found = monte_carlo._reflux_needed(by_rate, ThermoPackage.from_case(by_rate), stage_profile(nominal),
                                       monte_carlo.needed_reflux_specs(by_rate, D)[0],
                                       ("converged", "", (), nominal))
    assert found == ("converged", "", nominal.reflux_ratio)
    assert monte_carlo.needed_reflux_specs(case, None) == ()
