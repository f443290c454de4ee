"""Baselines for CI: what they record, how they are compared, when they are written, JUnit XML."""

from __future__ import annotations

import copy
import json
import textwrap
import xml.etree.ElementTree as ElementTree
from concurrent.futures import ProcessPoolExecutor, ThreadPoolExecutor
from pathlib import Path

import pytest

from conftest import BINARY_NRTL, case_from_text
from solver.errors import CaseError
from solver.regress import (
    BASELINE_SCHEMA,
    DEFAULT_TOLERANCES,
    DRIFT,
    FAILED,
    NO_BASELINE,
    PASS,
    UPDATED,
    WRITTEN,
    CaseCheck,
    baseline_from_result,
    baseline_path,
    check_case,
    check_cases,
    compare_baselines,
    find_cases,
    junit_xml,
    tolerances_for,
    write_baseline,
)
from solver.engine import simulate

CASES = Path(__file__).resolve().parent.parent / "cases"

CASE_TEXT = textwrap.dedent(
    BINARY_NRTL.format(
        enthalpy="rigorous", stages=10, condenser="total", efficiency=1.0, feed_stage=6, feed_temperature="65 degC",
        specs="reflux_ratio = 1.4\nbottoms = { water = 0.995 }",
    )
)


@pytest.fixture(scope="module")
def baseline():
    return baseline_from_result(simulate(case_from_text(CASE_TEXT)), "cases/column.toml")


def moved(baseline, change):
    current = copy.deepcopy(baseline)
    change(current)
    return current


# ------------------------------------------------------------------ what a baseline holds


def test_baseline_records_the_quantities_ci_compares(baseline):
    assert baseline["schema"] == BASELINE_SCHEMA and baseline["case"] == "column.toml"
    assert baseline["converged"] is True and baseline["traystack_version"]
    assert baseline["duties"]["condenser"] < 0 < baseline["duties"]["reboiler"]
    assert baseline["reflux_ratio"] == pytest.approx(1.4)
    assert baseline["products"]["bottoms"]["composition"]["water"] == pytest.approx(0.995)
    assert len(baseline["stage_temperatures"]) == 10
    assert baseline["audit_flags"] == []
    assert json.loads(json.dumps(baseline, allow_nan=False)) == baseline


def test_tolerances_come_from_check_table_else_defaults():
    case = case_from_text(CASE_TEXT + '\n[check]\ntolerances = { duty_rel = 1e-3, temperature_abs = "0.5 K" }\n')
    tolerances = tolerances_for(case)
    assert tolerances["duty_rel"] == 1e-3 and tolerances["temperature_abs"] == 0.5
    assert tolerances["flow_rel"] == DEFAULT_TOLERANCES["flow_rel"]
    assert tolerances["composition_abs"] == DEFAULT_TOLERANCES["composition_abs"]


# ------------------------------------------------------------------ comparison


def test_identical_baselines_have_no_deviation(baseline):
    assert compare_baselines(baseline, copy.deepcopy(baseline), DEFAULT_TOLERANCES) == []


def test_each_quantity_is_compared_with_its_own_tolerance(baseline):
    def nudge(current):
        current["duties"]["reboiler"] *= 1 + 3e-6  # beyond duty_rel 1e-6
        current["duties"]["condenser"] *= 1 + 5e-7  # within
        current["products"]["distillate"]["composition"]["methanol"] += 2e-7  # beyond composition_abs 1e-7
        current["products"]["bottoms"]["flow"] *= 1 + 5e-7  # within flow_rel 1e-6
        current["stage_temperatures"][2] += 5e-4  # beyond temperature_abs 1e-4 K
        current["stage_temperatures"][3] += 5e-5  # within

    deviations = compare_baselines(baseline, moved(baseline, nudge), DEFAULT_TOLERANCES)
    assert [d.quantity for d in deviations] == [
        "stage_temperatures[3]", "duties.reboiler", "products.distillate.composition.methanol"
    ]  # worst (in multiples of the tolerance) first
    assert deviations[1].measure == "rel" and deviations[1].difference == pytest.approx(3e-6, rel=1e-3)
    assert deviations[0].measure == "abs" and deviations[0].excess == pytest.approx(5.0, rel=1e-6)
    assert "duties.reboiler" in deviations[1].describe() and "> 1e-06" in deviations[1].describe()
    looser = dict(DEFAULT_TOLERANCES, duty_rel=1e-5, temperature_abs=1e-3, composition_abs=1e-6)
    assert compare_baselines(baseline, moved(baseline, nudge), looser) == []


@pytest.mark.parametrize(
    "change, quantity",
    [
        (lambda b: b["stage_temperatures"].append(400.0), "stage count"),
        (lambda b: b.update(components=["ethanol", "water"]), "components"),
        (lambda b: b["products"].pop("bottoms"), "products.bottoms"),
        (lambda b: b.update(audit_flags=["CMO_DRIFT"]), "audit_flags"),
        (lambda b: b.update(boilup_ratio=None), "boilup_ratio"),
    ],
)
def test_structural_changes_are_deviations(baseline, change, quantity):
    deviations = compare_baselines(baseline, moved(baseline, change), DEFAULT_TOLERANCES)
    assert deviations[0].quantity == quantity and deviations[0].tolerance is None


# ------------------------------------------------------------------ checking case files


@pytest.fixture
def cases(tmp_path):
    (tmp_path / "column.toml").write_text(CASE_TEXT)
    return tmp_path


def test_check_case_without_baseline_then_pass_then_drift(cases):
    case_file = str(cases / "column.toml")
    first = check_case(case_file)
    assert first.status == NO_BASELINE and first.ok and first.current["converged"]
    write_baseline(baseline_path(case_file), first.current)
    assert check_case(case_file).status == PASS
    (cases / "column.toml").write_text(CASE_TEXT.replace("reflux_ratio = 1.4", "reflux_ratio = 1.5"))
    drifted = check_case(case_file)
    assert drifted.status == DRIFT and not drifted.ok
    quantities = {d.quantity for d in drifted.deviations}
    assert {"reflux_ratio", "duties.reboiler", "products.distillate.flow"} <= quantities


def test_bad_case_and_bad_baseline_are_failures_not_exceptions(cases):
    (cases / "broken.toml").write_text("[column\nstages = 3")
    broken = check_case(str(cases / "broken.toml"))
    assert broken.status == FAILED and "not valid TOML" in broken.message and not broken.ok
    (cases / "column.expected.json").write_text("{ not json")
    unreadable = check_case(str(cases / "column.toml"))
    assert unreadable.status == FAILED and "unreadable baseline column.expected.json" in unreadable.message


def test_check_cases_writes_only_what_update_asks_for(cases):
    (cases / "other.toml").write_text(CASE_TEXT.replace("stages = 10", "stages = 11"))
    files = find_cases(cases)
    assert [path.name for path in files] == ["column.toml", "other.toml"]
    with ThreadPoolExecutor(max_workers=1) as executor:
        seen = []
        checks = check_cases(files, executor, progress=seen.append)
        assert [c.status for c in checks] == [NO_BASELINE, NO_BASELINE] and len(seen) == 2
        assert not baseline_path(files[0]).exists()  # never written without update
        checks = check_cases(files[:1], executor, update=True)
        assert checks[0].status == WRITTEN
        written = baseline_path(files[0])
        before = (written.read_bytes(), written.stat().st_mtime_ns)
        assert check_cases(files[:1], executor, update=True)[0].status == PASS
        assert (written.read_bytes(), written.stat().st_mtime_ns) == before  # a passing baseline is left alone
        (cases / "column.toml").write_text(CASE_TEXT.replace("reflux_ratio = 1.4", "reflux_ratio = 1.45"))
        assert check_cases(files[:1], executor, update=True)[0].status == UPDATED
        assert json.loads(written.read_text())["reflux_ratio"] == pytest.approx(1.45)


def test_find_cases_needs_case_files(tmp_path):
    with pytest.raises(CaseError, match="no case files"):
        find_cases(tmp_path)
    with pytest.raises(CaseError, match="no such folder"):
        find_cases(tmp_path / "missing")
    (tmp_path / "one.toml").write_text("")
    assert find_cases(tmp_path / "one.toml") == [tmp_path / "one.toml"]


def test_junit_xml_counts_and_details():
    checks = [
        CaseCheck("a", "a.toml", PASS, seconds=1.0),
        CaseCheck("b", "b.toml", DRIFT, "1 quantity moved", seconds=2.0,
                  deviations=tuple(compare_baselines({"components": ["x"]}, {"components": ["y"]}, DEFAULT_TOLERANCES))),
        CaseCheck("c", "c.toml", FAILED, "did not converge"),
        CaseCheck("d", "d.toml", NO_BASELINE, "no baseline d.expected.json"),
    ]
    root = ElementTree.fromstring(junit_xml(checks, seconds=3.5))
    suite = root.find("testsuite")
    for element in (root, suite):
        assert {k: element.get(k) for k in ("tests", "failures", "errors", "skipped", "time")} == {
            "tests": "4", "failures": "1", "errors": "1", "skipped": "1", "time": "3.500"}
    cases = {case.get("name"): case for case in suite.findall("testcase")}
    assert list(cases["a"]) == []
    assert cases["b"].find("failure").get("type") == "drift" and "components" in cases["b"].find("failure").text
    assert cases["c"].find("error").get("message") == "did not converge"
    assert cases["d"].find("skipped") is not None


def test_the_repository_cases_match_their_baselines():
    """What `traystack check cases/` runs in CI: every case has a baseline and matches it."""
    files = find_cases(CASES)
    assert len(files) >= 6
    assert all(baseline_path(path).exists() for path in files), "every case in cases/ needs a baseline"
    with ProcessPoolExecutor(max_workers=2) as executor:
        checks = check_cases(files, executor)
    assert [(c.name, c.status) for c in checks] == [(c.name, PASS) for c in checks], [
        (c.name, c.message, [d.describe() for d in c.deviations[:3]]) for c in checks if c.status != PASS
    ]


# ------------------------------------------------------------------ audit flags in baselines


def test_solve_case_attaches_the_solution_audit_and_the_baseline_records_its_flags():
    from solver.regress import audit_flags, solve_case

    result = solve_case(case_from_text(CASE_TEXT))
    audit = result.to_dict()["audit"]
    assert audit["scope"] == "solution" and audit["applicable"] is True
    assert len(audit["cmo_deviation"]) == result.stage_count
    recorded = baseline_from_result(result, "cases/column.toml")["audit_flags"]
    assert recorded == audit_flags(result) == sorted({item["code"] for item in audit["flags"]})
    assert "CMO_DEVIATION" in recorded  # methanol-water with real enthalpies
    # the same column under constant molar overflow: nothing to flag
    cmo = solve_case(case_from_text(CASE_TEXT.replace('enthalpy = "rigorous"', 'enthalpy = "cmo"')))
    assert cmo.to_dict()["audit"]["applicable"] is True and audit_flags(cmo) == []
