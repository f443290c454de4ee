"""simulate(case): convergence from the default start, the post-check, heat effects."""

from __future__ import annotations

import dataclasses
import json
from pathlib import Path

import CoolProp.CoolProp as CP
import numpy as np
import pytest

from conftest import methanol_water_case
from solver.case import load_case
from solver.errors import ConvergenceError, ThermoError
from solver.newton import NewtonOptions
from solver.results import SCHEMA
from solver.engine import build_system, simulate

CASES = Path(__file__).resolve().parent.parent / "cases"


@pytest.mark.parametrize("name", ["methanol_water", "benzene_toluene"])
def test_demo_cases_converge_from_the_default_start(name):
    result = simulate(load_case(CASES / f"{name}.toml"))
    assert result.converged, result.message
    assert result.iterations <= 8
    assert result.residual_norm <= 1e-9
    for key in ("component_balance_max", "equilibrium_max", "summation_max", "enthalpy_balance_max"):
        assert result.post_check[key] < 1e-9, key


def test_specs_are_met():
    result = simulate(methanol_water_case())
    assert result.reflux_ratio == pytest.approx(1.4, rel=1e-9)
    assert result.bottoms_composition[1] == pytest.approx(0.995, abs=1e-10)
    assert result.condenser_duty < 0 < result.reboiler_duty


def test_methanol_water_vapor_flow_falls_down_the_stripping_section():
    """Real enthalpies: methanol's molar latent heat is lower than water's, so the vapor rising
    through the stripping section shrinks towards the reboiler, by about the ratio of the
    vapor's molar latent heats at the two ends (latent heats from CoolProp called directly)."""
    case = load_case(CASES / "methanol_water.toml")
    result = simulate(case)
    assert result.converged
    f = case.feeds[0].stage
    V = result.vapor_flow
    stripping = V[f:]  # vapor leaving stages f+1 .. N
    assert np.all(np.diff(stripping) < 0), "vapor must fall monotonically down the stripping section"

    def latent(fluid, T):
        return CP.PropsSI("Hmolar", "T", T, "Q", 1, fluid) - CP.PropsSI("Hmolar", "T", T, "Q", 0, fluid)

    def mixture_latent(stage_index):
        T = result.temperature[stage_index]
        y = result.y[stage_index]
        return y[0] * latent("Methanol", T) + y[1] * latent("Water", T)

    observed = V[f] / V[-1]
    expected = mixture_latent(-1) / mixture_latent(f)
    assert observed > 1.03  # a real effect, not noise
    assert observed == pytest.approx(expected, rel=0.03)
    ratio_pure = latent("Water", 373.124) / latent("Methanol", 337.632)
    assert observed < ratio_pure
    assert result.post_check["enthalpy_balance_max"] < 1e-8
    assert result.balances()["energy_closure_rel"] < 1e-8


def test_cmo_enthalpies_give_constant_molar_overflow_on_a_real_mixture():
    result = simulate(methanol_water_case(enthalpy="cmo"))
    assert result.converged
    f = 7
    np.testing.assert_allclose(result.vapor_flow[1:f], result.vapor_flow[1], rtol=1e-9)
    np.testing.assert_allclose(result.vapor_flow[f:], result.vapor_flow[-1], rtol=1e-9)


def test_unconverged_result_is_marked_and_keeps_its_log():
    result = simulate(methanol_water_case(), options=NewtonOptions(max_iterations=2))
    assert not result.converged
    assert "no convergence in 2 iterations" in result.message
    assert len(result.iteration_log) == 3
    document = json.loads(result.to_json())
    assert document["converged"] is False
    assert document["message"] == result.message


def test_a_nan_start_is_a_convergence_error_naming_the_variable():
    case = methanol_water_case(stages=6, feed_stage=3)
    system = build_system(case)
    start = system.profile(np.full(system.size, 1.0))
    temperature = start.temperature.copy()
    temperature[2] = np.nan
    with pytest.raises(ConvergenceError, match="temperature of stage 3"):
        simulate(case, start=dataclasses.replace(start, temperature=temperature))


def test_result_document_has_every_design_field():
    result = simulate(methanol_water_case())
    document = json.loads(result.to_json())
    for key in (
        "schema", "title", "case", "converged", "iterations", "residual_norm", "message", "components", "units",
        "stages", "products", "duties", "balances", "thermo", "iteration_log",
    ):
        assert key in document, key
    assert document["schema"] == SCHEMA
    stage = document["stages"][0]
    for key in ("number", "T", "P", "L", "V", "x", "y", "K", "h_L", "h_V", "feeds", "liquid_draw", "vapor_draw", "duty"):
        assert key in stage, key
    # total condenser convention: V = 0 and the distillate is the liquid draw
    assert stage["V"] == 0.0
    assert stage["liquid_draw"] == pytest.approx(document["products"]["distillate"]["flow"])
    assert document["stages"][-1]["L"] == pytest.approx(document["products"]["bottoms"]["flow"])
    assert document["thermo"]["pairs"][0]["source"].startswith("Smith, Van Ness & Abbott")


def test_stage_feed_and_duties_are_consistent():
    result = simulate(methanol_water_case())
    assert sum(f.flow for feeds in result.stage_feeds for f in feeds) == pytest.approx(100 / 3.6)
    # no side duties: only the condenser and the reboiler exchange heat
    assert np.all(result.duty[1:-1] == pytest.approx(0.0, abs=1e-6 * abs(result.duty[0])))


FEATURES = """
title = "feature column"
[components]
names = ["acetone", "methanol", "water"]
[thermo]
liquid = "nrtl"
[thermo.nrtl.acetone.methanol]
dg = ["184.70 cal/mol", "222.64 cal/mol"]
alpha = 0.3084
source = "Smith, Van Ness & Abbott, 7th ed., Table 12.5"
[thermo.nrtl.acetone.water]
dg = ["631.05 cal/mol", "1197.41 cal/mol"]
alpha = 0.5343
source = "Smith, Van Ness & Abbott, 7th ed., Table 12.5"
[thermo.nrtl.methanol.water]
dg = ["-253.88 cal/mol", "845.21 cal/mol"]
alpha = 0.2994
source = "Smith, Van Ness & Abbott, 7th ed., Table 12.5"
[column]
stages = 18
condenser = "{condenser}"
reboiler = "partial"
pressure.top = "1.1 bar"
pressure.drop_per_stage = "0.7 kPa"
efficiency = {efficiency}
{extra_column}
[[feeds]]
name = "liquid feed"
stage = 8
flow = "60 kmol/h"
composition = {{ acetone = 0.25, methanol = 0.35, water = 0.40 }}
temperature = "40 degC"
[[feeds]]
name = "vapor feed"
stage = 13
flow = "20 kmol/h"
composition = {{ acetone = 0.05, methanol = 0.25, water = 0.70 }}
vapor_fraction = 1.0
[specs]
{specs}
"""


@pytest.mark.parametrize(
    "condenser, efficiency, extra_column, specs",
    [
        ("total", "1.0", "", 'reflux_ratio = 3.0\ndistillate_rate = "25 kmol/h"'),
        ("partial", "1.0", "", 'reflux_ratio = 3.0\ndistillate_rate = "25 kmol/h"'),
        ("total", "0.6", "", 'reflux_ratio = 3.0\nbottoms = { water = 0.9 }'),
        (
            "total",
            "0.8",
            '[[column.side_draws]]\nstage = 5\nphase = "liquid"\nflow = "5 kmol/h"\n'
            '[[column.side_draws]]\nstage = 15\nphase = "vapor"\nflow = "4 kmol/h"\n'
            '[[column.heaters]]\nstage = 10\nduty = "-50 kW"\n',
            'boilup_ratio = 2.0\nrecovery = { acetone = { distillate = 0.95 } }',
        ),
        ("total", "1.0", "", 'reflux_ratio = 3.0\ndistillate_rate = "25 kmol/h"\nreflux_subcooling = "10 K"'),
        ("total", "1.0", "", 'condenser_duty = "-900 kW"\nreboiler_duty = "730 kW"'),
        ("total", "1.0", "", 'stage_temperature = { stage = 12, value = "73.5 degC" }\nreflux_ratio = 3.0'),
    ],
    ids=["total", "partial", "murphree", "draws-heater-recovery", "subcooled-reflux", "duties", "stage-temperature"],
)
def test_column_features_converge_and_meet_specs(condenser, efficiency, extra_column, specs):
    from conftest import case_from_text

    case = case_from_text(FEATURES.format(condenser=condenser, efficiency=efficiency, extra_column=extra_column, specs=specs))
    result = simulate(case)
    assert result.converged, result.message
    assert result.iterations <= 15
    assert result.post_check["enthalpy_balance_max"] < 1e-9
    assert result.balances()["component_closure_max"] < 1e-10
    for spec in case.specs:
        if spec.kind == "reflux_ratio":
            assert result.reflux_ratio == pytest.approx(spec.value, rel=1e-8)
        elif spec.kind == "boilup_ratio":
            assert result.boilup_ratio == pytest.approx(spec.value, rel=1e-8)
        elif spec.kind == "distillate_rate":
            assert result.distillate_flow == pytest.approx(spec.value, rel=1e-8)
        elif spec.kind == "condenser_duty":
            assert result.condenser_duty == pytest.approx(spec.value, rel=1e-7)
        elif spec.kind == "reboiler_duty":
            assert result.reboiler_duty == pytest.approx(spec.value, rel=1e-7)
        elif spec.kind == "stage_temperature":
            assert result.temperature[spec.stage - 1] == pytest.approx(spec.value, abs=1e-7)
        elif spec.kind == "mole_fraction":
            assert result.bottoms_composition[2] == pytest.approx(spec.value, abs=1e-9)
        elif spec.kind == "recovery":
            recovered = result.distillate_flow * result.distillate_composition[0]
            assert recovered / (60 / 3.6 * 0.25 + 20 / 3.6 * 0.05) == pytest.approx(0.95, abs=1e-9)
    if case.column.reflux_subcooling:
        from solver.thermo.flash import bubble_temperature
        from solver.thermo.package import ThermoPackage

        thermo = ThermoPackage.from_case(case)
        bubble, _ = bubble_temperature(thermo, result.pressure[:1], result.x[:1])
        assert result.temperature[0] == pytest.approx(bubble[0] - 10.0, abs=1e-6)
    if case.column.side_draws:
        assert result.liquid_draw[4] == pytest.approx(5 / 3.6) and result.vapor_draw[14] == pytest.approx(4 / 3.6)
        assert result.duty[9] == pytest.approx(-50e3)


def test_cmo_model_runs_without_enthalpy_data():
    """User components with only a vapor pressure: the rigorous feed enthalpy is unavailable,
    so the cmo model takes q = 1 - vapor fraction (a subcooled feed counts as saturated)."""
    case = load_case(Path(__file__).parent / "data" / "user_components_cmo.toml")
    result = simulate(case)
    assert result.converged
    assert result.stage_feeds[4][0].q == 1.0
    # symmetric constant-alpha column, D = F/2: the products mirror each other
    assert result.x[0, 0] == pytest.approx(result.x[-1, 1], abs=1e-9)
    with pytest.raises(ThermoError, match="ideal gas cp"):
        simulate(dataclasses.replace(case, thermo=dataclasses.replace(case.thermo, enthalpy="rigorous")))


def test_a_dry_column_is_not_reported_as_converged():
    """Three stages cannot make a 0.61 ethanol distillate from a cold dilute feed; Newton can
    still meet the equations with an all but empty distillate, which must not pass."""
    from conftest import case_from_text

    case = case_from_text(
        """
        title = "infeasible short column"
        [components]
        names = ["ethanol", "water"]
        [thermo]
        liquid = "nrtl"
        [thermo.nrtl.ethanol.water]
        constant_term = [-0.178, 1.963]
        alpha = 0.2974
        [column]
        stages = 3
        condenser = "total"
        reboiler = "partial"
        pressure = "98.0665 kPa"
        [[feeds]]
        stage = 2
        flow = "453.68 kmol/h"
        composition = { ethanol = 0.1435, water = 0.8565 }
        temperature = "40 degC"
        [specs]
        reflux_ratio = 3.0
        distillate = { ethanol = 0.61 }
        """
    )
    result = simulate(case)
    assert not result.converged
    assert "almost" in result.message or "no convergence" in result.message


def test_the_second_start_is_the_sweeps_without_the_theta_correction(monkeypatch):
    """Rung 1b: when Newton fails from the default start (here made to fail), the engine tries
    the sweeps' start without Holland's correction before the homotopy, and records it."""
    import solver.engine as engine

    case = methanol_water_case(stages=12, feed_stage=7)
    reference = simulate(case)
    real_start, real_newton = engine.initial_estimate, engine.solve_system
    asked, calls = [], []

    def recording_start(system, *, correct_split=True):
        asked.append(correct_split)
        return real_start(system, correct_split=correct_split)

    def first_fails(system, X0, options):
        calls.append(1)
        result = real_newton(system, X0, options)
        return dataclasses.replace(result, converged=False) if len(calls) == 1 else result

    monkeypatch.setattr(engine, "initial_estimate", recording_start)
    monkeypatch.setattr(engine, "solve_system", first_fails)
    result = simulate(case, continuation=False)
    assert asked == [True, False]
    assert result.converged and result.strategy["rung"] == "second start"
    assert result.strategy["second_start"] == {"converged": True, "newton_iterations": result.iterations}
    np.testing.assert_allclose(result.temperature, reference.temperature, atol=1e-6)


def test_an_unconverged_long_column_says_what_to_change():
    """A 300-stage column stopped after one Newton iteration per rung: the message names the
    stage count and suggests fewer stages or a start from a shorter column."""
    text = (Path(__file__).resolve().parent.parent / "cases" / "benzene_toluene.toml").read_text()
    case = load_case_text(text.replace("stages = 16", "stages = 300").replace("stage = 8", "stage = 150"))
    result = simulate(case, options=NewtonOptions(max_iterations=1), continuation=False, shortening=0)
    assert not result.converged
    assert "the column has 300 stages" in result.message and "give fewer stages" in result.message
    short = simulate(methanol_water_case(), options=NewtonOptions(max_iterations=1), continuation=False, shortening=0)
    assert not short.converged and "give fewer stages" not in short.message


def load_case_text(text: str):
    from solver.case import loads_case

    return loads_case(text, source_file="long_column.toml")
