"""Baseline comparison for CI: ``traystack check CASES_DIR``.

Every ``NAME.toml`` in the folder that has a baseline ``NAME.expected.json`` beside it is
solved again and compared with the baseline, quantity by quantity:

=====================  ==============================================  =================
quantity               compared as                                     tolerance key
=====================  ==============================================  =================
converged              must be true                                    --
condenser, reboiler    relative difference                             ``duty_rel``
duty (a network: every
duty by name)
connection rates       relative difference (networks)                  ``flow_rel``
product flows          relative difference                             ``flow_rel``
reflux, boilup ratio   relative difference (ratios of flows)           ``flow_rel``
product compositions   absolute difference of mole fractions           ``composition_abs``
stage temperatures     absolute difference [K], stage by stage         ``temperature_abs``
audit flags            the same set of flag codes (of the audit that   --
                       needs no extra solve, see :func:`solve_case`)
components, stage      the same                                        --
count, products
=====================  ==============================================  =================

The tolerances come from the case's ``[check] tolerances`` table, key by key, else
:data:`DEFAULT_TOLERANCES`. The defaults sit far above what the solver itself can move and far
below what matters in a design. Newton stops when the largest scaled residual is at most 1e-9
(component balances in fractions of the total feed, enthalpy balances in fractions of feed
times a latent heat, equilibrium in mole fraction) after a quadratic last step. Solving four
of the demo cases (methanol_water, benzene_toluene, lpg_splitter, naphtha_side_draw) again from
starting profiles perturbed by 2 % moved duties, flows and ratios by at most 3e-10 relative,
mole fractions by 6e-11 and stage temperatures by 2e-8 K (measured while writing this module):
the defaults leave a factor of more than 1000 for other platforms' arithmetic and changed
starting profiles. Anything beyond them is a real change of data, model or code; a case that
should tolerate more says so in its ``[check]`` table.

The baseline is JSON (schema ``traystack-baseline/1``) in SI units, written atomically and
only when ``--update`` asks for it (:func:`write_baseline`). The solve and the comparison of
one case run in :func:`check_case`, a plain function of picklable arguments, so cases can run in
parallel processes through any :class:`concurrent.futures.Executor`.
"""

from __future__ import annotations

import json
import math
import os
import time
import xml.etree.ElementTree as ElementTree
from concurrent.futures import Executor, as_completed
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable, Iterable, Mapping, Sequence

from . import __version__
from .case import TOLERANCE_KEYS, Case, load_case
from .network_engine import simulate_network
from .network_results import NetworkResult
from .errors import CaseError, TraystackError
from .audit import AuditReport, SolutionAudit, audit_solution
from .results import Result, write_atomic
from .engine import simulate
from .thermo.package import ThermoPackage
from .reports.display import DisplayUnits

__all__ = [
    "BASELINE_SCHEMA",
    "DEFAULT_TOLERANCES",
    "Deviation",
    "CaseCheck",
    "baseline_path",
    "find_cases",
    "solve_case",
    "audit_flags",
    "baseline_from_result",
    "baseline_from_network_result",
    "compare_baselines",
    "check_case",
    "check_cases",
    "tolerances_for",
    "write_baseline",
    "headlines",
    "junit_xml",
]

BASELINE_SCHEMA = "traystack-baseline/1"
BASELINE_SUFFIX = ".expected.json"

#: Tolerances used when a case's [check] table does not give one (see the module docstring).
DEFAULT_TOLERANCES: Mapping[str, float] = {
    "duty_rel": 1e-6,  # relative
    "flow_rel": 1e-6,  # relative; also for reflux and boilup ratios
    "composition_abs": 1e-7,  # mole fraction
    "temperature_abs": 1e-4,  # K
}

#: Status of a checked case, as shown and as JUnit counts it.
PASS, DRIFT, FAILED, NO_BASELINE, WRITTEN, UPDATED = "pass", "drift", "failed", "no baseline", "baseline written", "baseline updated"


@dataclass(frozen=True)
class Deviation:
    """One quantity that moved beyond its tolerance (or a structural change when ``tolerance``
    is None: other components, another stage count, a product that appeared or vanished)."""

    quantity: str  # "duties.reboiler", "products.distillate.composition.methanol", "stage_temperatures[12]"
    baseline: Any
    current: Any
    difference: float | None = None  # relative for *_rel tolerances, absolute otherwise
    tolerance: float | None = None
    measure: str = ""  # "rel" | "abs" | ""

    def describe(self, units: DisplayUnits | None = None) -> str:
        """One line: the quantity, baseline -> now, and the difference against its tolerance;
        with ``units`` the values in display units (temperatures, flows, duties) and an absolute
        temperature difference in kelvin."""
        if self.tolerance is None:
            return f"{self.quantity}: {self.baseline} -> {self.current}"
        baseline, current, unit = _in_units(self.quantity, self.baseline, self.current, units)
        measure = f"{self.measure} {self.difference:.2e}" + (" K" if unit and self.quantity.startswith("stage_") else "")
        return f"{self.quantity}: {_number(baseline)} -> {_number(current)}{unit} ({measure} > {self.tolerance:.0e})"

    @property
    def excess(self) -> float:
        """How many times the tolerance the difference is (infinite for structural changes)."""
        if self.tolerance is None or self.difference is None:
            return math.inf
        return self.difference / self.tolerance


@dataclass(frozen=True)
class CaseCheck:
    """The outcome of checking one case (plain data, picklable)."""

    name: str
    case_file: str
    status: str  # PASS | DRIFT | FAILED | NO_BASELINE (WRITTEN | UPDATED after --update)
    message: str = ""
    deviations: tuple[Deviation, ...] = ()
    iterations: int | None = None
    seconds: float = 0.0
    baseline_version: str | None = None
    current: Mapping[str, Any] | None = field(default=None, repr=False)  # the new baseline, if the case solved

    @property
    def ok(self) -> bool:
        return self.status in (PASS, NO_BASELINE, WRITTEN, UPDATED)


def _in_units(quantity: str, baseline: Any, current: Any, units: DisplayUnits | None) -> tuple[Any, Any, str]:
    """(baseline, current, " unit") of a compared number in display units (SI when ``units``
    is None, with no unit named, as the baseline file holds them)."""
    if units is None or not all(isinstance(v, (int, float)) for v in (baseline, current)):
        return baseline, current, ""
    if quantity.startswith("stage_temperatures"):
        return units.T(baseline), units.T(current), f" {units.temperature_label}"
    if quantity.startswith("duties."):
        return units.Q(baseline), units.Q(current), f" {units.duty}"
    if quantity.endswith(".flow"):
        return units.F(baseline), units.F(current), f" {units.flow}"
    return baseline, current, ""


def headlines(deviations: Sequence[Deviation], units: DisplayUnits | None = None) -> list[str]:
    """A short account of what moved: every duty, ratio, product flow and structural change,
    the worst composition of each product, and the worst stage temperature with a count."""
    lines, worst_composition, temperatures = [], {}, []
    for deviation in deviations:  # worst first
        if deviation.quantity.startswith("stage_temperatures["):
            temperatures.append(deviation)
        elif ".composition." in deviation.quantity:
            product = deviation.quantity.split(".composition.")[0]
            worst_composition.setdefault(product, deviation)
        else:
            lines.append(deviation.describe(units))
    lines += [deviation.describe(units) for deviation in worst_composition.values()]
    if temperatures:
        more = f" (worst of {len(temperatures)} stages that moved)" if len(temperatures) > 1 else ""
        lines.append(temperatures[0].describe(units) + more)
    return lines


def _number(value: Any) -> str:
    return f"{value:.10g}" if isinstance(value, (int, float)) and not isinstance(value, bool) else str(value)


# =======================================================================================
# Baselines
# =======================================================================================


def baseline_path(case_file: str | os.PathLike) -> Path:
    """``cases/NAME.toml`` -> ``cases/NAME.expected.json``."""
    path = Path(case_file)
    return path.with_name(path.stem + BASELINE_SUFFIX)


def find_cases(location: str | os.PathLike) -> list[Path]:
    """The case files to check: every ``*.toml`` directly in the folder ``location`` (sorted by
    name), or ``location`` itself when it is a case file. Raises :class:`CaseError` when there
    is nothing to check."""
    path = Path(location)
    if path.is_file():
        return [path]
    if not path.is_dir():
        raise CaseError("no such folder", file=str(path), expected="a folder of case files (NAME.toml)")
    cases = sorted(p for p in path.glob("*.toml") if p.is_file())
    if not cases:
        raise CaseError("the folder holds no case files", file=str(path), expected="NAME.toml files")
    return cases


def solve_case(case: Case) -> Result:
    """The solve a check runs and a baseline records: the rigorous solution with the part of
    the audit that needs no further rigorous solve attached (:func:`solver.audit.audit_solution`:
    CMO deviation, feed condition, CMO duty estimates, tangent pinch and pinch of the enthalpy
    construction at the solution's own products and reflux), so that those flags enter the
    baseline through :func:`audit_flags`. The full audit (``traystack audit``) solves the
    shortcut's column and searches stage counts; at 5 to 30 rigorous solves a case it is left
    out of ``check``."""
    thermo = ThermoPackage.from_case(case)
    result = simulate(case, thermo=thermo)
    return audit_solution(case, result, thermo=thermo)


def audit_flags(result: Result) -> list[str]:
    """Sorted flag codes of the audit attached to ``result`` (``result.extra["audit"]``), if any."""
    audit = result.extra.get("audit")
    return sorted({flag.code for flag in audit.flags}) if isinstance(audit, (AuditReport, SolutionAudit)) else []


def _baseline_header(result: Result | NetworkResult, case_file: str) -> dict[str, Any]:
    """The fields every baseline begins with: schema, case, title, version, units, whether and
    how it converged, components."""
    return {
        "schema": BASELINE_SCHEMA,
        "case": Path(case_file).name if case_file else "",
        "title": result.title,
        "traystack_version": __version__,
        "units": {"temperature": "K", "flow": "mol/s", "duty": "W", "composition": "mole fraction"},
        "converged": bool(result.converged),
        "iterations": int(result.iterations),
        "components": list(result.components),
    }


def baseline_from_result(result: Result, case_file: str = "") -> dict[str, Any]:
    """What a baseline records of a result (SI units)."""
    names = list(result.components)
    return {
        **_baseline_header(result, case_file),
        "duties": {"condenser": result.condenser_duty, "reboiler": result.reboiler_duty},
        "reflux_ratio": result.reflux_ratio,
        "boilup_ratio": result.boilup_ratio,
        "products": {
            name: {"flow": product["flow"], "composition": dict(zip(names, product["composition"]))}
            for name, product in result.products().items()
        },
        "stage_temperatures": [float(T) for T in result.temperature],
        "audit_flags": audit_flags(result),
    }


def baseline_from_network_result(result: NetworkResult, case_file: str = "") -> dict[str, Any]:
    """What a baseline records of a network's result: the same fields as for one column, with
    every duty and product by name and the stage temperatures of all columns in order."""
    names = list(result.components)
    return {
        **_baseline_header(result, case_file),
        "columns": [column["name"] for column in result.columns],
        "duties": dict(result.duties),
        "reflux_ratio": None,
        "boilup_ratio": None,
        "products": {
            name: {"flow": product["flow"], "composition": dict(zip(names, product["composition"]))}
            for name, product in result.products.items()
        },
        "connections": {name: connection["flow"] for name, connection in result.connections.items()},
        "stage_temperatures": [float(T) for T in result.temperature],
        "audit_flags": [],
    }


def write_baseline(path: str | os.PathLike, baseline: Mapping[str, Any]) -> Path:
    """Write ``baseline`` as JSON to ``path`` atomically."""
    return write_atomic(path, json.dumps(baseline, indent=2, allow_nan=False) + "\n")


def tolerances_for(case: Case) -> dict[str, float]:
    """The case's [check] tolerances over :data:`DEFAULT_TOLERANCES`."""
    return {key: float(case.check.get(key, DEFAULT_TOLERANCES[key])) for key in TOLERANCE_KEYS}


# =======================================================================================
# Comparison
# =======================================================================================


def _relative(quantity: str, baseline: Any, current: Any, tolerance: float) -> Deviation | None:
    if baseline is None or current is None:
        return None if baseline is current else Deviation(quantity, baseline, current)
    scale = max(abs(baseline), abs(current), 1e-300)
    difference = abs(current - baseline) / scale
    return Deviation(quantity, baseline, current, difference, tolerance, "rel") if not difference <= tolerance else None


def _absolute(quantity: str, baseline: float, current: float, tolerance: float) -> Deviation | None:
    difference = abs(current - baseline)
    return Deviation(quantity, baseline, current, difference, tolerance, "abs") if not difference <= tolerance else None


def compare_baselines(baseline: Mapping[str, Any], current: Mapping[str, Any], tolerances: Mapping[str, float]) -> list[Deviation]:
    """Every quantity of ``current`` that moved from ``baseline`` beyond ``tolerances``, worst
    first (structural changes lead)."""
    found: list[Deviation | None] = []
    if list(baseline.get("components", [])) != list(current.get("components", [])):
        return [Deviation("components", baseline.get("components"), current.get("components"))]
    duty_names = ("condenser", "reboiler") + tuple(sorted((set(baseline["duties"]) | set(current["duties"])) - {"condenser", "reboiler"}))
    for key in duty_names:  # a column's two duties, or every duty of a network by name
        found.append(_relative(f"duties.{key}", baseline["duties"].get(key), current["duties"].get(key), tolerances["duty_rel"]))
    old_connections, new_connections = baseline.get("connections", {}), current.get("connections", {})
    for key in sorted(set(old_connections) | set(new_connections)):
        found.append(_relative(f"connections.{key}.flow", old_connections.get(key), new_connections.get(key), tolerances["flow_rel"]))
    for key in ("reflux_ratio", "boilup_ratio"):
        found.append(_relative(key, baseline.get(key), current.get(key), tolerances["flow_rel"]))
    old_products, new_products = baseline.get("products", {}), current.get("products", {})
    for name in sorted(set(old_products) | set(new_products)):
        if name not in old_products or name not in new_products:
            found.append(Deviation(f"products.{name}", "present" if name in old_products else "absent",
                                   "present" if name in new_products else "absent"))
            continue
        old, new = old_products[name], new_products[name]
        found.append(_relative(f"products.{name}.flow", old["flow"], new["flow"], tolerances["flow_rel"]))
        for component, x in old["composition"].items():
            found.append(_absolute(f"products.{name}.composition.{component}", x, new["composition"][component],
                                   tolerances["composition_abs"]))
    old_T, new_T = baseline.get("stage_temperatures", []), current.get("stage_temperatures", [])
    if len(old_T) != len(new_T):
        found.append(Deviation("stage count", len(old_T), len(new_T)))
    else:
        for j, (old, new) in enumerate(zip(old_T, new_T)):
            found.append(_absolute(f"stage_temperatures[{j + 1}]", old, new, tolerances["temperature_abs"]))
    old_flags, new_flags = sorted(baseline.get("audit_flags", [])), sorted(current.get("audit_flags", []))
    if old_flags != new_flags:
        found.append(Deviation("audit_flags", old_flags, new_flags))
    return sorted((d for d in found if d is not None), key=lambda d: -d.excess)


def check_case(case_file: str, without_baseline: bool = True) -> CaseCheck:
    """Solve the case in ``case_file`` and compare it with its baseline (if there is one; a
    case without one is solved only when ``without_baseline``, else listed as such).

    Never raises for a bad case or a failed solve: those come back as status ``failed`` with
    the message. The baseline file is only read here; writing is the caller's decision
    (:func:`check_cases`)."""
    started = time.perf_counter()
    name = Path(case_file).stem
    expected_file = baseline_path(case_file)
    if not without_baseline and not expected_file.exists():
        return CaseCheck(name, str(case_file), NO_BASELINE, f"no baseline {expected_file.name}: not run")
    try:
        case = load_case(case_file)
        if case.network is not None:
            result = simulate_network(case)
            current = baseline_from_network_result(result, case_file)
        else:
            result = solve_case(case)
            current = baseline_from_result(result, case_file)
    except TraystackError as exc:
        return CaseCheck(name, str(case_file), FAILED, str(exc), seconds=time.perf_counter() - started)
    seconds = time.perf_counter() - started
    if not result.converged:
        return CaseCheck(name, str(case_file), FAILED, f"did not converge: {result.message}",
                         iterations=result.iterations, seconds=seconds)
    if not expected_file.exists():
        return CaseCheck(name, str(case_file), NO_BASELINE, f"no baseline {expected_file.name}",
                         iterations=result.iterations, seconds=seconds, current=current)
    try:
        baseline = json.loads(expected_file.read_text(encoding="utf-8"))
        if baseline.get("schema") != BASELINE_SCHEMA:
            raise ValueError(f"schema {baseline.get('schema')!r}, expected {BASELINE_SCHEMA!r}")
        if not baseline.get("converged", False):
            raise ValueError("the baseline records an unconverged solution")
        deviations = compare_baselines(baseline, current, tolerances_for(case))
    except (OSError, ValueError, KeyError, TypeError, AttributeError) as exc:
        return CaseCheck(name, str(case_file), FAILED, f"unreadable baseline {expected_file.name}: {exc}",
                         iterations=result.iterations, seconds=seconds, current=current)
    status = DRIFT if deviations else PASS
    message = f"{len(deviations)} quantit{'y' if len(deviations) == 1 else 'ies'} moved" if deviations else ""
    return CaseCheck(name, str(case_file), status, message, tuple(deviations), result.iterations, seconds,
                     baseline.get("traystack_version"), current)


def check_cases(
    case_files: Sequence[str | os.PathLike],
    executor: Executor,
    *,
    update: bool = False,
    progress: Callable[[CaseCheck], None] | None = None,
) -> list[CaseCheck]:
    """Check every case through ``executor`` (one :func:`check_case` per case), in the order of
    ``case_files``. With ``update``, a case that drifted or had no baseline gets a new one
    (written atomically), and only then is a case without baseline solved; a passing baseline is left as it is, byte for byte, and a case that
    failed never gets one."""
    futures = {executor.submit(check_case, str(path), update): index for index, path in enumerate(case_files)}
    checks: list[CaseCheck | None] = [None] * len(futures)
    for future in as_completed(futures):
        outcome = future.result()
        if update and outcome.status in (DRIFT, NO_BASELINE) and outcome.current is not None:
            write_baseline(baseline_path(outcome.case_file), outcome.current)
            outcome = CaseCheck(
                outcome.name, outcome.case_file, UPDATED if outcome.status == DRIFT else WRITTEN,
                outcome.message, outcome.deviations, outcome.iterations, outcome.seconds,
                outcome.baseline_version, outcome.current,
            )
        checks[futures[future]] = outcome
        if progress is not None:
            progress(outcome)
    return [check for check in checks if check is not None]


# =======================================================================================
# JUnit XML
# =======================================================================================


def junit_xml(checks: Iterable[CaseCheck], *, suite: str = "traystack check", seconds: float | None = None) -> str:
    """A JUnit XML report: one testcase per case; drift is a failure, a failed solve or bad
    case an error, a case without baseline is skipped."""
    checks = list(checks)
    failures = sum(check.status == DRIFT for check in checks)
    errors = sum(check.status == FAILED for check in checks)
    skipped = sum(check.status == NO_BASELINE for check in checks)
    total = seconds if seconds is not None else sum(check.seconds for check in checks)
    counts = {"tests": str(len(checks)), "failures": str(failures), "errors": str(errors), "skipped": str(skipped),
              "time": f"{total:.3f}"}
    root = ElementTree.Element("testsuites", name=suite, **counts)
    suite_element = ElementTree.SubElement(root, "testsuite", name=suite, **counts,
                                           timestamp=time.strftime("%Y-%m-%dT%H:%M:%S"))
    for check in checks:
        case = ElementTree.SubElement(suite_element, "testcase", classname="traystack.check", name=check.name,
                                      file=check.case_file, time=f"{check.seconds:.3f}")
        if check.status == DRIFT:
            failure = ElementTree.SubElement(case, "failure", message=check.message, type="drift")
            failure.text = "\n".join(deviation.describe() for deviation in check.deviations)
        elif check.status == FAILED:
            ElementTree.SubElement(case, "error", message=check.message, type="failed")
        elif check.status == NO_BASELINE:
            ElementTree.SubElement(case, "skipped", message=check.message)
    ElementTree.indent(root)
    return ElementTree.tostring(root, encoding="unicode", xml_declaration=True) + "\n"
