"""The traystack command, run as a user would (subprocess).

Starting the command costs a few seconds (CoolProp's import), so the commands run once, a few
at a time, in one module-scoped fixture, and the tests assert on what they printed and wrote.
Error paths that need no separate process (their exit codes come from the same ``main``) are
called in-process.
"""

from __future__ import annotations

import csv
import io
import json
import os
import shutil
import subprocess
import sys
import xml.etree.ElementTree as ElementTree
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import numpy as np
import pytest

from solver.cli import main
from solver.regress import check_cases, find_cases

ROOT = Path(__file__).resolve().parent.parent
CASES = ROOT / "cases"
PNG = b"\x89PNG\r\n\x1a\n"


def traystack(*args, cwd=None):
    env = dict(os.environ, PYTHONPATH=str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", ""), COLUMNS="160")
    return subprocess.run(
        [sys.executable, "-m", "solver.cli", *map(str, args)],
        capture_output=True, text=True, cwd=cwd or ROOT, timeout=300, env=env,
    )


def stamp(path: Path) -> tuple[bytes, int]:
    return path.read_bytes(), path.stat().st_mtime_ns


def check_sequence(folder: Path) -> dict:
    """Record baselines (in-process), move a parameter, check (drift, no baseline, a broken case,
    JUnit), then check --update."""
    folder.mkdir()
    for name in ("ethanol_water_wankat", "naphtha_side_draw"):
        shutil.copy(CASES / f"{name}.toml", folder)
    with ThreadPoolExecutor(max_workers=1) as executor:
        steps = {"recorded": [check.status for check in check_cases(find_cases(folder), executor, update=True)]}
    kept = folder / "ethanol_water_wankat.expected.json"
    moved = folder / "naphtha_side_draw.expected.json"
    steps["stamps_after_update"] = {path.name: stamp(path) for path in (kept, moved)}
    naphtha = folder / "naphtha_side_draw.toml"
    naphtha.write_text(naphtha.read_text().replace("reflux_ratio = 4.0", "reflux_ratio = 4.2"))
    shutil.copy(CASES / "ethanol_water_wankat.toml", folder / "fresh_case.toml")
    (folder / "broken.toml").write_text("[column\nstages = 4\n")
    shutil.copy(kept, folder / "broken.expected.json")  # a case without baseline would only be listed
    steps["drift"] = traystack("check", folder, "--junit", folder / "report.xml", "--jobs", "2")
    steps["stamps_after_drift"] = {path.name: stamp(path) for path in (kept, moved)}
    steps["junit"] = (folder / "report.xml").read_text()
    (folder / "broken.toml").unlink()
    steps["update_again"] = traystack("check", folder, "--update", "--jobs", "2")
    steps["stamps_after_update_again"] = {path.name: stamp(path) for path in (kept, moved)}
    steps["new_baseline"] = json.loads(moved.read_text())
    steps["fresh_baseline_exists"] = (folder / "fresh_case.expected.json").exists()
    return steps


@pytest.fixture(scope="module")
def runs(tmp_path_factory):
    work = tmp_path_factory.mktemp("cli")
    bad = work / "bad.toml"
    bad.write_text((CASES / "methanol_water.toml").read_text().replace("reflux_ratio = 1.4", "reflux_raito = 1.4"))
    packed = work / "packed.toml"
    packed.write_text((CASES / "methanol_water.toml").read_text() + '\n[sizing]\ninternals = "random"\n'
                      'packing = { packing_factor = "24 1/ft", nominal_size = "50 mm", source = "our own test numbers" }\n')
    (work / "unconverged").mkdir()
    (work / "unconverged" / "temperature.png").write_bytes(PNG + b"stale figure of an earlier run")
    jobs = {
        # no --out: the folder is named after the case, in the current folder
        "demo": lambda: traystack("run", CASES / "methanol_water.toml", "--units", "temperature=degF", cwd=work),
        "unconverged": lambda: traystack("run", CASES / "benzene_toluene.toml", "--max-iterations", "1", "--json",
                                         "--out", work / "unconverged"),
        "bad": lambda: traystack("run", bad, "--out", work / "bad_out"),
        "sweep": lambda: traystack("sweep", CASES / "naphtha_side_draw.toml", "--vary", "specs.reflux_ratio=3:5:3",
                                   "--vary", "column.side_draws[0].stage=10:40:2", "--jobs", "2", "--out", work / "sweep"),
        "check_sequence": lambda: check_sequence(work / "cases"),
        "audit": lambda: traystack("audit", CASES / "methanol_water.toml", "--out", work / "audit", "--fail-on", "warning"),
        "shortcut": lambda: traystack("shortcut", CASES / "benzene_toluene.toml", "--out", work / "shortcut"),
        "size": lambda: traystack("size", CASES / "methanol_water.toml", "--out", work / "size"),
        "run_packed": lambda: traystack("run", packed, "--out", work / "packed"),
        "sweep_sizing": lambda: traystack("sweep", packed, "--vary", "sizing.flood_fraction=0.6:0.8:2",
                                          "--out", work / "sweep_sizing"),
    }
    with ThreadPoolExecutor(max_workers=3) as pool:
        futures = {name: pool.submit(job) for name, job in jobs.items()}
        outcome = {name: future.result() for name, future in futures.items()}
    outcome["work"] = work
    return outcome


def in_process(capsys, *args) -> tuple[int, str, str]:
    try:
        code = main([str(arg) for arg in args])
    except SystemExit as exit:  # --help
        code = exit.code
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def test_help_lists_the_commands_and_exit_codes(capsys):
    code, out, _ = in_process(capsys, "--help")
    assert code == 0
    for word in ("run", "shortcut", "audit", "size", "check", "sweep", "components", "Caution", "3 not converged"):
        assert word in out


def test_run_writes_result_files_summary_and_plots_in_the_default_folder(runs):
    out, folder = runs["demo"], runs["work"] / "methanol_water_out"
    assert out.returncode == 0, out.stderr
    assert "converged" in out.stdout and "Caution" in out.stdout and "T / °F" in out.stdout
    document = json.loads((folder / "result.json").read_text())
    assert document["converged"] is True and document["schema"] == "traystack-result/1"
    assert (folder / "stages.csv").read_text().count("\n") == 21
    for name in ("temperature.png", "flows.png", "compositions.png", "yx.png"):
        data = (folder / name).read_bytes()
        assert data[:8] == PNG and len(data) > 5000, name
    summary = (folder / "summary.md").read_text()
    assert summary.startswith("# Solvent recovery column (demo)") and "T / °F" in summary and "![yx](yx.png)" in summary


def test_unconverged_run_writes_its_result_and_exits_3(runs):
    out, folder = runs["unconverged"], runs["work"] / "unconverged"
    assert out.returncode == 3
    printed = json.loads(out.stdout)  # --json: stdout is the result and nothing else
    assert printed["converged"] is False and printed["iterations"] == 1
    assert json.loads((folder / "result.json").read_text())["converged"] is False
    assert "NOT CONVERGED" in (folder / "summary.md").read_text()
    assert not (folder / "temperature.png").exists()  # the stale figure is gone
    assert "not converged" in out.stderr and "Traceback" not in out.stderr


def test_quiet_prints_nothing_and_still_writes(capsys, tmp_path):
    code, out, err = in_process(capsys, "run", CASES / "ethanol_water_wankat.toml", "--quiet", "--out", tmp_path)
    assert code == 0 and out == "" and err == ""
    assert json.loads((tmp_path / "result.json").read_text())["converged"] is True


def test_bad_case_exits_2_with_one_clear_line(runs):
    out = runs["bad"]
    assert out.returncode == 2
    assert "Traceback" not in out.stderr and len(out.stderr.strip().splitlines()) == 1
    assert "bad.toml" in out.stderr and "reflux_raito" in out.stderr and "reflux_ratio" in out.stderr


def test_missing_spec_bad_units_and_bad_sweep_key_exit_2(capsys, tmp_path):
    underspecified = tmp_path / "underspecified.toml"
    underspecified.write_text((CASES / "methanol_water.toml").read_text().replace("reflux_ratio = 1.4\n", ""))
    code, _, err = in_process(capsys, "run", underspecified, "--out", tmp_path / "out")
    assert code == 2 and "degree(s) of freedom" in err
    code, _, err = in_process(capsys, "run", CASES / "benzene_toluene.toml", "--units", "flow=furlong")
    assert code == 2 and "--units flow" in err
    code, _, err = in_process(capsys, "sweep", CASES / "naphtha_side_draw.toml", "--vary", "column.stage=10:20:3")
    assert code == 2 and "column.stage" in err and "Traceback" not in err


def test_components_lists_coolprop_fluids(capsys):
    code, out, _ = in_process(capsys, "components", "meth*")
    assert code == 0
    assert "methanol" in out and "methane" in out


def test_sweep_writes_csv_and_plot_and_reports_failed_points(runs):
    out, folder = runs["sweep"], runs["work"] / "sweep"
    assert out.returncode == 0, out.stderr
    rows = list(csv.DictReader(io.StringIO((folder / "sweep.csv").read_text())))
    assert len(rows) == 6
    assert [row["specs.reflux_ratio"] for row in rows] == ["3", "3", "4", "4", "5", "5"]
    assert [row["column.side_draws[0].stage"] for row in rows] == ["10", "40"] * 3
    assert [row["converged"] for row in rows] == ["true", "false"] * 3
    assert all("out of range (got 40)" in row["message"] for row in rows[1::2])
    duties = [float(row["reboiler_duty_W"]) for row in rows[::2]]
    assert duties == sorted(duties)  # more reflux, more boilup
    assert "point 2 failed (bad input)" in out.stdout and "3 of 6 points converged" in out.stdout
    assert (folder / "sweep.png").read_bytes()[:8] == PNG


def test_check_records_detects_drift_and_updates_only_when_asked(runs):
    steps = runs["check_sequence"]
    assert steps["recorded"] == ["baseline written", "baseline written"]

    drift = steps["drift"]
    assert drift.returncode == 1
    assert "drift" in drift.stdout and "no baseline" in drift.stdout and "failed" in drift.stdout
    assert "reflux_ratio: 4 -> 4.2" in drift.stdout and "duties.reboiler" in drift.stdout
    assert "not failures" in drift.stdout
    assert steps["stamps_after_drift"] == steps["stamps_after_update"]  # untouched without --update

    suite = ElementTree.fromstring(steps["junit"]).find("testsuite")
    counts = {key: suite.get(key) for key in ("tests", "failures", "errors", "skipped")}
    assert counts == {"tests": "4", "failures": "1", "errors": "1", "skipped": "1"}
    failed = {case.get("name"): case for case in suite.findall("testcase")}
    assert failed["naphtha_side_draw"].find("failure") is not None
    assert failed["broken"].find("error") is not None and failed["fresh_case"].find("skipped") is not None

    again = steps["update_again"]
    assert again.returncode == 0, again.stdout
    assert "baseline updated" in again.stdout and steps["fresh_baseline_exists"]
    assert steps["new_baseline"]["reflux_ratio"] == pytest.approx(4.2)
    kept = "ethanol_water_wankat.expected.json"
    assert steps["stamps_after_update_again"][kept] == steps["stamps_after_update"][kept]  # a passing baseline stays


# ------------------------------------------------------------------ shortcut and audit


def test_audit_writes_the_audit_and_fails_on_a_warning_when_asked(runs):
    out, folder = runs["audit"], runs["work"] / "audit"
    assert out.returncode == 1, out.stderr  # methanol-water raises CMO_DEVIATION and DUTY_DIFFERENCE warnings
    assert "audit flag(s) at or above warning" in out.stderr and "CMO_DEVIATION" in out.stderr
    assert "Traceback" not in out.stderr
    assert "shortcut and rigorous side by side" in out.stdout and "CMO_DEVIATION" in out.stdout
    document = json.loads((folder / "result.json").read_text())
    assert document["converged"] is True and document["shortcut"]["method"] == "McCabe-Thiele"
    assert {flag["code"] for flag in document["audit"]["flags"]} >= {"CMO_DEVIATION", "DUTY_DIFFERENCE"}
    assert len(document["stages"]) == document["shortcut"]["stages"]  # the shortcut's column
    for name in ("yx.png", "cmo_flows.png", "temperature.png", "compositions.png"):
        data = (folder / name).read_bytes()
        assert data[:8] == PNG and len(data) > 5000, name
    summary = (folder / "summary.md").read_text()
    assert "## Shortcut and rigorous, side by side" in summary and "![cmo_flows](cmo_flows.png)" in summary
    # the shortcut's column in hardware: rigorous and CMO diameters of both sections, which is larger
    assert "diameters: rigorous traffic against the CMO traffic" in out.stdout
    rows = document["sizing"]["diameters"]
    assert [row["section"] for row in rows] == ["rectifying", "stripping"]
    assert all(row["rigorous_diameter"] > 0 and row["cmo_diameter"] > 0 and row["larger"] for row in rows)
    assert "## Diameters: rigorous against CMO traffic" in summary
    assert (folder / "flood.png").read_bytes()[:8] == PNG


# ------------------------------------------------------------------ size


def test_size_prints_the_headline_and_writes_its_files(runs):
    out, folder = runs["size"], runs["work"] / "size"
    assert out.returncode == 0, out.stderr
    assert "diameters: rigorous traffic against the CMO traffic" in out.stdout and "column hardware" in out.stdout
    assert "real trays" in out.stdout and "preliminary" in out.stdout and "Traceback" not in out.stderr
    document = json.loads((folder / "result.json").read_text())
    sizing = document["sizing"]
    assert sizing["internals"] == "sieve" and len(sizing["sections"]) == 2
    assert all(0.79 < section["largest_fraction_of_flood"] < 0.81 for section in sizing["sections"])
    assert sizing["efficiency"]["light_key"] == "methanol"
    assert "## Column hardware" in (folder / "summary.md").read_text()
    assert (folder / "flood.png").read_bytes()[:8] == PNG


def test_run_sizes_a_case_with_a_sizing_table_and_sweep_varies_its_inputs(runs):
    out, folder = runs["run_packed"], runs["work"] / "packed"
    assert out.returncode == 0, out.stderr
    assert "column hardware" in out.stdout and "packed" in out.stdout
    sizing = json.loads((folder / "result.json").read_text())["sizing"]
    assert sizing["internals"] == "random" and sizing["sections"][0]["packed_height"] == pytest.approx(10 * 0.9)
    sweep = runs["sweep_sizing"]
    assert sweep.returncode == 0, sweep.stderr
    rows = list(csv.DictReader(io.StringIO((runs["work"] / "sweep_sizing" / "sweep.csv").read_text())))
    low, high = (float(row["diameter_rectifying_m"]) for row in rows)
    assert low == pytest.approx(high * np.sqrt(0.8 / 0.6), rel=1e-6)  # area scales as 1/fraction of flood


def test_size_refuses_a_component_without_surface_tension_and_a_bad_sizing_table(capsys, tmp_path):
    code, _, err = in_process(capsys, "size", ROOT / "tests" / "data" / "user_components_cmo.toml", "--out", tmp_path)
    assert code == 2 and "sizing.components.light.surface_tension" in err and "Traceback" not in err
    bad = tmp_path / "bad.toml"
    bad.write_text((CASES / "methanol_water.toml").read_text() + '\n[sizing]\ntray_spacing = "6 m"\n')
    code, _, err = in_process(capsys, "size", bad, "--out", tmp_path)
    assert code == 2 and "sizing.tray_spacing" in err and "out of range" in err


def test_audit_exits_0_when_no_flag_reaches_fail_on(capsys, tmp_path):
    code, out, err = in_process(capsys, "audit", CASES / "benzene_toluene.toml", "--out", tmp_path, "--fail-on", "serious")
    assert code == 0, err
    assert "CMO_DEVIATION" in out and err == ""


def test_shortcut_writes_design_and_diagram(runs):
    out, folder = runs["shortcut"], runs["work"] / "shortcut"
    assert out.returncode == 0, out.stderr
    assert "McCabe-Thiele" in out.stdout and "Ponchon-Savarit" in out.stdout and "minimum reflux ratio" in out.stdout
    assert "rigorous solution of the case as specified" in out.stdout  # x_B is not in the specs
    document = json.loads((folder / "shortcut.json").read_text())
    assert document["schema"] == "traystack-shortcut/1" and document["shortcut"]["stages"] == 16
    assert document["shortcut"]["minimum_reflux"]["pinch"] == "feed"
    assert (folder / "yx_shortcut.png").read_bytes()[:8] == PNG


def test_shortcut_and_audit_refuse_a_purity_beyond_the_azeotrope_with_exit_2(capsys, tmp_path):
    beyond = tmp_path / "beyond.toml"
    beyond.write_text((CASES / "ethanol_water_azeotrope.toml").read_text().replace(
        "distillate = { ethanol = 0.84 }", "distillate = { ethanol = 0.95 }"))
    for command in ("shortcut", "audit"):
        code, _, err = in_process(capsys, command, beyond, "--out", tmp_path / command)
        assert code == 2, err
        assert "azeotrope" in err and "0.95" in err and "Traceback" not in err
