"""Identity and constants of pure components: CoolProp fluids, handbook-library compounds and
user-defined components.

A component named in a case is looked up first among the components the user defined under
``[components.data.NAME]`` (and those the case reader took from the handbook library,
:mod:`solver.handbook`), then among CoolProp's pure fluids, by name or alias, ignoring
case (``"n-heptane"``, ``"N-HEPTANE"``, ``"heptane"`` and ``"nC7H16"`` all give CoolProp's
``n-Heptane``). Constants of CoolProp fluids come from the fluid's reference equation of state
through ``AbstractState("HEOS", name)`` (Bell et al. 2014, Ind. Eng. Chem. Res. 53, 2498-2508,
for CoolProp itself), read from the index of :mod:`solver.fluids`, so that looking a component
up does not import CoolProp.

Pseudo-pure mixtures (R404A, Air, ...) and fluids whose saturation curve CoolProp cannot compute
are not offered: a distillation column needs each component's vapor pressure.
"""

from __future__ import annotations

import fnmatch
from dataclasses import dataclass
from functools import lru_cache
from typing import Mapping

from solver.errors import CaseError
from solver.fluids import coolprop_name, coolprop_version, fluid_aliases, fluid_entry, fluid_names, fluid_parameter
from solver.thermo.data import ComponentData

__all__ = ["ComponentInfo", "component_info", "coolprop_source", "list_components", "usable_coolprop_name"]


@dataclass(frozen=True)
class ComponentInfo:
    """Constants of one pure component (SI)."""

    name: str  # the name as used in the case, lower case
    molar_mass: float  # kg/mol
    critical_temperature: float  # K
    critical_pressure: float  # Pa
    normal_boiling_point: float | None  # K, at 101325 Pa
    triple_temperature: float | None  # K
    backend: str  # "coolprop" | "handbook" | "user"
    coolprop_name: str | None
    source: str


def component_info(name: str, user_data: Mapping[str, ComponentData] | None = None) -> ComponentInfo:
    """Constants of the component ``name``: a user-defined component from ``user_data``
    (matched ignoring case) or a CoolProp pure fluid. Raises
    :class:`~solver.errors.CaseError` with a "did you mean" suggestion for an unknown name and
    for CoolProp fluids that cannot be used in a column (pseudo-pure mixtures)."""
    if not isinstance(name, str) or not name.strip():
        raise CaseError("a component name must be a non-empty string", key="components.names", value=name)
    data = _find_user_data(name, user_data)
    if data is not None:
        return _user_info(name, data)
    fluid = coolprop_name(name)
    if fluid is None:
        from solver.catalog import close_names

        close = close_names(name, user_data or {})
        hint = "; did you mean " + " or ".join(repr(n) for n in close) + "?" if close else ""
        raise CaseError(
            f"unknown component {name.strip()!r}" + hint,
            key="components.names",
            expected="a CoolProp fluid or a handbook-library compound (list them with `traystack components`) or a "
            "name defined under [components.data]",
        )
    reason = _unusable_reason(fluid)
    if reason is not None:
        raise CaseError(
            f"component {name.strip()!r} (CoolProp {fluid}) cannot be used in a column: {reason}",
            key="components.names",
        )
    return _coolprop_info(fluid, name.strip().lower())


def list_components(pattern: str | None = None) -> list[ComponentInfo]:
    """Every usable CoolProp pure fluid, sorted by name; ``pattern`` keeps those whose name or
    an alias contains it (case-insensitive) or, if it has ``*``, ``?`` or ``[``, matches it as
    a shell-style glob."""
    infos = _all_coolprop_infos()
    if not pattern:
        return list(infos)
    text = pattern.strip().lower()
    glob = any(ch in text for ch in "*?[")
    chosen = []
    for info in infos:
        names = [info.name, *(fluid_aliases(info.coolprop_name))]
        names = [n.lower() for n in names]
        if glob:
            hit = any(fnmatch.fnmatchcase(n, text) for n in names)
        else:
            hit = any(text in n for n in names)
        if hit:
            chosen.append(info)
    return chosen


def usable_coolprop_name(name: str) -> str | None:
    """CoolProp's name of the fluid ``name`` when CoolProp has it as a pure fluid with a
    saturation curve (a column can use it), else None."""
    fluid = coolprop_name(name)
    return fluid if fluid is not None and _unusable_reason(fluid) is None else None


def coolprop_source(fluid: str) -> str:
    """The source line for a CoolProp fluid: version and the BibTeX keys CoolProp gives for the
    fluid's reference equation of state and ideal-gas heat capacity."""
    eos = fluid_parameter(fluid, "BibTeX-EOS") or "reference not stated by CoolProp"
    text = f"CoolProp {coolprop_version()} (reference EOS of {fluid}: {eos}"
    cp0 = fluid_parameter(fluid, "BibTeX-CP0")
    if cp0 and cp0 != eos:
        text += f"; ideal-gas heat capacity: {cp0}"
    return text + ")"


# --- helpers -----------------------------------------------------------------------------------


def _unusable_reason(fluid: str) -> str | None:
    return fluid_entry(fluid)["unusable"]


def _coolprop_constants(fluid: str) -> tuple[float, float, float, float | None, float]:
    entry = fluid_entry(fluid)
    return (entry["molar_mass"], entry["critical_temperature"], entry["critical_pressure"],
            entry["normal_boiling_point"], entry["triple_temperature"])


def _coolprop_info(fluid: str, name: str) -> ComponentInfo:
    molar_mass, Tc, Pc, Tb, Tt = _coolprop_constants(fluid)
    return ComponentInfo(
        name=name,
        molar_mass=molar_mass,
        critical_temperature=Tc,
        critical_pressure=Pc,
        normal_boiling_point=Tb,
        triple_temperature=Tt,
        backend="coolprop",
        coolprop_name=fluid,
        source=coolprop_source(fluid),
    )


@lru_cache(maxsize=1)
def _all_coolprop_infos() -> tuple[ComponentInfo, ...]:
    infos = [
        _coolprop_info(fluid, fluid.lower())
        for fluid in fluid_names()
        if _unusable_reason(fluid) is None
    ]
    return tuple(sorted(infos, key=lambda i: i.name))


def _find_user_data(name: str, user_data: Mapping[str, ComponentData] | None) -> ComponentData | None:
    if not user_data:
        return None
    key = name.strip().lower()
    for data_key, data in user_data.items():
        if data_key.strip().lower() == key or data.name.strip().lower() == key:
            return data
    return None


def _user_info(name: str, data: ComponentData) -> ComponentInfo:
    default_source = "handbook library" if data.origin == "handbook" else "user data (no source given)"
    return ComponentInfo(
        name=name.strip().lower(),
        molar_mass=data.molar_mass,
        critical_temperature=data.critical_temperature,
        critical_pressure=data.critical_pressure,
        normal_boiling_point=data.normal_boiling_point,
        triple_temperature=None,
        backend="handbook" if data.origin == "handbook" else "user",
        coolprop_name=None,
        source=data.source or default_source,
    )
