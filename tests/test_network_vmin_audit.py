"""`traystack audit` on a network case (solver/audit/network_vmin.py): the rigorous vapor of the
network beside Underwood's minimum vapor of the Petlyuk arrangement and the simple sequences."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest

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
