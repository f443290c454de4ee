"""The disk cache of fitted property curves: a hit gives the very fit that was stored, a miss
or an entry not to be trusted (stale key, damaged file, wrong checksum, wrong shapes) is built
again from CoolProp, concurrent writers leave one whole entry, ``--no-cache`` neither reads
nor writes, and a run gives the same numbers to the last bit with a cold, a warm and no cache,
its second time without importing CoolProp (``python -X importtime``)."""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import numpy as np
import pytest

from solver.thermo import chebyshev_fits, fit_cache
from solver.thermo.chebyshev_fits import ideal_gas_fit, saturation_fits

ROOT = Path(__file__).resolve().parent.parent


@pytest.fixture
def cache(tmp_path, monkeypatch):
    """An empty cache folder of this test, and the fits forgotten by this process."""
    monkeypatch.setenv("TRAYSTACK_CACHE_DIR", str(tmp_path / "cache"))
    monkeypatch.delenv("TRAYSTACK_NO_CACHE", raising=False)
    saturation_fits.cache_clear()
    ideal_gas_fit.cache_clear()
    yield fit_cache.fits_folder()
    saturation_fits.cache_clear()
    ideal_gas_fit.cache_clear()


def _builds(monkeypatch) -> list[str]:
    """Count the fits built from CoolProp (calls pass through)."""
    built: list[str] = []
    original = chebyshev_fits._build_saturation_fits

    def counting(fluid):
        built.append(fluid)
        return original(fluid)

    monkeypatch.setattr(chebyshev_fits, "_build_saturation_fits", counting)
    return built


def _same(first, second) -> None:
    for name in ("wagner", "ln_heat_of_vaporization", "ln_liquid_volume"):
        a, b = getattr(first, name), getattr(second, name)
        assert np.array_equal(a.coefficients, b.coefficients)  # bit for bit
        assert (a.low, a.high, a.pieces, a.max_error) == (b.low, b.high, b.pieces, b.max_error)
    assert (first.T_low, first.T_high, first.critical_temperature) == (second.T_low, second.T_high, second.critical_temperature)


def test_a_miss_builds_and_stores_and_a_hit_gives_the_same_fit_without_coolprop(cache, monkeypatch):
    built = _builds(monkeypatch)
    first = saturation_fits("Methanol")
    assert built == ["Methanol"]
    entries = list(cache.glob("saturation-Methanol-*.json"))
    assert len(entries) == 1
    saturation_fits.cache_clear()
    second = saturation_fits("Methanol")
    assert built == ["Methanol"]  # from the disk, not built again
    _same(first, second)
    cp_first = ideal_gas_fit("Methanol", 175.61, 768.0)
    ideal_gas_fit.cache_clear()
    cp_second = ideal_gas_fit("Methanol", 175.61, 768.0)
    assert np.array_equal(cp_first.cp.coefficients, cp_second.cp.coefficients)
    assert len(list(cache.glob("ideal_gas-Methanol-*.json"))) == 1


def test_another_coolprop_version_or_fit_setting_is_a_miss(cache, monkeypatch):
    built = _builds(monkeypatch)
    saturation_fits("Water")
    saturation_fits.cache_clear()
    monkeypatch.setattr(chebyshev_fits, "coolprop_version", lambda: "0.0.0-other")
    saturation_fits("Water")
    saturation_fits.cache_clear()
    monkeypatch.setattr(chebyshev_fits, "FIT_TOLERANCE", 1e-6)
    saturation_fits("Water")
    assert built == ["Water"] * 3
    assert len(list(cache.glob("saturation-Water-*.json"))) == 3


@pytest.mark.parametrize("damage", ["truncated", "not json", "checksum", "wrong key", "wrong shape", "old format"])
def test_an_entry_not_to_be_trusted_is_built_again(cache, monkeypatch, damage):
    built = _builds(monkeypatch)
    good = saturation_fits("Toluene")
    (entry,) = cache.glob("saturation-Toluene-*.json")
    text = entry.read_text()
    document = json.loads(text)
    if damage == "truncated":
        entry.write_text(text[: len(text) // 2])
    elif damage == "not json":
        entry.write_bytes(b"\x00\x01 not a cache entry")
    elif damage == "checksum":
        document["payload"]["wagner"]["coefficients"][0][0] += 1e-9
        entry.write_text(json.dumps(document))
    elif damage == "wrong key":
        document["key"]["fluid"] = "Benzene"
        entry.write_text(json.dumps(document))
    elif damage == "wrong shape":  # a consistent checksum over a fit of the wrong shape
        document["payload"]["wagner"]["coefficients"] = document["payload"]["wagner"]["coefficients"][:1]
        document["checksum"] = fit_cache._checksum(document["payload"])
        entry.write_text(json.dumps(document))
    else:
        document["format"] = fit_cache.FORMAT_VERSION - 1
        entry.write_text(json.dumps(document))
    saturation_fits.cache_clear()
    rebuilt = saturation_fits("Toluene")
    assert built == ["Toluene", "Toluene"]
    _same(good, rebuilt)
    assert json.loads(entry.read_text())["checksum"] == fit_cache._checksum(json.loads(entry.read_text())["payload"])


def test_no_cache_neither_reads_nor_writes(cache, monkeypatch):
    monkeypatch.setenv("TRAYSTACK_NO_CACHE", "1")
    assert fit_cache.fits_folder() is None
    assert fit_cache.store("saturation", {"fluid": "X"}, {"a": 1}) is None
    assert fit_cache.load("saturation", {"fluid": "X"}) is None
    saturation_fits("Water")
    assert not cache.exists()


def test_an_unwritable_cache_costs_time_only(tmp_path, monkeypatch):
    blocker = tmp_path / "a file"
    blocker.write_text("not a folder")
    monkeypatch.setenv("TRAYSTACK_CACHE_DIR", str(blocker))
    assert fit_cache.store("saturation", {"fluid": "X"}, {"a": 1.5}) is None
    assert fit_cache.load("saturation", {"fluid": "X"}) is None


def test_floats_come_back_exactly(cache):
    values = [0.1, 1 / 3, 2.0**-1074, 1.7976931348623157e308, -0.0, 6.02214076e23]
    fit_cache.store("test", {"fluid": "X", "tuple": (1.0, 2.0)}, {"values": values})
    assert fit_cache.load("test", {"fluid": "X", "tuple": (1.0, 2.0)})["values"] == values
    assert fit_cache.load("test", {"fluid": "X", "tuple": (1.0, 2.5)}) is None


_WRITER = """
import sys
from solver.thermo.chebyshev_fits import saturation_fits
fits = saturation_fits("Benzene")
print(repr(fits.wagner.coefficients.tolist()))
"""


def test_two_processes_writing_one_entry_leave_one_whole_entry(tmp_path):
    env = {**os.environ, "TRAYSTACK_CACHE_DIR": str(tmp_path / "cache"), "PYTHONPATH": str(ROOT)}
    env.pop("TRAYSTACK_NO_CACHE", None)
    writers = [subprocess.Popen([sys.executable, "-c", _WRITER], env=env, cwd=ROOT, stdout=subprocess.PIPE,
                                stderr=subprocess.PIPE, text=True) for _ in range(2)]
    outputs = [writer.communicate(timeout=300) for writer in writers]
    assert [writer.returncode for writer in writers] == [0, 0], [err for _, err in outputs]
    assert outputs[0][0] == outputs[1][0]
    folder = tmp_path / "cache" / f"fits-{fit_cache.FORMAT_VERSION}"
    assert [p.name for p in folder.iterdir() if p.name.endswith(".tmp")] == []
    (entry,) = folder.glob("saturation-Benzene-*.json")
    document = json.loads(entry.read_text())
    assert document["checksum"] == fit_cache._checksum(document["payload"])
    assert repr(document["payload"]["wagner"]["coefficients"]) == outputs[0][0].strip()


def _run(case: Path, out: Path, cache_dir: Path, *extra: str, importtime: bool = False) -> subprocess.CompletedProcess:
    env = {**os.environ, "TRAYSTACK_CACHE_DIR": str(cache_dir), "PYTHONPATH": str(ROOT)}
    env.pop("TRAYSTACK_NO_CACHE", None)
    command = [sys.executable, *(["-X", "importtime"] if importtime else []), "-m", "solver.cli", "run", str(case),
               "--out", str(out), "--quiet", *extra]
    return subprocess.run(command, env=env, cwd=ROOT, capture_output=True, text=True, timeout=600)


def test_cold_warm_and_no_cache_runs_give_identical_results_and_the_warm_run_imports_no_coolprop(tmp_path):
    case = ROOT / "cases" / "methanol_water.toml"
    cache_dir = tmp_path / "cache"
    cold = _run(case, tmp_path / "cold", cache_dir, importtime=True)
    assert cold.returncode == 0, cold.stderr
    assert "CoolProp" in cold.stderr  # the first run fits the curves from CoolProp
    entries = sorted(p.name for p in (cache_dir / f"fits-{fit_cache.FORMAT_VERSION}").iterdir())
    assert len(entries) == 4  # saturation and ideal gas of methanol and water
    warm = _run(case, tmp_path / "warm", cache_dir, importtime=True)
    assert warm.returncode == 0, warm.stderr
    imported = [line.split("|")[-1].strip() for line in warm.stderr.splitlines() if line.startswith("import time:")]
    assert "solver.engine" in imported  # the record is complete
    assert not [name for name in imported if name.lower().startswith("coolprop")]
    uncached = _run(case, tmp_path / "none", tmp_path / "unused", "--no-cache")
    assert uncached.returncode == 0, uncached.stderr
    assert not (tmp_path / "unused" / f"fits-{fit_cache.FORMAT_VERSION}").exists()
    reference = (tmp_path / "cold" / "result.json").read_bytes()
    assert (tmp_path / "warm" / "result.json").read_bytes() == reference
    assert (tmp_path / "none" / "result.json").read_bytes() == reference
