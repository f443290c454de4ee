"""One handbook component: the :class:`~solver.thermo.data.ComponentData` (SI) of a compound, each
property from the first table in the order of preference that has it, and the record of
where each property came from.

The vapor pressure must reproduce the compound's handbook normal boiling point within
:data:`BOILING_POINT_TOLERANCE`: a vapor-pressure table whose correlation does not (or whose
range does not include that boiling point) is passed over, with a note, for the next one; a
compound that no table passes is refused with the numbers (:class:`~solver.errors.CaseError`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from functools import lru_cache

import numpy as np

from solver.thermo.data import ComponentData, Correlation
from solver.errors import CaseError
from solver.handbook import tables
from solver.handbook.formula import molar_mass
from solver.handbook.sources import TABLES
from solver.thermo.extrapolation import acentric_factor, evaluate_log

__all__ = [
    "BOILING_POINT_TOLERANCE",
    "HandbookComponent",
    "PropertySource",
    "boiling_point_of",
    "build_component",
    "check_normal_boiling_point",
]

#: Largest allowed difference (K) between the handbook normal boiling point and the one the
#: vapor-pressure correlation gives.
BOILING_POINT_TOLERANCE = 0.5
ATMOSPHERE = 101325.0  # Pa
#: Agreement of a critical table with the other sources: Tc within the larger of 2 K and 0.5 %,
#: Pc within 5 % (a judgement: the evaluated tables differ by more only for compounds unstable
#: near their critical point, or by a misprint).
CRITICAL_AGREEMENT = (2.0, 0.005, 0.05)


@dataclass(frozen=True)
class PropertySource:
    """Where one property of a handbook component comes from."""

    prop: str  # "molar mass", "critical temperature", "vapor pressure", ...
    table: str  # key in solver.handbook.sources.TABLES
    form: str  # correlation form, or "constant"
    value: float | None = None  # SI, for constants
    T_min: float | None = None  # K
    T_max: float | None = None  # K

    @property
    def citation(self) -> str:
        return TABLES[self.table].citation

    @property
    def title(self) -> str:
        return TABLES[self.table].title


@dataclass(frozen=True)
class HandbookComponent:
    """A compound of the handbook library: identity, the data the thermo layer uses, the
    acentric factor (for the extrapolation toward Tc) and the provenance of every property;
    ``notes`` tells which preferred tables were passed over and why."""

    cas: str
    name: str
    formula: str
    data: ComponentData
    acentric_factor: float
    sources: tuple[PropertySource, ...]
    notes: tuple[str, ...]


def boiling_point_of(corr: Correlation, Tc: float | None = None) -> float | None:
    """Temperature (K) at which the vapor-pressure correlation gives 101325 Pa within its
    range, or None when it does not reach 101325 Pa there."""
    low = corr.T_min if corr.T_min is not None else 1.0
    high = corr.T_max if corr.T_max is not None else (Tc or 2000.0)
    if "Tc" in corr.coefficients:
        high = min(high, float(corr.coefficients["Tc"]))
    target = math.log(ATMOSPHERE)

    def gap(T: float) -> float:
        return float(evaluate_log(corr, np.array([T]), Tc)[0][0]) - target

    try:
        if not (gap(low) < 0.0 < gap(high)):
            return None
        from scipy.optimize import brentq  # scipy.optimize only when a boiling point is solved for

        return float(brentq(gap, low, high, xtol=1e-9))
    except (ValueError, FloatingPointError):
        return None


def check_normal_boiling_point(
    name: str, corr: Correlation, source: str, Tb: float, Tb_source: str, Tc: float | None = None
) -> float:
    """The boiling point the correlation gives, if within :data:`BOILING_POINT_TOLERANCE` of
    the handbook's ``Tb`` (K); else :class:`~solver.errors.CaseError` with both numbers and
    both sources."""
    computed = boiling_point_of(corr, Tc)
    if computed is None:
        raise CaseError(
            f"component {name!r} refused: its vapor pressure ({source}) does not reach 101325 Pa within its "
            f"range {_range(corr)}, so it cannot reproduce the normal boiling point {Tb:.2f} K ({Tb_source})"
        )
    if abs(computed - Tb) > BOILING_POINT_TOLERANCE:
        raise CaseError(
            f"component {name!r} refused: its vapor pressure ({source}) gives 101325 Pa at {computed:.2f} K, but "
            f"the normal boiling point is {Tb:.2f} K ({Tb_source}); they differ by {abs(computed - Tb):.2f} K, "
            f"more than {BOILING_POINT_TOLERANCE} K"
        )
    return computed


@lru_cache(maxsize=None)
def build_component(cas: str, name: str, formula: str) -> HandbookComponent:
    """The handbook component of CAS number ``cas`` (named ``name``, formula ``formula``);
    :class:`~solver.errors.CaseError` when a property is missing from every table or the
    boiling-point check refuses it. Reads the tables through ``chemicals`` (cached)."""
    notes: list[str] = []
    sources: list[PropertySource] = []
    try:
        M = molar_mass(formula)
    except ValueError as exc:
        raise CaseError(f"component {name!r} ({cas}): {exc}") from None
    sources.append(PropertySource("molar mass", "atomic-weights", "constant", M))

    critical = _critical_constants(name, cas, notes)
    Tc, Pc = critical.values["Tc"], critical.values["Pc"]
    sources.append(PropertySource("critical temperature", critical.table, "constant", Tc))
    sources.append(PropertySource("critical pressure", critical.table, "constant", Pc))
    boiling = _first(tables.normal_boiling_point(cas), name, cas, "normal boiling point")
    Tb = boiling.values["Tb"]
    sources.append(PropertySource("normal boiling point", boiling.table, "constant", Tb))

    correlations = {
        prop: _first(candidates, name, cas, prop)
        for prop, candidates in (
            ("heat of vaporization", tables.heat_of_vaporization(cas)),
            ("ideal-gas heat capacity", tables.ideal_gas_cp(cas)),
            ("liquid molar volume", tables.liquid_molar_volume(cas, critical)),
        )
    }
    pressure_key, pressure = _vapor_pressure(name, cas, Tb, boiling.table, Tc, notes)
    correlations = {"vapor pressure": (pressure_key, pressure), **correlations}
    for prop, (key, corr) in correlations.items():
        sources.append(PropertySource(prop, key, corr.form, None, corr.T_min, corr.T_max))

    data = ComponentData(
        name=name,
        molar_mass=M,
        critical_temperature=Tc,
        critical_pressure=Pc,
        vapor_pressure=pressure,
        ideal_gas_cp=correlations["ideal-gas heat capacity"][1],
        heat_of_vaporization=correlations["heat of vaporization"][1],
        liquid_molar_volume=correlations["liquid molar volume"][1],
        normal_boiling_point=Tb,
        source="; ".join(f"{s.prop}: {s.title}" for s in sources),
        origin="handbook",
    )
    omega = acentric_factor(pressure, Tc, Pc, Tb)
    return HandbookComponent(cas, name, formula, data, omega, tuple(sources), tuple(notes))


def _vapor_pressure(name: str, cas: str, Tb: float, Tb_table: str, Tc: float, notes: list[str]) -> tuple[str, Correlation]:
    candidates = tables.vapor_pressure(cas)
    if not candidates:
        raise CaseError(f"component {name!r} ({cas}) has no vapor pressure in the handbook tables")
    refusals = []
    for key, corr in candidates:
        try:
            check_normal_boiling_point(name, corr, TABLES[key].title, Tb, TABLES[Tb_table].title, Tc)
        except CaseError as exc:
            refusals.append(exc.problem.split(" refused: ", 1)[1])
            continue
        notes.extend(f"vapor pressure: passed over: {text}" for text in refusals)
        return key, corr
    raise CaseError(f"component {name!r} ({cas}) refused: no vapor-pressure table reproduces its normal boiling "
                    "point: " + "; ".join(refusals))


def _critical_constants(name: str, cas: str, notes: list[str]) -> tables.Constant:
    """The first critical table (in the order of preference) whose Tc and Pc the other
    sources confirm within :data:`CRITICAL_AGREEMENT`: with three or more sources (the critical
    tables and the critical points of the Wagner vapor-pressure tables) another critical table
    or the median of all sources, with two the other source. A table the others do not confirm is passed over with
    a note (rows filed under the wrong compound or with a misprint show this way); two sources
    that disagree leave the preferred one, with a note; a single source is taken as it is."""
    found = tables.critical_constants(cas)
    _first(found, name, cas, "critical constants")
    sources = [(c.table, c.values["Tc"], c.values["Pc"]) for c in found]
    sources += [(key, float(corr.coefficients["Tc"]), float(corr.coefficients["Pc"]))
                for key, corr in tables.vapor_pressure(cas) if corr.form == "wagner"]
    if len(sources) == 1:
        notes.append(f"critical constants: {TABLES[found[0].table].title} is the only source; not cross-checked")
        return found[0]
    if len(sources) == 2:
        (_, T0, P0), (other, T1, P1) = sources
        if not _agree(T0, P0, T1, P1):
            notes.append(f"critical constants: {TABLES[found[0].table].title} disagrees with {TABLES[other].title} "
                         f"(Tc = {T1:.2f} K, Pc = {P1 / 1e6:.4g} MPa); the preferred table is used")
        return found[0]
    T_median = float(np.median([T for _, T, _ in sources]))
    P_median = float(np.median([P for _, _, P in sources]))
    for candidate in found:
        Tc, Pc = candidate.values["Tc"], candidate.values["Pc"]
        confirmed_by_table = any(
            other.table != candidate.table and _agree(Tc, Pc, other.values["Tc"], other.values["Pc"]) for other in found
        )
        if confirmed_by_table or _agree(Tc, Pc, T_median, P_median):
            return candidate
        notes.append(f"critical constants: passed over {TABLES[candidate.table].title} (Tc = {Tc:.2f} K, "
                     f"Pc = {Pc / 1e6:.4g} MPa): the other sources give Tc = {T_median:.2f} K, Pc = {P_median / 1e6:.4g} MPa")
    raise CaseError(f"component {name!r} ({cas}): no critical table agrees with the median of the sources "
                    + "; ".join(f"{TABLES[key].title}: Tc = {T:.2f} K, Pc = {P / 1e6:.4g} MPa" for key, T, P in sources))


def _agree(Tc: float, Pc: float, T_other: float, P_other: float) -> bool:
    T_tolerance, T_relative, P_relative = CRITICAL_AGREEMENT
    return abs(Tc - T_other) <= max(T_tolerance, T_relative * Tc) and abs(Pc - P_other) <= P_relative * P_other


def _first(candidates: list, name: str, cas: str, prop: str):
    if not candidates:
        raise CaseError(f"component {name!r} ({cas}) has no {prop} in the handbook tables")
    return candidates[0]


def _range(corr: Correlation) -> str:
    low = "?" if corr.T_min is None else f"{corr.T_min:.2f}"
    high = "?" if corr.T_max is None else f"{corr.T_max:.2f}"
    return f"{low} to {high} K"
