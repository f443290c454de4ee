"""Columns whose liquids split into two liquid phases, against handbook liquid-liquid data: the
shipped n-butanol stripper (cases/butanol_water.toml) and an ethyl acetate stripper, each raising
the serious TWO_LIQUIDS flag in run, audit and check.

Outside values (mole fractions converted from mass percent with M = 74.12 g/mol n-butanol,
88.11 ethyl acetate, 18.015 water):
- n-butanol/water heterogeneous azeotrope at 760 mmHg: 92.4 degC, layers of 79.9 and 7.7 mass %
  n-butanol (x = 0.491 and 0.0199): CRC Handbook of Chemistry and Physics, 44th ed., azeotrope
  table, as reproduced in the Wikipedia "Azeotrope (data)" tables (read in a stored copy:
  verified); overall 55.5 mass % n-butanol (x = 0.233), from memory of the same table.
- ethyl acetate/water mutual solubility at 20-25 degC: 8.0 mass % ester in the water layer
  (x = 0.0175) and 3.0 mass % water in the ester layer (x_ester = 0.869); heterogeneous azeotrope
  at 760 mmHg: 70.4 degC (Horsley, Azeotropic Data III, Adv. Chem. Ser. 116, 1973). All FROM
  MEMORY of the handbook tables (CRC Handbook, aqueous solubility of organic compounds;
  Soerensen & Arlt, Liquid-Liquid Equilibrium Data Collection, DECHEMA Chemistry Data Series
  V/1, 1979), not re-read.
UNIFAC's parameters were fitted to vapor-liquid data and predict liquid-liquid splits only
roughly (common practice: a yes/no answer and a rough extent), hence the wide windows below.
"""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from conftest import case_from_text
from solver.audit import audit_case
from solver.audit.flags import two_liquids
from solver.case import load_case
from solver.cli import main
from solver.engine import simulate

CASES = Path(__file__).resolve().parents[2] / "cases"
BUTANOL_CASE = CASES / "butanol_water.toml"
CELSIUS = 273.15

BUTANOL_AZEOTROPE_T = 92.4 + CELSIUS  # CRC 44th ed. (verified)
BUTANOL_AZEOTROPE_X = 0.233  # overall, CRC 44th ed. (from memory)
BUTANOL_LAYERS = (0.0199, 0.491)  # CRC 44th ed. (verified)
ESTER_LAYERS = (0.0175, 0.869)  # 25 degC, handbook solubility tables (from memory)
ESTER_AZEOTROPE_T = 70.4 + CELSIUS  # Horsley (from memory)


@pytest.fixture(scope="module")
def butanol_result():
    case = load_case(BUTANOL_CASE)
    result = simulate(case)
    assert result.converged
    return case, result


def test_butanol_stripper_overhead_is_the_heterogeneous_azeotrope(butanol_result):
    _, result = butanol_result
    flag = two_liquids(result.liquid_split)
    assert flag is not None and flag.severity == "serious"
    assert flag.numbers["stages"] == [1]  # the condensate; the stripping section's water stays one liquid
    assert "heterogeneous azeotrope" in flag.message
    # the overhead boils where the handbook's heterogeneous azeotrope does (UNIFAC: 1 K, 0.03)
    assert abs(result.temperature[0] - BUTANOL_AZEOTROPE_T) < 1.0
    assert abs(result.distillate_composition[0] - BUTANOL_AZEOTROPE_X) < 0.03
    # ... between the two published layers, and the incipient second liquid is the water layer
    assert BUTANOL_LAYERS[0] < result.distillate_composition[0] < BUTANOL_LAYERS[1]
    second = flag.numbers["second_liquids"][0][0]
    assert 0.4 * BUTANOL_LAYERS[0] < second < 2.5 * BUTANOL_LAYERS[0]


def test_butanol_stripper_audit_reports_the_split_without_a_shortcut(butanol_result):
    case, solution = butanol_result
    report = audit_case(case, max_solves=3)
    assert report.shortcut is None and "liquid split" in report.shortcut_error
    assert [f.code for f in report.flags] == ["TWO_LIQUIDS"]
    assert report.solution.distillate_composition[0] == pytest.approx(solution.distillate_composition[0], abs=1e-9)
    record = report.as_json()
    assert record["basis"] is None and record["shortcut_error"] == report.shortcut_error
    assert [f["code"] for f in record["flags"]] == ["TWO_LIQUIDS"]


def test_butanol_stripper_audit_command_says_so_on_screen(tmp_path, capsys):
    out = tmp_path / "audit"
    assert main(["audit", str(BUTANOL_CASE), "--out", str(out)]) == 0
    screen = capsys.readouterr().out
    assert "TWO_LIQUIDS" in screen and "no shortcut design" in screen and "heterogeneous" in screen
    document = json.loads((out / "result.json").read_text())
    assert [f["code"] for f in document["audit"]["flags"]] == ["TWO_LIQUIDS"]
    assert "No shortcut design" in (out / "summary.md").read_text()
    assert main(["audit", str(BUTANOL_CASE), "--out", str(out), "--quiet", "--fail-on", "serious"]) == 1


def test_butanol_stripper_baseline_records_the_flag():
    baseline = json.loads((CASES / "butanol_water.expected.json").read_text())
    assert "TWO_LIQUIDS" in baseline["audit_flags"]


ESTER_STRIPPER = """
title = "ethyl acetate stripper (test)"
[components]
names = ["ethyl acetate", "water"]
[thermo]
liquid = "{liquid}"
[column]
stages = 8
condenser = "total"
reboiler = "partial"
pressure.top = "101.325 kPa"
[[feeds]]
stage = 2
flow = "100 kmol/h"
composition = {{ "ethyl acetate" = 0.01, water = 0.99 }}
vapor_fraction = 0.0
[specs]
reflux_ratio = 1.0
bottoms = {{ water = 0.9999 }}
"""


@pytest.mark.parametrize("liquid", ["unifac", "unifac-dortmund"])
def test_ethyl_acetate_water_split_is_flagged(liquid):
    """Water with 1 mol% ethyl acetate (below its solubility) stripped; the condensate lies
    between the handbook's two layers, so it must be flagged, and its second liquid is the
    water layer."""
    result = simulate(case_from_text(ESTER_STRIPPER.format(liquid=liquid)))
    assert result.converged
    flag = two_liquids(result.liquid_split)
    assert flag is not None and flag.severity == "serious" and flag.numbers["stages"] == [1]
    x_top = result.distillate_composition[0]
    assert ESTER_LAYERS[0] < x_top < ESTER_LAYERS[1]
    assert abs(result.temperature[0] - ESTER_AZEOTROPE_T) < 2.0
    second = flag.numbers["second_liquids"][0][0]
    # water layer: 0.0175 at 25 degC; ethyl acetate dissolves less in hot water, hence the low end
    assert 0.005 < second < 0.04
    # the feed region (liquids below the solubility) stays one liquid
    x = result.x[:, 0]
    split = set(result.liquid_split.split)
    assert all(k in split for k in range(len(x)) if ESTER_LAYERS[0] < x[k] < ESTER_LAYERS[1])
    assert not any(k in split for k in range(len(x)) if x[k] < 0.5 * ESTER_LAYERS[0])
