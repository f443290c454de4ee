"""``traystack run --sensitivity``: the screen tables, result.json's section, sensitivity.csv,
and an unconverged run that has nothing to differentiate."""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import pytest

from solver.cli import main

CASES = Path(__file__).resolve().parent.parent / "cases"


def run(capsys, *args) -> tuple[int, str, str]:
    code = main([str(arg) for arg in args])
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def test_run_with_sensitivity_prints_drivers_and_writes_json_and_csv(capsys, tmp_path):
    code, out, err = run(capsys, "run", CASES / "methanol_water.toml", "--sensitivity", "--out", tmp_path)
    assert code == 0, err
    assert "Sensitivities, specs held" in out and "reflux and boilup ratios held" in out
    assert "feeds[1].composition.methanol" in out  # the bottoms purity's largest driver as operated
    section = json.loads((tmp_path / "result.json").read_text())["sensitivity"]
    assert section["schema"] == "traystack-sensitivity/1"
    for view in ("as_specified", "as_operated"):
        data = section[view]
        assert len(data["derivatives"]) == len(data["outputs"]) == 2 + 4 + 4 + 2 + 20
        assert all(len(row) == len(data["inputs"]) == 13 for row in data["derivatives"])
    rows = list(csv.DictReader(io.StringIO((tmp_path / "sensitivity.csv").read_text())))
    assert len(rows) == 2 * 32 * 13
    spec_row = next(r for r in rows if r["view"] == "as_specified" and r["output"] == "bottoms.mole_fraction.water"
                    and r["input"] == "specs.bottoms.water")
    assert float(spec_row["elasticity"]) == pytest.approx(1.0, rel=1e-9)


def test_run_without_the_flag_has_no_section(capsys, tmp_path):
    code, _, err = run(capsys, "run", CASES / "methanol_water.toml", "--quiet", "--out", tmp_path)
    assert code == 0, err
    assert "sensitivity" not in json.loads((tmp_path / "result.json").read_text())
    assert not (tmp_path / "sensitivity.csv").exists()


def test_unconverged_run_says_there_are_no_sensitivities(capsys, tmp_path):
    code, out, err = run(capsys, "run", CASES / "benzene_toluene.toml", "--sensitivity", "--max-iterations", "1",
                         "--out", tmp_path)
    assert code == 3
    assert "no sensitivities" in out and "Traceback" not in err
    assert "sensitivity" not in json.loads((tmp_path / "result.json").read_text())
