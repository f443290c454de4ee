"""The shipped network cases of side strippers, a side rectifier, extractive distillation with
its recycle and a heat-integrated pair: each converges from the default start, closes its
balances, and shows the physics its description claims; a feed whose flow is free (a make-up)
counts as a degree of freedom."""

from __future__ import annotations

from pathlib import Path

import pytest

from solver.case import load_case, loads_case
from solver.errors import SpecError
from solver.network_engine import simulate_network

CASES = Path(__file__).resolve().parent.parent / "cases"
KMOL_PER_HOUR = 1000.0 / 3600.0  # mol/s


def _solved(name: str):
    result = simulate_network(load_case(CASES / f"{name}.toml"))
    assert result.converged, result.message
    assert result.post_check["component_closure_max"] < 1e-10
    assert result.post_check["energy_closure_rel"] < 1e-10
    return result


def test_steam_stays_vapor_except_in_the_condenser():
    result = _solved("crude_like_side_strippers")
    # the tangent-plane test finds a second liquid (water) in the total condenser only
    assert result.extra["liquid_stability"].split_labels == ("main 1",)
    water = result.components.index("water")
    assert result.products["steam-stripper.bottoms"]["composition"][water] < 0.005
    assert result.products["main.bottoms"]["composition"][water] < 1e-6


def test_side_rectifier_makes_the_middle_product():
    result = _solved("aromatics_side_rectifier")
    toluene = result.components.index("toluene")
    assert result.products["rectifier.distillate"]["composition"][toluene] > 0.99
    assert set(result.duties) == {"main.condenser", "main.reboiler", "rectifier.condenser"}


def test_heat_link_pairs_a_warmer_condenser_with_a_colder_reboiler():
    result = _solved("methanol_water_pressure_pair")
    assert result.duties["high-pressure.condenser"] == pytest.approx(-result.duties["low-pressure.reboiler"], rel=1e-12)
    hot = result.temperature[result.column_stages("high-pressure")[0]]
    cold = result.temperature[result.column_stages("low-pressure")[-1]]
    assert hot - cold > 5.0


def test_make_up_replaces_the_water_the_products_carry_away():
    result = _solved("acetone_methanol_extractive")
    make_up = next(f for feeds in result.stage_feeds for f in feeds if f.name == "water make-up")
    water = result.components.index("water")
    leaving = sum(p["flow"] * p["composition"][water] for p in result.products.values())
    assert make_up.flow == pytest.approx(leaving, rel=1e-9)
    # overall: 100 kmol/h in plus the make-up equals the two distillates and the purge
    assert make_up.flow == pytest.approx((51.2 + 50.2 + 0.5 - 100.0) * KMOL_PER_HOUR, rel=1e-9)
    assert result.connections["solvent-recycle"]["flow"] == pytest.approx(200 * KMOL_PER_HOUR, rel=1e-12)
    acetone, methanol = result.components.index("acetone"), result.components.index("methanol")
    assert result.products["extractive.distillate"]["composition"][acetone] > 0.97
    assert result.products["recovery.distillate"]["composition"][methanol] > 0.99


def test_pressure_swing_crosses_the_azeotrope_of_each_pressure():
    """The two distillates go on whole (no distillate products) and each lies on the far side
    of the other column's azeotrope: the 1-bar distillate is richer in acetone than the 10-bar
    azeotrope, the 10-bar distillate leaner than the 1-bar one (NRTL of the case: about 0.79 at
    1 bar and 0.37 at 10 bar, the EquilibriumCurve azeotrope search, checked here too)."""
    from solver.shortcut.equilibrium_curve import EquilibriumCurve
    from solver.thermo.package import ThermoPackage

    case = load_case(CASES / "acetone_methanol_pressure_swing.toml")
    result = _solved("acetone_methanol_pressure_swing")
    assert set(result.products) == {"low-pressure.bottoms", "high-pressure.bottoms"}
    thermo = ThermoPackage.from_case(case)
    (low,) = EquilibriumCurve.from_thermo(thermo, 1e5, 0).azeotropes
    (high,) = EquilibriumCurve.from_thermo(thermo, 10e5, 0).azeotropes
    assert 0.75 < low.x < 0.83 and 0.33 < high.x < 0.41
    acetone = result.components.index("acetone")
    to_high = result.x[result.column_stages("low-pressure")[0], acetone]
    back = result.x[result.column_stages("high-pressure")[0], acetone]
    assert high.x < back < to_high < low.x
    # acetone leaves at 10 bar, methanol at 1 bar; the recycle is the high-pressure distillate
    assert result.products["high-pressure.bottoms"]["flow"] == pytest.approx(50 * KMOL_PER_HOUR, rel=1e-3)
    assert result.connections["recycle"]["flow"] == pytest.approx(
        result.connections["low-pressure-distillate"]["flow"] - result.products["high-pressure.bottoms"]["flow"], rel=1e-9)


def test_audit_of_a_two_component_network_writes_the_solution_and_says_why_no_audit(tmp_path, capsys):
    from solver.cli import main

    assert main(["audit", str(CASES / "acetone_methanol_pressure_swing.toml"), "--out", str(tmp_path)]) == 0
    screen = " ".join(capsys.readouterr().out.split())
    assert "no minimum-vapor audit for this network" in screen and "three or more components" in screen
    assert {"result.json", "stages.csv", "summary.md", "network.png"} <= {path.name for path in tmp_path.iterdir()}


def test_a_free_feed_without_its_spec_is_named():
    text = (CASES / "acetone_methanol_extractive.toml").read_text()
    text = text.replace('[[specs]]\non = "recovery.bottoms"\nflow = "0.5 kmol/h"\n', "")
    with pytest.raises(SpecError, match="feed 'water make-up' \\(its flow is free\\) lacks 1 spec"):
        simulate_network(loads_case(text, source_file="<no purge spec>"))


def test_run_shows_the_two_liquid_flag_and_audit_writes_the_run_files(tmp_path, capsys):
    from solver.cli import main

    assert main(["run", str(CASES / "crude_like_side_strippers.toml"), "--out", str(tmp_path / "run")]) == 0
    screen = capsys.readouterr().out
    assert "[serious] TWO_LIQUIDS" in screen and "main 1" in screen  # the condenser's liquid, as the case says
    assert main(["audit", str(CASES / "aromatics_side_rectifier.toml"), "--out", str(tmp_path / "audit")]) == 0
    written = {path.name for path in (tmp_path / "audit").iterdir()}
    assert {"result.json", "stages.csv", "summary.md", "network.png"} <= written
    assert "TWO_LIQUIDS" not in capsys.readouterr().out


def test_a_total_condensers_distillate_is_reported_as_liquid():
    result = simulate_network(load_case(CASES / "aromatics_side_rectifier.toml"))
    stage_one = {name: product for name, product in result.products.items() if product["stage"] == 1}
    assert stage_one and all(product["phase"] == "liquid" for product in stage_one.values())
