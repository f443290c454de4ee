"""The output of a network run (solver/reports/network_summary.py, solver/reports/network_tables.py,
solver/network_plot.py, NetworkResult.stages_csv): one stages.csv with each row led by its
column, summary.md with tables per column (specs with the value reached, products, duties,
connections) and each column's temperature and composition profiles."""

from __future__ import annotations

import csv
import io
import json

import pytest

from conftest import NETWORK_EXAMPLE, network_example_case
from solver.cli import main
from solver.network_engine import simulate_network
from solver.network_graph import check_network
from solver.network_plot import column_marks, column_profile_files
from solver.network_specs import resolve_specs
from solver.spec_kinds import SPEC_REGISTRY
from solver.newton import NewtonOptions
from solver.reports import display_units
from solver.reports.network_summary import network_summary_markdown
from solver.reports.network_tables import spec_column, spec_rows

PNG = b"\x89PNG\r\n\x1a\n"


@pytest.fixture(scope="module")
def example_run(tmp_path_factory):
    out = tmp_path_factory.mktemp("network_run")
    assert main(["run", str(NETWORK_EXAMPLE), "--out", str(out), "--quiet"]) == 0
    return out


def test_stages_csv_is_one_table_led_by_the_column(example_run):
    data = json.loads((example_run / "result.json").read_text())
    rows = list(csv.DictReader(io.StringIO((example_run / "stages.csv").read_text())))
    assert list(rows[0])[:3] == ["column", "stage", "role"]
    assert [row["column"] for row in rows] == ["main"] * 20 + ["stripper"] * 5
    assert [int(row["stage"]) for row in rows] == list(range(1, 21)) + list(range(1, 6))
    for row, stage in zip(rows, data["stages"]):
        assert float(row["T_K"]) == pytest.approx(stage["T"], abs=1e-6)
        assert float(row["x_benzene"]) == pytest.approx(stage["x"][0], rel=1e-8, abs=1e-15)
    # main stage 12 sends the free connection's liquid to the stripper (a rate connection)
    assert float(rows[11]["transfer_liquid_mol_s"]) == pytest.approx(data["connections"]["to-stripper"]["flow"], rel=1e-8)
    assert float(rows[0]["liquid_draw_mol_s"]) == pytest.approx(data["products"]["main.distillate"]["flow"], rel=1e-8)


def test_summary_has_the_tables_of_each_column(example_run):
    text = (example_run / "summary.md").read_text()
    for heading in ("## Column main", "## Column stripper", "### Specifications of main", "### Products of stripper",
                    "### Duties of stripper", "### Connections of main", "### Stages of stripper", "## Connections"):
        assert heading in text, heading
    main_part, stripper_part = text.split("## Column stripper")
    assert "| stripper.bottoms |" in stripper_part and "| stripper.bottoms |" not in main_part.split("## Column main")[1]
    assert "| main.reboiler |" in main_part and "| main.reboiler |" not in stripper_part.split("## Connections")[0]
    # the boilup ratio is the stripper's spec, the stripper-bottoms flow too (it names that product)
    assert "| columns[1].specs.boilup_ratio | boilup ratio | 0.8 | 0.8 |" in stripper_part
    assert "| specs[0].flow | product flow | 30 kmol/h | 30 kmol/h |" in stripper_part
    for name in ("network.png", "temperature_main.png", "compositions_stripper.png"):
        assert f"]({name})" in text
        assert (example_run / name).read_bytes()[:8] == PNG


def test_every_spec_reaches_its_target():
    """The reached value each registry entry reads from the reported streams equals the target
    the Newton solution met (independent of the residual rows that set it)."""
    def variant(data):  # a spec on the free connection's fraction, a recovery and a stage temperature
        data["specs"] = [{"on": "to-stripper", "fraction": 0.45}]
        data["columns"][0]["specs"] = {"reflux_ratio": 2.5, "recovery": {"benzene": {"distillate": 0.95}}}
    for case in (network_example_case(), network_example_case(variant)):
        result = simulate_network(case)
        assert result.converged, result.message
        specs = resolve_specs(case, check_network(case))
        for row in specs:
            reached = SPEC_REGISTRY[row.kind].achieved(result, row)
            assert reached == pytest.approx(row.value, rel=1e-6), row.label
    assert {row.kind for row in specs} == {"reflux_ratio", "recovery", "boilup_ratio", "connection_fraction"}
    assert {row.label: spec_column(result, row) for row in specs}["specs[0].fraction"] == "main"  # leaves main


def test_unconverged_summary_says_so_and_reaches_nothing(tmp_path):
    case = network_example_case()
    result = simulate_network(case, options=NewtonOptions(max_iterations=1))
    assert not result.converged
    units = display_units()
    specs = resolve_specs(case, check_network(case))
    assert all(row[3] == "-" for row in spec_rows(result, specs, units))
    assert "**NOT CONVERGED**" in network_summary_markdown(result, units, specs)


def test_unconverged_run_removes_the_old_pictures(tmp_path):
    out = tmp_path / "out"
    assert main(["run", str(NETWORK_EXAMPLE), "--out", str(out), "--quiet"]) == 0
    assert (out / "temperature_stripper.png").exists()
    assert main(["run", str(NETWORK_EXAMPLE), "--out", str(out), "--quiet", "--max-iterations", "1"]) == 3
    assert not (out / "temperature_stripper.png").exists() and not (out / "network.png").exists()
    assert "NOT CONVERGED" in (out / "summary.md").read_text()


def test_column_marks_and_file_names():
    result = simulate_network(network_example_case())
    assert column_marks(result, "stripper") == [(1, "from a connection"), (1, "to a connection")]
    marks = column_marks(result, "main")
    assert (10, "feed") in marks and (12, "to a connection") in marks and (11, "from a connection") in marks
    assert (8, "to a connection") in marks and (6, "from a connection") in marks  # the pumparound
    assert column_profile_files(result)["main"] == ("temperature_main.png", "compositions_main.png")
