"""Result writers: atomic files, JSON without NaN, CSV layout, closures."""

from __future__ import annotations

import csv
import io
import json
import os

import pytest

from conftest import methanol_water_case
from solver.results import write_atomic, write_result_json, write_stages_csv
from solver.engine import simulate


@pytest.fixture(scope="module")
def result():
    return simulate(methanol_water_case(stages=10, feed_stage=6))


def test_json_round_trip_and_no_nan(result, tmp_path):
    path = write_result_json(result, tmp_path / "out" / "result.json")
    text = path.read_text()
    document = json.loads(text)
    assert "NaN" not in text and "Infinity" not in text
    assert document["products"]["distillate"]["flow"] == pytest.approx(result.distillate_flow)
    assert len(document["stages"]) == 10
    assert document["balances"]["component_closure_max"] < 1e-10


def test_csv_has_a_row_per_stage(result, tmp_path):
    path = write_stages_csv(result, tmp_path / "stages.csv")
    rows = list(csv.reader(io.StringIO(path.read_text())))
    assert rows[0][:3] == ["stage", "role", "T_K"]
    assert "x_methanol" in rows[0] and "K_water" in rows[0]
    assert len(rows) == 11
    assert float(rows[-1][2]) == pytest.approx(result.temperature[-1], abs=1e-5)


def test_atomic_write_leaves_no_partial_file(tmp_path):
    target = tmp_path / "result.json"
    target.write_text("previous")

    class Boom(bytes):
        pass

    with pytest.raises(TypeError):
        write_atomic(target, object())  # cannot be encoded: nothing is replaced
    assert target.read_text() == "previous"
    assert [p.name for p in tmp_path.iterdir()] == ["result.json"]
    write_atomic(target, "new")
    assert target.read_text() == "new"
    assert not any(name.endswith(".tmp") for name in os.listdir(tmp_path))


def test_energy_closure_recomputed_from_streams(result):
    balances = result.balances()
    assert balances["energy_closure_rel"] < 1e-10
    # a wrong duty shows up in the closure
    import dataclasses

    broken = dataclasses.replace(result, duty=result.duty * 1.01)
    assert broken.balances()["energy_closure_rel"] > 1e-4


def test_atomic_write_gives_ordinary_permissions(tmp_path):
    target = write_atomic(tmp_path / "fresh.json", "{}")
    umask = os.umask(0)
    os.umask(umask)
    assert target.stat().st_mode & 0o777 == 0o666 & ~umask


def test_the_case_a_result_records_reads_back_typed(result):
    """Reports and plots read the recorded case through typed properties: they give back the
    specs, side heaters, reflux settings and warnings of the case the result came from."""
    import dataclasses

    from solver.engine import case_summary

    case = methanol_water_case(specs='reflux_ratio = 1.4\nbottoms = { water = 0.995 }\nreflux_subcooling = "5 K"\n'
                                     '[[column.heaters]]\nstage = 4\nduty = "5 kW"')
    recorded = dataclasses.replace(result, case=case_summary(case))
    assert recorded.specs == case.specs and [s.kind for s in recorded.specs] == ["reflux_ratio", "mole_fraction"]
    assert recorded.stage_duties == case.column.stage_duties
    assert recorded.stage_duties[0].stage == 4 and recorded.stage_duties[0].duty == pytest.approx(5000.0)
    assert recorded.reflux_subcooling == pytest.approx(5.0) and recorded.reflux_temperature is None
    assert recorded.case_warnings == tuple(case.warnings)
    assert list(recorded.stated_efficiencies) == list(case.column.efficiencies)
