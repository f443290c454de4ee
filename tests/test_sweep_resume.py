"""An interrupted sweep resumes: the points it finished are kept in ``sweep_points.jsonl``, a
rerun into the same folder solves only the others, and the study comes out as an
uninterrupted one (the same numbers; with warm starts, the same within the solver's
tolerance, as the kept points' profiles start their neighbours)."""

from __future__ import annotations

import csv
import dataclasses
import io
from concurrent.futures import ThreadPoolExecutor
from pathlib import Path

import pytest

import solver.sweep as sweep_module
from solver.cli import main
from solver.sweep import load_document, parse_variation, run_sweep
from solver.sweep_log import LOG_NAME, PointLog

CASES = Path(__file__).resolve().parent.parent / "cases"
CASE = CASES / "methanol_water.toml"


def without_seconds(outcomes):
    return [dataclasses.replace(o, seconds=0.0, profile=None) for o in outcomes]


@pytest.mark.parametrize("warm", [False, True])
def test_only_the_missing_points_are_solved(tmp_path, monkeypatch, warm):
    document = load_document(CASE)
    variations = [parse_variation("specs.reflux_ratio=1.5:2.5:3"), parse_variation("feeds[0].stage=10:14:2")]
    log = PointLog(tmp_path / LOG_NAME, document, variations, warm)
    with ThreadPoolExecutor(max_workers=1) as executor:
        full = run_sweep(document, variations, executor, warm=warm, progress=log.append)
    log.close()
    lines = (tmp_path / LOG_NAME).read_text().splitlines()
    assert len(lines) == 1 + 6
    # interrupted after points 1, 2 and 5; the line of point 6 cut short
    (tmp_path / LOG_NAME).write_text("\n".join([lines[0], lines[1], lines[2], lines[5]]) + "\n" + lines[6][:50])
    log = PointLog(tmp_path / LOG_NAME, document, variations, warm)
    assert sorted(log.done) == [0, 1, 4]
    assert all(o.profile is not None for o in log.done.values())
    solved = []
    real = sweep_module.solve_point
    monkeypatch.setattr(sweep_module, "solve_point", lambda index, *rest: solved.append(index) or real(index, *rest))
    with ThreadPoolExecutor(max_workers=1) as executor:
        resumed = run_sweep(document, variations, executor, warm=warm, progress=log.append, done=log.done)
    log.close()
    assert sorted(solved) == [2, 3, 5]
    assert [o.index for o in resumed.outcomes] == list(range(6)) and not resumed.partial
    if not warm:
        assert without_seconds(resumed.outcomes) == without_seconds(full.outcomes)
    for again, first in zip(resumed.outcomes, full.outcomes):
        assert again.converged and first.converged
        assert again.reboiler_duty == pytest.approx(first.reboiler_duty, rel=1e-7)
        assert again.products["bottoms"][1] == pytest.approx(first.products["bottoms"][1], abs=1e-9)
    # the kept points are the very records of the first run
    assert [o.seconds for o in resumed.outcomes if o.index in (0, 1, 4)] == \
        [o.seconds for o in full.outcomes if o.index in (0, 1, 4)]
    assert len((tmp_path / LOG_NAME).read_text().splitlines()) == 7
    # another study (other values) into the same folder starts afresh
    other = [parse_variation("specs.reflux_ratio=1.5:2.5:4"), variations[1]]
    assert PointLog(tmp_path / LOG_NAME, document, other, warm).done == {}


def test_sweep_command_resumes_into_the_same_folder(capsys, tmp_path):
    command = ["sweep", str(CASE), "--vary", "specs.reflux_ratio=1.5:2.5:4", "--cold", "--out", str(tmp_path)]
    assert main(command) == 0
    capsys.readouterr()
    first = list(csv.DictReader(io.StringIO((tmp_path / "sweep.csv").read_text())))
    lines = (tmp_path / LOG_NAME).read_text().splitlines()
    (tmp_path / LOG_NAME).write_text("\n".join(lines[:3]) + "\n")
    assert main(command) == 0
    out = capsys.readouterr().out
    assert "resuming: 2 of 4 points already solved" in out
    again = list(csv.DictReader(io.StringIO((tmp_path / "sweep.csv").read_text())))
    for row in first + again:
        row.pop("seconds")
    assert again == first
    assert main(command[:-3] + ["--out", str(tmp_path)]) == 0  # warm is another study: solved afresh
    assert "resuming" not in capsys.readouterr().out


def test_a_network_sweep_resumes_from_its_log(capsys, tmp_path):
    """A network's points keep their unknowns (a NetworkStart) and exchanger duties in the log."""
    from conftest import NETWORK_EXAMPLE

    command = ["sweep", str(NETWORK_EXAMPLE), "--vary", "feeds[0].flow=95 kmol/h:105 kmol/h:3", "--out", str(tmp_path)]
    assert main(command) == 0
    capsys.readouterr()
    first = list(csv.DictReader(io.StringIO((tmp_path / "sweep.csv").read_text())))
    lines = (tmp_path / LOG_NAME).read_text().splitlines()
    (tmp_path / LOG_NAME).write_text("\n".join(lines[:2]) + "\n")
    log = PointLog(tmp_path / LOG_NAME, load_document(NETWORK_EXAMPLE),
                   [parse_variation("feeds[0].flow=95 kmol/h:105 kmol/h:3")], True)
    kept = log.done[0]
    log.close()
    assert kept.duties and type(kept.profile).__name__ == "NetworkStart" and set(kept.profile.duties) == set(kept.duties)
    assert main(command) == 0
    assert "resuming: 1 of 3 points already solved" in capsys.readouterr().out
    again = list(csv.DictReader(io.StringIO((tmp_path / "sweep.csv").read_text())))
    assert [row["status"] for row in again] == ["converged"] * 3
    for old, new in zip(first, again):
        assert float(new["stripper.bottoms_flow_mol_s"]) == pytest.approx(float(old["stripper.bottoms_flow_mol_s"]), rel=1e-7)
        duty_keys = [key for key in old if key.startswith("duty_")]
        assert duty_keys and all(float(new[k]) == pytest.approx(float(old[k]), rel=1e-6) for k in duty_keys)
