"""`traystack audit` on a network case (solver/audit/network_vmin.py): the rigorous vapor of the
network beside Underwood's minimum vapor of the Petlyuk arrangement and the simple sequences."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

from conftest import USER_SOLVENT_A
from solver.case import load_case
from solver.cli import main
from solver.shortcut.vmin_diagram import minimum_vapor_diagram

PETLYUK = Path(__file__).resolve().parent.parent / "cases" / "aromatics_petlyuk.toml"


def test_audit_of_the_petlyuk_case(tmp_path, capsys):
    assert main(["audit", str(PETLYUK), "--out", str(tmp_path)]) == 0
    assert "saving claimed by the short method" in capsys.readouterr().out
    data = json.loads((tmp_path / "result.json").read_text())
    audit = data["audit"]
    assert data["schema"] == "traystack-result/2" and data["converged"]
    # the diagram again from the audit's own volatilities, feed and q: the same minima
    case = load_case(PETLYUK)
    order = [case.component_names.index(name) for name in audit["components"]]
    feed = case.feeds[0].flow * np.asarray(case.feeds[0].composition)[order]
    diagram = minimum_vapor_diagram(np.array(audit["relative_volatility"]), feed, audit["q"])
    assert audit["petlyuk_minimum_vapor"] == pytest.approx(diagram.petlyuk_minimum_vapor, rel=1e-12)
    assert audit["claimed_saving"] == pytest.approx(
        1 - diagram.petlyuk_minimum_vapor / min(diagram.direct_sequence_minimum_vapor, diagram.indirect_sequence_minimum_vapor), rel=1e-12)
    # Halvorsen & Skogestad (2003): the Petlyuk minimum is below both simple sequences' minima
    assert 0 < audit["claimed_saving"] < 1
    # the rigorous boilup is the vapor leaving the main column's reboiler (the only reboiler)
    reboiler = [s for s in data["stages"] if s["role"] == "reboiler"]
    assert len(reboiler) == 1 and audit["rigorous_boilup"] == pytest.approx(reboiler[0]["V"], rel=1e-12)
    assert audit["boilup_over_minimum"] == pytest.approx(audit["rigorous_boilup"] / audit["petlyuk_minimum_boilup"], rel=1e-12)


def test_audit_under_cmo_enthalpies_with_a_component_without_heat_data(tmp_path):
    """The diagram's q comes from the feed as the engine flashes it under the case's enthalpy
    model: a saturated-liquid feed has q = 1 (by definition) without any rigorous enthalpy."""
    text = PETLYUK.read_text().replace('names = ["benzene", "toluene", "o-xylene"]', 'names = ["solvent_a", "toluene", "o-xylene"]\n' + USER_SOLVENT_A.format(t_max="500 K"))
    text = text.replace('enthalpy = "rigorous"', 'enthalpy = "cmo"').replace("benzene = 0.33", "solvent_a = 0.33")
    path = tmp_path / "petlyuk_cmo.toml"
    path.write_text(text)
    assert main(["audit", str(path), "--out", str(tmp_path / "out")]) == 0
    data = json.loads((tmp_path / "out" / "result.json").read_text())
    audit = data["audit"]
    assert data["converged"] and audit["q"] == 1.0
    assert audit["components"] == ["solvent_a", "toluene", "o-xylene"]
    case = load_case(path)
    order = [case.component_names.index(name) for name in audit["components"]]
    feed = case.feeds[0].flow * np.asarray(case.feeds[0].composition)[order]
    diagram = minimum_vapor_diagram(np.array(audit["relative_volatility"]), feed, 1.0)
    assert audit["petlyuk_minimum_vapor"] == pytest.approx(diagram.petlyuk_minimum_vapor, rel=1e-12)
    # a saturated-liquid feed: the minimum boilup is the minimum vapor (V_bottom = V_top - (1 - q) F)
    assert audit["petlyuk_minimum_boilup"] == pytest.approx(audit["petlyuk_minimum_vapor"], rel=1e-12)
