"""What ``traystack components`` shows: CoolProp's usable pure fluids (from the shipped index
:mod:`solver.fluids`, so a search imports neither CoolProp nor ``chemicals``) beside
the compounds of the handbook library (:mod:`solver.handbook`, its shipped name index), found by
name, alias or synonym, CAS number or formula; and, for one exact name, where each of its
properties comes from."""

from __future__ import annotations

import difflib
from dataclasses import dataclass
from functools import lru_cache

from solver.components import list_components, usable_coolprop_name
from solver.fluids import fluid_aliases
from solver.handbook.names import AmbiguousFormula, IndexEntry, entries, find, loose, search

__all__ = ["CoolPropFluid", "Matches", "close_names", "coolprop_fluid", "exact_handbook", "matches"]


@dataclass(frozen=True)
class CoolPropFluid:
    """One usable CoolProp fluid as the index records it (SI)."""

    name: str  # lower case
    coolprop_name: str
    aliases: tuple[str, ...]
    molar_mass: float
    normal_boiling_point: float | None
    critical_temperature: float
    critical_pressure: float


@dataclass(frozen=True)
class Matches:
    """The CoolProp fluids and the handbook compounds a pattern finds."""

    coolprop: tuple[CoolPropFluid, ...]
    handbook: tuple[IndexEntry, ...]


@lru_cache(maxsize=1)
def _fluids() -> dict[str, CoolPropFluid]:
    """Every usable CoolProp fluid by its CoolProp name, in the order of the component registry."""
    return {
        info.coolprop_name: CoolPropFluid(info.name, info.coolprop_name, fluid_aliases(info.coolprop_name),
                                          info.molar_mass, info.normal_boiling_point, info.critical_temperature,
                                          info.critical_pressure)
        for info in list_components()
    }


def coolprop_fluid(name: str) -> CoolPropFluid | None:
    """The usable CoolProp fluid called ``name`` (name or alias, any case; spaces, hyphens and
    underscores optional: :func:`solver.components.usable_coolprop_name`), or None."""
    fluid = usable_coolprop_name(name)
    return None if fluid is None else _fluids()[fluid]


def matches(pattern: str | None) -> Matches:
    """The CoolProp fluids whose name or an alias contains ``pattern`` (ignoring case; a shell
    glob when it has ``*``, ``?`` or ``[``: :func:`solver.components.list_components`) and the
    handbook compounds whose name, a synonym, the CAS number or the formula does; everything
    without a pattern."""
    fluids = _fluids()
    return Matches(tuple(fluids[info.coolprop_name] for info in list_components(pattern)), tuple(search(pattern)))


def exact_handbook(name: str) -> IndexEntry | None:
    """The handbook compound of exactly this name, synonym, CAS number or unique formula."""
    try:
        return find(name)
    except AmbiguousFormula:
        return None


def close_names(name: str, extra=(), count: int = 3) -> list[str]:
    """Up to ``count`` names close to ``name`` (difflib's ratio, best first; then on names
    without spaces, hyphens, underscores and commas) among the usable CoolProp fluids and their
    aliases, the handbook library's compounds and their synonyms, and the names in ``extra``
    (user-defined components); each answer is the canonical name."""
    candidates: dict[str, str] = {key.lower(): key.lower() for key in extra}
    for fluid in _fluids().values():
        for key in (fluid.name, *fluid.aliases):
            candidates.setdefault(key.lower(), fluid.name)
    for entry in entries():
        if not entry.refused:
            for key in (entry.name, *entry.synonyms):
                candidates.setdefault(key.lower(), entry.name)
    found = difflib.get_close_matches(name.strip().lower(), candidates, n=4 * count, cutoff=0.6)
    if not found:
        candidates = {loose(key): value for key, value in candidates.items()}
        found = difflib.get_close_matches(loose(name), candidates, n=4 * count, cutoff=0.6)
    names: list[str] = []
    for key in found:
        if candidates[key] not in names:
            names.append(candidates[key])
    return names[:count]
