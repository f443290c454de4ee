"""``traystack shortcut`` on a network case (solver/shortcut/network_shortcut.py): Underwood's
minimum vapor for a thermally coupled arrangement, a clear refusal (exit 2) naming why for any
other."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from scipy.optimize import brentq

from conftest import network_example_case
from solver.case import load_case
from solver.cli import main
from solver.shortcut.network_shortcut import coupled_sections

CASES = Path(__file__).parent.parent / "cases"


def test_petlyuk_shortcut_gives_underwood_minimum_vapor(tmp_path, capsys):
    out = tmp_path / "sc"
    assert main(["shortcut", str(CASES / "aromatics_petlyuk.toml"), "--out", str(out)]) == 0
    screen = capsys.readouterr().out
    assert "Petlyuk / divided-wall minimum vapor" in screen and "coupled: prefractionator" in screen
    found = json.loads((out / "shortcut.json").read_text())["minimum_vapor"]
    assert found["components"] == ["benzene", "toluene", "o-xylene"] and found["coupled_sections"] == ["prefractionator"]
    # Underwood (1948) for a saturated-liquid feed (q = 1): sum_i alpha_i z_i / (alpha_i - theta) = 0 has one root
    # between each pair of adjacent volatilities; the sharp split after component j needs
    # V = sum_{k<=j} alpha_k F z_k / (alpha_k - theta_j) (Halvorsen & Skogestad, Ind. Eng. Chem. Res. 42 (2003) 596, eq. for
    # the peaks). Checked here from the reported volatilities, independently of the module's own root finder.
    alpha = np.array(found["relative_volatility"])
    assert found["q"] == pytest.approx(1.0, abs=1e-6)
    flows = np.array([0.33, 0.34, 0.33]) * 100 / 3.6  # the case's feed, mol/s, in the order of volatility
    roots = [brentq(lambda t: float(np.sum(alpha * flows / (alpha - t))), alpha[k + 1] + 1e-9, alpha[k] - 1e-9) for k in range(2)]
    peaks = [float(np.sum(alpha[: j + 1] * flows[: j + 1] / (alpha[: j + 1] - roots[j]))) for j in range(2)]
    assert [p["vapor_top"] for p in found["peaks"]] == pytest.approx(peaks, rel=1e-8)
    assert found["petlyuk_minimum_vapor"] == pytest.approx(max(peaks), rel=1e-8)
    assert found["petlyuk_minimum_vapor"] < min(found["direct_sequence_minimum_vapor"], found["indirect_sequence_minimum_vapor"])
    assert 0 < found["claimed_saving"] < 1


@pytest.mark.parametrize("name", ["paraffins_side_stripper", "aromatics_pumparound"])
def test_no_shortcut_for_other_arrangements_names_why(name, tmp_path, capsys):
    assert main(["shortcut", str(CASES / f"{name}.toml"), "--out", str(tmp_path / "sc")]) == 2
    error = capsys.readouterr().err
    assert "no shortcut design applies to this network" in error and "thermally coupled" in error
    assert f"{name}.toml" in error and "Traceback" not in error
    assert not (tmp_path / "sc" / "shortcut.json").exists()


def test_coupled_sections():
    assert coupled_sections(load_case(CASES / "aromatics_petlyuk.toml").network) == ("prefractionator",)
    assert coupled_sections(load_case(CASES / "paraffins_side_stripper.toml").network) == ()
    assert coupled_sections(network_example_case().network) == ()  # a side stripper and a pumparound
