"""The shipped index of CoolProp's fluids (solver/data/coolprop_fluids.json) against the
installed CoolProp: the same fluids, aliases and constants, to the last bit, so that a drift
of CoolProp is caught (rebuild with scripts/build_coolprop_index.py); and the commands that
only look fluids up do not import CoolProp."""

from __future__ import annotations

import json
import math
import os
import subprocess
import sys
from pathlib import Path

import pytest

from solver import fluids

ROOT = Path(__file__).resolve().parent.parent


def _same(a, b) -> bool:
    if isinstance(a, float) and isinstance(b, float) and math.isnan(a) and math.isnan(b):
        return True
    return a == b


def test_the_shipped_index_matches_the_installed_coolprop():
    shipped = json.loads(fluids.INDEX_FILE.read_text())
    live = fluids.live_index()
    assert shipped["coolprop_version"] == live["coolprop_version"], "rebuild: python scripts/build_coolprop_index.py"
    assert list(shipped["fluids"]) == list(live["fluids"])
    for fluid, entry in live["fluids"].items():
        for key, value in entry.items():
            assert _same(shipped["fluids"][fluid][key], value), (fluid, key)


def test_the_index_is_used_only_with_its_own_coolprop_version(monkeypatch, tmp_path):
    other = tmp_path / "index.json"
    document = json.loads(fluids.INDEX_FILE.read_text())
    document["coolprop_version"] = "0.0.1"
    other.write_text(json.dumps(document))
    monkeypatch.setattr(fluids, "INDEX_FILE", other)
    fluids.fluid_index.cache_clear()
    try:
        assert fluids.fluid_index() is fluids.live_index()
    finally:
        fluids.fluid_index.cache_clear()


def test_water_constants_from_the_index():
    entry = fluids.fluid_entry("Water")
    # IAPWS-95 critical point, molar mass and normal boiling point (Wagner and Pruss 2002,
    # J. Phys. Chem. Ref. Data 31, 387; from memory)
    assert entry["critical_temperature"] == pytest.approx(647.096, abs=1e-3)
    assert entry["molar_mass"] == pytest.approx(0.018015268, rel=1e-7)
    assert entry["normal_boiling_point"] == pytest.approx(373.124, abs=2e-3)
    assert entry["unusable"] is None
    assert fluids.fluid_entry("R404A")["unusable"]  # a pseudo-pure mixture


@pytest.mark.parametrize("arguments", [["components", "meth*"], ["run", "{bad}"]])
def test_looking_fluids_up_imports_no_coolprop(tmp_path, arguments):
    bad = tmp_path / "bad.toml"
    bad.write_text((ROOT / "cases" / "benzene_toluene.toml").read_text().replace("toluene", "toluol-x"))
    command = [a.format(bad=bad) for a in arguments]
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    done = subprocess.run([sys.executable, "-X", "importtime", "-m", "solver.cli", *command], env=env, cwd=ROOT,
                          capture_output=True, text=True, timeout=300)
    imported = [line.split("|")[-1].strip() for line in done.stderr.splitlines() if line.startswith("import time:")]
    assert not [name for name in imported if name.lower().startswith("coolprop")]
    if command[0] == "run":
        assert done.returncode == 2 and "unknown component" in done.stderr and "'toluol-x'" in done.stderr
        assert not [name for name in imported if name.startswith(("scipy.sparse", "solver.engine", "matplotlib"))]
    else:
        assert done.returncode == 0 and "methanol" in done.stdout
