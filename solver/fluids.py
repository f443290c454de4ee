"""CoolProp's pure-fluid names: one index of names and aliases for every module that looks a
fluid up (the case reader for molar masses on a mass basis, the component registry).

Names match ignoring case; spaces, hyphens and underscores are optional where that leaves the
name unambiguous. CoolProp is imported on first use.
"""

from __future__ import annotations

import re
from functools import lru_cache

import CoolProp.CoolProp as CP

__all__ = [
    "coolprop_name",
    "fluid_aliases",
    "fluid_names",
    "fluid_parameter",
    "loose_key",
    "name_index",
]


def coolprop_name(name: str) -> str | None:
    """CoolProp's name of the fluid called ``name`` (a CoolProp name or alias, any case,
    spaces, hyphens and underscores optional), or None if CoolProp has no such fluid."""
    key = name.strip().lower()
    exact, loose = name_index()
    if key in exact:
        return exact[key]
    return loose.get(loose_key(key))


def loose_key(text: str) -> str:
    return re.sub(r"[\s_\-]", "", text.lower())


@lru_cache(maxsize=1)
def fluid_names() -> tuple[str, ...]:
    return tuple(CP.get_global_param_string("FluidsList").split(","))


@lru_cache(maxsize=None)
def fluid_aliases(fluid: str) -> tuple[str, ...]:
    text = fluid_parameter(fluid, "aliases")
    return tuple(a.strip() for a in text.split(",") if a.strip()) if text else ()


def fluid_parameter(fluid: str, key: str) -> str:
    try:
        return CP.get_fluid_param_string(fluid, key).strip()
    except Exception:  # CoolProp raises ValueError for keys a fluid lacks
        return ""


@lru_cache(maxsize=1)
def name_index() -> tuple[dict[str, str], dict[str, str]]:
    """(exact lower-case name or alias -> CoolProp name, loose key -> CoolProp name). A loose
    key (spaces, hyphens and underscores removed) that two fluids share is dropped."""
    exact: dict[str, str] = {}
    for fluid in fluid_names():
        exact.setdefault(fluid.lower(), fluid)
    for fluid in fluid_names():
        for alias in fluid_aliases(fluid):
            exact.setdefault(alias.lower(), fluid)
    loose: dict[str, str] = {}
    clashes: set[str] = set()
    for key, fluid in exact.items():
        lk = loose_key(key)
        if lk in loose and loose[lk] != fluid:
            clashes.add(lk)
        loose.setdefault(lk, fluid)
    for lk in clashes:
        del loose[lk]
    return exact, loose
