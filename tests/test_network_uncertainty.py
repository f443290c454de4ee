"""Uncertainty of the data in a column network: the ``[uncertainty]`` table of a network case
(efficiencies per column, feeds, vapor pressures) and its linear propagation on
``run --sensitivity`` (JCGM 100:2008, 5.1.2: ``u(y)^2 = sum (dy/dp)^2 u(p)^2``), checked
against the derivatives result.json holds; wrong keys refused with exit 2."""

from __future__ import annotations

import dataclasses
import json
from pathlib import Path

import numpy as np
import pytest

from solver.case import load_case
from solver.case.model import StandardUncertainty
from solver.cli import main
from solver.errors import CaseError
from solver.uncertainty import uncertain_inputs

CASES = Path(__file__).resolve().parent.parent / "cases"

TABLE = """
[uncertainty]
efficiency = { main = 0.03 }
vapor_pressure = { benzene = "1 %", toluene = "1 %" }

[[uncertainty.feeds]]
feed = "reformate cut"
composition = { benzene = 0.005 }
"""

STATED = {"main.efficiency": 0.03, "thermo.vapor_pressure_shift.benzene": 0.01,
          "thermo.vapor_pressure_shift.toluene": 0.01, "feeds[1].composition.benzene": 0.005}


def _case(tmp_path: Path, table: str = TABLE) -> Path:
    path = tmp_path / "pumparound_uncertain.toml"
    path.write_text((CASES / "aromatics_pumparound.toml").read_text() + table)
    return path


def test_network_case_reads_its_uncertainty_table(tmp_path):
    case = load_case(_case(tmp_path))
    assert {item.key: item.value for item in case.uncertainties} == pytest.approx(STATED)
    inputs = uncertain_inputs(case)
    # in the order of the network's inputs: feeds, columns, then the property model
    assert [item.parameter.key for item in inputs] == ["feeds[1].composition.benzene", "main.efficiency",
                                                       "thermo.vapor_pressure_shift.benzene",
                                                       "thermo.vapor_pressure_shift.toluene"]
    assert inputs[1].parameter.value == pytest.approx(1.0)  # the case's trays are ideal


def test_linear_propagation_on_a_network(capsys, tmp_path):
    code = main(["run", str(_case(tmp_path)), "--sensitivity", "--out", str(tmp_path / "out")])
    out, err = capsys.readouterr()
    assert code == 0, err
    assert "Standard uncertainty of the outputs" in out and "u, specs held" in out and "u, ratios held" not in out
    data = json.loads((tmp_path / "out" / "result.json").read_text())
    section, derivatives = data["uncertainty"], data["sensitivity"]["as_specified"]
    assert section["schema"] == "traystack-uncertainty/1" and "as_operated" not in section
    assert {i["key"]: i["standard_uncertainty"] for i in section["inputs"]} == pytest.approx(STATED)
    input_keys = [i["key"] for i in derivatives["inputs"]]
    output_keys = [o["key"] for o in derivatives["outputs"]]
    matrix = np.array(derivatives["derivatives"])
    u = {o["key"]: o["standard_uncertainty"] for o in section["as_specified"]}
    assert list(u) == output_keys
    for key in ("main.bottoms.mole_fraction.toluene", "main.bottoms.flow", "duty.main.reboiler", "duty.pumparound"):
        row = matrix[output_keys.index(key)]
        expected = np.sqrt(sum((row[input_keys.index(k)] * s) ** 2 for k, s in STATED.items()))
        assert u[key] == pytest.approx(expected, rel=1e-12) and u[key] > 0.0
    # figures of this case: the bottoms' toluene moves by about 1.2e-4, the products by 0.14 mol/s
    assert u["main.bottoms.mole_fraction.toluene"] == pytest.approx(1.21e-4, rel=0.02)
    assert u["main.distillate.flow"] == pytest.approx(0.142, rel=0.02)
    # the distillate purity is a spec, held: no uncertainty; the feed rate is exact, so both
    # products move by the same amount (overall balance)
    assert u["main.distillate.mole_fraction.benzene"] < 1e-9
    assert u["main.distillate.flow"] == pytest.approx(u["main.bottoms.flow"], rel=1e-6)


@pytest.mark.parametrize(("table", "named"), [
    ("[uncertainty]\nefficiency = { stripper = 0.03 }\n", "uncertainty.efficiency.stripper"),
    ("[uncertainty]\nefficiency = 0.03\n", "uncertainty.efficiency"),
    ("[uncertainty]\nreflux = 0.1\n", "reflux"),
    ('[[uncertainty.feeds]]\nfeed = "crude"\ntemperature = "2 K"\n', "crude"),
    ('[[uncertainty.feeds]]\nfeed = 1\ntemperature = "2 K"\n', "uncertainty.feeds[0].temperature"),
])
def test_wrong_uncertainty_key_in_a_network_exits_2(capsys, tmp_path, table, named):
    code = main(["run", str(_case(tmp_path, "\n" + table)), "--out", str(tmp_path / "out")])
    _, err = capsys.readouterr()
    assert code == 2 and "Traceback" not in err
    assert "pumparound_uncertain.toml" in err and named in err


def test_uncertainty_of_no_input_is_named(tmp_path):
    case = load_case(_case(tmp_path))
    stray = dataclasses.replace(case, uncertainties=(StandardUncertainty("main.nothing", 0.1, "uncertainty.nothing"),))
    with pytest.raises(CaseError, match="uncertainty.nothing"):
        uncertain_inputs(stray)
