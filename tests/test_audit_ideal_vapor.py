"""The audit of a pressure column beside ideal-vapor K-values: how far modified Raoult's law
would move the design (reflux and stages needed at the same products), the IDEAL_VAPOR_SHIFT
flag, and where it is shown (result.json, screen tables, summary.md)."""

from __future__ import annotations

import json
from pathlib import Path

import pytest

from solver.audit import audit_case, column_variant, impurity_ratio
from solver.audit.ideal_vapor import IdealVaporComparison, ideal_vapor_case, ideal_vapor_shift
from solver.audit.thresholds import DEFAULT_THRESHOLDS
from solver.case import load_case
from solver.engine import simulate
from solver.reports.audit_tables import audit_markdown, audit_tables, ideal_vapor_rows
from solver.reports.display import display_units

CASES = Path(__file__).resolve().parent.parent / "cases"


@pytest.fixture(scope="module")
def lpg():
    """The LPG splitter at 10 bar on Peng-Robinson (both components below their critical
    temperatures, so ideal-vapor K-values can be used and compared)."""
    return audit_case(load_case(CASES / "lpg_splitter.toml"))


def _flag(report, code):
    found = [f for f in report.flags if f.code == code]
    assert len(found) == 1, [f.code for f in report.flags]
    return found[0]


def test_ideal_vapor_moves_the_lpg_splitter_design_beyond_the_thresholds(lpg):
    """At 10 bar ideal-vapor K-values overstate the propane/n-butane volatility (Peng-Robinson's
    fugacity coefficients of the vapor pull K of the lighter component down more): the column
    would seem to need much less reflux and fewer stages."""
    comparison = lpg.ideal_vapor
    assert comparison is not None and comparison.applicable and comparison.model == "Peng-Robinson"
    # the equation of state's answers are the audit's own
    assert comparison.equation_reflux == pytest.approx(lpg.reflux_needed.reflux_ratio, rel=1e-12)
    assert comparison.equation_stages == lpg.stages_needed.stages
    assert comparison.reflux_shift < -0.10 and comparison.stage_shift < -1
    flag = _flag(lpg, "IDEAL_VAPOR_SHIFT")
    assert flag.severity == "serious"  # beyond three times the 10 % reflux threshold
    assert flag.numbers["ideal_reflux"] == pytest.approx(comparison.ideal_reflux)
    assert "Peng-Robinson" in flag.message and "reflux needed would be" in flag.message


def test_ideal_vapor_reflux_is_that_of_an_independent_solve_with_modified_raoult(lpg):
    """The comparison's reflux at the shortcut's stage count equals a cold solve of the same
    column with ``liquid = "ideal"`` built here (no warm start), which meets the targets."""
    comparison = lpg.ideal_vapor
    case = load_case(CASES / "lpg_splitter.toml")
    ideal = ideal_vapor_case(case)
    assert ideal.thermo.liquid == "ideal" and ideal.thermo.vapor == "ideal"
    targets = lpg.shortcut.basis.targets
    variant, _ = column_variant(ideal, comparison.stages, comparison.feed_stage, targets)
    result = simulate(variant)
    assert result.converged and result.thermo["k_value_model"].startswith("modified Raoult")
    assert result.reflux_ratio == pytest.approx(comparison.ideal_reflux, rel=1e-6)
    z = case.feeds[0].composition
    assert all(impurity_ratio(result, t, z) <= 1.0 + 1e-6 for t in targets)


def test_ideal_vapor_comparison_in_result_file_screen_and_summary(lpg):
    document = json.loads(lpg.result.to_json())
    record = document["audit"]["ideal_vapor"]
    assert record["applicable"] is True and record["model"] == "Peng-Robinson"
    assert record["reflux_needed"]["ideal_vapor"] == pytest.approx(lpg.ideal_vapor.ideal_reflux)
    assert record["stages_needed"]["shift"] == lpg.ideal_vapor.stage_shift
    assert record["flag"]["code"] == "IDEAL_VAPOR_SHIFT"
    assert "IDEAL_VAPOR_SHIFT" in {f["code"] for f in document["audit"]["flags"]}
    units = display_units()
    title, header, rows, note = ideal_vapor_rows(lpg)
    assert header[1:3] == ["Peng-Robinson", "ideal vapor"] and note == ""
    assert rows[0][3] == f"{100 * lpg.ideal_vapor.reflux_shift:+.1f} %"
    assert any(t.title == title for t in audit_tables(lpg.result, units))
    markdown = "\n".join(audit_markdown(lpg.result, units))
    assert "## Ideal-vapor K-values beside Peng-Robinson" in markdown and rows[1][0] in markdown


def test_where_ideal_vapor_cannot_describe_the_column_the_audit_says_why():
    """The depropanizer at 16 bar: its bottom stages are above ethane's critical temperature,
    where a vapor pressure does not exist; the comparison is not applicable and an info flag
    names the reason."""
    report = audit_case(load_case(CASES / "depropanizer.toml"))
    comparison = report.ideal_vapor
    assert not comparison.applicable and "critical temperature of ethane" in comparison.reason
    assert comparison.ideal_reflux is None and comparison.stages_needed is None
    flag = _flag(report, "IDEAL_VAPOR_SHIFT")
    assert flag.severity == "info" and "critical temperature of ethane" in flag.message
    *_, note = ideal_vapor_rows(report)
    assert note.startswith("Ideal-vapor K-values do not apply")


def _comparison(equation_reflux, ideal_reflux, equation_stages, ideal_stages):
    from solver.audit.search import StageSearch
    from solver.audit.variants import RigorousRun

    run = RigorousRun("ideal", 30, 15, (), True, reflux_ratio=ideal_reflux)
    search = StageSearch(2.0, 1.0, ideal_stages, 15, True, None, ())
    return IdealVaporComparison("Peng-Robinson", True, "", 30, 15, 2.0, equation_reflux, equation_stages, run, search)


@pytest.mark.parametrize("ideal_reflux, ideal_stages, severity", [
    (2.1, 30, None),          # 5 % and no stage: within the thresholds
    (2.3, 30, "warning"),     # 15 % reflux
    (1.3, 30, "serious"),     # -35 %: beyond three times 10 %
    (2.0, 32, "warning"),     # two stages
    (2.0, 20, "serious"),     # ten stages, a third of the column
])
def test_ideal_vapor_shift_grades_against_the_audit_thresholds(ideal_reflux, ideal_stages, severity):
    flag = ideal_vapor_shift(_comparison(2.0, ideal_reflux, 30, ideal_stages), DEFAULT_THRESHOLDS)
    assert (flag.severity if flag else None) == severity


def test_no_comparison_for_activity_models():
    """A modified-Raoult case already has an ideal vapor: nothing to compare."""
    from conftest import methanol_water_case

    assert ideal_vapor_shift(None, DEFAULT_THRESHOLDS) is None
    case = methanol_water_case()
    assert ideal_vapor_case(case).thermo.liquid == case.thermo.liquid
