"""The traystack command, run as a user would (subprocess)."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent


def traystack(*args, cwd=None):
    return subprocess.run(
        [sys.executable, "-m", "solver.cli", *args], capture_output=True, text=True, cwd=cwd or ROOT, timeout=300
    )


def test_help_lists_the_commands():
    out = traystack("--help")
    assert out.returncode == 0
    assert "run" in out.stdout and "components" in out.stdout and "Caution" in out.stdout


def test_run_demo_writes_result_files_and_plots(tmp_path):
    out = traystack("run", "cases/methanol_water.toml", "--out", str(tmp_path / "demo"))
    assert out.returncode == 0, out.stderr
    assert "converged" in out.stdout and "Caution" in out.stdout
    document = json.loads((tmp_path / "demo" / "result.json").read_text())
    assert document["converged"] is True
    assert (tmp_path / "demo" / "stages.csv").read_text().count("\n") == 21
    for name in ("temperature.png", "flows.png", "compositions.png"):
        data = (tmp_path / "demo" / name).read_bytes()
        assert data[:8] == b"\x89PNG\r\n\x1a\n" and len(data) > 5000


def test_bad_case_exits_2_with_one_clear_line(tmp_path):
    case = tmp_path / "bad.toml"
    case.write_text((ROOT / "cases" / "methanol_water.toml").read_text().replace("reflux_ratio = 1.4", "reflux_raito = 1.4"))
    out = traystack("run", str(case), "--out", str(tmp_path / "o"))
    assert out.returncode == 2
    assert "Traceback" not in out.stderr
    assert "bad.toml" in out.stderr and "reflux_raito" in out.stderr and "reflux_ratio" in out.stderr


def test_missing_spec_is_a_spec_error_exit_2(tmp_path):
    case = tmp_path / "underspecified.toml"
    case.write_text((ROOT / "cases" / "methanol_water.toml").read_text().replace("reflux_ratio = 1.4\n", ""))
    out = traystack("run", str(case), "--out", str(tmp_path / "o"))
    assert out.returncode == 2
    assert "degree(s) of freedom" in out.stderr


def test_components_lists_coolprop_fluids():
    out = traystack("components", "meth*")
    assert out.returncode == 0
    assert "methanol" in out.stdout and "methane" in out.stdout
