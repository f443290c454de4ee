"""Rough edges a practitioner met with the command (each test failed before its fix): an
output path that is a file, square brackets in user text, errors that name the file, `check`
and cases without a baseline, the audit's wording, a broken pipe, an impossible purity."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest

from solver.cli import main

ROOT = Path(__file__).resolve().parent.parent
CASES = ROOT / "cases"


def in_process(capsys, *args) -> tuple[int, str, str]:
    code = main([str(arg) for arg in args])
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def demo_text() -> str:
    return (CASES / "methanol_water.toml").read_text()


def test_run_with_out_an_existing_file_is_bad_input_naming_the_path(capsys, tmp_path):
    target = tmp_path / "results.txt"
    target.write_text("not a folder")
    code, _, err = in_process(capsys, "run", CASES / "ethanol_water_wankat.toml", "--out", target)
    assert code == 2, err
    assert str(target) in err and "internal error" not in err and "folder" in err
    assert target.read_text() == "not a folder"


def test_square_brackets_in_the_title_and_footers_are_shown_literally(capsys, tmp_path):
    case = tmp_path / "bracket.toml"
    case.write_text(demo_text().replace('title = "Solvent recovery column (demo)"', 'title = "Column [rev B]"'))
    code, out, _ = in_process(capsys, "run", case, "--out", tmp_path / "out")
    assert code == 0
    assert "Column [rev B]" in out
    code, out, _ = in_process(capsys, "components", "meth*")
    assert code == 0 and "[components.data.NAME]" in out and "\\[" not in out


@pytest.mark.parametrize("change, words", [
    (('names = ["methanol", "water"]', 'names = ["methanol", "watter"]'), ["watter"]),
    (("reflux_ratio = 1.4", 'distillate_rate = "120 kmol/h"'), ["distillate_rate"]),
])
def test_every_error_names_the_case_file(capsys, tmp_path, change, words):
    case = tmp_path / "named_case.toml"
    case.write_text(demo_text().replace(*change))
    code, _, err = in_process(capsys, "run", case, "--out", tmp_path / "out")
    assert code == 2, err
    assert "named_case.toml" in err and all(word in err for word in words), err


def test_check_lists_a_case_without_baseline_instead_of_failing_it(capsys, tmp_path):
    (tmp_path / "broken.toml").write_text("[column\nstages = 4\n")
    code, out, _ = in_process(capsys, "check", tmp_path)
    assert code == 0, out
    assert "no baseline" in out and "0 failed" in out


def test_audit_duty_message_states_less_or_more_heat():
    from solver.audit.flags import duty_difference
    from solver.audit.thresholds import DEFAULT_THRESHOLDS

    under = duty_difference("condenser", -70e3, -100e3, "CMO estimate", DEFAULT_THRESHOLDS)
    over = duty_difference("reboiler", 140e3, 100e3, "CMO estimate", DEFAULT_THRESHOLDS)
    assert "30.0 % less heat to remove" in under.message and "off" not in under.message
    assert "40.0 % more heat to supply" in over.message


def test_run_into_a_closed_pipe_exits_0_quietly(tmp_path):
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""))
    command = (f"{sys.executable} -m solver.cli run {CASES / 'ethanol_water_wankat.toml'} --out {tmp_path / 'out'} "
               "| head -3; echo status ${PIPESTATUS[0]}")
    done = subprocess.run(["bash", "-c", command], capture_output=True, text=True, timeout=300, env=env, cwd=ROOT)
    assert "status 0" in done.stdout, done.stdout + done.stderr
    assert done.stderr == ""


def test_drift_is_shown_in_display_units():
    from solver.regress import Deviation
    from solver.reports import display_units

    units = display_units()
    duty = Deviation("duties.reboiler", 1.0e6, 1.01e6, 0.0099, 1e-6, "rel").describe(units)
    stage = Deviation("stage_temperatures[3]", 373.15, 373.25, 0.1, 1e-4, "abs").describe(units)
    assert "1000 -> 1010 kW" in duty
    assert "100 -> 100.1 °C" in stage and "stage_temperatures[3]" in stage


def test_audit_says_on_screen_that_real_stages_face_theoretical_ones(capsys, tmp_path):
    """The case gives a Murphree efficiency of 0.963 on its trays."""
    code, out, err = in_process(capsys, "audit", CASES / "ethanol_water_wankat.toml", "--out", tmp_path / "out")
    assert code in (0, 1), err
    assert "note: the audit's columns have equilibrium stages" in out
    assert "real stages, Murphree E 0.963" in (tmp_path / "out" / "summary.md").read_text()  # the column beside the shortcut's


def test_an_impossible_bottoms_purity_is_refused_before_solving(capsys, tmp_path):
    """Before the fix the engine tried and failed after a Newton log (exit 3)."""
    case = tmp_path / "stripper_too_short.toml"
    text = (CASES / "benzene_toluene.toml").read_text().replace("stage = 8", "stage = 14")
    case.write_text(text.replace("distillate = { benzene = 0.98 }", "bottoms = { toluene = 0.999999999 }"))
    code, _, err = in_process(capsys, "run", case, "--out", tmp_path / "out")
    assert code == 2, err
    assert "stripper_too_short.toml" in err and "specs.bottoms.toluene = 0.999999999" in err, err
    assert "equilibrium stages even at total reflux; the column has 15" in err
    assert not (tmp_path / "out" / "result.json").exists()


@pytest.mark.parametrize("condenser", ["total", "partial"])
def test_top_stage_vapor_is_shown_by_one_convention(condenser):
    """The audit's CMO table showed the distillate as the vapor leaving a total condenser while
    the stage table, stages.csv and result.json show 0 there (the distillate being the liquid
    draw). Now every shown table agrees with the result file's stages."""
    from solver.audit.cmo import cmo_audit
    from solver.audit.record import cmo_record
    from solver.case import loads_case
    from solver.engine import simulate

    text = (CASES / "benzene_toluene.toml").read_text().replace('condenser = "total"', f'condenser = "{condenser}"')
    result = simulate(loads_case(text, source_file="bt.toml"))
    assert result.converged
    stages = result.to_dict()["stages"]
    audit = cmo_audit(result)
    expected_top = 0.0 if condenser == "total" else result.distillate_flow
    assert stages[0]["V"] == pytest.approx(expected_top, abs=1e-12)
    assert audit.vapor[0] == pytest.approx(expected_top, abs=1e-12)
    assert audit.vapor_cmo[0] == pytest.approx(expected_top, abs=1e-12)
    rows = cmo_record(audit)["stages"]
    assert [row["V"] for row in rows] == pytest.approx([stage["V"] for stage in stages], rel=1e-12, abs=1e-12)
    assert "top_stage_vapor" in result.to_dict()["conventions"]
