"""Screen tables and summary.md: display units, specifications, cautions, the Markdown layout."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest
from rich.console import Console

from conftest import methanol_water_case
from solver.audit import Flag, SolutionAudit
from solver.errors import CaseError
from solver.newton import NewtonOptions
from solver.reports import (
    CAUTION,
    cautions,
    display_units,
    spec_rows,
    summary_markdown,
    summary_tables,
    write_summary,
)
from solver.engine import simulate


@pytest.fixture(scope="module")
def result():
    return simulate(methanol_water_case(stages=10, feed_stage=6))


@pytest.fixture(scope="module")
def unconverged():
    return simulate(methanol_water_case(stages=10, feed_stage=6), options=NewtonOptions(max_iterations=1))


# ------------------------------------------------------------------ display units


def test_default_units_are_degC_bar_kmol_h_kW():
    units = display_units()
    assert units.T(373.15) == pytest.approx(100.0)
    assert units.P(1e5) == pytest.approx(1.0)
    assert units.F(1.0) == pytest.approx(3.6)
    assert units.Q(2500.0) == pytest.approx(2.5)
    assert units.temperature_label == "°C"


def test_si_preset_and_key_value_overrides():
    si = display_units({"temperature": "degC"}, "si")
    assert (si.T(300.0), si.P(101325.0), si.F(2.0), si.Q(7.0)) == pytest.approx((300.0, 101325.0, 2.0, 7.0))
    units = display_units({"pressure": "kPa"}, "temperature=degF, duty=Btu/h")
    assert units.T(373.15) == pytest.approx(212.0)
    assert units.P(101325.0) == pytest.approx(101.325)  # from the case's [display] table
    assert units.Q(1055.05585262 / 3.6) == pytest.approx(1000.0, rel=1e-6)  # 1 Btu = 1055.05585262 J (IT)
    assert units.temperature_label == "°F"


@pytest.mark.parametrize(
    "display, override, named",
    [
        ({}, "flow", "--units"),
        ({}, "colour=red", "--units"),
        ({}, "flow=furlong", "--units flow"),
        ({}, "temperature=kPa", "--units temperature"),
        ({"duty": "kg"}, None, "display.duty"),
    ],
)
def test_bad_units_name_where_they_came_from(display, override, named):
    with pytest.raises(CaseError) as caught:
        display_units(display, override)
    assert named in str(caught.value)


# ------------------------------------------------------------------ specs and cautions


def test_spec_rows_use_display_units():
    case = methanol_water_case(specs='distillate_rate = "35 kmol/h"\nbottoms = { water = 0.995 }\nreflux_subcooling = "5 K"')
    result = simulate(case)
    rows = dict(spec_rows(result, display_units()))
    assert rows["specs.distillate_rate"] == "35 kmol/h"
    assert rows["specs.bottoms.water"] == "x water = 0.995 in the bottoms"
    assert rows["specs.reflux_subcooling"].startswith("5 K")


def test_a_converged_result_at_1_atm_has_only_the_general_caution(result):
    assert cautions(result) == [CAUTION]


def test_cautions_for_unconverged_high_pressure_near_critical_and_audit_flags(result, unconverged):
    assert cautions(unconverged)[0].startswith("NOT CONVERGED")
    pressurized = dataclasses.replace(result, pressure=result.pressure * 10)
    assert any("ideal vapor" in text for text in cautions(pressurized))
    methanol_critical = result.thermo["components"][0]["critical_temperature"]
    hot = dataclasses.replace(result, temperature=np.full(result.stage_count, 0.9 * methanol_critical))
    near = [text for text in cautions(hot) if "T/Tc" in text]
    assert any(text.startswith("methanol reaches T/Tc = 0.900") for text in near)
    flagged = result.with_extra(audit=SolutionAudit(True, flags=(Flag("CMO_DRIFT", "warning", "V falls 8 %"),)))
    assert "[warning] CMO_DRIFT: V falls 8 %" in cautions(flagged)
    assert cautions(flagged)[-1] == CAUTION


# ------------------------------------------------------------------ tables and Markdown


def test_summary_tables_render_in_the_chosen_units(result):
    console = Console(record=True, width=200)
    for table in summary_tables(result, display_units(None, "temperature=degF,flow=mol/s")):
        console.print(table)
    text = console.export_text()
    assert "T / °F" in text and "flow / mol/s" in text and "specs.reflux_ratio" in text
    assert f"{result.temperature[-1] * 1.8 - 459.67:.2f}" in text
    assert f"{result.distillate_flow:.5g}" in text


def test_summary_markdown_sections_and_numbers(result):
    text = summary_markdown(result, display_units(), ["temperature.png", "yx.png"])
    headings = [line for line in text.splitlines() if line.startswith("## ")]
    assert headings == ["## Specifications", "## Feeds", "## Products", "## Duties", "## Stages", "## Convergence",
                        "## Plots", "## Cautions"]
    assert "**Converged**" in text
    assert f"| distillate | 1 | liquid | {result.distillate_flow * 3.6:.6g} |" in text
    assert f"| reboiler duty / kW | {result.reboiler_duty / 1e3:.6g} |" in text
    stage_rows = [line for line in text.split("## Stages")[1].split("## Convergence")[0].splitlines() if line.startswith("| ")]
    assert len(stage_rows) == 2 + result.stage_count  # header, rule, one per stage
    assert "![yx](yx.png)" in text
    assert text.rstrip().splitlines()[-3] == f"- {CAUTION}"


def test_unconverged_summary_says_so_and_has_no_plots_section(unconverged):
    text = summary_markdown(unconverged, display_units())
    assert "**NOT CONVERGED** after 1 iterations" in text
    assert "## Plots" not in text


def test_write_summary_writes_the_markdown(result, tmp_path):
    path = write_summary(result, tmp_path / "deep" / "summary.md", display_units())
    assert path.read_text(encoding="utf-8") == summary_markdown(result, display_units())


# ------------------------------------------------------------------ the audit's tables


@pytest.fixture(scope="module")
def audited():
    from solver.audit import audit_case

    return audit_case(methanol_water_case(stages=12, feed_stage=7)).result


def test_side_by_side_table_sets_the_shortcut_beside_the_rigorous_columns(audited):
    from solver.reports import side_by_side_rows

    header, rows = side_by_side_rows(audited, display_units())
    assert header == ["quantity", "McCabe-Thiele", "Ponchon-Savarit", "rigorous: at design", "rigorous: R needed",
                      "rigorous: N needed", "rigorous: the case"]
    by_name = {row[0]: row for row in rows}
    document = audited.to_dict()
    shortcut, audit = document["shortcut"], document["audit"]
    assert by_name["stages"][1] == str(shortcut["stages"]) == by_name["stages"][3]
    assert by_name["reflux ratio L/D"][4] == f"{audit['reflux_at_shortcut_stages']['reflux_ratio']:.4g}"
    assert by_name["reboiler duty / kW"][3] == f"{audited.reboiler_duty / 1e3:.5g}"
    assert by_name["impurity ratio 2"][3] == f"{audit['rigorous_at_shortcut_design']['impurity_ratios'][1]:.3f}"
    assert all(len(row) == len(header) for row in rows)


def test_audit_sections_of_the_summary_and_screen_tables(audited):
    from solver.reports import audit_tables

    text = summary_markdown(audited, display_units(), ["yx.png"])
    headings = [line for line in text.splitlines() if line.startswith("## ")]
    assert headings[headings.index("## Convergence") + 1:] == [
        "## Shortcut and rigorous, side by side", "## CMO audit", "## Audit flags", "## Plots", "## Cautions"]
    cmo_rows = [line for line in text.split("## CMO audit")[1].split("## Audit flags")[0].splitlines() if line.startswith("| ")]
    assert len(cmo_rows) == 2 + audited.stage_count
    for item in audited.to_dict()["audit"]["flags"]:
        assert f"| {item['severity']} | {item['code']} |" in text
        assert f"[{item['severity']}] {item['code']}" in text  # also among the cautions
    console = Console(record=True, width=200)
    for table in audit_tables(audited, display_units()):
        console.print(table)
    screen = console.export_text()
    assert "shortcut and rigorous side by side" in screen and "CMO audit" in screen and "audit flags" in screen


def test_a_solution_audit_has_no_side_by_side_section(result):
    from solver.audit import audit_solution

    case = methanol_water_case(stages=10, feed_stage=6)
    text = summary_markdown(audit_solution(case, result), display_units())
    assert "## CMO audit" in text and "## Audit flags" in text and "side by side" not in text


def test_shortcut_tables_show_both_binary_designs_and_where_the_targets_came_from(audited):
    from solver.reports import basis_rows, shortcut_rows

    header, rows = shortcut_rows(audited.extra["shortcut"], display_units())
    assert header == ["quantity", "McCabe-Thiele", "Ponchon-Savarit"]
    assert any(row[0] == "minimum reflux ratio (pinch)" and "(feed)" in row[1] for row in rows)
    basis = basis_rows(audited.extra["shortcut"])
    assert [row[0] for row in basis] == ["target 1", "target 2", "reflux"]
    assert basis[0][2] == "rigorous solution of the case as specified" and basis[2][2] == "case specs (reflux_ratio)"
