"""``traystack uncertainty``: files written, the same study from one seed on one or two
workers, the uncertainty section of ``run --sensitivity``, and refusals with exit 2."""

from __future__ import annotations

import json
from pathlib import Path

from solver.cli import main

CASES = Path(__file__).resolve().parent.parent / "cases"
UNCERTAIN = CASES / "methanol_water_uncertain.toml"


def run(capsys, *args) -> tuple[int, str, str]:
    code = main([str(arg) for arg in args])
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def test_study_is_the_same_on_one_and_two_workers(capsys, tmp_path):
    code, out, err = run(capsys, "uncertainty", UNCERTAIN, "--samples", "6", "--seed", "4", "--out", tmp_path / "one")
    assert code == 0, err
    assert "chance that bottoms.mole_fraction.water is at least 0.995" in out
    code, _, err = run(capsys, "uncertainty", UNCERTAIN, "--samples", "6", "--seed", "4", "--jobs", "2",
                       "--out", tmp_path / "two")
    assert code == 0, err
    one, two = (json.loads((tmp_path / name / "uncertainty.json").read_text()) for name in ("one", "two"))
    for data in (one, two):
        data.pop("seconds")
    assert one == two
    assert one["samples"] == 6 and one["seed"] == 4 and one["as_operated"]["converged"] == 6
    assert (tmp_path / "one" / "uncertainty.png").stat().st_size > 1000
    assert len((tmp_path / "one" / "uncertainty.csv").read_text().splitlines()) == 7
    other = tmp_path / "seed5"
    assert run(capsys, "uncertainty", UNCERTAIN, "--samples", "6", "--seed", "5", "--out", other)[0] == 0
    assert json.loads((other / "uncertainty.json").read_text())["as_operated"]["outputs"] != one["as_operated"]["outputs"]


def test_run_with_sensitivity_adds_the_linear_uncertainty(capsys, tmp_path):
    code, out, err = run(capsys, "run", UNCERTAIN, "--sensitivity", "--out", tmp_path)
    assert code == 0, err
    assert "Standard uncertainty of the outputs" in out
    section = json.loads((tmp_path / "result.json").read_text())["uncertainty"]
    assert [i["key"] for i in section["inputs"]] == [
        "column.efficiency", "thermo.nrtl.methanol.water.term_over_temperature.ij",
        "thermo.nrtl.methanol.water.term_over_temperature.ji", "thermo.nrtl.methanol.water.alpha"]
    held = {o["key"]: o["standard_uncertainty"] for o in section["as_specified"]}
    operated = {o["key"]: o["standard_uncertainty"] for o in section["as_operated"]}
    assert held["bottoms.mole_fraction.water"] < 1e-9 < operated["bottoms.mole_fraction.water"]


def test_case_without_uncertainties_is_refused(capsys, tmp_path):
    code, _, err = run(capsys, "uncertainty", CASES / "methanol_water.toml", "--samples", "3", "--out", tmp_path)
    assert code == 2
    assert "methanol_water.toml" in err and "uncertainty" in err and "Traceback" not in err


def test_bad_uncertainty_value_exits_2(capsys, tmp_path):
    case = tmp_path / "bad.toml"
    case.write_text(UNCERTAIN.read_text().replace("efficiency = 0.03", 'efficiency = "lots"'))
    code, _, err = run(capsys, "uncertainty", case, "--samples", "3", "--out", tmp_path)
    assert code == 2
    assert "bad.toml" in err and "uncertainty.efficiency" in err and "lots" in err


def test_interrupted_study_resumes_with_only_the_missing_samples(capsys, tmp_path):
    common = ("uncertainty", UNCERTAIN, "--samples", "5", "--seed", "9", "--out", tmp_path)
    assert run(capsys, *common)[0] == 0
    full = json.loads((tmp_path / "uncertainty.json").read_text())
    log = tmp_path / "samples.jsonl"
    lines = log.read_text().splitlines()
    assert len(lines) == 6  # the study's fingerprint and one line per sample
    log.write_text("\n".join(lines[:3]) + "\n" + lines[3][:40])  # two samples kept, one cut short by an interrupt
    code, out, err = run(capsys, *common)
    assert code == 0, err
    assert "resuming: 2 of 5 samples already solved" in out
    again = json.loads((tmp_path / "uncertainty.json").read_text())
    for data in (full, again):
        data.pop("seconds")
    assert again == full
    assert len(log.read_text().splitlines()) == 6
    code, out, _ = run(capsys, "uncertainty", UNCERTAIN, "--samples", "5", "--seed", "10", "--out", tmp_path)
    assert code == 0 and "resuming" not in out  # another seed is another study: started afresh
