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


SMALL = """
[uncertainty]
vapor_pressure = { benzene = "0.5 %", toluene = "0.5 %" }

[[uncertainty.feeds]]
feed = 1
composition = { benzene = 0.003 }
"""


def test_monte_carlo_on_a_network_matches_linear_propagation(capsys, tmp_path):
    """For small uncertainties the Monte Carlo spread equals the linear one (JCGM 101:2008,
    the check of JCGM 100's first-order law): within 15 % with 120 samples (the standard
    deviation of a sample standard deviation is about 1/sqrt(2n) = 6.5 %)."""
    out = tmp_path / "mc"
    code = main(["uncertainty", str(_case(tmp_path, SMALL)), "--samples", "120", "--seed", "11", "--out", str(out)])
    screen, err = capsys.readouterr()
    assert code == 0, err
    assert "Monte Carlo, specs held" in screen and "ratios held" not in screen
    assert "not computed for networks" in screen
    record = json.loads((out / "uncertainty.json").read_text())
    assert list(record["views"]) == ["as_specified"] and "as_operated" not in record
    assert record["spec_chances"] == [] and record["reflux_needed"]["specs"] == []
    assert "column network" in record["reflux_needed"]["method"]
    view = record["as_specified"]
    assert view["converged"] == 120 and view["not_converged"] == []
    linear = {o["key"]: o["standard_uncertainty"] for o in record["linear"]["as_specified"]}
    monte_carlo = {o["key"]: o for o in view["outputs"]}
    for key in ("main.bottoms.mole_fraction.toluene", "main.distillate.flow", "duty.main.reboiler",
                "duty.pumparound", "stage.main.12.temperature"):
        assert monte_carlo[key]["standard_deviation"] == pytest.approx(linear[key], rel=0.15), key
        # the median lies near the nominal value, within a third of a standard deviation
        assert abs(monte_carlo[key]["p50"] - monte_carlo[key]["nominal"]) < 0.34 * linear[key], key
    # the spec held does not move in any sample
    assert monte_carlo["main.distillate.mole_fraction.benzene"]["p97.5"] == pytest.approx(0.98, abs=1e-9)
    rows = (out / "uncertainty.csv").read_text().splitlines()
    assert len(rows) == 121 and rows[0].count("as_operated") == 0
    assert (out / "uncertainty.png").stat().st_size > 1000


def test_unconverged_network_sample_is_listed(tmp_path):
    """A sample whose network cannot be solved is reported as such, with its message."""
    from solver.monte_carlo import solve_sample
    from solver.network_engine import simulate_network
    from solver.network_unknowns import network_start
    from solver.sweep import load_document

    path = _case(tmp_path, SMALL)
    case = load_case(path)
    start = network_start(simulate_network(case))
    document = load_document(path)
    good = solve_sample(document, str(path), 0, ["feeds[1].composition.benzene"], [0.401], start, (None, None))
    assert good.statuses == ("converged",) and len(good.outputs[0]) == 41
    # a benzene-free feed cannot give a 98 % benzene distillate
    bad = solve_sample(document, str(path), 1, ["feeds[1].composition.benzene"], [1e-9], start, (None, None))
    assert bad.statuses[0] in ("not converged", "failed") and bad.messages[0] and bad.outputs == ((),)
    assert not bad.converged
