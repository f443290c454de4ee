"""Studies on a Dask cluster (``--scheduler``): a small ``distributed.LocalCluster`` of two
worker processes gives exactly the numbers of the serial run for ``uncertainty``, ``sweep`` and
``check``; without Dask, or with an address that is not one, the command exits 2 saying why."""

from __future__ import annotations

import csv
import io
import json
import sys
from pathlib import Path

import pytest

from solver.cli import main

distributed = pytest.importorskip("distributed")

CASES = Path(__file__).resolve().parent.parent / "cases"
UNCERTAIN = CASES / "methanol_water_uncertain.toml"


@pytest.fixture(scope="module")
def scheduler():
    cluster = distributed.LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None)
    yield cluster.scheduler_address
    cluster.close()


def run(capsys, *args) -> tuple[int, str, str]:
    code = main([str(arg) for arg in args])
    captured = capsys.readouterr()
    return code, captured.out, captured.err


def test_uncertainty_on_the_cluster_equals_the_serial_run(capsys, tmp_path, scheduler):
    common = ("uncertainty", UNCERTAIN, "--samples", "8", "--seed", "21")
    code, _, err = run(capsys, *common, "--out", tmp_path / "serial")
    assert code == 0, err
    code, _, err = run(capsys, *common, "--scheduler", scheduler, "--out", tmp_path / "cluster")
    assert code == 0, err
    serial, cluster = (json.loads((tmp_path / name / "uncertainty.json").read_text()) for name in ("serial", "cluster"))
    for data in (serial, cluster):
        data.pop("seconds")
    assert cluster == serial  # every percentile, bit for bit
    assert serial["as_operated"]["converged"] == 8


def _sweep_rows(folder: Path) -> list[dict]:
    rows = list(csv.DictReader(io.StringIO((folder / "sweep.csv").read_text())))
    return [{key: value for key, value in row.items() if "second" not in key} for row in rows]


@pytest.mark.parametrize("mode", [("--cold",), ("--jobs", "1")])
def test_sweep_on_the_cluster_equals_the_serial_run(capsys, tmp_path, scheduler, mode):
    common = ("sweep", CASES / "methanol_water.toml", "--vary", "specs.reflux_ratio=1.3:1.7:4", *mode)
    code, _, err = run(capsys, *common, "--out", tmp_path / "serial")
    assert code == 0, err
    code, _, err = run(capsys, *common, "--scheduler", scheduler, "--out", tmp_path / "cluster")
    assert code == 0, err
    serial = _sweep_rows(tmp_path / "serial")
    assert len(serial) == 4 and _sweep_rows(tmp_path / "cluster") == serial


def test_check_on_the_cluster(capsys, scheduler):
    code, out, err = run(capsys, "check", CASES / "benzene_toluene.toml", "--scheduler", scheduler)
    assert code == 0, err
    assert "1 pass" in out


def test_without_dask_the_message_says_what_to_install(capsys, tmp_path, monkeypatch):
    monkeypatch.setitem(sys.modules, "distributed", None)  # import distributed -> ImportError
    code, _, err = run(capsys, "sweep", CASES / "methanol_water.toml", "--vary", "specs.reflux_ratio=1.3:1.7:2",
                       "--scheduler", "tcp://127.0.0.1:8786", "--out", tmp_path)
    assert code == 2
    assert 'pip install "traystack[distributed]"' in err and "--scheduler" in err and "Traceback" not in err


def test_an_address_that_is_not_one_exits_2(capsys, tmp_path):
    code, _, err = run(capsys, "uncertainty", UNCERTAIN, "--samples", "2", "--scheduler", "localhost", "--out", tmp_path)
    assert code == 2
    assert "--scheduler" in err and "localhost" in err and "tcp://HOST:PORT" in err
